"""Faults of `osculate analyze` and `osculate summary`: nothing lost, nothing aborted.

Kills in the middle of a write, unreadable inputs, outputs that cannot be written, interrupts, and
the lines the commands print about them. Message wording is the CLI's own (python/osculate/cli/);
where a test checks a message, the comment says which argument, path or cell it must name.
"""

import inspect
import os
import re
import signal
import stat
import subprocess
import sys
import time
from pathlib import Path

import numpy as np
import osculate as osc
import pandas as pd
import pyarrow  # noqa: F401  (Parquet outputs; part of the test extra)
import pytest
from osculate import cli
from osculate._estimators import METHODS
from osculate.cli import _commands as cli_commands
from osculate.cli import _files as cli_files

BIG_TRACKS, BIG_PER_TRACK = 80, 10_000  # 800 000 rows: a CSV write of ~2 s, Parquet ~1 s
SMALL = ("--time", "t", "--position", "x,y", "--track", "id")
CLASS_NAME = re.compile(r"\b[A-Z][A-Za-z]*(Error|Exception|Invalid|Warning)\b")


def circles(tracks, per_track, seed):
    """`tracks` vehicles at 8 m/s on circles of random radius, 10 Hz, one block per vehicle."""
    rng = np.random.default_rng(seed)
    t = np.tile(np.arange(per_track) * 0.1, tracks)
    r = np.repeat(rng.uniform(20, 60, tracks), per_track)
    ids = np.repeat([f"v{k:03d}" for k in range(tracks)], per_track)
    return pd.DataFrame({"id": ids, "t": t, "x": r * np.cos(t * 8 / r), "y": r * np.sin(t * 8 / r)})


@pytest.fixture(scope="session")
def big_log(tmp_path_factory):
    """The large input, written once per session (Parquet: quick to read, slow outputs)."""
    path = tmp_path_factory.mktemp("big") / "big.parquet"
    circles(BIG_TRACKS, BIG_PER_TRACK, seed=11).to_parquet(path, index=False)
    return path


@pytest.fixture
def small_log(tmp_path):
    path = tmp_path / "small.csv"
    circles(3, 50, seed=5).to_csv(path, index=False)
    return path


def command(*args):
    return [sys.executable, "-m", "osculate.cli", *map(str, args)]


def run(*args, timeout=120):
    return subprocess.run(command(*args), capture_output=True, text=True, timeout=timeout)


def main(capsys, *args):
    """Run the command in this process: (exit status, stdout, stderr)."""
    try:
        code = cli.main([str(a) for a in args])
    except SystemExit as stop:  # argparse's usage errors
        code = stop.code
    out = capsys.readouterr()
    return code, out.out, out.err


def leftovers(folder, name):
    """The hidden temporary files of output `name` (the CLI's `.NAME.*.part` pattern)."""
    return sorted(folder.glob(f".{name}.*.part"))


def wait_for_part(proc, folder, name, timeout=60.0):
    """Poll until the writer's `.part` file holds bytes; None if the process ended first."""
    deadline = time.monotonic() + timeout
    while time.monotonic() < deadline and proc.poll() is None:
        for part in leftovers(folder, name):
            try:
                if part.stat().st_size > 0:
                    return part
            except FileNotFoundError:  # renamed or removed between glob and stat
                pass
        time.sleep(0.002)
    return None


# -- killed in the middle of a write -------------------------------------------------------------


@pytest.mark.parametrize("previous", [True, False], ids=["over-earlier-output", "new-output"])
@pytest.mark.parametrize("sig", [signal.SIGKILL, signal.SIGTERM], ids=["SIGKILL", "SIGTERM"])
@pytest.mark.parametrize("fmt", ["csv", "parquet"])
def test_killed_mid_write_leaves_the_earlier_output_or_nothing(
    tmp_path, capsys, big_log, small_log, fmt, sig, previous
):
    dest = tmp_path / f"out.{fmt}"
    before = None
    if previous:  # a complete earlier output at the destination, from the small log
        assert main(capsys, "analyze", small_log, *SMALL, "-o", dest, "-q") == (0, "", "")
        before = dest.read_bytes()
    with subprocess.Popen(
        command("analyze", big_log, *SMALL, "-o", dest, "-q"),
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
    ) as proc:
        try:
            part = wait_for_part(proc, tmp_path, dest.name)
            # The kill must land while the temporary file is written: the process still runs.
            assert part is not None, "no .part file with bytes appeared while analyze ran"
            proc.send_signal(sig)
            _, stderr = proc.communicate(timeout=60)
        finally:
            if proc.poll() is None:
                proc.kill()
    if sig == signal.SIGKILL:
        assert proc.returncode == -signal.SIGKILL  # Popen's convention for death by a signal
        # SIGKILL cannot be caught: a hidden .part may stay, never a file under the real name.
        assert all(p.name.startswith(f".{dest.name}.") for p in leftovers(tmp_path, dest.name))
    else:
        # The handler turns SIGTERM into an exception: exit 128 + 15 (shell convention), one line,
        # and the temporary file removed on the way out.
        assert proc.returncode == 128 + signal.SIGTERM
        assert stderr == "osculate analyze: stopped by SIGTERM\n"
        assert leftovers(tmp_path, dest.name) == []
    if previous:
        assert dest.read_bytes() == before  # byte for byte the earlier complete output
    else:
        assert not dest.exists()
    assert sorted(p.name for p in tmp_path.iterdir() if not p.name.startswith(".")) == sorted(
        ["small.csv", dest.name] if previous else ["small.csv"]
    )


# -- interrupted (Ctrl-C) --------------------------------------------------------------------------


def test_keyboard_interrupt_exits_130_with_one_line(tmp_path, capsys, monkeypatch, small_log):
    def interrupted(*args, **kwargs):
        raise KeyboardInterrupt

    monkeypatch.setattr(cli_commands, "_in_chunks", interrupted)  # Ctrl-C while computing
    dest = tmp_path / "out.csv"
    code, stdout, stderr = main(capsys, "analyze", small_log, *SMALL, "-o", dest, "-q")
    assert code == 130  # 128 + SIGINT, the shell's convention
    assert stderr == "osculate analyze: interrupted\n"
    assert stdout == "" and not dest.exists()


def test_interrupt_after_the_bytes_are_written_keeps_the_earlier_file(
    tmp_path, capsys, monkeypatch, small_log
):
    # The temporary file is complete but not yet renamed when Ctrl-C comes: the earlier output
    # stays byte for byte and the temporary file is removed.
    dest = tmp_path / "out.parquet"
    assert main(capsys, "analyze", small_log, *SMALL, "-o", dest, "-q") == (0, "", "")
    before = dest.read_bytes()
    write = cli_files.write_table
    written = []

    def write_then_interrupt(df, tmp, kind, codec):
        write(df, tmp, kind, codec)
        written.append(tmp.stat().st_size)
        raise KeyboardInterrupt

    monkeypatch.setattr(cli_files, "write_table", write_then_interrupt)
    bigger = circles(5, 80, seed=6)  # a different input: a different output
    src = tmp_path / "other.csv"
    bigger.to_csv(src, index=False)
    code, _, stderr = main(capsys, "analyze", src, *SMALL, "-o", dest)
    assert code == 130
    assert stderr.splitlines()[-1] == "osculate analyze: interrupted"
    assert written and written[0] > 0  # the interrupt really came after a full write
    assert dest.read_bytes() == before
    assert leftovers(tmp_path, dest.name) == []


def test_signal_handlers_are_restored_after_an_in_process_run(tmp_path, capsys, small_log):
    before = signal.getsignal(signal.SIGTERM)
    assert main(capsys, "analyze", small_log, *SMALL, "-o", tmp_path / "o.csv", "-q")[0] == 0
    assert signal.getsignal(signal.SIGTERM) is before


# -- outputs checked before computing --------------------------------------------------------------


@pytest.mark.parametrize(
    "subcommand, option", [("analyze", "-o"), ("summary", "-o"), ("summary", "--stops")]
)
def test_missing_output_folder_exits_2_before_reading(tmp_path, big_log, subcommand, option):
    dest = tmp_path / "nowhere" / "out.csv"
    started = time.perf_counter()
    res = run(subcommand, big_log, *SMALL, option, dest)
    took = time.perf_counter() - started
    assert res.returncode == 2
    # One line naming the option and the path. The tracks line, printed once the input is read,
    # is absent: the check came before reading (and so before computing) the 800 000 rows.
    assert res.stderr.count("\n") == 1 and res.stdout == ""
    name = "--stops" if option == "--stops" else "--output"
    assert res.stderr.startswith(f"osculate {subcommand}: error: {name} {str(dest)!r}: folder ")
    assert res.stderr.rstrip().endswith("does not exist")
    assert "nowhere" in res.stderr
    assert not (tmp_path / "nowhere").exists()
    print(f"{subcommand} {option} into a missing folder: {took:.2f} s")


def test_output_that_is_a_folder_exits_2(tmp_path, capsys, small_log):
    code, _, stderr = main(capsys, "analyze", small_log, *SMALL, "-o", tmp_path)
    assert code == 2
    assert stderr == f"osculate analyze: error: --output {str(tmp_path)!r}: is a folder; " + (
        "give a .csv or .parquet file name\n"
    )


def test_unwritable_output_folder_exits_2(tmp_path, capsys, monkeypatch, small_log):
    # Tests run as root here, where every folder is writable; os.access is made to say no for
    # the destination folder only (the check the CLI documents: W_OK | X_OK on the folder).
    folder = tmp_path / "locked"
    folder.mkdir()
    real_access = os.access

    def access(path, mode, **kwargs):
        if Path(path) == folder.resolve():
            return False
        return real_access(path, mode, **kwargs)

    monkeypatch.setattr(cli_files.os, "access", access)
    code, _, stderr = main(capsys, "analyze", small_log, *SMALL, "-o", folder / "o.csv")
    assert code == 2
    assert stderr.count("\n") == 1
    assert stderr.startswith(f"osculate analyze: error: --output {str(folder / 'o.csv')!r}")
    assert "is not writable" in stderr and str(folder.resolve()) in stderr


def test_summary_output_and_stops_must_differ(tmp_path, capsys, small_log):
    same = tmp_path / "same.csv"
    code, _, stderr = main(capsys, "summary", small_log, *SMALL, "-o", same, "--stops", same)
    assert code == 2 and "--stops" in stderr and "the same file as --output" in stderr
    assert not same.exists()


# -- unreadable inputs ---------------------------------------------------------------------------


def assert_one_clean_line(stderr, prefix):
    assert stderr.count("\n") == 1 and stderr.endswith("\n")
    assert stderr.startswith(prefix)
    assert "Traceback" not in stderr
    assert CLASS_NAME.search(stderr) is None, stderr  # no ParserError, ArrowInvalid, ...
    assert stderr[:-1].isprintable()


def test_empty_csv_exits_2(tmp_path):
    src = tmp_path / "empty.csv"
    src.write_bytes(b"")
    res = run("analyze", src, *SMALL, "-o", tmp_path / "o.csv")
    assert res.returncode == 2
    assert_one_clean_line(res.stderr, f"osculate analyze: error: input {str(src)!r}: ")
    assert "empty" in res.stderr
    assert not (tmp_path / "o.csv").exists() and leftovers(tmp_path, "o.csv") == []


@pytest.mark.parametrize("suffix", [".csv", ".parquet"])
def test_garbage_file_exits_2_naming_it(tmp_path, suffix):
    # Seeded random bytes: not UTF-8 text with consistent columns, not Parquet (no magic bytes).
    src = tmp_path / f"garbage{suffix}"
    src.write_bytes(np.random.default_rng(3).bytes(4096))
    res = run("summary", src, *SMALL, "-o", tmp_path / "o.csv")
    assert res.returncode == 2
    kind = "CSV" if suffix == ".csv" else "Parquet"
    assert_one_clean_line(
        res.stderr, f"osculate summary: error: input {str(src)!r}: cannot read it as {kind}"
    )
    assert not (tmp_path / "o.csv").exists()


@pytest.mark.parametrize("column", ["t", "y"])
def test_bad_numeric_cell_names_column_row_and_value(tmp_path, capsys, column):
    df = circles(2, 30, seed=8).astype({column: object})
    df.loc[37, column] = "12,5"  # a decimal comma: row 37 (from 0, header excluded)
    src = tmp_path / "in.csv"
    df.to_csv(src, index=False)
    code, _, stderr = main(capsys, "analyze", src, *SMALL, "-o", tmp_path / "o.csv")
    assert code == 2
    assert_one_clean_line(stderr, f"osculate analyze: error: column {column!r}, row 37: ")
    assert "cannot read '12,5' as a number" in stderr
    assert not (tmp_path / "o.csv").exists()


def test_bad_iso_time_cell_still_named(tmp_path, capsys):
    # A column of ISO 8601 times with one bad cell: named as a time, not as a number.
    df = circles(1, 20, seed=2)
    stamps = pd.Timestamp("2025-03-01T10:00:00Z") + pd.to_timedelta(df["t"], unit="s")
    df["t"] = stamps.dt.strftime("%Y-%m-%dT%H:%M:%S.%fZ")
    df.loc[11, "t"] = "2025-03-01 25:00"
    src = tmp_path / "in.csv"
    df.to_csv(src, index=False)
    code, _, stderr = main(capsys, "analyze", src, *SMALL, "-o", tmp_path / "o.csv")
    assert code == 2
    assert "column 't', row 11: cannot read '2025-03-01 25:00' as a time" in stderr


# -- what the commands say -------------------------------------------------------------------------


def test_tracks_and_rows_per_track_on_stderr(tmp_path, capsys):
    # Tracks of 10, 20 and 35 rows: min 10, median 20, max 35 (the sizes chosen here).
    parts = [circles(1, n, seed=n).assign(id=f"car{n}") for n in (10, 20, 35)]
    src = tmp_path / "in.csv"
    pd.concat(parts, ignore_index=True).to_csv(src, index=False)
    code, stdout, stderr = main(capsys, "analyze", src, *SMALL, "-o", tmp_path / "o.csv")
    assert code == 0, stderr
    assert stderr.splitlines()[0] == (
        "osculate analyze: 3 tracks by 'id'; rows per track: min 10, median 20, max 35"
    )
    assert stdout.splitlines()[-1] == cli.CAUTION  # printed once, after the results line
    assert stdout.count(cli.CAUTION) == 1
    code, _, stderr = main(capsys, "summary", src, "--time", "t", "--position", "x,y")
    # Without --track all 65 rows are one path: the line says so (the times then repeat).
    assert stderr.splitlines()[0] == (
        "osculate summary: 1 track of 65 rows (no --track: every row is on one path)"
    )


def test_help_lists_methods_defaults_and_caution():
    res = run("analyze", "--help")
    assert res.returncode == 0
    help_text = " ".join(res.stdout.split())
    # The choices are the API's estimators (osculate._estimators.METHODS) but "linear", which
    # osculate.kinematics rejects (it has no curvature).
    offered = [m for m in METHODS if m != "linear"]
    assert "{" + ",".join(offered) + "}" in help_text
    assert "indicative" in help_text and "130 interrupted" in help_text
    res = run("analyze", "in.csv", *SMALL, "--method", "linear", "-o", "o.csv")
    assert res.returncode == 2 and "invalid choice: 'linear'" in res.stderr
    # The CLI's default is the smoothing spline (logs are noisy); the help names the Python
    # default (osculate.kinematics's own) as the one for exact paths.
    default = inspect.signature(osc.kinematics).parameters["method"].default
    assert "(default: smooth;" in help_text and f"({default}, the Python default" in help_text
    res = run("demo", "--help")
    assert "(default: osculate-report)" in " ".join(res.stdout.split())


@pytest.mark.parametrize(
    "missing, output, hint",
    [
        ("pandas", "o.csv", "pip install 'osculate[pandas]'"),
        ("pyarrow", "o.parquet", "pip install 'osculate[cli]'"),  # the extra that has pyarrow
    ],
)
def test_missing_dependency_is_one_line_with_the_hint(tmp_path, small_log, missing, output, hint):
    # The module is made unimportable in a fresh interpreter (None in sys.modules).
    code = (
        f"import sys; sys.modules[{missing!r}] = None\n"
        "from osculate.cli import main\n"
        f"sys.exit(main(sys.argv[1:]))"
    )
    args = ["analyze", small_log, *SMALL, "-o", tmp_path / output]
    res = subprocess.run(
        [sys.executable, "-c", code, *map(str, args)], capture_output=True, text=True, timeout=120
    )
    assert res.returncode == 1
    assert_one_clean_line(res.stderr, "osculate analyze: error: ")
    assert hint in res.stderr
    assert not (tmp_path / output).exists()


# -- what the atomic write must not change ---------------------------------------------------------


def test_compressed_csv_and_file_modes(tmp_path, capsys, small_log):
    plain, packed = tmp_path / "o.csv", tmp_path / "o.csv.gz"
    for dest in (plain, packed):
        assert main(capsys, "analyze", small_log, *SMALL, "-o", dest, "-q") == (0, "", "")
    assert packed.read_bytes()[:2] == b"\x1f\x8b"  # the gzip magic number (RFC 1952)
    pd.testing.assert_frame_equal(pd.read_csv(packed), pd.read_csv(plain), check_exact=True)
    # A new file gets 0o666 less the umask, like any file the process creates (not mkstemp's
    # 0o600); a replaced file keeps its mode.
    umask = os.umask(0)
    os.umask(umask)
    assert stat.S_IMODE(plain.stat().st_mode) == 0o666 & ~umask
    plain.chmod(0o640)
    assert main(capsys, "analyze", small_log, *SMALL, "-o", plain, "-q")[0] == 0
    assert stat.S_IMODE(plain.stat().st_mode) == 0o640


def test_output_through_a_symbolic_link_replaces_the_target(tmp_path, capsys, small_log):
    target = tmp_path / "real" / "out.csv"
    target.parent.mkdir()
    target.write_text("old\n")
    link = tmp_path / "link.csv"
    link.symlink_to(target)
    assert main(capsys, "analyze", small_log, *SMALL, "-o", link, "-q")[0] == 0
    assert link.is_symlink()
    assert len(pd.read_csv(target)) == 150  # 3 tracks of 50 rows (small_log)

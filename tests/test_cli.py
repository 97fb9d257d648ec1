"""The `osculate analyze` and `osculate summary` commands, end to end."""

import io
import subprocess
import sys
import time

import numpy as np
import osculate as osc
import pandas as pd
import pytest
from osculate import cli
from osculate.cli import _commands as cli_commands

pa = pytest.importorskip("pyarrow")
pacsv = pytest.importorskip("pyarrow.csv")


def run(*args, timeout=120):
    return subprocess.run(
        [sys.executable, "-m", "osculate.cli", *map(str, args)],
        capture_output=True,
        text=True,
        timeout=timeout,
    )


def main(capsys, *args):
    """Run the command in this process: (exit status, stdout, stderr)."""
    try:
        code = cli.main([str(a) for a in args])
    except SystemExit as stop:  # argparse's usage errors
        code = stop.code
    out = capsys.readouterr()
    return code, out.out, out.err


def log(m=12, per=80, seed=4, nan_row=True):
    """A log of `m` vehicles circling, rows ordered by time with tracks interleaved."""
    rng = np.random.default_rng(seed)
    t = np.cumsum(rng.uniform(0.05, 0.15, per))
    ids = np.repeat([f"v{k:04d}" for k in range(m)], per)
    tt = np.tile(t, m) + np.repeat(rng.uniform(0, 1, m), per)
    r = np.repeat(rng.uniform(20, 60, m), per)
    df = pd.DataFrame(
        {"id": ids, "t": tt, "x": r * np.cos(tt * 8 / r), "y": r * np.sin(tt * 8 / r)}
    )
    df = df.sort_values("t", kind="stable").reset_index(drop=True)
    if nan_row:
        df.loc[5, "x"] = np.nan
    return df, 8.0


def test_csv_to_parquet_to_csv_keeps_every_row(tmp_path, capsys):
    df, _ = log()
    src, mid, out = tmp_path / "in.csv", tmp_path / "mid.parquet", tmp_path / "out.csv"
    df.to_csv(src, index=False)
    code, stdout, stderr = main(
        capsys, "analyze", src, "--time", "t", "--position", "x,y", "--track", "id", "-o", mid
    )
    assert code == 0, stderr
    assert "rows, 12 tracks" in stdout
    code, stdout, stderr = main(
        capsys, "analyze", mid, "--time", "t", "--position", "x,y", "--track", "id", "-o", out
    )
    assert code == 0, stderr
    assert "replacing input columns" in stderr  # the first run's results
    back = pd.read_csv(out)
    assert len(back) == len(df)
    # Input columns come back unchanged (tolerance 0: CSV floats are written shortest-round-trip).
    pd.testing.assert_frame_equal(back[df.columns], df, check_exact=True, check_dtype=False)
    # Results equal the accessor's on the same frame with the CLI's default estimator, the
    # smoothing spline (tolerance 0: same kernel, exact floats).
    expected = df.osc.kinematics(time="t", position=["x", "y"], by="id", method="smooth")
    for col in expected.columns:
        np.testing.assert_array_equal(back[col].to_numpy(), expected[col].to_numpy(), err_msg=col)
    assert osc.Flag.INVALID in osc.Flag(int(back.loc[5, "flags"]))


def test_missing_column_exits_2_with_one_line(tmp_path):
    # A real process: its exit status and its whole stderr.
    df, _ = log(m=2, per=10)
    src = tmp_path / "in.csv"
    df.to_csv(src, index=False)
    res = run("analyze", src, "--time", "t", "--position", "x,z", "-o", tmp_path / "o.csv")
    assert res.returncode == 2
    assert res.stderr.count("\n") == 1
    assert res.stderr.startswith("osculate analyze: error: position: column 'z' not found")
    assert "Traceback" not in res.stderr
    assert not (tmp_path / "o.csv").exists()


def test_bad_row_exits_2_naming_the_row(tmp_path, capsys):
    df, _ = log(m=2, per=10, nan_row=False)
    df.loc[7, "t"] = df.loc[6, "t"] if df.loc[6, "id"] == df.loc[7, "id"] else df.loc[5, "t"]
    df.loc[7, "id"] = df.loc[6 if df.loc[6, "t"] == df.loc[7, "t"] else 5, "id"]
    src = tmp_path / "in.csv"
    df.to_csv(src, index=False)
    args = ("summary", src, "--time", "t", "--position", "x,y", "--track", "id")
    code, _, stderr = main(capsys, *args)
    assert code == 2
    # stderr: the tracks line (2 vehicles of 10 rows: the generator's m and per), then one error.
    tracks, error = stderr.splitlines()
    assert tracks == "osculate summary: 2 tracks by 'id'; rows per track: min 10, median 10, max 10"
    assert error.startswith("osculate summary: error: column 't', row 7 (track 'v000")
    assert "times must be strictly increasing" in error
    assert stderr.endswith("\n") and "Traceback" not in stderr
    code, _, stderr = main(capsys, *args, "--debug")
    assert code == 2 and "Traceback" in stderr


@pytest.mark.parametrize(
    "args, message",
    [
        (["--time", "t"], "one of the arguments --position --geodetic is required"),
        (["--time", "t", "--position", "x"], "--position: expected 2 or 3"),
        (["--time", "t", "--position", "x,y", "--up", "0,1"], "--up: expected 3"),
    ],
)
def test_usage_errors_exit_2(tmp_path, capsys, args, message):
    df, _ = log(m=1, per=10)
    src = tmp_path / "in.csv"
    df.to_csv(src, index=False)
    code, _, stderr = main(capsys, "summary", src, *args)
    assert code == 2
    assert message in stderr


def test_unreadable_and_missing_files_exit_2(tmp_path, capsys):
    code, _, stderr = main(
        capsys, "summary", tmp_path / "no.csv", "--time", "t", "--position", "x,y"
    )
    assert code == 2 and "no such file" in stderr
    bad = tmp_path / "bad.parquet"
    bad.write_text("not parquet")
    code, _, stderr = main(capsys, "summary", bad, "--time", "t", "--position", "x,y")
    assert code == 2 and stderr.count("\n") == 1 and "bad.parquet" in stderr
    code, _, stderr = main(
        capsys, "summary", tmp_path / "a.txt", "--time", "t", "--position", "x,y"
    )
    assert code == 2 and "use a .csv or .parquet file name" in stderr


def test_summary_prints_one_line_per_track(tmp_path, capsys):
    df, speed = log(m=5, per=60)
    src = tmp_path / "in.parquet"
    df.to_parquet(src)
    args = ("summary", src, "--time", "t", "--position", "x,y", "--track", "id")
    code, stdout, stderr = main(capsys, *args, "--order", "4")
    assert code == 0, stderr
    lines = stdout.splitlines()
    rows = [ln for ln in lines if ln.startswith("v0")]
    assert len(rows) == 5
    assert "licensed engineers decide" in lines[-1]
    # Every vehicle drives at 8 m/s (the generator's speed): max_speed within 1e-3 (4th-order FD,
    # irregular steps of ~0.1 s on radii of 20-60 m).
    header = lines[0].split()
    col = header.index("max_speed") + 1  # +1: the index column
    np.testing.assert_allclose([float(r.split()[col]) for r in rows], speed, rtol=1e-3)
    assert main(capsys, *args, "--quiet") == (0, "", "")


def test_geodetic_columns_and_iso_times(tmp_path, capsys):
    # ISO 8601 times with a zone and WGS 84 columns go straight in; the ENU positions and results
    # equal the accessor's on the same data (tolerance 0).
    n = 40
    t = np.arange(n) * 0.5
    stamps = pd.Timestamp("2025-01-01T08:00:00Z") + pd.to_timedelta(t, unit="s")
    df = pd.DataFrame(
        {
            "when": stamps.strftime("%Y-%m-%dT%H:%M:%S.%fZ"),
            "lat": 59.3 + 1e-4 * np.sin(t / 5),
            "lon": 18.0 + 2e-4 * np.cos(t / 5),
            "alt": 30.0 + t,
        }
    )
    src, out = tmp_path / "gps.csv", tmp_path / "gps.parquet"
    df.to_csv(src, index=False)
    args = ("analyze", src, "--time", "when", "--geodetic", "lat,lon,alt", "-o", out)
    assert main(capsys, *args, "-q") == (0, "", "")
    got = pd.read_parquet(out)
    expected = df.assign(when=stamps).osc.kinematics(
        time="when", position=["lat", "lon", "alt"], crs="geodetic", method="smooth"
    )
    pd.testing.assert_frame_equal(got[expected.columns], expected, check_exact=True)
    df.loc[3, "when"] = "yesterday"
    df.to_csv(src, index=False)
    code, _, stderr = main(capsys, *args)
    assert code == 2
    assert "column 'when', row 3: cannot read 'yesterday' as a time" in stderr


class FakeTerminal(io.StringIO):
    def isatty(self):
        return True


def test_progress_bar_on_a_terminal_and_chunks_change_nothing(tmp_path, monkeypatch):
    # With a terminal the tracks go to Rust in chunks of ~ROWS_PER_CALL rows under a bar; the
    # numbers equal the single-call run (tolerance 0: each track is computed from its own rows).
    df, _ = log(m=30, per=50)
    src = tmp_path / "in.parquet"
    df.to_parquet(src)
    args = ["analyze", str(src), "--time", "t", "--position", "x,y", "--track", "id"]
    assert cli.main([*args, "-o", str(tmp_path / "one.parquet"), "-q"]) == 0
    monkeypatch.setattr(cli_commands, "ROWS_PER_CALL", 200)
    term = FakeTerminal()
    monkeypatch.setattr(sys, "stderr", term)
    assert cli.main([*args, "-o", str(tmp_path / "chunks.parquet")]) == 0
    assert "30/30" in term.getvalue() and "track" in term.getvalue()
    one = pd.read_parquet(tmp_path / "one.parquet")
    chunks = pd.read_parquet(tmp_path / "chunks.parquet")
    pd.testing.assert_frame_equal(one, chunks, check_exact=True)
    quiet = FakeTerminal()
    monkeypatch.setattr(sys, "stderr", quiet)
    assert cli.main([*args, "-o", str(tmp_path / "q.parquet"), "--quiet"]) == 0
    assert quiet.getvalue() == ""


def test_a_million_rows_end_to_end(tmp_path):
    # 1e6 rows, 1000 interleaved vehicles, CSV in, Parquet out, in a subprocess that is not on a
    # terminal: no progress bar (stderr holds only the tracks line).
    df, speed = log(m=1000, per=1000, seed=9)
    src, out = tmp_path / "big.csv", tmp_path / "big.parquet"
    pacsv.write_csv(pa.Table.from_pandas(df, preserve_index=False), src)
    started = time.perf_counter()
    res = run(
        "analyze", src, "--time", "t", "--position", "x,y", "--track", "id", "--order", "4",
        "--columns", "speed,curvature,accel_normal", "-o", out,
    )  # fmt: skip
    took = time.perf_counter() - started
    assert res.returncode == 0, res.stderr
    # 1000 vehicles of 1000 rows each (the generator's m and per).
    tracks = (
        "osculate analyze: 1000 tracks by 'id'; rows per track: min 1000, median 1000, max 1000"
    )
    assert res.stderr == tracks + "\n"
    assert "1000000 rows, 1000 tracks" in res.stdout
    got = pd.read_parquet(out)
    assert len(got) == 1_000_000
    assert got["id"].nunique() == 1000
    # Uniform circular motion at 8 m/s (generator): speed within 1e-3 relative away from the
    # NaN row's neighbours (4th-order FD on ~0.1 s steps).
    ok = got["speed"].notna() & (got.index != 5)
    np.testing.assert_allclose(got.loc[ok, "speed"], speed, rtol=1e-3)
    print(f"1e6-row analyze: {took:.1f} s")

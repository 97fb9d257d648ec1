"""The ``osculate`` command line."""

from __future__ import annotations

import argparse
import contextlib
import inspect
import os
import signal
import stat
import sys
import tempfile
import threading
import time
import traceback
import warnings
from collections.abc import Iterator, Sequence
from pathlib import Path
from types import FrameType
from typing import Any, Optional

import numpy as np

from . import __version__
from ._estimators import METHODS
from .diagnose import SuspectDataWarning

__all__ = ["main"]

CAUTION = (
    "Values are indicative. Lateral acceleration, jerk and radius estimated from logged data are "
    "not a safety assessment: local codes and licensed engineers decide whether a road, track, "
    "ride or vehicle is acceptable."
)


def run_demo(out: Path) -> Any:
    """Run the demo scenarios and write the report folder (see :func:`osculate.report.run`)."""
    from .report import run

    return run(out)


def _demo(args: argparse.Namespace) -> int:
    """``osculate demo``: the key figures on stdout, the report folder on disk."""
    from .report import text_table

    rep = run_demo(args.out)
    print(text_table(rep.checks))
    if not rep.figures:
        print("osculate demo: no figures (they need matplotlib): pip install 'osculate[plot]'")
    if rep.removed:
        names = ", ".join(p.name for p in rep.removed)
        print(f"osculate demo: removed {len(rep.removed)} files of the previous run: {names}")
    took = f"{len(rep.files)} files in {rep.seconds:.1f} s"
    print(f"osculate demo: {took}, report written to {rep.report}")
    print(CAUTION)
    if not rep.passed:
        print("osculate demo: some estimates are outside their stated tolerance", file=sys.stderr)
        return 1
    return 0


# -- analyze / summary: files in, files out ----------------------------------------------------

EXIT_OK, EXIT_FAILURE, EXIT_INPUT, EXIT_INTERRUPTED = 0, 1, 2, 130
ROWS_PER_CALL = 250_000  # with a progress bar, tracks go to Rust in chunks of about this many rows
ROWS_PER_WRITE = 1 << 18  # outputs are written in slices of this many rows (Parquet: row groups)
# The methods of osculate.kinematics; "linear" (resample / fit only) has no curvature.
KINEMATICS_METHODS = tuple(m for m in METHODS if m != "linear")
EXIT_STATUS = (
    "Exit status: 0 done, 1 failure, 2 bad arguments or input, 130 interrupted (Ctrl-C), "
    "143 terminated (SIGTERM)."
)
ATOMIC_NOTE = (
    "Each output is written to a hidden .part file in its folder and renamed into place when "
    "complete: an interrupted run leaves an earlier output as it was."
)
PANDAS_HINT = (
    "pip install 'osculate[pandas]' (or 'osculate[cli]', which adds pyarrow for Parquet and a "
    "progress bar)"
)
_WHERE = ("time", "position", "by", "crs", "origin")  # summary_and_stops's leading arguments
_CODECS = {".gz": "gzip", ".bz2": "bz2", ".zst": "zstd"}  # compressed CSV: suffix -> codec


class _UsageError(Exception):
    """Bad input or arguments: exit code 2."""


class _WriteError(Exception):
    """An output could not be written (disk full, permissions changed meanwhile): exit code 1."""


class _Terminated(BaseException):
    """Raised by the SIGTERM / SIGHUP handler so that ``finally`` clauses remove temporary files.

    Parameters
    ----------
    signum : int
        The signal received; the exit status is 128 + ``signum``.
    """

    def __init__(self, signum: int) -> None:
        super().__init__(signum)
        self.signum = signum


def _names(text: str, option: str, sizes: tuple[int, ...]) -> list[str]:
    names = [s.strip() for s in text.split(",")]
    if len(names) not in sizes or not all(names):
        want = " or ".join(str(k) for k in sizes)
        raise _UsageError(f"{option}: expected {want} comma-separated column names, got {text!r}")
    return names


def _numbers(text: str, option: str, size: int) -> tuple[float, ...]:
    try:
        values = tuple(float(s) for s in text.split(","))
    except ValueError:
        values = ()
    if len(values) != size:
        raise _UsageError(f"{option}: expected {size} comma-separated numbers, got {text!r}")
    return values


def _format(path: Path, role: str) -> str:
    name = path.name.lower()
    if name.endswith((".csv", ".csv.gz", ".csv.bz2", ".csv.zst")):
        return "csv"
    if name.endswith((".parquet", ".pq")):
        return "parquet"
    raise _UsageError(f"{role} {str(path)!r}: use a .csv or .parquet file name")


def _pandas() -> Any:
    """Import pandas, or fail with one line and the install hint."""
    try:
        import pandas
    except ImportError as exc:
        raise ImportError(f"reading and writing tables needs pandas: {PANDAS_HINT}") from exc
    return pandas


def _pyarrow(what: str) -> Any:
    try:
        import pyarrow
    except ImportError as exc:
        raise ImportError(f"{what} needs pyarrow: pip install 'osculate[cli]'") from exc
    return pyarrow


def _shown(value: Any, width: int = 40) -> str:
    """``repr`` of a cell for an error message, cut to about ``width`` characters."""
    text = repr(value)
    return text if len(text) <= width else text[: width - 1] + "…"


def _reason(err: BaseException, width: int = 120) -> str:
    """Return the readable head of a reader's message (parsers quote the bytes they met)."""
    text = " ".join(str(err).split())
    cut = next((i for i, ch in enumerate(text) if ch == "\ufffd" or not ch.isprintable()), None)
    if cut is not None:  # drop the quoted part: "..., got 2: <bytes>" -> "..., got 2"
        head = text[:cut]
        text = head.rsplit(": ", 1)[0] if ": " in head else head.rstrip(" :")
    return text if len(text) <= width else text[: width - 1] + "…"


def _check_input(text: str) -> Path:
    """Return the input path if it names an existing .csv / .parquet file (else exit 2)."""
    path = Path(text)
    _format(path, "input")
    if path.is_dir():
        raise _UsageError(f"input {text!r}: is a folder, not a file")
    if not path.is_file():
        raise _UsageError(f"input {text!r}: no such file")
    return path


def _check_output(text: str, option: str) -> Path:
    """Return the output path if it can be written, checked before any computing (else exit 2).

    The file name must end in .csv or .parquet, not name a folder, and its folder must exist and
    be writable; an existing read-only file is not replaced.
    """
    path = Path(text)
    if path.is_dir():
        raise _UsageError(f"{option} {text!r}: is a folder; give a .csv or .parquet file name")
    kind = _format(path, option)
    dest = _destination(path)
    folder = dest.parent
    if not folder.is_dir():
        raise _UsageError(f"{option} {text!r}: folder {str(folder)!r} does not exist")
    if not os.access(folder, os.W_OK | os.X_OK):
        raise _UsageError(f"{option} {text!r}: folder {str(folder)!r} is not writable")
    if dest.exists() and not os.access(dest, os.W_OK):
        raise _UsageError(f"{option} {text!r}: the file exists and is read-only")
    if kind == "parquet":
        _pyarrow("writing Parquet")
    return path


def _destination(path: Path) -> Path:
    """Return the file really written: links are followed, so the rename lands on the target."""
    return Path(os.path.realpath(path))


def _read(path: Path) -> Any:
    """Read the input table; an unreadable file is a :class:`_UsageError` naming it."""
    pd = _pandas()
    kind = _format(path, "input")
    name = "Parquet" if kind == "parquet" else "CSV"
    try:
        if kind == "parquet":
            _pyarrow("reading Parquet")
            return pd.read_parquet(path)
        try:
            import pyarrow  # noqa: F401  (the fast CSV reader; it also parses ISO 8601 times)
        except ImportError:
            return pd.read_csv(path)
        return pd.read_csv(path, engine="pyarrow")
    except pd.errors.EmptyDataError:
        raise _UsageError(f"input {str(path)!r}: the file is empty (no header, no rows)") from None
    except (pd.errors.ParserError, UnicodeDecodeError, EOFError, OSError) as err:
        raise _UsageError(f"input {str(path)!r}: cannot read it as {name}: {_reason(err)}") from err
    except Exception as err:
        if not type(err).__module__.startswith("pyarrow"):  # ArrowInvalid and friends
            raise
        raise _UsageError(f"input {str(path)!r}: cannot read it as {name}: {_reason(err)}") from err


def _codec(path: Path) -> Optional[str]:
    """Return the compression of a CSV output from its name (``.csv.gz``, ``.bz2``, ``.zst``)."""
    name = path.name.lower()
    return next((c for suffix, c in _CODECS.items() if name.endswith(".csv" + suffix)), None)


def _new_file_mode(dest: Path) -> int:
    """Return the output's permission bits: the replaced file's, else 0o666 less the umask."""
    try:
        return stat.S_IMODE(os.stat(dest).st_mode)
    except OSError:
        umask = os.umask(0o022)
        os.umask(umask)
        return 0o666 & ~umask


def _fsync(path: Path) -> None:
    """Flush a file (or, on POSIX, a folder's entries) to the disk."""
    flags = os.O_RDONLY if path.is_dir() else os.O_RDWR
    fd = os.open(path, flags)
    try:
        os.fsync(fd)
    finally:
        os.close(fd)


@contextlib.contextmanager
def _atomic(dest: Path) -> Iterator[Path]:
    """Yield a hidden temporary path next to ``dest``; rename it onto ``dest`` once complete.

    The temporary file (``.NAME.XXXX.part`` in the destination folder, so the rename stays on one
    file system) is flushed to disk, then moved into place with :func:`os.replace`, which is
    atomic: readers see the earlier file or the complete new one, never a part. On any error or
    interruption (KeyboardInterrupt, the SIGTERM handler's exception) the temporary file is
    removed and an earlier ``dest`` is left as it was. Only SIGKILL can leave the ``.part`` file.
    """
    with tempfile.NamedTemporaryFile(
        dir=dest.parent, prefix=f".{dest.name}.", suffix=".part", delete=False
    ) as handle:
        tmp = Path(handle.name)
    try:
        yield tmp
        _fsync(tmp)
        os.chmod(tmp, _new_file_mode(dest))
        os.replace(tmp, dest)
    except BaseException:
        with contextlib.suppress(OSError):
            tmp.unlink()
        raise
    if os.name == "posix":  # make the rename itself durable
        with contextlib.suppress(OSError):
            _fsync(dest.parent)


def _write_table(df: Any, tmp: Path, kind: str, codec: Optional[str]) -> None:
    """Write ``df`` to ``tmp`` in slices of ``ROWS_PER_WRITE`` rows (signals are seen between)."""
    import pandas as pd

    keep_index = not isinstance(df.index, pd.RangeIndex)
    try:
        pa: Any = _pyarrow("writing Parquet" if kind == "parquet" else "the CSV writer")
    except ImportError:
        if kind == "parquet":
            raise
        pa = None  # pandas writes the CSV (and compresses it) on its own
    if pa is None or (codec is not None and not pa.Codec.is_available(codec)):
        df.to_csv(tmp, index=keep_index, compression=codec, chunksize=ROWS_PER_WRITE)
        return
    if kind == "parquet":
        import pyarrow.parquet as pq

        table = pa.Table.from_pandas(df, preserve_index=keep_index)
        with pq.ParquetWriter(tmp, table.schema) as writer:
            for start in range(0, table.num_rows, ROWS_PER_WRITE):
                writer.write_table(table.slice(start, ROWS_PER_WRITE))
        return
    import pyarrow.csv as pacsv

    table = pa.Table.from_pandas(df.reset_index() if keep_index else df, preserve_index=False)
    path = str(tmp)
    sink = pa.OSFile(path, "wb") if codec is None else pa.CompressedOutputStream(path, codec)
    with sink, pacsv.CSVWriter(sink, table.schema) as writer:
        for start in range(0, table.num_rows, ROWS_PER_WRITE):
            writer.write_table(table.slice(start, ROWS_PER_WRITE))


def _write(df: Any, path: Path, option: str) -> None:
    """Write ``df`` to ``path`` atomically (see :func:`_atomic`); ``option`` names it in errors."""
    kind = _format(path, option)
    dest = _destination(path)
    try:
        with _atomic(dest) as tmp:
            _write_table(df, tmp, kind, _codec(dest))
    except OSError as err:
        raise _WriteError(f"{option} {str(path)!r}: cannot write: {err.strerror or err}") from err


def _is_text(s: Any) -> bool:
    import pandas as pd

    return bool(pd.api.types.is_object_dtype(s.dtype) or pd.api.types.is_string_dtype(s.dtype))


def _first_bad(df: Any, column: str, bad: np.ndarray, what: str) -> _UsageError:
    """Return the error naming the first cell of ``column`` flagged in ``bad`` (rows from 0)."""
    i = int(np.argmax(bad))
    value = df[column].iloc[i]
    return _UsageError(
        f"column {column!r}, row {df.index[i]!r}: cannot read {_shown(value)} as {what}"
    )


def _parse_numbers(df: Any, columns: Sequence[str]) -> Any:
    """Return ``df`` with text columns among ``columns`` read as numbers; a bad cell is named.

    A CSV column holding numbers and one stray word comes back as text; the accessor would only
    say the column is not numeric. Empty cells stay missing (the accessor flags those rows).
    """
    import pandas as pd

    converted = {}
    for column in dict.fromkeys(columns):  # a handful of columns, not rows
        if column not in df.columns or not _is_text(df[column]):
            continue
        s = df[column]
        values = pd.to_numeric(s, errors="coerce")
        bad = values.isna().to_numpy() & s.notna().to_numpy()
        if bad.any():
            raise _first_bad(df, column, bad, "a number")
        converted[column] = values.astype(np.float64)
    return df.assign(**converted) if converted else df


def _parse_times(df: Any, column: str) -> Any:
    """Return ``df`` with a text time column read as numbers or ISO 8601 times; name a bad cell.

    A text column is read as ISO 8601 times; when that fails, as whichever of numbers or times
    more of its cells are, and the first cell that is not one is reported.
    """
    import pandas as pd

    if column not in df.columns or not _is_text(df[column]):
        return df
    s = df[column]
    try:
        return df.assign(**{column: pd.to_datetime(s, format="ISO8601", utc=True)})
    except (ValueError, TypeError):
        pass
    present = s.notna().to_numpy()
    numbers = pd.to_numeric(s, errors="coerce")
    stamps = pd.to_datetime(s, format="ISO8601", utc=True, errors="coerce")
    if int(numbers.notna().sum()) > int(stamps.notna().sum()):
        bad = present & numbers.isna().to_numpy()
        if bad.any():
            raise _first_bad(df, column, bad, "a number of seconds (the column holds numbers)")
        return df.assign(**{column: numbers.astype(np.float64)})
    bad = present & stamps.isna().to_numpy()
    if not bad.any():
        return df.assign(**{column: stamps})
    err = _first_bad(df, column, bad, "a time")
    raise _UsageError(f"{err} (use numbers of seconds or ISO 8601)")


def _auto_or_float(text: str) -> float | str:
    """Parse a threshold on the command line: a number or "auto"."""
    return "auto" if text == "auto" else float(text)


def _selection(args: argparse.Namespace) -> dict[str, Any]:
    """Accessor keywords (columns, crs, estimator options) from the command line."""
    if args.geodetic is not None:
        position = _names(args.geodetic, "--geodetic", (2, 3))
        crs = "geodetic"
    else:
        position = _names(args.position, "--position", (2, 3))
        crs = "cartesian"
    spec: dict[str, Any] = {"time": args.time, "position": position, "by": args.track, "crs": crs}
    if args.origin is not None:
        if crs != "geodetic":
            raise _UsageError("--origin: only with --geodetic")
        spec["origin"] = _numbers(args.origin, "--origin", 3)
    # Logs are noisy: the smoothing spline unless an estimator is named (--order alone means fd).
    if args.method is None:
        args.method = "fd" if args.order is not None else CLI_METHOD
    for name in ("method", "order", "smoothing", "min_speed", "min_curvature", "gap_factor"):
        value = getattr(args, name)
        if value is not None:
            spec[name] = value
    if args.up is not None:
        spec["up"] = _numbers(args.up, "--up", 3)
    return spec


def _progress(args: argparse.Namespace, total: int) -> Any:
    """Return a tqdm bar over tracks on stderr, or None (with --quiet, or not on a terminal)."""
    if args.quiet or not sys.stderr.isatty():
        return None
    try:
        from tqdm import tqdm
    except ImportError:  # the bar is optional: pip install 'osculate[cli]'
        return None
    return tqdm(total=total, unit="track", file=sys.stderr, desc=f"osculate {args.command}")


def _in_chunks(df: Any, by: Any, call: Any, args: argparse.Namespace) -> list[tuple[Any, Any]]:
    """Run ``call`` on whole tracks: one call, or with a progress bar one call per chunk of tracks.

    Returns ``(rows, result)`` pairs, ``rows`` being caller positions (None: all rows).
    """
    import pandas as pd

    from .accessor import _values

    n = len(df)
    codes = None
    if by is not None:
        codes, _ = pd.factorize(_values(df, by, "by"))
    n_tracks = 1 if codes is None else int(codes.max(initial=-1)) + 1
    bar = _progress(args, n_tracks)
    if bar is None or codes is None or n <= ROWS_PER_CALL or (codes < 0).any():
        result = call(df)
        if bar is not None:
            bar.update(n_tracks)
            bar.close()
        return [(None, result)]
    counts = np.bincount(codes, minlength=n_tracks)
    chunk_of_track = (np.cumsum(counts) - 1) // ROWS_PER_CALL
    chunk_of_row = chunk_of_track[codes]
    order = np.argsort(chunk_of_row, kind="stable")
    bounds = np.searchsorted(chunk_of_row[order], np.arange(int(chunk_of_track[-1]) + 2))
    tracks_per_chunk = np.bincount(chunk_of_track)
    out = []
    with bar:
        for c in range(len(bounds) - 1):
            rows = order[bounds[c] : bounds[c + 1]]
            out.append((rows, call(df.iloc[rows])))
            bar.update(int(tracks_per_chunk[c]))
    return out


def _plural(count: int, noun: str) -> str:
    return f"{count} {noun}" if count == 1 else f"{count} {noun}s"


def _tracks_line(df: Any, by: Optional[str]) -> str:
    """How many tracks the input holds and rows per track (a forgotten --track shows here)."""
    import pandas as pd

    from .accessor import _values

    n = len(df)
    if n == 0:
        return "the input has no rows (a header only): the results will be empty"
    if by is None:
        return f"1 track of {_plural(n, 'row')} (no --track: every row is on one path)"
    codes, labels = pd.factorize(_values(df, by, "by"))
    missing = int(np.count_nonzero(codes < 0))
    if len(labels) == 0:
        return f"no tracks: all {_plural(n, 'row')} lack a track id in {by!r}"
    counts = np.bincount(codes[codes >= 0], minlength=len(labels))
    text = (
        f"{_plural(len(labels), 'track')} by {by!r}; rows per track: min {counts.min()}, "
        f"median {np.median(counts):.10g}, max {counts.max()}"
    )
    return text + (f"; {_plural(missing, 'row')} without a track id" if missing else "")


def _load(args: argparse.Namespace, source: Path, spec: dict[str, Any]) -> Any:
    """Read the input, read text time and position columns, report its tracks on stderr.

    Returns
    -------
    pandas.DataFrame
        The input table, text columns of numbers or times parsed.
    """
    from .accessor import _values

    df = _read(source)
    df = _parse_numbers(_parse_times(df, args.time), spec["position"])
    # Missing columns fail here, as the accessor would (same order and message), before the line.
    _values(df, args.time, "time")
    for column in spec["position"]:
        _values(df, column, "position")
    if args.track is not None:
        _values(df, args.track, "by")
    if not args.quiet:
        print(f"osculate {args.command}: {_tracks_line(df, args.track)}", file=sys.stderr)
    return df


def _analyze(args: argparse.Namespace) -> int:
    """``osculate analyze``: per-sample kinematics written next to the input columns."""
    pd = _pandas()
    spec = _selection(args)
    if args.columns is not None:
        spec["columns"] = [c.strip() for c in args.columns.split(",") if c.strip()]
    source = _check_input(args.file)
    out_path = _check_output(args.output, "--output")
    started = time.perf_counter()
    df = _load(args, source, spec)
    parts = _in_chunks(df, args.track, lambda part: part.osc.kinematics(**spec), args)
    if parts[0][0] is None:
        res = parts[0][1]
    else:
        first = parts[0][1]
        cols = {}
        for name in first.columns:
            col = np.empty(len(df), dtype=first[name].dtype)
            for rows, part in parts:
                col[rows] = part[name].to_numpy()
            cols[name] = col
        res = pd.DataFrame(cols, index=df.index)
    clash = [c for c in res.columns if c in df.columns]
    if clash and not args.quiet:
        print(f"osculate analyze: replacing input columns {', '.join(clash)}", file=sys.stderr)
    table = pd.concat([df.drop(columns=clash), res], axis=1)
    _write(table, out_path, "--output")
    if not args.quiet:
        n_tracks = 1 if args.track is None else table[args.track].nunique()
        took = time.perf_counter() - started
        print(
            f"osculate analyze: {len(table)} rows, {_plural(n_tracks, 'track')}, "
            f"{res.shape[1]} result columns written to {out_path} in {took:.1f} s"
        )
        print(CAUTION)
    return EXIT_OK


def _summarize(args: argparse.Namespace) -> int:
    """``osculate summary``: one line per track and the stop intervals."""
    pd = _pandas()
    from .accessor import RESULTS_SUMMARIZED, summary_and_stops

    spec = _selection(args)
    source = _check_input(args.file)
    outputs = {
        "--output": args.output,
        "--stops": args.stops,
        "--turns": args.turns,
        "--speed-changes": args.speed_changes,
        "--elements": args.elements,
    }
    paths = {k: _check_output(v, k) for k, v in outputs.items() if v is not None}
    seen: dict[Any, str] = {}
    for option, path in paths.items():
        other = seen.setdefault(_destination(path), option)
        if other != option:
            raise _UsageError(f"{option} {outputs[option]!r}: the same file as {other}")
    df = _load(args, source, spec)
    time_col, position, by, crs, origin = (spec.pop(k, None) for k in _WHERE)
    # An output of `osculate analyze`: its results are summarised as they are.
    done = not args.recompute and all(c in df.columns for c in RESULTS_SUMMARIZED)
    if done and not args.quiet:
        print(
            f"osculate summary: summarising the results already in {args.file} "
            "(--recompute computes them again from the positions)",
            file=sys.stderr,
        )
    # Turns, speed changes and elements come from the same run as the summary.
    rules: dict[str, dict[str, Any]] = {
        name: {}
        for name, option in (
            ("turns", "--turns"),
            ("speed_changes", "--speed-changes"),
            ("elements", "--elements"),
        )
        if option in paths
    }
    if "elements" in rules and len(position) == 3:
        rules["elements"] = {"up": spec.get("up") or (0.0, 0.0, 1.0)}
    parts = _in_chunks(
        df,
        args.track,
        lambda part: summary_and_stops(
            part, time_col, position, by, crs, origin, spec, from_results=done, tables=rules
        ),
        args,
    )
    table = pd.concat([p[0] for _, p in parts])
    stops = pd.concat([p[1] for _, p in parts], ignore_index=True)
    found: dict[str, Any] = {}
    for name in rules:
        both = pd.concat([p[2][name] for _, p in parts], ignore_index=True)
        # Rows within a chunk are not the file's: left out.
        found[name] = both.drop(columns=["first_row", "last_row"], errors="ignore")
    if "--output" in paths:
        _write(table, paths["--output"], "--output")
    if "--stops" in paths:
        _write(stops, paths["--stops"], "--stops")
    if "--turns" in paths:
        _write(found["turns"], paths["--turns"], "--turns")
    if "--speed-changes" in paths:
        _write(found["speed_changes"], paths["--speed-changes"], "--speed-changes")
    if "--elements" in paths:
        _write(found["elements"], paths["--elements"], "--elements")
    if not args.quiet:
        with pd.option_context("display.max_rows", None, "display.width", 250):
            print(table.to_string())
            print(f"\n{len(stops)} stop(s):")
            if len(stops):
                print(stops.to_string(index=False))
            for name, what in (
                ("turns", "turn(s)"),
                ("speed_changes", "speed change(s)"),
                ("elements", "element(s): straights, arcs, spirals"),
            ):
                if name in found:
                    print(f"\n{len(found[name])} {what}:")
                    if len(found[name]):
                        print(found[name].to_string(index=False))
        print(CAUTION)
    return EXIT_OK


#: The command line's estimator when none is named: on a noisy log with stops, finite differences
#: reported |a_t| of 29–37 m/s² for vehicles braking at 2 m/s², and found no curved sample.
CLI_METHOD = "smooth"


def _default_method() -> str:
    """Return the default ``method`` of :func:`osculate.kinematics` (what the CLI passes on)."""
    from .intrinsic import kinematics

    return str(inspect.signature(kinematics).parameters["method"].default)


def _add_data_commands(sub: Any) -> None:
    """Add the ``analyze`` and ``summary`` subcommands."""
    common = argparse.ArgumentParser(add_help=False)
    common.add_argument("file", help="input table: .csv or .parquet")
    common.add_argument(
        "--time", required=True, metavar="COL", help="time column (seconds or dates)"
    )
    where = common.add_mutually_exclusive_group(required=True)
    where.add_argument("--position", metavar="X,Y[,Z]", help="Cartesian position columns")
    where.add_argument(
        "--geodetic",
        metavar="LAT,LON[,ALT]",
        help="WGS 84 latitude, longitude (degrees) and ellipsoidal height (m) columns; each "
        "track becomes east-north-up metres about its first fix",
    )
    common.add_argument(
        "--origin", metavar="LAT,LON,H", help="one origin for all tracks (geodetic)"
    )
    common.add_argument("--track", metavar="COL", help="track id column (default: one track)")
    common.add_argument(
        "--method",
        choices=KINEMATICS_METHODS,
        help=f"derivative estimator, as in osculate.kinematics (default: {CLI_METHOD}; logs are "
        f"noisy, and finite differences ({_default_method()}, the Python default, meant for exact "
        "or simulated paths) turn their noise into accelerations of several g)",
    )
    common.add_argument("--order", type=int, help="finite-difference order")
    common.add_argument("--smoothing", type=float, help="smoothing parameter of the estimator")
    common.add_argument(
        "--min-speed", type=_auto_or_float, help="slower samples are STOPPED (or 'auto')"
    )
    common.add_argument(
        "--min-curvature", type=_auto_or_float, help="flatter samples are STRAIGHT (or 'auto')"
    )
    common.add_argument(
        "--gap-factor", type=float, help="time steps this many medians long are gaps"
    )
    common.add_argument("--up", metavar="X,Y,Z", help="axis of the signed curvature (3-D paths)")
    common.add_argument("-q", "--quiet", action="store_true", help="no progress bar, no messages")
    common.add_argument("--debug", action="store_true", help="show the traceback of an error")
    analyze = sub.add_parser(
        "analyze",
        parents=[common],
        help="per-sample kinematics of a table of tracks, written next to the input columns",
        description="Read a CSV or Parquet table, compute the kinematics of every track, write the "
        "input columns followed by the results. Error rows are counted from 0, header excluded. "
        f"{EXIT_STATUS}",
        epilog=f"Lateral acceleration, jerk and radius are indicative, not a safety assessment. "
        f"{ATOMIC_NOTE}",
    )
    analyze.add_argument("-o", "--output", required=True, help="output table: .csv or .parquet")
    analyze.add_argument("--columns", metavar="A,B,...", help="keep only these results")
    summary = sub.add_parser(
        "summary",
        parents=[common],
        help="one line per track: length, duration, speeds, accelerations, radius",
        description="Print one line per track, then the intervals where a track stood still. "
        f"Columns and units: osculate.SUMMARY_COLUMNS. {EXIT_STATUS}",
        epilog=ATOMIC_NOTE,
    )
    summary.add_argument("-o", "--output", help="also write the table (.csv or .parquet)")
    summary.add_argument("--stops", help="also write the stop intervals (.csv or .parquet)")
    summary.add_argument(
        "--turns",
        help="also write one row per turn (.csv or .parquet): direction, heading change, "
        "smallest radius (a circle through the turn's core), peak lateral acceleration, speeds",
    )
    summary.add_argument(
        "--speed-changes",
        help="also write one row per speed-up or slow-down above 0.5 length units/time unit² "
        "(.csv or .parquet)",
    )
    summary.add_argument(
        "--elements",
        help="also write the path's straights, circular arcs and transition spirals, one row "
        "each (.csv or .parquet): reconstructions from the log, not design values",
    )
    summary.add_argument(
        "--recompute",
        action="store_true",
        help="given an output of `osculate analyze`, compute the results again from the "
        "positions instead of summarising the columns it holds",
    )


def _print_warnings(command: str, caught: list[warnings.WarningMessage]) -> None:
    """Print data warnings as one line each on stderr (once each, whatever the chunking)."""
    seen = set()
    for w in caught:
        if not issubclass(w.category, SuspectDataWarning):
            warnings.showwarning(w.message, w.category, w.filename, w.lineno)
            continue
        text = " ".join(str(w.message).split())
        if text not in seen:
            seen.add(text)
            print(f"osculate {command}: warning: {text}", file=sys.stderr)


def _run_data_command(args: argparse.Namespace) -> int:
    """Run analyze / summary; map errors to one line on stderr and an exit status."""
    from ._core import InputError

    run = _analyze if args.command == "analyze" else _summarize
    try:
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always", SuspectDataWarning)
            try:
                return run(args)
            finally:
                _print_warnings(args.command, caught)
    except Exception as err:  # one line on stderr; --debug adds the traceback
        if isinstance(err, (_UsageError, InputError, TypeError, KeyError, FileNotFoundError)):
            code, message = EXIT_INPUT, str(err)
        elif isinstance(err, (ImportError, _WriteError)):
            code, message = EXIT_FAILURE, str(err)
        elif isinstance(err, MemoryError):
            code, message = EXIT_FAILURE, "out of memory (try fewer rows, or --columns)"
        else:  # a bug or the environment: the class name helps, unless it is a library's own
            library = type(err).__module__.split(".")[0] in ("pandas", "pyarrow")
            name = "" if library else f"{type(err).__name__}: "
            code, message = EXIT_FAILURE, f"unexpected {name}{err} (--debug shows the traceback)"
        if args.debug:
            traceback.print_exception(type(err), err, err.__traceback__)
    print(f"osculate {args.command}: error: {' '.join(message.split())}", file=sys.stderr)
    return code


@contextlib.contextmanager
def _signals_raise() -> Iterator[None]:
    """While the command runs, SIGTERM and SIGHUP raise :class:`_Terminated`.

    Python's default for them is to die at once, leaving temporary files behind; as exceptions
    they unwind through the writers' cleanup. The earlier handlers are restored afterwards (in the
    main thread only: elsewhere handlers cannot be set, and nothing is changed).
    """

    def handler(signum: int, frame: Optional[FrameType]) -> None:
        raise _Terminated(signum)

    previous: dict[int, Any] = {}
    try:
        if threading.current_thread() is threading.main_thread():
            for name in ("SIGTERM", "SIGHUP"):
                if hasattr(signal, name):
                    number = getattr(signal, name)
                    previous[number] = signal.signal(number, handler)
        yield
    finally:
        for number, old in previous.items():
            signal.signal(number, old)


def main(argv: Sequence[str] | None = None) -> int:
    """Entry point of the ``osculate`` console script."""
    parser = argparse.ArgumentParser(
        prog="osculate", description="Intrinsic kinematics of recorded paths."
    )
    parser.add_argument("--version", action="version", version=f"osculate {__version__}")
    sub = parser.add_subparsers(dest="command", required=True)
    demo = sub.add_parser(
        "demo",
        help="run the whole job on invented scenarios and write a report folder",
        description="Generate three invented scenarios with known ground truth (a survey drone's "
        "GPS log, an electric vehicle on a loop with clothoid bends, tracer particles in a "
        "vortex), estimate their kinematics, frames, resampled points, work and circulation, and "
        "write per-sample tables, a per-track summary, figures (with matplotlib) and report.md "
        "comparing every key figure with the truth. Exit status 1 if one is out of tolerance.",
    )
    demo.add_argument(
        "--out",
        type=Path,
        default=Path("osculate-report"),
        help="report folder (default: %(default)s)",
    )
    _add_data_commands(sub)
    args = parser.parse_args(argv)
    try:
        with _signals_raise():
            if args.command in ("analyze", "summary"):
                return _run_data_command(args)
            if args.command == "demo":
                return _demo(args)
            return EXIT_OK
    except KeyboardInterrupt:
        if getattr(args, "debug", False):
            traceback.print_exc()
        print(f"osculate {args.command}: interrupted", file=sys.stderr)
        return EXIT_INTERRUPTED
    except _Terminated as stop:
        print(
            f"osculate {args.command}: stopped by {signal.Signals(stop.signum).name}",
            file=sys.stderr,
        )
        return 128 + stop.signum


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())

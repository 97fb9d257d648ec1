"""The ``osculate`` command line."""

from __future__ import annotations

import argparse
import sys
import time
import traceback
import warnings
from collections.abc import Sequence
from pathlib import Path
from typing import Any

import numpy as np

from . import __version__
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
    rep = run_demo(args.out)
    table = [ln for ln in rep.report.read_text().splitlines() if ln.startswith("| ")]
    print("\n".join(ln for ln in table if not ln.startswith("| key figure")))
    if not rep.figures:
        print("osculate demo: no figures (they need matplotlib): pip install 'osculate[plot]'")
    took = f"{len(rep.files)} files in {rep.seconds:.1f} s"
    print(f"osculate demo: {took}, report written to {rep.report}")
    print(CAUTION)
    if not rep.passed:
        print("osculate demo: some estimates are outside their stated tolerance", file=sys.stderr)
        return 1
    return 0


# -- analyze / summary: files in, files out ----------------------------------------------------

EXIT_OK, EXIT_FAILURE, EXIT_INPUT = 0, 1, 2
ROWS_PER_CALL = 250_000  # with a progress bar, tracks go to Rust in chunks of about this many rows


class _UsageError(Exception):
    """Bad input or arguments: exit code 2."""


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


def _pyarrow(what: str) -> Any:
    try:
        import pyarrow
    except ImportError as exc:
        raise ImportError(f"{what} needs pyarrow: pip install 'osculate[cli]'") from exc
    return pyarrow


def _read(path: Path) -> Any:
    import pandas as pd

    kind = _format(path, "input")
    if not path.is_file():
        raise _UsageError(f"input {str(path)!r}: no such file")
    if kind == "parquet":
        _pyarrow("reading Parquet")
        return pd.read_parquet(path)
    try:
        import pyarrow  # noqa: F401  (the fast CSV reader; it also parses ISO 8601 times)
    except ImportError:
        return pd.read_csv(path)
    return pd.read_csv(path, engine="pyarrow")


def _write(df: Any, path: Path) -> None:
    import pandas as pd

    kind = _format(path, "output")
    keep_index = not isinstance(df.index, pd.RangeIndex)
    if kind == "parquet":
        _pyarrow("writing Parquet")
        df.to_parquet(path, index=keep_index)
        return
    try:
        import pyarrow as pa
        import pyarrow.csv as pacsv
    except ImportError:
        df.to_csv(path, index=keep_index)
        return
    table = pa.Table.from_pandas(df.reset_index() if keep_index else df, preserve_index=False)
    pacsv.write_csv(table, path)


def _parse_times(df: Any, column: str) -> Any:
    """Return ``df`` with a text time column read as ISO 8601 times (the CSV reader may not)."""
    import pandas as pd

    if column not in df.columns:
        return df
    s = df[column]
    if not (pd.api.types.is_object_dtype(s.dtype) or pd.api.types.is_string_dtype(s.dtype)):
        return df
    try:
        parsed = pd.to_datetime(s, format="ISO8601", utc=True)
    except (ValueError, TypeError):
        coerced = pd.to_datetime(s, format="ISO8601", utc=True, errors="coerce")
        bad = int(np.argmax(coerced.isna().to_numpy() & s.notna().to_numpy()))
        raise _UsageError(
            f"column {column!r}, row {df.index[bad]!r}: cannot read {s.iloc[bad]!r} as a time "
            "(use numbers of seconds or ISO 8601)"
        ) from None
    return df.assign(**{column: parsed})


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


def _analyze(args: argparse.Namespace) -> int:
    import pandas as pd

    spec = _selection(args)
    if args.columns is not None:
        spec["columns"] = [c.strip() for c in args.columns.split(",") if c.strip()]
    out_path = Path(args.output)
    _format(out_path, "output")
    started = time.perf_counter()
    df = _parse_times(_read(Path(args.file)), args.time)
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
    _write(table, out_path)
    if not args.quiet:
        n_tracks = 1 if args.track is None else table[args.track].nunique()
        took = time.perf_counter() - started
        print(
            f"osculate analyze: {len(table)} rows, {n_tracks} tracks, {res.shape[1]} result "
            f"columns written to {out_path} in {took:.1f} s"
        )
    return EXIT_OK


def _summarize(args: argparse.Namespace) -> int:
    import pandas as pd

    from .accessor import summary_and_stops

    spec = _selection(args)
    keys = ("time", "position", "by", "crs", "origin")
    where = [spec.pop(k, None) for k in keys]
    df = _parse_times(_read(Path(args.file)), args.time)
    parts = _in_chunks(df, args.track, lambda part: summary_and_stops(part, *where, spec), args)
    table = pd.concat([p[0] for _, p in parts])
    stops = pd.concat([p[1] for _, p in parts], ignore_index=True)
    if args.output is not None:
        _write(table, Path(args.output))
    if args.stops is not None:
        _write(stops, Path(args.stops))
    if not args.quiet:
        with pd.option_context("display.max_rows", None, "display.width", 250):
            print(table.to_string())
            print(f"\n{len(stops)} stop(s):")
            if len(stops):
                print(stops.to_string(index=False))
        print(CAUTION)
    return EXIT_OK


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
    common.add_argument("--method", help="derivative estimator, as in osculate.kinematics")
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
        "Exit status: 0 done, 1 failure, 2 bad arguments or input.",
    )
    analyze.add_argument("-o", "--output", required=True, help="output table: .csv or .parquet")
    analyze.add_argument("--columns", metavar="A,B,...", help="keep only these results")
    summary = sub.add_parser(
        "summary",
        parents=[common],
        help="one line per track: length, duration, speeds, accelerations, radius",
        description="Print one line per track, then the intervals where a track stood still; "
        "exit status as for analyze. Columns and units: osculate.SUMMARY_COLUMNS.",
    )
    summary.add_argument("-o", "--output", help="also write the table (.csv or .parquet)")
    summary.add_argument("--stops", help="also write the stop intervals (.csv or .parquet)")


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
        elif isinstance(err, ImportError):
            code, message = EXIT_FAILURE, str(err)
        elif type(err).__module__.startswith("pyarrow"):
            code, message = EXIT_INPUT, f"{args.file}: {err}"  # a file pyarrow cannot read
        else:
            code, message = EXIT_FAILURE, f"{type(err).__name__}: {err}"
        if args.debug:
            traceback.print_exception(type(err), err, err.__traceback__)
    print(f"osculate {args.command}: error: {' '.join(message.split())}", file=sys.stderr)
    return code


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
    demo.add_argument("--out", type=Path, default=Path("osculate-report"), help="report folder")
    _add_data_commands(sub)
    args = parser.parse_args(argv)
    if args.command in ("analyze", "summary"):
        return _run_data_command(args)
    if args.command == "demo":
        return _demo(args)
    return 0


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())

"""The ``osculate`` command line."""

from __future__ import annotations

import argparse
import csv
import sys
import time
import traceback
from collections.abc import Sequence
from pathlib import Path
from typing import Any

import numpy as np

from . import __version__
from .demo import test_loop
from .flags import Flag
from .intrinsic import Kinematics, kinematics

__all__ = ["main"]

CAUTION = (
    "Values are indicative. Lateral acceleration, jerk and radius estimated from logged data are "
    "not a safety assessment: local codes and licensed engineers decide whether a road, track, "
    "ride or vehicle is acceptable."
)


def _write_table(path: Path, columns: dict[str, np.ndarray]) -> None:
    names = list(columns)
    with path.open("w", newline="") as fh:
        w = csv.writer(fh)
        w.writerow(names)
        w.writerows(zip(*(columns[c].tolist() for c in names)))


def _samples(k: Kinematics) -> dict[str, np.ndarray]:
    assert k.tracks is not None
    return {
        "lap": k.tracks,
        "t": k.t,
        "x": k.position[:, 0],
        "y": k.position[:, 1],
        "speed": k.speed,
        "arclength": k.arclength,
        "curvature": k.curvature,
        "signed_curvature": k.signed_curvature,
        "radius": k.radius,
        "accel_tangential": k.accel_tangential,
        "accel_normal": k.accel_normal,
        "angular_speed": k.angular_speed,
        "flags": k.flags,
    }


def run_demo(out: Path) -> Path:
    """Run the test-loop scenario and write the report folder; returns the report path."""
    out.mkdir(parents=True, exist_ok=True)
    d = test_loop(laps=3)
    k = kinematics(d.t, d.xy, tracks=d.lap, order=4)
    _write_table(out / "samples.csv", _samples(k))
    _write_table(out / "summary.csv", k.summary_arrays())

    # Rows well inside a bend: the stencils do not straddle the jump of curvature at its ends.
    inner = d.in_bend.copy()
    for shift in range(1, 4):
        inner &= np.roll(d.in_bend, shift) & np.roll(d.in_bend, -shift)
    inner &= ~k.flagged(Flag.EDGE | Flag.GAP | Flag.INVALID)
    radius = float(np.median(k.radius[inner]))
    true_an = d.speed**2 / d.bend_radius
    an_err = float(np.max(np.abs(k.accel_normal[inner] - true_an[inner]) / true_an[inner]))
    speed_err = float(np.max(np.abs(k.speed - d.speed)[~k.flagged(Flag.INVALID)]))
    report = out / "report.md"
    report.write_text(
        f"""# osculate demo: oval test loop

Scenario (invented, seed 7): a small electric vehicle laps an oval of two {d.straight_length:.0f} m
straights and two half-circle bends of radius {d.bend_radius:.0f} m, three laps, logged at 20 Hz
with clock jitter of ±20 % of the step, speed swinging between 8 and 12 m/s. Positions are exact (no
noise): finite differences amplify noise and the smoothing estimators are a separate feature.

Method: `osculate.kinematics(t, xy, tracks=lap, order=4)` (4th-order finite differences with
Fornberg weights on the uneven times); {len(k)} samples, {int(k.tracks.max()) + 1} tracks.

| figure | estimated | true |
|---|---|---|
| bend radius (median inside bends) | {radius:.4f} m | {d.bend_radius:.4f} m |
| max relative error of a_n = v²/R inside bends | {an_err:.2e} | 0 |
| max absolute speed error | {speed_err:.2e} m/s | 0 |

Straights are flagged STRAIGHT (curvature 0, normal undefined):
{int(k.flagged(Flag.STRAIGHT).sum())} samples. At the ends of each bend the curvature of this loop
jumps from 0 to 1/R (no transition spiral), so estimates there are a blend of both.

Files: `samples.csv` (per-sample results, flags as bits of `osculate.Flag`), `summary.csv` (one
row per lap).

**Caution.** {CAUTION}
"""
    )
    return report


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

    spec = _selection(args)
    df = _parse_times(_read(Path(args.file)), args.time)
    parts = _in_chunks(df, args.track, lambda part: part.osc.summary(**spec), args)
    table = pd.concat([p for _, p in parts]) if len(parts) > 1 else parts[0][1]
    if args.output is not None:
        _write(table, Path(args.output))
    if not args.quiet:
        with pd.option_context("display.max_rows", None, "display.width", 250):
            print(table.to_string())
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
    common.add_argument("--min-speed", type=float, help="slower samples are STOPPED")
    common.add_argument("--min-curvature", type=float, help="flatter samples are STRAIGHT")
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
        description="Print one line per track; exit status as for analyze.",
    )
    summary.add_argument("-o", "--output", help="also write the table (.csv or .parquet)")


def _run_data_command(args: argparse.Namespace) -> int:
    """Run analyze / summary; map errors to one line on stderr and an exit status."""
    from ._core import InputError

    run = _analyze if args.command == "analyze" else _summarize
    try:
        return run(args)
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
    demo = sub.add_parser("demo", help="run the whole job on the bundled demo scenario")
    demo.add_argument("--out", type=Path, default=Path("osculate-report"), help="report folder")
    _add_data_commands(sub)
    args = parser.parse_args(argv)
    if args.command in ("analyze", "summary"):
        return _run_data_command(args)
    if args.command == "demo":
        report = run_demo(args.out)
        table = [ln for ln in report.read_text().splitlines() if ln.startswith("|")]
        print("\n".join(table))
        print(f"osculate demo: report written to {report}")
    return 0


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())

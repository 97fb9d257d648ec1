"""The data commands: ``osculate analyze`` and ``osculate summary``, tracks in chunks."""

from __future__ import annotations

import argparse
import sys
import time
from pathlib import Path
from typing import Any, Optional

import numpy as np

from .._validate import Grouping
from ._files import (
    UsageError,
    check_input,
    check_output,
    destination,
    need_pandas,
    parse_numbers,
    parse_times,
    read_table,
    write_output,
)

__all__ = [
    "CAUTION",
    "CLI_METHOD",
    "EXIT_FAILURE",
    "EXIT_INPUT",
    "EXIT_INTERRUPTED",
    "EXIT_OK",
    "ROWS_PER_CALL",
    "analyze",
    "auto_or_float",
    "summarize",
]

CAUTION = (
    "Values are indicative. Lateral acceleration, jerk and radius estimated from logged data are "
    "not a safety assessment: local codes and licensed engineers decide whether a road, track, "
    "ride or vehicle is acceptable."
)


EXIT_OK, EXIT_FAILURE, EXIT_INPUT, EXIT_INTERRUPTED = 0, 1, 2, 130
ROWS_PER_CALL = 250_000  # with a progress bar, tracks go to Rust in chunks of about this many rows
_WHERE = ("time", "position", "by", "crs", "origin")  # summary_and_stops's leading arguments


def _names(text: str, option: str, sizes: tuple[int, ...]) -> list[str]:
    names = [s.strip() for s in text.split(",")]
    if len(names) not in sizes or not all(names):
        want = " or ".join(str(k) for k in sizes)
        raise UsageError(f"{option}: expected {want} comma-separated column names, got {text!r}")
    return names


def _numbers(text: str, option: str, size: int) -> tuple[float, ...]:
    try:
        values = tuple(float(s) for s in text.split(","))
    except ValueError:
        values = ()
    if len(values) != size:
        raise UsageError(f"{option}: expected {size} comma-separated numbers, got {text!r}")
    return values


def auto_or_float(text: str) -> float | str:
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
            raise UsageError("--origin: only with --geodetic")
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

    from .._columns import column_values

    n = len(df)
    codes = None
    if by is not None:
        codes, _ = pd.factorize(column_values(df, by, "by"))
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
    chunks = Grouping.from_codes(chunk_of_track[codes], np.arange(int(chunk_of_track[-1]) + 1))
    order = np.arange(n) if chunks.order is None else chunks.order
    bounds = chunks.offsets
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

    from .._columns import column_values

    n = len(df)
    if n == 0:
        return "the input has no rows (a header only): the results will be empty"
    if by is None:
        return f"1 track of {_plural(n, 'row')} (no --track: every row is on one path)"
    codes, labels = pd.factorize(column_values(df, by, "by"))
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
    from .._columns import column_values

    df = read_table(source)
    df = parse_numbers(parse_times(df, args.time), spec["position"])
    # Missing columns fail here, as the accessor would (same order and message), before the line.
    column_values(df, args.time, "time")
    for column in spec["position"]:
        column_values(df, column, "position")
    if args.track is not None:
        column_values(df, args.track, "by")
    if not args.quiet:
        print(f"osculate {args.command}: {_tracks_line(df, args.track)}", file=sys.stderr)
    return df


def analyze(args: argparse.Namespace) -> int:
    """``osculate analyze``: per-sample kinematics written next to the input columns."""
    pd = need_pandas()
    spec = _selection(args)
    if args.columns is not None:
        spec["columns"] = [c.strip() for c in args.columns.split(",") if c.strip()]
    source = check_input(args.file)
    out_path = check_output(args.output, "--output")
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
    write_output(table, out_path, "--output")
    if not args.quiet:
        n_tracks = 1 if args.track is None else table[args.track].nunique()
        took = time.perf_counter() - started
        print(
            f"osculate analyze: {len(table)} rows, {_plural(n_tracks, 'track')}, "
            f"{res.shape[1]} result columns written to {out_path} in {took:.1f} s"
        )
        print(CAUTION)
    return EXIT_OK


def summarize(args: argparse.Namespace) -> int:
    """``osculate summary``: one line per track and the stop intervals."""
    pd = need_pandas()
    from .._dataframes import RESULTS_SUMMARIZED, summary_and_stops

    spec = _selection(args)
    source = check_input(args.file)
    outputs = {
        "--output": args.output,
        "--stops": args.stops,
        "--turns": args.turns,
        "--speed-changes": args.speed_changes,
        "--elements": args.elements,
    }
    paths = {k: check_output(v, k) for k, v in outputs.items() if v is not None}
    seen: dict[Any, str] = {}
    for option, path in paths.items():
        other = seen.setdefault(destination(path), option)
        if other != option:
            raise UsageError(f"{option} {outputs[option]!r}: the same file as {other}")
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
        write_output(table, paths["--output"], "--output")
    if "--stops" in paths:
        write_output(stops, paths["--stops"], "--stops")
    if "--turns" in paths:
        write_output(found["turns"], paths["--turns"], "--turns")
    if "--speed-changes" in paths:
        write_output(found["speed_changes"], paths["--speed-changes"], "--speed-changes")
    if "--elements" in paths:
        write_output(found["elements"], paths["--elements"], "--elements")
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

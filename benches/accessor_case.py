"""The pandas accessor against ``groupby().apply`` with a NumPy per-track implementation.

    python benches/accessor_case.py [--quick] [--out FILE.json]

Data: ``data.many_tracks`` (1,000 tracks of ~1,000 samples, 3-D; ``--quick``: 100 tracks), laid
out as a log: rows ordered by time, so the tracks are interleaved, on a RangeIndex.

* accessor: ``df.osc.kinematics(time="t", position=["x", "y", "z"], by="track", ...)`` (absolute
  thresholds, no stop intervals, as the reference), every output on
  the caller's rows (one Rust call for all tracks);
* baseline: ``df.groupby("track")[cols].apply(f)`` where ``f`` sorts the track's rows by time, runs
  ``reference.kinematics`` (the vectorized NumPy implementation of the same quantities beside this
  file) and returns a DataFrame of the same columns on the group's index; the result is put back
  on the caller's rows with ``reindex``.

Beside it, the same pair asked for four columns only, ``FOUR`` = speed, curvature,
accel_tangential, accel_normal:

* accessor: the same call with ``columns=FOUR`` (the accessor passes the quantities behind the
  columns to the kernel as ``outputs=``, so nothing else is computed or written);
* baseline: the same groupby-apply with ``reference.speed_curvature_split`` (r′ and r″ by the
  same 3-point stencils, then those four formulas only).

Before timing, both all-column results are checked equal with ``check.compare`` (the tolerances
stated there), and each four-column result must be bit-identical (NaN where NaN) to the same
columns of its all-column result, so the four-column pair is equal to the tolerances of
``check.compare`` too. Targets (reported PASS / MISS, not asserted), for both rows: the accessor
≥ 50× faster than the baseline, and its peak memory (growth of the resident set during the call,
measured in a fresh interpreter) ≤ 3× the memory of the input frame.

``run(quick) -> dict`` is the entry point for a driver; ``main`` prints the dict as JSON.
"""

from __future__ import annotations

import argparse
import json
import statistics
import subprocess
import sys
import time
from pathlib import Path
from typing import Any

import numpy as np
import pandas as pd

HERE = Path(__file__).resolve().parent
if str(HERE) not in sys.path:
    sys.path.insert(0, str(HERE))

import check  # noqa: E402  (beside this file)
import data  # noqa: E402
import osculate  # noqa: E402, F401  (registers DataFrame.osc)
import reference  # noqa: E402

XYZ = ["x", "y", "z"]
FOUR = list(reference.SPLIT_FIELDS)
SIZES = {False: (1000, 1000), True: (100, 1000)}  # (tracks, mean samples per track)
TARGET_SPEEDUP = 50.0
TARGET_PEAK_RATIO = 3.0


def make_frame(m: int, mean_len: int) -> pd.DataFrame:
    """A log of ``m`` tracks: rows ordered by time, tracks interleaved."""
    t, x, off = data.many_tracks(m, mean_len)
    ids = np.repeat(np.arange(m), np.diff(off))
    order = np.argsort(t, kind="stable")
    return pd.DataFrame(
        {"track": ids[order], "t": t[order], "x": x[order, 0], "y": x[order, 1], "z": x[order, 2]}
    )


def accessor(df: pd.DataFrame) -> pd.DataFrame:
    """Every output of every track, on the caller's rows, with one call."""
    # The reference knows absolute thresholds only and no stop intervals: ask for the same.
    return df.osc.kinematics(
        time="t", position=XYZ, by="track", min_speed=1e-3, min_curvature=1e-6, min_stop=np.inf
    )


def accessor_four(df: pd.DataFrame) -> pd.DataFrame:
    """Speed, curvature, a_t and a_n of every track, on the caller's rows, with one call."""
    return df.osc.kinematics(
        time="t",
        position=XYZ,
        by="track",
        columns=FOUR,
        min_speed=1e-3,
        min_curvature=1e-6,
        min_stop=np.inf,
    )


def _per_track(g: pd.DataFrame) -> pd.DataFrame:
    g = g.sort_values("t", kind="stable")
    out = reference.kinematics(g["t"].to_numpy(), g[XYZ].to_numpy())
    cols: dict[str, np.ndarray] = {}
    for name in reference.FIELDS:
        a = out[name]
        if a.ndim == 1:
            cols[name] = a
        else:
            for j, axis in enumerate("xyz"[: a.shape[1]]):
                cols[f"{name}_{axis}"] = a[:, j]
    return pd.DataFrame(cols, index=g.index)


def baseline(df: pd.DataFrame) -> pd.DataFrame:
    """The usual pandas way: groupby().apply of a NumPy per-track function, back on the rows."""
    res = df.groupby("track", group_keys=False)[["t", *XYZ]].apply(_per_track)
    return res.reindex(df.index)


def _per_track_four(g: pd.DataFrame) -> pd.DataFrame:
    g = g.sort_values("t", kind="stable")
    out = reference.speed_curvature_split(g["t"].to_numpy(), g[XYZ].to_numpy())
    return pd.DataFrame(out, index=g.index)


def baseline_four(df: pd.DataFrame) -> pd.DataFrame:
    """groupby().apply of the NumPy per-track function of the four quantities, on the rows."""
    res = df.groupby("track", group_keys=False)[["t", *XYZ]].apply(_per_track_four)
    return res.reindex(df.index)


def _same_columns(four: pd.DataFrame, every: pd.DataFrame, what: str) -> None:
    """``four`` holds exactly FOUR, each bit-identical to ``every``'s column (NaN where NaN)."""
    if list(four.columns) != FOUR or not four.index.equals(every.index):
        raise AssertionError(f"{what}: columns {list(four.columns)}, expected {FOUR}")
    for c in FOUR:
        a, b = four[c].to_numpy(), every[c].to_numpy()
        if a.dtype != b.dtype or not np.array_equal(a, b, equal_nan=True):
            raise AssertionError(f"{what}: column {c} differs from the all-column result")


def _kernel_order(df: pd.DataFrame, res: pd.DataFrame) -> dict[str, np.ndarray]:
    """Result columns → the per-field arrays of ``check.compare``, grouped by track and time."""
    order = np.lexsort((df["t"].to_numpy(), df["track"].to_numpy()))
    out = {}
    for name in reference.FIELDS:
        if name in res.columns:
            out[name] = res[name].to_numpy()[order]
        else:
            comps = [c for c in (f"{name}_{a}" for a in "xyz") if c in res.columns]
            out[name] = res[comps].to_numpy()[order]
    return out


def verify(df: pd.DataFrame, quick: bool) -> dict[str, Any]:
    """Both results hold the same numbers (check.compare's tolerances); the accessor's rows."""
    mine, theirs = accessor(df), baseline(df)
    _same_columns(accessor_four(df), mine, "accessor columns=FOUR")
    _same_columns(baseline_four(df), theirs, "groupby-apply of the four")
    if not mine.index.equals(df.index) or not theirs.index.equals(df.index):
        raise AssertionError("a result is not on the caller's rows")
    order = np.lexsort((df["t"].to_numpy(), df["track"].to_numpy()))
    counts = np.bincount(df["track"].to_numpy())
    offsets = np.zeros(len(counts) + 1, dtype=np.int64)
    np.cumsum(counts, out=offsets[1:])
    figures = check.compare(
        _kernel_order(df, mine),
        _kernel_order(df, theirs),
        df["t"].to_numpy()[order],
        df[XYZ].to_numpy()[order],
        offsets,
        {},
        f"accessor vs groupby-apply ({'quick' if quick else 'full'})",
    )
    return {
        "samples": figures["samples"],
        "flags_identical": figures["flags_identical"],
        "four_columns_bit_identical_to_all_columns": True,
    }


def _timed(fn: Any, df: pd.DataFrame, repeats: int) -> dict[str, float]:
    times = []
    for _ in range(repeats):
        start = time.perf_counter()
        fn(df)
        times.append(time.perf_counter() - start)
    return {"median_s": statistics.median(times), "min_s": min(times), "repeats": repeats}


def _peak_job(quick: bool, four: bool) -> dict[str, Any]:
    """In a fresh interpreter: resident-set growth during one accessor call (VmHWM reset)."""

    def status_kib(field: str) -> int:
        with open("/proc/self/status") as f:
            for line in f:
                if line.startswith(field + ":"):
                    return int(line.split()[1])
        raise OSError(field)

    call = accessor_four if four else accessor
    df = make_frame(*SIZES[quick])
    call(df.iloc[:1000])  # warm-up: imports, thread pool
    input_bytes = int(df.memory_usage(index=True, deep=True).sum())
    with open("/proc/self/clear_refs", "w") as f:
        f.write("5")
    before = status_kib("VmRSS")
    res = call(df)
    growth = (status_kib("VmHWM") - before) * 1024
    return {
        "input_bytes": input_bytes,
        "output_bytes": int(res.memory_usage(index=False).sum()),
        "peak_growth_bytes": growth,
    }


def run(quick: bool) -> dict[str, Any]:
    """Check, time and measure; return the figures and the PASS / MISS of each target."""
    m, mean_len = SIZES[quick]
    df = make_frame(m, mean_len)
    result: dict[str, Any] = {"rows": len(df), "tracks": m, "check": verify(df, quick)}
    result["accessor"] = _timed(accessor, df, 2 if quick else 5)
    result["groupby_apply"] = _timed(baseline, df, 1)
    result["speedup"] = _speedup(result["groupby_apply"], result["accessor"])
    result["peak_memory"] = _peak(quick, four=False)
    result["accessor_four"] = _timed(accessor_four, df, 2 if quick else 5)
    result["groupby_apply_four"] = _timed(baseline_four, df, 1)
    result["speedup_four"] = _speedup(result["groupby_apply_four"], result["accessor_four"])
    result["peak_memory_four"] = _peak(quick, four=True)
    return result


def _speedup(baseline_time: dict[str, float], accessor_time: dict[str, float]) -> dict[str, Any]:
    speedup = baseline_time["median_s"] / accessor_time["median_s"]
    return {
        "measured": speedup,
        "target": TARGET_SPEEDUP,
        "status": "PASS" if speedup >= TARGET_SPEEDUP else "MISS",
    }


def _peak(quick: bool, four: bool) -> dict[str, Any]:
    """Peak memory of one accessor call (all columns, or ``FOUR``) in a fresh interpreter."""
    flags = [*(["--quick"] if quick else []), *(["--four"] if four else [])]
    try:
        job = subprocess.run(
            [sys.executable, __file__, "--peak-job", *flags],
            capture_output=True,
            text=True,
            check=True,
            timeout=600,
        )
        peak = json.loads(job.stdout.strip().splitlines()[-1])
        ratio = peak["peak_growth_bytes"] / peak["input_bytes"]
        return {
            **peak,
            "ratio_to_input": ratio,
            "target": TARGET_PEAK_RATIO,
            "status": "PASS" if ratio <= TARGET_PEAK_RATIO else "MISS",
        }
    except (OSError, subprocess.SubprocessError, ValueError) as err:  # not Linux, or it failed
        return {"status": "NOT MEASURED", "why": str(err)}


def main() -> None:
    """Command line: print the figures as JSON (and write them with --out)."""
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--quick", action="store_true", help="100 tracks instead of 1000")
    p.add_argument("--out", type=Path, help="also write the JSON here")
    p.add_argument("--peak-job", action="store_true", help=argparse.SUPPRESS)
    p.add_argument("--four", action="store_true", help=argparse.SUPPRESS)
    args = p.parse_args()
    if args.peak_job:
        print(json.dumps(_peak_job(args.quick, args.four)))
        return
    figures = run(args.quick)
    text = json.dumps(figures, indent=2)
    print(text)
    if args.out is not None:
        args.out.write_text(text + "\n")


if __name__ == "__main__":
    main()

"""Resampling at a uniform arc-length step: osculate against ``np.interp`` on the chord length.

    python benches/resample_case.py [--quick] [--out FILE.json]

One 3-D track (``data.one_track``) of 1e5 and 1e6 samples (``--quick``: 1e5 only), resampled
every ``step`` = length / n (about one point per sample) with ``osc.resample(t, x, step=step)``:

linear
    ``method="linear"`` (the polyline through the samples). Reference: the same computation in
    NumPy — chord lengths ``cumsum(norm(diff(x)))``, then ``np.interp`` of t and of each
    coordinate at s = 0, step, 2·step, … Checked equal first: |Δx| ≤ ``TOL_LINEAR`` · length (the
    two running sums of n chord lengths round differently; n · eps · length bounds the gap).
spline
    ``method="spline"`` (the interpolating cubic, not-a-knot; exact arc length by Gauss–Legendre
    quadrature and Newton steps). Same reference timing (the cheapest way to resample at all).
    Checked first: every point lies on the spline, |x − CubicSpline(t)(t_j)| ≤ ``TOL_SPLINE`` ·
    size (``scipy.interpolate.CubicSpline``, the same spline, as reference), and the points'
    arc lengths differ from the chord lengths by less than ``TOL_CHORD`` relative (the polyline
    is shorter than the curve by O(h²κ²)).

Targets (PASS / MISS, never asserted): linear ≥ 1× the reference, spline ≥ 0.5×. Each timing is
the median of repeated calls after one warm-up call, osculate and NumPy in the same process.
``run(quick) -> dict`` is the entry point for ``run.py``.
"""

from __future__ import annotations

import argparse
import json
import statistics
import sys
import time
from pathlib import Path
from typing import Any, Callable

import numpy as np

HERE = Path(__file__).resolve().parent
if str(HERE) not in sys.path:
    sys.path.insert(0, str(HERE))

import data  # noqa: E402
import osculate as osc  # noqa: E402
from scipy.interpolate import CubicSpline  # noqa: E402

SIZES = {False: [100_000, 1_000_000], True: [100_000]}
TARGETS = {"linear": 1.0, "spline": 0.5}
#: Linear: |Δx| / length between osculate and NumPy (see the module docstring).
TOL_LINEAR = 1e-9
#: Spline: |x − CubicSpline(t_j)| / size of the track.
TOL_SPLINE = 1e-12
#: Spline: |s − chord length at t_j| / length.
TOL_CHORD = 1e-4


def _timed(fn: Callable[[], Any], repeats: int) -> dict[str, float]:
    fn()
    times = []
    for _ in range(repeats):
        start = time.perf_counter()
        fn()
        times.append(time.perf_counter() - start)
    return {"median_s": statistics.median(times), "min_s": min(times), "repeats": repeats}


def numpy_resample(t: np.ndarray, x: np.ndarray, step: float) -> tuple[np.ndarray, np.ndarray]:
    """Chord lengths, then np.interp of t and each coordinate at s = 0, step, …"""
    chord = np.empty(len(t))
    chord[0] = 0.0
    np.cumsum(np.linalg.norm(np.diff(x, axis=0), axis=1), out=chord[1:])
    s = np.arange(0.0, chord[-1], step)
    cols = [np.interp(s, chord, t)] + [np.interp(s, chord, x[:, j]) for j in range(x.shape[1])]
    return s, np.column_stack(cols)


def _ratio(reference: dict[str, float], ours: dict[str, float], target: float) -> dict[str, Any]:
    r = reference["median_s"] / ours["median_s"]
    return {"measured": r, "target": target, "status": "PASS" if r >= target else "MISS"}


def case(n: int, repeats: int) -> dict[str, Any]:
    t, x = data.one_track(n)
    length = float(np.linalg.norm(np.diff(x, axis=0), axis=1).sum())
    step = length / n
    size = float(np.abs(x).max())
    s_ref, ref = numpy_resample(t, x, step)
    lin = osc.resample(t, x, step=step, method="linear", endpoint=False)
    m = min(len(s_ref), len(lin))
    lin_gap = float(np.abs(lin.position[:m] - ref[:m, 1:]).max()) / length
    if not lin_gap <= TOL_LINEAR:
        raise AssertionError(f"linear, {n} samples: |Δx| / length = {lin_gap:.3e} > {TOL_LINEAR}")
    spl = osc.resample(t, x, step=step, method="spline")
    on_curve = float(np.abs(CubicSpline(t, x)(spl.t) - spl.position).max()) / size
    if not on_curve <= TOL_SPLINE:
        raise AssertionError(f"spline, {n} samples: off the spline by {on_curve:.3e} · size")
    chord = np.concatenate([[0.0], np.cumsum(np.linalg.norm(np.diff(x, axis=0), axis=1))])
    chord_gap = float(np.abs(np.interp(spl.t, t, chord) - spl.s).max()) / length
    if not chord_gap <= TOL_CHORD:
        raise AssertionError(f"spline, {n} samples: s vs chord {chord_gap:.3e} > {TOL_CHORD}")
    reference = _timed(lambda: numpy_resample(t, x, step), repeats)
    linear = _timed(lambda: osc.resample(t, x, step=step, method="linear"), repeats)
    spline = _timed(lambda: osc.resample(t, x, step=step, method="spline"), repeats)
    return {
        "samples": n,
        "points": len(spl),
        "check": {
            "linear_abs_diff_over_length": lin_gap,
            "spline_off_curve_over_size": on_curve,
            "spline_s_vs_chord_over_length": chord_gap,
        },
        "numpy_interp_on_chord_length": reference,
        "osculate_linear": linear,
        "osculate_spline": spline,
        "linear_vs_numpy": _ratio(reference, linear, TARGETS["linear"]),
        "spline_vs_numpy": _ratio(reference, spline, TARGETS["spline"]),
    }


def run(quick: bool) -> dict[str, Any]:
    """Check, time and compare every size; return the figures and each target's PASS / MISS."""
    repeats = 3 if quick else 5
    return {f"step_{n:.0e}".replace("+0", ""): case(n, repeats) for n in SIZES[quick]}


def main() -> None:
    """Command line: print the figures as JSON (and write them with --out)."""
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--quick", action="store_true", help="1e5 samples only")
    p.add_argument("--out", type=Path, help="also write the JSON here")
    args = p.parse_args()
    text = json.dumps(run(args.quick), indent=2)
    print(text)
    if args.out is not None:
        args.out.write_text(text + "\n")


if __name__ == "__main__":
    main()

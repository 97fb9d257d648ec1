"""Smoothing splines with automatic λ: osculate against SciPy, its own target, and two threads.

    python benches/smooth_case.py [--quick] [--out FILE.json]

Three cases:

automatic
    One 3-D track of 1e6 samples (``data.one_track`` plus seeded Gaussian noise of 5 cm;
    ``--quick``: 1e5) fitted with ``osc.fit(t, x, method="smooth")`` (quintic, λ* by GCV, and the
    fit for r‴ that every automatic fit makes). Absolute target: ≤ 3 s for 1e6 samples (the
    ``--quick`` run scales it to 0.3 s for 1e5, the time being linear in n).
vs_scipy
    The planar part (x, y) of the same kind of track, 1e5 samples (``--quick``: 3e3): osculate's
    cubic smoothing spline (``degree=3``: the same penalty ∫|f″|², one λ* by GCV shared by both
    coordinates) against ``scipy.interpolate.make_smoothing_spline`` (GCV) called on each
    coordinate (its λ is chosen per coordinate). The two need not choose the same λ, so each is
    judged at its own choice against the noise-free track: checked first that osculate's RMS
    error is at most ``QUALITY`` × SciPy's (and SciPy's at most ``QUALITY`` × osculate's), both
    well below the noise. Target ≥ 100× SciPy's time.
threads
    2,000 tracks of about 200 samples (``data.many_tracks`` plus 5 cm noise; ``--quick``: 300)
    fitted in one call, in fresh interpreters with ``RAYON_NUM_THREADS=1`` and ``2``. Target: the
    two-thread run ≥ 1.7× faster.

Each timing is the median of repeated calls after a warm-up call (the automatic fit: the fit
that reads λ* is the warm-up, then two calls, one for 1e6 samples; SciPy: one call, which takes
seconds at 3e3 samples and minutes at 1e5). Targets are reported PASS / MISS, never
asserted. ``run(quick) -> dict`` is the entry point for ``run.py``.
"""

from __future__ import annotations

import argparse
import json
import os
import statistics
import subprocess
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
from scipy.interpolate import make_smoothing_spline  # noqa: E402

SIZES = {
    False: {"automatic": 1_000_000, "vs_scipy": 100_000, "tracks": 2_000},
    True: {"automatic": 100_000, "vs_scipy": 3_000, "tracks": 300},
}
#: Absolute target of the automatic fit of 1e6 samples, in seconds (scaled linearly with n).
AUTOMATIC_S_PER_1E6 = 3.0
TARGETS = {"vs_scipy": 100.0, "threads": 1.7}
#: Fit quality: each RMS error against the truth at most this multiple of the other's.
QUALITY = 1.25
NOISE = 0.05


def _timed(fn: Callable[[], Any], repeats: int, warm: bool = True) -> dict[str, float]:
    if warm:
        fn()
    times = []
    for _ in range(repeats):
        start = time.perf_counter()
        fn()
        times.append(time.perf_counter() - start)
    return {"median_s": statistics.median(times), "min_s": min(times), "repeats": repeats}


def noisy_track(n: int, seed: int = 0) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    t, x = data.one_track(n, seed=seed)
    rng = np.random.default_rng(seed + 100)
    return t, x, x + rng.normal(0.0, NOISE, x.shape)


def case_automatic(n: int) -> dict[str, Any]:
    t, _, y = noisy_track(n)
    fit = osc.fit(t, y, method="smooth")
    timing = _timed(lambda: osc.fit(t, y, method="smooth"), 1 if n > 100_000 else 2, warm=False)
    target = AUTOMATIC_S_PER_1E6 * n / 1e6
    return {
        "samples": n,
        "smoothing": float(fit.fit_info["smoothing"][0]),
        "noise_estimate": float(fit.fit_info["noise"][0]),
        "osculate_fit": timing,
        "seconds": {
            "measured": timing["median_s"],
            "target": target,
            "status": "PASS" if timing["median_s"] <= target else "MISS",
        },
    }


def scipy_per_coordinate(t: np.ndarray, y: np.ndarray) -> np.ndarray:
    """make_smoothing_spline (GCV) on each coordinate, evaluated at the samples."""
    return np.column_stack([make_smoothing_spline(t, y[:, j])(t) for j in range(y.shape[1])])


def case_vs_scipy(n: int) -> dict[str, Any]:
    t, truth, y = noisy_track(n, seed=2)
    truth, y = truth[:, :2], y[:, :2]
    ours = osc.fit(t, y, method="smooth", degree=3)
    rms = {
        "osculate": float(np.sqrt(np.mean((ours(t) - truth) ** 2))),
        "scipy": float(np.sqrt(np.mean((scipy_per_coordinate(t, y) - truth) ** 2))),
    }
    ours_ok = rms["osculate"] <= QUALITY * rms["scipy"]
    if not (ours_ok and rms["scipy"] <= QUALITY * rms["osculate"]):
        raise AssertionError(f"vs_scipy, {n} samples: fit quality differs: {rms}")
    if not max(rms.values()) < 0.5 * NOISE:
        raise AssertionError(f"vs_scipy, {n} samples: the fits do not remove the noise: {rms}")
    mine = _timed(lambda: osc.fit(t, y, method="smooth", degree=3), 3)
    reference = _timed(lambda: scipy_per_coordinate(t, y), 1, warm=False)
    r = reference["median_s"] / mine["median_s"]
    return {
        "samples": n,
        "rms_error_vs_truth": rms,
        "osculate_smoothing": float(ours.fit_info["smoothing"][0]),
        "osculate_fit": mine,
        "scipy_make_smoothing_spline_per_coordinate": reference,
        "speedup": {
            "measured": r,
            "target": TARGETS["vs_scipy"],
            "status": "PASS" if r >= TARGETS["vs_scipy"] else "MISS",
        },
    }


_THREAD_SNIPPET = """
import statistics, sys, time
import numpy as np
sys.path.insert(0, {here!r})
import data, osculate as osc
t, x, off = data.many_tracks({m}, 200)
x = x + np.random.default_rng(7).normal(0.0, {noise}, x.shape)
osc.fit(t, x, offsets=off, method="smooth")
times = []
for _ in range(3):
    a = time.perf_counter()
    osc.fit(t, x, offsets=off, method="smooth")
    times.append(time.perf_counter() - a)
print(statistics.median(times))
"""


def case_threads(m: int) -> dict[str, Any]:
    code = _THREAD_SNIPPET.format(here=str(HERE), m=m, noise=NOISE)
    out = {}
    for threads in (1, 2):
        env = {**os.environ, "RAYON_NUM_THREADS": str(threads)}
        proc = subprocess.run(
            [sys.executable, "-c", code], env=env, capture_output=True, text=True, check=True
        )
        out[threads] = float(proc.stdout.strip().splitlines()[-1])
    r = out[1] / out[2]
    return {
        "tracks": m,
        "one_thread_s": out[1],
        "two_threads_s": out[2],
        "speedup": {
            "measured": r,
            "target": TARGETS["threads"],
            "status": "PASS" if r >= TARGETS["threads"] else "MISS",
        },
    }


def run(quick: bool) -> dict[str, Any]:
    """Check, time and compare the three cases; return the figures and each target's status."""
    size = SIZES[quick]
    return {
        "automatic": case_automatic(size["automatic"]),
        "vs_scipy": case_vs_scipy(size["vs_scipy"]),
        "threads": case_threads(size["tracks"]),
    }


def main() -> None:
    """Command line: print the figures as JSON (and write them with --out)."""
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--quick", action="store_true", help="1e5 / 3e3 samples, 300 tracks")
    p.add_argument("--out", type=Path, help="also write the JSON here")
    args = p.parse_args()
    text = json.dumps(run(args.quick), indent=2)
    print(text)
    if args.out is not None:
        args.out.write_text(text + "\n")


if __name__ == "__main__":
    main()

"""Smoothing splines and arc-length resampling: osculate against SciPy / NumPy, same run.

    python benches/estimators_case.py [--quick] [--out FILE.json]

smooth
    Automatic smoothing of noisy 3-D tracks. osculate: ``osc.kinematics(method="smooth")`` (one
    quintic spline per track, λ by GCV plus the derivative rule, all kinematics). Reference: what
    an analyst writes with SciPy, ``make_smoothing_spline(t, x[:, j])`` (cubic, λ by GCV) per
    coordinate and per track, then the first three derivatives. The two do different things (one
    shared λ vs one per coordinate, quintic vs cubic), so before timing the pair is checked on a
    computation they share: our cubic spline with a fixed λ* against ``make_smoothing_spline`` with
    the matching ``lam = λ* · h̄³`` (values to 1e-8 of the data range). Cases: one track (1e5
    samples; ``--quick`` 5e3) and many tracks (300 × 200; ``--quick`` 40 × 200) — SciPy takes
    minutes beyond that, so the per-track rate is what to compare; osculate alone is also timed on
    one track of 1e6 samples and 10,000 × 200 (not in ``--quick``).
resample
    A helix (radius 3, pitch 0.4 per radian) of 1e6 unevenly timed samples (``--quick`` 1e5)
    resampled every 0.05. osculate: ``osc.resample(step=0.05)`` (cubic spline, Gauss–Legendre arc
    length, Newton). Reference: ``np.interp`` on the cumulative chord length. Both are timed and
    the spacing error of each is measured against the exact arc length of the helix,
    s = √(a² + c²)·θ with θ recovered from the point. Target: faster than the reference while at
    least 1000× more uniform.

``run(quick) -> dict`` is the entry point for a driver; ``main`` prints the dict as JSON.
"""

from __future__ import annotations

import argparse
import json
import statistics
import time
from typing import Any, Callable

import numpy as np
import osculate as osc
from scipy.interpolate import make_smoothing_spline

SIZES = {
    False: {
        "one": 100_000,
        "tracks": 300,
        "big_one": 1_000_000,
        "big_tracks": 10_000,
        "res": 1_000_000,
    },
    True: {"one": 5_000, "tracks": 40, "big_one": 0, "big_tracks": 0, "res": 100_000},
}
TARGETS = {"smooth": 10.0, "resample_speed": 1.0, "resample_uniformity": 1000.0}


def _median_time(fn: Callable[[], Any], repeats: int) -> float:
    fn()
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def _noisy_tracks(m: int, n: int, seed: int = 5) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    rng = np.random.default_rng(seed)
    t = np.cumsum(rng.uniform(0.05, 0.15, (m, n)), axis=1)
    r = rng.uniform(5, 20, (m, 1))
    xyz = np.stack([r * np.cos(t / r), r * np.sin(t / r), 0.2 * t], axis=-1)
    xyz += rng.normal(0, 0.03, xyz.shape)
    return t.reshape(-1), xyz.reshape(-1, 3), np.repeat(np.arange(m), n)


def _scipy_smooth(t: np.ndarray, x: np.ndarray, ids: np.ndarray) -> list[np.ndarray]:
    out = []
    for k in np.unique(ids):  # the per-track loop an analyst writes
        rows = ids == k
        for j in range(x.shape[1]):
            s = make_smoothing_spline(t[rows], x[rows, j])
            out.append(np.column_stack([s(t[rows], nu) for nu in range(4)]))
    return out


def _check_same_computation() -> float:
    """Cubic spline at a fixed λ*: osculate vs make_smoothing_spline (max error / data range)."""
    t, x, _ = _noisy_tracks(1, 400)
    lam_star = 5.0
    hbar = (t[-1] - t[0]) / (len(t) - 1)
    path = osc.fit(t, x, method="smooth", degree=3, smoothing=lam_star)
    worst = 0.0
    for j in range(3):
        ref = make_smoothing_spline(t, x[:, j], lam=lam_star * hbar**3)(t)
        worst = max(worst, float(np.max(np.abs(path(t)[:, j] - ref)) / np.ptp(x[:, j])))
    assert worst < 1e-8, f"smoothing check failed: {worst:.3e} of the data range"
    return worst


def smooth_case(quick: bool) -> dict[str, Any]:
    sz = SIZES[quick]
    out: dict[str, Any] = {"check_max_error_over_range": _check_same_computation()}
    for name, (m, n) in {"one_track": (1, sz["one"]), "many_tracks": (sz["tracks"], 200)}.items():
        t, x, ids = _noisy_tracks(m, n)
        ours = _median_time(
            lambda t=t, x=x, ids=ids: osc.kinematics(t, x, tracks=ids, method="smooth"), 3
        )
        ref = _median_time(lambda t=t, x=x, ids=ids: _scipy_smooth(t, x, ids), 1)
        out[name] = {
            "tracks": m,
            "samples_per_track": n,
            "osculate_s": ours,
            "scipy_s": ref,
            "speedup": ref / ours,
            "samples_per_s": m * n / ours,
        }
    for name, (m, n) in {
        "one_1e6": (1, sz["big_one"]),
        "10000x200": (sz["big_tracks"], 200),
    }.items():
        if m and n:
            t, x, ids = _noisy_tracks(m, n)
            ours = _median_time(
                lambda t=t, x=x, ids=ids: osc.kinematics(t, x, tracks=ids, method="smooth"), 1
            )
            out[f"osculate_only_{name}"] = {"osculate_s": ours, "samples_per_s": m * n / ours}
    worst = min(out["one_track"]["speedup"], out["many_tracks"]["speedup"])
    out["target"] = f">= {TARGETS['smooth']}x"
    out["verdict"] = "PASS" if worst >= TARGETS["smooth"] else "MISS"
    return out


def _helix(n: int) -> tuple[np.ndarray, np.ndarray]:
    rng = np.random.default_rng(9)
    th = np.cumsum(rng.uniform(0.5, 1.5, n))
    th *= 2000.0 / th[-1]
    return th, np.column_stack([3 * np.cos(th), 3 * np.sin(th), 0.4 * th])


def _exact_s(p: np.ndarray) -> np.ndarray:
    """Exact arc length of helix points: θ from z (0.4 θ), s = √(3² + 0.4²) θ."""
    return np.hypot(3.0, 0.4) * p[:, 2] / 0.4


def _numpy_resample(th: np.ndarray, x: np.ndarray, step: float) -> np.ndarray:
    chord = np.concatenate([[0.0], np.cumsum(np.linalg.norm(np.diff(x, axis=0), axis=1))])
    s = np.arange(0.0, chord[-1], step)
    return np.column_stack([np.interp(s, chord, x[:, j]) for j in range(3)])


def resample_case(quick: bool) -> dict[str, Any]:
    th, x = _helix(SIZES[quick]["res"])
    step = 0.05
    ours = _median_time(lambda: osc.resample(th, x, step=step, endpoint=False), 3)
    ref = _median_time(lambda: _numpy_resample(th, x, step), 3)
    r = osc.resample(th, x, step=step, endpoint=False)
    err_ours = float(np.max(np.abs(np.diff(_exact_s(r.position)) - step)))
    err_ref = float(np.max(np.abs(np.diff(_exact_s(_numpy_resample(th, x, step))) - step)))
    speed = ref / ours
    uniform = err_ref / max(err_ours, 1e-300)
    ok = speed >= TARGETS["resample_speed"] and uniform >= TARGETS["resample_uniformity"]
    return {
        "samples": len(th),
        "points": len(r),
        "osculate_s": ours,
        "numpy_s": ref,
        "speedup": speed,
        "max_spacing_error_osculate": err_ours,
        "max_spacing_error_numpy": err_ref,
        "uniformity_ratio": uniform,
        "target": "faster than NumPy and >= 1000x more uniform",
        "verdict": "PASS" if ok else "MISS",
    }


def run(quick: bool) -> dict[str, Any]:
    """Both cases."""
    return {"smooth": smooth_case(quick), "resample": resample_case(quick)}


def main() -> None:
    """Command line entry point."""
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true")
    ap.add_argument("--out", default=None)
    args = ap.parse_args()
    res = run(args.quick)
    text = json.dumps(res, indent=2)
    print(text)
    if args.out:
        with open(args.out, "w") as fh:
            fh.write(text)


if __name__ == "__main__":
    main()

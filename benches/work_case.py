"""Work along paths: osculate against NumPy / SciPy code doing the same computation.

    python benches/work_case.py [--quick] [--out FILE.json]

Three cases, the first two checked equal before they are timed:

sampled
    One 3-D track of 1e7 samples (``--quick``: 1e6; ``data.one_track``) with a force sampled at
    every row. osculate: ``osc.work(x, F)`` (trapezoid rule, total), once with
    ``estimate_error=False`` — the same computation as the reference — and once with the default
    error estimate (which adds the four-point cubic rule, summed in the same streaming sweep).
    Reference: NumPy trapezoid on the segments, ``einsum("ij,ij->", (F[1:] + F[:-1]) / 2,
    diff(x))``.
grid
    1e6 samples (``--quick``: 1e5) of the same kind of track inside a 256³ grid (``--quick``:
    64³) of 3-vectors. osculate: ``osc.work(x, GridField(...), nodes=2)`` (trilinear
    interpolation at 2 Gauss–Legendre nodes per segment), with and without the error estimate
    (which adds the midpoint node). Reference: ``scipy.interpolate.RegularGridInterpolator``
    (method "linear") at the same 2 nodes per segment, then the same weighted einsum.
threads
    ``osc.work(x, F)`` of the sampled case (error estimate on) in fresh processes with
    ``RAYON_NUM_THREADS`` 1 and 2, alternating (as ``run.py``'s threads case does, so that a
    change of load hits both alike); the outputs must be bit-identical.

Equality is checked to |a − b| ≤ ``RTOL_SUM`` · Σ|terms| (the two sum in different orders; the
rounding of a sum of N terms is at most about N·eps·Σ|terms|, and osculate sums runs of at most
16,384 terms before adding the runs, so 16,384·eps ≈ 3.6e-12 bounds its part). Field objects
(``GridField``, the interpolator) are built before timing; each timing is the median of repeated
calls after one warm-up call. Targets (reported PASS / MISS, never asserted): ≥ 3× for sampled
forces, for the same computation and with the error estimate on; ≥ 10× for the grid (the same
computation, without the error estimate); ≥ 1.7× from 1 to 2 rayon threads.

``run(quick) -> dict`` is the entry point for a driver; ``main`` prints the dict as JSON.
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
from scipy.interpolate import RegularGridInterpolator  # noqa: E402

SIZES = {
    False: {"sampled": 10_000_000, "grid_samples": 1_000_000, "grid_nodes": 256},
    True: {"sampled": 1_000_000, "grid_samples": 100_000, "grid_nodes": 64},
}
TARGETS = {"sampled": 3.0, "sampled_with_estimate": 3.0, "grid": 10.0, "threads": 1.7}
#: Allowed |a − b| / Σ|terms| between osculate and the reference (see the module docstring).
RTOL_SUM = 1e-10
GL2 = (np.array([-1.0, 1.0]) / np.sqrt(3.0), np.array([1.0, 1.0]))


def force_field(p: np.ndarray) -> np.ndarray:
    """A smooth 3-D force field (N) of position (m)."""
    x, y, z = p[..., 0], p[..., 1], p[..., 2]
    return np.stack(
        [np.sin(y / 40.0), np.cos(z / 15.0) * x / 100.0, 1.0 + 0.1 * np.sin(x / 30.0)], axis=-1
    )


def _timed(fn: Callable[[], Any], repeats: int) -> dict[str, float]:
    fn()  # warm-up: thread pool, page faults of first-touch buffers
    times = []
    for _ in range(repeats):
        start = time.perf_counter()
        fn()
        times.append(time.perf_counter() - start)
    return {"median_s": statistics.median(times), "min_s": min(times), "repeats": repeats}


def _ratio(reference: dict[str, float], ours: dict[str, float], target: float) -> dict[str, Any]:
    r = reference["median_s"] / ours["median_s"]
    return {"measured": r, "target": target, "status": "PASS" if r >= target else "MISS"}


def _check(ours: float, theirs: float, terms_abs: float, what: str) -> dict[str, float]:
    diff = abs(ours - theirs)
    if not diff <= RTOL_SUM * terms_abs:
        raise AssertionError(
            f"{what}: osculate {ours!r} vs reference {theirs!r}: |diff| {diff:.3e} > "
            f"{RTOL_SUM:g} · Σ|terms| = {RTOL_SUM * terms_abs:.3e}"
        )
    return {"osculate": ours, "reference": theirs, "abs_diff_over_sum_abs_terms": diff / terms_abs}


# ------------------------------------------------------------------------------ sampled forces


def numpy_trapezoid(x: np.ndarray, f: np.ndarray) -> float:
    """Σ (F_i + F_{i+1})/2 · (x_{i+1} − x_i) with NumPy (the osculate trapezoid rule)."""
    return float(np.einsum("ij,ij->", 0.5 * (f[1:] + f[:-1]), np.diff(x, axis=0)))


def case_sampled(n: int, repeats: int) -> dict[str, Any]:
    _, x = data.one_track(n)
    f = force_field(x)
    ours = float(osc.work(x, f, estimate_error=False).total[0])
    terms = np.abs(np.einsum("ij,ij->i", 0.5 * (f[1:] + f[:-1]), np.diff(x, axis=0))).sum()
    check = _check(ours, numpy_trapezoid(x, f), float(terms), f"sampled, {n} samples")
    same = _timed(lambda: osc.work(x, f, estimate_error=False), repeats)
    with_estimate = _timed(lambda: osc.work(x, f), repeats)
    reference = _timed(lambda: numpy_trapezoid(x, f), repeats)
    return {
        "samples": n,
        "check": check,
        "osculate_trapezoid": same,
        "osculate_trapezoid_with_error_estimate": with_estimate,
        "numpy_trapezoid": reference,
        "speedup_same_computation": _ratio(reference, same, TARGETS["sampled"]),
        "speedup_with_error_estimate": _ratio(
            reference, with_estimate, TARGETS["sampled_with_estimate"]
        ),
    }


# ------------------------------------------------------------------------------ gridded field


def make_grid(x: np.ndarray, k: int) -> tuple[osc.GridField, RegularGridInterpolator]:
    lo, hi = x.min(axis=0) - 5.0, x.max(axis=0) + 5.0
    axes = [np.linspace(a, b, k) for a, b in zip(lo, hi)]
    vals = np.empty((k, k, k, 3))
    for i in range(k):  # one plane at a time keeps the temporaries small (setup, not timed)
        yy, zz = np.meshgrid(axes[1], axes[2], indexing="ij")
        plane = np.stack([np.full_like(yy, axes[0][i]), yy, zz], axis=-1)
        vals[i] = force_field(plane)
    field = osc.GridField(vals, origin=lo, spacing=(hi - lo) / (k - 1))
    return field, RegularGridInterpolator(axes, vals, method="linear")


def scipy_grid_work(x: np.ndarray, rgi: RegularGridInterpolator) -> float:
    """2-node Gauss–Legendre on each segment, field values by RegularGridInterpolator."""
    dx = np.diff(x, axis=0)
    total = 0.0
    for xi, w in zip(*GL2):
        nodes = x[:-1] + (0.5 * (1.0 + xi)) * dx
        total += 0.5 * w * float(np.einsum("ij,ij->", rgi(nodes), dx))
    return total


def case_grid(n: int, k: int, repeats: int) -> dict[str, Any]:
    _, x = data.one_track(n, seed=4)
    field, rgi = make_grid(x, k)
    ours = float(osc.work(x, field, nodes=2, estimate_error=False).total[0])
    dx = np.diff(x, axis=0)
    terms = sum(
        np.abs(0.5 * w * np.einsum("ij,ij->i", rgi(x[:-1] + 0.5 * (1 + xi) * dx), dx)).sum()
        for xi, w in zip(*GL2)
    )
    check = _check(ours, scipy_grid_work(x, rgi), float(terms), f"grid {k}^3, {n} samples")
    same = _timed(lambda: osc.work(x, field, nodes=2, estimate_error=False), repeats)
    with_estimate = _timed(lambda: osc.work(x, field, nodes=2), repeats)
    reference = _timed(lambda: scipy_grid_work(x, rgi), max(1, repeats // 2))
    return {
        "samples": n,
        "grid": [k, k, k, 3],
        "grid_bytes": int(field.values.nbytes),
        "check": check,
        "osculate_gauss_legendre_2": same,
        "osculate_gauss_legendre_2_with_error_estimate": with_estimate,
        "scipy_regular_grid_interpolator": reference,
        "speedup_same_computation": _ratio(reference, same, TARGETS["grid"]),
        "speedup_with_error_estimate": reference["median_s"] / with_estimate["median_s"],
    }


# ------------------------------------------------------------------------------ thread scaling


def _thread_child(n: int, repeats: int) -> dict[str, Any]:
    """In a fresh process: time ``osc.work(x, F)`` on the sampled case; the outputs' bits."""
    _, x = data.one_track(n)
    f = force_field(x)
    w = osc.work(x, f)
    timing = _timed(lambda: osc.work(x, f), repeats)
    return {**timing, "bits": [float(w.total[0]).hex(), float(w.error[0]).hex()]}


def case_threads(n: int, repeats: int, rounds: int) -> dict[str, Any]:
    parts: dict[str, list[dict[str, Any]]] = {"1": [], "2": []}
    for _ in range(rounds):  # processes alternate, so that a change of load hits both alike
        for k in parts:
            env = {**os.environ, "RAYON_NUM_THREADS": k}
            cmd = [sys.executable, __file__, "--thread-child", str(n), str(repeats)]
            proc = subprocess.run(cmd, env=env, capture_output=True, text=True, check=False)
            if proc.returncode != 0:
                raise RuntimeError(f"{' '.join(cmd)} failed:\n{proc.stderr}")
            parts[k].append(json.loads(proc.stdout.strip().splitlines()[-1]))
    if len({tuple(p["bits"]) for k in parts for p in parts[k]}) != 1:
        raise AssertionError("threads: outputs with 1 and 2 rayon threads are not bit-identical")
    median = {k: statistics.median(p["median_s"] for p in v) for k, v in parts.items()}
    one, two = ({"median_s": median[k]} for k in ("1", "2"))
    return {
        "samples": n,
        "rayon_1_thread": one,
        "rayon_2_threads": two,
        "outputs_bit_identical": True,
        "speedup_2_threads": _ratio(one, two, TARGETS["threads"]),
    }


def run(quick: bool) -> dict[str, Any]:
    """Check, time and compare the cases; return the figures and each target's PASS / MISS."""
    size = SIZES[quick]
    repeats = 3 if quick else 5
    return {
        "sampled": case_sampled(size["sampled"], repeats),
        "grid": case_grid(size["grid_samples"], size["grid_nodes"], repeats),
        "threads": case_threads(size["sampled"], repeats, 1 if quick else 2),
    }


def _rows(figures: dict[str, Any]) -> list[str]:
    """One line per target: what, measured, goal, PASS / MISS."""
    out = []
    for case, label in (
        ("sampled", "work/sampled {samples:.0e} vs NumPy einsum trapezoid"),
        ("grid", "work/grid {samples:.0e} vs RegularGridInterpolator"),
        ("threads", "work/sampled {samples:.0e}, 1 -> 2 rayon threads"),
    ):
        c = figures[case]
        for key, d in c.items():
            if isinstance(d, dict) and "status" in d:
                what = label.format(samples=c["samples"]) + f" ({key.replace('_', ' ')})"
                goal = f">= {d['target']:g}x"
                out.append(f"  {d['status']:<4}  {what:<88} {d['measured']:6.2f}x  {goal}")
    return out


def main() -> None:
    """Command line: print the targets and the figures as JSON (and write them with --out)."""
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--quick", action="store_true", help="1e6 / 1e5 samples, 64³ grid")
    p.add_argument("--out", type=Path, help="also write the JSON here")
    p.add_argument("--thread-child", nargs=2, type=int, help=argparse.SUPPRESS)
    args = p.parse_args()
    if args.thread_child:
        print(json.dumps(_thread_child(*args.thread_child)))
        return
    figures = run(args.quick)
    text = json.dumps(figures, indent=2)
    print(text)
    print("\n".join(_rows(figures)), file=sys.stderr)
    if args.out is not None:
        args.out.write_text(text + "\n")


if __name__ == "__main__":
    main()

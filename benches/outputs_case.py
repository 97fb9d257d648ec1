"""What ``outputs=`` saves: osculate computing four quantities against NumPy computing those four.

    python benches/outputs_case.py [--quick] [--out FILE.json]

The four quantities are ``FOUR`` = speed, curvature, accel_tangential, accel_normal, with
``method="fd", order=2`` and absolute thresholds ``min_speed=1e-3, min_curvature=1e-6``,
``min_stop=inf``: no noise-dependent thresholds and no stop search, so the work asked for is the
derivatives r′, r″ and the four formulas; flags are always written (EDGE, GAP with the default
``gap_factor``: ``gap_factor=inf`` measured no cheaper, and GAP bits are part of correct flags).
The kernel still estimates every track's noise (which the data checks of ``kinematics`` use);
that cost, and the checks', are in the times.

one (1e6 and 1e7 samples of one 3-D track, ``data.one_track``; ``--quick``: 1e5 and 1e6)
    Timed together, in interleaved rounds (each round calls every implementation, the order
    rotating from round to round, freed heap given back to the OS before every call, as
    ``measure.job_time`` does):

    * ``four``: ``osc.kinematics(t, x, outputs=FOUR, ...)``;
    * ``numpy``: ``reference.speed_curvature_split`` (3-point non-uniform stencils for r′ and r″
      as in ``reference.py``, then the four formulas of ``reference.frenet``; nothing else);
    * ``floor``: the memory traffic of the same call, read t and x once and write fresh arrays of
      the same output bytes (four float64 arrays and the uint8 flags);
    * ``four_out``: ``four`` writing into the same four arrays every call (``out=``, what a
      caller who loops does), and ``floor_out``: the floor writing into the same arrays too;
    * ``full``: ``osc.kinematics(t, x, ...)`` with every output (what asking for less saves);
    * ``derivatives``: ``osc.derivatives(t, x, ...)`` (r′, r″, r‴ and flags only).

    Before timing, ``four`` is checked against ``numpy`` on the interior samples (rows 1..n−2,
    centred stencils; the kernel forms its weights by Fornberg's recursion, the reference by the
    closed-form Lagrange formula, so they round differently). Per sample, with
    e₁ = ``ULPS`` · eps · ‖Σ_j |w′_j| |x_j|‖ and e₂ = ``ULPS`` · eps · ‖Σ_j |w″_j| |x_j|‖ the
    size of the rounding of one evaluation of the r′ and r″ stencils
    (``reference.first_second_magnitudes``, as check.py bounds the derivatives), the first-order
    propagation gives

    * |Δv| ≤ e₁,
    * |Δa_t|, |Δa_n| ≤ e₂ + 2 |r″| e₁ / v   (a_t = T·r″, a_n = |r″ − a_t T|, |ΔT| ≤ e₁ / v),
    * |Δκ| ≤ (e₂ + 2 |r″| e₁ / v) / v² + 3 a_n e₁ / v³   (κ = a_n / v²; first order gives 2, not
      3, in the last term),

    each plus ``FORMULA_ULPS`` · eps · |value| for the few operations of the formula itself. NaN
    on the same samples and the same STOPPED / STRAIGHT bits are required; the largest
    |difference| / bound is reported (it must be ≤ 1).

threads (10,000 tracks of ~200 samples, ``data.many_tracks``; ``--quick``: 1,000)
    ``osc.kinematics(..., offsets=..., outputs=FOUR)`` in two fresh interpreters, one with
    ``RAYON_NUM_THREADS=1`` and one with 2, taking turns (1, 2, 2, 1, ...; only one computes at a
    time), each turn a few timed calls; every turn reports a digest of its outputs, and all
    digests must be equal (bit-identical across thread counts).

Targets (reported PASS / MISS, never asserted): ``four`` ≥ 10× faster than ``numpy``, its time
≤ 1.5× the floor's, and the 2-thread speed-up ≥ 1.7×. The savings (``full`` / ``four`` and
``full`` / ``derivatives``) are reported without a target. The machine may be shared: ratios come
from the same rounds, and each run's spread is in the figures, with the median CPU time (user +
system) of every call beside its wall time (osculate may use two threads, NumPy one, so the CPU
ratios are the work ratios, not the speed-ups).

``run(quick) -> dict`` is the entry point for a driver; ``main`` prints the dict as JSON.
"""

from __future__ import annotations

import argparse
import gc
import hashlib
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

import data  # noqa: E402  (beside this file)
import measure  # noqa: E402
import osculate as osc  # noqa: E402
import reference  # noqa: E402

FOUR = list(reference.SPLIT_FIELDS)
THRESHOLDS = {"min_speed": 1e-3, "min_curvature": 1e-6}
OPTIONS: dict[str, Any] = {"method": "fd", "order": 2, **THRESHOLDS, "min_stop": np.inf}
SIZES: dict[bool, dict[str, Any]] = {
    False: {
        "one": (1_000_000, 10_000_000),
        "many": (10_000, 200),
        "budget_s": 8.0,
        "min_rounds": 3,
        "thread_rounds": 6,
        "calls_per_turn": 5,
    },
    True: {
        "one": (100_000, 1_000_000),
        "many": (1_000, 200),
        "budget_s": 1.0,
        "min_rounds": 2,
        "thread_rounds": 4,
        "calls_per_turn": 4,
    },
}
TARGETS = {"vs_numpy": 10.0, "vs_floor": 1.5, "threads": 1.7}
EPS = float(np.finfo(np.float64).eps)
#: Rounding of one stencil evaluation, in units of eps · Σ|w_j||x_j| (check.DERIVATIVE_ULPS).
ULPS = 32.0
#: Rounding of the few operations of a formula (a dot product, a square root, two divisions).
FORMULA_ULPS = 16.0


# ------------------------------------------------------------------------------ implementations


def ours_four(t: np.ndarray, x: np.ndarray) -> Any:
    return osc.kinematics(t, x, outputs=FOUR, **OPTIONS)


def ours_four_out(t: np.ndarray, x: np.ndarray, out: dict[str, np.ndarray]) -> Any:
    return osc.kinematics(t, x, outputs=FOUR, out=out, **OPTIONS)


def floor_four_out(t: np.ndarray, x: np.ndarray, out: dict[str, np.ndarray]) -> None:
    """Read the inputs once, write the same bytes as ``ours_four_out`` into the same arrays."""
    np.add.reduce(t)
    np.add.reduce(x, axis=None)
    for a in out.values():
        a.fill(0.0)
    flags = np.empty(len(t), dtype=np.uint8)  # the flags are the kernel's own array
    flags.fill(0)


def ours_full(t: np.ndarray, x: np.ndarray) -> Any:
    return osc.kinematics(t, x, **OPTIONS)


def ours_derivatives(t: np.ndarray, x: np.ndarray) -> Any:
    return osc.derivatives(t, x, method="fd", order=2, **THRESHOLDS)


def numpy_four(t: np.ndarray, x: np.ndarray) -> dict[str, np.ndarray]:
    return reference.speed_curvature_split(t, x, **THRESHOLDS)


def floor_four(t: np.ndarray, x: np.ndarray) -> list[np.ndarray]:
    """Read the inputs once, write fresh arrays of the same bytes as ``ours_four``'s outputs."""
    n = len(t)
    np.add.reduce(t)
    np.add.reduce(x, axis=None)
    outs: list[np.ndarray] = []
    for _ in FOUR:
        a = np.empty(n)
        a.fill(0.0)
        outs.append(a)
    flags = np.empty(n, dtype=np.uint8)
    flags.fill(0)
    outs.append(flags)
    return outs


# ------------------------------------------------------------------------------ check


def check_four(t: np.ndarray, x: np.ndarray) -> dict[str, Any]:
    """``ours_four`` against the NumPy reference on the interior rows (module docstring)."""
    k = ours_four(t, x)
    xc = np.ascontiguousarray(x.T)[:, None, :]
    d1, d2 = reference.first_second_block(t[None, :], xc, np.array([len(t)]))
    d1, d2 = d1[:, 0], d2[:, 0]
    ref, stopped, straight = reference.split_from_derivatives(d1, d2, **THRESHOLDS)
    m1, m2 = reference.first_second_magnitudes(t, x)
    inner = slice(1, len(t) - 1)
    e1 = ULPS * EPS * np.sqrt((m1[inner] ** 2).sum(axis=1))
    e2 = ULPS * EPS * np.sqrt((m2[inner] ** 2).sum(axis=1))
    v = ref["speed"][inner]
    acc = np.sqrt((d2[:, inner] ** 2).sum(axis=0))
    with np.errstate(divide="ignore", invalid="ignore"):
        split = e2 + 2.0 * acc * e1 / v
        bounds = {
            "speed": e1,
            "accel_tangential": split,
            "accel_normal": split,
            "curvature": split / v**2 + 3.0 * np.abs(ref["accel_normal"][inner]) * e1 / v**3,
        }
    flags = np.asarray(k.flags)[inner]
    for name, bit, mask in (("STOPPED", 1, stopped), ("STRAIGHT", 2, straight)):
        if not np.array_equal((flags & bit) != 0, mask[inner]):
            raise AssertionError(f"{name} bits differ from the reference on {len(t)} samples")
    worst: dict[str, float] = {}
    for name in FOUR:
        a, b = np.asarray(getattr(k, name))[inner], ref[name][inner]
        if not np.array_equal(np.isnan(a), np.isnan(b)):
            raise AssertionError(f"{name}: NaN on different samples ({len(t)} samples)")
        ok = ~np.isnan(b)
        bound = bounds[name][ok] + FORMULA_ULPS * EPS * np.abs(b[ok])
        ratio = float(np.max(np.abs(a[ok] - b[ok]) / bound)) if ok.any() else 0.0
        if not ratio <= 1.0:
            raise AssertionError(f"{name}: |osculate - numpy| exceeds its bound ({ratio:.3g}×)")
        worst[name] = ratio
    return {
        "rows_checked": len(t) - 2,
        "stopped": int(stopped.sum()),
        "straight": int(straight.sum()),
        "max_abs_diff_over_bound": worst,
    }


# ------------------------------------------------------------------------------ timing


def interleaved(
    fns: dict[str, Callable[[], Any]], budget_s: float, min_rounds: int = 3, max_rounds: int = 15
) -> dict[str, dict[str, Any]]:
    """Time every callable in rounds, rotating the order (see ``measure.job_time``).

    One warm-up call each; short callables run several times per round so every one fills a
    comparable slot. Before each call: garbage collection and freed heap back to the OS.
    """
    names = list(fns)
    times: dict[str, list[float]] = {name: [] for name in names}
    cpu: dict[str, list[float]] = {name: [] for name in names}

    def call(name: str) -> float:
        gc.collect()
        measure._release_free_heap()
        u0, s0, _ = measure._usage()
        t0 = time.perf_counter()
        out = fns[name]()
        elapsed = time.perf_counter() - t0
        u1, s1, _ = measure._usage()
        del out
        times[name].append(elapsed)
        cpu[name].append(u1 - u0 + s1 - s0)
        return elapsed

    first = {name: call(name) for name in names}
    for name in names:  # the warm-up calls are not counted
        times[name].clear()
        cpu[name].clear()
    slot = max(first.values())
    per_round = {name: max(1, min(10, int(slot / first[name]))) for name in names}
    rounds = budget_s / sum(per_round[n] * first[n] for n in names)
    rounds = int(min(max_rounds, max(min_rounds, rounds)))
    for r in range(rounds):
        k = r % len(names)
        for name in names[k:] + names[:k]:
            for _ in range(per_round[name]):
                call(name)
    return {
        name: {
            "median_s": statistics.median(ts),
            "min_s": min(ts),
            "max_s": max(ts),
            "cpu_s": statistics.median(cpu[name]),
            "calls": len(ts),
            "rounds": rounds,
        }
        for name, ts in times.items()
    }


def _status(measured: float, target: float, higher_is_better: bool) -> dict[str, Any]:
    ok = measured >= target if higher_is_better else measured <= target
    return {
        "measured": measured,
        "target": f"{'>=' if higher_is_better else '<='} {target:g}",
        "status": "PASS" if ok else "MISS",
    }


def case_one(n: int, budget_s: float, min_rounds: int) -> dict[str, Any]:
    t, x = data.one_track(n)
    checked = check_four(t, x)
    bufs = {name: np.zeros(n) for name in FOUR}
    floor_bufs = {name: np.zeros(n) for name in FOUR}
    gc.collect()
    fns = {
        "four": lambda: ours_four(t, x),
        "four_out": lambda: ours_four_out(t, x, bufs),
        "floor_out": lambda: floor_four_out(t, x, floor_bufs),
        "numpy": lambda: numpy_four(t, x),
        "floor": lambda: floor_four(t, x),
        "full": lambda: ours_full(t, x),
        "derivatives": lambda: ours_derivatives(t, x),
    }
    timed = interleaved(fns, budget_s, min_rounds)
    med = {name: r["median_s"] for name, r in timed.items()}
    cpu = {name: r["cpu_s"] for name, r in timed.items()}
    return {
        "samples": n,
        "check": checked,
        **timed,
        "four_vs_numpy": _status(med["numpy"] / med["four"], TARGETS["vs_numpy"], True),
        "four_over_floor": _status(med["four"] / med["floor"], TARGETS["vs_floor"], False),
        "four_out_vs_numpy": _status(med["numpy"] / med["four_out"], TARGETS["vs_numpy"], True),
        "four_out_over_floor_out": _status(
            med["four_out"] / med["floor_out"], TARGETS["vs_floor"], False
        ),
        "full_over_four": med["full"] / med["four"],
        "full_over_derivatives": med["full"] / med["derivatives"],
        "cpu_numpy_over_four": cpu["numpy"] / cpu["four"],
        "cpu_full_over_four": cpu["full"] / cpu["four"],
        "floor_bytes_written": n * (8 * len(FOUR) + 1),
    }


# ------------------------------------------------------------------------------ threads


def _digest(k: Any) -> str:
    h = hashlib.blake2b(digest_size=16)
    for name in [*FOUR, "flags"]:
        h.update(np.ascontiguousarray(getattr(k, name)).data)
    return h.hexdigest()


def _thread_worker(m: int, mean_len: int) -> None:
    """A worker in a fresh interpreter (RAYON_NUM_THREADS set by the caller).

    Prints one JSON line when ready (digest of a warm-up call), then, for each line ``N`` read
    from standard input, makes N timed calls and prints their times and the digest of the last
    call's outputs (hashed after the timing). Ends at end of input.
    """
    t, x, offsets = data.many_tracks(m, mean_len)
    fn = lambda: osc.kinematics(t, x, offsets=offsets, outputs=FOUR, **OPTIONS)  # noqa: E731
    print(json.dumps({"samples": len(t), "digest": _digest(fn())}), flush=True)
    for line in sys.stdin:
        times = []
        for _ in range(int(line)):
            gc.collect()
            measure._release_free_heap()
            t0 = time.perf_counter()
            k = fn()
            times.append(time.perf_counter() - t0)
        print(json.dumps({"times_s": times, "digest": _digest(k)}), flush=True)
        del k


def case_threads(m: int, mean_len: int, rounds: int, calls: int) -> dict[str, Any]:
    """Two workers, 1 and 2 rayon threads, taking turns: (1, 2), (2, 1), ... (one busy at once)."""
    cmd = [sys.executable, __file__, "--thread-worker", f"{m},{mean_len}"]
    workers = {
        n: subprocess.Popen(
            cmd,
            stdin=subprocess.PIPE,
            stdout=subprocess.PIPE,
            text=True,
            env={**os.environ, "RAYON_NUM_THREADS": str(n)},
        )
        for n in (1, 2)
    }
    times: dict[int, list[float]] = {1: [], 2: []}
    digests = set()
    try:

        def reply(n: int) -> dict[str, Any]:
            out = workers[n].stdout
            line = out.readline() if out is not None else ""
            if not line:
                raise RuntimeError(f"thread worker ({n} threads) ended: exit {workers[n].poll()}")
            return dict(json.loads(line))

        ready = {n: reply(n) for n in workers}
        digests |= {r["digest"] for r in ready.values()}
        for r in range(rounds):
            for n in (1, 2) if r % 2 == 0 else (2, 1):
                stdin = workers[n].stdin
                assert stdin is not None
                stdin.write(f"{calls}\n")
                stdin.flush()
                res = reply(n)
                times[n] += res["times_s"]
                digests.add(res["digest"])
    finally:
        for w in workers.values():
            if w.stdin is not None:
                w.stdin.close()
            w.wait(timeout=60)
    if len(digests) != 1:
        raise AssertionError(f"outputs differ between 1 and 2 rayon threads: {sorted(digests)}")
    med = {n: statistics.median(ts) for n, ts in times.items()}
    return {
        "tracks": m,
        "samples": ready[1]["samples"],
        "turns_per_thread_count": rounds,
        "calls_per_turn": calls,
        "one_thread": {"median_s": med[1], "min_s": min(times[1]), "max_s": max(times[1])},
        "two_threads": {"median_s": med[2], "min_s": min(times[2]), "max_s": max(times[2])},
        "bit_identical": True,
        "speedup": _status(med[1] / med[2], TARGETS["threads"], True),
    }


def run(quick: bool) -> dict[str, Any]:
    """Check, time and compare; return the figures and each target's PASS / MISS."""
    size = SIZES[quick]
    result: dict[str, Any] = {"outputs": FOUR, "options": {**OPTIONS, "min_stop": "inf"}}
    for n in size["one"]:
        t0 = time.perf_counter()
        result[f"one_{n:.0e}"] = case_one(n, size["budget_s"], size["min_rounds"])
        result[f"one_{n:.0e}"]["seconds"] = time.perf_counter() - t0
    m, mean_len = size["many"]
    t0 = time.perf_counter()
    result["threads"] = case_threads(m, mean_len, size["thread_rounds"], size["calls_per_turn"])
    result["threads"]["seconds"] = time.perf_counter() - t0
    if hasattr(os, "getloadavg"):
        result["load_average_at_end"] = os.getloadavg()
    return result


def main() -> None:
    """Command line: print the figures as JSON (and write them with --out)."""
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--quick", action="store_true", help="1e5 / 1e6 samples, 1,000 tracks")
    p.add_argument("--out", type=Path, help="also write the JSON here")
    p.add_argument("--thread-worker", help=argparse.SUPPRESS)
    args = p.parse_args()
    if args.thread_worker:
        m, mean_len = (int(v) for v in args.thread_worker.split(","))
        _thread_worker(m, mean_len)
        return
    text = json.dumps(run(args.quick), indent=2)
    print(text)
    if args.out is not None:
        args.out.write_text(text + "\n")


if __name__ == "__main__":
    main()

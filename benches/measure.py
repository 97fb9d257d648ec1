"""Measurements, each run in a fresh interpreter so memory figures start from a clean process.

``python benches/measure.py SPEC_JSON`` runs one job and prints its result as the last line of
standard output (prefixed with ``RESULT``); :func:`in_subprocess` does that from the driver.

Jobs (``spec["job"]``):

``time``
    Build the inputs; call each implementation once (warm-up), then in rounds, every
    implementation once per round in a rotating order (so that a change of load on a shared
    machine hits them alike); report per implementation the median, the spread, and per call the
    minor page faults and user / system CPU time from getrusage. Before each call, freed heap
    memory goes back to the OS, so no implementation gets pages another one faulted in: every
    call pays for its fresh memory as in a fresh process.
``memory``
    One implementation, one call: the growth of the resident set during it (its peak, VmHWM,
    reset through /proc/self/clear_refs just before the call, after freed heap memory went back
    to the OS), then the peak of Python allocations traced by tracemalloc during a second call.
``check``
    Run osculate and the NumPy references on the same inputs and compare (``check.py``).
``pythreads``
    Two Python threads calling osculate at the same time versus one after the other, and how fast a
    pure-Python loop in another thread runs while osculate computes (near 0 if the call held the
    interpreter lock, near 1 if it released it and a core is free).
"""

from __future__ import annotations

import ctypes
import gc
import hashlib
import json
import os
import resource
import statistics
import subprocess
import sys
import threading
import time
import tracemalloc
from collections.abc import Mapping
from pathlib import Path
from typing import Any, Callable, Optional

import numpy as np

HERE = Path(__file__).resolve().parent
if str(HERE) not in sys.path:  # when imported from elsewhere than benches/
    sys.path.insert(0, str(HERE))

import check  # noqa: E402
import data  # noqa: E402
import reference  # noqa: E402

MARK = "RESULT "
OPTIONS: dict[str, Any] = {
    "up": (0.0, 0.0, 1.0),
    "min_speed": 1e-3,
    "min_curvature": 1e-6,
    "gap_factor": 5.0,
}
VECTORS = {"velocity", "acceleration", "jerk", "tangent", "normal", "binormal", "center"}


# ------------------------------------------------------------------ memory and CPU from the OS


def _status_kib(field: str) -> int | None:
    try:
        with open("/proc/self/status") as f:
            for line in f:
                if line.startswith(field + ":"):
                    return int(line.split()[1])
    except OSError:
        pass
    return None


def _reset_peak() -> bool:
    """Reset VmHWM to the current resident set size (Linux ≥ 4.0)."""
    try:
        with open("/proc/self/clear_refs", "w") as f:
            f.write("5")
        return True
    except OSError:
        return False


def _rss_bytes() -> int:
    kib = _status_kib("VmRSS")
    return -1 if kib is None else kib * 1024


def _peak_bytes() -> int:
    kib = _status_kib("VmHWM")
    if kib is None:  # not Linux: ru_maxrss is the lifetime peak (KiB on Linux, bytes on macOS)
        kib = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
        if sys.platform == "darwin":
            kib //= 1024
    return kib * 1024


def _release_free_heap() -> None:
    """Give freed heap memory back to the OS (glibc), so RSS growth counts new memory only."""
    try:
        ctypes.CDLL(None).malloc_trim(0)
    except (OSError, AttributeError):
        pass


def _usage() -> tuple[float, float, int]:
    r = resource.getrusage(resource.RUSAGE_SELF)
    return r.ru_utime, r.ru_stime, r.ru_minflt


# ------------------------------------------------------------------ inputs and implementations


def make_inputs(spec: Mapping[str, Any]) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Times, positions and row offsets of the data a spec names.

    For ``"interleaved"`` (the rows of many tracks in time order, as an ordinary log holds
    them) the third array is the track id of every row instead of offsets.
    """
    if spec["kind"] == "one":
        t, x = data.one_track(int(spec["n"]))
        return t, x, np.array([0, len(t)], dtype=np.int64)
    if spec["kind"] == "many":
        return data.many_tracks(int(spec["m"]), int(spec.get("mean_len", 200)))
    if spec["kind"] == "interleaved":
        t, x, offsets = data.many_tracks(int(spec["m"]), int(spec.get("mean_len", 200)))
        ids = np.repeat(np.arange(len(offsets) - 1), np.diff(offsets))
        order = np.argsort(t, kind="stable")
        return t[order], np.ascontiguousarray(x[order]), ids[order]
    raise ValueError(f"unknown data kind {spec['kind']!r}")


def floor(t: np.ndarray, x: np.ndarray) -> list[np.ndarray]:
    """Memory-traffic floor: read every input byte once, write every output byte once.

    The inputs are summed (a read-only pass); the outputs, as many arrays of the same shapes as the
    kernel returns, are allocated fresh and filled (a write-only pass), as the kernel's are.
    """
    n = len(t)
    np.add.reduce(t)
    np.add.reduce(x, axis=None)
    outs = []
    for name in reference.FIELDS:
        if name == "flags":
            a = np.empty(n, dtype=np.uint8)
            a.fill(0)
        else:
            a = np.empty((n, x.shape[1]) if name in VECTORS else n)
            a.fill(0.0)
        outs.append(a)
    return outs


def implementation(
    impl: str, t: np.ndarray, x: np.ndarray, offsets: np.ndarray
) -> Callable[[], Any]:
    """A no-argument callable that computes every output once with ``impl``."""
    if impl == "osculate":
        import osculate

        # The reference has no stop intervals: compare the estimator's own values (min_stop=inf).
        ours = {**OPTIONS, "min_stop": np.inf}
        if len(offsets) == len(t):  # interleaved: track ids
            return lambda: osculate.kinematics(t, x, tracks=offsets, **ours)
        if len(offsets) == 2:
            return lambda: osculate.kinematics(t, x, **ours)
        return lambda: osculate.kinematics(t, x, offsets=offsets, **ours)
    if impl == "numpy":
        return lambda: reference.kinematics(t, x, **OPTIONS)
    if impl == "numpy-loop":
        return lambda: reference.kinematics_loop(t, x, offsets, **OPTIONS)
    if impl == "numpy-padded":
        return lambda: reference.kinematics_padded(t, x, offsets, **OPTIONS)
    if impl == "floor":
        return lambda: floor(t, x)
    raise ValueError(f"unknown implementation {impl!r}")


def _arrays(result: Any) -> list[np.ndarray]:
    if isinstance(result, list):
        return result
    if isinstance(result, Mapping):
        return [result[name] for name in reference.FIELDS]
    return [np.asarray(getattr(result, name)) for name in reference.FIELDS]


def _digest(result: Any) -> str:
    h = hashlib.blake2b(digest_size=16)
    for a in _arrays(result):
        h.update(np.ascontiguousarray(a).data)
    return h.hexdigest()


# ------------------------------------------------------------------ jobs


def _inputs_bytes(t: np.ndarray, x: np.ndarray, offsets: np.ndarray) -> int:
    return t.nbytes + x.nbytes + (offsets.nbytes if len(offsets) > 2 else 0)


def job_memory(spec: Mapping[str, Any]) -> dict[str, Any]:
    """Peak memory of one call in this fresh process: RSS growth, then tracemalloc's peak."""
    t, x, offsets = make_inputs(spec["data"])
    fn = implementation(spec["impl"], t, x, offsets)
    inputs_bytes = _inputs_bytes(t, x, offsets)
    gc.collect()
    _release_free_heap()
    rss0 = _rss_bytes()
    peak_reset = _reset_peak()
    out = fn()
    growth = _peak_bytes() - rss0
    outputs_bytes = sum(a.nbytes for a in _arrays(out))
    del out
    gc.collect()
    tracemalloc.start()
    out = fn()
    traced = tracemalloc.get_traced_memory()[1]
    tracemalloc.stop()
    del out
    return {
        "inputs_bytes": inputs_bytes,
        "outputs_bytes": outputs_bytes,
        "rss_growth_bytes": growth,
        "rss_peak_method": "VmHWM reset by clear_refs" if peak_reset else "lifetime peak (bound)",
        "tracemalloc_peak_bytes": traced,
        "peak_over_in_out": (inputs_bytes + growth) / (inputs_bytes + outputs_bytes),
    }


def job_time(spec: Mapping[str, Any]) -> list[dict[str, Any]]:
    """Time several runs (an implementation on a data set), interleaved (module docstring).

    ``spec["runs"]`` lists ``{"impl": ..., "data": ...}``. One warm-up call each, then rounds in
    which every run is called (a short one several times, so that each run fills a comparable
    slot), the order rotating from round to round, so that a change of load on a shared machine
    hits all runs alike.
    """
    inputs: dict[str, tuple[np.ndarray, np.ndarray, np.ndarray]] = {}
    for run in spec["runs"]:
        key = json.dumps(run["data"], sort_keys=True)
        if key not in inputs:
            inputs[key] = make_inputs(run["data"])
    runs = [(run["impl"], inputs[json.dumps(run["data"], sort_keys=True)]) for run in spec["runs"]]
    fns = [implementation(impl, *data) for impl, data in runs]
    calls: list[list[tuple[float, float, float, int]]] = [[] for _ in runs]

    def call(i: int) -> Any:
        gc.collect()
        _release_free_heap()  # every call starts from the same allocator state, whatever ran before
        u0, s0, f0 = _usage()
        t0 = time.perf_counter()
        out = fns[i]()
        elapsed = time.perf_counter() - t0
        u1, s1, f1 = _usage()
        calls[i].append((elapsed, u1 - u0, s1 - s0, f1 - f0))
        return out

    digests: list[Optional[str]] = []
    for i in range(len(runs)):
        out = call(i)
        digests.append(_digest(out) if spec.get("digest") else None)
        del out
    first = [c[0][0] for c in calls]
    for c in calls:
        c.clear()

    slot = max(first)
    per_round = [max(1, min(10, int(slot / f))) for f in first]
    budget = float(spec.get("budget_s", 5.0))
    rounds = budget / sum(k * f for k, f in zip(per_round, first))
    rounds = int(min(spec.get("max_repeats", 15), max(spec.get("min_repeats", 3), rounds)))
    order = list(range(len(runs)))
    for r in range(rounds):
        k = r % len(order)
        for i in order[k:] + order[:k]:
            for _ in range(per_round[i]):
                call(i)  # the outputs are dropped at once

    results = []
    for i, (impl, (t, _, offsets)) in enumerate(runs):
        times = [c[0] for c in calls[i]]
        median = statistics.median(times)
        results.append(
            {
                "impl": impl,
                "samples": len(t),
                "tracks": len(offsets) - 1,
                "repeats": len(times),
                "median_s": median,
                "min_s": min(times),
                "max_s": max(times),
                "times_s": times,
                "first_call_s": first[i],
                "samples_per_s": len(t) / median,
                "user_s_per_call": statistics.median(c[1] for c in calls[i]),
                "sys_s_per_call": statistics.median(c[2] for c in calls[i]),
                "minor_faults_per_call": statistics.median(c[3] for c in calls[i]),
                "digest": digests[i],
                "rayon_threads": os.environ.get("RAYON_NUM_THREADS", "default"),
            }
        )
    return results


def job_check(spec: Mapping[str, Any]) -> dict[str, Any]:
    """Compare osculate with each NumPy reference of the spec (raises on a mismatch)."""
    t, x, offsets = make_inputs(spec["data"])
    ours = implementation("osculate", t, x, offsets)()
    reports = {}
    for impl in spec["impls"]:
        theirs = implementation(impl, t, x, offsets)()
        reports[impl] = check.compare(ours, theirs, t, x, offsets, OPTIONS, impl)
        del theirs
    return reports


def job_pythreads(spec: Mapping[str, Any]) -> dict[str, Any]:
    """Concurrent versus serial calls from two Python threads, and the interpreter-lock probe."""
    t, x, offsets = make_inputs(spec["data"])
    fn = implementation("osculate", t, x, offsets)
    fn()
    repeats = int(spec.get("repeats", 3))

    def serial() -> float:
        t0 = time.perf_counter()
        fn()
        fn()
        return time.perf_counter() - t0

    def concurrent() -> float:
        barrier = threading.Barrier(3)

        def work() -> None:
            barrier.wait()
            fn()

        threads = [threading.Thread(target=work) for _ in range(2)]
        for th in threads:
            th.start()
        barrier.wait()
        t0 = time.perf_counter()
        for th in threads:
            th.join()
        return time.perf_counter() - t0

    serial_s, concurrent_s = [], []
    for _ in range(repeats):
        gc.collect()
        serial_s.append(serial())
        gc.collect()
        concurrent_s.append(concurrent())

    # Interpreter-lock probe: a pure-Python counter in another thread, alone and during a call.
    count = [0]
    stop = threading.Event()

    def spin() -> None:
        while not stop.is_set():
            count[0] += 1

    one_call = statistics.median(serial_s) / 2
    spinner = threading.Thread(target=spin)
    spinner.start()
    time.sleep(0.05)
    c0, t0 = count[0], time.perf_counter()
    time.sleep(max(0.2, one_call))
    alone = (count[0] - c0) / (time.perf_counter() - t0)
    rates = []
    for _ in range(repeats):
        c0, t0 = count[0], time.perf_counter()
        fn()
        rates.append((count[0] - c0) / (time.perf_counter() - t0))
    stop.set()
    spinner.join()
    return {
        "samples": len(t),
        "tracks": len(offsets) - 1,
        "serial_two_calls_s": statistics.median(serial_s),
        "concurrent_two_calls_s": statistics.median(concurrent_s),
        "speedup": statistics.median(serial_s) / statistics.median(concurrent_s),
        "python_loop_rate_during_call": statistics.median(rates) / alone,
        "rayon_threads": os.environ.get("RAYON_NUM_THREADS", "default"),
    }


JOBS = {
    "time": job_time,
    "memory": job_memory,
    "check": job_check,
    "pythreads": job_pythreads,
}


def in_subprocess(
    spec: Mapping[str, Any], env: Mapping[str, str] | None = None, timeout: float = 1200.0
) -> dict[str, Any]:
    """Run one job in a fresh interpreter; its failure is raised as RuntimeError."""
    full_env = dict(os.environ)
    full_env.update(env or {})
    proc = subprocess.run(
        [sys.executable, str(Path(__file__).resolve()), json.dumps(spec)],
        capture_output=True,
        text=True,
        env=full_env,
        timeout=timeout,
        check=False,
    )
    lines = [ln for ln in proc.stdout.splitlines() if ln.startswith(MARK)]
    if proc.returncode != 0 or not lines:
        raise RuntimeError(
            f"job {json.dumps(spec)} failed (exit {proc.returncode}):\n{proc.stdout}{proc.stderr}"
        )
    return json.loads(lines[-1][len(MARK) :])


def main() -> None:
    spec = json.loads(sys.argv[1])
    result = JOBS[spec["job"]](spec)
    print(MARK + json.dumps(result), flush=True)


if __name__ == "__main__":
    main()

"""Thread safety: concurrent calls on shared read-only inputs, the interpreter released during
kernel calls, and what a KeyboardInterrupt does during a long call.

Expected values here are the serial results of the same calls (the kernels keep no state between
calls, design of osculate.batch); comparisons are bit for bit.
"""

from __future__ import annotations

import json
import os
import signal
import subprocess
import sys
import textwrap
import threading
import time

import numpy as np
import osculate as osc
import pytest

# The inputs carry deliberate noise under fd: the data check rightly warns; not tested here.
pytestmark = pytest.mark.filterwarnings("ignore::osculate.SuspectDataWarning")


def shared_inputs():
    rng = np.random.default_rng(11)
    sizes = [int(v) for v in rng.integers(5, 400, 40)] + [20000]  # one track of 2 parallel jobs
    t = np.concatenate([np.cumsum(rng.uniform(0.05, 0.15, n)) for n in sizes])
    x = np.column_stack([np.cos(0.3 * t), np.sin(0.2 * t), 0.05 * t])
    x += 1e-4 * rng.standard_normal(x.shape)
    x[500:503, 0] = np.nan  # a few INVALID rows, so the compacting path runs too
    off = np.concatenate([[0], np.cumsum(sizes)]).astype(np.int64)
    # The same rows interleaved at random, each track keeping its time order, with track ids.
    labels = np.repeat(np.arange(len(sizes)), sizes)
    pos = rng.permutation(len(t))
    for lab in range(len(sizes)):
        rows = labels == lab
        pos[rows] = np.sort(pos[rows])
    t_ids, x_ids, ids = np.empty_like(t), np.empty_like(x), np.empty_like(labels)
    t_ids[pos], x_ids[pos], ids[pos] = t, x, labels
    arrays = {
        "t": t,
        "x": x,
        "xy": np.ascontiguousarray(x[:, :2]),
        "x32": x.astype(np.float32),
        "off": off,
        "ids": ids,
        "t_ids": t_ids,
        "x_ids": x_ids,
    }
    for a in arrays.values():
        a.setflags(write=False)
    return arrays


JOBS = {
    "kin-2": lambda a: osc.kinematics(a["t"], a["x"], offsets=a["off"]),
    "kin-4-up": lambda a: osc.kinematics(a["t"], a["x"], order=4, offsets=a["off"], up=(0, 0, 1)),
    "kin-ids": lambda a: osc.kinematics(a["t_ids"], a["x_ids"], tracks=a["ids"], min_speed=0.5),
    "kin-2d": lambda a: osc.kinematics(a["t"], a["xy"], offsets=a["off"], gap_factor=np.inf),
    "kin-f32": lambda a: osc.kinematics(a["t"], a["x32"], offsets=a["off"], min_curvature=0.1),
    "arc": lambda a: osc.arclength(a["t"], a["x"], offsets=a["off"]),
    "arc-ids": lambda a: osc.arclength(a["t_ids"], a["x_ids"], tracks=a["ids"]),
    "der-4": lambda a: osc.derivatives(a["t"], a["x"], order=4, offsets=a["off"]),
}


def fingerprint(result):
    """Every array of a result, as bytes (bit-for-bit comparison, NaN payloads included)."""
    if isinstance(result, np.ndarray):
        return [result.tobytes()]
    if isinstance(result, tuple):  # Derivatives
        return [np.asarray(v).tobytes() for v in result]
    return [
        np.ascontiguousarray(v).tobytes()
        for _, v in sorted(vars(result).items())
        if isinstance(v, np.ndarray) and v.dtype != object
    ]


def test_eight_threads_match_serial_calls_and_never_touch_the_inputs():
    a = shared_inputs()
    before = {k: v.copy() for k, v in a.items()}
    serial = {name: fingerprint(job(a)) for name, job in JOBS.items()}
    start = threading.Barrier(len(JOBS))
    got, errors = {}, []

    def worker(name):
        try:
            start.wait(timeout=30)
            got[name] = [fingerprint(JOBS[name](a)) for _ in range(3)]
        except BaseException as exc:  # reported below; a thread must not swallow a failure
            errors.append((name, repr(exc)))

    threads = [threading.Thread(target=worker, args=(name,)) for name in JOBS]
    for th in threads:
        th.start()
    for th in threads:
        th.join(timeout=120)
    assert not any(th.is_alive() for th in threads), "a worker hangs"
    assert not errors, errors
    for name, runs in got.items():
        for run in runs:
            assert run == serial[name], name
    for k, v in a.items():  # inputs unchanged and still read-only
        assert not v.flags.writeable, k
        np.testing.assert_array_equal(v, before[k], err_msg=k)


def test_the_interpreter_is_released_during_a_kernel_call():
    # Design: kernels run inside `detach` (GIL released), so another Python thread keeps running
    # during a long call. The main thread records timestamps while a worker computes; with the
    # interpreter held, the main thread would stall for the whole call.
    n = 1_500_000
    t = np.linspace(0.0, 1500.0, n)
    x = np.column_stack([np.cos(t), np.sin(t), 0.1 * t])
    done = threading.Event()
    span = {}

    def work():
        span["start"] = time.perf_counter()
        osc.kinematics(t, x)
        span["end"] = time.perf_counter()
        done.set()

    ticks = []
    th = threading.Thread(target=work)
    th.start()
    while not done.is_set():
        ticks.append(time.perf_counter())
        time.sleep(0.002)
    th.join()
    inside = np.array([v for v in ticks if span["start"] <= v <= span["end"]])
    duration = span["end"] - span["start"]
    # Python's switch interval is 5 ms: with the interpreter released the main thread ticks all
    # along; allow gaps up to a third of the call (a loaded machine), never the whole call.
    edges = np.concatenate([[span["start"]], inside, [span["end"]]])
    assert len(inside) >= 3, (len(inside), duration)
    assert np.max(np.diff(edges)) < max(duration / 3, 0.05), (np.max(np.diff(edges)), duration)


INTERRUPT_SCRIPT = textwrap.dedent(
    """
    import json, sys, time
    import numpy as np
    import osculate as osc

    n = int(sys.argv[1])
    t = np.linspace(0.0, n * 1e-3, n)
    x = np.column_stack([np.cos(t), np.sin(t), 0.1 * t])
    t0 = time.time()
    osc.kinematics(t, x)
    one_call = time.time() - t0
    print(json.dumps({"ready": time.time(), "one_call": one_call}), flush=True)
    returned = []
    try:
        for _ in range(50):
            osc.kinematics(t, x)
            returned.append(time.time())
        print(json.dumps({"interrupted": None}), flush=True)
    except KeyboardInterrupt:
        print(json.dumps({"interrupted": time.time(), "returned": returned}), flush=True)
    """
)


def test_keyboard_interrupt_is_honoured_when_the_running_call_returns():
    # Documented limitation: the kernels do not poll for signals. Ctrl-C during a call sets
    # Python's flag; KeyboardInterrupt is raised as soon as the running call returns (its result is
    # discarded), so the wait is at most one call. Checked: the interrupt arrives, the process does
    # not crash, and the delay is at most the duration of one call plus 1 s of scheduling slack.
    # (POSIX signal delivery.)
    proc = subprocess.Popen(
        [sys.executable, "-c", INTERRUPT_SCRIPT, "1000000"],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
    )
    try:
        first = json.loads(proc.stdout.readline())
        time.sleep(min(0.5 * first["one_call"], 0.5))  # inside the next call
        sent = time.time()
        proc.send_signal(signal.SIGINT)
        out, err = proc.communicate(timeout=60)
    finally:
        proc.kill()
    assert proc.returncode == 0, err
    report = json.loads(out.strip().splitlines()[-1])
    assert report["interrupted"] is not None, "the interrupt was lost"
    delay = report["interrupted"] - sent
    assert delay <= 2 * first["one_call"] + 1.0, (delay, first["one_call"])
    # It came at a call boundary: no call returned after the interrupt was raised.
    assert all(r <= report["interrupted"] for r in report["returned"])


def test_results_are_new_arrays_not_views_of_each_other():
    # Each result array owns its memory (outputs allocated per call, design): writing into one
    # result never changes another result or a later call's.
    a = shared_inputs()
    k1 = JOBS["kin-2"](a)
    k2 = JOBS["kin-2"](a)
    for name in ("curvature", "tangent", "speed", "flags"):
        v1, v2 = getattr(k1, name), getattr(k2, name)
        assert not np.shares_memory(v1, v2), name
        assert v1.flags.writeable, name
    k1.curvature[:] = -1.0
    assert not np.any(k2.curvature == -1.0)
    assert not np.shares_memory(k1.curvature, k1.torsion)


def test_read_only_and_memory_mapped_inputs(tmp_path):
    # Read-only float32 views of memory-mapped files (a common way to feed big logs) are accepted
    # and give the same bits as in-memory float64 copies.
    a = shared_inputs()
    path = os.fspath(tmp_path / "x.f32")
    a["x32"].tofile(path)
    mm = np.memmap(path, dtype=np.float32, mode="r", shape=a["x32"].shape)
    got = osc.kinematics(a["t"], mm[:, ::1], offsets=a["off"], min_curvature=0.1)
    want = JOBS["kin-f32"](a)
    assert fingerprint(got) == fingerprint(want)
    np.testing.assert_array_equal(np.asarray(mm), a["x32"])

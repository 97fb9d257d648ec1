"""Huge inputs, short form: one track of 1e6 samples (62 parallel jobs of 16384 rows) is computed
without seams, and an allocation that cannot succeed raises MemoryError instead of aborting.

The full-size run is manual, not part of the test suite (it needs ~13 GiB):

    python tests/test_huge.py 5e7      # one 3-D track of 5e7 samples; prints time and peak RSS
"""

from __future__ import annotations

import os
import subprocess
import sys
import textwrap

import numpy as np
import osculate as osc
import pytest
from conftest import graded_times

N = 1_000_000
CHUNK = 1 << 14  # rows per parallel job (osculate::batch::CHUNK)
U = np.finfo(np.float64).eps / 2


@pytest.fixture(scope="module")
def long_helix():
    # Helix (2 cos t, 2 sin t, t/2) on smoothly graded times (steps within a factor 1.9).
    t = graded_times(N, 2000.0)
    x = np.column_stack([2 * np.cos(t), 2 * np.sin(t), 0.5 * t])
    return t, x


FIELDS = (
    "velocity",
    "acceleration",
    "jerk",
    "speed",
    "tangent",
    "normal",
    "binormal",
    "curvature",
    "torsion",
    "center",
    "accel_tangential",
    "accel_normal",
    "angular_accel",
    "flags",
)


def same_bits(a, b):
    a, b = np.ascontiguousarray(a), np.ascontiguousarray(b)
    if a.dtype == np.float64:
        a, b = a.view(np.uint64), b.view(np.uint64)
    return np.array_equal(a, b)


def test_long_track_has_no_seams(long_helix):
    # The same track computed as 62 parallel jobs and as one job: a track with a non-finite row
    # is processed whole (osculate.kinematics: compacted path). Away from the removed row (3 rows,
    # the reach of the order-4 stencils) every stencil reads the same nodes, so every output must
    # have the same bits (Fornberg weights depend only on the nodes). Expected values: the one-job
    # computation; tolerance: none.
    t, x = long_helix
    chunked = osc.kinematics(t, x, order=4)
    hole = CHUNK * 31 + 5  # next to a seam of the chunked run
    x_hole = x.copy()
    x_hole[hole, 2] = np.nan
    whole = osc.kinematics(t, x_hole, order=4)
    far = np.abs(np.arange(N) - hole) > 3
    assert whole.flags[hole] == osc.Flag.INVALID
    for name in FIELDS:
        assert same_bits(getattr(chunked, name)[far], getattr(whole, name)[far]), name
    # Arc length: the same sums up to the hole (the chord across it is counted after it).
    assert same_bits(chunked.arclength[:hole], whole.arclength[:hole])
    del whole

    # Every row is filled: finite everywhere, flags only EDGE within 3 rows of the ends.
    for name in FIELDS[:-1]:
        assert np.isfinite(getattr(chunked, name)).all(), name
    edge = np.zeros(N, bool)
    edge[:3] = edge[-3:] = True
    np.testing.assert_array_equal(chunked.flags, np.where(edge, int(osc.Flag.EDGE), 0))

    # The same track behind a short one (the jobs now start at other global rows): same bits.
    pre = 777
    tt = np.concatenate([t[:pre], t])
    xx = np.concatenate([x[:pre] * 3.0, x])
    batch = osc.kinematics(tt, xx, order=4, offsets=[0, pre, pre + N])
    for name in (*FIELDS, "arclength"):
        assert same_bits(getattr(batch, name)[pre:], getattr(chunked, name)), name


def test_long_track_arclength_against_the_closed_form(long_helix):
    # Chord of the helix between parameters t0 < t1: sqrt((2a sin(dt/2))^2 + (c dt)^2) (closed
    # form), summed along the 1e6 samples. Tolerance: rounding only: positions (numpy's cos, sin
    # and c t within 2 U of |x|) move each chord by <= 4 U (sqrt(2) a + c t); norm and reference
    # chord ~ 10 U of the chord; two recursive summations 2 i U s (Higham sec. 4.2).
    t, x = long_helix
    a, c = 2.0, 0.5
    dt = np.diff(t)
    chord = np.sqrt((2 * a * np.sin(dt / 2)) ** 2 + (c * dt) ** 2)
    want = np.concatenate([[0.0], np.cumsum(chord)])
    per = 4 * U * (np.sqrt(2) * a + c * np.abs(t[1:])) + 10 * U * chord
    tol = np.concatenate([[0.0], np.cumsum(per)]) + 2 * np.arange(N) * U * want
    s = osc.arclength(t, x)
    assert np.all(np.abs(s - want) <= tol)
    assert tol[-1] < 1e-9 * want[-1]  # the check is sharp: a relative defect of 1e-9 would show
    k = osc.kinematics(t[:300_000], x[:300_000])
    assert same_bits(k.arclength, s[:300_000])


# -------------------------------------------------------------------------------------------------
# Allocation failures, forced with an address-space limit (RLIMIT_AS) in a child process: only the
# child can run out of memory, whatever the machine. glibc is told to reserve no per-thread arenas
# after the limit is set and to map and unmap every block over 64 KiB (no free heap kept from
# earlier temporaries), so the outcome depends neither on thread scheduling nor on the allocation
# history.

OOM_SCRIPT = textwrap.dedent(
    """
    import re, resource, sys
    import numpy as np
    import osculate as osc

    fn, headroom, nan_row = sys.argv[1], int(sys.argv[2]), sys.argv[3] == "1"
    kwargs = eval(sys.argv[4]) if len(sys.argv) > 4 else {}
    n = int(kwargs.pop("n", 1_000_000))
    t = np.arange(n) * 1e-3
    x = np.column_stack([np.cos(t), np.sin(t), 0.1 * t])
    if nan_row:
        x[n // 2, 1] = np.nan
    warm = x[:100].copy()
    osc.kinematics(t[:100], warm)  # start the thread pool before the limit
    warm[50, 0] = np.nan
    osc.kinematics(t[:100], warm)
    status = open("/proc/self/status").read()
    vm = int(re.search(r"VmSize:\\s+(\\d+)", status).group(1)) * 1024
    resource.setrlimit(resource.RLIMIT_AS, (vm + headroom, vm + headroom))
    try:
        if fn == "work":
            osc.work(x, x, t=t, **kwargs)
        else:
            getattr(osc, fn)(t, x, **kwargs)
        print("ok")
    except MemoryError as err:
        print("MemoryError", err)
    except osc.InputError as err:
        print("InputError", err)
    """
)


def run_out_of_memory(fn, headroom_mb, nan_row=False, kwargs=None):
    env = {
        **os.environ,
        "MALLOC_ARENA_MAX": "1",
        "MALLOC_MMAP_THRESHOLD_": "65536",
        "MALLOC_TRIM_THRESHOLD_": "65536",
        "RUST_BACKTRACE": "0",
    }
    args = [fn, str(int(headroom_mb * 1e6)), "1" if nan_row else "0", repr(kwargs or {})]
    return subprocess.run(
        [sys.executable, "-c", OOM_SCRIPT, *args],
        env=env,
        capture_output=True,
        text=True,
        timeout=120,
    )


@pytest.mark.parametrize(
    "fn, headroom_mb, nan_row",
    [
        ("kinematics", 64, False),  # outputs (265 MB) cannot be allocated
        ("derivatives", 64, False),
        ("arclength", 4, False),  # 8 MB of output
        ("kinematics", 64, True),  # a track with a NaN row
        ("kinematics", 4, False),  # was: batch::median_step collected 8n bytes infallibly
        ("kinematics", 270, True),  # was: kinematics::compacted collected its copies infallibly
    ],
)
def test_impossible_allocation_raises_memory_error(fn, headroom_mb, nan_row):
    # (the cases of every estimator and function follow in the next test)
    # Design rule (DEVELOPERS.md): an allocation that cannot succeed is a MemoryError, never an
    # abort of the interpreter. The inputs fit; `headroom_mb` more is not enough for the call.
    # (Linux: RLIMIT_AS, /proc/self/status and glibc's malloc variables.)
    out = run_out_of_memory(fn, headroom_mb, nan_row)
    assert out.returncode == 0, f"child died with {out.returncode}: {out.stderr[-500:]}"
    assert out.stdout.startswith("MemoryError"), out.stdout


@pytest.mark.parametrize(
    "fn, headroom_mb, kwargs, expect",
    [
        # Every estimator's fit, its own working arrays included (was: smooth aborted in
        # bspline::clamped_knots and in its collected copies of times, weights and positions).
        ("kinematics", 64, {"method": "smooth"}, "MemoryError"),
        ("kinematics", 16, {"method": "smooth"}, "MemoryError"),
        ("kinematics", 64, {"method": "local", "window": 7}, "MemoryError"),
        ("kinematics", 64, {"method": "spline"}, "MemoryError"),
        ("fit", 64, {"method": "smooth"}, "MemoryError"),
        ("frames", 64, {}, "MemoryError"),
        # Half the 8 MB cumulative output: 8 MB left the call a few pages to spare or not,
        # depending on what the process had imported (pandas or not; tests/test_pandas_hook.py).
        ("work", 4, {"cumulative": True}, "MemoryError"),
        # A requested size beyond memory names the argument (was: an abort collecting targets).
        ("resample", 64, {"n": 1000, "step": 1e-9}, "InputError step"),
        ("resample", 64, {"n": 1000, "count": 10**12}, "InputError count"),
    ],
)
def test_every_function_fails_cleanly_without_memory(fn, headroom_mb, kwargs, expect):
    # The inputs (1e6 rows unless `n`) fit; the call needs more than `headroom_mb` on top.
    out = run_out_of_memory(fn, headroom_mb, kwargs=kwargs)
    assert out.returncode == 0, f"child died with {out.returncode}: {out.stderr[-500:]}"
    assert out.stdout.startswith(expect), out.stdout


def manual_run(n):
    """One 3-D track of n samples through kinematics; prints the time and the peak RSS."""
    import resource
    import time

    t = np.arange(n, dtype=np.float64)
    t *= 1e-3
    x = np.empty((n, 3))
    np.cos(t, out=x[:, 0])
    np.sin(t, out=x[:, 1])
    x[:, 2] = t
    x *= [30.0, 30.0, 0.5]
    before = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 2**20
    start = time.perf_counter()
    k = osc.kinematics(t, x)
    took = time.perf_counter() - start
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 2**20
    kappa = 30.0 / (30.0**2 + 0.5**2)  # helix a/(a^2 + c^2), closed form
    err = np.max(np.abs(k.curvature[3:-3] - kappa)) / kappa
    print(
        f"n = {n:.3g}: kinematics {took:.1f} s; peak RSS {peak:.2f} GiB (inputs {before:.2f} GiB)"
    )
    print(f"max relative curvature error {err:.2e}; flagged rows {np.count_nonzero(k.flags)}")


if __name__ == "__main__":
    manual_run(int(float(sys.argv[1]) if len(sys.argv) > 1 else 5e7))

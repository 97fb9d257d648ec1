"""osculate.flags: one bit per flag, the bits the report and the kernels use."""

import numpy as np
import osculate as osc
import pytest


def test_each_flag_is_its_own_bit():
    values = [int(f) for f in osc.Flag]
    assert all(v > 0 and v & (v - 1) == 0 for v in values)  # powers of two
    assert len(set(values)) == len(values)
    combined = osc.Flag.STOPPED | osc.Flag.GAP
    assert [f.name for f in osc.Flag if f & combined] == ["STOPPED", "GAP"]


def test_the_bits_the_demo_report_documents():
    # report.md tells readers of its tables every bit of osculate.Flag ("1 STOPPED, 2 STRAIGHT,
    # 4 EDGE, 8 GAP, 16 INVALID, 32 VAGUE").
    import inspect

    from osculate.report import _writing

    text = " ".join(inspect.getsource(_writing.run).split())
    for flag in osc.Flag:
        assert f"{int(flag)} {flag.name}" in text, flag.name


@pytest.mark.parametrize(
    "flag, make",
    [
        # At rest for the first 2 s of 5: STOPPED (speed 0 within any threshold).
        ("STOPPED", lambda t: np.column_stack([np.clip(t - 2.0, 0, None) ** 2, 0 * t])),
        # A straight line: STRAIGHT (curvature 0).
        ("STRAIGHT", lambda t: np.column_stack([t, 2 * t])),
    ],
)
def test_kernel_rows_carry_the_bit_of_their_flag(flag, make):
    t = np.linspace(0.0, 5.0, 51)
    x = make(t)
    x[25] = np.nan  # INVALID: a non-finite input row
    k = osc.kinematics(t, x, min_speed=1e-6)
    bits = np.asarray(k.flags)
    assert bits[25] & int(osc.Flag.INVALID)
    assert np.any(bits & int(osc.Flag[flag]))
    assert bits[0] & int(osc.Flag.EDGE) and bits[-1] & int(osc.Flag.EDGE)  # one-sided stencils
    assert np.array_equal(k.flagged(osc.Flag[flag]), (bits & int(osc.Flag[flag])) != 0)

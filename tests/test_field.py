"""GridField (osculate.field): where it lives, how its errors read, its docstring examples.

Interpolation against scipy's RegularGridInterpolator is in test_work.py beside the integrals
that use it.
"""

import doctest

import numpy as np
import osculate as osc
import osculate.field
import osculate.lineint
import pytest


def test_docstring_examples_run():
    result = doctest.testmod(osculate.field, optionflags=doctest.ELLIPSIS)
    assert result.attempted > 0
    assert result.failed == 0


def test_one_class_under_three_names():
    assert osc.GridField is osculate.field.GridField is osculate.lineint.GridField


def test_point_errors_name_the_callers_row_and_no_track():
    g = osc.GridField(np.zeros((3, 3)), origin=(0, 0), spacing=1.0)
    with pytest.raises(
        osc.InputError, match=r"^points: row 2: point \[5\.0, 0\.0\] is outside"
    ) as e:
        g([[0.5, 0.5], [1.0, 1.0], [5.0, 0.0]])
    assert (e.value.argument, e.value.track, e.value.row) == ("points", None, 2)


@pytest.mark.parametrize(
    "outside, exc, msg",
    [
        (
            "wrap",
            osc.InputError,
            r"outside: expected one of \('error', 'nan', 'clamp'\), got 'wrap'",
        ),
        (None, TypeError, r"outside: expected a string"),
    ],
)
def test_outside_is_checked_by_the_kernel_and_typed_here(outside, exc, msg):
    with pytest.raises(exc, match=msg):
        osc.GridField(np.zeros((2, 2)), (0, 0), 1.0, outside=outside)


def test_values_on_the_nodes_and_between():
    # Bilinear interpolation reproduces a field linear in each coordinate exactly (1e-14, the
    # rounding of a few operations): f = 1 + 2x − y + 0.5 xy (Press et al., Numerical Recipes,
    # 3rd ed., §3.6).
    x, y = np.meshgrid(np.linspace(-1, 2, 4), np.linspace(0, 1, 3), indexing="ij")
    f = 1 + 2 * x - y + 0.5 * x * y
    g = osc.GridField(f, origin=(-1, 0), spacing=(1.0, 0.5))
    p = np.array([[-1.0, 0.0], [0.3, 0.7], [2.0, 1.0], [1.99, 0.01]])
    want = 1 + 2 * p[:, 0] - p[:, 1] + 0.5 * p[:, 0] * p[:, 1]
    np.testing.assert_allclose(g(p), want, rtol=0, atol=1e-14)

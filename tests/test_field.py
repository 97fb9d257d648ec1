"""GridField (osculate.field): interpolation, where it lives, how its errors read, its
docstring examples. Integrals of gridded fields are in test_lineint.py.

Every numerical check states where its expected value comes from and its tolerance.
"""

import doctest
import re

import numpy as np
import osculate as osc
import osculate.field
import osculate.lineint
import pytest
from scipy.interpolate import RegularGridInterpolator


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


def test_grid_interpolation_matches_regular_grid_interpolator(rng):
    # Bi/trilinear interpolation against scipy.interpolate.RegularGridInterpolator (method
    # "linear"), an independent implementation: 1e-13 absolute on values of size 1.
    for shape in ((7, 5), (6, 4, 5)):
        d = len(shape)
        origin = rng.normal(size=d)
        spacing = rng.uniform(0.2, 1.5, size=d)
        axes = [o + s * np.arange(k) for o, s, k in zip(origin, spacing, shape)]
        vals = rng.normal(size=(*shape, d))
        pts = origin + rng.random((5000, d)) * (np.array(shape) - 1) * spacing
        ours = osc.GridField(vals, origin, spacing)(pts)
        np.testing.assert_allclose(ours, RegularGridInterpolator(axes, vals)(pts), atol=1e-13)
        scalar = osc.GridField(vals[..., 0], origin, spacing)(pts.tolist())
        ref = RegularGridInterpolator(axes, vals[..., 0])(pts)
        np.testing.assert_allclose(scalar, ref, atol=1e-13)


BAD = [
    # (description, callable, exception, message regex)
    (
        "one node on an axis",
        lambda: osc.GridField(np.zeros((1, 3, 3, 3)), (0, 0, 0), 1.0),
        osc.InputError,
        r"values: axis 0 has 1 node",
    ),
    (
        "zero spacing",
        lambda: osc.GridField(np.zeros((2, 2, 2)), (0, 0, 0), (1.0, 0.0, 1.0)),
        osc.InputError,
        r"spacing: must be finite and > 0, axis 1",
    ),
    (
        "negative spacing",
        lambda: osc.GridField(np.zeros((2, 2)), (0, 0), -1.0),
        osc.InputError,
        r"spacing: must be finite and > 0",
    ),
    (
        "NaN spacing",
        lambda: osc.GridField(np.zeros((2, 2)), (0, 0), np.nan),
        osc.InputError,
        r"spacing: must be finite",
    ),
    (
        "spacing length",
        lambda: osc.GridField(np.zeros((2, 2)), (0, 0), (1.0, 1.0, 1.0)),
        osc.InputError,
        r"spacing: expected a number or 2 steps",
    ),
    (
        "origin length",
        lambda: osc.GridField(np.zeros((2, 2)), (0, 0, 0, 0), 1.0),
        osc.InputError,
        r"origin: expected 2 or 3 coordinates",
    ),
    (
        "vector width",
        lambda: osc.GridField(np.zeros((2, 2, 2, 2)), (0, 0, 0), 1.0),
        osc.InputError,
        r"values: a 3-D grid needs shape",
    ),
    (
        "NaN node value",
        lambda: osc.GridField(
            np.where(np.arange(8).reshape(2, 2, 2) == 5, np.nan, 0.0), (0, 0, 0), 1.0
        ),
        osc.InputError,
        re.escape("values: node (1, 0, 1) is not finite"),
    ),
    (
        "bad outside",
        lambda: osc.GridField(np.zeros((2, 2)), (0, 0), 1.0, outside="wrap"),
        osc.InputError,
        r"outside: expected one of",
    ),
    (
        "complex grid",
        lambda: osc.GridField(np.zeros((2, 2)) + 1j, (0, 0), 1.0),
        TypeError,
        r"values: expected real numbers, got complex",
    ),
]


@pytest.mark.parametrize("desc, fn, exc, msg", BAD, ids=[b[0] for b in BAD])
def test_bad_grids_raise_the_stated_error(desc, fn, exc, msg):
    with pytest.raises(exc, match=msg):
        fn()

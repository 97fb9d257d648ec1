"""Findings of the stress harness (test_properties.py::test_stress_harness_...) and of the
cargo-fuzz targets (fuzz/), each pinned by a minimal reproducer.

Every finding here is fixed; each test keeps it fixed. A new finding goes in as a strict xfail
with a matching entry of KNOWN_BUGS (the exceptions the stress harness lets through until then),
and both come out with the fix. The one crash cargo fuzz found (local fits with a time window far
outside the track) is replayed by benches/fuzz.sh from fuzz/regressions/.
"""

from __future__ import annotations

import re
import warnings

import numpy as np
import osculate as osc
import pytest

# Random data in arbitrary units: the data checks may rightly call them suspect.
pytestmark = pytest.mark.filterwarnings("ignore::osculate.SuspectDataWarning")

T = np.arange(10.0)
X = np.column_stack([T, T**2, np.sin(T)])

# Exceptions the stress harness tolerates until the bugs below are fixed: Python's float()/int()
# conversions of option values, numpy's conversion of a ragged id list, and the overflow warning of
# Kinematics.summary_arrays. Everything else that is not InputError, TypeError or MemoryError fails
# the harness.
KNOWN_BUGS: tuple[tuple[type[BaseException], str], ...] = ()


def known_bug(exc: BaseException) -> bool:
    """Whether `exc` is one of the reported, not yet fixed, bugs listed in KNOWN_BUGS."""
    return any(type(exc) is kind and re.search(msg, str(exc)) for kind, msg in KNOWN_BUGS)


@pytest.mark.parametrize("order", [2.7, 4.0, "4", np.float64(2.0)])
def test_order_must_be_an_integer(order):
    # Like `degree` and `window`, `order` is an integer option: a float or a string is a TypeError
    # naming it (README: "raises osc.InputError ... naming the argument").
    with pytest.raises(TypeError, match=r"^order: "):
        osc.kinematics(T, X, order=order)


@pytest.mark.parametrize(
    "kw",
    [
        {"min_speed": "abc"},
        {"min_curvature": "1e-3x"},
        {"gap_factor": "x"},
        {"up": ["a", "b", "c"]},
        {"method": "smooth", "smoothing": "x"},
        {"method": "smooth", "noise": "x"},
        {"method": "local", "window_span": "x"},
    ],
    ids=lambda kw: next(iter(kw.keys() - {"method"})),
)
def test_non_numeric_option_is_a_type_error_naming_it(kw):
    # Observed: plain ValueError("could not convert string to float: 'abc'"), no argument named.
    name = next(iter(kw.keys() - {"method"}))
    with pytest.raises((TypeError, osc.InputError), match=rf"^{name}: "):
        osc.kinematics(T, X, **kw)


@pytest.mark.parametrize(
    "kw",
    [
        {"min_speed": 10**400},
        {"gap_factor": 10**400},
        {"order": 2**70},
        {"method": "smooth", "smoothing": 10**400},
    ],
    ids=lambda kw: next(iter(kw.keys() - {"method"})),
)
def test_huge_integer_option_is_an_input_error_naming_it(kw):
    # Observed: OverflowError("int too large to convert to float") / ("... to C long").
    name = next(iter(kw.keys() - {"method"}))
    with pytest.raises((TypeError, osc.InputError), match=rf"^{name}: "):
        osc.kinematics(T, X, **kw)


@pytest.mark.parametrize("nu", [-1, 2**70])
def test_path_derivative_order_out_of_range(nu):
    # nu = 9 already gives InputError("nu: must be 0, 1, 2 or 3"); -1 and 2**70 give OverflowError.
    path = osc.fit(T, X, method="spline")
    with pytest.raises(osc.InputError, match=r"nu: must be 0, 1, 2 or 3"):
        path([1.0], nu=nu)


def test_ragged_track_ids_are_an_input_error():
    ids = [[1], [1, 2]] + [[0]] * 8
    with pytest.raises(osc.InputError, match=r"^tracks: "):
        osc.kinematics(T, X, tracks=ids)


def test_summary_of_huge_coordinates_is_exact_and_silent():
    # Scaling space by 2^660 (~5e198) is exact, so every length-like summary figure scales by
    # exactly 2^660 (scaling of the Frenet apparatus, any differential geometry text) and nothing
    # overflows: |jerk| ~ 1e200 is far below the float range. Was: RuntimeWarning "overflow
    # encountered in square" from sqrt(sum(jerk**2)), and an infinite polyline length. The
    # thresholds are 0 because min_curvature is in the data's units (1e-6 would make the scaled
    # path STRAIGHT, by design). Tolerance: none.
    lam = 2.0**660
    kw = {"min_speed": 0.0, "min_curvature": 0.0}
    base = osc.kinematics(T, X, **kw).summary_arrays()
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        # 1e199 m/s: the data check rightly calls the units implausible; nothing numerical warns.
        warnings.simplefilter("ignore", osc.SuspectDataWarning)
        big = osc.kinematics(T, X * lam, **kw).summary_arrays()
    for name in ("length", "max_speed", "max_accel_normal", "max_jerk_magnitude"):
        np.testing.assert_array_equal(big[name], base[name] * lam, err_msg=name)


@pytest.mark.parametrize("power", [-600, -300, 300, 600])
def test_frenet_apparatus_is_scale_covariant_over_the_exponent_range(power):
    # Scaling space by 2^p is exact and the apparatus is scale-covariant (any differential geometry
    # text): speed x 2^p, kappa and tau x 2^-p, T unchanged. Inputs and true outputs here are all
    # normal floats (|x| ~ 2^p * 1e2, kappa ~ 2^-p). Observed: |r' x r''|^2 and v^2 overflow or
    # underflow: at 2^300 kappa = inf with no flag, at 2^-300 and 2^500 a curved path is STRAIGHT
    # with kappa = 0, at 2^-600 every sample is STOPPED. Found with the property tests' exact
    # power-of-two scaling taken beyond its +-2^30 range. Tolerance: an overflow-safe evaluation
    # (prescaling by a power of two) reproduces the unscaled bits; 1e-13 relative allows another
    # correctly rounded evaluation order.
    lam = 2.0**power
    kw = {"min_speed": 0.0, "min_curvature": 0.0}
    base = osc.kinematics(T, X, **kw)
    big = osc.kinematics(T, X * lam, **kw)
    np.testing.assert_array_equal(big.flags, base.flags)
    np.testing.assert_allclose(big.speed / lam, base.speed, rtol=1e-13)
    np.testing.assert_allclose(big.curvature * lam, base.curvature, rtol=1e-13)
    np.testing.assert_allclose(big.torsion * lam, base.torsion, rtol=1e-13, atol=0)
    np.testing.assert_allclose(big.tangent, base.tangent, rtol=1e-13, atol=1e-15)


def test_up_direction_with_huge_components():
    # `up` is a direction; (1e308, 1e308, 1e308) is finite and points along (1, 1, 1). Observed:
    # InputError "up: must be a finite non-zero vector". Expected: the signed curvature about
    # (1, 1, 1), within the rounding of normalizing the axis (4 U relative, closed form of a/|a|).
    want = osc.kinematics(T, X, up=(1.0, 1.0, 1.0)).signed_curvature
    got = osc.kinematics(T, X, up=(1e308, 1e308, 1e308)).signed_curvature
    np.testing.assert_allclose(got, want, rtol=4 * np.finfo(float).eps, atol=0)


def test_unsigned_offsets_beyond_int64_are_named_as_given():
    # Observed: "offsets: must end at the number of rows 10, ends at -1" for 2**64 - 1.
    with pytest.raises(osc.InputError, match=r"18446744073709551615"):
        osc.kinematics(T, X, offsets=np.array([0, 2**64 - 1], dtype=np.uint64))


@pytest.mark.parametrize("where", [20.0, -20.0])
def test_local_fit_with_a_time_window_outside_the_track(where):
    # Found by the `fit` fuzz target: local::window_rows gives an empty row range for a query
    # farther than span/2 outside the track, and fit_at reads t[lo] (lo = n) or t[hi - 1] (hi = 0)
    # before checking the count: a panic, reported as RuntimeError "osculate internal error".
    # Documented (osculate.Path): "Outside a track's time range ... the end windows are used (local
    # fits)", as they are for window=5. Expected: the end window's cubic, exact on the quadratic
    # data, extrapolated: (where, where^2) (closed form). Tolerance: least-squares rounding
    # amplified by extrapolating ~3 window spans (1e-9 relative seen with window=5): rtol 1e-6.
    t = np.arange(10.0)
    xy = np.column_stack([t, t**2])
    path = osc.fit(t, xy, method="local", window_span=8.0, degree=3)
    np.testing.assert_allclose(path([where]), [[where, where**2]], rtol=1e-6)
    k = path.kinematics([where])
    np.testing.assert_allclose(k.velocity, [[1.0, 2 * where]], rtol=1e-6)


@pytest.mark.parametrize(
    "query",
    [np.complex128(1.0), "abc", None, True],
    ids=["complex", "str", "None", "bool"],
)
def test_path_scalar_query_is_checked_like_an_array(query):
    # Arrays of these dtypes are a TypeError "t: expected real numbers, got ..."; a scalar goes
    # through np.asarray([t], dtype=float) instead. Observed: ComplexWarning, ValueError, NaN for
    # None, 1.0 for True and for the datetime.
    path = osc.fit(T, X, method="spline")
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        with pytest.raises(TypeError, match=r"^t: expected real numbers"):
            path(query)


def test_path_datetime_query_is_seconds_since_the_epoch():
    # Datetimes are times everywhere (seconds since 1970-01-01 UTC): a datetime query equals the
    # float query of its seconds (was: read as 1.0 by np.asarray([t], dtype=float)).
    path = osc.fit(T, X, method="spline")
    np.testing.assert_array_equal(path(np.datetime64(1, "s")), path(1.0))


def test_known_bug_filter_is_narrow():
    # The harness's tolerance list must not swallow the failures it exists to catch; with every
    # finding fixed it lets nothing through.
    assert not known_bug(RuntimeError("osculate internal error"))
    assert not known_bug(ValueError("positions: something else"))
    assert not known_bug(OverflowError("some other overflow"))
    assert not known_bug(ValueError("could not convert string to float: 'x'"))


def _slow_unit_kinematics(k_scale: float):
    # The `elements` fuzz target's slow unit (fuzz/regressions/elements/winding-spiral), as the
    # kernel received it: 4 samples 6 apart, a curvature ramp 0 -> -23.8 (times k_scale), positions
    # no such path passes near, a NaN time, se 0 then negative (unknown). A Kinematics of the
    # same shape carries it to the public elements_of.
    import dataclasses

    base = osc.kinematics(np.arange(4.0), np.column_stack([np.arange(4.0), np.zeros(4)]))
    return dataclasses.replace(
        base,
        t=np.array([np.nan, -31.125, -31.125, -31.125]),
        position=np.array(
            [[-31.125, -31.125], [-31.125, 41.875], [-7968.0, -31.125], [-31.76171875, -31.125]]
        ),
        arclength=np.array([0.0, 6.02, 12.08, 18.18]),
        signed_curvature=np.array([0.0, -7.98, -15.92, -23.82]) * k_scale,
        flags=np.array([0, 0, 0, 32], dtype=np.uint8),
        se={"signed_curvature": np.array([0.0, -7.98, -15.92, -23.82])},
        fit_info=None,
    )


def test_elements_of_a_curvature_diagram_the_samples_cannot_resolve():
    # Found by the `elements` fuzz target: one call took 15 s. The curvature diagram turns 217.8
    # rad (the trapezoids of |kappa| ds give 217.6) over 3 sample intervals; the chain fit then
    # wandered to spirals turning 1e10 rad. Expected: an InputError naming the argument and the
    # track (the kernel's Rust tests count that no chain is evaluated).
    from osculate.elements import elements_of

    k = _slow_unit_kinematics(1.0)
    with pytest.raises(osc.InputError, match=r"^curvature: track .*turns 2\.178e2 rad .* 3 sample"):
        elements_of(k, min_length=6.08215e-319, max_iterations=8)


def test_elements_fit_stays_within_what_the_samples_resolve():
    # The same unit with kappa / 100 (2.18 rad over 3 intervals): a fit with 6 residuals for 8
    # parameters. Was: a chain of two spirals 14.8 km long for 18 m of samples, turning 4e5 rad.
    # Expected (closed form of the bound): the returned chain turns at most pi per sample interval,
    # sum of |kappa| ds over the elements <= 3 pi (kappa linear on each: trapezoid, or the two
    # triangles either side of a sign change); the elements lie in the samples' arc-length span
    # and hold the 4 samples. Tolerance: none (the kernel checks the same closed form).
    from osculate.elements import elements_of

    el = elements_of(_slow_unit_kinematics(0.01), min_length=6.08215e-319, max_iterations=8)
    assert len(el) >= 1
    k0, k1, length = el.start_curvature, el.end_curvature, el.length
    same = k0 * k1 >= 0
    with np.errstate(divide="ignore", invalid="ignore"):
        apart = (k0**2 + k1**2) / np.abs(k1 - k0)
    turning = 0.5 * length * np.where(same, np.abs(k0) + np.abs(k1), apart)
    assert turning.sum() <= 3 * np.pi
    assert np.all((0.0 <= el.start_arclength) & (el.start_arclength <= el.end_arclength))
    assert np.all(el.end_arclength <= 18.18)
    assert el.samples.sum() == 4

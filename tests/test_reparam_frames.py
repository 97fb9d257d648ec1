"""Arc length on splines, resampling by arc length, and rotation-minimizing frames."""

import numpy as np
import osculate as osc
import pytest
from conftest import helix
from osculate import Flag
from scipy.special import ellipe


def test_ellipse_perimeter_with_spline_arclength():
    # Perimeter 4a·E(e²) with scipy.special.ellipe (parameter m = e²); 400 samples of a closed
    # ellipse through an interpolating spline: tolerance 1e-8 relative (spline error O(h⁴)).
    a, b = 3.0, 2.0
    th = np.linspace(0, 2 * np.pi, 401)
    s = osc.arclength(th, np.column_stack([a * np.cos(th), b * np.sin(th)]), method="spline")
    exact = 4 * a * ellipe(1 - (b / a) ** 2)
    assert abs(s[-1] - exact) / exact < 1e-8


def test_helix_length_closed_form():
    # Helix (a cos t, a sin t, c t): length √(a²+c²)·T (closed form); 1000 graded samples,
    # tolerance 1e-9 relative (spline position error O(h⁴) with h ≈ 0.01).
    u = np.linspace(0, 1, 1000)
    t = 10 * (u + 0.05 * np.sin(2 * np.pi * u))
    k = osc.kinematics(t, helix(t, 2.0, 0.5), method="spline")
    np.testing.assert_allclose(k.arclength[-1], np.sqrt(4.25) * 10.0, rtol=1e-9)
    # The reported quadrature error bound covers the difference from the closed form.
    assert k.fit_info["length_error"][0] < 1e-9


@pytest.mark.parametrize("method", ["spline", "smooth", "linear"])
def test_resampled_spacing_equals_step(method):
    # Consecutive points, measured by the path's own accurate arc length, are `step` apart to
    # 1e-9·step (the Newton solve runs to 1e-14 of the length).
    rng = np.random.default_rng(11)
    t = np.sort(rng.uniform(0, 12, 250))
    x = helix(t, 3.0, 0.4) + (rng.normal(0, 0.01, (250, 3)) if method == "smooth" else 0)
    step = 0.37
    r = osc.resample(t, x, step=step, method=method)
    path = osc.fit(t, x, method=method)
    s = path.arclength(r.t)
    gaps = np.diff(s)
    np.testing.assert_allclose(gaps[:-1], step, atol=1e-9 * step)
    assert 0 < gaps[-1] <= step * (1 + 1e-9)  # the shorter last step kept by endpoint=True
    np.testing.assert_allclose(r.s, s, atol=1e-9 * step)
    short = osc.resample(t, x, step=step, method=method, endpoint=False)
    assert len(short) == len(r) - 1


def test_resampling_a_straight_segment_and_extra_columns():
    # A straight line at non-uniform speed: resampled points are exact (common practice: the
    # interpolating spline of collinear samples is collinear), and columns linear in t are
    # reproduced exactly by the linear interpolation in time.
    t = np.array([0.0, 0.5, 1.5, 2.0, 4.0])
    u = t**2
    x = np.column_stack([3 * u, 4 * u])
    r = osc.resample(t, x, count=9, extra={"temp": 20 + 2 * t, "id": 7 + 0 * t}, method="linear")
    np.testing.assert_allclose(r.s, np.linspace(0, 80, 9))
    np.testing.assert_allclose(r.position, np.column_stack([0.6 * r.s, 0.8 * r.s]), atol=1e-12)
    np.testing.assert_allclose(r.extra["temp"], 20 + 2 * r.t, atol=1e-12)
    np.testing.assert_array_equal(r.extra["id"], 7.0)
    df = r.to_pandas()
    assert list(df.columns) == ["s", "t", "x", "y", "temp", "id"]


def test_resample_many_tracks_and_at():
    t = np.linspace(0, 1, 20)
    ids = np.repeat(["b", "a"], 20)
    x = np.concatenate([np.column_stack([t, 0 * t]), np.column_stack([2 * t, 0 * t])])
    r = osc.resample(np.tile(t, 2), x, tracks=ids, at=[0.0, 0.5, 1.0])
    assert list(r.tracks) == ["a"] * 3 + ["b"] * 3
    np.testing.assert_allclose(r.length, [2.0, 1.0])
    np.testing.assert_allclose(r.position[:, 0], [0, 0.5, 1.0] * 2, atol=1e-12)
    with pytest.raises(osc.InputError, match=r"at: track 'b': arc length 1.5 is outside"):
        osc.resample(np.tile(t, 2), x, tracks=ids, at=[0.0, 1.5])


@pytest.mark.parametrize(
    "kw, msg",
    [
        ({"step": 0.0}, r"step: must be finite and > 0"),
        ({"step": -1.0}, r"step: must be finite and > 0"),
        ({"count": 1}, r"count: must be at least 2"),
        ({"at": [0.5, 0.1]}, r"at: must be sorted"),
        ({"at": [np.nan]}, r"at: value 0 is not finite"),
        ({}, r"step, count, at: give exactly one"),
        ({"step": 1.0, "count": 3}, r"give exactly one"),
        ({"step": 1.0, "extra": np.ones(5)}, r"extra: expected shape \(6,\)"),
        ({"step": 1.0, "method": "fd"}, r"method: expected one of"),
    ],
)
def test_resample_bad_input(kw, msg):
    t = np.arange(6.0)
    with pytest.raises(osc.InputError, match=msg):
        osc.resample(t, np.column_stack([t, t**2]), **kw)


def test_rotation_minimizing_frame_on_a_helix():
    # Orthonormal and right-handed to 1e-12; minimal rotation: dN/ds has no component along the
    # other normal B, to discretization order (the leak, measured with second-order differences,
    # falls ≈ 4× when the samples double; |dN/ds| itself is κ ≈ 0.4); twist changes at −τ per
    # unit arc length (Bishop 1975), within 1e-6 relative.
    a, c = 2.0, 1.0
    leaks = []
    for n in (2001, 4001):
        t = np.linspace(0, 20, n)
        k = osc.kinematics(t, helix(t, a, c), method="spline", frame="rotation-minimizing")
        dn = np.gradient(k.normal, k.arclength, axis=0)
        leaks.append(np.max(np.abs(np.sum(dn * k.binormal, axis=1)[10:-10])))
    assert leaks[1] < 2e-6 and 3.5 < leaks[0] / leaks[1] < 4.5, leaks
    frame = np.stack([k.tangent, k.normal, k.binormal], axis=1)
    np.testing.assert_allclose(
        frame @ frame.transpose(0, 2, 1), np.broadcast_to(np.eye(3), frame.shape), atol=1e-12
    )
    np.testing.assert_allclose(np.linalg.det(frame), 1.0, atol=1e-12)
    s = k.arclength
    inner = slice(10, -10)
    tau = c / (a * a + c * c)
    slope = np.polyfit(s[inner], np.unwrap(k.twist[inner]), 1)[0]
    np.testing.assert_allclose(slope, -tau, rtol=1e-6)


def test_planar_rotation_minimizing_normal_is_frenet_up_to_sign():
    # A plane S-curve: the rotation-minimizing normal stays in the plane and equals ± the
    # Frenet normal wherever that exists (common practice; exact up to rounding, 1e-9).
    t = np.linspace(-2, 2, 401)
    xy = np.column_stack([t, t**3 - t])
    rm = osc.frames(t, xy, method="spline")
    fr = osc.frames(t, xy, method="spline", frame="frenet")
    ok = np.isfinite(fr.normal[:, 0])
    dots = np.sum(rm.normal[ok] * fr.normal[ok], axis=1)
    np.testing.assert_allclose(np.abs(dots), 1.0, atol=1e-9)
    assert np.all(np.isfinite(rm.normal))
    # Continuous: consecutive normals never flip, even across the inflection at t = 0.
    assert np.min(np.sum(rm.normal[1:] * rm.normal[:-1], axis=1)) > 0.99


def test_frames_stay_finite_and_continuous_through_a_straight_middle():
    s = np.linspace(-3, 3, 121)
    bend = np.where(np.abs(s) > 1, np.sign(s) * (np.abs(s) - 1) ** 3, 0.0)
    x = np.column_stack([s, bend, 0.3 * bend**2])
    k = osc.kinematics(s, x, frame="rotation-minimizing")
    assert k.flagged(Flag.STRAIGHT)[50:70].any()
    assert np.all(np.isfinite(k.normal)) and np.all(np.isfinite(k.binormal))
    assert np.min(np.sum(k.normal[1:] * k.normal[:-1], axis=1)) > 0.99
    # The Frenet normal is NaN on the straight part, so is the twist there.
    assert np.isnan(k.twist[60])


def test_initial_normal_and_errors():
    t = np.linspace(0, 5, 50)
    x = helix(t)
    f = osc.frames(t, x, method="spline", initial=(0, 0, 1))
    # The start is the projection of +z onto the first normal plane (closed form).
    tan0 = f.tangent[0]
    want = np.array([0, 0, 1.0]) - tan0 * tan0[2]
    np.testing.assert_allclose(f.normal[0], want / np.linalg.norm(want), atol=1e-12)
    with pytest.raises(osc.InputError, match="initial: track 0: is zero or parallel"):
        osc.frames(t, x, method="spline", initial=f.tangent[0])
    with pytest.raises(osc.InputError, match="frame: expected"):
        osc.frames(t, x, frame="bishop")
    with pytest.raises(osc.InputError, match="initial: only applies"):
        osc.kinematics(t, x, initial=(0, 0, 1))

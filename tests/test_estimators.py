"""Spline, smoothing-spline and local-polynomial estimators against reference implementations."""

import numpy as np
import osculate as osc
import pytest
from conftest import helix
from scipy.interpolate import BSpline, CubicSpline, make_smoothing_spline
from scipy.signal import savgol_filter
from scipy.spatial.transform import Rotation


@pytest.fixture
def uneven(rng):
    t = np.cumsum(rng.uniform(0.05, 0.3, 60))
    x = np.column_stack([np.sin(t), np.cos(1.7 * t) + 0.1 * t, rng.normal(0, 0.1, 60)])
    return t, x


@pytest.mark.parametrize("bc", ["not-a-knot", "natural", "clamped"])
def test_spline_matches_scipy_cubic_spline(uneven, rng, bc):
    # Reference: scipy.interpolate.CubicSpline with the same end conditions; values and 1st–3rd
    # derivatives at random times inside and at the samples, 1e-10 relative to each scale.
    t, x = uneven
    kw, scipy_bc = {}, bc
    if bc == "clamped":
        v = np.array([[1.0, -0.5, 0.2], [0.3, 0.0, -1.0]])
        kw["bc_velocity"] = v
        scipy_bc = ((1, v[0]), (1, v[1]))
    ref = CubicSpline(t, x, bc_type=scipy_bc)
    path = osc.fit(t, x, method="spline", bc=bc, **kw)
    tq = np.concatenate([t, rng.uniform(t[0], t[-1], 200)])
    for nu in range(4):
        want = ref(tq, nu)
        np.testing.assert_allclose(path(tq, nu), want, rtol=1e-10, atol=1e-10 * np.abs(want).max())
    k = osc.kinematics(t, x, method="spline", bc=bc, **kw)
    np.testing.assert_allclose(k.velocity, ref(t, 1), rtol=1e-10, atol=1e-10)


def test_cubic_smoothing_with_fixed_lambda_matches_scipy(uneven):
    # Reference: scipy.interpolate.make_smoothing_spline(lam) minimizes the same objective
    # Σ (y − f)² + lam ∫ f″²; our dimensionless λ* maps to lam = λ* · w̄ · h̄³ (w̄ = 1 here,
    # h̄ the mean step). Tolerance 1e-8 relative to the data range.
    t, x = uneven
    lam_star = 3.0
    hbar = (t[-1] - t[0]) / (len(t) - 1)
    path = osc.fit(t, x, method="smooth", degree=3, smoothing=lam_star)
    for j in range(3):
        ref = make_smoothing_spline(t, x[:, j], lam=lam_star * hbar**3)
        scale = np.ptp(x[:, j])
        for nu in range(3):
            np.testing.assert_allclose(
                path(t, nu)[:, j], ref(t, nu), atol=1e-8 * scale * max(1, 10**nu)
            )
    np.testing.assert_allclose(path.fit_info["smoothing"], [lam_star])


def test_cubic_gcv_agrees_with_scipy_gcv(rng):
    # scipy's make_smoothing_spline(lam=None) picks lam by GCV on one coordinate. With a second,
    # exactly linear coordinate (in the penalty's null space: no residual, same trace) our shared
    # λ minimizes the same score. derivative=0 turns off the derivative rule. Tolerance: 1e-3 of
    # the data range (GCV minima are flat).
    t = np.sort(rng.uniform(0, 10, 300))
    y = np.sin(t) + rng.normal(0, 0.1, 300)
    ref = make_smoothing_spline(t, y)
    path = osc.fit(t, np.column_stack([2 * t, y]), method="smooth", degree=3, derivative=0)
    np.testing.assert_allclose(path(t)[:, 1], ref(t), atol=1e-3 * np.ptp(y))


def _dense_quintic_reference(t, x, lam):
    """Penalized least squares in the clamped quintic B-spline basis, solved densely."""
    k = 5
    knots = np.concatenate([[t[0]] * k, t, [t[-1]] * k])
    nb = len(t) + k - 1
    design = BSpline.design_matrix(t, knots, k).toarray()
    gx, gw = np.polynomial.legendre.leggauss(4)  # exact for the degree-4 integrand f‴²
    omega = np.zeros((nb, nb))
    for a, b in zip(t[:-1], t[1:]):
        nodes = 0.5 * (a + b) + 0.5 * (b - a) * gx
        d3 = np.column_stack(
            [BSpline(knots, np.eye(nb)[j], k).derivative(3)(nodes) for j in range(nb)]
        )
        omega += d3.T @ (d3 * (0.5 * (b - a) * gw)[:, None])
    coef = np.linalg.solve(design.T @ design + lam * omega, design.T @ x)
    return BSpline(knots, coef, k)


def test_quintic_smoothing_matches_dense_reference(uneven):
    # Reference: dense penalized least squares built here from scipy's BSpline.design_matrix
    # (degree 5, knots at the samples, ∫ f‴² by 4-point Gauss–Legendre). λ = λ* · h̄⁵.
    # Tolerance 1e-6 relative to the data range.
    t, x = uneven
    lam_star = 50.0
    hbar = (t[-1] - t[0]) / (len(t) - 1)
    ref = _dense_quintic_reference(t, x, lam_star * hbar**5)
    path = osc.fit(t, x, method="smooth", smoothing=lam_star)
    for nu in range(4):
        want = ref(t, nu)
        np.testing.assert_allclose(path(t, nu), want, atol=1e-6 * np.abs(want).max())


@pytest.mark.parametrize("degree, window", [(2, 7), (3, 11), (4, 15), (5, 21)])
def test_local_matches_savgol_on_uniform_grid(degree, window):
    # Reference: scipy.signal.savgol_filter (same window, polyorder, deriv, delta) on the
    # interior samples; tolerance 1e-10 relative to each derivative's scale.
    h = 0.05
    t = np.arange(200) * h
    x = np.column_stack([np.sin(t) + 0.01 * np.cos(37 * t), t**2 / 10])
    path = osc.fit(t, x, method="local", degree=degree, window=window)
    inner = slice(window // 2, -(window // 2))
    for nu in range(min(degree, 3) + 1):
        want = savgol_filter(x, window, degree, deriv=nu, delta=h, axis=0)
        got = path(t, nu)
        np.testing.assert_allclose(got[inner], want[inner], atol=1e-10 * np.abs(want).max())


def _noisy_helix(seed):
    rng = np.random.default_rng(seed)
    t = np.sort(rng.uniform(0, 4 * np.pi, 2000))
    return t, helix(t, 10.0, 2.0) + rng.normal(0, 0.05, (2000, 3))


def _rms(v, ref):
    inner = slice(200, 1800)  # drop 10 % at each end
    return float(np.sqrt(np.nanmean((v[inner] - ref) ** 2)) / ref)


def test_noisy_helix_everything_automatic(capsys):
    # a = 10, c = 2, t ∈ [0, 4π], 2000 sorted uniform-random times, σ = 0.05 per coordinate:
    # κ = a/(a²+c²), τ = c/(a²+c²) (closed form). Targets: smooth κ ≤ 1.5 %, τ ≤ 15 %;
    # local κ ≤ 3 %, τ ≤ 25 % relative RMS on the interior.
    t, x = _noisy_helix(20261202)
    kap, tau = 10 / 104, 2 / 104
    sm = osc.kinematics(t, x, method="smooth")
    lo = osc.kinematics(t, x, method="local")
    with pytest.warns(osc.SuspectDataWarning, match="finite differences"):
        # The absolute thresholds of old, so that fd shows its raw estimates instead of flags.
        fd = osc.kinematics(t, x, min_speed=1e-3, min_curvature=1e-6)
    ref = [make_smoothing_spline(t, x[:, j]) for j in range(3)]
    d1, d2, d3 = (np.column_stack([s.derivative(nu)(t) for s in ref]) for nu in (1, 2, 3))
    c = np.cross(d1, d2)
    sp_kap = np.linalg.norm(c, axis=1) / np.linalg.norm(d1, axis=1) ** 3
    sp_tau = np.sum(c * d3, axis=1) / np.sum(c * c, axis=1)
    with capsys.disabled():
        print("\nnoisy helix, relative RMS error of curvature / torsion:")
        for name, k_err, t_err in [
            ("smooth", _rms(sm.curvature, kap), _rms(sm.torsion, tau)),
            ("local", _rms(lo.curvature, kap), _rms(lo.torsion, tau)),
            ("fd", _rms(fd.curvature, kap), _rms(fd.torsion, tau)),
            ("scipy cubic GCV per coordinate", _rms(sp_kap, kap), _rms(sp_tau, tau)),
        ]:
            print(f"  {name:32s} {k_err:10.4f} {t_err:12.4f}")
    assert _rms(sm.curvature, kap) <= 0.015
    assert _rms(sm.torsion, tau) <= 0.15
    assert _rms(lo.curvature, kap) <= 0.03
    assert _rms(lo.torsion, tau) <= 0.25


@pytest.mark.parametrize(
    "method, kw",
    [
        ("smooth", {"smoothing": 1e6}),
        ("smooth", {"degree": 3, "smoothing": 300.0}),
        ("local", {}),
        ("local", {"window_span": 0.5}),
    ],
)
def test_rotation_invariance(method, kw):
    # One λ (or window) shared by all coordinates makes every scalar invariant under rotations
    # and vectors covariant (any differential geometry text). Tolerance 1e-9 of each quantity's
    # scale; torsion 1e-6, since r‴ amplifies the rounding of the rotated input (~1e-15 of |x|)
    # by about 1/h_eff³ ≈ 1e7 at these bandwidths.
    t, x = _noisy_helix(7)
    t, x = t[:400], x[:400]
    rot = Rotation.from_euler("xyz", [0.3, -1.1, 2.0]).as_matrix()
    a = osc.kinematics(t, x, method=method, **kw)
    b = osc.kinematics(t, x @ rot.T, method=method, **kw)
    for name, tol in [
        ("curvature", 1e-9),
        ("speed", 1e-9),
        ("accel_normal", 1e-9),
        ("torsion", 1e-6),
    ]:
        want = getattr(a, name)
        np.testing.assert_allclose(getattr(b, name), want, atol=tol * np.nanmax(np.abs(want)))
    np.testing.assert_allclose(b.tangent, a.tangent @ rot.T, atol=1e-9)


@pytest.mark.parametrize("degree", [3, 5])
def test_automatic_smoothing_is_rotation_invariant_and_unit_free(degree):
    # The GCV score is rotation invariant, so the chosen λ* agrees up to the search resolution
    # under rounding (0.01 decade, i.e. 2.3 %); results then agree to 1e-4 of their scale.
    # Reported λ* is dimensionless: the same data in km and minutes give the same λ* (1e-6).
    t, x = _noisy_helix(7)
    t, x = t[:400], x[:400]
    rot = Rotation.from_euler("xyz", [0.3, -1.1, 2.0]).as_matrix()
    a = osc.kinematics(t, x, method="smooth", degree=degree)
    b = osc.kinematics(t, x @ rot.T, method="smooth", degree=degree)
    np.testing.assert_allclose(b.fit_info["smoothing"], a.fit_info["smoothing"], rtol=0.024)
    for name in ("curvature", "torsion"):
        want = getattr(a, name)
        np.testing.assert_allclose(getattr(b, name), want, atol=1e-4 * np.nanmax(np.abs(want)))
    c = osc.kinematics(t / 60.0, x / 1000.0, method="smooth", degree=degree)
    np.testing.assert_allclose(c.fit_info["smoothing"], a.fit_info["smoothing"], rtol=1e-6)


def test_spline_position_convergence_order():
    # Interpolating cubic splines converge as O(h⁴) in position (de Boor, ch. V); measured
    # log-log slope between 3.7 and 4.3.
    f = np.sin
    errs, hs = [], []
    for n in (20, 40, 80, 160):
        t = np.linspace(0, 3, n) ** 1.2
        path = osc.fit(t, np.column_stack([f(t), t]), method="spline")
        tq = np.linspace(t[0], t[-1], 5000)
        errs.append(np.max(np.abs(path(tq)[:, 0] - f(tq))))
        hs.append(np.max(np.diff(t)))
    slope = np.polyfit(np.log(hs), np.log(errs), 1)[0]
    assert 3.7 < slope < 4.3, slope


def test_path_object_kinematics_and_arclength_anywhere():
    # Helix (a = 2, c = 0.5): arc length √(a²+c²)·t and κ, τ closed forms, between samples too.
    # Cubic spline errors (de Boor, ch. V) with h = 0.03: position O(h⁴) → 1e-7, r″ and κ
    # O(h²) → 2e-4, r‴ and τ O(h) → 3e-2; arc length integrates |r′| (O(h³) per unit) → 1e-6.
    t = np.linspace(0, 12, 400)
    path = osc.fit(t, helix(t), method="spline")
    tq = np.linspace(1, 11, 37)
    k = path.kinematics(tq)
    np.testing.assert_allclose(k.curvature, 2 / 4.25, rtol=2e-4)
    np.testing.assert_allclose(k.torsion, 0.5 / 4.25, rtol=3e-2)
    np.testing.assert_allclose(path.arclength(tq), np.sqrt(4.25) * tq, rtol=1e-6)
    np.testing.assert_allclose(k.position, helix(tq), atol=1e-7)


def test_fit_many_tracks_and_query_by_track():
    t = np.linspace(0, 6, 50)
    ids = np.repeat(["slow", "fast"], 50)
    x = np.concatenate([helix(t, 1.0, 0.0)[:, :2], helix(t, 3.0, 0.0)[:, :2]])
    path = osc.fit(np.tile(t, 2), x, method="smooth", tracks=ids, smoothing=1e-3)
    assert list(path.tracks) == ["fast", "slow"]
    k = path.kinematics([2.0, 2.0], track=["slow", "fast"])
    # Circles of radius 1 and 3 (closed form); tolerance 1e-3 for the light smoothing.
    np.testing.assert_allclose(k.curvature, [1.0, 1 / 3], rtol=1e-3)
    with pytest.raises(osc.InputError, match="track: row 0: unknown track 'medium'"):
        path(1.0, track="medium")
    with pytest.raises(osc.InputError, match="say which one"):
        path(1.0)


@pytest.mark.parametrize(
    "kw, msg",
    [
        ({"method": "smooth", "smoothing": -1.0}, r"smoothing: must be finite and >= 0"),
        ({"method": "smooth", "noise": 0.0}, r"noise: must be finite and > 0"),
        ({"method": "smooth", "smoothing": 1.0, "noise": 1.0}, r"not both"),
        ({"method": "smooth", "degree": 4}, r"degree: must be 3 or 5"),
        ({"method": "smooth", "weights": np.zeros(30)}, r"weights: track 0, row 0: .* > 0"),
        ({"method": "smooth", "weights": np.ones(29)}, r"weights: expected shape \(30,\)"),
        ({"method": "local", "window": 3}, r"window: track 0: 3 samples: must be at least"),
        ({"method": "local", "window": 31}, r"at most the track length 30"),
        ({"method": "local", "window_span": -2.0}, r"window: track 0: a time span must be"),
        ({"method": "local", "degree": 2}, r"degree: torsion and jerk need"),
        ({"method": "spline", "bc": "periodic"}, r"bc: expected one of"),
        ({"method": "spline", "bc": "clamped"}, r"bc_velocity: give it exactly"),
        ({"method": "fd", "degree": 3}, r"degree: does not apply to method='fd'"),
        ({"method": "smooth", "order": 4}, r"order: does not apply"),
    ],
)
def test_estimator_bad_options(kw, msg):
    t = np.linspace(0, 3, 30)
    with pytest.raises(osc.InputError, match=msg):
        osc.kinematics(t, helix(t), **kw)


@pytest.mark.parametrize(
    "kw, argument, msg",
    [
        (
            {"method": "spline", "bc": "clamped", "bc_velocity": np.ones((2, 2))},
            "bc_velocity",
            r"velocities of shape \(2, 3\), got \(2, 2\)",
        ),
        (
            {"method": "spline", "bc": "clamped", "bc_velocity": [1.0, 2.0]},
            "bc_velocity",
            r"got \(2,\)",
        ),
        ({"method": "local", "window": 0}, "window", r"must be a positive number of samples"),
        ({"method": "local", "degree": 6}, "degree", r"must be 1 to 5 for method='local'"),
        ({"method": "smooth", "derivative": 4}, "derivative", r"must be 0, 1, 2 or 3, got 4"),
        ({"method": "fd", "weights": np.ones(30)}, "weights", r"does not apply to method='fd'"),
        ({"method": "linear", "bc": "natural"}, "bc", r"does not apply .* \(it takes \[\]\)"),
        ({"method": "smooth", "order": 2**70}, "order", r"\d+ is too large"),
    ],
)
def test_estimator_options_are_checked_by_the_kernel(kw, argument, msg):
    # One rule set (src/fit_options.rs) for every public function, each error naming its option.
    t = np.linspace(0, 3, 30)
    call = osc.kinematics if kw["method"] == "fd" else osc.fit
    with pytest.raises(osc.InputError, match=f"^{argument}: .*{msg}") as e:
        call(t, helix(t), **kw)
    assert e.value.argument == argument


@pytest.mark.parametrize(
    "kw, msg",
    [
        ({"method": "smooth", "degree": True}, r"^degree: expected an integer, got True"),
        ({"method": "smooth", "degree": np.True_}, r"^degree: expected an integer"),
        ({"method": "local", "window": "7"}, r"^window: expected an integer, got '7'"),
        ({"method": "smooth", "derivative": 1.0}, r"^derivative: expected an integer"),
        ({"method": "smooth", "noise": False}, r"^noise: expected a real number, got False"),
        ({"method": "smooth", "smoothing": 1j}, r"^smoothing: expected a real number"),
        ({"method": "spline", "bc": 3}, r"^bc: expected a string, got 3"),
        ({"method": 3}, r"^method: expected a string"),
        ({"method": "spline", "knots": 5}, r"^unexpected estimator option 'knots'"),
    ],
)
def test_estimator_option_types_are_checked_by_the_binding(kw, msg):
    # A bool or a str is not an integer, a bool or a complex number not a real one.
    t = np.linspace(0, 3, 30)
    with pytest.raises(TypeError, match=msg):
        osc.fit(t, helix(t), **kw)


def test_fit_refuses_fd_and_defaults_come_from_the_kernel():
    t = np.linspace(0, 3, 30)
    with pytest.raises(osc.InputError, match=r"method: expected one of \('spline', 'smooth', "):
        osc.fit(t, helix(t), method="fd")
    # The defaults (src/fit_options.rs): order 2, quintic smoothing, local degree 4.
    assert osc.kinematics(t, helix(t)).estimator == "fd (order 2)"
    assert osc.fit(t, helix(t), method="smooth").fit_info["edf"].shape == (1,)
    assert repr(osc.fit(t, helix(t), method="smooth")).endswith("smooth (degree 5)>")
    assert repr(osc.fit(t, helix(t), method="local")).endswith("local (degree 4)>")

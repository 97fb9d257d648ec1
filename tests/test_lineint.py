"""Work, line integrals, circulation and power (osculate.lineint).

Every numerical check states where its expected value comes from and its tolerance.
"""

import numpy as np
import osculate as osc
import pytest
from scipy.integrate import solve_ivp
from scipy.interpolate import CubicSpline

G0 = 9.80665  # standard gravity, m/s² (SI brochure / CGPM 1901)


def random_paths(rng, m=4, n=(50, 400)):
    """Rows of m random 3-D walks with their track ids, the tracks interleaved (each track's rows
    keep their order); also the walks themselves."""
    lengths = rng.integers(n[0], n[1], m)
    xs = [
        np.cumsum(rng.normal(size=(k, 3)), axis=0) + rng.normal(scale=20, size=3) for k in lengths
    ]
    ids = np.concatenate([np.full(k, f"trk{j}") for j, k in enumerate(lengths)])
    stamps = np.concatenate([np.sort(rng.random(k)) for k in lengths])
    perm = np.argsort(stamps, kind="stable")
    return np.concatenate(xs)[perm], ids[perm], xs


def grid_around(x, force, k):
    """The field ``force`` sampled on a k-node-per-axis grid covering the path with a margin."""
    lo, hi = x.min(axis=0) - 1.0, x.max(axis=0) + 1.0
    axes = [np.linspace(a, b, k) for a, b in zip(lo, hi)]
    nodes = np.stack(np.meshgrid(*axes, indexing="ij"), axis=-1)
    d = x.shape[1]
    vals = force(nodes.reshape(-1, d)).reshape(*nodes.shape[:-1], d)
    return osc.GridField(vals, origin=lo, spacing=(hi - lo) / (k - 1))


def constant_grid(vec, lo=-200.0, hi=200.0):
    vals = np.broadcast_to(np.asarray(vec, dtype=float), (2, 2, 2, 3))
    return osc.GridField(vals, origin=(lo, lo, lo), spacing=hi - lo)


def circle(n, r=1.5, z=0.3):
    a = np.linspace(0.0, 2 * np.pi, n, endpoint=False)
    return np.column_stack([r * np.cos(a), r * np.sin(a), np.full(n, z)])


def rotation(p):
    """F = (−y, x, 0), curl F = (0, 0, 2)."""
    return np.column_stack([-p[:, 1], p[:, 0], np.zeros(len(p))])


# ------------------------------------------------------------------------- conservative forces

FORMS = ["trapezoid", "cubic", "cubic-with-t", "grid", "callable"]


def work_of(form, x, force_vec_or_fn, **kw):
    """Work of a force given as samples, a grid or a callable, in the named form."""
    if form in ("trapezoid", "cubic", "cubic-with-t"):
        f = (
            force_vec_or_fn(x)
            if callable(force_vec_or_fn)
            else np.broadcast_to(force_vec_or_fn, x.shape)
        )
        rule = "trapezoid" if form == "trapezoid" else "cubic"
        if form == "cubic-with-t":
            kw["t"] = kw.pop("t_for_cubic")
        else:
            kw.pop("t_for_cubic", None)
        return osc.work(x, f, rule=rule, **kw)
    kw.pop("t_for_cubic", None)
    if form == "grid":
        field = force_vec_or_fn if isinstance(force_vec_or_fn, osc.GridField) else None
        if field is None:
            field = constant_grid(force_vec_or_fn)
        return osc.work(x, field, **kw)
    fn = (
        force_vec_or_fn
        if callable(force_vec_or_fn)
        else (lambda p: np.broadcast_to(force_vec_or_fn, p.shape).copy())
    )
    return osc.work(x, fn, **kw)


@pytest.mark.parametrize("form", FORMS)
def test_gravity_work_is_minus_m_g_dz_on_random_paths(rng, form):
    # Path independence of a conservative force: W = −m g (z_end − z_start) exactly, for each
    # of 4 interleaved tracks; 1e-12 relative (rounding only).
    x, ids, xs = random_paths(rng)
    m = 1.7
    t = np.arange(len(x), dtype=float)  # increasing within every track too
    w = work_of(form, x, [0.0, 0.0, -m * G0], tracks=ids, t_for_cubic=t)
    expected = np.array([-m * G0 * (xk[-1, 2] - xk[0, 2]) for xk in xs])
    assert w.tracks.tolist() == [f"trk{j}" for j in range(len(xs))]
    np.testing.assert_allclose(w.total, expected, rtol=1e-12)


@pytest.mark.parametrize("form", FORMS)
def test_gradient_of_quadratic_potential_circulates_to_zero(form):
    # φ = x² − 3xy + 2yz + z² / 2 + x − 4z: ∇φ is linear, which trilinear interpolation
    # reproduces exactly and every rule integrates exactly along its path model, so the
    # circulation around a closed loop is 0 (gradient theorem). Tolerance: 1e-12 of the sum of
    # |φ| changes along the loop (the rounding scale).
    s = np.linspace(0.0, 2 * np.pi, 500, endpoint=False)
    loop = np.column_stack(
        [np.sin(s) + 2 * np.sin(2 * s), np.cos(s) - 2 * np.cos(2 * s), -np.sin(3 * s)]
    )

    def phi(p):
        x, y, z = p.T
        return x**2 - 3 * x * y + 2 * y * z + z**2 / 2 + x - 4 * z

    def grad(p):
        x, y, z = p.T
        return np.column_stack([2 * x - 3 * y + 1, -3 * x + 2 * z, 2 * y + z - 4])

    ax = np.linspace(-4.0, 4.0, 9)
    nodes = np.stack(np.meshgrid(ax, ax, ax, indexing="ij"), axis=-1).reshape(-1, 3)
    field = osc.GridField(grad(nodes).reshape(9, 9, 9, 3), origin=(-4, -4, -4), spacing=1.0)
    force = field if form == "grid" else grad
    w = work_of(form, loop, force, closed=True, t_for_cubic=None)
    scale = np.abs(np.diff(phi(np.vstack([loop, loop[:1]])))).sum()
    assert abs(w.total[0]) <= 1e-12 * scale


def test_gradient_of_cubic_potential_converges_with_grid_refinement():
    # φ of degree 3: ∇φ is quadratic and trilinear interpolation errs by at most
    # Σ_a (Δ²/8) max|∂²F_i/∂x_a²| per component (linear-interpolation error bound), so the
    # circulation around the loop (exactly 0 for the true field, gradient theorem) is bounded by
    # length × that error and must go to 0 at least like Δ²: checked at every level, and the
    # least-squares slope of log|∮| against log Δ over 5 levels must be ≥ 2 (measured 2.15).
    s = np.linspace(0.0, 2 * np.pi, 4000, endpoint=False)
    loop = 0.5 * np.column_stack(
        [np.sin(s) + 2 * np.sin(2 * s), np.cos(s) - 2 * np.cos(2 * s), -np.sin(3 * s)]
    )

    def grad(p):  # φ = x³ − 2xy² + yz² + z³/2 + xyz
        x, y, z = p[..., 0], p[..., 1], p[..., 2]
        return np.stack(
            [
                3 * x**2 - 2 * y**2 + y * z,
                -4 * x * y + z**2 + x * z,
                2 * y * z + 1.5 * z**2 + x * y,
            ],
            axis=-1,
        )

    # |∂²F_i/∂x_a²| summed over a, per component i: F_x: 6 + 4, F_y: 2, F_z: 3.
    second = np.array([10.0, 2.0, 3.0])
    length = np.linalg.norm(np.diff(np.vstack([loop, loop[:1]]), axis=0), axis=1).sum()
    spacings, errors = [], []
    for k in (8, 16, 32, 64, 128):
        ax = np.linspace(-2.0, 2.0, k + 1)
        delta = 4.0 / k
        vals = grad(np.stack(np.meshgrid(ax, ax, ax, indexing="ij"), axis=-1))
        field = osc.GridField(vals, origin=(-2, -2, -2), spacing=delta)
        circ = abs(osc.work(loop, field, closed=True).total[0])
        bound = length * np.linalg.norm(delta**2 / 8 * second)
        assert circ <= bound, (k, circ, bound)
        spacings.append(delta)
        errors.append(circ)
    slope = np.polyfit(np.log(spacings), np.log(errors), 1)[0]
    assert slope >= 2.0, slope


# ------------------------------------------------------------------------- Stokes' theorem


def test_circulation_around_circle_converges_at_each_rules_order():
    # ∮ (−y, x, 0)·dr = 2π r² (Stokes' theorem: curl F = 2 over the disc). On the inscribed
    # n-gon through the samples (trapezoid rule, gridded and callable fields on straight
    # segments) the circulation is n r² sin(2π/n) exactly (twice the polygon's area), to 1e-12;
    # its error falls as h²; the cubic rule's as h⁴. Measured slopes of log error against log n
    # from n = 16 to 256: −2.00 and −4.0; asserted within 0.05 and 0.2.
    r = 1.5
    exact = 2 * np.pi * r**2
    ns = np.array([16, 32, 64, 128, 256])
    ax = np.array([-2.0, 2.0])
    vals = np.stack(np.meshgrid(ax, ax, ax, indexing="ij"), axis=-1)
    field = osc.GridField(rotation(vals.reshape(-1, 3)).reshape(2, 2, 2, 3), (-2, -2, -2), 4.0)
    err_trap, err_cubic = [], []
    for n in ns:
        x = circle(n, r)
        polygon = n * r**2 * np.sin(2 * np.pi / n)
        trap = osc.work(x, rotation(x), closed=True)
        cubic = osc.work(x, rotation(x), closed=True, rule="cubic")
        for w in (trap, osc.work(x, field, closed=True), osc.work(x, rotation, closed=True)):
            assert w.total[0] == pytest.approx(polygon, rel=1e-12)
        err_trap.append(abs(trap.total[0] - exact))
        err_cubic.append(abs(cubic.total[0] - exact))
        # The estimate of the trapezoid result is realistic: within 5 % of its true error (the
        # cubic companion's own error is 2.8 % of the trapezoid's at n = 16, less after).
        assert trap.error[0] == pytest.approx(err_trap[-1], rel=0.05)
    slope_trap = np.polyfit(np.log(ns), np.log(err_trap), 1)[0]
    slope_cubic = np.polyfit(np.log(ns), np.log(err_cubic), 1)[0]
    assert slope_trap == pytest.approx(-2.0, abs=0.05)
    assert slope_cubic == pytest.approx(-4.0, abs=0.2)


# ------------------------------------------------------------------------- work–energy theorem


def projectile(n, seed=3):
    """A ball with gravity and quadratic drag, integrated tightly and logged at jittered times."""
    m, k = 2.0, 0.05  # kg, N s²/m²: F_drag = −k |v| v

    def rhs(_t, u):
        v = u[3:]
        return np.concatenate([v, -k / m * np.linalg.norm(v) * v - [0.0, 0.0, G0]])

    span = 4.0
    sol = solve_ivp(
        rhs,
        (0.0, span),
        [0, 0, 1.0, 30, 5, 25],
        method="DOP853",
        rtol=1e-13,
        atol=1e-12,
        dense_output=True,
    )
    rng = np.random.default_rng(seed)
    t = np.linspace(0.0, span, n)
    t[1:-1] += rng.uniform(-0.25, 0.25, n - 2) * span / (n - 1)  # a logger's jitter
    u = sol.sol(t).T
    x, v = u[:, :3], u[:, 3:]
    gravity = np.broadcast_to([0.0, 0.0, -m * G0], x.shape)
    drag = -k * np.linalg.norm(v, axis=1)[:, None] * v
    dke = 0.5 * m * (v[-1] @ v[-1] - v[0] @ v[0])
    return t, x, gravity, drag, dke, m


def test_work_energy_theorem_for_projectile_with_drag():
    # W_gravity + W_drag = ΔKE (work–energy theorem), with the trajectory and the kinetic energy
    # from scipy.integrate.solve_ivp (DOP853, rtol 1e-13): ≤ 1e-6 relative with the cubic rule
    # (measured 1.0e-7 with times, 1.0e-8 with the chord-length parameter, 201 samples).
    t, x, gravity, drag, dke, m = projectile(201)
    for kw in ({"t": t}, {}):
        w = osc.work(x, gravity + drag, rule="cubic", **kw)
        assert w.total[0] == pytest.approx(dke, rel=1e-6)
    # Gravity alone: −m g Δz (exact, 1e-12); the forces add.
    wg = osc.work(x, gravity, rule="cubic", t=t).total[0]
    wd = osc.work(x, drag, rule="cubic", t=t).total[0]
    assert wg == pytest.approx(-m * G0 * (x[-1, 2] - x[0, 2]), rel=1e-12)
    assert wg + wd == pytest.approx(dke, rel=1e-6)
    # The trapezoid rule is second order: 9e-5 relative here, and its error estimate (the
    # difference from the cubic rule) is within 5 % of its true error (measured 0.1 %).
    trap = osc.work(x, gravity + drag, t=t)
    true_err = abs(trap.total[0] - dke)
    assert 1e-5 < true_err / abs(dke) < 1e-3
    assert trap.error[0] == pytest.approx(true_err, rel=0.05)


def test_integrated_power_equals_work():
    # ∫ P dt with P = F·v (velocity from the spline estimator) integrated by
    # scipy.interpolate.CubicSpline(t, P).integrate, and ∫ F·dr by the cubic rule, both equal
    # ΔKE from solve_ivp (work–energy theorem) to 1e-6 relative (measured 1.5e-7 and 1.0e-7),
    # hence each other to 2e-6.
    t, x, gravity, drag, dke, _ = projectile(201)
    p = osc.power(t, x, gravity + drag, method="spline")
    integral = CubicSpline(t, p).integrate(t[0], t[-1])
    w = osc.work(x, gravity + drag, t=t, rule="cubic").total[0]
    assert integral == pytest.approx(dke, rel=1e-6)
    assert integral == pytest.approx(w, rel=2e-6)


def test_power_forms_agree_and_skip_nan_rows():
    # The same force as samples, as a (linear, so exactly interpolated) grid and as a callable
    # gives the same F·v (1e-12); P of uniform circular motion under F = (−y, x, 0) is
    # F·v = r²ω (closed form), to the fd estimator's O(h²) error: 1e-4 relative at 400 samples.
    r, om = 1.5, 0.8
    t = np.linspace(0.0, 6.0, 401)
    x = np.column_stack([r * np.cos(om * t), r * np.sin(om * t), np.full_like(t, 0.3)])
    ax = np.array([-2.0, 2.0])
    vals = rotation(np.stack(np.meshgrid(ax, ax, ax, indexing="ij"), -1).reshape(-1, 3))
    field = osc.GridField(vals.reshape(2, 2, 2, 3), (-2, -2, -2), 4.0)
    p_sampled = osc.power(t, x, rotation(x), order=4)
    np.testing.assert_allclose(p_sampled, r**2 * om, rtol=1e-4)
    np.testing.assert_allclose(osc.power(t, x, field, order=4), p_sampled, rtol=1e-12)
    np.testing.assert_allclose(osc.power(t, x, rotation, order=4), p_sampled, rtol=1e-12)
    x2 = x.copy()
    x2[100] = np.nan
    for force in (field, rotation):
        p = osc.power(t, x2, force)
        assert np.isnan(p[100]) and np.isfinite(np.delete(p, 100)).all()


# ------------------------------------------------------------------------- invariants


@pytest.mark.parametrize("form", FORMS)
def test_reversing_the_path_negates_the_work(rng, form):
    # Reversal of the direction of travel negates ∫ F·dr (orientation of a line integral):
    # 1e-12 relative, for a position-dependent force.
    x = np.cumsum(rng.normal(size=(300, 3)), axis=0)

    def force(p):
        return np.column_stack([np.sin(p[:, 1]), 0.1 * p[:, 2] * p[:, 0], 1 + 0.3 * p[:, 0]])

    f = grid_around(x, force, 40) if form == "grid" else force
    t = np.linspace(0.0, 10.0, len(x))
    forward = work_of(form, x, f, t_for_cubic=t).total[0]
    backward = work_of(form, x[::-1], f, t_for_cubic=t).total[0]
    assert backward == pytest.approx(-forward, rel=1e-12)


@pytest.mark.parametrize("form", ["trapezoid", "grid", "callable", "cubic"])
def test_splitting_a_path_adds_up(rng, form):
    # Additivity over a split at any sample (the sample belongs to both pieces): each piece is a
    # track of one call. Segment-local rules add up to rounding (1e-12 relative); the cubic
    # rule's stencils turn one-sided at the split, so its pieces add up to within its own
    # error estimates (a difference of O(h⁵) per segment against O(h³) estimates).
    x = np.cumsum(rng.normal(size=(200, 3)), axis=0) * 0.2

    def force(p):
        return np.column_stack([np.cos(p[:, 1]), p[:, 2] * 0.5, 1 + 0.2 * p[:, 0] ** 2])

    f = grid_around(x, force, 30) if form == "grid" else force
    whole = work_of(form, x, f, t_for_cubic=None, cumulative=True)
    for k in (1, 57, 120, 198):
        pieces = np.vstack([x[: k + 1], x[k:]])
        split = work_of(form, pieces, f, t_for_cubic=None, offsets=[0, k + 1, len(x) + 1])
        if form == "cubic":
            slack = whole.error[0] + split.error.sum()
            assert abs(split.total.sum() - whole.total[0]) <= slack
        else:
            assert split.total.sum() == pytest.approx(whole.total[0], rel=1e-12)
            # The cumulative work at the split is the first piece's work.
            assert whole.cumulative[k] == pytest.approx(split.total[0], rel=1e-12, abs=1e-12)


def test_integral_of_one_is_the_arc_length():
    # ∫ 1 ds: by the trapezoid rule (and on straight segments) it is the polyline length of
    # osc.arclength, per row with cumulative=True (1e-12); by the cubic rule on a helix it
    # approaches the closed form √(a² + c²)·T at fourth order: relative errors measured 3.5e-6,
    # 2.2e-7, 1.4e-8 at 100, 200, 400 samples; asserted ≤ 3e-7 at 200 and an observed order
    # within 0.1 of 4.
    a, c = 2.0, 0.5

    def helix(n):
        t = np.linspace(0.0, 4 * np.pi, n)
        return t, np.column_stack([a * np.cos(t), a * np.sin(t), c * t])

    t, x = helix(200)
    ones = np.ones(len(t))
    s = osc.arclength(t, x)
    for f in (ones, lambda p: np.ones(len(p))):
        r = osc.line_integral(x, f, cumulative=True)
        np.testing.assert_allclose(r.cumulative, s, rtol=1e-12)
        assert r.total[0] == pytest.approx(s[-1], rel=1e-12)
    exact = np.hypot(a, c) * 4 * np.pi
    errors = []
    for n in (100, 200, 400):
        t, x = helix(n)
        errors.append(abs(osc.line_integral(x, np.ones(n), rule="cubic", t=t).total[0] / exact - 1))
    assert errors[1] <= 3e-7
    orders = np.log2(np.array(errors[:-1]) / errors[1:])
    np.testing.assert_allclose(orders, 4.0, atol=0.1)


@pytest.mark.parametrize("form", ["trapezoid", "cubic", "grid", "callable"])
def test_nan_rows_are_skipped_like_removed_rows(rng, form):
    # A non-finite row is left out: the result equals that of the path without the row
    # (1e-13), its cumulative value is NaN, and `skipped` counts it.
    x = np.cumsum(rng.normal(size=(60, 2)), axis=0)

    def force(p):
        return np.column_stack([p[:, 1], 1.0 + 0.0 * p[:, 0]])

    f = grid_around(x, force, 40) if form == "grid" else force
    holes = x.copy()
    holes[[0, 17, 18, 40]] = np.nan
    kept = np.delete(x, [0, 17, 18, 40], axis=0)
    a = work_of(form, holes, f, t_for_cubic=None, cumulative=True)
    b = work_of(form, kept, f, t_for_cubic=None, cumulative=True)
    assert a.total[0] == pytest.approx(b.total[0], rel=1e-13)
    assert a.skipped.tolist() == [4]
    assert np.isnan(a.cumulative[[0, 17, 18, 40]]).all()
    np.testing.assert_allclose(np.delete(a.cumulative, [0, 17, 18, 40]), b.cumulative, rtol=1e-13)


def test_tracks_by_id_equal_separate_calls(rng):
    # Interleaved ids give each track's own result (1e-13), on the caller's rows.
    x, ids, _ = random_paths(rng, m=3)
    force = np.column_stack([np.sin(x[:, 0]), x[:, 2] * 0.01, np.ones(len(x))])
    w = osc.work(x, force, tracks=ids, rule="cubic", cumulative=True)
    for j in range(3):
        rows = ids == f"trk{j}"
        one = osc.work(x[rows], force[rows], rule="cubic", cumulative=True)
        assert w.total[j] == pytest.approx(one.total[0], rel=1e-13)
        np.testing.assert_allclose(w.cumulative[rows], one.cumulative, rtol=1e-13, atol=1e-12)
    table = w.summary_arrays()
    assert table["track"].tolist() == ["trk0", "trk1", "trk2"]
    assert w.summary().loc["trk1", "total"] == w.total[1]


def test_callable_is_called_once_with_every_node():
    # One call for all segments of all tracks: nodes × segments rows (2 nodes and the
    # 1-node companion: 3 per segment), and node times inside each segment with time_varying.
    calls = []

    def force(p, tq=None):
        calls.append((p.shape, None if tq is None else tq.copy()))
        return np.zeros_like(p)

    x = np.arange(30.0).reshape(10, 3)
    t = np.arange(10.0) ** 2
    osc.work(x, force, offsets=[0, 4, 10])
    assert calls == [((3 * (3 + 5), 3), None)]
    calls.clear()
    osc.work(x, force, t=t, offsets=[0, 4, 10], time_varying=True, nodes=3)
    (shape, tq) = calls[0]
    assert len(calls) == 1 and shape == (5 * 8, 3)
    per = tq.reshape(8, 5)
    starts = np.array([0, 1, 4, 16, 25, 36, 49, 64.0])
    ends = np.array([1, 4, 9, 25, 36, 49, 64, 81.0])
    assert ((per > starts[:, None]) & (per < ends[:, None])).all()
    # estimate_error=False: only the main rule's nodes, error NaN, same total.
    calls.clear()
    w = osc.work(x, lambda p: np.ones_like(p), nodes=2, estimate_error=False)
    assert np.isnan(w.error).all() and w.total[0] == pytest.approx(3 * 27.0, rel=1e-14)


def test_outside_modes_of_a_grid():
    # "clamp" uses the boundary value (a constant field beyond the box: work = F·Δr exactly);
    # "nan" gives NaN for the track that leaves, leaving the others finite.
    vals = np.broadcast_to([1.0, 2.0], (3, 3, 2))
    x = np.array([[0.5, 0.5], [1.5, 1.5], [0.2, 0.1], [5.0, 9.0]])
    clamp = osc.work(x, osc.GridField(vals, (0, 0), 1.0, outside="clamp"), offsets=[0, 2, 4])
    np.testing.assert_allclose(clamp.total, [1.0 + 2.0, 4.8 + 2 * 8.9], rtol=1e-14)
    nan = osc.work(x, osc.GridField(vals, (0, 0), 1.0, outside="nan"), offsets=[0, 2, 4])
    assert nan.total[0] == pytest.approx(3.0, rel=1e-14) and np.isnan(nan.total[1])


# ------------------------------------------------------------------------- bad input

X5 = np.column_stack([np.arange(5.0), np.arange(5.0) ** 2, np.zeros(5)])
F5 = np.ones((5, 3))
GRID3 = osc.GridField(np.zeros((3, 3, 3, 3)), (0, 0, 0), 10.0)


def _nan_at_third_node(p):
    out = np.zeros_like(p)
    out[2] = np.nan
    return out


BAD = [
    # (description, callable, exception, message regex)
    (
        "force rows",
        lambda: osc.work(X5, F5[:4]),
        osc.InputError,
        r"force: has 4 rows but positions has 5",
    ),
    (
        "force width",
        lambda: osc.work(X5, F5[:, :2]),
        osc.InputError,
        r"force: expected shape \(5, 3\)",
    ),
    (
        "scalar f width",
        lambda: osc.line_integral(X5, F5),
        osc.InputError,
        r"f: expected shape \(5,\)",
    ),
    (
        "1-column positions",
        lambda: osc.work(X5[:, :1], F5[:, :1]),
        osc.InputError,
        r"positions: expected shape",
    ),
    (
        "empty positions",
        lambda: osc.work(np.zeros((0, 3)), np.zeros((0, 3))),
        osc.InputError,
        r"positions: is empty",
    ),
    (
        "t length",
        lambda: osc.work(X5, F5, t=np.arange(4.0)),
        osc.InputError,
        r"t: has 4 values but positions has 5",
    ),
    (
        "t decreasing",
        lambda: osc.work(X5, F5, t=[0, 1, 0.5, 2, 3]),
        osc.InputError,
        r"t: track 0, row 2: times must be strictly increasing",
    ),
    (
        "grid axes vs path",
        lambda: osc.work(X5[:, :2], GRID3),
        osc.InputError,
        r"force: the grid has 3 axes but the path has 2",
    ),
    (
        "scalar grid for work",
        lambda: osc.work(X5, osc.GridField(np.zeros((2, 2, 2)), (0, 0, 0), 1.0)),
        osc.InputError,
        r"work needs 3 components per grid node, the grid has 1",
    ),
    (
        "vector grid for scalar",
        lambda: osc.line_integral(X5, GRID3),
        osc.InputError,
        r"f: a scalar integral needs 1 value per grid node",
    ),
    (
        "path leaves grid",
        lambda: osc.work(
            np.array([[1.0, 1, 1], [9, 9, 9], [5, 5, 5], [25, 5, 5]]),
            GRID3,
            tracks=["a", "b", "a", "b"],
        ),
        osc.InputError,
        r"force: track 'b', row 3: point \[25\.0, 5\.0, 5\.0\] is outside the grid box",
    ),
    (
        "callable shape",
        lambda: osc.work(X5, lambda p: p[:, :2]),
        osc.InputError,
        r"force: the callable returned shape \(12, 2\) for 12 points of 3 coordinates; "
        r"expected \(12, 3\)",
    ),
    (
        "callable NaN",
        lambda: osc.work(X5, _nan_at_third_node, tracks=[1, 2, 1, 2, 1]),
        osc.InputError,
        r"force: track 1, row 0: returned a non-finite value",
    ),
    (
        "callable complex",
        lambda: osc.work(X5, lambda p: p + 1j),
        TypeError,
        r"force \(the callable's result\): expected real numbers, got complex",
    ),
    (
        "scalar callable shape",
        lambda: osc.line_integral(X5, lambda p: p),
        osc.InputError,
        r"f: the callable returned shape \(12, 3\)",
    ),
    (
        "unknown rule",
        lambda: osc.work(X5, F5, rule="simpson"),
        osc.InputError,
        r"rule: expected one of \('trapezoid', 'cubic'\)",
    ),
    (
        "rule for grid",
        lambda: osc.work(X5, GRID3, rule="cubic"),
        osc.InputError,
        r"rule: gridded and callable fields use 'gauss-legendre'",
    ),
    (
        "nodes for samples",
        lambda: osc.work(X5, F5, nodes=3),
        osc.InputError,
        r"nodes: applies to gridded and callable fields",
    ),
    ("nodes 0", lambda: osc.work(X5, GRID3, nodes=0), osc.InputError, r"nodes: must be 1 to 5"),
    ("nodes 6", lambda: osc.work(X5, np.sin, nodes=6), osc.InputError, r"nodes: must be 1 to 5"),
    ("nodes 1e30", lambda: osc.work(X5, np.sin, nodes=10**30), osc.InputError, r"nodes: 10+ is"),
    (
        "nodes float",
        lambda: osc.work(X5, GRID3, nodes=2.0),
        TypeError,
        r"nodes: expected an integer",
    ),
    (
        "time_varying without t",
        lambda: osc.work(X5, np.sin, time_varying=True),
        osc.InputError,
        r"time_varying: the field's times need t",
    ),
    (
        "time_varying samples",
        lambda: osc.work(X5, F5, t=np.arange(5.0), time_varying=True),
        osc.InputError,
        r"time_varying: applies to a callable field only",
    ),
    (
        "time_varying closed",
        lambda: osc.work(X5, np.sin, t=np.arange(5.0), time_varying=True, closed=True),
        osc.InputError,
        r"time_varying: a closed path",
    ),
    (
        "complex force",
        lambda: osc.work(X5, F5 + 1j),
        TypeError,
        r"force: expected real numbers, got complex",
    ),
    (
        "string force",
        lambda: osc.work(X5, "gravity"),
        TypeError,
        r"force: expected real numbers, got string",
    ),
    (
        "bad offsets",
        lambda: osc.work(X5, F5, offsets=[0, 3]),
        osc.InputError,
        r"offsets: must end at the number of rows 5",
    ),
    (
        "power force rows",
        lambda: osc.power(np.arange(5.0), X5, F5[:3]),
        osc.InputError,
        r"force: has 3 rows but positions has 5",
    ),
    (
        "power planar grid",
        lambda: osc.power(np.arange(5.0), X5, osc.GridField(np.zeros((2, 2, 2)), (0, 0), 1.0)),
        osc.InputError,
        r"force: power needs a vector field of 3 components",
    ),
    (
        "power callable NaN",
        lambda: osc.power(
            np.arange(6.0), np.arange(18.0).reshape(6, 3), _nan_at_third_node, tracks=[1, 2] * 3
        ),
        osc.InputError,
        r"force: track 1, row 2: the callable returned a non-finite value",
    ),
    (
        "power leaves grid",
        lambda: osc.power(np.arange(5.0), X5 * 10, GRID3),
        osc.InputError,
        r"force: track 0, row 2: point \[20\.0, 40\.0, 0\.0\] is outside",
    ),
]


@pytest.mark.parametrize("desc, fn, exc, msg", BAD, ids=[b[0] for b in BAD])
def test_bad_input_raises_the_stated_error(desc, fn, exc, msg):
    with pytest.raises(exc, match=msg):
        fn()


# ------------------------------------------------------------------------- streaming estimate

GL3_S = np.array([0.5 - np.sqrt(0.15), 0.5, 0.5 + np.sqrt(0.15)])  # Gauss–Legendre on [0, 1]
GL3_W = np.array([5.0, 8.0, 5.0]) / 18.0  # (Abramowitz & Stegun, Table 25.4)


def gill_miller_numpy(x, f):
    """Σ over the segments of ∫ P_F · P_r′ ds, P the cubic through four neighbouring samples
    (centred, one-sided at the ends; Gill & Miller, Comput. J. 15 (1972) 80–83) in Lagrange form
    with the chord-length parameter, by 3-point Gauss–Legendre (exact: degree 5). An independent
    NumPy implementation of the cubic rule of an open path."""
    n = len(x)
    h = np.linalg.norm(np.diff(x, axis=0), axis=1)
    u = np.concatenate([[0.0], np.cumsum(h)])
    i = np.arange(n - 1)
    idx = np.clip(i - 1, 0, n - 4)[:, None] + np.arange(4)
    U = u[idx] - u[i][:, None]
    total = 0.0
    for s01, w in zip(GL3_S, GL3_W):
        e = (s01 * h)[:, None] - U
        value = np.zeros((n - 1, x.shape[1]))
        slope = np.zeros_like(value)
        for j in range(4):
            others = [m for m in range(4) if m != j]
            den = np.prod([U[:, j] - U[:, m] for m in others], axis=0)
            lj = np.prod([e[:, m] for m in others], axis=0) / den
            dlj = sum(np.prod([e[:, k] for k in others if k != m], axis=0) for m in others) / den
            value += lj[:, None] * f[idx[:, j]]
            slope += dlj[:, None] * x[idx[:, j]]
        total += w * float(np.sum(h * np.einsum("ij,ij->i", value, slope)))
    return total


def test_streaming_error_estimate_matches_an_independent_cubic_rule():
    # The default work(...) sums the trapezoid rule and its cubic companion in one streaming
    # sweep (the cubic as trapezoid + closed-form correction). Expected: |trapezoid − cubic| by
    # NumPy (trapezoid by einsum, cubic by gill_miller_numpy). Tolerance 1e-11 of Σ|F|·|Δr|, the
    # scale of the terms: both sides round differently (a few dozen operations per segment, and
    # the reference's parameter is a running sum).
    s = np.linspace(0.0, 6.0, 3001) ** 1.3  # uneven steps
    x = np.column_stack([np.cos(s), np.sin(1.3 * s), 0.2 * s])
    f = np.column_stack([np.sin(x[:, 1]), x[:, 0] * x[:, 2], 1.0 + np.cos(x[:, 0])])
    trap = float(np.einsum("ij,ij->", 0.5 * (f[1:] + f[:-1]), np.diff(x, axis=0)))
    cubic = gill_miller_numpy(x, f)
    scale = float(np.sum(np.abs(f[1:]).sum(axis=1) * np.linalg.norm(np.diff(x, axis=0), axis=1)))
    w = osc.work(x, f)
    assert abs(w.total[0] - trap) <= 1e-12 * scale
    assert abs(w.error[0] - abs(trap - cubic)) <= 1e-11 * scale
    assert w.error[0] > 1e-8 * scale  # a real difference, far above the tolerance
    c = osc.work(x, f, rule="cubic")
    assert abs(c.total[0] - cubic) <= 1e-11 * scale
    # Cumulative output takes the row-by-row loop: the same bits as the streaming sweep.
    for rule in ("trapezoid", "cubic"):
        a, b = osc.work(x, f, rule=rule), osc.work(x, f, rule=rule, cumulative=True)
        assert a.total[0] == b.total[0] and a.error[0] == b.error[0]

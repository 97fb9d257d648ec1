"""Standard errors, noise-aware flags, stop intervals, trusted summaries and data warnings."""

from __future__ import annotations

import warnings

import numpy as np
import osculate as osc
import pytest


def _helix(rng, n=400, sigma=0.05):
    # Helix x = a cos ωt, y = a sin ωt, z = c ω t: v = ω√(a²+c²), κ = a/(a²+c²), a_n = aω² (closed
    # forms for a helix).
    a, c, w = 10.0, 2.0, 0.3
    t = np.sort(rng.uniform(0.0, 20.0, n))
    p = np.column_stack([a * np.cos(w * t), a * np.sin(w * t), c * w * t])
    truth = {
        "speed": w * np.hypot(a, c),
        "curvature": a / (a * a + c * c),
        "accel_normal": a * w * w,
    }
    return t, p + rng.normal(0.0, sigma, p.shape), truth


def _clothoid_arc(rng, n=500, sigma=0.03):
    # Planar path at 5 m/s: a clothoid κ(s) = s/(A²) up to s = 40 m, then the circle of that
    # curvature. Truth by integrating the heading in closed form θ = s²/(2A²) (clothoid) and
    # θ₀ + κ₀(s − 40) (arc) with a fine trapezoid rule (reference, 1e-9).
    A2, s1, v = 1600.0, 40.0, 5.0
    s_fine = np.linspace(0.0, 120.0, 240001)
    kap = np.where(s_fine < s1, s_fine / A2, s1 / A2)
    theta = np.concatenate([[0.0], np.cumsum(0.5 * (kap[1:] + kap[:-1]) * np.diff(s_fine))])
    xf = np.concatenate(
        [[0.0], np.cumsum(0.5 * (np.cos(theta[1:]) + np.cos(theta[:-1])) * np.diff(s_fine))]
    )
    yf = np.concatenate(
        [[0.0], np.cumsum(0.5 * (np.sin(theta[1:]) + np.sin(theta[:-1])) * np.diff(s_fine))]
    )
    t = np.sort(rng.uniform(0.0, 120.0 / v, n))
    s = v * t
    p = np.column_stack([np.interp(s, s_fine, xf), np.interp(s, s_fine, yf)])
    k = np.interp(s, s_fine, kap)
    truth = {"speed": np.full(n, v), "curvature": k, "accel_normal": k * v * v}
    return t, p + rng.normal(0.0, sigma, p.shape), truth


_SHORT = (
    "measured below 85 %: the automatic window is chosen for the positions and leaves a bias in "
    "the derivatives that the band does not hold (0.7 × the window: 94 %)"
)


@pytest.mark.parametrize(
    "case, method",
    [
        (_helix, "smooth"),
        (_clothoid_arc, "smooth"),
        pytest.param(_helix, "local", marks=pytest.mark.xfail(reason=f"speed 60 %, {_SHORT}")),
        pytest.param(
            _clothoid_arc, "local", marks=pytest.mark.xfail(reason=f"speed 83 %, {_SHORT}")
        ),
        (_helix, "fd"),
        (_clothoid_arc, "fd"),
    ],
)
def test_bands_cover_the_truth(case, method):
    # Monte Carlo, 200 seeded replications: average pointwise coverage of ±1.96 se on interior
    # samples. Smoothing splines: within [85 %, 99 %] (Nychka, JASA 83 (1988) 1134–1143 gives
    # near-nominal average coverage); fd and local are exactly linear in the noise, so for fd on a
    # well-resolved curve the band is exact up to a small truncation error (≥ 93 %). local's
    # window is chosen by GCV on the positions, so its derivative bias is allowed like smooth's.
    rng = np.random.default_rng(2024)
    hits = {q: [] for q in ("speed", "accel_normal", "curvature")}
    for _ in range(200):
        t, x, truth = case(rng)
        opts = {"uncertainty": True} if method == "fd" else {}
        if method == "fd":
            # fd needs dense sampling to resolve the curve at all; low noise keeps it usable.
            t, x, truth = case(rng, n=400, sigma=1e-4) if case is _helix else case(rng, sigma=1e-4)
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", osc.SuspectDataWarning)
            k = osc.kinematics(t, x, method=method, min_speed=1e-3, min_curvature=1e-6, **opts)
        n = len(t)
        inner = slice(n // 10, n - n // 10)
        for q in hits:
            est, se = getattr(k, q)[inner], k.se[q][inner]
            tr = np.broadcast_to(truth[q], (n,))[inner]
            hits[q].append(np.mean(np.abs(est - tr) <= 1.96 * se))
    for q, h in hits.items():
        cov = float(np.mean(h))
        low = 0.93 if method == "fd" else 0.85
        assert low <= cov <= 0.99, (method, case.__name__, q, cov)


@pytest.mark.parametrize("method, sigma", [("local", 0.05), ("fd", 1e-3)])
def test_bands_are_exact_for_pure_noise(method, sigma):
    # A cubic in time (closed-form velocity and acceleration) is reproduced exactly by local
    # fits of degree 4 and by fd's stencils up to the noise, so the linear-propagation variance
    # is the whole error: ±1.96 se must cover 95 % (normal quantile); ≥ 93 % over 200 seeded
    # replications of 240 interior samples (Monte Carlo spread about ±0.1 %). Measured 94.4–95.0 %.
    rng = np.random.default_rng(5)
    hits = {q: [] for q in ("speed", "accel_tangential", "velocity", "acceleration")}
    for _ in range(200):
        n = 300
        t = np.sort(rng.uniform(0.0, 30.0, n))
        p = np.column_stack([2 * t + 0.05 * t**2 - 0.001 * t**3, 1.5 * t - 0.02 * t**2, 0.3 * t])
        v = np.column_stack([2 + 0.1 * t - 0.003 * t**2, 1.5 - 0.04 * t, np.full(n, 0.3)])
        a = np.column_stack([0.1 - 0.006 * t, np.full(n, -0.04), np.zeros(n)])
        speed = np.linalg.norm(v, axis=1)
        truth = {
            "velocity": v,
            "acceleration": a,
            "speed": speed,
            "accel_tangential": np.sum(v * a, axis=1) / speed,
        }
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", osc.SuspectDataWarning)
            k = osc.kinematics(
                t,
                p + rng.normal(0.0, sigma, p.shape),
                method=method,
                uncertainty=True,
                min_speed=1e-3,
                min_curvature=1e-9,
            )
        inner = slice(n // 10, n - n // 10)
        for q in hits:
            est, se, tr = getattr(k, q)[inner], k.se[q][inner], truth[q][inner]
            hits[q].append(np.mean(np.abs(est - tr) <= 1.96 * se))
    for q, h in hits.items():
        assert 0.93 <= float(np.mean(h)) <= 0.97, (method, q, float(np.mean(h)))


def test_smoothing_standard_errors_equal_the_dense_smoother():
    # se of position and velocity of "smooth" = σ sqrt(diag(S Sᵀ)) with S the smoother matrix,
    # built densely here column by column (the fit is linear: S e_j is the fit of a unit impulse
    # at the same λ). Tolerance 1e-8 relative.
    rng = np.random.default_rng(5)
    n = 120
    t = np.sort(rng.uniform(0, 30, n))
    x = np.column_stack([np.cos(0.2 * t), np.sin(0.3 * t)]) + rng.normal(0, 0.02, (n, 2))
    k = osc.kinematics(t, x, method="smooth")
    lam, sigma = k.fit_info["smoothing"][0], k.fit_info["noise"][0]
    rows = {0: np.zeros((n, n)), 1: np.zeros((n, n))}
    for j in range(n):
        e = np.zeros((n, 2))
        e[j, 0] = 1.0
        path = osc.fit(t, e, method="smooth", smoothing=lam)
        for nu in rows:
            rows[nu][:, j] = path(t, nu=nu)[:, 0]
    for nu, name in ((0, "position"), (1, "velocity")):
        ref = sigma * np.sqrt((rows[nu] ** 2).sum(axis=1))
        np.testing.assert_allclose(k.se[name][:, 0], ref, rtol=1e-8)
        np.testing.assert_allclose(k.se[name][:, 1], ref, rtol=1e-8)


def test_noise_is_estimated_per_track():
    # Known σ = 0.05 and 0.2 on two tracks: every estimator recovers it within 15 % (n = 800).
    rng = np.random.default_rng(9)
    t = np.sort(rng.uniform(0, 80, 800))
    base = np.column_stack([20 * np.cos(0.1 * t), 20 * np.sin(0.1 * t)])
    x = np.concatenate(
        [base + rng.normal(0, 0.05, base.shape), base + rng.normal(0, 0.2, base.shape)]
    )
    tt = np.concatenate([t, t])
    ids = np.repeat(["a", "b"], 800)
    for method in ("smooth", "local", "fd"):
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", osc.SuspectDataWarning)
            k = osc.kinematics(tt, x, method=method, tracks=ids)
        np.testing.assert_allclose(k.fit_info["noise"], [0.05, 0.2], rtol=0.15)
        assert list(k.summary_arrays()["noise"]) == list(k.fit_info["noise"])


def _stop_and_go(rng, sigma=0.05):
    """A vehicle: 60 m straight, 8 s stop, 30 m, quarter circle R = 20 m, 40 m, 6 s stop, 50 m;
    8 m/s cruising, ramps of 2 m/s² in and out of stops, ~10 Hz uneven sampling (invented)."""
    v, amax, hz = 8.0, 2.0, 10.0
    ts, xs, stop, _kap, vel = [], [], [], [], []
    tnow, pos, head, carry = 0.0, np.zeros(2), 0.0, 0.0
    legs = [
        ("line", 60.0),
        ("stop", 8.0),
        ("line", 30.0),
        ("arc", 20.0),
        ("line", 40.0),
        ("stop", 6.0),
        ("line", 50.0),
    ]
    for i, (kind, val) in enumerate(legs):
        if kind == "stop":
            for _ in range(int(val * hz)):
                ts.append(tnow)
                xs.append(pos.copy())
                stop.append(True)
                vel.append(0.0)
                tnow += (1 + 0.3 * (rng.random() - 0.5)) / hz
            continue
        length = val if kind == "line" else val * np.pi / 2
        after_stop = i > 0 and legs[i - 1][0] == "stop"
        before_stop = i + 1 < len(legs) and legs[i + 1][0] == "stop"
        # The distance overshot at the end of the previous leg is carried into this one, so that
        # the path has no stutter at the joints.
        s, carry = carry, 0.0
        u = np.array([np.cos(head), np.sin(head)])
        while s < length:
            if kind == "line":
                p = pos + s * u
                speed = min(
                    v,
                    np.sqrt(max(2 * amax * s, 0.05)) if after_stop else v,
                    np.sqrt(max(2 * amax * (length - s), 0.05)) if before_stop else v,
                )
            else:
                c = pos + val * np.array([-u[1], u[0]])
                ang = head - np.pi / 2 + s / val
                p = c + val * np.array([np.cos(ang), np.sin(ang)])
                speed = v
            ts.append(tnow)
            xs.append(p)
            stop.append(False)
            vel.append(speed)
            h = (1 + 0.3 * (rng.random() - 0.5)) / hz
            tnow += h
            s += speed * h
        carry = s - length if not before_stop else 0.0
        if kind == "line":
            pos = pos + length * u
        else:
            c = pos + val * np.array([-u[1], u[0]])
            head += np.pi / 2
            pos = c + val * np.array([np.cos(head - np.pi / 2), np.sin(head - np.pi / 2)])
    x = np.array(xs) + rng.normal(0, sigma, (len(xs), 2))
    return np.array(ts), x, np.array(stop), np.array(vel)


@pytest.mark.parametrize("seed", [1, 7, 77])
def test_stop_and_go_vehicle_defaults(seed):
    # Truth from the scenario's construction: two stops of 8 s and 6 s, one quarter turn of
    # R = 20 m (turning π/2). Thresholds from the issue: ≥ 95 % of stopped samples STOPPED, ≤ 1 %
    # of samples faster than 10 σ per second STOPPED, stop ends within 4 sample steps, minimum
    # radius within 10 %, turning angle within 5 % (rad; straights contribute no turning).
    # Measured over seeds 0–7 and 77: stop samples 98.6–100 %, fast 0 %, ends within 0.37 s,
    # minimum radius 19.4–19.8 m (stretches of 3 bandwidths; 18.9–19.5 m with 1.5), turning
    # 1.563–1.617 rad.
    rng = np.random.default_rng(seed)
    t, x, stop, speed = _stop_and_go(rng)
    k = osc.kinematics(t, x, method="smooth")
    st = k.flagged(osc.Flag.STOPPED)
    fast = speed > 10 * 0.05
    assert st[stop].mean() >= 0.95
    assert st[fast].mean() <= 0.01
    assert len(k.stops) == 2
    edges = np.flatnonzero(np.diff(stop.astype(int)))
    true_start = t[edges[::2] + 1]
    true_end = t[edges[1::2]]
    np.testing.assert_allclose(k.stops.start, true_start, atol=0.4)  # about 4 steps of 0.1 s
    np.testing.assert_allclose(k.stops.end, true_end, atol=0.4)
    s = k.summary_arrays()
    assert abs(s["min_radius"][0] - 20.0) <= 2.0
    assert abs(s["turning_angle"][0] - np.pi / 2) <= 0.05 * np.pi / 2
    assert s["stops"][0] == 2
    # Each end within 0.4 s, so the total of the two stops within 4 × 0.4 s.
    np.testing.assert_allclose(s["stopped_time"][0], np.sum(true_end - true_start), atol=1.6)


def test_summary_columns_are_the_same_everywhere():
    pd = pytest.importorskip("pandas")
    rng = np.random.default_rng(3)
    t, x, _, _ = _stop_and_go(rng)
    k = osc.kinematics(t, x, method="smooth")
    df = pd.DataFrame({"t": t, "x": x[:, 0], "y": x[:, 1], "car": "a"})
    acc = df.osc.summary(time="t", position=["x", "y"], by="car", method="smooth")
    assert list(k.summary().columns) == list(acc.columns)
    assert set(osc.SUMMARY_COLUMNS) <= set(acc.columns)
    dd = pytest.importorskip("dask.dataframe")
    ddf = dd.from_pandas(df, npartitions=1)
    lazy = osc.dask.summary(ddf, time="t", position=["x", "y"], by="car", method="smooth")
    assert list(lazy.compute(scheduler="synchronous").columns) == list(acc.columns)
    stops = df.osc.stops(time="t", position=["x", "y"], by="car", method="smooth")
    assert len(stops) == len(k.stops)
    # Rows interleaved with another vehicle's: the same stops, at the same times, on this car.
    other = df.assign(car="b", x=df["x"] + 500.0)
    both = pd.concat([df, other]).sort_values("t", kind="stable")
    got = both.osc.stops(time="t", position=["x", "y"], by="car", method="smooth")
    mine = got[got["car"] == "a"]
    np.testing.assert_array_equal(mine["start"], k.stops.start)  # exact: the same rows
    np.testing.assert_array_equal(mine["end"], k.stops.end)


def test_cli_summary_has_the_same_columns_and_lists_stops(tmp_path):
    pd = pytest.importorskip("pandas")
    from osculate.cli import main

    rng = np.random.default_rng(4)
    t, x, _, _ = _stop_and_go(rng)
    src = tmp_path / "log.csv"
    pd.DataFrame({"t": t, "x": x[:, 0], "y": x[:, 1], "car": "a"}).to_csv(src, index=False)
    out, stops = tmp_path / "s.csv", tmp_path / "stops.csv"
    args = [str(src), "--time", "t", "--position", "x,y", "--track", "car", "--method", "smooth"]
    assert main(["summary", *args, "-o", str(out), "--stops", str(stops), "-q"]) == 0
    k = osc.kinematics(t, x, method="smooth")
    table = pd.read_csv(out, index_col=0)
    assert list(table.columns) == list(k.summary().columns)
    listed = pd.read_csv(stops)
    np.testing.assert_allclose(listed["start"], k.stops.start, rtol=1e-12)  # CSV round trip


def test_warning_for_interleaved_objects():
    # Two vehicles 30 m apart, rows alternating, given as one track.
    t = np.repeat(np.arange(200) * 0.1, 2)
    x = np.column_stack([10 * t, np.tile([0.0, 30.0], 200)])
    with pytest.warns(osc.SuspectDataWarning) as rec:
        osc.kinematics(t + np.tile([0.0, 0.01], 200), x, method="smooth")
    assert any("interleaved" in str(w.message) for w in rec)


def test_warning_for_millimetres_as_metres():
    # A car at 30 m/s logged in millimetres: 30,000 "m/s" median step speed.
    t = np.arange(300) * 0.1
    x = np.column_stack([30_000 * t, 1000 * np.sin(0.1 * t)])
    with pytest.warns(osc.SuspectDataWarning) as rec:
        osc.kinematics(t, x, method="smooth")
    assert any("units" in str(w.message) for w in rec)


def test_warning_for_fd_on_noisy_data_and_silence_on_clean_data():
    rng = np.random.default_rng(1)
    t = np.arange(500) * 0.1
    x = np.column_stack([20 * np.cos(0.2 * t), 20 * np.sin(0.2 * t)])
    with pytest.warns(osc.SuspectDataWarning) as rec:
        osc.kinematics(t, x + rng.normal(0, 0.05, x.shape))
    assert any("finite differences" in str(w.message) for w in rec)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        osc.kinematics(t, x)
        osc.kinematics(t, x + rng.normal(0, 0.05, x.shape), method="smooth")


def test_se_mapping_is_read_only_and_in_pandas():
    rng = np.random.default_rng(0)
    t, x, _ = _helix(rng, n=100)
    k = osc.kinematics(t, x, method="smooth")
    with pytest.raises(TypeError):
        k.se["speed"] = 0  # type: ignore[index]
    with pytest.raises(ValueError):
        k.se["speed"][0] = 1.0
    assert k.se["velocity"].shape == k.velocity.shape
    pytest.importorskip("pandas")
    cols = k.to_pandas().columns
    assert {"speed_se", "curvature_se", "velocity_x_se", "torsion_se"} <= set(cols)
    with pytest.warns(osc.SuspectDataWarning):  # fd on noisy data
        assert osc.kinematics(t, x).se is None  # fd: off by default


def test_warnings_from_the_accessor_name_the_callers_tracks():
    # The accessor runs all tracks as one batch; its data warnings name the frame's track labels
    # (they named batch positions 0, 1, ... before). Two stop-and-go vehicles with 5 cm noise
    # through finite differences: the noise warning fires for both.
    pd = pytest.importorskip("pandas")
    frames = []
    for name, seed in (("north", 1), ("south", 2)):
        t, x, _, _ = _stop_and_go(np.random.default_rng(seed))
        frames.append(pd.DataFrame({"t": t, "x": x[:, 0], "y": x[:, 1], "car": name}))
    df = pd.concat(frames, ignore_index=True)
    with pytest.warns(osc.SuspectDataWarning, match=r"track\(s\) north, south: with noise"):
        df.osc.kinematics(time="t", position=["x", "y"], by="car")


def test_auto_keeps_fd_on_exact_data_bit_for_bit():
    # Exact samples of a circle (closed form): "auto" is finite differences, to the last bit.
    t = np.arange(400) * 0.05
    x = np.column_stack([20 * np.cos(0.2 * t), 20 * np.sin(0.2 * t)])
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        auto = osc.kinematics(t, x, method="auto", order=4)
    fd = osc.kinematics(t, x, method="fd", order=4)
    assert auto.method == "fd"
    for name in ("curvature", "accel_tangential", "accel_normal", "speed"):
        np.testing.assert_array_equal(getattr(auto, name), getattr(fd, name))  # tolerance 0


def test_auto_smooths_noisy_logs_and_says_so():
    # The stop-and-go vehicle with 5 cm noise (construction above): "auto" chooses the smoothing
    # spline, equal to the last bit to asking for it, and the warning names the choice.
    rng = np.random.default_rng(7)
    t, x, _, _ = _stop_and_go(rng)
    with pytest.warns(osc.SuspectDataWarning, match="method='auto' used 'smooth'") as rec:
        auto = osc.kinematics(t, x, method="auto")
    assert rec[0].filename == __file__  # the warning points at the caller's line
    smooth = osc.kinematics(t, x, method="smooth")
    assert auto.method == "smooth" and auto.estimator == smooth.estimator
    np.testing.assert_array_equal(auto.curvature, smooth.curvature)  # tolerance 0
    assert len(auto.stops) == 2


def test_tables_of_the_accessor_default_to_auto_on_noisy_logs():
    # Two stop-and-go vehicles (construction above: cruising 8 m/s, ramps of 2 m/s², one
    # R = 20 m quarter turn each, 5 cm noise) in one log, rows in time order. At the defaults the
    # summary's headline is the smoothing spline's: |a_t| within 50 % of the 2 m/s² ramps (it
    # was 30–47 m/s² from finite differences), two stops each, and a minimum radius within 10 %.
    pd = pytest.importorskip("pandas")
    frames = []
    for name, seed in (("north", 1), ("south", 2)):
        t, x, _, _ = _stop_and_go(np.random.default_rng(seed))
        frames.append(pd.DataFrame({"t": t, "x": x[:, 0], "y": x[:, 1], "car": name}))
    df = pd.concat(frames, ignore_index=True).sort_values("t", kind="stable")
    with pytest.warns(osc.SuspectDataWarning, match="method='auto'") as rec:
        s = df.osc.summary(time="t", position=["x", "y"], by="car")
    assert all(w.filename == __file__ for w in rec)
    assert (s["max_abs_accel_tangential"] <= 3.0).all()
    assert (s["stops"] == 2).all()
    np.testing.assert_allclose(s["min_radius"], 20.0, rtol=0.1)


def test_one_kernel_call_per_kinematics(monkeypatch):
    # Every stage — estimate, data checks, stops, refit between stops, held rows, the
    # rotation-minimizing frame, the caller's row order — runs inside one call into Rust when
    # the tracks are given by offsets (ids add the grouping call).
    rng = np.random.default_rng(1)
    t, x, _, _ = _stop_and_go(rng)
    n = len(t)
    calls = []
    for name in dir(osc._core):
        fn = getattr(osc._core, name)
        if callable(fn) and not isinstance(fn, type) and not name.startswith("_"):

            def counted(*a, _fn=fn, _name=name, **kw):
                calls.append(_name)
                return _fn(*a, **kw)

            monkeypatch.setattr(osc._core, name, counted)
    x3 = np.column_stack([x, 0.01 * t])
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", osc.SuspectDataWarning)
        osc.kinematics(t, x3, method="smooth", frame="rotation-minimizing", offsets=[0, n])
        assert calls == ["kinematics"]
        calls.clear()
        osc.frames(t, x3, method="smooth", offsets=[0, n])
        assert calls == ["kinematics"]
        calls.clear()
        ids = np.arange(n) % 2  # two interleaved "tracks"
        osc.kinematics(t, x3, method="smooth", tracks=ids)
        assert calls == ["group_rows", "kinematics"]


def test_arc_length_of_a_track_that_starts_with_a_missing_row():
    # Two stop-and-go vehicles in one batch, the second one's first position missing (NaN).
    # With stops, the moving stretches are refitted and the arc length is joined from both
    # fits; the second track's length must not pick up the first track's (it started at
    # -49.9 m here before the join became per track). Reference: the same track
    # alone in its own call (same kernels; tolerance 1e-9 m for the summation order).
    a_t, a_x, _, _ = _stop_and_go(np.random.default_rng(3))
    b_t, b_x, _, _ = _stop_and_go(np.random.default_rng(4))
    b_x[0] = np.nan
    t = np.concatenate([a_t, b_t])
    x = np.concatenate([a_x, b_x])
    ids = np.repeat([0, 1], [len(a_t), len(b_t)])
    both = osc.kinematics(t, x, method="smooth", tracks=ids)
    alone = osc.kinematics(b_t, b_x, method="smooth")
    assert len(alone.stops) == 2
    s = both.arclength[ids == 1]
    assert np.isnan(s[0]) and s[1] == 0.0
    np.testing.assert_allclose(s, alone.arclength, atol=1e-9, equal_nan=True)

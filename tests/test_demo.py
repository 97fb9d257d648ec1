"""The demo scenarios hold their ground truth (osculate.demo).

Generators are checked against independent closed forms (Fresnel integrals for the clothoid,
pymap3d for WGS 84, the Lamb–Oseen circulation).
"""

import numpy as np
import osculate.demo as demo
import pytest


@pytest.mark.parametrize("make", [demo.survey_flight, demo.spiral_loop, demo.swirl_tracers])
def test_generators_are_reproducible(make):
    a, b = make(), make()
    for name in ("t", "xy", "lat", "force", "particle"):
        if hasattr(a, name):
            assert np.array_equal(getattr(a, name), getattr(b, name))
    assert not np.array_equal(make(seed=99).t, a.t)


def test_clothoid_matches_fresnel_integrals():
    # Euler spiral with κ = s/(R L) from the straight: x = a·C(s/a), y = a·S(s/a),
    # a = sqrt(π R L) (scipy.special.fresnel: S, C with the π/2 convention).
    from scipy import special

    e = demo.spiral_loop(noise=0.0, force_noise=0.0)
    u = np.mod(e.distance, e.lap_length)
    s0 = 0.5 * e.straight_length  # the first entry spiral starts at (75, 0), heading +x
    on = (u > s0) & (u < s0 + e.spiral_length)
    s = u[on] - s0
    a = np.sqrt(np.pi * e.bend_radius * e.spiral_length)
    fs, fc = special.fresnel(s / a)
    want = np.column_stack([s0 + a * fc, a * fs])
    assert on.sum() > 50
    assert np.abs(e.xy_true[on] - want).max() < 1e-9  # metres
    # Curvature linear in arc length at the stated rate, and v²κ is the normal acceleration.
    assert np.allclose(e.curvature[on], s * e.spiral_rate, rtol=1e-12, atol=1e-15)
    assert np.allclose(e.accel_normal, e.speed**2 * np.abs(e.curvature))


def test_spiral_loop_closes_and_keeps_its_radius():
    e = demo.spiral_loop(noise=0.0, force_noise=0.0)
    # Closed loop: 2·(straight + spiral + πR) (geometry of the generator).
    assert np.isclose(e.lap_length, 2 * (150 + 40 + np.pi * 35), rtol=1e-12)
    arc = e.segment == "arc"
    # On the arcs the path stays at R from a fixed centre: the first arc's centre is (x, y + R)
    # from the arc's start, heading there is +x rotated by the spiral's turn L/(2R).
    i = np.flatnonzero(arc & (e.lap == 0))
    first = i[: np.argmax(np.diff(i) > 1) + 1] if (np.diff(i) > 1).any() else i
    pts = e.xy_true[first]
    # Fit the circle through the arc samples (algebraic least squares) and compare its radius.
    A = np.column_stack([2 * pts, np.ones(len(pts))])
    sol = np.linalg.lstsq(A, (pts**2).sum(axis=1), rcond=None)[0]
    radius = np.sqrt(sol[2] + sol[0] ** 2 + sol[1] ** 2)
    assert np.isclose(radius, e.bend_radius, rtol=1e-9)
    # Logged force: the resistance magnitude, opposite to the motion (noise-free here).
    direction = np.gradient(e.xy_true, e.t, axis=0)
    cos = np.einsum("ij,ij->i", e.force, direction) / (
        np.linalg.norm(e.force, axis=1) * np.linalg.norm(direction, axis=1)
    )
    assert np.all(cos < -0.999)
    assert np.allclose(np.linalg.norm(e.force, axis=1), e.resistance(e.speed))


def test_spiral_loop_true_work_along_each_lap():
    e = demo.spiral_loop()
    laps = len(e.drag_work)
    first = np.searchsorted(e.lap, np.arange(laps))
    last = np.searchsorted(e.lap, np.arange(laps), side="right") - 1
    # Zero at each lap's first row, the lap's drag_work at its last (the generator's definition).
    assert np.all(e.cumulative_drag_work[first] == 0.0)
    assert np.allclose(e.cumulative_drag_work[last], e.drag_work, rtol=1e-12)
    # −∫ R(v) ds by the trapezoid rule over the rows' true distance and speed: an independent
    # quadrature; its error on ~0.7 m steps is about h²/12 · R'' · 600 m ≈ 0.3 J of 62 kJ.
    r = e.resistance(e.speed)
    same = e.lap[1:] == e.lap[:-1]
    step = np.where(same, 0.5 * (r[1:] + r[:-1]) * np.diff(e.distance), 0.0)
    lap_start = np.concatenate([[0.0], np.cumsum(step)])[first][e.lap]
    trapezoid = -(np.concatenate([[0.0], np.cumsum(step)]) - lap_start)
    assert np.allclose(e.cumulative_drag_work, trapezoid, rtol=0, atol=1.0)  # J


def test_survey_flight_geodesy_matches_pymap3d():
    import pymap3d

    f = demo.survey_flight(noise_horizontal=0.0, noise_vertical=0.0)
    lat, lon, h = pymap3d.enu2geodetic(*f.enu.T, *f.origin)  # WGS 84 by default
    assert np.abs(lat - f.lat).max() < 1e-9 and np.abs(lon - f.lon).max() < 1e-9
    assert np.abs(h - f.height).max() < 1e-4


def test_survey_flight_turns_have_the_planned_radius():
    f = demo.survey_flight(noise_horizontal=0.0, noise_vertical=0.0)
    assert np.all(f.enu[f.turn >= 0, 2] == f.altitude)
    for turn in range(3):  # three turns: points at R from one centre
        p = f.enu[f.turn == turn, :2]
        A = np.column_stack([2 * p, np.ones(len(p))])
        sol = np.linalg.lstsq(A, (p**2).sum(axis=1), rcond=None)[0]
        assert np.isclose(np.sqrt(sol[2] + sol[0] ** 2 + sol[1] ** 2), f.turn_radius, rtol=1e-9)
    # Speed is the derivative of the distance flown (central differences, uneven times).
    v = np.gradient(f.distance, f.t)
    inner = np.ones_like(v, dtype=bool)
    inner[[0, -1]] = False
    assert np.abs(v - f.speed)[inner].max() < 0.05
    # The hover: at rest for 8 s; the outage: no fix for 2.5 s.
    h0, h1 = f.hover_span
    assert np.isclose(h1 - h0, f.hover) and np.all(f.speed[(f.t > h0) & (f.t < h1)] == 0)
    assert 2.5 < np.diff(f.t).max() < 2.8
    # Noisy log: noise of the stated size, about the truth.
    g = demo.survey_flight()
    import osculate as osc

    enu = osc.geodetic_to_enu(g.lat, g.lon, g.height, origin=g.origin)
    err = enu - g.enu
    assert np.allclose(err.std(axis=0), [0.3, 0.3, 0.5], rtol=0.1)


def test_swirl_tracers_circles_and_circulation():
    d = demo.swirl_tracers(noise=0.0)
    r = np.hypot(*d.xy.T)
    assert np.allclose(r, d.radius[d.particle], rtol=1e-12)
    # Speed from frame-to-frame chords, r·2 sin(ωΔt/2)/Δt → v (sub-percent at 50 fps).
    same = d.particle[1:] == d.particle[:-1]
    chord = np.hypot(*np.diff(d.xy, axis=0).T)[same] * d.fps
    assert np.allclose(chord, d.speed[1:][same], rtol=1e-4)
    # Circulation of the velocity round a circle by the trapezoid rule (numpy) against the closed
    # form Γ(1 − exp(−r²/r_c²)) of the Lamb–Oseen vortex.
    a = np.linspace(0.0, 2 * np.pi, 4001)
    for radius in (0.005, 0.015, 0.06):
        p = radius * np.column_stack([np.cos(a), np.sin(a)])
        u = d.velocity(p)
        tangent = radius * np.column_stack([-np.sin(a), np.cos(a)])
        integrand = np.einsum("ij,ij->i", u, tangent)
        circ = np.sum(0.5 * (integrand[1:] + integrand[:-1]) * np.diff(a))
        assert np.isclose(circ, d.enclosed_circulation(radius), rtol=1e-10)
    # The grid holds the field at its nodes, [i, j] at (grid_x[i], grid_y[j]).
    assert np.allclose(d.grid_velocity[10, 60], d.velocity([[d.grid_x[10], d.grid_y[60]]])[0])


def test_oval_loop_with_exact_positions():
    # The oval of demo.test_loop, exact positions: 4th-order finite differences give the bend
    # radius of the generator (40 m) to 0.1 % inside the bends, away from the jumps of curvature.
    import osculate as osc

    d = demo.test_loop(laps=2)
    k = osc.kinematics(d.t, d.xy, tracks=d.lap, order=4)
    inner = d.in_bend & np.roll(d.in_bend, 4) & np.roll(d.in_bend, -4)
    inner &= ~k.flagged(osc.Flag.EDGE | osc.Flag.GAP)
    assert abs(np.median(k.radius[inner]) / d.bend_radius - 1) < 1e-3
    assert np.abs(k.speed - d.speed).max() < 1e-3  # m/s, against the generator's speed law

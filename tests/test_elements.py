"""Geometric elements (straights, arcs, spirals) and the Fresnel integrals behind them.

Test paths are built here from exact clothoid geometry with ``scipy.special.fresnel`` (an
implementation independent of ours), sampled at uneven times with varying speed, seed fixed.
"""

import mpmath
import numpy as np
import osculate as osc
import pytest
from osculate import _core
from osculate.elements import KINDS, elements, elements_of
from scipy.special import fresnel as scipy_fresnel

STRAIGHT, ARC, SPIRAL = 0, 1, 2


# --------------------------------------------------------------------------- Fresnel integrals


def test_fresnel_matches_scipy():
    # Reference: scipy.special.fresnel (cephes fresnl), which returns (S, C). Tolerance 1e-13
    # absolute over |x| ≤ 1000, dense near the series / continued-fraction switch at 1.5.
    x = np.concatenate(
        [
            np.linspace(-1000.0, 1000.0, 400_001),
            np.linspace(1.49, 1.51, 2001),
            np.geomspace(1e-300, 1.0, 2001),
            [0.0, -0.0],
        ]
    )
    c, s = _core.fresnel(x)
    s_ref, c_ref = scipy_fresnel(x)
    assert np.max(np.abs(c - c_ref)) < 1e-13
    assert np.max(np.abs(s - s_ref)) < 1e-13
    # Small arguments: C(x) = x − …, S(x) = πx³/6 − … relative to 1e-15 (A&S 7.3.11–12).
    tiny = np.geomspace(1e-300, 1e-6, 50)
    ct, st = _core.fresnel(tiny)
    assert np.allclose(ct, tiny, rtol=1e-15, atol=0)
    assert np.allclose(st, np.pi * tiny**3 / 6, rtol=1e-11, atol=0)


def test_fresnel_large_arguments_against_mpmath():
    # Reference: mpmath.fresnelc / fresnels at 30 digits (same normalisation). Beyond |x| ≈ 50
    # scipy's phase πx²/2 carries a rounding of about ulp(x²) (its difference from ours grows
    # like 1e-16·x, 4e-14 at x = 730); ours reduces the phase exactly: 1e-15 absolute here.
    mpmath.mp.dps = 30
    for x in (73.3, 729.12, 12345.678, 3.0e6):
        c, s = _core.fresnel(np.array([x]))
        assert abs(c[0] - float(mpmath.fresnelc(x))) < 1e-15
        assert abs(s[0] - float(mpmath.fresnels(x))) < 1e-15
    c, s = _core.fresnel(np.array([np.inf, -np.inf, np.nan]))
    assert c[:2].tolist() == [0.5, -0.5] and s[:2].tolist() == [0.5, -0.5]
    assert np.isnan(c[2]) and np.isnan(s[2])


# --------------------------------------------------------------------------- exact test paths


def _arc_points(x0, y0, th0, k0, rate, v):
    """Points at offsets v of a clothoid (k = k0 + rate·v) from (x0, y0, th0), exact."""
    v = np.asarray(v, dtype=float)
    if rate == 0.0:
        if k0 == 0.0:
            return x0 + v * np.cos(th0), y0 + v * np.sin(th0)
        th = th0 + k0 * v
        return x0 + (np.sin(th) - np.sin(th0)) / k0, y0 - (np.cos(th) - np.cos(th0)) / k0
    sign = 1.0 if rate > 0 else -1.0  # mirror a negative rate: conj of the positive case
    r, k, th = abs(rate), sign * k0, sign * th0
    scale = np.sqrt(np.pi / r)
    u0, u = k / np.sqrt(np.pi * r), (k + r * v) / np.sqrt(np.pi * r)
    s0, c0 = scipy_fresnel(u0)
    s1, c1 = scipy_fresnel(u)
    # ∫₀ᵛ e^{i(th + k w + r w²/2)} dw = e^{i(th − k²/(2r))} √(π/r) [E(u) − E(u0)].
    ph = th - k * k / (2 * r)
    dx = scale * (np.cos(ph) * (c1 - c0) - np.sin(ph) * (s1 - s0))
    dy = scale * (np.sin(ph) * (c1 - c0) + np.cos(ph) * (s1 - s0))
    return x0 + dx, y0 + sign * dy


def chain(parts, s, start=(0.0, 0.0, 0.0)):
    """Positions at arc lengths s along elements (length, k_start, k_end)."""
    x, y, th = start
    xs, ys = np.empty_like(s), np.empty_like(s)
    u0 = 0.0
    for j, (length, k0, k1) in enumerate(parts):
        last = j == len(parts) - 1
        on = (s >= u0) & ((s < u0 + length) | last)
        rate = (k1 - k0) / length
        xs[on], ys[on] = _arc_points(x, y, th, k0, rate, s[on] - u0)
        x, y = _arc_points(x, y, th, k0, rate, length)
        x, y = float(x), float(y)
        th += k0 * length + 0.5 * rate * length**2
        u0 += length
    return xs, ys


def sampling(total, seed):
    """Uneven times (steps 0.05–0.15 s) and a speed varying 10–20 m/s; arc lengths in [0, total]."""
    rng = np.random.default_rng(seed)
    dt = rng.uniform(0.05, 0.15, int(total / 10.0 / 0.05) + 10)
    t = np.concatenate([[0.0], np.cumsum(dt)])
    speed = 15.0 + 5.0 * np.sin(0.3 * t)
    s = np.concatenate([[0.0], np.cumsum(0.5 * (speed[1:] + speed[:-1]) * dt)])
    keep = s <= total
    return t[keep], s[keep]


R = 200.0
TRANSITION = [  # straight → spiral → arc → spiral → straight, A² = R L = 12000
    (80.0, 0.0, 0.0),
    (60.0, 0.0, 1 / R),
    (100.0, 1 / R, 1 / R),
    (60.0, 1 / R, 0.0),
    (80.0, 0.0, 0.0),
]
REVERSE = [  # left curve, S-spiral through zero curvature, right curve
    (60.0, 0.0, 0.0),
    (50.0, 0.0, 1 / 150.0),
    (70.0, 1 / 150.0, 1 / 150.0),
    (100.0, 1 / 150.0, -1 / 250.0),
    (90.0, -1 / 250.0, -1 / 250.0),
    (50.0, -1 / 250.0, 0.0),
    (60.0, 0.0, 0.0),
]


def path(parts, seed, noise=0.0):
    total = sum(p[0] for p in parts)
    t, s = sampling(total, seed)
    x, y = chain(parts, s, start=(12.0, -7.0, 0.4))
    rng = np.random.default_rng(seed + 1000)
    xy = np.column_stack([x, y]) + noise * rng.standard_normal((len(t), 2))
    return t, xy, s


def expected_lengths(parts, s_last):
    lengths = [p[0] for p in parts]
    lengths[-1] -= sum(lengths) - s_last  # the last element ends at the last sample
    return np.array(lengths)


def kinds_of(parts):
    return [STRAIGHT if k0 == k1 == 0 else ARC if k0 == k1 else SPIRAL for _, k0, k1 in parts]


@pytest.mark.parametrize("parts", [TRANSITION, REVERSE], ids=["transition", "reverse"])
def test_noise_free_chain_is_recovered(parts):
    t, xy, s = path(parts, seed=3)
    el = elements(t, xy)
    assert el.kind.tolist() == kinds_of(parts)
    assert el.refined.all()
    # Lengths, radii and A against the design values above; tolerance 1e-6 relative (the
    # Levenberg–Marquardt stop, not the data, limits it: positions are exact to rounding).
    want = expected_lengths(parts, s[-1])
    np.testing.assert_allclose(el.length, want, rtol=1e-6)
    k0 = np.array([p[1] for p in parts])
    k1 = np.array([p[2] for p in parts])
    np.testing.assert_allclose(el.start_curvature, k0, atol=1e-8)
    np.testing.assert_allclose(el.end_curvature, k1, atol=1e-8)
    arcs = el.kind == ARC
    np.testing.assert_allclose(el.radius[arcs], 1 / np.abs(k0[arcs]), rtol=1e-6)
    sp = el.kind == SPIRAL
    a_true = np.sqrt(want[sp] / np.abs(k1[sp] - k0[sp]))
    np.testing.assert_allclose(el.spiral_parameter[sp], a_true, rtol=1e-6)
    assert np.nanmax(el.max_distance) < 1e-6
    # Start of the chain: the first sample and the heading 0.4 rad given above.
    assert abs(el.x[0] - 12.0) < 1e-6 and abs(el.y[0] + 7.0) < 1e-6
    assert abs(el.heading[0] - 0.4) < 1e-8


def test_spiral_from_straight_into_arc_has_a_squared_equal_rl():
    # Common practice of the trade: a clothoid from κ = 0 into radius R over length L has
    # A² = R L. Noise-free: 1e-6 relative.
    t, xy, _ = path(TRANSITION, seed=4)
    el = elements(t, xy)
    a2 = el.spiral_parameter[1] ** 2
    assert abs(a2 - el.radius[2] * el.length[1]) < 1e-6 * a2
    assert abs(a2 - R * 60.0) < 1e-6 * a2


@pytest.mark.parametrize("parts", [TRANSITION, REVERSE], ids=["transition", "reverse"])
@pytest.mark.parametrize("seed", [11, 12, 13])
def test_noisy_chain(parts, seed):
    noise = 0.03  # 3 cm per coordinate
    t, xy, s = path(parts, seed=seed, noise=noise)
    el = elements(t, xy)
    assert el.kind.tolist() == kinds_of(parts)
    spacing = np.median(np.diff(s))
    want = expected_lengths(parts, s[-1])
    # Lengths within max(2 %, 2 sample spacings) of the design values.
    assert np.all(np.abs(el.length - want) <= np.maximum(0.02 * want, 2 * spacing))
    k0 = np.array([p[1] for p in parts])
    k1 = np.array([p[2] for p in parts])
    arcs = el.kind == ARC
    np.testing.assert_allclose(el.radius[arcs], 1 / np.abs(k0[arcs]), rtol=0.02)
    sp = el.kind == SPIRAL
    a_true = np.sqrt(np.array([p[0] for p in parts])[sp] / np.abs(k1[sp] - k0[sp]))
    np.testing.assert_allclose(el.spiral_parameter[sp], a_true, rtol=0.05)
    # Lateral RMS: the noise's component along the normal has the per-coordinate σ; with
    # 30–90 samples per element, within 35 % of it.
    np.testing.assert_allclose(el.rms, noise, rtol=0.35)


def test_rotation_and_translation_invariance():
    # Rotating by φ and translating by a far offset changes the start points and headings
    # accordingly and nothing else (1e-6 relative: the fit's stop).
    t, xy, _ = path(REVERSE, seed=5)
    phi, shift = 2.1, np.array([3.0e5, -4.0e5])
    rot = np.array([[np.cos(phi), -np.sin(phi)], [np.sin(phi), np.cos(phi)]])
    a = elements(t, xy)
    b = elements(t, xy @ rot.T + shift)
    assert a.kind.tolist() == b.kind.tolist()
    np.testing.assert_allclose(b.length, a.length, rtol=1e-6)
    np.testing.assert_allclose(b.start_curvature, a.start_curvature, atol=1e-9)
    moved = np.column_stack([a.x, a.y]) @ rot.T + shift
    np.testing.assert_allclose(np.column_stack([b.x, b.y]), moved, atol=1e-4)
    dh = np.angle(np.exp(1j * (b.heading - a.heading - phi)))
    assert np.max(np.abs(dh)) < 1e-8


def test_straight_path_is_one_straight():
    rng = np.random.default_rng(21)
    t = np.cumsum(rng.uniform(0.05, 0.15, 800))
    xy = np.column_stack([12.0 * t, -5.0 * t]) + 0.03 * rng.standard_normal((800, 2))
    el = elements(t, xy)
    assert el.kind.tolist() == [STRAIGHT]
    # Length: the first to the last sample along the line (2 sample spacings).
    true = 13.0 * (t[-1] - t[0])
    assert abs(el.length[0] - true) < 2 * 13.0 * 0.15


def test_tracks_3d_and_table():
    # Two tracks given as 3-D paths at height 50 with up = z, ids not in sorted order: the
    # elements of the planar paths, tracks in label order, labelled by track.
    t1, xy1, _ = path(TRANSITION, seed=6)
    t2, xy2, _ = path(REVERSE, seed=7)
    t = np.concatenate([t1, t2])
    xyz = np.column_stack([np.concatenate([xy1, xy2]), np.full(len(t), 50.0)])
    ids = np.array(["b"] * len(t1) + ["a"] * len(t2))
    el = elements(t, xyz, tracks=ids, up=[0, 0, 1])
    assert el.track.tolist() == ["a"] * len(REVERSE) + ["b"] * len(TRANSITION)
    assert el.kind.tolist() == kinds_of(REVERSE) + kinds_of(TRANSITION)
    np.testing.assert_allclose(el.plane, [[1, 0, 0], [0, 1, 0]], atol=1e-15)
    df = el.to_pandas()
    assert len(df) == len(el) and list(df["kind"].astype(str)[:2]) == [KINDS[0], KINDS[2]]
    # Times at element ends increase within a track.
    assert np.all(el.end_time >= el.start_time)


def test_elements_of_reuses_kinematics_and_refine_false_falls_back():
    t, xy, _ = path(TRANSITION, seed=8, noise=0.03)
    k = osc.kinematics(t, xy, method="smooth")
    a = elements_of(k)
    b = elements_of(k, refine=False)
    assert a.kind.tolist() == b.kind.tolist() == kinds_of(TRANSITION)
    assert a.refined.all() and not b.refined.any()
    # The fallback (curvature diagram only) is coarser: its lateral RMS is at least the
    # refined chain's (least squares over a larger family of chains).
    assert np.sqrt(np.mean(b.rms**2)) >= np.sqrt(np.mean(a.rms**2))


T = np.arange(40.0)
XY = np.column_stack([T, np.zeros(40)])


@pytest.mark.parametrize(
    ("kwargs", "argument"),
    [
        ({"penalty": -1.0}, "penalty"),
        ({"penalty": np.nan}, "penalty"),
        ({"min_length": -2.0}, "min_length"),
        ({"significance": 0.0}, "significance"),
        ({"resolution": -1.0}, "resolution"),
        ({"max_iterations": 2.5}, "max_iterations"),
        ({"up": [0, 0, 1]}, "up"),
    ],
)
def test_bad_options_name_the_argument(kwargs, argument):
    with pytest.raises(osc.InputError, match=rf"^{argument}:"):
        elements(T, XY, **kwargs)


def test_3d_needs_up():
    with pytest.raises(osc.InputError, match=r"^up:"):
        elements(T, np.column_stack([XY, T]))
    with pytest.raises(osc.InputError, match=r"^up:"):
        elements(T, np.column_stack([XY, T]), up=[0, 0, 0])


def test_elements_through_kinematics_the_accessor_and_the_command_line(tmp_path):
    # An invented stop-and-go vehicle (tests/test_trust.py): 60 m straight, stop, 30 m straight,
    # quarter circle R = 20 m, 40 m straight, stop, 50 m straight (construction), 5 cm noise.
    # Stops travel no distance, so the chain is straight 90 m → arc 31.4 m → straight 90 m:
    # radius within 2 %, lengths within max(2 %, 2 spacings ~1.6 m), lateral RMS ≈ 0.05 m.
    pd = pytest.importorskip("pandas")
    from osculate.cli import main
    from test_trust import _stop_and_go

    frames = []
    for vid, seed in (("a", 1), ("b", 2)):
        t, x, _, _ = _stop_and_go(np.random.default_rng(seed))
        frames.append(pd.DataFrame({"t": t, "x": x[:, 0], "y": x[:, 1], "van": vid}))
    k = osc.kinematics(frames[0]["t"], frames[0][["x", "y"]], method="smooth")
    el = k.elements()
    assert list(el.kind_name) == ["straight", "arc", "straight"]
    assert abs(el.radius[1] / 20 - 1) <= 0.02
    np.testing.assert_allclose(el.length, [90, 10 * np.pi, 90], atol=max(1.6, 0.02 * 90))
    assert np.all(np.abs(el.rms - 0.05) <= 0.015)
    df = pd.concat(frames).sort_values("t", kind="stable").reset_index(drop=True)
    table = df.osc.elements(time="t", position=["x", "y"], by="van", method="smooth")
    assert list(table["van"]) == ["a"] * 3 + ["b"] * 3
    # The accessor runs the same kernels on the same rows: equal to rounding (1e-9).
    np.testing.assert_allclose(table["radius"].to_numpy()[:3], el.radius, rtol=1e-9)
    src, out = tmp_path / "log.csv", tmp_path / "elements.csv"
    df.to_csv(src, index=False)
    args = ["--time", "t", "--position", "x,y", "--track", "van", "--method", "smooth", "-q"]
    assert main(["summary", str(src), *args, "--elements", str(out)]) == 0
    back = pd.read_csv(out)
    np.testing.assert_allclose(back["radius"], table["radius"], rtol=1e-9)
    assert list(back["kind"]) == list(table["kind"].astype(str))

"""Finite-difference kinematics against closed forms and reference implementations."""

import numpy as np
import osculate as osc
import pytest
from conftest import graded_times, helix
from osculate import Flag
from scipy.spatial.transform import Rotation
from scipy.special import ellipe


def interior(k, width=3):
    keep = ~k.flagged(Flag.EDGE)
    keep[:width] = keep[-width:] = False
    return keep


@pytest.mark.parametrize("order", [2, 4])
def test_uniform_circular_motion(order):
    # Circle of radius R at constant speed v: κ = 1/R, a_n = v²/R, a_t = 0 (any mechanics text).
    # Tolerance: FD error at 400 samples per 2 rad, ~1e-5 (order 2) and ~1e-9 (order 4).
    r, v = 25.0, 7.0
    t = graded_times(400, 2 * r / v)
    xy = r * np.column_stack([np.cos(v * t / r), np.sin(v * t / r)])
    k = osc.kinematics(t, xy, order=order)
    m = interior(k)
    tol = 1e-4 if order == 2 else 1e-8
    np.testing.assert_allclose(k.curvature[m], 1 / r, rtol=tol)
    np.testing.assert_allclose(k.signed_curvature[m], 1 / r, rtol=tol)  # counter-clockwise: left
    np.testing.assert_allclose(k.accel_normal[m], v**2 / r, rtol=tol)
    np.testing.assert_allclose(k.accel_tangential[m], 0.0, atol=tol * v**2 / r)
    np.testing.assert_allclose(k.angular_speed[m], v / r, rtol=tol)
    np.testing.assert_allclose(k.radius[m], r, rtol=tol)
    np.testing.assert_allclose(k.center[m], 0.0, atol=tol * r)


def test_circular_motion_with_angular_acceleration():
    # θ(t) = ω0 t + α t²/2 on radius R: a_t = Rα, a_n = Rω², dω/dt = α (any mechanics text).
    # Tolerance 1e-7 relative: 4th-order FD on 2001 samples.
    r, w0, al = 3.0, 0.5, 0.2
    t = graded_times(2001, 5.0)
    th = w0 * t + 0.5 * al * t**2
    k = osc.kinematics(t, r * np.column_stack([np.cos(th), np.sin(th)]), order=4)
    m = interior(k)
    w = w0 + al * t
    np.testing.assert_allclose(k.accel_tangential[m], r * al, rtol=1e-7)
    np.testing.assert_allclose(k.accel_normal[m], r * w[m] ** 2, rtol=1e-7)
    np.testing.assert_allclose(k.angular_speed[m], w[m], rtol=1e-7)
    np.testing.assert_allclose(k.angular_accel[m], al, rtol=1e-5)
    # r″ = a_t T + a_n N (decomposition identity), everywhere the frame exists.
    rebuilt = k.accel_tangential[:, None] * k.tangent + k.accel_normal[:, None] * k.normal
    np.testing.assert_allclose(rebuilt, k.acceleration, atol=1e-12)


@pytest.mark.parametrize("order, rtol", [(2, 2e-4), (4, 1e-7)])
def test_helix_on_uneven_times(order, rtol):
    # κ = a/(a²+c²), τ = c/(a²+c²) (closed form, any differential geometry text);
    # tolerance from the FD truncation error at 600 graded samples over 12 rad.
    a, c = 2.0, 0.5
    t = graded_times(600, 12.0)
    k = osc.kinematics(t, helix(t, a, c), order=order)
    m = interior(k)
    np.testing.assert_allclose(k.curvature[m], a / (a * a + c * c), rtol=rtol)
    np.testing.assert_allclose(k.torsion[m], c / (a * a + c * c), rtol=10 * rtol)
    np.testing.assert_allclose(k.speed, np.hypot(a, c), rtol=10 * rtol)
    frame = np.stack([k.tangent[m], k.normal[m], k.binormal[m]], axis=1)
    np.testing.assert_allclose(
        frame @ frame.transpose(0, 2, 1), np.broadcast_to(np.eye(3), frame.shape), atol=1e-12
    )
    assert np.all(np.isnan(k.signed_curvature))  # 3-D without `up`


def test_signed_curvature_about_up():
    # Helix turning counter-clockwise seen from +z: positive about +z, negative about -z.
    t = graded_times(200, 6.0)
    up = osc.kinematics(t, helix(t), up=(0, 0, 1))
    down = osc.kinematics(t, helix(t), up=(0, 0, -5))
    m = interior(up)
    # (r′×r″)·ẑ / v³ = a²/(a²+c²)^(3/2) for the helix (closed form); FD tolerance 1e-3.
    np.testing.assert_allclose(up.signed_curvature[m], 4 / 4.25**1.5, rtol=1e-3)
    np.testing.assert_array_equal(down.signed_curvature, -up.signed_curvature)


def test_ellipse_perimeter_converges():
    # Perimeter 4a·E(e²) with scipy.special.ellipe (parameter m = e²). The polyline error is
    # O(h²): tolerance 1e-5 relative at 2000 samples, and the error shrinks 4x when n doubles.
    a, b = 3.0, 2.0
    exact = 4 * a * ellipe(1 - (b / a) ** 2)
    errs = []
    for n in (1000, 2000):
        t = np.linspace(0, 2 * np.pi, n + 1)
        s = osc.arclength(t, np.column_stack([a * np.cos(t), b * np.sin(t)]))
        errs.append(abs(s[-1] - exact) / exact)
    assert errs[1] < 1e-5
    assert 3.5 < errs[0] / errs[1] < 4.5


def test_velocity_matches_numpy_gradient():
    # numpy.gradient(edge_order=2) is the same 3-point formula on non-uniform grids (reference
    # implementation); agreement to rounding, 1e-12 relative.
    t = graded_times(300, 10.0) + 100.0
    x = helix(t)
    d = osc.derivatives(t, x, order=2)
    ref = np.gradient(x, t, axis=0, edge_order=2)
    np.testing.assert_allclose(d.velocity, ref, rtol=1e-12, atol=1e-12)


def _convergence_slope(order):
    errs, hs = [], []
    for n in (100, 200, 400, 800):
        t = graded_times(n, 8.0)
        k = osc.kinematics(t, helix(t), order=order)
        m = interior(k)
        errs.append(np.max(np.abs(k.curvature[m] - 2 / 4.25)))
        hs.append(8.0 / n)
    return np.polyfit(np.log(hs), np.log(errs), 1)[0]


@pytest.mark.parametrize("order", [2, 4])
def test_measured_convergence_order(order):
    # The log-log slope of the curvature error over a refinement sequence equals the formal
    # order of the stencils (Fornberg 1988); tolerance ±0.3.
    assert abs(_convergence_slope(order) - order) < 0.3


def test_invariance_under_rigid_motion_time_shift_mirror_and_scale(rng):
    # Curvature, torsion and speeds are intrinsic (any differential geometry text): unchanged by
    # rotation + translation + time shift; a mirror flips τ; scaling space by λ divides κ, τ by λ.
    # Tolerance: only rounding differs (rtol 1e-7; atol 1e-8 where τ crosses zero).
    t = graded_times(300, 10.0)
    x = np.column_stack([np.cos(t) + 0.1 * t**2, np.sin(1.3 * t), 0.3 * t])
    base = osc.kinematics(t, x)
    rot = Rotation.random(random_state=1).as_matrix()
    moved = osc.kinematics(t + 1234.5, x @ rot.T + [5.0, -7.0, 11.0])
    for name in ("curvature", "torsion", "speed", "accel_tangential", "accel_normal"):
        got, want = getattr(moved, name), getattr(base, name)
        np.testing.assert_allclose(got, want, rtol=1e-7, atol=1e-8, err_msg=name)
    np.testing.assert_allclose(moved.tangent, base.tangent @ rot.T, atol=1e-9)
    mirrored = osc.kinematics(t, x * [1, 1, -1])
    np.testing.assert_allclose(mirrored.torsion, -base.torsion, rtol=1e-9, atol=1e-10)
    scaled = osc.kinematics(t, 3.0 * x)
    np.testing.assert_allclose(scaled.curvature, base.curvature / 3.0, rtol=1e-9)
    np.testing.assert_allclose(scaled.torsion, base.torsion / 3.0, rtol=1e-9, atol=1e-10)


def test_straight_line_and_stop_are_flagged():
    t = np.linspace(0, 5, 51)
    line = osc.kinematics(t, np.column_stack([t**2, 2 * t**2, -(t**2)]))  # accelerating, straight
    assert line.flagged(Flag.STRAIGHT)[1:].all()
    np.testing.assert_array_equal(line.curvature[1:], 0.0)
    assert np.isnan(line.normal[1:]).all() and np.isnan(line.torsion[1:]).all()
    # The t = 0 sample starts from rest: STOPPED, not STRAIGHT.
    assert line.flagged(Flag.STOPPED)[0]
    parked = osc.kinematics(t, np.zeros((51, 2)))
    assert parked.flagged(Flag.STOPPED).all()
    assert np.isnan(parked.tangent).all() and np.isnan(parked.curvature).all()
    np.testing.assert_array_equal(parked.speed, 0.0)


def test_batch_equals_single_tracks_bit_for_bit(rng):
    # Rows of five tracks interleaved at random (each track keeps its time order), string ids.
    pieces = []
    for k in range(5):
        t = np.sort(rng.uniform(0, 10, 20 + 7 * k))
        pieces.append((t, helix(t, 1 + k, 0.2 * k)))
    sizes = [len(p[0]) for p in pieces]
    ids_grouped = np.repeat([f"car-{k}" for k in range(5)], sizes)
    pos = rng.permutation(len(ids_grouped))
    for k in range(5):
        rows = ids_grouped == f"car-{k}"
        pos[rows] = np.sort(pos[rows])
    t_all = np.empty(len(pos))
    x_all = np.empty((len(pos), 3))
    ids = np.empty(len(pos), dtype=object)
    t_all[pos] = np.concatenate([p[0] for p in pieces])
    x_all[pos] = np.concatenate([p[1] for p in pieces])
    ids[pos] = ids_grouped
    batch = osc.kinematics(t_all, x_all, tracks=ids)
    by_offsets = osc.kinematics(
        np.concatenate([p[0] for p in pieces]),
        np.concatenate([p[1] for p in pieces]),
        offsets=np.concatenate([[0], np.cumsum(sizes)]),
    )
    for k, (t, x) in enumerate(pieces):
        single = osc.kinematics(t, x)
        rows = ids == f"car-{k}"
        for name in ("curvature", "torsion", "tangent", "arclength", "flags"):
            got = getattr(batch, name)[rows]
            assert np.array_equal(got, getattr(single, name), equal_nan=name != "flags"), name
            got = getattr(by_offsets, name)[ids_grouped == f"car-{k}"]
            assert np.array_equal(got, getattr(single, name), equal_nan=name != "flags"), name
    assert list(batch.tracks) == list(ids)
    summary = batch.summary()
    assert list(summary.index) == [f"car-{k}" for k in range(5)]
    np.testing.assert_array_equal(summary["samples"], sizes)


def test_summary_figures_of_a_circle():
    # Two laps of a circle of radius 5 at 2 m/s: length 20π, turning angle 4π rad, min radius 5
    # (closed form); tolerance 1e-4 relative from the order-4 FD and the polyline length.
    t = np.linspace(0, 10 * np.pi, 4001)
    xy = 5 * np.column_stack([np.cos(0.4 * t), np.sin(0.4 * t)])
    s = osc.kinematics(t, xy, order=4).summary()
    row = s.iloc[0]
    np.testing.assert_allclose(row["length"], 20 * np.pi, rtol=1e-4)
    np.testing.assert_allclose(row["turning_angle"], 4 * np.pi, rtol=1e-4)
    np.testing.assert_allclose(row["min_radius"], 5.0, rtol=1e-4)
    np.testing.assert_allclose(row["mean_speed"], 2.0, rtol=1e-4)


def test_to_pandas_columns_and_array_likes():
    k = osc.kinematics([0, 1, 2, 3], [[0, 0], [1, 0], [2, 1], [3, 3]])
    df = k.to_pandas()
    assert {"t", "speed", "tangent_x", "tangent_y", "binormal_z", "flags"} <= set(df.columns)
    assert len(df) == 4
    assert k.dim == 2 and k.binormal.shape == (4, 3)


@pytest.mark.parametrize("dtype", [np.float32, np.int64, np.int16])
@pytest.mark.filterwarnings("ignore::osculate.SuspectDataWarning")  # a zig-zag of integers
def test_other_real_dtypes_and_layouts(dtype):
    t = np.arange(12)
    x = np.column_stack([t, t**2 % 7, t % 3]).astype(dtype)
    ref = osc.kinematics(t.astype(float), x.astype(float))
    for variant in (x, np.asfortranarray(x), np.repeat(x, 2, axis=0)[::2]):
        got = osc.kinematics(t.astype(dtype), variant)
        np.testing.assert_array_equal(got.curvature, ref.curvature)


def test_outputs_select_the_computed_quantities():
    # Same kernel, fewer columns written: every asked value is bit-identical to the full run
    # (exact equality: the same arithmetic), the others raise AttributeError naming outputs=.
    t = np.linspace(0.0, 6.0, 301)
    x = np.column_stack([2 * np.cos(t), 2 * np.sin(t), 0.5 * t])
    for method in ("fd", "smooth"):
        full = osc.kinematics(t, x, method=method)
        part = osc.kinematics(t, x, method=method, outputs=["curvature", "accel_normal"])
        assert part.outputs == ("curvature", "accel_normal")
        np.testing.assert_array_equal(part.curvature, full.curvature)
        np.testing.assert_array_equal(part.accel_normal, full.accel_normal)
        np.testing.assert_array_equal(part.flags, full.flags)
        with pytest.raises(AttributeError, match="outputs="):
            _ = part.speed
        if method == "smooth":
            np.testing.assert_array_equal(part.se["curvature"], full.se["curvature"])
            assert "speed" not in part.se
    rmf = osc.kinematics(t, x, frame="rotation-minimizing", outputs=["speed"])
    assert rmf.outputs == ("speed",) and rmf.twist is not None
    with pytest.raises(osc.InputError, match="outputs: unknown quantity 'sped'"):
        osc.kinematics(t, x, outputs=["sped"])
    with pytest.raises(TypeError, match="outputs"):
        osc.kinematics(t, x, outputs=[1])


def test_accessor_columns_ask_the_kernel_for_their_quantities():
    pd = pytest.importorskip("pandas")
    t = np.linspace(0.0, 6.0, 61)
    df = pd.DataFrame({"t": t, "x": np.cos(t), "y": np.sin(t)})
    res = df.osc.kinematics(time="t", position=["x", "y"], columns=["speed", "tangent_x"])
    full = df.osc.kinematics(time="t", position=["x", "y"])
    assert list(res.columns) == ["speed", "tangent_x"]
    # Same kernel arithmetic: exact equality with the full run.
    np.testing.assert_array_equal(res["tangent_x"], full["tangent_x"])


def test_out_buffers_are_written_in_place():
    # Reference: the same call without out= (same kernel, tolerance 0).
    t = np.linspace(0.0, 4.0, 2001)
    xy = 2.0 * np.column_stack([np.cos(1.5 * t), np.sin(1.5 * t)])
    asked = ["speed", "curvature", "tangent"]
    for tracks in (None, np.arange(len(t)) % 3):  # the caller's order, and interleaved tracks
        ref = osc.kinematics(t, xy, tracks=tracks, outputs=asked)
        buf = {"speed": np.full(len(t), 7.0), "tangent": np.zeros((len(t), 2))}
        k = osc.kinematics(t, xy, tracks=tracks, outputs=asked, out=buf)
        assert k.speed is buf["speed"] and k.tangent is buf["tangent"]
        np.testing.assert_array_equal(buf["speed"], ref.speed)
        np.testing.assert_array_equal(buf["tangent"], ref.tangent)
        np.testing.assert_array_equal(k.curvature, ref.curvature)


def test_out_buffers_are_checked():
    t = np.linspace(0.0, 4.0, 50)
    xy = np.column_stack([t, t**2])
    n = len(t)
    bad = [
        ({"curvature": np.empty(n)}, osc.InputError, "not one of the outputs asked"),
        ({"speed": np.empty(n, np.float32)}, TypeError, "writeable float64"),
        ({"speed": np.empty(2 * n)[::2]}, TypeError, "C-contiguous"),
        ({"tangent": np.empty((2, n))}, osc.InputError, r"shape \(2, 50\), expected \(50, 2\)"),
        ({"speed": [0.0] * n}, TypeError, "NumPy array"),
    ]
    for out, error, message in bad:
        with pytest.raises(error, match=message):
            osc.kinematics(t, xy, outputs=["speed", "tangent"], out=out)
    frozen = np.empty(n)
    frozen.flags.writeable = False
    with pytest.raises(TypeError, match="writeable"):
        osc.kinematics(t, xy, outputs=["speed"], out={"speed": frozen})

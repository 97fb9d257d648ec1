"""Property-based tests (hypothesis) of osc.kinematics (method "fd", orders 2 and 4), osc.arclength
and osc.derivatives over random 2-D and 3-D paths with uneven times and several tracks.

Where the checks come from. The Frenet apparatus is invariant under rigid motions, covariant under
scaling, and changes in a known way under a mirror or a reversal of direction (invariance of the
Frenet apparatus, any differential geometry text). The finite-difference estimates inherit these
properties exactly in real arithmetic: the Fornberg weights depend only on time differences and
the estimates are linear in the positions (Fornberg, Math. Comp. 51 (1988) 699-706). So every
difference seen here is rounding, and three kinds of check follow:

* transformations that are exact in floating point (negating a coordinate, scaling by a power of
  two, a time shift on a dyadic grid, regrouping rows into tracks) must give identical results;
* inexact ones (a general rotation, scale or time shift, reversal) must agree within a
  first-order rounding-error bound computed per sample from the conditioning of the computation:
  a stencil sum errs by at most (sum of |weights|) x (rounding of data and weights), Higham,
  Accuracy and Stability of Numerical Algorithms (2002) sec. 3.1 (`fd_bounds`), and the error
  propagates through the Frenet formulas by first-order perturbation (`frenet_bounds`);
* identities (unit, orthogonal frame; r'' = a_t T + a_n N) within bounds derived beside them.

`close` also checks that each tolerance is sharp (a small multiple of the rounding level), so no
check here passes whatever the library returns; the paths are well-conditioned by construction
(see `paths`), so none flakes. Observed errors reach 1-25 % of the bounds.
"""

from __future__ import annotations

import os
import subprocess
import sys
import textwrap
import warnings
from fractions import Fraction
from math import factorial

import numpy as np
import osculate as osc
import pytest
from hypothesis import HealthCheck, event, given, settings
from hypothesis import strategies as st
from hypothesis.extra import numpy as hnp
from test_fuzz_regressions import known_bug

# Random data in arbitrary units: the data checks may rightly call them suspect.
pytestmark = pytest.mark.filterwarnings("ignore::osculate.SuspectDataWarning")

U = np.finfo(np.float64).eps / 2  # unit roundoff of IEEE double precision
WIDTHS = {2: (3, 5), 4: (5, 7)}  # stencil widths (r' and r'', r''') per order, osculate.diff docs
C_WEIGHTS = 8  # Fornberg weights are accurate to C_WEIGHTS * width * U, checked in test_weights_...
NO_THRESHOLDS = {"min_speed": 0.0, "min_curvature": 0.0}  # absolute thresholds are not scale-free

PROPS = settings(
    deadline=None,
    max_examples=25,
    derandomize=True,  # the same examples on every run: reproducible in CI
    suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large],
)

SCALARS_SAME = ("speed", "curvature", "torsion", "radius", "accel_normal", "angular_speed")


# -------------------------------------------------------------------------------------------------
# Random well-conditioned paths


@st.composite
def paths(draw, dims=(2, 3), max_tracks=3, min_n=8, max_n=50):
    """Several tracks of an epitrochoid (3-D: plus a wobbling climb) run with a varying speed.

    In the curve parameter th: r = e^{i th} + rho e^{i(m th + phi)}; the planar part of
    r_th x r_thth is 1 + m^3 rho^2 + (m^2 + m) rho cos(.) >= 1/2 for rho <= 1/(2(m^2 + m)), and
    |r_th| >= 1 - m rho > 0, so speed and |r' x r''| stay away from zero. Time enters through
    th(u) = u + b sin(g u + psi)/g with |b| <= 1/2 (th' in [1/2, 3/2]). Steps are
    h0 * 2^U(-1/2, 1/2) (any two within a factor 2) with h0 in [0.02, 0.05]: at most 0.32 rad of
    the fastest mode (m th' <= 4.5) per step, so the estimates resolve the path. Space and time get
    random units (1e-2..1e3 and 1e-2..1e2, tracks within 10x of each other), offsets of a few path
    sizes and of a hundred durations, and (3-D) a random orientation.
    """
    dim = draw(st.sampled_from(dims))
    m_tracks = draw(st.integers(1, max_tracks))
    seed = draw(st.integers(0, 2**32 - 1))
    rng = np.random.default_rng(seed)
    length0 = 10 ** rng.uniform(-2, 3)  # the batch's length and time units; tracks vary by 10x
    tscale0 = 10 ** rng.uniform(-2, 2)
    ts, xs = [], []
    for _ in range(m_tracks):
        n = draw(st.integers(min_n, max_n))
        m = int(rng.integers(2, 4))
        rho = rng.uniform(0, 1 / (2 * (m * m + m)))
        phi, psi, phi2 = rng.uniform(0, 2 * np.pi, 3)
        b, g = rng.uniform(-0.5, 0.5), rng.uniform(0.2, 2.0)
        h0 = rng.uniform(0.02, 0.05)
        u = np.concatenate([[0.0], np.cumsum(h0 * 2.0 ** rng.uniform(-0.5, 0.5, n - 1))])
        th = u + b * np.sin(g * u + psi) / g
        z = np.exp(1j * th) + rho * np.exp(1j * (m * th + phi))
        cols = [z.real, z.imag]
        if dim == 3:
            pitch = rng.choice([-1, 1]) * rng.uniform(0.1, 1.0)
            cols.append(pitch * th + rng.uniform(0, 0.3) * np.sin(2 * th + phi2))
        x = np.column_stack(cols)
        if dim == 3:
            x = x @ random_rotation(rng, 3, proper=True).T
        length = length0 * 10 ** rng.uniform(-0.5, 0.5)
        x = length * (x + rng.uniform(-3, 3, dim))
        tscale = tscale0 * 10 ** rng.uniform(-0.5, 0.5)
        t = tscale * (u + rng.uniform(-100, 100))
        ts.append(t)
        xs.append(x)
    sizes = [len(t) for t in ts]
    offsets = np.concatenate([[0], np.cumsum(sizes)]).astype(np.int64)
    order = draw(st.sampled_from([2, 4]))
    return {
        "t": np.concatenate(ts),
        "x": np.concatenate(xs),
        "offsets": offsets,
        "order": order,
        "dim": dim,
        "rng": rng,
    }


def random_rotation(rng, dim, proper):
    """Haar-random orthogonal matrix (QR of a Gaussian matrix, signs fixed), det +1 or -1."""
    q, r = np.linalg.qr(rng.standard_normal((dim, dim)))
    q = q * np.sign(np.diag(r))
    if (np.linalg.det(q) > 0) != proper:
        q[:, 0] = -q[:, 0]
    return q


def kin(p, t=None, x=None, **kw):
    kw = {"order": p["order"], "offsets": p["offsets"], **NO_THRESHOLDS, **kw}
    return osc.kinematics(p["t"] if t is None else t, p["x"] if x is None else x, **kw)


def tracks_of(offsets):
    return [slice(int(a), int(b)) for a, b in zip(offsets[:-1], offsets[1:])]


# -------------------------------------------------------------------------------------------------
# Stencils, checked against exact rational weights


def stencil_start(n, width):
    """First node of each sample's stencil: centred, slid inwards at the ends, same width.

    The kinematics docstring: "centred in the interior and one-sided of the same width at the ends".
    """
    return np.clip(np.arange(n) - width // 2, 0, n - width)


def weights(t, width, k):
    """Finite-difference weights of derivative k at each sample, shape (n, width), from the moment
    conditions sum_j w_j (t_j - t_i)^q / q! = [q == k], q < width (solved in float, scaled)."""
    n = len(t)
    width = min(width, n)
    start = stencil_start(n, width)
    nodes = t[start[:, None] + np.arange(width)]
    d = nodes - t[:, None]
    h = np.max(np.abs(d), axis=1, keepdims=True)
    q = np.arange(width)
    a = (d[:, None, :] / h[:, :, None]) ** q[None, :, None] / np.array([factorial(v) for v in q])[
        None, :, None
    ]
    rhs = np.zeros((n, width, 1))
    rhs[:, k, 0] = 1.0
    return np.linalg.solve(a, rhs)[:, :, 0] / h**k, start


def exact_weights(t, i, start, width, k):
    """The same moment conditions solved in rational arithmetic (exact on the float nodes)."""
    d = [Fraction(float(t[start + j])) - Fraction(float(t[i])) for j in range(width)]
    a = [[dj**q / factorial(q) for dj in d] + [Fraction(int(q == k))] for q in range(width)]
    for c in range(width):  # Gauss-Jordan elimination with exact pivots
        p = next(r for r in range(c, width) if a[r][c] != 0)
        a[c], a[p] = a[p], a[c]
        for r in range(width):
            if r != c and a[r][c] != 0:
                f = a[r][c] / a[c][c]
                a[r] = [x - f * y for x, y in zip(a[r], a[c])]
    return [a[j][width] / a[j][j] for j in range(width)]


@PROPS
@given(
    n=st.integers(7, 12),
    order=st.sampled_from([2, 4]),
    seed=st.integers(0, 2**32 - 1),
    log_h=st.floats(-3, 3),
    offset=st.floats(-1e4, 1e4),
)
def test_weights_match_exact_rational_weights(n, order, seed, log_h, offset):
    # The library's weights are read off by differentiating unit impulses (a stencil sum with one
    # non-zero term is exact), and compared with the exact rational solution of the moment
    # conditions on the same float nodes (Fornberg 1988: the unique weights exact on polynomials of
    # degree < width). Tolerance: C_WEIGHTS * width * U normwise (measured worst case ~13 U on 7
    # nodes over 300 random grids, so a factor ~4 of margin). This also pins the stencil placement.
    rng = np.random.default_rng(seed)
    h = 10**log_h * 2.0 ** rng.uniform(-0.5, 0.5, n - 1)
    t = offset + np.concatenate([[0.0], np.cumsum(h)])
    impulses = np.zeros((n * n, 2))
    impulses[np.arange(n) * n + np.arange(n), 0] = 1.0
    # Unit impulses look like pure noise to the data checks: their warning is expected here.
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", osc.SuspectDataWarning)
        d = osc.derivatives(np.tile(t, n), impulses, order=order, offsets=np.arange(n + 1) * n)
    low, high = WIDTHS[order]
    for k, got in ((1, d.velocity), (2, d.acceleration), (3, d.jerk)):
        width = low if k < 3 else high
        start = stencil_start(n, width)
        for i in range(n):
            cols = start[i] + np.arange(width)
            lib = got[cols * n + i, 0]  # weight of node j at sample i is d^(k)_i of impulse j
            ex = np.array([float(w) for w in exact_weights(t, i, start[i], width, k)])
            err = np.abs(lib - ex).sum()
            assert err <= C_WEIGHTS * width * U * np.abs(ex).sum(), (k, i, err)
        # All other nodes have weight zero: the stencil is where the documentation says.
        mask = np.ones((n, n), bool)
        mask[start[:, None] + np.arange(width), np.arange(n)[:, None]] = False
        assert np.all(got[:, 0].reshape(n, n)[mask] == 0.0)


# -------------------------------------------------------------------------------------------------
# Rounding-error bounds


def window_max(v, lo, hi):
    """max(v[lo[i]:hi[i]]) per sample."""
    return np.array([np.max(v[a:b]) for a, b in zip(lo, hi)])


def fd_bounds(t, x_norm, dx, speed, order, dt_err=None):
    """Bound on |computed r^(k) - r^(k) of the exact stencils on the exact data|, k = 1, 2, 3.

    e_k = S_k * ((width + C_WEIGHTS width) U X + dx + V dt): S_k the sum of |weights| (recomputed
    here), X the largest |position| the stencil reads (rounding of the stencil sum, Higham sec. 3.1,
    and of the weights, test_weights_...), dx the rounding of transformed positions, and, when the
    times themselves are perturbed by up to dt, V dt with V twice the largest estimated speed (the
    data were sampled at the unperturbed times: the change is sum_j w_j r'(t_j) dt_j).
    """
    n = len(t)
    out = []
    for k in (1, 2, 3):
        width = min(WIDTHS[order][0] if k < 3 else WIDTHS[order][1], n)
        if width <= k:
            out.append(np.full(n, np.nan))
            continue
        w, start = weights(t, width, k)
        s = np.abs(w).sum(axis=1)
        lo, hi = start, start + width
        data = (width + C_WEIGHTS * width) * U * window_max(x_norm, lo, hi) + window_max(dx, lo, hi)
        if dt_err is not None:
            data = data + 2 * window_max(speed, lo, hi) * window_max(dt_err, lo, hi)
        out.append(s * data)
    return out


def frenet_bounds(k, e1, e2, e3):
    """First-order bounds on the Frenet outputs given bounds e1, e2, e3 on r', r'', r'''.

    With c = r' x r'', v = |r'|: |dc| <= e1|r''| + v e2 + e1 e2 (+ rounding of the cross product,
    2 sqrt(3) U v |r''|); d(a/|a|) <= 2|da|/|a| for a normalized vector; then
    kappa = |c|/v^3, tau = c.r'''/|c|^2, a_t = r'.r''/v, a_n = |c|/v, omega = |c|/v^2 and
    domega/dt = c.(r' x r''')/(|c| v^2) - 2|c| a_t/v^3 are differentiated term by term. The few U
    added to each is the rounding of the formula itself.
    """
    v = k.speed
    a2 = np.linalg.norm(k.acceleration, axis=1)
    a3 = np.linalg.norm(k.jerk, axis=1)
    cn = k.accel_normal * v
    at, an, kap, tau, om = (
        k.accel_tangential,
        k.accel_normal,
        k.curvature,
        k.torsion,
        k.angular_speed,
    )
    dc = e1 * a2 + v * e2 + e1 * e2 + 2 * np.sqrt(3) * U * v * a2
    b = {}
    b["speed"] = e1 + 4 * U * v
    b["curvature"] = dc / v**3 + 3 * kap * e1 / v + 8 * U * kap
    b["signed_curvature"] = b["curvature"]
    b["torsion"] = (dc * a3 + cn * e3) / cn**2 + 2 * np.abs(tau) * dc / cn + 8 * U * np.abs(tau)
    b["radius"] = b["curvature"] / kap**2 + 4 * U / kap
    b["tangent"] = 2 * e1 / v + 4 * U
    b["binormal"] = 2 * dc / cn + 4 * U
    b["normal"] = b["binormal"] + b["tangent"] + 8 * U
    b["accel_tangential"] = e2 + 2 * e1 * a2 / v + 8 * U * (np.abs(at) + a2)
    b["accel_normal"] = dc / v + an * e1 / v + 8 * U * an
    b["angular_speed"] = dc / v**2 + 2 * om * e1 / v + 8 * U * om
    q = 2 * cn * np.abs(at) / v**3
    p = np.abs(k.angular_accel) + q
    dq = 2 * (dc * np.abs(at) + cn * b["accel_tangential"]) / v**3 + 3 * q * e1 / v
    dp = (dc * v * a3 + cn * (e1 * a3 + v * e3)) / (cn * v**2) + p * (dc / cn + 2 * e1 / v)
    b["angular_accel"] = dp + dq + 16 * U * (p + q)
    b["velocity"], b["acceleration"], b["jerk"] = e1, e2, e3
    return b


def close(name, got, want, tol, scale=None, tight=1e-6):
    """|got - want| <= tol row by row (vectors: Euclidean norm); NaN exactly where expected.

    With `scale`, also require the check to be sharp: median(tol / scale) < `tight`, so a defect of
    that relative size could not pass unnoticed.
    """
    got = np.asarray(got, float)
    want = np.broadcast_to(np.asarray(want, float), got.shape)
    nan_g, nan_w = np.isnan(got), np.isnan(want)
    assert np.array_equal(nan_g, nan_w), f"{name}: NaN pattern differs"
    diff = np.where(nan_w, 0.0, got - want)
    if diff.ndim == 2:
        diff = np.linalg.norm(diff, axis=1)
    tol = np.broadcast_to(tol, diff.shape)
    bad = ~(diff <= tol)
    if bad.any():
        with np.errstate(divide="ignore", invalid="ignore"):
            ratio = np.where(bad, diff / tol, 0.0)
        row = int(np.argmax(np.nan_to_num(ratio, nan=np.inf)))
        raise AssertionError(
            f"{name}: {bad.sum()} rows off; row {row}: |diff| {diff[row]:.3g} > tol {tol[row]:.3g}"
        )
    if scale is not None:
        ratio = np.median(tol / np.broadcast_to(scale, tol.shape))
        assert ratio < tight, f"{name}: tolerance {ratio:.2g} x scale is too loose to mean anything"


def row_norms(x):
    return np.linalg.norm(x, axis=1)


def per_track(p, fn):
    """Concatenate fn(slice) over the tracks."""
    return np.concatenate([fn(s) for s in tracks_of(p["offsets"])])


# -------------------------------------------------------------------------------------------------
# Exact transformations: identical results


@PROPS
@given(p=paths(), axis=st.integers(0, 2))
def test_mirror_of_one_coordinate_is_exact(p, axis):
    # Negating coordinate `axis` is exact in IEEE arithmetic and every stencil sum, cross product
    # and dot product only changes sign: T, N and the positions mirror, B mirrors with an extra
    # sign (the mirror has det -1), kappa stays, tau flips (invariance of the Frenet apparatus, any
    # differential geometry text). Tolerance: none (IEEE == on every value).
    dim = p["dim"]
    axis = axis % dim
    m = np.ones(dim)
    m[axis] = -1.0
    m3 = np.ones(3)
    m3[axis] = -1.0
    up = (0.0, 0.0, 1.0) if dim == 3 else None
    a = kin(p, up=up)
    b = kin(p, x=p["x"] * m, up=up)
    same = lambda u, v: np.array_equal(u, v, equal_nan=True)  # noqa: E731
    for name in ("velocity", "acceleration", "jerk", "tangent", "normal", "center"):
        assert same(getattr(b, name), getattr(a, name) * m), name
    assert same(b.binormal, -a.binormal * m3)
    for name in (*SCALARS_SAME, "arclength", "accel_tangential", "angular_accel"):
        want = -a.torsion if name == "torsion" else getattr(a, name)
        assert same(getattr(b, name), want), name
    # Signed curvature about +z: (-M c).z = -c.z unless the mirror is the z axis itself.
    flip = -1.0 if (dim == 2 or axis != 2) else 1.0
    assert same(b.signed_curvature, flip * a.signed_curvature)
    np.testing.assert_array_equal(b.flags, a.flags)


@PROPS
@given(p=paths(), power=st.integers(-30, 30))
def test_scaling_by_a_power_of_two_is_exact(p, power):
    # x -> 2^p x scales every derivative by 2^p exactly (no overflow or underflow at these sizes),
    # so kappa, tau -> kappa/2^p, tau/2^p, speeds and accelerations -> 2^p times, omega unchanged
    # (scaling of the Frenet apparatus, any differential geometry text). Tolerance: none.
    lam = 2.0**power
    a = kin(p)
    b = kin(p, x=p["x"] * lam)
    d_a = osc.derivatives(p["t"], p["x"], order=p["order"], offsets=p["offsets"])
    d_b = osc.derivatives(p["t"], p["x"] * lam, order=p["order"], offsets=p["offsets"])
    s_a = osc.arclength(p["t"], p["x"], offsets=p["offsets"])
    s_b = osc.arclength(p["t"], p["x"] * lam, offsets=p["offsets"])
    expect = {
        "curvature": 1 / lam,
        "signed_curvature": 1 / lam,
        "torsion": 1 / lam,
        "radius": lam,
        "speed": lam,
        "arclength": lam,
        "accel_tangential": lam,
        "accel_normal": lam,
        "angular_speed": 1.0,
        "angular_accel": 1.0,
        "velocity": lam,
        "acceleration": lam,
        "jerk": lam,
        "tangent": 1.0,
        "normal": 1.0,
        "binormal": 1.0,
        "center": lam,
    }
    for name, f in expect.items():
        assert np.array_equal(getattr(b, name), getattr(a, name) * f, equal_nan=True), name
    for name in ("velocity", "acceleration", "jerk"):
        assert np.array_equal(getattr(d_b, name), getattr(d_a, name) * lam, equal_nan=True), name
    np.testing.assert_array_equal(d_b.flags, d_a.flags)
    np.testing.assert_array_equal(s_b, s_a * lam)
    np.testing.assert_array_equal(b.flags, a.flags)


@PROPS
@given(p=paths(), shift=st.integers(-(2**30), 2**30))
def test_time_shift_on_a_dyadic_grid_is_exact(p, shift):
    # On times that are multiples of 2^-20 below 2^31, t + shift * 2^-20 and every difference of
    # times are exact, so the weights and all results are identical (the estimates depend on time
    # differences only; Fornberg 1988). Tolerance: none.
    q = 2.0**-20
    t = np.round(p["t"] / p["t"].std() * 2**5 / q) * q  # rescaled to |t| < 2^30, on the grid
    for s in tracks_of(p["offsets"]):
        assert np.all(np.diff(t[s]) > 0)
    a = kin(p, t=t)
    b = kin(p, t=t + shift * q)
    assert np.array_equal(t + shift * q - shift * q, t)  # the shift is exact
    for name in ("curvature", "torsion", "tangent", "normal", "binormal", "jerk", "angular_accel"):
        assert np.array_equal(getattr(b, name), getattr(a, name), equal_nan=True), name
    np.testing.assert_array_equal(b.flags, a.flags)


# -------------------------------------------------------------------------------------------------
# Inexact transformations: agreement within the rounding bound


@PROPS
@given(
    p=paths(),
    proper=st.booleans(),
    log_scale=st.floats(-2, 2),
    log_move=st.floats(-1, 2),
)
def test_similarity_transform(p, proper, log_scale, log_move):
    # x' = lam Q x + b with Q orthogonal: scalars scale with their dimension, vectors rotate with Q,
    # B turns with det(Q) Q, tau and the signed curvature change sign with det(Q) (invariance and
    # scaling of the Frenet apparatus, any differential geometry text; the FD stencils are linear
    # and act on each coordinate alike). Tolerance: twice the first-order rounding bound of both
    # computations (fd_bounds, frenet_bounds), checked to be sharp.
    dim, rng = p["dim"], p["rng"]
    q = random_rotation(rng, dim, proper)
    det = np.linalg.det(q).round()
    q3 = np.eye(3)
    q3[:dim, :dim] = q
    lam = 10.0**log_scale
    x = p["x"]
    size = np.max(np.ptp(x, axis=0))
    b = size * 10**log_move * rng.uniform(-1, 1, dim)
    x2 = (lam * x) @ q.T + b
    up = np.array([0.0, 0.0, 1.0]) if dim == 3 else None
    ka = kin(p, up=up)
    kb = kin(p, x=x2, up=None if up is None else q3 @ up)

    # Rounding of x2 = fl(fl(lam x) Q^T + b): (dim + 2) U per component of lam |x| + |b|.
    xn, xn2 = row_norms(x), row_norms(x2)
    dx2 = dim * (dim + 2) * U * (lam * xn + np.linalg.norm(b))
    e = [np.zeros(len(x)) for _ in range(3)]
    for s in tracks_of(p["offsets"]):
        ea = fd_bounds(p["t"][s], xn[s], 0 * xn[s], ka.speed[s], p["order"])
        eb = fd_bounds(p["t"][s], xn2[s], dx2[s], kb.speed[s], p["order"])
        for j in range(3):
            e[j][s] = ea[j] + eb[j] / lam  # both computations, in the units of the first
    bnd = frenet_bounds(ka, *e)

    kap = ka.curvature
    scales = {"curvature": kap, "speed": ka.speed, "tangent": 1.0, "normal": 1.0, "radius": 1 / kap}
    expect = {
        "speed": (ka.speed, lam),
        "curvature": (ka.curvature, 1 / lam),
        "torsion": (ka.torsion, det / lam),
        "radius": (ka.radius, lam),
        "accel_tangential": (ka.accel_tangential, lam),
        "accel_normal": (ka.accel_normal, lam),
        "angular_speed": (ka.angular_speed, 1.0),
        "angular_accel": (ka.angular_accel, 1.0),
        "signed_curvature": (ka.signed_curvature, det / lam),
    }
    for name, (want, f) in expect.items():
        got = getattr(kb, name) / f  # exact for f = 1 and +-1/lam up to one rounding: + 2U|want|
        close(name, got, want, 2 * bnd[name] + 2 * U * np.abs(want), scales.get(name))
    for name, turn in (("velocity", lam), ("acceleration", lam), ("jerk", lam)):
        want = getattr(ka, name) @ q.T
        got = getattr(kb, name) / turn
        # Q v in float: dim U |v| more.
        tol = 2 * bnd[name] + 2 * dim * U * row_norms(want)
        close(name, got, want, tol)
    for name, m in (("tangent", q), ("normal", q), ("binormal", det * q3)):
        want = getattr(ka, name) @ m.T
        close(name, getattr(kb, name), want, 2 * bnd[name] + 6 * U, scales.get(name))
    # Centre of curvature r + rho N: moved like the points; rounding of r' is dx2, of rho N below.
    # c' - (lam Q c + b) = rounding of x2 (dx2) + lam (rho dN + drho) + rounding of r + rho N in
    # both runs and of lam Q c + b here (4 dim U of the magnitudes).
    want = (lam * ka.center) @ q.T + b
    mags = lam * (xn + ka.radius + row_norms(ka.center)) + np.linalg.norm(b)
    tol = dx2 + 2 * lam * (ka.radius * bnd["normal"] + bnd["radius"]) + 4 * dim * U * mags
    close("center", kb.center, want, tol)
    np.testing.assert_array_equal(kb.flags, ka.flags)

    # Arc length: each segment |x_j - x_{j-1}| moves by the rounding of both points and of the
    # norm, (dim + 3) U; the cumulative sums add U per term (recursive summation, Higham sec. 4.2).
    sa = osc.arclength(p["t"], x, offsets=p["offsets"])
    sb = osc.arclength(p["t"], x2, offsets=p["offsets"])

    def s_tol(s):
        seg = np.diff(sa[s], prepend=0.0)
        per = 2 * np.r_[0.0, np.maximum(dx2[s][1:], dx2[s][:-1])] / lam + (dim + 3) * U * 2 * seg
        j = np.arange(s.stop - s.start)
        return np.cumsum(per) + 2 * j * U * sa[s]

    close("arclength", sb / lam, sa, 2 * per_track(p, s_tol) + U * sa)
    np.testing.assert_array_equal(ka.arclength, sa)  # the kinematics' own column is the same sum


def reverse_rows(p):
    """Row permutation that reverses every track in place."""
    return per_track(p, lambda s: np.arange(s.stop - 1, s.start - 1, -1))


@PROPS
@given(p=paths())
def test_reversal_of_direction(p):
    # Running the path backwards (t -> -t, rows reversed): kappa, tau, speed, a_n, omega and N
    # stay; T, B, r', r''' and a_t change sign (reversal of the Frenet apparatus, any differential
    # geometry text; the stencil placement is mirror-symmetric). Times are negated exactly and the
    # data are the same, so only the order of the rounding changes: tolerance twice the rounding
    # bound of both computations (fd_bounds), checked to be sharp.
    rev = reverse_rows(p)  # an involution: row j of the reversed run is row rev[j] of the first
    t2 = -p["t"][rev]
    x2 = p["x"][rev]
    up = (0.0, 0.0, 1.0) if p["dim"] == 3 else None
    ka = kin(p, up=up)
    kb = kin(p, t=t2, x=x2, up=up)
    xn = row_norms(p["x"])
    e = [np.zeros(len(xn)) for _ in range(3)]
    for s in tracks_of(p["offsets"]):
        ea = fd_bounds(p["t"][s], xn[s], 0 * xn[s], ka.speed[s], p["order"])
        for j in range(3):
            e[j][s] = 2 * ea[j]
    bnd = frenet_bounds(ka, *e)
    sign = {
        "speed": 1,
        "curvature": 1,
        "torsion": 1,
        "radius": 1,
        "accel_normal": 1,
        "angular_speed": 1,
        "accel_tangential": -1,
        "angular_accel": -1,
        "signed_curvature": -1,
        "velocity": -1,
        "acceleration": 1,
        "jerk": -1,
        "tangent": -1,
        "normal": 1,
        "binormal": -1,
    }
    scales = {"curvature": ka.curvature, "speed": ka.speed, "tangent": 1.0, "normal": 1.0}
    for name, f in sign.items():
        want = f * getattr(ka, name)
        got = getattr(kb, name)[rev]
        close(name, got, want, 2 * bnd[name], scales.get(name))
    np.testing.assert_array_equal(kb.flags[rev], ka.flags)
    # Arc length from the other end: s_rev = L - s. The segment lengths are bit-identical (the
    # same squares); only the summation order differs: (n - 1) U L each way (Higham sec. 4.2).
    sa, sb = ka.arclength, kb.arclength[rev]
    for s in tracks_of(p["offsets"]):
        total = sa[s][-1]
        n = s.stop - s.start
        close("arclength", sb[s], total - sa[s], 2 * n * U * total + U * total, total, 1e-12)


@PROPS
@given(p=paths(), log_shift=st.floats(-1, 3), neg=st.booleans())
def test_time_shift(p, log_shift, neg):
    # t -> t + t0 leaves every output unchanged (the estimates depend on time differences only).
    # fl(t + t0) moves each time by up to U |t + t0|, which moves r^(k) by at most
    # S_k * max|r'| * U |t + t0| (fd_bounds with dt). Tolerance twice the bound, checked sharp.
    span = np.ptp(p["t"])
    t0 = (-1) ** neg * span * 10**log_shift
    t2 = p["t"] + t0
    for s in tracks_of(p["offsets"]):
        assert np.all(np.diff(t2[s]) > 0)
    ka = kin(p)
    kb = kin(p, t=t2)
    xn = row_norms(p["x"])
    e = [np.zeros(len(xn)) for _ in range(3)]
    for s in tracks_of(p["offsets"]):
        z = 0 * xn[s]
        ea = fd_bounds(p["t"][s], xn[s], z, ka.speed[s], p["order"], dt_err=U * np.abs(p["t"][s]))
        eb = fd_bounds(t2[s], xn[s], z, ka.speed[s], p["order"], dt_err=U * np.abs(t2[s]))
        for j in range(3):
            e[j][s] = ea[j] + eb[j]
    bnd = frenet_bounds(ka, *e)
    scales = {"curvature": ka.curvature, "speed": ka.speed, "tangent": 1.0}
    for name in (*SCALARS_SAME, "accel_tangential", "tangent", "normal", "binormal", "jerk"):
        got, want = getattr(kb, name), getattr(ka, name)
        close(name, got, want, 2 * bnd[name], scales.get(name))
    np.testing.assert_array_equal(kb.arclength, ka.arclength)  # positions only
    np.testing.assert_array_equal(kb.flags, ka.flags)


# -------------------------------------------------------------------------------------------------
# Identities within one computation


@PROPS
@given(p=paths())
def test_frame_is_orthonormal_and_splits_the_acceleration(p):
    k = kin(p)
    t, n, b = k.tangent, k.normal, k.binormal
    dim = p["dim"]
    t3 = np.zeros((len(t), 3))
    t3[:, :dim] = t
    n3 = np.zeros((len(t), 3))
    n3[:, :dim] = n
    assert not k.flagged(osc.Flag.STOPPED | osc.Flag.STRAIGHT).any()  # well-conditioned paths
    # Unit vectors: a/|a| in floating point has |.| within (dim/2 + 2) U of 1 (norm: dim/2 U + U,
    # division: U); the normal N = B x T adds the cross product's 2 U per component. Tolerance
    # 8 U for T and B, 16 U for N (a factor 2 over the bound), any error analysis of normalization.
    close("|T|", row_norms(t), 1.0, 8 * U)
    close("|B|", row_norms(b), 1.0, 8 * U)
    close("|N|", row_norms(n), 1.0, 16 * U)
    # N = fl(B x T) is orthogonal to T and B up to the cross product's rounding (2 sqrt(2) U
    # per unit vector) and the dot product's (3 U): tolerance 16 U.
    close("T.N", np.sum(t3 * n3, axis=1), 0.0, 16 * U)
    close("B.N", np.sum(b * n3, axis=1), 0.0, 16 * U)
    # B = c/|c| with c = fl(r' x r''): |fl(c) - c| <= 2 sqrt(3) U v |r''|, so
    # |B.T| <= 2 sqrt(3) U v |r''| / |c| + 8 U; tolerance twice that (conditioning: 1/sin of the
    # angle between r' and r'').
    v, a2 = k.speed, row_norms(k.acceleration)
    cn = k.accel_normal * v
    close("B.T", np.sum(b * t3, axis=1), 0.0, 2 * (2 * np.sqrt(3) * U * v * a2 / cn + 8 * U))
    # r'' = a_t T + a_n N (decomposition identity, any mechanics text). a_t T is rounded by
    # ~ (3 + 7) U (|r''| + |a_t|); a_n N by ~ 7 U |r''| through N (the conditioning cancels:
    # a_n = |c|/v) plus 3.5 U |r''| + 3 U a_n through a_n: tolerance 32 U (|r''| + |a_t| + a_n),
    # twice that sum.
    rebuilt = k.accel_tangential[:, None] * t + k.accel_normal[:, None] * n
    tol = 32 * U * (a2 + np.abs(k.accel_tangential) + k.accel_normal)
    close("a_t T + a_n N", rebuilt, k.acceleration, tol)
    # T = r'/v, a_t = T.r'', a_n = |r' x r''|/v and omega = kappa v (definitions): a few U.
    close("v T", v[:, None] * t, k.velocity, 4 * dim * U * v)
    close("kappa v^2", k.curvature * v**2, k.accel_normal, 8 * U * k.accel_normal)
    close("kappa v", k.curvature * v, k.angular_speed, 8 * U * k.angular_speed)
    close("1/kappa", 1 / k.curvature, k.radius, 4 * U * k.radius)


def horner_bound(u, c):
    """Rounding bound of numpy's Horner evaluation of sum_j c_j u^j: 2 deg U sum_j |c_j| |u|^j
    (Higham sec. 5.1), per row, as a Euclidean norm over the columns of c."""
    poly = np.polynomial.polynomial
    deg = len(c) - 1
    return 2 * max(deg, 1) * U * row_norms(poly.polyval(np.abs(u), np.abs(c)).T)


@PROPS
@given(p=paths(max_n=30), seed=st.integers(0, 2**32 - 1))
def test_derivatives_are_exact_on_polynomials(p, seed):
    # A stencil of w nodes differentiates polynomials of degree < w exactly (Fornberg 1988): with
    # degree width - 1 per coordinate, r' and r'' are exact on widths 3 / 5 and r''' on 5 / 7
    # (orders 2 / 4), on every sample including the one-sided ends. Expected values: the
    # polynomial's derivatives (closed form). Tolerance: no truncation error at all, only
    # rounding: fd_bounds with the rounding of the data (Horner, and u = t - mean moving each node
    # by U |u|), plus the rounding of the reference derivative; checked to be sharp.
    rng = np.random.default_rng(seed)
    poly = np.polynomial.polynomial
    order, dim = p["order"], p["dim"]
    for s in tracks_of(p["offsets"]):
        t = p["t"][s]
        u = t - t.mean()  # a centred, well-scaled polynomial per track
        for k, width in ((1, WIDTHS[order][0]), (2, WIDTHS[order][0]), (3, WIDTHS[order][1])):
            deg = width - 1
            c = rng.standard_normal((deg + 1, dim)) / np.ptp(u) ** np.arange(deg + 1)[:, None]
            x = poly.polyval(u, c).T
            ck = poly.polyder(c, k)
            want = poly.polyval(u, ck).T
            speed = row_norms(poly.polyval(u, poly.polyder(c, 1)).T)
            xn = row_norms(x)
            e = fd_bounds(t, xn, horner_bound(u, c), speed, order, dt_err=U * np.abs(u))[k - 1]
            tol = e + horner_bound(u, ck)
            d = osc.derivatives(t, x, order=order)
            got = (d.velocity, d.acceleration, d.jerk)[k - 1]
            close(f"r^({k})", got, want, tol, row_norms(want) + np.max(row_norms(want)), 1e-8)


# -------------------------------------------------------------------------------------------------
# Batches and threads


@PROPS
@given(p=paths(max_tracks=5, min_n=5, max_n=30), shuffle_seed=st.integers(0, 2**32 - 1))
def test_batch_equals_per_track_bit_for_bit(p, shuffle_seed):
    # Tracks are independent: the same bits whether a track is computed alone, in a batch given by
    # offsets, or with interleaved rows given by track ids (design: no cross-track arithmetic).
    rng = np.random.default_rng(shuffle_seed)
    sizes = np.diff(p["offsets"])
    ids_grouped = np.repeat(rng.permutation(len(sizes)) * 7 - 3, sizes)  # arbitrary int ids
    pos = rng.permutation(len(ids_grouped))
    for lab in np.unique(ids_grouped):  # keep each track's rows in time order
        rows = ids_grouped == lab
        pos[rows] = np.sort(pos[rows])
    t = np.empty_like(p["t"])
    x = np.empty_like(p["x"])
    ids = np.empty_like(ids_grouped)
    t[pos], x[pos], ids[pos] = p["t"], p["x"], ids_grouped

    def bits(a):
        a = np.ascontiguousarray(a)
        return a.view(np.uint64) if a.dtype == np.float64 else a

    order = p["order"]
    by_ids = osc.kinematics(t, x, order=order, tracks=ids)
    by_off = osc.kinematics(p["t"], p["x"], order=order, offsets=p["offsets"])
    d_ids = osc.derivatives(t, x, order=order, tracks=ids)
    s_ids = osc.arclength(t, x, tracks=ids)
    names = ("velocity", "jerk", "tangent", "binormal", "torsion", "arclength", "center", "flags")
    for s, lab in zip(tracks_of(p["offsets"]), ids_grouped[p["offsets"][:-1]]):
        single = osc.kinematics(p["t"][s], p["x"][s], order=order)
        rows = ids == lab
        for name in names:
            want = bits(getattr(single, name))
            assert np.array_equal(bits(getattr(by_ids, name)[rows]), want), name
            assert np.array_equal(bits(getattr(by_off, name)[s]), want), name
        d1 = osc.derivatives(p["t"][s], p["x"][s], order=order)
        for name in d1._fields:
            assert np.array_equal(bits(getattr(d_ids, name)[rows]), bits(getattr(d1, name))), name
        s1 = osc.arclength(p["t"][s], p["x"][s])
        assert np.array_equal(bits(s_ids[rows]), bits(s1))
    assert np.array_equal(by_ids.tracks, ids)


THREADS_SCRIPT = textwrap.dedent(
    """
    import hashlib, sys
    import numpy as np
    import osculate as osc

    rng = np.random.default_rng(7)
    # 300 short tracks, one long track of 3 parallel jobs (16384 rows each) and one with NaN rows.
    sizes = [int(v) for v in rng.integers(5, 60, 300)] + [40000, 3000]
    t = np.concatenate([np.cumsum(rng.uniform(0.5, 1.5, n)) for n in sizes])
    x = np.column_stack([np.cos(0.1 * t), np.sin(0.13 * t), 0.01 * t**1.5])
    x += 1e-3 * rng.standard_normal(x.shape)
    x[-100:-90, 1] = np.nan
    off = np.concatenate([[0], np.cumsum(sizes)])
    h = hashlib.sha256()
    for order in (2, 4):
        k = osc.kinematics(t, x, order=order, offsets=off, up=(0, 0, 1))
        for name in sorted(vars(k)):
            v = getattr(k, name)
            if isinstance(v, np.ndarray) and v.dtype != object:
                h.update(name.encode() + np.ascontiguousarray(v).tobytes())
    # The fitting estimators (parallel smoothing search, GCV window choice) on 60 short tracks and
    # on 8000 rows of the long one.
    long = slice(int(off[300]), int(off[300]) + 8000)
    for rows, o in ((slice(0, int(off[60])), off[:61]), (long, [0, long.stop - long.start])):
        for method in ("spline", "smooth", "local"):
            k = osc.kinematics(t[rows], x[rows], method=method, offsets=o)
            for name in ("curvature", "torsion", "speed", "flags"):
                h.update(method.encode() + name.encode() + getattr(k, name).tobytes())
    h.update(osc.arclength(t, x, offsets=off).tobytes())
    h.update(osc.derivatives(t[:-3000], x[:-3000], offsets=off[:-1]).jerk.tobytes())
    print(h.hexdigest())
    """
)


def test_results_do_not_depend_on_the_number_of_threads():
    # The kernels split work into per-track jobs on the rayon pool and reduce nothing across jobs,
    # so 1, 2 or 3 worker threads must give the same bits (design of osculate.batch).
    digests = set()
    for threads in ("1", "2", "3"):
        env = {**os.environ, "RAYON_NUM_THREADS": threads}
        out = subprocess.run(
            [sys.executable, "-c", THREADS_SCRIPT],
            env=env,
            capture_output=True,
            text=True,
            timeout=120,
            check=True,
        )
        digests.add(out.stdout.strip())
    assert len(digests) == 1, digests


def test_the_first_bad_track_is_reported_whatever_the_threads():
    # check_times documents "Reports the first offending track and row"; with several bad tracks
    # the error must name the first one on every call and for any thread count (regression: it
    # named whichever bad track a worker reached first). Tracks 31 (at its last row) and 32..63 (at
    # row 1) are bad: a thread that starts on the second half finds one long before the first
    # track's scan ends.
    script = textwrap.dedent(
        """
        import numpy as np, osculate as osc
        m, n = 64, 50000
        t = np.tile(np.arange(n, dtype=float), m)
        t[31 * n + n - 1] = t[31 * n + n - 2]
        for b in range(32, m):
            t[b * n + 1] = t[b * n]
        seen = set()
        for _ in range(40):
            try:
                osc.arclength(t, np.zeros((m * n, 2)), offsets=np.arange(m + 1) * n)
            except osc.InputError as err:
                seen.add(err.track)
        print(sorted(seen))
        """
    )
    env = {**os.environ, "RAYON_NUM_THREADS": "8"}
    out = subprocess.run(
        [sys.executable, "-c", script], env=env, capture_output=True, text=True, timeout=120
    )
    assert out.returncode == 0, out.stderr
    assert out.stdout.strip() == "[31]"


# -------------------------------------------------------------------------------------------------
# Stress harness: arbitrary arrays, dtypes, layouts and options through every public function


DTYPES = [
    np.float64,
    np.float32,
    np.float16,
    np.int8,
    np.int64,
    np.uint64,
    np.bool_,
    np.complex128,
    np.dtype("U3"),
    np.dtype("M8[s]"),
    np.dtype(">f8"),  # big-endian
    np.longdouble,
]
ANY_FLOAT = st.floats(allow_nan=True, allow_infinity=True)


def any_array(shapes):
    return st.one_of(
        hnp.arrays(st.sampled_from(DTYPES), st.sampled_from(shapes)),
        st.sampled_from(shapes).flatmap(lambda s: hnp.arrays(np.float64, s, elements=ANY_FLOAT)),
    )


ANY_NUMBER = st.one_of(
    ANY_FLOAT,
    st.integers(-(2**1100), 2**1100),
    st.text(max_size=2),
    st.none(),
    st.booleans(),
    st.sampled_from([np.float32(1.5), np.int64(3), np.array([1.0, 2.0]), [1.0], 1j]),
)
VALID = {
    "order": st.sampled_from([2, 4]),
    "degree": st.sampled_from([3, 4, 5]),
    "window": st.integers(3, 9),
    "bc": st.sampled_from(["not-a-knot", "natural"]),
    "smoothing": st.floats(1e-3, 1e3),
    "noise": st.floats(1e-3, 1.0),
    "window_span": st.floats(0.5, 5.0),
}
ANY_INT = st.one_of(
    st.integers(-3, 12),
    st.integers(-(2**70), 2**70),
    ANY_FLOAT,
    st.text(max_size=2),
    st.none(),
    st.booleans(),
    st.sampled_from([np.int8(3), np.uint64(5), 2.0, 4.0, [2]]),
)
OPTIONS = {
    "fd": ["order"],
    "spline": ["bc", "bc_velocity"],
    "smooth": ["degree", "smoothing", "noise", "weights"],
    "local": ["degree", "window", "window_span"],
}


@st.composite
def calls(draw):
    """A call of a public function: (name, args, kwargs with the follow-up `_query`, `_nu`).

    Half of the calls are well-formed in type and shape (so they reach the kernels) with extreme
    values: NaN, inf, 1e300, 1e-300 coordinates, huge, tiny or coincident time steps, any number
    of tracks. The other half are anything: dtypes, shapes, layouts, options of any type.
    """
    well_formed = draw(st.booleans())
    n = draw(st.integers(5 if well_formed else 0, 14))
    if n and well_formed:  # increasing, with steps varying a millionfold
        start = draw(st.floats(-1e6, 1e6))
        t = start + np.cumsum(draw(hnp.arrays(np.float64, n, elements=st.floats(1e-3, 1e3))))
    elif n and draw(st.booleans()):  # non-decreasing, with extreme or coincident steps
        steps = st.floats(1e-300, 1e300) | st.floats(0.01, 2) | st.just(0.0)
        t = np.cumsum(draw(hnp.arrays(np.float64, n, elements=steps)))
    else:
        t = draw(any_array([(n,), (n, 1), (), (n + 1,)]))
    pos = st.floats(-10, 10) | ANY_FLOAT
    x = hnp.arrays(np.float64, st.sampled_from([(n, 2), (n, 3)]), elements=pos)
    if not well_formed:
        x |= any_array([(n, 2), (n, 3), (n,), (n, 4), (n, 3, 1), (n + 1, 3), (n, 0)])
    x = draw(x)
    if x.ndim == 2 and draw(st.booleans()):
        x = np.asfortranarray(x)
    if draw(st.booleans()):
        x = x[::-1]  # a negative-stride view
    fn = draw(st.sampled_from(["kinematics", "derivatives", "arclength", "fit", "geodesy"]))
    if fn == "geodesy":
        if well_formed:
            coords = [draw(hnp.arrays(np.float64, n, elements=pos)) for _ in range(3)]
        else:
            coords = [draw(any_array([(n,), (), (n, 1)])) for _ in range(3)]
        origin = draw(st.none() | any_array([(3,), (2,), (1, 3)]))
        ids = draw(st.none() | any_array([(n,)]))
        inverse = draw(st.booleans())
        name = "enu_to_geodetic" if inverse else "geodetic_to_enu"
        if inverse and origin is None:
            origin = np.zeros(3)
        return name, (*coords, origin), {"tracks": ids, "_query": None, "_nu": 0}
    methods = ["spline", "smooth", "local"] if fn == "fit" else ["fd", "spline", "smooth", "local"]
    method = draw(st.sampled_from(methods if well_formed else [*methods, "bogus"]))
    kw = {"method": method}
    names = OPTIONS.get(method, [])
    if not well_formed and draw(st.booleans()):  # options of another method
        names = sorted({v for opts in OPTIONS.values() for v in opts})
    for name in names:
        if draw(st.booleans()):
            continue
        if name in VALID and (well_formed or draw(st.booleans())):
            kw[name] = draw(VALID[name])
        elif well_formed:
            continue
        elif name in ("order", "degree", "window"):
            kw[name] = draw(ANY_INT)
        elif name == "bc":
            kw[name] = draw(st.sampled_from(["not-a-knot", "natural", "clamped", "x", None, 3]))
        elif name in ("bc_velocity", "weights"):
            kw[name] = draw(any_array([(2, 2), (2, 3), (n,), (3,)]) | st.none())
        else:
            kw[name] = draw(ANY_NUMBER)
    threshold = st.floats(0, 1e300) if well_formed else ANY_NUMBER
    gap = st.floats(1.0, 1e300, exclude_min=True) | st.just(np.inf) if well_formed else ANY_NUMBER
    if fn in ("kinematics", "derivatives") and not draw(st.integers(0, 2)):
        kw["gap_factor"] = draw(gap)
    if fn == "kinematics":
        for name in ("min_speed", "min_curvature"):
            if not draw(st.integers(0, 2)):
                kw[name] = draw(threshold)
        if not draw(st.integers(0, 2)) and (x.shape[-1:] == (3,) or not well_formed):
            up = st.tuples(ANY_FLOAT, ANY_FLOAT, ANY_FLOAT)
            kw["up"] = draw(up if well_formed else up | st.lists(ANY_FLOAT) | st.text(max_size=3))
    grouping = draw(st.sampled_from(["none", "tracks", "offsets"]))
    if grouping == "tracks" and well_formed:
        kw["tracks"] = draw(hnp.arrays(np.int64, n, elements=st.integers(0, 3)))
    elif grouping == "tracks":
        kw["tracks"] = draw(any_array([(n,), (n, 1), (n + 1,)]))
    elif grouping == "offsets" and well_formed:
        cuts = draw(st.lists(st.integers(1, max(n - 1, 1)), max_size=4, unique=True))
        kw["offsets"] = np.array([0, *sorted(c for c in cuts if c < n), n])
    elif grouping == "offsets":
        kw["offsets"] = draw(
            st.lists(st.integers(-(2**63), 2**64 - 1), max_size=5)
            | st.lists(st.integers(0, n), max_size=5).map(sorted)
            | hnp.arrays(st.sampled_from([np.int64, np.uint64, np.float64, np.int8]), (3,))
        )
    query = draw(ANY_FLOAT | any_array([(3,), (), (2, 2)]))
    nu = draw(st.integers(0, 3) if well_formed else ANY_INT)
    return fn, (t, x), {**kw, "_query": query, "_nu": nu}


DOCUMENTED = (osc.InputError, TypeError, MemoryError)


@settings(
    deadline=None,
    max_examples=400,
    derandomize=True,
    suppress_health_check=list(HealthCheck),
)
@given(call=calls())
def test_stress_harness_only_documented_exceptions(call):
    # Any input whatever: each public function returns, or raises InputError / TypeError /
    # MemoryError (README: "raises osc.InputError (a ValueError) naming the argument", TypeError
    # for non-real input). Never a PanicException, RuntimeError or any other exception, and the
    # inputs are never modified. Known, reported bugs (tests/test_fuzz_regressions.py KNOWN_BUGS,
    # each a strict xfail there) are let through until they are fixed.
    fn, args, kw = call
    query, nu = kw.pop("_query"), kw.pop("_nu")
    arrays = [a for a in (*args, *kw.values()) if isinstance(a, np.ndarray)]
    before = [a.copy() for a in arrays]
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("error")
            # Random data in arbitrary units may rightly look suspect: that warning is documented.
            warnings.simplefilter("ignore", osc.SuspectDataWarning)
            result = getattr(osc, fn)(*args, **kw)
            event(f"{fn} returned")
            if isinstance(result, osc.Kinematics):
                result.summary_arrays()
                result.to_pandas()
                assert result.flags.dtype == np.uint8
            if isinstance(result, osc.Path):
                for follow_up in (
                    lambda: result(query, nu),
                    lambda: result.kinematics(query),
                    lambda: result.arclength(query),
                ):
                    try:
                        follow_up()
                    except DOCUMENTED:
                        pass
    except DOCUMENTED as exc:
        event(f"{fn}: {type(exc).__name__}: {str(exc)[:40]}")
    except BaseException as exc:
        if not known_bug(exc):
            raise
    for a, b in zip(arrays, before):
        assert a.tobytes() == b.tobytes(), "an input was modified"  # bitwise: NaN, NaT alike

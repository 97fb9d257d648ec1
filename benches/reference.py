"""A vectorized NumPy implementation of ``osculate.kinematics(method="fd", order=2)``.

It computes the same outputs with the same definitions as the Rust kernel (src/diff.rs,
src/frame.rs, src/kinematics.rs), written the way a careful NumPy user would: whole-array
operations, no per-sample Python loops.

Derivatives
    Three-point stencils for r′ and r″, five points for r‴, centred in the interior and slid inwards
    (one-sided, same width) at the ends of a track. The weights are the derivatives of the Lagrange
    basis polynomials at the evaluation time; with node offsets h_k = t_k − t_i and
    D_j = Π_{k≠j} (h_j − h_k):

    * 3 nodes: w′_j = −(Σ_{k≠j} h_k) / D_j and w″_j = 2 / D_j
      (since Π_{k≠j} (u − h_k) = u² − (Σ h_k) u + Π h_k);
    * 5 nodes: w‴_j = −6 (Σ_{k≠j} h_k) / D_j
      (the u³ coefficient of Π_{k≠j} (u − h_k) is −Σ h_k, and d³/du³ of u⁴ vanishes at u = 0).

    These are the weights that Fornberg's recursion produces (B. Fornberg, Math. Comp. 51 (1988)
    699–706); the interior and edge first derivatives equal ``numpy.gradient(edge_order=2)``.

Frenet apparatus (c = r′ × r″, v = |r′|)
    T = r′/v, B = c/|c|, N = B × T, κ = |c|/v³, τ = c·r‴/|c|², ρ = 1/κ, a_t = r′·r″/v,
    a_n = |c|/v, ω = |c|/v², dω/dt = c·(r′ × r‴)/(|c| v²) − 2|c| a_t/v³, centre = r + ρN, signed
    curvature c·up/v³; flags STOPPED, STRAIGHT, EDGE, GAP exactly as the kernel sets them.

Scope: 3-D positions, every position finite, at least 5 samples per track (the kernel also handles
2-D paths, non-finite rows and 3- or 4-sample tracks; the benchmarks use none of those).
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any, Optional

import numpy as np
import numpy.typing as npt

F64 = npt.NDArray[np.float64]
Outputs = dict[str, np.ndarray]

STOPPED, STRAIGHT, EDGE, GAP = 1, 2, 4, 8
#: Relative size of |r′ × r″| below which r′ and r″ count as parallel (as in src/frame.rs).
PARALLEL_EPS = 64.0 * np.finfo(np.float64).eps

#: Output names, in the order of ``osculate.Kinematics``.
FIELDS = (
    "velocity",
    "acceleration",
    "jerk",
    "speed",
    "arclength",
    "tangent",
    "normal",
    "binormal",
    "curvature",
    "signed_curvature",
    "torsion",
    "radius",
    "center",
    "accel_tangential",
    "accel_normal",
    "angular_speed",
    "angular_accel",
    "flags",
)

MIN_SAMPLES = 5


# --------------------------------------------------------------------------------------------
# A block of tracks: times (B, L), positions component-major (3, B, L) so that every array
# operation runs along contiguous memory; track b holds its samples in [0, lengths[b]).
# --------------------------------------------------------------------------------------------


def _stencil_node(a: np.ndarray, lengths: np.ndarray, width: int, j: int) -> np.ndarray:
    """``out[b, i] = a[b, s + j]`` where ``s = clip(i - width // 2, 0, lengths[b] - width)``."""
    length = a.shape[1]
    half = width // 2
    right = width - 1 - half
    out = np.empty_like(a)
    out[:, half : length - right] = a[:, j : length - width + 1 + j]
    out[:, :half] = a[:, j : j + 1]
    out[:, length - right :] = a[:, length - width + j : length - width + j + 1]
    rows = np.arange(a.shape[0])
    for e in range(right):
        out[rows, lengths - 1 - e] = a[rows, lengths - width + j]
    return out


def _apply_stencil(weights: Sequence[F64], x: F64, lengths: np.ndarray, width: int) -> F64:
    """Σ_j weights[j] · x[:, node j] for x of shape (3, B, L), summed in node order."""
    length = x.shape[2]
    half = width // 2
    right = width - 1 - half
    out = np.empty_like(x)
    mid = slice(half, length - right)
    acc = weights[0][:, mid] * x[:, :, 0 : length - width + 1]
    for j in range(1, width):
        acc += weights[j][:, mid] * x[:, :, j : length - width + 1 + j]
    out[:, :, mid] = acc
    for i in range(half):
        acc = weights[0][:, i] * x[:, :, 0]
        for j in range(1, width):
            acc += weights[j][:, i] * x[:, :, j]
        out[:, :, i] = acc
    for i in range(length - right, length):  # only padding rows of shorter tracks end up here
        acc = weights[0][:, i] * x[:, :, length - width]
        for j in range(1, width):
            acc += weights[j][:, i] * x[:, :, length - width + j]
        out[:, :, i] = acc
    rows = np.arange(x.shape[1])
    for e in range(right):
        i = lengths - 1 - e
        acc = weights[0][rows, i] * x[:, rows, lengths - width]
        for j in range(1, width):
            acc += weights[j][rows, i] * x[:, rows, lengths - width + j]
        out[:, rows, i] = acc
    return out


def _lagrange(h: Sequence[F64]) -> tuple[list[F64], list[F64]]:
    """1 / Π_{k≠j} (h_j − h_k) and Σ_{k≠j} h_k for every node j."""
    inv, sums = [], []
    for j in range(len(h)):
        others = [h[k] for k in range(len(h)) if k != j]
        d = h[j] - others[0]
        s = others[0]
        for hk in others[1:]:
            d = d * (h[j] - hk)
            s = s + hk
        inv.append(1.0 / d)
        sums.append(s)
    return inv, sums


def derivatives_block(t: F64, x: F64, lengths: np.ndarray) -> tuple[F64, F64, F64]:
    """r′, r″ (3 points) and r‴ (5 points) of times (B, L) and positions (3, B, L)."""
    inv3, sum3 = _lagrange([_stencil_node(t, lengths, 3, j) - t for j in range(3)])
    inv5, sum5 = _lagrange([_stencil_node(t, lengths, 5, j) - t for j in range(5)])
    d1 = _apply_stencil([-s * r for s, r in zip(sum3, inv3)], x, lengths, 3)
    d2 = _apply_stencil([2.0 * r for r in inv3], x, lengths, 3)
    d3 = _apply_stencil([-6.0 * s * r for s, r in zip(sum5, inv5)], x, lengths, 5)
    return d1, d2, d3


def _gap_and_edge_block(t: F64, lengths: np.ndarray, gap_factor: float) -> np.ndarray:
    """EDGE | GAP bits of every (B, L) sample."""
    nb, length = t.shape
    dt = np.diff(t, axis=1)
    mid = (lengths - 1) // 2  # the kernel's median: element (n - 1) // 2 of the sorted steps
    rows = np.arange(nb)
    if np.all(lengths == length):
        k = int(mid[0])
        median = np.partition(dt, k, axis=1)[:, k]
    else:
        steps = np.where(np.arange(length - 1) < (lengths - 1)[:, None], dt, np.inf)
        median = np.sort(steps, axis=1)[rows, mid]
    big = dt > (gap_factor * median)[:, None]
    count = np.zeros((nb, length), dtype=np.int64)
    np.cumsum(big, axis=1, out=count[:, 1:])
    # The r‴ stencil (5 nodes) reaches rows s..s+4, i.e. the steps s..s+3.
    spans = _stencil_node(count, lengths, 5, 4) - _stencil_node(count, lengths, 5, 0)
    i = np.arange(length)
    edge = (i < 2) | (i >= (lengths - 2)[:, None])
    return np.where(edge, np.uint8(EDGE), np.uint8(0)) | np.where(
        spans > 0, np.uint8(GAP), np.uint8(0)
    )


def _dot(a: F64, b: F64) -> F64:
    return a[0] * b[0] + a[1] * b[1] + a[2] * b[2]


def _cross(a: F64, b: F64) -> F64:
    out = np.empty_like(a)
    np.subtract(a[1] * b[2], a[2] * b[1], out=out[0])
    np.subtract(a[2] * b[0], a[0] * b[2], out=out[1])
    np.subtract(a[0] * b[1], a[1] * b[0], out=out[2])
    return out


def frenet(
    d1: F64,
    d2: F64,
    d3: F64,
    position: F64,
    up: Optional[F64],
    min_speed: float,
    min_curvature: float,
) -> Outputs:
    """Frenet apparatus and acceleration split from r′, r″, r‴, as src/frame.rs does it.

    Vectors are component-major, shape (3, N), in and out.
    """
    nan = np.nan
    speed = np.sqrt(_dot(d1, d1))
    c = _cross(d1, d2)
    cn = np.sqrt(_dot(c, c))
    with np.errstate(divide="ignore", invalid="ignore"):
        moving = speed > 0.0
        a_t = np.where(moving, _dot(d1, d2) / speed, nan)
        a_n = np.where(moving, cn / speed, nan)
        stopped = ~(speed >= min_speed) | (speed == 0.0)
        v2 = speed * speed
        v3 = v2 * speed
        kappa = cn / v3
        parallel = cn <= PARALLEL_EPS * speed * np.sqrt(_dot(d2, d2))
        straight = ~stopped & (~(kappa >= min_curvature) | parallel)
        turning = ~stopped & ~straight
        tangent = np.where(stopped, nan, d1 / speed)
        binormal = np.where(turning, c / cn, nan)
        normal = _cross(binormal, tangent)
        curvature = np.where(turning, kappa, np.where(straight, 0.0, nan))
        if up is None:
            signed = np.full_like(speed, nan)
        else:
            c_up = c[0] * up[0] + c[1] * up[1] + c[2] * up[2]
            signed = np.where(turning, c_up / v3, np.where(straight, 0.0, nan))
        torsion = np.where(turning, _dot(c, d3) / (cn * cn), nan)
        radius = np.where(turning, 1.0 / kappa, np.where(straight, np.inf, nan))
        accel_normal = np.where(straight, 0.0, a_n)
        omega = np.where(turning, cn / v2, np.where(straight, 0.0, nan))
        alpha = np.where(
            turning,
            _dot(c, _cross(d1, d3)) / (cn * v2) - 2.0 * cn * a_t / v3,
            nan,
        )
        center = position + normal * radius
    flags = np.where(stopped, np.uint8(STOPPED), np.uint8(0)) | np.where(
        straight, np.uint8(STRAIGHT), np.uint8(0)
    )
    return {
        "speed": speed,
        "tangent": tangent,
        "normal": normal,
        "binormal": binormal,
        "curvature": curvature,
        "signed_curvature": signed,
        "torsion": torsion,
        "radius": radius,
        "center": center,
        "accel_tangential": a_t,
        "accel_normal": accel_normal,
        "angular_speed": omega,
        "angular_accel": alpha,
        "flags": flags,
    }


def _unit(up: Optional[Sequence[float]]) -> Optional[F64]:
    if up is None:
        return None
    u = np.asarray(up, dtype=np.float64)
    return u / np.sqrt(u @ u)


def frenet_rows(
    d1: F64,
    d2: F64,
    d3: F64,
    position: F64,
    up: Optional[F64],
    min_speed: float,
    min_curvature: float,
) -> Outputs:
    """:func:`frenet` for row-major (N, 3) vectors, returning (N, 3) vectors."""
    out = frenet(d1.T, d2.T, d3.T, position.T, up, min_speed, min_curvature)
    return {name: a.T if a.ndim == 2 else a for name, a in out.items()}


def kinematics_block(
    t: F64,
    x: F64,
    lengths: np.ndarray,
    *,
    up: Optional[Sequence[float]] = None,
    min_speed: float = 1e-3,
    min_curvature: float = 1e-6,
    gap_factor: float = 5.0,
) -> Outputs:
    """Kinematics of a padded block: times (B, L), positions (3, B, L), ``lengths`` (B,).

    Row b holds a track in its first ``lengths[b]`` entries; the rest is padding, which must be
    finite with increasing times (it is computed on and then dropped). Returns the outputs of the
    real rows, track after track, like the kernel's concatenated rows; vectors have shape (N, 3)
    (views of component-major arrays: the same values as the kernel's, in another memory order).
    """
    lengths = np.asarray(lengths, dtype=np.intp)
    nb, length = t.shape
    valid = np.arange(length) < lengths[:, None]
    whole = bool(valid.all())
    if lengths.min() < MIN_SAMPLES:
        raise ValueError(f"every track needs at least {MIN_SAMPLES} samples")
    steps = np.diff(t, axis=1)
    if not whole:
        steps = steps[valid[:, 1:]]
    if not (np.isfinite(t).all() and (steps > 0).all()):
        raise ValueError("t: times must be finite and strictly increasing within a track")
    if not np.isfinite(x).all():
        raise ValueError("positions: non-finite rows are outside this reference")

    d1, d2, d3 = derivatives_block(t, x, lengths)
    edge_gap = _gap_and_edge_block(t, lengths, gap_factor)
    dx = np.diff(x, axis=2)
    seg = np.zeros((nb, length))
    seg[:, 1:] = np.sqrt(dx[0] * dx[0] + dx[1] * dx[1] + dx[2] * dx[2])
    arclength = np.cumsum(seg, axis=1)

    def rows(a: np.ndarray) -> np.ndarray:
        if whole:
            return a.reshape(*a.shape[:-2], nb * length)
        return a[..., valid]

    d1, d2, d3, pos = rows(d1), rows(d2), rows(d3), rows(x)
    out = frenet(d1, d2, d3, pos, _unit(up), min_speed, min_curvature)
    out["flags"] |= rows(edge_gap)
    out.update(velocity=d1, acceleration=d2, jerk=d3, arclength=rows(arclength))
    return {name: out[name].T if out[name].ndim == 2 else out[name] for name in FIELDS}


def kinematics(t: F64, x: F64, **options: Any) -> Outputs:
    """Kinematics of one track: times (n,), positions (n, 3)."""
    xc = np.ascontiguousarray(x.T)[:, None, :]
    return kinematics_block(t[None, :], xc, np.array([len(t)]), **options)


def kinematics_loop(t: F64, x: F64, offsets: np.ndarray, **options: Any) -> Outputs:
    """Many tracks the way they are often written: a Python loop over tracks, then concatenate."""
    parts: dict[str, list[np.ndarray]] = {name: [] for name in FIELDS}
    for a, b in zip(offsets[:-1], offsets[1:]):
        res = kinematics(t[a:b], x[a:b], **options)
        for name in FIELDS:
            parts[name].append(res[name])
    return {name: np.concatenate(parts[name]) for name in FIELDS}


def _pad(t: F64, x: F64, offsets: np.ndarray) -> tuple[F64, F64, np.ndarray]:
    """Concatenated tracks → padded times (m, L), positions (3, m, L), and the track lengths."""
    offsets = np.asarray(offsets, dtype=np.intp)
    lengths = np.diff(offsets)
    if len(lengths) == 1:
        return t[None, :], np.ascontiguousarray(x.T)[:, None, :], lengths
    length = int(lengths.max())
    j = np.arange(length)
    last = (offsets[1:] - 1)[:, None]
    idx = np.minimum(offsets[:-1, None] + j, last)
    pad = j >= lengths[:, None]
    # Padding: the last position repeated at later, unit-spaced times (finite, increasing).
    tb = np.where(pad, t[last] + (j - lengths[:, None] + 1), t[idx])
    return tb, np.ascontiguousarray(x.T)[:, idx], lengths


def kinematics_padded(t: F64, x: F64, offsets: np.ndarray, **options: Any) -> Outputs:
    """Many tracks in one vectorized pass over a padded block."""
    tb, xb, lengths = _pad(t, x, offsets)
    return kinematics_block(tb, xb, lengths, **options)


def stencil_magnitudes(t: F64, x: F64, offsets: np.ndarray) -> tuple[F64, F64, F64]:
    """Σ_j |w_j| |x_j| of the r′, r″ and r‴ stencils of every row, shape (N, 3) each.

    One evaluation of a stencil sum in floating point is off by at most a small multiple of
    eps · Σ_j |w_j| |x_j| (plus the weights' own rounding), so two implementations may differ by
    about that much.
    """
    tb, xb, lengths = _pad(t, x, offsets)
    valid = np.arange(tb.shape[1]) < lengths[:, None]
    inv3, sum3 = _lagrange([_stencil_node(tb, lengths, 3, j) - tb for j in range(3)])
    inv5, sum5 = _lagrange([_stencil_node(tb, lengths, 5, j) - tb for j in range(5)])
    weights = (
        [s * r for s, r in zip(sum3, inv3)],
        [2.0 * r for r in inv3],
        [6.0 * s * r for s, r in zip(sum5, inv5)],
    )
    ax = np.abs(xb)
    out = [
        _apply_stencil([np.abs(w) for w in ws], ax, lengths, len(ws))[:, valid].T for ws in weights
    ]
    return out[0], out[1], out[2]


# --------------------------------------------------------------------------------------------
# Speed, curvature and the acceleration split only (outputs=["speed", "curvature",
# "accel_tangential", "accel_normal"]): r′ and r″ from the 3-point stencils, no r‴.
# --------------------------------------------------------------------------------------------

#: The quantities :func:`speed_curvature_split` computes, in ``osculate.intrinsic.OUTPUTS`` order.
SPLIT_FIELDS = ("speed", "curvature", "accel_tangential", "accel_normal")


def first_second_block(t: F64, x: F64, lengths: np.ndarray) -> tuple[F64, F64]:
    """r′ and r″ (3-point stencils, as :func:`derivatives_block`) of (B, L) times, (3, B, L) x."""
    inv3, sum3 = _lagrange([_stencil_node(t, lengths, 3, j) - t for j in range(3)])
    d1 = _apply_stencil([-s * r for s, r in zip(sum3, inv3)], x, lengths, 3)
    d2 = _apply_stencil([2.0 * r for r in inv3], x, lengths, 3)
    return d1, d2


def split_from_derivatives(
    d1: F64, d2: F64, min_speed: float, min_curvature: float
) -> tuple[Outputs, np.ndarray, np.ndarray]:
    """Speed, κ, a_t, a_n from component-major r′, r″ (3, N), with the STOPPED and STRAIGHT masks.

    The same expressions as :func:`frenet` (so the same bits for the same r′, r″).
    """
    nan = np.nan
    speed = np.sqrt(_dot(d1, d1))
    c = _cross(d1, d2)
    cn = np.sqrt(_dot(c, c))
    with np.errstate(divide="ignore", invalid="ignore"):
        moving = speed > 0.0
        a_t = np.where(moving, _dot(d1, d2) / speed, nan)
        a_n = np.where(moving, cn / speed, nan)
        stopped = ~(speed >= min_speed) | (speed == 0.0)
        kappa = cn / (speed * speed * speed)
        parallel = cn <= PARALLEL_EPS * speed * np.sqrt(_dot(d2, d2))
        straight = ~stopped & (~(kappa >= min_curvature) | parallel)
        turning = ~stopped & ~straight
        curvature = np.where(turning, kappa, np.where(straight, 0.0, nan))
        accel_normal = np.where(straight, 0.0, a_n)
    out = {
        "speed": speed,
        "curvature": curvature,
        "accel_tangential": a_t,
        "accel_normal": accel_normal,
    }
    return out, stopped, straight


def speed_curvature_split(
    t: F64, x: F64, *, min_speed: float = 1e-3, min_curvature: float = 1e-6
) -> Outputs:
    """Speed, curvature, a_t and a_n of one track: times (n,), positions (n, 3); nothing else."""
    xc = np.ascontiguousarray(x.T)[:, None, :]
    d1, d2 = first_second_block(t[None, :], xc, np.array([len(t)]))
    out, _, _ = split_from_derivatives(d1[:, 0], d2[:, 0], min_speed, min_curvature)
    return out


def first_second_magnitudes(t: F64, x: F64) -> tuple[F64, F64]:
    """Σ_j |w_j| |x_j| of the r′ and r″ stencils of one track, shape (n, 3) each.

    The rounding of one evaluation of a stencil sum is a small multiple of eps times this (see
    :func:`stencil_magnitudes`, which also covers r‴ and many tracks).
    """
    tb = t[None, :]
    lengths = np.array([len(t)])
    ax = np.abs(np.ascontiguousarray(x.T))[:, None, :]
    inv3, sum3 = _lagrange([_stencil_node(tb, lengths, 3, j) - tb for j in range(3)])
    m1 = _apply_stencil([np.abs(s * r) for s, r in zip(sum3, inv3)], ax, lengths, 3)
    m2 = _apply_stencil([np.abs(2.0 * r) for r in inv3], ax, lengths, 3)
    return m1[:, 0].T, m2[:, 0].T

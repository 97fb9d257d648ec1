"""Deterministic synthetic recordings for the benchmarks.

The paths are smooth and well conditioned on purpose: wherever a quantity is defined it does not
hang on rounding noise, so two implementations that round differently must agree closely (see
``check.py``). Every flag the kernel sets on finite input still occurs:

* ``one_track``: a long 3-D closed curve on a torus, driven at a varying speed that never falls
  below 30 % of its mean, sampled at an uneven 100 Hz (±25 % jitter) with a few recording gaps
  (GAP flags near them, EDGE flags at the two ends).
* ``many_tracks``: tracks of 150–250 samples at 100, 20 or 10 Hz. Most are the torus curve at a
  random scale, orientation and place; some drive along the x axis (y = z = 0 exactly, so
  r′ × r″ = 0 exactly: STRAIGHT) and wait at x = 0 for a while (r′ = 0 exactly: STOPPED); some
  have a recording gap.
"""

from __future__ import annotations

import numpy as np
import numpy.typing as npt

F64 = npt.NDArray[np.float64]


def _torus_curve(psi: F64) -> F64:
    """A (2, 3) torus knot of tube radius 30 around a circle of radius 80, height ±20."""
    ring = 80.0 + 30.0 * np.cos(3.0 * psi)
    return np.column_stack(
        [ring * np.cos(2.0 * psi), ring * np.sin(2.0 * psi), 20.0 * np.sin(3.0 * psi)]
    )


def _jittered_steps(rng: np.random.Generator, size: int, step: float | F64) -> F64:
    return step * (1.0 + 0.25 * rng.uniform(-1.0, 1.0, size))


def one_track(n: int, seed: int = 0) -> tuple[F64, F64]:
    """Times (n,) and positions (n, 3) of one long recording."""
    rng = np.random.default_rng(seed)
    dt = _jittered_steps(rng, n - 1, 0.01)
    gaps = max(1, n // 100_000)
    dt[((np.arange(gaps) + 0.5) * (n - 1) / gaps).astype(np.intp)] = 0.25
    t = np.empty(n)
    t[0] = 0.0
    np.cumsum(dt, out=t[1:])
    speed = 0.7 + 0.25 * np.sin(2 * np.pi * t / 97.0) + 0.15 * np.sin(2 * np.pi * t / 23.0 + 1.0)
    phase = np.empty(n)
    phase[0] = 0.0
    np.cumsum(0.5 * (speed[1:] + speed[:-1]) * dt, out=phase[1:])
    return t, _torus_curve(phase / 20.0)


def many_tracks(
    m: int, mean_len: int = 200, seed: int = 1
) -> tuple[F64, F64, npt.NDArray[np.int64]]:
    """Concatenated times (N,), positions (N, 3) and row offsets (m + 1,) of ``m`` tracks."""
    rng = np.random.default_rng(seed)
    lengths = rng.integers(mean_len * 3 // 4, mean_len * 5 // 4 + 1, m)
    offsets = np.zeros(m + 1, dtype=np.int64)
    np.cumsum(lengths, out=offsets[1:])
    width = int(lengths.max())
    j = np.arange(width)
    valid = j < lengths[:, None]

    # Times, generated on a padded (m, width) grid so every track's sums start afresh.
    step = rng.choice([0.01, 0.05, 0.1], m)
    dt = _jittered_steps(rng, (m, width), step[:, None])
    gap = rng.random(m) < 0.05
    dt[gap, lengths[gap] // 2] *= 8.0
    dt[:, 0] = 0.0
    t = rng.uniform(0.0, 3600.0, m)[:, None] + np.cumsum(dt, axis=1)

    kind = rng.random(m)
    straight = kind < 0.10
    curved = ~straight

    # Curved tracks: the torus curve, scaled, rotated and moved, at a speed bounded away from 0.
    scale = rng.uniform(0.3, 2.0, m)[:, None]
    v0 = rng.uniform(3.0, 15.0, m)[:, None]
    tau = t - t[:, :1]
    speed = v0 * (0.75 + 0.25 * np.sin(2 * np.pi * tau / rng.uniform(5.0, 60.0, m)[:, None]))
    inc = np.zeros((m, width))
    inc[:, 1:] = 0.5 * (speed[:, 1:] + speed[:, :-1]) * np.diff(t, axis=1)
    psi = rng.uniform(0.0, 2 * np.pi, m)[:, None] + np.cumsum(inc, axis=1) / (200.0 * scale)
    local = _torus_curve(psi.reshape(-1)).reshape(m, width, 3) * scale[:, :, None]
    rot, _ = np.linalg.qr(rng.normal(size=(m, 3, 3)))
    place = rng.uniform(-500.0, 500.0, (m, 1, 3))
    xyz = np.einsum("mij,mlj->mli", rot, local) + place

    # Straight tracks: along the x axis, braking to a halt at x = 0, waiting, driving off.
    stop_from = tau[np.arange(m), lengths // 3][:, None]
    stop_to = tau[np.arange(m), lengths // 2][:, None]
    accel = rng.uniform(0.5, 3.0, m)[:, None]
    x_line = np.where(
        tau < stop_from,
        -accel * (stop_from - tau) ** 2,
        np.where(tau > stop_to, accel * (tau - stop_to) ** 2, 0.0),
    )
    xyz[straight] = 0.0
    xyz[straight, :, 0] = x_line[straight]
    assert curved.any() and straight.any()
    return t[valid], xyz[valid], offsets

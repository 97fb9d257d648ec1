"""Warnings for data that look wrong: interleaved objects, unit mistakes, noise for fd."""

from __future__ import annotations

import warnings

import numpy as np
import numpy.typing as npt

from .flags import Flag
from .summary import group_quantile

__all__ = ["SuspectDataWarning", "check_tracks"]

#: No tracked object moves faster than Earth's escape speed, 11.2 km/s (common practice); a
#: median step speed above this in metres per second is a unit mistake (e.g. millimetres).
MAX_PLAUSIBLE_SPEED = 12_000.0
#: For one object, the nearest of the rows 2 to :data:`INTERLEAVED_LAG` ahead is about twice as
#: far as the next row while moving, and 0.45 times as far while standing in Gaussian noise (the
#: median of the smallest of five Rayleigh distances); far less means the rows come back to where
#: they were after a few others, as rows of several interleaved objects do.
INTERLEAVED_RATIO = 0.2
#: The most objects whose interleaved rows are recognised.
INTERLEAVED_LAG = 6
#: fd is useless when the noise of its r″ exceeds this fraction of the typical |r″|.
FD_NOISE_RATIO = 0.3
#: Share of a track flagged VAGUE or GAP beyond which the track is reported (INVALID rows are
#: the input's own NaN, visible to the caller already).
MOSTLY_FLAGGED = 0.5


class SuspectDataWarning(UserWarning):
    """The data look wrong for the analysis asked for; the message says why and what to do.

    Raised by :func:`osculate.kinematics` (and everything built on it) and printed by the
    command line. Silence it with :func:`warnings.filterwarnings` once the cause is understood.
    """


def _names(labels: np.ndarray, bad: npt.NDArray[np.bool_]) -> str:
    shown = [str(v) for v in labels[bad][:5]]
    more = int(bad.sum()) - len(shown)
    return ", ".join(shown) + (f" and {more} more" if more > 0 else "")


def check_tracks(
    t: npt.NDArray[np.float64],
    x: npt.NDArray[np.float64],
    offsets: npt.NDArray[np.int64],
    labels: np.ndarray,
    flags: npt.NDArray[np.uint8],
    acceleration: npt.NDArray[np.float64],
    method: str,
) -> None:
    """Warn (:class:`SuspectDataWarning`) about tracks whose data look wrong (kernel row order).

    Parameters
    ----------
    t, x, flags, acceleration
        Times, measured positions, flags and estimated r″ of every row, tracks contiguous.
    offsets : ndarray of int
        Row offsets of the tracks.
    labels : ndarray
        Track labels, for the messages.
    method : str
        The estimator.
    """
    m = len(offsets) - 1
    if m == 0 or len(t) < 3:
        return
    with np.errstate(all="ignore"):  # huge or tiny coordinates: the comparisons stay valid
        findings = _findings(t, x, offsets, flags, acceleration, method)
    for bad, message in findings:
        if bad.any():
            warnings.warn(
                f"track(s) {_names(labels, bad)}: {message}", SuspectDataWarning, stacklevel=3
            )


def _robust_noise(t: np.ndarray, x: np.ndarray, code: np.ndarray, m: int) -> np.ndarray:
    """Estimate the noise per track from the median absolute cubic pseudo-residual.

    The pseudo-residuals are those of :func:`osculate.kinematics` (Notes) for ``"fd"``; their
    median ignores isolated corners of an exact path.
    """
    n = len(t)
    if n < 5:
        return np.full(m, np.nan)
    i = np.arange(2, n - 2)
    nb = np.stack([i - 2, i - 1, i + 1, i + 2])
    ti, tn = t[i], t[nb]
    w = np.ones((4, len(i)))
    for j in range(4):  # Lagrange weights of the cubic through the 4 neighbours
        for k in range(4):
            if k != j:
                w[j] *= (ti - tn[k]) / (tn[j] - tn[k])
    c = 1.0 / np.sqrt(1.0 + (w * w).sum(axis=0))
    e = np.einsum("ji,jid->id", w, x[nb]) - x[i]
    ok = (code[i - 2] == code[i + 2]) & np.isfinite(e).all(axis=1)
    a = np.abs(e * c[:, None])
    med = group_quantile(
        np.repeat(code[i], x.shape[1]), m, a.ravel(), np.repeat(ok, x.shape[1]), 0.5
    )
    return 1.4826 * med  # type: ignore[no-any-return]


def _findings(
    t: npt.NDArray[np.float64],
    x: npt.NDArray[np.float64],
    offsets: npt.NDArray[np.int64],
    flags: npt.NDArray[np.uint8],
    acceleration: npt.NDArray[np.float64],
    method: str,
) -> list[tuple[npt.NDArray[np.bool_], str]]:
    """Per check, the tracks that fail it and what to tell the caller."""
    m = len(offsets) - 1
    counts = np.diff(offsets)
    code = np.repeat(np.arange(m), counts)
    finite = np.isfinite(x).all(axis=1)
    step1 = np.hypot.reduce(x[1:] - x[:-1], axis=1)
    ok1 = (code[1:] == code[:-1]) & finite[1:] & finite[:-1]
    med1 = group_quantile(code[1:], m, step1, ok1, 0.5)
    # Per row, the distance to the nearest of the rows 2..INTERLEAVED_LAG ahead in its track.
    nearest = np.full(len(t), np.inf)
    for lag in range(2, INTERLEAVED_LAG + 1):
        d = np.hypot.reduce(x[lag:] - x[:-lag], axis=1)
        d[(code[lag:] != code[:-lag]) | ~finite[lag:] | ~finite[:-lag]] = np.inf
        nearest[:-lag] = np.fmin(nearest[:-lag], d)
    back = group_quantile(code, m, nearest, np.isfinite(nearest), 0.5)
    interleaved = (counts >= 10) & (med1 > 0) & (back < INTERLEAVED_RATIO * med1)
    dt = np.diff(t)
    speed = group_quantile(code[1:], m, step1 / dt, ok1, 0.5)
    fast = speed > MAX_PLAUSIBLE_SPEED
    noisy_fd = np.zeros(m, bool)
    noise = np.full(m, np.nan)
    if method == "fd":
        h = group_quantile(code[1:], m, dt, ok1, 0.5)
        acc = group_quantile(code, m, np.hypot.reduce(acceleration, axis=1), finite, 0.5)
        noise = _robust_noise(t, x, code, m)
        # Noise at the level of rounding (exact or simulated data) is no reason to warn.
        real = (noise > 1e-9 * med1) & (med1 > 0)
        noisy_fd = real & (np.sqrt(6.0) * noise / (h * h) > FD_NOISE_RATIO * acc)
    bad_flags = int(Flag.VAGUE | Flag.GAP)
    share = np.bincount(code, weights=(flags & bad_flags) != 0, minlength=m) / np.maximum(counts, 1)
    mostly = (share > MOSTLY_FLAGGED) & (counts >= 20)
    return [
        (
            interleaved,
            "the rows jump away and come back a few rows later (the nearest of the next "
            f"{INTERLEAVED_LAG} rows is typically under {INTERLEAVED_RATIO:.0%} of the step to the "
            "next row), as if several objects were interleaved; give tracks= (by=, --track) to "
            "separate them",
        ),
        (
            fast,
            f"the median speed between samples is up to {np.nanmax(speed, initial=0):.3g} "
            "position units per time unit, faster than anything tracked in metres per second; "
            "check the units (millimetres given as metres, or milliseconds as seconds?)",
        ),
        (
            noisy_fd,
            f"with noise of up to {np.nanmax(noise, initial=0):.3g} position units, finite "
            "differences give accelerations that are mostly noise (their standard error is over "
            "30 % of the typical |r″|); use method='smooth' or 'local'",
        ),
        (
            mostly,
            "more than half of the samples are flagged VAGUE or GAP; the figures of these tracks "
            "rest on few samples",
        ),
    ]

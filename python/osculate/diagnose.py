"""Warnings for data that look wrong: interleaved objects, unit mistakes, noise beyond the method."""

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
#: For one object, |x(i+2) − x(i)| is about twice |x(i+1) − x(i)| while moving and about equal
#: while standing; far less means every other row belongs to another object.
INTERLEAVED_RATIO = 0.5
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
    noise: npt.NDArray[np.float64],
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
    noise : ndarray
        Position noise per track.
    method : str
        The estimator.
    """
    m = len(offsets) - 1
    n = len(t)
    if m == 0 or n < 3:
        return
    with np.errstate(all="ignore"):  # huge or tiny coordinates: the comparisons stay valid
        _check(t, x, offsets, labels, flags, acceleration, noise, method)


def _robust_noise(t: np.ndarray, x: np.ndarray, code: np.ndarray, m: int) -> np.ndarray:
    """Per-track noise from the median absolute cubic pseudo-residual (see
    :func:`osculate.kinematics`, Notes): isolated corners of an exact path do not count.
    """
    n = len(t)
    if n < 5:
        return np.full(m, np.nan)
    i = np.arange(2, n - 2)
    nb = np.stack([i - 2, i - 1, i + 1, i + 2])
    ti, tn = t[i], t[nb]
    w = np.ones((4, len(i)))
    for j in range(4):
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


def _check(
    t: npt.NDArray[np.float64],
    x: npt.NDArray[np.float64],
    offsets: npt.NDArray[np.int64],
    labels: np.ndarray,
    flags: npt.NDArray[np.uint8],
    acceleration: npt.NDArray[np.float64],
    noise: npt.NDArray[np.float64],
    method: str,
) -> None:
    m = len(offsets) - 1
    code = np.repeat(np.arange(m), np.diff(offsets))
    finite = np.isfinite(x).all(axis=1)
    step1 = np.linalg.norm(x[1:] - x[:-1], axis=1)
    ok1 = (code[1:] == code[:-1]) & finite[1:] & finite[:-1]
    step2 = np.linalg.norm(x[2:] - x[:-2], axis=1)
    ok2 = (code[2:] == code[:-2]) & finite[2:] & finite[:-2]
    med1 = group_quantile(code[1:], m, step1, ok1, 0.5)
    med2 = group_quantile(code[2:], m, step2, ok2, 0.5)
    counts = np.diff(offsets)
    with np.errstate(invalid="ignore", divide="ignore"):
        interleaved = (counts >= 10) & (med1 > 0) & (med2 < INTERLEAVED_RATIO * med1)
        dt = np.diff(t)
        speed = group_quantile(code[1:], m, step1 / dt, ok1, 0.5)
        fast = speed > MAX_PLAUSIBLE_SPEED
        h = group_quantile(code[1:], m, dt, ok1, 0.5)
        acc = group_quantile(code, m, np.linalg.norm(acceleration, axis=1), finite, 0.5)
        robust = _robust_noise(t, x, code, m)
        fd_noise = np.sqrt(6.0) * robust / (h * h)
        # Noise at the level of rounding (exact or simulated data) is no reason to warn.
        real_noise = (robust > 1e-9 * med1) & (med1 > 0)
        noisy_fd = (fd_noise > FD_NOISE_RATIO * acc) & real_noise & (method == "fd")
    bad_flags = int(Flag.VAGUE | Flag.GAP)
    share = np.bincount(code, weights=(flags & bad_flags) != 0, minlength=m) / np.maximum(counts, 1)
    mostly = (share > MOSTLY_FLAGGED) & (counts >= 20)
    if interleaved.any():
        warnings.warn(
            f"track(s) {_names(labels, interleaved)}: every other row jumps away and back (the "
            "median distance two rows apart is less than half the distance between neighbours), "
            "as if several objects were interleaved; give tracks= (by=, --track) to separate them",
            SuspectDataWarning,
            stacklevel=4,
        )
    if fast.any():
        warnings.warn(
            f"track(s) {_names(labels, fast)}: the median speed between samples is "
            f"{np.nanmax(speed[fast]):.3g} position units per time unit, faster than anything "
            "tracked in metres per second; check the units (millimetres given as metres, or "
            "milliseconds as seconds?)",
            SuspectDataWarning,
            stacklevel=4,
        )
    if noisy_fd.any():
        warnings.warn(
            f"track(s) {_names(labels, noisy_fd)}: with noise of {np.nanmax(noise[noisy_fd]):.3g} "
            "position units, finite differences give accelerations that are mostly noise (their "
            "standard error is over 30 % of the typical |r″|); use method='smooth' or 'local'",
            SuspectDataWarning,
            stacklevel=4,
        )
    if mostly.any():
        warnings.warn(
            f"track(s) {_names(labels, mostly)}: more than half of the samples are flagged VAGUE "
            "or GAP; the figures of these tracks rest on few samples",
            SuspectDataWarning,
            stacklevel=4,
        )

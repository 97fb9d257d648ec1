"""Stops inside the kinematics: moving stretches refitted on their own, stop rows held still."""

from __future__ import annotations

import copy
from typing import Any

import numpy as np
import numpy.typing as npt

from ._estimators import EstimatorOptions, fit_core
from ._validate import Grouping, call_kernel
from .flags import Flag

__all__ = ["hold_stops", "refit_moving", "stop_rows"]

#: Shortest moving stretch that is refitted on its own (shorter ones keep the whole-track fit).
MIN_STRETCH = 12

_HELD = ("velocity", "acceleration", "jerk", "speed", "accel_tangential", "accel_normal")
_UNDEFINED_WHEN_STOPPED = (
    "tangent",
    "normal",
    "binormal",
    "curvature",
    "signed_curvature",
    "torsion",
    "radius",
    "center",
    "angular_speed",
    "angular_accel",
)
_FIT_CHOICES = ("smoothing", "edf", "criterion", "window")


def stop_rows(first: np.ndarray, last: np.ndarray, n: int) -> npt.NDArray[np.bool_]:
    """Mask of the rows inside the stop intervals ``first[i]..last[i]`` (kernel rows)."""
    mark = np.zeros(n + 1, np.int64)
    np.add.at(mark, first, 1)
    np.add.at(mark, last + 1, -1)
    return np.cumsum(mark[:-1]) > 0


def _track_codes(offsets: np.ndarray) -> np.ndarray:
    return np.repeat(np.arange(len(offsets) - 1), np.diff(offsets))


def refit_moving(
    opts: EstimatorOptions,
    kind: str | None,
    options: dict[str, Any],
    t: npt.NDArray[np.float64],
    x: npt.NDArray[np.float64],
    g: Grouping,
    raw: dict[str, Any],
    info: dict[str, np.ndarray],
    held: npt.NDArray[np.bool_],
) -> None:
    """Fit the moving stretches between stops again, each on its own, and write them into ``raw``.

    A stop is a position held, not a curve: fitted together with the moving parts, its jitter
    and the abrupt start and end of motion drive the automatic smoothing far down (on an
    invented stop-and-go log, λ* 9 for the whole track against 150–1700 for its moving
    stretches), which leaves curvature mostly noise. Stretches of tracks without stops, and
    stretches shorter than :data:`MIN_STRETCH` samples, keep the whole-track fit.
    """
    code = _track_codes(g.offsets)
    n = len(t)
    if n == 0 or not held.any():
        return
    has_stop = np.bincount(code[held], minlength=g.n_tracks) > 0
    new = np.ones(n, bool)
    new[1:] = (code[1:] != code[:-1]) | (held[1:] != held[:-1])
    stretch = np.cumsum(new) - 1
    starts = np.flatnonzero(new)
    length = np.diff(np.append(starts, n))
    moving = ~held[starts] & has_stop[code[starts]] & (length >= MIN_STRETCH)
    if opts.method == "local" and opts.window is not None:
        moving &= length >= opts.window
    if not moving.any():
        return
    chosen = moving[stretch]
    rows = np.flatnonzero(chosen)
    offsets = np.concatenate([[0], np.cumsum(length[moving])]).astype(np.int64)
    sub = Grouping(offsets, None, g.labels[code[starts[moving]]])
    sub_opts = opts
    if opts.weights is not None:
        sub_opts = copy.copy(opts)
        sub_opts.weights = g.to_kernel(np.asarray(opts.weights, dtype=np.float64))[rows]
    fitted = fit_core(sub_opts, sub, t[rows], x[rows], uncertainty=kind)
    part = call_kernel(sub, fitted.kinematics, **options)
    s_before = raw["arclength"].copy() if "arclength" in raw else None
    for name, a in part.items():
        if name == "se":
            for q, v in a.items():
                raw["se"][q][rows] = v
        elif isinstance(a, np.ndarray) and len(a) == len(rows) and name in raw:
            raw[name][rows] = a
    if s_before is not None:
        raw["arclength"] = _joined_arclength(s_before, raw["arclength"], rows, new, held, code)
    # Per track, the choices of its longest refitted stretch.
    sub_info = fitted.info()
    track_of = code[starts[moving]]
    pick = np.lexsort((length[moving], track_of))
    last = np.flatnonzero(np.append(track_of[pick][1:] != track_of[pick][:-1], True))
    for name in _FIT_CHOICES:
        if name in info:
            info[name] = info[name].copy()
            info[name][track_of[pick][last]] = sub_info[name][pick][last]


def _joined_arclength(
    whole: np.ndarray,
    refit: np.ndarray,
    rows: np.ndarray,
    new: np.ndarray,
    held: np.ndarray,
    code: np.ndarray,
) -> np.ndarray:
    """Cumulative length per track from the increments of both fits; zero inside stops."""
    n = len(whole)
    firsts = np.flatnonzero(np.r_[True, code[1:] != code[:-1]])

    def increments(s: np.ndarray) -> np.ndarray:
        # Forward-fill NaN rows within the track, then difference (0 at track starts).
        idx = np.where(np.isnan(s), 0, np.arange(n))
        idx = np.maximum.accumulate(idx)
        filled = np.where(np.isnan(s[idx]), 0.0, s[idx])
        inc = np.diff(filled, prepend=0.0)
        inc[firsts] = 0.0
        return inc

    inc = increments(whole)
    inc_refit = increments(refit)
    inside = np.zeros(n, bool)
    inside[rows] = True
    inside &= ~new  # the step into a stretch is measured by the whole-track fit
    inc[inside] = inc_refit[inside]
    inc[held & ~new] = 0.0  # standing still adds no length
    cs = np.cumsum(inc)
    start_of = np.repeat(firsts, np.diff(np.append(firsts, n)))
    out = cs - cs[start_of]
    out[np.isnan(whole)] = np.nan
    return out  # type: ignore[no-any-return]


def hold_stops(raw: dict[str, Any], held: npt.NDArray[np.bool_]) -> None:
    """Make the rows of stops stand still: zero velocity and acceleration, STOPPED, no frame."""
    rows = np.flatnonzero(held & ((raw["flags"] & np.uint8(Flag.INVALID)) == 0))
    if len(rows) == 0:
        return
    for name in _HELD:
        if name in raw:
            raw[name][rows] = 0.0
    for name in _UNDEFINED_WHEN_STOPPED:
        if name in raw:
            raw[name][rows] = np.nan
    # Held values are set, not estimated: they have no standard error (the position keeps its).
    for name, se in raw.get("se", {}).items():
        if name != "position":
            se[rows] = np.nan
    raw["flags"][rows] = (raw["flags"][rows] | np.uint8(Flag.STOPPED)) & ~np.uint8(
        Flag.STRAIGHT | Flag.VAGUE
    )

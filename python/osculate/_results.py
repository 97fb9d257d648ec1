"""The result types of :mod:`osculate.intrinsic`: per-sample kinematics, derivatives, frames.

Also :func:`assemble`, which builds a :class:`Kinematics` on the caller's rows from what a
kernel returned.
"""

from __future__ import annotations

import dataclasses
import types
from collections.abc import Callable, Mapping
from typing import TYPE_CHECKING, Any, NamedTuple, Optional

import numpy as np
import numpy.typing as npt

from . import _core
from ._columns import require_pandas
from ._estimators import EstimatorOptions
from ._validate import Grouping
from .flags import Flag
from .stops import Stops

if TYPE_CHECKING:
    from .elements import Elements
    from .turns import SpeedChanges, Turns


__all__ = ["OUTPUTS", "OUTPUT_SET", "Derivatives", "Frames", "Kinematics", "assemble"]

F64 = npt.NDArray[np.float64]

VECTORS = ("velocity", "acceleration", "jerk", "tangent", "normal", "binormal", "center")
_SCALARS = (
    "speed",
    "arclength",
    "curvature",
    "signed_curvature",
    "torsion",
    "radius",
    "accel_tangential",
    "accel_normal",
    "angular_speed",
    "angular_accel",
)


#: Every per-sample quantity ``outputs=`` can name, in the kernels' order (the kernels' own
#: list, less the fitted position and its standard error, which the Python layer asks for itself).
OUTPUTS: tuple[str, ...] = tuple(
    n for n in _core.KINEMATICS_OUTPUTS if n not in ("position", "position_se")
)
OUTPUT_SET = frozenset(OUTPUTS)


@dataclasses.dataclass(frozen=True, eq=False, repr=False)
class Kinematics:
    """Kinematics of every sample, on the caller's rows.

    Vectors have the path's dimension ``dim`` except ``binormal``, which is always 3-D (for planar
    paths it is (0, 0, ±1)). Undefined quantities are NaN and their samples carry ``flags``.

    Attributes
    ----------
    t, position : ndarray
        The input, as float64.
    velocity, acceleration, jerk : ndarray, shape (n, dim)
        r′, r″, r‴.
    speed, arclength : ndarray, shape (n,)
        |r′| and the cumulative path length from the first finite sample of each track.
    tangent, normal : ndarray, shape (n, dim)
        Unit tangent T and principal normal N.
    binormal : ndarray, shape (n, 3)
        Binormal B = T × N.
    curvature, radius, torsion : ndarray, shape (n,)
        κ ≥ 0, ρ = 1/κ and τ.
    signed_curvature : ndarray, shape (n,)
        Curvature signed by the turn about ``up`` (left turns positive): ((r′ × r″)·up)/|r′|³,
        which is κ for planar paths and κ·(B·up) in 3-D (smaller than κ where the path climbs or
        banks); always present for planar paths, NaN for 3-D paths without ``up``.
    center : ndarray, shape (n, dim)
        Centre of the osculating circle r + ρN.
    accel_tangential, accel_normal : ndarray, shape (n,)
        a_t = dv/dt and a_n = κv² ≥ 0, so that r″ = a_t T + a_n N.
    angular_speed, angular_accel : ndarray, shape (n,)
        ω = κv (rad per time unit) and dω/dt.
    flags : ndarray of uint8, shape (n,)
        Bits of :class:`osculate.Flag`.
    tracks : ndarray or None
        Track label of each row when the input had several tracks.
    method : str
        The derivative estimator (``"fd"``, ``"spline"``, ``"smooth"`` or ``"local"``).
    estimator : str
        The estimator with its main option, e.g. ``"smooth (degree 5)"``.
    fit_info : dict of str to ndarray, or None
        For fitted estimators, one value per track: ``smoothing`` (dimensionless λ* of
        ``"smooth"``), ``edf`` (effective degrees of freedom per coordinate), ``criterion`` (GCV
        score or unbiased risk at the choice) and ``window`` (samples or time span of
        ``"local"``) and ``length_error`` (estimated error of the arc length of spline
        methods); NaN where a value does not apply.
    frame : str
        ``"frenet"``, or ``"rotation-minimizing"`` when ``normal`` and ``binormal`` hold that frame.
    twist : ndarray or None
        With the rotation-minimizing frame: its angle from the Frenet normal (radians, positive
        about T), NaN where the Frenet normal is undefined.
    se : mapping of str to ndarray, or None
        With ``uncertainty``: read-only standard errors of ``position``, ``velocity``,
        ``acceleration``, ``jerk`` (per component, shaped like the quantity), ``speed``,
        ``accel_tangential``, ``accel_normal``, ``curvature``, ``signed_curvature``, ``radius``,
        ``torsion`` and ``angular_speed``; NaN where the quantity is undefined. See
        :func:`kinematics` for what they cover.
    stops : Stops
        The intervals where a track stands still (see :class:`osculate.Stops`); their rows are
        STOPPED with zero velocity, speed and acceleration.
    outputs : tuple of str
        The quantities computed (``outputs=`` of :func:`kinematics`; all of :data:`OUTPUTS` by
        default). Reading another one raises AttributeError.
    """

    t: F64
    position: F64
    velocity: F64
    acceleration: F64
    jerk: F64
    speed: F64
    arclength: F64
    tangent: F64
    normal: F64
    binormal: F64
    curvature: F64
    signed_curvature: F64
    torsion: F64
    radius: F64
    center: F64
    accel_tangential: F64
    accel_normal: F64
    angular_speed: F64
    angular_accel: F64
    flags: npt.NDArray[np.uint8]
    tracks: Optional[np.ndarray]
    method: str
    estimator: str
    fit_info: Optional[dict[str, np.ndarray]]
    frame: str
    twist: Optional[F64]
    se: Optional[Mapping[str, np.ndarray]]
    stops: Stops
    outputs: tuple[str, ...]
    _grouping: Grouping = dataclasses.field(repr=False)

    def __getattribute__(self, name: str) -> Any:
        value = object.__getattribute__(self, name)
        if value is None and name in OUTPUT_SET:
            raise AttributeError(
                f"{name} was not computed: kinematics(..., outputs=...) did not ask for it "
                f"(computed: {', '.join(object.__getattribute__(self, 'outputs')) or 'none'})"
            )
        return value

    def __repr__(self) -> str:
        return (
            f"Kinematics(n={len(self)}, dim={self.dim}, tracks="
            f"{self._grouping.n_tracks}, estimator={self.estimator!r}, frame={self.frame!r}, "
            f"outputs={len(self.outputs)} of {len(OUTPUTS)})"
        )

    @property
    def grouping(self) -> Grouping:
        """How the rows split into tracks (kernel order ↔ the caller's rows), for table builders."""
        return self._grouping

    @property
    def dim(self) -> int:
        """2 for planar paths, 3 for space curves."""
        return int(self.position.shape[1])

    def __len__(self) -> int:
        return len(self.t)

    def flagged(self, flag: Flag | int) -> npt.NDArray[np.bool_]:
        """Rows that carry any of the bits of ``flag``."""
        return (self.flags & int(flag)) != 0

    def to_pandas(self, index: Any = None) -> Any:
        """All per-sample results as a :class:`pandas.DataFrame`, one column per component.

        Vector components are suffixed ``_x``, ``_y`` (and ``_z``); ``index`` defaults to the row
        number.
        """
        pd = require_pandas()
        cols: dict[str, Any] = {}
        if self.tracks is not None:
            cols["track"] = self.tracks
        cols["t"] = self.t
        for name in ("position", *(q for q in (*VECTORS, *_SCALARS) if q in self.outputs)):
            a = getattr(self, name)
            if a.ndim == 1:
                cols[name] = a
            else:
                for j, axis in enumerate("xyz"[: a.shape[1]]):
                    cols[f"{name}_{axis}"] = a[:, j]
        cols["flags"] = self.flags
        for name, a in (self.se or {}).items():
            if a.ndim == 1:
                cols[f"{name}_se"] = a
            else:
                for j, axis in enumerate("xyz"[: a.shape[1]]):
                    cols[f"{name}_{axis}_se"] = a[:, j]
        return pd.DataFrame(cols, index=index)

    def summary(self) -> Any:
        """One row per track: extremes of trusted samples with when they occur and their errors.

        Returns
        -------
        pandas.DataFrame
            Indexed by track label, with the columns of :meth:`summary_arrays`.

        Notes
        -----
        Lateral (normal) acceleration, jerk and radius here are indicative, estimated from
        measured positions; whether a road, rail, ride or vehicle is acceptable is decided by
        local codes and licensed engineers.
        """
        pd = require_pandas()
        data = self.summary_arrays()
        labels = data.pop("track")
        return pd.DataFrame(data, index=pd.Index(labels, name="track"))

    def turns(
        self,
        *,
        up: npt.ArrayLike | None = None,
        significance: float = 3.0,
        hold: float = 1.0,
        min_heading: float = 10.0,
        merge: int = 5,
        core: float = 0.75,
    ) -> Turns:
        """One row per turn of every track: where, which way, how far, how tight, how fast.

        A turn is a run of moving samples whose signed curvature is at least ``significance``
        standard errors from zero with one sign, continued while it stays ``hold`` standard
        errors from zero with that sign (stopped samples do not end it), merged with the next
        run of the same sign across at most ``merge`` moving samples, and extended over its
        flanks while the curvature keeps its sign. Turns of less than ``min_heading`` degrees
        are left out.

        Parameters
        ----------
        up : array_like, shape (3,), optional
            For 3-D paths, the direction about which turns are left or right and normal to the
            plane of the fitted circles; default (0, 0, 1).
        significance, hold : float
            Standard errors of curvature to start and to continue a turn (without standard
            errors, the absolute floor of 1e-6 per length unit applies).
        min_heading : float
            Smallest heading change reported, degrees.
        merge : int
            Longest gap (moving samples) across which runs of one sign merge.
        core : float
            Fraction of the peak curvature above which samples make the turn's core.

        Returns
        -------
        Turns
            Columns ``track``, ``start``, ``end``, ``direction``, ``heading_change``,
            ``min_radius`` (least-squares circle through the measured positions of the core,
            with ``min_radius_se``), ``peak_radius`` (1 / the smoothed peak curvature, biased
            low on short turns), ``max_accel_normal`` and when, speeds in, out and mean,
            ``samples``, ``flagged``; ``to_pandas()``.

        Notes
        -----
        On short turns 1/max κ of a smoothed curve misses the radius (the peak is flattened by
        the smoothing, and the largest of many noisy values is the noisiest); the circle uses
        every core sample at once (I. Kåsa, IEEE Trans. Instrum. Meas. 25 (1976) 8–14, refined
        by Gauss–Newton on the geometric distances). Turn radii and lateral accelerations
        estimated from logged data are indicative: local codes and licensed engineers decide
        whether a road, rail, ride or vehicle is acceptable.

        Examples
        --------
        A left quarter turn of radius 20 m between two straights, driven at 8 m/s:

        >>> import numpy as np
        >>> import osculate as osc
        >>> s = np.arange(0.0, 100.0 + 10 * np.pi, 0.8)
        >>> a = np.clip((s - 50.0) / 20.0, 0.0, np.pi / 2)
        >>> x = np.where(s < 50, s, 50 + 20 * np.sin(a)) + np.where(s > 50 + 10 * np.pi, 0, 0)
        >>> y = 20 * (1 - np.cos(a)) + np.clip(s - 50 - 10 * np.pi, 0, None)
        >>> x = np.where(s > 50 + 10 * np.pi, 70.0, x)
        >>> k = osc.kinematics(s / 8.0, np.column_stack([x, y]), method="spline")
        >>> turn = k.turns()
        >>> len(turn), str(turn.direction[0]), round(float(turn.heading_change[0]))
        (1, 'left', 90)
        >>> bool(abs(turn.min_radius[0] - 20.0) < 0.05)
        True
        """
        from .turns import find_turns

        return find_turns(
            self,
            up=up,
            significance=significance,
            hold=hold,
            min_heading=min_heading,
            merge=merge,
            core=core,
        )

    def elements(
        self,
        *,
        up: npt.ArrayLike | None = None,
        penalty: float | None = None,
        min_length: float | None = None,
        **options: Any,
    ) -> Elements:
        """Return the straights, circular arcs and transition spirals of every track.

        Parameters
        ----------
        up : array_like, shape (3,), optional
            For 3-D paths, the vertical (the elements are those of the plan view); required
            there.
        penalty, min_length, **options
            As in :func:`osculate.elements.elements_of` (cost of one more element; shortest
            element; ``significance``, ``resolution``, ``refine``, ``max_iterations``).

        Returns
        -------
        Elements
            One row per element (see :func:`osculate.elements`); element tables are
            reconstructions from logged data, and design values are decided by local codes and
            licensed engineers.

        Examples
        --------
        A straight, then a circular arc of radius 50 m turning 60°, then a straight:

        >>> import numpy as np
        >>> import osculate as osc
        >>> s = np.arange(0.0, 200.0 + 50 * np.pi / 3, 1.0)
        >>> a = np.clip((s - 100.0) / 50.0, 0.0, np.pi / 3)
        >>> after = np.clip(s - 100.0 - 50 * np.pi / 3, 0.0, None)
        >>> x = np.where(s < 100, s, 100 + 50 * np.sin(a)) + after * np.cos(np.pi / 3)
        >>> y = 50 * (1 - np.cos(a)) + after * np.sin(np.pi / 3)
        >>> k = osc.kinematics(s / 10.0, np.column_stack([x, y]), method="spline")
        >>> el = k.elements()
        >>> [str(n) for n in el.kind_name], round(float(el.radius[1]), 3)
        (['straight', 'arc', 'straight'], 50.0)
        """
        from .elements import elements_of

        return elements_of(self, up=up, penalty=penalty, min_length=min_length, **options)

    def speed_changes(
        self,
        *,
        threshold: float = 0.5,
        release: float | None = None,
        significance: float = 3.0,
        hold: float = 1.0,
        min_samples: int = 3,
    ) -> SpeedChanges:
        """One row per marked speed-up or slow-down of every track.

        A speed change is a run of moving samples whose tangential acceleration keeps its sign
        with |a_t| at least ``threshold`` (and ``significance`` standard errors), continued
        while |a_t| stays at least ``release`` (default ``threshold / 2``; and ``hold``
        standard errors). Stops end it.

        Parameters
        ----------
        threshold, release : float
            |a_t| to start and to continue, in the input's length per time squared (default
            0.5: m/s² for metres and seconds, a gentle but deliberate change for a road
            vehicle; common practice, adjust for your vehicle).
        significance, hold : float
            Standard errors of a_t to start and to continue (where they are computed).
        min_samples : int
            Fewest samples of a speed change.

        Returns
        -------
        SpeedChanges
            Columns ``track``, ``kind`` (``"speed-up"``/``"slow-down"``), ``start``, ``end``,
            ``duration``, ``speed_before``, ``speed_after``, ``peak_accel`` and ``peak_at``,
            ``mean_accel``, ``samples``; ``to_pandas()``.

        Examples
        --------
        From rest to 10 m/s at 2 m/s², cruise, then braking at 3 m/s² to 4 m/s:

        >>> import numpy as np
        >>> import osculate as osc
        >>> t = np.linspace(0.0, 20.0, 401)
        >>> v = np.minimum(np.minimum(2 * t, 10.0), np.maximum(10 - 3 * (t - 12), 4.0))
        >>> x = np.concatenate([[0.0], np.cumsum(0.5 * (v[1:] + v[:-1]) * np.diff(t))])
        >>> k = osc.kinematics(t, np.column_stack([x, np.zeros_like(x)]), min_speed=1e-9)
        >>> ch = k.speed_changes()
        >>> [str(c) for c in ch.kind], [round(float(p), 1) for p in ch.peak_accel]
        (['speed-up', 'slow-down'], [2.0, 3.0])
        """
        from .turns import find_speed_changes

        return find_speed_changes(
            self,
            threshold=threshold,
            release=release,
            significance=significance,
            hold=hold,
            min_samples=min_samples,
        )

    def summary_arrays(self) -> dict[str, np.ndarray]:
        """Per-track figures as NumPy arrays (no pandas needed).

        Returns
        -------
        dict of str to ndarray
            One element per track: ``track`` (label), then the columns listed with their units
            in ``osculate.SUMMARY_COLUMNS``: counts, length and duration, and for speed, |a_t|,
            a_n, radius and |r‴| the extreme over *trusted* samples (no flag at all, EDGE
            included), the time it occurs (``…_at``) and its standard error (``…_se``, NaN
            without ``uncertainty``), robust companions ``p95_accel_normal`` and ``p5_radius``,
            ``turning_angle`` (skipping stopped samples), ``stops``, ``stopped_time``,
            ``flagged``, ``noise``, then the other entries of ``fit_info``. An entry is NaN when
            no sample of the track qualifies.
        """
        from .summary import summarize

        return summarize(self)


class Derivatives(NamedTuple):
    """Time derivatives r′, r″, r‴ on the caller's rows, with the EDGE/GAP/INVALID flags."""

    velocity: F64
    acceleration: F64
    jerk: F64
    flags: npt.NDArray[np.uint8]


class Frames(NamedTuple):
    """A moving frame on the caller's rows: unit tangent, normal and binormal, twist and flags."""

    tangent: F64
    normal: F64
    binormal: F64
    twist: Optional[F64]
    flags: npt.NDArray[np.uint8]


def assemble(
    t: F64,
    x: F64,
    g: Grouping,
    raw: dict[str, Any],
    opts: EstimatorOptions,
    info: dict[str, np.ndarray] | None,
    *,
    grouped: bool,
    frame: str = "frenet",
    stops: Stops | None = None,
    kernel_order: bool = True,
) -> Kinematics:
    """Kinematics on the caller's rows from the kernel's dictionary.

    The dictionary's rows are in kernel order, unless ``kernel_order`` is False.

    ``raw`` is emptied: its arrays are handed over (or freed as their caller-order copies are
    made), so the outputs are held once plus one array, not twice.
    """
    raw.pop("noise", None)
    se_raw = raw.pop("se", None)
    res = {}
    to_caller = g.to_caller if kernel_order else (lambda a: a)
    for name in list(raw):
        res[name] = to_caller(raw.pop(name))
    res.setdefault("twist", None)
    computed = tuple(q for q in OUTPUTS if q in res)
    for q in OUTPUTS:
        res.setdefault(q, None)
    se = None if se_raw is None else _se_mapping(se_raw, to_caller, x.shape[1])
    return Kinematics(
        se=se,
        stops=Stops.none(x.shape[1]) if stops is None else stops,
        t=t,
        position=x,
        tracks=g.labels[g.row_codes()] if grouped else None,
        method=opts.method,
        estimator=opts.describe(),
        fit_info=info,
        frame=frame,
        outputs=computed,
        _grouping=g,
        **res,
    )


def _se_mapping(
    se: dict[str, np.ndarray], to_caller: Callable[[np.ndarray], np.ndarray], dim: int
) -> Mapping[str, np.ndarray]:
    """Read-only standard errors on the caller's rows; vector ones shaped (n, dim)."""
    out: dict[str, np.ndarray] = {}
    for name, a in se.items():
        a = to_caller(a)
        if name in ("position", "velocity", "acceleration", "jerk"):
            a = np.broadcast_to(a[:, None], (len(a), dim))
        else:
            a.flags.writeable = False
        out[name] = a
    if "curvature" in out:
        out["signed_curvature"] = out["curvature"]
    return types.MappingProxyType(out)

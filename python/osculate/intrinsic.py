"""Intrinsic kinematics of sampled paths: speed, Frenet frame, curvature, torsion, a_t / a_n."""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from typing import TYPE_CHECKING, Any, Optional, Union

import numpy as np
import numpy.typing as npt

from . import _core
from ._estimators import EstimatorOptions
from ._results import OUTPUT_SET, OUTPUTS, VECTORS, Derivatives, Frames, Kinematics, assemble
from ._validate import (
    as_positions,
    as_real,
    as_times,
    call_kernel,
    group_rows,
    kernel_times,
    ticks_of,
)
from .diagnose import check_tracks
from .flags import Flag
from .stops import kernel_stops

if TYPE_CHECKING:
    pass

__all__ = [
    "Derivatives",
    "Frames",
    "Kinematics",
    "arclength",
    "derivatives",
    "frames",
    "kinematics",
]

F64 = npt.NDArray[np.float64]


def up_vector(up: Any, dim: int) -> tuple[float, float, float] | None:
    if up is None:
        return None
    if dim != 3:
        raise _core.InputError(f"up: expected a 3-vector for a 3-D path, got {up!r} (dim {dim})")
    return vector3("up", up, 3)


def vector3(name: str, v: Any, dim: int) -> tuple[float, float, float]:
    """Return a vector of the path's dimension as a 3-tuple (z = 0 for planar paths)."""
    raw = np.asarray(v)
    if raw.dtype.kind not in "fiu":
        raise TypeError(f"{name}: expected {dim} real numbers, got {v!r}")
    u = raw.astype(float).reshape(-1)
    if u.shape != (dim,):
        raise _core.InputError(f"{name}: expected a {dim}-vector, got {v!r}")
    w = np.zeros(3)
    w[:dim] = u
    return (float(w[0]), float(w[1]), float(w[2]))


def kinematics(
    t: npt.ArrayLike,
    positions: npt.ArrayLike,
    *,
    method: str = "fd",
    order: int | None = None,
    bc: str | None = None,
    bc_velocity: npt.ArrayLike | None = None,
    degree: int | None = None,
    smoothing: float | None = None,
    noise: float | None = None,
    weights: npt.ArrayLike | None = None,
    window: int | None = None,
    window_span: float | None = None,
    derivative: int | None = None,
    tracks: npt.ArrayLike | None = None,
    offsets: npt.ArrayLike | None = None,
    min_speed: Union[float, str] = "auto",
    min_curvature: Union[float, str] = "auto",
    gap_factor: float = 5.0,
    up: npt.ArrayLike | None = None,
    frame: str = "frenet",
    initial: npt.ArrayLike | None = None,
    uncertainty: Union[bool, str, None] = None,
    significance: float = 3.0,
    max_relative_se: float = 0.25,
    min_stop: float | None = None,
    outputs: Sequence[str] | None = None,
    out: Mapping[str, np.ndarray] | None = None,
) -> Kinematics:
    """Speed, Frenet frame, curvature, torsion and acceleration split of sampled paths.

    Parameters
    ----------
    t : array_like, shape (n,)
        Sample times, strictly increasing within each track: real numbers in your time unit,
        integers (e.g. epoch nanoseconds; differenced exactly in int64 per track, spans up to
        2**53) or datetimes (NumPy or pandas, timezone-aware ones via UTC; seconds since
        1970-01-01, differenced exactly in nanoseconds).
    positions : array_like, shape (n, 2) or (n, 3)
        Positions (pandas nullable columns accepted; a missing value is an error naming its
        row). Rows with a NaN or infinite coordinate are flagged INVALID and skipped; their
        neighbours are estimated from the finite rows around them and flagged GAP.
    method : {"fd", "auto", "spline", "smooth", "local"}
        Derivative estimator. ``"fd"``: finite differences on the non-uniform grid (exact data).
        ``"auto"`` (the default of the per-track tables: summaries, stops, turns, elements):
        ``"fd"``, unless on some track the noise would make finite-difference accelerations
        mostly noise (the standard error of the 3-point r″, √6 σ/h², over 30 % of the track's
        median |r″|, with σ the difference-based noise of the Notes); then ``"smooth"`` for
        every track of the call, with a :class:`SuspectDataWarning` saying so and ``k.method``
        telling which was used. It takes ``order`` and the options of ``"smooth"``, each used
        when that estimator is chosen. Exact and simulated data keep ``"fd"`` (noise at rounding
        level does not count).
        ``"spline"``: interpolating cubic spline (exact data; r‴ is piecewise constant).
        ``"smooth"``: penalized smoothing spline, λ chosen by generalized cross-validation unless
        ``smoothing`` or ``noise`` is given (noisy data). ``"local"``: local polynomial least
        squares, Savitzky–Golay on uneven times (noisy data). Only the options of the chosen
        estimator may be given.
    order : {2, 4}, default 2
        ``"fd"``: accuracy order; 2 uses 3-point stencils for r′ and r″ and 5 points for r‴, 4 uses
        5 and 7 points. Needs at least 3 (order 2) or 5 (order 4) samples per track.
    bc : {"not-a-knot", "natural", "clamped"}, default "not-a-knot"
        ``"spline"``: end conditions.
    bc_velocity : array_like, shape (2, dim)
        ``"spline"`` with ``bc="clamped"``: velocities at the start and the end of every track.
    degree : int
        ``"smooth"``: 5 (quintic, penalty on r‴, so jerk and torsion are continuous; default) or 3
        (cubic, penalty on r″). ``"local"``: polynomial degree, 4 by default; at least 3 here,
        since torsion and jerk need r‴.
    smoothing : float
        ``"smooth"``: the dimensionless smoothing λ* = λ / (w̄ h̄^(2m−1)) (w̄ mean weight, h̄ mean
        time step, m = (degree + 1) / 2), as reported in ``fit_info["smoothing"]``; the same value
        means the same smoothing whatever the units. λ*^(1/2m) is roughly the smoothing bandwidth
        in samples.
    noise : float
        ``"smooth"``: standard deviation of the position noise per coordinate (position units);
        λ then minimizes the unbiased risk estimate instead of the GCV score.
    weights : array_like, shape (n,)
        ``"smooth"``: positive weight of each row (e.g. inverse variance).
    window : int
        ``"local"``: window length in samples (kept at full length near the ends).
    window_span : float
        ``"local"``: window as a time span (all samples within ± span/2). With neither window
        option the length in samples is chosen by generalized cross-validation.
    derivative : {0, 1, 2, 3}, default 0
        ``"smooth"`` with automatic λ: the derivative order the choice is tuned for. The default
        0 keeps the GCV (or unbiased-risk) choice, which is best for positions and whose
        standard errors cover the truth on noisy helices on 92–95 % of samples at ±1.96 se;
        ν > 0 rescales it for the ν-th derivative by a plug-in rule (see Notes), never by more
        than 100×: 1 gives smoother curvature covered on 86–93 %, 2 smoother still, with a bias
        the bands no longer cover (70–82 %).
    tracks : array_like, shape (n,), optional
        Track id of each row; rows of a track need not be contiguous (they keep their order).
    offsets : array_like of int, shape (m + 1,), optional
        Alternative to ``tracks`` for rows already grouped: track k is rows
        ``offsets[k]:offsets[k+1]``.
    min_speed : float or "auto", default "auto"
        Samples slower than this are STOPPED (position units per time unit). ``"auto"``: slower
        than ``significance`` standard errors of the speed (speed not significantly above zero
        given the noise), and never faster than the floor of 1e-3 (1 mm/s for metres and
        seconds). Without a noise estimate (``"spline"``) only the floor applies.
    min_curvature : float or "auto", default "auto"
        Samples with a smaller curvature are STRAIGHT (1/position units). ``"auto"``: curvature
        within ``significance`` standard errors of zero, with the floor 1e-6 (a radius of
        1000 km in metres).
    gap_factor : float, default 5.0
        A time step longer than ``gap_factor`` times the track's median step is a gap; estimates
        whose stencil spans it are flagged GAP. ``numpy.inf`` disables the check.
    up : array_like, shape (3,), optional
        For 3-D paths, the axis about which ``signed_curvature`` is measured (left turns positive),
        e.g. ``(0, 0, 1)`` for vehicles in an east-north-up frame. Planar paths always use +z.
    frame : {"frenet", "rotation-minimizing"}
        Which normal and binormal to return. ``"rotation-minimizing"`` replaces them with the
        rotation-minimizing frame (double reflection; Wang, Jüttler, Zheng & Liu, ACM TOG 27(1),
        2008), defined wherever the tangent is, so it stays continuous through straight stretches
        and inflections; ``twist`` then holds its angle from the Frenet normal (radians, positive
        about T; its arc-length derivative is −τ, Bishop 1975). It starts from the Frenet normal
        at the first sample that has one (or from ``initial``).
    initial : array_like, optional
        Starting normal of the rotation-minimizing frame, projected onto the normal plane of each
        track's first sample with a tangent.
    uncertainty : bool or {"sampling", "posterior"}, optional
        Standard errors per sample in ``k.se`` (default: on for ``"smooth"`` and ``"local"``, off
        for ``"fd"``; ``"spline"`` interpolates and has none). ``True`` and ``"sampling"`` give the
        spread of the estimate over repeated noise, σ‖ℓᵢ‖ with ℓᵢ the estimator's row for the
        sample; ``"posterior"`` (``"smooth"`` only) gives Wahba's Bayesian standard errors, which
        add an allowance for the smoothing bias. See Notes for what they cover.
    significance : float, default 3.0
        The z of the ``"auto"`` thresholds: a speed or curvature must exceed this many standard
        errors to differ from zero.
    max_relative_se : float, default 0.25
        A moving, curved sample whose standard error of curvature or speed exceeds this fraction
        of the value is flagged VAGUE (only where standard errors are computed).
    min_stop : float, optional
        Shortest stop interval (time units) in ``k.stops``; default five mean time steps;
        ``numpy.inf`` finds none and leaves every row as the estimator gave it.
    outputs : sequence of str, optional
        The quantities to compute, from :data:`osculate.intrinsic.OUTPUTS` (default: all).
        Every quantity of a sample comes from the same derivatives in one pass, so this saves
        the writing of the others (most of the cost: 249 bytes per planar sample for all);
        ``flags``, ``t``, ``position`` and ``stops`` are always there, and standard errors come
        with their quantities. Reading a quantity not asked for raises AttributeError.
    out : mapping of str to ndarray, optional
        Arrays to write some of the quantities asked for into, in place, instead of new ones:
        writeable C-contiguous float64 of shape (n,), (n, dim) or (n, 3) for the binormal. For
        callers who loop over same-sized batches: memory already in use costs no page faults
        (fresh output pages cost the operating system one each). The result's attributes are
        these arrays.

    Returns
    -------
    Kinematics
        Per-sample arrays on the caller's rows; see :class:`Kinematics`.

    Raises
    ------
    InputError
        Mismatched shapes, times not finite or not strictly increasing, too few samples, bad
        options; the message names the argument, the track and the row.
    TypeError
        Non-real input (boolean, complex, object, string, datetime).

    Notes
    -----
    With c = r′ × r″ and v = |r′|: T = r′/v, B = c/|c|, N = B × T, κ = |c|/v³, τ = (c·r‴)/|c|²,
    a_t = r′·r″/v, a_n = κv², ω = κv.

    **Indicative values.** Lateral (normal) acceleration, jerk and radius estimated from logged
    positions are indicative: whether a road, rail, ride or vehicle is acceptable is decided by
    local codes and licensed engineers.

    ``"fd"``: weights by Fornberg's algorithm (B. Fornberg, Math. Comp. 51 (1988) 699–706),
    centred in the interior and one-sided of the same width at the ends (EDGE); arc length is the
    polyline length. Finite differences amplify noise by 1/h² in r″ and 1/h³ in r‴: on noisy data
    use ``"smooth"`` or ``"local"``.

    ``"spline"``: C. de Boor, *A Practical Guide to Splines* (1978). ``"smooth"``: C. Reinsch,
    Numer. Math. 10 (1967) 177–183 (cubic) and its quintic analogue, fitted by Givens rotations
    on the B-spline normal equations (P. Dierckx, *Curve and Surface Fitting with Splines*, 1993)
    with one λ shared by all coordinates, so results do not depend on the orientation of the
    axes; λ by generalized cross-validation (P. Craven and G. Wahba, Numer. Math. 31 (1979)
    377–403) with the trace from the band of the inverse (M. F. Hutchinson and F. R. de Hoog,
    Numer. Math. 47 (1985) 99–106). Samples within about one smoothing bandwidth of the ends are
    EDGE: the natural end conditions bias their derivatives. Arc length of the spline methods is
    5-point Gauss–Legendre quadrature of |r′| per interval; the centre of curvature uses the
    fitted position. ``"local"``: A. Savitzky and M. J. E. Golay, Anal. Chem. 36 (1964)
    1627–1639, generalized to uneven times; arc length by the trapezoid rule on the speed with
    the Euler–Maclaurin end correction.

    **Uncertainty.** Every estimator is linear in the positions, so the derivatives at a sample
    have the exact covariance σ² G (G the Gram matrix of the estimator's rows for r, r′, r″, r‴,
    computed in Rust: from the Fornberg weights, from (XᵀX)⁻¹ of the local fit, or from the band
    of the inverse normal matrix of the smoothing spline, all O(n)); speed, a_t, a_n, κ, τ and ω
    follow by first-order propagation. σ is ``fit_info["noise"]``: RSS/(n − edf) at the GCV
    choice for ``"smooth"`` (G. Wahba, *Spline Models for Observational Data*, SIAM 1990), the
    residuals of the local fits for ``"local"``, and the pseudo-residuals of T. Gasser, L. Sroka
    and C. Jennen-Steinmetz, Biometrika 73 (1986) 625–633 for ``"fd"``. The bands cover the
    noise, not the bias: not the rounding of sharp features (a curvature step, a sudden stop) by
    the smoother, and not model error (a wrong time base, outliers, correlated noise). Measured
    on noisy helices at the default λ, ±1.96 se holds the truth on 92–95 % of interior samples;
    for ``"fd"`` and ``"local"`` on a path their polynomials reproduce (pure noise), 94–95 %.
    ``"local"``'s automatic window is chosen for the positions, where a centred fit of even
    degree cancels its leading bias; its derivatives keep theirs, and on noisy helices and
    clothoids the bands cover only 60–83 % for speed and 82–89 % for κ. A window of 0.7 times the
    automatic one (``window=``) covers 94 % at twice the RMS error of κ.
    ``"posterior"`` uses Wahba's Bayesian covariance (J. R. Stat. Soc. B 45 (1983) 133–150),
    whose average coverage is near nominal even with bias (D. Nychka, JASA 83 (1988)
    1134–1143) and conservative on slowly varying paths.

    Examples
    --------
    A circle of radius 2 travelled at 3 m/s: κ = 1/2 and a_n = v²/r = 4.5.

    >>> import numpy as np
    >>> import osculate as osc
    >>> t = np.linspace(0.0, 4.0, 401)
    >>> xy = 2.0 * np.column_stack([np.cos(1.5 * t), np.sin(1.5 * t)])
    >>> k = osc.kinematics(t, xy)
    >>> round(float(k.curvature[200]), 4), round(float(k.accel_normal[200]), 3)
    (0.5, 4.5)

    A straight line is flagged STRAIGHT, with zero curvature and an undefined normal:

    >>> k = osc.kinematics([0.0, 1.0, 2.0], [[0.0, 0.0], [1.0, 1.0], [2.0, 2.0]])
    >>> k.curvature.tolist(), bool(k.flagged(osc.Flag.STRAIGHT).all())
    ([0.0, 0.0, 0.0], True)
    >>> bool(np.isnan(k.normal).all())
    True

    A NaN row is kept, flagged INVALID, and does not poison its neighbours:

    >>> xy = [[0, 0], [1, 0.1], [np.nan, 0], [3, 0.9], [4, 1.6], [5, 2.5]]
    >>> k = osc.kinematics([0, 1, 2, 3, 4, 5], xy)
    >>> osc.Flag(int(k.flags[2])).name, bool(np.isfinite(k.speed[3]))
    ('INVALID', True)

    Only what is asked for is computed:

    >>> t = np.linspace(0.0, 4.0, 401)
    >>> xy = 2.0 * np.column_stack([np.cos(1.5 * t), np.sin(1.5 * t)])
    >>> k = osc.kinematics(t, xy, outputs=["speed", "curvature"])
    >>> k.outputs, round(float(k.speed[200]), 3)
    (('speed', 'curvature'), 3.0)
    >>> hasattr(k, "torsion")  # AttributeError: torsion was not computed
    False
    """
    # The kernel checks the estimator options (and that the estimator gives curvature).
    opts = EstimatorOptions.unchecked(
        method,
        {
            "order": order,
            "bc": bc,
            "bc_velocity": bc_velocity,
            "degree": degree,
            "smoothing": smoothing,
            "noise": noise,
            "weights": weights,
            "window": window,
            "window_span": window_span,
            "derivative": derivative,
        },
    )
    # Standard errors: for "auto" the fd choice decides the kinematics option, the fallback fit
    # keeps its covariance unless they are refused.
    kind = _uncertainty(uncertainty, "fd" if method == "auto" else method)
    fit_kind = _uncertainty(uncertainty, "smooth") if method == "auto" else kind
    tt = as_times(t)
    x = as_positions(positions, len(tt))
    g = group_rows(len(tt), tracks, offsets, tt)
    asked = _outputs(outputs)
    options = {
        **_thresholds(min_speed, min_curvature, significance, max_relative_se),
        "gap_factor": as_real("gap_factor", gap_factor),
        "up": up_vector(up, x.shape[1]),
        "uncertainty": kind is not None,
        "outputs": None if asked is None else sorted({*asked, "position_se"}),
    }
    # Integer times are made relative per track (exact differences) in kernel order; the kernel
    # gathers everything else into its order itself.
    exact = ticks_of(t) is not None
    raw = call_kernel(
        g,
        _core.kinematics,
        kernel_times(t, tt, g)[0] if exact else tt,
        x,
        g.offsets,
        estimator={**opts.options, "weights": opts.weights},
        uncertainty=fit_kind,
        options=options,
        min_stop=None if min_stop is None else as_real("min_stop", min_stop),
        frame=frame,
        initial=None if initial is None else vector3("initial", initial, x.shape[1]),
        weights=opts.weights_array(len(tt)),
        order=None if g.order is None else g.order.view(np.uintp),
        inverse=None if g.inverse is None else g.inverse.view(np.uintp),
        t_kernel=exact,
        out=_out_buffers(out, len(tt), x.shape[1]),
    )
    used, estimator = raw.pop("method"), raw.pop("estimator")
    check_tracks(g.names, raw.pop("stats"), raw["noise"], method, used)
    info = raw.pop("info", None) or {"noise": raw["noise"]}
    grouped = tracks is not None or offsets is not None
    labels = g.labels if grouped else np.zeros(1, np.int64)
    stops = kernel_stops(tt, raw.pop("stops"), labels, g.order)
    return assemble(
        tt,
        x,
        g,
        raw,
        used,
        estimator,
        info,
        grouped=grouped,
        frame=frame,
        stops=stops,
        kernel_order=False,
    )


def _out_buffers(
    out: Mapping[str, np.ndarray] | None, n: int, dim: int
) -> dict[str, np.ndarray] | None:
    """Check the shapes of the caller's output buffers (dtype, layout and names: the kernel)."""
    if out is None:
        return None
    if not isinstance(out, Mapping):
        raise TypeError(f"out: expected a mapping of output names to arrays, got {type(out)}")
    for name, a in out.items():
        if not isinstance(a, np.ndarray):
            raise TypeError(f"out: {name!r} must be a NumPy array, got {type(a).__name__}")
        width = 3 if name == "binormal" else dim if name in VECTORS else 1
        shape = (n,) if width == 1 else (n, width)
        if a.shape != shape:
            raise _core.InputError(f"out: {name!r} has shape {a.shape}, expected {shape}")
    return dict(out)


def _outputs(outputs: Sequence[str] | None) -> tuple[str, ...] | None:
    """Return the quantities asked for, in :data:`OUTPUTS` order."""
    if outputs is None:
        return None
    names = [outputs] if isinstance(outputs, str) else list(outputs)
    if not all(isinstance(n, str) for n in names):
        raise TypeError(f"outputs: expected names (str), got {outputs!r}")
    unknown = [n for n in names if n not in OUTPUT_SET]
    if unknown:
        raise _core.InputError(
            f"outputs: unknown quantity {unknown[0]!r}; choose from {', '.join(OUTPUTS)}"
        )
    return tuple(n for n in OUTPUTS if n in names)


def _uncertainty(value: Union[bool, str, None], method: str) -> Optional[str]:
    """Return the covariance kind the kernels compute, or None."""
    if value is None:
        value = method in ("smooth", "local")
    if value is False:
        return None
    if value is True:
        value = "sampling"
    if value not in ("sampling", "posterior"):
        raise _core.InputError(
            f"uncertainty: expected True, False, 'sampling' or 'posterior', got {value!r}"
        )
    if method == "spline":
        raise _core.InputError(
            "uncertainty: the interpolating spline has no noise model; use method='smooth'"
        )
    if value == "posterior" and method != "smooth":
        raise _core.InputError("uncertainty: 'posterior' applies to method='smooth' only")
    return str(value)


def _thresholds(
    min_speed: Union[float, str],
    min_curvature: Union[float, str],
    significance: float,
    max_relative_se: float,
) -> dict[str, Any]:
    """Keyword arguments of the kernels for the STOPPED / STRAIGHT / VAGUE decisions."""

    def one(name: str, value: Union[float, str], floor: float) -> tuple[float, bool]:
        if isinstance(value, str):
            if value != "auto":
                raise _core.InputError(f"{name}: expected a number or 'auto', got {value!r}")
            return floor, True
        return as_real(name, value), False  # its range is checked by the kernel

    speed, auto_speed = one("min_speed", min_speed, 1e-3)
    curvature, auto_curvature = one("min_curvature", min_curvature, 1e-6)
    return {
        "min_speed": speed,
        "min_curvature": curvature,
        "auto_speed": auto_speed,
        "auto_curvature": auto_curvature,
        # Their ranges are checked by the kernel.
        "significance": as_real("significance", significance),
        "max_relative_se": as_real("max_relative_se", max_relative_se),
    }


def derivatives(
    t: npt.ArrayLike,
    positions: npt.ArrayLike,
    *,
    method: str = "fd",
    tracks: npt.ArrayLike | None = None,
    offsets: npt.ArrayLike | None = None,
    gap_factor: float = 5.0,
    **options: Any,
) -> Derivatives:
    """Time derivatives r′, r″ and r‴ of sampled paths.

    Parameters
    ----------
    t, positions, method, tracks, offsets, gap_factor
        As in :func:`kinematics`.
    **options
        The estimator's options, as in :func:`kinematics` (``order``, ``degree``, ...).

    Returns
    -------
    Derivatives
        ``velocity``, ``acceleration``, ``jerk`` of shape (n, dim) and ``flags`` (EDGE, GAP,
        INVALID bits only).

    Notes
    -----
    See :func:`kinematics` for the estimators and their references. The kernel writes the
    derivatives and the flags only.

    Examples
    --------
    Exact on quadratics, even on uneven times:

    >>> import numpy as np
    >>> import osculate as osc
    >>> t = np.array([0.0, 0.3, 1.0, 1.2, 2.0])
    >>> d = osc.derivatives(t, np.column_stack([t**2, 3 * t]))
    >>> np.allclose(d.velocity[:, 0], 2 * t), np.allclose(d.acceleration[:, 0], 2.0)
    (True, True)
    """
    k = kinematics(
        t,
        positions,
        method=method,
        tracks=tracks,
        offsets=offsets,
        gap_factor=gap_factor,
        min_stop=np.inf,  # the estimator's own derivatives, stops not held
        outputs=("velocity", "acceleration", "jerk"),
        **options,
    )
    keep = np.uint8(Flag.EDGE | Flag.GAP | Flag.INVALID)
    return Derivatives(k.velocity, k.acceleration, k.jerk, k.flags & keep)


def arclength(
    t: npt.ArrayLike,
    positions: npt.ArrayLike,
    *,
    method: str = "fd",
    tracks: npt.ArrayLike | None = None,
    offsets: npt.ArrayLike | None = None,
    **options: Any,
) -> F64:
    """Cumulative arc length of each sample from the start of its track.

    Parameters
    ----------
    t, positions, method, tracks, offsets
        As in :func:`kinematics`; for ``"fd"``, ``t`` is only checked (finite, strictly increasing
        per track).
    **options
        The estimator's options, as in :func:`kinematics`.

    Returns
    -------
    ndarray, shape (n,)
        Path length from the first finite sample of the track; NaN on rows with a non-finite
        position (the chord across them is counted).

    Notes
    -----
    ``"fd"`` measures the polyline through the samples, which underestimates the length of a curved
    path by O(h²) (for a circle, the inscribed-polygon error). The spline methods integrate |r′| of
    the fitted spline by 5-point Gauss–Legendre quadrature on every interval.

    Examples
    --------
    >>> import osculate as osc
    >>> osc.arclength([0, 1, 2, 3], [[0, 0], [3, 4], [3, 4.5], [6, 8.5]]).tolist()
    [0.0, 5.0, 5.5, 10.5]

    Along an interpolating spline a quarter circle of 9 samples is measured to 1e-5:

    >>> import numpy as np
    >>> a = np.linspace(0, np.pi / 2, 9)
    >>> s = osc.arclength(a, np.column_stack([np.cos(a), np.sin(a)]), method="spline")
    >>> bool(abs(s[-1] - np.pi / 2) < 1e-5)
    True
    """
    if method != "fd":
        return kinematics(
            t,
            positions,
            method=method,
            tracks=tracks,
            offsets=offsets,
            outputs=("arclength",),
            **options,
        ).arclength
    EstimatorOptions(method, **options)
    tt = as_times(t)
    x = as_positions(positions, len(tt))
    g = group_rows(len(tt), tracks, offsets, tt)
    s = call_kernel(
        g, _core.polyline_arclength, kernel_times(t, tt, g)[0], g.to_kernel(x), g.offsets
    )
    return g.to_caller(s)


def frames(
    t: npt.ArrayLike,
    positions: npt.ArrayLike,
    *,
    frame: str = "rotation-minimizing",
    initial: npt.ArrayLike | None = None,
    method: str = "fd",
    tracks: npt.ArrayLike | None = None,
    offsets: npt.ArrayLike | None = None,
    **options: Any,
) -> Frames:
    """Compute moving frames along sampled paths: rotation-minimizing (default) or Frenet.

    Parameters
    ----------
    t, positions, method, tracks, offsets
        As in :func:`kinematics`.
    frame : {"rotation-minimizing", "frenet"}
        The frame; see :func:`kinematics`.
    initial : array_like, optional
        Starting normal of the rotation-minimizing frame.
    **options
        Estimator options and thresholds, as in :func:`kinematics`.

    Returns
    -------
    Frames
        ``tangent`` and ``normal`` of shape (n, dim), ``binormal`` (n, 3), ``twist`` (angle from
        the Frenet normal, rotation-minimizing frame only) and ``flags``.

    Notes
    -----
    Double reflection method: W. Wang, B. Jüttler, D. Zheng and Y. Liu, ACM Trans. Graph. 27(1)
    (2008). Along a space curve the rotation-minimizing normal turns against the Frenet normal at
    the rate of the torsion: d(twist)/ds = −τ (R. L. Bishop, Amer. Math. Monthly 82 (1975)).

    Examples
    --------
    A path with a straight middle: the Frenet normal is undefined there, the rotation-minimizing
    one is not.

    >>> import numpy as np
    >>> import osculate as osc
    >>> s = np.linspace(-3, 3, 61)
    >>> xy = np.column_stack([s, np.where(np.abs(s) > 1, np.sign(s) * (np.abs(s) - 1) ** 3, 0)])
    >>> f = osc.frames(s, xy)
    >>> frenet = osc.frames(s, xy, frame="frenet")
    >>> bool(np.isfinite(f.normal).all()), bool(np.isnan(frenet.normal[30]).all())
    (True, True)
    """
    k = kinematics(
        t,
        positions,
        method=method,
        tracks=tracks,
        offsets=offsets,
        frame=frame,
        initial=initial,
        outputs=("tangent", "normal", "binormal"),
        **options,
    )
    return Frames(k.tangent, k.normal, k.binormal, k.twist, k.flags)

"""Proof that osculate and the NumPy reference compute the same outputs, to stated tolerances.

The two round differently (Fornberg's recursion in the kernel, closed-form Lagrange weights in
``reference.py``), and finite-difference sums cancel heavily: a third derivative of positions of
some hundred metres sampled every 10 ms is a sum of terms of size 1e8 that nearly cancel. A single
relative tolerance would either be loose or fail on honest rounding. So the check has three parts,
each with its own stated tolerance:

1. Derivatives r′, r″, r‴ (the reference's own, as timed): per sample and component,
   |a − b| ≤ ``DERIVATIVE_ULPS`` · eps · Σ_j |w_j| |x_j|, where eps · Σ_j |w_j| |x_j| is the size of
   the rounding error of one evaluation of the stencil sum (``reference.stencil_magnitudes``).
   For a single track the reference's r′ is also held to that bound against
   ``numpy.gradient(x, t, axis=0, edge_order=2)``, an implementation from outside the project.
2. Everything computed from the derivatives (speed, T, N, B, κ, signed κ, τ, ρ, centre, a_t,
   a_n, ω, dω/dt): the reference's formulas (``reference.frenet``, the code the timed reference
   runs) applied to osculate's own r′, r″, r‴ must reproduce osculate's values to
   |a − b| ≤ ``FORMULA_RTOL`` · (|b| + median |b|), with identical STOPPED / STRAIGHT bits.
3. The timed reference's outputs themselves: identical flags, NaN and ±inf on exactly the same
   samples in every output, and the arc length within ``ARCLENGTH_RTOL`` (normalized as in 2).
   Their largest normalized differences |a − b| / (|b| + median |b|) are reported too (not
   asserted: they are the propagated rounding of part 1, largest for τ and dω/dt at one-sided end
   stencils).
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

import numpy as np
import reference

EPS = float(np.finfo(np.float64).eps)
#: Allowed difference of the derivatives, in units of eps · Σ|w_j||x_j| (measured up to ~5).
DERIVATIVE_ULPS = 32.0
#: Allowed normalized difference of the formulas applied to the same derivatives (measured ≤ 2e-13).
FORMULA_RTOL = 1e-11
#: Allowed relative difference of the cumulative polyline length (measured ≤ 4e-16).
ARCLENGTH_RTOL = 1e-12

DERIVATIVES = ("velocity", "acceleration", "jerk")
FORMULA_FIELDS = (
    "speed",
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
)


def _as_dict(result: Any) -> dict[str, np.ndarray]:
    if isinstance(result, Mapping):
        return {name: np.asarray(result[name]) for name in reference.FIELDS}
    return {name: np.asarray(getattr(result, name)) for name in reference.FIELDS}


def _normalized(a: np.ndarray, b: np.ndarray) -> float:
    both = np.isfinite(a) & np.isfinite(b)
    if not both.any():
        return 0.0
    fa, fb = a[both], b[both]
    denom = np.abs(fb) + float(np.median(np.abs(fb)))
    diff = np.abs(fa - fb)
    err = np.divide(diff, denom, out=np.where(diff > 0, np.inf, 0.0), where=denom > 0)
    return float(err.max())


def _same_special(a: np.ndarray, b: np.ndarray) -> bool:
    """NaN, +inf and −inf on exactly the same samples."""
    return all(np.array_equal(f(a), f(b)) for f in (np.isnan, np.isposinf, np.isneginf))


def compare(
    osc_result: Any,
    ref_result: Any,
    t: np.ndarray,
    x: np.ndarray,
    offsets: np.ndarray,
    options: Mapping[str, Any],
    label: str,
) -> dict[str, Any]:
    """Run the three checks of the module docstring; raise AssertionError on any failure.

    Returns the measured figures next to the tolerances they were held to.
    """
    a_all = _as_dict(osc_result)
    b_all = _as_dict(ref_result)
    problems: list[str] = []
    for name in reference.FIELDS:
        if a_all[name].shape != b_all[name].shape:
            problems.append(f"{name}: shape {a_all[name].shape} != {b_all[name].shape}")
    if problems:
        raise AssertionError(f"{label}: outputs differ:\n  " + "\n  ".join(problems))

    # 1. Derivatives within their rounding-error bound.
    derivative_ulps = {}
    for name, mag in zip(DERIVATIVES, reference.stencil_magnitudes(t, x, offsets)):
        diff = np.abs(a_all[name] - b_all[name])
        bound = EPS * mag
        ulps = np.divide(diff, bound, out=np.where(diff > 0, np.inf, 0.0), where=bound > 0)
        worst = float(np.nan_to_num(ulps, nan=np.inf).max())
        derivative_ulps[name] = worst
        if worst > DERIVATIVE_ULPS:
            problems.append(f"{name}: differs by {worst:.3g} > {DERIVATIVE_ULPS} eps·Σ|w||x|")

    # 1b. One track: the reference's r′ against numpy.gradient(edge_order=2), same bound.
    gradient_ulps = None
    if len(offsets) == 2:
        diff = np.abs(np.gradient(x, t, axis=0, edge_order=2) - b_all["velocity"])
        bound = EPS * reference.stencil_magnitudes(t, x, offsets)[0]
        ulps = np.divide(diff, bound, out=np.where(diff > 0, np.inf, 0.0), where=bound > 0)
        gradient_ulps = float(ulps.max())
        if gradient_ulps > DERIVATIVE_ULPS:
            problems.append(f"numpy.gradient: r′ differs by {gradient_ulps:.3g} eps·Σ|w||x|")

    # 2. The formulas, on osculate's own derivatives.
    up = options.get("up")
    u = None if up is None else np.asarray(up, dtype=np.float64) / np.linalg.norm(up)
    again = reference.frenet_rows(
        a_all["velocity"],
        a_all["acceleration"],
        a_all["jerk"],
        x,
        u,
        float(options.get("min_speed", 1e-3)),
        float(options.get("min_curvature", 1e-6)),
    )
    formula = {}
    for name in FORMULA_FIELDS:
        a, b = a_all[name], again[name]
        if not _same_special(a, b):
            problems.append(f"{name}: NaN/inf differ from the formulas on the same derivatives")
        formula[name] = _normalized(a, b)
        if formula[name] > FORMULA_RTOL:
            problems.append(f"{name}: formulas differ by {formula[name]:.3g} > {FORMULA_RTOL:g}")
    bits = reference.STOPPED | reference.STRAIGHT
    if not np.array_equal(a_all["flags"] & bits, again["flags"]):
        problems.append("STOPPED/STRAIGHT bits differ from the formulas on the same derivatives")

    # 3. The timed outputs: flags, NaN / inf pattern, arc length; differences reported.
    flag_mismatches = int(np.count_nonzero(a_all["flags"] != b_all["flags"]))
    if flag_mismatches:
        problems.append(f"flags: {flag_mismatches} samples differ")
    for name in reference.FIELDS:
        if name != "flags" and not _same_special(a_all[name], b_all[name]):
            problems.append(f"{name}: NaN / inf on different samples")
    arclength = _normalized(a_all["arclength"], b_all["arclength"])
    if arclength > ARCLENGTH_RTOL:
        problems.append(f"arclength: differs by {arclength:.3g} > {ARCLENGTH_RTOL:g}")
    direct = {
        name: _normalized(a_all[name], b_all[name]) for name in reference.FIELDS if name != "flags"
    }

    if problems:
        raise AssertionError(f"{label}: outputs differ:\n  " + "\n  ".join(problems))
    return {
        "samples": len(t),
        "flag_counts": {
            name: int(np.count_nonzero(a_all["flags"] & bit))
            for name, bit in (
                ("STOPPED", reference.STOPPED),
                ("STRAIGHT", reference.STRAIGHT),
                ("EDGE", reference.EDGE),
                ("GAP", reference.GAP),
            )
        },
        "derivatives_eps_sum_w_x": {"tolerance": DERIVATIVE_ULPS, "measured": derivative_ulps},
        "numpy_gradient_eps_sum_w_x": gradient_ulps,
        "formulas_normalized": {"tolerance": FORMULA_RTOL, "measured": formula},
        "arclength_normalized": {"tolerance": ARCLENGTH_RTOL, "measured": arclength},
        "flags_identical": True,
        "direct_normalized_difference": direct,
    }

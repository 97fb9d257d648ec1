"""Units of the axes: labels of each quantity, lengths shown in a readable unit, plain ticks."""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any, NamedTuple, Optional

import numpy as np
import numpy.typing as npt
from matplotlib.ticker import Formatter

from .. import _core
from ._samples import Samples

__all__ = [
    "LENGTH_UNITS",
    "QUANTITIES",
    "LengthScale",
    "PlainTicks",
    "Units",
    "axis_label",
    "length_scale",
    "unit_labels",
]

F64 = npt.NDArray[np.float64]
Units = Optional[Mapping[str, str]]

#: Display units of length per metre, for ``length_unit``.
LENGTH_UNITS = {"µm": 1e6, "um": 1e6, "mm": 1e3, "cm": 1e2, "m": 1.0, "km": 1e-3}
_SMALL, _LARGE = 0.5, 50e3  # auto length unit: mm below 0.5 m of extent, km above 50 km

# name: (label, unit template); {L} length, {T} time, {F} force, {E} energy.
QUANTITIES: dict[str, tuple[str, str]] = {
    "speed": ("speed v", "{L}/{T}"),
    "arclength": ("arc length s", "{L}"),
    "curvature": ("curvature κ", "1/{L}"),
    "signed_curvature": ("signed curvature (left +)", "1/{L}"),
    "radius": ("radius of curvature ρ", "{L}"),
    "torsion": ("torsion τ", "1/{L}"),
    "accel_tangential": ("tangential accel. a_t", "{L}/{T}²"),
    "accel_normal": ("normal accel. a_n", "{L}/{T}²"),
    "angular_speed": ("turn rate ω", "rad/{T}"),
    "angular_accel": ("turn-rate change dω/dt", "rad/{T}²"),
    "velocity": ("|velocity|", "{L}/{T}"),
    "acceleration": ("|acceleration|", "{L}/{T}²"),
    "jerk": ("|jerk|", "{L}/{T}³"),
    "twist": ("frame twist", "rad"),
    "time": ("time t", "{T}"),
    "work": ("cumulative work W", "{E}"),
}
_DEFAULT_UNITS = {"length": "m", "time": "s", "force": "N", "energy": "J"}


def unit_labels(units: Units) -> dict[str, str]:
    u = dict(_DEFAULT_UNITS)
    if units is not None:
        if not isinstance(units, Mapping):
            raise TypeError(f"units: expected a mapping such as {{'length': 'm'}}, got {units!r}")
        u.update({str(k): str(v) for k, v in units.items()})
    return u


def _unit_of(name: str, u: dict[str, str]) -> str:
    if name in u:
        return u[name]
    template = QUANTITIES.get(name, (name, ""))[1]
    return template.format(L=u["length"], T=u["time"], F=u["force"], E=u["energy"])


def axis_label(name: str, u: dict[str, str], label: Optional[str] = None) -> str:
    text = label if label is not None else QUANTITIES.get(name, (name.replace("_", " "), ""))[0]
    unit = _unit_of(name, u)
    return f"{text} [{unit}]" if unit else text


class PlainTicks(Formatter):
    """Tick labels of the values times ``factor`` (metres shown as mm or km, joules as kJ).

    Plain numbers with as few decimals as the ticks need to differ and read exactly, never an
    offset ("1e-7 + 2.4998e-2") that a reader has to add up; scientific notation only for very
    small or very large values. The axis keeps its data (and its locator) in the data's units.
    """

    def __init__(self, factor: float = 1.0) -> None:
        self.factor = float(factor)
        self.spec = ".0f"

    def set_locs(self, locs: Any) -> None:
        v = np.unique(np.asarray(locs, dtype=float) * self.factor)
        v = v[np.isfinite(v)]
        top = float(np.max(np.abs(v), initial=0.0))
        step = float(np.min(np.diff(v))) if len(v) > 1 else top
        tol = 1e-6 * step if step > 0 else 1e-12 * max(top, 1e-300)
        decimals = next(
            (n for n in range(16) if np.allclose(np.round(v, n), v, rtol=0.0, atol=tol)), 15
        )
        if top == 0.0 or 1e-4 <= top < 1e9:
            self.spec = f".{decimals}f"
        else:  # as many significant digits as the ticks need, all alike
            exact = (p for p in range(15) if all(abs(float(f"{x:.{p}e}") - x) <= tol for x in v))
            self.spec = f".{next(exact, 14)}e"

    def __call__(self, x: float, pos: Optional[int] = None) -> str:
        text = format(x * self.factor, self.spec)
        if float(text) == 0.0:
            text = text.lstrip("-")
        return text.replace("-", "\N{MINUS SIGN}")

    def format_data_short(self, value: float) -> str:
        return f"{value * self.factor:.6g}"


class LengthScale(NamedTuple):
    """How lengths are shown: the unit, the factor from the data's unit, what is scaled."""

    unit: str
    factor: float
    quantities: frozenset[str]  # results whose values are lengths and take the shown unit

    def apply(self, axis: Any) -> None:
        """Label the ticks of an axis holding lengths in the shown unit."""
        axis.set_major_formatter(PlainTicks(self.factor))


def length_scale(u: dict[str, str], length_unit: str, d: Samples) -> LengthScale:
    """Choose the unit lengths are shown in; adds it to ``u`` for arc length and radius."""
    data_unit = u["length"]
    if not isinstance(length_unit, str):
        raise TypeError(f"length_unit: expected a str, got {length_unit!r}")
    if length_unit == "auto":
        if data_unit != "m":  # the caller's own units: shown as they are
            unit, factor = data_unit, 1.0
        else:
            pts = d.position[np.isfinite(d.position).all(axis=1)]
            extent = float(np.max(np.ptp(pts, axis=0))) if len(pts) else 0.0
            unit = "mm" if 0.0 < extent < _SMALL else ("km" if extent > _LARGE else "m")
            factor = LENGTH_UNITS[unit]
    elif length_unit == data_unit:
        unit, factor = data_unit, 1.0
    elif length_unit in LENGTH_UNITS and data_unit in LENGTH_UNITS:
        unit, factor = length_unit, LENGTH_UNITS[length_unit] / LENGTH_UNITS[data_unit]
    else:
        known = ", ".join(repr(k) for k in LENGTH_UNITS)
        raise _core.InputError(
            f"length_unit: expected 'auto' or one of {known} (data in {data_unit!r}), "
            f"got {length_unit!r}"
        )
    scaled = frozenset(q for q in ("arclength", "radius") if q not in u)
    for q in scaled:
        u[q] = unit
    return LengthScale(unit, factor, scaled)

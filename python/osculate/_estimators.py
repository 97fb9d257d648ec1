"""Derivative estimators other than finite differences: option checks and the call into Rust."""

from __future__ import annotations

from typing import Any, Optional

import numpy as np
import numpy.typing as npt

from . import _core
from ._validate import Grouping, as_int, as_real, call_kernel

__all__ = ["FIT_METHODS", "METHODS", "EstimatorOptions", "fit_core"]

METHODS = ("fd", "spline", "smooth", "local", "linear", "auto")
FIT_METHODS = ("spline", "smooth", "local", "linear")
_BCS = ("not-a-knot", "natural", "clamped")


class EstimatorOptions:
    """Validated estimator options; only those that apply to the method may be given."""

    def __init__(
        self,
        method: str,
        *,
        order: Optional[int] = None,
        bc: Optional[str] = None,
        bc_velocity: Any = None,
        degree: Optional[int] = None,
        smoothing: Optional[float] = None,
        noise: Optional[float] = None,
        weights: Any = None,
        window: Optional[int] = None,
        window_span: Optional[float] = None,
        derivative: Optional[int] = None,
    ) -> None:
        if method not in METHODS:
            raise _core.InputError(f"method: expected one of {METHODS}, got {method!r}")
        given = {
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
        }
        allowed = {
            "fd": {"order"},
            "spline": {"bc", "bc_velocity"},
            "smooth": {"degree", "smoothing", "noise", "weights", "derivative"},
            "local": {"degree", "window", "window_span"},
            "linear": set(),
            # fd's order, and the smoothing spline's options for when it is chosen.
            "auto": {"order", "degree", "smoothing", "noise", "weights", "derivative"},
        }[method]
        for name, value in given.items():
            if value is not None and name not in allowed:
                raise _core.InputError(
                    f"{name}: does not apply to method={method!r} (it takes {sorted(allowed)})"
                )
        self.method = method
        self.order = 2 if order is None else as_int("order", order, 2, 4)
        if self.order not in (2, 4):
            raise _core.InputError(f"order: must be 2 or 4, got {self.order}")
        self.bc = "not-a-knot" if bc is None else bc
        if self.bc not in _BCS:
            raise _core.InputError(f"bc: expected one of {_BCS}, got {bc!r}")
        if (self.bc == "clamped") != (bc_velocity is not None):
            raise _core.InputError('bc_velocity: give it exactly when bc="clamped"')
        self.bc_velocity = bc_velocity
        default_degree = 5 if method in ("smooth", "auto") else 4
        self.degree = default_degree if degree is None else as_int("degree", degree, 0, 10**6)
        if method == "smooth" and self.degree not in (3, 5):
            raise _core.InputError(f"degree: must be 3 or 5 for method='smooth', got {degree}")
        if method == "local" and not 1 <= self.degree <= 5:
            raise _core.InputError(f"degree: must be 1 to 5 for method='local', got {degree}")
        self.smoothing = None if smoothing is None else as_real("smoothing", smoothing)
        self.noise = None if noise is None else as_real("noise", noise)
        self.weights = weights
        self.window = None if window is None else as_int("window", window, 1, 2**62)
        self.window_span = None if window_span is None else as_real("window_span", window_span)
        self.derivative = 0 if derivative is None else as_int("derivative", derivative, 0, 3)

    def describe(self) -> str:
        """Short human-readable summary, e.g. ``smooth (degree 5)``."""
        if self.method == "fd":
            return f"fd (order {self.order})"
        if self.method == "spline":
            return f"spline (bc {self.bc})"
        if self.method in ("linear", "auto"):
            return self.method
        return f"{self.method} (degree {self.degree})"

    def kernel_options(self, dim: int, uncertainty: Optional[str] = None) -> dict[str, Any]:
        """Return the options as the kernels take them (``uncertainty``: the covariance kept)."""
        start = end = None
        if self.bc_velocity is not None:
            start, end = _end_velocities(self.bc_velocity, dim)
        return {
            "method": self.method,
            "order": self.order,
            "bc": self.bc,
            "bc_velocity": None if start is None else [start, end],
            "degree": self.degree,
            "smoothing": self.smoothing,
            "noise": self.noise,
            "window": self.window,
            "window_span": self.window_span,
            "derivative": self.derivative,
            "uncertainty": uncertainty,
        }

    def kernel_weights(self, n: int) -> npt.NDArray[np.float64]:
        """Return the weights as a float64 vector of ``n`` rows (caller order)."""
        w = np.asarray(self.weights)
        if w.dtype.kind not in "fiu":
            raise TypeError(f"weights: expected real numbers, got dtype {w.dtype}")
        if w.shape != (n,):
            raise _core.InputError(f"weights: expected shape ({n},), got {w.shape}")
        return np.ascontiguousarray(w, dtype=np.float64)


def _end_velocities(v: Any, dim: int) -> tuple[list[float], list[float]]:
    arr = np.asarray(v, dtype=float)
    if arr.shape != (2, dim):
        raise _core.InputError(
            f"bc_velocity: expected (start, end) velocities of shape (2, {dim}), got {arr.shape}"
        )
    return arr[0].tolist(), arr[1].tolist()


def fit_core(
    opts: EstimatorOptions,
    g: Grouping,
    t: npt.NDArray[np.float64],
    x: npt.NDArray[np.float64],
    uncertainty: Optional[str] = None,
) -> _core.FittedPaths:
    """Fit every track (arrays in kernel row order).

    ``uncertainty`` ("sampling" or "posterior") keeps what the standard errors need.
    """
    start = end = None
    if opts.bc_velocity is not None:
        start, end = _end_velocities(opts.bc_velocity, x.shape[1])
    weights = None
    if opts.weights is not None:
        w = np.asarray(opts.weights)
        if w.dtype.kind not in "fiu":
            raise TypeError(f"weights: expected real numbers, got dtype {w.dtype}")
        if w.shape != (len(t),):
            raise _core.InputError(f"weights: expected shape ({len(t)},), got {w.shape}")
        weights = g.to_kernel(np.ascontiguousarray(w, dtype=np.float64))
    return call_kernel(
        g,
        _core.fit_paths,
        t,
        x,
        g.offsets,
        method=opts.method,
        bc=opts.bc,
        bc_start=start,
        bc_end=end,
        degree=opts.degree,
        smoothing=opts.smoothing,
        noise=opts.noise,
        window=opts.window,
        window_span=opts.window_span,
        weights=weights,
        derivative=opts.derivative,
        uncertainty=uncertainty,
    )

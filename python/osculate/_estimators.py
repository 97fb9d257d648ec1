"""Derivative estimators: the options as given, and the call into Rust.

The kernel owns the rules (``src/fit_options.rs``): defaults, ranges, which options apply to
which method; the binding converts the types. Here only array-likes are converted.
"""

from __future__ import annotations

from typing import Any, Optional

import numpy as np
import numpy.typing as npt

from . import _core
from ._validate import Grouping, as_real_array, call_kernel

__all__ = ["METHODS", "EstimatorOptions", "fit_core"]

METHODS: tuple[str, ...] = tuple(_core.ESTIMATOR_METHODS)


class EstimatorOptions:
    """Estimator options as given, checked by the kernel when made.

    ``options`` holds the options given (None ones left out) as the kernel's dictionary, with
    ``bc_velocity`` converted to a float array; ``weights`` is kept as given (its rows follow the
    caller's). ``order`` (fd) and ``degree`` (smooth, local) are the kernel's resolved values
    (``order`` None, ``degree`` 0 where they do not apply).
    """

    def __init__(self, method: str, **given: Any) -> None:
        self._check(method, given, fit_only=False)

    @classmethod
    def unchecked(cls, method: str, given: dict[str, Any]) -> EstimatorOptions:
        """Return the options as given, for a kernel call that checks them itself."""
        opts = cls.__new__(cls)
        opts._take(method, given)
        return opts

    @classmethod
    def for_fit(cls, method: str, given: dict[str, Any]) -> EstimatorOptions:
        """Options of a fitted estimator: as the constructor, refusing ``method="fd"``."""
        opts = cls.__new__(cls)
        opts._check(method, given, fit_only=True)
        return opts

    def _take(self, method: str, given: dict[str, Any]) -> None:
        """Keep the options given (None ones left out), arrays converted."""
        self.method = method
        self.options: dict[str, Any] = {"method": method}
        self.options.update((k, v) for k, v in given.items() if v is not None)
        self.weights: Any = self.options.pop("weights", None)
        if "bc_velocity" in self.options:
            self.options["bc_velocity"] = as_real_array("bc_velocity", given["bc_velocity"])

    def _check(self, method: str, given: dict[str, Any], fit_only: bool) -> None:
        self._take(method, given)
        checked = _core.check_estimator_options(
            {**self.options, "weights": self.weights}, fit_only=fit_only
        )
        self._description: str = checked["description"]
        self.order: Optional[int] = checked["order"]
        self.degree: int = checked["degree"] or 0
        self.window: Optional[int] = self.options.get("window")

    def describe(self) -> str:
        """Short human-readable summary, e.g. ``smooth (degree 5)``."""
        return self._description

    def weights_array(self, n: int) -> Optional[npt.NDArray[np.float64]]:
        """Return the weights as float64 on the caller's ``n`` rows (None when not given)."""
        if self.weights is None:
            return None
        w = as_real_array("weights", self.weights)
        if w.shape != (n,):
            raise _core.InputError(f"weights: expected shape ({n},), got {w.shape}")
        return w


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
    w = opts.weights_array(len(t))
    weights = None if w is None else g.to_kernel(w)
    return call_kernel(
        g,
        _core.fit_paths,
        t,
        x,
        g.offsets,
        options=opts.options,
        weights=weights,
        uncertainty=uncertainty,
    )

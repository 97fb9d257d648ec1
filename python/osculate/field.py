"""Fields given on a regular grid, interpolated in Rust (mirrors ``src/field.rs``)."""

from __future__ import annotations

from typing import Any, Optional, Union

import numpy as np
import numpy.typing as npt

from . import _core
from ._validate import as_real_array, call_kernel

__all__ = ["GridField"]

F64 = npt.NDArray[np.float64]


class GridField:
    """A field on a regular 2-D or 3-D grid, interpolated bilinearly or trilinearly.

    Parameters
    ----------
    values : array_like
        Node values with the grid axes first: shape (n0, n1[, n2]) for a scalar field (for
        :func:`line_integral`), or (n0, n1[, n2], ndim) for a vector field (for :func:`work`
        and :func:`power`). Node ``(i, j[, k])`` sits at ``origin + (i*dx, j*dy[, k*dz])``, the
        ``indexing="ij"`` layout of :func:`numpy.meshgrid`. Every axis needs at least 2 nodes;
        values must be finite.
    origin : array_like, shape (ndim,)
        Position of node ``(0, 0[, 0])``; its length sets the number of grid axes (2 or 3).
    spacing : float or array_like, shape (ndim,)
        Node spacing along each axis, finite and > 0.
    outside : {"error", "nan", "clamp"}, default "error"
        Evaluating outside the grid box is an error naming the track and row (``"error"``),
        gives NaN (``"nan"``; an integral touching it is NaN), or takes the value at the nearest
        point of the box (``"clamp"``). Points within 1e-9 of a cell of the box count as inside.

    Attributes
    ----------
    values : ndarray
        The node values, float64 and C-contiguous (shared with the caller when already so).
    ndim : int
        Grid axes, 2 or 3.
    components : int or None
        Values per node of a vector field, None for a scalar field.
    origin, spacing : tuple of float
        As given.
    outside : str
        As given.

    Notes
    -----
    Bilinear / trilinear interpolation is linear interpolation along each axis in turn (W. H.
    Press et al., *Numerical Recipes*, 3rd ed. (2007), §3.6): continuous, exact for fields that
    are linear in each coordinate (so for constant and linear fields), second-order accurate
    for smooth fields, with kinks at the cell faces. The interpolation runs in Rust.

    Examples
    --------
    >>> import numpy as np
    >>> import osculate as osc
    >>> x, y = np.meshgrid(np.arange(4.0), np.arange(3.0), indexing="ij")
    >>> g = osc.GridField(2 * x + y, origin=(0, 0), spacing=1.0)
    >>> g([[1.5, 0.25], [3.0, 2.0]]).tolist()      # linear fields are reproduced exactly
    [3.25, 8.0]
    >>> g([[4.0, 0.0]])
    Traceback (most recent call last):
    ...
    osculate.InputError: points: row 0: point [4.0, 0.0] is outside the grid box ...
    """

    def __init__(
        self,
        values: npt.ArrayLike,
        origin: npt.ArrayLike,
        spacing: Union[float, npt.ArrayLike],
        *,
        outside: str = "error",
    ) -> None:
        org = as_real_array("origin", origin)
        if org.ndim != 1 or len(org) not in (2, 3):
            raise _core.InputError(
                f"origin: expected 2 or 3 coordinates (one per grid axis), got shape {org.shape}"
            )
        ndim = len(org)
        sp = as_real_array("spacing", spacing)
        if np.ndim(spacing) == 0:  # one step for every axis
            sp = np.full(ndim, sp.item())
        if sp.shape != (ndim,):
            raise _core.InputError(
                f"spacing: expected a number or {ndim} steps (one per grid axis), got shape "
                f"{sp.shape}"
            )
        vals = as_real_array("values", values)
        if vals.ndim not in (ndim, ndim + 1) or (vals.ndim == ndim + 1 and vals.shape[-1] != ndim):
            raise _core.InputError(
                f"values: a {ndim}-D grid needs shape (n0, ..., n{ndim - 1}) for a scalar field "
                f"or (n0, ..., n{ndim - 1}, {ndim}) for a vector field, got {vals.shape}"
            )
        if not isinstance(outside, str):
            raise TypeError(f"outside: expected a string, got {outside!r}")
        self.values: F64 = vals
        self.ndim: int = ndim
        self.components: Optional[int] = ndim if vals.ndim == ndim + 1 else None
        self.origin: tuple[float, ...] = tuple(float(v) for v in org)
        self.spacing: tuple[float, ...] = tuple(float(v) for v in sp)
        self.outside: str = outside
        # The kernel checks node counts, spacing and outside; evaluating no point runs them once.
        self._eval(np.empty((0, ndim)))
        finite = np.isfinite(vals)
        if not finite.all():
            bad = tuple(int(i) for i in np.argwhere(~finite)[0])
            raise _core.InputError(
                f"values: node {bad[:ndim]} is not finite ({vals[bad]}); fill gaps first"
            )

    def __repr__(self) -> str:
        kind = "scalar" if self.components is None else f"{self.components}-vector"
        shape = "x".join(str(s) for s in self.values.shape[: self.ndim])
        return (
            f"<osculate.GridField: {self.ndim}-D {kind} field on {shape} nodes, "
            f"origin {self.origin}, spacing {self.spacing}, outside={self.outside!r}>"
        )

    @property
    def bounds(self) -> tuple[F64, F64]:
        """Lowest and highest corner of the grid box."""
        lo = np.asarray(self.origin)
        return lo, lo + (np.asarray(self.values.shape[: self.ndim]) - 1) * np.asarray(self.spacing)

    def _eval(self, points: F64) -> F64:
        return call_kernel(
            None,
            _core.grid_eval,
            self.values,
            points,
            grid_ndim=self.ndim,
            origin=list(self.origin),
            spacing=list(self.spacing),
            outside=self.outside,
        )

    def __call__(self, points: npt.ArrayLike) -> F64:
        """Interpolate at ``points`` of shape (m, ndim).

        Returns
        -------
        ndarray
            Shape (m,) for a scalar field, (m, ndim) for a vector field.
        """
        p = as_real_array("points", points)
        if p.ndim != 2 or p.shape[1] != self.ndim:
            raise _core.InputError(
                f"points: expected shape (m, {self.ndim}) for a {self.ndim}-D grid, got {p.shape}"
            )
        return self._eval(p)

    def _kernel_args(self) -> dict[str, Any]:
        return {
            "values": self.values,
            "grid_ndim": self.ndim,
            "origin": list(self.origin),
            "spacing": list(self.spacing),
            "outside": self.outside,
        }

"""The sample adapter: per-sample arrays of a Kinematics or an accessor DataFrame, sorted."""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any, Optional

import numpy as np
import numpy.typing as npt

from .. import _core
from .._validate import Grouping, group_rows
from ..intrinsic import Kinematics

__all__ = ["Samples"]

F64 = npt.NDArray[np.float64]


class Samples:
    """Per-sample arrays of a Kinematics or of an accessor DataFrame, in track-then-time order."""

    def __init__(
        self,
        k: Any,
        *,
        time: Any = None,
        position: Optional[Sequence[Any]] = None,
        by: Any = None,
    ) -> None:
        self.k = k
        self.is_kinematics = isinstance(k, Kinematics)
        if self.is_kinematics:
            self.n = len(k)
            self.axis_names: list[str] = list("xyz"[: k.dim])
            pos = k.position
            t: Optional[F64] = k.t
            tracks = k.tracks
            self.frame = k.frame
            self.estimator: Optional[str] = k.estimator
        elif hasattr(k, "columns") and hasattr(k, "index"):
            cols = list(k.columns)
            self.n = len(k)
            names = list(position) if position is not None else self._guess_position(cols)
            missing = [c for c in names if c not in cols]
            if missing:
                raise _core.InputError(f"position: no column {missing[0]!r} in the frame")
            self.axis_names = [str(c) for c in names]
            pos = np.column_stack([np.asarray(k[c], dtype=float) for c in names])
            t = self._time(k, cols, time)
            if by is not None and by not in cols:
                raise _core.InputError(f"by: no column {by!r} in the frame")
            tracks = None if by is None else np.asarray(k[by])
            # The accessor gives a twist column only with the rotation-minimizing frame.
            self.frame = "rotation-minimizing" if "twist" in cols else "frenet"
            self.estimator = None
        else:
            raise TypeError(
                "expected an osculate.Kinematics or a pandas DataFrame of df.osc.kinematics "
                f"results, got {type(k).__name__}"
            )
        if pos.shape[1] not in (2, 3):
            raise _core.InputError(f"position: expected 2 or 3 columns, got {pos.shape[1]}")
        self.dim = int(pos.shape[1])
        ids = None if tracks is None else np.asarray(tracks)
        if ids is not None and ids.dtype.kind == "O":
            ids = ids.astype(str)
        self.grouped = tracks is not None
        key = np.arange(self.n) if t is None else np.where(np.isfinite(t), t, np.inf)
        g = group_rows(self.n, tracks=ids)  # labels and codes of the ids
        g = Grouping.from_codes(g.row_codes(), g.labels, key)  # each track in time order
        self.labels = g.labels
        self.order = np.arange(self.n) if g.order is None else g.order
        self.codes = g.row_codes()[self.order]
        self.position = pos[self.order]
        self.t = None if t is None else t[self.order]
        same = self.codes[1:] == self.codes[:-1]
        self.first = np.concatenate([[True], ~same])  # first row of each track (sorted order)
        self.last = np.concatenate([~same, [True]])

    @staticmethod
    def _guess_position(cols: list[Any]) -> list[Any]:
        for names in (("east", "north", "up"), ("x", "y", "z"), ("position_x", "position_y")):
            present = [c for c in names if c in cols]
            if len(present) >= 2 and present == list(names[: len(present)]):
                if names[0] == "position_x" and "position_z" in cols:
                    present.append("position_z")
                return present
        raise _core.InputError(
            "position: name the position columns (e.g. position=['x', 'y']); the frame has none "
            "of east/north[/up], x/y[/z] (run df.osc.kinematics(..., keep=True) to keep them)"
        )

    @staticmethod
    def _time(k: Any, cols: list[Any], time: Any) -> Optional[F64]:
        name = time if time is not None else next((c for c in ("t", "time") if c in cols), None)
        if name is None:
            return None
        if name not in cols:
            raise _core.InputError(f"time: no column {name!r} in the frame")
        col = k[name]
        kind = np.asarray(col).dtype.kind
        if kind in "mM" or str(getattr(col, "dtype", "")).startswith("datetime64"):
            import pandas as pd

            stamps = pd.to_datetime(col)
            seconds = (stamps - stamps.min()).dt.total_seconds()
            return np.asarray(seconds, dtype=float)
        return np.asarray(col, dtype=float)

    # Quantities, in sorted order.
    def has(self, name: str) -> bool:
        if self.is_kinematics:
            return getattr(self.k, name, None) is not None
        return name in self.k.columns or f"{name}_x" in self.k.columns

    def get(self, name: str) -> F64:
        """Return a scalar quantity (vectors give their length), sorted."""
        if name == "time":
            if self.t is None:
                raise _core.InputError("time: the frame has no time column; pass time='column'")
            return self.t
        if self.is_kinematics:
            a = getattr(self.k, name, None)
            if a is None or not isinstance(a, np.ndarray) or a.shape[:1] != (self.n,):
                raise _core.InputError(f"quantity: unknown or unavailable result {name!r}")
        elif name in self.k.columns:
            a = np.asarray(self.k[name], dtype=float)
        elif f"{name}_x" in self.k.columns:
            a = self.vector(name, sort=False)
        else:
            raise _core.InputError(f"quantity: no column {name!r} (nor {name}_x) in the frame")
        a = np.asarray(a, dtype=float)
        if a.ndim == 2:
            a = np.sqrt(np.sum(a**2, axis=1))
        return a[self.order]

    def standard_error(self, name: str) -> Optional[F64]:
        """Return the standard error of a scalar quantity (sorted), or None if there is none."""
        if self.is_kinematics:
            se = self.k.se
            a = None if se is None or name not in se or se[name].ndim != 1 else se[name]
        else:
            col = f"{name}_se"
            a = self.k[col] if col in self.k.columns else None
        return None if a is None else np.asarray(a, dtype=float)[self.order]

    def vector(self, name: str, *, sort: bool = True) -> F64:
        if self.is_kinematics:
            a = np.asarray(getattr(self.k, name), dtype=float)
        else:
            names = [f"{name}_{c}" for c in "xyz" if f"{name}_{c}" in self.k.columns]
            if not names:
                raise _core.InputError(f"quantity: no columns {name}_x, {name}_y in the frame")
            a = np.column_stack([np.asarray(self.k[c], dtype=float) for c in names])
        return a[self.order] if sort else a

    def flags(self) -> npt.NDArray[np.uint8]:
        if self.is_kinematics:
            f = self.k.flags
        elif "flags" in self.k.columns:
            f = np.asarray(self.k["flags"])
        else:
            return np.zeros(self.n, dtype=np.uint8)
        return np.asarray(f).astype(np.uint8)[self.order]

    def track_names(self) -> list[str]:
        return [str(x) for x in self.labels] if self.grouped else ["path"]

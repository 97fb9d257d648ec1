"""Per-sample tables of the report (Parquet with pyarrow, else CSV) and numbers read from them."""

from __future__ import annotations

from typing import Any

import numpy as np
import numpy.typing as npt

__all__ = [
    "flips",
    "kinematics_columns",
    "median_by_track",
    "middle_rows",
    "smoothing_of",
    "undefined",
    "write_csv",
    "write_table",
]

F64 = npt.NDArray[np.float64]


def middle_rows(mask: npt.NDArray[np.bool_], groups: npt.NDArray[np.int64], keep: float) -> Any:
    """Rows of ``mask`` in the middle ``keep`` fraction (by row order) of each group's run."""
    rows = np.flatnonzero(mask)
    g = groups[rows]
    order = np.argsort(g, kind="stable")
    rows, g = rows[order], g[order]
    starts = np.searchsorted(g, g, side="left")
    ends = np.searchsorted(g, g, side="right")
    pos = (np.arange(len(rows)) - starts) / np.maximum(ends - starts - 1, 1)
    margin = 0.5 * (1.0 - keep)
    return rows[(pos >= margin) & (pos <= 1.0 - margin)]


def median_by_track(values: F64, codes: npt.NDArray[np.intp], m: int) -> F64:
    """Median of the finite values of each of ``m`` tracks (NaN for a track without any)."""
    ok = np.isfinite(values)
    v, c = values[ok], codes[ok]
    order = np.lexsort((v, c))
    v, c = v[order], c[order]
    counts = np.bincount(c, minlength=m)
    start = np.concatenate([[0], np.cumsum(counts)[:-1]])
    lo = start + (counts - 1) // 2
    hi = start + counts // 2
    has = counts > 0
    out = np.full(m, np.nan)
    out[has] = 0.5 * (v[lo[has]] + v[hi[has]])
    return out


def write_table(path: Any, columns: dict[str, np.ndarray]) -> Any:
    """Write columns as Parquet when pyarrow is present (``.parquet``), else as CSV."""
    import csv

    try:
        import pyarrow as pa
        import pyarrow.parquet as pq
    except ImportError:
        target = path.with_suffix(".csv")
        with target.open("w", newline="", encoding="utf-8") as fh:
            w = csv.writer(fh)
            w.writerow(list(columns))
            w.writerows(zip(*(np.asarray(c).tolist() for c in columns.values())))
        return target
    target = path.with_suffix(".parquet")
    pq.write_table(pa.table({k: np.asarray(v) for k, v in columns.items()}), target)
    return target


def write_csv(path: Any, columns: dict[str, np.ndarray]) -> Any:
    import csv

    with path.open("w", newline="", encoding="utf-8") as fh:
        w = csv.writer(fh)
        w.writerow(list(columns))
        w.writerows(zip(*(np.asarray(c).tolist() for c in columns.values())))
    return path


def kinematics_columns(
    k: Any, names: tuple[str, ...], track: str = "track"
) -> dict[str, np.ndarray]:
    cols: dict[str, np.ndarray] = {}
    if k.tracks is not None:
        cols[track] = k.tracks
    cols["t"] = k.t
    for j, axis in enumerate(names):
        cols[axis] = k.position[:, j]
    for name in (
        "speed",
        "arclength",
        "curvature",
        "signed_curvature",
        "radius",
        "torsion",
        "accel_tangential",
        "accel_normal",
        "angular_speed",
    ):
        cols[name] = getattr(k, name)
    for j, axis in enumerate("xyz"[: k.dim]):
        cols[f"normal_{axis}"] = k.normal[:, j]
    if k.twist is not None:
        cols["twist"] = k.twist
    cols["flags"] = k.flags
    return cols


def smoothing_of(k: Any) -> F64:
    """Return the smoothing λ* chosen for each track (NaN when the estimator has none)."""
    info = k.fit_info or {}
    return np.asarray(info.get("smoothing", [np.nan]), dtype=float)


def flips(normal: F64, same_track: npt.NDArray[np.bool_]) -> int:
    """Consecutive samples whose normals differ by more than 90° (a flip of the frame)."""
    dot = np.einsum("ij,ij->i", normal[1:], normal[:-1])
    return int(np.sum((dot < 0) & same_track))


def undefined(normal: F64, rows: npt.NDArray[np.bool_]) -> int:
    """Rows of ``rows`` where the normal is undefined (NaN)."""
    return int(np.sum(~np.isfinite(normal).all(axis=1) & rows))

//! Bindings of the WGS 84 geodetic ↔ east-north-up kernels.

use super::error::{contiguous, detached, rows};
use crate::geodesy::{self, Origin};
use numpy::{PyArray2, PyReadonlyArray1, PyReadonlyArray2};
use pyo3::prelude::*;

/// ENU rows and the origins used, as returned to Python.
type EnuAndOrigins<'py> = (Bound<'py, PyArray2<f64>>, Bound<'py, PyArray2<f64>>);

fn rows3(py: Python<'_>, v: Vec<f64>) -> PyResult<Bound<'_, PyArray2<f64>>> {
    rows(py, v, 3)
}

/// Geodetic rows `(n, 3)` (lat°, lon°, h m) to east-north-up metres per track; returns the ENU
/// rows and the origin used by each track `(m, 3)`. `origin=None`: each track's first finite fix.
#[pyfunction]
#[pyo3(signature = (llh, offsets, *, origin=None))]
pub fn geodetic_to_enu<'py>(
    py: Python<'py>,
    llh: PyReadonlyArray2<'py, f64>,
    offsets: PyReadonlyArray1<'py, i64>,
    origin: Option<PyReadonlyArray2<'py, f64>>,
) -> PyResult<EnuAndOrigins<'py>> {
    let x = contiguous("llh", llh.as_slice())?;
    let off = contiguous("offsets", offsets.as_slice())?;
    let given = match &origin {
        Some(o) => Some(contiguous("origin", o.as_slice())?),
        None => None,
    };
    let out = detached(py, || {
        let origin = given.map_or(Origin::FirstFix, Origin::Given);
        geodesy::geodetic_to_enu(x, off, origin)
    })?;
    Ok((rows3(py, out.enu)?, rows3(py, out.origins)?))
}

/// East-north-up rows `(n, 3)` in metres back to geodetic (lat°, lon°, h m) per track, about the
/// given origin(s) `(1, 3)` or `(m, 3)`.
#[pyfunction]
#[pyo3(signature = (enu, offsets, *, origin))]
pub fn enu_to_geodetic<'py>(
    py: Python<'py>,
    enu: PyReadonlyArray2<'py, f64>,
    offsets: PyReadonlyArray1<'py, i64>,
    origin: PyReadonlyArray2<'py, f64>,
) -> PyResult<Bound<'py, PyArray2<f64>>> {
    let x = contiguous("enu", enu.as_slice())?;
    let off = contiguous("offsets", offsets.as_slice())?;
    let o = contiguous("origin", origin.as_slice())?;
    let llh = detached(py, || geodesy::enu_to_geodetic(x, off, Origin::Given(o)))?;
    rows3(py, llh)
}

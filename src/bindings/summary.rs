//! Binding of the per-track summary kernel.

use super::error::{contiguous, detached};
use crate::summary::{summarize as kernel, Samples, QUANTITIES};
use numpy::{IntoPyArray, PyReadonlyArray1, PyReadonlyArray2, PyUntypedArrayMethods};
use pyo3::exceptions::PyValueError;
use pyo3::prelude::*;
use pyo3::types::PyDict;

/// Per-track summary figures (see `osculate.summary`); `se` holds the standard errors of speed,
/// a_t, a_n, curvature and one jerk component, each an array or None.
#[pyfunction]
#[allow(clippy::too_many_arguments)]
pub fn summarize<'py>(
    py: Python<'py>,
    t: PyReadonlyArray1<'py, f64>,
    flags: PyReadonlyArray1<'py, u8>,
    speed: PyReadonlyArray1<'py, f64>,
    accel_tangential: PyReadonlyArray1<'py, f64>,
    accel_normal: PyReadonlyArray1<'py, f64>,
    curvature: PyReadonlyArray1<'py, f64>,
    angular_speed: PyReadonlyArray1<'py, f64>,
    arclength: PyReadonlyArray1<'py, f64>,
    jerk: PyReadonlyArray2<'py, f64>,
    se: Vec<Option<PyReadonlyArray1<'py, f64>>>,
    offsets: PyReadonlyArray1<'py, i64>,
    half: PyReadonlyArray1<'py, i64>,
) -> PyResult<Bound<'py, PyDict>> {
    if se.len() != QUANTITIES.len() {
        return Err(PyValueError::new_err(format!(
            "se: expected {} entries ({})",
            QUANTITIES.len(),
            QUANTITIES.join(", ")
        )));
    }
    let mut errs: [Option<&[f64]>; 5] = [None; 5];
    for (slot, a) in errs.iter_mut().zip(&se) {
        if let Some(a) = a {
            *slot = Some(contiguous("se", a.as_slice())?);
        }
    }
    let half: Vec<usize> = contiguous("half", half.as_slice())?
        .iter()
        .map(|&h| h.max(0) as usize)
        .collect();
    let s = Samples {
        t: contiguous("t", t.as_slice())?,
        flags: contiguous("flags", flags.as_slice())?,
        speed: contiguous("speed", speed.as_slice())?,
        accel_tangential: contiguous("accel_tangential", accel_tangential.as_slice())?,
        accel_normal: contiguous("accel_normal", accel_normal.as_slice())?,
        curvature: contiguous("curvature", curvature.as_slice())?,
        angular_speed: contiguous("angular_speed", angular_speed.as_slice())?,
        arclength: contiguous("arclength", arclength.as_slice())?,
        dim: jerk.shape()[1],
        jerk: contiguous("jerk", jerk.as_slice())?,
        se: errs,
    };
    let off = contiguous("offsets", offsets.as_slice())?;
    let rows = detached(py, || kernel(&s, off, &half))?;
    let out = PyDict::new(py);
    let col =
        |f: &dyn Fn(&crate::summary::Summary) -> f64| -> Vec<f64> { rows.iter().map(f).collect() };
    let count = |f: &dyn Fn(&crate::summary::Summary) -> usize| -> Vec<i64> {
        rows.iter().map(|r| f(r) as i64).collect()
    };
    out.set_item("trusted", count(&|r| r.trusted).into_pyarray(py))?;
    out.set_item("curved", count(&|r| r.curved).into_pyarray(py))?;
    out.set_item("flagged", count(&|r| r.flagged).into_pyarray(py))?;
    out.set_item("length", col(&|r| r.length).into_pyarray(py))?;
    out.set_item("duration", col(&|r| r.duration).into_pyarray(py))?;
    for (q, name) in QUANTITIES.iter().enumerate() {
        out.set_item(*name, col(&|r| r.extremes[q].value).into_pyarray(py))?;
        out.set_item(
            format!("{name}_at"),
            col(&|r| r.extremes[q].at).into_pyarray(py),
        )?;
        out.set_item(
            format!("{name}_se"),
            col(&|r| r.extremes[q].se).into_pyarray(py),
        )?;
    }
    out.set_item(
        "p95_accel_normal",
        col(&|r| r.p95_accel_normal).into_pyarray(py),
    )?;
    out.set_item("p5_radius", col(&|r| r.p5_radius).into_pyarray(py))?;
    out.set_item("turning_angle", col(&|r| r.turning_angle).into_pyarray(py))?;
    Ok(out)
}

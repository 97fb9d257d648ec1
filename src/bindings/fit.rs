//! Bindings of fitted paths: spline, smoothing spline and local-polynomial estimators.

use super::error::{contiguous, detached, rows};
use super::kinematics::{kinematics_options, to_dict};
use crate::diff::FdOrder;
use crate::fit::{fit_batch, Fits, Method, MethodOptions};
use crate::kinematics::{of_fits, of_fits_at, Options};
use crate::resample::{resample, Spacing};
use crate::KernelError;
use numpy::{
    IntoPyArray, PyArray1, PyArray2, PyReadonlyArray1, PyReadonlyArray2, PyUntypedArrayMethods,
};
use pyo3::prelude::*;
use pyo3::types::PyDict;

/// Fitted tracks, evaluable anywhere. Built by `fit_paths`.
#[pyclass(module = "osculate._core", frozen)]
pub struct FittedPaths {
    fits: Fits,
}

fn bad(argument: &'static str, detail: String) -> KernelError {
    KernelError::Option { argument, detail }
}

/// Fit every track of a batch (arrays validated by the Python layer).
#[pyfunction]
#[pyo3(signature = (t, positions, offsets, *, method, bc="not-a-knot", bc_start=None, bc_end=None,
    degree=5, smoothing=None, noise=None, window=None, window_span=None, weights=None,
    derivative=2, uncertainty=None))]
#[allow(clippy::too_many_arguments)]
pub fn fit_paths<'py>(
    py: Python<'py>,
    t: PyReadonlyArray1<'py, f64>,
    positions: PyReadonlyArray2<'py, f64>,
    offsets: PyReadonlyArray1<'py, i64>,
    method: &str,
    bc: &str,
    bc_start: Option<Vec<f64>>,
    bc_end: Option<Vec<f64>>,
    degree: usize,
    smoothing: Option<f64>,
    noise: Option<f64>,
    window: Option<usize>,
    window_span: Option<f64>,
    weights: Option<PyReadonlyArray1<'py, f64>>,
    derivative: usize,
    uncertainty: Option<String>,
) -> PyResult<FittedPaths> {
    let dim = positions.shape()[1];
    let t = contiguous("t", t.as_slice())?;
    let x = contiguous("positions", positions.as_slice())?;
    let off = contiguous("offsets", offsets.as_slice())?;
    let w = match &weights {
        Some(w) => Some(contiguous("weights", w.as_slice())?),
        None => None,
    };
    let options = MethodOptions {
        name: method,
        bc,
        bc_start,
        bc_end,
        degree,
        smoothing,
        noise,
        window,
        window_span,
        derivative,
        uncertainty: uncertainty.as_deref(),
    };
    let fits = detached(py, move || {
        let m = Method::from_options(options)?;
        fit_batch(t, x, dim, off, w, &m)
    })?;
    Ok(FittedPaths { fits })
}

#[pymethods]
impl FittedPaths {
    /// Number of tracks.
    fn __len__(&self) -> usize {
        self.fits.tracks.len()
    }

    /// Coordinates (2 or 3).
    #[getter]
    fn dim(&self) -> usize {
        self.fits.dim
    }

    /// Kinematics at the fitted samples, on the rows of the fit (`options` as in
    /// `kinematics_options`).
    #[pyo3(signature = (*, options=None))]
    fn kinematics<'py>(
        &self,
        py: Python<'py>,
        options: Option<Bound<'py, PyDict>>,
    ) -> PyResult<Bound<'py, PyDict>> {
        let opts = kinematics_options(py, options.as_ref(), FdOrder::Two)?;
        let k = detached(py, || of_fits(&self.fits, &opts))?;
        to_dict(py, k, opts.outputs)
    }

    /// Kinematics at times `t` grouped by track with `query_offsets` (no gap flags).
    #[pyo3(signature = (t, query_offsets, *, options=None))]
    fn kinematics_at<'py>(
        &self,
        py: Python<'py>,
        t: PyReadonlyArray1<'py, f64>,
        query_offsets: PyReadonlyArray1<'py, i64>,
        options: Option<Bound<'py, PyDict>>,
    ) -> PyResult<Bound<'py, PyDict>> {
        let t = contiguous("t", t.as_slice())?;
        let q = contiguous("query_offsets", query_offsets.as_slice())?;
        let opts = Options {
            gap_factor: f64::INFINITY,
            ..kinematics_options(py, options.as_ref(), FdOrder::Two)?
        };
        let k = detached(py, || of_fits_at(&self.fits, t, q, &opts))?;
        to_dict(py, k, opts.outputs)
    }

    /// Derivative `nu` (0 to 3) of every track at times `t` grouped with `query_offsets`.
    fn evaluate<'py>(
        &self,
        py: Python<'py>,
        t: PyReadonlyArray1<'py, f64>,
        query_offsets: PyReadonlyArray1<'py, i64>,
        nu: usize,
    ) -> PyResult<Bound<'py, PyArray2<f64>>> {
        let t = contiguous("t", t.as_slice())?;
        let q = contiguous("query_offsets", query_offsets.as_slice())?;
        let d = self.fits.dim;
        let v = detached(py, || {
            if nu > 3 {
                return Err(bad("nu", format!("must be 0, 1, 2 or 3, got {nu}")));
            }
            crate::fit::evaluate(&self.fits, t, q, nu)
        })?;
        rows(py, v, d)
    }

    /// Points at uniform arc-length `step`, or `count` points, or the arc lengths `at` on every
    /// track; `t` and `extra` are the fitted rows (kernel order). Returns a dict of arrays.
    #[pyo3(signature = (t, extra, *, step=None, count=None, at=None, endpoint=true))]
    #[allow(clippy::too_many_arguments)]
    fn resample<'py>(
        &self,
        py: Python<'py>,
        t: PyReadonlyArray1<'py, f64>,
        extra: PyReadonlyArray2<'py, f64>,
        step: Option<f64>,
        count: Option<usize>,
        at: Option<PyReadonlyArray1<'py, f64>>,
        endpoint: bool,
    ) -> PyResult<Bound<'py, PyDict>> {
        let ncols = extra.shape()[1];
        let t = contiguous("t", t.as_slice())?;
        let e = contiguous("extra", extra.as_slice())?;
        let at = match &at {
            Some(a) => Some(contiguous("at", a.as_slice())?.to_vec()),
            None => None,
        };
        let d = self.fits.dim;
        let r = detached(py, move || {
            let spacing = match (step, count, at) {
                (Some(step), None, None) => Spacing::Step { step, endpoint },
                (None, Some(c), None) => Spacing::Count(c),
                (None, None, Some(a)) => Spacing::At(a),
                _ => return Err(bad("step", "give exactly one of step, count and at".into())),
            };
            resample(&self.fits, t, e, ncols, &spacing)
        })?;
        let out = PyDict::new(py);
        let offsets: Vec<i64> = r.offsets.iter().map(|&o| o as i64).collect();
        out.set_item("offsets", offsets.into_pyarray(py))?;
        out.set_item("s", r.s.into_pyarray(py))?;
        out.set_item("t", r.t.into_pyarray(py))?;
        out.set_item("position", rows(py, r.x, d)?)?;
        out.set_item("extra", rows(py, r.extra, ncols)?)?;
        out.set_item("length", r.lengths.into_pyarray(py))?;
        Ok(out)
    }

    /// Per-track choices: dimensionless smoothing λ*, effective degrees of freedom, criterion,
    /// window.
    fn info<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyDict>> {
        let infos: Vec<_> = self.fits.tracks.iter().map(|f| f.info()).collect();
        let out = PyDict::new(py);
        let col = |f: fn(&crate::fit::FitInfo) -> f64| -> Bound<'py, PyArray1<f64>> {
            infos.iter().map(f).collect::<Vec<f64>>().into_pyarray(py)
        };
        out.set_item("smoothing", col(|i| i.smoothing))?;
        out.set_item("edf", col(|i| i.edf))?;
        out.set_item("criterion", col(|i| i.criterion))?;
        out.set_item("window", col(|i| i.window))?;
        out.set_item("length_error", col(|i| i.length_error))?;
        out.set_item("noise", col(|i| i.noise))?;
        out.set_item("jerk_smoothing", col(|i| i.jerk_smoothing))?;
        out.set_item("bandwidth", col(|i| i.bandwidth))?;
        Ok(out)
    }
}

//! Bindings of fitted paths: spline, smoothing spline and local-polynomial estimators.

use super::error::{contiguous, detached, rows};
use super::kinematics::{kinematics_options, to_dict};
use crate::diff::FdOrder;
use crate::error::try_collect;
use crate::fit::{fit_batch, Estimator, EstimatorOptions, FitInfo, Fits, Method};
use crate::fit_options::EndVelocities;
use crate::kinematics::{of_fits, of_fits_at, Options};
use crate::resample::{resample, Spacing};
use crate::KernelError;
use numpy::{
    IntoPyArray, PyArray1, PyArray2, PyReadonlyArray1, PyReadonlyArray2, PyReadonlyArrayDyn,
    PyUntypedArrayMethods,
};
use pyo3::exceptions::{PyMemoryError, PyOverflowError, PyTypeError};
use pyo3::prelude::*;
use pyo3::types::{PyBool, PyComplex, PyDict};

/// Fitted tracks, evaluable anywhere. Built by `fit_paths`.
#[pyclass(module = "osculate._core", frozen)]
pub struct FittedPaths {
    fits: Fits,
}

fn bad(argument: &'static str, detail: String) -> KernelError {
    KernelError::Option { argument, detail }
}

/// An InputError naming `argument`, like those of the kernel.
fn input_error(py: Python<'_>, argument: &'static str, detail: String) -> PyErr {
    // `detached` is the one place that turns kernel errors into exceptions (with the `argument`
    // attribute set); the closure only returns the error.
    match detached(py, move || Err::<(), _>(bad(argument, detail))) {
        Err(e) => e,
        Ok(()) => PyTypeError::new_err(argument),
    }
}

fn repr(v: &Bound<'_, PyAny>) -> String {
    let r = v.repr().map(|r| r.to_string()).unwrap_or_default();
    match r.char_indices().nth(80) {
        Some((i, _)) => format!("{}...", &r[..i]),
        None => r,
    }
}

/// Python's and NumPy's booleans: integers to Python, never an option value here.
fn is_boolean(v: &Bound<'_, PyAny>) -> bool {
    v.is_instance_of::<PyBool>()
        || v.get_type()
            .fully_qualified_name()
            .is_ok_and(|n| n.to_string().starts_with("numpy.bool"))
}

fn text(name: &'static str, v: &Bound<'_, PyAny>) -> PyResult<String> {
    v.extract::<String>()
        .map_err(|_| PyTypeError::new_err(format!("{name}: expected a string, got {}", repr(v))))
}

/// An integer option: Python or NumPy integers (anything with `__index__`), not booleans.
fn integer(py: Python<'_>, name: &'static str, v: &Bound<'_, PyAny>) -> PyResult<i64> {
    let typed = !is_boolean(v) && v.get_type().hasattr("__index__")?;
    match v.extract::<i64>() {
        Ok(i) if typed => Ok(i),
        Err(e) if typed && e.is_instance_of::<PyOverflowError>(py) => {
            Err(input_error(py, name, format!("{} is too large", repr(v))))
        }
        _ => Err(PyTypeError::new_err(format!(
            "{name}: expected an integer, got {}",
            repr(v)
        ))),
    }
}

/// A real option: anything Python converts with `float()` except booleans and complex numbers.
fn real(py: Python<'_>, name: &'static str, v: &Bound<'_, PyAny>) -> PyResult<f64> {
    let complex = v.is_instance_of::<PyComplex>()
        || v.get_type()
            .fully_qualified_name()
            .is_ok_and(|n| n.to_string().starts_with("numpy.complex"));
    match v.extract::<f64>() {
        Ok(x) if !complex && !is_boolean(v) => Ok(x),
        Err(e) if e.is_instance_of::<PyOverflowError>(py) => {
            Err(input_error(py, name, format!("{} is too large", repr(v))))
        }
        _ => Err(PyTypeError::new_err(format!(
            "{name}: expected a real number, got {}",
            repr(v)
        ))),
    }
}

/// `bc_velocity` as a float64 array of any shape (the Python layer converts array-likes); the
/// kernel checks the shape.
fn end_velocities(v: &Bound<'_, PyAny>) -> PyResult<EndVelocities> {
    let a = v.extract::<PyReadonlyArrayDyn<'_, f64>>().map_err(|_| {
        PyTypeError::new_err(format!(
            "bc_velocity: expected a float64 array, got {}",
            repr(v)
        ))
    })?;
    let view = a.as_array();
    Ok(EndVelocities {
        shape: view.shape().to_vec(),
        values: try_collect(view.len(), view.iter().copied())
            .map_err(|e| PyMemoryError::new_err(e.to_string()))?,
    })
}

/// The estimator options from a dictionary keyed by the option names of the Python API
/// (`method`, `order`, `bc`, `bc_velocity`, `degree`, `smoothing`, `noise`, `weights`, `window`,
/// `window_span`, `derivative`): the one place where they are converted from
/// Python objects. A missing key or None is an option not given; `weights` only says whether
/// weights are given (any value but None; the weights travel with the arrays). Type errors name
/// the option (a bool or a string is not an integer); an unknown key is a TypeError. Ranges,
/// defaults and which options apply to which method are the kernel's
/// ([`crate::fit_options::Estimator::from_options`]).
pub(crate) fn estimator_options(
    py: Python<'_>,
    options: &Bound<'_, PyDict>,
) -> PyResult<EstimatorOptions> {
    let mut o = EstimatorOptions::default();
    for (key, value) in options.iter() {
        let key: String = key.extract()?;
        if value.is_none() {
            continue;
        }
        let v = &value;
        match key.as_str() {
            "method" => o.method = text("method", v)?,
            "order" => o.order = Some(integer(py, "order", v)?),
            "bc" => o.bc = Some(text("bc", v)?),
            "bc_velocity" => o.bc_velocity = Some(end_velocities(v)?),
            "degree" => o.degree = Some(integer(py, "degree", v)?),
            "smoothing" => o.smoothing = Some(real(py, "smoothing", v)?),
            "noise" => o.noise = Some(real(py, "noise", v)?),
            "weights" => o.weights = true,
            "window" => o.window = Some(integer(py, "window", v)?),
            "window_span" => o.window_span = Some(real(py, "window_span", v)?),
            "derivative" => o.derivative = Some(integer(py, "derivative", v)?),
            other => {
                return Err(PyTypeError::new_err(format!(
                    "unexpected estimator option '{other}'"
                )))
            }
        }
    }
    Ok(o)
}

/// Check estimator options (a dict as in `fit_paths`) before any data is read: the conversion
/// and the kernel's checks of `fit_paths`, but `bc_velocity` only checked to have 2 or 3
/// columns. With `fit_only`, "fd" is refused. Returns the estimator's `description` and its
/// resolved `order` (fd) and `degree` (smooth, local), None where they do not apply.
#[pyfunction]
#[pyo3(signature = (options, *, fit_only=false))]
pub fn check_estimator_options<'py>(
    py: Python<'py>,
    options: Bound<'py, PyDict>,
    fit_only: bool,
) -> PyResult<Bound<'py, PyDict>> {
    let o = estimator_options(py, &options)?;
    let e = detached(py, move || {
        let e = Estimator::from_options(&o)?;
        if fit_only {
            e.clone().into_fit()?;
        }
        Ok(e)
    })?;
    let out = PyDict::new(py);
    out.set_item("description", e.describe())?;
    out.set_item("order", e.order())?;
    out.set_item("degree", e.degree())?;
    Ok(out)
}

/// Fit every track of a batch (arrays validated by the Python layer; `options` as in
/// [`estimator_options`], `weights` one per row, `uncertainty` "sampling" or "posterior" to keep
/// what the standard errors need).
#[pyfunction]
#[pyo3(signature = (t, positions, offsets, *, options, weights=None, uncertainty=None))]
pub fn fit_paths<'py>(
    py: Python<'py>,
    t: PyReadonlyArray1<'py, f64>,
    positions: PyReadonlyArray2<'py, f64>,
    offsets: PyReadonlyArray1<'py, i64>,
    options: Bound<'py, PyDict>,
    weights: Option<PyReadonlyArray1<'py, f64>>,
    uncertainty: Option<String>,
) -> PyResult<FittedPaths> {
    let dim = positions.shape()[1];
    let mut o = estimator_options(py, &options)?;
    o.weights = weights.is_some();
    if uncertainty.is_some() {
        o.uncertainty = uncertainty;
    }
    let t = contiguous("t", t.as_slice())?;
    let x = contiguous("positions", positions.as_slice())?;
    let off = contiguous("offsets", offsets.as_slice())?;
    let w = match &weights {
        Some(w) => Some(contiguous("weights", w.as_slice())?),
        None => None,
    };
    let fits = detached(py, move || {
        let m = Method::from_options(&o, dim)?;
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
        let infos: Vec<FitInfo> = self.fits.tracks.iter().map(|f| f.info()).collect();
        info_dict(py, &infos)
    }
}

/// Per-track fit choices as a dictionary of arrays (one entry per [`FitInfo`] field).
pub(crate) fn info_dict<'py>(py: Python<'py>, infos: &[FitInfo]) -> PyResult<Bound<'py, PyDict>> {
    let out = PyDict::new(py);
    let col = |f: fn(&FitInfo) -> f64| -> Bound<'py, PyArray1<f64>> {
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

//! Bindings of fitted paths: spline, smoothing spline and local-polynomial estimators.

use super::error::{contiguous, detached, rows};
use super::kinematics::{options, significance, to_dict};
use crate::diff::FdOrder;
use crate::fit::{fit_batch, Fits, Method};
use crate::kinematics::{of_fits, of_fits_at, Options};
use crate::local::Window;
use crate::resample::{resample, Spacing};
use crate::smooth::{Covariance, Smoothing};
use crate::spline::EndCondition;
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

#[allow(clippy::too_many_arguments)]
fn method(
    name: &str,
    bc: &str,
    bc_start: Option<Vec<f64>>,
    bc_end: Option<Vec<f64>>,
    degree: usize,
    smoothing: Option<f64>,
    noise: Option<f64>,
    window: Option<usize>,
    window_span: Option<f64>,
    derivative: usize,
    uncertainty: Option<&str>,
) -> crate::Result<Method> {
    let covariance = match uncertainty {
        None => None,
        Some("sampling") => Some(Covariance::Sampling),
        Some("posterior") => Some(Covariance::Posterior),
        Some(other) => {
            return Err(bad(
                "uncertainty",
                format!("expected \"sampling\" or \"posterior\", got {other:?}"),
            ))
        }
    };
    Ok(match name {
        "spline" => Method::Spline(match bc {
            "not-a-knot" => EndCondition::NotAKnot,
            "natural" => EndCondition::Natural,
            "clamped" => match (bc_start, bc_end) {
                (Some(start), Some(end)) => EndCondition::Clamped { start, end },
                _ => {
                    return Err(bad(
                        "bc",
                        "\"clamped\" needs the start and end velocities".into(),
                    ))
                }
            },
            other => {
                return Err(bad(
                    "bc",
                    format!("expected \"not-a-knot\", \"natural\" or \"clamped\", got {other:?}"),
                ))
            }
        }),
        "smooth" => {
            if derivative > 3 {
                return Err(bad(
                    "derivative",
                    format!("must be 0, 1, 2 or 3, got {derivative}"),
                ));
            }
            let smoothing = match (smoothing, noise) {
                (Some(_), Some(_)) => {
                    return Err(bad("smoothing", "give smoothing or noise, not both".into()))
                }
                (Some(l), None) if l.is_nan() || l < 0.0 || l.is_infinite() => {
                    return Err(bad(
                        "smoothing",
                        format!("must be finite and >= 0, got {l}"),
                    ))
                }
                (Some(l), None) => Smoothing::Fixed(l),
                (None, Some(s)) if s.is_nan() || s <= 0.0 || s.is_infinite() => {
                    return Err(bad("noise", format!("must be finite and > 0, got {s}")))
                }
                (None, Some(s)) => Smoothing::Noise(s),
                (None, None) => Smoothing::Gcv,
            };
            Method::Smooth {
                degree,
                smoothing,
                derivative,
                covariance,
            }
        }
        "local" => Method::Local {
            degree,
            window: match (window, window_span) {
                (Some(_), Some(_)) => {
                    return Err(bad(
                        "window",
                        "give a sample count or a time span, not both".into(),
                    ))
                }
                (Some(w), None) => Window::Samples(w),
                (None, Some(s)) => Window::Span(s),
                (None, None) => Window::Auto,
            },
            uncertainty: covariance.is_some(),
        },
        "linear" => Method::Linear,
        other => return Err(bad("method", format!("unknown method {other:?}"))),
    })
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
    let name = method.to_owned();
    let bc = bc.to_owned();
    let fits = detached(py, move || {
        let m = self::method(
            &name,
            &bc,
            bc_start,
            bc_end,
            degree,
            smoothing,
            noise,
            window,
            window_span,
            derivative,
            uncertainty.as_deref(),
        )?;
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

    /// Kinematics at the fitted samples, on the rows of the fit.
    #[pyo3(signature = (*, min_speed, min_curvature, gap_factor, up=None, uncertainty=false,
        auto_speed=false, auto_curvature=false, significance=3.0, max_relative_se=0.25,
        outputs=None))]
    #[allow(clippy::too_many_arguments)]
    fn kinematics<'py>(
        &self,
        py: Python<'py>,
        min_speed: f64,
        min_curvature: f64,
        gap_factor: f64,
        up: Option<[f64; 3]>,
        uncertainty: bool,
        auto_speed: bool,
        auto_curvature: bool,
        significance: f64,
        max_relative_se: f64,
        outputs: Option<Vec<String>>,
    ) -> PyResult<Bound<'py, PyDict>> {
        let want = detached(py, || super::kinematics::outputs(outputs))?;
        let opts = Options {
            uncertainty,
            outputs: want,
            significance: self::significance(
                auto_speed,
                auto_curvature,
                significance,
                max_relative_se,
            ),
            ..options(FdOrder::Two, min_speed, min_curvature, gap_factor, up)
        };
        let k = detached(py, || of_fits(&self.fits, &opts))?;
        to_dict(py, k, want)
    }

    /// Kinematics at times `t` grouped by track with `query_offsets`.
    #[pyo3(signature = (t, query_offsets, *, min_speed, min_curvature, up=None, outputs=None))]
    #[allow(clippy::too_many_arguments)]
    fn kinematics_at<'py>(
        &self,
        py: Python<'py>,
        t: PyReadonlyArray1<'py, f64>,
        query_offsets: PyReadonlyArray1<'py, i64>,
        min_speed: f64,
        min_curvature: f64,
        up: Option<[f64; 3]>,
        outputs: Option<Vec<String>>,
    ) -> PyResult<Bound<'py, PyDict>> {
        let t = contiguous("t", t.as_slice())?;
        let q = contiguous("query_offsets", query_offsets.as_slice())?;
        let want = detached(py, || super::kinematics::outputs(outputs))?;
        let opts = Options {
            outputs: want,
            ..options(FdOrder::Two, min_speed, min_curvature, f64::INFINITY, up)
        };
        let k = detached(py, || of_fits_at(&self.fits, t, q, &opts))?;
        to_dict(py, k, want)
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

/// Rotation-minimizing frames from positions, tangents and Frenet normals (kernel order).
#[pyfunction]
#[pyo3(signature = (positions, tangent, frenet_normal, offsets, *, initial=None))]
pub fn rotation_minimizing<'py>(
    py: Python<'py>,
    positions: PyReadonlyArray2<'py, f64>,
    tangent: PyReadonlyArray2<'py, f64>,
    frenet_normal: PyReadonlyArray2<'py, f64>,
    offsets: PyReadonlyArray1<'py, i64>,
    initial: Option<[f64; 3]>,
) -> PyResult<Bound<'py, PyDict>> {
    let d = positions.shape()[1];
    let x = contiguous("positions", positions.as_slice())?;
    let t = contiguous("tangent", tangent.as_slice())?;
    let nf = contiguous("frenet_normal", frenet_normal.as_slice())?;
    let off = contiguous("offsets", offsets.as_slice())?;
    let r = detached(py, || {
        crate::rmf::rotation_minimizing(x, t, nf, d, off, initial)
    })?;
    let out = PyDict::new(py);
    out.set_item("normal", rows(py, r.normal, d)?)?;
    out.set_item("binormal", rows(py, r.binormal, 3)?)?;
    out.set_item("twist", r.twist.into_pyarray(py))?;
    Ok(out)
}

//! Bindings of the kinematics pipeline (one call: estimate, stops, frame, caller order) and of
//! polyline arc length.

use super::error::{contiguous, detached, rows, to_pyerr};
use crate::diff::FdOrder;
use crate::kinematics::pipeline::{run_in, Estimator, Finished, Frame, Request};
use crate::kinematics::{Kinematics, Lend, Options, Outputs};
use crate::KernelError;
use numpy::{
    IntoPyArray, PyArray1, PyReadonlyArray1, PyReadonlyArray2, PyReadwriteArrayDyn,
    PyUntypedArrayMethods,
};
use pyo3::exceptions::PyTypeError;
use pyo3::prelude::*;
use pyo3::types::PyDict;

fn column<'py>(
    py: Python<'py>,
    v: Vec<f64>,
    n: usize,
    width: usize,
) -> PyResult<Bound<'py, PyAny>> {
    debug_assert_eq!(v.len(), n * width);
    Ok(if width == 1 {
        v.into_pyarray(py).into_any()
    } else {
        rows(py, v, width)?.into_any()
    })
}

/// The columns asked for (`outputs`), the flags, the noise per track and, when computed, the
/// standard errors of the columns asked for.
pub(crate) fn to_dict<'py>(
    py: Python<'py>,
    k: Kinematics<'_>,
    outputs: Outputs,
) -> PyResult<Bound<'py, PyDict>> {
    to_dict_lent(py, k, outputs, &[])
}

/// [`to_dict`] where the columns written into lent buffers are the caller's arrays `lent`.
fn to_dict_lent<'py>(
    py: Python<'py>,
    k: Kinematics<'_>,
    outputs: Outputs,
    lent: &[(&'static str, Bound<'py, PyAny>)],
) -> PyResult<Bound<'py, PyDict>> {
    let (n, d) = (k.n, k.dim);
    let out = PyDict::new(py);
    let vectors = [
        ("velocity", k.velocity, d),
        ("acceleration", k.acceleration, d),
        ("jerk", k.jerk, d),
        ("speed", k.speed, 1),
        ("arclength", k.arclength, 1),
        ("tangent", k.tangent, d),
        ("normal", k.normal, d),
        ("binormal", k.binormal, 3),
        ("curvature", k.curvature, 1),
        ("signed_curvature", k.signed_curvature, 1),
        ("torsion", k.torsion, 1),
        ("radius", k.radius, 1),
        ("center", k.center, d),
        ("accel_tangential", k.accel_tangential, 1),
        ("accel_normal", k.accel_normal, 1),
        ("angular_speed", k.angular_speed, 1),
        ("angular_accel", k.angular_accel, 1),
        ("position", k.position, d),
    ];
    for (name, v, w) in vectors {
        if outputs.has(name) {
            match v.into_vec() {
                Some(v) => out.set_item(name, column(py, v, n, w)?)?,
                None => {
                    if let Some((_, a)) = lent.iter().find(|(l, _)| *l == name) {
                        out.set_item(name, a)?;
                    }
                }
            }
        }
    }
    out.set_item("flags", k.flags.into_pyarray(py))?;
    out.set_item("noise", k.noise.into_pyarray(py))?;
    if k.se_w == 1 {
        let se = PyDict::new(py);
        let columns = [
            ("position", k.se_position),
            ("velocity", k.se_velocity),
            ("acceleration", k.se_acceleration),
            ("jerk", k.se_jerk),
            ("speed", k.se_speed),
            ("accel_tangential", k.se_accel_tangential),
            ("accel_normal", k.se_accel_normal),
            ("curvature", k.se_curvature),
            ("torsion", k.se_torsion),
            ("angular_speed", k.se_angular_speed),
            ("radius", k.se_radius),
        ];
        for (name, v) in columns {
            let asked = if name == "position" {
                "position_se"
            } else {
                name
            };
            if outputs.has(asked) || (name == "curvature" && outputs.has("signed_curvature")) {
                se.set_item(name, v.into_vec().unwrap_or_default().into_pyarray(py))?;
            }
        }
        out.set_item("se", se)?;
    }
    Ok(out)
}

/// The kinematics options from the dictionary every kinematics binding takes (`options=`): the
/// one place where they are converted from Python objects. Missing keys keep the kernel's
/// defaults; an unknown key is a TypeError (a misspelt option must not pass silently). Ranges
/// are the kernel's to check.
pub(crate) fn kinematics_options(
    py: Python<'_>,
    options: Option<&Bound<'_, PyDict>>,
    order: FdOrder,
) -> PyResult<Options> {
    let mut o = Options {
        order,
        ..Options::default()
    };
    let Some(d) = options else {
        return Ok(o);
    };
    for (key, value) in d.iter() {
        let key: String = key.extract()?;
        match key.as_str() {
            "min_speed" => o.thresholds.min_speed = value.extract()?,
            "min_curvature" => o.thresholds.min_curvature = value.extract()?,
            "gap_factor" => o.gap_factor = value.extract()?,
            "up" => o.up = value.extract()?,
            "uncertainty" => o.uncertainty = value.extract()?,
            "auto_speed" => o.significance.speed = value.extract()?,
            "auto_curvature" => o.significance.curvature = value.extract()?,
            "significance" => o.significance.z = value.extract()?,
            "max_relative_se" => o.significance.max_relative = value.extract()?,
            "outputs" => {
                let names: Option<Vec<String>> = value.extract()?;
                o.outputs = match names {
                    None => Outputs::ALL,
                    Some(v) => detached(py, || Outputs::from_names(v.iter().map(String::as_str)))?,
                };
            }
            other => {
                return Err(PyTypeError::new_err(format!(
                    "unknown kinematics option {other:?}"
                )))
            }
        }
    }
    Ok(o)
}

/// Cumulative polyline length per track, after checking the times.
#[pyfunction]
pub fn polyline_arclength<'py>(
    py: Python<'py>,
    t: PyReadonlyArray1<'py, f64>,
    positions: PyReadonlyArray2<'py, f64>,
    offsets: PyReadonlyArray1<'py, i64>,
) -> PyResult<Bound<'py, PyArray1<f64>>> {
    let dim = positions.shape()[1];
    let t = contiguous("t", t.as_slice())?;
    let x = contiguous("positions", positions.as_slice())?;
    let off = contiguous("offsets", offsets.as_slice())?;
    let s = detached(py, || {
        let checked = crate::batch::check_offsets(off, t.len())?;
        crate::batch::check_times(t, &checked, 2, "arclength")?;
        crate::arclength::polyline(x, dim, off)
    })?;
    Ok(s.into_pyarray(py))
}

/// Per-track numbers as a dictionary of arrays.
fn columns_dict<'py>(py: Python<'py>, cols: Vec<(&str, Vec<f64>)>) -> PyResult<Bound<'py, PyDict>> {
    let out = PyDict::new(py);
    for (name, v) in cols {
        out.set_item(name, v.into_pyarray(py))?;
    }
    Ok(out)
}

/// The whole kinematics of concatenated tracks in one call (see
/// `crate::kinematics::pipeline::run`): `estimator` a dict of the estimator options as in
/// `bindings::fit::estimator_options` (`uncertainty`: the covariance a fit keeps), `options` as in
/// [`kinematics_options`], `min_stop` (None: default; inf: no stops), `frame` "frenet" or
/// "rotation-minimizing" with `initial`, and `weights`. `order` (kernel row i is caller row
/// `order[i]`) and `inverse` (its inverse) relate the caller's rows to the kernel's, None when
/// they agree: positions, weights and — unless `t_kernel` says they already are — times are
/// gathered into kernel order here, and per-row results come back on the caller's rows. Stop
/// rows stay kernel rows.
#[pyfunction]
#[pyo3(name = "kinematics", signature = (t, positions, offsets, *, estimator, options=None,
    min_stop=None, frame="frenet", initial=None, weights=None, order=None, inverse=None,
    t_kernel=false, out=None, uncertainty=None))]
#[allow(clippy::too_many_arguments)]
pub fn kinematics_call<'py>(
    py: Python<'py>,
    t: PyReadonlyArray1<'py, f64>,
    positions: PyReadonlyArray2<'py, f64>,
    offsets: PyReadonlyArray1<'py, i64>,
    estimator: Bound<'py, PyDict>,
    options: Option<Bound<'py, PyDict>>,
    min_stop: Option<f64>,
    frame: &str,
    initial: Option<[f64; 3]>,
    weights: Option<PyReadonlyArray1<'py, f64>>,
    order: Option<PyReadonlyArray1<'py, usize>>,
    inverse: Option<PyReadonlyArray1<'py, usize>>,
    t_kernel: bool,
    out: Option<Bound<'py, PyDict>>,
    uncertainty: Option<String>,
) -> PyResult<Bound<'py, PyDict>> {
    let dim = positions.shape()[1];
    let (t, x, off) = (
        contiguous("t", t.as_slice())?,
        contiguous("positions", positions.as_slice())?,
        contiguous("offsets", offsets.as_slice())?,
    );
    let w = match &weights {
        Some(w) => Some(contiguous("weights", w.as_slice())?),
        None => None,
    };
    let inv = match &inverse {
        Some(i) => Some(contiguous("inverse", i.as_slice())?),
        None => None,
    };
    let ord = match &order {
        Some(i) => Some(contiguous("order", i.as_slice())?),
        None => None,
    };
    let mut est = super::fit::estimator_options(py, &estimator)?;
    est.uncertainty = uncertainty;
    let est = detached(py, || Estimator::for_dim(&est, dim))?;
    let opts = kinematics_options(py, options.as_ref(), FdOrder::Two)?;
    // Caller's buffers for some outputs, borrowed writable for the whole call.
    let mut lent: Vec<(&'static str, Bound<'py, PyAny>)> = Vec::new();
    let mut guards: Vec<(&'static str, PyReadwriteArrayDyn<'py, f64>)> = Vec::new();
    for (key, value) in out.iter().flat_map(|d| d.iter()) {
        let key: String = key.extract()?;
        let name = Outputs::NAMES
            .iter()
            .copied()
            .find(|n| *n == key && *n != "position" && *n != "position_se")
            .filter(|n| opts.outputs.has(n))
            .ok_or_else(|| {
                to_pyerr(
                    py,
                    KernelError::Option {
                        argument: "out",
                        detail: format!("{key:?} is not one of the outputs asked for"),
                    },
                )
            })?;
        let guard = value
            .extract::<PyReadwriteArrayDyn<'py, f64>>()
            .map_err(|_| {
                PyTypeError::new_err(format!(
                    "out: {key:?} must be a writeable float64 NumPy array not in use elsewhere"
                ))
            })?;
        lent.push((name, value.clone()));
        guards.push((name, guard));
    }
    let mut lend = Lend::default();
    for (name, g) in guards.iter_mut() {
        let buf = g.as_slice_mut().map_err(|_| {
            PyTypeError::new_err(format!("out: {name:?} must be a C-contiguous array"))
        })?;
        lend.lend(name, buf);
    }
    let frame = detached(py, || Frame::from_options(frame, initial))?;
    let rmf = matches!(frame, Frame::RotationMinimizing(_));
    let (f, twist) = detached(py, || {
        let gather = |a: &[f64], width: usize| match ord {
            Some(o) => crate::grouping::take_rows(a, width, o).map(Some),
            None => Ok(None),
        };
        let tk = if t_kernel { None } else { gather(t, 1)? };
        let xk = gather(x, dim)?;
        let wk = match w {
            Some(w) => gather(w, 1)?,
            None => None,
        };
        let request = Request {
            estimator: est,
            weights: wk.as_deref().or(w),
            options: opts,
            min_stop,
            frame,
        };
        let (t, x) = (tk.as_deref().unwrap_or(t), xk.as_deref().unwrap_or(x));
        // Lent buffers take the kernel's writes directly when no reordering follows.
        let (mut f, mut lend) = match inv {
            None => (run_in(t, x, dim, off, &request, lend)?, Lend::default()),
            Some(_) => (run_in(t, x, dim, off, &request, Lend::default())?, lend),
        };
        drop((tk, xk, wk));
        let mut twist = std::mem::take(&mut f.twist);
        if let Some(inv) = inv {
            f.k = f.k.into_rows(inv, &mut lend)?;
            if rmf {
                twist = crate::grouping::take_rows(&twist, 1, inv)?;
            }
        }
        Ok((f, twist))
    })?;
    let Finished {
        k,
        stops: stop_rows,
        stop_centres,
        info: fit_info,
        stats: s,
        fd_swamped,
        used,
        ..
    } = f;
    let out = to_dict_lent(py, k, opts.outputs, &lent)?;
    if rmf {
        out.set_item("twist", twist.into_pyarray(py))?;
    }
    out.set_item("method", used.name())?;
    out.set_item("estimator", used.describe())?;
    let to_i64 = |v: &[usize]| v.iter().map(|&r| r as i64).collect::<Vec<i64>>();
    let stops = PyDict::new(py);
    stops.set_item("first", to_i64(&stop_rows.first).into_pyarray(py))?;
    stops.set_item("last", to_i64(&stop_rows.last).into_pyarray(py))?;
    stops.set_item("track", to_i64(&stop_rows.track).into_pyarray(py))?;
    stops.set_item("centre", rows(py, stop_centres, dim)?)?;
    out.set_item("stops", stops)?;
    let stats = columns_dict(
        py,
        vec![
            ("step", s.step),
            ("back", s.back),
            ("speed", s.speed),
            ("dt", s.dt),
            ("accel", s.accel),
            ("flagged", s.flagged),
        ],
    )?;
    stats.set_item("fd_swamped", fd_swamped.into_pyarray(py))?;
    let count: Vec<i64> = off.windows(2).map(|w| w[1] - w[0]).collect();
    stats.set_item("count", count.into_pyarray(py))?;
    out.set_item("stats", stats)?;
    if !fit_info.is_empty() {
        out.set_item("info", super::fit::info_dict(py, &fit_info)?)?;
    }
    Ok(out)
}

//! Bindings of the finite-difference kinematics and polyline arc length kernels.

use super::error::{contiguous, detached, rows};
use crate::diff::FdOrder;
use crate::kinematics::{kinematics, Kinematics, Options, Outputs};
use crate::KernelError;
use numpy::{IntoPyArray, PyArray1, PyReadonlyArray1, PyReadonlyArray2, PyUntypedArrayMethods};
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
pub(crate) fn to_dict(
    py: Python<'_>,
    k: Kinematics,
    outputs: Outputs,
) -> PyResult<Bound<'_, PyDict>> {
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
            out.set_item(name, column(py, v, n, w)?)?;
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
                se.set_item(name, v.into_pyarray(py))?;
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

/// Finite-difference kinematics of concatenated tracks (validated arrays from the Python layer;
/// `options` as in [`kinematics_options`]).
#[pyfunction]
#[pyo3(signature = (t, positions, offsets, *, order, options=None))]
pub fn fd_kinematics<'py>(
    py: Python<'py>,
    t: PyReadonlyArray1<'py, f64>,
    positions: PyReadonlyArray2<'py, f64>,
    offsets: PyReadonlyArray1<'py, i64>,
    order: i64,
    options: Option<Bound<'py, PyDict>>,
) -> PyResult<Bound<'py, PyDict>> {
    let dim = positions.shape()[1];
    let (t, x, off) = (
        contiguous("t", t.as_slice())?,
        contiguous("positions", positions.as_slice())?,
        contiguous("offsets", offsets.as_slice())?,
    );
    let order = detached(py, || {
        FdOrder::from_int(order).ok_or_else(|| KernelError::Option {
            argument: "order",
            detail: format!("must be 2 or 4, got {order}"),
        })
    })?;
    let opts = kinematics_options(py, options.as_ref(), order)?;
    let result = detached(py, || kinematics(t, x, dim, off, &opts))?;
    to_dict(py, result, opts.outputs)
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

/// Per-track medians behind the data checks (kernel order; see `osculate.diagnose`).
#[pyfunction]
pub fn track_stats<'py>(
    py: Python<'py>,
    t: PyReadonlyArray1<'py, f64>,
    positions: PyReadonlyArray2<'py, f64>,
    offsets: PyReadonlyArray1<'py, i64>,
    flags: PyReadonlyArray1<'py, u8>,
) -> PyResult<Bound<'py, PyDict>> {
    let dim = positions.shape()[1];
    let t = contiguous("t", t.as_slice())?;
    let x = contiguous("positions", positions.as_slice())?;
    let off = contiguous("offsets", offsets.as_slice())?;
    let f = contiguous("flags", flags.as_slice())?;
    let s = detached(py, || crate::diagnose::track_stats(t, x, dim, off, f))?;
    let out = PyDict::new(py);
    out.set_item("step", s.step.into_pyarray(py))?;
    out.set_item("back", s.back.into_pyarray(py))?;
    out.set_item("speed", s.speed.into_pyarray(py))?;
    out.set_item("dt", s.dt.into_pyarray(py))?;
    out.set_item("accel", s.accel.into_pyarray(py))?;
    out.set_item("flagged", s.flagged.into_pyarray(py))?;
    Ok(out)
}

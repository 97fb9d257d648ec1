//! Bindings of the finite-difference kinematics and polyline arc length kernels.

use super::error::{contiguous, detached, rows};
use crate::diff::FdOrder;
use crate::frame::Thresholds;
use crate::kinematics::{kinematics, Kinematics, Options, Outputs};
use crate::uncertainty::Significance;
use crate::KernelError;
use numpy::{IntoPyArray, PyArray1, PyReadonlyArray1, PyReadonlyArray2, PyUntypedArrayMethods};
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

/// The set of outputs named by the caller (None: every quantity).
pub(crate) fn outputs(names: Option<Vec<String>>) -> crate::Result<Outputs> {
    match names {
        None => Ok(Outputs::ALL),
        Some(v) => Outputs::from_names(v.iter().map(String::as_str)),
    }
}

/// Kinematics options from the keyword arguments every kinematics binding takes (no standard
/// errors, absolute thresholds only).
pub(crate) fn options(
    order: FdOrder,
    min_speed: f64,
    min_curvature: f64,
    gap_factor: f64,
    up: Option<[f64; 3]>,
) -> Options {
    Options {
        order,
        thresholds: Thresholds {
            min_speed,
            min_curvature,
        },
        gap_factor,
        up,
        ..Options::default()
    }
}

/// The noise-aware flag options from their keyword arguments.
pub(crate) fn significance(
    speed: bool,
    curvature: bool,
    z: f64,
    max_relative: f64,
) -> Significance {
    Significance {
        speed,
        curvature,
        z,
        max_relative,
    }
}

/// Finite-difference kinematics of concatenated tracks (validated arrays from the Python layer).
#[pyfunction]
#[pyo3(signature = (t, positions, offsets, *, order, min_speed, min_curvature, gap_factor, up=None,
    uncertainty=false, auto_speed=false, auto_curvature=false, significance=3.0,
    max_relative_se=0.25, outputs=None))]
#[allow(clippy::too_many_arguments)]
pub fn fd_kinematics<'py>(
    py: Python<'py>,
    t: PyReadonlyArray1<'py, f64>,
    positions: PyReadonlyArray2<'py, f64>,
    offsets: PyReadonlyArray1<'py, i64>,
    order: i64,
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
    let dim = positions.shape()[1];
    let (t, x, off) = (
        contiguous("t", t.as_slice())?,
        contiguous("positions", positions.as_slice())?,
        contiguous("offsets", offsets.as_slice())?,
    );
    let want = detached(py, || self::outputs(outputs))?;
    let result = detached(py, || {
        let order = FdOrder::from_int(order).ok_or_else(|| KernelError::Option {
            argument: "order",
            detail: format!("must be 2 or 4, got {order}"),
        })?;
        let opts = Options {
            uncertainty,
            outputs: want,
            significance: self::significance(
                auto_speed,
                auto_curvature,
                significance,
                max_relative_se,
            ),
            ..options(order, min_speed, min_curvature, gap_factor, up)
        };
        kinematics(t, x, dim, off, &opts)
    })?;
    to_dict(py, result, want)
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
) -> PyResult<Bound<'py, PyDict>> {
    let dim = positions.shape()[1];
    let t = contiguous("t", t.as_slice())?;
    let x = contiguous("positions", positions.as_slice())?;
    let off = contiguous("offsets", offsets.as_slice())?;
    let s = detached(py, || crate::diagnose::track_stats(t, x, dim, off))?;
    let out = PyDict::new(py);
    out.set_item("step", s.step.into_pyarray(py))?;
    out.set_item("back", s.back.into_pyarray(py))?;
    out.set_item("speed", s.speed.into_pyarray(py))?;
    out.set_item("dt", s.dt.into_pyarray(py))?;
    out.set_item("accel", s.accel.into_pyarray(py))?;
    Ok(out)
}

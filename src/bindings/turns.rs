//! Bindings of the turn and speed-change kernels.

use super::error::{contiguous, detached};
use crate::turns::{speed_changes as speed_kernel, turns as turn_kernel};
use crate::turns::{Samples, SpeedOptions, TurnOptions};
use numpy::{IntoPyArray, PyReadonlyArray1, PyReadonlyArray2};
use pyo3::prelude::*;
use pyo3::types::PyDict;

/// Turns of every track: a dict of per-turn columns (rows are kernel rows).
#[pyfunction]
#[pyo3(signature = (t, s, curvature, curvature_se, speed, accel_normal, accel_tangential, flags, xy, vxy, offsets, *, z_on=3.0, z_off=1.0, min_curvature=1e-6, merge_samples=5, min_heading=0.17453292519943295, core=0.75, half=1))]
#[allow(clippy::too_many_arguments)]
pub fn find_turns<'py>(
    py: Python<'py>,
    t: PyReadonlyArray1<'py, f64>,
    s: PyReadonlyArray1<'py, f64>,
    curvature: PyReadonlyArray1<'py, f64>,
    curvature_se: Option<PyReadonlyArray1<'py, f64>>,
    speed: PyReadonlyArray1<'py, f64>,
    accel_normal: PyReadonlyArray1<'py, f64>,
    accel_tangential: PyReadonlyArray1<'py, f64>,
    flags: PyReadonlyArray1<'py, u8>,
    xy: PyReadonlyArray2<'py, f64>,
    vxy: PyReadonlyArray2<'py, f64>,
    offsets: PyReadonlyArray1<'py, i64>,
    z_on: f64,
    z_off: f64,
    min_curvature: f64,
    merge_samples: usize,
    min_heading: f64,
    core: f64,
    half: usize,
) -> PyResult<Bound<'py, PyDict>> {
    let smp = Samples {
        t: contiguous("t", t.as_slice())?,
        s: contiguous("arclength", s.as_slice())?,
        curvature: contiguous("curvature", curvature.as_slice())?,
        curvature_se: match &curvature_se {
            Some(a) => Some(contiguous("curvature_se", a.as_slice())?),
            None => None,
        },
        speed: contiguous("speed", speed.as_slice())?,
        accel_normal: contiguous("accel_normal", accel_normal.as_slice())?,
        accel_tangential: contiguous("accel_tangential", accel_tangential.as_slice())?,
        accel_tangential_se: None,
        flags: contiguous("flags", flags.as_slice())?,
        xy: contiguous("xy", xy.as_slice())?,
        vxy: contiguous("vxy", vxy.as_slice())?,
    };
    let off = contiguous("offsets", offsets.as_slice())?;
    let opts = TurnOptions {
        z_on,
        z_off,
        min_curvature,
        merge_samples,
        min_heading,
        core,
        half,
    };
    let rows = detached(py, || turn_kernel(&smp, off, &opts))?;
    let out = PyDict::new(py);
    let f = |g: fn(&crate::turns::Turn) -> f64| rows.iter().map(g).collect::<Vec<f64>>();
    let u = |g: fn(&crate::turns::Turn) -> usize| {
        rows.iter().map(|r| g(r) as i64).collect::<Vec<i64>>()
    };
    out.set_item("track", u(|r| r.track).into_pyarray(py))?;
    out.set_item("first", u(|r| r.first).into_pyarray(py))?;
    out.set_item("last", u(|r| r.last).into_pyarray(py))?;
    out.set_item(
        "direction",
        rows.iter()
            .map(|r| r.direction)
            .collect::<Vec<i8>>()
            .into_pyarray(py),
    )?;
    out.set_item("heading", f(|r| r.heading).into_pyarray(py))?;
    out.set_item("radius", f(|r| r.radius).into_pyarray(py))?;
    out.set_item("radius_se", f(|r| r.radius_se).into_pyarray(py))?;
    out.set_item("core", u(|r| r.core).into_pyarray(py))?;
    out.set_item("peak_radius", f(|r| r.peak_radius).into_pyarray(py))?;
    out.set_item("peak_at", f(|r| r.peak_at).into_pyarray(py))?;
    out.set_item("accel_normal", f(|r| r.accel_normal).into_pyarray(py))?;
    out.set_item("accel_normal_at", f(|r| r.accel_normal_at).into_pyarray(py))?;
    out.set_item("speed_in", f(|r| r.speed_in).into_pyarray(py))?;
    out.set_item("speed_out", f(|r| r.speed_out).into_pyarray(py))?;
    out.set_item("flagged", u(|r| r.flagged).into_pyarray(py))?;
    Ok(out)
}

/// Speed changes of every track: a dict of per-row columns (rows are kernel rows).
#[pyfunction]
#[pyo3(signature = (t, s, speed, accel_tangential, accel_tangential_se, flags, offsets, *, accel_on, accel_off, z_on=3.0, z_off=1.0, min_samples=3))]
#[allow(clippy::too_many_arguments)]
pub fn find_speed_changes<'py>(
    py: Python<'py>,
    t: PyReadonlyArray1<'py, f64>,
    s: PyReadonlyArray1<'py, f64>,
    speed: PyReadonlyArray1<'py, f64>,
    accel_tangential: PyReadonlyArray1<'py, f64>,
    accel_tangential_se: Option<PyReadonlyArray1<'py, f64>>,
    flags: PyReadonlyArray1<'py, u8>,
    offsets: PyReadonlyArray1<'py, i64>,
    accel_on: f64,
    accel_off: f64,
    z_on: f64,
    z_off: f64,
    min_samples: usize,
) -> PyResult<Bound<'py, PyDict>> {
    let ts = contiguous("t", t.as_slice())?;
    let n = ts.len();
    // Curvature, a_n and positions play no part in speed changes.
    let zeros = vec![0.0; n];
    let xy = vec![0.0; 2 * n];
    let smp = Samples {
        t: ts,
        s: contiguous("arclength", s.as_slice())?,
        curvature: &zeros,
        curvature_se: None,
        speed: contiguous("speed", speed.as_slice())?,
        accel_normal: &zeros,
        accel_tangential: contiguous("accel_tangential", accel_tangential.as_slice())?,
        accel_tangential_se: match &accel_tangential_se {
            Some(a) => Some(contiguous("accel_tangential_se", a.as_slice())?),
            None => None,
        },
        flags: contiguous("flags", flags.as_slice())?,
        xy: &xy,
        vxy: &xy,
    };
    let off = contiguous("offsets", offsets.as_slice())?;
    let opts = SpeedOptions {
        accel_on,
        accel_off,
        z_on,
        z_off,
        min_samples,
    };
    let rows = detached(py, || speed_kernel(&smp, off, &opts))?;
    let out = PyDict::new(py);
    let f = |g: fn(&crate::turns::SpeedChange) -> f64| rows.iter().map(g).collect::<Vec<f64>>();
    let u = |g: fn(&crate::turns::SpeedChange) -> usize| {
        rows.iter().map(|r| g(r) as i64).collect::<Vec<i64>>()
    };
    out.set_item("track", u(|r| r.track).into_pyarray(py))?;
    out.set_item("first", u(|r| r.first).into_pyarray(py))?;
    out.set_item("last", u(|r| r.last).into_pyarray(py))?;
    out.set_item(
        "direction",
        rows.iter()
            .map(|r| r.direction)
            .collect::<Vec<i8>>()
            .into_pyarray(py),
    )?;
    out.set_item("speed_before", f(|r| r.speed_before).into_pyarray(py))?;
    out.set_item("speed_after", f(|r| r.speed_after).into_pyarray(py))?;
    out.set_item("peak", f(|r| r.peak).into_pyarray(py))?;
    out.set_item("peak_at", f(|r| r.peak_at).into_pyarray(py))?;
    Ok(out)
}

//! Binding of the geometric-element kernel.

use super::error::{contiguous, detached};
use crate::elements::{elements as kernel, Element, Options, Samples};
use numpy::{IntoPyArray, PyArray1, PyReadonlyArray1, PyReadonlyArray2};
use pyo3::prelude::*;
use pyo3::types::PyDict;

type Pair<'py> = (Bound<'py, PyArray1<f64>>, Bound<'py, PyArray1<f64>>);
type Column = (&'static str, fn(&Element) -> f64);

/// Straights, arcs and spirals of every track (see `osculate.elements`); one array per column,
/// one entry per element, tracks in order.
#[pyfunction]
#[pyo3(signature = (
    t, arclength, curvature, se, flags, positions, offsets, *, penalty, min_length,
    bandwidth, significance, resolution, refine, max_iterations
))]
#[allow(clippy::too_many_arguments)]
pub fn find_elements<'py>(
    py: Python<'py>,
    t: PyReadonlyArray1<'py, f64>,
    arclength: PyReadonlyArray1<'py, f64>,
    curvature: PyReadonlyArray1<'py, f64>,
    se: PyReadonlyArray1<'py, f64>,
    flags: PyReadonlyArray1<'py, u8>,
    positions: PyReadonlyArray2<'py, f64>,
    offsets: PyReadonlyArray1<'py, i64>,
    penalty: f64,
    min_length: PyReadonlyArray1<'py, f64>,
    bandwidth: PyReadonlyArray1<'py, f64>,
    significance: f64,
    resolution: f64,
    refine: bool,
    max_iterations: usize,
) -> PyResult<Bound<'py, PyDict>> {
    let s = Samples {
        t: contiguous("t", t.as_slice())?,
        arclength: contiguous("arclength", arclength.as_slice())?,
        curvature: contiguous("curvature", curvature.as_slice())?,
        se: contiguous("se", se.as_slice())?,
        flags: contiguous("flags", flags.as_slice())?,
        xy: contiguous("positions", positions.as_slice())?,
    };
    let opt = Options {
        penalty,
        min_length: contiguous("min_length", min_length.as_slice())?,
        bandwidth: contiguous("bandwidth", bandwidth.as_slice())?,
        significance,
        resolution,
        refine,
        max_iterations,
    };
    let off = contiguous("offsets", offsets.as_slice())?;
    let rows = detached(py, || kernel(&s, off, &opt))?;
    let out = PyDict::new(py);
    let col = |f: fn(&Element) -> f64| -> Vec<f64> { rows.iter().map(f).collect() };
    out.set_item(
        "track",
        rows.iter()
            .map(|e| e.track as i64)
            .collect::<Vec<_>>()
            .into_pyarray(py),
    )?;
    out.set_item(
        "kind",
        rows.iter()
            .map(|e| e.kind)
            .collect::<Vec<_>>()
            .into_pyarray(py),
    )?;
    let floats: [Column; 16] = [
        ("start_arclength", |e| e.start_arclength),
        ("end_arclength", |e| e.end_arclength),
        ("start_time", |e| e.start_time),
        ("end_time", |e| e.end_time),
        ("length", |e| e.length),
        ("start_curvature", |e| e.start_curvature),
        ("end_curvature", |e| e.end_curvature),
        ("radius", |e| e.radius),
        ("spiral_parameter", |e| e.spiral_parameter),
        ("x", |e| e.x),
        ("y", |e| e.y),
        ("heading", |e| e.heading),
        ("rms", |e| e.rms),
        ("max_distance", |e| e.max_distance),
        ("samples", |e| e.samples as f64),
        ("refined", |e| f64::from(u8::from(e.refined))),
    ];
    for (name, f) in floats {
        out.set_item(name, col(f).into_pyarray(py))?;
    }
    Ok(out)
}

/// Fresnel integrals `(C(x), S(x))` elementwise (normalisation of `scipy.special.fresnel`,
/// which returns them in the order `(S, C)`).
#[pyfunction]
pub fn fresnel<'py>(py: Python<'py>, x: PyReadonlyArray1<'py, f64>) -> PyResult<Pair<'py>> {
    let x = contiguous("x", x.as_slice())?;
    let (c, s) = detached(py, || {
        let mut c = crate::error::try_filled(x.len(), 0.0)?;
        let mut s = crate::error::try_filled(x.len(), 0.0)?;
        for ((ci, si), &xi) in c.iter_mut().zip(s.iter_mut()).zip(x) {
            (*ci, *si) = crate::fresnel::fresnel(xi);
        }
        Ok((c, s))
    })?;
    Ok((c.into_pyarray(py), s.into_pyarray(py)))
}

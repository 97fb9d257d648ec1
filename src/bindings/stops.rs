//! Binding of the stop-interval kernel.

use super::error::{contiguous, detached};
use crate::stops::find_stops as kernel;
use numpy::{IntoPyArray, PyArray1, PyReadonlyArray1, PyReadonlyArray2, PyUntypedArrayMethods};
use pyo3::prelude::*;

/// Kernel rows of the first and last sample of every stop and its track, as int64 arrays.
#[pyfunction]
#[pyo3(signature = (t, positions, flags, offsets, noise, min_stop=None))]
#[allow(clippy::type_complexity)]
pub fn find_stops<'py>(
    py: Python<'py>,
    t: PyReadonlyArray1<'py, f64>,
    positions: PyReadonlyArray2<'py, f64>,
    flags: PyReadonlyArray1<'py, u8>,
    offsets: PyReadonlyArray1<'py, i64>,
    noise: PyReadonlyArray1<'py, f64>,
    min_stop: Option<f64>,
) -> PyResult<(
    Bound<'py, PyArray1<i64>>,
    Bound<'py, PyArray1<i64>>,
    Bound<'py, PyArray1<i64>>,
)> {
    let dim = positions.shape()[1];
    let ts = contiguous("t", t.as_slice())?;
    let xs = contiguous("positions", positions.as_slice())?;
    let fs = contiguous("flags", flags.as_slice())?;
    let os = contiguous("offsets", offsets.as_slice())?;
    let ns = contiguous("noise", noise.as_slice())?;
    let (first, last, track) = detached(py, || {
        let s = kernel(ts, xs, dim, fs, os, ns, min_stop)?;
        let int = |v: &[usize]| crate::error::try_collect(v.len(), v.iter().map(|&r| r as i64));
        Ok((int(&s.first)?, int(&s.last)?, int(&s.track)?))
    })?;
    Ok((
        first.into_pyarray(py),
        last.into_pyarray(py),
        track.into_pyarray(py),
    ))
}

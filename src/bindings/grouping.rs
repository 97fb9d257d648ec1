//! Bindings of the row grouping: the permutation between the caller's rows and the kernels'.

use super::error::{contiguous, detached};
use crate::grouping::{group, take_rows as take};
use numpy::ndarray::{ArrayD, IxDyn};
use numpy::{
    Element, IntoPyArray, PyArray1, PyArrayDyn, PyArrayMethods, PyReadonlyArray1,
    PyUntypedArrayMethods,
};
use pyo3::exceptions::PyTypeError;
use pyo3::prelude::*;

type Permutation<'py> = Option<Bound<'py, PyArray1<usize>>>;

/// Group rows by track code and time: `(order, inverse, offsets)`, the permutations None when the
/// rows already are grouped and in time order. `key` is float64 or int64 times, or None.
#[pyfunction]
#[pyo3(signature = (codes, n_tracks, key=None))]
#[allow(clippy::type_complexity)]
pub fn group_rows<'py>(
    py: Python<'py>,
    codes: PyReadonlyArray1<'py, i64>,
    n_tracks: usize,
    key: Option<Bound<'py, PyAny>>,
) -> PyResult<(
    Permutation<'py>,
    Permutation<'py>,
    Bound<'py, PyArray1<usize>>,
)> {
    let codes = contiguous("tracks", codes.as_slice())?;
    let g = match key {
        None => detached(py, || group::<f64>(codes, n_tracks, None))?,
        Some(k) => {
            if let Ok(k) = k.cast::<PyArray1<f64>>() {
                let k = k.readonly();
                let k = contiguous("t", k.as_slice())?;
                detached(py, || group(codes, n_tracks, Some(k)))?
            } else if let Ok(k) = k.cast::<PyArray1<i64>>() {
                let k = k.readonly();
                let k = contiguous("t", k.as_slice())?;
                detached(py, || group(codes, n_tracks, Some(k)))?
            } else {
                return Err(PyTypeError::new_err("t: expected a float64 or int64 array"));
            }
        }
    };
    Ok((
        g.order.map(|v| v.into_pyarray(py)),
        g.inverse.map(|v| v.into_pyarray(py)),
        g.offsets.into_pyarray(py),
    ))
}

fn take_typed<'py, T: Element + Copy + Default + Send + Sync>(
    py: Python<'py>,
    a: &Bound<'py, PyArrayDyn<T>>,
    index: &[usize],
) -> PyResult<Bound<'py, PyAny>> {
    let a = a.readonly();
    let shape = a.shape().to_vec();
    let width: usize = shape[1..].iter().product();
    let src = contiguous("a", a.as_slice())?;
    let out = detached(py, || take(src, width, index))?;
    let mut dims = shape;
    dims[0] = index.len();
    let arr = ArrayD::from_shape_vec(IxDyn(&dims), out)
        .map_err(|e| PyTypeError::new_err(e.to_string()))?;
    Ok(arr.into_pyarray(py).into_any())
}

/// `a[index]` along the first axis, in parallel, for C-contiguous float64, int64, int32, uint8
/// or bool arrays of one or more dimensions; TypeError for other dtypes.
#[pyfunction]
pub fn take_rows<'py>(
    py: Python<'py>,
    a: Bound<'py, PyAny>,
    index: PyReadonlyArray1<'py, usize>,
) -> PyResult<Bound<'py, PyAny>> {
    let index = contiguous("index", index.as_slice())?;
    if let Ok(a) = a.cast::<PyArrayDyn<f64>>() {
        take_typed(py, a, index)
    } else if let Ok(a) = a.cast::<PyArrayDyn<i64>>() {
        take_typed(py, a, index)
    } else if let Ok(a) = a.cast::<PyArrayDyn<i32>>() {
        take_typed(py, a, index)
    } else if let Ok(a) = a.cast::<PyArrayDyn<u8>>() {
        take_typed(py, a, index)
    } else if let Ok(a) = a.cast::<PyArrayDyn<bool>>() {
        take_typed(py, a, index)
    } else {
        Err(PyTypeError::new_err(
            "a: no parallel row gather for this dtype",
        ))
    }
}

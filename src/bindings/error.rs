//! Kernel errors become Python exceptions; kernel calls run without the interpreter and never let a
//! panic through.

use crate::error::KernelError;
use pyo3::exceptions::{PyMemoryError, PyRuntimeError, PyTypeError, PyValueError};
use pyo3::prelude::*;
use std::panic::{catch_unwind, AssertUnwindSafe};

pyo3::create_exception!(
    osculate,
    InputError,
    PyValueError,
    "Input that osculate cannot use. Attributes `argument`, `track` and `row` locate the problem."
);

/// The Python exception of a kernel error (`InputError` with its location, or `MemoryError`).
pub(crate) fn to_pyerr(py: Python<'_>, e: KernelError) -> PyErr {
    if let KernelError::OutOfMemory { .. } = e {
        return PyMemoryError::new_err(e.to_string());
    }
    let err = InputError::new_err(e.to_string());
    let value = err.value(py);
    // Setting an attribute on a fresh exception instance cannot fail in practice; if it did, the
    // message alone would still say everything.
    let _ = value.setattr("argument", e.argument());
    let _ = value.setattr("track", e.track());
    let _ = value.setattr("row", e.row());
    let _ = value.setattr("detail", e.detail());
    err
}

/// Run `f` with the interpreter released; kernel errors and (impossible by design) panics become
/// Python exceptions.
pub fn detached<T, F>(py: Python<'_>, f: F) -> PyResult<T>
where
    T: Send,
    F: Send + FnOnce() -> crate::Result<T>,
{
    match py.detach(|| catch_unwind(AssertUnwindSafe(f))) {
        Ok(Ok(v)) => Ok(v),
        Ok(Err(e)) => Err(to_pyerr(py, e)),
        Err(payload) => {
            let what = payload
                .downcast_ref::<&str>()
                .map(|s| s.to_string())
                .or_else(|| payload.downcast_ref::<String>().cloned())
                .unwrap_or_default();
            Err(PyRuntimeError::new_err(format!(
                "osculate internal error (please report it with the input that caused it): {what}"
            )))
        }
    }
}

/// A borrowed array that is not C-contiguous is a bug of the Python layer, reported as TypeError.
pub fn contiguous<'a, T>(name: &str, s: Result<&'a [T], numpy::AsSliceError>) -> PyResult<&'a [T]> {
    s.map_err(|_| PyTypeError::new_err(format!("{name}: expected a C-contiguous array")))
}

/// A flat row-major vector as a NumPy array of `width` columns (a 1-D array for width 1).
pub fn rows(
    py: Python<'_>,
    v: Vec<f64>,
    width: usize,
) -> PyResult<Bound<'_, numpy::PyArray2<f64>>> {
    use numpy::IntoPyArray;
    let n = v.len() / width.max(1);
    let a = numpy::ndarray::Array2::from_shape_vec((n, width), v)
        .map_err(|e| PyRuntimeError::new_err(e.to_string()))?;
    Ok(a.into_pyarray(py))
}

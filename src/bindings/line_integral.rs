//! Bindings of the line-integral kernels (work, scalar integrals, gridded fields, nodes for
//! Python callables).

use super::error::{contiguous, detached, rows};
use crate::field::{GridField, Outside};
use crate::line_integral::{self, Integral, Kind, Options, Rule};
use crate::KernelError;
use numpy::{
    IntoPyArray, PyArray2, PyArrayDyn, PyReadonlyArray1, PyReadonlyArray2, PyReadonlyArrayDyn,
    PyUntypedArrayMethods,
};
use pyo3::prelude::*;
use pyo3::types::PyDict;

fn options(kind: &str, closed: bool, cumulative: bool, estimate: bool) -> crate::Result<Options> {
    let (kind, argument) = match kind {
        "work" => (Kind::Work, "force"),
        "scalar" => (Kind::Scalar, "f"),
        other => {
            return Err(KernelError::Option {
                argument: "kind",
                detail: format!("expected \"work\" or \"scalar\", got {other:?}"),
            })
        }
    };
    Ok(Options {
        kind,
        closed,
        cumulative,
        estimate,
        argument,
    })
}

fn to_dict(py: Python<'_>, r: Integral, cumulative: bool) -> PyResult<Bound<'_, PyDict>> {
    let out = PyDict::new(py);
    out.set_item("total", r.total.into_pyarray(py))?;
    out.set_item("error", r.error.into_pyarray(py))?;
    if cumulative {
        out.set_item("cumulative", r.cumulative.into_pyarray(py))?;
    } else {
        out.set_item("cumulative", py.None())?;
    }
    let skipped: Vec<i64> = r.skipped.into_iter().map(|s| s as i64).collect();
    out.set_item("skipped", skipped.into_pyarray(py))?;
    Ok(out)
}

/// Grid shape (first `grid_ndim` axes) and values per node (product of the others).
fn grid_shape(shape: &[usize], grid_ndim: usize) -> (Vec<usize>, usize) {
    let k = grid_ndim.min(shape.len());
    (shape[..k].to_vec(), shape[k..].iter().product())
}

/// Line integral of values sampled at the rows (`kind="work"`: (n, dim) forces; `"scalar"`: (n,)).
#[pyfunction]
#[pyo3(signature = (positions, values, offsets, *, t=None, rule, kind, closed, cumulative, estimate))]
#[allow(clippy::too_many_arguments)]
pub fn line_integral_sampled<'py>(
    py: Python<'py>,
    positions: PyReadonlyArray2<'py, f64>,
    values: PyReadonlyArrayDyn<'py, f64>,
    offsets: PyReadonlyArray1<'py, i64>,
    t: Option<PyReadonlyArray1<'py, f64>>,
    rule: &str,
    kind: &str,
    closed: bool,
    cumulative: bool,
    estimate: bool,
) -> PyResult<Bound<'py, PyDict>> {
    let dim = positions.shape()[1];
    let x = contiguous("positions", positions.as_slice())?;
    let f = contiguous("values", values.as_slice())?;
    let off = contiguous("offsets", offsets.as_slice())?;
    let t = match &t {
        Some(t) => Some(contiguous("t", t.as_slice())?),
        None => None,
    };
    let r = detached(py, || {
        let opts = options(kind, closed, cumulative, estimate)?;
        line_integral::sampled(x, dim, f, off, t, Rule::parse(rule)?, &opts)
    })?;
    to_dict(py, r, cumulative)
}

/// Line integral of a gridded field (`values`: grid axes first, components last) along the
/// straight segments, with `nodes` Gauss–Legendre nodes per segment (`t` only checked).
#[pyfunction]
#[pyo3(signature = (positions, offsets, values, *, t=None, grid_ndim, origin, spacing, outside,
    nodes, kind, closed, cumulative, estimate))]
#[allow(clippy::too_many_arguments)]
pub fn line_integral_grid<'py>(
    py: Python<'py>,
    positions: PyReadonlyArray2<'py, f64>,
    offsets: PyReadonlyArray1<'py, i64>,
    values: PyReadonlyArrayDyn<'py, f64>,
    t: Option<PyReadonlyArray1<'py, f64>>,
    grid_ndim: usize,
    origin: Vec<f64>,
    spacing: Vec<f64>,
    outside: &str,
    nodes: usize,
    kind: &str,
    closed: bool,
    cumulative: bool,
    estimate: bool,
) -> PyResult<Bound<'py, PyDict>> {
    let dim = positions.shape()[1];
    let (shape, comps) = grid_shape(values.shape(), grid_ndim);
    let x = contiguous("positions", positions.as_slice())?;
    let v = contiguous("values", values.as_slice())?;
    let off = contiguous("offsets", offsets.as_slice())?;
    let t = match &t {
        Some(t) => Some(contiguous("t", t.as_slice())?),
        None => None,
    };
    let r = detached(py, || {
        let opts = options(kind, closed, cumulative, estimate)?;
        let grid = GridField::new(
            v,
            &shape,
            comps,
            &origin,
            &spacing,
            Outside::parse(outside)?,
        )?;
        line_integral::gridded(x, dim, off, t, &grid, nodes, &opts)
    })?;
    to_dict(py, r, cumulative)
}

/// Node positions `(N, dim)` (and node times `(N,)` when `t` is given) at which
/// `line_integral_values` expects the field.
#[pyfunction]
#[pyo3(signature = (positions, offsets, *, t=None, nodes, closed, estimate))]
#[allow(clippy::type_complexity)]
pub fn segment_nodes<'py>(
    py: Python<'py>,
    positions: PyReadonlyArray2<'py, f64>,
    offsets: PyReadonlyArray1<'py, i64>,
    t: Option<PyReadonlyArray1<'py, f64>>,
    nodes: usize,
    closed: bool,
    estimate: bool,
) -> PyResult<(
    Bound<'py, PyArray2<f64>>,
    Option<Bound<'py, numpy::PyArray1<f64>>>,
)> {
    let dim = positions.shape()[1];
    let x = contiguous("positions", positions.as_slice())?;
    let off = contiguous("offsets", offsets.as_slice())?;
    let t = match &t {
        Some(t) => Some(contiguous("t", t.as_slice())?),
        None => None,
    };
    let out = detached(py, || {
        let opts = options("work", closed, false, estimate)?;
        line_integral::segment_nodes(x, dim, off, t, nodes, &opts)
    })?;
    let times = out.times.map(|v| v.into_pyarray(py));
    Ok((rows(py, out.points, dim)?, times))
}

/// Line integral from the field's values at the nodes of `segment_nodes` (same arguments).
#[pyfunction]
#[pyo3(signature = (positions, offsets, values, *, nodes, kind, closed, cumulative, estimate))]
#[allow(clippy::too_many_arguments)]
pub fn line_integral_values<'py>(
    py: Python<'py>,
    positions: PyReadonlyArray2<'py, f64>,
    offsets: PyReadonlyArray1<'py, i64>,
    values: PyReadonlyArrayDyn<'py, f64>,
    nodes: usize,
    kind: &str,
    closed: bool,
    cumulative: bool,
    estimate: bool,
) -> PyResult<Bound<'py, PyDict>> {
    let dim = positions.shape()[1];
    let x = contiguous("positions", positions.as_slice())?;
    let v = contiguous("values", values.as_slice())?;
    let off = contiguous("offsets", offsets.as_slice())?;
    let r = detached(py, || {
        let opts = options(kind, closed, cumulative, estimate)?;
        line_integral::from_values(x, dim, off, v, nodes, &opts)
    })?;
    to_dict(py, r, cumulative)
}

/// Interpolate a gridded field at `points` `(m, grid_ndim)`: `(m,)` for a scalar grid, otherwise
/// `(m, components)`.
#[pyfunction]
#[pyo3(signature = (values, points, *, grid_ndim, origin, spacing, outside))]
pub fn grid_eval<'py>(
    py: Python<'py>,
    values: PyReadonlyArrayDyn<'py, f64>,
    points: PyReadonlyArray2<'py, f64>,
    grid_ndim: usize,
    origin: Vec<f64>,
    spacing: Vec<f64>,
    outside: &str,
) -> PyResult<Bound<'py, PyArrayDyn<f64>>> {
    let (shape, comps) = grid_shape(values.shape(), grid_ndim);
    let scalar = values.ndim() == grid_ndim;
    let dim = points.shape()[1];
    let m = points.shape()[0];
    let v = contiguous("values", values.as_slice())?;
    let p = contiguous("points", points.as_slice())?;
    let out = detached(py, || {
        let grid = GridField::new(
            v,
            &shape,
            comps,
            &origin,
            &spacing,
            Outside::parse(outside)?,
        )?;
        grid.eval_points(p, dim)
    })?;
    let shape: Vec<usize> = if scalar { vec![m] } else { vec![m, comps] };
    let a = numpy::ndarray::ArrayD::from_shape_vec(shape, out)
        .map_err(|e| pyo3::exceptions::PyRuntimeError::new_err(e.to_string()))?;
    Ok(a.into_pyarray(py))
}

//! Bindings of the line-integral kernels (work, scalar integrals, gridded fields, nodes for
//! Python callables, power). Options arrive as given by the caller and are checked by
//! `Options::new` in the kernel.

use super::error::{contiguous, detached, rows};
use crate::field::{GridField, Outside};
use crate::line_integral::{self, Integral, Integrand, Options, PowerForce};
use numpy::{
    IntoPyArray, PyArray1, PyArray2, PyArrayDyn, PyReadonlyArray1, PyReadonlyArray2,
    PyReadonlyArrayDyn, PyUntypedArrayMethods,
};
use pyo3::prelude::*;
use pyo3::types::PyDict;

fn to_dict<'py>(
    py: Python<'py>,
    r: Integral,
    opts: &Options,
    integrand: Integrand,
) -> PyResult<Bound<'py, PyDict>> {
    let out = PyDict::new(py);
    out.set_item("total", r.total.into_pyarray(py))?;
    out.set_item("error", r.error.into_pyarray(py))?;
    if opts.cumulative {
        out.set_item("cumulative", r.cumulative.into_pyarray(py))?;
    } else {
        out.set_item("cumulative", py.None())?;
    }
    let skipped: Vec<i64> = r.skipped.into_iter().map(|s| s as i64).collect();
    out.set_item("skipped", skipped.into_pyarray(py))?;
    out.set_item("rule", opts.describe(integrand))?;
    Ok(out)
}

/// Grid shape (first `grid_ndim` axes) and values per node (product of the others).
fn grid_shape(shape: &[usize], grid_ndim: usize) -> (Vec<usize>, usize) {
    let k = grid_ndim.min(shape.len());
    (shape[..k].to_vec(), shape[k..].iter().product())
}

fn slice<'a>(name: &str, a: &'a Option<PyReadonlyArray1<'_, f64>>) -> PyResult<Option<&'a [f64]>> {
    a.as_ref()
        .map(|a| contiguous(name, a.as_slice()))
        .transpose()
}

/// Line integral of values sampled at the rows (`kind="work"`: (n, dim) forces; `"scalar"`: (n,)).
#[pyfunction]
#[pyo3(signature = (positions, values, offsets, *, t=None, rule=None, nodes=None, kind, closed,
    cumulative, estimate))]
#[allow(clippy::too_many_arguments)]
pub fn line_integral_sampled<'py>(
    py: Python<'py>,
    positions: PyReadonlyArray2<'py, f64>,
    values: PyReadonlyArrayDyn<'py, f64>,
    offsets: PyReadonlyArray1<'py, i64>,
    t: Option<PyReadonlyArray1<'py, f64>>,
    rule: Option<&str>,
    nodes: Option<i64>,
    kind: &str,
    closed: bool,
    cumulative: bool,
    estimate: bool,
) -> PyResult<Bound<'py, PyDict>> {
    let dim = positions.shape()[1];
    let x = contiguous("positions", positions.as_slice())?;
    let f = contiguous("values", values.as_slice())?;
    let off = contiguous("offsets", offsets.as_slice())?;
    let t = slice("t", &t)?;
    let s = Integrand::Sampled;
    let (r, opts) = detached(py, || {
        let opts = Options::new(kind, s, rule, nodes, closed, cumulative, estimate)?;
        Ok((line_integral::sampled(x, dim, f, off, t, &opts)?, opts))
    })?;
    to_dict(py, r, &opts, s)
}

/// Line integral of a gridded field (`values`: grid axes first, components last) along the
/// straight segments, with `nodes` Gauss–Legendre nodes per segment (`t` only checked).
#[pyfunction]
#[pyo3(signature = (positions, offsets, values, *, t=None, grid_ndim, origin, spacing, outside,
    rule=None, nodes=None, kind, closed, cumulative, estimate))]
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
    rule: Option<&str>,
    nodes: Option<i64>,
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
    let t = slice("t", &t)?;
    let s = Integrand::Field;
    let (r, opts) = detached(py, || {
        let opts = Options::new(kind, s, rule, nodes, closed, cumulative, estimate)?;
        let outside = Outside::parse(outside)?;
        let grid = GridField::new(v, &shape, comps, &origin, &spacing, outside)?;
        Ok((line_integral::gridded(x, dim, off, t, &grid, &opts)?, opts))
    })?;
    to_dict(py, r, &opts, s)
}

/// Node positions `(N, dim)` (and node times `(N,)` when `t` is given) at which
/// `line_integral_values` expects the field.
#[pyfunction]
#[pyo3(signature = (positions, offsets, *, t=None, rule=None, nodes=None, kind, closed, estimate))]
#[allow(clippy::type_complexity, clippy::too_many_arguments)]
pub fn segment_nodes<'py>(
    py: Python<'py>,
    positions: PyReadonlyArray2<'py, f64>,
    offsets: PyReadonlyArray1<'py, i64>,
    t: Option<PyReadonlyArray1<'py, f64>>,
    rule: Option<&str>,
    nodes: Option<i64>,
    kind: &str,
    closed: bool,
    estimate: bool,
) -> PyResult<(Bound<'py, PyArray2<f64>>, Option<Bound<'py, PyArray1<f64>>>)> {
    let dim = positions.shape()[1];
    let x = contiguous("positions", positions.as_slice())?;
    let off = contiguous("offsets", offsets.as_slice())?;
    let t = slice("t", &t)?;
    let out = detached(py, || {
        let s = Integrand::Field;
        let opts = Options::new(kind, s, rule, nodes, closed, false, estimate)?;
        line_integral::segment_nodes(x, dim, off, t, &opts)
    })?;
    let times = out.times.map(|v| v.into_pyarray(py));
    Ok((rows(py, out.points, dim)?, times))
}

/// Line integral from the field's values at the nodes of `segment_nodes` (same arguments).
#[pyfunction]
#[pyo3(signature = (positions, offsets, values, *, rule=None, nodes=None, kind, closed,
    cumulative, estimate))]
#[allow(clippy::too_many_arguments)]
pub fn line_integral_values<'py>(
    py: Python<'py>,
    positions: PyReadonlyArray2<'py, f64>,
    offsets: PyReadonlyArray1<'py, i64>,
    values: PyReadonlyArrayDyn<'py, f64>,
    rule: Option<&str>,
    nodes: Option<i64>,
    kind: &str,
    closed: bool,
    cumulative: bool,
    estimate: bool,
) -> PyResult<Bound<'py, PyDict>> {
    let dim = positions.shape()[1];
    let x = contiguous("positions", positions.as_slice())?;
    let v = contiguous("values", values.as_slice())?;
    let off = contiguous("offsets", offsets.as_slice())?;
    let s = Integrand::Field;
    let (r, opts) = detached(py, || {
        let opts = Options::new(kind, s, rule, nodes, closed, cumulative, estimate)?;
        Ok((line_integral::from_values(x, dim, off, v, &opts)?, opts))
    })?;
    to_dict(py, r, &opts, s)
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
        let outside = Outside::parse(outside)?;
        let grid = GridField::new(v, &shape, comps, &origin, &spacing, outside)?;
        grid.eval_points(p, dim)
    })?;
    let shape: Vec<usize> = if scalar { vec![m] } else { vec![m, comps] };
    let a = numpy::ndarray::ArrayD::from_shape_vec(shape, out)
        .map_err(|e| pyo3::exceptions::PyRuntimeError::new_err(e.to_string()))?;
    Ok(a.into_pyarray(py))
}

/// Power F·v at every row (kernel row order): `force` sampled at the rows (`kind="sampled"`),
/// returned by a callable at the rows with a finite position (`"returned"`, NaN elsewhere), or
/// `None` with `grid_values` and the grid's description for a vector `GridField`.
#[pyfunction]
#[pyo3(signature = (positions, offsets, velocity, *, force=None, returned=false,
    grid_values=None, origin=None, spacing=None, outside=None))]
#[allow(clippy::too_many_arguments)]
pub fn line_power<'py>(
    py: Python<'py>,
    positions: PyReadonlyArray2<'py, f64>,
    offsets: PyReadonlyArray1<'py, i64>,
    velocity: PyReadonlyArray2<'py, f64>,
    force: Option<PyReadonlyArray2<'py, f64>>,
    returned: bool,
    grid_values: Option<PyReadonlyArrayDyn<'py, f64>>,
    origin: Option<Vec<f64>>,
    spacing: Option<Vec<f64>>,
    outside: Option<&str>,
) -> PyResult<Bound<'py, PyArray1<f64>>> {
    let dim = positions.shape()[1];
    let x = contiguous("positions", positions.as_slice())?;
    let off = contiguous("offsets", offsets.as_slice())?;
    let v = contiguous("velocity", velocity.as_slice())?;
    let f = force
        .as_ref()
        .map(|f| contiguous("force", f.as_slice()))
        .transpose()?;
    let grid = match &grid_values {
        Some(g) => {
            let nd = origin.as_ref().map_or(0, Vec::len);
            let (shape, comps) = grid_shape(g.shape(), nd);
            Some((contiguous("force", g.as_slice())?, shape, comps))
        }
        None => None,
    };
    let out = detached(py, || match (f, &grid) {
        (Some(f), _) if returned => {
            line_integral::power(x, dim, off, v, PowerForce::Returned(f), "force")
        }
        (Some(f), _) => line_integral::power(x, dim, off, v, PowerForce::Sampled(f), "force"),
        (None, Some((vals, shape, comps))) => {
            let outside = Outside::parse(outside.unwrap_or("error"))?;
            let origin = origin.as_deref().unwrap_or(&[]);
            let spacing = spacing.as_deref().unwrap_or(&[]);
            let g = GridField::new(vals, shape, *comps, origin, spacing, outside)?;
            line_integral::power(x, dim, off, v, PowerForce::Grid(&g), "force")
        }
        (None, None) => Err(crate::KernelError::Option {
            argument: "force",
            detail: "give force values or a grid".into(),
        }),
    })?;
    Ok(out.into_pyarray(py))
}

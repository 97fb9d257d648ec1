//! Power P = F·v at every sample: the rate of the work, one parallel pass over the rows.

use super::driver::check_positions;
use crate::batch::{self, CHUNK};
use crate::error::{try_filled, KernelError, Result};
use crate::field::GridField;
use rayon::prelude::*;

/// The force whose power is asked for.
#[derive(Debug, Clone, Copy)]
pub enum PowerForce<'a> {
    /// Values at the rows, `dim` per row (a non-finite value gives NaN power).
    Sampled(&'a [f64]),
    /// What a callable returned for the rows, `dim` per row, NaN on rows with a non-finite
    /// position (where it was not called); a non-finite value at a finite position is an error.
    Returned(&'a [f64]),
    /// A vector field on a grid of the path's dimension, interpolated at the rows.
    Grid(&'a GridField<'a>),
}

/// F·v at every row of `x` (`dim` coordinates per row, tracks given by `offsets`), with the
/// velocity `v` (`dim` per row); NaN on rows with a non-finite position, force or velocity.
/// Errors name the track and row (`argument` is the force's name).
///
/// # Examples
///
/// ```
/// use osculate::line_integral::{power, PowerForce};
/// let x = [0.0, 0.0, 1.0, 0.0, f64::NAN, 0.0];
/// let v = [1.0, 0.0, 1.0, 0.5, f64::NAN, f64::NAN]; // no velocity at the NaN row
/// let f = [2.0, 3.0, 2.0, 4.0, 2.0, 0.0];
/// let p = power(&x, 2, &[0, 3], &v, PowerForce::Sampled(&f), "force").unwrap();
/// assert_eq!(&p[..2], &[2.0, 4.0]); // 2·1 + 3·0 and 2·1 + 4·0.5, exact
/// assert!(p[2].is_nan());
/// ```
pub fn power(
    x: &[f64],
    dim: usize,
    offsets: &[i64],
    v: &[f64],
    force: PowerForce,
    argument: &'static str,
) -> Result<Vec<f64>> {
    let n = check_positions(x, dim)?;
    let off = batch::check_offsets(offsets, n)?;
    let rows_of = |name: &'static str, len: usize| {
        if len == n * dim {
            Ok(())
        } else {
            Err(KernelError::Shape {
                argument: name,
                detail: format!("expected {n} rows of {dim} values, got {len} values"),
            })
        }
    };
    rows_of("velocity", v.len())?;
    match force {
        PowerForce::Sampled(f) | PowerForce::Returned(f) => rows_of(argument, f.len())?,
        PowerForce::Grid(g) => {
            if g.ndim() != dim || g.comps() != dim {
                return Err(KernelError::Shape {
                    argument,
                    detail: format!(
                        "power needs a vector field of {dim} components on a {dim}-D grid, got \
                         {} component(s) on a {}-D grid",
                        g.comps(),
                        g.ndim()
                    ),
                });
            }
        }
    }
    let mut out = try_filled(n, f64::NAN)?;
    let track_of = |row: usize| off.partition_point(|&o| o <= row) - 1;
    let bad = out
        .par_chunks_mut(CHUNK)
        .enumerate()
        .map(|(j, o)| -> Option<KernelError> {
            let mut fv = [0.0; 3];
            for (i, oi) in o.iter_mut().enumerate() {
                let row = j * CHUNK + i;
                let (xr, vr) = (
                    &x[row * dim..(row + 1) * dim],
                    &v[row * dim..(row + 1) * dim],
                );
                let f: &[f64] = match force {
                    PowerForce::Sampled(f) => &f[row * dim..(row + 1) * dim],
                    PowerForce::Returned(f) => {
                        let fr = &f[row * dim..(row + 1) * dim];
                        if xr.iter().all(|c| c.is_finite()) && !fr.iter().all(|c| c.is_finite()) {
                            return Some(KernelError::Row {
                                argument,
                                track: track_of(row),
                                row,
                                detail: format!("the callable returned a non-finite value {fr:?}"),
                            });
                        }
                        fr
                    }
                    PowerForce::Grid(g) => {
                        if !xr.iter().all(|c| c.is_finite()) {
                            continue; // no position, no power (NaN)
                        }
                        if !g.eval(xr, &mut fv[..dim]) {
                            return Some(g.outside_error(argument, track_of(row), row, xr));
                        }
                        &fv[..dim]
                    }
                };
                *oi = (0..dim).map(|c| f[c] * vr[c]).sum::<f64>();
            }
            None
        })
        .find_map_first(|e| e);
    match bad {
        None => Ok(out),
        Some(e) => Err(e),
    }
}

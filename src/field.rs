//! Fields given on a regular 2-D or 3-D grid, evaluated anywhere by bilinear / trilinear
//! interpolation (the tensor product of linear interpolation along each axis).
//!
//! The values are row-major with the grid axes first and the components last: node
//! `(i, j[, k])` sits at `origin + (i·spacing₀, j·spacing₁[, k·spacing₂])` and holds `comps`
//! consecutive values (1 for a scalar field, 2 or 3 for a vector field).

use crate::error::{try_filled, KernelError, Result};
use rayon::prelude::*;

/// A point this close to the grid box (in cells) still counts as inside, so that a path lying on
/// the boundary is not rejected for the rounding of its quadrature nodes.
pub const BOUNDARY_SLACK: f64 = 1e-9;

/// What the field is outside the grid box.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Outside {
    /// Evaluating outside is an error.
    Error,
    /// NaN outside.
    Nan,
    /// The value at the nearest point of the box (constant extension of the boundary values).
    Clamp,
}

impl Outside {
    /// Parse `"error"`, `"nan"` or `"clamp"`.
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::field::Outside;
    /// assert_eq!(Outside::parse("clamp").unwrap(), Outside::Clamp);
    /// assert_eq!(Outside::parse("wrap").unwrap_err().argument(), "outside");
    /// ```
    pub fn parse(name: &str) -> Result<Self> {
        match name {
            "error" => Ok(Outside::Error),
            "nan" => Ok(Outside::Nan),
            "clamp" => Ok(Outside::Clamp),
            other => Err(KernelError::Option {
                argument: "outside",
                detail: format!("expected one of ('error', 'nan', 'clamp'), got '{other}'"),
            }),
        }
    }
}

/// A field on a regular grid, borrowed from the caller's values.
#[derive(Debug, Clone, Copy)]
pub struct GridField<'a> {
    ndim: usize,
    shape: [usize; 3],
    comps: usize,
    origin: [f64; 3],
    inv_spacing: [f64; 3],
    strides: [usize; 3],
    outside: Outside,
    values: &'a [f64],
}

impl<'a> GridField<'a> {
    /// Check the grid and borrow `values` (`shape` holds the 2 or 3 node counts, `comps` values per
    /// node). Values are not checked for finiteness: a non-finite node value spreads to every
    /// point of the cells around it.
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::field::{GridField, Outside};
    /// // f(x, y) = 1 + 2x + 3y on a 3 × 2 grid with spacing (0.5, 1) from (0, 0).
    /// let v: Vec<f64> = (0..3)
    ///     .flat_map(|i| (0..2).map(move |j| 1.0 + 2.0 * (0.5 * i as f64) + 3.0 * j as f64))
    ///     .collect();
    /// let g = GridField::new(&v, &[3, 2], 1, &[0.0, 0.0], &[0.5, 1.0], Outside::Error).unwrap();
    /// let mut out = [0.0];
    /// assert!(g.eval(&[0.7, 0.25], &mut out));
    /// assert!((out[0] - (1.0 + 1.4 + 0.75)).abs() < 1e-15); // bilinear is exact on linear fields
    /// assert!(!g.eval(&[1.5, 0.0], &mut out)); // outside the box [0, 1] × [0, 1]
    /// ```
    pub fn new(
        values: &'a [f64],
        shape: &[usize],
        comps: usize,
        origin: &[f64],
        spacing: &[f64],
        outside: Outside,
    ) -> Result<Self> {
        let ndim = shape.len();
        if !(ndim == 2 || ndim == 3) {
            return Err(KernelError::Shape {
                argument: "values",
                detail: format!("a grid has 2 or 3 axes, got {ndim}"),
            });
        }
        if let Some(a) = shape.iter().position(|&s| s < 2) {
            return Err(KernelError::Shape {
                argument: "values",
                detail: format!(
                    "axis {a} has {} node(s); interpolation needs at least 2 per axis",
                    shape[a]
                ),
            });
        }
        if comps == 0 {
            return Err(KernelError::Shape {
                argument: "values",
                detail: "no components per node".into(),
            });
        }
        if origin.len() != ndim {
            return Err(KernelError::Shape {
                argument: "origin",
                detail: format!("expected {ndim} coordinates, got {}", origin.len()),
            });
        }
        if spacing.len() != ndim {
            return Err(KernelError::Shape {
                argument: "spacing",
                detail: format!("expected {ndim} steps, got {}", spacing.len()),
            });
        }
        if let Some(a) = origin.iter().position(|o| !o.is_finite()) {
            return Err(KernelError::Option {
                argument: "origin",
                detail: format!("coordinate {a} is not finite ({})", origin[a]),
            });
        }
        if let Some(a) = spacing.iter().position(|s| !(s.is_finite() && *s > 0.0)) {
            return Err(KernelError::Option {
                argument: "spacing",
                detail: format!("must be finite and > 0, axis {a} has {}", spacing[a]),
            });
        }
        let nodes = shape
            .iter()
            .try_fold(1usize, |acc, &s| acc.checked_mul(s))
            .and_then(|n| n.checked_mul(comps));
        if nodes != Some(values.len()) {
            return Err(KernelError::Shape {
                argument: "values",
                detail: format!(
                    "{} values do not fill a grid of shape {shape:?} with {comps} per node",
                    values.len()
                ),
            });
        }
        let mut g = GridField {
            ndim,
            shape: [1; 3],
            comps,
            origin: [0.0; 3],
            inv_spacing: [1.0; 3],
            strides: [0; 3],
            outside,
            values,
        };
        let mut stride = comps;
        for a in (0..ndim).rev() {
            g.shape[a] = shape[a];
            g.origin[a] = origin[a];
            g.inv_spacing[a] = 1.0 / spacing[a];
            g.strides[a] = stride;
            stride *= shape[a];
        }
        Ok(g)
    }

    /// Grid axes (2 or 3).
    pub fn ndim(&self) -> usize {
        self.ndim
    }

    /// Values per node.
    pub fn comps(&self) -> usize {
        self.comps
    }

    /// What happens outside the box.
    pub fn outside(&self) -> Outside {
        self.outside
    }

    /// Whether `p` lies in the grid box (within [`BOUNDARY_SLACK`] cells).
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::field::{GridField, Outside};
    /// // A 2 × 2 grid of spacing 1 from the origin: the box is [0, 1] × [0, 1], edges included.
    /// let v = [0.0; 4];
    /// let g = GridField::new(&v, &[2, 2], 1, &[0.0, 0.0], &[1.0, 1.0], Outside::Error).unwrap();
    /// assert!(g.contains(&[1.0, 0.5]) && g.contains(&[0.0, 0.0]));
    /// assert!(!g.contains(&[1.1, 0.5]) && !g.contains(&[0.5, -0.01]));
    /// ```
    pub fn contains(&self, p: &[f64]) -> bool {
        (0..self.ndim).all(|a| {
            let u = (p[a] - self.origin[a]) * self.inv_spacing[a];
            (-BOUNDARY_SLACK..=(self.shape[a] - 1) as f64 + BOUNDARY_SLACK).contains(&u)
        })
    }

    /// Interpolate at `p` (at least `ndim` coordinates) into `out` (`comps` values). Returns false,
    /// with `out` NaN, when `p` is outside under [`Outside::Error`] (the caller reports it) or not
    /// finite; under [`Outside::Nan`] an outside point gives NaN and true.
    #[inline]
    pub fn eval(&self, p: &[f64], out: &mut [f64]) -> bool {
        match (self.ndim, self.comps) {
            (3, 3) => self.eval_in::<3, 3>(p, out),
            (3, 1) => self.eval_in::<3, 1>(p, out),
            (3, _) => self.eval_in::<3, 0>(p, out),
            (_, 2) => self.eval_in::<2, 2>(p, out),
            (_, 1) => self.eval_in::<2, 1>(p, out),
            _ => self.eval_in::<2, 0>(p, out),
        }
    }

    /// [`GridField::eval`] for `N` axes and `C` components (`C` = 0: any number, given at run
    /// time), so that the loops unroll. The cell of each axis is the floor of the clamped
    /// coordinate (`u as usize` for u ≥ 0), the last cell on the upper face.
    #[inline(always)]
    pub(crate) fn eval_in<const N: usize, const C: usize>(
        &self,
        p: &[f64],
        out: &mut [f64],
    ) -> bool {
        let (mut index, mut frac) = ([0usize; N], [0.0; N]);
        for a in 0..N {
            let top = (self.shape[a] - 1) as f64;
            let mut u = (p[a] - self.origin[a]) * self.inv_spacing[a];
            // Written so that NaN fails the test too.
            if !(u >= -BOUNDARY_SLACK && u <= top + BOUNDARY_SLACK)
                && (!u.is_finite() || self.outside != Outside::Clamp)
            {
                return self.miss(p, out);
            }
            u = u.clamp(0.0, top);
            let i = (u as usize).min(self.shape[a] - 2);
            index[a] = i;
            frac[a] = u - i as f64;
        }
        let comps = if C == 0 { self.comps } else { C };
        let base: usize = (0..N).map(|a| index[a] * self.strides[a]).sum();
        let (sx, sy, sz) = (self.strides[0], self.strides[1], self.strides[2]);
        let lerp = |a: f64, b: f64, f: f64| a + f * (b - a);
        let v = self.values;
        for (c, o) in out[..comps].iter_mut().enumerate() {
            let b = base + c;
            // Linear along the last axis first, then the others (tensor-product interpolation).
            *o = if N == 3 {
                let (fx, fy, fz) = (frac[0], frac[1], frac[N - 1]);
                let y00 = lerp(v[b], v[b + sz], fz);
                let y01 = lerp(v[b + sy], v[b + sy + sz], fz);
                let y10 = lerp(v[b + sx], v[b + sx + sz], fz);
                let y11 = lerp(v[b + sx + sy], v[b + sx + sy + sz], fz);
                lerp(lerp(y00, y01, fy), lerp(y10, y11, fy), fx)
            } else {
                let (fx, fy) = (frac[0], frac[N - 1]);
                let x0 = lerp(v[b], v[b + sy], fy);
                let x1 = lerp(v[b + sx], v[b + sx + sy], fy);
                lerp(x0, x1, fx)
            };
        }
        true
    }

    /// A point outside (or not finite): NaN values, and whether that is an answer.
    #[cold]
    fn miss(&self, p: &[f64], out: &mut [f64]) -> bool {
        out[..self.comps].fill(f64::NAN);
        let finite = p[..self.ndim].iter().all(|v| v.is_finite());
        finite && self.outside == Outside::Nan
    }

    /// Interpolate at every row of `points` (`dim` = grid axes columns), in parallel. A point
    /// outside under [`Outside::Error`], or a non-finite point, is an error naming its row.
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::field::{GridField, Outside};
    /// // f(x, y) = x on the box [0, 1]², clamped outside: (2, 0.5) takes the value at (1, 0.5).
    /// let v = [0.0, 0.0, 1.0, 1.0]; // nodes (0,0), (0,1), (1,0), (1,1)
    /// let g = GridField::new(&v, &[2, 2], 1, &[0.0, 0.0], &[1.0, 1.0], Outside::Clamp).unwrap();
    /// let f = g.eval_points(&[0.25, 0.75, 2.0, 0.5], 2).unwrap();
    /// assert!((f[0] - 0.25).abs() < 1e-15 && (f[1] - 1.0).abs() < 1e-15);
    /// // Under Outside::Error the same point is an error naming its row.
    /// let g = GridField::new(&v, &[2, 2], 1, &[0.0, 0.0], &[1.0, 1.0], Outside::Error).unwrap();
    /// assert_eq!(g.eval_points(&[0.25, 0.75, 2.0, 0.5], 2).unwrap_err().row(), Some(1));
    /// ```
    pub fn eval_points(&self, points: &[f64], dim: usize) -> Result<Vec<f64>> {
        if dim != self.ndim || points.len() % dim != 0 {
            return Err(KernelError::Shape {
                argument: "points",
                detail: format!(
                    "expected rows of {} coordinates for a {}-D grid, got width {dim}",
                    self.ndim, self.ndim
                ),
            });
        }
        let n = points.len() / dim;
        let c = self.comps;
        let mut out = try_filled(n * c, f64::NAN)?;
        let chunk = crate::batch::CHUNK;
        let bad = out
            .par_chunks_mut(chunk * c)
            .enumerate()
            .map(|(j, o)| -> Option<usize> {
                for (i, oi) in o.chunks_exact_mut(c).enumerate() {
                    let row = j * chunk + i;
                    if !self.eval(&points[row * dim..(row + 1) * dim], oi) {
                        return Some(row);
                    }
                }
                None
            })
            .find_map_first(|r| r);
        match bad {
            None => Ok(out),
            Some(row) => {
                Err(self.outside_error("points", 0, row, &points[row * dim..(row + 1) * dim]))
            }
        }
    }

    /// The error for a point that could not be evaluated (outside, or not finite).
    pub fn outside_error(
        &self,
        argument: &'static str,
        track: usize,
        row: usize,
        p: &[f64],
    ) -> KernelError {
        let p = &p[..self.ndim];
        let detail = if p.iter().all(|v| v.is_finite()) {
            let hi: Vec<f64> = (0..self.ndim)
                .map(|a| self.origin[a] + (self.shape[a] - 1) as f64 / self.inv_spacing[a])
                .collect();
            format!(
                "point {p:?} is outside the grid box from {:?} to {hi:?} (outside=\"error\"; \
                 use \"nan\" or \"clamp\" to allow it)",
                &self.origin[..self.ndim]
            )
        } else {
            format!("point {p:?} is not finite")
        };
        KernelError::Row {
            argument,
            track,
            row,
            detail,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    /// Values of `f` on a grid, row-major with components last.
    fn sample(
        shape: &[usize],
        origin: &[f64],
        spacing: &[f64],
        comps: usize,
        f: impl Fn(&[f64]) -> Vec<f64>,
    ) -> Vec<f64> {
        let mut v = Vec::new();
        let n: usize = shape.iter().product();
        for flat in 0..n {
            let mut rem = flat;
            let mut p = vec![0.0; shape.len()];
            for a in (0..shape.len()).rev() {
                p[a] = origin[a] + (rem % shape[a]) as f64 * spacing[a];
                rem /= shape[a];
            }
            let fv = f(&p);
            assert_eq!(fv.len(), comps);
            v.extend(fv);
        }
        v
    }

    #[test]
    fn trilinear_reproduces_trilinear_functions() {
        // f = 1 + x − 2y + 3z + xy − yz + 0.5 xyz is in the span of the trilinear basis, so the
        // interpolant equals f everywhere (tensor-product linear interpolation, exact by
        // construction).
        let f = |p: &[f64]| {
            let (x, y, z) = (p[0], p[1], p[2]);
            vec![
                1.0 + x - 2.0 * y + 3.0 * z + x * y - y * z + 0.5 * x * y * z,
                -x + 4.0,
            ]
        };
        let (shape, origin, spacing) = ([4, 5, 3], [-1.0, 0.5, 2.0], [0.5, 0.25, 1.5]);
        let v = sample(&shape, &origin, &spacing, 2, f);
        let g = GridField::new(&v, &shape, 2, &origin, &spacing, Outside::Error).unwrap();
        let mut out = [0.0; 2];
        for p in [
            [-1.0, 0.5, 2.0],
            [0.3, 1.1, 4.9],
            [0.5, 1.5, 5.0],
            [-0.77, 0.61, 2.2],
        ] {
            assert!(g.eval(&p, &mut out));
            let e = f(&p);
            assert_relative_eq!(out[0], e[0], max_relative = 1e-14);
            assert_relative_eq!(out[1], e[1], max_relative = 1e-14);
        }
    }

    #[test]
    fn interpolates_between_nodes_and_hits_nodes() {
        let v = [0.0, 1.0, 10.0, 11.0]; // 2 × 2 grid, f(i, j) = 10 i + j
        let g = GridField::new(&v, &[2, 2], 1, &[0.0, 0.0], &[1.0, 1.0], Outside::Error).unwrap();
        let mut out = [0.0];
        assert!(g.eval(&[1.0, 1.0], &mut out));
        assert_eq!(out[0], 11.0);
        assert!(g.eval(&[0.5, 0.5], &mut out));
        assert_eq!(out[0], 5.5);
    }

    #[test]
    fn outside_modes() {
        let v = [0.0, 1.0, 10.0, 11.0];
        let mk = |o| GridField::new(&v, &[2, 2], 1, &[0.0, 0.0], &[1.0, 1.0], o).unwrap();
        let mut out = [0.0];
        assert!(!mk(Outside::Error).eval(&[2.0, 0.0], &mut out));
        assert!(mk(Outside::Nan).eval(&[2.0, 0.0], &mut out) && out[0].is_nan());
        assert!(mk(Outside::Clamp).eval(&[2.0, -3.0], &mut out));
        assert_eq!(out[0], 10.0);
        // Within the slack of the boundary counts as inside.
        assert!(mk(Outside::Error).eval(&[1.0 + 1e-12, 0.0], &mut out));
        assert_eq!(out[0], 10.0);
        // A NaN point is never evaluated.
        assert!(!mk(Outside::Nan).eval(&[f64::NAN, 0.0], &mut out));
        let err = mk(Outside::Error)
            .eval_points(&[0.0, 0.0, 0.5, 3.0], 2)
            .unwrap_err();
        assert_eq!(err.row(), Some(1));
        assert!(err.to_string().contains("outside the grid box"));
    }

    #[test]
    fn rejects_bad_grids() {
        let v = [0.0; 6];
        let bad = |shape: &[usize], origin: &[f64], spacing: &[f64]| {
            GridField::new(&v, shape, 1, origin, spacing, Outside::Error).unwrap_err()
        };
        assert!(bad(&[6, 1], &[0.0, 0.0], &[1.0, 1.0])
            .to_string()
            .contains("axis 1 has 1 node"));
        assert!(bad(&[3, 2], &[0.0, 0.0], &[1.0, 0.0])
            .to_string()
            .contains("spacing: must be finite and > 0"));
        assert!(bad(&[3, 2], &[0.0, 0.0], &[1.0, f64::NAN])
            .to_string()
            .contains("spacing"));
        assert!(bad(&[3, 2], &[0.0], &[1.0, 1.0])
            .to_string()
            .contains("origin"));
        assert!(bad(&[3, 3], &[0.0, 0.0], &[1.0, 1.0])
            .to_string()
            .contains("do not fill"));
        assert!(bad(&[6], &[0.0], &[1.0])
            .to_string()
            .contains("2 or 3 axes"));
        assert!(Outside::parse("wrap").is_err());
    }

    #[test]
    fn eval_points_in_parallel_matches_eval() {
        let v: Vec<f64> = (0..4 * 4 * 4).map(|i| (i as f64).sin()).collect();
        let g = GridField::new(&v, &[4, 4, 4], 1, &[0.0; 3], &[1.0; 3], Outside::Clamp).unwrap();
        let pts: Vec<f64> = (0..3 * 40_000).map(|i| (i as f64 * 0.37) % 3.5).collect();
        let got = g.eval_points(&pts, 3).unwrap();
        let mut one = [0.0];
        for (r, p) in pts.chunks_exact(3).enumerate().step_by(997) {
            g.eval(p, &mut one);
            assert_eq!(got[r], one[0]);
        }
    }
}

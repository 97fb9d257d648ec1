//! Gridded fields: a [`GridField`] interpolated at Gauss–Legendre nodes on the straight segments
//! between the samples, and the straight-segment quadrature that the callable protocol shares.

use super::driver::{
    check_positions, checked_offsets, finite_row, integrate, Integral, Pair, Segments,
};
use super::options::{Kind, NodeRule, Options};
use crate::error::{KernelError, Result};
use crate::field::GridField;
use std::ops::Range;

/// Straight segments between usable (finite) rows, with Gauss–Legendre nodes.
pub(super) struct Straight<'a> {
    pub(super) x: &'a [f64],
    pub(super) dim: usize,
    pub(super) rule: &'a NodeRule,
    pub(super) kind: Kind,
}

impl Straight<'_> {
    /// Node `q` of the segment p → r into `out`, and the segment's vector.
    #[inline]
    pub(super) fn node(&self, p: usize, r: usize, q: usize, out: &mut [f64]) {
        let a = 0.5 * (1.0 + self.rule.xi[q]);
        let (xp, xr) = (
            &self.x[p * self.dim..(p + 1) * self.dim],
            &self.x[r * self.dim..(r + 1) * self.dim],
        );
        for c in 0..self.dim {
            out[c] = xp[c] + a * (xr[c] - xp[c]);
        }
    }

    /// Sum over the nodes of `value(q)` paired with the segment by the two rules.
    #[inline]
    pub(super) fn sum(
        &self,
        p: usize,
        r: usize,
        mut value: impl FnMut(usize, &mut [f64]) -> Result<()>,
    ) -> Result<Pair> {
        let d = self.dim;
        let mut dx = [0.0; 3];
        for c in 0..d {
            dx[c] = self.x[r * d + c] - self.x[p * d + c];
        }
        let len = dx[..d].iter().map(|v| v * v).sum::<f64>().sqrt();
        let (mut main, mut comp) = (0.0, 0.0);
        let mut v = [0.0; 3];
        for q in 0..self.rule.len() {
            value(q, &mut v)?;
            let g = match self.kind {
                Kind::Work => (0..d).map(|c| v[c] * dx[c]).sum::<f64>(),
                Kind::Scalar => v[0] * len,
            };
            main += 0.5 * self.rule.main[q] * g;
            if !self.rule.companion.is_empty() {
                comp += 0.5 * self.rule.companion[q] * g;
            }
        }
        Ok((main, comp))
    }
}

struct Gridded<'a> {
    line: Straight<'a>,
    field: &'a GridField<'a>,
    argument: &'static str,
}

impl Segments for Gridded<'_> {
    #[inline]
    fn usable(&self, row: usize) -> bool {
        finite_row(self.line.x, self.line.dim, row)
    }

    fn segment(
        &self,
        k: usize,
        _rows: &Range<usize>,
        p: usize,
        r: usize,
        _seg: usize,
    ) -> Result<Pair> {
        let mut pt = [0.0; 3];
        self.line.sum(p, r, |q, v| {
            self.line.node(p, r, q, &mut pt);
            if self.field.eval(&pt, v) {
                return Ok(());
            }
            // Name the first sample outside (the box is convex, so p or r is).
            let d = self.line.dim;
            let xp = &self.line.x[p * d..(p + 1) * d];
            let row = if self.field.contains(xp) { r } else { p };
            Err(self.field.outside_error(
                self.argument,
                k,
                row,
                &self.line.x[row * d..(row + 1) * d],
            ))
        })
    }
}

/// Line integral of a gridded field along the straight segments between the samples, by
/// `opts.nodes`-point Gauss–Legendre quadrature on each segment (bi/trilinear interpolation at the
/// nodes). The companion rule has one node fewer (two for `nodes = 1`). Times, when given, are
/// only checked (the field does not depend on time).
pub fn gridded(
    x: &[f64],
    dim: usize,
    offsets: &[i64],
    t: Option<&[f64]>,
    field: &GridField,
    opts: &Options,
) -> Result<Integral> {
    let n = check_positions(x, dim)?;
    let comps = opts.kind.comps(dim);
    if field.ndim() != dim {
        return Err(KernelError::Shape {
            argument: opts.argument,
            detail: format!(
                "the grid has {} axes but the path has {dim} coordinates",
                field.ndim()
            ),
        });
    }
    if field.comps() != comps {
        return Err(KernelError::Shape {
            argument: opts.argument,
            detail: match opts.kind {
                Kind::Work => format!(
                    "work needs {dim} components per grid node, the grid has {}",
                    field.comps()
                ),
                Kind::Scalar => format!(
                    "a scalar integral needs 1 value per grid node, the grid has {}",
                    field.comps()
                ),
            },
        });
    }
    let off = checked_offsets(offsets, n, t)?;
    let rule = NodeRule::new(opts.nodes, opts.estimate)?;
    let g = Gridded {
        line: Straight {
            x,
            dim,
            rule: &rule,
            kind: opts.kind,
        },
        field,
        argument: opts.argument,
    };
    integrate(&g, n, &off, opts)
}

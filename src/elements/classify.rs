//! Classification of the pieces of the curvature diagram (straight, arc, spiral, from the
//! significance of their level and slope) and merging of neighbours of the same kind.

use super::segment::{Fit, Prefix};
use super::table::{ARC, SPIRAL, STRAIGHT};

impl Fit {
    /// [`STRAIGHT`] if level and slope are within `z` standard errors of zero, [`ARC`] if the
    /// slope is, else [`SPIRAL`].
    pub(super) fn kind(&self, z: f64) -> u8 {
        let flat = self.sxx <= 0.0 || self.slope.abs() * self.sxx.sqrt() <= z;
        if flat && self.level.abs() * self.w.sqrt() <= z {
            STRAIGHT
        } else if flat {
            ARC
        } else {
            SPIRAL
        }
    }
}

/// One piece of the curvature diagram: usable samples `a..b`.
#[derive(Debug, Clone, Copy)]
pub(super) struct Piece {
    pub(super) a: usize,
    pub(super) b: usize,
    pub(super) kind: u8,
    pub(super) fit: Fit,
}

/// Merge neighbours of the same kind unless keeping them apart pays for its penalty.
pub(super) fn merge(pieces: &mut Vec<Piece>, p: &[Prefix], beta: f64) {
    let mut i = 0;
    while i + 1 < pieces.len() {
        let (l, r) = (pieces[i], pieces[i + 1]);
        if l.kind == r.kind {
            let k = l.kind as usize;
            let joined = Fit::of(p, l.a, r.b);
            if joined.cost[k] <= l.fit.cost[k] + r.fit.cost[k] + beta {
                pieces[i] = Piece {
                    a: l.a,
                    b: r.b,
                    kind: l.kind,
                    fit: joined,
                };
                pieces.remove(i + 1);
                continue;
            }
        }
        i += 1;
    }
}

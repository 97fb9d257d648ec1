//! The chain of elements as a curve: parameter layout (which parameters set each element's
//! length and end curvatures), the chain's poses from [`crate::fresnel::advance`], and foot
//! points of samples on it.

use super::table::{ARC, STRAIGHT};
use crate::fresnel::{advance, Pose};

/// How each element's end curvatures come from the parameter vector.
#[derive(Debug, Clone)]
pub(super) struct Layout {
    pub(super) kinds: Vec<u8>,
    /// Parameter index of each element's length.
    pub(super) len_at: Vec<usize>,
    /// Parameter index of the start and end curvature (None: zero).
    pub(super) k_at: Vec<(Option<usize>, Option<usize>)>,
    /// Parameters that elements 0..=e depend on: indices < `prefix[e]`.
    pub(super) prefix: Vec<usize>,
    pub(super) count: usize,
}

impl Layout {
    pub(super) fn new(kinds: &[u8]) -> Layout {
        let e = kinds.len();
        let mut len_at = vec![0; e];
        let mut k_at = vec![(None, None); e];
        let mut prefix = vec![0; e];
        let mut arc_var: Vec<Option<usize>> = vec![None; e];
        let mut n = 3;
        let new = |n: &mut usize| {
            *n += 1;
            Some(*n - 1)
        };
        for i in 0..e {
            len_at[i] = n;
            n += 1;
            match kinds[i] {
                STRAIGHT => {}
                ARC => {
                    if arc_var[i].is_none() {
                        arc_var[i] = new(&mut n);
                    }
                    k_at[i] = (arc_var[i], arc_var[i]);
                }
                _ => {
                    let start = if i == 0 {
                        new(&mut n)
                    } else {
                        match kinds[i - 1] {
                            STRAIGHT => None,
                            ARC => arc_var[i - 1],
                            _ => k_at[i - 1].1,
                        }
                    };
                    let end = if i + 1 == e {
                        new(&mut n)
                    } else {
                        match kinds[i + 1] {
                            STRAIGHT => None,
                            ARC => {
                                arc_var[i + 1] = new(&mut n);
                                arc_var[i + 1]
                            }
                            _ => new(&mut n),
                        }
                    };
                    k_at[i] = (start, end);
                }
            }
            prefix[i] = n;
        }
        Layout {
            kinds: kinds.to_vec(),
            len_at,
            k_at,
            prefix,
            count: n,
        }
    }

    pub(super) fn curvatures(&self, q: &[f64], e: usize) -> (f64, f64) {
        let get = |v: Option<usize>| v.map_or(0.0, |i| q[i]);
        (get(self.k_at[e].0), get(self.k_at[e].1))
    }

    /// Total absolute turning `∫|κ| ds` of the chain with parameters `q` (NaN if any length or
    /// curvature is NaN); O(elements), no chain evaluated.
    pub(super) fn turning(&self, q: &[f64]) -> f64 {
        (0..self.kinds.len())
            .map(|e| {
                let (k0, k1) = self.curvatures(q, e);
                turning(k0, k1, q[self.len_at[e]])
            })
            .sum()
    }

    /// Whether the chain with parameters `q` turns at most `max` (false if its turning is NaN).
    pub(super) fn winds_within(&self, q: &[f64], max: f64) -> bool {
        self.turning(q) <= max
    }
}

/// `∫₀ᴸ |κ(s)| ds` for κ linear from `k0` to `k1` over length `l` ≥ 0 (closed form: the
/// trapezoid when the ends have one sign, else the two triangles either side of the zero).
pub(super) fn turning(k0: f64, k1: f64, l: f64) -> f64 {
    if k0 * k1 >= 0.0 {
        0.5 * l * (k0.abs() + k1.abs())
    } else {
        0.5 * l * (k0 * k0 + k1 * k1) / (k1 - k0).abs()
    }
}

/// Work counters of the chain evaluations on this thread (tests only): every chain built and
/// the largest total turning of one, which bounds the Fresnel sub-intervals of every
/// [`advance`] on it (see [`crate::elements::MAX_TURNING_PER_INTERVAL`]).
#[cfg(test)]
pub(super) mod work {
    use std::cell::Cell;

    thread_local! {
        static BUILDS: Cell<usize> = const { Cell::new(0) };
        static MAX_TURNING: Cell<f64> = const { Cell::new(0.0) };
    }

    pub(in crate::elements) fn record(turning: f64) {
        BUILDS.with(|b| b.set(b.get() + 1));
        // NaN counts as unbounded.
        MAX_TURNING.with(|m| {
            let was = m.get();
            m.set(if was.is_nan() || turning <= was {
                was
            } else {
                turning
            });
        });
    }

    /// (chains built, largest turning) since the last call; resets both.
    pub(in crate::elements) fn take() -> (usize, f64) {
        (
            BUILDS.with(|b| b.replace(0)),
            MAX_TURNING.with(|m| m.replace(0.0)),
        )
    }
}

/// The chain: start poses of every element and of the end, cumulative lengths.
#[derive(Debug, Clone)]
pub(super) struct Chain {
    pub(super) poses: Vec<Pose>,
    pub(super) cum: Vec<f64>,
    pub(super) k: Vec<(f64, f64)>,
    pub(super) len: Vec<f64>,
}

impl Chain {
    pub(super) fn build(layout: &Layout, q: &[f64]) -> Chain {
        let e = layout.kinds.len();
        let mut poses = Vec::with_capacity(e + 1);
        let mut cum = Vec::with_capacity(e + 1);
        let mut k = Vec::with_capacity(e);
        let mut len = Vec::with_capacity(e);
        let mut p = Pose {
            x: q[0],
            y: q[1],
            heading: q[2],
        };
        let mut u = 0.0;
        for i in 0..e {
            poses.push(p);
            cum.push(u);
            let l = q[layout.len_at[i]];
            let (k0, k1) = layout.curvatures(q, i);
            p = advance(p, k0, rate(k0, k1, l), l);
            u += l;
            k.push((k0, k1));
            len.push(l);
        }
        poses.push(p);
        cum.push(u);
        #[cfg(test)]
        work::record(layout.turning(q));
        Chain { poses, cum, k, len }
    }

    pub(super) fn total(&self) -> f64 {
        *self.cum.last().unwrap_or(&0.0)
    }

    /// Element holding chain arc length `u` (clamped to the chain).
    pub(super) fn element(&self, u: f64) -> usize {
        let e = self.len.len();
        let j = self.cum[1..e].partition_point(|&c| c <= u);
        j.min(e - 1)
    }

    /// Pose and curvature at local offset `v` in element `e`.
    pub(super) fn at(&self, e: usize, v: f64) -> (Pose, f64) {
        let (k0, k1) = self.k[e];
        let r = rate(k0, k1, self.len[e]);
        (advance(self.poses[e], k0, r, v), k0 + r * v)
    }
}

pub(super) fn rate(k0: f64, k1: f64, l: f64) -> f64 {
    if l > 0.0 {
        (k1 - k0) / l
    } else {
        0.0
    }
}

/// Foot point of `(px, py)` on the chain from the guess `u` (Newton steps on T·(p − c) = 0).
pub(super) fn foot(chain: &Chain, px: f64, py: f64, mut u: f64) -> (f64, usize, Pose, f64) {
    let total = chain.total();
    let mut e = chain.element(u);
    let (mut pose, mut k) = chain.at(e, u - chain.cum[e]);
    for _ in 0..4 {
        let (dx, dy) = (px - pose.x, py - pose.y);
        let (s, c) = pose.heading.sin_cos();
        let along = c * dx + s * dy;
        let normal = -s * dx + c * dy;
        let den = 1.0 - k * normal;
        let step = along / if den > 0.2 { den } else { 1.0 };
        let nu = (u + step).clamp(0.0, total);
        if (nu - u).abs() <= 1e-12 * (1.0 + total) {
            break;
        }
        u = nu;
        e = chain.element(u);
        (pose, k) = chain.at(e, u - chain.cum[e]);
    }
    (u, e, pose, k)
}

/// Signed normal distance of a point from a pose (left positive).
pub(super) fn normal_distance(pose: &Pose, px: f64, py: f64) -> f64 {
    let (s, c) = pose.heading.sin_cos();
    -s * (px - pose.x) + c * (py - pose.y)
}

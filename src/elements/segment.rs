//! Segmentation of the curvature diagram κ(s) into pieces on which κ is linear in s: exact
//! penalized segmentation by optimal partitioning with PELT pruning and a minimum piece length;
//! the cost of a piece is O(1) from double-double prefix sums (see the notes of
//! [`crate::elements`]).

use crate::error::{try_filled, KernelError, Result};

/// Double-double running sums (Knuth's two-sum), so differences of prefix sums keep their digits.
#[derive(Debug, Clone, Copy, Default)]
pub(super) struct Dd {
    pub(super) hi: f64,
    pub(super) lo: f64,
}

impl Dd {
    pub(super) fn add(self, x: f64) -> Dd {
        let s = self.hi + x;
        let bb = s - self.hi;
        let err = (self.hi - (s - bb)) + (x - bb);
        let lo = self.lo + err;
        let hi = s + lo;
        Dd {
            hi,
            lo: lo - (hi - s),
        }
    }
    pub(super) fn minus(self, o: Dd) -> f64 {
        (self.hi - o.hi) + (self.lo - o.lo)
    }
}

/// Prefix sums of w, ws, ws², wκ, wsκ, wκ².
#[derive(Debug, Clone, Copy, Default)]
pub(super) struct Prefix(pub(super) [Dd; 6]);

/// Weighted sums of one piece and its fits.
#[derive(Debug, Clone, Copy)]
pub(super) struct Fit {
    pub(super) w: f64,
    pub(super) mean_s: f64,
    /// Weighted mean curvature (the level at `mean_s`) and slope.
    pub(super) level: f64,
    pub(super) slope: f64,
    pub(super) sxx: f64,
    /// Residual costs of the three models: κ = 0, κ constant, κ linear.
    pub(super) cost: [f64; 3],
}

impl Fit {
    pub(super) fn of(p: &[Prefix], a: usize, b: usize) -> Fit {
        // Samples a..b (exclusive) of the usable list; p has one more entry.
        let d = |j: usize| p[b].0[j].minus(p[a].0[j]);
        let (w, ws, wss, wk, wsk, wkk) = (d(0), d(1), d(2), d(3), d(4), d(5));
        let mean_s = ws / w;
        let level = wk / w;
        let sxx = (wss - ws * mean_s).max(0.0);
        let sxy = wsk - ws * level;
        let syy = (wkk - wk * level).max(0.0);
        let slope = if sxx > 0.0 { sxy / sxx } else { 0.0 };
        let linear = if sxx > 0.0 {
            (syy - sxy * sxy / sxx).max(0.0)
        } else {
            syy
        };
        Fit {
            w,
            mean_s,
            level,
            slope,
            sxx,
            cost: [wkk.max(0.0), syy, linear],
        }
    }

    pub(super) fn at(&self, s: f64) -> f64 {
        self.level + self.slope * (s - self.mean_s)
    }
}

/// Exact penalized segmentation (optimal partitioning, PELT pruning, minimum length). Returns
/// the ends (exclusive) of the pieces.
pub(super) fn pelt(p: &[Prefix], s: &[f64], beta: f64, min_len: f64) -> Result<Vec<usize>> {
    let m = s.len();
    let mut best = try_filled(m + 1, f64::INFINITY)?;
    let mut last = try_filled(m + 1, 0usize)?;
    best[0] = -beta;
    // Candidates: (start index, pruned from this arc length on).
    let mut cand: Vec<(usize, f64)> = Vec::new();
    cand.try_reserve(64)
        .map_err(|_| KernelError::OutOfMemory { bytes: 64 * 16 })?;
    cand.push((0, f64::INFINITY));
    let span = |a: usize, b: usize| s[b - 1] - s[a];
    for t in 1..=m {
        let st = s[t - 1];
        cand.retain(|&(_, dead)| dead > st);
        for &(a, _) in &cand {
            // A piece a..t must be long enough, unless it is the whole track.
            if !(best[a].is_finite() && (span(a, t) >= min_len || (a == 0 && t == m))) {
                continue;
            }
            let v = best[a] + Fit::of(p, a, t).cost[2] + beta;
            if v < best[t] {
                best[t] = v;
                last[t] = a;
            }
        }
        if best[t].is_finite() {
            let bt = best[t];
            let until = st + min_len;
            for c in cand.iter_mut() {
                let (a, _) = *c;
                if best[a].is_finite()
                    && span(a, t) >= min_len
                    && best[a] + Fit::of(p, a, t).cost[2] >= bt
                {
                    c.1 = c.1.min(until);
                }
            }
        }
        if t < m {
            cand.try_reserve(1)
                .map_err(|_| KernelError::OutOfMemory { bytes: 16 })?;
            cand.push((t, f64::INFINITY));
        }
    }
    let mut ends = Vec::new();
    let mut t = m;
    if !best[m].is_finite() {
        ends.push(m);
        return Ok(ends);
    }
    while t > 0 {
        ends.push(t);
        t = last[t];
    }
    ends.reverse();
    Ok(ends)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn pelt_with_minimum_length_matches_brute_force() {
        // Optimal partitioning over every segmentation (exhaustive recursion) on a small
        // piecewise-linear signal with noise: PELT with delayed pruning finds the same cost.
        let m = 24;
        let s: Vec<f64> = (0..m).map(|i| i as f64).collect();
        let k: Vec<f64> = (0..m)
            .map(|i| {
                let x = i as f64;
                let base = if i < 8 {
                    0.0
                } else if i < 15 {
                    0.3 * (x - 8.0)
                } else {
                    2.1
                };
                base + 0.05 * ((i * 7919 % 13) as f64 - 6.0) / 6.0
            })
            .collect();
        let mut p = vec![Prefix::default(); m + 1];
        let mut acc = Prefix::default();
        for j in 0..m {
            let (x, y) = (s[j], k[j]);
            for (a, v) in acc.0.iter_mut().zip([1.0, x, x * x, y, x * y, y * y]) {
                *a = a.add(v);
            }
            p[j + 1] = acc;
        }
        for &(beta, min_len) in &[(0.05, 0.0), (0.05, 4.0), (0.5, 6.0), (0.001, 2.5)] {
            let ends = pelt(&p, &s, beta, min_len).unwrap();
            let cost = |ends: &[usize]| {
                let mut a = 0;
                let mut c = 0.0;
                for &b in ends {
                    c += Fit::of(&p, a, b).cost[2] + beta;
                    a = b;
                }
                c
            };
            fn brute(p: &[Prefix], s: &[f64], a: usize, beta: f64, min_len: f64) -> f64 {
                let m = s.len();
                let mut best = f64::INFINITY;
                for b in a + 1..=m {
                    let long = s[b - 1] - s[a] >= min_len || (a == 0 && b == m);
                    if !long {
                        continue;
                    }
                    let here = Fit::of(p, a, b).cost[2] + beta;
                    let rest = if b == m {
                        0.0
                    } else {
                        brute(p, s, b, beta, min_len)
                    };
                    best = best.min(here + rest);
                }
                best
            }
            let want = brute(&p, &s, 0, beta, min_len);
            assert!((cost(&ends) - want).abs() < 1e-9, "{beta} {min_len}");
        }
    }
}

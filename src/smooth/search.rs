//! The search for λ*: generalized cross-validation (P. Craven and G. Wahba, Numer. Math. 31
//! (1979) 377–403) or the unbiased risk estimate, minimized over log10 λ*.
//!
//! Each round evaluates two values of λ* at once (one per core). A coarse walk on the grid of
//! 2-decade steps starts at 10⁸ and goes downhill until the best point has a worse neighbour on
//! each side (or is an end of the range); successive parabolic interpolation (the parabolic step
//! of R. P. Brent, *Algorithms for Minimization without Derivatives*, 1973, ch. 5) then refines
//! the bracket, each round pairing the parabola's vertex with the midpoint of the wider side,
//! until the best point's neighbours are within 0.02 decade or the parabola's vertex falls on
//! the best point (within 0.0025 decade), on a lattice of 1/1024 decade. The walk assumes the
//! criterion falls towards one minimum from 10⁸ (a deeper minimum beyond a rise of the criterion
//! would be missed); the old full scan of the grid (every 2 decades from 10⁻⁴ up, then golden
//! sections) cost 15 + 13 evaluations, the walk and refinement about 6 rounds of two.
//!
//! Evaluations at λ* ≤ 10^[`NORMAL_MAX`] use the band LDLᵀ of the normal equations, the others
//! Givens QR (see [`NORMAL_MAX`] for the measured accuracy).

use super::problem::{Eval, Pool, Problem};
use super::Smoothing;
use crate::error::Result;

/// Bounds of the search over log10 λ*.
pub(super) const LOG_LAMBDA_MIN: f64 = -4.0;
pub(super) const LOG_LAMBDA_MAX: f64 = 24.0;
/// Spacing of the coarse scan and resolution of the refinement, in decades of λ*.
const COARSE_STEP: f64 = 2.0;
const FINE_STEP: f64 = 0.02;
/// Largest log10 λ* evaluated through the normal equations. Measured against QR on noisy torus
/// knots (n = 3·10³ to 10⁵, cubic and quintic, noise 10⁻⁵ to 10⁻² of the size): the GCV score
/// agrees to 7e-9 (relative) up to λ* = 10⁵, 1e-7 at 10⁶, 7e-6 at 10⁸, 2e-3 at 10⁹, and is
/// useless from 10¹¹ (the normal matrix squares the condition number, about 10² λ*). A relative
/// error of 1e-8 moves the minimum of the criterion by about 10⁻³ decade, well inside the search's
/// resolution; past 10⁵ QR is used.
pub(super) const NORMAL_MAX: f64 = 5.0;

/// Which factorization an evaluation uses.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum Solver {
    /// Givens QR of the rows.
    Qr,
    /// Band LDLᵀ of the normal equations.
    Normal,
}

impl Problem {
    /// The criterion of a fit `e` (infinite when it is not usable).
    pub(super) fn score(&self, how: Smoothing, e: &Eval) -> f64 {
        let n = self.n as f64;
        let d = self.dim as f64;
        // The influence matrix reproduces the m polynomials of the penalty's null space and
        // shrinks everything else: m ≤ tr A ≤ n. A trace outside that range means the band of
        // the inverse lost its accuracy (very large λ*): the evaluation is rejected.
        let m = self.k.div_ceil(2) as f64;
        if !(e.trace >= m - 0.01 && e.trace <= n + 0.01) {
            return f64::INFINITY;
        }
        match how {
            Smoothing::Noise(sigma) => e.rss / n + 2.0 * d * sigma * sigma * e.trace / n,
            _ => {
                let r = 1.0 - e.trace / n;
                if r <= 0.0 {
                    f64::INFINITY
                } else {
                    e.rss / (n * d) / (r * r)
                }
            }
        }
    }

    /// The fit at log10 λ* with `solver`, and its criterion.
    pub(super) fn criterion_with(
        &self,
        how: Smoothing,
        log_lambda: f64,
        solver: Solver,
        pool: &Pool,
    ) -> Result<(f64, Option<Eval>)> {
        let lambda = 10f64.powf(log_lambda);
        let e = match solver {
            Solver::Qr => self.eval(lambda, true, pool)?,
            Solver::Normal => self.eval_normal(lambda, pool)?,
        };
        Ok(match e {
            Some(e) => (self.score(how, &e), Some(e)),
            None => (f64::INFINITY, None),
        })
    }
}

/// The minimum found: log10 λ*, its criterion, and the fit there when QR made it (the final fit
/// is then reused).
pub(super) struct Found {
    pub(super) log_lambda: f64,
    pub(super) criterion: f64,
    pub(super) fit: Option<Eval>,
}

/// Most rounds of the walk and of the refinement (each round evaluates two points at once).
const MAX_ROUNDS: usize = 24;

/// Points of the refinement lie on a lattice of this many per decade (λ* steps of 0.22 %): a
/// parabola's vertex moves with the rounding of the scores, and the same data in other units
/// (whose scores differ by rounding) must give the same λ*.
const LATTICE: f64 = 1024.0;

/// Where the coarse walk starts: λ* = 10⁸ (bandwidths of about 20 samples for the quintic, 100
/// for the cubic spline), in the middle of the range where noisy logs put λ*.
const START: f64 = 8.0;

/// The best point (log10 λ*, criterion) with its neighbours in the scan (None at an end).
type Around = (Option<(f64, f64)>, (f64, f64), Option<(f64, f64)>);

/// The points evaluated so far, sorted by log10 λ*, and the best fit made by QR.
struct Scan<'a> {
    prob: &'a Problem,
    how: Smoothing,
    points: Vec<(f64, f64)>,
    best: Found,
    pool: Pool,
}

impl Scan<'_> {
    /// Evaluate two points at once (one per core) and record them.
    fn pair(&mut self, x1: f64, x2: f64) -> Result<()> {
        let (prob, how, pool) = (self.prob, self.how, &self.pool);
        let run = |x: f64| -> Result<(f64, f64, Option<Eval>)> {
            let solver = prob.solver(x);
            let (c, e) = prob.criterion_with(how, x, solver, pool)?;
            let keep = match e {
                Some(e) if solver == Solver::Qr => Some(e),
                Some(e) => {
                    pool.recycle(e);
                    None
                }
                None => None,
            };
            Ok((x, c, keep))
        };
        let (r1, r2) = if x1 == x2 {
            (run(x1)?, None)
        } else {
            let (a, b) = rayon::join(|| run(x1), || run(x2));
            (a?, Some(b?))
        };
        for (x, c, e) in std::iter::once(r1).chain(r2) {
            // Ties go to the smaller λ*, so the choice does not depend on the order of the
            // evaluations.
            let better =
                c < self.best.criterion || (c == self.best.criterion && x < self.best.log_lambda);
            if better {
                let old = std::mem::replace(
                    &mut self.best,
                    Found {
                        log_lambda: x,
                        criterion: c,
                        fit: e,
                    },
                );
                if let Some(f) = old.fit {
                    self.pool.recycle(f);
                }
            } else if let Some(f) = e {
                self.pool.recycle(f);
            }
            let at = self.points.partition_point(|p| p.0 < x);
            if self.points.get(at).is_none_or(|p| p.0 != x) {
                self.points.insert(at, (x, c));
            }
        }
        Ok(())
    }

    /// [`Scan::pair`] with both points rounded to the lattice of [`LATTICE`] per decade, skipping
    /// points already evaluated; false when both were.
    fn pair_on_lattice(&mut self, x1: f64, x2: f64) -> Result<bool> {
        let on = |x: f64| (x * LATTICE).round() / LATTICE;
        let known = |scan: &Self, x: f64| scan.points.iter().any(|p| p.0 == x);
        let (x1, x2) = (on(x1), on(x2));
        match (known(self, x1), known(self, x2)) {
            (true, true) => return Ok(false),
            (true, false) => self.pair(x2, x2)?,
            (false, true) => self.pair(x1, x1)?,
            (false, false) => self.pair(x1, x2)?,
        }
        Ok(true)
    }

    /// The best point's index and its neighbours in the scan (None at an end).
    fn around_best(&self) -> Around {
        let i = self
            .points
            .iter()
            .position(|p| p.0 == self.best.log_lambda)
            .unwrap_or(0);
        let left = i.checked_sub(1).map(|j| self.points[j]);
        (left, self.points[i], self.points.get(i + 1).copied())
    }
}

impl Problem {
    /// The solver for log10 λ* `l`.
    fn solver(&self, l: f64) -> Solver {
        if l <= NORMAL_MAX {
            Solver::Normal
        } else {
            Solver::Qr
        }
    }

    /// Minimize the criterion over log10 λ* (see the module notes). Always terminates: at most
    /// [`MAX_ROUNDS`] rounds of two evaluations for each stage.
    pub(super) fn search(&self, how: Smoothing) -> Result<Found> {
        let hi =
            LOG_LAMBDA_MAX.min(2.0 * self.k.div_ceil(2) as f64 * (self.n as f64).log10() + 2.0);
        // The grid runs from LOG_LAMBDA_MIN to `hi`, and one step past either end, where the
        // refinement of the full scan used to reach (±2 decades around its best point).
        let (lo_end, hi_end) = (LOG_LAMBDA_MIN - COARSE_STEP, hi + COARSE_STEP);
        let grid = |l: f64| l.clamp(lo_end, hi_end);
        let mut scan = Scan {
            prob: self,
            how,
            points: Vec::new(),
            best: Found {
                log_lambda: f64::NAN,
                criterion: f64::INFINITY,
                fit: None,
            },
            pool: Pool::default(),
        };
        // Coarse walk on the 2-decade grid: from START downhill, two grid points per round,
        // until the best point has an evaluated neighbour on each side (or is an end of the
        // range).
        let start = grid(START);
        scan.pair(grid(start - COARSE_STEP), start)?;
        for _ in 0..MAX_ROUNDS {
            let (left, mid, right) = scan.around_best();
            let x = mid.0;
            if !scan.best.criterion.is_finite() {
                // Nothing usable yet (singular or inaccurate everywhere tried): go down.
                let lo = scan.points[0].0;
                if lo <= lo_end {
                    break;
                }
                scan.pair(grid(lo - COARSE_STEP), grid(lo - 2.0 * COARSE_STEP))?;
                continue;
            }
            match (left, right) {
                (None, _) if x > lo_end => {
                    scan.pair(grid(x - COARSE_STEP), grid(x - 2.0 * COARSE_STEP))?
                }
                (_, None) if x < hi_end => {
                    scan.pair(grid(x + COARSE_STEP), grid(x + 2.0 * COARSE_STEP))?
                }
                _ => break,
            }
        }
        // Refinement inside the bracket: a parabola through the best point and its neighbours
        // proposes one point of each round; the other halves the wider side, so the bracket
        // shrinks even where the criterion is far from a parabola (it is steep above the
        // minimum and flat below). Ends when the neighbours are within FINE_STEP, or when the
        // vertex falls on the best point (within FINE_STEP / 8) from neighbours at most
        // 15 FINE_STEP away (the criterion is that close to a parabola there).
        for _ in 0..MAX_ROUNDS {
            let (left, mid, right) = scan.around_best();
            let x = mid.0;
            let (a, c) = match (left, right) {
                (Some(l), Some(r)) => (l.0, r.0),
                _ => break, // the minimum is at an end of the range
            };
            if (x - a) <= FINE_STEP && (c - x) <= FINE_STEP {
                break;
            }
            let vertex = parabola_vertex(left.unwrap_or(mid), mid, right.unwrap_or(mid));
            let on_best = vertex.is_finite() && (vertex - x).abs() <= 0.125 * FINE_STEP;
            if on_best && (x - a).max(c - x) <= 15.0 * FINE_STEP {
                break;
            }
            if on_best || !vertex.is_finite() && (x - a).max(c - x) <= 4.0 * FINE_STEP {
                // Close in from both sides.
                let s = FINE_STEP;
                if !scan.pair_on_lattice(x - s.min(0.5 * (x - a)), x + s.min(0.5 * (c - x)))? {
                    break;
                }
                continue;
            }
            let wide = if x - a > c - x {
                0.5 * (a + x)
            } else {
                0.5 * (x + c)
            };
            let step = if vertex.is_finite() {
                vertex.clamp(a + 0.1 * (x - a), c - 0.1 * (c - x))
            } else if x - a > c - x {
                0.5 * (x + c)
            } else {
                0.5 * (a + x)
            };
            if !scan.pair_on_lattice(step, wide)? {
                break;
            }
        }
        if scan.best.log_lambda.is_nan() {
            // No usable score anywhere (e.g. squares of the data overflow): the smallest λ*, as
            // the full scan of the grid used to give.
            scan.best.log_lambda = LOG_LAMBDA_MIN;
        }
        Ok(scan.best)
    }
}

/// log10 λ* at the vertex of the parabola through three points (NaN when it opens downwards or
/// the points are collinear).
fn parabola_vertex((x0, f0): (f64, f64), (x1, f1): (f64, f64), (x2, f2): (f64, f64)) -> f64 {
    if !(f0.is_finite() && f1.is_finite() && f2.is_finite()) {
        return f64::NAN;
    }
    let (d0, d2) = ((f0 - f1) / (x0 - x1), (f2 - f1) / (x2 - x1));
    let curvature = (d2 - d0) / (x2 - x0);
    if curvature.partial_cmp(&0.0) != Some(std::cmp::Ordering::Greater) {
        return f64::NAN;
    }
    // f ≈ f1 + slope (x − x1) + curvature (x − x0)(x − x2)... written about x1:
    let slope = d0 + curvature * (x1 - x0);
    x1 - slope / (2.0 * curvature)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Noisy torus-knot track (deterministic pseudo-noise), centred.
    fn track(n: usize, noise: f64) -> (Vec<f64>, Vec<f64>) {
        let u: Vec<f64> = (0..n)
            .map(|i| i as f64 + 0.2 * ((i * 37 % 11) as f64 / 11.0 - 0.5))
            .collect();
        let mut y = Vec::with_capacity(3 * n);
        let mut state = 12345u64;
        let mut rnd = || {
            let mut s = 0.0;
            for _ in 0..12 {
                state = state
                    .wrapping_mul(6364136223846793005)
                    .wrapping_add(1442695040888963407);
                s += (state >> 11) as f64 / (1u64 << 53) as f64;
            }
            s - 6.0
        };
        for &ui in &u {
            let p = ui * 0.01 / 20.0 * 0.8;
            let ring = 80.0 + 30.0 * (3.0 * p).cos();
            y.push(ring * (2.0 * p).cos() + noise * rnd());
            y.push(ring * (2.0 * p).sin() + noise * rnd());
            y.push(20.0 * (3.0 * p).sin() + noise * rnd());
        }
        let dim = 3;
        let mut c = [0.0; 3];
        for r in y.chunks(3) {
            for d in 0..3 {
                c[d] += r[d] / n as f64;
            }
        }
        for r in y.chunks_mut(3) {
            for d in 0..3 {
                r[d] -= c[d];
            }
        }
        let _ = dim;
        (u, y)
    }

    #[test]
    fn normal_equations_agree_with_qr_where_they_are_used() {
        // The GCV score through the band LDLᵀ against Givens QR (the reference: error growing
        // with √cond instead of cond) at every decade up to NORMAL_MAX: within 2e-8 relative
        // (measured: at most 7e-9, see NORMAL_MAX).
        for &(n, noise, k) in &[(3000usize, 0.05, 5usize), (3000, 0.001, 5), (3000, 0.05, 3)] {
            let (u, y) = track(n, noise);
            let p = Problem::new(&u, y, 3, vec![1.0; n], k).unwrap();
            let mut l = LOG_LAMBDA_MIN;
            while l <= NORMAL_MAX {
                let (a, _) = p
                    .criterion_with(Smoothing::Gcv, l, Solver::Qr, &Pool::default())
                    .unwrap();
                let (b, _) = p
                    .criterion_with(Smoothing::Gcv, l, Solver::Normal, &Pool::default())
                    .unwrap();
                assert!(
                    (a - b).abs() <= 2e-8 * a,
                    "n {n} k {k} log λ* {l}: {a} vs {b}"
                );
                l += 1.0;
            }
        }
    }

    #[test]
    fn vertex_of_a_parabola() {
        // f = 2 (x − 1.5)² + 3 sampled at 0, 1, 3: the vertex is 1.5 (closed form).
        let f = |x: f64| 2.0 * (x - 1.5) * (x - 1.5) + 3.0;
        let v = parabola_vertex((0.0, f(0.0)), (1.0, f(1.0)), (3.0, f(3.0)));
        assert!((v - 1.5).abs() < 1e-12);
        // Opening downwards: no vertex.
        assert!(parabola_vertex((0.0, 0.0), (1.0, 1.0), (2.0, 0.0)).is_nan());
    }

    #[test]
    fn search_finds_the_minimum_of_the_scan() {
        // The walk and refinement end within 0.05 decade of the best point of a dense scan of
        // the same criterion (every 0.05 decade around it), and no worse than that point.
        let (u, y) = track(2000, 0.05);
        let p = Problem::new(&u, y, 3, vec![1.0; 2000], 5).unwrap();
        let found = p.search(Smoothing::Gcv).unwrap();
        let mut dense = (f64::INFINITY, 0.0);
        for j in 0..=560 {
            let l = LOG_LAMBDA_MIN + 0.05 * j as f64;
            let c = p
                .criterion_with(Smoothing::Gcv, l, p.solver(l), &Pool::default())
                .unwrap()
                .0;
            if c < dense.0 {
                dense = (c, l);
            }
        }
        assert!(
            (found.log_lambda - dense.1).abs() <= 0.05 + 1e-9,
            "{} vs {}",
            found.log_lambda,
            dense.1
        );
        assert!(found.criterion <= dense.0 * (1.0 + 1e-6));
    }
}

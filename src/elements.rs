//! Geometric elements of recorded paths: straights, circular arcs and transition spirals
//! (clothoids), as in a road or rail alignment, reconstructed from the curvature diagram κ(s).
//!
//! Per track, in three steps:
//!
//! 1. **Segmentation.** The signed curvature against arc length is cut into pieces on which κ is
//!    linear in s, by exact penalized segmentation: optimal partitioning with PELT pruning
//!    (R. Killick, P. Fearnhead & I. A. Eckley, JASA 107 (2012) 1590–1598). The cost of a piece is
//!    its weighted least-squares residual about a line, O(1) from prefix sums of w, ws, ws², wκ,
//!    wsκ, wκ² (kept as double-double sums so that a short piece far along a long track keeps its
//!    digits). The weights are `w = 1/(c·se_eff²)`: `se_eff² = se² + (resolution · p95|κ|)²`
//!    (the floor keeps noise-free data from turning the smoother's rounding at curvature kinks
//!    into pieces) and `c` the correlation length of the curvature estimates in samples:
//!    smoothed curvatures of neighbouring samples share their noise, and dividing by `c` counts
//!    them about once per independent value. `c` = [`CORRELATION_BANDWIDTHS`] = 3 smoothing
//!    bandwidths (the main lobe of the cubic smoothing spline's equivalent kernel spans about
//!    ±3.3 bandwidths, B. W. Silverman, Ann. Statist. 12 (1984) 898–916); on the noisy test
//!    chains of `tests/test_elements.py` (3 cm noise, 12 seeds) c = 2 bandwidths gave the right
//!    kinds in 7 of 12, 3 and 4 bandwidths in 12 of 12. Every piece adds `penalty`
//!    to the total; the default is the BIC-like `β = 3 ln n_eff` (a level, a slope and a change
//!    point per piece, Schwarz's ln n per parameter, over `n_eff = n / c` independent values).
//!    Every piece spans at least `min_length` of arc length; PELT's pruning is delayed until a
//!    piece of that length fits after the candidate, which keeps the search exact.
//! 2. **Classification.** Per piece, the level at its weighted centre and the slope, with their
//!    standard errors `1/√Σw` and `1/√Σw(s − s̄)²`: a piece whose level and slope are both within
//!    `significance` standard errors of zero is a straight, else one whose slope is is an arc,
//!    else a spiral. Neighbours of the same kind are merged (and refitted) unless keeping them
//!    apart lowers the weighted cost of their kind's model (κ = 0, κ constant, κ linear) by more
//!    than the penalty: a compound curve (two radii) stays two arcs.
//! 3. **Refinement in position space.** The chain of elements is a curve with continuous position
//!    and heading; curvature is continuous at the ends of spirals (a spiral starts where its
//!    neighbour ends: 0 next to a straight, the arc's curvature next to an arc). Its parameters
//!    (start point, start heading, each element's length, the curvatures of arcs and of free
//!    spiral ends) are fitted to the positions by Levenberg–Marquardt on the distances of the
//!    samples from the chain along its normal (foot points re-projected by Newton steps after
//!    every accepted step); the first and last samples are tied to the chain's ends. Chain points
//!    come from [`crate::fresnel::advance`]; the Jacobian from the chain's rigid-motion structure
//!    (a change in an element moves every later point by a rotation about the element's end),
//!    with forward differences of single elements. If the fit fails, or the chain has more than
//!    [`MAX_PARAMETERS`] parameters (the normal equations are dense), the elements of the
//!    curvature diagram are returned with `refined = false`, placed by a rigid fit of the chain to
//!    the samples.

use crate::batch::{check_offsets, track_rows};
use crate::error::{try_collect, try_filled, KernelError, Result};
use crate::frame::flag;
use crate::fresnel::{advance, Pose};
use nalgebra::{DMatrix, DVector};
use rayon::prelude::*;

/// Samples with these flags take no part.
pub const UNUSABLE: u8 = flag::STOPPED | flag::INVALID | flag::GAP;
/// Element kinds.
pub const STRAIGHT: u8 = 0;
pub const ARC: u8 = 1;
pub const SPIRAL: u8 = 2;
/// Refinement is skipped (curvature-diagram elements returned) beyond this many parameters.
pub const MAX_PARAMETERS: usize = 400;
/// Fewest usable samples for any element.
pub const MIN_SAMPLES: usize = 4;
/// Correlation length of smoothed curvatures, in smoothing bandwidths (see the module notes).
pub const CORRELATION_BANDWIDTHS: f64 = 3.0;
/// Default shortest element, in smoothing bandwidths (at least 3 sample spacings). The smoother
/// rounds the curvature diagram over a few bandwidths, so a shorter piece is mostly rounding:
/// on the noisy chains of `tests/test_elements.py` (3 cm noise, 24 paths, bandwidth about 4.5
/// samples) 2 bandwidths gave the right kinds for 15 paths, 4 for 20, 5 for 23, 6 for all 24.
pub const MIN_LENGTH_BANDWIDTHS: f64 = 6.0;
/// Default penalty per piece: `PENALTY_PER_LOG · ln n_eff` (see the module notes).
pub const PENALTY_PER_LOG: f64 = 3.0;

/// Per-sample inputs of a batch, kernel row order.
#[derive(Debug, Clone, Copy)]
pub struct Samples<'a> {
    pub t: &'a [f64],
    /// Cumulative arc length.
    pub arclength: &'a [f64],
    /// Signed curvature (left turns positive).
    pub curvature: &'a [f64],
    /// Standard error of the curvature (NaN: unknown).
    pub se: &'a [f64],
    /// Flag bits (see [`crate::frame::flag`]).
    pub flags: &'a [u8],
    /// Positions in the plane, row-major (n, 2).
    pub xy: &'a [f64],
}

/// Options; per-track arrays have one entry per track.
#[derive(Debug, Clone, Copy)]
pub struct Options<'a> {
    /// Penalty per piece in weighted-χ² units; NaN: `3 ln n_eff`.
    pub penalty: f64,
    /// Shortest piece (arc length) per track; NaN: `max(3, 6 · bandwidth)` median spacings
    /// (see [`MIN_LENGTH_BANDWIDTHS`]).
    pub min_length: &'a [f64],
    /// Smoothing bandwidth in samples per track (`fit_info["bandwidth"]`; NaN: none, the
    /// curvatures are taken as independent).
    pub bandwidth: &'a [f64],
    /// Standard errors of level and slope within which they count as zero.
    pub significance: f64,
    /// Relative floor of the curvature's standard error, times the 95th percentile of |κ|.
    pub resolution: f64,
    /// Refine in position space.
    pub refine: bool,
    /// Most Levenberg–Marquardt iterations.
    pub max_iterations: usize,
}

/// One element.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Element {
    /// Track position in the batch.
    pub track: usize,
    /// [`STRAIGHT`], [`ARC`] or [`SPIRAL`].
    pub kind: u8,
    /// Arc length (of the input's `arclength`) and time at the element's ends, interpolated
    /// from the samples' foot points on the chain.
    pub start_arclength: f64,
    pub end_arclength: f64,
    pub start_time: f64,
    pub end_time: f64,
    /// Length along the chain.
    pub length: f64,
    /// Signed curvature at the ends.
    pub start_curvature: f64,
    pub end_curvature: f64,
    /// 1/|κ| of an arc (NaN otherwise).
    pub radius: f64,
    /// Spiral parameter A, A² = L/|κ₁ − κ₀| (NaN otherwise).
    pub spiral_parameter: f64,
    /// Start point and heading (radians, counter-clockwise from +x).
    pub x: f64,
    pub y: f64,
    pub heading: f64,
    /// RMS and largest distance of the samples on the element from the chain, along its normal.
    pub rms: f64,
    pub max_distance: f64,
    /// Samples whose foot points lie on the element.
    pub samples: usize,
    /// Whether the position-space refinement converged.
    pub refined: bool,
}

/// Double-double running sums (Knuth's two-sum), so differences of prefix sums keep their digits.
#[derive(Debug, Clone, Copy, Default)]
struct Dd {
    hi: f64,
    lo: f64,
}

impl Dd {
    fn add(self, x: f64) -> Dd {
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
    fn minus(self, o: Dd) -> f64 {
        (self.hi - o.hi) + (self.lo - o.lo)
    }
}

/// Prefix sums of w, ws, ws², wκ, wsκ, wκ².
#[derive(Debug, Clone, Copy, Default)]
struct Prefix([Dd; 6]);

/// Weighted sums of one piece and its fits.
#[derive(Debug, Clone, Copy)]
struct Fit {
    w: f64,
    mean_s: f64,
    /// Weighted mean curvature (the level at `mean_s`) and slope.
    level: f64,
    slope: f64,
    sxx: f64,
    /// Residual costs of the three models: κ = 0, κ constant, κ linear.
    cost: [f64; 3],
}

impl Fit {
    fn of(p: &[Prefix], a: usize, b: usize) -> Fit {
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

    fn at(&self, s: f64) -> f64 {
        self.level + self.slope * (s - self.mean_s)
    }

    fn kind(&self, z: f64) -> u8 {
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
struct Piece {
    a: usize,
    b: usize,
    kind: u8,
    fit: Fit,
}

/// Exact penalized segmentation (optimal partitioning, PELT pruning, minimum length). Returns
/// the ends (exclusive) of the pieces.
fn pelt(p: &[Prefix], s: &[f64], beta: f64, min_len: f64) -> Result<Vec<usize>> {
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

/// Merge neighbours of the same kind unless keeping them apart pays for its penalty.
fn merge(pieces: &mut Vec<Piece>, p: &[Prefix], beta: f64) {
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

/// How each element's end curvatures come from the parameter vector.
#[derive(Debug, Clone)]
struct Layout {
    kinds: Vec<u8>,
    /// Parameter index of each element's length.
    len_at: Vec<usize>,
    /// Parameter index of the start and end curvature (None: zero).
    k_at: Vec<(Option<usize>, Option<usize>)>,
    /// Parameters that elements 0..=e depend on: indices < `prefix[e]`.
    prefix: Vec<usize>,
    count: usize,
}

impl Layout {
    fn new(kinds: &[u8]) -> Layout {
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

    fn curvatures(&self, q: &[f64], e: usize) -> (f64, f64) {
        let get = |v: Option<usize>| v.map_or(0.0, |i| q[i]);
        (get(self.k_at[e].0), get(self.k_at[e].1))
    }
}

/// The chain: start poses of every element and of the end, cumulative lengths.
#[derive(Debug, Clone)]
struct Chain {
    poses: Vec<Pose>,
    cum: Vec<f64>,
    k: Vec<(f64, f64)>,
    len: Vec<f64>,
}

impl Chain {
    fn build(layout: &Layout, q: &[f64]) -> Chain {
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
        Chain { poses, cum, k, len }
    }

    fn total(&self) -> f64 {
        *self.cum.last().unwrap_or(&0.0)
    }

    /// Element holding chain arc length `u` (clamped to the chain).
    fn element(&self, u: f64) -> usize {
        let e = self.len.len();
        let j = self.cum[1..e].partition_point(|&c| c <= u);
        j.min(e - 1)
    }

    /// Pose and curvature at local offset `v` in element `e`.
    fn at(&self, e: usize, v: f64) -> (Pose, f64) {
        let (k0, k1) = self.k[e];
        let r = rate(k0, k1, self.len[e]);
        (advance(self.poses[e], k0, r, v), k0 + r * v)
    }
}

fn rate(k0: f64, k1: f64, l: f64) -> f64 {
    if l > 0.0 {
        (k1 - k0) / l
    } else {
        0.0
    }
}

/// Foot point of `(px, py)` on the chain from the guess `u` (Newton steps on T·(p − c) = 0).
fn foot(chain: &Chain, px: f64, py: f64, mut u: f64) -> (f64, usize, Pose, f64) {
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
fn normal_distance(pose: &Pose, px: f64, py: f64) -> f64 {
    let (s, c) = pose.heading.sin_cos();
    -s * (px - pose.x) + c * (py - pose.y)
}

/// The fitting problem of one track.
struct Problem<'a> {
    px: &'a [f64],
    py: &'a [f64],
    layout: Layout,
}

struct State {
    q: Vec<f64>,
    chain: Chain,
    u: Vec<f64>,
    cost: f64,
}

impl Problem<'_> {
    fn n(&self) -> usize {
        self.px.len()
    }

    /// Foot points for parameters `q`, from guesses `u`; residual cost.
    fn state(&self, q: Vec<f64>, guess: &[f64]) -> State {
        let chain = Chain::build(&self.layout, &q);
        let n = self.n();
        let total = chain.total();
        let mut u = Vec::with_capacity(n);
        let mut cost = 0.0;
        for i in 0..n {
            let g = guess[i].clamp(0.0, total);
            if i == 0 || i + 1 == n {
                let end = if i == 0 { 0.0 } else { total };
                let p = if i == 0 {
                    chain.poses[0]
                } else {
                    chain.poses[chain.len.len()]
                };
                cost += (self.px[i] - p.x).powi(2) + (self.py[i] - p.y).powi(2);
                u.push(end);
                continue;
            }
            let (ui, _, pose, _) = foot(&chain, self.px[i], self.py[i], g);
            cost += normal_distance(&pose, self.px[i], self.py[i]).powi(2);
            u.push(ui);
        }
        State { q, chain, u, cost }
    }

    /// Normal equations JᵀJ and Jᵀr at a state.
    fn normal_equations(&self, st: &State) -> (DMatrix<f64>, DVector<f64>) {
        let np = self.layout.count;
        let e_count = self.layout.kinds.len();
        let q = &st.q;
        let chain = &st.chain;
        // d(start pose of element e, and of the end)/dq_k by forward differences of the chain.
        let scale = chain.total().max(1e-300);
        let mut dpose = vec![[0.0f64; 3]; (e_count + 1) * np];
        for k in 3..np {
            let h = step_for(k, q, &self.layout, scale);
            let mut qk = q.clone();
            qk[k] += h;
            let c2 = Chain::build(&self.layout, &qk);
            for e in 0..=e_count {
                let (a, b) = (chain.poses[e], c2.poses[e]);
                dpose[e * np + k] = [
                    (b.x - a.x) / h,
                    (b.y - a.y) / h,
                    (b.heading - a.heading) / h,
                ];
            }
        }
        let mut jtj = DMatrix::<f64>::zeros(np, np);
        let mut jtr = DVector::<f64>::zeros(np);
        let mut row = vec![0.0; np];
        let mut add = |row: &[f64], r: f64, upto: usize, jtj: &mut DMatrix<f64>| {
            for a in 0..upto {
                if row[a] == 0.0 {
                    continue;
                }
                jtr[a] += row[a] * r;
                for b in 0..=a {
                    jtj[(a, b)] += row[a] * row[b];
                }
            }
        };
        let n = self.n();
        for i in 0..n {
            let (px, py) = (self.px[i], self.py[i]);
            if i == 0 {
                // r = p − P0: dr/dx0 = (−1, 0), dr/dy0 = (0, −1).
                row.iter_mut().for_each(|v| *v = 0.0);
                row[0] = -1.0;
                add(&row, px - q[0], 1, &mut jtj);
                row[0] = 0.0;
                row[1] = -1.0;
                add(&row, py - q[1], 2, &mut jtj);
                continue;
            }
            let last = i + 1 == n;
            let (e, v) = if last {
                (e_count, 0.0)
            } else {
                let e = chain.element(st.u[i]);
                (e, st.u[i] - chain.cum[e])
            };
            let (pose, base) = if last {
                (chain.poses[e_count], chain.poses[e_count])
            } else {
                (chain.at(e, v).0, chain.poses[e])
            };
            // dc/dq for every parameter, as (dx, dy).
            let upto = if last { np } else { self.layout.prefix[e] };
            let mut dc = vec![(0.0, 0.0); upto];
            dc[0] = (1.0, 0.0);
            dc[1] = (0.0, 1.0);
            dc[2] = (-(pose.y - q[1]), pose.x - q[0]);
            let (rx, ry) = (pose.x - base.x, pose.y - base.y);
            for (k, d) in dc.iter_mut().enumerate().skip(3) {
                let [dx, dy, dth] = dpose[e * np + k];
                *d = (dx - dth * ry, dy + dth * rx);
            }
            if !last && v > 0.0 {
                // Changes within element e at fixed offset v.
                let (k0, k1) = chain.k[e];
                let l = chain.len[e];
                let r = rate(k0, k1, l);
                let g0 = Pose {
                    x: 0.0,
                    y: 0.0,
                    heading: 0.0,
                };
                let g = advance(g0, k0, r, v);
                let hk = 1e-6 / v;
                let gk = advance(g0, k0 + hk, r, v);
                let d_k0 = ((gk.x - g.x) / hk, (gk.y - g.y) / hk); // at fixed rate
                let (sn, cs) = base.heading.sin_cos();
                let rot = |d: (f64, f64)| (cs * d.0 - sn * d.1, sn * d.0 + cs * d.1);
                let mut local = |k: usize, d: (f64, f64), f: f64| {
                    let d = rot(d);
                    dc[k].0 += f * d.0;
                    dc[k].1 += f * d.1;
                };
                let (ks, ke) = self.layout.k_at[e];
                if self.layout.kinds[e] == SPIRAL && l > 0.0 {
                    let hr = 1e-6 / (v * v);
                    let gr = advance(g0, k0, r + hr, v);
                    let d_r = ((gr.x - g.x) / hr, (gr.y - g.y) / hr);
                    // rate = (k1 − k0)/L: dk0 → ∂k0 − ∂rate/L, dk1 → ∂rate/L, dL → −rate/L ∂rate.
                    if let Some(a) = ks {
                        local(a, d_k0, 1.0);
                        local(a, d_r, -1.0 / l);
                    }
                    if let Some(b) = ke {
                        local(b, d_r, 1.0 / l);
                    }
                    local(self.layout.len_at[e], d_r, -r / l);
                } else if let Some(a) = ks {
                    local(a, d_k0, 1.0);
                }
            }
            row.iter_mut().for_each(|x| *x = 0.0);
            if last {
                for (k, d) in dc.iter().enumerate() {
                    row[k] = -d.0;
                }
                add(&row, px - pose.x, upto, &mut jtj);
                for (k, d) in dc.iter().enumerate() {
                    row[k] = -d.1;
                }
                add(&row, py - pose.y, upto, &mut jtj);
            } else {
                let (sn, cs) = pose.heading.sin_cos();
                for (k, d) in dc.iter().enumerate() {
                    row[k] = -(-sn * d.0 + cs * d.1);
                }
                add(&row, normal_distance(&pose, px, py), upto, &mut jtj);
            }
        }
        for a in 0..np {
            for b in 0..a {
                jtj[(b, a)] = jtj[(a, b)];
            }
        }
        (jtj, jtr)
    }

    /// Levenberg–Marquardt from `q0`; None if it fails.
    fn solve(&self, q0: Vec<f64>, u0: &[f64], max_iter: usize) -> Option<State> {
        let mut st = self.state(q0, u0);
        if !st.cost.is_finite() {
            return None;
        }
        let mut mu = 1e-3;
        for _ in 0..max_iter {
            let (a, g) = self.normal_equations(&st);
            let big = (0..a.nrows()).map(|i| a[(i, i)]).fold(0.0, f64::max);
            if !(big.is_finite() && big > 0.0) {
                return None;
            }
            let mut improved = false;
            for _ in 0..12 {
                let mut m = a.clone();
                for i in 0..m.nrows() {
                    // Damping relative to each diagonal (parameters differ in scale by 1e10).
                    m[(i, i)] += mu * m[(i, i)] + 1e-30 * big;
                }
                let Some(ch) = m.cholesky() else {
                    mu *= 10.0;
                    continue;
                };
                let delta = ch.solve(&(-&g));
                let mut q = st.q.clone();
                for (qi, d) in q.iter_mut().zip(delta.iter()) {
                    *qi += d;
                }
                if q.iter().any(|v| !v.is_finite()) {
                    mu *= 10.0;
                    continue;
                }
                // Lengths are projected on ≥ 0 (an element may vanish; it is dropped after).
                for &i in &self.layout.len_at {
                    q[i] = q[i].max(0.0);
                }
                // Foot-point guesses: same fraction of the same element.
                let guess: Vec<f64> =
                    st.u.iter()
                        .map(|&u| {
                            let e = st.chain.element(u);
                            let l0 = st.chain.len[e];
                            let l1 = q[self.layout.len_at[e]];
                            let start: f64 = (0..e).map(|j| q[self.layout.len_at[j]]).sum();
                            start
                                + if l0 > 0.0 {
                                    (u - st.chain.cum[e]) * l1 / l0
                                } else {
                                    0.0
                                }
                        })
                        .collect();
                let trial = self.state(q, &guess);
                if trial.cost.is_finite() && trial.cost < st.cost {
                    let gain = st.cost - trial.cost;
                    st = trial;
                    mu = (mu / 3.0).max(1e-12);
                    improved = true;
                    if gain <= 1e-12 * st.cost.max(1e-300) {
                        return Some(st);
                    }
                    break;
                }
                mu *= 4.0;
            }
            if !improved {
                // No step lowers the cost: at a minimum to rounding.
                return Some(st);
            }
        }
        Some(st)
    }
}

fn step_for(k: usize, q: &[f64], layout: &Layout, scale: f64) -> f64 {
    if layout.len_at.contains(&k) {
        1e-7 * q[k].abs().max(1e-3 * scale)
    } else {
        // A curvature: a heading change of 1e-7 rad over the chain.
        1e-7 / scale
    }
}

/// Elements of one track (global row range `r`).
fn one_track(
    s: &Samples,
    r: std::ops::Range<usize>,
    track: usize,
    opt: &Options,
    min_length: f64,
    corr: f64,
) -> Result<Vec<Element>> {
    let n = r.len();
    let mut idx = try_collect(n, Vec::<usize>::new())?;
    for i in r.clone() {
        let ok = s.flags[i] & UNUSABLE == 0
            && s.curvature[i].is_finite()
            && s.arclength[i].is_finite()
            && s.xy[2 * i].is_finite()
            && s.xy[2 * i + 1].is_finite();
        if ok && idx.last().is_none_or(|&j| s.arclength[i] >= s.arclength[j]) {
            idx.push(i);
        }
    }
    let m = idx.len();
    if m < MIN_SAMPLES {
        return Ok(Vec::new());
    }
    let ss = try_collect(m, idx.iter().map(|&i| s.arclength[i] - s.arclength[idx[0]]))?;
    // Weights.
    let mut abs_k = try_collect(m, idx.iter().map(|&i| s.curvature[i].abs()))?;
    let p95 = quantile(&mut abs_k, 0.95);
    let mut known = try_collect(
        m,
        idx.iter()
            .map(|&i| s.se[i])
            .filter(|v| v.is_finite() && *v >= 0.0),
    )?;
    let typical = if known.is_empty() {
        // No standard errors: the curvature's scatter from its successive differences (an
        // underestimate for smoothed curvatures, which the correlation length makes up for).
        let d2: f64 = idx
            .windows(2)
            .map(|w| (s.curvature[w[1]] - s.curvature[w[0]]).powi(2))
            .sum();
        (d2 / (2.0 * (m - 1) as f64)).sqrt()
    } else {
        quantile(&mut known, 0.5)
    };
    let floor = (opt.resolution * p95).max(1e-150);
    let mut prefix = try_filled(m + 1, Prefix::default())?;
    let mut acc = Prefix::default();
    for (j, &i) in idx.iter().enumerate() {
        let se = if s.se[i].is_finite() && s.se[i] >= 0.0 {
            s.se[i]
        } else {
            typical
        };
        let w = 1.0 / (corr * (se * se + floor * floor));
        let (x, k) = (ss[j], s.curvature[i]);
        let add = [w, w * x, w * x * x, w * k, w * x * k, w * k * k];
        for (a, v) in acc.0.iter_mut().zip(add) {
            *a = a.add(v);
        }
        prefix[j + 1] = acc;
    }
    let n_eff = (m as f64 / corr).max(2.0);
    let beta = if opt.penalty.is_nan() {
        PENALTY_PER_LOG * n_eff.ln()
    } else {
        opt.penalty
    };
    let ends = pelt(&prefix, &ss, beta, min_length)?;
    let mut pieces = Vec::with_capacity(ends.len());
    let mut a = 0;
    for &b in &ends {
        let fit = Fit::of(&prefix, a, b);
        pieces.push(Piece {
            a,
            b,
            kind: fit.kind(opt.significance),
            fit,
        });
        a = b;
    }
    merge(&mut pieces, &prefix, beta);
    // Initial chain.
    let kinds: Vec<u8> = pieces.iter().map(|p| p.kind).collect();
    let layout = Layout::new(&kinds);
    let e_count = pieces.len();
    let bounds: Vec<f64> = (0..=e_count)
        .map(|j| {
            if j == 0 {
                0.0
            } else if j == e_count {
                ss[m - 1]
            } else {
                0.5 * (ss[pieces[j].a - 1] + ss[pieces[j].a])
            }
        })
        .collect();
    let mut q = vec![0.0; layout.count];
    let mut seen = vec![0u32; layout.count];
    for (e, p) in pieces.iter().enumerate() {
        q[layout.len_at[e]] = (bounds[e + 1] - bounds[e]).max(1e-9 * (1.0 + ss[m - 1]));
        let (ks, ke) = layout.k_at[e];
        let (v0, v1) = if p.kind == ARC {
            (p.fit.level, p.fit.level)
        } else {
            (p.fit.at(bounds[e]), p.fit.at(bounds[e + 1]))
        };
        for (var, val) in [(ks, v0), (ke, v1)] {
            if let Some(i) = var {
                // Arcs set their own value; a spiral only fills a free end (one shared by two
                // spirals gets the mean of both fits).
                let owner_is_arc = (e > 0 && kinds[e - 1] == ARC && Some(i) == ks)
                    || (e + 1 < e_count && kinds[e + 1] == ARC && Some(i) == ke);
                if p.kind == ARC || !owner_is_arc {
                    q[i] += val;
                    seen[i] += 1;
                }
            }
        }
    }
    for (v, &c) in q.iter_mut().zip(&seen).skip(3) {
        if c > 1 {
            *v /= c as f64;
        }
    }
    let px = try_collect(m, idx.iter().map(|&i| s.xy[2 * i]))?;
    let py = try_collect(m, idx.iter().map(|&i| s.xy[2 * i + 1]))?;
    // Rigid placement of the unrefined chain on the samples (2-D Kabsch).
    let chain0 = Chain::build(&layout, &q);
    let pts: Vec<Pose> = ss
        .iter()
        .map(|&u| {
            let e = chain0.element(u);
            chain0.at(e, u - chain0.cum[e]).0
        })
        .collect();
    let (cx, cy) = (mean(&pts, |p| p.x), mean(&pts, |p| p.y));
    let (mx, my) = (
        px.iter().sum::<f64>() / m as f64,
        py.iter().sum::<f64>() / m as f64,
    );
    let (mut sxx, mut sxy) = (0.0, 0.0);
    for j in 0..m {
        let (ax, ay) = (pts[j].x - cx, pts[j].y - cy);
        let (bx, by) = (px[j] - mx, py[j] - my);
        sxx += ax * bx + ay * by;
        sxy += ax * by - ay * bx;
    }
    let phi = sxy.atan2(sxx);
    let (sn, cs) = phi.sin_cos();
    q[0] = mx - (cs * cx - sn * cy);
    q[1] = my - (sn * cx + cs * cy);
    q[2] = phi;
    let mut problem = Problem {
        px: &px,
        py: &py,
        layout,
    };
    // Elements that the fit shrinks below half the minimum length (or half a sample spacing)
    // are dropped and the chain refitted (a curvature jump smoothed into a short ramp gives
    // such spirals).
    let drop_below = 0.5 * min_length.max(ss[m - 1] / (m - 1) as f64);
    let mut rounds = 0;
    let (st, ok) = loop {
        let refined = if opt.refine && problem.layout.count <= MAX_PARAMETERS {
            problem.solve(q.clone(), &ss, opt.max_iterations)
        } else {
            None
        };
        let Some(st) = refined else {
            break (problem.state(q, &ss), false);
        };
        let keep: Vec<usize> = (0..st.chain.len.len())
            .filter(|&e| st.chain.len[e] >= drop_below)
            .collect();
        rounds += 1;
        if keep.len() == st.chain.len.len() || keep.is_empty() || rounds > 3 {
            break (st, true);
        }
        let kinds: Vec<u8> = keep.iter().map(|&e| problem.layout.kinds[e]).collect();
        let layout = Layout::new(&kinds);
        let mut nq = vec![0.0; layout.count];
        let mut seen = vec![0u32; layout.count];
        nq[..3].copy_from_slice(&st.q[..3]);
        for (j, &e) in keep.iter().enumerate() {
            nq[layout.len_at[j]] = st.chain.len[e];
            let (k0, k1) = st.chain.k[e];
            for (var, val) in [(layout.k_at[j].0, k0), (layout.k_at[j].1, k1)] {
                if let Some(i) = var {
                    nq[i] += val;
                    seen[i] += 1;
                }
            }
        }
        for (v, &c) in nq.iter_mut().zip(&seen).skip(3) {
            if c > 1 {
                *v /= c as f64;
            }
        }
        q = nq;
        problem.layout = layout;
    };
    Ok(report(&problem, &st, s, &idx, track, ok))
}

fn mean(p: &[Pose], f: impl Fn(&Pose) -> f64) -> f64 {
    p.iter().map(f).sum::<f64>() / p.len() as f64
}

fn report(
    pr: &Problem,
    st: &State,
    s: &Samples,
    idx: &[usize],
    track: usize,
    refined: bool,
) -> Vec<Element> {
    let chain = &st.chain;
    let e_count = chain.len.len();
    let mut sq = vec![0.0; e_count];
    let mut mx = vec![0.0f64; e_count];
    let mut cnt = vec![0usize; e_count];
    // Foot points made non-decreasing for the interpolation of times and arc lengths.
    let mut u = st.u.clone();
    for j in 1..u.len() {
        u[j] = u[j].max(u[j - 1]);
    }
    for (j, &uj) in st.u.iter().enumerate() {
        let e = chain.element(uj);
        let (pose, _) = chain.at(e, uj - chain.cum[e]);
        let d = normal_distance(&pose, pr.px[j], pr.py[j]);
        sq[e] += d * d;
        mx[e] = mx[e].max(d.abs());
        cnt[e] += 1;
    }
    let interp = |x: f64, col: &dyn Fn(usize) -> f64| -> f64 {
        let j = u.partition_point(|&v| v < x);
        if j == 0 {
            return col(idx[0]);
        }
        if j >= u.len() {
            return col(idx[u.len() - 1]);
        }
        let (u0, u1) = (u[j - 1], u[j]);
        let (a, b) = (col(idx[j - 1]), col(idx[j]));
        if u1 > u0 {
            a + (b - a) * (x - u0) / (u1 - u0)
        } else {
            b
        }
    };
    let time = |i: usize| s.t[i];
    let arc = |i: usize| s.arclength[i];
    (0..e_count)
        .map(|e| {
            let kind = pr.layout.kinds[e];
            let (k0, k1) = chain.k[e];
            let l = chain.len[e];
            let (u0, u1) = (chain.cum[e], chain.cum[e + 1]);
            Element {
                track,
                kind,
                start_arclength: interp(u0, &arc),
                end_arclength: interp(u1, &arc),
                start_time: interp(u0, &time),
                end_time: interp(u1, &time),
                length: l,
                start_curvature: k0,
                end_curvature: k1,
                radius: if kind == ARC {
                    1.0 / k0.abs()
                } else {
                    f64::NAN
                },
                spiral_parameter: if kind == SPIRAL {
                    (l / (k1 - k0).abs()).sqrt()
                } else {
                    f64::NAN
                },
                x: chain.poses[e].x,
                y: chain.poses[e].y,
                heading: chain.poses[e].heading,
                rms: if cnt[e] > 0 {
                    (sq[e] / cnt[e] as f64).sqrt()
                } else {
                    f64::NAN
                },
                max_distance: if cnt[e] > 0 { mx[e] } else { f64::NAN },
                samples: cnt[e],
                refined,
            }
        })
        .collect()
}

fn quantile(v: &mut [f64], q: f64) -> f64 {
    if v.is_empty() {
        return f64::NAN;
    }
    let pos = ((v.len() - 1) as f64 * q).round() as usize;
    *v.select_nth_unstable_by(pos, f64::total_cmp).1
}

fn median_spacing(s: &Samples, r: std::ops::Range<usize>) -> Result<f64> {
    let mut d = try_collect(
        r.len(),
        r.clone()
            .skip(1)
            .filter(|&i| s.flags[i] & UNUSABLE == 0)
            .map(|i| s.arclength[i] - s.arclength[i - 1])
            .filter(|v| v.is_finite() && *v > 0.0),
    )?;
    Ok(quantile(&mut d, 0.5))
}

/// The elements of every track of a batch, track by track in order.
///
/// # Examples
///
/// ```
/// use osculate::elements::{elements, Options, Samples, STRAIGHT};
/// // A straight line along y = x, 50 samples 1 apart: one straight of length 49·√2.
/// let n = 50;
/// let t: Vec<f64> = (0..n).map(|i| i as f64).collect();
/// let s: Vec<f64> = t.iter().map(|&v| v * 2f64.sqrt()).collect();
/// let xy: Vec<f64> = t.iter().flat_map(|&v| [v, v]).collect();
/// let samples = Samples {
///     t: &t, arclength: &s, curvature: &vec![0.0; n], se: &vec![1e-4; n],
///     flags: &vec![0; n], xy: &xy,
/// };
/// let opt = Options {
///     penalty: f64::NAN, min_length: &[f64::NAN], bandwidth: &[f64::NAN], significance: 3.0,
///     resolution: 1e-3, refine: true, max_iterations: 50,
/// };
/// let out = elements(&samples, &[0, n as i64], &opt).unwrap();
/// assert_eq!(out.len(), 1);
/// assert_eq!(out[0].kind, STRAIGHT);
/// assert!((out[0].length - 49.0 * 2f64.sqrt()).abs() < 1e-9);
/// ```
pub fn elements(s: &Samples, offsets: &[i64], opt: &Options) -> Result<Vec<Element>> {
    let n = s.t.len();
    for (name, len) in [
        ("arclength", s.arclength.len()),
        ("curvature", s.curvature.len()),
        ("se", s.se.len()),
        ("flags", s.flags.len()),
    ] {
        if len != n {
            return Err(KernelError::Shape {
                argument: name,
                detail: format!("expected {n} rows (as t), got {len}"),
            });
        }
    }
    if s.xy.len() != 2 * n {
        return Err(KernelError::Shape {
            argument: "positions",
            detail: format!("expected {n} rows of 2 coordinates"),
        });
    }
    let offsets = check_offsets(offsets, n)?;
    let m = offsets.len() - 1;
    for (name, a) in [("min_length", opt.min_length), ("bandwidth", opt.bandwidth)] {
        if a.len() != m {
            return Err(KernelError::Shape {
                argument: name,
                detail: format!("expected one value per track ({m}), got {}", a.len()),
            });
        }
    }
    let bad =
        |argument: &'static str, detail: String| Err(KernelError::Option { argument, detail });
    if !(opt.penalty.is_nan() || (opt.penalty.is_finite() && opt.penalty >= 0.0)) {
        return bad(
            "penalty",
            format!("must be finite and >= 0, got {}", opt.penalty),
        );
    }
    if !(opt.significance.is_finite() && opt.significance > 0.0) {
        return bad(
            "significance",
            format!("must be finite and > 0, got {}", opt.significance),
        );
    }
    if !(opt.resolution.is_finite() && opt.resolution >= 0.0) {
        return bad(
            "resolution",
            format!("must be finite and >= 0, got {}", opt.resolution),
        );
    }
    for (k, &v) in opt.min_length.iter().enumerate() {
        if !(v.is_nan() || (v.is_finite() && v >= 0.0)) {
            return Err(KernelError::Track {
                argument: "min_length",
                track: k,
                detail: format!("must be finite and >= 0, got {v}"),
            });
        }
    }
    let per_track: Vec<Result<Vec<Element>>> = (0..m)
        .into_par_iter()
        .map(|k| {
            let r = track_rows(&offsets, k);
            let band = opt.bandwidth[k];
            let band = if band.is_finite() && band > 0.0 {
                band
            } else {
                1.0 / CORRELATION_BANDWIDTHS
            };
            let corr = (CORRELATION_BANDWIDTHS * band).max(1.0);
            let min_length = if opt.min_length[k].is_nan() {
                let h = median_spacing(s, r.clone())?;
                if h.is_finite() {
                    h * (MIN_LENGTH_BANDWIDTHS * band).max(3.0)
                } else {
                    0.0
                }
            } else {
                opt.min_length[k]
            };
            one_track(s, r, k, opt, min_length, corr)
        })
        .collect();
    let mut total = 0;
    for v in per_track.iter().flatten() {
        total += v.len();
    }
    let mut out = Vec::new();
    out.try_reserve_exact(total)
        .map_err(|_| KernelError::OutOfMemory {
            bytes: total * std::mem::size_of::<Element>(),
        })?;
    for p in per_track {
        out.extend(p?);
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Samples of a chain of (kind, length, k0, k1) at unit arc-length steps, exact curvature.
    fn chain_samples(parts: &[(f64, f64, f64)], step: f64) -> (Vec<f64>, Vec<f64>, Vec<f64>) {
        let mut s = vec![];
        let mut k = vec![];
        let mut xy = vec![];
        let mut pose = Pose {
            x: 0.0,
            y: 0.0,
            heading: 0.3,
        };
        let mut u0 = 0.0;
        for &(l, k0, k1) in parts {
            let mut v = 0.0;
            while v < l - 1e-9 {
                let p = advance(pose, k0, (k1 - k0) / l, v);
                s.push(u0 + v);
                k.push(k0 + (k1 - k0) * v / l);
                xy.extend([p.x, p.y]);
                v += step;
            }
            pose = advance(pose, k0, (k1 - k0) / l, l);
            u0 += l;
        }
        (s, k, xy)
    }

    #[test]
    fn exact_chain_is_recovered() {
        // straight 50 → spiral 40 (0 → 1/100) → arc 60 → spiral 40 → straight 50; samples every
        // 1.0 of arc length, exact curvatures: the elements' lengths to 1e-6 (the fit's
        // tolerance), radius 100 and A = √(40·100) = 63.25 (A² = R L).
        let r = 100.0;
        let parts = [
            (50.0, 0.0, 0.0),
            (40.0, 0.0, 1.0 / r),
            (60.0, 1.0 / r, 1.0 / r),
            (40.0, 1.0 / r, 0.0),
            (50.0, 0.0, 0.0),
        ];
        let (s, k, xy) = chain_samples(&parts, 1.0);
        let n = s.len();
        let samples = Samples {
            t: &s,
            arclength: &s,
            curvature: &k,
            se: &vec![1e-6; n],
            flags: &vec![0; n],
            xy: &xy,
        };
        let opt = Options {
            penalty: f64::NAN,
            min_length: &[f64::NAN],
            bandwidth: &[f64::NAN],
            significance: 3.0,
            resolution: 1e-3,
            refine: true,
            max_iterations: 100,
        };
        let out = elements(&samples, &[0, n as i64], &opt).unwrap();
        let kinds: Vec<u8> = out.iter().map(|e| e.kind).collect();
        assert_eq!(kinds, vec![STRAIGHT, SPIRAL, ARC, SPIRAL, STRAIGHT]);
        assert!(out.iter().all(|e| e.refined));
        // The last straight ends at the last sample (249), not at 240.
        let want = [50.0, 40.0, 60.0, 40.0, 49.0];
        for (e, w) in out.iter().zip(want) {
            assert!((e.length - w).abs() < 1e-6, "{:?}", out);
        }
        assert!((out[2].radius - r).abs() < 1e-6);
        assert!((out[1].spiral_parameter - (40.0 * r).sqrt()).abs() < 1e-6);
        assert!(out.iter().all(|e| e.max_distance < 1e-8));
    }

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

    #[test]
    fn bad_options_name_the_argument() {
        let z = vec![0.0; 10];
        let t: Vec<f64> = (0..10).map(|i| i as f64).collect();
        let samples = Samples {
            t: &t,
            arclength: &t,
            curvature: &z,
            se: &z,
            flags: &[0; 10],
            xy: &[0.0; 20],
        };
        let mut opt = Options {
            penalty: -1.0,
            min_length: &[f64::NAN],
            bandwidth: &[f64::NAN],
            significance: 3.0,
            resolution: 1e-3,
            refine: true,
            max_iterations: 10,
        };
        assert_eq!(
            elements(&samples, &[0, 10], &opt).unwrap_err().argument(),
            "penalty"
        );
        opt.penalty = f64::NAN;
        opt.min_length = &[-1.0];
        assert_eq!(
            elements(&samples, &[0, 10], &opt).unwrap_err().argument(),
            "min_length"
        );
    }
}

#[cfg(test)]
mod gradient_check {
    use super::*;

    #[test]
    fn gradient_matches_cost_differences() {
        let r = 100.0;
        let parts = [
            (50.0, 0.0, 0.0),
            (40.0, 0.0, 1.0 / r),
            (60.0, 1.0 / r, 1.0 / r),
        ];
        let mut px = vec![];
        let mut py = vec![];
        let mut pose = Pose {
            x: 0.0,
            y: 0.0,
            heading: 0.3,
        };
        let mut ss = vec![];
        let mut u0 = 0.0;
        for &(l, k0, k1) in &parts {
            let mut v = 0.0;
            while v < l - 1e-9 {
                let p = advance(pose, k0, (k1 - k0) / l, v);
                px.push(p.x + 0.01 * ((px.len() * 37 % 11) as f64 - 5.0) / 5.0);
                py.push(p.y);
                ss.push(u0 + v);
                v += 1.0;
            }
            pose = advance(pose, k0, (k1 - k0) / l, l);
            u0 += l;
        }
        let layout = Layout::new(&[STRAIGHT, SPIRAL, ARC]);
        let pr = Problem {
            px: &px,
            py: &py,
            layout,
        };
        let q = vec![0.01, -0.02, 0.31, 51.0, 38.0, 0.0098, 60.0];
        assert_eq!(pr.layout.count, q.len());
        let st = pr.state(q.clone(), &ss);
        let (_, g) = pr.normal_equations(&st);
        for k in 0..q.len() {
            let h = 1e-6 * q[k].abs().max(1e-3);
            let mut a = q.clone();
            a[k] += h;
            let mut b = q.clone();
            b[k] -= h;
            let ca = pr.state(a, &st.u).cost;
            let cb = pr.state(b, &st.u).cost;
            let fd = (ca - cb) / (4.0 * h);
            // Jᵀr = ½ d(cost)/dq (foot points are stationary: envelope theorem); central
            // differences of the cost, relative 1e-5.
            assert!(
                (g[k] - fd).abs() <= 1e-5 * fd.abs().max(1e-3),
                "{k}: {} vs {fd}",
                g[k]
            );
        }
    }
}

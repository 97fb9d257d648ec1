//! Sampled integrands: the trapezoid rule and the four-point cubic rule (Gill–Miller), each the
//! companion of the other, with a streaming pass that sums both rules in one sweep over a run of
//! usable rows.
//!
//! The cubic rule on a segment with a centred stencil (rows i−1, i, i+1, i+2 at parameters −h₀,
//! 0, h₁, h₁ + h₂) is computed as the trapezoid term plus a closed-form correction: with the
//! Newton form P(s) = Fᵢ + D s + S s(s − h₁) + T s(s − h₁)(s + h₀) of both interpolants (D, S,
//! T the divided differences of the values, likewise of the path) the exact integral of
//! P_F · P_r′ over [0, h₁] is the trapezoid term plus
//!
//! ```text
//! h³/6 · A + h³(h + 2h₀)/12 · (B − A)/H + h⁵/60 · (c₀₁ + c₁₂ − c₀₂)/((h₀ + h₁)(h₁ + h₂) H)
//! ```
//!
//! where h = h₁, H = h₀ + h₁ + h₂, Dⱼ and Eⱼ are the first divided differences of the values and
//! of the path on step j (0, 1, 2 for the steps before, on and after the segment),
//! cⱼₖ = Dⱼ·Eₖ − Dₖ·Eⱼ, A = c₀₁/(h₀ + h₁) and B = c₁₂/(h₁ + h₂). (Integrate the 12 products of
//! the Newton basis functions and their derivatives over [0, h]; four vanish by symmetry, and
//! the divided differences combine into the cⱼₖ.) It is the same integral as the 3-point
//! Gauss–Legendre quadrature of the Lagrange form (the product has degree 5), summed in a
//! different order: equal to rounding.

use super::driver::{checked_offsets, finite_row, integrate, Integral, Pair, Segments};
use super::options::{Kind, Options, Rule};
use crate::error::{KernelError, Result};
use std::ops::Range;

#[derive(Clone, Copy)]
pub(super) struct Sampled<'a> {
    x: &'a [f64],
    f: &'a [f64],
    dim: usize,
    comps: usize,
    /// Parameter of the cubic rule: the times, or None for the cumulative chord length.
    t: Option<&'a [f64]>,
    rule: Rule,
    kind: Kind,
    closed: bool,
    estimate: bool,
}

/// 3-point Gauss–Legendre on [0, 1]: (node, weight).
const GL3: [(f64, f64); 3] = [
    (0.112_701_665_379_258_3, 5.0 / 18.0),
    (0.5, 8.0 / 18.0),
    (0.887_298_334_620_741_7, 5.0 / 18.0),
];

impl Sampled<'_> {
    #[inline]
    fn xr(&self, row: usize) -> &[f64] {
        &self.x[row * self.dim..(row + 1) * self.dim]
    }

    #[inline]
    fn fr(&self, row: usize) -> &[f64] {
        &self.f[row * self.comps..(row + 1) * self.comps]
    }

    fn trapezoid(&self, p: usize, r: usize) -> f64 {
        let (xp, xr, fp, fr) = (self.xr(p), self.xr(r), self.fr(p), self.fr(r));
        match self.kind {
            Kind::Work => (0..self.dim)
                .map(|c| 0.5 * (fp[c] + fr[c]) * (xr[c] - xp[c]))
                .sum(),
            Kind::Scalar => 0.5 * (fp[0] + fr[0]) * dist(xp, xr),
        }
    }

    /// Next usable row after `row` in the track (wrapping on closed paths); with the chord-length
    /// parameter, rows at the same point are passed over (their parameter would repeat).
    fn step(&self, rows: &Range<usize>, row: usize, forward: bool) -> Option<usize> {
        let mut i = row;
        for _ in 1..rows.len() {
            i = if forward {
                if i + 1 == rows.end {
                    if !self.closed {
                        return None;
                    }
                    rows.start
                } else {
                    i + 1
                }
            } else if i == rows.start {
                if !self.closed {
                    return None;
                }
                rows.end - 1
            } else {
                i - 1
            };
            if self.usable(i) && (self.t.is_some() || self.xr(i) != self.xr(row)) {
                return Some(i);
            }
        }
        None
    }

    /// Parameter step from row `a` to row `b` (consecutive stencil nodes).
    fn du(&self, a: usize, b: usize) -> f64 {
        match self.t {
            Some(t) => t[b] - t[a],
            None => dist(self.xr(a), self.xr(b)),
        }
    }

    /// The stencil of the segment p → r: its size, its rows in parameter order and the position
    /// of p among them; None when the track has no other usable row.
    fn stencil_rows(
        &self,
        rows: &Range<usize>,
        p: usize,
        r: usize,
    ) -> Option<(usize, [usize; 4], usize)> {
        let l1 = self.step(rows, p, false);
        let r1 = self.step(rows, r, true);
        match (l1, r1) {
            (Some(a), Some(b)) => Some((4, [a, p, r, b], 1)),
            (None, Some(b)) => match self.step(rows, b, true) {
                Some(c) => Some((4, [p, r, b, c], 0)),
                None => Some((3, [p, r, b, 0], 0)),
            },
            (Some(a), None) => match self.step(rows, a, false) {
                Some(z) => Some((4, [z, a, p, r], 2)),
                None => Some((3, [a, p, r, 0], 1)),
            },
            (None, None) => None,
        }
    }

    fn cubic(&self, rows: &Range<usize>, p: usize, r: usize) -> f64 {
        if self.t.is_none() && self.xr(p) == self.xr(r) {
            return 0.0; // no length, and no chord-length parameter step
        }
        let Some((k, nodes, at)) = self.stencil_rows(rows, p, r) else {
            return self.trapezoid(p, r);
        };
        if k == 4 && at == 1 && self.kind == Kind::Work {
            // Centred: the trapezoid term plus the closed-form correction (module docs).
            return match self.dim {
                3 => self.centred_at::<3>(nodes),
                _ => self.centred_at::<2>(nodes),
            };
        }
        // Parameter values relative to p.
        let mut u = [0.0; 4];
        for j in (0..at).rev() {
            u[j] = u[j + 1] - self.du(nodes[j], nodes[j + 1]);
        }
        for j in at + 1..k {
            u[j] = u[j - 1] + self.du(nodes[j - 1], nodes[j]);
        }
        // Monomorphized on stencil size, coordinates and components so the loops unroll.
        match (k, self.dim, self.comps) {
            (4, 3, 3) => self.stencil::<4, 3, 3>(&nodes, &u, at),
            (4, 3, _) => self.stencil::<4, 3, 1>(&nodes, &u, at),
            (4, _, 2) => self.stencil::<4, 2, 2>(&nodes, &u, at),
            (4, _, _) => self.stencil::<4, 2, 1>(&nodes, &u, at),
            (_, 3, 3) => self.stencil::<3, 3, 3>(&nodes, &u, at),
            (_, 3, _) => self.stencil::<3, 3, 1>(&nodes, &u, at),
            (_, _, 2) => self.stencil::<3, 2, 2>(&nodes, &u, at),
            _ => self.stencil::<3, 2, 1>(&nodes, &u, at),
        }
    }

    /// The integral from stencil node `at` (row p, parameter 0) to the next of the product of the
    /// degree-(K − 1) Lagrange interpolants through the stencil, by 3-point Gauss–Legendre.
    #[inline(always)]
    fn stencil<const K: usize, const D: usize, const C: usize>(
        &self,
        nodes: &[usize; 4],
        u: &[f64; 4],
        at: usize,
    ) -> f64 {
        let p = nodes[at];
        let h = u[at + 1];
        if h.is_nan() || h <= 0.0 {
            return f64::NAN; // cannot happen with checked times and distinct points
        }
        // The stencil as differences from row p, which keeps the rounding relative to the local
        // variation (and makes constants exact).
        let (xp, fp) = (self.xr(p), self.fr(p));
        let (mut dx, mut df) = ([[0.0; D]; K], [[0.0; C]; K]);
        // Normalizations 1 / Π_{l≠j} (u_j − u_l) of the Lagrange basis.
        let mut norm = [1.0; K];
        for j in 0..K {
            let (xj, fj) = (self.xr(nodes[j]), self.fr(nodes[j]));
            for a in 0..D {
                dx[j][a] = xj[a] - xp[a];
            }
            for a in 0..C {
                df[j][a] = fj[a] - fp[a];
            }
            for l in 0..K {
                if l != j {
                    norm[j] *= u[j] - u[l];
                }
            }
            norm[j] = 1.0 / norm[j];
        }
        let mut sum = 0.0;
        for &(s01, w) in &GL3 {
            let s = u[at] + s01 * h;
            let mut e = [0.0; K];
            for l in 0..K {
                e[l] = s - u[l];
            }
            // L_j(s) = norm_j Π_{l≠j} e_l and its derivative, by the product rule factor by factor.
            let (mut lv, mut ld) = ([0.0; K], [0.0; K]);
            for j in 0..K {
                let (mut v, mut dv) = (norm[j], 0.0);
                for l in 0..K {
                    if l != j {
                        dv = dv * e[l] + v;
                        v *= e[l];
                    }
                }
                lv[j] = v;
                ld[j] = dv;
            }
            let (mut value, mut slope) = ([0.0; C], [0.0; D]);
            for a in 0..C {
                value[a] = fp[a] + (0..K).map(|j| lv[j] * df[j][a]).sum::<f64>();
            }
            for a in 0..D {
                slope[a] = (0..K).map(|j| ld[j] * dx[j][a]).sum::<f64>();
            }
            let g = if C == D {
                (0..D).map(|a| value[a] * slope[a]).sum::<f64>()
            } else {
                value[0] * (0..D).map(|a| slope[a] * slope[a]).sum::<f64>().sqrt()
            };
            sum += w * g;
        }
        sum * h
    }
}

#[inline]
fn dist(a: &[f64], b: &[f64]) -> f64 {
    a.iter()
        .zip(b)
        .map(|(p, q)| (q - p) * (q - p))
        .sum::<f64>()
        .sqrt()
}

/// One step of a stencil: its parameter step `h` and the first divided differences of the values
/// (`d` = ΔF/h) and of the path (`e` = Δx/h).
#[derive(Debug, Clone, Copy)]
struct Slope<const D: usize> {
    h: f64,
    d: [f64; D],
    e: [f64; D],
}

/// Σ v² in coordinate order.
#[inline(always)]
fn norm2<const D: usize>(v: &[f64; D]) -> f64 {
    let mut s = v[0] * v[0];
    for c in v.iter().skip(1) {
        s += c * c;
    }
    s
}

/// a·b in coordinate order.
#[inline(always)]
fn dot<const D: usize>(a: &[f64; D], b: &[f64; D]) -> f64 {
    let mut s = a[0] * b[0];
    for c in 1..D {
        s += a[c] * b[c];
    }
    s
}

/// dⱼ·eₖ − dₖ·eⱼ of two steps (the cⱼₖ of the module docs).
#[inline(always)]
fn wedge<const D: usize>(dj: &[f64; D], ej: &[f64; D], dk: &[f64; D], ek: &[f64; D]) -> f64 {
    dot(dj, ek) - dot(dk, ej)
}

/// The cubic rule minus the trapezoid rule on the middle step of a centred stencil of three
/// steps (parameter steps `h`, and the wedges c₀₁, c₁₂, c₀₂ of their divided differences): the
/// correction of the module docs; work integrals only.
#[inline(always)]
fn centred(h: [f64; 3], c01: f64, c12: f64, c02: f64) -> f64 {
    let (h0, h1, h2) = (h[0], h[1], h[2]);
    let (s01, s12) = (h0 + h1, h1 + h2);
    let big = s01 + h2;
    // One division: 1/s01, 1/s12 and 1/big from 1/(s01 s12 big).
    let inv = 1.0 / (s01 * s12 * big);
    let a = c01 * (s12 * big * inv);
    let b = c12 * (s01 * big * inv);
    let h3 = h1 * h1 * h1;
    h3 / 6.0 * a
        + h3 * (h1 + 2.0 * h0) / 12.0 * (b - a) * (s01 * s12 * inv)
        + h3 * h1 * h1 / 60.0 * (c01 + c12 - c02) * inv
}

/// Segments per block of the streaming sweep (its working arrays live on the stack).
const BLOCK: usize = 128;

impl Sampled<'_> {
    /// The step from row `a` to row `b` (work integrals: `comps` = `dim` = D).
    #[inline(always)]
    fn slope<const D: usize>(&self, a: usize, b: usize) -> Slope<D> {
        let (xa, xb, fa, fb) = (self.xr(a), self.xr(b), self.fr(a), self.fr(b));
        let (mut dx, mut df) = ([0.0; D], [0.0; D]);
        for c in 0..D {
            dx[c] = xb[c] - xa[c];
            df[c] = fb[c] - fa[c];
        }
        let h = match self.t {
            Some(t) => t[b] - t[a],
            None => norm2(&dx).sqrt(),
        };
        let inv = 1.0 / h;
        Slope {
            h,
            d: df.map(|v| v * inv),
            e: dx.map(|v| v * inv),
        }
    }

    /// The cubic rule on a centred stencil of rows a, p, r, b.
    #[inline(always)]
    fn centred_at<const D: usize>(&self, nodes: [usize; 4]) -> f64 {
        let [a, p, r, b] = nodes;
        let s = [self.slope::<D>(a, p), self.slope(p, r), self.slope(r, b)];
        let w = |j: usize, k: usize| wedge(&s[j].d, &s[j].e, &s[k].d, &s[k].e);
        let h = [s[0].h, s[1].h, s[2].h];
        self.trapezoid(p, r) + centred(h, w(0, 1), w(1, 2), w(0, 2))
    }

    /// Σ trapezoid and Σ cubic over the segments between consecutive rows of `first..end` (work
    /// integrals, every row assumed usable: a non-finite row makes the trapezoid sum non-finite).
    /// Blocks of [`BLOCK`] segments: the block's rows are copied coordinate by coordinate, then
    /// the steps' divided differences, the wedges, the trapezoid terms and the centred
    /// corrections are loops over arrays (which the compiler vectorizes), then the sums follow
    /// in row order. Segments whose stencil is not the centred one of consecutive rows (track
    /// ends, a skipped neighbour, a repeated point under the chord-length parameter) take
    /// [`Sampled::cubic`]. Bitwise the same sums as the row-by-row loop: the same operations on
    /// the same values.
    #[inline(always)]
    fn streamed<const D: usize>(&self, rows: &Range<usize>, first: usize, end: usize) -> Pair {
        const R: usize = BLOCK + 3; // rows i0 − 1 ..= i0 + nb + 1
        const S: usize = BLOCK + 2; // steps between them
        let (lo, hi) = (rows.start, rows.end);
        let chord = self.t.is_none();
        let (mut trap, mut cub) = (0.0, 0.0);
        let (mut xs, mut fs, mut ts) = ([[0.0; R]; D], [[0.0; R]; D], [0.0; R]);
        let (mut d, mut e, mut h) = ([[0.0; S]; D], [[0.0; S]; D], [0.0; S]);
        let (mut cw, mut c02) = ([0.0; S], [0.0; BLOCK]);
        let (mut tr, mut corr) = ([0.0; BLOCK], [0.0; BLOCK]);
        let mut i0 = first;
        while i0 + 1 < end {
            let nb = (end - 1 - i0).min(BLOCK);
            let (nr, ns) = (nb + 3, nb + 2);
            // Rows i0 − 1 + m, NaN outside the track (so are the steps that touch them).
            for m in 0..nr {
                let row = (i0 + m).wrapping_sub(1);
                let inside = row >= lo && row < hi;
                for c in 0..D {
                    xs[c][m] = if inside {
                        self.x[row * D + c]
                    } else {
                        f64::NAN
                    };
                    fs[c][m] = if inside {
                        self.f[row * D + c]
                    } else {
                        f64::NAN
                    };
                }
                if let Some(t) = self.t {
                    ts[m] = if inside { t[row] } else { f64::NAN };
                }
            }
            for c in 0..D {
                for k in 0..ns {
                    e[c][k] = xs[c][k + 1] - xs[c][k];
                    d[c][k] = fs[c][k + 1] - fs[c][k];
                }
            }
            if chord {
                // norm2 of Sampled::slope, in the same order.
                for k in 0..ns {
                    let mut q = e[0][k] * e[0][k];
                    for ec in e.iter().skip(1) {
                        q += ec[k] * ec[k];
                    }
                    h[k] = q.sqrt();
                }
            } else {
                for k in 0..ns {
                    h[k] = ts[k + 1] - ts[k];
                }
            }
            for k in 0..ns {
                let inv = 1.0 / h[k];
                for c in 0..D {
                    d[c][k] *= inv;
                    e[c][k] *= inv;
                }
            }
            // dot() of two steps, in the same order.
            let dot = |a: &[[f64; S]; D], j: usize, b: &[[f64; S]; D], k: usize| {
                let mut q = a[0][j] * b[0][k];
                for c in 1..D {
                    q += a[c][j] * b[c][k];
                }
                q
            };
            // The wedge of each pair of consecutive steps serves two segments.
            for k in 0..ns - 1 {
                cw[k] = dot(&d, k, &e, k + 1) - dot(&d, k + 1, &e, k);
            }
            for k in 0..nb {
                c02[k] = dot(&d, k, &e, k + 2) - dot(&d, k + 2, &e, k);
                tr[k] = (0..D)
                    .map(|c| 0.5 * (fs[c][k + 1] + fs[c][k + 2]) * (xs[c][k + 2] - xs[c][k + 1]))
                    .sum::<f64>();
                corr[k] = centred([h[k], h[k + 1], h[k + 2]], cw[k], cw[k + 1], c02[k]);
            }
            let nonzero = !chord || h[..ns].iter().all(|&v| v != 0.0);
            if nonzero
                && i0 > lo
                && i0 + nb + 1 < hi
                && self.usable(i0 - 1)
                && (i0 + nb + 1 < end || self.usable(i0 + nb + 1))
            {
                // Every segment of the block has its centred stencil.
                for k in 0..nb {
                    trap += tr[k];
                    cub += tr[k] + corr[k];
                }
            } else {
                for k in 0..nb {
                    let i = i0 + k;
                    let centred_ok = i > lo
                        && i + 2 < hi
                        && (i > first || self.usable(i - 1))
                        && (i + 2 < end || self.usable(i + 2))
                        && !(chord && (h[k] == 0.0 || h[k + 1] == 0.0 || h[k + 2] == 0.0));
                    trap += tr[k];
                    cub += if centred_ok {
                        tr[k] + corr[k]
                    } else {
                        self.cubic(rows, i, i + 1)
                    };
                }
            }
            i0 += nb;
        }
        (trap, cub)
    }
}

impl Sampled<'_> {
    /// [`Sampled::streamed`] compiled for AVX2 too, taken when the processor has it: wider
    /// vectors for its array loops. Rust contracts no multiply-add by itself, so the values are
    /// the same bits either way.
    fn streamed_wide<const D: usize>(&self, rows: &Range<usize>, first: usize, end: usize) -> Pair {
        #[cfg(target_arch = "x86_64")]
        if std::arch::is_x86_feature_detected!("avx2") {
            // SAFETY: the processor supports AVX2, checked just above.
            return unsafe { self.streamed_avx2::<D>(rows, first, end) };
        }
        self.streamed::<D>(rows, first, end)
    }

    #[cfg(target_arch = "x86_64")]
    #[target_feature(enable = "avx2")]
    unsafe fn streamed_avx2<const D: usize>(
        &self,
        rows: &Range<usize>,
        first: usize,
        end: usize,
    ) -> Pair {
        self.streamed::<D>(rows, first, end)
    }
}

impl Segments for Sampled<'_> {
    #[inline]
    fn usable(&self, row: usize) -> bool {
        finite_row(self.x, self.dim, row) && finite_row(self.f, self.comps, row)
    }

    fn segment(
        &self,
        _k: usize,
        rows: &Range<usize>,
        p: usize,
        r: usize,
        _seg: usize,
    ) -> Result<Pair> {
        let main = match self.rule {
            Rule::Trapezoid => self.trapezoid(p, r),
            Rule::Cubic => self.cubic(rows, p, r),
        };
        let other = if !self.estimate {
            0.0
        } else {
            match self.rule {
                Rule::Trapezoid => self.cubic(rows, p, r),
                Rule::Cubic => self.trapezoid(p, r),
            }
        };
        Ok((main, other))
    }

    fn run(&self, rows: &Range<usize>, first: usize, end: usize) -> Option<Pair> {
        // One row has no segment, so nothing would show whether it is usable.
        if self.kind != Kind::Work || end - first < 2 {
            return None;
        }
        let d = self.dim;
        if self.rule == Rule::Trapezoid && !self.estimate {
            let (xs, fs) = (&self.x[first * d..end * d], &self.f[first * d..end * d]);
            let sum = match d {
                3 => trapezoid_run::<3>(xs, fs),
                _ => trapezoid_run::<2>(xs, fs),
            };
            // A non-finite value anywhere makes its term, hence the sum, non-finite (NaN or ±∞
            // in a sum, difference or product with it). So a finite sum proves every row
            // usable; else the slow path skips the bad rows (or finds the same overflow).
            return sum.is_finite().then_some((sum, 0.0));
        }
        let (trap, cub) = match d {
            3 => self.streamed_wide::<3>(rows, first, end),
            _ => self.streamed_wide::<2>(rows, first, end),
        };
        if !trap.is_finite() {
            return None; // as above
        }
        let other = |v: f64| if self.estimate { v } else { 0.0 };
        Some(match self.rule {
            Rule::Trapezoid => (trap, cub),
            Rule::Cubic => (cub, other(trap)),
        })
    }
}

/// Σ over consecutive rows of (F₀ + F₁)/2 · (r₁ − r₀), in the order and with the arithmetic of
/// [`Sampled::trapezoid`].
fn trapezoid_run<const D: usize>(x: &[f64], f: &[f64]) -> f64 {
    let mut rows = x.chunks_exact(D).zip(f.chunks_exact(D));
    let Some((mut xp, mut fp)) = rows.next() else {
        return 0.0;
    };
    let mut sum = 0.0;
    for (xr, fr) in rows {
        sum += (0..D)
            .map(|c| 0.5 * (fp[c] + fr[c]) * (xr[c] - xp[c]))
            .sum::<f64>();
        (xp, fp) = (xr, fr);
    }
    sum
}

/// Line integral of values sampled at the path's rows (`f`: `dim` values per row for
/// [`Kind::Work`], one for [`Kind::Scalar`]) by `opts.rule`.
///
/// The cubic rule's interpolation parameter is `t` when given (and the path is open), otherwise
/// the cumulative chord length (fourth-order as well: M. S. Floater, *Chordal cubic spline
/// interpolation is fourth-order accurate*, IMA J. Numer. Anal. 26 (2006) 25–33). On closed
/// paths the stencils wrap around the loop.
///
/// # Examples
///
/// Constant gravity does work −m g Δz on any path (conservative force):
///
/// ```
/// use osculate::line_integral::{sampled, Options, Rule};
/// let x = [0.0, 0.0, 10.0, 3.0, 1.0, 7.0, -2.0, 5.0, 4.0, 1.0, 1.0, 2.5];
/// let g = [0.0, 0.0, -9.80665].repeat(4);
/// let opts = Options { rule: Rule::Cubic, ..Options::default() };
/// let w = sampled(&x, 3, &g, &[0, 4], None, &opts).unwrap();
/// assert!((w.total[0] - (-9.80665 * (2.5 - 10.0))).abs() < 1e-12);
/// assert!(w.error[0] < 1e-12); // both rules are exact here
/// ```
pub fn sampled(
    x: &[f64],
    dim: usize,
    f: &[f64],
    offsets: &[i64],
    t: Option<&[f64]>,
    opts: &Options,
) -> Result<Integral> {
    let n = super::driver::check_positions(x, dim)?;
    let comps = opts.kind.comps(dim);
    if f.len() != n * comps {
        return Err(KernelError::Shape {
            argument: opts.argument,
            detail: format!(
                "expected {n} rows of {comps} value(s), got {} values",
                f.len()
            ),
        });
    }
    let off = checked_offsets(offsets, n, t)?;
    let s = Sampled {
        x,
        f,
        dim,
        comps,
        t: if opts.closed { None } else { t },
        rule: opts.rule,
        kind: opts.kind,
        closed: opts.closed,
        estimate: opts.estimate,
    };
    integrate(&s, n, &off, opts)
}

#[cfg(test)]
#[path = "sampled_tests.rs"]
pub(super) mod tests;

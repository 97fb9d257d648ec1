//! Fresnel integrals and exact clothoid arcs.
//!
//! `C(x) = ∫₀ˣ cos(πt²/2) dt` and `S(x) = ∫₀ˣ sin(πt²/2) dt` (the normalisation of
//! `scipy.special.fresnel` and of Abramowitz & Stegun 7.3.1–7.3.2). For |x| < 1.5 the power series
//! `C + iS = Σₖ (iπ/2)ᵏ x²ᵏ⁺¹ / (k! (2k+1))` (A&S 7.3.11–7.3.12) is summed; its largest term is
//! below 8, so at most three bits are lost to cancellation. For larger |x|, `C + iS` is written
//! through the complementary error function, `C + iS = (1+i)/2 · erf((√π/2)(1−i)x)` (A&S 7.3.22),
//! and `erfc` is evaluated by its continued fraction (A&S 7.1.14, even form) with the modified
//! Lentz method. The phase πx²/2 is reduced modulo 2π from the exact product x² = hi + lo (a
//! fused multiply-add gives lo), so large arguments lose nothing to the reduction. Measured
//! against `scipy.special.fresnel` in `tests/test_elements.py`: below 1e-15 absolute over
//! |x| ≤ 50.
//!
//! A clothoid (Euler spiral) is a curve whose curvature is linear in arc length:
//! κ(s) = κ₀ + κ′ s. Its heading is θ₀ + κ₀ s + κ′ s²/2 and its displacement over a length L is
//! `L e^{iθ₀} F(κ′L², κ₀L)` with the normalised integral
//! `F(a, b) = ∫₀¹ exp(i(aτ²/2 + bτ)) dτ` ([`clothoid_integral`]). For |a| ≥ [`SMALL_A`] the square
//! is completed and `F` is a difference of Fresnel integrals; below it, where that difference would
//! cancel (its terms grow like 1/√|a|), `exp(iaτ²/2)` is expanded in powers of `a` and integrated
//! term by term against the moments `∫₀¹ τᵏ e^{ibτ} dτ` (summed as a series for |b| ≤ 1.1, by the
//! forward recurrence for |b| ≥ 19 where it is stable, and on ⌈|b|⌉ sub-intervals between). Straight
//! lines (a = b = 0) and circular arcs (a = 0) are exact special cases of the same formula
//! (`F(0, b) = e^{ib/2} sin(b/2)/(b/2)`). The idea of splitting by the size of `a` follows
//! E. Bertolazzi & M. Frego, Math. Methods Appl. Sci. 38 (2015) 881–897; the code is ours.

use std::f64::consts::PI;

/// Below this |x| the power series is used, above it the continued fraction.
const SERIES_LIMIT: f64 = 1.5;
/// Beyond this |x| the first terms of the asymptotic expansion are exact to rounding.
const ASYMPTOTIC_LIMIT: f64 = 1e8;
/// |a| below which [`clothoid_integral`] expands in powers of `a`.
pub const SMALL_A: f64 = 0.1;
/// Largest |b|/√(πa) for which the completed square is used (phase rounding ≤ 4π ulp).
const MAX_U0: f64 = 2.0;

/// A complex number, only what the integrals need.
#[derive(Debug, Clone, Copy, PartialEq)]
struct Cx {
    re: f64,
    im: f64,
}

impl Cx {
    const fn new(re: f64, im: f64) -> Self {
        Cx { re, im }
    }
    fn add(self, o: Cx) -> Cx {
        Cx::new(self.re + o.re, self.im + o.im)
    }
    fn sub(self, o: Cx) -> Cx {
        Cx::new(self.re - o.re, self.im - o.im)
    }
    fn mul(self, o: Cx) -> Cx {
        Cx::new(
            self.re * o.re - self.im * o.im,
            self.re * o.im + self.im * o.re,
        )
    }
    fn scale(self, f: f64) -> Cx {
        Cx::new(self.re * f, self.im * f)
    }
    fn div(self, o: Cx) -> Cx {
        // Smith's algorithm: no overflow for large |o|.
        if o.re.abs() >= o.im.abs() {
            let r = o.im / o.re;
            let d = o.re + o.im * r;
            Cx::new((self.re + self.im * r) / d, (self.im - self.re * r) / d)
        } else {
            let r = o.re / o.im;
            let d = o.re * r + o.im;
            Cx::new((self.re * r + self.im) / d, (self.im * r - self.re) / d)
        }
    }
    fn expi(phase: f64) -> Cx {
        let (s, c) = phase.sin_cos();
        Cx::new(c, s)
    }
    fn conj(self) -> Cx {
        Cx::new(self.re, -self.im)
    }
    fn abs1(self) -> f64 {
        self.re.abs() + self.im.abs()
    }
}

/// `e^{iπx²/2}` with the phase reduced exactly modulo 2π.
fn expi_half_pi_square(x: f64) -> Cx {
    let hi = x * x;
    let lo = x.mul_add(x, -hi); // x² = hi + lo exactly
                                // πx²/2 = 2π (x²/4): keep the fractional part of x²/4 (hi/4 and lo/4 are exact).
    let q = hi * 0.25;
    let mut r = q - q.round();
    r += lo * 0.25;
    r -= r.round();
    Cx::expi(2.0 * PI * r)
}

/// Fresnel integrals `(C(x), S(x))` with `C(x) = ∫₀ˣ cos(πt²/2) dt`, `S(x) = ∫₀ˣ sin(πt²/2) dt`.
///
/// NaN gives NaN; ±∞ gives ±(1/2, 1/2).
///
/// # Examples
///
/// ```
/// use osculate::fresnel::fresnel;
/// // A&S Table 7.7: C(1) = 0.7798934004, S(1) = 0.4382591474; C(∞) = S(∞) = 1/2.
/// let (c, s) = fresnel(1.0);
/// assert!((c - 0.7798934004).abs() < 1e-10 && (s - 0.4382591474).abs() < 1e-10);
/// assert_eq!(fresnel(f64::INFINITY), (0.5, 0.5));
/// let (c, s) = fresnel(-1.0);
/// assert!((c + 0.7798934004).abs() < 1e-10 && (s + 0.4382591474).abs() < 1e-10);
/// ```
pub fn fresnel(x: f64) -> (f64, f64) {
    if x.is_nan() {
        return (f64::NAN, f64::NAN);
    }
    let ax = x.abs();
    let (c, s) = if ax < SERIES_LIMIT {
        series(ax)
    } else if ax < ASYMPTOTIC_LIMIT {
        continued_fraction(ax)
    } else if ax.is_finite() {
        // f ≈ 1/(πx), g ≈ 1/(π²x³) (A&S 7.3.27–7.3.28); the next terms are below 1e-40.
        let e = expi_half_pi_square(ax);
        let f = 1.0 / (PI * ax);
        let g = f / (PI * ax * ax);
        (0.5 + f * e.im - g * e.re, 0.5 - f * e.re - g * e.im)
    } else {
        (0.5, 0.5)
    };
    if x < 0.0 {
        (-c, -s)
    } else {
        (c, s)
    }
}

fn series(x: f64) -> (f64, f64) {
    // Term k: (iπ/2)ᵏ x²ᵏ⁺¹ / (k! (2k+1)); powers of i alternate between C and S.
    let z = 0.5 * PI * x * x;
    let (mut c, mut s) = (0.0, 0.0);
    let mut p = x; // zᵏ x / k!
    for k in 0..60 {
        let term = p / (2 * k + 1) as f64;
        match k % 4 {
            0 => c += term,
            1 => s += term,
            2 => c -= term,
            _ => s -= term,
        }
        if term < 1e-18 * x {
            break;
        }
        p *= z / (k + 1) as f64;
    }
    (c, s)
}

fn continued_fraction(x: f64) -> (f64, f64) {
    // erfc(w) √π e^{w²} / (2w) = 1/(2w²+1 − 1·2/(2w²+5 − 3·4/(2w²+9 − …))) with
    // w = (√π/2)(1−i)x, 2w² = −iπx². Modified Lentz evaluation.
    let tiny = 1e-300;
    let mut b = Cx::new(1.0, -PI * x * x);
    let mut c = Cx::new(1.0 / tiny, 0.0);
    let mut d = Cx::new(1.0, 0.0).div(b);
    let mut h = d;
    let mut n = -1.0;
    for _ in 0..500 {
        n += 2.0;
        let a = -n * (n + 1.0);
        b = b.add(Cx::new(4.0, 0.0));
        d = Cx::new(1.0, 0.0).div(d.scale(a).add(b));
        c = b.add(Cx::new(a, 0.0).div(c));
        let del = c.mul(d);
        h = h.mul(del);
        if (del.re - 1.0).abs() + del.im.abs() < 1e-16 {
            break;
        }
    }
    // erfc(w) = e^{−w²} (2w/√π) h, e^{−w²} = e^{iπx²/2}, 2w/√π = (1−i)x.
    let erfc = expi_half_pi_square(x).mul(Cx::new(x, -x)).mul(h);
    let cs = Cx::new(0.5, 0.5).mul(Cx::new(1.0, 0.0).sub(erfc));
    (cs.re, cs.im)
}

/// `(C(x), S(x))` as a complex number.
fn fresnel_cx(x: f64) -> Cx {
    let (c, s) = fresnel(x);
    Cx::new(c, s)
}

/// `e^{ib/2} sin(b/2)/(b/2) = ∫₀¹ e^{ibτ} dτ`, exact for every b.
fn arc_integral(b: f64) -> Cx {
    let h = 0.5 * b;
    let sinc = if h == 0.0 { 1.0 } else { h.sin() / h };
    Cx::expi(h).scale(sinc)
}

/// Moments `∫₀¹ τᵏ e^{ibτ} dτ` for k = 0..=K (K < out.len()).
fn moments(b: f64, out: &mut [Cx]) {
    if b.abs() <= 1.1 {
        // Σⱼ (ib)ʲ / (j! (k + j + 1)): terms below 1.1ʲ/j!, no cancellation.
        for (k, m) in out.iter_mut().enumerate() {
            let mut sum = Cx::new(0.0, 0.0);
            let mut p = Cx::new(1.0, 0.0); // (ib)ʲ / j!
            for j in 0..40 {
                let term = p.scale(1.0 / (k + j + 1) as f64);
                sum = sum.add(term);
                if term.abs1() < 1e-18 {
                    break;
                }
                p = p.mul(Cx::new(0.0, b / (j + 1) as f64));
            }
            *m = sum;
        }
    } else {
        // Mₖ = (e^{ib} − k Mₖ₋₁)/(ib): errors shrink by k/|b| < 1 per step when |b| > K.
        let e = Cx::expi(b);
        let ib = Cx::new(0.0, b);
        out[0] = arc_integral(b);
        for k in 1..out.len() {
            out[k] = e.sub(out[k - 1].scale(k as f64)).div(ib);
        }
    }
}

/// Terms of the expansion in powers of `a` (enough for |a| < [`SMALL_A`]: (a/2)ⁿ/n! < 1e-17).
const SMALL_TERMS: usize = 10;

fn small_a(a: f64, b: f64) -> Cx {
    let mut m = [Cx::new(0.0, 0.0); 2 * SMALL_TERMS - 1];
    moments(b, &mut m);
    let mut sum = Cx::new(0.0, 0.0);
    let mut p = Cx::new(1.0, 0.0); // (ia/2)ⁿ / n!
    for n in 0..SMALL_TERMS {
        sum = sum.add(p.mul(m[2 * n]));
        p = p.mul(Cx::new(0.0, 0.5 * a / (n + 1) as f64));
    }
    sum
}

/// `F(a, b) = ∫₀¹ exp(i(aτ²/2 + bτ)) dτ` as `(re, im)`; see the module notes.
///
/// # Examples
///
/// ```
/// use osculate::fresnel::clothoid_integral;
/// // A straight line: 1. A half circle (b = π): ∫₀¹ e^{iπτ} dτ = 2i/π.
/// assert_eq!(clothoid_integral(0.0, 0.0), (1.0, 0.0));
/// let (re, im) = clothoid_integral(0.0, std::f64::consts::PI);
/// assert!(re.abs() < 1e-16 && (im - 2.0 / std::f64::consts::PI).abs() < 1e-16);
/// ```
pub fn clothoid_integral(a: f64, b: f64) -> (f64, f64) {
    let f = integral(a, b);
    (f.re, f.im)
}

/// Most sub-intervals [`integral`] sums (beyond: NaN).
const MAX_PIECES: f64 = 1e6;

fn integral(a: f64, b: f64) -> Cx {
    if !(a.is_finite() && b.is_finite()) {
        return Cx::new(f64::NAN, f64::NAN);
    }
    if a == 0.0 {
        return arc_integral(b);
    }
    if a < 0.0 {
        // F(a, b) = conj F(−a, −b).
        return integral(-a, -b).conj();
    }
    let u0 = b / (PI * a).sqrt();
    if a >= SMALL_A && u0.abs() <= MAX_U0 {
        // aτ²/2 + bτ = (π/2)(k(τ + b/a))² − b²/(2a), k = √(a/π).
        let k = (a / PI).sqrt();
        let u1 = u0 + k;
        let diff = fresnel_cx(u1).sub(fresnel_cx(u0));
        // −b²/(2a) = −(π/2)u0².
        return expi_half_pi_square(u0).conj().mul(diff).scale(1.0 / k);
    }
    if a < SMALL_A && (b.abs() <= 1.1 || b.abs() >= (2 * SMALL_TERMS) as f64) {
        return small_a(a, b);
    }
    // m sub-intervals, local a = a/m² < SMALL_A and local b = b/m + a j/m² (each taken by the
    // branches above): for 1.1 < |b| < 20 with small a, |local b| ≤ 1 + |a|/m; for large a with
    // |u0| > MAX_U0, where the phase b²/(2a) of the completed square would carry the rounding of
    // u0 (π u0² ulp), the pieces never need it.
    let m = if a < SMALL_A {
        b.abs().ceil()
    } else {
        (a / SMALL_A).sqrt().floor() + 1.0
    };
    if m > MAX_PIECES {
        // Heading changes of millions of turns within one element: not a path anybody
        // logged (a diverging fit proposes them); no value rather than an endless sum.
        return Cx::new(f64::NAN, f64::NAN);
    }
    let mut sum = Cx::new(0.0, 0.0);
    for j in 0..m as usize {
        let j = j as f64;
        let phase = a * j * j / (2.0 * m * m) + b * j / m;
        let local = integral(a / (m * m), b / m + a * j / (m * m));
        sum = sum.add(Cx::expi(phase).mul(local));
    }
    sum.scale(1.0 / m)
}

/// A point of a planar curve with its heading (radians, counter-clockwise from +x).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Pose {
    pub x: f64,
    pub y: f64,
    pub heading: f64,
}

/// The pose reached after arc length `s` along the clothoid that starts at `start` with curvature
/// `k0` and curvature rate `rate` = dκ/ds (`rate = 0`: a circular arc; `k0 = rate = 0`: a
/// straight line). Exact to rounding for any `k0` and for tiny rates (see the module notes).
///
/// # Examples
///
/// ```
/// use osculate::fresnel::{advance, Pose};
/// // A quarter circle of radius 2 from the origin heading +x ends at (2, 2) heading +y.
/// let p = advance(Pose { x: 0.0, y: 0.0, heading: 0.0 }, 0.5, 0.0, std::f64::consts::PI);
/// assert!((p.x - 2.0).abs() < 1e-15 && (p.y - 2.0).abs() < 1e-15);
/// assert!((p.heading - std::f64::consts::FRAC_PI_2).abs() < 1e-15);
/// ```
pub fn advance(start: Pose, k0: f64, rate: f64, s: f64) -> Pose {
    if s == 0.0 {
        return start;
    }
    let f = integral(rate * s * s, k0 * s);
    let d = Cx::expi(start.heading).mul(f).scale(s);
    Pose {
        x: start.x + d.re,
        y: start.y + d.im,
        heading: start.heading + k0 * s + 0.5 * rate * s * s,
    }
}

/// The end pose of the clothoid arc of length `length` whose curvature goes linearly from `k0`
/// to `k1` (`k0 = k1`: a circular arc; both zero: a straight line). A zero length returns
/// `start`.
///
/// # Examples
///
/// ```
/// use osculate::fresnel::{clothoid_end, fresnel, Pose};
/// // From a straight (κ = 0) into a curve: the spiral x + iy = A√π (C + iS)(L/(A√π)),
/// // A² = L/κ₁ (the clothoid in its standard form).
/// let (l, k1) = (60.0, 1.0 / 300.0);
/// let p = clothoid_end(Pose { x: 0.0, y: 0.0, heading: 0.0 }, 0.0, k1, l);
/// let a = (l / k1).sqrt();
/// let scale = a * std::f64::consts::PI.sqrt();
/// let (c, s) = fresnel(l / scale);
/// assert!((p.x - scale * c).abs() < 1e-12 && (p.y - scale * s).abs() < 1e-12);
/// assert!((p.heading - 0.1).abs() < 1e-15); // L κ₁ / 2
/// ```
pub fn clothoid_end(start: Pose, k0: f64, k1: f64, length: f64) -> Pose {
    if length == 0.0 {
        return start;
    }
    advance(start, k0, (k1 - k0) / length, length)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// ∫₀¹ exp(i(aτ²/2 + bτ)) dτ by composite 20-point Gauss–Legendre on `pieces` pieces (an
    /// independent quadrature; nodes from the Golub–Welsch eigenvalues are replaced here by the
    /// Newton iteration on the Legendre polynomial, which converges to rounding).
    fn quadrature(a: f64, b: f64, pieces: usize) -> Cx {
        let n = 20;
        let mut nodes = Vec::new();
        for i in 0..n {
            let mut x = (PI * (i as f64 + 0.75) / (n as f64 + 0.5)).cos();
            let mut dp = 0.0;
            for _ in 0..100 {
                let (mut p0, mut p1) = (1.0, x);
                for k in 2..=n {
                    let p2 = ((2 * k - 1) as f64 * x * p1 - (k - 1) as f64 * p0) / k as f64;
                    p0 = p1;
                    p1 = p2;
                }
                dp = n as f64 * (x * p1 - p0) / (x * x - 1.0);
                let dx = p1 / dp;
                x -= dx;
                if dx.abs() < 1e-16 {
                    break;
                }
            }
            nodes.push((x, 2.0 / ((1.0 - x * x) * dp * dp)));
        }
        let mut sum = Cx::new(0.0, 0.0);
        let h = 1.0 / pieces as f64;
        for p in 0..pieces {
            for &(x, w) in &nodes {
                let t = (p as f64 + 0.5 * (x + 1.0)) * h;
                sum = sum.add(Cx::expi(0.5 * a * t * t + b * t).scale(0.5 * w * h));
            }
        }
        sum
    }

    #[test]
    fn fresnel_limits_and_table() {
        // A&S Table 7.7 (10 digits): C(0.5) = 0.4923442259, S(0.5) = 0.0647324328;
        // C(2) = 0.4882534061, S(2) = 0.3434156784. Both sides of SERIES_LIMIT agree.
        let (c, s) = fresnel(0.5);
        assert!((c - 0.4923442259).abs() < 1e-10 && (s - 0.0647324328).abs() < 1e-10);
        let (c, s) = fresnel(2.0);
        assert!((c - 0.4882534061).abs() < 1e-10 && (s - 0.3434156784).abs() < 1e-10);
        let below = series(SERIES_LIMIT);
        let above = continued_fraction(SERIES_LIMIT);
        assert!((below.0 - above.0).abs() < 2e-15 && (below.1 - above.1).abs() < 2e-15);
        // Asymptotically C, S → 1/2 with |C − 1/2| ≤ 1/(πx) (A&S 7.3.27).
        let (c, s) = fresnel(1e9);
        assert!((c - 0.5).abs() < 1e-9 / PI * 1.01 && (s - 0.5).abs() < 1e-9 / PI * 1.01);
        assert!(fresnel(f64::NAN).0.is_nan());
    }

    #[test]
    fn clothoid_integral_matches_quadrature() {
        // Every branch (a = 0, |a| small with |b| ≤ 1.1, 1.1 < |b| < 20 and |b| ≥ 20, a ≥ SMALL_A,
        // a < 0) against composite Gauss–Legendre (exact to rounding for these smooth integrands).
        for &a in &[
            0.0, 1e-12, -3e-7, 0.05, -0.099, 0.1, 0.7, -2.0, 15.0, 80.0, 900.0,
        ] {
            for &b in &[0.0, 0.3, -1.05, 1.2, 5.5, -12.0, 19.5, 25.0, -60.0, 300.0] {
                let got = integral(a, b);
                let want = quadrature(a, b, 256);
                let err = got.sub(want).abs1();
                assert!(err < 2e-14, "a={a} b={b}: {got:?} vs {want:?} ({err:e})");
            }
        }
    }

    #[test]
    fn tiny_rates_do_not_cancel() {
        // A spiral whose curvature changes by 1e-12 over 100 m is a circle to 1e-12·100²/6 in
        // position: compare with the exact arc (closed form).
        let start = Pose {
            x: 10.0,
            y: -3.0,
            heading: 0.4,
        };
        let arc = advance(start, 0.01, 0.0, 100.0);
        let spiral = advance(start, 0.01, 1e-14, 100.0);
        let c = (
            start.x - 100.0 * 0.4f64.sin(),
            start.y + 100.0 * 0.4f64.cos(),
        );
        let r = ((arc.x - c.0).powi(2) + (arc.y - c.1).powi(2)).sqrt();
        assert!((r - 100.0).abs() < 1e-12);
        // The rate moves the end by ∫₀ᴸ (rate u²/2) du = rate L³/6 = 1.67e-9 at most, and by at
        // least cos(κL = 1 rad) of that (the direction turns by 1 rad along the arc).
        let moved = ((spiral.x - arc.x).powi(2) + (spiral.y - arc.y).powi(2)).sqrt();
        let bound = 1e-14 * 1e6 / 6.0;
        assert!(moved <= bound * 1.001 && moved >= 0.5 * bound, "{moved:e}");
        assert!((spiral.heading - arc.heading - 0.5e-10).abs() < 1e-16);
    }

    #[test]
    fn advancing_twice_is_advancing_once() {
        // Curvature k0 + rate·s along both legs: the pose after s1 + s2 equals the pose after s1
        // followed by s2 with curvature k0 + rate·s1 (composition, exact).
        let start = Pose {
            x: 1.0,
            y: 2.0,
            heading: -1.0,
        };
        let (k0, rate) = (-0.02, 3e-4);
        let once = advance(start, k0, rate, 150.0);
        let mid = advance(start, k0, rate, 40.0);
        let twice = advance(mid, k0 + rate * 40.0, rate, 110.0);
        assert!((once.x - twice.x).abs() < 1e-12 && (once.y - twice.y).abs() < 1e-12);
        assert!((once.heading - twice.heading).abs() < 1e-14);
    }
}

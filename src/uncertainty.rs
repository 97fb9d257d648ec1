//! Standard errors of the kinematics from the noise of the positions.
//!
//! Every estimator here is linear in the positions: the ν-th derivative at sample i is
//! r⁽ᵛ⁾(tᵢ) = Σⱼ ℓᵢⱼ⁽ᵛ⁾ xⱼ with weights ℓ that depend on the times only, the same for every
//! coordinate. With independent noise of variance σ²/wⱼ per coordinate (w the fit weights, 1
//! without them), the derivatives 0..=3 of one coordinate at one sample have the covariance
//! σ² G with the 4 × 4 Gram matrix G_ab = Σⱼ ℓⱼ⁽ᵃ⁾ ℓⱼ⁽ᵇ⁾ / wⱼ, and different coordinates are
//! independent. [`Gram`] holds G; each estimator computes it in its own kernel (finite differences
//! from the Fornberg weights, local fits from (XᵀX)⁻¹, smoothing splines from the band of the
//! inverse normal matrix).
//!
//! Nonlinear quantities (speed, a_t, a_n, κ, τ, ω) follow by first-order (delta-method)
//! propagation: Var q ≈ σ² Σ_c Σ_ab (∂q/∂r⁽ᵃ⁾_c) G_ab (∂q/∂r⁽ᵇ⁾_c), with the gradients written in
//! closed form below. The approximation is good while the standard error is small against the
//! value; where it is not, the quantity is flagged instead (see [`crate::frame::flag`]).
//!
//! The noise σ itself comes from the estimator's residuals, or for finite differences from the
//! difference-based estimator of T. Gasser, L. Sroka and C. Jennen-Steinmetz, "Residual variance
//! and residual pattern in nonlinear regression", Biometrika 73 (1986) 625–633 (with cubic
//! interpolation and a robust scale, see [`difference_noise`]).

use nalgebra::Vector3;

mod noise;
pub use noise::{difference_noise, NOISE_SAMPLES};

/// Symmetric 4 × 4 Gram matrix of the smoother rows of derivatives 0..=3 at one sample, upper
/// triangle row by row: (0,0) (0,1) (0,2) (0,3) (1,1) (1,2) (1,3) (2,2) (2,3) (3,3).
pub type Gram = [f64; 10];

/// Position of entry (a, b) of a [`Gram`].
///
/// # Examples
///
/// ```
/// use osculate::uncertainty::at;
/// assert_eq!((at(0, 0), at(0, 3), at(1, 1), at(2, 3), at(3, 3)), (0, 3, 4, 8, 9));
/// assert_eq!(at(3, 1), at(1, 3)); // symmetric
/// ```
#[inline]
pub const fn at(a: usize, b: usize) -> usize {
    let (a, b) = if a <= b { (a, b) } else { (b, a) };
    // Rows 0..a hold 4, 3, 2, 1 entries.
    a * 4 - a * (a.saturating_sub(1)) / 2 + (b - a)
}

/// G from the smoother rows `l[a][j]` (derivative a, node j) and node weights `w` (1/w is the
/// relative noise variance of a node).
///
/// # Examples
///
/// ```
/// use osculate::uncertainty::{at, gram_of_rows};
/// // Rows of the central differences on a unit grid: r = x₀, r′ = (x₊ − x₋)/2,
/// // r″ = x₊ − 2x₀ + x₋; G = LLᵀ gives G₁₁ = 1/2, G₂₂ = 6, G₀₂ = −2 (closed form).
/// let rows = [[0.0, -0.5, 1.0, 0.0], [1.0, 0.0, -2.0, 0.0], [0.0, 0.5, 1.0, 0.0]];
/// let g = gram_of_rows(&rows, None);
/// assert_eq!((g[at(1, 1)], g[at(2, 2)], g[at(0, 2)], g[at(0, 1)]), (0.5, 6.0, -2.0, 0.0));
/// // Node weights 2 halve every entry.
/// assert_eq!(gram_of_rows(&rows, Some(&[2.0; 3]))[at(2, 2)], 3.0);
/// ```
pub fn gram_of_rows(l: &[[f64; 4]], w: Option<&[f64]>) -> Gram {
    let mut g = [0.0; 10];
    for (j, r) in l.iter().enumerate() {
        let iw = w.map_or(1.0, |w| 1.0 / w[j]);
        for a in 0..4 {
            for b in a..4 {
                g[at(a, b)] += r[a] * r[b] * iw;
            }
        }
    }
    g
}

/// Standard errors of one sample (position units and time units of the input).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Errors {
    /// Of each coordinate of r, r′, r″ and r‴ (the same for every coordinate).
    pub position: f64,
    /// Of each coordinate of r′.
    pub velocity: f64,
    /// Of each coordinate of r″.
    pub acceleration: f64,
    /// Of each coordinate of r‴.
    pub jerk: f64,
    /// Of |r′|.
    pub speed: f64,
    /// Of a_t.
    pub accel_tangential: f64,
    /// Of a_n.
    pub accel_normal: f64,
    /// Of κ (and of the signed curvature).
    pub curvature: f64,
    /// Of τ.
    pub torsion: f64,
    /// Of ω.
    pub angular_speed: f64,
}

impl Errors {
    /// Every entry NaN.
    pub const NAN: Errors = Errors {
        position: f64::NAN,
        velocity: f64::NAN,
        acceleration: f64::NAN,
        jerk: f64::NAN,
        speed: f64::NAN,
        accel_tangential: f64::NAN,
        accel_normal: f64::NAN,
        curvature: f64::NAN,
        torsion: f64::NAN,
        angular_speed: f64::NAN,
    };
}

/// When a sample counts as stopped or straight, judged against its standard errors.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Significance {
    /// STOPPED also when speed < `z` × its standard error.
    pub speed: bool,
    /// STRAIGHT also when κ < `z` × its standard error.
    pub curvature: bool,
    /// The multiple of the standard error that a value must exceed to differ from zero.
    pub z: f64,
    /// VAGUE when the standard error of κ or of the speed exceeds this fraction of the value.
    pub max_relative: f64,
}

impl Default for Significance {
    /// Off; z = 3 and a relative standard error of 1/4 when switched on (z = 3 leaves a noise-only
    /// speed above the threshold with probability e^(−4.5) ≈ 1.1 % in the plane and 2.9 % in
    /// space, Rayleigh and Maxwell tails).
    fn default() -> Self {
        Significance {
            speed: false,
            curvature: false,
            z: 3.0,
            max_relative: 0.25,
        }
    }
}

/// σ √(gᵀ G g) summed over coordinates for the gradient blocks `g[a]` = ∂q/∂r⁽ᵃ⁾ (a = 0..=3),
/// using the first `dim` coordinates.
#[inline]
fn spread(g: &[Vector3<f64>; 4], gram: &Gram, dim: usize, sigma: f64) -> f64 {
    let mut v = 0.0;
    for a in 0..4 {
        for b in 0..4 {
            let gab = gram[at(a, b)];
            if gab == 0.0 {
                continue;
            }
            let dot: f64 = (0..dim).map(|c| g[a][c] * g[b][c]).sum();
            v += gab * dot;
        }
    }
    sigma * v.max(0.0).sqrt()
}

/// Standard errors of the speed and of κ only (what the significance tests need), as in
/// [`propagate`] but without the other quantities.
///
/// # Examples
///
/// ```
/// use nalgebra::Vector3;
/// use osculate::uncertainty::{speed_and_curvature, Gram};
/// // Straight motion at speed 2 along x: se of the speed is σ·√G₁₁ (closed form); with no
/// // velocity there is no curvature and its se is NaN.
/// let g: Gram = [1.0, 0.0, -2.0, 0.0, 0.5, 0.0, -1.0, 6.0, 0.0, 2.5];
/// let (se_v, se_k) = speed_and_curvature(&Vector3::new(2.0, 0.0, 0.0), &Vector3::zeros(), 3, &g, 0.1);
/// assert!((se_v - 0.1 * 0.5f64.sqrt()).abs() < 1e-15 && se_k > 0.0);
/// let (_, se_k) = speed_and_curvature(&Vector3::zeros(), &Vector3::zeros(), 3, &g, 0.1);
/// assert!(se_k.is_nan());
/// ```
#[inline]
pub fn speed_and_curvature(
    d1: &Vector3<f64>,
    d2: &Vector3<f64>,
    dim: usize,
    gram: &Gram,
    sigma: f64,
) -> (f64, f64) {
    let speed = sigma * gram[at(1, 1)].max(0.0).sqrt();
    let v = d1.norm();
    if !(v > 0.0 && v.is_finite()) {
        return (speed, f64::NAN);
    }
    let (chat, cn) = normal_direction(d1, d2, v, dim);
    let g = curvature_gradient(d1, &d2.cross(&chat), &chat.cross(d1), v, cn);
    (speed, spread(&g, gram, dim, sigma))
}

/// ∂κ/∂r⁽ᵃ⁾ for κ = |c|/v³, given d|c| = δ′·`dc1` + δ″·`dc2`.
#[inline]
fn curvature_gradient(
    d1: &Vector3<f64>,
    dc1: &Vector3<f64>,
    dc2: &Vector3<f64>,
    v: f64,
    cn: f64,
) -> [Vector3<f64>; 4] {
    let v3 = v * v * v;
    let kappa = cn / v3;
    let z = Vector3::zeros();
    [z, dc1 / v3 - d1 * (3.0 * kappa / (v * v)), dc2 / v3, z]
}

/// Unit direction of r′ × r″ and |r′ × r″|, or any unit vector normal to T (and 0) when the
/// cross product vanishes.
#[inline]
fn normal_direction(
    d1: &Vector3<f64>,
    d2: &Vector3<f64>,
    v: f64,
    dim: usize,
) -> (Vector3<f64>, f64) {
    let c = d1.cross(d2);
    let cn = c.norm();
    if cn > 0.0 && cn.is_finite() {
        return (c / cn, cn);
    }
    if dim == 2 {
        return (Vector3::z(), cn);
    }
    let t = d1 / v;
    let trial = if t.x.abs() < 0.9 {
        Vector3::x()
    } else {
        Vector3::y()
    };
    (t.cross(&trial).normalize(), cn)
}

/// Propagate the noise `sigma` through the Frenet formulas at one sample with derivatives
/// r′ = `d1`, r″ = `d2`, r‴ = `d3` (zero beyond `dim`) and Gram matrix `gram`.
///
/// Where r′ × r″ vanishes (a straight sample) the curvature's gradient is taken along any
/// direction normal to T, so its standard error stays the noise level of κ there.
///
/// # Examples
///
/// ```
/// use nalgebra::Vector3;
/// use osculate::uncertainty::{propagate, at};
/// // Only r′ is noisy, with unit Gram entry: the speed's standard error is σ.
/// let mut g = [0.0; 10];
/// g[at(1, 1)] = 1.0;
/// let e = propagate(&Vector3::new(3.0, 4.0, 0.0), &Vector3::zeros(), &Vector3::zeros(), 2, &g, 0.1);
/// assert!((e.speed - 0.1).abs() < 1e-15 && (e.velocity - 0.1).abs() < 1e-15);
/// ```
pub fn propagate(
    d1: &Vector3<f64>,
    d2: &Vector3<f64>,
    d3: &Vector3<f64>,
    dim: usize,
    gram: &Gram,
    sigma: f64,
) -> Errors {
    let sd = |a: usize| sigma * gram[at(a, a)].max(0.0).sqrt();
    let mut e = Errors {
        position: sd(0),
        velocity: sd(1),
        acceleration: sd(2),
        jerk: sd(3),
        // ∂v/∂r′ = T, a unit vector: Var v = σ² G₁₁ whatever the direction.
        speed: sd(1),
        ..Errors::NAN
    };
    let v = d1.norm();
    if !(v > 0.0 && v.is_finite()) {
        return e;
    }
    let z = Vector3::zeros();
    let t = d1 / v;
    let c = d1.cross(d2);
    let (chat, cn) = normal_direction(d1, d2, v, dim);
    let v2 = v * v;
    let at_ = d1.dot(d2) / v;
    let an = cn / v;
    // d|c| = δ′·(r″ × ĉ) + δ″·(ĉ × r′).
    let (dc1, dc2) = (d2.cross(&chat), chat.cross(d1));
    e.accel_tangential = spread(&[z, d2 / v - d1 * (at_ / v2), t, z], gram, dim, sigma);
    e.accel_normal = spread(&[z, dc1 / v - d1 * (an / v2), dc2 / v, z], gram, dim, sigma);
    e.curvature = spread(&curvature_gradient(d1, &dc1, &dc2, v, cn), gram, dim, sigma);
    let omega = cn / v2;
    e.angular_speed = spread(
        &[z, dc1 / v2 - d1 * (2.0 * omega / v2), dc2 / v2, z],
        gram,
        dim,
        sigma,
    );
    // τ = (c·r‴)/|c|²: d(c·r‴) = δ′·(r″ × r‴) + δ″·(r‴ × r′) + δ‴·c and d|c|² = 2|c| d|c|.
    if dim == 3 && cn > 0.0 && d3.iter().all(|x| x.is_finite()) {
        let c2 = cn * cn;
        let tau = c.dot(d3) / c2;
        e.torsion = spread(
            &[
                z,
                (d2.cross(d3) - dc1 * (2.0 * tau * cn)) / c2,
                (d3.cross(d1) - dc2 * (2.0 * tau * cn)) / c2,
                c / c2,
            ],
            gram,
            dim,
            sigma,
        );
    } else if dim == 2 {
        e.torsion = 0.0;
    }
    e
}

/// Median of the finite values of `v` (NaN if none), by selection; reorders `v`.
///
/// # Examples
///
/// ```
/// use osculate::uncertainty::median;
/// assert_eq!(median(&mut vec![3.0, f64::NAN, 1.0, 2.0]), 2.0);
/// assert_eq!(median(&mut vec![4.0, 1.0, 2.0, 3.0]), 2.5); // mean of the middle two
/// assert!(median(&mut vec![f64::NAN]).is_nan());
/// ```
pub fn median(v: &mut Vec<f64>) -> f64 {
    v.retain(|x| x.is_finite());
    if v.is_empty() {
        return f64::NAN;
    }
    let (len, k) = (v.len(), v.len() / 2);
    let (lo, mid, _) = v.select_nth_unstable_by(k, f64::total_cmp);
    if len % 2 == 1 {
        *mid
    } else {
        let below = lo.iter().copied().fold(f64::NEG_INFINITY, f64::max);
        0.5 * (below + *mid)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn gram_layout() {
        let mut seen = [false; 10];
        for a in 0..4 {
            for b in a..4 {
                assert_eq!(at(a, b), at(b, a));
                assert!(!seen[at(a, b)]);
                seen[at(a, b)] = true;
            }
        }
        assert!(seen.iter().all(|&s| s));
    }

    /// Central finite differences of a scalar function of (r′, r″, r‴).
    fn numeric_gradient(
        f: &dyn Fn(&[Vector3<f64>; 3]) -> f64,
        d: &[Vector3<f64>; 3],
    ) -> [Vector3<f64>; 4] {
        let mut g = [Vector3::zeros(); 4];
        for a in 0..3 {
            for c in 0..3 {
                let h = 1e-6;
                let (mut p, mut m) = (*d, *d);
                p[a][c] += h;
                m[a][c] -= h;
                g[a + 1][c] = (f(&p) - f(&m)) / (2.0 * h);
            }
        }
        g
    }

    type Quantity<'a> = &'a dyn Fn(&[Vector3<f64>; 3]) -> f64;

    #[test]
    fn gradients_match_numerical_differentiation() {
        // A generic 3-D sample; Gram = identity on derivatives 1..=3, so the standard error is
        // σ |∇q| and each closed-form gradient is checked against central differences (1e-6).
        let d = [
            Vector3::new(1.3, -0.4, 0.7),
            Vector3::new(0.2, 0.9, -0.5),
            Vector3::new(-0.6, 0.1, 0.8),
        ];
        let mut gram = [0.0; 10];
        for a in 1..4 {
            gram[at(a, a)] = 1.0;
        }
        let e = propagate(&d[0], &d[1], &d[2], 3, &gram, 1.0);
        let norm = |g: &[Vector3<f64>; 4]| g.iter().map(|v| v.norm_squared()).sum::<f64>().sqrt();
        let c = |d: &[Vector3<f64>; 3]| d[0].cross(&d[1]);
        let cases: [(f64, Quantity); 5] = [
            (e.accel_tangential, &|d| d[0].dot(&d[1]) / d[0].norm()),
            (e.accel_normal, &|d| c(d).norm() / d[0].norm()),
            (e.curvature, &|d| c(d).norm() / d[0].norm().powi(3)),
            (e.angular_speed, &|d| c(d).norm() / d[0].norm_squared()),
            (e.torsion, &|d| c(d).dot(&d[2]) / c(d).norm_squared()),
        ];
        for (se, f) in cases {
            assert_relative_eq!(se, norm(&numeric_gradient(f, &d)), max_relative = 1e-6);
        }
        assert_relative_eq!(e.speed, 1.0);
    }

    #[test]
    fn medians() {
        assert_eq!(median(&mut vec![3.0, 1.0, 2.0]), 2.0);
        assert_eq!(median(&mut vec![4.0, 1.0, f64::NAN, 2.0, 3.0]), 2.5);
        assert!(median(&mut vec![f64::NAN]).is_nan());
    }

    #[test]
    fn the_short_path_agrees_with_the_full_propagation() {
        let (d1, d2, d3) = (
            Vector3::new(1.3, -0.4, 0.7),
            Vector3::new(0.2, 0.9, -0.5),
            Vector3::new(-0.6, 0.1, 0.8),
        );
        let g: Gram = [1.0, 0.1, -0.2, 0.0, 2.0, 0.3, 0.1, 5.0, 0.4, 9.0];
        let e = propagate(&d1, &d2, &d3, 3, &g, 0.7);
        let (sv, sk) = speed_and_curvature(&d1, &d2, 3, &g, 0.7);
        assert_eq!((sv, sk), (e.speed, e.curvature));
    }
}

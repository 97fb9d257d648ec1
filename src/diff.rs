//! Finite differences on non-uniform grids.
//!
//! Weights come from Fornberg's recursion (B. Fornberg, "Generation of finite difference formulas on
//! arbitrarily spaced grids", Math. Comp. 51 (1988) 699–706), which gives the weights of every
//! derivative order up to `m` on any set of distinct nodes in O(width² · m) operations.
//!
//! Two accuracy orders are offered. `order = 2` uses the 3-point stencil for r′ and r″ and the 5-point
//! stencil for r‴; `order = 4` uses 5 points for r′ and r″ and 7 for r‴. These are the narrowest
//! centred stencils whose error is O(h^order) on uniform and smoothly graded grids. Near the ends of a
//! track the stencil slides inwards and keeps its width (one-sided): r′ keeps its formal order, the
//! higher derivatives lose one, and the sample is flagged EDGE.
//!
//! The stencils of [`derivatives_at`] (3, 4, 5 and 7 nodes, the derivative taken at one of the
//! nodes) use the closed form of the Lagrange basis instead of the recursion: one division per
//! node, no allocation. Fornberg's recursion stays for any other width ([`fornberg`]) and is the
//! reference the closed form is tested against.

use crate::uncertainty::Gram;

/// Widest stencil used by any order.
pub const MAX_WIDTH: usize = 7;
/// Highest derivative order computed.
pub const MAX_DERIV: usize = 3;

/// Weights of one stencil: `w[j][k]` multiplies node `j` for derivative `k`.
pub type Weights = [[f64; MAX_DERIV + 1]; MAX_WIDTH];

/// Formal accuracy order of the finite differences.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FdOrder {
    /// 3-point r′, r″; 5-point r‴.
    Two,
    /// 5-point r′, r″; 7-point r‴.
    Four,
}

impl FdOrder {
    /// Parse the public integer form (2 or 4).
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::diff::FdOrder;
    /// assert_eq!(FdOrder::from_int(4), Some(FdOrder::Four));
    /// assert_eq!(FdOrder::from_int(3), None);
    /// ```
    pub fn from_int(order: i64) -> Option<Self> {
        match order {
            2 => Some(FdOrder::Two),
            4 => Some(FdOrder::Four),
            _ => None,
        }
    }

    /// Stencil width for r′ and r″.
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::diff::FdOrder;
    /// assert_eq!((FdOrder::Two.width_low(), FdOrder::Four.width_low()), (3, 5));
    /// ```
    pub fn width_low(self) -> usize {
        match self {
            FdOrder::Two => 3,
            FdOrder::Four => 5,
        }
    }

    /// Stencil width for r‴.
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::diff::FdOrder;
    /// assert_eq!((FdOrder::Two.width_high(), FdOrder::Four.width_high()), (5, 7));
    /// ```
    pub fn width_high(self) -> usize {
        self.width_low() + 2
    }

    /// Fewest samples a track must have.
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::diff::FdOrder;
    /// assert_eq!((FdOrder::Two.min_samples(), FdOrder::Four.min_samples()), (3, 5));
    /// ```
    pub fn min_samples(self) -> usize {
        self.width_low()
    }
}

/// Fornberg's weights for derivatives `0..=m` at `z` on the nodes `x` (at most [`MAX_WIDTH`]).
///
/// # Examples
///
/// ```
/// use osculate::diff::fornberg;
/// // Central differences on a uniform grid of step 1: f' ≈ (f(1) - f(-1)) / 2.
/// let w = fornberg(0.0, &[-1.0, 0.0, 1.0], 2);
/// assert_eq!([w[0][1], w[1][1], w[2][1]], [-0.5, 0.0, 0.5]);
/// assert_eq!([w[0][2], w[1][2], w[2][2]], [1.0, -2.0, 1.0]);
/// ```
pub fn fornberg(z: f64, x: &[f64], m: usize) -> Weights {
    debug_assert!(x.len() <= MAX_WIDTH && m <= MAX_DERIV);
    let mut c: Weights = [[0.0; MAX_DERIV + 1]; MAX_WIDTH];
    let n = x.len();
    if n == 0 {
        return c;
    }
    fornberg_into(z, x, m, &mut c[..n]);
    c
}

#[inline(always)]
fn fornberg_into(z: f64, x: &[f64], m: usize, c: &mut [[f64; MAX_DERIV + 1]]) {
    let n = x.len();
    let mut c1 = 1.0;
    let mut c4 = x[0] - z;
    c[0][0] = 1.0;
    for i in 1..n {
        let mn = i.min(m);
        let mut c2 = 1.0;
        let c5 = c4;
        c4 = x[i] - z;
        for j in 0..i {
            let c3 = x[i] - x[j];
            let inv3 = 1.0 / c3;
            c2 *= c3;
            if j == i - 1 {
                let f = c1 / c2;
                for k in (1..=mn).rev() {
                    c[i][k] = f * (k as f64 * c[i - 1][k - 1] - c5 * c[i - 1][k]);
                }
                c[i][0] = -f * c5 * c[i - 1][0];
            }
            for k in (1..=mn).rev() {
                c[j][k] = (c4 * c[j][k] - k as f64 * c[j][k - 1]) * inv3;
            }
            c[j][0] = c4 * c[j][0] * inv3;
        }
        c1 = c2;
    }
}

/// Weights of derivatives 1..=3 at node `p` of the `N` nodes `x`, from the closed form of the
/// Lagrange basis (the hot path for the fixed stencils; equal to [`fornberg`] up to rounding).
///
/// With offsets dₘ = xₘ − x_p, the basis polynomial of node j ≠ p is
/// ℓⱼ(x_p + u) = u · Πₘ (u − dₘ) / (dⱼ · Πₘ (xⱼ − xₘ)), products over m ∉ {j, p}, so its k-th
/// derivative at u = 0 is k! times the coefficient of u^(k−1) in Πₘ (u − dₘ), divided by the
/// denominator. Each node's denominator is formed and inverted once and shared by the three
/// orders; node p takes minus the sum of the others (weights of a derivative sum to zero). `w[j][0]`
/// is left 0 (the value at a node is the node itself).
#[inline(always)]
fn closed_weights<const N: usize>(x: &[f64], p: usize) -> [[f64; MAX_DERIV + 1]; N] {
    let x: &[f64; N] = x[..N].try_into().expect("stencil of N nodes");
    let xp = x[p];
    let mut w = [[0.0; MAX_DERIV + 1]; N];
    let mut sum = [0.0; 3];
    for j in 0..N {
        if j == p {
            continue;
        }
        let mut den = x[j] - xp;
        // Coefficients of u⁰, u¹, u² in Πₘ (u − dₘ).
        let (mut c0, mut c1, mut c2) = (1.0, 0.0, 0.0);
        for m in 0..N {
            if m == j || m == p {
                continue;
            }
            den *= x[j] - x[m];
            let d = x[m] - xp;
            c2 = c1 - d * c2;
            c1 = c0 - d * c1;
            c0 *= -d;
        }
        let inv = 1.0 / den;
        let wj = [c0 * inv, 2.0 * c1 * inv, 6.0 * c2 * inv];
        w[j][1..].copy_from_slice(&wj);
        for (acc, v) in sum.iter_mut().zip(wj) {
            *acc += v;
        }
    }
    for k in 0..3 {
        w[p][k + 1] = -sum[k];
    }
    w
}

/// Where a stencil of `width` nodes sits for sample `i` of a track of `n` samples.
///
/// Returns the first node and whether the stencil is centred on `i`.
///
/// # Examples
///
/// ```
/// use osculate::diff::place;
/// // 5 nodes in a track of 10: centred on sample 4, slid inwards at both ends.
/// assert_eq!(place(4, 5, 10), (2, true));
/// assert_eq!(place(0, 5, 10), (0, false));
/// assert_eq!(place(9, 5, 10), (5, false));
/// ```
#[inline]
pub fn place(i: usize, width: usize, n: usize) -> (usize, bool) {
    let half = width / 2;
    let start = i.saturating_sub(half).min(n - width);
    (start, start + half == i)
}

/// r′, r″ and r‴ of one sample, and whether any stencil was one-sided or narrowed.
///
/// `t` holds the track's times, `x` its positions row-major with `D` columns. r‴ is NaN when the
/// track is too short to hold four nodes. With `gram`, also the Gram matrix of the rows of
/// derivatives 0..=3 (the position row is the sample itself) from the same weights, for
/// [`crate::uncertainty`]; its r‴ entries are NaN when r‴ is.
///
/// # Examples
///
/// ```
/// use osculate::diff::{derivatives_at, FdOrder};
/// use osculate::uncertainty::at;
/// // x = t³ on uneven times: the 5-point r‴ is exact (6) for a cubic (closed form), to rounding.
/// let t = [0.0, 0.3, 1.0, 1.4, 2.5, 3.0];
/// let x: Vec<f64> = t.iter().map(|&s| s * s * s).collect();
/// let mut g = [0.0; 10];
/// let (d1, d2, d3, edge) = derivatives_at::<1>(&t, &x, 2, FdOrder::Two, Some(&mut g));
/// assert!((d3[0] - 6.0).abs() < 1e-10 && !edge);
/// assert!(d1[0] > 0.0 && d2[0] > 0.0);
/// assert_eq!(g[at(0, 0)], 1.0); // the position row is the sample itself
/// // Three samples: no r‴, and the stencils are the whole track.
/// let (_, _, d3, edge) = derivatives_at::<1>(&t[..3], &x[..3], 1, FdOrder::Two, None);
/// assert!(d3[0].is_nan() && edge);
/// ```
#[inline]
pub fn derivatives_at<const D: usize>(
    t: &[f64],
    x: &[f64],
    i: usize,
    order: FdOrder,
    gram: Option<&mut Gram>,
) -> ([f64; D], [f64; D], [f64; D], bool) {
    derivatives_with(t, x, i, order, gram, true)
}

/// [`derivatives_at`], with r‴ (and its Gram entries) left NaN unless `third`: the wider stencil
/// is then only placed, for the EDGE flag, not summed.
///
/// # Examples
///
/// ```
/// use osculate::diff::{derivatives_at, derivatives_with, FdOrder};
/// let t = [0.0, 0.3, 1.0, 1.4, 2.5, 3.0];
/// let x: Vec<f64> = t.iter().map(|&s| s * s * s).collect();
/// let all = derivatives_at::<1>(&t, &x, 1, FdOrder::Two, None);
/// let low = derivatives_with::<1>(&t, &x, 1, FdOrder::Two, None, false);
/// assert_eq!((all.0, all.1, all.3), (low.0, low.1, low.3)); // same r′, r″ and EDGE
/// assert!(low.2[0].is_nan());
/// ```
#[inline]
pub fn derivatives_with<const D: usize>(
    t: &[f64],
    x: &[f64],
    i: usize,
    order: FdOrder,
    gram: Option<&mut Gram>,
    third: bool,
) -> ([f64; D], [f64; D], [f64; D], bool) {
    let n = t.len();
    let wl = order.width_low().min(n);
    let wh = order.width_high().min(n);
    let mut edge = wl < order.width_low() || wh < order.width_high();
    let want = gram.is_some();
    // Smoother rows by node, from the first node of the wider stencil (which holds the other).
    let (s_high, _) = place(i, wh, n);
    let mut rows = [[0.0; MAX_DERIV + 1]; MAX_WIDTH];

    let (s, centred) = place(i, wl, n);
    edge |= !centred;
    let mut d1 = [0.0; D];
    let mut d2 = [0.0; D];
    // The weights of a derivative sum to zero, so differences from the sample itself give the
    // same sums; they are exact for nearby positions (Sterbenz), which keeps coordinates far from
    // the origin (ECEF metres) from adding the rounding of large products.
    let xi = &x[i * D..(i + 1) * D];
    let mut low = |w: &[[f64; MAX_DERIV + 1]]| {
        for (j, wj) in w.iter().enumerate() {
            let row = &x[(s + j) * D..(s + j + 1) * D];
            for k in 0..D {
                let dx = row[k] - xi[k];
                d1[k] += wj[1] * dx;
                d2[k] += wj[2] * dx;
            }
            if want {
                rows[s + j - s_high][1] = wj[1];
                rows[s + j - s_high][2] = wj[2];
            }
        }
    };
    match wl {
        3 => low(&closed_weights::<3>(&t[s..], i - s)),
        5 => low(&closed_weights::<5>(&t[s..], i - s)),
        _ => low(&fornberg(t[i], &t[s..s + wl], 2)[..wl]),
    }

    let mut d3 = [f64::NAN; D];
    if wh > MAX_DERIV && !third {
        edge |= !place(i, wh, n).1;
    } else if wh > MAX_DERIV {
        let (s, centred) = place(i, wh, n);
        edge |= !centred;
        d3 = [0.0; D];
        let mut high = |w: &[[f64; MAX_DERIV + 1]]| {
            for (j, wj) in w.iter().enumerate() {
                let row = &x[(s + j) * D..(s + j + 1) * D];
                for k in 0..D {
                    d3[k] += wj[3] * (row[k] - xi[k]);
                }
                if want {
                    rows[j][3] = wj[3];
                }
            }
        };
        match wh {
            4 => high(&closed_weights::<4>(&t[s..], i - s)),
            5 => high(&closed_weights::<5>(&t[s..], i - s)),
            7 => high(&closed_weights::<7>(&t[s..], i - s)),
            _ => high(&fornberg(t[i], &t[s..s + wh], 3)[..wh]),
        }
    }
    if let Some(g) = gram {
        rows[i - s_high][0] = 1.0;
        *g = crate::uncertainty::gram_of_rows(&rows[..wh], None);
        if wh <= MAX_DERIV || !third {
            for a in 0..4 {
                g[crate::uncertainty::at(a, 3)] = f64::NAN;
            }
        }
    }
    (d1, d2, d3, edge)
}

/// The rows `[first, last]` that the stencils of sample `i` read.
///
/// # Examples
///
/// ```
/// use osculate::diff::{reach, FdOrder};
/// // The 5-point r‴ stencil of order 2, and the 7-point one of order 4 (slid at the start).
/// assert_eq!(reach(4, 10, FdOrder::Two), (2, 6));
/// assert_eq!(reach(1, 10, FdOrder::Four), (0, 6));
/// ```
#[inline]
pub fn reach(i: usize, n: usize, order: FdOrder) -> (usize, usize) {
    let wh = order.width_high().min(n);
    let (s, _) = place(i, wh, n);
    (s, s + wh - 1)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn weights_are_exact_on_polynomials() {
        // A stencil of w nodes differentiates polynomials of degree < w exactly (Fornberg 1988).
        let x = [0.0, 0.13, 0.4, 0.71, 1.0];
        let z = 0.4;
        let w = fornberg(z, &x, 3);
        let f = |u: f64| 2.0 - u + 3.0 * u * u - 0.5 * u.powi(3) + 0.25 * u.powi(4);
        let exact = [
            f(z),
            -1.0 + 6.0 * z - 1.5 * z * z + z.powi(3),
            6.0 - 3.0 * z + 3.0 * z * z,
            -3.0 + 6.0 * z,
        ];
        for k in 0..=3 {
            let est: f64 = x.iter().zip(w.iter()).map(|(&u, wj)| wj[k] * f(u)).sum();
            assert_relative_eq!(est, exact[k], epsilon = 1e-10, max_relative = 1e-10);
        }
    }

    #[test]
    fn three_point_matches_textbook_nonuniform_formula() {
        // Interior second-order formula of numpy.gradient for steps h1 (left), h2 (right).
        let (h1, h2) = (0.3, 0.7);
        let w = fornberg(0.0, &[-h1, 0.0, h2], 1);
        let a = -h2 / (h1 * (h1 + h2));
        let b = (h2 - h1) / (h1 * h2);
        let c = h1 / (h2 * (h1 + h2));
        assert_relative_eq!(w[0][1], a, max_relative = 1e-14);
        assert_relative_eq!(w[1][1], b, max_relative = 1e-14);
        assert_relative_eq!(w[2][1], c, max_relative = 1e-14);
    }

    #[test]
    fn placement_slides_at_the_ends() {
        assert_eq!(place(0, 3, 10), (0, false));
        assert_eq!(place(1, 3, 10), (0, true));
        assert_eq!(place(9, 3, 10), (7, false));
        assert_eq!(place(1, 5, 10), (0, false));
        assert_eq!(place(2, 5, 10), (0, true));
        assert_eq!(place(0, 3, 3), (0, false));
    }

    #[test]
    fn derivatives_of_a_cubic_are_exact_with_five_points() {
        let t: Vec<f64> = (0..9).map(|i| (i as f64 * 0.37).powf(1.3)).collect();
        let x: Vec<f64> = t.iter().map(|&u| u * u * u - 2.0 * u).collect();
        for i in 0..t.len() {
            let (_, _, d3, _) = derivatives_at::<1>(&t, &x, i, FdOrder::Two, None);
            assert_relative_eq!(d3[0], 6.0, max_relative = 1e-8);
            let (d1, d2, d3, _) = derivatives_at::<1>(&t, &x, i, FdOrder::Four, None);
            assert_relative_eq!(d1[0], 3.0 * t[i] * t[i] - 2.0, epsilon = 1e-9);
            assert_relative_eq!(d2[0], 6.0 * t[i], epsilon = 1e-9);
            assert_relative_eq!(d3[0], 6.0, max_relative = 1e-8);
        }
    }

    #[test]
    fn third_derivative_is_nan_on_three_samples() {
        let t = [0.0, 1.0, 2.5];
        let x = [0.0, 1.0, 6.25];
        let (d1, d2, d3, edge) = derivatives_at::<1>(&t, &x, 1, FdOrder::Two, None);
        assert!(d3[0].is_nan() && edge);
        assert_relative_eq!(d1[0], 2.0, max_relative = 1e-12);
        assert_relative_eq!(d2[0], 2.0, max_relative = 1e-12);
    }

    #[test]
    fn gram_of_the_central_stencils() {
        // Uniform step h, order 2, interior: r′ = (x₊ − x₋)/2h, r″ = (x₊ − 2x + x₋)/h² and the
        // 5-point r‴ = (x₊₂ − 2x₊ + 2x₋ − x₋₂)/2h³ (closed forms), so G₁₁ = 1/(2h²),
        // G₂₂ = 6/h⁴, G₀₂ = −2/h², G₃₃ = 10/(4h⁶), G₁₃ = −(2 + 2)/(2h · 2h³) = −1/h⁴, G₀₁ = 0.
        use crate::uncertainty::at;
        let h = 0.5;
        let t: Vec<f64> = (0..9).map(|i| i as f64 * h).collect();
        let x = vec![0.0; 9];
        let mut g = [0.0; 10];
        derivatives_at::<1>(&t, &x, 4, FdOrder::Two, Some(&mut g));
        let close = |a: f64, b: f64| (a - b).abs() <= 1e-12 * b.abs().max(1.0);
        assert!(close(g[at(0, 0)], 1.0) && close(g[at(0, 1)], 0.0));
        assert!(close(g[at(1, 1)], 1.0 / (2.0 * h * h)));
        assert!(close(g[at(2, 2)], 6.0 / h.powi(4)) && close(g[at(0, 2)], -2.0 / (h * h)));
        assert!(close(g[at(3, 3)], 10.0 / (4.0 * h.powi(6))));
        assert!(close(g[at(1, 3)], -1.0 / h.powi(4)));
    }

    /// A deterministic generator in [0, 1) (xorshift64*), for seeded random spacings.
    fn uniform(state: &mut u64) -> f64 {
        *state ^= *state >> 12;
        *state ^= *state << 25;
        *state ^= *state >> 27;
        (state.wrapping_mul(0x2545_f491_4f6c_dd1d) >> 11) as f64 / (1u64 << 53) as f64
    }

    /// Random uneven nodes: steps from 0.01 to 1 (ratios up to 100) at a random offset and scale.
    fn uneven_nodes(state: &mut u64, n: usize) -> Vec<f64> {
        let scale = 10f64.powf(6.0 * uniform(state) - 3.0);
        let mut v = vec![scale * (100.0 * uniform(state) - 50.0)];
        for _ in 1..n {
            let h = 10f64.powf(-2.0 * uniform(state));
            v.push(v[v.len() - 1] + scale * h);
        }
        v
    }

    #[test]
    fn closed_forms_equal_fornberg_on_random_uneven_nodes() {
        // Reference: Fornberg's recursion on the same nodes. Tolerance: 1e-12 relative to the
        // largest weight of the same derivative (a weight near zero, like the middle weight of r′
        // on a nearly even grid, is the difference of large terms in either method).
        let mut state = 0x9e37_79b9_7f4a_7c15u64;
        for _ in 0..2000 {
            for n in [3usize, 4, 5, 7] {
                let x = uneven_nodes(&mut state, n);
                for p in 0..n {
                    let reference = fornberg(x[p], &x, 3);
                    let closed: Vec<[f64; MAX_DERIV + 1]> = match n {
                        3 => closed_weights::<3>(&x, p).to_vec(),
                        4 => closed_weights::<4>(&x, p).to_vec(),
                        5 => closed_weights::<5>(&x, p).to_vec(),
                        _ => closed_weights::<7>(&x, p).to_vec(),
                    };
                    for k in 1..n.min(MAX_DERIV + 1) {
                        let big = (0..n).map(|j| reference[j][k].abs()).fold(0.0, f64::max);
                        for j in 0..n {
                            let err = (closed[j][k] - reference[j][k]).abs();
                            assert!(
                                err <= 1e-12 * big,
                                "n={n} p={p} k={k} j={j}: {} vs {} (nodes {x:?})",
                                closed[j][k],
                                reference[j][k]
                            );
                        }
                    }
                }
            }
        }
    }

    /// What `derivatives_at` returned with Fornberg's weights for every stencil: the reference.
    fn derivatives_by_fornberg<const D: usize>(
        t: &[f64],
        x: &[f64],
        i: usize,
        order: FdOrder,
    ) -> ([f64; D], [f64; D], [f64; D], Gram) {
        let n = t.len();
        let (wl, wh) = (order.width_low().min(n), order.width_high().min(n));
        let (s_high, _) = place(i, wh, n);
        let mut rows = [[0.0; MAX_DERIV + 1]; MAX_WIDTH];
        let (mut d1, mut d2, mut d3) = ([0.0; D], [0.0; D], [f64::NAN; D]);
        let (s, _) = place(i, wl, n);
        let w = fornberg(t[i], &t[s..s + wl], 2);
        for j in 0..wl {
            for k in 0..D {
                let dx = x[(s + j) * D + k] - x[i * D + k];
                d1[k] += w[j][1] * dx;
                d2[k] += w[j][2] * dx;
            }
            rows[s + j - s_high][1] = w[j][1];
            rows[s + j - s_high][2] = w[j][2];
        }
        if wh > MAX_DERIV {
            let w = fornberg(t[i], &t[s_high..s_high + wh], 3);
            d3 = [0.0; D];
            for j in 0..wh {
                for k in 0..D {
                    d3[k] += w[j][3] * (x[(s_high + j) * D + k] - x[i * D + k]);
                }
                rows[j][3] = w[j][3];
            }
        }
        rows[i - s_high][0] = 1.0;
        let mut g = crate::uncertainty::gram_of_rows(&rows[..wh], None);
        if wh <= MAX_DERIV {
            for a in 0..4 {
                g[crate::uncertainty::at(a, 3)] = f64::NAN;
            }
        }
        (d1, d2, d3, g)
    }

    #[test]
    fn derivatives_and_gram_equal_the_fornberg_version() {
        // Reference: the same sums with Fornberg's weights (`derivatives_by_fornberg`).
        // Tolerance: 1e-12 relative to the largest term of the same sum (Σ|w|·|xⱼ − xᵢ|), and
        // for the Gram matrix 1e-12 · √(G_aa G_bb) (G_ab is a sum of products of the same rows).
        use crate::uncertainty::at;
        let mut state = 0x0123_4567_89ab_cdefu64;
        for n in [3usize, 4, 5, 6, 7, 12] {
            let t = uneven_nodes(&mut state, n);
            let x: Vec<f64> = (0..2 * n)
                .map(|_| 200.0 * uniform(&mut state) - 100.0)
                .collect();
            for order in [FdOrder::Two, FdOrder::Four] {
                if n < order.min_samples() {
                    continue;
                }
                for i in 0..n {
                    let mut g = [0.0; 10];
                    let (d1, d2, d3, _) = derivatives_at::<2>(&t, &x, i, order, Some(&mut g));
                    let (r1, r2, r3, rg) = derivatives_by_fornberg::<2>(&t, &x, i, order);
                    let spread = x.iter().fold(0.0f64, |m, v| m.max(v.abs())) * 2.0;
                    for (a, b, gk) in [(d1, r1, 1), (d2, r2, 2), (d3, r3, 3)] {
                        let bound = 1e-12 * spread * rg[at(gk, gk)].sqrt() * (n as f64).sqrt();
                        for k in 0..2 {
                            let same_nan = a[k].is_nan() && b[k].is_nan();
                            assert!(same_nan || (a[k] - b[k]).abs() <= bound, "{a:?} vs {b:?}");
                        }
                    }
                    for p in 0..4 {
                        for q in p..4 {
                            let (a, b) = (g[at(p, q)], rg[at(p, q)]);
                            let scale = (rg[at(p, p)] * rg[at(q, q)]).sqrt();
                            let ok = (b.is_nan() && a.is_nan()) || (a - b).abs() <= 1e-12 * scale;
                            assert!(ok, "n={n} i={i} G[{p},{q}]: {a} vs {b}");
                        }
                    }
                }
            }
        }
    }
    #[test]
    fn any_track_length_and_degenerate_times_do_not_panic() {
        // The fuzz target's property on a fixed grid of cases: repeated, unsorted and
        // non-finite times on tracks of 1..=12 samples, every sample, both orders.
        let kinds: [fn(usize) -> f64; 4] = [
            |j| j as f64,
            |_| 1.0,
            |j| (j as f64 * 2.7).sin(),
            |j| if j == 2 { f64::NAN } else { j as f64 },
        ];
        for n in 1..=12 {
            for times in kinds {
                let t: Vec<f64> = (0..n).map(times).collect();
                let x: Vec<f64> = (0..2 * n).map(|j| j as f64).collect();
                for order in [FdOrder::Two, FdOrder::Four] {
                    for i in 0..n {
                        let mut g = [0.0; 10];
                        let _ = derivatives_at::<2>(&t, &x, i, order, Some(&mut g));
                        let (lo, hi) = reach(i, n, order);
                        assert!(lo <= i && i <= hi && hi < n);
                    }
                }
            }
        }
    }
}

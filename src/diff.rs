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
    pub fn from_int(order: i64) -> Option<Self> {
        match order {
            2 => Some(FdOrder::Two),
            4 => Some(FdOrder::Four),
            _ => None,
        }
    }

    /// Stencil width for r′ and r″.
    pub fn width_low(self) -> usize {
        match self {
            FdOrder::Two => 3,
            FdOrder::Four => 5,
        }
    }

    /// Stencil width for r‴.
    pub fn width_high(self) -> usize {
        self.width_low() + 2
    }

    /// Fewest samples a track must have.
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

/// Fornberg's recursion with a stencil width known at compile time (the hot path).
#[inline]
fn fornberg_fixed<const N: usize>(z: f64, x: &[f64], m: usize) -> [[f64; MAX_DERIV + 1]; N] {
    let mut c = [[0.0; MAX_DERIV + 1]; N];
    fornberg_into(z, &x[..N], m, &mut c);
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

/// Where a stencil of `width` nodes sits for sample `i` of a track of `n` samples.
///
/// Returns the first node and whether the stencil is centred on `i`.
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
#[inline]
pub fn derivatives_at<const D: usize>(
    t: &[f64],
    x: &[f64],
    i: usize,
    order: FdOrder,
    gram: Option<&mut Gram>,
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
        3 => low(&fornberg_fixed::<3>(t[i], &t[s..], 2)),
        5 => low(&fornberg_fixed::<5>(t[i], &t[s..], 2)),
        _ => low(&fornberg(t[i], &t[s..s + wl], 2)[..wl]),
    }

    let mut d3 = [f64::NAN; D];
    if wh > MAX_DERIV {
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
            5 => high(&fornberg_fixed::<5>(t[i], &t[s..], 3)),
            7 => high(&fornberg_fixed::<7>(t[i], &t[s..], 3)),
            _ => high(&fornberg(t[i], &t[s..s + wh], 3)[..wh]),
        }
    }
    if let Some(g) = gram {
        rows[i - s_high][0] = 1.0;
        *g = crate::uncertainty::gram_of_rows(&rows[..wh], None);
        if wh <= MAX_DERIV {
            for a in 0..4 {
                g[crate::uncertainty::at(a, 3)] = f64::NAN;
            }
        }
    }
    (d1, d2, d3, edge)
}

/// The rows `[first, last]` that the stencils of sample `i` read.
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
}

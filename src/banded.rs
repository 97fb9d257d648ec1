//! Banded linear algebra: symmetric positive definite band matrices (LDLᵀ, solves and the band of
//! the inverse) and tridiagonal systems with several right-hand sides.
//!
//! The band of the inverse uses the recurrence of M. F. Hutchinson and F. R. de Hoog, "Smoothing
//! noisy data with spline functions", Numer. Math. 47 (1985) 99–106: from M = L D Lᵀ,
//! Σ = D⁻¹ L⁻¹ + (I − Lᵀ) Σ, evaluated from the last row upwards, touches only entries inside the
//! band, so it costs O(n b²) like the factorization itself.

use crate::error::{try_filled, KernelError, Result};

/// Resize `v` to `len` zeros, reusing its storage (fallible when it must grow).
pub fn zeroed(v: &mut Vec<f64>, len: usize) -> Result<()> {
    v.clear();
    v.try_reserve_exact(len)
        .map_err(|_| KernelError::OutOfMemory { bytes: len * 8 })?;
    v.resize(len, 0.0);
    Ok(())
}

/// Symmetric band matrix of order `n` and half-bandwidth `b`, lower band stored row by row:
/// `a[i * (b + 1) + d]` holds M[i][i − d].
#[derive(Debug, Clone, PartialEq)]
pub struct SymBand {
    /// Order.
    pub n: usize,
    /// Half-bandwidth.
    pub b: usize,
    /// Lower band, row-major.
    pub a: Vec<f64>,
}

impl SymBand {
    /// A zero matrix.
    pub fn zeros(n: usize, b: usize) -> Result<Self> {
        Ok(SymBand {
            n,
            b,
            a: try_filled(n * (b + 1), 0.0)?,
        })
    }

    /// M[i][j] for |i − j| ≤ b (callers stay inside the band).
    #[inline]
    pub fn get(&self, i: usize, j: usize) -> f64 {
        let (r, c) = if i >= j { (i, j) } else { (j, i) };
        self.a[r * (self.b + 1) + (r - c)]
    }

    /// M[i][j] += v for i ≥ j, i − j ≤ b.
    #[inline]
    pub fn add_lower(&mut self, i: usize, j: usize, v: f64) {
        self.a[i * (self.b + 1) + (i - j)] += v;
    }

    /// Factor in place as L D Lᵀ (L unit lower, stored below the diagonal; D on the diagonal).
    /// Returns false if a pivot is not positive (the matrix is not numerically positive definite).
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::banded::SymBand;
    /// // [[1, 2], [2, 1]] is indefinite (determinant −3): the second pivot 1 − 4 is negative.
    /// let mut m = SymBand::zeros(2, 1).unwrap();
    /// m.add_lower(0, 0, 1.0);
    /// m.add_lower(1, 0, 2.0);
    /// m.add_lower(1, 1, 1.0);
    /// assert!(!m.ldlt_in_place());
    /// ```
    pub fn ldlt_in_place(&mut self) -> bool {
        let (n, b) = (self.n, self.b);
        let w = b + 1;
        for i in 0..n {
            let lo = i.saturating_sub(b);
            for j in lo..i {
                // L[i][j] = (M[i][j] − Σ_{k<j} L[i][k] D[k] L[j][k]) / D[j]
                let mut s = self.a[i * w + (i - j)];
                for k in lo.max(j.saturating_sub(b))..j {
                    s -= self.a[i * w + (i - k)] * self.a[k * w] * self.a[j * w + (j - k)];
                }
                self.a[i * w + (i - j)] = s / self.a[j * w];
            }
            let mut d = self.a[i * w];
            for k in lo..i {
                let l = self.a[i * w + (i - k)];
                d -= l * l * self.a[k * w];
            }
            if d.is_nan() || d <= 0.0 {
                return false;
            }
            self.a[i * w] = d;
        }
        true
    }

    /// Solve M x = y in place for `nrhs` right-hand sides stored row-major (`y[i * nrhs + r]`),
    /// given the factor from [`SymBand::ldlt_in_place`].
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::banded::SymBand;
    /// // M = tridiag(−1, 2, −1) of order 3 maps (1, 1, 1) to (1, 0, 1), (1, 2, 3) to (0, 0, 4).
    /// let mut m = SymBand::zeros(3, 1).unwrap();
    /// for i in 0..3 {
    ///     m.add_lower(i, i, 2.0);
    ///     if i > 0 {
    ///         m.add_lower(i, i - 1, -1.0);
    ///     }
    /// }
    /// assert!(m.ldlt_in_place());
    /// let mut y = [1.0, 0.0, 0.0, 0.0, 1.0, 4.0]; // two right-hand sides, row-major
    /// m.ldlt_solve(&mut y, 2);
    /// let want = [1.0, 1.0, 1.0, 2.0, 1.0, 3.0];
    /// assert!(y.iter().zip(want).all(|(a, b)| (a - b).abs() < 1e-14));
    /// ```
    pub fn ldlt_solve(&self, y: &mut [f64], nrhs: usize) {
        let (n, b) = (self.n, self.b);
        let w = b + 1;
        for i in 0..n {
            for k in i.saturating_sub(b)..i {
                let l = self.a[i * w + (i - k)];
                for r in 0..nrhs {
                    y[i * nrhs + r] -= l * y[k * nrhs + r];
                }
            }
        }
        for i in 0..n {
            let d = self.a[i * w];
            for r in 0..nrhs {
                y[i * nrhs + r] /= d;
            }
        }
        for i in (0..n).rev() {
            for k in i + 1..(i + w).min(n) {
                let l = self.a[k * w + (k - i)];
                for r in 0..nrhs {
                    y[i * nrhs + r] -= l * y[k * nrhs + r];
                }
            }
        }
    }

    /// The band of M⁻¹ (same layout), from the factor (Hutchinson & de Hoog 1985).
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::banded::SymBand;
    /// // tridiag(−1, 2, −1) of order 3 has the inverse [[3, 2, 1], [2, 4, 2], [1, 2, 3]] / 4
    /// // (closed form); its band holds the diagonal and the first off-diagonal.
    /// let mut m = SymBand::zeros(3, 1).unwrap();
    /// for i in 0..3 {
    ///     m.add_lower(i, i, 2.0);
    ///     if i > 0 {
    ///         m.add_lower(i, i - 1, -1.0);
    ///     }
    /// }
    /// assert!(m.ldlt_in_place());
    /// let s = m.inverse_band().unwrap();
    /// for (i, j, want) in [(0, 0, 0.75), (1, 0, 0.5), (1, 1, 1.0), (2, 1, 0.5), (2, 2, 0.75)] {
    ///     assert!((s.get(i, j) - want).abs() < 1e-14);
    /// }
    /// ```
    pub fn inverse_band(&self) -> Result<SymBand> {
        let mut s = SymBand::zeros(self.n, self.b)?;
        self.inverse_band_into(&mut s);
        Ok(s)
    }

    /// [`SymBand::inverse_band`] into `s` (of the same order and band; every band entry is
    /// overwritten, so its contents do not matter).
    pub fn inverse_band_into(&self, s: &mut SymBand) {
        let (n, b) = (self.n, self.b);
        let w = b + 1;
        for i in (0..n).rev() {
            let hi = (i + b).min(n - 1);
            // Off-diagonal entries Σ[j][i], j > i, first; then the diagonal. Σ[k][j] for k, j > i
            // is read from the lower band at row max(k, j).
            for j in (i + 1..=hi).rev() {
                let mut v = 0.0;
                for k in i + 1..=hi {
                    let l = self.a[k * w + (k - i)];
                    let sig = if k >= j {
                        s.a[k * w + (k - j)]
                    } else {
                        s.a[j * w + (j - k)]
                    };
                    v -= l * sig;
                }
                s.a[j * w + (j - i)] = v;
            }
            let mut v = 1.0 / self.a[i * w];
            for k in i + 1..=hi {
                v -= self.a[k * w + (k - i)] * s.a[k * w + (k - i)];
            }
            s.a[i * w] = v;
        }
    }
}

impl SymBand {
    /// The band of dΣ/dλ = −Σ Ṁ Σ for M(λ) with dM/dλ = `dm`, given this L D Lᵀ factor of M and
    /// the band `sigma` of Σ = M⁻¹ from [`SymBand::inverse_band`].
    ///
    /// Forward-mode differentiation of the factorization and of the Hutchinson–de Hoog recurrence:
    /// every step is the tangent of the corresponding step of [`SymBand::ldlt_in_place`] and
    /// [`SymBand::inverse_band`], so the cost stays O(n b²) and only band entries are touched.
    /// The smoothing-spline standard errors need it: the sampling covariance of the coefficients
    /// is Σ H Σ = −dΣ/dμ for M(μ) = μH + λP at μ = 1.
    pub fn inverse_band_tangent(&self, sigma: &SymBand, dm: &SymBand) -> Result<SymBand> {
        let (n, b) = (self.n, self.b);
        let w = b + 1;
        let l = |i: usize, j: usize| self.a[i * w + (i - j)];
        let d = |i: usize| self.a[i * w];
        // Tangent of the factor: same layout (L̇ below the diagonal, Ḋ on it).
        let mut f = SymBand::zeros(n, b)?;
        for i in 0..n {
            let lo = i.saturating_sub(b);
            for j in lo..i {
                // L_ij D_j = M_ij − Σ_k L_ik D_k L_jk, differentiated.
                let mut s = dm.a[i * w + (i - j)] - l(i, j) * f.a[j * w];
                for k in lo.max(j.saturating_sub(b))..j {
                    s -= f.a[i * w + (i - k)] * d(k) * l(j, k)
                        + l(i, k) * f.a[k * w] * l(j, k)
                        + l(i, k) * d(k) * f.a[j * w + (j - k)];
                }
                f.a[i * w + (i - j)] = s / d(j);
            }
            let mut s = dm.a[i * w];
            for k in lo..i {
                let lik = l(i, k);
                s -= 2.0 * lik * f.a[i * w + (i - k)] * d(k) + lik * lik * f.a[k * w];
            }
            f.a[i * w] = s;
        }
        let mut t = SymBand::zeros(n, b)?;
        for i in (0..n).rev() {
            let hi = (i + b).min(n - 1);
            for j in (i + 1..=hi).rev() {
                let mut v = 0.0;
                for k in i + 1..=hi {
                    let (r, c) = if k >= j { (k, j) } else { (j, k) };
                    v -= f.a[k * w + (k - i)] * sigma.a[r * w + (r - c)]
                        + l(k, i) * t.a[r * w + (r - c)];
                }
                t.a[j * w + (j - i)] = v;
            }
            let mut v = -f.a[i * w] / (d(i) * d(i));
            for k in i + 1..=hi {
                v -= f.a[k * w + (k - i)] * sigma.a[k * w + (k - i)]
                    + l(k, i) * t.a[k * w + (k - i)];
            }
            t.a[i * w] = v;
        }
        Ok(t)
    }
}

#[cfg(test)]
mod tangent_tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn tangent_of_the_inverse_band_matches_central_differences() {
        // M(λ) = H + λP with banded H, P (b = 2): dΣ/dλ against (Σ(λ+h) − Σ(λ−h)) / 2h.
        let (n, b) = (9, 2);
        let build = |lam: f64| {
            let mut m = SymBand::zeros(n, b).unwrap();
            let mut p = SymBand::zeros(n, b).unwrap();
            for i in 0..n {
                for dd in 0..=b.min(i) {
                    let h = if dd == 0 {
                        4.0 + (i % 3) as f64
                    } else {
                        0.5 / (1 + dd + i % 2) as f64
                    };
                    let q = if dd == 0 { 2.0 } else { -0.7 + 0.1 * dd as f64 };
                    m.add_lower(i, i - dd, h + lam * q);
                    p.add_lower(i, i - dd, q);
                }
            }
            (m, p)
        };
        let inv = |lam: f64| {
            let (mut m, _) = build(lam);
            assert!(m.ldlt_in_place());
            m.inverse_band().unwrap()
        };
        let lam = 0.8;
        let (mut m, p) = build(lam);
        assert!(m.ldlt_in_place());
        let sigma = m.inverse_band().unwrap();
        let t = m.inverse_band_tangent(&sigma, &p).unwrap();
        let (hp, hm) = (inv(lam + 1e-5), inv(lam - 1e-5));
        for i in 0..n {
            for j in i.saturating_sub(b)..=i {
                let fd = (hp.get(i, j) - hm.get(i, j)) / 2e-5;
                assert_relative_eq!(t.get(i, j), fd, max_relative = 1e-6, epsilon = 1e-9);
            }
        }
    }
}

/// Solve a tridiagonal system in place by elimination without pivoting (as de Boor's CUBSPL does
/// for spline end conditions): `sub[i]` = M[i][i−1] (sub[0] unused), `diag[i]`, `sup[i]` = M[i][i+1]
/// (last unused); `y` holds `nrhs` right-hand sides row-major and receives the solution.
/// `diag` is overwritten.
///
/// # Examples
///
/// ```
/// use osculate::banded::tridiagonal_solve;
/// // [2 1 0; 1 2 1; 0 1 2] x = [4 8 8] has the solution x = (1, 2, 3) (closed form).
/// let mut diag = [2.0, 2.0, 2.0];
/// let mut y = [4.0, 8.0, 8.0];
/// tridiagonal_solve(&[0.0, 1.0, 1.0], &mut diag, &[1.0, 1.0, 0.0], &mut y, 1);
/// assert!(y.iter().zip([1.0, 2.0, 3.0]).all(|(a, b)| (a - b).abs() < 1e-14));
/// ```
pub fn tridiagonal_solve(sub: &[f64], diag: &mut [f64], sup: &[f64], y: &mut [f64], nrhs: usize) {
    let n = diag.len();
    for i in 1..n {
        let m = sub[i] / diag[i - 1];
        diag[i] -= m * sup[i - 1];
        for r in 0..nrhs {
            y[i * nrhs + r] -= m * y[(i - 1) * nrhs + r];
        }
    }
    for r in 0..nrhs {
        y[(n - 1) * nrhs + r] /= diag[n - 1];
    }
    for i in (0..n - 1).rev() {
        for r in 0..nrhs {
            y[i * nrhs + r] = (y[i * nrhs + r] - sup[i] * y[(i + 1) * nrhs + r]) / diag[i];
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    fn dense_inverse(m: &[Vec<f64>]) -> Vec<Vec<f64>> {
        // Gauss–Jordan, for the test only.
        let n = m.len();
        let mut a: Vec<Vec<f64>> = m
            .iter()
            .enumerate()
            .map(|(i, r)| {
                let mut row = r.clone();
                row.extend((0..n).map(|j| if i == j { 1.0 } else { 0.0 }));
                row
            })
            .collect();
        for c in 0..n {
            let p = (c..n)
                .max_by(|&i, &j| a[i][c].abs().total_cmp(&a[j][c].abs()))
                .unwrap();
            a.swap(c, p);
            let piv = a[c][c];
            for v in a[c].iter_mut() {
                *v /= piv;
            }
            for r in 0..n {
                if r != c {
                    let f = a[r][c];
                    let row_c = a[c].clone();
                    for (v, rc) in a[r].iter_mut().zip(row_c) {
                        *v -= f * rc;
                    }
                }
            }
        }
        a.into_iter().map(|r| r[n..].to_vec()).collect()
    }

    fn example(n: usize, b: usize) -> (SymBand, Vec<Vec<f64>>) {
        let mut m = SymBand::zeros(n, b).unwrap();
        let mut dense = vec![vec![0.0; n]; n];
        for i in 0..n {
            for d in 0..=b.min(i) {
                let v = if d == 0 {
                    4.0 + (i as f64).sin()
                } else {
                    0.5 / (d as f64 + (i as f64 * 0.3).cos().abs())
                };
                m.add_lower(i, i - d, v);
                dense[i][i - d] = v;
                dense[i - d][i] = v;
            }
        }
        (m, dense)
    }

    #[test]
    fn solve_and_inverse_band_match_dense() {
        let (n, b) = (12, 3);
        let (mut m, dense) = example(n, b);
        assert!(m.ldlt_in_place());
        let inv = dense_inverse(&dense);
        let sig = m.inverse_band().unwrap();
        for i in 0..n {
            for j in i.saturating_sub(b)..=i {
                assert_relative_eq!(
                    sig.get(i, j),
                    inv[i][j],
                    max_relative = 1e-12,
                    epsilon = 1e-14
                );
            }
        }
        let mut y: Vec<f64> = (0..2 * n).map(|k| (k as f64).cos()).collect();
        let y0 = y.clone();
        m.ldlt_solve(&mut y, 2);
        for i in 0..n {
            for r in 0..2 {
                let x: f64 = (0..n).map(|k| inv[i][k] * y0[k * 2 + r]).sum();
                assert_relative_eq!(y[i * 2 + r], x, max_relative = 1e-12, epsilon = 1e-14);
            }
        }
    }

    #[test]
    fn indefinite_matrix_is_reported() {
        let mut m = SymBand::zeros(2, 1).unwrap();
        m.add_lower(0, 0, 1.0);
        m.add_lower(1, 0, 2.0);
        m.add_lower(1, 1, 1.0);
        assert!(!m.ldlt_in_place());
    }

    #[test]
    fn tridiagonal_matches_direct() {
        let sub = [0.0, 1.0, 1.0];
        let mut diag = [4.0, 4.0, 4.0];
        let sup = [1.0, 1.0, 0.0];
        let mut y = [5.0, 6.0, 5.0];
        tridiagonal_solve(&sub, &mut diag, &sup, &mut y, 1);
        for v in y {
            assert_relative_eq!(v, 1.0, max_relative = 1e-15);
        }
    }
}

/// Widest band [`BandQr`] handles (half-bandwidth + 1).
pub const MAX_BAND: usize = 8;

/// Least squares with banded rows by Givens rotations (the approach of P. Dierckx, *Curve and
/// Surface Fitting with Splines*, Oxford 1993, ch. 4): rows with `b + 1` consecutive non-zeros,
/// added in order of their first column, are rotated into an upper-triangular band R, so that
/// RᵀR equals the normal matrix without ever forming it. The error grows with the square root of
/// the normal matrix's condition number instead of the condition number itself.
#[derive(Debug, Clone)]
pub struct BandQr {
    nb: usize,
    b: usize,
    nrhs: usize,
    /// `r[j * (b + 1) + c]` = R[j][j + c].
    r: Vec<f64>,
    /// Rotated right-hand sides, `nb × nrhs`.
    z: Vec<f64>,
}

impl BandQr {
    /// An empty system with `nb` unknowns, half-bandwidth `b` (< [`MAX_BAND`]), `nrhs`
    /// right-hand sides.
    pub fn new(nb: usize, b: usize, nrhs: usize) -> Result<Self> {
        Self::in_buffers(nb, b, nrhs, Vec::new(), Vec::new())
    }

    /// [`BandQr::new`] in the storage of `r` and `z` (their contents are overwritten with
    /// zeros), so that repeated systems of one size reuse their memory.
    pub fn in_buffers(
        nb: usize,
        b: usize,
        nrhs: usize,
        mut r: Vec<f64>,
        mut z: Vec<f64>,
    ) -> Result<Self> {
        assert!(b < MAX_BAND, "band too wide");
        zeroed(&mut r, nb * (b + 1))?;
        zeroed(&mut z, nb * nrhs)?;
        Ok(BandQr { nb, b, nrhs, r, z })
    }

    /// The storage of R and of the right-hand sides, for reuse.
    pub fn into_buffers(self) -> (Vec<f64>, Vec<f64>) {
        (self.r, self.z)
    }

    /// Rotate in the row whose non-zeros `vals` (b + 1 of them) start at column `first`, with
    /// right-hand sides `rhs` (`nrhs` values). `rhs` is consumed as scratch.
    pub fn add_row(&mut self, first: usize, vals: &[f64], rhs: &mut [f64]) {
        let (w, nrhs) = (self.b + 1, self.nrhs);
        // The row as it sweeps right: entry `off + c` is column `p + c` while eliminating column
        // p = first + off; fill-in lands past the original b + 1 entries, so the window is 2w.
        let mut row = [0.0; 2 * MAX_BAND];
        row[..w].copy_from_slice(&vals[..w]);
        for (off, p) in (first..(first + w).min(self.nb)).enumerate() {
            let x = row[off];
            if x == 0.0 {
                continue;
            }
            let rp = &mut self.r[p * w..(p + 1) * w];
            let piv = rp[0];
            // Entries stay far from overflow (scaled data, λ* ≤ 1e24), so the plain root is
            // safe and much cheaper than `hypot`.
            let rr = (piv * piv + x * x).sqrt();
            let (c, s) = (piv / rr, x / rr);
            rp[0] = rr;
            for q in 1..w {
                let a = rp[q];
                let v = row[off + q];
                rp[q] = c * a + s * v;
                row[off + q] = c * v - s * a;
            }
            let zp = &mut self.z[p * nrhs..(p + 1) * nrhs];
            for (a, h) in zp.iter_mut().zip(rhs.iter_mut()) {
                let z = *a;
                *a = c * z + s * *h;
                *h = c * *h - s * z;
            }
        }
    }

    /// Row `j` of R from its diagonal on: R[j][j..=j + b] (entries past the last column are 0).
    pub fn row(&self, j: usize) -> &[f64] {
        let w = self.b + 1;
        &self.r[j * w..(j + 1) * w]
    }

    /// Solve R x = z by back substitution; `None` if a diagonal entry of R vanishes.
    pub fn solve(&self) -> Option<Vec<f64>> {
        let mut x = Vec::new();
        self.solve_into(&mut x).then_some(x)
    }

    /// [`BandQr::solve`] into `x` (resized; false if a diagonal entry of R vanishes). The
    /// storage is taken as it comes: `x` must hold at least the capacity for nb × nrhs values,
    /// or the resize allocates.
    pub fn solve_into(&self, x: &mut Vec<f64>) -> bool {
        let (nb, w, nrhs) = (self.nb, self.b + 1, self.nrhs);
        x.clear();
        x.extend_from_slice(&self.z);
        for j in (0..nb).rev() {
            let d = self.r[j * w];
            if d == 0.0 || !d.is_finite() {
                return false;
            }
            for k in 0..nrhs {
                let mut v = x[j * nrhs + k];
                for c in 1..w.min(nb - j) {
                    v -= self.r[j * w + c] * x[(j + c) * nrhs + k];
                }
                x[j * nrhs + k] = v / d;
            }
        }
        true
    }

    /// The same normal matrix RᵀR as an L D Lᵀ factor (for [`SymBand::inverse_band`]).
    pub fn to_ldlt(&self) -> Result<SymBand> {
        let mut f = SymBand::zeros(self.nb, self.b)?;
        self.to_ldlt_into(&mut f);
        Ok(f)
    }

    /// [`BandQr::to_ldlt`] into `f` (of order nb and band b; every entry inside the band is
    /// overwritten).
    pub fn to_ldlt_into(&self, f: &mut SymBand) {
        let (nb, w) = (self.nb, self.b + 1);
        for j in 0..nb {
            let d = self.r[j * w];
            f.a[j * w] = d * d;
            for c in 1..w.min(nb - j) {
                // L[j + c][j] = R[j][j + c] / R[j][j]
                f.a[(j + c) * w + c] = self.r[j * w + c] / d;
            }
        }
    }
}

#[cfg(test)]
mod qr_tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn qr_matches_normal_equations() {
        // Fit rows with 3 consecutive non-zeros; compare with LDLᵀ of the normal equations.
        let (nb, b) = (6, 2);
        let mut qr = BandQr::new(nb, b, 1).unwrap();
        let mut normal = SymBand::zeros(nb, b).unwrap();
        let mut rhs = vec![0.0; nb];
        for first in 0..nb - b {
            for rep in 0..3 {
                let vals: Vec<f64> = (0..=b)
                    .map(|c| 1.0 + ((first * 3 + rep + c * 5) % 7) as f64)
                    .collect();
                let y = (first + rep) as f64 * 0.7 - 1.0;
                for r in 0..=b {
                    for s in 0..=r {
                        normal.add_lower(first + r, first + s, vals[r] * vals[s]);
                    }
                    rhs[first + r] += vals[r] * y;
                }
                qr.add_row(first, &vals, &mut [y]);
            }
        }
        let x = qr.solve().unwrap();
        let inv_qr = qr.to_ldlt().unwrap().inverse_band().unwrap();
        assert!(normal.ldlt_in_place());
        normal.ldlt_solve(&mut rhs, 1);
        let inv = normal.inverse_band().unwrap();
        for j in 0..nb {
            assert_relative_eq!(x[j], rhs[j], max_relative = 1e-10, epsilon = 1e-12);
            for i in j..(j + b + 1).min(nb) {
                assert_relative_eq!(
                    inv_qr.get(i, j),
                    inv.get(i, j),
                    max_relative = 1e-10,
                    epsilon = 1e-12
                );
            }
        }
    }
}

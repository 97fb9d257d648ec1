//! The penalized least-squares problem of one track at a given λ*: its rows (data and penalty),
//! the fit by Givens QR (accurate at any λ*) or by the band LDLᵀ of the normal equations (cheap,
//! for the scan at moderate λ*), the residuals and the trace of the influence matrix.

use super::Covariance;
use crate::banded::{zeroed, BandQr, SymBand};
use crate::batch::CHUNK;
use crate::bspline::{basis_derivatives, clamped_knots, span_of_interval, to_piecewise};
use crate::error::{try_copy, try_filled, KernelError, Result};
use crate::piecewise::{gauss_legendre, PiecewisePoly};
use crate::uncertainty::{at, Gram};
use rayon::prelude::*;

pub(super) struct Problem {
    pub(super) n: usize,
    /// Clamped knots on the scaled times.
    knots: Vec<f64>,
    /// Scaled sample times.
    u: Vec<f64>,
    pub(super) dim: usize,
    pub(super) k: usize,
    w: Vec<f64>,
    y: Vec<f64>,
    /// Per sample: first basis index and the k + 1 basis values.
    rows: Vec<(usize, [f64; 6])>,
    /// The penalty's triangular square root: row j holds R_P[j][j..=j + k], with R_Pᵀ R_P the
    /// penalty matrix (Givens QR of the per-interval rows √(Gauss weight) · B⁽ᵐ⁾, done once).
    /// Each evaluation rotates in √λ R_P (n + k − 1 rows) instead of the m (n − 1) rows.
    root: Vec<[f64; 6]>,
    /// The normal equations' parts, for [`Problem::eval_normal`]: the data matrix Bᵀ W B, the
    /// penalty R_Pᵀ R_P and Bᵀ W y (`dim` columns); built on first use.
    normal: std::sync::OnceLock<Result<(SymBand, SymBand, Vec<f64>)>>,
}

/// Storage of finished evaluations, reused by the next ones: at 10⁶ samples an evaluation needs
/// about 200 MB of band arrays, and fresh pages cost more than the arithmetic on them.
#[derive(Default)]
pub(super) struct Pool(std::sync::Mutex<Vec<Vec<f64>>>);

impl Pool {
    /// `len` zeros, in the smallest stored vector that holds them (else the largest).
    fn take(&self, len: usize) -> Result<Vec<f64>> {
        let mut v = match self.0.lock() {
            Ok(mut p) => {
                let fit = (0..p.len())
                    .filter(|&i| p[i].capacity() >= len)
                    .min_by_key(|&i| p[i].capacity());
                let any = (0..p.len()).max_by_key(|&i| p[i].capacity());
                fit.or(any).map(|i| p.swap_remove(i)).unwrap_or_default()
            }
            Err(_) => Vec::new(),
        };
        zeroed(&mut v, len)?;
        Ok(v)
    }

    fn give(&self, v: Vec<f64>) {
        if let Ok(mut p) = self.0.lock() {
            if p.len() < 16 {
                p.push(v);
            }
        }
    }

    /// Hand an evaluation's arrays back.
    pub(super) fn recycle(&self, e: Eval) {
        self.give(e.coef);
        if let Some((l, s)) = e.factor {
            self.give(l.a);
            self.give(s.a);
        }
    }
}

pub(super) struct Eval {
    pub(super) coef: Vec<f64>,
    pub(super) rss: f64,
    pub(super) trace: f64,
    /// L D Lᵀ factor of the normal matrix and the band of its inverse (with the trace).
    factor: Option<(SymBand, SymBand)>,
}

impl Problem {
    pub(super) fn new(u: &[f64], y: Vec<f64>, dim: usize, w: Vec<f64>, k: usize) -> Result<Self> {
        let n = u.len();
        let m = k.div_ceil(2);
        let nb = n + k - 1;
        let knots = clamped_knots(u, k)?;
        let oom = |rows: usize| KernelError::OutOfMemory { bytes: rows * 56 };
        // Basis values at the samples and the penalty rows at the Gauss nodes of every interval
        // are independent: computed in parallel, rotated into R_P in order.
        let mut rows = try_filled(n, (0usize, [0.0; 6]))?;
        rows.par_chunks_mut(CHUNK).enumerate().for_each(|(c, out)| {
            for (q, row) in out.iter_mut().enumerate() {
                let i = c * CHUNK + q;
                let span = span_of_interval(i.min(n - 2), k);
                let d = basis_derivatives(&knots, span, u[i], k, 0);
                row.0 = span - k;
                row.1[..=k].copy_from_slice(&d[0][..=k]);
            }
        });
        let mut penalty = try_filled((n - 1) * m, [0.0; 6])?;
        let (gx, gw) = gauss_legendre(m);
        penalty
            .par_chunks_mut(CHUNK * m)
            .enumerate()
            .for_each(|(c, out)| {
                for (q, rows_iv) in out.chunks_mut(m).enumerate() {
                    let iv = c * CHUNK + q;
                    let span = span_of_interval(iv, k);
                    let (mid, half) = (0.5 * (u[iv] + u[iv + 1]), 0.5 * (u[iv + 1] - u[iv]));
                    for ((&xq, &wq), row) in gx.iter().zip(gw).zip(rows_iv.iter_mut()) {
                        let d = basis_derivatives(&knots, span, mid + half * xq, k, m);
                        let s = (wq * half).sqrt();
                        for r in 0..=k {
                            row[r] = s * d[m][r];
                        }
                    }
                }
            });
        let mut qr = BandQr::new(nb, k, 0)?;
        for (iv, rows_iv) in penalty.chunks(m).enumerate() {
            for row in rows_iv {
                qr.add_row(iv, &row[..=k], &mut []);
            }
        }
        drop(penalty);
        let mut root = Vec::new();
        root.try_reserve_exact(nb).map_err(|_| oom(nb))?;
        for j in 0..nb {
            let mut row = [0.0; 6];
            row[..=k].copy_from_slice(qr.row(j));
            root.push(row);
        }
        Ok(Problem {
            n,
            knots,
            u: try_copy(u)?,
            dim,
            k,
            w,
            y,
            rows,
            root,
            normal: std::sync::OnceLock::new(),
        })
    }

    /// Σ wᵢ |yᵢ − f(tᵢ)|² for the coefficients `coef`.
    fn rss(&self, coef: &[f64]) -> f64 {
        let (k, dim) = (self.k, self.dim);
        let mut rss = 0.0;
        for (i, (first, b)) in self.rows.iter().enumerate() {
            for c in 0..dim {
                let f: f64 = (0..=k).map(|r| b[r] * coef[(first + r) * dim + c]).sum();
                let e = self.y[i * dim + c] - f;
                rss += self.w[i] * e * e;
            }
        }
        rss
    }

    /// tr A = Σᵢ wᵢ bᵢᵀ Σ bᵢ from the band of Σ = M⁻¹ (Hutchinson & de Hoog 1985).
    fn trace(&self, sig: &SymBand) -> f64 {
        let k = self.k;
        let w1 = sig.b + 1;
        let mut trace = 0.0;
        for ((first, b), wi) in self.rows.iter().zip(&self.w) {
            // bᵀ Σ b over the lower band: diagonal once, off-diagonal twice.
            let mut q = 0.0;
            for r in 0..=k {
                let row = &sig.a[(first + r) * w1..(first + r + 1) * w1];
                let mut off = 0.0;
                for s in 0..r {
                    off += b[s] * row[r - s];
                }
                q += b[r] * (b[r] * row[0] + 2.0 * off);
            }
            trace += wi * q;
        }
        trace
    }

    /// Fit at λ* by Givens QR of the data rows and √λ R_P, in order of their first column; `None`
    /// when the system is numerically singular.
    pub(super) fn eval(&self, lambda: f64, want_trace: bool, pool: &Pool) -> Result<Option<Eval>> {
        let (n, k, dim) = (self.n, self.k, self.dim);
        let nb = n + k - 1;
        let w = k + 1;
        let mut qr = BandQr::in_buffers(nb, k, dim, pool.take(nb * w)?, pool.take(nb * dim)?)?;
        let sl = lambda.sqrt();
        let mut vals = [0.0; 6];
        let mut rhs = [0.0; 3];
        let mut next = 0;
        for (j, root) in self.root.iter().enumerate() {
            if root[0] != 0.0 {
                for r in 0..=k {
                    vals[r] = sl * root[r];
                }
                // Entries past the last column are zero: the rotation stops at column nb − 1.
                qr.add_row(j, &vals[..=k], &mut [0.0; 3][..dim]);
            }
            while next < n && self.rows[next].0 == j {
                let (first, b) = &self.rows[next];
                let sw = self.w[next].sqrt();
                for r in 0..=k {
                    vals[r] = sw * b[r];
                }
                for c in 0..dim {
                    rhs[c] = sw * self.y[next * dim + c];
                }
                qr.add_row(*first, &vals[..=k], &mut rhs[..dim]);
                next += 1;
            }
        }
        let mut coef = pool.take(nb * dim)?;
        let solved = qr.solve_into(&mut coef);
        let mut factor = None;
        if solved && want_trace {
            let mut ldlt = SymBand {
                n: nb,
                b: k,
                a: pool.take(nb * w)?,
            };
            qr.to_ldlt_into(&mut ldlt);
            let mut sig = SymBand {
                n: nb,
                b: k,
                a: pool.take(nb * w)?,
            };
            ldlt.inverse_band_into(&mut sig);
            factor = Some((ldlt, sig));
        }
        let (r, z) = qr.into_buffers();
        pool.give(r);
        pool.give(z);
        if !solved {
            pool.give(coef);
            return Ok(None);
        }
        let rss = self.rss(&coef);
        let trace = factor.as_ref().map_or(f64::NAN, |(_, sig)| self.trace(sig));
        Ok(Some(Eval {
            coef,
            rss,
            trace,
            factor,
        }))
    }

    /// The normal equations' parts (see the field).
    fn normal_parts(&self) -> Result<&(SymBand, SymBand, Vec<f64>)> {
        let parts = self.normal.get_or_init(|| {
            let (n, k, dim) = (self.n, self.k, self.dim);
            let nb = n + k - 1;
            let mut h = SymBand::zeros(nb, k)?;
            let mut p = SymBand::zeros(nb, k)?;
            let mut rhs = try_filled(nb * dim, 0.0)?;
            for (i, ((first, b), wi)) in self.rows.iter().zip(&self.w).enumerate() {
                for a in 0..=k {
                    for c in 0..=a {
                        h.add_lower(first + a, first + c, wi * b[a] * b[c]);
                    }
                    for d in 0..dim {
                        rhs[(first + a) * dim + d] += wi * b[a] * self.y[i * dim + d];
                    }
                }
            }
            for (j, row) in self.root.iter().enumerate() {
                for a in 0..=k.min(nb - 1 - j) {
                    for c in 0..=a {
                        p.add_lower(j + a, j + c, row[a] * row[c]);
                    }
                }
            }
            Ok((h, p, rhs))
        });
        match parts {
            Ok(p) => Ok(p),
            Err(e) => Err(e.clone()),
        }
    }

    /// Fit at λ* from the band L D Lᵀ of the normal equations Bᵀ W B + λ R_Pᵀ R_P, with the
    /// trace. About a fifth of the work of [`Problem::eval`], but the normal matrix squares the
    /// condition number: used only where the search has checked it against QR.
    pub(super) fn eval_normal(&self, lambda: f64, pool: &Pool) -> Result<Option<Eval>> {
        let (h, p, rhs) = self.normal_parts()?;
        let mut m = SymBand {
            n: h.n,
            b: h.b,
            a: pool.take(h.a.len())?,
        };
        for ((a, hv), pv) in m.a.iter_mut().zip(&h.a).zip(&p.a) {
            *a = hv + lambda * pv;
        }
        if !m.ldlt_in_place() {
            pool.give(m.a);
            return Ok(None);
        }
        let mut coef = pool.take(rhs.len())?;
        coef.copy_from_slice(rhs);
        m.ldlt_solve(&mut coef, self.dim);
        let rss = self.rss(&coef);
        let mut sig = SymBand {
            n: h.n,
            b: h.b,
            a: pool.take(h.a.len())?,
        };
        m.inverse_band_into(&mut sig);
        let trace = self.trace(&sig);
        Ok(Some(Eval {
            coef,
            rss,
            trace,
            factor: Some((m, sig)),
        }))
    }

    /// √(RSS / (dim (n − edf))), Wahba's residual estimate of the noise.
    pub(super) fn noise(&self, e: &Eval) -> f64 {
        let dof = self.dim as f64 * (self.n as f64 - e.trace);
        if dof > 0.0 {
            (e.rss / dof).sqrt()
        } else {
            f64::NAN
        }
    }

    /// Per sample, the Gram matrix of the rows of derivatives 0..=3 (scaled time units) for the
    /// fit `e`.
    pub(super) fn grams(&self, e: &Eval, cov: Covariance) -> Result<Vec<Gram>> {
        let (n, k) = (self.n, self.k);
        let (ldlt, sig) = e.factor.as_ref().expect("evaluated with the trace");
        let c = match cov {
            Covariance::Posterior => sig.clone(),
            Covariance::Sampling => {
                // Σ H Σ = −dΣ/dμ for M(μ) = μH + λP at μ = 1, H = Σᵢ wᵢ bᵢ bᵢᵀ the data part.
                // (Σ + λ dΣ/dλ is the same matrix, but at large λ it is the small difference
                // of two large ones near the ends of the track.)
                let mut h = SymBand::zeros(sig.n, k)?;
                for ((first, b), w) in self.rows.iter().zip(&self.w) {
                    for a in 0..=k {
                        for c in 0..=a {
                            h.add_lower(first + a, first + c, w * b[a] * b[c]);
                        }
                    }
                }
                let mut d = ldlt.inverse_band_tangent(sig, &h)?;
                d.a.iter_mut().for_each(|v| *v = -*v);
                d
            }
        };
        let mut out = Vec::new();
        out.try_reserve_exact(n)
            .map_err(|_| KernelError::OutOfMemory { bytes: n * 80 })?;
        for (i, &ui) in self.u.iter().enumerate() {
            let span = span_of_interval(i.min(n - 2), k);
            let first = span - k;
            let d = basis_derivatives(&self.knots, span, ui, k, 3.min(k));
            let mut g = [0.0; 10];
            for a in 0..4 {
                for b in a..4 {
                    if a > k || b > k {
                        continue;
                    }
                    let mut v = 0.0;
                    for r in 0..=k {
                        for s in 0..=k {
                            v += d[a][r] * d[b][s] * c.get(first + r, first + s);
                        }
                    }
                    g[at(a, b)] = v;
                }
            }
            out.push(g);
        }
        Ok(out)
    }

    /// The spline of an evaluation in the caller's units (t = t₀ + h̄u, positions re-centred)
    /// and, with `covariance`, its Gram matrices in the caller's time units.
    pub(super) fn finish(
        &self,
        e: &Eval,
        t: &[f64],
        hbar: f64,
        centre: &[f64],
        covariance: Option<Covariance>,
    ) -> Result<(PiecewisePoly, Vec<Gram>)> {
        let (n, dim, degree) = (self.n, self.dim, self.k);
        let mut gram = match covariance {
            Some(cov) => self.grams(e, cov)?,
            None => Vec::new(),
        };
        // Derivative a in scaled time is h̄^a times the derivative in the caller's time.
        for g in gram.iter_mut() {
            for a in 0..4 {
                for b in a..4 {
                    g[at(a, b)] /= hbar.powi((a + b) as i32);
                }
            }
        }
        let mut path = to_piecewise(&self.u, degree, &e.coef, dim)?;
        // The coefficient of u^p scales by h̄^−p.
        path.x = try_copy(t)?;
        let order = degree + 1;
        for iv in 0..n - 1 {
            let mut scale = 1.0;
            for p in 0..order {
                for d in 0..dim {
                    let c = &mut path.coef[(iv * order + p) * dim + d];
                    *c *= scale;
                    if p == 0 {
                        *c += centre[d];
                    }
                }
                scale /= hbar;
            }
        }
        Ok((path, gram))
    }
}

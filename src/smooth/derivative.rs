//! The derivative rule: more smoothing for derivatives than GCV picks for the positions.
//!
//! GCV (and the unbiased risk) are tuned for the positions; the derivatives that kinematics needs
//! are best estimated with more smoothing. With `derivative = ν > 0` the automatic choice is a
//! pilot by GCV followed by a plug-in rescaling of the smoothing bandwidth: the spline acts
//! asymptotically as the filter 1/(1 + (hω)^{2m}) (B. W. Silverman, Ann. Statist. 12 (1984)
//! 898–916), whose mean squared error for the ν-th derivative of a signal of frequency ω is
//! h^{4m} A_ν + σ² h̄ R_ν / h^{2ν+1} with R_ν = (1/2π)∫ w^{2ν}/(1+w^{2m})² dw. Minimizing it
//! for ν and for 0 and eliminating σ² gives u_ν^{4m+2ν+1} = (2ν+1)(R_ν/R_0) u_0^{4m+1} with
//! u = hω; ω is estimated from the pilot fit as ω̂² = Σ|f″|²/Σ|f′|². The factor on λ is
//! (u_ν/u_0)^{2m}, kept within [1, 100] so that a nearly straight track is not over-smoothed.

/// R_ν = (1/2π)∫ w^{2ν}/(1+w^{2m})² dw for ν = 0..=3: closed forms for m = 2 and m = 3
/// (checked against numerical quadrature with scipy.integrate.quad).
fn kernel_roughness(m: usize) -> [f64; 4] {
    if m == 2 {
        let r = 1.0 / (8.0 * std::f64::consts::SQRT_2);
        [3.0 * r, r, r, 3.0 * r]
    } else {
        [5.0 / 18.0, 1.0 / 12.0, 1.0 / 18.0, 1.0 / 18.0]
    }
}

/// Largest factor the derivative rule may apply to the pilot λ*.
pub const MAX_DERIVATIVE_FACTOR: f64 = 100.0;

/// Factor on the pilot λ* for estimating the `nu`-th derivative (see the module notes).
pub(super) fn derivative_factor(m: usize, nu: usize, lambda0: f64, hbar: f64, omega: f64) -> f64 {
    if nu == 0 || omega.is_nan() || omega <= 0.0 || omega.is_infinite() {
        return 1.0;
    }
    let r = kernel_roughness(m);
    let (mf, nf) = (m as f64, nu.min(3) as f64);
    let u0 = hbar * lambda0.powf(0.5 / mf) * omega;
    let unu = ((2.0 * nf + 1.0) * r[nu.min(3)] / r[0] * u0.powf(4.0 * mf + 1.0))
        .powf(1.0 / (4.0 * mf + 2.0 * nf + 1.0));
    (unu / u0).powf(2.0 * mf).clamp(1.0, MAX_DERIVATIVE_FACTOR)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn derivative_factor_limits() {
        // No frequency information: no change; u₀ → 0 drives the factor to its cap; u₀ large
        // (heavily resolved signal) leaves it near 1.
        assert_eq!(derivative_factor(3, 2, 1e6, 1.0, 0.0), 1.0);
        assert_eq!(
            derivative_factor(3, 3, 1e6, 1.0, 1e-9),
            MAX_DERIVATIVE_FACTOR
        );
        assert!(derivative_factor(3, 2, 1.0, 1.0, 10.0) < 1.5);
        // Helix-like case of the module notes: u₀ ≈ 0.153 gives ≈ 14 for ν = 2 and ≈ 39 for ν = 3.
        let l0 = (0.153f64).powi(6);
        assert!((derivative_factor(3, 2, l0, 1.0, 1.0) - 14.2).abs() < 0.2);
        assert!((derivative_factor(3, 3, l0, 1.0, 1.0) - 39.0).abs() < 0.5);
    }
}

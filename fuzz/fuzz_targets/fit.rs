//! `osculate::fit::fit_batch` with every method (spline with each end condition, smoothing spline
//! with each way of choosing λ, local polynomial with each window, linear) on arbitrary batches,
//! then `fit::evaluate`, `kinematics::of_fits` and `kinematics::of_fits_at` on what was fitted, at
//! arbitrary query times. Property: never panics. Kept preconditions: `nu` <= 3 (documented).
#![no_main]

mod common;

use common::Bytes;
use libfuzzer_sys::fuzz_target;
use osculate::fit::{evaluate, fit_batch, Method};
use osculate::kinematics::{of_fits, of_fits_at, Options};
use osculate::local::Window;
use osculate::smooth::{Covariance, Smoothing};
use osculate::spline::EndCondition;
use osculate::uncertainty::Significance;

fn method(b: &mut Bytes, dim: usize) -> Method {
    match b.u8() % 4 {
        0 => Method::Spline(match b.u8() % 3 {
            0 => EndCondition::NotAKnot,
            1 => EndCondition::Natural,
            _ => {
                let len = if b.chance(220) {
                    dim
                } else {
                    b.u8() as usize % 5
                };
                EndCondition::Clamped {
                    start: (0..len).map(|_| b.f64_any()).collect(),
                    end: (0..len).map(|_| b.f64_any()).collect(),
                }
            }
        }),
        1 => Method::Smooth {
            degree: if b.chance(200) {
                3 + 2 * (b.u8() as usize % 2)
            } else {
                b.u8() as usize % 8
            },
            smoothing: match b.u8() % 3 {
                0 => Smoothing::Gcv,
                1 => Smoothing::Noise(b.f64_any()),
                _ => Smoothing::Fixed(b.f64_any()),
            },
            derivative: b.u8() as usize % 5,
            covariance: match b.u8() % 3 {
                0 => None,
                1 => Some(Covariance::Sampling),
                _ => Some(Covariance::Posterior),
            },
        },
        2 => Method::Local {
            degree: b.u8() as usize % 8,
            window: match b.u8() % 3 {
                0 => Window::Samples(b.u16() as usize % 40),
                1 => Window::Span(b.f64_any()),
                _ => Window::Auto,
            },
            uncertainty: b.chance(128),
        },
        _ => Method::Linear,
    }
}

fuzz_target!(|data: &[u8]| {
    let mut b = Bytes::new(data);
    let dim = if b.chance(240) {
        2 + (b.u8() as usize % 2)
    } else {
        b.u8() as usize % 6
    };
    let n = b.u8() as usize % 64;
    let method = method(&mut b, dim);
    let t = b.times(n);
    let x = b.values(n * dim);
    let offsets = b.offsets(n);
    let weights: Option<Vec<f64>> = match b.u8() % 4 {
        0 => Some(b.values(n).iter().map(|v| v.abs()).collect()),
        1 => {
            let len = b.u8() as usize % 70;
            Some(b.values(len))
        }
        _ => None,
    };
    let Ok(fits) = fit_batch(&t, &x, dim, &offsets, weights.as_deref(), &method) else {
        return;
    };
    let m = offsets.len().saturating_sub(1);
    let nq = b.u8() as usize % 32;
    let tq: Vec<f64> = if b.chance(128) {
        b.times(nq)
    } else {
        (0..nq).map(|_| b.f64_any()).collect()
    };
    let qoff = if b.chance(200) && m > 0 {
        // Every query to one track, or spread over the tracks.
        let mut o = vec![0i64; m + 1];
        for (k, v) in o.iter_mut().enumerate().skip(1) {
            *v = (nq * k / m) as i64;
        }
        o
    } else {
        b.offsets(nq)
    };
    let nu = b.u8() as usize % 4;
    if let Ok(v) = evaluate(&fits, &tq, &qoff, nu) {
        assert_eq!(v.len(), nq * fits.dim);
    }
    let opts = Options {
        up: if b.chance(128) {
            None
        } else {
            Some([b.f64_any(), b.f64_any(), b.f64_any()])
        },
        uncertainty: b.chance(128),
        significance: Significance {
            speed: b.chance(128),
            curvature: b.chance(128),
            z: if b.chance(200) { 3.0 } else { b.f64_any() },
            max_relative: if b.chance(200) { 0.25 } else { b.f64_any() },
        },
        ..Options::default()
    };
    if let Ok(k) = of_fits(&fits, &opts) {
        assert_eq!(k.n, n);
    }
    if let Ok(k) = of_fits_at(&fits, &tq, &qoff, &opts) {
        assert_eq!(k.n, nq);
    }
});

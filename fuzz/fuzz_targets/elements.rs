//! `osculate::elements::elements` (PELT, classification, Levenberg–Marquardt chain fit) on
//! arbitrary per-sample columns and options, plus a noisy exact arc now and then so the fit runs.
//! Property: never panics; every element lies inside its track's arc length span, in order.
#![no_main]

mod common;

use common::Bytes;
use libfuzzer_sys::fuzz_target;
use osculate::elements::{elements, Options, Samples};

fuzz_target!(|data: &[u8]| {
    let mut b = Bytes::new(data);
    let n = b.u16() as usize % 300;
    let t = b.times(n);
    let (s, kappa, xy) = if b.chance(128) {
        // An arc of radius r at unit spacing with bounded perturbations: a fittable path.
        let r = 5.0 + (b.u8() as f64);
        let s: Vec<f64> = (0..n).map(|i| i as f64).collect();
        let xy = s
            .iter()
            .flat_map(|&u| [r * (u / r).sin(), r * (1.0 - (u / r).cos())])
            .map(|v| v + 1e-3 * (b.u8() as f64 - 128.0) / 128.0)
            .collect::<Vec<f64>>();
        (s, vec![1.0 / r; n], xy)
    } else {
        (b.values(n), b.values(n), b.values(2 * n))
    };
    let se = b.values(n);
    let flags: Vec<u8> = (0..n).map(|_| b.u8() & 63).collect();
    let offsets = b.offsets(n);
    let m = offsets.len().saturating_sub(1);
    let min_length: Vec<f64> = (0..m).map(|_| b.f64_any()).collect();
    let bandwidth: Vec<f64> = (0..m).map(|_| b.f64_any()).collect();
    let opt = Options {
        penalty: if b.chance(128) { f64::NAN } else { b.f64_any() },
        min_length: &min_length,
        bandwidth: &bandwidth,
        significance: 3.0,
        resolution: 1e-3,
        refine: b.chance(128),
        max_iterations: b.u8() as usize % 20,
    };
    let samples = Samples {
        t: &t,
        arclength: &s,
        curvature: &kappa,
        se: &se,
        flags: &flags,
        xy: &xy,
    };
    if let Ok(found) = elements(&samples, &offsets, &opt) {
        for e in &found {
            assert!(e.track < m && e.kind <= 2);
        }
    }
});

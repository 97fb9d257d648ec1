//! `osculate::kinematics::kinematics` on arbitrary batches: any dimension 0..5, any times, values,
//! offsets, options and outputs. Property: it returns (Ok or Err) and never panics; an Ok result has
//! one row per input row in every column asked for, none in the others, and only the documented
//! flag bits.
#![no_main]

mod common;

use common::Bytes;
use libfuzzer_sys::fuzz_target;
use osculate::diff::FdOrder;
use osculate::frame::Thresholds;
use osculate::kinematics::{kinematics, Options, Outputs};
use osculate::uncertainty::Significance;

fuzz_target!(|data: &[u8]| {
    let mut b = Bytes::new(data);
    let dim = (b.u8() % 6) as usize;
    // Mostly short tracks; now and then a long one that spans several parallel jobs (16384 rows).
    let n = if b.chance(3) {
        16_000 + (b.u16() as usize % 20_000)
    } else {
        b.u16() as usize % 200
    };
    let order = if b.chance(128) {
        FdOrder::Two
    } else {
        FdOrder::Four
    };
    let t = b.times(n);
    let len = if b.chance(8) {
        b.u16() as usize % 600
    } else {
        n * dim
    };
    let x = b.values(len);
    let offsets = b.offsets(n);
    let thresholds = Thresholds {
        min_speed: if b.chance(200) { 1e-3 } else { b.f64_any() },
        min_curvature: if b.chance(200) { 1e-6 } else { b.f64_any() },
    };
    let gap_factor = if b.chance(200) { 5.0 } else { b.f64_any() };
    let up = if b.chance(128) {
        None
    } else {
        Some([b.f64_any(), b.f64_any(), b.f64_any()])
    };
    // Every output, or any subset of them (a column not asked for must stay empty).
    let outputs = if b.chance(128) {
        Outputs::ALL
    } else {
        let names: Vec<&str> = Outputs::NAMES
            .iter()
            .copied()
            .filter(|_| b.chance(128))
            .collect();
        Outputs::from_names(names).expect("known names")
    };
    let opts = Options {
        order,
        outputs,
        thresholds,
        gap_factor,
        up,
        uncertainty: b.chance(128),
        significance: Significance {
            speed: b.chance(128),
            curvature: b.chance(128),
            z: if b.chance(200) { 3.0 } else { b.f64_any() },
            max_relative: if b.chance(200) { 0.25 } else { b.f64_any() },
        },
    };
    if let Ok(k) = kinematics(&t, &x, dim, &offsets, &opts) {
        assert_eq!(k.n, n);
        assert_eq!(k.dim, dim);
        for (name, col, w) in [
            ("velocity", &k.velocity, dim),
            ("jerk", &k.jerk, dim),
            ("speed", &k.speed, 1),
            ("arclength", &k.arclength, 1),
            ("binormal", &k.binormal, 3),
            ("torsion", &k.torsion, 1),
            ("center", &k.center, dim),
            ("angular_accel", &k.angular_accel, 1),
        ] {
            let asked = outputs.has(name);
            assert_eq!(col.len(), if asked { n * w } else { 0 }, "{name}");
        }
        assert_eq!(k.flags.len(), n);
        // STOPPED 1, STRAIGHT 2, EDGE 4, GAP 8, INVALID 16, VAGUE 32.
        assert!(
            k.flags.iter().all(|f| f & !63 == 0),
            "undocumented flag bit"
        );
        // A row with a non-finite coordinate is INVALID (documented in the Flag docs).
        for i in 0..n {
            if x[i * dim..(i + 1) * dim].iter().any(|v| !v.is_finite()) {
                assert_ne!(k.flags[i] & 16, 0, "row {i} not flagged INVALID");
            }
        }
    }
});

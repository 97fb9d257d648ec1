//! `osculate::turns::{turns, speed_changes}` and `osculate::summary::summarize` on arbitrary
//! per-sample columns (NaN, infinities, huge and tiny values, any flags) and offsets. Property:
//! never panics; every row found lies inside its track, first <= last, in track order.
#![no_main]

mod common;

use common::Bytes;
use libfuzzer_sys::fuzz_target;
use osculate::summary::{summarize, Samples as SummarySamples};
use osculate::turns::{speed_changes, turns, Samples, SpeedOptions, TurnOptions};

fuzz_target!(|data: &[u8]| {
    let mut b = Bytes::new(data);
    let n = b.u16() as usize % 400;
    let t = b.times(n);
    let s = b.values(n);
    let kappa = b.values(n);
    let se = if b.chance(128) { Some(b.values(n)) } else { None };
    let speed = b.values(n);
    let an = b.values(n);
    let at = b.values(n);
    let flags: Vec<u8> = (0..n).map(|_| b.u8() & 63).collect();
    let xy = b.values(2 * n);
    let vxy = b.values(2 * n);
    let offsets = b.offsets(n);
    let samples = Samples {
        t: &t,
        s: &s,
        curvature: &kappa,
        curvature_se: se.as_deref(),
        speed: &speed,
        accel_normal: &an,
        accel_tangential: &at,
        accel_tangential_se: se.as_deref(),
        flags: &flags,
        xy: &xy,
        vxy: &vxy,
    };
    let opts = TurnOptions {
        merge_samples: b.u8() as usize % 8,
        half: b.u8() as usize % 4,
        ..TurnOptions::default()
    };
    let inside = |track: usize, first: usize, last: usize| {
        let (a, z) = (offsets[track] as usize, offsets[track + 1] as usize);
        assert!(a <= first && first <= last && last < z, "rows {first}..{last} outside {a}..{z}");
    };
    if let Ok(found) = turns(&samples, &offsets, &opts) {
        for w in found.windows(2) {
            assert!((w[0].track, w[0].last) < (w[1].track, w[1].first) || w[0].track < w[1].track);
        }
        found.iter().for_each(|r| inside(r.track, r.first, r.last));
    }
    let speed_opts = SpeedOptions {
        accel_on: 0.5,
        accel_off: 0.25,
        z_on: 3.0,
        z_off: 1.0,
        min_samples: 1 + b.u8() as usize % 4,
    };
    if let Ok(found) = speed_changes(&samples, &offsets, &speed_opts) {
        found.iter().for_each(|r| inside(r.track, r.first, r.last));
    }
    let jerk = b.values(2 * n);
    let summary = SummarySamples {
        t: &t,
        flags: &flags,
        speed: &speed,
        accel_tangential: &at,
        accel_normal: &an,
        curvature: &kappa,
        angular_speed: &at,
        arclength: &s,
        jerk: &jerk,
        dim: 2,
        se: [se.as_deref(); 5],
    };
    let half = vec![b.u8() as usize % 10; offsets.len().saturating_sub(1)];
    if let Ok(rows) = summarize(&summary, &offsets, &half) {
        assert_eq!(rows.len(), offsets.len().saturating_sub(1));
    }
});

//! `osculate::geodesy::geodetic_to_enu` (first-fix or given origins) and `enu_to_geodetic` on
//! arbitrary coordinates, offsets and origins. Property: never panics; Ok results have 3 values per
//! row (and per track for the origins).
#![no_main]

mod common;

use common::Bytes;
use libfuzzer_sys::fuzz_target;
use osculate::geodesy::{enu_to_geodetic, geodetic_to_enu, Origin};

fuzz_target!(|data: &[u8]| {
    let mut b = Bytes::new(data);
    let rows = b.u8() as usize % 100;
    let len = if b.chance(240) {
        3 * rows
    } else {
        b.u16() as usize % 400
    };
    let values: Vec<f64> = if b.chance(128) {
        // Plausible fixes: latitude, longitude in degrees, height in metres, a few spikes.
        let mut v = Vec::with_capacity(len);
        for i in 0..len {
            let u = (b.u8() as f64 - 128.0) / 128.0;
            v.push(match i % 3 {
                0 => 90.0 * u,
                1 => 180.0 * u,
                _ => 1e4 * u,
            });
        }
        for _ in 0..b.u8() % 3 {
            if len > 0 {
                let at = b.u16() as usize % len;
                v[at] = b.f64_any();
            }
        }
        v
    } else {
        b.values(len)
    };
    let n = len / 3;
    let offsets = b.offsets(n);
    let m = offsets.len().saturating_sub(1);
    let given: Vec<f64> = {
        let k = match b.u8() % 4 {
            0 => 3,
            1 => 3 * m,
            _ => b.u8() as usize % 13,
        };
        (0..k)
            .map(|i| {
                if b.chance(200) {
                    [45.0, 7.0, 300.0][i % 3]
                } else {
                    b.f64_any()
                }
            })
            .collect()
    };
    let origin = if b.chance(128) {
        Origin::FirstFix
    } else {
        Origin::Given(&given)
    };
    if let Ok(c) = geodetic_to_enu(&values, &offsets, origin) {
        assert_eq!(c.enu.len(), 3 * n);
        assert_eq!(c.origins.len(), 3 * m);
    }
    if let Ok(llh) = enu_to_geodetic(&values, &offsets, Origin::Given(&given)) {
        assert_eq!(llh.len(), 3 * n);
    }
});

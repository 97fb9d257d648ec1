//! `osculate::arclength::polyline` on arbitrary rows, dimensions 0..5 and offsets. Property: never
//! panics; an Ok result has one length per row and never decreases along a track (NaN rows aside).
#![no_main]

mod common;

use common::Bytes;
use libfuzzer_sys::fuzz_target;
use osculate::arclength::polyline;

fuzz_target!(|data: &[u8]| {
    let mut b = Bytes::new(data);
    let dim = (b.u8() % 6) as usize;
    let rows = b.u16() as usize % 300;
    let len = if b.chance(16) {
        b.u16() as usize % 1000
    } else {
        rows * dim
    };
    let x = b.values(len);
    let n = len.checked_div(dim).unwrap_or(rows);
    let offsets = b.offsets(n);
    if let Ok(s) = polyline(&x, dim, &offsets) {
        assert_eq!(s.len(), n);
        for w in offsets.windows(2) {
            let track = &s[w[0] as usize..w[1] as usize];
            let finite: Vec<f64> = track.iter().copied().filter(|v| !v.is_nan()).collect();
            assert!(
                finite.first().is_none_or(|&v| v == 0.0),
                "track starts at {finite:?}"
            );
            assert!(
                finite.windows(2).all(|p| p[1] >= p[0]),
                "length decreases: {finite:?}"
            );
        }
    }
});

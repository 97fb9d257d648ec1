//! `osculate::batch::check_offsets` on arbitrary offsets and row counts. Property: never panics; an
//! Ok result starts at 0, ends at n and strictly increases (every track non-empty).
#![no_main]

mod common;

use common::Bytes;
use libfuzzer_sys::fuzz_target;
use osculate::batch::check_offsets;

fuzz_target!(|data: &[u8]| {
    let mut b = Bytes::new(data);
    let n = match b.u8() % 4 {
        0 => b.u64() as usize,
        _ => b.u16() as usize % 64,
    };
    let offsets: Vec<i64> = if b.chance(128) {
        b.offsets(n.min(1 << 16))
    } else {
        let len = b.u8() as usize % 12;
        (0..len)
            .map(|_| match b.u8() % 5 {
                0 => b.u64() as i64,
                1 => n as i64,
                2 => i64::MIN,
                3 => i64::MAX,
                _ => (b.u8() % 80) as i64 - 8,
            })
            .collect()
    };
    if let Ok(off) = check_offsets(&offsets, n) {
        assert_eq!(off.first(), Some(&0));
        assert_eq!(off.last(), Some(&n));
        assert!(off.windows(2).all(|w| w[1] > w[0]));
        assert_eq!(off.len(), offsets.len());
    }
});

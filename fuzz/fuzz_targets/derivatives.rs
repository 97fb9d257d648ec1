//! `osculate::diff::derivatives_at` (and through it `fornberg`) on any nodes: repeated, unsorted,
//! non-finite, huge or tiny times, any values, dimensions 0..5 and both orders; plus `fornberg`
//! alone on 0..7 nodes. Property: never panics. The callers' preconditions are kept: the sample
//! index lies inside the track, rows have the dimension's width, and fornberg gets at most 7 nodes
//! and derivative orders up to 3.
#![no_main]

mod common;

use common::Bytes;
use libfuzzer_sys::fuzz_target;
use osculate::diff::{derivatives_at, fornberg, reach, FdOrder, MAX_DERIV, MAX_WIDTH};

fn at<const D: usize>(t: &[f64], x: &[f64], i: usize, order: FdOrder) {
    let mut gram = [0.0; 10];
    let (d1, d2, d3, _edge) = derivatives_at::<D>(t, x, i, order, Some(&mut gram));
    assert_eq!((d1.len(), d2.len(), d3.len()), (D, D, D));
    let (lo, hi) = reach(i, t.len(), order);
    assert!(
        lo <= i && i <= hi && hi < t.len(),
        "reach {lo}..={hi} of row {i}"
    );
}

fuzz_target!(|data: &[u8]| {
    let mut b = Bytes::new(data);
    if b.chance(64) {
        let width = (b.u8() as usize) % (MAX_WIDTH + 1);
        let m = (b.u8() as usize) % (MAX_DERIV + 1);
        let z = b.f64_any();
        let nodes: Vec<f64> = (0..width).map(|_| b.f64_any()).collect();
        let _ = fornberg(z, &nodes, m);
        return;
    }
    let dim = (b.u8() % 6) as usize;
    let n = 1 + (b.u8() as usize % 12);
    let order = if b.chance(128) {
        FdOrder::Two
    } else {
        FdOrder::Four
    };
    let t = b.times(n);
    let x = b.values(n * dim);
    let i = b.u8() as usize % n;
    match dim {
        0 => at::<0>(&t, &x, i, order),
        1 => at::<1>(&t, &x, i, order),
        2 => at::<2>(&t, &x, i, order),
        3 => at::<3>(&t, &x, i, order),
        4 => at::<4>(&t, &x, i, order),
        _ => at::<5>(&t, &x, i, order),
    }
});

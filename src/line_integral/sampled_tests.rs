//! Unit tests of the sampled rules that look inside them (the centred closed form against the
//! Lagrange form), and the segment-by-segment Lagrange reference of the other tests.

use super::*;

/// Σ over the segments of one open track (`n` rows of 3-D work, chord-length parameter) of the
/// cubic rule in its Lagrange form, segment by segment: the reference of the tests.
pub(crate) fn lagrange_cubic_total(x: &[f64], f: &[f64], n: usize) -> f64 {
    let smp = Sampled {
        x,
        f,
        dim: 3,
        comps: 3,
        t: None,
        rule: Rule::Cubic,
        kind: Kind::Scalar, // anything but Work: keeps `cubic` on the Lagrange form
        closed: false,
        estimate: false,
    };
    let rows = 0..n;
    let mut sum = 0.0;
    for i in 0..n - 1 {
        // `cubic` picks the stencil; with kind Scalar it integrates F₀ |r′|, so rebuild the
        // stencil here and integrate F·r′ with the same nodes.
        let (k, nodes, at) = smp.stencil_rows(&rows, i, i + 1).expect("4 rows or more");
        let mut u = [0.0; 4];
        for j in (0..at).rev() {
            u[j] = u[j + 1] - smp.du(nodes[j], nodes[j + 1]);
        }
        for j in at + 1..k {
            u[j] = u[j - 1] + smp.du(nodes[j - 1], nodes[j]);
        }
        let work = Sampled {
            kind: Kind::Work,
            ..smp
        };
        sum += match k {
            4 => work.stencil::<4, 3, 3>(&nodes, &u, at),
            _ => work.stencil::<3, 3, 3>(&nodes, &u, at),
        };
    }
    sum
}

#[test]
fn centred_closed_form_is_the_gauss_legendre_lagrange_integral() {
    // The correction of the module docs plus the trapezoid term against 3-point
    // Gauss–Legendre on the product of the Lagrange interpolants (exact for degree 5), on
    // random uneven stencils, chord-length and time parameters: equal to 1e-13 of the
    // scale |F|·|Δx| of the segment (rounding of a few dozen operations).
    let mut s = 0x9e37_79b9_7f4a_7c15_u64;
    let mut next = || {
        s ^= s << 13;
        s ^= s >> 7;
        s ^= s << 17;
        (s >> 11) as f64 / (1u64 << 53) as f64
    };
    for case in 0..200 {
        let x: Vec<f64> = (0..12).map(|_| 4.0 * next() - 2.0).collect();
        let f: Vec<f64> = (0..12).map(|_| 10.0 * next() - 5.0).collect();
        let t: Vec<f64> = (0..4)
            .scan(0.0, |acc, _| {
                *acc += 0.05 + next();
                Some(*acc)
            })
            .collect();
        let times = (case % 2 == 0).then_some(&t[..]);
        let smp = Sampled {
            x: &x,
            f: &f,
            dim: 3,
            comps: 3,
            t: times,
            rule: Rule::Cubic,
            kind: Kind::Work,
            closed: false,
            estimate: true,
        };
        let nodes = [0, 1, 2, 3];
        let mut u = [0.0; 4];
        u[0] = -smp.du(0, 1);
        u[2] = smp.du(1, 2);
        u[3] = u[2] + smp.du(2, 3);
        let lagrange = smp.stencil::<4, 3, 3>(&nodes, &u, 1);
        let closed = smp.centred_at::<3>([0, 1, 2, 3]);
        let scale = 5.0 * 3.0 * dist(smp.xr(1), smp.xr(2)) + 1e-300;
        assert!(
            (lagrange - closed).abs() <= 1e-13 * scale,
            "case {case}: {lagrange} vs {closed}"
        );
        // The row-by-row rule takes the closed form on a centred stencil.
        let rows = 0..4;
        assert_eq!(smp.cubic(&rows, 1, 2), closed);
    }
}

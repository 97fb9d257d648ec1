//! Unit tests of the line integrals against closed forms and invariants.

use super::*;
use crate::batch;
use crate::field::GridField;
use crate::field::Outside;
use approx::assert_relative_eq;
use std::f64::consts::PI;

const G: f64 = 9.80665;

/// A deterministic wandering 3-D path (xorshift steps).
fn wander(n: usize, seed: u64) -> Vec<f64> {
    let mut s = seed;
    let mut next = || {
        s ^= s << 13;
        s ^= s >> 7;
        s ^= s << 17;
        (s >> 11) as f64 / (1u64 << 53) as f64 - 0.5
    };
    let mut x = vec![0.0; 3 * n];
    for i in 1..n {
        for c in 0..3 {
            x[3 * i + c] = x[3 * (i - 1) + c] + next();
        }
    }
    x
}

fn circle(n: usize, r: f64) -> Vec<f64> {
    (0..n)
        .flat_map(|i| {
            let a = 2.0 * PI * i as f64 / n as f64;
            [r * a.cos(), r * a.sin()]
        })
        .collect()
}

fn ruled(rule: Rule, o: Options) -> Options {
    Options { rule, ..o }
}

fn noded(nodes: usize, o: Options) -> Options {
    Options { nodes, ..o }
}

fn opts(kind: Kind, closed: bool, cumulative: bool) -> Options {
    Options {
        kind,
        closed,
        cumulative,
        ..Options::default()
    }
}

#[test]
fn gravity_work_is_path_independent() {
    // W = −m g Δz for a constant force, exactly (conservative field); 1e-12 relative.
    let n = 3 * batch::CHUNK + 17; // several parallel jobs
    let x = wander(n, 7);
    let f = [0.0, 0.0, -G].repeat(n);
    let dz = x[3 * n - 1] - x[2];
    let exact = -G * dz;
    for rule in [Rule::Trapezoid, Rule::Cubic] {
        let w = sampled(
            &x,
            3,
            &f,
            &[0, n as i64],
            None,
            &ruled(rule, opts(Kind::Work, false, true)),
        )
        .unwrap();
        assert_relative_eq!(w.total[0], exact, max_relative = 1e-12);
        assert_eq!(w.cumulative[n - 1], w.total[0]);
        assert_relative_eq!(
            w.cumulative[1000],
            -G * (x[3 * 1000 + 2] - x[2]),
            epsilon = 1e-9
        );
    }
    let v = [0.0, 0.0, -G].repeat(8);
    let grid = GridField::new(&v, &[2, 2, 2], 3, &[-1e3; 3], &[2e3; 3], Outside::Error).unwrap();
    let w = gridded(
        &x,
        3,
        &[0, n as i64],
        None,
        &grid,
        &noded(2, opts(Kind::Work, false, false)),
    )
    .unwrap();
    assert_relative_eq!(w.total[0], exact, max_relative = 1e-12);
}

#[test]
fn circulation_of_rotation_field_converges_at_each_rules_order() {
    // F = (−y, x): ∮ F·dr = 2 π r² (Stokes' theorem, curl F = 2). Trapezoid on the inscribed
    // polygon: n r² sin(2π/n) exactly (twice the polygon's area), an O(h²) error; the cubic
    // rule converges as h⁴ (observed order within 0.3 of 4).
    let r = 1.5;
    let exact = 2.0 * PI * r * r;
    let mut errs = Vec::new();
    for n in [16usize, 32, 64] {
        let x = circle(n, r);
        let f: Vec<f64> = x.chunks(2).flat_map(|p| [-p[1], p[0]]).collect();
        let o = opts(Kind::Work, true, false);
        let trap = sampled(&x, 2, &f, &[0, n as i64], None, &ruled(Rule::Trapezoid, o)).unwrap();
        let polygon = n as f64 * r * r * (2.0 * PI / n as f64).sin();
        assert_relative_eq!(trap.total[0], polygon, max_relative = 1e-13);
        let cub = sampled(&x, 2, &f, &[0, n as i64], None, &ruled(Rule::Cubic, o)).unwrap();
        errs.push((cub.total[0] - exact).abs());
        // The estimate is the difference of the two rules.
        assert_relative_eq!(
            cub.error[0],
            (cub.total[0] - polygon).abs(),
            max_relative = 1e-9
        );
    }
    for w in errs.windows(2) {
        let order = (w[0] / w[1]).log2();
        assert!((order - 4.0).abs() < 0.3, "observed order {order}");
    }
}

#[test]
fn cubic_is_exact_for_cubic_paths_and_forces_in_time() {
    // r(t) = (t, t², t³), F(t) = (1 + t, t², 2 − t³) on uneven times. With the time as
    // parameter the four-point interpolants are exact, and F·r′ has degree 5, so the rule is
    // exact (to rounding, 1e-13): the closed form below.
    let t: Vec<f64> = [0.0, 0.1, 0.35, 0.5, 0.9, 1.0, 1.45, 1.7, 2.0].to_vec();
    let x: Vec<f64> = t.iter().flat_map(|&s| [s, s * s, s * s * s]).collect();
    let f: Vec<f64> = t
        .iter()
        .flat_map(|&s| [1.0 + s, s * s, 2.0 - s * s * s])
        .collect();
    // F·r′ = (1 + t) + 2t³ + (2 − t³)·3t² = 1 + t + 2t³ + 6t² − 3t⁵.
    let b: f64 = 2.0;
    let exact = b + b * b / 2.0 + b.powi(4) / 2.0 + 2.0 * b.powi(3) - b.powi(6) / 2.0;
    let n = t.len() as i64;
    let w = sampled(
        &x,
        3,
        &f,
        &[0, n],
        Some(&t),
        &ruled(Rule::Cubic, opts(Kind::Work, false, false)),
    )
    .unwrap();
    assert_relative_eq!(w.total[0], exact, max_relative = 1e-13);
}

#[test]
fn scalar_integral_of_one_is_length() {
    // ∫ 1 ds on straight segments is the polyline length (arclength::polyline, 1e-14).
    let n = 500;
    let x = wander(n, 3);
    let one = vec![1.0; n];
    let w = sampled(
        &x,
        3,
        &one,
        &[0, 200, n as i64],
        None,
        &ruled(Rule::Trapezoid, opts(Kind::Scalar, false, true)),
    )
    .unwrap();
    let s = crate::arclength::polyline(&x, 3, &[0, 200, n as i64]).unwrap();
    assert_relative_eq!(w.total[0], s[199], max_relative = 1e-14);
    assert_relative_eq!(w.total[1], s[n - 1], max_relative = 1e-14);
    for i in [0, 50, 199, 200, 201, 499] {
        assert_relative_eq!(w.cumulative[i], s[i], max_relative = 1e-13);
    }
}

#[test]
fn nan_rows_are_skipped_and_bridged() {
    // Skipping row 2 equals integrating the path without it.
    let x = [0.0, 0.0, 1.0, 0.5, f64::NAN, 9.0, 3.0, 1.0, 4.0, 3.0];
    let f = [1.0, 2.0, 0.5, 1.0, 7.0, 7.0, -1.0, 0.0, 2.0, 2.0];
    let keep = [0.0, 0.0, 1.0, 0.5, 3.0, 1.0, 4.0, 3.0];
    let fk = [1.0, 2.0, 0.5, 1.0, -1.0, 0.0, 2.0, 2.0];
    for rule in [Rule::Trapezoid, Rule::Cubic] {
        let a = sampled(
            &x,
            2,
            &f,
            &[0, 5],
            None,
            &ruled(rule, opts(Kind::Work, false, true)),
        )
        .unwrap();
        let b = sampled(
            &keep,
            2,
            &fk,
            &[0, 4],
            None,
            &ruled(rule, opts(Kind::Work, false, true)),
        )
        .unwrap();
        assert_eq!(a.total, b.total);
        assert_eq!(a.skipped, vec![1]);
        assert!(a.cumulative[2].is_nan());
        assert_eq!(a.cumulative[4], b.cumulative[3]);
    }
    // A NaN force skips the row too; a track without a usable row has a NaN total.
    let mut f2 = f;
    f2[1] = f64::NAN;
    let a = sampled(
        &x,
        2,
        &f2,
        &[0, 1, 5],
        None,
        &ruled(Rule::Cubic, opts(Kind::Work, false, false)),
    )
    .unwrap();
    assert!(a.total[0].is_nan());
    assert_eq!(a.skipped, vec![1, 1]);
}

#[test]
fn reversal_negates_and_splitting_adds() {
    let n = 300;
    let x = wander(n, 11);
    let f: Vec<f64> = x
        .chunks(3)
        .flat_map(|p| [p[1].sin(), p[2] * p[0], 1.0 + p[0]])
        .collect();
    let o = opts(Kind::Work, false, false);
    let rev = |a: &[f64]| -> Vec<f64> { a.chunks(3).rev().flatten().copied().collect() };
    let whole = sampled(&x, 3, &f, &[0, n as i64], None, &ruled(Rule::Trapezoid, o)).unwrap();
    let back = sampled(
        &rev(&x),
        3,
        &rev(&f),
        &[0, n as i64],
        None,
        &ruled(Rule::Trapezoid, o),
    )
    .unwrap();
    assert_relative_eq!(back.total[0], -whole.total[0], max_relative = 1e-12);
    // Splitting at row 120 (the sample shared by both pieces).
    let a = sampled(
        &x[..3 * 121],
        3,
        &f[..3 * 121],
        &[0, 121],
        None,
        &ruled(Rule::Trapezoid, o),
    )
    .unwrap();
    let b = sampled(
        &x[3 * 120..],
        3,
        &f[3 * 120..],
        &[0, (n - 120) as i64],
        None,
        &ruled(Rule::Trapezoid, o),
    )
    .unwrap();
    assert_relative_eq!(
        a.total[0] + b.total[0],
        whole.total[0],
        max_relative = 1e-12
    );
}

#[test]
fn node_values_give_the_grid_result() {
    // Evaluating the grid at the handed-out nodes and integrating the values is the grid
    // integral (same nodes, same sums): equal to 1e-14.
    let shape = [5usize, 6];
    let v: Vec<f64> = (0..30 * 2).map(|i| (0.3 * i as f64).cos()).collect();
    let grid = GridField::new(&v, &shape, 2, &[0.0, 0.0], &[1.0, 1.0], Outside::Error).unwrap();
    let x = [
        0.5,
        0.5,
        1.2,
        3.3,
        3.9,
        4.1,
        3.0,
        0.2,
        f64::NAN,
        1.0,
        1.0,
        1.0,
    ];
    let off = [0, 4, 6];
    for closed in [false, true] {
        let o = opts(Kind::Work, closed, true);
        let direct = gridded(&x, 2, &off, None, &grid, &noded(3, o)).unwrap();
        let nodes = segment_nodes(&x, 2, &off, None, &noded(3, o)).unwrap();
        let vals = grid.eval_points(&nodes.points, 2).unwrap();
        let via = from_values(&x, 2, &off, &vals, &noded(3, o)).unwrap();
        for k in 0..2 {
            assert_relative_eq!(via.total[k], direct.total[k], max_relative = 1e-14);
            assert_relative_eq!(
                via.error[k],
                direct.error[k],
                max_relative = 1e-12,
                epsilon = 1e-15
            );
        }
        assert_eq!(direct.skipped, vec![0, 1]);
        // Track 1 holds one usable row: no segment, total 0.
        assert_eq!(direct.total[1], 0.0);
    }
    let bad = from_values(
        &x,
        2,
        &off,
        &[1.0; 4],
        &noded(3, opts(Kind::Work, false, false)),
    );
    assert!(bad.unwrap_err().to_string().contains("expected 15 nodes"));
}

#[test]
fn leaving_the_grid_names_the_sample() {
    let v = [1.0; 8];
    let grid = GridField::new(&v, &[2, 2], 2, &[0.0, 0.0], &[1.0, 1.0], Outside::Error).unwrap();
    let x = [0.1, 0.1, 0.5, 0.5, 1.5, 0.5, 0.2, 0.2];
    let err = gridded(
        &x,
        2,
        &[0, 1, 4],
        None,
        &grid,
        &noded(2, Options::default()),
    )
    .unwrap_err();
    assert_eq!((err.track(), err.row()), (Some(1), Some(2)));
    let nan = GridField::new(&v, &[2, 2], 2, &[0.0, 0.0], &[1.0, 1.0], Outside::Nan).unwrap();
    let w = gridded(&x, 2, &[0, 1, 4], None, &nan, &noded(2, Options::default())).unwrap();
    assert!(w.total[1].is_nan() && w.total[0] == 0.0);
}

#[test]
fn non_finite_node_value_is_reported() {
    let x = [0.0, 0.0, 1.0, 0.0, 2.0, 0.0];
    let o = Options::default();
    let nodes = segment_nodes(&x, 2, &[0, 3], None, &noded(2, o)).unwrap();
    let mut vals = vec![1.0; nodes.points.len()];
    vals[2 * 3 + 1] = f64::NAN; // node 3 = second segment
    let err = from_values(&x, 2, &[0, 3], &vals, &noded(2, o)).unwrap_err();
    assert_eq!(err.row(), Some(1));
    assert!(err.to_string().contains("node 3"));
}

#[test]
fn fast_path_is_bitwise_the_generic_sum() {
    // Totals without cumulative output take the streaming fast path (both rules in one sweep);
    // with it, the generic row-by-row loop: identical bits for totals and error estimates, with
    // either rule, times or chord length, open or closed, across job boundaries, with a NaN row
    // and a repeated point (which leave the centred stencil).
    let n = 2 * batch::CHUNK + 101;
    let mut x = wander(n, 5);
    let t: Vec<f64> = (0..n)
        .map(|i| i as f64 * 0.1 + (i as f64).sin() * 0.01)
        .collect();
    let f: Vec<f64> = x.iter().map(|v| (0.3 * v).sin()).collect();
    for round in 0..3 {
        let off = [0, 777, n as i64];
        for rule in [Rule::Trapezoid, Rule::Cubic] {
            for estimate in [false, true] {
                for (closed, times) in [(false, None), (false, Some(&t[..])), (true, None)] {
                    let o = |cumulative| Options {
                        estimate,
                        rule,
                        ..opts(Kind::Work, closed, cumulative)
                    };
                    let fast = sampled(&x, 3, &f, &off, times, &o(false)).unwrap();
                    let slow = sampled(&x, 3, &f, &off, times, &o(true)).unwrap();
                    assert_eq!(
                        fast.total, slow.total,
                        "{round} {rule:?} {estimate} {closed}"
                    );
                    assert_eq!(
                        fast.error.iter().map(|e| e.to_bits()).collect::<Vec<_>>(),
                        slow.error.iter().map(|e| e.to_bits()).collect::<Vec<_>>()
                    );
                }
            }
        }
        // The gridded sweep against its row-by-row loop too.
        let v: Vec<f64> = (0..4 * 4 * 4 * 3)
            .map(|i| (0.37 * i as f64).sin())
            .collect();
        let grid = GridField::new(&v, &[4, 4, 4], 3, &[-300.0; 3], &[200.0; 3], Outside::Error);
        let grid = grid.unwrap();
        for estimate in [false, true] {
            let o = |cumulative| Options {
                estimate,
                nodes: 3,
                ..opts(Kind::Work, false, cumulative)
            };
            let fast = gridded(&x, 3, &off, None, &grid, &o(false)).unwrap();
            let slow = gridded(&x, 3, &off, None, &grid, &o(true)).unwrap();
            let bits = |v: &[f64]| v.iter().map(|e| e.to_bits()).collect::<Vec<_>>();
            assert_eq!(bits(&fast.total), bits(&slow.total));
            assert_eq!(bits(&fast.error), bits(&slow.error));
        }
        if round == 0 {
            x[3 * (batch::CHUNK + 5)] = f64::NAN; // a job with a skipped row
        } else {
            let (a, b) = (3 * (batch::CHUNK + 40), 3 * (batch::CHUNK + 41));
            let p: Vec<f64> = x[a..a + 3].to_vec();
            x[b..b + 3].copy_from_slice(&p); // a repeated point
        }
    }
}

#[test]
fn streaming_estimate_matches_the_lagrange_rule() {
    // The error estimate of the streaming sweep (closed-form cubic correction) against the
    // cubic rule evaluated segment by segment with the Gauss–Legendre Lagrange form: the same
    // quadrature in another order of operations, so equal to rounding. Tolerance 1e-12 of
    // Σ|F|·|Δx| (the scale of the terms; a few dozen roundings per segment).
    let n = 50_000;
    let x = wander(n, 9);
    let f: Vec<f64> = x
        .chunks(3)
        .flat_map(|p| [p[1].sin(), p[2] * p[0] * 0.1, 1.0 + p[0].cos()])
        .collect();
    let o = opts(Kind::Work, false, false);
    let w = sampled(&x, 3, &f, &[0, n as i64], None, &o).unwrap();
    let scale: f64 = (1..n)
        .map(|i| {
            let dx: f64 = (0..3)
                .map(|c| (x[3 * i + c] - x[3 * i - 3 + c]).powi(2))
                .sum::<f64>()
                .sqrt();
            dx * (0..3).map(|c| f[3 * i + c].abs()).sum::<f64>()
        })
        .sum();
    let lagrange = super::sampled::tests::lagrange_cubic_total(&x, &f, n);
    let trap = w.total[0];
    assert!(
        ((trap - lagrange).abs() - w.error[0]).abs() <= 1e-12 * scale,
        "{} vs {}",
        (trap - lagrange).abs(),
        w.error[0]
    );
    assert!(w.error[0] > 1e-9 * scale); // a curved path: the estimate is not rounding noise
}

#[test]
fn options_are_checked_once_with_the_argument_named() {
    let new = |kind, s, rule, nodes| Options::new(kind, s, rule, nodes, false, false, true);
    let msg = |r: Result<Options, crate::KernelError>| r.unwrap_err().to_string();
    use Integrand::{Field, Sampled};
    assert_eq!(
        new("work", Sampled, None, None).unwrap().rule,
        Rule::Trapezoid
    );
    assert_eq!(new("scalar", Field, None, None).unwrap().nodes, 2);
    assert_eq!(new("scalar", Field, None, None).unwrap().argument, "f");
    assert!(msg(new("heat", Sampled, None, None)).starts_with("kind: expected one of"));
    assert!(msg(new("work", Sampled, Some("simpson"), None)).starts_with("rule: expected one of"));
    assert!(msg(new("work", Sampled, None, Some(2))).starts_with("nodes: applies to gridded"));
    assert!(msg(new("work", Field, Some("cubic"), None)).starts_with("rule: gridded and callable"));
    for q in [0, 6, -1] {
        assert!(msg(new("work", Field, None, Some(q))).starts_with("nodes: must be 1 to 5"));
    }
    let five = new("work", Field, Some("gauss-legendre"), Some(5)).unwrap();
    assert_eq!(five.describe(Field), "gauss-legendre, 5 nodes per segment");
}

#[test]
fn power_is_force_dot_velocity_and_names_rows() {
    // F·v by hand (exact small integers); a grid field constant (0, 0, -g) gives -g v_z.
    let x = [
        0.0,
        0.0,
        0.0,
        1.0,
        1.0,
        1.0,
        f64::NAN,
        0.0,
        0.0,
        2.0,
        2.0,
        2.0,
    ];
    let v = [1.0, 2.0, 3.0, 0.0, 0.0, 2.0, 1.0, 1.0, 1.0, 1.0, 0.0, -1.0];
    let f = [1.0, 1.0, 1.0, 2.0, 0.0, 1.0, 5.0, 5.0, 5.0, 0.0, 3.0, 4.0];
    let p = power(&x, 3, &[0, 2, 4], &v, PowerForce::Sampled(&f), "force").unwrap();
    assert_eq!((p[0], p[1], p[2], p[3]), (6.0, 2.0, 15.0, -4.0));
    let g = [0.0, 0.0, -G].repeat(8);
    let grid = GridField::new(&g, &[2, 2, 2], 3, &[-1.0; 3], &[4.0; 3], Outside::Error).unwrap();
    let p = power(&x, 3, &[0, 2, 4], &v, PowerForce::Grid(&grid), "force").unwrap();
    assert_eq!((p[0], p[1], p[3]), (-3.0 * G, -2.0 * G, G));
    assert!(p[2].is_nan()); // no position
    let small = GridField::new(&g, &[2, 2, 2], 3, &[-1.0; 3], &[2.5; 3], Outside::Error).unwrap();
    let err = power(&x, 3, &[0, 2, 4], &v, PowerForce::Grid(&small), "force").unwrap_err();
    assert_eq!((err.track(), err.row()), (Some(1), Some(3)));
    let mut back = f;
    back[4] = f64::NAN;
    let err = power(&x, 3, &[0, 2, 4], &v, PowerForce::Returned(&back), "force").unwrap_err();
    assert_eq!((err.track(), err.row()), (Some(0), Some(1)));
    assert!(err
        .to_string()
        .contains("the callable returned a non-finite value"));
}

#[test]
fn node_rule_pairs() {
    let r = NodeRule::new(2, true).unwrap();
    assert_eq!(r.len(), 3);
    assert_relative_eq!(r.main.iter().sum::<f64>(), 2.0, epsilon = 1e-15);
    assert_relative_eq!(r.companion.iter().sum::<f64>(), 2.0, epsilon = 1e-15);
    assert_eq!(NodeRule::new(1, true).unwrap().len(), 3);
    assert_eq!(NodeRule::new(4, false).unwrap().len(), 4);
    assert!(NodeRule::new(0, true).is_err() && NodeRule::new(6, true).is_err());
}

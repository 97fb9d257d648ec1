//! Unit tests of `fit`: closed forms and the checks of `fit_batch`.

use super::*;

/// An arc of radius 5 (about a quarter circle) at unit speed, sampled unevenly; 2-D rows.
fn arc(n: usize) -> (Vec<f64>, Vec<f64>) {
    let t: Vec<f64> = (0..n)
        .map(|i| {
            let u = i as f64 / (n - 1) as f64;
            (u + 0.05 * (7.0 * u).sin()) * 5.0 * std::f64::consts::FRAC_PI_2
        })
        .collect();
    let x = t
        .iter()
        .flat_map(|&s| [5.0 * (s / 5.0).cos(), 5.0 * (s / 5.0).sin()])
        .collect();
    (t, x)
}

#[test]
fn linear_fit_lengths_are_the_chords() {
    // The polyline's cumulative length is the sum of the chords (closed form: 3-4-5 steps).
    let t = [0.0, 1.0, 2.0, 3.0];
    let x = [0.0, 0.0, 3.0, 4.0, 6.0, 8.0, 6.0, 8.0];
    let f = fit_track(&t, &x, 2, None, &Method::Linear).unwrap();
    assert_eq!(f.cumulative_length().unwrap(), vec![0.0, 5.0, 10.0, 10.0]);
    let mut out = [0.0; 8];
    f.at_time(0.5, &mut out); // midway along the first chord, velocity (3, 4)
    assert_eq!(&out[..4], &[1.5, 2.0, 3.0, 4.0]);
}

#[test]
fn spline_arc_length_of_a_quarter_circle() {
    // Interpolating cubic through 41 uneven samples of an arc of radius 5 at unit speed: the
    // length is the elapsed time (closed form) to 1e-6 relative (spline error ~h⁴, h ≈ 0.2).
    let (t, x) = arc(41);
    let f = fit_track(&t, &x, 2, None, &Method::Spline(EndCondition::NotAKnot)).unwrap();
    let cum = f.cumulative_length().unwrap();
    let exact = t[40] - t[0];
    assert!((cum[40] / exact - 1.0).abs() < 1e-6, "{}", cum[40]);
    // length_to between samples agrees with the cumulative lengths at the samples.
    assert!((f.length_to(&cum, t[20]) - cum[20]).abs() < 1e-12);
    assert!(f.info().smoothing.is_nan());
}

#[test]
fn batch_skips_non_finite_rows_and_flags_short_tracks() {
    // Two tracks: the first has a NaN row (fitted on the others, its rows recorded); the
    // second has 3 finite rows of 4, fewer than a quintic smoothing spline needs (5).
    let (t1, x1) = arc(30);
    let mut x = x1.clone();
    x[2 * 10] = f64::NAN;
    let t2 = [0.0, 1.0, 2.0, 3.0, 4.0];
    let x2 = [0.0, 0.0, 1.0, 0.0, f64::NAN, 0.0, 3.0, 0.0, 4.0, 0.0];
    let mut t = t1.clone();
    t.extend(t2);
    x.extend(x2);
    let method = Method::Smooth {
        degree: 5,
        smoothing: Smoothing::Gcv,
        derivative: 0,
        covariance: None,
    };
    let fits = fit_batch(&t, &x, 2, &[0, 30, 35], None, &method).unwrap();
    let kept = fits.rows[0].as_ref().unwrap();
    assert_eq!(kept.len(), 29);
    assert!(!kept.contains(&10));
    assert!(matches!(fits.tracks[1], TrackFit::Invalid));
    assert!(fits.tracks[0].info().edf >= 3.0 - 1e-9); // tr A ≥ m = 3 (penalty null space)
}

#[test]
fn bad_weights_are_named() {
    let (t, x) = arc(20);
    let w = vec![1.0; 19];
    let method = Method::Smooth {
        degree: 3,
        smoothing: Smoothing::Gcv,
        derivative: 0,
        covariance: None,
    };
    let err = fit_batch(&t, &x, 2, &[0, 20], Some(&w), &method).unwrap_err();
    assert_eq!(err.argument(), "weights");
}

/// Uneven times 0 ≤ t ≤ ~6 (steps 0.1 to 0.3).
fn uneven(n: usize) -> Vec<f64> {
    let mut t = vec![0.0];
    for i in 1..n {
        t.push(t[i - 1] + 0.2 + 0.1 * (1.3 * i as f64).sin());
    }
    t
}

#[test]
fn smoothing_splines_reproduce_their_penalty_null_space() {
    // The penalty ∫|r^(m)|² vanishes on polynomials of degree < m, so at any λ the smoothing
    // spline reproduces them (closed form): lines for the cubic (m = 2), quadratics for the
    // quintic (m = 3). Tolerance 1e-8 absolute on derivatives of size ≤ 12 (rounding of the
    // band solves).
    let t = uneven(40);
    for (degree, smoothing) in [
        (3, Smoothing::Fixed(50.0)),
        (3, Smoothing::Gcv),
        (5, Smoothing::Fixed(50.0)),
    ] {
        let x: Vec<f64> = if degree == 3 {
            t.iter().flat_map(|&s| [2.0 * s + 1.0, -s]).collect()
        } else {
            t.iter().flat_map(|&s| [s * s, 3.0 * s]).collect()
        };
        let method = Method::Smooth {
            degree,
            smoothing,
            derivative: 0,
            covariance: None,
        };
        let f = fit_track(&t, &x, 2, None, &method).unwrap();
        let mut out = [0.0; 8];
        for (j, &tj) in t.iter().enumerate().step_by(7) {
            f.at_sample(j, &mut out);
            let want = if degree == 3 {
                [2.0 * tj + 1.0, -tj, 2.0, -1.0, 0.0, 0.0]
            } else {
                [tj * tj, 3.0 * tj, 2.0 * tj, 3.0, 2.0, 0.0]
            };
            for (k, w) in want.iter().enumerate() {
                assert!(
                    (out[k] - w).abs() < 1e-8,
                    "degree {degree}, t {tj}: {out:?}"
                );
            }
        }
        assert!(f.info().edf > 0.0 && f.info().bandwidth.is_finite());
    }
}

#[test]
fn local_polynomials_reproduce_polynomials_of_their_degree() {
    // Least squares is exact on data in the model space (closed form), between samples too.
    // x = t² − t, y = 0.5 t; tolerance 1e-9 absolute.
    let t = uneven(25);
    let x: Vec<f64> = t.iter().flat_map(|&s| [s * s - s, 0.5 * s]).collect();
    let method = Method::Local {
        degree: 2,
        window: Window::Samples(6),
        uncertainty: false,
    };
    let f = fit_track(&t, &x, 2, None, &method).unwrap();
    let mut out = [0.0; 8];
    f.at_time(1.37, &mut out);
    let want = [1.37 * 1.37 - 1.37, 0.685, 2.0 * 1.37 - 1.0, 0.5, 2.0, 0.0];
    for (k, w) in want.iter().enumerate() {
        assert!((out[k] - w).abs() < 1e-9, "{out:?}");
    }
    assert_eq!(f.info().window, 6.0);
    assert!(f.info().smoothing.is_nan());
}

#[test]
fn batch_checks_name_their_argument() {
    let t = uneven(12);
    let x3 = vec![0.5; 12 * 4];
    let spline = Method::Spline(EndCondition::NotAKnot);
    // Rows of 4 values are no positions.
    let e = fit_batch(&t, &x3, 4, &[0, 12], None, &spline).unwrap_err();
    assert_eq!(e.argument(), "positions");
    // A track of 3 samples is too short for a quintic smoothing spline.
    let x: Vec<f64> = t.iter().flat_map(|&s| [s, s * s]).collect();
    let quintic = Method::Smooth {
        degree: 5,
        smoothing: Smoothing::Gcv,
        derivative: 0,
        covariance: None,
    };
    let e = fit_batch(&t, &x, 2, &[0, 9, 12], None, &quintic).unwrap_err();
    assert_eq!(e.track(), Some(1));
    // Offsets that do not end at the row count.
    let e = fit_batch(&t, &x, 2, &[0, 11], None, &spline).unwrap_err();
    assert_eq!(e.argument(), "offsets");
}

#[test]
fn evaluate_is_nan_at_non_finite_times_and_on_invalid_tracks() {
    // Track 0 is fitted; track 1 has one finite row of 3 (too few for a spline: Invalid).
    let t = [0.0, 1.0, 2.0, 0.0, 1.0, 2.0];
    let x = [
        0.0,
        0.0,
        1.0,
        1.0,
        2.0,
        2.0,
        0.0,
        0.0,
        f64::NAN,
        0.0,
        1.0,
        f64::NAN,
    ];
    let fits = fit_batch(&t, &x, 2, &[0, 3, 6], None, &Method::Linear).unwrap();
    assert!(matches!(fits.tracks[1], TrackFit::Invalid));
    let p = evaluate(&fits, &[0.5, f64::NAN, 0.5], &[0, 2, 3], 0).unwrap();
    // Track 0 at t = 0.5: halfway along the chord (0, 0)-(1, 1) (closed form).
    assert_eq!(&p[..2], &[0.5, 0.5]);
    assert!(p[2..].iter().all(|v| v.is_nan()));
    let v = evaluate(&fits, &[1.5], &[0, 1, 1], 1).unwrap();
    assert_eq!(v, vec![1.0, 1.0]); // velocity on the second chord
}

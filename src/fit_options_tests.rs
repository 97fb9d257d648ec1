//! Unit tests of `fit_options`: defaults, and each error naming its argument.

use super::*;

fn opts(method: &str) -> EstimatorOptions {
    EstimatorOptions {
        method: method.into(),
        ..Default::default()
    }
}

fn error(o: EstimatorOptions) -> (String, String) {
    let e = Estimator::from_options(&o).unwrap_err();
    (e.argument().to_string(), e.to_string())
}

#[test]
fn defaults_are_supplied_here() {
    let fit = |m: &str| Estimator::from_options(&opts(m)).unwrap();
    assert_eq!(fit("fd"), Estimator::Fd(FdOrder::Two));
    assert_eq!(
        fit("spline"),
        Estimator::Fit(Method::Spline(EndCondition::NotAKnot))
    );
    assert_eq!(
        fit("smooth"),
        Estimator::Fit(Method::Smooth {
            degree: 5,
            smoothing: Smoothing::Gcv,
            derivative: 0,
            covariance: None
        })
    );
    assert_eq!(
        fit("local"),
        Estimator::Fit(Method::Local {
            degree: 4,
            window: Window::Auto,
            uncertainty: false
        })
    );
    assert_eq!(fit("linear").describe(), "linear");
    assert_eq!(fit("fd").order(), Some(2));
    assert_eq!(fit("smooth").degree(), Some(5));
    assert_eq!(fit("spline").degree(), None);
}

#[test]
fn each_error_names_its_argument() {
    let smooth = opts("smooth");
    for (o, want) in [
        (
            EstimatorOptions {
                degree: Some(4),
                ..smooth.clone()
            },
            "degree",
        ),
        (
            EstimatorOptions {
                derivative: Some(4),
                ..smooth.clone()
            },
            "derivative",
        ),
        (
            EstimatorOptions {
                derivative: Some(-1),
                ..smooth.clone()
            },
            "derivative",
        ),
        (
            EstimatorOptions {
                smoothing: Some(-1.0),
                ..smooth.clone()
            },
            "smoothing",
        ),
        (
            EstimatorOptions {
                smoothing: Some(f64::NAN),
                ..smooth.clone()
            },
            "smoothing",
        ),
        (
            EstimatorOptions {
                smoothing: Some(1.0),
                noise: Some(1.0),
                ..smooth.clone()
            },
            "smoothing",
        ),
        (
            EstimatorOptions {
                noise: Some(0.0),
                ..smooth.clone()
            },
            "noise",
        ),
        (
            EstimatorOptions {
                uncertainty: Some("both".into()),
                ..smooth.clone()
            },
            "uncertainty",
        ),
        (
            EstimatorOptions {
                bc: Some("clamped".into()),
                ..opts("spline")
            },
            "bc_velocity",
        ),
        (
            EstimatorOptions {
                bc: Some("periodic".into()),
                ..opts("spline")
            },
            "bc",
        ),
        (
            EstimatorOptions {
                degree: Some(0),
                ..opts("local")
            },
            "degree",
        ),
        (
            EstimatorOptions {
                degree: Some(6),
                ..opts("local")
            },
            "degree",
        ),
        (
            EstimatorOptions {
                window: Some(0),
                ..opts("local")
            },
            "window",
        ),
        (
            EstimatorOptions {
                window: Some(5),
                window_span: Some(1.0),
                ..opts("local")
            },
            "window",
        ),
        (
            EstimatorOptions {
                order: Some(3),
                ..opts("fd")
            },
            "order",
        ),
        (
            EstimatorOptions {
                order: Some(i64::MIN),
                ..opts("fd")
            },
            "order",
        ),
        (opts("fourier"), "method"),
    ] {
        assert_eq!(error(o).0, want);
    }
}

#[test]
fn options_of_another_method_are_refused_by_name() {
    // The first option given that the method does not take, and the list of those it takes.
    let (arg, msg) = error(EstimatorOptions {
        degree: Some(3),
        ..opts("fd")
    });
    assert_eq!(arg, "degree");
    assert!(
        msg.ends_with("does not apply to method='fd' (it takes ['order'])"),
        "{msg}"
    );
    let (arg, msg) = error(EstimatorOptions {
        weights: true,
        ..opts("local")
    });
    assert_eq!(arg, "weights");
    assert!(
        msg.contains("(it takes ['degree', 'window', 'window_span'])"),
        "{msg}"
    );
    let (arg, msg) = error(EstimatorOptions {
        bc: Some("natural".into()),
        ..opts("linear")
    });
    assert_eq!(arg, "bc");
    assert!(msg.ends_with("(it takes [])"), "{msg}");
    let (_, msg) = error(opts("magic"));
    assert!(
        msg.contains(
            "expected one of ('fd', 'spline', 'smooth', 'local', 'linear', 'auto'), got 'magic'"
        ),
        "{msg}"
    );
}

#[test]
fn end_velocities_must_be_two_rows_of_the_track_width() {
    let clamped = |shape: Vec<usize>| EstimatorOptions {
        method: "spline".into(),
        bc: Some("clamped".into()),
        bc_velocity: Some(EndVelocities {
            values: vec![0.5; shape.iter().product()],
            shape,
        }),
        ..Default::default()
    };
    // Without the tracks' width, 2 or 3 columns pass; with it, only that width.
    assert!(Estimator::from_options(&clamped(vec![2, 3])).is_ok());
    assert!(Method::from_options(&clamped(vec![2, 3]), 3).is_ok());
    let e = Method::from_options(&clamped(vec![2, 3]), 2).unwrap_err();
    assert!(e.to_string().ends_with("shape (2, 2), got (2, 3)"), "{e}");
    for bad_shape in [vec![3], vec![3, 2], vec![2, 4], vec![2, 2, 1]] {
        let (arg, msg) = error(clamped(bad_shape));
        assert_eq!(arg, "bc_velocity");
        assert!(
            msg.contains("expected (start, end) velocities of shape (2, dim)"),
            "{msg}"
        );
    }
    let (_, msg) = error(clamped(vec![3]));
    assert!(msg.ends_with("got (3,)"), "{msg}");
    // Velocities without bc="clamped" are refused too.
    let natural = EstimatorOptions {
        bc: Some("natural".into()),
        ..clamped(vec![2, 2])
    };
    assert_eq!(error(natural).0, "bc_velocity");
}

#[test]
fn fd_is_not_a_fitted_method() {
    let e = Method::from_options(&opts("fd"), 2).unwrap_err();
    assert_eq!(e.argument(), "method");
    assert!(e
        .to_string()
        .contains("('spline', 'smooth', 'local', 'linear'), got 'fd'"));
}

//! Estimator options as callers give them, checked in one place: [`Method::from_options`]
//! turns the option names of the Python API into a [`Method`], and every range check names its
//! argument. The bindings only convert types.

use crate::error::{KernelError, Result};
use crate::fit::Method;
use crate::local::Window;
use crate::smooth::{Covariance, Smoothing};
use crate::spline::EndCondition;

/// Estimator options as a caller gives them (the names of the Python API), checked and turned
/// into a [`Method`] by [`Method::from_options`].
#[derive(Debug, Clone, PartialEq)]
pub struct MethodOptions<'a> {
    /// "spline", "smooth", "local" or "linear".
    pub name: &'a str,
    /// End condition of the interpolating spline.
    pub bc: &'a str,
    /// Start velocity for `bc = "clamped"`.
    pub bc_start: Option<Vec<f64>>,
    /// End velocity for `bc = "clamped"`.
    pub bc_end: Option<Vec<f64>>,
    /// Degree of the smoothing spline (3 or 5) or of the local polynomials.
    pub degree: usize,
    /// A given dimensionless λ* (≥ 0).
    pub smoothing: Option<f64>,
    /// A known noise standard deviation (> 0): λ* by unbiased risk.
    pub noise: Option<f64>,
    /// Local window in samples.
    pub window: Option<usize>,
    /// Local window as a time span.
    pub window_span: Option<f64>,
    /// Derivative order the automatic λ* is tuned for (0 to 3).
    pub derivative: usize,
    /// "sampling" or "posterior" to keep what the standard errors need.
    pub uncertainty: Option<&'a str>,
}

fn bad(argument: &'static str, detail: String) -> KernelError {
    KernelError::Option { argument, detail }
}

impl Method {
    /// Check `options` (each error names its argument) and build the method.
    pub fn from_options(options: MethodOptions) -> Result<Method> {
        let MethodOptions {
            name,
            bc,
            bc_start,
            bc_end,
            degree,
            smoothing,
            noise,
            window,
            window_span,
            derivative,
            uncertainty,
        } = options;
        let covariance = match uncertainty {
            None => None,
            Some("sampling") => Some(Covariance::Sampling),
            Some("posterior") => Some(Covariance::Posterior),
            Some(other) => {
                return Err(bad(
                    "uncertainty",
                    format!("expected \"sampling\" or \"posterior\", got {other:?}"),
                ))
            }
        };
        Ok(match name {
            "spline" => Method::Spline(match bc {
                "not-a-knot" => EndCondition::NotAKnot,
                "natural" => EndCondition::Natural,
                "clamped" => match (bc_start, bc_end) {
                    (Some(start), Some(end)) => EndCondition::Clamped { start, end },
                    _ => {
                        return Err(bad(
                            "bc",
                            "\"clamped\" needs the start and end velocities".into(),
                        ))
                    }
                },
                other => {
                    return Err(bad(
                        "bc",
                        format!(
                            "expected \"not-a-knot\", \"natural\" or \"clamped\", got {other:?}"
                        ),
                    ))
                }
            }),
            "smooth" => {
                if degree != 3 && degree != 5 {
                    return Err(bad("degree", format!("must be 3 or 5, got {degree}")));
                }
                if derivative > 3 {
                    return Err(bad(
                        "derivative",
                        format!("must be 0, 1, 2 or 3, got {derivative}"),
                    ));
                }
                let smoothing = match (smoothing, noise) {
                    (Some(_), Some(_)) => {
                        return Err(bad("smoothing", "give smoothing or noise, not both".into()))
                    }
                    (Some(l), None) if l.is_nan() || l < 0.0 || l.is_infinite() => {
                        return Err(bad(
                            "smoothing",
                            format!("must be finite and >= 0, got {l}"),
                        ))
                    }
                    (Some(l), None) => Smoothing::Fixed(l),
                    (None, Some(s)) if s.is_nan() || s <= 0.0 || s.is_infinite() => {
                        return Err(bad("noise", format!("must be finite and > 0, got {s}")))
                    }
                    (None, Some(s)) => Smoothing::Noise(s),
                    (None, None) => Smoothing::Gcv,
                };
                Method::Smooth {
                    degree,
                    smoothing,
                    derivative,
                    covariance,
                }
            }
            "local" => Method::Local {
                degree,
                window: match (window, window_span) {
                    (Some(_), Some(_)) => {
                        return Err(bad(
                            "window",
                            "give a sample count or a time span, not both".into(),
                        ))
                    }
                    (Some(w), None) => Window::Samples(w),
                    (None, Some(s)) => Window::Span(s),
                    (None, None) => Window::Auto,
                },
                uncertainty: covariance.is_some(),
            },
            "linear" => Method::Linear,
            other => return Err(bad("method", format!("unknown method {other:?}"))),
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn options_are_checked_where_the_method_is_built() {
        let base = MethodOptions {
            name: "smooth",
            bc: "not-a-knot",
            bc_start: None,
            bc_end: None,
            degree: 5,
            smoothing: None,
            noise: None,
            window: None,
            window_span: None,
            derivative: 2,
            uncertainty: None,
        };
        let arg = |o: MethodOptions| Method::from_options(o).unwrap_err().argument();
        assert!(matches!(
            Method::from_options(base.clone()),
            Ok(Method::Smooth {
                smoothing: Smoothing::Gcv,
                ..
            })
        ));
        for (o, want) in [
            (
                MethodOptions {
                    degree: 4,
                    ..base.clone()
                },
                "degree",
            ),
            (
                MethodOptions {
                    derivative: 4,
                    ..base.clone()
                },
                "derivative",
            ),
            (
                MethodOptions {
                    smoothing: Some(-1.0),
                    ..base.clone()
                },
                "smoothing",
            ),
            (
                MethodOptions {
                    smoothing: Some(1.0),
                    noise: Some(1.0),
                    ..base.clone()
                },
                "smoothing",
            ),
            (
                MethodOptions {
                    noise: Some(0.0),
                    ..base.clone()
                },
                "noise",
            ),
            (
                MethodOptions {
                    uncertainty: Some("both"),
                    ..base.clone()
                },
                "uncertainty",
            ),
            (
                MethodOptions {
                    name: "spline",
                    bc: "clamped",
                    ..base.clone()
                },
                "bc",
            ),
            (
                MethodOptions {
                    name: "spline",
                    bc: "periodic",
                    ..base.clone()
                },
                "bc",
            ),
            (
                MethodOptions {
                    name: "local",
                    window: Some(5),
                    window_span: Some(1.0),
                    ..base.clone()
                },
                "window",
            ),
            (
                MethodOptions {
                    name: "fourier",
                    ..base.clone()
                },
                "method",
            ),
        ] {
            assert_eq!(arg(o), want);
        }
    }
}

//! Estimator options as callers give them, checked in one place: [`Estimator::from_options`]
//! (and [`Method::from_options`] for the fitted estimators) turns the option names of the Python
//! API into an estimator, supplies the defaults, checks every range and which options apply to
//! which method, and names the argument in each error. The bindings only convert types; the
//! Python layer only converts arrays.

use crate::diff::FdOrder;
use crate::error::{KernelError, Result};
use crate::fit::Method;
use crate::local::{Window, MAX_DEGREE};
use crate::smooth::{Covariance, Smoothing};
use crate::spline::EndCondition;

/// Estimator names, in the order the documentation lists them.
pub const METHODS: [&str; 6] = ["fd", "spline", "smooth", "local", "linear", "auto"];

/// The options each method takes (every other option is an error when given).
const TAKES: [(&str, &[&str]); 6] = [
    ("fd", &["order"]),
    ("spline", &["bc", "bc_velocity"]),
    (
        "smooth",
        &["degree", "derivative", "noise", "smoothing", "weights"],
    ),
    ("local", &["degree", "window", "window_span"]),
    ("linear", &[]),
    // fd's order, and the smoothing spline's options for when it is chosen.
    (
        "auto",
        &[
            "order",
            "degree",
            "derivative",
            "noise",
            "smoothing",
            "weights",
        ],
    ),
];

/// End conditions of the interpolating spline.
const END_CONDITIONS: [&str; 3] = ["not-a-knot", "natural", "clamped"];

/// Start and end velocities of a clamped spline as given: the array's shape and its values in
/// row-major order (shape `(2, dim)` when usable).
#[derive(Debug, Clone, PartialEq)]
pub struct EndVelocities {
    /// Shape of the given array.
    pub shape: Vec<usize>,
    /// Values, row-major.
    pub values: Vec<f64>,
}

/// Estimator options as a caller gives them: the names of the Python API, `None` (or `false`)
/// where an option is not given. Checked, with its defaults supplied, by
/// [`Estimator::from_options`].
#[derive(Debug, Clone, PartialEq)]
pub struct EstimatorOptions {
    /// One of [`METHODS`] (default "fd").
    pub method: String,
    /// Accuracy order of finite differences, 2 (default) or 4.
    pub order: Option<i64>,
    /// End condition of the interpolating spline (default "not-a-knot").
    pub bc: Option<String>,
    /// Start and end velocities, exactly when `bc = "clamped"`.
    pub bc_velocity: Option<EndVelocities>,
    /// Degree of the smoothing spline (3 or 5, default 5) or of the local polynomials (1 to 5,
    /// default 4).
    pub degree: Option<i64>,
    /// A given dimensionless λ* (≥ 0).
    pub smoothing: Option<f64>,
    /// A known noise standard deviation (> 0): λ* by unbiased risk.
    pub noise: Option<f64>,
    /// Whether per-sample weights are given (the weights themselves travel with the arrays).
    pub weights: bool,
    /// Local window in samples (≥ 1).
    pub window: Option<i64>,
    /// Local window as a time span.
    pub window_span: Option<f64>,
    /// Derivative order the automatic λ* is tuned for, 0 (default) to 3.
    pub derivative: Option<i64>,
    /// "sampling" or "posterior" to keep what the standard errors need.
    pub uncertainty: Option<String>,
}

impl Default for EstimatorOptions {
    fn default() -> Self {
        EstimatorOptions {
            method: "fd".into(),
            order: None,
            bc: None,
            bc_velocity: None,
            degree: None,
            smoothing: None,
            noise: None,
            weights: false,
            window: None,
            window_span: None,
            derivative: None,
            uncertainty: None,
        }
    }
}

/// A checked derivative estimator: finite differences or a fitted path.
#[derive(Debug, Clone, PartialEq)]
pub enum Estimator {
    /// Finite differences of the given accuracy order.
    Fd(FdOrder),
    /// A path fitted to every track.
    Fit(Method),
    /// Finite differences, unless on some track the noise makes their accelerations mostly
    /// noise ([`crate::diagnose::fd_swamped`]); then `fallback` (a smoothing spline) for the
    /// whole batch.
    Auto {
        /// Order of the finite differences.
        order: FdOrder,
        /// The estimator used when finite differences would give noise.
        fallback: Method,
    },
}

fn bad(argument: &'static str, detail: String) -> KernelError {
    KernelError::Option { argument, detail }
}

/// `names` as a Python tuple of strings: `('a', 'b')`.
fn tuple(names: &[&str]) -> String {
    let quoted: Vec<String> = names.iter().map(|n| format!("'{n}'")).collect();
    format!("({})", quoted.join(", "))
}

/// A shape as Python prints it: `(3,)`, `(2, 3)`.
fn shape(s: &[usize]) -> String {
    match s {
        [n] => format!("({n},)"),
        _ => format!(
            "({})",
            s.iter()
                .map(|n| n.to_string())
                .collect::<Vec<_>>()
                .join(", ")
        ),
    }
}

impl EstimatorOptions {
    /// The options given, in the order they are checked, by name.
    fn given(&self) -> [(&'static str, bool); 10] {
        [
            ("order", self.order.is_some()),
            ("bc", self.bc.is_some()),
            ("bc_velocity", self.bc_velocity.is_some()),
            ("degree", self.degree.is_some()),
            ("smoothing", self.smoothing.is_some()),
            ("noise", self.noise.is_some()),
            ("weights", self.weights),
            ("window", self.window.is_some()),
            ("window_span", self.window_span.is_some()),
            ("derivative", self.derivative.is_some()),
        ]
    }

    /// The method's name, after checking that it is one and that every option given applies to
    /// it.
    fn method(&self) -> Result<&'static str> {
        let Some(&(name, takes)) = TAKES.iter().find(|(m, _)| *m == self.method) else {
            return Err(bad(
                "method",
                format!("expected one of {}, got '{}'", tuple(&METHODS), self.method),
            ));
        };
        for (option, given) in self.given() {
            if given && !takes.contains(&option) {
                let list: Vec<String> = takes.iter().map(|t| format!("'{t}'")).collect();
                return Err(bad(
                    option,
                    format!(
                        "does not apply to method='{name}' (it takes [{}])",
                        list.join(", ")
                    ),
                ));
            }
        }
        Ok(name)
    }
}

/// The end condition from `bc` and `bc_velocity` (`dim`: the tracks' coordinates when known).
fn end_condition(o: &EstimatorOptions, dim: Option<usize>) -> Result<EndCondition> {
    let bc = o.bc.as_deref().unwrap_or("not-a-knot");
    if !END_CONDITIONS.contains(&bc) {
        return Err(bad(
            "bc",
            format!("expected one of {}, got '{bc}'", tuple(&END_CONDITIONS)),
        ));
    }
    if (bc == "clamped") != o.bc_velocity.is_some() {
        return Err(bad(
            "bc_velocity",
            "give it exactly when bc=\"clamped\"".into(),
        ));
    }
    Ok(match (bc, &o.bc_velocity) {
        ("natural", _) => EndCondition::Natural,
        ("clamped", Some(v)) => {
            let width = v.shape.get(1).copied().unwrap_or(0);
            let fits = v.shape.len() == 2
                && v.shape[0] == 2
                && dim.map_or(width == 2 || width == 3, |d| width == d)
                && v.values.len() == 2 * width;
            if !fits {
                let want = dim.map_or("dim".to_string(), |d| d.to_string());
                return Err(bad(
                    "bc_velocity",
                    format!(
                        "expected (start, end) velocities of shape (2, {want}), got {}",
                        shape(&v.shape)
                    ),
                ));
            }
            EndCondition::Clamped {
                start: v.values[..width].to_vec(),
                end: v.values[width..].to_vec(),
            }
        }
        _ => EndCondition::NotAKnot,
    })
}

fn smooth(o: &EstimatorOptions, covariance: Option<Covariance>) -> Result<Method> {
    let degree = o.degree.unwrap_or(5);
    if degree != 3 && degree != 5 {
        return Err(bad(
            "degree",
            format!("must be 3 or 5 for method='smooth', got {degree}"),
        ));
    }
    let derivative = o.derivative.unwrap_or(0);
    if !(0..=3).contains(&derivative) {
        return Err(bad(
            "derivative",
            format!("must be 0, 1, 2 or 3, got {derivative}"),
        ));
    }
    let smoothing = match (o.smoothing, o.noise) {
        (Some(_), Some(_)) => {
            return Err(bad("smoothing", "give smoothing or noise, not both".into()))
        }
        (Some(l), None) if !(l.is_finite() && l >= 0.0) => {
            return Err(bad(
                "smoothing",
                format!("must be finite and >= 0, got {l}"),
            ))
        }
        (Some(l), None) => Smoothing::Fixed(l),
        (None, Some(s)) if !(s.is_finite() && s > 0.0) => {
            return Err(bad("noise", format!("must be finite and > 0, got {s}")))
        }
        (None, Some(s)) => Smoothing::Noise(s),
        (None, None) => Smoothing::Gcv,
    };
    Ok(Method::Smooth {
        degree: degree as usize,
        smoothing,
        derivative: derivative as usize,
        covariance,
    })
}

fn local(o: &EstimatorOptions, uncertainty: bool) -> Result<Method> {
    let degree = o.degree.unwrap_or(4);
    if !(1..=MAX_DEGREE as i64).contains(&degree) {
        return Err(bad(
            "degree",
            format!("must be 1 to {MAX_DEGREE} for method='local', got {degree}"),
        ));
    }
    let window = match (o.window, o.window_span) {
        (Some(_), Some(_)) => {
            return Err(bad(
                "window",
                "give a sample count or a time span, not both".into(),
            ))
        }
        (Some(w), None) if w < 1 => {
            return Err(bad(
                "window",
                format!("must be a positive number of samples, got {w}"),
            ))
        }
        (Some(w), None) => Window::Samples(usize::try_from(w).unwrap_or(usize::MAX)),
        (None, Some(s)) => Window::Span(s),
        (None, None) => Window::Auto,
    };
    Ok(Method::Local {
        degree: degree as usize,
        window,
        uncertainty,
    })
}

fn build(o: &EstimatorOptions, dim: Option<usize>) -> Result<Estimator> {
    let name = o.method()?;
    let covariance = match o.uncertainty.as_deref() {
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
    let order = || {
        let order = o.order.unwrap_or(2);
        FdOrder::from_int(order).ok_or_else(|| bad("order", format!("must be 2 or 4, got {order}")))
    };
    Ok(match name {
        "fd" => Estimator::Fd(order()?),
        "auto" => Estimator::Auto {
            order: order()?,
            fallback: smooth(o, covariance)?,
        },
        "spline" => Estimator::Fit(Method::Spline(end_condition(o, dim)?)),
        "smooth" => Estimator::Fit(smooth(o, covariance)?),
        "local" => Estimator::Fit(local(o, covariance.is_some())?),
        _ => Estimator::Fit(Method::Linear),
    })
}

impl Estimator {
    /// Check `options` (each error names its argument) and build the estimator, with the
    /// defaults for the options not given. The width of `bc_velocity` is only checked to be 2
    /// or 3 here; [`Method::from_options`] checks it against the tracks' coordinates.
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::diff::FdOrder;
    /// use osculate::fit_options::{Estimator, EstimatorOptions};
    /// let fd = Estimator::from_options(&EstimatorOptions::default()).unwrap();
    /// assert_eq!(fd, Estimator::Fd(FdOrder::Two));
    /// let smooth = EstimatorOptions { method: "smooth".into(), order: Some(4), ..Default::default() };
    /// let err = Estimator::from_options(&smooth).unwrap_err();
    /// assert_eq!(err.argument(), "order");
    /// assert!(err.to_string().contains("does not apply to method='smooth'"));
    /// ```
    pub fn from_options(options: &EstimatorOptions) -> Result<Estimator> {
        build(options, None)
    }

    /// [`Estimator::from_options`] for tracks of `dim` coordinates: `bc_velocity` must have
    /// `dim` columns.
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::fit_options::{EndVelocities, Estimator, EstimatorOptions};
    /// let clamped = EstimatorOptions {
    ///     method: "spline".into(),
    ///     bc: Some("clamped".into()),
    ///     bc_velocity: Some(EndVelocities { shape: vec![2, 3], values: vec![0.0; 6] }),
    ///     ..Default::default()
    /// };
    /// assert!(Estimator::for_dim(&clamped, 3).is_ok());
    /// assert_eq!(Estimator::for_dim(&clamped, 2).unwrap_err().argument(), "bc_velocity");
    /// ```
    pub fn for_dim(options: &EstimatorOptions, dim: usize) -> Result<Estimator> {
        build(options, Some(dim))
    }

    /// Short human-readable summary, e.g. `smooth (degree 5)`.
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::fit_options::{Estimator, EstimatorOptions};
    /// let local = EstimatorOptions { method: "local".into(), ..Default::default() };
    /// assert_eq!(Estimator::from_options(&local).unwrap().describe(), "local (degree 4)");
    /// ```
    pub fn describe(&self) -> String {
        match self {
            Estimator::Fd(FdOrder::Two) => "fd (order 2)".into(),
            Estimator::Fd(FdOrder::Four) => "fd (order 4)".into(),
            Estimator::Fit(Method::Spline(bc)) => format!(
                "spline (bc {})",
                match bc {
                    EndCondition::NotAKnot => "not-a-knot",
                    EndCondition::Natural => "natural",
                    EndCondition::Clamped { .. } => "clamped",
                }
            ),
            Estimator::Fit(Method::Smooth { degree, .. }) => format!("smooth (degree {degree})"),
            Estimator::Fit(Method::Local { degree, .. }) => format!("local (degree {degree})"),
            Estimator::Fit(Method::Linear) => "linear".into(),
            Estimator::Auto { order, fallback } => format!(
                "auto: {} or {}",
                Estimator::Fd(*order).describe(),
                Estimator::Fit(fallback.clone()).describe()
            ),
        }
    }

    /// The method's name as callers give it.
    pub fn name(&self) -> &'static str {
        match self {
            Estimator::Fd(_) => "fd",
            Estimator::Fit(m) => m.name(),
            Estimator::Auto { .. } => "auto",
        }
    }

    /// The accuracy order of finite differences (`None` for fitted paths).
    pub fn order(&self) -> Option<i64> {
        match self {
            Estimator::Fd(FdOrder::Two) => Some(2),
            Estimator::Fd(FdOrder::Four)
            | Estimator::Auto {
                order: FdOrder::Four,
                ..
            } => Some(4),
            Estimator::Auto { .. } => Some(2),
            Estimator::Fit(_) => None,
        }
    }

    /// The polynomial degree of smoothing splines and local fits (`None` for the others).
    pub fn degree(&self) -> Option<usize> {
        match self {
            Estimator::Fit(Method::Smooth { degree, .. } | Method::Local { degree, .. })
            | Estimator::Auto {
                fallback: Method::Smooth { degree, .. },
                ..
            } => Some(*degree),
            _ => None,
        }
    }
}

impl Method {
    /// Check `options` as [`Estimator::from_options`] does, for tracks of `dim` coordinates, and
    /// build the fitted estimator; "fd" is an error here (it fits nothing).
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::fit::Method;
    /// use osculate::fit_options::{EndVelocities, EstimatorOptions};
    /// use osculate::spline::EndCondition;
    /// let clamped = EstimatorOptions {
    ///     method: "spline".into(),
    ///     bc: Some("clamped".into()),
    ///     bc_velocity: Some(EndVelocities { shape: vec![2, 2], values: vec![1.0, 0.0, 0.0, 1.0] }),
    ///     ..Default::default()
    /// };
    /// let start_end = EndCondition::Clamped { start: vec![1.0, 0.0], end: vec![0.0, 1.0] };
    /// assert_eq!(Method::from_options(&clamped, 2).unwrap(), Method::Spline(start_end));
    /// // The same velocities do not fit 3-D tracks.
    /// assert_eq!(Method::from_options(&clamped, 3).unwrap_err().argument(), "bc_velocity");
    /// ```
    pub fn from_options(options: &EstimatorOptions, dim: usize) -> Result<Method> {
        Estimator::for_dim(options, dim)?.into_fit()
    }
}

impl Estimator {
    /// The fitted estimator; "fd" is an error naming `method` (it fits nothing).
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::fit::Method;
    /// use osculate::fit_options::{Estimator, EstimatorOptions};
    /// let linear = EstimatorOptions { method: "linear".into(), ..Default::default() };
    /// let m = Estimator::from_options(&linear).unwrap().into_fit().unwrap();
    /// assert_eq!(m, Method::Linear);
    /// let fd = Estimator::from_options(&EstimatorOptions::default()).unwrap();
    /// assert_eq!(fd.into_fit().unwrap_err().argument(), "method");
    /// ```
    pub fn into_fit(self) -> Result<Method> {
        match self {
            Estimator::Fit(m) => Ok(m),
            Estimator::Fd(_) | Estimator::Auto { .. } => Err(bad(
                "method",
                format!(
                    "expected one of {}, got '{}'",
                    tuple(&METHODS[1..5]),
                    self.name()
                ),
            )),
        }
    }
}

#[cfg(test)]
#[path = "fit_options_tests.rs"]
mod tests;

//! Fitted paths: one estimator per track (interpolating spline, smoothing spline, local
//! polynomials), fitted once and evaluated anywhere, batched over tracks in parallel.
//!
//! Rows with a non-finite position are left out of the fit (their track is fitted on the finite
//! rows); a track with too few finite rows has no fit and all its rows are INVALID.

use crate::batch::{check_offsets, check_times, track_rows};
use crate::error::{try_collect, try_copy, KernelError, Result};
pub use crate::fit_options::{Estimator, EstimatorOptions};
use crate::local::{local_with, LocalFit, Window};
use crate::piecewise::PiecewisePoly;
use crate::smooth::{self, smooth_with, Covariance, JerkFit, Smoothing};
use crate::spline::{interpolate, EndCondition};
use crate::uncertainty::{at, Gram};
use rayon::prelude::*;

/// Samples flagged EDGE at each end of a smoothing spline, in smoothing bandwidths.
pub const EDGE_BANDWIDTHS: f64 = 3.0;

/// Gauss–Legendre points per interval for arc length on splines; a 5-point rule beside it gives
/// the error estimate.
pub const LENGTH_NODES: usize = 8;
const LENGTH_NODES_LOW: usize = 5;

/// A derivative estimator that fits the whole track.
#[derive(Debug, Clone, PartialEq)]
pub enum Method {
    /// Interpolating cubic spline.
    Spline(EndCondition),
    /// Penalized smoothing spline of degree 3 or 5.
    Smooth {
        /// 3 or 5.
        degree: usize,
        /// How λ is chosen.
        smoothing: Smoothing,
        /// Derivative order the automatic choice is tuned for (0 = positions).
        derivative: usize,
        /// Which covariance to keep per sample for standard errors (none when `None`).
        covariance: Option<Covariance>,
    },
    /// Local polynomial least squares.
    Local {
        /// Polynomial degree.
        degree: usize,
        /// Window.
        window: Window,
        /// Whether to keep the per-sample covariance for standard errors.
        uncertainty: bool,
    },
    /// The polyline through the samples, traversed at constant speed on each segment.
    Linear,
}

impl Method {
    /// Fewest samples per track.
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::fit::Method;
    /// use osculate::local::Window;
    /// use osculate::spline::EndCondition;
    /// assert_eq!(Method::Spline(EndCondition::Natural).min_samples(), 2);
    /// let local = Method::Local { degree: 3, window: Window::Auto, uncertainty: false };
    /// assert_eq!(local.min_samples(), 4); // a cubic needs 4 points
    /// ```
    pub fn min_samples(&self) -> usize {
        match self {
            Method::Spline(_) => 2,
            Method::Smooth { degree, .. } => smooth::min_samples(*degree),
            Method::Local { degree, .. } => degree + 1,
            Method::Linear => 2,
        }
    }

    /// Public name.
    pub fn name(&self) -> &'static str {
        match self {
            Method::Spline(_) => "spline",
            Method::Smooth { .. } => "smooth",
            Method::Local { .. } => "local",
            Method::Linear => "linear",
        }
    }
}

/// What was chosen for a track (NaN where it does not apply).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FitInfo {
    /// Dimensionless λ* of a smoothing spline.
    pub smoothing: f64,
    /// Effective degrees of freedom of a smoothing spline.
    pub edf: f64,
    /// Selection criterion at the choice (GCV score or unbiased risk).
    pub criterion: f64,
    /// Window of local fits: samples, or a time span.
    pub window: f64,
    /// Estimated error of the track's arc length (NaN where not estimated).
    pub length_error: f64,
    /// Noise standard deviation of the positions seen by the estimator (NaN where not estimated).
    pub noise: f64,
    /// Dimensionless λ* of the smoother fit that r‴ comes from (NaN where r‴ has no fit of its
    /// own).
    pub jerk_smoothing: f64,
    /// Bandwidth of a smoothing spline's equivalent kernel in samples, λ*^(1/2m) (B. W.
    /// Silverman, Ann. Statist. 12 (1984) 898–916); NaN for other estimators.
    pub bandwidth: f64,
}

/// The fit of one track.
#[derive(Debug, Clone, PartialEq)]
pub enum TrackFit {
    /// Too few finite rows: nothing fitted.
    Invalid,
    /// A piecewise polynomial (splines); `edge` samples from each end are flagged EDGE.
    Poly {
        /// The path.
        poly: PiecewisePoly,
        /// Choices made.
        info: FitInfo,
        /// Samples at each end influenced by the end conditions.
        edge: usize,
        /// Per fitted sample, the Gram matrix of the derivative rows (empty unless asked for).
        gram: Vec<Gram>,
        /// A smoother fit of the same samples whose r‴ replaces this one's.
        jerk: Option<Box<JerkFit>>,
    },
    /// Local polynomial fits.
    Local(LocalFit),
    /// The polyline through the samples (`x` row-major with `dim` columns).
    Linear {
        /// Sample times.
        t: Vec<f64>,
        /// Positions.
        x: Vec<f64>,
        /// Coordinates.
        dim: usize,
    },
}

impl TrackFit {
    /// The fitted sample times.
    pub fn times(&self) -> &[f64] {
        match self {
            TrackFit::Invalid => &[],
            TrackFit::Poly { poly, .. } => &poly.x,
            TrackFit::Local(f) => &f.t,
            TrackFit::Linear { t, .. } => t,
        }
    }

    /// Derivatives 0..=3 (`out[nu * dim + d]`) at fitted sample `j`.
    pub fn at_sample(&self, j: usize, out: &mut [f64]) {
        match self {
            TrackFit::Invalid => out.iter_mut().for_each(|v| *v = f64::NAN),
            TrackFit::Poly { poly, jerk, .. } => {
                let i = j.min(poly.intervals() - 1);
                poly.eval_on(i, poly.x[j], 3, out);
                if let Some(f) = jerk {
                    let mut buf = [0.0; 12];
                    f.path.eval_on(i, poly.x[j], 3, &mut buf[..out.len()]);
                    let d = poly.dim;
                    out[3 * d..4 * d].copy_from_slice(&buf[3 * d..4 * d]);
                }
            }
            TrackFit::Local(f) => {
                let w = 4 * f.dim;
                out.copy_from_slice(&f.deriv[j * w..(j + 1) * w]);
            }
            TrackFit::Linear { t, .. } => self.at_time(t[j], out),
        }
    }

    /// Derivatives 0..=3 at any time (splines extrapolate with their end pieces).
    pub fn at_time(&self, t: f64, out: &mut [f64]) {
        match self {
            TrackFit::Invalid => out.iter_mut().for_each(|v| *v = f64::NAN),
            TrackFit::Poly { poly, jerk, .. } => {
                poly.eval(t, 3, out);
                if let Some(f) = jerk {
                    let mut buf = [0.0; 12];
                    f.path.eval(t, 3, &mut buf[..out.len()]);
                    let d = poly.dim;
                    out[3 * d..4 * d].copy_from_slice(&buf[3 * d..4 * d]);
                }
            }
            TrackFit::Local(f) => f.eval(t, out),
            TrackFit::Linear { t: ts, x, dim } => {
                // Segment holding t (the right one at a sample), extrapolating at the ends.
                let d = *dim;
                let i = ts
                    .partition_point(|&v| v <= t)
                    .saturating_sub(1)
                    .min(ts.len() - 2);
                let h = ts[i + 1] - ts[i];
                for k in 0..d {
                    let (a, b) = (x[i * d + k], x[(i + 1) * d + k]);
                    let v = (b - a) / h;
                    out[k] = a + v * (t - ts[i]);
                    out[d + k] = v;
                    out[2 * d + k] = 0.0;
                    out[3 * d + k] = 0.0;
                }
            }
        }
    }

    /// Gram matrix of the derivative rows at fitted sample `j`, when it was kept. With a separate
    /// fit for r‴, its G₃₃ comes from that fit and the covariances of r‴ with r, r′, r″ (two
    /// different smoothers of the same data) are left out: an approximation of the torsion's
    /// standard error, whose r‴ term dominates.
    pub fn gram(&self, j: usize) -> Option<Gram> {
        match self {
            TrackFit::Poly { gram, jerk, .. } => {
                let mut g = *gram.get(j)?;
                if let Some(f) = jerk {
                    for a in 0..3 {
                        g[at(a, 3)] = 0.0;
                    }
                    g[at(3, 3)] = f.gram.get(j)?[at(3, 3)];
                }
                Some(g)
            }
            TrackFit::Local(f) => f.gram.get(j).copied(),
            _ => None,
        }
    }

    /// Noise of the positions seen by the fit (NaN where not estimated); cheaper than
    /// [`TrackFit::info`], which also integrates the length error.
    pub fn noise(&self) -> f64 {
        match self {
            TrackFit::Poly { info, .. } => info.noise,
            TrackFit::Local(f) => f.noise,
            _ => f64::NAN,
        }
    }

    /// Whether fitted sample `j` is an end estimate.
    pub fn is_edge(&self, j: usize) -> bool {
        match self {
            TrackFit::Invalid => false,
            TrackFit::Poly { poly, edge, .. } => j < *edge || j + *edge >= poly.x.len(),
            TrackFit::Local(f) => f.edge[j],
            TrackFit::Linear { .. } => false,
        }
    }

    /// Path length between fitted samples j − 1 and j.
    pub fn segment(&self, j: usize) -> f64 {
        match self {
            TrackFit::Invalid => f64::NAN,
            TrackFit::Poly { poly, .. } => {
                poly.length_on(j - 1, poly.x[j - 1], poly.x[j], LENGTH_NODES)
            }
            TrackFit::Local(f) => {
                let w = 4 * f.dim;
                let h = f.t[j] - f.t[j - 1];
                trapezoid_em(
                    &f.deriv[(j - 1) * w..j * w],
                    &f.deriv[j * w..(j + 1) * w],
                    f.dim,
                    h,
                )
            }
            TrackFit::Linear { x, dim, .. } => {
                crate::arclength::distance(&x[(j - 1) * dim..j * dim], &x[j * dim..(j + 1) * dim])
            }
        }
    }

    /// Coordinates of the fitted path (0 for an invalid track).
    pub fn dim(&self) -> usize {
        match self {
            TrackFit::Invalid => 0,
            TrackFit::Poly { poly, .. } => poly.dim,
            TrackFit::Local(f) => f.dim,
            TrackFit::Linear { dim, .. } => *dim,
        }
    }

    /// Σ over intervals of |L₈ − L₅|, the difference of the 8- and 5-point Gauss–Legendre lengths
    /// (a conservative estimate of the 8-point rule's error); NaN for other kinds of fit.
    pub fn length_error(&self) -> f64 {
        match self {
            TrackFit::Poly { poly, .. } => (0..poly.intervals())
                .map(|i| {
                    let (a, b) = (poly.x[i], poly.x[i + 1]);
                    (poly.length_on(i, a, b, LENGTH_NODES)
                        - poly.length_on(i, a, b, LENGTH_NODES_LOW))
                    .abs()
                })
                .sum(),
            TrackFit::Linear { .. } => 0.0,
            _ => f64::NAN,
        }
    }

    /// Cumulative length at the fitted samples (empty for an invalid track).
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::fit::{fit_track, Method};
    /// // A polyline of 3-4-5 steps: cumulative chord lengths 0, 5, 10 (closed form).
    /// let t = [0.0, 1.0, 2.0];
    /// let f = fit_track(&t, &[0.0, 0.0, 3.0, 4.0, 6.0, 8.0], 2, None, &Method::Linear).unwrap();
    /// assert_eq!(f.cumulative_length().unwrap(), vec![0.0, 5.0, 10.0]);
    /// ```
    pub fn cumulative_length(&self) -> Result<Vec<f64>> {
        let n = self.times().len();
        let mut cum = Vec::new();
        cum.try_reserve_exact(n)
            .map_err(|_| KernelError::OutOfMemory { bytes: n * 8 })?;
        let mut acc = 0.0;
        for j in 0..n {
            if j > 0 {
                acc += self.segment(j);
            }
            cum.push(acc);
        }
        Ok(cum)
    }

    /// Arc length from the first fitted sample to time `t`, given [`TrackFit::cumulative_length`];
    /// negative before the first sample.
    pub fn length_to(&self, cum: &[f64], t: f64) -> f64 {
        let ts = self.times();
        if ts.is_empty() {
            return f64::NAN;
        }
        let j = ts
            .partition_point(|&v| v <= t)
            .saturating_sub(1)
            .min(ts.len() - 1);
        let base = cum[j];
        match self {
            TrackFit::Invalid => f64::NAN,
            TrackFit::Poly { poly, .. } => {
                let i = j.min(poly.intervals() - 1);
                // Partial length from break j (the end break when t is past the last one).
                base + poly.length_on(i, poly.x[j], t, LENGTH_NODES)
            }
            TrackFit::Local(f) => {
                // The same rule as between samples, so that lengths are continuous at samples.
                let w = 4 * f.dim;
                let mut buf = [0.0; 12];
                f.eval(t, &mut buf[..w]);
                base + trapezoid_em(&f.deriv[j * w..(j + 1) * w], &buf[..w], f.dim, t - ts[j])
            }
            TrackFit::Linear { .. } => {
                let mut buf = [0.0; 12];
                self.at_time(t, &mut buf);
                let dim = self.dim();
                let v = buf[dim..2 * dim].iter().map(|a| a * a).sum::<f64>().sqrt();
                base + v * (t - ts[j])
            }
        }
    }

    /// Choices made for the track.
    pub fn info(&self) -> FitInfo {
        let nan = f64::NAN;
        match self {
            TrackFit::Invalid | TrackFit::Linear { .. } => FitInfo {
                smoothing: nan,
                edf: nan,
                criterion: nan,
                window: nan,
                length_error: self.length_error(),
                noise: nan,
                jerk_smoothing: nan,
                bandwidth: nan,
            },
            TrackFit::Poly { info, .. } => FitInfo {
                length_error: self.length_error(),
                ..*info
            },
            TrackFit::Local(f) => FitInfo {
                smoothing: nan,
                edf: nan,
                criterion: f.criterion,
                window: match f.window {
                    Window::Samples(w) => w as f64,
                    Window::Span(s) => s,
                    Window::Auto => nan,
                },
                length_error: nan,
                noise: f.noise,
                jerk_smoothing: nan,
                bandwidth: nan,
            },
        }
    }
}

/// Trapezoid of the speed with the Euler–Maclaurin end correction over a step h:
/// h (v₀ + v₁)/2 − h² (v̇₁ − v̇₀)/12 with v̇ = a_t = r′·r″/v, from derivative blocks 0..=3.
fn trapezoid_em(a: &[f64], b: &[f64], d: usize, h: f64) -> f64 {
    // Scale-safe: |r′| without squaring (1e200 m steps stay finite), a_t = (r′/|r′|)·r″.
    let sv = |r: &[f64]| {
        let v = crate::arclength::distance(&r[d..2 * d], &[0.0; 3][..d]);
        let at: f64 = if v > 0.0 {
            r[d..2 * d]
                .iter()
                .zip(&r[2 * d..3 * d])
                .map(|(x, y)| (x / v) * y)
                .sum()
        } else {
            0.0
        };
        (v, at)
    };
    let ((v0, a0), (v1, a1)) = (sv(a), sv(b));
    h * 0.5 * (v0 + v1) - h * h * (a1 - a0) / 12.0
}

/// Fit one track whose rows are all finite.
pub fn fit_track(
    t: &[f64],
    x: &[f64],
    dim: usize,
    w: Option<&[f64]>,
    method: &Method,
) -> Result<TrackFit> {
    let nan = f64::NAN;
    Ok(match method {
        Method::Spline(bc) => TrackFit::Poly {
            poly: interpolate(t, x, dim, bc)?,
            info: FitInfo {
                smoothing: nan,
                edf: nan,
                criterion: nan,
                window: nan,
                length_error: nan,
                noise: nan,
                jerk_smoothing: nan,
                bandwidth: nan,
            },
            edge: 2,
            gram: Vec::new(),
            jerk: None,
        },
        Method::Smooth {
            degree,
            smoothing,
            derivative,
            covariance,
        } => {
            let f = smooth_with(t, x, dim, w, *degree, *smoothing, *derivative, *covariance)?;
            // The natural end conditions bias derivatives over the reach of the equivalent
            // kernel, about three bandwidths λ*^(1/2m) (in samples) from each end.
            let m = degree.div_ceil(2);
            let bandwidth = f.lambda.powf(0.5 / m as f64);
            let band = (EDGE_BANDWIDTHS * bandwidth).ceil().max(1.0) as usize;
            TrackFit::Poly {
                poly: f.path,
                info: FitInfo {
                    smoothing: f.lambda,
                    edf: f.edf,
                    criterion: f.criterion,
                    window: nan,
                    length_error: nan,
                    noise: f.noise,
                    jerk_smoothing: f.jerk.as_ref().map_or(nan, |j| j.lambda),
                    bandwidth,
                },
                edge: band.min(t.len()),
                gram: f.gram,
                jerk: f.jerk.map(Box::new),
            }
        }
        Method::Local {
            degree,
            window,
            uncertainty,
        } => TrackFit::Local(local_with(t, x, dim, *degree, *window, *uncertainty)?),
        Method::Linear => TrackFit::Linear {
            t: try_copy(t)?,
            x: try_copy(x)?,
            dim,
        },
    })
}

/// Fits of a batch of tracks, and which rows of each track they cover.
#[derive(Debug, Clone, PartialEq)]
pub struct Fits {
    /// Coordinates.
    pub dim: usize,
    /// Row offsets of the tracks.
    pub offsets: Vec<usize>,
    /// One fit per track.
    pub tracks: Vec<TrackFit>,
    /// For tracks with non-finite rows, the local indices of the fitted rows.
    pub rows: Vec<Option<Vec<usize>>>,
}

/// Check per-sample weights: finite and > 0, one per row.
fn check_weights(w: &[f64], n: usize, offsets: &[usize]) -> Result<()> {
    if w.len() != n {
        return Err(KernelError::Shape {
            argument: "weights",
            detail: format!("has {} values but there are {n} rows", w.len()),
        });
    }
    match w
        .iter()
        .position(|v| v.is_nan() || *v <= 0.0 || v.is_infinite())
    {
        None => Ok(()),
        Some(row) => Err(KernelError::Row {
            argument: "weights",
            track: offsets.partition_point(|&o| o <= row) - 1,
            row,
            detail: format!("weights must be finite and > 0, got {}", w[row]),
        }),
    }
}

/// Fit every track of a batch in parallel.
///
/// # Examples
///
/// ```
/// use osculate::fit::{evaluate, fit_batch, Method};
/// use osculate::spline::EndCondition;
/// // Two tracks: a circle of radius 2 at unit angular speed (curvature 1/2, closed form) and a
/// // straight line (curvature 0), 61 samples each.
/// let t: Vec<f64> = (0..61).map(|i| i as f64 * std::f64::consts::PI / 60.0).collect();
/// let mut x: Vec<f64> = t.iter().flat_map(|&s| [2.0 * s.cos(), 2.0 * s.sin()]).collect();
/// x.extend(t.iter().flat_map(|&s| [s, 3.0 * s]));
/// let tt: Vec<f64> = t.iter().chain(&t).copied().collect();
/// let spline = Method::Spline(EndCondition::NotAKnot);
/// let fits = fit_batch(&tt, &x, 2, &[0, 61, 122], None, &spline).unwrap();
/// let q = [1.3, 1.3];
/// let v = evaluate(&fits, &q, &[0, 1, 2], 1).unwrap();
/// let a = evaluate(&fits, &q, &[0, 1, 2], 2).unwrap();
/// let kappa = |k: usize| {
///     let (vx, vy, ax, ay) = (v[2 * k], v[2 * k + 1], a[2 * k], a[2 * k + 1]);
///     (vx * ay - vy * ax).abs() / (vx * vx + vy * vy).powf(1.5)
/// };
/// assert!((kappa(0) - 0.5).abs() < 1e-4); // SciPy's not-a-knot CubicSpline: off by 1.7e-5
/// assert!(kappa(1) < 1e-12);
/// ```
pub fn fit_batch(
    t: &[f64],
    x: &[f64],
    dim: usize,
    offsets: &[i64],
    weights: Option<&[f64]>,
    method: &Method,
) -> Result<Fits> {
    let n = t.len();
    if x.len() != n * dim || !(dim == 2 || dim == 3) {
        return Err(KernelError::Shape {
            argument: "positions",
            detail: format!(
                "expected {n} rows of 2 or 3 values, got {} values of width {dim}",
                x.len()
            ),
        });
    }
    let offsets = check_offsets(offsets, n)?;
    check_times(t, &offsets, method.min_samples(), method.name())?;
    if let Some(w) = weights {
        check_weights(w, n, &offsets)?;
    }
    let m = offsets.len() - 1;
    let results: Vec<Result<(TrackFit, Option<Vec<usize>>)>> = (0..m)
        .into_par_iter()
        .map(|k| {
            let r = track_rows(&offsets, k);
            let (tk, xk) = (&t[r.clone()], &x[r.start * dim..r.end * dim]);
            let wk = weights.map(|w| &w[r.clone()]);
            let finite = |i: usize| xk[i * dim..(i + 1) * dim].iter().all(|v| v.is_finite());
            if (0..tk.len()).all(finite) {
                return Ok((
                    fit_track(tk, xk, dim, wk, method).map_err(|e| e.in_track(k))?,
                    None,
                ));
            }
            let keep = try_collect(tk.len(), (0..tk.len()).filter(|&i| finite(i)))?;
            if keep.len() < method.min_samples() {
                return Ok((TrackFit::Invalid, Some(keep)));
            }
            let tv = try_collect(keep.len(), keep.iter().map(|&i| tk[i]))?;
            let xv = try_collect(
                keep.len() * dim,
                keep.iter()
                    .flat_map(|&i| xk[i * dim..(i + 1) * dim].iter().copied()),
            )?;
            let wv = match wk {
                Some(w) => Some(try_collect(keep.len(), keep.iter().map(|&i| w[i]))?),
                None => None,
            };
            let fit = fit_track(&tv, &xv, dim, wv.as_deref(), method).map_err(|e| e.in_track(k))?;
            Ok((fit, Some(keep)))
        })
        .collect();
    let mut tracks = Vec::with_capacity(m);
    let mut rows = Vec::with_capacity(m);
    for r in results {
        let (f, k) = r?;
        tracks.push(f);
        rows.push(k);
    }
    Ok(Fits {
        dim,
        offsets,
        tracks,
        rows,
    })
}

/// Derivative `nu` (0..=3) of every track at times `t` grouped by track with `query_offsets`
/// (row-major, `dim` columns). NaN for non-finite times and invalid tracks.
///
/// # Examples
///
/// ```
/// use osculate::fit::{evaluate, fit_batch, Method};
/// use osculate::spline::EndCondition;
/// // The interpolating cubic reproduces the cubic x = t³, y = t (closed form), between samples too.
/// let t: Vec<f64> = (0..8).map(f64::from).collect();
/// let x: Vec<f64> = t.iter().flat_map(|&s| [s * s * s, s]).collect();
/// let fits = fit_batch(&t, &x, 2, &[0, 8], None, &Method::Spline(EndCondition::NotAKnot)).unwrap();
/// let p = evaluate(&fits, &[2.5], &[0, 1], 0).unwrap();
/// assert!((p[0] - 15.625).abs() < 1e-12 && (p[1] - 2.5).abs() < 1e-12);
/// let v = evaluate(&fits, &[2.5], &[0, 1], 1).unwrap();
/// assert!((v[0] - 18.75).abs() < 1e-10);
/// assert!(evaluate(&fits, &[2.5], &[0, 1], 4).is_err()); // nu above 3
/// ```
pub fn evaluate(fits: &Fits, t: &[f64], query_offsets: &[i64], nu: usize) -> Result<Vec<f64>> {
    if nu > 3 {
        return Err(KernelError::Option {
            argument: "nu",
            detail: format!("must be 0, 1, 2 or 3, got {nu}"),
        });
    }
    let q = crate::batch::check_query_offsets(query_offsets, t.len(), fits.tracks.len())?;
    let d = fits.dim;
    let mut out = crate::error::try_filled(t.len() * d, f64::NAN)?;
    let m = q.len() - 1;
    crate::batch::partition(&mut out[..], (0..m).map(|k| (q[k + 1] - q[k]) * d))
        .into_par_iter()
        .enumerate()
        .for_each(|(k, o)| {
            let mut buf = [0.0; 12];
            for (j, &tq) in t[q[k]..q[k + 1]].iter().enumerate() {
                if tq.is_finite() {
                    fits.tracks[k].at_time(tq, &mut buf[..4 * d]);
                    o[j * d..(j + 1) * d].copy_from_slice(&buf[nu * d..(nu + 1) * d]);
                }
            }
        });
    Ok(out)
}

#[cfg(test)]
#[path = "fit_tests.rs"]
mod tests;

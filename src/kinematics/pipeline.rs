//! From samples to finished kinematics in one call: the estimate, the data checks' statistics,
//! stops, the moving stretches between stops refitted on their own, stop rows held still, the
//! frame asked for, and the rows put back in the caller's order.
//!
//! Each stage is a kernel of its own ([`super::kinematics`], [`crate::fit`],
//! [`crate::diagnose`], [`crate::stops`], [`crate::rmf`]); this module only strings them
//! together, so a call from Python crosses into Rust once.

use super::{kinematics_in, of_fits, of_fits_in, Kinematics, Lend, Options};
use crate::batch::check_offsets;
use crate::diagnose::{fd_swamped, track_stats, TrackStats};
use crate::diff::FdOrder;
use crate::error::{try_collect, try_copy, KernelError, Result};
use crate::fit::{fit_batch, FitInfo, Method};
pub use crate::fit_options::Estimator;
use crate::frame::flag;
use crate::stops::{centres, find_stops, held_mask, StopRows};

/// Which normal and binormal are returned.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Frame {
    /// The Frenet frame (undefined where the path is straight or stopped).
    Frenet,
    /// The rotation-minimizing frame by double reflection, started from the given normal (the
    /// Frenet normal where first defined when `None`).
    RotationMinimizing(Option<[f64; 3]>),
}

impl Frame {
    /// The frame named `name` ("frenet" or "rotation-minimizing"); `initial` only applies to
    /// the rotation-minimizing one.
    pub fn from_options(name: &str, initial: Option<[f64; 3]>) -> Result<Frame> {
        match (name, initial) {
            ("frenet", None) => Ok(Frame::Frenet),
            ("rotation-minimizing", i) => Ok(Frame::RotationMinimizing(i)),
            ("frenet", Some(_)) => Err(KernelError::Option {
                argument: "initial",
                detail: "only applies to frame='rotation-minimizing'".into(),
            }),
            (other, _) => Err(KernelError::Option {
                argument: "frame",
                detail: format!("expected 'frenet' or 'rotation-minimizing', got {other:?}"),
            }),
        }
    }
}

/// Everything a kinematics call asks for besides the arrays.
#[derive(Debug, Clone, PartialEq)]
pub struct Request<'a> {
    /// The estimator.
    pub estimator: Estimator,
    /// Per-row weights of a smoothing spline (kernel order).
    pub weights: Option<&'a [f64]>,
    /// Kinematics options; `outputs` are the columns the caller wants.
    pub options: Options,
    /// Shortest stop (time units); `None`: five mean time steps; infinite: no stops.
    pub min_stop: Option<f64>,
    /// The frame.
    pub frame: Frame,
}

/// The finished kinematics (kernel row order).
#[derive(Debug, PartialEq)]
pub struct Finished<'a> {
    /// Per-row columns, flags and per-track noise.
    pub k: Kinematics<'a>,
    /// Angle from the Frenet normal to the rotation-minimizing one (empty for the Frenet frame).
    pub twist: Vec<f64>,
    /// Stop intervals (kernel rows).
    pub stops: StopRows,
    /// Mean measured position of each stop, row-major.
    pub stop_centres: Vec<f64>,
    /// What the fit chose per track (empty for finite differences).
    pub info: Vec<FitInfo>,
    /// The statistics behind the data checks, from the first estimate.
    pub stats: TrackStats,
    /// Whether finite differences would give accelerations that are mostly noise, per track.
    pub fd_swamped: Vec<bool>,
    /// The estimator used (for "auto", the one chosen).
    pub used: Estimator,
}

/// Shortest moving stretch that is refitted on its own (shorter ones keep the whole-track fit).
pub const MIN_STRETCH: usize = 12;

/// Run the whole kinematics of a batch (tracks contiguous and in time order).
///
/// # Examples
///
/// ```
/// use osculate::diff::FdOrder;
/// use osculate::kinematics::pipeline::{run, Estimator, Frame, Request};
/// use osculate::kinematics::Options;
/// // A unit circle at unit speed that stands still for 2 s in the middle: one stop, held at
/// // speed 0, and curvature 1 (closed form) while moving.
/// let mut t = Vec::new();
/// let mut x = Vec::new();
/// for i in 0..200 {
///     let s = i as f64 * 0.05;
///     let arc = if s < 4.0 { s } else if s < 6.0 { 4.0 } else { s - 2.0 };
///     t.push(s);
///     x.extend([arc.cos(), arc.sin()]);
/// }
/// let request = Request {
///     estimator: Estimator::Fd(FdOrder::Two),
///     weights: None,
///     options: Options::default(),
///     min_stop: None,
///     frame: Frame::Frenet,
/// };
/// let f = run(&t, &x, 2, &[0, 200], &request).unwrap();
/// assert_eq!(f.stops.first.len(), 1);
/// assert_eq!(f.k.speed[100], 0.0);
/// assert!((f.k.curvature[40] - 1.0).abs() < 1e-3);
/// ```
pub fn run(
    t: &[f64],
    x: &[f64],
    dim: usize,
    offsets: &[i64],
    req: &Request,
) -> Result<Finished<'static>> {
    run_in(t, x, dim, offsets, req, Lend::default())
}

/// [`run`] writing the columns `lend` has buffers for into them, in place (kernel row order).
pub fn run_in<'a>(
    t: &[f64],
    x: &[f64],
    dim: usize,
    offsets: &[i64],
    req: &Request,
    lend: Lend<'a>,
) -> Result<Finished<'a>> {
    check_estimator(&req.estimator)?;
    let off = check_offsets(offsets, t.len())?;
    let rmf = matches!(req.frame, Frame::RotationMinimizing(_));
    let mut opts = req.options;
    if rmf {
        // The frame is carried along the tangents and the (fitted) positions.
        opts.outputs = opts.outputs.with(&["tangent", "normal", "position"]);
    }
    // Statistics and verdict of the finite differences "auto" kept (computed once).
    let mut kept = None;
    let (mut k, fits_method, fits_info) = match &req.estimator {
        Estimator::Fd(order) => (
            fd(t, x, dim, offsets, *order, &opts, lend)?,
            None,
            Vec::new(),
        ),
        Estimator::Fit(m) => {
            let (k, info) = fitted(t, x, dim, offsets, req.weights, m, &opts, lend)?;
            (k, Some(m), info)
        }
        Estimator::Auto { order, fallback } => {
            let k = fd(t, x, dim, offsets, *order, &opts, lend)?;
            let stats = track_stats(t, x, dim, offsets, &k.flags)?;
            let swamped = fd_swamped(&stats, &k.noise, x, dim, &off);
            if swamped.iter().any(|&b| b) {
                let lend = k.into_lend();
                let fit_opts = Options {
                    uncertainty: keeps_covariance(fallback),
                    ..opts
                };
                let (k, info) = fitted(t, x, dim, offsets, req.weights, fallback, &fit_opts, lend)?;
                // The fallback's flags are new; the verdict stays that of finite differences.
                kept = Some((track_stats(t, x, dim, offsets, &k.flags)?, swamped));
                (k, Some(fallback), info)
            } else {
                kept = Some((stats, swamped));
                (k, None, Vec::new())
            }
        }
    };
    let (stats, swamped) = match kept {
        Some(s) => s,
        None => {
            let stats = track_stats(t, x, dim, offsets, &k.flags)?;
            let swamped = fd_swamped(&stats, &k.noise, x, dim, &off);
            (stats, swamped)
        }
    };
    let stops = find_stops(t, x, dim, &k.flags, offsets, &k.noise, req.min_stop)?;
    let stop_centres = centres(x, dim, &stops)?;
    let held = held_mask(&stops, t.len())?;
    let mut info = fits_info;
    if let Some(m @ (Method::Smooth { .. } | Method::Local { .. })) = fits_method {
        let fit_opts = Options {
            uncertainty: k.se_w == 1,
            ..opts
        };
        let req = Refit {
            method: m,
            weights: req.weights,
            opts: &fit_opts,
        };
        refit_moving(t, x, dim, &off, &held, &req, &mut k, &mut info)?;
    }
    hold(&mut k, &held);
    let mut twist = Vec::new();
    if let Frame::RotationMinimizing(initial) = req.frame {
        let f = crate::rmf::rotation_minimizing(
            &k.position,
            &k.tangent,
            &k.normal,
            dim,
            offsets,
            initial,
        )?;
        k.normal.set(f.normal);
        k.binormal.set(f.binormal);
        twist = f.twist;
    }
    Ok(Finished {
        k,
        twist,
        stops,
        stop_centres,
        info,
        stats,
        fd_swamped: swamped,
        used: match (fits_method, &req.estimator) {
            (Some(m), _) => Estimator::Fit(m.clone()),
            (None, Estimator::Fd(o) | Estimator::Auto { order: o, .. }) => Estimator::Fd(*o),
            (None, Estimator::Fit(m)) => Estimator::Fit(m.clone()),
        },
    })
}

/// The estimators that give every quantity of the kinematics.
fn check_estimator(e: &Estimator) -> Result<()> {
    match e {
        Estimator::Fit(Method::Linear) => Err(KernelError::Option {
            argument: "method",
            detail: "'linear' has no curvature; use it with resample() or fit() only".into(),
        }),
        Estimator::Fit(Method::Local { degree, .. }) if *degree < 3 => Err(KernelError::Option {
            argument: "degree",
            detail: format!(
                "torsion and jerk need r‴, so local fits need degree >= 3, got {degree}"
            ),
        }),
        _ => Ok(()),
    }
}

fn fd<'a>(
    t: &[f64],
    x: &[f64],
    dim: usize,
    offsets: &[i64],
    order: FdOrder,
    opts: &Options,
    lend: Lend<'a>,
) -> Result<Kinematics<'a>> {
    kinematics_in(t, x, dim, offsets, &Options { order, ..*opts }, lend)
}

#[allow(clippy::too_many_arguments)]
fn fitted<'a>(
    t: &[f64],
    x: &[f64],
    dim: usize,
    offsets: &[i64],
    weights: Option<&[f64]>,
    method: &Method,
    opts: &Options,
    lend: Lend<'a>,
) -> Result<(Kinematics<'a>, Vec<FitInfo>)> {
    let fits = fit_batch(t, x, dim, offsets, weights, method)?;
    let k = of_fits_in(&fits, opts, lend)?;
    Ok((k, fits.tracks.iter().map(|f| f.info()).collect()))
}

/// How the moving stretches are fitted again.
struct Refit<'a> {
    method: &'a Method,
    weights: Option<&'a [f64]>,
    opts: &'a Options,
}

/// Fit the moving stretches between stops again, each on its own, and write them into `k`.
///
/// A stop is a position held, not a curve: fitted together with the moving parts, its jitter
/// and the abrupt start and end of motion drive the automatic smoothing far down (on an
/// invented stop-and-go log, λ* 9 for the whole track against 150–1700 for its moving
/// stretches), which leaves curvature mostly noise. Stretches of tracks without stops, and
/// stretches shorter than [`MIN_STRETCH`] samples (or than a fixed local window), keep the
/// whole-track fit. A track's fit choices become those of its longest refitted stretch (the
/// later one of equal length).
#[allow(clippy::too_many_arguments)]
fn refit_moving(
    t: &[f64],
    x: &[f64],
    dim: usize,
    off: &[usize],
    held: &[bool],
    req: &Refit,
    k: &mut Kinematics<'_>,
    info: &mut [FitInfo],
) -> Result<()> {
    let m = off.len() - 1;
    let min_len = match req.method {
        Method::Local {
            window: crate::local::Window::Samples(w),
            ..
        } => MIN_STRETCH.max(*w),
        _ => MIN_STRETCH,
    };
    // Moving stretches of tracks with a stop: (track, first row, end row).
    let mut stretches = Vec::new();
    for tr in 0..m {
        let (a, b) = (off[tr], off[tr + 1]);
        if !held[a..b].iter().any(|&h| h) {
            continue;
        }
        let mut i = a;
        while i < b {
            let mut j = i + 1;
            while j < b && held[j] == held[i] {
                j += 1;
            }
            if !held[i] && j - i >= min_len {
                stretches.push((tr, i, j));
            }
            i = j;
        }
    }
    if stretches.is_empty() {
        return Ok(());
    }
    let total: usize = stretches.iter().map(|s| s.2 - s.1).sum();
    let rows = try_collect(total, stretches.iter().flat_map(|s| s.1..s.2))?;
    let sub_t = try_collect(total, rows.iter().map(|&r| t[r]))?;
    let sub_x = try_collect(
        total * dim,
        rows.iter()
            .flat_map(|&r| x[r * dim..(r + 1) * dim].iter().copied()),
    )?;
    let sub_w = match req.weights {
        Some(w) => Some(try_collect(total, rows.iter().map(|&r| w[r]))?),
        None => None,
    };
    let mut sub_off = try_collect(stretches.len() + 1, std::iter::once(0i64))?;
    let mut acc = 0i64;
    for s in &stretches {
        acc += (s.2 - s.1) as i64;
        sub_off.push(acc);
    }
    let in_batch = |e: KernelError| locate(e, &stretches, &rows);
    let fits =
        fit_batch(&sub_t, &sub_x, dim, &sub_off, sub_w.as_deref(), req.method).map_err(in_batch)?;
    let part = of_fits(&fits, req.opts).map_err(in_batch)?;
    let whole_s = if k.has("arclength") {
        Some(try_copy(&k.arclength)?)
    } else {
        None
    };
    let mut dst = k.rows();
    for (j, &r) in rows.iter().enumerate() {
        dst.copy_row(r, &part, j);
    }
    if let Some(whole) = whole_s {
        join_arclength(&whole, &mut k.arclength, &stretches, held, off);
    }
    // Per track, the choices of its longest refitted stretch.
    let mut best = vec![0usize; m];
    for (s, &(tr, a, b)) in stretches.iter().enumerate() {
        if b - a >= best[tr] && !info.is_empty() {
            best[tr] = b - a;
            let sub = fits.tracks[s].info();
            let i = &mut info[tr];
            (i.smoothing, i.edf, i.criterion, i.window) =
                (sub.smoothing, sub.edf, sub.criterion, sub.window);
        }
    }
    Ok(())
}

/// An error of the refit, moved from the stretch batch to the caller's batch.
fn locate(e: KernelError, stretches: &[(usize, usize, usize)], rows: &[usize]) -> KernelError {
    match e {
        KernelError::Row {
            argument,
            track,
            row,
            detail,
        } => KernelError::Row {
            argument,
            track: stretches[track].0,
            row: rows[row],
            detail,
        },
        KernelError::Track {
            argument,
            track,
            detail,
        } => KernelError::Track {
            argument,
            track: stretches[track].0,
            detail,
        },
        KernelError::TooShort {
            track,
            have,
            need,
            method,
        } => KernelError::TooShort {
            track: stretches[track].0,
            have,
            need,
            method,
        },
        other => other,
    }
}

/// Cumulative length per track from the increments of both fits: inside a refitted stretch
/// those of the refit, the step into a stretch those of the whole-track fit, zero while held.
fn join_arclength(
    whole: &[f64],
    s: &mut [f64],
    stretches: &[(usize, usize, usize)],
    held: &[bool],
    off: &[usize],
) {
    let n = whole.len();
    let mut refit = vec![false; n];
    for &(_, a, b) in stretches {
        // The first row of a stretch is reached by a step of the whole-track fit.
        refit[a + 1..b].iter_mut().for_each(|r| *r = true);
    }
    for tr in 0..off.len() - 1 {
        let (a, b) = (off[tr], off[tr + 1]);
        // Increments of the forward-filled values of each fit (0 before the first finite one).
        let (mut last_w, mut last_r) = (0.0, 0.0);
        let mut acc = 0.0;
        for i in a..b {
            let (w, r) = (whole[i], s[i]);
            let fw = if w.is_nan() { last_w } else { w };
            let fr = if r.is_nan() { last_r } else { r };
            let inc = if i == a || (held[i] && held[i - 1]) {
                0.0
            } else if refit[i] {
                fr - last_r
            } else {
                fw - last_w
            };
            (last_w, last_r) = (fw, fr);
            acc += inc;
            s[i] = if w.is_nan() { f64::NAN } else { acc };
        }
    }
}

/// Make the rows of stops stand still: zero velocity and acceleration, STOPPED, no frame; held
/// values are set, not estimated, so they have no standard error (the position keeps its).
fn hold(k: &mut Kinematics<'_>, held: &[bool]) {
    let rows: Vec<usize> = (0..k.n)
        .filter(|&i| held[i] && k.flags[i] & flag::INVALID == 0)
        .collect();
    k.hold_rows(&rows);
}

/// Whether the fits of `m` keep what standard errors need.
fn keeps_covariance(m: &Method) -> bool {
    matches!(
        m,
        Method::Smooth {
            covariance: Some(_),
            ..
        } | Method::Local {
            uncertainty: true,
            ..
        }
    )
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::fit::fit_batch;
    use crate::smooth::Smoothing;

    /// A unit circle at unit speed, 20 Hz, standing still from t = 4 s to t = 6 s, with
    /// alternating ±`e` noise on x (deterministic).
    fn stop_and_go(e: f64) -> (Vec<f64>, Vec<f64>) {
        let mut t = Vec::new();
        let mut x = Vec::new();
        for i in 0..240 {
            let s = i as f64 * 0.05;
            let arc = if s < 4.0 {
                s
            } else if s < 6.0 {
                4.0
            } else {
                s - 2.0
            };
            let jitter = if i % 2 == 0 { e } else { -e };
            t.push(s);
            x.extend([arc.cos() + jitter, arc.sin()]);
        }
        (t, x)
    }

    fn request(estimator: Estimator) -> Request<'static> {
        Request {
            estimator,
            weights: None,
            options: Options::default(),
            min_stop: None,
            frame: Frame::Frenet,
        }
    }

    fn smooth() -> Method {
        Method::Smooth {
            degree: 5,
            smoothing: Smoothing::Gcv,
            derivative: 0,
            covariance: None,
        }
    }

    #[test]
    fn stop_rows_are_held_still() {
        let (t, x) = stop_and_go(0.0);
        let f = run(&t, &x, 2, &[0, 240], &request(Estimator::Fd(FdOrder::Two))).unwrap();
        assert_eq!(f.stops.first.len(), 1);
        let (a, b) = (f.stops.first[0], f.stops.last[0]);
        // The held rows lie inside the true stop, rows 80..=120 (closed form of the path).
        assert!(
            (80..=84).contains(&a) && (116..=120).contains(&b),
            "{a}..{b}"
        );
        for i in a..=b {
            assert_eq!(f.k.speed[i], 0.0);
            assert_eq!(f.k.velocity[2 * i], 0.0);
            assert!(f.k.curvature[i].is_nan() && f.k.tangent[2 * i].is_nan());
            assert_eq!(f.k.flags[i] & flag::STOPPED, flag::STOPPED);
            assert_eq!(f.k.flags[i] & (flag::STRAIGHT | flag::VAGUE), 0);
        }
        // Standing still adds no length: the arc length over the stop is constant.
        assert_eq!(f.k.arclength[a], f.k.arclength[b]);
        assert_eq!(f.used.name(), "fd");
        assert!(f.info.is_empty());
    }

    #[test]
    fn moving_stretches_are_the_fits_of_the_stretches_alone() {
        let (t, x) = stop_and_go(0.002);
        let opts = Options {
            uncertainty: false,
            ..Options::default()
        };
        let req = Request {
            options: opts,
            ..request(Estimator::Fit(smooth()))
        };
        let f = run(&t, &x, 2, &[0, 240], &req).unwrap();
        assert_eq!(f.stops.first.len(), 1);
        let last = f.stops.last[0];
        // Reference: the stretch after the stop fitted on its own by the same kernels.
        let (ts, xs) = (&t[last + 1..], &x[2 * (last + 1)..]);
        let alone = fit_batch(ts, xs, 2, &[0, ts.len() as i64], None, &smooth()).unwrap();
        let k = of_fits(&alone, &opts).unwrap();
        for j in 0..ts.len() {
            // Same arithmetic on the same rows: equal to the last bit.
            assert_eq!(
                f.k.curvature[last + 1 + j].to_bits(),
                k.curvature[j].to_bits()
            );
            assert_eq!(f.k.speed[last + 1 + j].to_bits(), k.speed[j].to_bits());
        }
        // The track reports the choices of its longest refitted stretch (the first, 80 rows).
        assert_eq!(f.info.len(), 1);
        assert!(f.info[0].smoothing.is_finite());
    }

    #[test]
    fn arclength_joins_the_increments_of_both_fits() {
        // Rows 0..3 whole-track fit, 3..6 a refitted stretch (starting from 0), 6..8 held.
        let whole = [0.0, 1.0, 2.0, 3.0, 4.0, 5.0, 5.5, 5.6];
        let mut s = [0.0, 1.0, 2.0, 0.0, 1.5, 3.0, 5.5, 5.6];
        let held = [false, false, false, false, false, false, true, true];
        join_arclength(&whole, &mut s, &[(0, 3, 6)], &held, &[0, 8]);
        // Steps: 1, 1, 1 (into the stretch, whole fit), 1.5, 1.5 (refit), 0.5 (into the
        // hold, whole fit), 0 (held).
        assert_eq!(s, [0.0, 1.0, 2.0, 3.0, 4.5, 6.0, 6.5, 6.5]);
    }

    #[test]
    fn auto_keeps_finite_differences_on_exact_data_and_smooths_noise() {
        let (t, x) = stop_and_go(0.0);
        let auto = Estimator::Auto {
            order: FdOrder::Two,
            fallback: smooth(),
        };
        let exact = run(&t, &x, 2, &[0, 240], &request(auto.clone())).unwrap();
        let fd = run(&t, &x, 2, &[0, 240], &request(Estimator::Fd(FdOrder::Two))).unwrap();
        assert_eq!(exact.used.name(), "fd");
        let bits = |v: &[f64]| v.iter().map(|x| x.to_bits()).collect::<Vec<_>>();
        assert!(bits(&exact.k.curvature) == bits(&fd.k.curvature));
        assert!(bits(&exact.k.accel_tangential) == bits(&fd.k.accel_tangential));
        assert!(exact.k.flags == fd.k.flags);
        // ±2 cm at 20 Hz: the 3-point r″ has a standard error of about √6·0.02/0.0025 ≈ 20,
        // against |r″| = 1 on the circle (closed form).
        let (t, x) = stop_and_go(0.02);
        let noisy = run(&t, &x, 2, &[0, 240], &request(auto)).unwrap();
        assert_eq!(noisy.used.name(), "smooth");
        assert_eq!(noisy.fd_swamped, vec![true]);
        assert_eq!(noisy.info.len(), 1);
    }

    #[test]
    fn frame_names_are_checked() {
        assert_eq!(Frame::from_options("frenet", None).unwrap(), Frame::Frenet);
        let e = Frame::from_options("frenet", Some([0.0, 0.0, 1.0])).unwrap_err();
        assert_eq!(e.argument(), "initial");
        let e = Frame::from_options("bishop", None).unwrap_err();
        assert_eq!(e.argument(), "frame");
    }
}

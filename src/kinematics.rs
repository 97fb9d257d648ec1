//! Per-sample kinematics of ragged batches of tracks by finite differences, in one fused pass:
//! stencil → r′, r″, r‴ → Frenet apparatus → outputs, with no temporaries per sample.
//!
//! Rows whose position is not finite are INVALID: the track is compacted to its finite rows, the
//! estimates are made on those, and every sample whose stencil reached across a removed row is
//! flagged GAP, so no estimate is silently poisoned and none silently bridges a hole.

use crate::batch::{self, partition, plan_jobs, track_rows, SplitRows};
use crate::diff::{derivatives_at, reach, FdOrder};
use crate::error::{try_collect, try_filled, try_zeroed, KernelError, Result};
use crate::fit::{Fits, TrackFit};
use crate::frame::{flag, frenet, Thresholds};
use crate::uncertainty::{self, at, propagate, Errors, Gram, Significance};
use nalgebra::Vector3;
use rayon::prelude::*;

/// Options of [`kinematics`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Options {
    /// Finite-difference order.
    pub order: FdOrder,
    /// When the frame is undefined.
    pub thresholds: Thresholds,
    /// A time step longer than `gap_factor` × the track's median step is a gap.
    pub gap_factor: f64,
    /// Axis of the signed curvature for 3-D paths (planar paths always use +z).
    pub up: Option<[f64; 3]>,
    /// Write the standard errors (finite differences compute them also when `significance`
    /// needs them; fitted tracks have them when their fit kept the covariance).
    pub uncertainty: bool,
    /// Flags judged against the standard errors.
    pub significance: Significance,
}

impl Default for Options {
    fn default() -> Self {
        Options {
            order: FdOrder::Two,
            thresholds: Thresholds::default(),
            gap_factor: 5.0,
            up: None,
            uncertainty: false,
            significance: Significance::default(),
        }
    }
}

macro_rules! width {
    (dim, $d:expr, $s:expr) => {
        $d
    };
    (three, $d:expr, $s:expr) => {
        3
    };
    (one, $d:expr, $s:expr) => {
        1
    };
    (se, $d:expr, $s:expr) => {
        $s
    };
}

macro_rules! columns {
    ($($(#[$doc:meta])* $name:ident : $w:ident),* $(,)?) => {
        /// Kinematics of every row, row-major; vectors have the path's dimension `dim` except the
        /// binormal, which is always 3-D (for planar paths it is (0, 0, ±1)).
        #[derive(Debug, Clone, PartialEq)]
        pub struct Kinematics {
            /// Rows.
            pub n: usize,
            /// 2 or 3.
            pub dim: usize,
            /// 1 when the standard-error columns (`se_…`) are present, else 0 (they are empty).
            pub se_w: usize,
            $($(#[$doc])* pub $name: Vec<f64>,)*
            /// Bit flags per row, see [`crate::frame::flag`].
            pub flags: Vec<u8>,
            /// Noise standard deviation per track (position units; NaN where not estimated).
            pub noise: Vec<f64>,
        }

        /// Mutable view of some consecutive rows of a [`Kinematics`].
        pub struct Rows<'a> {
            dim: usize,
            se_w: usize,
            $($name: &'a mut [f64],)*
            flags: &'a mut [u8],
        }

        impl Kinematics {
            /// Outputs for `n` rows, filled with NaN; standard-error columns when `se`.
            pub fn alloc(n: usize, dim: usize, se: bool) -> Result<Self> {
                let s = usize::from(se);
                Ok(Kinematics {
                    n,
                    dim,
                    se_w: s,
                    $($name: try_filled(n * width!($w, dim, s), f64::NAN)?,)*
                    flags: try_filled(n, 0u8)?,
                    noise: Vec::new(),
                })
            }

            /// Outputs for `n` rows on zeroed pages: every row must then be written (by
            /// `emit` or `fill_nan`), which saves a pass over the memory.
            fn alloc_zeroed(n: usize, dim: usize, se: bool) -> Result<Self> {
                let s = usize::from(se);
                Ok(Kinematics {
                    n,
                    dim,
                    se_w: s,
                    $($name: try_zeroed(n * width!($w, dim, s))?,)*
                    flags: try_filled(n, 0u8)?,
                    noise: Vec::new(),
                })
            }

            fn rows(&mut self) -> Rows<'_> {
                Rows {
                    dim: self.dim,
                    se_w: self.se_w,
                    $($name: &mut self.$name[..],)*
                    flags: &mut self.flags[..],
                }
            }
        }

        impl Rows<'_> {
            /// Set every value of local row `j` to NaN.
            fn fill_nan(&mut self, j: usize) {
                let (d, s) = (self.dim, self.se_w);
                $(
                    let w = width!($w, d, s);
                    self.$name[j * w..(j + 1) * w].fill(f64::NAN);
                )*
            }

            /// Copy row `src_row` of `src` into local row `dst_row`.
            fn copy_row(&mut self, dst_row: usize, src: &Kinematics, src_row: usize) {
                let (d, s) = (self.dim, self.se_w);
                $(
                    let w = width!($w, d, s);
                    self.$name[dst_row * w..(dst_row + 1) * w]
                        .copy_from_slice(&src.$name[src_row * w..(src_row + 1) * w]);
                )*
                self.flags[dst_row] = src.flags[src_row];
            }
        }

        impl SplitRows for Rows<'_> {
            fn split_rows(self, k: usize) -> (Self, Self) {
                let (d, s) = (self.dim, self.se_w);
                $(let $name = self.$name.split_at_mut(k * width!($w, d, s));)*
                let flags = self.flags.split_at_mut(k);
                (
                    Rows { dim: d, se_w: s, $($name: $name.0,)* flags: flags.0 },
                    Rows { dim: d, se_w: s, $($name: $name.1,)* flags: flags.1 },
                )
            }
        }
    };
}

columns! {
    /// r′.
    velocity: dim,
    /// r″.
    acceleration: dim,
    /// r‴.
    jerk: dim,
    /// |r′|.
    speed: one,
    /// Cumulative polyline length from the track's first finite row.
    arclength: one,
    /// T.
    tangent: dim,
    /// N.
    normal: dim,
    /// B (always 3 wide).
    binormal: three,
    /// κ.
    curvature: one,
    /// κ signed about the up axis (NaN for 3-D paths without one).
    signed_curvature: one,
    /// τ.
    torsion: one,
    /// ρ = 1/κ.
    radius: one,
    /// Centre of the osculating circle r + ρN.
    center: dim,
    /// a_t.
    accel_tangential: one,
    /// a_n = κv².
    accel_normal: one,
    /// ω = κv.
    angular_speed: one,
    /// dω/dt.
    angular_accel: one,
    /// Standard error of each coordinate of the (fitted) position.
    se_position: se,
    /// Standard error of each coordinate of r′.
    se_velocity: se,
    /// Standard error of each coordinate of r″.
    se_acceleration: se,
    /// Standard error of each coordinate of r‴.
    se_jerk: se,
    /// Standard error of the speed.
    se_speed: se,
    /// Standard error of a_t.
    se_accel_tangential: se,
    /// Standard error of a_n.
    se_accel_normal: se,
    /// Standard error of κ (and of the signed curvature).
    se_curvature: se,
    /// Standard error of τ.
    se_torsion: se,
    /// Standard error of ω.
    se_angular_speed: se,
    /// Standard error of ρ (NaN where κ = 0).
    se_radius: se,
}

/// Per-track facts needed by every job of the track.
struct TrackPrep {
    gap_dt: f64,
    has_invalid: bool,
    /// Difference-based noise of the finite rows.
    noise: f64,
}

fn check_options(opts: &Options) -> Result<Option<Vector3<f64>>> {
    let th = &opts.thresholds;
    let bad = |argument, value: f64| KernelError::Option {
        argument,
        detail: format!("must be finite and >= 0, got {value}"),
    };
    if th.min_speed.is_nan() || th.min_speed < 0.0 || th.min_speed.is_infinite() {
        return Err(bad("min_speed", th.min_speed));
    }
    if th.min_curvature.is_nan() || th.min_curvature < 0.0 || th.min_curvature.is_infinite() {
        return Err(bad("min_curvature", th.min_curvature));
    }
    let sig = &opts.significance;
    if !(sig.z > 0.0 && sig.z.is_finite()) {
        return Err(KernelError::Option {
            argument: "significance",
            detail: format!("must be finite and > 0, got {}", sig.z),
        });
    }
    if sig.max_relative.is_nan() || sig.max_relative <= 0.0 {
        return Err(KernelError::Option {
            argument: "max_relative_se",
            detail: format!("must be > 0, got {}", sig.max_relative),
        });
    }
    if opts.gap_factor.is_nan() || opts.gap_factor <= 1.0 {
        return Err(KernelError::Option {
            argument: "gap_factor",
            detail: format!(
                "must be > 1 (or infinite to disable), got {}",
                opts.gap_factor
            ),
        });
    }
    match opts.up {
        None => Ok(None),
        Some(u) => {
            // Scale by the largest component first: a direction may be given with huge numbers.
            let big = u.iter().fold(0.0f64, |a, v| a.max(v.abs()));
            let u = if big > 0.0 && big.is_finite() {
                Vector3::from(u) / big
            } else {
                Vector3::from(u)
            };
            let norm = u.norm();
            if norm.is_nan() || norm == 0.0 || norm.is_infinite() {
                return Err(KernelError::Option {
                    argument: "up",
                    detail: format!("must be a finite non-zero vector, got {u:?}"),
                });
            }
            Ok(Some(u / norm))
        }
    }
}

/// Finite-difference kinematics of every row of a batch of tracks.
///
/// `t` has one time per row, `x` the positions row-major with `dim` (2 or 3) columns, `offsets` the
/// `m + 1` row offsets of the `m` tracks.
///
/// # Examples
///
/// ```
/// use osculate::kinematics::{kinematics, Options};
/// // A quarter of the unit circle at unit speed, 40 samples.
/// let t: Vec<f64> = (0..40).map(|i| i as f64 * 0.04).collect();
/// let x: Vec<f64> = t.iter().flat_map(|&s| [s.cos(), s.sin()]).collect();
/// let k = kinematics(&t, &x, 2, &[0, 40], &Options::default()).unwrap();
/// assert!((k.curvature[20] - 1.0).abs() < 1e-3);
/// assert!((k.speed[20] - 1.0).abs() < 1e-3);
/// ```
pub fn kinematics(
    t: &[f64],
    x: &[f64],
    dim: usize,
    offsets: &[i64],
    opts: &Options,
) -> Result<Kinematics> {
    match dim {
        2 => run::<2>(t, x, offsets, opts),
        3 => run::<3>(t, x, offsets, opts),
        _ => Err(KernelError::Shape {
            argument: "positions",
            detail: format!("must have 2 or 3 columns, got {dim}"),
        }),
    }
}

fn run<const D: usize>(
    t: &[f64],
    x: &[f64],
    offsets: &[i64],
    opts: &Options,
) -> Result<Kinematics> {
    let n = t.len();
    if x.len() != n * D {
        return Err(KernelError::Shape {
            argument: "positions",
            detail: format!("has {} values, expected {} rows of {D}", x.len(), n),
        });
    }
    let up = check_options(opts)?;
    let up = if D == 2 { Some(Vector3::z()) } else { up };
    let offsets = batch::check_offsets(offsets, n)?;
    let need = opts.order.min_samples();
    batch::check_times(t, &offsets, need, "fd")?;

    let m = offsets.len() - 1;
    let prep: Vec<TrackPrep> = (0..m)
        .into_par_iter()
        .map(|k| {
            let rows = track_rows(&offsets, k);
            let has_invalid = x[rows.start * D..rows.end * D]
                .iter()
                .any(|v| !v.is_finite());
            let (tk, xk) = (&t[rows.clone()], &x[rows.start * D..rows.end * D]);
            let gap_dt = if has_invalid {
                f64::NAN // decided on the compacted track
            } else {
                opts.gap_factor * batch::median_step(tk)?
            };
            let noise = uncertainty::difference_noise(tk, xk, D)?;
            Ok(TrackPrep {
                gap_dt,
                has_invalid,
                noise,
            })
        })
        .collect::<Result<Vec<_>>>()?;

    let mut out = Kinematics::alloc_zeroed(n, D, opts.uncertainty)?;
    let jobs = plan_jobs(&offsets, |k| prep[k].has_invalid);
    let parts = partition(out.rows(), jobs.iter().map(|j| j.rows.len()));
    jobs.par_iter()
        .zip(parts)
        .try_for_each(|(job, rows)| -> Result<()> {
            let tr = track_rows(&offsets, job.track);
            let (tk, xk) = (&t[tr.clone()], &x[tr.start * D..tr.end * D]);
            let p = &prep[job.track];
            let local = job.rows.start - tr.start..job.rows.end - tr.start;
            if p.has_invalid {
                compacted::<D>(tk, xk, opts, up.as_ref(), p.noise, rows)
            } else {
                let ctx = Context {
                    opts,
                    up: up.as_ref(),
                    gap_dt: p.gap_dt,
                    noise: p.noise,
                };
                dense::<D>(tk, xk, local, &ctx, None, rows);
                Ok(())
            }
        })?;

    accumulate_arclength(&mut out.arclength, &offsets);
    out.noise = prep.iter().map(|p| p.noise).collect();
    Ok(out)
}

/// Turn per-row segment lengths into cumulative lengths per track (NaN rows stay NaN).
fn accumulate_arclength(s: &mut [f64], offsets: &[usize]) {
    let m = offsets.len() - 1;
    partition(s, (0..m).map(|k| offsets[k + 1] - offsets[k]))
        .into_par_iter()
        .for_each(|seg| {
            let mut acc = 0.0;
            for v in seg.iter_mut().filter(|v| !v.is_nan()) {
                acc += *v;
                *v = acc;
            }
        });
}

/// Kinematics at the samples of fitted tracks (spline, smoothing spline or local polynomials).
///
/// Rows left out of a fit (non-finite positions) are INVALID; samples next to them, or next to a
/// time step longer than `gap_factor` × the track's median step, are GAP.
pub fn of_fits(fits: &Fits, opts: &Options) -> Result<Kinematics> {
    match fits.dim {
        2 => of_fits_dim::<2>(fits, opts),
        3 => of_fits_dim::<3>(fits, opts),
        d => Err(KernelError::Shape {
            argument: "positions",
            detail: format!("must have 2 or 3 columns, got {d}"),
        }),
    }
}

fn of_fits_dim<const D: usize>(fits: &Fits, opts: &Options) -> Result<Kinematics> {
    let up = check_options(opts)?;
    let up = if D == 2 { Some(Vector3::z()) } else { up };
    let offsets = &fits.offsets;
    let n = offsets[offsets.len() - 1];
    let m = offsets.len() - 1;
    let se = opts.uncertainty && fits.tracks.iter().any(|f| f.gram(0).is_some());
    let mut out = Kinematics::alloc(n, D, se)?;
    let parts = partition(out.rows(), (0..m).map(|k| offsets[k + 1] - offsets[k]));
    parts.into_par_iter().enumerate().for_each(|(k, mut rows)| {
        let fit = &fits.tracks[k];
        let noise = fit.noise();
        let kept = fits.rows[k].as_deref();
        let len = offsets[k + 1] - offsets[k];
        if kept.is_some() {
            rows.flags[..len]
                .iter_mut()
                .for_each(|f| *f = flag::INVALID);
        }
        let tf = fit.times();
        if tf.is_empty() {
            return;
        }
        // A failed allocation here only loses the GAP flags of this track.
        let gap_dt = opts.gap_factor * batch::median_step(tf).unwrap_or(f64::INFINITY);
        let row_of = |j: usize| kept.map_or(j, |r| r[j]);
        let nf = tf.len();
        let step_is_gap = |j: usize| {
            // Step between fitted samples j and j + 1.
            j + 1 < nf && (tf[j + 1] - tf[j] > gap_dt || row_of(j + 1) - row_of(j) > 1)
        };
        let mut buf = [0.0; 12];
        for j in 0..nf {
            fit.at_sample(j, &mut buf[..4 * D]);
            let take = |nu: usize| {
                let mut a = [0.0; D];
                a.copy_from_slice(&buf[nu * D..(nu + 1) * D]);
                a
            };
            let gap = step_is_gap(j) || (j > 0 && step_is_gap(j - 1));
            let flags =
                if fit.is_edge(j) { flag::EDGE } else { 0 } | if gap { flag::GAP } else { 0 };
            let s = Sample {
                p: take(0),
                d1: take(1),
                d2: take(2),
                d3: take(3),
                ds: if j == 0 { 0.0 } else { fit.segment(j) },
                flags,
                unc: fit.gram(j).map(|g| (g, noise)),
                rounding: 0.0,
            };
            rows.emit(row_of(j), &s, up.as_ref(), opts);
        }
    });
    accumulate_arclength(&mut out.arclength, offsets);
    out.noise = fits.tracks.iter().map(TrackFit::noise).collect();
    Ok(out)
}

/// Kinematics of fitted tracks at arbitrary times: `t` grouped by track with `query_offsets`
/// (m + 1 entries, tracks may be empty). Arc length is measured from each track's first fitted
/// sample (negative before it). No GAP or EDGE flags are set.
pub fn of_fits_at(
    fits: &Fits,
    t: &[f64],
    query_offsets: &[i64],
    opts: &Options,
) -> Result<Kinematics> {
    let q = batch::check_query_offsets(query_offsets, t.len(), fits.tracks.len())?;
    match fits.dim {
        2 => of_fits_at_dim::<2>(fits, t, &q, opts),
        _ => of_fits_at_dim::<3>(fits, t, &q, opts),
    }
}

fn of_fits_at_dim<const D: usize>(
    fits: &Fits,
    t: &[f64],
    q: &[usize],
    opts: &Options,
) -> Result<Kinematics> {
    let up = check_options(opts)?;
    let up = if D == 2 { Some(Vector3::z()) } else { up };
    let m = q.len() - 1;
    let mut out = Kinematics::alloc(t.len(), D, false)?;
    let parts = partition(out.rows(), (0..m).map(|k| q[k + 1] - q[k]));
    parts
        .into_par_iter()
        .enumerate()
        .try_for_each(|(k, mut rows)| {
            let fit = &fits.tracks[k];
            let cum = fit.cumulative_length()?;
            let mut buf = [0.0; 12];
            for (j, &tq) in t[q[k]..q[k + 1]].iter().enumerate() {
                if !tq.is_finite() || matches!(fit, crate::fit::TrackFit::Invalid) {
                    rows.flags[j] = flag::INVALID;
                    continue;
                }
                fit.at_time(tq, &mut buf[..4 * D]);
                let take = |nu: usize| {
                    let mut a = [0.0; D];
                    a.copy_from_slice(&buf[nu * D..(nu + 1) * D]);
                    a
                };
                let s = Sample {
                    p: take(0),
                    d1: take(1),
                    d2: take(2),
                    d3: take(3),
                    ds: fit.length_to(&cum, tq),
                    flags: 0,
                    unc: None,
                    rounding: 0.0,
                };
                rows.emit(j, &s, up.as_ref(), opts);
            }
            Ok(())
        })?;
    out.noise = fits.tracks.iter().map(TrackFit::noise).collect();
    Ok(out)
}

/// The derivatives of one sample and where they came from.
struct Sample<const D: usize> {
    /// Position (fitted for smoothing methods).
    p: [f64; D],
    d1: [f64; D],
    d2: [f64; D],
    d3: [f64; D],
    /// Arc length increment from the previous sample of the track.
    ds: f64,
    /// EDGE / GAP bits.
    flags: u8,
    /// Gram matrix of the derivative rows and the noise, for standard errors.
    unc: Option<(Gram, f64)>,
    /// Largest rounding of the stored positions the derivatives were taken from (half an ulp
    /// of the largest coordinate, rounded up to a full one); 0 for fitted paths.
    rounding: f64,
}

fn vec3<const D: usize>(a: &[f64; D]) -> Vector3<f64> {
    let mut v = Vector3::zeros();
    v.as_mut_slice()[..D].copy_from_slice(a);
    v
}

impl Rows<'_> {
    /// Write local row `j` from the derivatives of its sample.
    #[inline]
    fn emit<const D: usize>(
        &mut self,
        j: usize,
        s: &Sample<D>,
        up: Option<&Vector3<f64>>,
        opts: &Options,
    ) {
        let put = |dst: &mut [f64], v: &Vector3<f64>| {
            dst[j * D..(j + 1) * D].copy_from_slice(&v.as_slice()[..D]);
        };
        let (d1, d2, d3) = (vec3(&s.d1), vec3(&s.d2), vec3(&s.d3));
        let sig = &opts.significance;
        // All standard errors when they are written, else only the two the flags need.
        let err = match &s.unc {
            Some((g, sigma)) if self.se_w == 1 => Some(propagate(&d1, &d2, &d3, D, g, *sigma)),
            _ => None,
        };
        let (se_speed, se_kappa) = match (&err, &s.unc) {
            (Some(e), _) => (e.speed, e.curvature),
            (None, Some((g, sigma))) => uncertainty::speed_and_curvature(&d1, &d2, D, g, *sigma),
            (None, None) => (f64::NAN, f64::NAN),
        };
        let mut th = opts.thresholds;
        // NaN standard errors (no noise estimate) leave the absolute thresholds.
        if sig.speed && sig.z * se_speed > th.min_speed {
            th.min_speed = sig.z * se_speed;
        }
        if sig.curvature && sig.z * se_kappa > th.min_curvature {
            th.min_curvature = sig.z * se_kappa;
        }
        if let (Some((g, _)), true) = (&s.unc, s.rounding > 0.0) {
            // No float64 method removes the rounding δ of the stored positions: r′ and r″ can be
            // off by Σ|w|·δ·√D, bounded by √(width·Σw²) from the Gram matrix (Cauchy–Schwarz).
            // A speed or curvature within that of zero is not told apart from zero.
            let width = opts.order.width_low() as f64;
            let root = (D as f64).sqrt() * s.rounding;
            let (dv, da) = (
                (width * g[at(1, 1)]).sqrt() * root,
                (width * g[at(2, 2)]).sqrt() * root,
            );
            let v = d1.norm();
            th.min_speed = th.min_speed.max(dv);
            if v > 0.0 {
                th.min_curvature = th.min_curvature.max(da / (v * v));
            }
        }
        let mut f = frenet(&d1, &d2, &d3, up, &th);
        let defined = f.flags & (flag::STOPPED | flag::STRAIGHT) == 0;
        let rel = sig.max_relative;
        let too_big = |se: f64, v: f64| se.is_finite() && se > rel * v;
        if defined && (too_big(se_kappa, f.curvature) || too_big(se_speed, f.speed)) {
            f.flags |= flag::VAGUE;
        }
        self.velocity[j * D..(j + 1) * D].copy_from_slice(&s.d1);
        self.acceleration[j * D..(j + 1) * D].copy_from_slice(&s.d2);
        self.jerk[j * D..(j + 1) * D].copy_from_slice(&s.d3);
        self.speed[j] = f.speed;
        self.arclength[j] = s.ds;
        put(self.tangent, &f.tangent);
        put(self.normal, &f.normal);
        self.binormal[j * 3..(j + 1) * 3].copy_from_slice(f.binormal.as_slice());
        self.curvature[j] = f.curvature;
        self.signed_curvature[j] = f.signed_curvature;
        self.torsion[j] = f.torsion;
        self.radius[j] = f.radius;
        put(self.center, &(vec3(&s.p) + f.normal * f.radius));
        self.accel_tangential[j] = f.accel_tangential;
        self.accel_normal[j] = f.accel_normal;
        self.angular_speed[j] = f.angular_speed;
        self.angular_accel[j] = f.angular_accel;
        self.flags[j] = f.flags | s.flags;
        if self.se_w == 1 {
            let e = err.unwrap_or(Errors::NAN);
            // A standard error only where its quantity is defined.
            let only = |q: f64, se: f64| if q.is_nan() { f64::NAN } else { se };
            self.se_position[j] = e.position;
            self.se_velocity[j] = e.velocity;
            self.se_acceleration[j] = e.acceleration;
            self.se_jerk[j] = e.jerk;
            self.se_speed[j] = only(f.speed, e.speed);
            self.se_accel_tangential[j] = only(f.accel_tangential, e.accel_tangential);
            self.se_accel_normal[j] = only(f.accel_normal, e.accel_normal);
            self.se_curvature[j] = only(f.curvature, e.curvature);
            self.se_torsion[j] = only(f.torsion, e.torsion);
            self.se_angular_speed[j] = only(f.angular_speed, e.angular_speed);
            self.se_radius[j] = if f.curvature > 0.0 {
                e.curvature / (f.curvature * f.curvature)
            } else {
                f64::NAN
            };
        }
    }
}

/// What every sample of one finite-difference job shares.
struct Context<'a> {
    opts: &'a Options,
    up: Option<&'a Vector3<f64>>,
    /// Time steps longer than this are gaps.
    gap_dt: f64,
    /// Noise of the track.
    noise: f64,
}

/// Estimates for rows `local` of one track whose positions are all finite. `holes[j]` marks rows
/// removed between compacted rows j and j + 1. The arclength column receives segment lengths.
fn dense<const D: usize>(
    t: &[f64],
    x: &[f64],
    local: std::ops::Range<usize>,
    ctx: &Context<'_>,
    holes: Option<&[bool]>,
    mut out: Rows<'_>,
) {
    let (opts, gap_dt) = (ctx.opts, ctx.gap_dt);
    let sig = &opts.significance;
    let want_se = opts.uncertainty || sig.speed || sig.curvature;
    let n = t.len();
    for (j, i) in local.enumerate() {
        let mut gram = [0.0; 10];
        let (d1, d2, d3, edge) =
            derivatives_at::<D>(t, x, i, opts.order, want_se.then_some(&mut gram));
        let (lo, hi) = reach(i, n, opts.order);
        let gap = (lo..hi).any(|q| t[q + 1] - t[q] > gap_dt || holes.is_some_and(|h| h[q]));
        let mut p = [0.0; D];
        p.copy_from_slice(&x[i * D..(i + 1) * D]);
        let ds = if i == 0 {
            0.0
        } else {
            crate::arclength::distance(&x[i * D..(i + 1) * D], &x[(i - 1) * D..i * D])
        };
        let flags = if edge { flag::EDGE } else { 0 } | if gap { flag::GAP } else { 0 };
        let s = Sample {
            p,
            d1,
            d2,
            d3,
            ds,
            flags,
            unc: want_se.then_some((gram, ctx.noise)),
            rounding: p.iter().fold(0.0f64, |m, v| m.max(v.abs())) * f64::EPSILON,
        };
        out.emit(j, &s, ctx.up, opts);
    }
}

/// A whole track that has non-finite rows: estimate on its finite rows, then scatter back.
fn compacted<const D: usize>(
    t: &[f64],
    x: &[f64],
    opts: &Options,
    up: Option<&Vector3<f64>>,
    noise: f64,
    mut out: Rows<'_>,
) -> Result<()> {
    let valid = try_collect(
        t.len(),
        (0..t.len()).filter(|&i| x[i * D..(i + 1) * D].iter().all(|v| v.is_finite())),
    )?;
    for i in 0..t.len() {
        out.fill_nan(i);
        out.flags[i] = flag::INVALID;
    }
    let m = valid.len();
    if m < opts.order.min_samples() {
        return Ok(()); // too few finite rows: the whole track stays NaN and INVALID
    }
    let tv = try_collect(m, valid.iter().map(|&i| t[i]))?;
    let xv = try_collect(
        m * D,
        valid
            .iter()
            .flat_map(|&i| x[i * D..(i + 1) * D].iter().copied()),
    )?;
    let holes = try_collect(m, valid.windows(2).map(|w| w[1] - w[0] > 1))?;
    let ctx = Context {
        opts,
        up,
        gap_dt: opts.gap_factor * batch::median_step(&tv)?,
        noise,
    };
    let mut tmp = Kinematics::alloc(m, D, opts.uncertainty)?;
    dense::<D>(&tv, &xv, 0..m, &ctx, Some(&holes), tmp.rows());
    for (j, &i) in valid.iter().enumerate() {
        out.copy_row(i, &tmp, j);
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    fn helix(n: usize, warp: bool) -> (Vec<f64>, Vec<f64>) {
        let t: Vec<f64> = (0..n)
            .map(|i| {
                let u = i as f64 / (n - 1) as f64;
                6.0 * if warp { u + 0.08 * (7.0 * u).sin() } else { u }
            })
            .collect();
        let x = t
            .iter()
            .flat_map(|&s| [2.0 * s.cos(), 2.0 * s.sin(), 0.5 * s])
            .collect();
        (t, x)
    }

    #[test]
    fn helix_on_uneven_times() {
        // κ = a/(a²+c²) = 2/4.25, τ = c/(a²+c²) = 0.5/4.25 (closed form).
        let (t, x) = helix(400, true);
        for order in [FdOrder::Two, FdOrder::Four] {
            let opts = Options {
                order,
                ..Options::default()
            };
            let k = kinematics(&t, &x, 3, &[0, 400], &opts).unwrap();
            for i in 5..395 {
                assert_relative_eq!(k.curvature[i], 2.0 / 4.25, max_relative = 2e-3);
                assert_relative_eq!(k.torsion[i], 0.5 / 4.25, max_relative = 2e-2);
                assert_eq!(k.flags[i] & flag::EDGE, 0);
            }
            assert_ne!(k.flags[0] & flag::EDGE, 0);
        }
    }

    #[test]
    fn batch_equals_single_tracks_bit_for_bit() {
        let (t1, x1) = helix(50, true);
        let (t2, x2) = helix(70, false);
        let t: Vec<f64> = t1.iter().chain(&t2).copied().collect();
        let x: Vec<f64> = x1.iter().chain(&x2).copied().collect();
        let o = Options::default();
        let both = kinematics(&t, &x, 3, &[0, 50, 120], &o).unwrap();
        let a = kinematics(&t1, &x1, 3, &[0, 50], &o).unwrap();
        let b = kinematics(&t2, &x2, 3, &[0, 70], &o).unwrap();
        let same = |u: &[f64], v: &[f64]| u.iter().zip(v).all(|(p, q)| p.to_bits() == q.to_bits());
        assert!(same(&both.curvature[..50], &a.curvature));
        assert!(same(&both.torsion[50..], &b.torsion));
        assert!(same(&both.arclength[50..], &b.arclength));
        assert!(same(&both.tangent[150..], &b.tangent));
    }

    #[test]
    fn long_track_chunks_agree_with_serial() {
        // A track longer than one job: the chunk seams must not show.
        let n = crate::batch::CHUNK + 100;
        let (t, x) = helix(n, true);
        let k = kinematics(&t, &x, 3, &[0, n as i64], &Options::default()).unwrap();
        let s = crate::batch::CHUNK;
        assert_relative_eq!(k.curvature[s], k.curvature[s - 1], max_relative = 1e-6);
        let total: f64 = k.arclength[n - 1];
        let poly: f64 = (1..n)
            .map(|i| {
                (0..3)
                    .map(|c| (x[i * 3 + c] - x[(i - 1) * 3 + c]).powi(2))
                    .sum::<f64>()
                    .sqrt()
            })
            .sum();
        assert_relative_eq!(total, poly, max_relative = 1e-12);
    }

    #[test]
    fn nan_rows_are_invalid_and_neighbours_flagged() {
        let (t, mut x) = helix(30, false);
        x[10 * 3 + 1] = f64::NAN;
        let k = kinematics(&t, &x, 3, &[0, 30], &Options::default()).unwrap();
        assert_eq!(k.flags[10], flag::INVALID);
        assert!(k.speed[10].is_nan() && k.arclength[10].is_nan());
        for i in [8, 9, 11, 12] {
            assert_ne!(k.flags[i] & flag::GAP, 0, "row {i}");
            assert!(k.curvature[i].is_finite());
        }
        assert_eq!(k.flags[20], 0);
        assert!(k.arclength[29] > k.arclength[11]);
    }

    #[test]
    fn gaps_in_time_are_flagged() {
        let mut t: Vec<f64> = (0..30).map(|i| i as f64 * 0.1).collect();
        for v in t.iter_mut().skip(15) {
            *v += 5.0;
        }
        let x: Vec<f64> = t.iter().flat_map(|&s| [s, s * s]).collect();
        let k = kinematics(&t, &x, 2, &[0, 30], &Options::default()).unwrap();
        assert_ne!(k.flags[14] & flag::GAP, 0);
        assert_eq!(k.flags[5] & flag::GAP, 0);
    }

    #[test]
    fn bad_options_are_errors() {
        let (t, x) = helix(10, false);
        let o = Options {
            gap_factor: 0.5,
            ..Options::default()
        };
        assert!(matches!(
            kinematics(&t, &x, 3, &[0, 10], &o),
            Err(KernelError::Option {
                argument: "gap_factor",
                ..
            })
        ));
        let o = Options {
            up: Some([0.0; 3]),
            ..Options::default()
        };
        assert!(kinematics(&t, &x, 3, &[0, 10], &o).is_err());
        assert!(kinematics(&t, &x, 4, &[0, 10], &Options::default()).is_err());
    }
}

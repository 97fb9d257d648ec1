//! Kinematics of fitted paths (spline, smoothing spline, local polynomials): at their samples or
//! at any time.

use super::emit::Sample;
use super::{accumulate_arclength, check_options, Kinematics, Lend, Options};
use crate::batch::{self, partition};
use crate::error::{KernelError, Result};
use crate::fit::{Fits, TrackFit};
use crate::frame::flag;
use nalgebra::Vector3;
use rayon::prelude::*;

/// Kinematics at the samples of fitted tracks (spline, smoothing spline or local polynomials).
///
/// Rows left out of a fit (non-finite positions) are INVALID; samples next to them, or next to a
/// time step longer than `gap_factor` × the track's median step, are GAP.
///
/// # Examples
///
/// ```
/// use osculate::fit::{fit_batch, Method};
/// use osculate::spline::EndCondition;
/// use osculate::kinematics::{of_fits, Options};
/// // A circle of radius 2 at unit angular rate, 0.1 rad per sample: κ = 1/2, speed 2 (closed
/// // form; the cubic spline's κ is off by O(h²), here 4e-4).
/// let t: Vec<f64> = (0..60).map(|i| i as f64 * 0.1).collect();
/// let x: Vec<f64> = t.iter().flat_map(|&s| [2.0 * s.cos(), 2.0 * s.sin()]).collect();
/// let fits = fit_batch(&t, &x, 2, &[0, 60], None, &Method::Spline(EndCondition::NotAKnot)).unwrap();
/// let k = of_fits(&fits, &Options::default()).unwrap();
/// assert!((k.curvature[30] - 0.5).abs() < 1e-3 && (k.speed[30] - 2.0).abs() < 1e-5);
/// ```
pub fn of_fits(fits: &Fits, opts: &Options) -> Result<Kinematics<'static>> {
    of_fits_in(fits, opts, Lend::default())
}

/// [`of_fits`] writing the columns `lend` has buffers for into them, in place.
pub fn of_fits_in<'a>(fits: &Fits, opts: &Options, lend: Lend<'a>) -> Result<Kinematics<'a>> {
    match fits.dim {
        2 => of_fits_dim::<2>(fits, opts, lend),
        3 => of_fits_dim::<3>(fits, opts, lend),
        d => Err(KernelError::Shape {
            argument: "positions",
            detail: format!("must have 2 or 3 columns, got {d}"),
        }),
    }
}

fn of_fits_dim<'a, const D: usize>(
    fits: &Fits,
    opts: &Options,
    mut lend: Lend<'a>,
) -> Result<Kinematics<'a>> {
    let up = check_options(opts)?;
    let up = if D == 2 { Some(Vector3::z()) } else { up };
    let offsets = &fits.offsets;
    let n = offsets[offsets.len() - 1];
    let m = offsets.len() - 1;
    let se = opts.uncertainty && fits.tracks.iter().any(|f| f.gram(0).is_some());
    let mut out = Kinematics::alloc_in(n, D, se, opts.outputs, &mut lend, Some(f64::NAN))?;
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
    if out.has("arclength") {
        accumulate_arclength(&mut out.arclength, offsets);
    }
    out.noise = fits.tracks.iter().map(TrackFit::noise).collect();
    Ok(out)
}

/// Kinematics of fitted tracks at arbitrary times: `t` grouped by track with `query_offsets`
/// (m + 1 entries, tracks may be empty). Arc length is measured from each track's first fitted
/// sample (negative before it). No GAP or EDGE flags are set.
///
/// # Examples
///
/// ```
/// use osculate::fit::{fit_batch, Method};
/// use osculate::spline::EndCondition;
/// use osculate::kinematics::{of_fits_at, Options, Outputs};
/// // Between the samples of a quadratic path x = t², y = t: exact for the cubic spline.
/// let t: Vec<f64> = (0..10).map(f64::from).collect();
/// let x: Vec<f64> = t.iter().flat_map(|&s| [s * s, s]).collect();
/// let fits = fit_batch(&t, &x, 2, &[0, 10], None, &Method::Spline(EndCondition::NotAKnot)).unwrap();
/// let opts = Options { outputs: Outputs::from_names(["velocity", "position"]).unwrap(), ..Options::default() };
/// let k = of_fits_at(&fits, &[2.5], &[0, 1], &opts).unwrap();
/// assert!((k.velocity[0] - 5.0).abs() < 1e-12 && (k.position[0] - 6.25).abs() < 1e-12);
/// assert!(k.speed.is_empty()); // not asked for
/// ```
pub fn of_fits_at(
    fits: &Fits,
    t: &[f64],
    query_offsets: &[i64],
    opts: &Options,
) -> Result<Kinematics<'static>> {
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
) -> Result<Kinematics<'static>> {
    let up = check_options(opts)?;
    let up = if D == 2 { Some(Vector3::z()) } else { up };
    let m = q.len() - 1;
    let mut out = Kinematics::alloc(t.len(), D, false, opts.outputs)?;
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

//! Finite-difference kinematics of ragged batches of tracks.
//!
//! Rows whose position is not finite are INVALID: the track is compacted to its finite rows, the
//! estimates are made on those, and every sample whose stencil reached across a removed row is
//! flagged GAP, so no estimate is silently poisoned and none silently bridges a hole.

use super::emit::Sample;
use super::{accumulate_arclength, check_options, Kinematics, Lend, Options, Rows};
use crate::batch::{self, partition, plan_jobs, track_rows};
use crate::diff::{derivatives_with, reach};
use crate::error::{try_collect, KernelError, Result};
use crate::frame::flag;
use crate::uncertainty;
use nalgebra::Vector3;
use rayon::prelude::*;

/// Per-track facts needed by every job of the track.
struct TrackPrep {
    gap_dt: f64,
    has_invalid: bool,
    /// Difference-based noise of the finite rows.
    noise: f64,
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
) -> Result<Kinematics<'static>> {
    kinematics_in(t, x, dim, offsets, opts, Lend::default())
}

/// [`kinematics`] writing the columns `lend` has buffers for into them, in place.
pub fn kinematics_in<'a>(
    t: &[f64],
    x: &[f64],
    dim: usize,
    offsets: &[i64],
    opts: &Options,
    lend: Lend<'a>,
) -> Result<Kinematics<'a>> {
    match dim {
        2 => run::<2>(t, x, offsets, opts, lend),
        3 => run::<3>(t, x, offsets, opts, lend),
        _ => Err(KernelError::Shape {
            argument: "positions",
            detail: format!("must have 2 or 3 columns, got {dim}"),
        }),
    }
}

fn run<'a, const D: usize>(
    t: &[f64],
    x: &[f64],
    offsets: &[i64],
    opts: &Options,
    mut lend: Lend<'a>,
) -> Result<Kinematics<'a>> {
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
            let has_invalid = !batch::all_finite(&x[rows.start * D..rows.end * D]);
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

    // Every row is written (emit or fill_nan): zeroed pages or lent buffers need no filling.
    let mut out = Kinematics::alloc_in(n, D, opts.uncertainty, opts.outputs, &mut lend, None)?;
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

    if out.has("arclength") {
        accumulate_arclength(&mut out.arclength, &offsets);
    }
    out.noise = prep.iter().map(|p| p.noise).collect();
    Ok(out)
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
    let third = opts.outputs.needs_third();
    let n = t.len();
    for (j, i) in local.enumerate() {
        let mut gram = [0.0; 10];
        let (d1, d2, d3, edge) =
            derivatives_with::<D>(t, x, i, opts.order, want_se.then_some(&mut gram), third);
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
    let mut tmp = Kinematics::alloc(m, D, opts.uncertainty, opts.outputs)?;
    dense::<D>(&tv, &xv, 0..m, &ctx, Some(&holes), tmp.rows());
    for (j, &i) in valid.iter().enumerate() {
        out.copy_row(i, &tmp, j);
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::diff::FdOrder;
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

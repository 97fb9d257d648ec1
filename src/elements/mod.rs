//! Geometric elements of recorded paths: straights, circular arcs and transition spirals
//! (clothoids), as in a road or rail alignment, reconstructed from the curvature diagram κ(s).
//!
//! Per track, in three steps:
//!
//! 1. **Segmentation.** The signed curvature against arc length is cut into pieces on which κ is
//!    linear in s, by exact penalized segmentation: optimal partitioning with PELT pruning
//!    (R. Killick, P. Fearnhead & I. A. Eckley, JASA 107 (2012) 1590–1598). The cost of a piece is
//!    its weighted least-squares residual about a line, O(1) from prefix sums of w, ws, ws², wκ,
//!    wsκ, wκ² (kept as double-double sums so that a short piece far along a long track keeps its
//!    digits). The weights are `w = 1/(c·se_eff²)`: `se_eff² = se² + (resolution · p95|κ|)²`
//!    (the floor keeps noise-free data from turning the smoother's rounding at curvature kinks
//!    into pieces) and `c` the correlation length of the curvature estimates in samples:
//!    smoothed curvatures of neighbouring samples share their noise, and dividing by `c` counts
//!    them about once per independent value. `c` = [`CORRELATION_BANDWIDTHS`] = 3 smoothing
//!    bandwidths (the main lobe of the cubic smoothing spline's equivalent kernel spans about
//!    ±3.3 bandwidths, B. W. Silverman, Ann. Statist. 12 (1984) 898–916); on the noisy test
//!    chains of `tests/test_elements.py` (3 cm noise, 12 seeds) c = 2 bandwidths gave the right
//!    kinds in 7 of 12, 3 and 4 bandwidths in 12 of 12. Every piece adds `penalty`
//!    to the total; the default is the BIC-like `β = 3 ln n_eff` (a level, a slope and a change
//!    point per piece, Schwarz's ln n per parameter, over `n_eff = n / c` independent values).
//!    Every piece spans at least `min_length` of arc length; PELT's pruning is delayed until a
//!    piece of that length fits after the candidate, which keeps the search exact.
//! 2. **Classification.** Per piece, the level at its weighted centre and the slope, with their
//!    standard errors `1/√Σw` and `1/√Σw(s − s̄)²`: a piece whose level and slope are both within
//!    `significance` standard errors of zero is a straight, else one whose slope is is an arc,
//!    else a spiral. Neighbours of the same kind are merged (and refitted) unless keeping them
//!    apart lowers the weighted cost of their kind's model (κ = 0, κ constant, κ linear) by more
//!    than the penalty: a compound curve (two radii) stays two arcs.
//! 3. **Refinement in position space.** The chain of elements is a curve with continuous position
//!    and heading; curvature is continuous at the ends of spirals (a spiral starts where its
//!    neighbour ends: 0 next to a straight, the arc's curvature next to an arc). Its parameters
//!    (start point, start heading, each element's length, the curvatures of arcs and of free
//!    spiral ends) are fitted to the positions by Levenberg–Marquardt on the distances of the
//!    samples from the chain along its normal (foot points re-projected by Newton steps after
//!    every accepted step); the first and last samples are tied to the chain's ends. Chain points
//!    come from [`crate::fresnel::advance`]; the Jacobian from the chain's rigid-motion structure
//!    (a change in an element moves every later point by a rotation about the element's end),
//!    with forward differences of single elements. If the fit fails, or the chain has more than
//!    [`MAX_PARAMETERS`] parameters (the normal equations are dense), the elements of the
//!    curvature diagram are returned with `refined = false`, placed by a rigid fit of the chain to
//!    the samples. No chain may turn more than [`MAX_TURNING_PER_INTERVAL`] (π) per sample
//!    interval on average: a curvature diagram that does is an error naming `curvature`, and a
//!    step that would wind the chain beyond it is rejected; this bounds the work of every chain
//!    evaluation.

mod chain;
mod classify;
mod refine;
mod segment;
mod table;
mod track;

pub use table::{Element, Options, Samples, ARC, SPIRAL, STRAIGHT, UNUSABLE};

use crate::batch::{check_offsets, track_rows};
use crate::error::{try_collect, KernelError, Result};
use rayon::prelude::*;

/// Refinement is skipped (curvature-diagram elements returned) beyond this many parameters.
pub const MAX_PARAMETERS: usize = 400;
/// Most total turning `∫|κ| ds` of a chain per sample interval of its track (radians): half a
/// turn between consecutive samples on average.
///
/// Samples farther apart than that do not resolve the heading (a chain turning θ + 2π between
/// two samples fits them as well as one turning θ), so no curvature estimated from them, and no
/// chain fitted to them, means anything. A track whose curvature diagram (its fitted pieces)
/// turns more is an error naming `curvature`; a Levenberg–Marquardt step that would wind the
/// chain beyond it is rejected like a non-finite one (the damping grows, the step shrinks).
///
/// The bound is what makes the work per track bounded: a point on a spiral of curvature change
/// Δκ over length L costs up to √(10·|Δκ|·L) + 1 Fresnel sub-intervals, each summed in at most
/// 20 pieces ([`crate::fresnel::advance`]; |Δκ|·L ≤ 4·∫|κ| ds), so at most √(40π(m − 1)) + 1
/// for m usable samples (195 for 300 samples), where a diverging fit had proposed chains
/// turning 10¹⁰ rad (10⁶ sub-intervals per point; a 4-sample track took 15 s).
///
/// It loses nothing on sane input: on the chains of `tests/test_elements.py` and the
/// `osculate demo` scenarios the largest turning per sample interval of any initial chain and
/// of any Levenberg–Marquardt trial was 0.006 rad (500 times below), of the initial chains of
/// random walks (300 unit normal steps, every estimator) 0.025 rad; a curvature taken from the
/// circle through three neighbouring samples turns at most 2 rad per chord (κ·chord =
/// 2 sin(θ/2) ≤ 2).
pub const MAX_TURNING_PER_INTERVAL: f64 = std::f64::consts::PI;
/// Fewest usable samples for any element.
pub const MIN_SAMPLES: usize = 4;
/// Correlation length of smoothed curvatures, in smoothing bandwidths (see the module notes).
pub const CORRELATION_BANDWIDTHS: f64 = 3.0;
/// Default shortest element, in smoothing bandwidths (at least 3 sample spacings). The smoother
/// rounds the curvature diagram over a few bandwidths, so a shorter piece is mostly rounding:
/// on the noisy chains of `tests/test_elements.py` (3 cm noise, 24 paths, bandwidth about 4.5
/// samples) 2 bandwidths gave the right kinds for 15 paths, 4 for 20, 5 for 23, 6 for all 24.
pub const MIN_LENGTH_BANDWIDTHS: f64 = 6.0;
/// Default penalty per piece: `PENALTY_PER_LOG · ln n_eff` (see the module notes).
pub const PENALTY_PER_LOG: f64 = 3.0;

/// Element of rank round((len − 1)·q) of `v` (reorders `v`); NaN if empty.
fn quantile(v: &mut [f64], q: f64) -> f64 {
    if v.is_empty() {
        return f64::NAN;
    }
    let pos = ((v.len() - 1) as f64 * q).round() as usize;
    *v.select_nth_unstable_by(pos, f64::total_cmp).1
}

fn median_spacing(s: &Samples, r: std::ops::Range<usize>) -> Result<f64> {
    let mut d = try_collect(
        r.len(),
        r.clone()
            .skip(1)
            .filter(|&i| s.flags[i] & UNUSABLE == 0)
            .map(|i| s.arclength[i] - s.arclength[i - 1])
            .filter(|v| v.is_finite() && *v > 0.0),
    )?;
    Ok(quantile(&mut d, 0.5))
}

/// The elements of every track of a batch, track by track in order.
///
/// # Examples
///
/// ```
/// use osculate::elements::{elements, Options, Samples, STRAIGHT};
/// // A straight line along y = x, 50 samples 1 apart: one straight of length 49·√2.
/// let n = 50;
/// let t: Vec<f64> = (0..n).map(|i| i as f64).collect();
/// let s: Vec<f64> = t.iter().map(|&v| v * 2f64.sqrt()).collect();
/// let xy: Vec<f64> = t.iter().flat_map(|&v| [v, v]).collect();
/// let samples = Samples {
///     t: &t, arclength: &s, curvature: &vec![0.0; n], se: &vec![1e-4; n],
///     flags: &vec![0; n], xy: &xy,
/// };
/// let opt = Options {
///     penalty: f64::NAN, min_length: &[f64::NAN], bandwidth: &[f64::NAN], significance: 3.0,
///     resolution: 1e-3, refine: true, max_iterations: 50,
/// };
/// let out = elements(&samples, &[0, n as i64], &opt).unwrap();
/// assert_eq!(out.len(), 1);
/// assert_eq!(out[0].kind, STRAIGHT);
/// assert!((out[0].length - 49.0 * 2f64.sqrt()).abs() < 1e-9);
/// ```
pub fn elements(s: &Samples, offsets: &[i64], opt: &Options) -> Result<Vec<Element>> {
    let n = s.t.len();
    for (name, len) in [
        ("arclength", s.arclength.len()),
        ("curvature", s.curvature.len()),
        ("se", s.se.len()),
        ("flags", s.flags.len()),
    ] {
        if len != n {
            return Err(KernelError::Shape {
                argument: name,
                detail: format!("expected {n} rows (as t), got {len}"),
            });
        }
    }
    if s.xy.len() != 2 * n {
        return Err(KernelError::Shape {
            argument: "positions",
            detail: format!("expected {n} rows of 2 coordinates"),
        });
    }
    let offsets = check_offsets(offsets, n)?;
    let m = offsets.len() - 1;
    for (name, a) in [("min_length", opt.min_length), ("bandwidth", opt.bandwidth)] {
        if a.len() != m {
            return Err(KernelError::Shape {
                argument: name,
                detail: format!("expected one value per track ({m}), got {}", a.len()),
            });
        }
    }
    let bad =
        |argument: &'static str, detail: String| Err(KernelError::Option { argument, detail });
    if !(opt.penalty.is_nan() || (opt.penalty.is_finite() && opt.penalty >= 0.0)) {
        return bad(
            "penalty",
            format!("must be finite and >= 0, got {}", opt.penalty),
        );
    }
    if !(opt.significance.is_finite() && opt.significance > 0.0) {
        return bad(
            "significance",
            format!("must be finite and > 0, got {}", opt.significance),
        );
    }
    if !(opt.resolution.is_finite() && opt.resolution >= 0.0) {
        return bad(
            "resolution",
            format!("must be finite and >= 0, got {}", opt.resolution),
        );
    }
    for (k, &v) in opt.min_length.iter().enumerate() {
        if !(v.is_nan() || (v.is_finite() && v >= 0.0)) {
            return Err(KernelError::Track {
                argument: "min_length",
                track: k,
                detail: format!("must be finite and >= 0, got {v}"),
            });
        }
    }
    let per_track: Vec<Result<Vec<Element>>> = (0..m)
        .into_par_iter()
        .map(|k| {
            let r = track_rows(&offsets, k);
            let band = opt.bandwidth[k];
            let band = if band.is_finite() && band > 0.0 {
                band
            } else {
                1.0 / CORRELATION_BANDWIDTHS
            };
            let corr = (CORRELATION_BANDWIDTHS * band).max(1.0);
            let min_length = if opt.min_length[k].is_nan() {
                let h = median_spacing(s, r.clone())?;
                if h.is_finite() {
                    h * (MIN_LENGTH_BANDWIDTHS * band).max(3.0)
                } else {
                    0.0
                }
            } else {
                opt.min_length[k]
            };
            track::one_track(s, r, k, opt, min_length, corr)
        })
        .collect();
    let mut total = 0;
    for v in per_track.iter().flatten() {
        total += v.len();
    }
    let mut out = Vec::new();
    out.try_reserve_exact(total)
        .map_err(|_| KernelError::OutOfMemory {
            bytes: total * std::mem::size_of::<Element>(),
        })?;
    for p in per_track {
        out.extend(p?);
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::fresnel::{advance, Pose};

    /// Samples of a chain of (kind, length, k0, k1) at unit arc-length steps, exact curvature.
    fn chain_samples(parts: &[(f64, f64, f64)], step: f64) -> (Vec<f64>, Vec<f64>, Vec<f64>) {
        let mut s = vec![];
        let mut k = vec![];
        let mut xy = vec![];
        let mut pose = Pose {
            x: 0.0,
            y: 0.0,
            heading: 0.3,
        };
        let mut u0 = 0.0;
        for &(l, k0, k1) in parts {
            let mut v = 0.0;
            while v < l - 1e-9 {
                let p = advance(pose, k0, (k1 - k0) / l, v);
                s.push(u0 + v);
                k.push(k0 + (k1 - k0) * v / l);
                xy.extend([p.x, p.y]);
                v += step;
            }
            pose = advance(pose, k0, (k1 - k0) / l, l);
            u0 += l;
        }
        (s, k, xy)
    }

    #[test]
    fn exact_chain_is_recovered() {
        // straight 50 → spiral 40 (0 → 1/100) → arc 60 → spiral 40 → straight 50; samples every
        // 1.0 of arc length, exact curvatures: the elements' lengths to 1e-6 (the fit's
        // tolerance), radius 100 and A = √(40·100) = 63.25 (A² = R L).
        let r = 100.0;
        let parts = [
            (50.0, 0.0, 0.0),
            (40.0, 0.0, 1.0 / r),
            (60.0, 1.0 / r, 1.0 / r),
            (40.0, 1.0 / r, 0.0),
            (50.0, 0.0, 0.0),
        ];
        let (s, k, xy) = chain_samples(&parts, 1.0);
        let n = s.len();
        let samples = Samples {
            t: &s,
            arclength: &s,
            curvature: &k,
            se: &vec![1e-6; n],
            flags: &vec![0; n],
            xy: &xy,
        };
        let opt = Options {
            penalty: f64::NAN,
            min_length: &[f64::NAN],
            bandwidth: &[f64::NAN],
            significance: 3.0,
            resolution: 1e-3,
            refine: true,
            max_iterations: 100,
        };
        let out = elements(&samples, &[0, n as i64], &opt).unwrap();
        let kinds: Vec<u8> = out.iter().map(|e| e.kind).collect();
        assert_eq!(kinds, vec![STRAIGHT, SPIRAL, ARC, SPIRAL, STRAIGHT]);
        assert!(out.iter().all(|e| e.refined));
        // The last straight ends at the last sample (249), not at 240.
        let want = [50.0, 40.0, 60.0, 40.0, 49.0];
        for (e, w) in out.iter().zip(want) {
            assert!((e.length - w).abs() < 1e-6, "{:?}", out);
        }
        assert!((out[2].radius - r).abs() < 1e-6);
        assert!((out[1].spiral_parameter - (40.0 * r).sqrt()).abs() < 1e-6);
        assert!(out.iter().all(|e| e.max_distance < 1e-8));
    }

    /// The input the `elements` fuzz target decoded from the 206-byte slow unit (benches/fuzz.sh,
    /// kept in fuzz/regressions/elements/winding-spiral), with its curvature scaled by
    /// `k_scale`: 4 samples 6 apart, κ a ramp 0 → −23.8, positions far off any such path.
    fn slow_unit(k_scale: f64, run: impl FnOnce(&Samples, &Options)) {
        let t = [f64::NAN, -31.125, -31.125, -31.125];
        let s = [0.0, 6.02, 12.08, 18.18];
        let kappa = [0.0, -7.98, -15.92, -23.82].map(|v| v * k_scale);
        let xy = [
            -31.125,
            -31.125,
            -31.125,
            41.875,
            -7968.0,
            -31.125,
            -31.76171875,
            -31.125,
        ];
        let se = [0.0, -7.98, -15.92, -23.82];
        let samples = Samples {
            t: &t,
            arclength: &s,
            curvature: &kappa,
            se: &se,
            flags: &[0, 0, 0, 32],
            xy: &xy,
        };
        let opt = Options {
            penalty: f64::NAN,
            min_length: &[6.08215e-319],
            bandwidth: &[f64::NEG_INFINITY],
            significance: 3.0,
            resolution: 1e-3,
            refine: true,
            max_iterations: 8,
        };
        run(&samples, &opt);
    }

    /// `one_track` on this thread (the work counters are per thread), with the minimum length
    /// and correlation length `elements` derives for the slow unit's options (given, and 1).
    fn one_track_counted(s: &Samples, opt: &Options) -> (Result<Vec<Element>>, usize, f64) {
        chain::work::take();
        let out = track::one_track(s, 0..4, 0, opt, opt.min_length[0], 1.0);
        let (builds, turning) = chain::work::take();
        (out, builds, turning)
    }

    #[test]
    fn curvature_diagram_winding_past_the_samples_is_an_error() {
        // The fuzz target's slow unit (15 s in one call): its curvature diagram, one spiral per
        // half, turns 217.8 rad over 3 sample intervals (∫|κ| ds of the ramp, trapezoids: 24.0 +
        // 72.4 + 121.2 = 217.6 for the samples; the fitted pieces' ends differ in the third
        // digit). Was: a Levenberg–Marquardt fit that wandered to spirals 278 km long turning
        // 10¹⁰ rad, each point of them 10⁶ Fresnel sub-intervals. Now the error names the
        // argument and the track, before any chain is evaluated (counted, not timed).
        slow_unit(1.0, |s, opt| {
            let err = elements(s, &[0, 4], opt).unwrap_err();
            assert_eq!((err.argument(), err.track()), ("curvature", Some(0)));
            assert!(err.detail().contains("2.178e2 rad"), "{err}");
            let (out, builds, _) = one_track_counted(s, opt);
            assert!(out.is_err());
            assert_eq!(builds, 0);
        });
    }

    #[test]
    fn fit_steps_never_wind_the_chain_past_the_samples() {
        // The slow unit with κ / 100 (2.18 rad over 3 intervals, under the bound 3π): the
        // chain is fitted to positions no such chain passes near, 6 residuals for 8 parameters.
        // Was: the first Gauss–Newton step proposed spirals 8.9 km long turning 4·10⁵ rad, and
        // the result kept two of them (chain length 14.8 km for 18 m of samples). Every chain
        // the fit evaluates now turns at most π per sample interval (3π here, no tolerance: the
        // check is on the same closed form), and the chains built are at most 1 placement + 4
        // rounds of (1 start + 8 iterations × (5 finite differences + 12 trials)), counted.
        slow_unit(0.01, |s, opt| {
            let (out, builds, turning) = one_track_counted(s, opt);
            let out = out.unwrap();
            assert!(turning <= 3.0 * std::f64::consts::PI, "{turning}");
            assert!(builds <= 1 + 4 * (1 + 8 * (5 + 12)), "{builds}");
            assert!(!out.is_empty());
            let total: f64 = out
                .iter()
                .map(|e| chain::turning(e.start_curvature, e.end_curvature, e.length))
                .sum();
            assert!(total <= 3.0 * std::f64::consts::PI, "{out:?}");
            for e in &out {
                assert!(0.0 <= e.start_arclength && e.start_arclength <= e.end_arclength);
                assert!(e.end_arclength <= 18.18);
            }
            assert_eq!(out.iter().map(|e| e.samples).sum::<usize>(), 4);
            // The batch entry point gives the same rows (Debug text: exact, and NaN equals NaN).
            let batch = elements(s, &[0, 4], opt).unwrap();
            assert_eq!(format!("{batch:?}"), format!("{out:?}"));
        });
    }

    #[test]
    fn curvature_too_large_to_sum_is_an_error() {
        // A curvature of 1.5e308 (finite) in a 12-sample track: its square overflows the
        // segmentation's weighted sums, so the fitted pieces are not finite and neither is the
        // turning. Found by the fuzz target after the check above was in: a NaN turning passed
        // it, and a unit whose other elements turned 10⁴ rad per interval took 0.1 s to place.
        // Expected: the same kind of error, no chain evaluated (counted).
        let n = 12;
        let t: Vec<f64> = (0..n).map(|i| i as f64).collect();
        let mut kappa = vec![0.01; n];
        kappa[8] = 1.5e308;
        let xy: Vec<f64> = t.iter().flat_map(|&v| [v, 0.0]).collect();
        let samples = Samples {
            t: &t,
            arclength: &t,
            curvature: &kappa,
            se: &vec![1.0; n],
            flags: &vec![0; n],
            xy: &xy,
        };
        let opt = Options {
            penalty: f64::NAN,
            min_length: &[f64::NAN],
            bandwidth: &[f64::NAN],
            significance: 3.0,
            resolution: 1e-3,
            refine: true,
            max_iterations: 20,
        };
        let err = elements(&samples, &[0, n as i64], &opt).unwrap_err();
        assert_eq!(
            (err.argument(), err.track()),
            ("curvature", Some(0)),
            "{err}"
        );
        assert!(
            err.detail().contains("not finite (|κ| up to 1.500e308)"),
            "{err}"
        );
        chain::work::take();
        let out = track::one_track(&samples, 0..n, 0, &opt, 3.0, 1.0);
        assert!(out.is_err());
        assert_eq!(chain::work::take().0, 0);
    }

    #[test]
    fn bad_options_name_the_argument() {
        let z = vec![0.0; 10];
        let t: Vec<f64> = (0..10).map(|i| i as f64).collect();
        let samples = Samples {
            t: &t,
            arclength: &t,
            curvature: &z,
            se: &z,
            flags: &[0; 10],
            xy: &[0.0; 20],
        };
        let mut opt = Options {
            penalty: -1.0,
            min_length: &[f64::NAN],
            bandwidth: &[f64::NAN],
            significance: 3.0,
            resolution: 1e-3,
            refine: true,
            max_iterations: 10,
        };
        assert_eq!(
            elements(&samples, &[0, 10], &opt).unwrap_err().argument(),
            "penalty"
        );
        opt.penalty = f64::NAN;
        opt.min_length = &[-1.0];
        assert_eq!(
            elements(&samples, &[0, 10], &opt).unwrap_err().argument(),
            "min_length"
        );
    }
}

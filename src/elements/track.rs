//! The elements of one track: usable samples, weights and prefix sums, segmentation,
//! classification, the initial chain and its rigid placement, refinement, and the table rows.

use super::chain::{normal_distance, Chain, Layout};
use super::classify::{merge, Piece};
use super::refine::{Problem, State};
use super::segment::{pelt, Fit, Prefix};
use super::table::{Element, Options, Samples, ARC, SPIRAL, UNUSABLE};
use super::{quantile, MAX_PARAMETERS, MAX_TURNING_PER_INTERVAL, MIN_SAMPLES, PENALTY_PER_LOG};
use crate::error::{try_collect, try_filled, KernelError, Result};
use crate::fresnel::Pose;

/// Elements of one track (global row range `r`).
pub(super) fn one_track(
    s: &Samples,
    r: std::ops::Range<usize>,
    track: usize,
    opt: &Options,
    min_length: f64,
    corr: f64,
) -> Result<Vec<Element>> {
    let n = r.len();
    let mut idx = try_collect(n, Vec::<usize>::new())?;
    for i in r.clone() {
        let ok = s.flags[i] & UNUSABLE == 0
            && s.curvature[i].is_finite()
            && s.arclength[i].is_finite()
            && s.xy[2 * i].is_finite()
            && s.xy[2 * i + 1].is_finite();
        if ok && idx.last().is_none_or(|&j| s.arclength[i] >= s.arclength[j]) {
            idx.push(i);
        }
    }
    let m = idx.len();
    if m < MIN_SAMPLES {
        return Ok(Vec::new());
    }
    let ss = try_collect(m, idx.iter().map(|&i| s.arclength[i] - s.arclength[idx[0]]))?;
    // Weights.
    let mut abs_k = try_collect(m, idx.iter().map(|&i| s.curvature[i].abs()))?;
    let p95 = quantile(&mut abs_k, 0.95);
    let mut known = try_collect(
        m,
        idx.iter()
            .map(|&i| s.se[i])
            .filter(|v| v.is_finite() && *v >= 0.0),
    )?;
    let typical = if known.is_empty() {
        // No standard errors: the curvature's scatter from its successive differences (an
        // underestimate for smoothed curvatures, which the correlation length makes up for).
        let d2: f64 = idx
            .windows(2)
            .map(|w| (s.curvature[w[1]] - s.curvature[w[0]]).powi(2))
            .sum();
        (d2 / (2.0 * (m - 1) as f64)).sqrt()
    } else {
        quantile(&mut known, 0.5)
    };
    let floor = (opt.resolution * p95).max(1e-150);
    let mut prefix = try_filled(m + 1, Prefix::default())?;
    let mut acc = Prefix::default();
    for (j, &i) in idx.iter().enumerate() {
        let se = if s.se[i].is_finite() && s.se[i] >= 0.0 {
            s.se[i]
        } else {
            typical
        };
        let w = 1.0 / (corr * (se * se + floor * floor));
        let (x, k) = (ss[j], s.curvature[i]);
        let add = [w, w * x, w * x * x, w * k, w * x * k, w * k * k];
        for (a, v) in acc.0.iter_mut().zip(add) {
            *a = a.add(v);
        }
        prefix[j + 1] = acc;
    }
    let n_eff = (m as f64 / corr).max(2.0);
    let beta = if opt.penalty.is_nan() {
        PENALTY_PER_LOG * n_eff.ln()
    } else {
        opt.penalty
    };
    let ends = pelt(&prefix, &ss, beta, min_length)?;
    let mut pieces = Vec::with_capacity(ends.len());
    let mut a = 0;
    for &b in &ends {
        let fit = Fit::of(&prefix, a, b);
        pieces.push(Piece {
            a,
            b,
            kind: fit.kind(opt.significance),
            fit,
        });
        a = b;
    }
    merge(&mut pieces, &prefix, beta);
    // Initial chain.
    let kinds: Vec<u8> = pieces.iter().map(|p| p.kind).collect();
    let layout = Layout::new(&kinds);
    let e_count = pieces.len();
    let bounds: Vec<f64> = (0..=e_count)
        .map(|j| {
            if j == 0 {
                0.0
            } else if j == e_count {
                ss[m - 1]
            } else {
                0.5 * (ss[pieces[j].a - 1] + ss[pieces[j].a])
            }
        })
        .collect();
    let mut q = vec![0.0; layout.count];
    let mut seen = vec![0u32; layout.count];
    for (e, p) in pieces.iter().enumerate() {
        q[layout.len_at[e]] = (bounds[e + 1] - bounds[e]).max(1e-9 * (1.0 + ss[m - 1]));
        let (ks, ke) = layout.k_at[e];
        let (v0, v1) = if p.kind == ARC {
            (p.fit.level, p.fit.level)
        } else {
            (p.fit.at(bounds[e]), p.fit.at(bounds[e + 1]))
        };
        for (var, val) in [(ks, v0), (ke, v1)] {
            if let Some(i) = var {
                // Arcs set their own value; a spiral only fills a free end (one shared by two
                // spirals gets the mean of both fits).
                let owner_is_arc = (e > 0 && kinds[e - 1] == ARC && Some(i) == ks)
                    || (e + 1 < e_count && kinds[e + 1] == ARC && Some(i) == ke);
                if p.kind == ARC || !owner_is_arc {
                    q[i] += val;
                    seen[i] += 1;
                }
            }
        }
    }
    for (v, &c) in q.iter_mut().zip(&seen).skip(3) {
        if c > 1 {
            *v /= c as f64;
        }
    }
    // A curvature diagram that winds faster than the samples resolve has no chain to fit or
    // place (and evaluating one costs ~√turning Fresnel sub-intervals per point).
    let max_turning = MAX_TURNING_PER_INTERVAL * (m - 1) as f64;
    if !layout.winds_within(&q, max_turning) {
        let turning = layout.turning(&q);
        let detail = if turning.is_nan() {
            // Curvatures so large that the weighted sums of the segmentation overflow.
            let big = idx
                .iter()
                .map(|&i| s.curvature[i].abs())
                .fold(0.0, f64::max);
            format!(
                "the curvature diagram's fitted pieces are not finite (|κ| up to {big:.3e}): \
                 no path the samples resolve turns like that"
            )
        } else {
            format!(
                "the curvature diagram turns {turning:.3e} rad (∫|κ| ds of its fitted pieces) \
                 over {} sample intervals, more than π per interval on average: samples this \
                 sparse do not resolve such a path",
                m - 1
            )
        };
        return Err(KernelError::Track {
            argument: "curvature",
            track,
            detail,
        });
    }
    let px = try_collect(m, idx.iter().map(|&i| s.xy[2 * i]))?;
    let py = try_collect(m, idx.iter().map(|&i| s.xy[2 * i + 1]))?;
    // Rigid placement of the unrefined chain on the samples (2-D Kabsch).
    let chain0 = Chain::build(&layout, &q);
    let pts: Vec<Pose> = ss
        .iter()
        .map(|&u| {
            let e = chain0.element(u);
            chain0.at(e, u - chain0.cum[e]).0
        })
        .collect();
    let (cx, cy) = (mean(&pts, |p| p.x), mean(&pts, |p| p.y));
    let (mx, my) = (
        px.iter().sum::<f64>() / m as f64,
        py.iter().sum::<f64>() / m as f64,
    );
    let (mut sxx, mut sxy) = (0.0, 0.0);
    for j in 0..m {
        let (ax, ay) = (pts[j].x - cx, pts[j].y - cy);
        let (bx, by) = (px[j] - mx, py[j] - my);
        sxx += ax * bx + ay * by;
        sxy += ax * by - ay * bx;
    }
    let phi = sxy.atan2(sxx);
    let (sn, cs) = phi.sin_cos();
    q[0] = mx - (cs * cx - sn * cy);
    q[1] = my - (sn * cx + cs * cy);
    q[2] = phi;
    let mut problem = Problem {
        px: &px,
        py: &py,
        layout,
        max_turning,
    };
    // Elements that the fit shrinks below half the minimum length (or half a sample spacing)
    // are dropped and the chain refitted (a curvature jump smoothed into a short ramp gives
    // such spirals).
    let drop_below = 0.5 * min_length.max(ss[m - 1] / (m - 1) as f64);
    let mut rounds = 0;
    let (st, ok) = loop {
        let refined = if opt.refine && problem.layout.count <= MAX_PARAMETERS {
            problem.solve(q.clone(), &ss, opt.max_iterations)
        } else {
            None
        };
        let Some(st) = refined else {
            break (problem.state(q, &ss), false);
        };
        let keep: Vec<usize> = (0..st.chain.len.len())
            .filter(|&e| st.chain.len[e] >= drop_below)
            .collect();
        rounds += 1;
        if keep.len() == st.chain.len.len() || keep.is_empty() || rounds > 3 {
            break (st, true);
        }
        let kinds: Vec<u8> = keep.iter().map(|&e| problem.layout.kinds[e]).collect();
        let layout = Layout::new(&kinds);
        let mut nq = vec![0.0; layout.count];
        let mut seen = vec![0u32; layout.count];
        nq[..3].copy_from_slice(&st.q[..3]);
        for (j, &e) in keep.iter().enumerate() {
            nq[layout.len_at[j]] = st.chain.len[e];
            let (k0, k1) = st.chain.k[e];
            for (var, val) in [(layout.k_at[j].0, k0), (layout.k_at[j].1, k1)] {
                if let Some(i) = var {
                    nq[i] += val;
                    seen[i] += 1;
                }
            }
        }
        for (v, &c) in nq.iter_mut().zip(&seen).skip(3) {
            if c > 1 {
                *v /= c as f64;
            }
        }
        if !layout.winds_within(&nq, max_turning) {
            // Without the short elements (their curvatures averaged into the neighbours) the
            // chain would wind beyond the bound: keep the refined chain with them.
            break (st, true);
        }
        q = nq;
        problem.layout = layout;
    };
    Ok(report(&problem, &st, s, &idx, track, ok))
}

pub(super) fn mean(p: &[Pose], f: impl Fn(&Pose) -> f64) -> f64 {
    p.iter().map(f).sum::<f64>() / p.len() as f64
}

pub(super) fn report(
    pr: &Problem,
    st: &State,
    s: &Samples,
    idx: &[usize],
    track: usize,
    refined: bool,
) -> Vec<Element> {
    let chain = &st.chain;
    let e_count = chain.len.len();
    let mut sq = vec![0.0; e_count];
    let mut mx = vec![0.0f64; e_count];
    let mut cnt = vec![0usize; e_count];
    // Foot points made non-decreasing for the interpolation of times and arc lengths.
    let mut u = st.u.clone();
    for j in 1..u.len() {
        u[j] = u[j].max(u[j - 1]);
    }
    for (j, &uj) in st.u.iter().enumerate() {
        let e = chain.element(uj);
        let (pose, _) = chain.at(e, uj - chain.cum[e]);
        let d = normal_distance(&pose, pr.px[j], pr.py[j]);
        sq[e] += d * d;
        mx[e] = mx[e].max(d.abs());
        cnt[e] += 1;
    }
    let interp = |x: f64, col: &dyn Fn(usize) -> f64| -> f64 {
        let j = u.partition_point(|&v| v < x);
        if j == 0 {
            return col(idx[0]);
        }
        if j >= u.len() {
            return col(idx[u.len() - 1]);
        }
        let (u0, u1) = (u[j - 1], u[j]);
        let (a, b) = (col(idx[j - 1]), col(idx[j]));
        if u1 > u0 {
            a + (b - a) * (x - u0) / (u1 - u0)
        } else {
            b
        }
    };
    let time = |i: usize| s.t[i];
    let arc = |i: usize| s.arclength[i];
    (0..e_count)
        .map(|e| {
            let kind = pr.layout.kinds[e];
            let (k0, k1) = chain.k[e];
            let l = chain.len[e];
            let (u0, u1) = (chain.cum[e], chain.cum[e + 1]);
            Element {
                track,
                kind,
                start_arclength: interp(u0, &arc),
                end_arclength: interp(u1, &arc),
                start_time: interp(u0, &time),
                end_time: interp(u1, &time),
                length: l,
                start_curvature: k0,
                end_curvature: k1,
                radius: if kind == ARC {
                    1.0 / k0.abs()
                } else {
                    f64::NAN
                },
                spiral_parameter: if kind == SPIRAL {
                    (l / (k1 - k0).abs()).sqrt()
                } else {
                    f64::NAN
                },
                x: chain.poses[e].x,
                y: chain.poses[e].y,
                heading: chain.poses[e].heading,
                rms: if cnt[e] > 0 {
                    (sq[e] / cnt[e] as f64).sqrt()
                } else {
                    f64::NAN
                },
                max_distance: if cnt[e] > 0 { mx[e] } else { f64::NAN },
                samples: cnt[e],
                refined,
            }
        })
        .collect()
}

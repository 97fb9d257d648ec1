//! Levenberg–Marquardt fit of the chain of elements to the positions, on the samples' normal
//! distances from the chain (see the notes of [`crate::elements`]).

use super::chain::{foot, normal_distance, rate, Chain, Layout};
use super::table::SPIRAL;
use crate::fresnel::{advance, Pose};
use nalgebra::{DMatrix, DVector};

/// The fitting problem of one track.
pub(super) struct Problem<'a> {
    pub(super) px: &'a [f64],
    pub(super) py: &'a [f64],
    pub(super) layout: Layout,
    /// Largest total turning `∫|κ| ds` of a chain the fit may try (see
    /// [`crate::elements::MAX_TURNING_PER_INTERVAL`]).
    pub(super) max_turning: f64,
}

pub(super) struct State {
    pub(super) q: Vec<f64>,
    pub(super) chain: Chain,
    pub(super) u: Vec<f64>,
    pub(super) cost: f64,
}

impl Problem<'_> {
    pub(super) fn n(&self) -> usize {
        self.px.len()
    }

    /// Foot points for parameters `q`, from guesses `u`; residual cost.
    pub(super) fn state(&self, q: Vec<f64>, guess: &[f64]) -> State {
        let chain = Chain::build(&self.layout, &q);
        let n = self.n();
        let total = chain.total();
        let mut u = Vec::with_capacity(n);
        let mut cost = 0.0;
        for i in 0..n {
            let g = guess[i].clamp(0.0, total);
            if i == 0 || i + 1 == n {
                let end = if i == 0 { 0.0 } else { total };
                let p = if i == 0 {
                    chain.poses[0]
                } else {
                    chain.poses[chain.len.len()]
                };
                cost += (self.px[i] - p.x).powi(2) + (self.py[i] - p.y).powi(2);
                u.push(end);
                continue;
            }
            let (ui, _, pose, _) = foot(&chain, self.px[i], self.py[i], g);
            cost += normal_distance(&pose, self.px[i], self.py[i]).powi(2);
            u.push(ui);
        }
        State { q, chain, u, cost }
    }

    /// Normal equations JᵀJ and Jᵀr at a state.
    pub(super) fn normal_equations(&self, st: &State) -> (DMatrix<f64>, DVector<f64>) {
        let np = self.layout.count;
        let e_count = self.layout.kinds.len();
        let q = &st.q;
        let chain = &st.chain;
        // d(start pose of element e, and of the end)/dq_k by forward differences of the chain.
        let scale = chain.total().max(1e-300);
        let mut dpose = vec![[0.0f64; 3]; (e_count + 1) * np];
        for k in 3..np {
            let h = step_for(k, q, &self.layout, scale);
            let mut qk = q.clone();
            qk[k] += h;
            let c2 = Chain::build(&self.layout, &qk);
            for e in 0..=e_count {
                let (a, b) = (chain.poses[e], c2.poses[e]);
                dpose[e * np + k] = [
                    (b.x - a.x) / h,
                    (b.y - a.y) / h,
                    (b.heading - a.heading) / h,
                ];
            }
        }
        let mut jtj = DMatrix::<f64>::zeros(np, np);
        let mut jtr = DVector::<f64>::zeros(np);
        let mut row = vec![0.0; np];
        let mut add = |row: &[f64], r: f64, upto: usize, jtj: &mut DMatrix<f64>| {
            for a in 0..upto {
                if row[a] == 0.0 {
                    continue;
                }
                jtr[a] += row[a] * r;
                for b in 0..=a {
                    jtj[(a, b)] += row[a] * row[b];
                }
            }
        };
        let n = self.n();
        for i in 0..n {
            let (px, py) = (self.px[i], self.py[i]);
            if i == 0 {
                // r = p − P0: dr/dx0 = (−1, 0), dr/dy0 = (0, −1).
                row.iter_mut().for_each(|v| *v = 0.0);
                row[0] = -1.0;
                add(&row, px - q[0], 1, &mut jtj);
                row[0] = 0.0;
                row[1] = -1.0;
                add(&row, py - q[1], 2, &mut jtj);
                continue;
            }
            let last = i + 1 == n;
            let (e, v) = if last {
                (e_count, 0.0)
            } else {
                let e = chain.element(st.u[i]);
                (e, st.u[i] - chain.cum[e])
            };
            let (pose, base) = if last {
                (chain.poses[e_count], chain.poses[e_count])
            } else {
                (chain.at(e, v).0, chain.poses[e])
            };
            // dc/dq for every parameter, as (dx, dy).
            let upto = if last { np } else { self.layout.prefix[e] };
            let mut dc = vec![(0.0, 0.0); upto];
            dc[0] = (1.0, 0.0);
            dc[1] = (0.0, 1.0);
            dc[2] = (-(pose.y - q[1]), pose.x - q[0]);
            let (rx, ry) = (pose.x - base.x, pose.y - base.y);
            for (k, d) in dc.iter_mut().enumerate().skip(3) {
                let [dx, dy, dth] = dpose[e * np + k];
                *d = (dx - dth * ry, dy + dth * rx);
            }
            if !last && v > 0.0 {
                // Changes within element e at fixed offset v.
                let (k0, k1) = chain.k[e];
                let l = chain.len[e];
                let r = rate(k0, k1, l);
                let g0 = Pose {
                    x: 0.0,
                    y: 0.0,
                    heading: 0.0,
                };
                let g = advance(g0, k0, r, v);
                let hk = 1e-6 / v;
                let gk = advance(g0, k0 + hk, r, v);
                let d_k0 = ((gk.x - g.x) / hk, (gk.y - g.y) / hk); // at fixed rate
                let (sn, cs) = base.heading.sin_cos();
                let rot = |d: (f64, f64)| (cs * d.0 - sn * d.1, sn * d.0 + cs * d.1);
                let mut local = |k: usize, d: (f64, f64), f: f64| {
                    let d = rot(d);
                    dc[k].0 += f * d.0;
                    dc[k].1 += f * d.1;
                };
                let (ks, ke) = self.layout.k_at[e];
                if self.layout.kinds[e] == SPIRAL && l > 0.0 {
                    let hr = 1e-6 / (v * v);
                    let gr = advance(g0, k0, r + hr, v);
                    let d_r = ((gr.x - g.x) / hr, (gr.y - g.y) / hr);
                    // rate = (k1 − k0)/L: dk0 → ∂k0 − ∂rate/L, dk1 → ∂rate/L, dL → −rate/L ∂rate.
                    if let Some(a) = ks {
                        local(a, d_k0, 1.0);
                        local(a, d_r, -1.0 / l);
                    }
                    if let Some(b) = ke {
                        local(b, d_r, 1.0 / l);
                    }
                    local(self.layout.len_at[e], d_r, -r / l);
                } else if let Some(a) = ks {
                    local(a, d_k0, 1.0);
                }
            }
            row.iter_mut().for_each(|x| *x = 0.0);
            if last {
                for (k, d) in dc.iter().enumerate() {
                    row[k] = -d.0;
                }
                add(&row, px - pose.x, upto, &mut jtj);
                for (k, d) in dc.iter().enumerate() {
                    row[k] = -d.1;
                }
                add(&row, py - pose.y, upto, &mut jtj);
            } else {
                let (sn, cs) = pose.heading.sin_cos();
                for (k, d) in dc.iter().enumerate() {
                    row[k] = -(-sn * d.0 + cs * d.1);
                }
                add(&row, normal_distance(&pose, px, py), upto, &mut jtj);
            }
        }
        for a in 0..np {
            for b in 0..a {
                jtj[(b, a)] = jtj[(a, b)];
            }
        }
        (jtj, jtr)
    }

    /// Levenberg–Marquardt from `q0`; None if it fails.
    pub(super) fn solve(&self, q0: Vec<f64>, u0: &[f64], max_iter: usize) -> Option<State> {
        let mut st = self.state(q0, u0);
        if !st.cost.is_finite() {
            return None;
        }
        let mut mu = 1e-3;
        for _ in 0..max_iter {
            let (a, g) = self.normal_equations(&st);
            let big = (0..a.nrows()).map(|i| a[(i, i)]).fold(0.0, f64::max);
            if !(big.is_finite() && big > 0.0) {
                return None;
            }
            let mut improved = false;
            for _ in 0..12 {
                let mut m = a.clone();
                for i in 0..m.nrows() {
                    // Damping relative to each diagonal (parameters differ in scale by 1e10).
                    m[(i, i)] += mu * m[(i, i)] + 1e-30 * big;
                }
                let Some(ch) = m.cholesky() else {
                    mu *= 10.0;
                    continue;
                };
                let delta = ch.solve(&(-&g));
                let mut q = st.q.clone();
                for (qi, d) in q.iter_mut().zip(delta.iter()) {
                    *qi += d;
                }
                if q.iter().any(|v| !v.is_finite()) {
                    mu *= 10.0;
                    continue;
                }
                // Lengths are projected on ≥ 0 (an element may vanish; it is dropped after).
                for &i in &self.layout.len_at {
                    q[i] = q[i].max(0.0);
                }
                // A chain winding faster than the samples resolve is outside the trusted
                // region: a shorter step (its evaluation alone could cost ~√turning Fresnel
                // sub-intervals per point).
                if !self.layout.winds_within(&q, self.max_turning) {
                    mu *= 10.0;
                    continue;
                }
                // Foot-point guesses: same fraction of the same element.
                let guess: Vec<f64> =
                    st.u.iter()
                        .map(|&u| {
                            let e = st.chain.element(u);
                            let l0 = st.chain.len[e];
                            let l1 = q[self.layout.len_at[e]];
                            let start: f64 = (0..e).map(|j| q[self.layout.len_at[j]]).sum();
                            start
                                + if l0 > 0.0 {
                                    (u - st.chain.cum[e]) * l1 / l0
                                } else {
                                    0.0
                                }
                        })
                        .collect();
                let trial = self.state(q, &guess);
                if trial.cost.is_finite() && trial.cost < st.cost {
                    let gain = st.cost - trial.cost;
                    st = trial;
                    mu = (mu / 3.0).max(1e-12);
                    improved = true;
                    if gain <= 1e-12 * st.cost.max(1e-300) {
                        return Some(st);
                    }
                    break;
                }
                mu *= 4.0;
            }
            if !improved {
                // No step lowers the cost: at a minimum to rounding.
                return Some(st);
            }
        }
        Some(st)
    }
}

pub(super) fn step_for(k: usize, q: &[f64], layout: &Layout, scale: f64) -> f64 {
    if layout.len_at.contains(&k) {
        1e-7 * q[k].abs().max(1e-3 * scale)
    } else {
        // A curvature: a heading change of 1e-7 rad over the chain.
        1e-7 / scale
    }
}

#[cfg(test)]
mod gradient_check {
    use super::*;
    use crate::elements::table::{ARC, STRAIGHT};

    #[test]
    fn gradient_matches_cost_differences() {
        let r = 100.0;
        let parts = [
            (50.0, 0.0, 0.0),
            (40.0, 0.0, 1.0 / r),
            (60.0, 1.0 / r, 1.0 / r),
        ];
        let mut px = vec![];
        let mut py = vec![];
        let mut pose = Pose {
            x: 0.0,
            y: 0.0,
            heading: 0.3,
        };
        let mut ss = vec![];
        let mut u0 = 0.0;
        for &(l, k0, k1) in &parts {
            let mut v = 0.0;
            while v < l - 1e-9 {
                let p = advance(pose, k0, (k1 - k0) / l, v);
                px.push(p.x + 0.01 * ((px.len() * 37 % 11) as f64 - 5.0) / 5.0);
                py.push(p.y);
                ss.push(u0 + v);
                v += 1.0;
            }
            pose = advance(pose, k0, (k1 - k0) / l, l);
            u0 += l;
        }
        let layout = Layout::new(&[STRAIGHT, SPIRAL, ARC]);
        let pr = Problem {
            px: &px,
            py: &py,
            layout,
            max_turning: f64::INFINITY,
        };
        let q = vec![0.01, -0.02, 0.31, 51.0, 38.0, 0.0098, 60.0];
        assert_eq!(pr.layout.count, q.len());
        let st = pr.state(q.clone(), &ss);
        let (_, g) = pr.normal_equations(&st);
        for k in 0..q.len() {
            let h = 1e-6 * q[k].abs().max(1e-3);
            let mut a = q.clone();
            a[k] += h;
            let mut b = q.clone();
            b[k] -= h;
            let ca = pr.state(a, &st.u).cost;
            let cb = pr.state(b, &st.u).cost;
            let fd = (ca - cb) / (4.0 * h);
            // Jᵀr = ½ d(cost)/dq (foot points are stationary: envelope theorem); central
            // differences of the cost, relative 1e-5.
            assert!(
                (g[k] - fd).abs() <= 1e-5 * fd.abs().max(1e-3),
                "{k}: {} vs {fd}",
                g[k]
            );
        }
    }
}

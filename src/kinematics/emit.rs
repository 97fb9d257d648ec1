//! One sample's derivatives → every requested column, the flags and the standard errors.

use super::{Options, Rows};
use crate::frame::{flag, frenet};
use crate::uncertainty::{self, at, propagate, Errors, Gram};
use nalgebra::Vector3;

/// The derivatives of one sample and where they came from.
pub(super) struct Sample<const D: usize> {
    /// Position (fitted for smoothing methods).
    pub(super) p: [f64; D],
    pub(super) d1: [f64; D],
    pub(super) d2: [f64; D],
    pub(super) d3: [f64; D],
    /// Arc length increment from the previous sample of the track.
    pub(super) ds: f64,
    /// EDGE / GAP bits.
    pub(super) flags: u8,
    /// Gram matrix of the derivative rows and the noise, for standard errors.
    pub(super) unc: Option<(Gram, f64)>,
    /// Largest rounding of the stored positions the derivatives were taken from (half an ulp
    /// of the largest coordinate, rounded up to a full one); 0 for fitted paths.
    pub(super) rounding: f64,
}

fn vec3<const D: usize>(a: &[f64; D]) -> Vector3<f64> {
    let mut v = Vector3::zeros();
    v.as_mut_slice()[..D].copy_from_slice(a);
    v
}

impl Rows<'_> {
    /// Write local row `j` from the derivatives of its sample.
    #[inline]
    pub(super) fn emit<const D: usize>(
        &mut self,
        j: usize,
        s: &Sample<D>,
        up: Option<&Vector3<f64>>,
        opts: &Options,
    ) {
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
        let put = |dst: &mut [f64], v: &[f64]| {
            if !dst.is_empty() {
                dst[j * v.len()..(j + 1) * v.len()].copy_from_slice(v);
            }
        };
        let set = |dst: &mut [f64], v: f64| {
            if !dst.is_empty() {
                dst[j] = v;
            }
        };
        put(self.velocity, &s.d1);
        put(self.acceleration, &s.d2);
        put(self.jerk, &s.d3);
        put(self.position, &s.p);
        set(self.speed, f.speed);
        set(self.arclength, s.ds);
        put(self.tangent, &f.tangent.as_slice()[..D]);
        put(self.normal, &f.normal.as_slice()[..D]);
        put(self.binormal, f.binormal.as_slice());
        set(self.curvature, f.curvature);
        set(self.signed_curvature, f.signed_curvature);
        set(self.torsion, f.torsion);
        set(self.radius, f.radius);
        if !self.center.is_empty() {
            put(
                self.center,
                &(vec3(&s.p) + f.normal * f.radius).as_slice()[..D],
            );
        }
        set(self.accel_tangential, f.accel_tangential);
        set(self.accel_normal, f.accel_normal);
        set(self.angular_speed, f.angular_speed);
        set(self.angular_accel, f.angular_accel);
        self.flags[j] = f.flags | s.flags;
        if self.se_w == 1 {
            let e = err.unwrap_or(Errors::NAN);
            // A standard error only where its quantity is defined.
            let only = |q: f64, se: f64| if q.is_nan() { f64::NAN } else { se };
            set(self.se_position, e.position);
            set(self.se_velocity, e.velocity);
            set(self.se_acceleration, e.acceleration);
            set(self.se_jerk, e.jerk);
            set(self.se_speed, only(f.speed, e.speed));
            set(
                self.se_accel_tangential,
                only(f.accel_tangential, e.accel_tangential),
            );
            set(self.se_accel_normal, only(f.accel_normal, e.accel_normal));
            set(self.se_curvature, only(f.curvature, e.curvature));
            set(self.se_torsion, only(f.torsion, e.torsion));
            set(
                self.se_angular_speed,
                only(f.angular_speed, e.angular_speed),
            );
            let se_radius = if f.curvature > 0.0 {
                e.curvature / (f.curvature * f.curvature)
            } else {
                f64::NAN
            };
            set(self.se_radius, se_radius);
        }
    }
}

//! The Frenet apparatus of one sample from its time derivatives r′, r″, r‴.
//!
//! With c = r′ × r″ and v = |r′|:
//! T = r′/v, B = c/|c|, N = B × T, κ = |c|/v³, τ = (c · r‴)/|c|², a_t = r′·r″/v, a_n = |c|/v,
//! ω = κ v, ρ = 1/κ. The derivative of the turn rate follows from ω = |c|/v² and c′ = r′ × r‴:
//! dω/dt = (c · (r′ × r‴))/(|c| v²) − 2 |c| a_t / v³, so it needs no second pass.

use nalgebra::Vector3;

/// Bit flags of a sample. The Python layer mirrors them as an `IntFlag`.
pub mod flag {
    /// Speed below `min_speed`: T, N, B, κ, τ, ρ, ω are undefined (NaN).
    pub const STOPPED: u8 = 1;
    /// Curvature below `min_curvature` or indistinguishable from zero in floating point: κ = 0,
    /// N, B, τ are undefined (NaN).
    pub const STRAIGHT: u8 = 2;
    /// A one-sided or narrowed stencil was used: lower-order estimate.
    pub const EDGE: u8 = 4;
    /// The estimate spans a time step much longer than usual, or a skipped INVALID row.
    pub const GAP: u8 = 8;
    /// The input row is not finite; every result of the row is NaN.
    pub const INVALID: u8 = 16;
    /// Moving and curved, but the standard error of κ (or of the speed) is more than the allowed
    /// fraction of its value: the frame and κ are defined but too uncertain to use. Only set
    /// where standard errors are computed.
    pub const VAGUE: u8 = 32;
}

/// Thresholds that decide when the frame is undefined.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Thresholds {
    /// Speeds below this are STOPPED (position units per time unit).
    pub min_speed: f64,
    /// Curvatures below this are STRAIGHT (1 / position units).
    pub min_curvature: f64,
}

impl Default for Thresholds {
    /// 1 mm/s and a radius of 1000 km for data in metres and seconds.
    fn default() -> Self {
        Thresholds {
            min_speed: 1e-3,
            min_curvature: 1e-6,
        }
    }
}

/// Everything the kinematics report for one sample.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Frenet {
    /// |r′|.
    pub speed: f64,
    /// Unit tangent T.
    pub tangent: Vector3<f64>,
    /// Principal normal N.
    pub normal: Vector3<f64>,
    /// Binormal B.
    pub binormal: Vector3<f64>,
    /// κ ≥ 0.
    pub curvature: f64,
    /// κ with the sign of the turn about the `up` axis (left positive); NaN if no axis.
    pub signed_curvature: f64,
    /// τ.
    pub torsion: f64,
    /// ρ = 1/κ (infinite on STRAIGHT samples).
    pub radius: f64,
    /// Tangential acceleration a_t = dv/dt.
    pub accel_tangential: f64,
    /// Normal (centripetal) acceleration a_n = κ v² ≥ 0.
    pub accel_normal: f64,
    /// ω = κ v.
    pub angular_speed: f64,
    /// dω/dt.
    pub angular_accel: f64,
    /// STOPPED / STRAIGHT bits.
    pub flags: u8,
}

/// Relative size of |r′ × r″| below which r′ and r″ are taken as parallel in floating point.
const PARALLEL_EPS: f64 = 64.0 * f64::EPSILON;

/// The Frenet apparatus from r′, r″, r‴.
///
/// `up` is the unit axis about which the signed curvature is measured (+z for planar paths).
///
/// # Examples
///
/// ```
/// use nalgebra::Vector3;
/// use osculate::frame::{frenet, Thresholds};
/// // Unit circle at unit speed, at the point (1, 0, 0).
/// let f = frenet(
///     &Vector3::new(0.0, 1.0, 0.0),
///     &Vector3::new(-1.0, 0.0, 0.0),
///     &Vector3::new(0.0, -1.0, 0.0),
///     Some(&Vector3::z()),
///     &Thresholds::default(),
/// );
/// assert!((f.curvature - 1.0).abs() < 1e-15);
/// assert!((f.signed_curvature - 1.0).abs() < 1e-15);
/// assert_eq!(f.normal, Vector3::new(-1.0, 0.0, 0.0));
/// ```
#[inline]
pub fn frenet(
    d1: &Vector3<f64>,
    d2: &Vector3<f64>,
    d3: &Vector3<f64>,
    up: Option<&Vector3<f64>>,
    th: &Thresholds,
) -> Frenet {
    // The formulas multiply derivatives together (|r′|³, |r′ × r″|²), which over- or underflows
    // long before the inputs do. Scaling space by a power of two around |r′| is exact, and the
    // apparatus is scale-covariant: T, N, B, ω, dω/dt do not change, lengths and accelerations
    // scale with space, curvature and torsion inversely.
    let big = d1.amax();
    // |r′ × r″|² ~ |r′|⁴: beyond 1e±30 the squares come near the ends of the range.
    if !(big > 0.0 && big.is_finite()) || (1e-30..=1e30).contains(&big) {
        return frenet_unscaled(d1, d2, d3, up, th);
    }
    let e = big.log2().floor() as i32;
    let s = 2f64.powi(-e);
    let th_s = Thresholds {
        min_speed: th.min_speed * s,
        min_curvature: th.min_curvature / s,
    };
    let mut f = frenet_unscaled(&(d1 * s), &(d2 * s), &(d3 * s), up, &th_s);
    f.speed /= s;
    f.accel_tangential /= s;
    f.accel_normal /= s;
    f.curvature *= s;
    f.signed_curvature *= s;
    f.torsion *= s;
    f.radius /= s;
    f
}

#[inline]
fn frenet_unscaled(
    d1: &Vector3<f64>,
    d2: &Vector3<f64>,
    d3: &Vector3<f64>,
    up: Option<&Vector3<f64>>,
    th: &Thresholds,
) -> Frenet {
    let nan = f64::NAN;
    let nanv = Vector3::from_element(nan);
    let speed = d1.norm();
    let c = d1.cross(d2);
    let cn = c.norm();
    let (accel_tangential, accel_normal) = if speed > 0.0 {
        (d1.dot(d2) / speed, cn / speed)
    } else {
        (nan, nan)
    };
    let mut out = Frenet {
        speed,
        tangent: nanv,
        normal: nanv,
        binormal: nanv,
        curvature: nan,
        signed_curvature: nan,
        torsion: nan,
        radius: nan,
        accel_tangential,
        accel_normal,
        angular_speed: nan,
        angular_accel: nan,
        flags: 0,
    };
    if speed.is_nan() || speed < th.min_speed || speed == 0.0 {
        out.flags |= flag::STOPPED;
        return out;
    }
    out.tangent = d1 / speed;
    let v2 = speed * speed;
    let kappa = cn / (v2 * speed);
    if kappa.is_nan() || kappa < th.min_curvature || cn <= PARALLEL_EPS * speed * d2.norm() {
        out.flags |= flag::STRAIGHT;
        out.curvature = 0.0;
        out.signed_curvature = if up.is_some() { 0.0 } else { nan };
        out.radius = f64::INFINITY;
        out.accel_normal = 0.0;
        out.angular_speed = 0.0;
        return out;
    }
    let b = c / cn;
    out.binormal = b;
    out.normal = b.cross(&out.tangent);
    out.curvature = kappa;
    out.signed_curvature = up.map_or(nan, |u| c.dot(u) / (v2 * speed));
    out.torsion = c.dot(d3) / (cn * cn);
    out.radius = 1.0 / kappa;
    out.angular_speed = cn / v2;
    out.angular_accel =
        c.dot(&d1.cross(d3)) / (cn * v2) - 2.0 * cn * accel_tangential / (v2 * speed);
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    fn helix(a: f64, c: f64, s: f64) -> [Vector3<f64>; 3] {
        [
            Vector3::new(-a * s.sin(), a * s.cos(), c),
            Vector3::new(-a * s.cos(), -a * s.sin(), 0.0),
            Vector3::new(a * s.sin(), -a * s.cos(), 0.0),
        ]
    }

    #[test]
    fn helix_closed_form() {
        // κ = a/(a²+c²), τ = c/(a²+c²) for (a cos s, a sin s, c s): any differential geometry text.
        let (a, c) = (2.0, 0.5);
        let [d1, d2, d3] = helix(a, c, 0.7);
        let f = frenet(&d1, &d2, &d3, None, &Thresholds::default());
        assert_relative_eq!(f.curvature, a / (a * a + c * c), max_relative = 1e-14);
        assert_relative_eq!(f.torsion, c / (a * a + c * c), max_relative = 1e-14);
        assert!(f.signed_curvature.is_nan());
        assert_relative_eq!(f.tangent.norm(), 1.0, max_relative = 1e-15);
        assert_relative_eq!(f.normal.dot(&f.tangent), 0.0, epsilon = 1e-15);
        // Uniform speed: a_t = 0 and dω/dt = 0 (closed form).
        assert_relative_eq!(f.accel_tangential, 0.0, epsilon = 1e-15);
        assert_relative_eq!(f.angular_accel, 0.0, epsilon = 1e-14);
    }

    #[test]
    fn circle_with_angular_acceleration() {
        // Circle of radius R with θ(t) = ω0 t + α t²/2, at t = 0: a_t = Rα, a_n = Rω0², dω/dt = α
        // (uniform circular motion with angular acceleration, any mechanics text).
        let (r, w, al) = (3.0, 0.8, 0.25);
        let d1 = Vector3::new(0.0, r * w, 0.0);
        let d2 = Vector3::new(-r * w * w, r * al, 0.0);
        let d3 = Vector3::new(-3.0 * r * w * al, -r * w * w * w, 0.0);
        let f = frenet(&d1, &d2, &d3, Some(&Vector3::z()), &Thresholds::default());
        assert_relative_eq!(f.accel_tangential, r * al, max_relative = 1e-14);
        assert_relative_eq!(f.accel_normal, r * w * w, max_relative = 1e-14);
        assert_relative_eq!(f.curvature, 1.0 / r, max_relative = 1e-14);
        assert_relative_eq!(f.angular_accel, al, max_relative = 1e-13);
    }

    #[test]
    fn stop_and_straight_are_flagged() {
        let th = Thresholds::default();
        let z = Vector3::zeros();
        let f = frenet(&z, &Vector3::x(), &z, None, &th);
        assert_eq!(f.flags, flag::STOPPED);
        assert!(f.tangent[0].is_nan() && f.curvature.is_nan() && f.accel_tangential.is_nan());
        let f = frenet(&Vector3::x(), &(Vector3::x() * 3.0), &z, None, &th);
        assert_eq!(f.flags, flag::STRAIGHT);
        assert_eq!(f.curvature, 0.0);
        assert_eq!(f.accel_tangential, 3.0);
        assert!(f.normal[0].is_nan() && f.torsion.is_nan());
    }

    #[test]
    fn scale_covariant_far_beyond_the_square_root_of_the_range() {
        // Scaling space by 2^p is exact: κ, τ scale by 2^−p, speeds and accelerations by 2^p
        // (closed form for the helix), even where |r′|³ alone would over- or underflow.
        let [d1, d2, d3] = helix(2.0, 0.5, 0.7);
        let th = Thresholds {
            min_speed: 0.0,
            min_curvature: 0.0,
        };
        let base = frenet(&d1, &d2, &d3, None, &th);
        for p in [-600, -300, 300, 600] {
            let s = 2f64.powi(p);
            let f = frenet(&(d1 * s), &(d2 * s), &(d3 * s), None, &th);
            assert_eq!(f.flags, 0, "p = {p}");
            assert_relative_eq!(f.curvature, base.curvature / s, max_relative = 1e-14);
            assert_relative_eq!(f.torsion, base.torsion / s, max_relative = 1e-14);
            assert_relative_eq!(f.speed, base.speed * s, max_relative = 1e-14);
            assert_relative_eq!(f.angular_speed, base.angular_speed, max_relative = 1e-14);
        }
    }

    #[test]
    fn right_turn_is_negative() {
        let f = frenet(
            &Vector3::x(),
            &Vector3::new(0.0, -2.0, 0.0),
            &Vector3::zeros(),
            Some(&Vector3::z()),
            &Thresholds::default(),
        );
        assert_relative_eq!(f.signed_curvature, -2.0, max_relative = 1e-15);
    }
}

//! WGS 84 geodetic coordinates (latitude, longitude, ellipsoidal height) to Earth-centred
//! Earth-fixed (ECEF) Cartesian coordinates and to a local east-north-up (ENU) frame, and back.
//!
//! Forward: the closed form of NIMA TR8350.2 (3rd ed., 2000), section 4: with the prime-vertical
//! radius N = a / √(1 − e² sin²φ),
//! X = (N + h) cos φ cos λ, Y = (N + h) cos φ sin λ, Z = (N(1 − e²) + h) sin φ.
//! ENU components are the ECEF difference from the origin rotated onto the origin's east, north
//! and up unit vectors (up = the ellipsoid normal at the origin).
//!
//! Inverse (ECEF → geodetic): Heikkinen's exact closed form (M. Heikkinen, Z. Vermess. 107 (1982)
//! 207–211), in the notation of J. Zhu, IEEE Trans. Aerosp. Electron. Syst. 30(3) (1994) 957–961.
//! It is exact up to rounding for every point farther than about 43 km from the Earth's centre
//! (inside that small region the formula is undefined and the result is NaN; no navigation fix
//! lies there).
//!
//! Angles are in degrees at the interface, heights and ENU components in metres. Rows are given
//! row-major as `(n, 3)` arrays flattened to slices, split into tracks by `m + 1` offsets so that
//! each track can have its own origin; work is spread over the rayon pool in chunks of rows.

use crate::batch::{check_offsets, partition, plan_jobs, track_rows};
use crate::error::{try_filled, KernelError, Result};
use rayon::prelude::*;

/// WGS 84 semi-major axis a in metres (NIMA TR8350.2, Table 3.1).
pub const WGS84_A: f64 = 6_378_137.0;
/// WGS 84 inverse flattening 1/f (NIMA TR8350.2, Table 3.1).
pub const WGS84_INV_F: f64 = 298.257_223_563;

/// A reference ellipsoid of revolution.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Ellipsoid {
    /// Semi-major (equatorial) axis, metres.
    pub a: f64,
    /// Flattening f = (a − b) / a.
    pub f: f64,
}

impl Ellipsoid {
    /// The WGS 84 ellipsoid: a = 6378137 m, 1/f = 298.257223563.
    pub const WGS84: Ellipsoid = Ellipsoid {
        a: WGS84_A,
        f: 1.0 / WGS84_INV_F,
    };

    /// Semi-minor (polar) axis b = a (1 − f).
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::geodesy::Ellipsoid;
    /// // NIMA TR8350.2, Table 3.3: b = 6356752.3142 m (to the 0.1 mm given there).
    /// assert!((Ellipsoid::WGS84.b() - 6_356_752.3142).abs() < 1e-4);
    /// ```
    pub fn b(&self) -> f64 {
        self.a * (1.0 - self.f)
    }

    /// First eccentricity squared e² = f (2 − f).
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::geodesy::Ellipsoid;
    /// // NIMA TR8350.2, Table 3.3: e² = 0.00669437999014 (14 decimals given there).
    /// assert!((Ellipsoid::WGS84.e2() - 0.006_694_379_990_14).abs() < 1e-14);
    /// // A sphere has none.
    /// assert_eq!(Ellipsoid { a: 1.0, f: 0.0 }.e2(), 0.0);
    /// ```
    pub fn e2(&self) -> f64 {
        self.f * (2.0 - self.f)
    }

    /// ECEF coordinates (metres) of geodetic `[lat°, lon°, h m]` (NIMA TR8350.2, eq. 4-14).
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::geodesy::Ellipsoid;
    /// let w = Ellipsoid::WGS84;
    /// // On the equator at the prime meridian the point lies on the X axis at distance a + h.
    /// assert_eq!(w.to_ecef([0.0, 0.0, 10.0]), [6_378_147.0, 0.0, 0.0]);
    /// ```
    pub fn to_ecef(&self, llh: [f64; 3]) -> [f64; 3] {
        let (sp, cp) = llh[0].to_radians().sin_cos();
        let (sl, cl) = llh[1].to_radians().sin_cos();
        let h = llh[2];
        let e2 = self.e2();
        let n = self.a / (1.0 - e2 * sp * sp).sqrt();
        [
            (n + h) * cp * cl,
            (n + h) * cp * sl,
            (n * (1.0 - e2) + h) * sp,
        ]
    }

    /// Geodetic `[lat°, lon°, h m]` of ECEF coordinates, by Heikkinen's closed form.
    ///
    /// Longitude is in (−180°, 180°]. Points within about 43 km of the Earth's centre, where the
    /// closed form is undefined, give NaN latitude and height.
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::geodesy::Ellipsoid;
    /// let w = Ellipsoid::WGS84;
    /// let llh = w.from_ecef(w.to_ecef([45.0, -120.0, 250.0]));
    /// assert!((llh[0] - 45.0).abs() < 1e-12 && (llh[1] + 120.0).abs() < 1e-12);
    /// assert!((llh[2] - 250.0).abs() < 1e-8);
    /// assert!(w.from_ecef([0.0, 0.0, 0.0])[0].is_nan());
    /// ```
    pub fn from_ecef(&self, p: [f64; 3]) -> [f64; 3] {
        let [x, y, z] = p;
        let a = self.a;
        let b = self.b();
        let e2 = self.e2();
        let ep2 = e2 / (1.0 - e2); // second eccentricity squared
        let r2 = x * x + y * y;
        let r = r2.sqrt();
        let big_e2 = a * a - b * b;
        let f = 54.0 * b * b * z * z;
        let g = r2 + (1.0 - e2) * z * z - e2 * big_e2;
        let lon = y.atan2(x).to_degrees();
        if g <= 0.0 {
            return [f64::NAN, lon, f64::NAN];
        }
        let c = e2 * e2 * f * r2 / (g * g * g);
        let s = (1.0 + c + (c * c + 2.0 * c).sqrt()).cbrt();
        let k = s + 1.0 / s + 1.0;
        let pp = f / (3.0 * k * k * g * g);
        let q = (1.0 + 2.0 * e2 * e2 * pp).sqrt();
        // Near the poles the true radicand tends to 0 and rounding can make it slightly negative;
        // it is clamped (the latitude there comes from atan2(z', r) and is insensitive to r0).
        let radicand = 0.5 * a * a * (1.0 + 1.0 / q)
            - pp * (1.0 - e2) * z * z / (q * (1.0 + q))
            - 0.5 * pp * r2;
        let r0 = -(pp * e2 * r) / (1.0 + q) + radicand.max(0.0).sqrt();
        let dr = r - e2 * r0;
        let u = (dr * dr + z * z).sqrt();
        let v = (dr * dr + (1.0 - e2) * z * z).sqrt();
        let z0 = b * b * z / (a * v);
        let h = u * (1.0 - b * b / (a * v));
        let lat = (z + ep2 * z0).atan2(r).to_degrees();
        [lat, lon, h]
    }
}

/// A local east-north-up frame tangent to the ellipsoid at an origin.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LocalFrame {
    /// ECEF coordinates of the origin.
    pub origin_ecef: [f64; 3],
    /// Rows: the east, north and up unit vectors in ECEF.
    pub axes: [[f64; 3]; 3],
}

impl LocalFrame {
    /// The ENU frame at geodetic `origin` `[lat°, lon°, h m]` on `ellipsoid`.
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::geodesy::{Ellipsoid, LocalFrame, WGS84_A};
    /// // On the equator at longitude 0 the origin is ECEF (a, 0, 0), east is +y, north +z, up +x
    /// // (closed form).
    /// let f = LocalFrame::new(&Ellipsoid::WGS84, [0.0, 0.0, 0.0]);
    /// assert!((f.origin_ecef[0] - WGS84_A).abs() < 1e-9 && f.origin_ecef[1].abs() < 1e-9);
    /// let want = [[0.0, 1.0, 0.0], [0.0, 0.0, 1.0], [1.0, 0.0, 0.0]];
    /// for (axis, w) in f.axes.iter().zip(want) {
    ///     assert!(axis.iter().zip(w).all(|(a, b)| (a - b).abs() < 1e-15));
    /// }
    /// ```
    pub fn new(ellipsoid: &Ellipsoid, origin: [f64; 3]) -> Self {
        let (sp, cp) = origin[0].to_radians().sin_cos();
        let (sl, cl) = origin[1].to_radians().sin_cos();
        LocalFrame {
            origin_ecef: ellipsoid.to_ecef(origin),
            axes: [
                [-sl, cl, 0.0],
                [-sp * cl, -sp * sl, cp],
                [cp * cl, cp * sl, sp],
            ],
        }
    }

    /// ENU components of an ECEF point.
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::geodesy::{Ellipsoid, LocalFrame};
    /// // 100 m straight up from an origin on the equator at longitude 0 is ECEF x + 100
    /// // (closed form: there the up axis is the ECEF x axis).
    /// let f = LocalFrame::new(&Ellipsoid::WGS84, [0.0, 0.0, 0.0]);
    /// let o = f.origin_ecef;
    /// let enu = f.enu_of_ecef([o[0] + 100.0, o[1], o[2]]);
    /// assert!(enu[0].abs() < 1e-9 && enu[1].abs() < 1e-9 && (enu[2] - 100.0).abs() < 1e-9);
    /// let back = f.ecef_of_enu(enu);
    /// assert!((back[0] - o[0] - 100.0).abs() < 1e-6);
    /// ```
    pub fn enu_of_ecef(&self, p: [f64; 3]) -> [f64; 3] {
        let o = self.origin_ecef;
        let d = [p[0] - o[0], p[1] - o[1], p[2] - o[2]];
        self.axes
            .map(|row| row[0] * d[0] + row[1] * d[1] + row[2] * d[2])
    }

    /// ECEF point of ENU components.
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::geodesy::{Ellipsoid, LocalFrame};
    /// // At the north pole the origin is ECEF (0, 0, b) and up is +z (closed form): 10 m up is
    /// // z = b + 10.
    /// let wgs = Ellipsoid::WGS84;
    /// let f = LocalFrame::new(&wgs, [90.0, 0.0, 0.0]);
    /// let p = f.ecef_of_enu([0.0, 0.0, 10.0]);
    /// assert!(p[0].abs() < 1e-6 && p[1].abs() < 1e-6 && (p[2] - wgs.b() - 10.0).abs() < 1e-6);
    /// ```
    pub fn ecef_of_enu(&self, enu: [f64; 3]) -> [f64; 3] {
        let [e, n, u] = self.axes;
        let o = self.origin_ecef;
        [0, 1, 2].map(|j| o[j] + e[j] * enu[0] + n[j] * enu[1] + u[j] * enu[2])
    }
}

/// Where the local frame of each track is anchored.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Origin<'a> {
    /// At the first row of each track whose latitude, longitude and height are all finite.
    FirstFix,
    /// Given origins `[lat°, lon°, h m]`: 3 values (one origin for every track) or `3 m` values
    /// (one per track, row-major).
    Given(&'a [f64]),
}

/// Result of [`geodetic_to_enu`].
#[derive(Debug, Clone, PartialEq)]
pub struct Converted {
    /// ENU components, row-major `(n, 3)`.
    pub enu: Vec<f64>,
    /// Origin used by each track, row-major `(m, 3)`; NaN for a track without a finite fix when
    /// the origin is [`Origin::FirstFix`].
    pub origins: Vec<f64>,
}

fn rows3(values: &[f64], argument: &'static str) -> Result<usize> {
    if values.len() % 3 != 0 {
        return Err(KernelError::Shape {
            argument,
            detail: format!("{} values do not form rows of 3", values.len()),
        });
    }
    Ok(values.len() / 3)
}

fn row_at(values: &[f64], i: usize) -> [f64; 3] {
    [values[3 * i], values[3 * i + 1], values[3 * i + 2]]
}

fn finite(p: [f64; 3]) -> bool {
    p.iter().all(|v| v.is_finite())
}

/// Check given origins (one shared or one per track) and return them per track, row-major.
fn given_origins(given: &[f64], m: usize) -> Result<Vec<f64>> {
    let k = rows3(given, "origin")?;
    if k != 1 && k != m {
        return Err(KernelError::Shape {
            argument: "origin",
            detail: format!("expected one origin or one per track ({m}), got {k}"),
        });
    }
    for i in 0..k {
        let o = row_at(given, i);
        let which = if k == 1 {
            String::new()
        } else {
            format!("track {i}: ")
        };
        if !finite(o) {
            return Err(KernelError::Option {
                argument: "origin",
                detail: format!("{which}must be finite, got {o:?}"),
            });
        }
        if o[0].abs() > 90.0 {
            return Err(KernelError::Option {
                argument: "origin",
                detail: format!("{which}latitude {} is outside [-90, 90] degrees", o[0]),
            });
        }
    }
    let mut out = try_filled(3 * m, 0.0)?;
    for (i, chunk) in out.chunks_exact_mut(3).enumerate() {
        chunk.copy_from_slice(&given[3 * (i % k)..3 * (i % k) + 3]);
    }
    Ok(out)
}

/// Convert geodetic rows `[lat°, lon°, h m]` to local east-north-up metres, per track.
///
/// Rows with a non-finite value give NaN. A finite latitude outside [−90°, 90°] is an error that
/// names the track and row.
///
/// # Examples
///
/// ```
/// use osculate::geodesy::{geodetic_to_enu, Origin};
/// // Two tracks, each anchored at its own first fix; 0.001° of latitude is about 110.6 m north.
/// let llh = [10.0, 20.0, 0.0, 10.001, 20.0, 0.0, -5.0, 7.0, 3.0, -5.0, 7.0, 4.0];
/// let out = geodetic_to_enu(&llh, &[0, 2, 4], Origin::FirstFix).unwrap();
/// assert_eq!(&out.enu[..3], &[0.0, 0.0, 0.0]);
/// assert!((out.enu[4] - 110.6).abs() < 0.1 && out.enu[3].abs() < 1e-9);
/// assert!((out.enu[11] - 1.0).abs() < 1e-9); // one metre up
/// assert_eq!(&out.origins[3..], &[-5.0, 7.0, 3.0]);
/// ```
pub fn geodetic_to_enu(llh: &[f64], offsets: &[i64], origin: Origin<'_>) -> Result<Converted> {
    let n = rows3(llh, "llh")?;
    let off = check_offsets(offsets, n)?;
    let m = off.len() - 1;
    let origins = match origin {
        Origin::Given(g) => given_origins(g, m)?,
        Origin::FirstFix => {
            let first: Vec<[f64; 3]> = (0..m)
                .into_par_iter()
                .map(|k| {
                    track_rows(&off, k)
                        .map(|i| row_at(llh, i))
                        .find(|p| finite(*p))
                        .unwrap_or([f64::NAN; 3])
                })
                .collect();
            let mut out = try_filled(3 * m, 0.0)?;
            for (chunk, p) in out.chunks_exact_mut(3).zip(&first) {
                chunk.copy_from_slice(p);
            }
            out
        }
    };
    let wgs = Ellipsoid::WGS84;
    let frames: Vec<Option<LocalFrame>> = origins
        .chunks_exact(3)
        .map(|o| {
            let o = [o[0], o[1], o[2]];
            finite(o).then(|| LocalFrame::new(&wgs, o))
        })
        .collect();
    let mut enu = try_filled(3 * n, f64::NAN)?;
    let jobs = plan_jobs(&off, |_| false);
    let parts = partition(&mut enu[..], jobs.iter().map(|j| 3 * j.rows.len()));
    let outcomes: Vec<Result<()>> = parts
        .into_par_iter()
        .zip(jobs.par_iter())
        .map(|(out, job)| {
            let frame = frames[job.track];
            for (j, dst) in job.rows.clone().zip(out.chunks_exact_mut(3)) {
                let p = row_at(llh, j);
                if p[0].abs() > 90.0 {
                    return Err(KernelError::Row {
                        argument: "lat",
                        track: job.track,
                        row: j,
                        detail: format!("latitude {} is outside [-90, 90] degrees", p[0]),
                    });
                }
                if let (Some(frame), true) = (frame, finite(p)) {
                    dst.copy_from_slice(&frame.enu_of_ecef(wgs.to_ecef(p)));
                }
            }
            Ok(())
        })
        .collect();
    // The first failing job in row order, so the reported row does not depend on scheduling.
    outcomes.into_iter().collect::<Result<()>>()?;
    Ok(Converted { enu, origins })
}

/// Convert local east-north-up rows (metres) back to geodetic `[lat°, lon°, h m]`, per track.
///
/// The origins must be given (one for every track, or one per track). Rows with a non-finite
/// value give NaN.
///
/// # Examples
///
/// ```
/// use osculate::geodesy::{enu_to_geodetic, Origin};
/// let llh = enu_to_geodetic(&[0.0, 0.0, 12.5], &[0, 1], Origin::Given(&[51.5, -0.1, 30.0]))
///     .unwrap();
/// assert!((llh[0] - 51.5).abs() < 1e-12 && (llh[1] + 0.1).abs() < 1e-12);
/// assert!((llh[2] - 42.5).abs() < 1e-8);
/// ```
pub fn enu_to_geodetic(enu: &[f64], offsets: &[i64], origin: Origin<'_>) -> Result<Vec<f64>> {
    let n = rows3(enu, "enu")?;
    let off = check_offsets(offsets, n)?;
    let m = off.len() - 1;
    let Origin::Given(given) = origin else {
        return Err(KernelError::Option {
            argument: "origin",
            detail: "must be given to convert east-north-up back to geodetic".into(),
        });
    };
    let origins = given_origins(given, m)?;
    let wgs = Ellipsoid::WGS84;
    let frames: Vec<LocalFrame> = origins
        .chunks_exact(3)
        .map(|o| LocalFrame::new(&wgs, [o[0], o[1], o[2]]))
        .collect();
    let mut llh = try_filled(3 * n, f64::NAN)?;
    let jobs = plan_jobs(&off, |_| false);
    let parts = partition(&mut llh[..], jobs.iter().map(|j| 3 * j.rows.len()));
    parts
        .into_par_iter()
        .zip(jobs.par_iter())
        .for_each(|(out, job)| {
            let frame = &frames[job.track];
            for (j, dst) in job.rows.clone().zip(out.chunks_exact_mut(3)) {
                let p = row_at(enu, j);
                if finite(p) {
                    dst.copy_from_slice(&wgs.from_ecef(frame.ecef_of_enu(p)));
                }
            }
        });
    Ok(llh)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::batch::CHUNK;
    use approx::assert_abs_diff_eq;

    const W: Ellipsoid = Ellipsoid::WGS84;

    #[test]
    fn derived_constants_match_the_standard() {
        // NIMA TR8350.2 (3rd ed.), Table 3.3: b = 6356752.3142 m, e² = 0.00669437999014
        // (published to 4 decimals of a metre and 14 decimals respectively).
        assert_abs_diff_eq!(W.b(), 6_356_752.314_2, epsilon = 1e-4);
        assert_abs_diff_eq!(W.e2(), 0.006_694_379_990_14, epsilon = 5e-15);
    }

    #[test]
    fn poles_and_equator_are_on_the_axes() {
        // Closed form: the pole at height h is (0, 0, b + h); the equator at 90° E is (0, a + h, 0).
        let p = W.to_ecef([90.0, 33.0, 100.0]);
        assert_abs_diff_eq!(p[2], W.b() + 100.0, epsilon = 1e-8);
        assert!(p[0].abs() < 1e-6 && p[1].abs() < 1e-6);
        let q = W.to_ecef([0.0, 90.0, -20.0]);
        assert_abs_diff_eq!(q[1], WGS84_A - 20.0, epsilon = 1e-8);
        // And back: both poles are recovered exactly by the closed form.
        let back = W.from_ecef([0.0, 0.0, -W.b() - 5.0]);
        assert_abs_diff_eq!(back[0], -90.0, epsilon = 1e-12);
        assert_abs_diff_eq!(back[2], 5.0, epsilon = 1e-8);
    }

    #[test]
    fn round_trip_everywhere_outside_the_core() {
        // geodetic → ECEF → geodetic: the closed form is exact, so only rounding remains
        // (tolerance 1e-11° ≈ 1 µm and 1e-7 m, well inside the 1e-9° required).
        for i in 0..=72 {
            let lat = -90.0 + 2.5 * i as f64;
            for lon in [-179.9, -60.0, 0.0, 45.0, 135.5, 180.0] {
                for h in [-10_000.0, 0.0, 8_848.0, 400_000.0, 35_786_000.0] {
                    let back = W.from_ecef(W.to_ecef([lat, lon, h]));
                    assert_abs_diff_eq!(back[0], lat, epsilon = 1e-11);
                    if lat.abs() < 90.0 {
                        let dlon = (back[1] - lon + 540.0).rem_euclid(360.0) - 180.0;
                        assert!(dlon.abs() < 1e-11, "lon {lon} -> {}", back[1]);
                    }
                    assert_abs_diff_eq!(back[2], h, epsilon = 1e-7);
                }
            }
        }
    }

    #[test]
    fn inner_core_is_nan_not_garbage() {
        let llh = W.from_ecef([1_000.0, 0.0, 1_000.0]);
        assert!(llh[0].is_nan() && llh[2].is_nan());
    }

    #[test]
    fn enu_axes_are_orthonormal_and_up_is_the_normal() {
        let f = LocalFrame::new(&W, [37.0, -122.0, 10.0]);
        for i in 0..3 {
            for j in 0..3 {
                let d: f64 = (0..3).map(|c| f.axes[i][c] * f.axes[j][c]).sum();
                assert_abs_diff_eq!(d, if i == j { 1.0 } else { 0.0 }, epsilon = 1e-15);
            }
        }
        // Raising the height moves the point straight up in its own frame.
        let up = f.enu_of_ecef(W.to_ecef([37.0, -122.0, 110.0]));
        assert_abs_diff_eq!(up[0], 0.0, epsilon = 1e-8);
        assert_abs_diff_eq!(up[1], 0.0, epsilon = 1e-8);
        assert_abs_diff_eq!(up[2], 100.0, epsilon = 1e-8);
        // ENU → ECEF inverts ECEF → ENU.
        let p = [1234.5, -987.0, 55.0];
        let back = f.enu_of_ecef(f.ecef_of_enu(p));
        for c in 0..3 {
            assert_abs_diff_eq!(back[c], p[c], epsilon = 1e-8);
        }
    }

    #[test]
    fn batch_round_trip_long_track_and_per_track_origins() {
        // A track longer than one parallel chunk, plus a short one with a NaN row first.
        let n0 = CHUNK + 17;
        let mut llh = Vec::new();
        for i in 0..n0 {
            let s = i as f64 / n0 as f64;
            llh.extend([48.0 + 0.5 * s, 11.0 + 0.7 * s, 500.0 + 100.0 * s]);
        }
        llh.extend([f64::NAN, 0.0, 0.0, -33.9, 151.2, 20.0, -33.8, 151.3, 25.0]);
        let off = [0, n0 as i64, n0 as i64 + 3];
        let out = geodetic_to_enu(&llh, &off, Origin::FirstFix).unwrap();
        assert_eq!(&out.origins[3..], &[-33.9, 151.2, 20.0]);
        assert!(out.enu[3 * n0].is_nan());
        assert_eq!(&out.enu[3 * n0 + 3..3 * n0 + 6], &[0.0, 0.0, 0.0]);
        let back = enu_to_geodetic(&out.enu, &off, Origin::Given(&out.origins)).unwrap();
        for (a, b) in back.chunks_exact(3).zip(llh.chunks_exact(3)) {
            if b.iter().all(|v| v.is_finite()) {
                // Round trip of the closed forms: rounding only (1e-9° ≈ 0.1 mm, 1e-6 m).
                assert!((a[0] - b[0]).abs() < 1e-9 && (a[1] - b[1]).abs() < 1e-9);
                assert!((a[2] - b[2]).abs() < 1e-6, "{a:?} vs {b:?}");
            } else {
                assert!(a.iter().all(|v| v.is_nan()));
            }
        }
    }

    #[test]
    fn bad_latitude_and_origins_are_reported() {
        let llh = [0.0, 0.0, 0.0, 10.0, 0.0, 0.0, 91.0, 0.0, 0.0];
        let err = geodetic_to_enu(&llh, &[0, 2, 3], Origin::FirstFix).unwrap_err();
        assert_eq!(
            (err.argument(), err.track(), err.row()),
            ("lat", Some(1), Some(2))
        );
        let err = geodetic_to_enu(&llh[..6], &[0, 2], Origin::Given(&[95.0, 0.0, 0.0]));
        assert!(matches!(
            err,
            Err(KernelError::Option {
                argument: "origin",
                ..
            })
        ));
        let err = geodetic_to_enu(&llh[..6], &[0, 1, 2], Origin::Given(&[0.0; 9]));
        assert!(matches!(
            err,
            Err(KernelError::Shape {
                argument: "origin",
                ..
            })
        ));
        let err = enu_to_geodetic(&llh[..6], &[0, 2], Origin::FirstFix);
        assert!(matches!(
            err,
            Err(KernelError::Option {
                argument: "origin",
                ..
            })
        ));
        let err = geodetic_to_enu(&llh[..5], &[0, 1], Origin::FirstFix);
        assert!(matches!(
            err,
            Err(KernelError::Shape {
                argument: "llh",
                ..
            })
        ));
    }

    #[test]
    fn track_without_a_fix_is_all_nan() {
        let llh = [f64::NAN, 1.0, 2.0, 3.0, f64::NAN, 5.0];
        let out = geodetic_to_enu(&llh, &[0, 2], Origin::FirstFix).unwrap();
        assert!(out.enu.iter().chain(&out.origins).all(|v| v.is_nan()));
    }
}

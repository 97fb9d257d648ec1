//! Rotation-minimizing frames by the double reflection method (W. Wang, B. Jüttler, D. Zheng and
//! Y. Liu, "Computation of rotation minimizing frames", ACM Trans. Graph. 27(1), 2008, art. 2).
//!
//! The frame is carried from sample to sample by two reflections: one in the bisecting plane of
//! the chord, one that maps the reflected tangent onto the next tangent. It exists wherever the
//! tangent does, so it stays continuous through straight stretches and inflections where the
//! Frenet normal vanishes or flips. Along a curve its normal turns relative to the Frenet normal
//! at the rate of the torsion (R. L. Bishop, "There is more than one way to frame a curve", Amer.
//! Math. Monthly 82 (1975) 246–251).

use crate::batch::{check_offsets, partition, track_rows};
use crate::error::{try_filled, KernelError, Result};
use nalgebra::Vector3;
use rayon::prelude::*;

/// A rotation-minimizing frame per row: normal and binormal (the tangent is the caller's), and the
/// twist angle from the Frenet normal to the frame's normal, positive about the tangent.
#[derive(Debug, Clone, PartialEq)]
pub struct Rmf {
    /// Normal, row-major with the path's dimension.
    pub normal: Vec<f64>,
    /// Binormal T × normal, 3 per row.
    pub binormal: Vec<f64>,
    /// Angle from the Frenet normal to the frame normal (radians); NaN where either is undefined.
    pub twist: Vec<f64>,
}

fn load<const D: usize>(a: &[f64], i: usize) -> Vector3<f64> {
    let mut v = Vector3::zeros();
    v.as_mut_slice()[..D].copy_from_slice(&a[i * D..(i + 1) * D]);
    v
}

/// Reflection of `r` in the plane with normal `v` (`c` = |v|²).
#[inline]
fn reflect(r: &Vector3<f64>, v: &Vector3<f64>, c: f64) -> Vector3<f64> {
    if c > 0.0 {
        r - v * (2.0 * v.dot(r) / c)
    } else {
        *r
    }
}

/// Carry the normal `r` from (x0, t0) to (x1, t1) by double reflection, then re-orthonormalize
/// against t1 so that rounding cannot accumulate.
///
/// # Examples
///
/// ```
/// use nalgebra::Vector3;
/// use osculate::rmf::double_reflection;
/// // Along a straight line the frame does not turn (closed form).
/// let (x0, x1, t) = (Vector3::zeros(), Vector3::new(1.0, 0.0, 0.0), Vector3::x());
/// let r = double_reflection(&x0, &t, &Vector3::y(), &x1, &t);
/// assert!((r - Vector3::y()).norm() < 1e-15);
/// ```
#[inline]
pub fn double_reflection(
    x0: &Vector3<f64>,
    t0: &Vector3<f64>,
    r: &Vector3<f64>,
    x1: &Vector3<f64>,
    t1: &Vector3<f64>,
) -> Vector3<f64> {
    let v1 = x1 - x0;
    let c1 = v1.norm_squared();
    let rl = reflect(r, &v1, c1);
    let tl = reflect(t0, &v1, c1);
    let v2 = t1 - tl;
    let r1 = reflect(&rl, &v2, v2.norm_squared());
    let r1 = r1 - t1 * t1.dot(&r1);
    r1 / r1.norm()
}

/// A unit vector perpendicular to `t`: the left normal for planar paths, otherwise the
/// coordinate axis least aligned with `t`, orthogonalized.
fn any_normal<const D: usize>(t: &Vector3<f64>) -> Vector3<f64> {
    if D == 2 {
        return Vector3::new(-t.y, t.x, 0.0);
    }
    let axis = (0..3)
        .min_by(|&a, &b| t[a].abs().total_cmp(&t[b].abs()))
        .map(|k| Vector3::ith(k, 1.0))
        .unwrap_or_else(Vector3::z);
    let r = axis - t * t.dot(&axis);
    r / r.norm()
}

/// Rotation-minimizing frames of every track. `x`, `tangent`, `frenet_normal` are row-major with
/// `dim` columns (tangent NaN where the direction is undefined, Frenet normal NaN where it is).
/// The frame starts from the Frenet normal at the first sample that has one, or from `initial`
/// (projected on the normal plane of the first sample with a tangent), or, on a track that is
/// straight throughout, from an arbitrary normal.
///
/// # Examples
///
/// ```
/// use osculate::rmf::rotation_minimizing;
/// // A planar path: the rotation-minimizing normal of a plane curve is the left normal of the
/// // tangent throughout (closed form), also where the Frenet normal is undefined (NaN).
/// let x = [0.0, 0.0, 1.0, 0.0, 2.0, 0.1, 3.0, 0.3];
/// let s = 0.1f64.hypot(1.0);
/// let tangent = [1.0, 0.0, 1.0, 0.0, 1.0 / s, 0.1 / s, 1.0 / s, 0.1 / s];
/// let frenet = [f64::NAN, f64::NAN, f64::NAN, f64::NAN, -0.1 / s, 1.0 / s, -0.1 / s, 1.0 / s];
/// let f = rotation_minimizing(&x, &tangent, &frenet, 2, &[0, 4], None).unwrap();
/// assert!((f.normal[1] - 1.0).abs() < 1e-12 && f.normal[0].abs() < 1e-12);
/// assert!((f.normal[6] + 0.1 / s).abs() < 1e-12 && (f.normal[7] - 1.0 / s).abs() < 1e-12);
/// ```
pub fn rotation_minimizing(
    x: &[f64],
    tangent: &[f64],
    frenet_normal: &[f64],
    dim: usize,
    offsets: &[i64],
    initial: Option<[f64; 3]>,
) -> Result<Rmf> {
    match dim {
        2 => run::<2>(x, tangent, frenet_normal, offsets, initial),
        3 => run::<3>(x, tangent, frenet_normal, offsets, initial),
        _ => Err(KernelError::Shape {
            argument: "positions",
            detail: format!("must have 2 or 3 columns, got {dim}"),
        }),
    }
}

fn run<const D: usize>(
    x: &[f64],
    tangent: &[f64],
    frenet_normal: &[f64],
    offsets: &[i64],
    initial: Option<[f64; 3]>,
) -> Result<Rmf> {
    let n = x.len() / D;
    if tangent.len() != n * D || frenet_normal.len() != n * D || x.len() != n * D {
        return Err(KernelError::Shape {
            argument: "tangent",
            detail: "positions, tangents and normals must have the same shape".into(),
        });
    }
    if let Some(u) = initial {
        if u.iter().any(|v| !v.is_finite()) || (D == 2 && u[2] != 0.0) {
            return Err(KernelError::Option {
                argument: "initial",
                detail: format!("must be a finite vector in the path's space, got {u:?}"),
            });
        }
    }
    let offsets = check_offsets(offsets, n)?;
    let m = offsets.len() - 1;
    let mut out = Rmf {
        normal: try_filled(n * D, f64::NAN)?,
        binormal: try_filled(n * 3, f64::NAN)?,
        twist: try_filled(n, f64::NAN)?,
    };
    let offs = &offsets;
    let sizes = |w: usize| (0..m).map(move |k| (offs[k + 1] - offs[k]) * w);
    let nparts = partition(&mut out.normal[..], sizes(D));
    let bparts = partition(&mut out.binormal[..], sizes(3));
    let wparts = partition(&mut out.twist[..], sizes(1));
    let results: Vec<Result<()>> = nparts
        .into_par_iter()
        .zip(bparts)
        .zip(wparts)
        .enumerate()
        .map(|(k, ((no, bo), wo))| {
            let rows = track_rows(&offsets, k);
            let (xs, ts, ns) = (
                &x[rows.start * D..rows.end * D],
                &tangent[rows.start * D..rows.end * D],
                &frenet_normal[rows.start * D..rows.end * D],
            );
            let len = rows.len();
            let has_t = |i: usize| ts[i * D..(i + 1) * D].iter().all(|v| v.is_finite());
            let has_n = |i: usize| ns[i * D..(i + 1) * D].iter().all(|v| v.is_finite());
            let Some(i0) = (0..len).find(|&i| has_t(i)) else {
                return Ok(());
            };
            let (start, r0) = match initial {
                Some(u) => {
                    let t = load::<D>(ts, i0);
                    let u = Vector3::from(u);
                    let r = u - t * t.dot(&u);
                    if r.norm() <= 1e-12 * u.norm() || u.norm() == 0.0 {
                        return Err(KernelError::Track {
                            argument: "initial",
                            track: k,
                            detail: "is zero or parallel to the tangent at the first sample".into(),
                        });
                    }
                    (i0, r / r.norm())
                }
                None => match (i0..len).find(|&i| has_t(i) && has_n(i)) {
                    Some(j) => (j, load::<D>(ns, j)),
                    None => (i0, any_normal::<D>(&load::<D>(ts, i0))),
                },
            };
            let mut put = |i: usize, r: &Vector3<f64>| {
                let t = load::<D>(ts, i);
                no[i * D..(i + 1) * D].copy_from_slice(&r.as_slice()[..D]);
                bo[i * 3..(i + 1) * 3].copy_from_slice(t.cross(r).as_slice());
                if has_n(i) {
                    let nf = load::<D>(ns, i);
                    wo[i] = nf.cross(r).dot(&t).atan2(nf.dot(r));
                }
            };
            put(start, &r0);
            for dir in [1isize, -1] {
                let (mut prev, mut r) = (start, r0);
                let mut i = start as isize + dir;
                while i >= 0 && (i as usize) < len {
                    let iu = i as usize;
                    if has_t(iu) {
                        r = double_reflection(
                            &load::<D>(xs, prev),
                            &load::<D>(ts, prev),
                            &r,
                            &load::<D>(xs, iu),
                            &load::<D>(ts, iu),
                        );
                        put(iu, &r);
                        prev = iu;
                    }
                    i += dir;
                }
            }
            Ok(())
        })
        .collect();
    for r in results {
        r?;
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn helix_twist_changes_at_the_torsion_rate() {
        // Helix (a cos s', a sin s', c s') with unit-speed parameter: τ = c/(a²+c²) per unit
        // length (closed form); the twist from the Frenet normal changes at −τ (Bishop 1975).
        let (a, c) = (2.0f64, 1.0f64);
        let w = (a * a + c * c).sqrt();
        let n = 2001;
        let s: Vec<f64> = (0..n).map(|i| i as f64 * 0.01).collect();
        let mut x = Vec::new();
        let mut t = Vec::new();
        let mut nf = Vec::new();
        for &si in &s {
            let u = si / w;
            x.extend([a * u.cos(), a * u.sin(), c * u]);
            t.extend([-a * u.sin() / w, a * u.cos() / w, c / w]);
            nf.extend([-u.cos(), -u.sin(), 0.0]);
        }
        let r = rotation_minimizing(&x, &t, &nf, 3, &[0, n as i64], None).unwrap();
        let tau = c / (a * a + c * c);
        let rate = (r.twist[1500] - r.twist[500]) / (s[1500] - s[500]);
        assert_relative_eq!(rate, -tau, max_relative = 1e-6);
        for i in [0, 700, 2000] {
            let nv = Vector3::new(r.normal[3 * i], r.normal[3 * i + 1], r.normal[3 * i + 2]);
            let tv = Vector3::new(t[3 * i], t[3 * i + 1], t[3 * i + 2]);
            assert_relative_eq!(nv.norm(), 1.0, epsilon = 1e-12);
            assert!(nv.dot(&tv).abs() < 1e-12);
        }
    }

    #[test]
    fn straight_track_gets_a_continuous_frame() {
        let x = [0.0, 0.0, 0.0, 1.0, 0.0, 0.0, 2.0, 0.0, 0.0];
        let t = [1.0, 0.0, 0.0, 1.0, 0.0, 0.0, 1.0, 0.0, 0.0];
        let nf = [f64::NAN; 9];
        let r = rotation_minimizing(&x, &t, &nf, 3, &[0, 3], None).unwrap();
        assert_eq!(&r.normal[0..3], &r.normal[6..9]);
        assert!(r.twist.iter().all(|v| v.is_nan()));
        let bad = rotation_minimizing(&x, &t, &nf, 3, &[0, 3], Some([2.0, 0.0, 0.0]));
        assert!(matches!(
            bad,
            Err(KernelError::Track {
                argument: "initial",
                ..
            })
        ));
    }
}

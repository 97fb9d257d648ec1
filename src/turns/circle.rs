//! Least-squares circle through points: the algebraic fit of I. Kåsa (IEEE Trans. Instrum.
//! Meas. 25 (1976) 8–14) refined by Gauss–Newton on the geometric distances, with the standard
//! error of the radius (used for the smallest radius of a turn's core, see [`crate::turns`]).

/// Least-squares circle through points `(x, y)`: (radius, its standard error), or `None` when
/// the points do not determine one (fewer than 4, or collinear to rounding).
///
/// # Examples
///
/// ```
/// use osculate::turns::fit_circle;
/// // Eight points on a circle of radius 5 about (1, 2): radius 5 (closed form), se 0 to rounding.
/// let pts: Vec<[f64; 2]> = (0..8)
///     .map(|i| {
///         let a = 0.4 * i as f64;
///         [1.0 + 5.0 * a.cos(), 2.0 + 5.0 * a.sin()]
///     })
///     .collect();
/// let (r, se) = fit_circle(&pts).unwrap();
/// assert!((r - 5.0).abs() < 1e-10 && se < 1e-8);
/// assert!(fit_circle(&pts[..3]).is_none()); // fewer than 4 points
/// ```
pub fn fit_circle(pts: &[[f64; 2]]) -> Option<(f64, f64)> {
    let m = pts.len();
    if m < 4 {
        return None;
    }
    // Centred coordinates for conditioning.
    let (mx, my) = pts
        .iter()
        .fold((0.0, 0.0), |(a, b), p| (a + p[0], b + p[1]));
    let (mx, my) = (mx / m as f64, my / m as f64);
    let centred = || pts.iter().map(|p| [p[0] - mx, p[1] - my]);
    // Kåsa: x² + y² + D x + E y + F = 0 in least squares (3 × 3 normal equations).
    let mut a = [[0.0; 3]; 3];
    let mut b = [0.0; 3];
    for p in centred() {
        let row = [p[0], p[1], 1.0];
        let rhs = -(p[0] * p[0] + p[1] * p[1]);
        for r in 0..3 {
            for c in 0..3 {
                a[r][c] += row[r] * row[c];
            }
            b[r] += row[r] * rhs;
        }
    }
    let sol = solve3(a, b)?;
    let (mut cx, mut cy) = (-0.5 * sol[0], -0.5 * sol[1]);
    let mut r = (cx * cx + cy * cy - sol[2]).max(0.0).sqrt();
    if !(r.is_finite() && r > 0.0) {
        return None;
    }
    // Gauss–Newton on the geometric residuals |p − c| − r.
    let mut normal = [[0.0; 3]; 3];
    let mut rss = 0.0;
    for _ in 0..20 {
        let mut g = [0.0; 3];
        normal = [[0.0; 3]; 3];
        rss = 0.0;
        for p in centred() {
            let (dx, dy) = (p[0] - cx, p[1] - cy);
            let d = (dx * dx + dy * dy).sqrt();
            if d == 0.0 {
                return None;
            }
            let res = d - r;
            let jac = [-dx / d, -dy / d, -1.0];
            for i in 0..3 {
                for k in 0..3 {
                    normal[i][k] += jac[i] * jac[k];
                }
                g[i] -= jac[i] * res;
            }
            rss += res * res;
        }
        let step = solve3(normal, g)?;
        cx += step[0];
        cy += step[1];
        r += step[2];
        if step.iter().map(|v| v.abs()).fold(0.0, f64::max) <= 1e-12 * r.max(1e-300) {
            break;
        }
    }
    let inv = invert3(normal)?;
    let dof = (m - 3) as f64;
    let se = if dof > 0.0 {
        (rss / dof * inv[2][2]).sqrt()
    } else {
        f64::NAN
    };
    (r.is_finite() && r > 0.0).then_some((r, se))
}

fn solve3(a: [[f64; 3]; 3], b: [f64; 3]) -> Option<[f64; 3]> {
    let inv = invert3(a)?;
    let mut x = [0.0; 3];
    for i in 0..3 {
        x[i] = (0..3).map(|k| inv[i][k] * b[k]).sum();
    }
    Some(x)
}

/// Inverse of a 3 × 3 matrix by cofactors; `None` when singular relative to its scale.
fn invert3(a: [[f64; 3]; 3]) -> Option<[[f64; 3]; 3]> {
    let c = |r: usize, k: usize| {
        let (r1, r2) = ((r + 1) % 3, (r + 2) % 3);
        let (k1, k2) = ((k + 1) % 3, (k + 2) % 3);
        a[r1][k1] * a[r2][k2] - a[r1][k2] * a[r2][k1]
    };
    let det = a[0][0] * c(0, 0) + a[0][1] * c(0, 1) + a[0][2] * c(0, 2);
    let scale = a.iter().flatten().map(|v| v.abs()).fold(0.0, f64::max);
    if !det.is_finite() || det.abs() <= 1e-14 * scale.powi(3) {
        return None;
    }
    let mut inv = [[0.0; 3]; 3];
    for r in 0..3 {
        for k in 0..3 {
            inv[k][r] = c(r, k) / det;
        }
    }
    Some(inv)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn circle_fit_recovers_radius_and_centre_free() {
        // Points on a circle of radius 7 about (3, −2), over 60°: radius exact (closed form) to
        // 1e-10, standard error 0 to rounding.
        let pts: Vec<[f64; 2]> = (0..20)
            .map(|i| {
                let a = 0.3 + i as f64 * (std::f64::consts::PI / 3.0) / 19.0;
                [3.0 + 7.0 * a.cos(), -2.0 + 7.0 * a.sin()]
            })
            .collect();
        let (r, se) = fit_circle(&pts).unwrap();
        assert!((r - 7.0).abs() < 1e-10 && se < 1e-8);
    }

    #[test]
    fn collinear_points_have_no_circle() {
        let pts: Vec<[f64; 2]> = (0..10).map(|i| [i as f64, 2.0 * i as f64]).collect();
        assert!(fit_circle(&pts).is_none() || fit_circle(&pts).unwrap().0 > 1e6);
    }
}

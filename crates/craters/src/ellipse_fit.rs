//! Direct least-squares ellipse fit: Fitzgibbon, Pilu and Fisher (1999), "Direct least square
//! fitting of ellipses", IEEE Trans. PAMI 21:476, in the numerically stable form of Halíř and
//! Flusser (1998), WSCG'98, which splits the scatter matrix so the constraint matrix is not
//! singular and reduces the generalised eigenproblem to a 3 x 3 ordinary one.

use nalgebra::{Matrix3, Vector3};

#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Ellipse {
    pub cx: f64,
    pub cy: f64,
    pub semi_major: f64,
    pub semi_minor: f64,
    /// Azimuth of the major axis, degrees clockwise from +y (north), [0, 180).
    pub azimuth_deg: f64,
}

fn null_vector(m: &Matrix3<f64>) -> Vector3<f64> {
    let rows = [
        m.row(0).transpose(),
        m.row(1).transpose(),
        m.row(2).transpose(),
    ];
    let cands = [
        rows[0].cross(&rows[1]),
        rows[0].cross(&rows[2]),
        rows[1].cross(&rows[2]),
    ];
    let mut best = cands[0];
    for c in &cands[1..] {
        if c.norm() > best.norm() {
            best = *c;
        }
    }
    best
}

/// Fit an ellipse to at least 6 points. `None` if the points do not determine one.
pub fn fit(pts: &[(f64, f64)]) -> Option<Ellipse> {
    if pts.len() < 6 {
        return None;
    }
    let n = pts.len() as f64;
    let (mx, my) = pts
        .iter()
        .fold((0.0, 0.0), |a, p| (a.0 + p.0 / n, a.1 + p.1 / n));
    let s = (pts
        .iter()
        .map(|p| (p.0 - mx).powi(2) + (p.1 - my).powi(2))
        .sum::<f64>()
        / n)
        .sqrt();
    if !(s > 0.0) {
        return None;
    }
    let (mut s1, mut s2, mut s3) = (
        Matrix3::<f64>::zeros(),
        Matrix3::<f64>::zeros(),
        Matrix3::<f64>::zeros(),
    );
    for p in pts {
        let (x, y) = ((p.0 - mx) / s, (p.1 - my) / s);
        let d1 = Vector3::new(x * x, x * y, y * y);
        let d2 = Vector3::new(x, y, 1.0);
        s1 += d1 * d1.transpose();
        s2 += d1 * d2.transpose();
        s3 += d2 * d2.transpose();
    }
    let t = -s3.try_inverse()? * s2.transpose();
    let m = s1 + s2 * t;
    // Premultiply by the inverse of the constraint block C1 = [[0,0,2],[0,-1,0],[2,0,0]].
    let m = Matrix3::from_rows(&[(m.row(2) / 2.0), -m.row(1), (m.row(0) / 2.0)]);
    let eig = m.complex_eigenvalues();
    let mut best: Option<Vector3<f64>> = None;
    for lam in eig.iter() {
        if lam.im.abs() > 1e-9 * (1.0 + lam.re.abs()) {
            continue;
        }
        let v = null_vector(&(m - Matrix3::identity() * lam.re));
        if 4.0 * v[0] * v[2] - v[1] * v[1] > 0.0 {
            best = Some(v);
        }
    }
    let a1 = best?;
    let a2 = t * a1;
    let (a, b, c, d, e, f) = (a1[0], a1[1], a1[2], a2[0], a2[1], a2[2]);
    let det = 4.0 * a * c - b * b;
    let x0 = (b * e - 2.0 * c * d) / det;
    let y0 = (b * d - 2.0 * a * e) / det;
    let f0 = f + (d * x0 + e * y0) / 2.0;
    // Eigen-decomposition of the quadratic form [[a, b/2], [b/2, c]].
    let tr = a + c;
    let disc = ((a - c).powi(2) + b * b).sqrt();
    let (l1, l2) = ((tr - disc) / 2.0, (tr + disc) / 2.0);
    let (q1, q2) = (-f0 / l1, -f0 / l2);
    if !(q1 > 0.0 && q2 > 0.0) {
        return None;
    }
    let (ax1, ax2) = (q1.sqrt() * s, q2.sqrt() * s);
    // The smaller eigenvalue belongs to the longer axis.
    let (vx, vy) = if b.abs() > 1e-15 {
        (b / 2.0, l1 - a)
    } else if a <= c {
        (1.0, 0.0)
    } else {
        (0.0, 1.0)
    };
    let az = vx.atan2(vy).to_degrees().rem_euclid(180.0);
    let (semi_major, semi_minor) = if ax1 >= ax2 { (ax1, ax2) } else { (ax2, ax1) };
    Some(Ellipse {
        cx: x0 * s + mx,
        cy: y0 * s + my,
        semi_major,
        semi_minor,
        azimuth_deg: if az >= 180.0 { 0.0 } else { az },
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn recovers_a_rotated_ellipse_exactly() {
        // Points on a known ellipse: the direct fit is exact for noise-free data (Fitzgibbon 1999).
        let (a, b, th) = (300.0_f64, 200.0_f64, 30.0_f64.to_radians());
        let pts: Vec<(f64, f64)> = (0..40)
            .map(|i| {
                let t = i as f64 / 40.0 * std::f64::consts::TAU;
                let (u, v) = (a * t.cos(), b * t.sin());
                // Major axis at azimuth th from north: direction (sin th, cos th).
                (
                    1000.0 + u * th.sin() + v * th.cos(),
                    -500.0 + u * th.cos() - v * th.sin(),
                )
            })
            .collect();
        let e = fit(&pts).expect("fit");
        assert!(
            (e.semi_major - a).abs() < 1e-6 && (e.semi_minor - b).abs() < 1e-6,
            "{e:?}"
        );
        assert!((e.cx - 1000.0).abs() < 1e-6 && (e.cy + 500.0).abs() < 1e-6);
        assert!((e.azimuth_deg - 30.0).abs() < 1e-6, "{e:?}");
    }
}

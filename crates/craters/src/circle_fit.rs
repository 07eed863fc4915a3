//! Circle fitting to rim-crest points.
//!
//! - Algebraic start: Kåsa (1976), "A circle fitting procedure and its error analysis", IEEE
//!   Trans. Instrum. Meas. 25:8 — linear least squares on x^2 + y^2 + Dx + Ey + F = 0.
//! - Geometric refinement: Gauss-Newton on the orthogonal distances |p - c| - r (the
//!   geometric fit of Ahn, Rauh and Warnecke 2001, Pattern Recognition 34:2283), with Tukey
//!   biweight weights (Beaton and Tukey 1974, Technometrics 16:147) recomputed each step so
//!   points in breached or slumped sectors lose their pull.

use nalgebra::{Matrix3, Vector3};

#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Circle {
    pub cx: f64,
    pub cy: f64,
    pub r: f64,
}

/// Kåsa algebraic fit (optionally weighted). `None` with fewer than 3 points or collinear ones.
pub fn kasa(pts: &[(f64, f64)], w: Option<&[f64]>) -> Option<Circle> {
    if pts.len() < 3 {
        return None;
    }
    // Centre the data first: the normal equations are badly conditioned far from the origin.
    let n: f64 = pts.len() as f64;
    let (mx, my) = pts
        .iter()
        .fold((0.0, 0.0), |a, p| (a.0 + p.0 / n, a.1 + p.1 / n));
    let mut m = Matrix3::<f64>::zeros();
    let mut b = Vector3::<f64>::zeros();
    for (i, p) in pts.iter().enumerate() {
        let wi = w.map_or(1.0, |w| w[i]);
        if wi <= 0.0 {
            continue;
        }
        let (x, y) = (p.0 - mx, p.1 - my);
        let row = Vector3::new(x, y, 1.0);
        m += wi * row * row.transpose();
        b += wi * row * (-(x * x + y * y));
    }
    let s = m.lu().solve(&b)?;
    let (cx, cy) = (-s[0] / 2.0, -s[1] / 2.0);
    let r2 = cx * cx + cy * cy - s[2];
    (r2 > 0.0 && r2.is_finite()).then(|| Circle {
        cx: cx + mx,
        cy: cy + my,
        r: r2.sqrt(),
    })
}

/// Robust geometric fit starting from the Kåsa circle. Returns the circle and the final
/// per-point weights (0 for rejected points).
pub fn robust_geometric(pts: &[(f64, f64)]) -> Option<(Circle, Vec<f64>)> {
    let mut c = kasa(pts, None)?;
    let mut w = vec![1.0; pts.len()];
    let (mut res, mut abs) = (Vec::with_capacity(pts.len()), Vec::with_capacity(pts.len()));
    for _ in 0..8 {
        // Tukey weights from the current residuals, scale from the median absolute deviation.
        res.clear();
        res.extend(
            pts.iter()
                .map(|p| ((p.0 - c.cx).powi(2) + (p.1 - c.cy).powi(2)).sqrt() - c.r),
        );
        abs.clear();
        abs.extend(res.iter().map(|r: &f64| r.abs()));
        // Floor on the scale: a perfect circle must not make every point an outlier.
        let scale = (1.4826 * crate::stats::median(&mut abs)).max(1e-3 * c.r);
        let k = 4.685 * scale;
        for (wi, r) in w.iter_mut().zip(&res) {
            let u = r / k;
            *wi = if u.abs() < 1.0 {
                (1.0 - u * u).powi(2)
            } else {
                0.0
            };
        }
        // One weighted Gauss-Newton step on (cx, cy, r).
        let mut m = Matrix3::<f64>::zeros();
        let mut g = Vector3::<f64>::zeros();
        for (p, &wi) in pts.iter().zip(&w) {
            if wi <= 0.0 {
                continue;
            }
            let (dx, dy) = (p.0 - c.cx, p.1 - c.cy);
            let d = (dx * dx + dy * dy).sqrt().max(1e-12);
            let j = Vector3::new(-dx / d, -dy / d, -1.0);
            let r = d - c.r;
            m += wi * j * j.transpose();
            g += wi * j * r;
        }
        let step = m.lu().solve(&(-g))?;
        c = Circle {
            cx: c.cx + step[0],
            cy: c.cy + step[1],
            r: c.r + step[2],
        };
        if !(c.r > 0.0 && c.r.is_finite()) {
            return None;
        }
        if step.norm() < 1e-6 * c.r {
            break;
        }
    }
    Some((c, w))
}

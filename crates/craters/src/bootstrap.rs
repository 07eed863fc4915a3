//! Uncertainties of a measured crater by the bootstrap over azimuths (Efron 1979, "Bootstrap
//! methods: another look at the jackknife", Ann. Statist. 7:1): the rim-crest points are
//! resampled with replacement, not the profiles, so a resample costs a few sums.

use crate::measure::MeasureOptions;
use crate::stats;
use rand::{RngCore, SeedableRng};

/// Bootstrap over azimuths (Efron 1979, Ann. Statist. 7:1): resample the rim-crest points with
/// replacement, refit the circle (Kåsa) and the rim median, and report the standard deviations
/// of the diameter and the depth. Seeded, so the output is reproducible.
pub fn spreads(pts: &[(f64, f64)], crest_z: &[f64], floor_level: f64, opts: &MeasureOptions) -> (f64, f64) {
    if opts.bootstrap_resamples < 2 || pts.len() < 3 {
        return (0.0, 0.0);
    }
    let mut rng = rand_chacha::ChaCha8Rng::seed_from_u64(opts.seed);
    let n = pts.len();
    // Kåsa's normal equations are sums over points, so each point's terms are computed once
    // and a resample only adds up the drawn ones. Coordinates relative to the points' mean
    // keep the equations well conditioned.
    let (mx, my) = pts.iter().fold((0.0, 0.0), |a, p| (a.0 + p.0 / n as f64, a.1 + p.1 / n as f64));
    let terms: Vec<[f64; 6]> = pts
        .iter()
        .map(|p| {
            let (x, y) = (p.0 - mx, p.1 - my);
            let q = -(x * x + y * y);
            [x * x, x * y, y * y, x, y, q]
        })
        .collect();
    let (mut ds, mut hs) = (Vec::with_capacity(opts.bootstrap_resamples), Vec::with_capacity(opts.bootstrap_resamples));
    let mut z = Vec::with_capacity(n);
    for _ in 0..opts.bootstrap_resamples {
        z.clear();
        // Sums of x^2, xy, y^2, x, y, count and of q, qx, qy with q = -(x^2 + y^2).
        let mut m = [0.0f64; 6];
        let (mut bq, mut bx, mut by) = (0.0, 0.0, 0.0);
        for _ in 0..n {
            // Multiply-shift draw of an index (Lemire 2019, ACM TOMACS 29:3): its bias, below
            // n / 2^32, is nothing against 50 resamples.
            let j = ((rng.next_u32() as u64 * n as u64) >> 32) as usize;
            let t = &terms[j];
            for (a, v) in m.iter_mut().zip(t) {
                *a += v;
            }
            bx += t[3] * t[5];
            by += t[4] * t[5];
            bq += t[5];
            z.push(crest_z[j]);
        }
        // Solve [[Sxx Sxy Sx] [Sxy Syy Sy] [Sx Sy n]] (D E F)' = (Sxq Syq Sq)' (Cramer's rule).
        let (sxx, sxy, syy, sx, sy, cnt) = (m[0], m[1], m[2], m[3], m[4], n as f64);
        let det = sxx * (syy * cnt - sy * sy) - sxy * (sxy * cnt - sy * sx) + sx * (sxy * sy - syy * sx);
        if det.abs() > 1e-12 * (sxx * syy * cnt).abs() && det.is_finite() {
            let dd = (bx * (syy * cnt - sy * sy) - sxy * (by * cnt - sy * bq) + sx * (by * sy - syy * bq)) / det;
            let ee = (sxx * (by * cnt - sy * bq) - bx * (sxy * cnt - sy * sx) + sx * (sxy * bq - by * sx)) / det;
            let ff = (sxx * (syy * bq - by * sy) - sxy * (sxy * bq - by * sx) + bx * (sxy * sy - syy * sx)) / det;
            let r2 = 0.25 * (dd * dd + ee * ee) - ff;
            if r2 > 0.0 && r2.is_finite() {
                ds.push(2.0 * r2.sqrt());
            }
        }
        hs.push(stats::median(&mut z) - floor_level);
    }
    (stats::sd(&ds), stats::sd(&hs))
}

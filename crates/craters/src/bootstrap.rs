//! Uncertainties of a measured crater by the bootstrap over azimuths (Efron 1979, "Bootstrap
//! methods: another look at the jackknife", Ann. Statist. 7:1): the rim-crest points are
//! resampled with replacement, not the profiles, so a resample costs a few sums.

use crate::measure::MeasureOptions;
use crate::stats;
use rand::{RngCore, SeedableRng};

/// Bootstrap over azimuths (Efron 1979, Ann. Statist. 7:1): resample the rim-crest points with
/// replacement, refit the circle (Kåsa) and the rim median, and report the standard deviations
/// of the diameter and the depth. Seeded, so the output is reproducible.
pub fn spreads(
    pts: &[(f64, f64)],
    crest_z: &[f64],
    floor_level: f64,
    opts: &MeasureOptions,
) -> (f64, f64) {
    if opts.bootstrap_resamples < 2 || pts.len() < 3 {
        return (0.0, 0.0);
    }
    let mut rng = rand_chacha::ChaCha8Rng::seed_from_u64(opts.seed);
    let n = pts.len();
    // Kåsa's normal equations are sums over points, so each point's terms are computed once
    // and a resample only adds up the drawn ones. Coordinates relative to the points' mean
    // keep the equations well conditioned.
    let (mx, my) = pts.iter().fold((0.0, 0.0), |a, p| {
        (a.0 + p.0 / n as f64, a.1 + p.1 / n as f64)
    });
    let terms: Vec<[f64; 8]> = pts
        .iter()
        .map(|p| {
            let (x, y) = (p.0 - mx, p.1 - my);
            let q = -(x * x + y * y);
            [x * x, x * y, y * y, x, y, q, x * q, y * q]
        })
        .collect();
    let (mut ds, mut hs) = (
        Vec::with_capacity(opts.bootstrap_resamples),
        Vec::with_capacity(opts.bootstrap_resamples),
    );
    // A resample's median height is read off how often each point was drawn, walking the
    // points in height order (sorted once), instead of selecting among the drawn heights:
    // the same order statistic, so the same value. Not with NaN heights, whose place in
    // `stats::median` this would not copy.
    let by_height = crest_z.len() == n && crest_z.iter().all(|z| !z.is_nan());
    let mut order: Vec<usize> = (0..n).collect();
    if by_height {
        order.sort_by(|&a, &b| crest_z[a].total_cmp(&crest_z[b]));
    }
    let mut drawn = vec![0u32; n];
    let mut picks = Vec::with_capacity(n);
    let mut z = Vec::with_capacity(n);
    for _ in 0..opts.bootstrap_resamples {
        z.clear();
        drawn.fill(0);
        // Multiply-shift draw of an index (Lemire 2019, ACM TOMACS 29:3): its bias, below
        // n / 2^32, is nothing against 50 resamples.
        picks.clear();
        picks.extend((0..n).map(|_| ((rng.next_u32() as u64 * n as u64) >> 32) as usize));
        let [sxx, sxy, syy, sx, sy, bq, bx, by] = drawn_sums(&terms, &picks);
        if by_height {
            for &j in &picks {
                drawn[j] += 1;
            }
        } else {
            z.extend(picks.iter().map(|&j| crest_z[j]));
        }
        // Solve [[Sxx Sxy Sx] [Sxy Syy Sy] [Sx Sy n]] (D E F)' = (Sxq Syq Sq)' (Cramer's rule).
        let cnt = n as f64;
        let det =
            sxx * (syy * cnt - sy * sy) - sxy * (sxy * cnt - sy * sx) + sx * (sxy * sy - syy * sx);
        if det.abs() > 1e-12 * (sxx * syy * cnt).abs() && det.is_finite() {
            let dd = (bx * (syy * cnt - sy * sy) - sxy * (by * cnt - sy * bq)
                + sx * (by * sy - syy * bq))
                / det;
            let ee = (sxx * (by * cnt - sy * bq) - bx * (sxy * cnt - sy * sx)
                + sx * (sxy * bq - by * sx))
                / det;
            let ff = (sxx * (syy * bq - by * sy) - sxy * (sxy * bq - by * sx)
                + bx * (sxy * sy - syy * sx))
                / det;
            let r2 = 0.25 * (dd * dd + ee * ee) - ff;
            if r2 > 0.0 && r2.is_finite() {
                ds.push(2.0 * r2.sqrt());
            }
        }
        let median = if by_height {
            median_of_draws(crest_z, &order, &drawn)
        } else {
            stats::median(&mut z)
        };
        hs.push(median - floor_level);
    }
    (stats::sd(&ds), stats::sd(&hs))
}

/// Median (as [`stats::median`]: type 7, the mean of the middle two for an even count) of the
/// multiset holding `values[j]` `drawn[j]` times, `order` listing the indices by height.
fn median_of_draws(values: &[f64], order: &[usize], drawn: &[u32]) -> f64 {
    let total: u32 = drawn.iter().sum();
    if total == 0 {
        return f64::NAN;
    }
    let h = (total - 1) as f64 * 0.5;
    let (i, f) = (h.floor() as u32, h - h.floor());
    // The i-th and (i+1)-th smallest (0-based) of the multiset.
    let (mut lo, mut hi, mut seen) = (f64::NAN, f64::NAN, 0u32);
    for &j in order {
        let before = seen;
        seen += drawn[j];
        if before <= i && i < seen {
            lo = values[j];
        }
        if before <= i + 1 && i + 1 < seen {
            hi = values[j];
            break;
        }
    }
    if f > 0.0 && i + 1 < total {
        lo + f * (hi - lo)
    } else {
        lo
    }
}

/// Sums over the drawn points of x^2, xy, y^2, x, y, q, qx, qy with q = -(x^2 + y^2), each
/// added up in draw order. A function of its own, called once per resample, so its eight
/// running sums stay in registers (inside the resampling loop they were kept in memory).
#[inline(never)]
fn drawn_sums(terms: &[[f64; 8]], picks: &[usize]) -> [f64; 8] {
    let mut s = [0.0f64; 8];
    for t in picks.iter().filter_map(|&j| terms.get(j)) {
        for (a, v) in s.iter_mut().zip(t) {
            *a += v;
        }
    }
    s
}

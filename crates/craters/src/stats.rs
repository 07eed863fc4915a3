//! Small order statistics used across the crate.

/// Median of a slice (reordered in place); NaN when empty.
pub fn median(v: &mut [f64]) -> f64 {
    quantile(v, 0.5)
}

/// Linear-interpolated quantile q in [0, 1] (type 7 of Hyndman and Fan 1996, Am. Stat.
/// 50:361, the default of R and NumPy); NaN when empty.
pub fn quantile(v: &mut [f64], q: f64) -> f64 {
    quantile_by(v, q, f64::total_cmp)
}

/// [`median`] of single-precision values, computed as of their double-precision copies.
pub fn median_f32(v: &mut [f32]) -> f64 {
    quantile_by(v, 0.5, f32::total_cmp)
}

fn quantile_by<T: Copy + Into<f64>>(
    v: &mut [T],
    q: f64,
    cmp: fn(&T, &T) -> std::cmp::Ordering,
) -> f64 {
    if v.is_empty() {
        return f64::NAN;
    }
    let h = (v.len() - 1) as f64 * q.clamp(0.0, 1.0);
    let (i, f) = (h.floor() as usize, h - h.floor());
    // Selection rather than a full sort: this runs hundreds of times per crater.
    let (_, lo, rest) = v.select_nth_unstable_by(i, cmp);
    let lo: f64 = (*lo).into();
    if f > 0.0 && !rest.is_empty() {
        let hi = rest.iter().map(|&x| x.into()).fold(f64::INFINITY, f64::min);
        lo + f * (hi - lo)
    } else {
        lo
    }
}

/// Sample standard deviation; 0 with fewer than two values.
pub fn sd(v: &[f64]) -> f64 {
    if v.len() < 2 {
        return 0.0;
    }
    let m = v.iter().sum::<f64>() / v.len() as f64;
    (v.iter().map(|x| (x - m).powi(2)).sum::<f64>() / (v.len() - 1) as f64).sqrt()
}

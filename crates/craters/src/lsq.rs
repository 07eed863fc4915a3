//! Linear least squares through the normal equations, for the small (3 or 4 parameter)
//! surface fits of the measurement, solved by Gaussian elimination with partial pivoting.
//! Callers centre their coordinates first, which keeps the normal equations well conditioned.

/// Fit coefficients c minimising sum (c . f_i - z_i)^2 over rows (f_i, z_i). `None` when the
/// rows do not determine the coefficients.
pub fn fit_linear<const N: usize>(rows: impl Iterator<Item = ([f64; N], f64)>) -> Option<[f64; N]> {
    let mut m = [[0.0f64; N]; N];
    let mut b = [0.0f64; N];
    let mut n = 0usize;
    for (f, z) in rows {
        // The upper triangle only: f[i] f[j] and f[j] f[i] are the same product, so the
        // mirrored sums below are exactly the ones the lower triangle would have summed.
        for i in 0..N {
            for j in i..N {
                m[i][j] += f[i] * f[j];
            }
            b[i] += f[i] * z;
        }
        n += 1;
    }
    for (i, j) in (0..N).flat_map(|i| (0..i).map(move |j| (i, j))) {
        m[i][j] = m[j][i];
    }
    if n < N {
        return None;
    }
    let scale = (0..N).map(|i| m[i][i].abs()).fold(0.0, f64::max);
    for col in 0..N {
        let piv = (col..N).max_by(|&a, &b2| m[a][col].abs().total_cmp(&m[b2][col].abs()))?;
        if m[piv][col].abs() <= 1e-13 * scale || !m[piv][col].is_finite() {
            return None;
        }
        m.swap(col, piv);
        b.swap(col, piv);
        let pivot = m[col];
        for r in col + 1..N {
            let k = m[r][col] / pivot[col];
            for (x, p) in m[r][col..].iter_mut().zip(&pivot[col..]) {
                *x -= k * p;
            }
            b[r] -= k * b[col];
        }
    }
    let mut x = [0.0f64; N];
    for i in (0..N).rev() {
        let s: f64 = (i + 1..N).map(|j| m[i][j] * x[j]).sum();
        x[i] = (b[i] - s) / m[i][i];
    }
    x.iter().all(|v| v.is_finite()).then_some(x)
}

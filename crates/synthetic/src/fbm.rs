//! Self-affine background surface by spectral synthesis: fractional Brownian surface with
//! power spectrum P(k) ~ k^-(2H+2), made by filtering Gaussian white noise in the Fourier
//! domain with the amplitude k^-(H+1) (the Fourier filtering method; Voss 1985, "Random
//! fractal forgeries", in Fundamental Algorithms for Computer Graphics, Springer; Saupe 1988,
//! "Algorithms for random fractals", ch. 2 of The Science of Fractal Images, Springer,
//! algorithm SpectralSynthesisFM2D).
//!
//! The FFT uses rustfft's scalar planner on purpose: its SIMD planners choose code paths by
//! CPU feature at run time, which may round differently, and the committed demo files must be
//! reproducible on any machine.

use rand::Rng;
use rand_distr::StandardNormal;
use rayon::prelude::*;
use rustfft::num_complex::Complex;
use rustfft::{Fft, FftPlannerScalar};
use std::sync::Arc;

/// A `width` x `height` fBm surface (row-major), scaled so that the RMS height difference
/// between posts `lag_m` apart (along rows and columns) is `rms_at_lag_m`. The surface is
/// synthesised on a square power-of-two grid that covers the raster and cropped, so it is
/// periodic only on that larger grid.
pub fn fbm_surface(
    width: usize,
    height: usize,
    post_m: f64,
    hurst: f64,
    lag_m: f64,
    rms_at_lag_m: f64,
    rng: &mut impl Rng,
) -> Vec<f64> {
    let n = width.max(height).max(2).next_power_of_two();
    let mut grid: Vec<Complex<f64>> = (0..n * n)
        .map(|_| Complex::new(rng.sample::<f64, _>(StandardNormal), 0.0))
        .collect();
    let mut planner = FftPlannerScalar::<f64>::new();
    let forward = planner.plan_fft_forward(n);
    let inverse = planner.plan_fft_inverse(n);
    fft_2d(&mut grid, n, &forward);
    let spectral_exponent = -(hurst + 1.0);
    grid.par_chunks_mut(n).enumerate().for_each(|(i, row)| {
        let ki = wavenumber(i, n);
        for (j, v) in row.iter_mut().enumerate() {
            let kj = wavenumber(j, n);
            let k2 = ki * ki + kj * kj;
            // The mean level is set by the caller, not by the noise.
            *v = if k2 == 0.0 {
                Complex::new(0.0, 0.0)
            } else {
                *v * k2.powf(0.5 * spectral_exponent)
            };
        }
    });
    fft_2d(&mut grid, n, &inverse);
    let mut out = Vec::with_capacity(width * height);
    for r in 0..height {
        out.extend(grid[r * n..r * n + width].iter().map(|c| c.re));
    }
    drop(grid);
    let lag_px =
        ((lag_m / post_m).round() as usize).clamp(1, width.min(height).saturating_sub(1).max(1));
    let rms = rms_difference_at_lag(&out, width, height, lag_px);
    let scale = if rms > 0.0 { rms_at_lag_m / rms } else { 0.0 };
    out.iter_mut().for_each(|v| *v *= scale);
    out
}

/// Signed integer frequency of FFT bin `i` on an `n`-point grid.
fn wavenumber(i: usize, n: usize) -> f64 {
    if i <= n / 2 {
        i as f64
    } else {
        i as f64 - n as f64
    }
}

/// In-place 2-D FFT of an `n` x `n` row-major grid: rows, transpose, rows, transpose.
fn fft_2d(grid: &mut Vec<Complex<f64>>, n: usize, fft: &Arc<dyn Fft<f64>>) {
    fft_rows(grid, n, fft);
    let mut t = transpose(grid, n);
    fft_rows(&mut t, n, fft);
    *grid = transpose(&t, n);
}

fn fft_rows(grid: &mut [Complex<f64>], n: usize, fft: &Arc<dyn Fft<f64>>) {
    // Batches of rows share one scratch buffer; each row's result does not depend on the batching.
    let rows_per_batch = 32.min(n);
    grid.par_chunks_mut(n * rows_per_batch).for_each(|batch| {
        let mut scratch = vec![Complex::new(0.0, 0.0); fft.get_inplace_scratch_len()];
        fft.process_with_scratch(batch, &mut scratch);
    });
}

fn transpose(src: &[Complex<f64>], n: usize) -> Vec<Complex<f64>> {
    let mut dst = vec![Complex::new(0.0, 0.0); n * n];
    const B: usize = 32;
    dst.par_chunks_mut(n * B.min(n))
        .enumerate()
        .for_each(|(bi, band)| {
            let r0 = bi * B.min(n);
            let rows = band.len() / n;
            for c0 in (0..n).step_by(B) {
                for r in 0..rows {
                    for c in c0..(c0 + B).min(n) {
                        band[r * n + c] = src[c * n + r0 + r];
                    }
                }
            }
        });
    dst
}

/// RMS of height differences between posts `lag_px` apart along rows and along columns,
/// summed in a fixed order so the result does not depend on thread scheduling.
pub fn rms_difference_at_lag(z: &[f64], width: usize, height: usize, lag_px: usize) -> f64 {
    let (mut sum, mut count) = (0.0f64, 0usize);
    for r in 0..height {
        for c in 0..width {
            let v = z[r * width + c];
            if c + lag_px < width {
                let d = z[r * width + c + lag_px] - v;
                sum += d * d;
                count += 1;
            }
            if r + lag_px < height {
                let d = z[(r + lag_px) * width + c] - v;
                sum += d * d;
                count += 1;
            }
        }
    }
    if count == 0 {
        0.0
    } else {
        (sum / count as f64).sqrt()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use rand::SeedableRng;

    /// For fBm the RMS difference grows as lag^H (Saupe 1988, eq. 1.7 "the increments have
    /// variance proportional to |t|^2H"): recover H from two lags.
    #[test]
    fn structure_function_slope_matches_hurst_saupe_1988() {
        let mut rng = rand_chacha::ChaCha8Rng::seed_from_u64(7);
        let (w, h, hurst) = (256, 256, 0.85);
        let z = fbm_surface(w, h, 30.0, hurst, 1000.0, 20.0, &mut rng);
        let (a, b) = (2, 16);
        let (ra, rb) = (
            rms_difference_at_lag(&z, w, h, a),
            rms_difference_at_lag(&z, w, h, b),
        );
        let fitted = (rb / ra).ln() / (b as f64 / a as f64).ln();
        assert!((fitted - hurst).abs() < 0.1, "fitted H {fitted}");
        let at_lag = rms_difference_at_lag(&z, w, h, 33);
        assert!((at_lag - 20.0).abs() < 1e-6, "scaled RMS {at_lag}");
    }
}

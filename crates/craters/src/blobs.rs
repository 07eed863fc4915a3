//! Bowl-shaped blobs: the scale-normalised Laplacian of Gaussian, sigma^2 times the Laplacian
//! of the heights smoothed by a Gaussian of scale sigma, maximised over position and scale
//! (blob detection with automatic scale selection: Lindeberg 1998, "Feature detection with
//! automatic scale selection", Int. J. Comput. Vision 30:79-116). A bowl is a dark blob: its
//! Laplacian is positive inside. Unlike a closed depression the response needs no rim that
//! holds water, and unlike slope voting it needs no wall steeper than the level's typical
//! slope, so a broad shallow bowl whose rim has diffused away (a degraded crater) still shows.
//!
//! For a paraboloid bowl of depth d and radius R on flat ground, the response at its centre is
//! the Gaussian-weighted mean of the bowl's Laplacian (4 d / R^2 inside) and of its rim kink
//! (a ring of -2 d / R): with u = 2 sigma^2 / R^2 it is 2 d (u (1 - e^(-1/u)) - e^(-1/u)),
//! largest, about 0.6 d, near u = 0.55, sigma = 0.52 R: the diameter is [`DIAMETER_PER_SIGMA`]
//! sigma (our derivation, checked by the analytic test below).

use rayon::prelude::*;

/// Diameter of a paraboloid bowl over the scale at which it responds most (module notes).
pub const DIAMETER_PER_SIGMA: f64 = 3.85;

/// A blob: cell position, its scale in cells and its response (height units).
#[derive(Clone, Copy, Debug)]
pub struct Blob {
    pub i: usize,
    pub j: usize,
    pub sigma_cells: f64,
    pub response: f64,
}

/// Buffers for [`Smoother::smooth`], reused from scale to scale (fresh ones per scale had the
/// kernel zero their pages again each time).
#[derive(Default)]
struct Smoother {
    pass_out: Vec<f32>,
    flipped: Vec<f32>,
}

impl Smoother {
    /// Gaussian smoothing (separable, kernel out to 3 sigma), renormalised over the taps inside
    /// the grid and over valid (non-NaN) cells, so edges and holes do not pull heights to zero.
    fn smooth(&mut self, z: &[f32], w: usize, h: usize, sigma: f64) -> &[f32] {
        let rad = (3.0 * sigma).ceil() as usize;
        let k: Vec<f64> = (0..=2 * rad)
            .map(|t| {
                let x = t as f64 - rad as f64;
                (-(x * x) / (2.0 * sigma * sigma)).exp()
            })
            .collect();
        // Along rows of a w x h array; the caller transposes for the other axis.
        let pass = |src: &[f32], out: &mut Vec<f32>, w: usize, h: usize| {
            out.resize(w * h, 0.0);
            out.par_chunks_mut(w)
                .zip(src.par_chunks(w))
                .for_each(|(o, s)| {
                    for (i, v) in o.iter_mut().enumerate() {
                        let (mut sum, mut wt) = (0.0, 0.0);
                        let lo = i.saturating_sub(rad);
                        let hi = (i + rad).min(w - 1);
                        for (x, &sv) in s.iter().enumerate().take(hi + 1).skip(lo) {
                            if !sv.is_nan() {
                                let kv = k[x + rad - i];
                                sum += kv * sv as f64;
                                wt += kv;
                            }
                        }
                        *v = if wt > 0.0 {
                            (sum / wt) as f32
                        } else {
                            f32::NAN
                        };
                    }
                });
        };
        let transpose = |src: &[f32], t: &mut Vec<f32>, w: usize, h: usize| {
            t.resize(w * h, 0.0);
            for j in 0..h {
                for i in 0..w {
                    t[i * h + j] = src[j * w + i];
                }
            }
        };
        let (out, flipped) = (&mut self.pass_out, &mut self.flipped);
        pass(&z[..w * h], out, w, h);
        transpose(out, flipped, w, h);
        pass(flipped, out, h, w);
        transpose(out, flipped, h, w);
        flipped
    }
}

/// Blobs of the grid `z` (w x h cells) at the scales `sigmas` (cells, ascending): cells where
/// the scale-normalised response, maximised over the scales, peaks at a scale strictly inside
/// the list (the first and last scales only bound the search: a response still rising at the
/// end belongs to a larger feature, such as the curved floor of a bigger crater), is a maximum
/// of its neighbourhood (one sigma around) and at least `min_ratio` times the diameter the
/// scale stands for
/// ([`DIAMETER_PER_SIGMA`] sigma cells of `cell`, in the units of the heights).
/// Cells within 3 sigma of the grid edge or on missing data are left out.
pub fn find(z: &[f32], w: usize, h: usize, sigmas: &[f64], cell: f64, min_ratio: f64) -> Vec<Blob> {
    if w < 3 || h < 3 || z.len() < w * h || sigmas.is_empty() {
        return Vec::new();
    }
    let mut best = vec![f32::NEG_INFINITY; w * h];
    let mut best_s = vec![0usize; w * h];
    let mut smoother = Smoother::default();
    for (si, &s) in sigmas.iter().enumerate() {
        let l = smoother.smooth(z, w, h, s);
        let norm = (s * s) as f32;
        // The Laplacian reads one cell either side: keep its cells clear of the edge band where
        // the smoothing kernel is cut.
        let margin = (3.0 * s).ceil() as usize + 1;
        for j in margin.max(1)..h.saturating_sub(margin.max(1)) {
            for i in margin.max(1)..w.saturating_sub(margin.max(1)) {
                let o = j * w + i;
                let lap = l[o - 1] + l[o + 1] + l[o - w] + l[o + w] - 4.0 * l[o];
                if z[o].is_nan() || !lap.is_finite() {
                    continue;
                }
                let v = norm * lap;
                if v > best[o] {
                    best[o] = v;
                    best_s[o] = si;
                }
            }
        }
    }
    let mut out = Vec::new();
    for j in 1..h - 1 {
        for i in 1..w - 1 {
            let o = j * w + i;
            let (v, si) = (best[o], best_s[o]);
            if !(v.is_finite() && v > 0.0) || si == 0 || si + 1 == sigmas.len() {
                continue;
            }
            let s = sigmas[si];
            let d = DIAMETER_PER_SIGMA * s * cell;
            if (v as f64) < min_ratio * d {
                continue;
            }
            let r = (s.round() as usize).max(1);
            let (j0, j1, i0, i1) = (
                j.saturating_sub(r),
                (j + r).min(h - 1),
                i.saturating_sub(r),
                (i + r).min(w - 1),
            );
            // Ties go to the first cell in row-major order, so a flat plateau yields one blob.
            let is_max = (j0..=j1).all(|jj| {
                (i0..=i1).all(|ii| {
                    let q = jj * w + ii;
                    q == o || best[q] < v || (best[q] == v && q > o)
                })
            });
            if is_max {
                out.push(Blob {
                    i,
                    j,
                    sigma_cells: s,
                    response: v as f64,
                });
            }
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A paraboloid bowl of depth d and radius R cells on flat ground.
    fn bowl(w: usize, h: usize, ci: f64, cj: f64, r: f64, d: f64) -> Vec<f32> {
        (0..w * h)
            .map(|k| {
                let (i, j) = ((k % w) as f64, (k / w) as f64);
                let rho = (i - ci).hypot(j - cj) / r;
                if rho < 1.0 {
                    (d * (rho * rho - 1.0)) as f32
                } else {
                    0.0
                }
            })
            .collect()
    }

    #[test]
    fn paraboloid_bowl_peaks_at_its_centre_at_the_derived_scale_and_height() {
        // Lindeberg 1998: a blob's scale-normalised Laplacian peaks at a scale proportional to
        // its size; for this bowl, sigma = 2R / DIAMETER_PER_SIGMA and about 0.6 d (the
        // derivation in the module notes; the discrete grid adds a few per cent).
        let (w, h, r, d) = (64, 64, 8.0, 4.0);
        let z = bowl(w, h, 31.0, 33.0, r, d);
        let sigmas: Vec<f64> = (0..9).map(|k| 3.0 * 2f64.powf(k as f64 / 8.0)).collect();
        let blobs = find(&z, w, h, &sigmas, 1.0, 0.001);
        let top = blobs
            .iter()
            .max_by(|a, b| a.response.total_cmp(&b.response))
            .expect("a blob");
        assert_eq!((top.i, top.j), (31, 33));
        assert!(
            (top.sigma_cells * DIAMETER_PER_SIGMA / (2.0 * r) - 1.0).abs() < 0.1,
            "sigma {}",
            top.sigma_cells
        );
        assert!(
            (top.response / (0.6 * d) - 1.0).abs() < 0.1,
            "response {}",
            top.response
        );
    }

    #[test]
    fn flat_and_tilted_ground_give_no_blob() {
        let (w, h) = (40, 30);
        let z: Vec<f32> = (0..w * h)
            .map(|k| 0.3 * (k % w) as f32 - 0.1 * (k / w) as f32)
            .collect();
        assert!(find(&z, w, h, &[2.0, 3.0], 1.0, 0.001).is_empty());
        let nan = vec![f32::NAN; w * h];
        assert!(find(&nan, w, h, &[2.0], 1.0, 0.001).is_empty());
    }
}

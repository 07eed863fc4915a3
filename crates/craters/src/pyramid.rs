//! Scale levels for detection: the window resampled onto square ground cells that double in
//! size from level to level, so a crater of any size spans a similar number of cells at its
//! level and the detection cost stays bounded (the image-pyramid idea of Burt and Adelson
//! 1983, IEEE Trans. Commun. 31:532).
//!
//! Cells are square on the ground (metres), not in map pixels: on a cylindrical grid away from
//! the equator a crater is stretched east-west in pixels, and circular voting needs it round.
//! Each cell averages a few bilinear samples inside its footprint.

use terrain::ElevationGrid;

/// One level: heights on square cells of `cell_m`, and the map back to window pixels.
#[derive(Clone, Debug)]
pub struct Level {
    pub width: usize,
    pub height: usize,
    pub cell_m: f64,
    /// Window pixels per cell along columns and rows.
    pub sx: f64,
    pub sy: f64,
    pub z: Vec<f32>,
}

impl Level {
    /// Window pixel position (pixel-centre convention) of the centre of cell (i, j) (fractional).
    pub fn to_window(&self, i: f64, j: f64) -> (f64, f64) {
        ((i + 0.5) * self.sx - 0.5, (j + 0.5) * self.sy - 0.5)
    }
}

/// Ground pixel size (east-west, north-south) at the window centre.
pub fn window_pixel_size_m(grid: &ElevationGrid) -> Option<(f64, f64)> {
    let c = grid.col0 as f64 + grid.width as f64 / 2.0;
    let r = grid.row0 as f64 + grid.height as f64 / 2.0;
    grid.geometry.pixel_size_m_at(c, r).filter(|p| p.0 > 0.0 && p.1 > 0.0 && p.0.is_finite() && p.1.is_finite())
}

/// Resample the window onto square cells of `cell_m`. A cell with no valid sample is NaN.
pub fn build(grid: &ElevationGrid, px_m: (f64, f64), cell_m: f64) -> Level {
    let (sx, sy) = (cell_m / px_m.0, cell_m / px_m.1);
    let width = ((grid.width as f64 / sx).floor() as usize).max(1);
    let height = ((grid.height as f64 / sy).floor() as usize).max(1);
    let (mx, my) = ((sx.round() as usize).clamp(1, 4), (sy.round() as usize).clamp(1, 4));
    let mut z = vec![f32::NAN; width * height];
    use rayon::prelude::*;
    z.par_chunks_mut(width).enumerate().for_each(|(j, row)| {
        for (i, v) in row.iter_mut().enumerate() {
            let (mut sum, mut n) = (0.0, 0);
            for b in 0..my {
                for a in 0..mx {
                    let c = (i as f64 + (a as f64 + 0.5) / mx as f64) * sx - 0.5;
                    let r = (j as f64 + (b as f64 + 0.5) / my as f64) * sy - 0.5;
                    let c = c.clamp(0.0, grid.width as f64 - 1.0);
                    let r = r.clamp(0.0, grid.height as f64 - 1.0);
                    if let Some(h) = grid.sample(c, r) {
                        sum += h;
                        n += 1;
                    }
                }
            }
            if n > 0 {
                *v = (sum / n as f64) as f32;
            }
        }
    });
    Level { width, height, cell_m, sx, sy, z }
}

/// Box mean over a (2k+1)^2 neighbourhood ignoring NaN (summed-area table), for removing
/// the large-scale relief before looking for closed depressions.
pub fn box_mean(z: &[f32], w: usize, h: usize, k: usize) -> Vec<f32> {
    let (w1, h1) = (w + 1, h + 1);
    let mut s = vec![0.0f64; w1 * h1];
    let mut n = vec![0u32; w1 * h1];
    for j in 0..h {
        for i in 0..w {
            let v = z[j * w + i];
            let (add, cnt) = if v.is_nan() { (0.0, 0) } else { (v as f64, 1) };
            let o = (j + 1) * w1 + i + 1;
            s[o] = add + s[o - 1] + s[o - w1] - s[o - w1 - 1];
            n[o] = cnt + n[o - 1] + n[o - w1] - n[o - w1 - 1];
        }
    }
    let mut out = vec![f32::NAN; w * h];
    for j in 0..h {
        let (j0, j1) = (j.saturating_sub(k), (j + k + 1).min(h));
        for i in 0..w {
            let (i0, i1) = (i.saturating_sub(k), (i + k + 1).min(w));
            let sum = s[j1 * w1 + i1] - s[j0 * w1 + i1] - s[j1 * w1 + i0] + s[j0 * w1 + i0];
            let cnt = n[j1 * w1 + i1] + n[j0 * w1 + i0] - n[j0 * w1 + i1] - n[j1 * w1 + i0];
            if cnt > 0 {
                out[j * w + i] = (sum / cnt as f64) as f32;
            }
        }
    }
    out
}

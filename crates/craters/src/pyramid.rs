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
    grid.geometry
        .pixel_size_m_at(c, r)
        .filter(|p| p.0 > 0.0 && p.1 > 0.0 && p.0.is_finite() && p.1.is_finite())
}

/// One sub-sample position along an axis: the window pixels either side and the fraction.
#[derive(Clone, Copy)]
struct Tap {
    lo: usize,
    hi: usize,
    f: f64,
}

/// Resample the window onto square cells of `cell_m`. A cell with no valid sample is NaN.
pub fn build(grid: &ElevationGrid, px_m: (f64, f64), cell_m: f64) -> Level {
    let (sx, sy) = (cell_m / px_m.0, cell_m / px_m.1);
    let width = ((grid.width as f64 / sx).floor() as usize).max(1);
    let height = ((grid.height as f64 / sy).floor() as usize).max(1);
    let (mx, my) = (
        (sx.round() as usize).clamp(1, 4),
        (sy.round() as usize).clamp(1, 4),
    );
    // Where each sub-sample falls, worked out once per column and once per row rather than
    // per cell: its two neighbouring window pixels and the fraction between them. The sums
    // below are `ElevationGrid::sample`'s bilinear formula, term for term, so the level is the
    // same to the bit as sampling each point through it.
    let axis = |n: usize, m: usize, s: f64, len: usize| -> Vec<Tap> {
        let mut taps = Vec::with_capacity(n * m);
        for i in 0..n {
            for a in 0..m {
                let x = ((i as f64 + (a as f64 + 0.5) / m as f64) * s - 0.5)
                    .clamp(0.0, len as f64 - 1.0);
                let x0 = x.floor() as usize;
                let f = x - x0 as f64;
                taps.push(Tap {
                    lo: x0,
                    hi: if f > 0.0 { x0 + 1 } else { x0 },
                    f,
                });
            }
        }
        taps
    };
    let cols = axis(width, mx, sx, grid.width);
    let rows = axis(height, my, sy, grid.height);
    let (hm, gw) = (&grid.heights_m[..], grid.width);
    let mut z = vec![f32::NAN; width * height];
    use rayon::prelude::*;
    z.par_chunks_mut(width).enumerate().for_each(|(j, row)| {
        let row_taps = &rows[j * my..(j + 1) * my];
        for (i, v) in row.iter_mut().enumerate() {
            let (mut sum, mut n) = (0.0, 0);
            for rt in row_taps {
                let (top, bottom) = (
                    &hm[rt.lo * gw..rt.lo * gw + gw],
                    &hm[rt.hi * gw..rt.hi * gw + gw],
                );
                let fr = rt.f;
                for ct in &cols[i * mx..(i + 1) * mx] {
                    let (h00, h10, h01, h11) =
                        (top[ct.lo], top[ct.hi], bottom[ct.lo], bottom[ct.hi]);
                    if h00.is_nan() || h10.is_nan() || h01.is_nan() || h11.is_nan() {
                        continue;
                    }
                    let (h00, h10, h01, h11) = (h00 as f64, h10 as f64, h01 as f64, h11 as f64);
                    let fc = ct.f;
                    sum += h00 * (1.0 - fc) * (1.0 - fr)
                        + h10 * fc * (1.0 - fr)
                        + h01 * (1.0 - fc) * fr
                        + h11 * fc * fr;
                    n += 1;
                }
            }
            if n > 0 {
                *v = (sum / n as f64) as f32;
            }
        }
    });
    Level {
        width,
        height,
        cell_m,
        sx,
        sy,
        z,
    }
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

#[cfg(test)]
mod tests {
    use super::*;
    use std::sync::Arc;
    use terrain::GridGeometry;

    /// The level sampled point by point through `ElevationGrid::sample`, as `build` once did.
    fn build_by_sampling(grid: &ElevationGrid, px_m: (f64, f64), cell_m: f64) -> Vec<f32> {
        let (sx, sy) = (cell_m / px_m.0, cell_m / px_m.1);
        let width = ((grid.width as f64 / sx).floor() as usize).max(1);
        let height = ((grid.height as f64 / sy).floor() as usize).max(1);
        let (mx, my) = (
            (sx.round() as usize).clamp(1, 4),
            (sy.round() as usize).clamp(1, 4),
        );
        let mut z = vec![f32::NAN; width * height];
        for j in 0..height {
            for i in 0..width {
                let (mut sum, mut n) = (0.0, 0);
                for b in 0..my {
                    for a in 0..mx {
                        let c = ((i as f64 + (a as f64 + 0.5) / mx as f64) * sx - 0.5)
                            .clamp(0.0, grid.width as f64 - 1.0);
                        let r = ((j as f64 + (b as f64 + 0.5) / my as f64) * sy - 0.5)
                            .clamp(0.0, grid.height as f64 - 1.0);
                        if let Some(h) = grid.sample(c, r) {
                            sum += h;
                            n += 1;
                        }
                    }
                }
                if n > 0 {
                    z[j * width + i] = (sum / n as f64) as f32;
                }
            }
        }
        z
    }

    #[test]
    fn levels_equal_sampling_each_point_bit_for_bit() {
        let (w, h) = (157, 113);
        // Uneven heights with holes, so that every branch (a NaN neighbour, an edge) is taken.
        let heights_m = (0..w * h)
            .map(|k| {
                let (i, j) = ((k % w) as f32, (k / w) as f32);
                if (i * 7.0 + j * 3.0) % 23.0 == 0.0 {
                    f32::NAN
                } else {
                    (i * 0.37).sin() * 80.0 + j * 1.3 + (i * j * 0.01).cos()
                }
            })
            .collect();
        let grid = ElevationGrid {
            geometry: Arc::new(GridGeometry::global_simple_cylindrical(
                terrain::MOON_RADIUS_M,
                4,
            )),
            col0: 0,
            row0: 0,
            width: w,
            height: h,
            heights_m,
        };
        for (px, cell) in [
            ((30.0, 30.0), 30.0),
            ((30.0, 30.0), 60.0),
            ((21.0, 30.0), 75.0),
            ((30.0, 30.0), 240.0),
            ((30.0, 17.0), 45.5),
        ] {
            let level = build(&grid, px, cell);
            let reference = build_by_sampling(&grid, px, cell);
            assert_eq!(level.z.len(), reference.len());
            for (a, b) in level.z.iter().zip(&reference) {
                assert!(
                    a.to_bits() == b.to_bits() || (a.is_nan() && b.is_nan()),
                    "cell {cell}: {a} != {b}"
                );
            }
        }
    }
}

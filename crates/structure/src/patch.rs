//! The terrain around one crater resampled onto a square lattice in the crater's local
//! azimuthal equidistant frame (x east, y north, metres), so that every later step is plain
//! arithmetic on metres.
//!
//! The exact frame-to-pixel map (Snyder 1987, Map Projections: A Working Manual, §25 inverse,
//! then the grid's own projection) costs several trigonometric calls per point. It is smooth,
//! so it is evaluated exactly on a coarse net of control nodes and interpolated bilinearly in
//! between, as the crater measurement does; over a crater-sized frame the error is far below
//! a pixel.

use terrain::{ElevationGrid, LocalFrame};

/// Control nodes per side of the frame-to-pixel net; 9 is ample for frames of a few km on a
/// body the size of the Moon (the map's curvature grows with the angle the frame spans).
fn control_nodes(extent_m: f64, body_radius_m: f64) -> usize {
    (9.0 + 150.0 * extent_m / body_radius_m).clamp(9.0, 65.0) as usize
}

/// Heights on a square lattice: node (i, j) sits at x = -half + i * cell, y = -half + j * cell.
#[derive(Clone, Debug)]
pub struct Patch {
    pub frame: LocalFrame,
    pub cell_m: f64,
    pub half_m: f64,
    pub n: usize,
    /// Row-major from the south-west corner, metres above the sphere, NaN where no data.
    pub heights_m: Vec<f64>,
}

impl Patch {
    /// Resample `grid` around (lon, lat) over the square of half-side `half_m` at `cell_m`.
    /// `None` when the projection cannot place the frame on the grid.
    pub fn build(
        grid: &ElevationGrid,
        lon_deg: f64,
        lat_deg: f64,
        half_m: f64,
        cell_m: f64,
    ) -> Option<Patch> {
        let geom = &grid.geometry;
        let frame = LocalFrame::new(geom.body_radius_m, lon_deg, lat_deg);
        let steps = (half_m / cell_m).ceil() as usize;
        let half_m = steps as f64 * cell_m;
        let n = 2 * steps + 1;
        // The net is kept in whole-raster pixel-centre coordinates and the window's origin is
        // taken off only after interpolating: for an origin at or after the raster's first
        // pixel that subtraction is exact, so any window holding the patch samples the very
        // same heights (a refit reading a small window per crater reproduces the survey's fit,
        // made on a whole tile, to the last bit).
        let to_raster = |x: f64, y: f64| -> Option<(f64, f64)> {
            let (lon, lat) = frame.to_lonlat(x, y);
            let (c, r) = geom.lonlat_to_pixel(lon, lat)?;
            Some((c - 0.5, r - 0.5))
        };
        let m = control_nodes(2.0 * half_m, geom.body_radius_m);
        let step = 2.0 * half_m / (m - 1) as f64;
        let mut nodes = Vec::with_capacity(m * m);
        for j in 0..m {
            for i in 0..m {
                let p = to_raster(-half_m + i as f64 * step, -half_m + j as f64 * step)?;
                if !(p.0.is_finite() && p.1.is_finite()) {
                    return None;
                }
                nodes.push(p);
            }
        }
        let heights_m = sample_lattice(grid, &nodes, m, n, cell_m / step);
        Some(Patch {
            frame,
            cell_m,
            half_m,
            n,
            heights_m,
        })
    }

    /// Lattice index (i, j) and position of node k.
    #[inline]
    pub fn node_xy(&self, i: usize, j: usize) -> (f64, f64) {
        (
            -self.half_m + i as f64 * self.cell_m,
            -self.half_m + j as f64 * self.cell_m,
        )
    }

    /// Bilinear height at local (x, y); NaN outside the lattice or next to missing data.
    pub fn sample(&self, x: f64, y: f64) -> f64 {
        let u = (x + self.half_m) / self.cell_m;
        let v = (y + self.half_m) / self.cell_m;
        let last = (self.n - 1) as f64;
        if !(u >= 0.0 && v >= 0.0 && u <= last && v <= last) {
            return f64::NAN;
        }
        // In 0..=last here: through u32, as ElevationGrid::sample.
        let (i, j) = (
            (u as u32 as usize).min(self.n - 2),
            (v as u32 as usize).min(self.n - 2),
        );
        let (s, t) = (u - i as f64, v - j as f64);
        let k = j * self.n + i;
        let h = &self.heights_m;
        h[k] * (1.0 - s) * (1.0 - t)
            + h[k + 1] * s * (1.0 - t)
            + h[k + self.n] * (1.0 - s) * t
            + h[k + self.n + 1] * s * t
    }
}

/// Heights of the `n` x `n` lattice whose node (i, j) lies at control-net coordinates
/// (i, j) * `per_step` on the `m` x `m` net `nodes` (whole-raster pixel positions): each row's
/// two bounding rows of the net blended once, then each node's position between two blended
/// control points, then the window's bilinear height there.
fn sample_lattice(
    grid: &ElevationGrid,
    nodes: &[(f64, f64)],
    m: usize,
    n: usize,
    per_step: f64,
) -> Vec<f64> {
    let (col0, row0) = (grid.col0 as f64, grid.row0 as f64);
    let mut heights_m = Vec::with_capacity(n * n);
    let mut blended = vec![(0.0, 0.0); m];
    // Every row splits its columns among the net's cells the same way: once for all rows.
    let columns: Vec<(usize, f64)> = (0..n).map(|i| split(i as f64 * per_step, m)).collect();
    for j in 0..n {
        let (jj, t) = split(j as f64 * per_step, m);
        let (lower, upper) = (
            &nodes[jj * m..(jj + 1) * m],
            &nodes[(jj + 1) * m..(jj + 2) * m],
        );
        for ((b, p0), p1) in blended.iter_mut().zip(lower).zip(upper) {
            *b = (p0.0 + t * (p1.0 - p0.0), p0.1 + t * (p1.1 - p0.1));
        }
        heights_m.extend(columns.iter().map(|&(ii, s)| {
            let (a, b) = (blended[ii], blended[ii + 1]);
            let (c, r) = (a.0 + s * (b.0 - a.0), a.1 + s * (b.1 - a.1));
            // Window pixel-centre convention, as ElevationGrid::sample expects.
            grid.sample(c - col0, r - row0).unwrap_or(f64::NAN)
        }));
    }
    heights_m
}

/// Control-net cell index and fraction for lattice coordinate `u` (in control steps).
#[inline]
fn split(u: f64, m: usize) -> (usize, f64) {
    let i = (u as u32 as usize).min(m - 2);
    (i, (u - i as f64).clamp(0.0, 1.0))
}

//! Landing on the floor: a hazard mask from the DEM (slope and an obstacle proxy at the post
//! scale) integrated against a circular Gaussian touchdown dispersion.
//!
//! The terrain round the crater is resampled onto a square lattice at the DEM's post spacing in
//! the crater's local azimuthal equidistant frame (`structure::patch`). A node is safe when
//! all its eight neighbours have data, its Horn slope (Horn 1981, Proc. IEEE 69:14) is at most
//! the limit and no neighbour departs from the plane of that slope by more than the roughness
//! limit (the obstacle proxy). Slope at the post spacing cannot see rocks or slopes smaller
//! than a post: a safe node is only "no hazard the DEM can show".
//!
//! The probability of a safe touchdown when aiming at a node is the dispersion's mass on safe
//! nodes: the safe mask convolved with the circular Gaussian of sigma = R / 3 (R the 3-sigma
//! radius), truncated at 4 sigma and normalised on the lattice, so ground that is everywhere
//! safe gives 1. Ground off the lattice counts as unsafe. Aim points are the floor's nodes:
//! those within the inner edge of the wall annulus of the crater measurement
//! (`craters::MeasureOptions::wall_inner_frac` of the radius) of the crater centre.

use serde::{Deserialize, Serialize};
use structure::patch::Patch;
use terrain::ElevationGrid;

/// What the landing needs to know about one crater.
#[derive(Clone, Copy, Debug)]
pub struct LandingSite {
    pub crater_lon_deg: f64,
    pub crater_lat_deg: f64,
    /// Floor radius, m: aim points lie within it of the crater centre.
    pub floor_radius_m: f64,
    /// Where the structure wants the lander (or the floor centre), lon/lat.
    pub aim_lon_deg: f64,
    pub aim_lat_deg: f64,
}

/// Hazard limits and the dispersion.
#[derive(Clone, Copy, Debug)]
pub struct LandingLimits {
    pub dispersion_3sigma_m: f64,
    pub max_slope_deg: f64,
    pub max_roughness_m: f64,
}

/// The landing figures of one crater.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct LandingReport {
    /// Probability of a safe touchdown when aiming where the structure wants the lander.
    pub p_aim: f64,
    pub aim_lon_deg: f64,
    pub aim_lat_deg: f64,
    /// The floor node with the highest probability, and that probability.
    pub best_lon_deg: f64,
    pub best_lat_deg: f64,
    pub p_best: f64,
    /// Ground distance from the best aim point to where the structure wants the lander, m.
    pub best_to_aim_m: f64,
    /// Share of the floor's nodes that are safe.
    pub safe_fraction: f64,
    /// Lattice spacing (the DEM's post), m: no hazard smaller than this is seen.
    pub post_m: f64,
}

/// The safe mask of a lattice: 1 safe, 0 hazard, 2 no data near the node.
pub fn safe_mask(patch: &Patch, limits: &LandingLimits) -> Vec<u8> {
    let n = patch.n;
    let h = &patch.heights_m;
    let c = patch.cell_m;
    let tan_max = limits.max_slope_deg.to_radians().tan();
    let mut mask = vec![2u8; n * n];
    for j in 1..n.saturating_sub(1) {
        for i in 1..n - 1 {
            let at = |di: isize, dj: isize| {
                h[(j as isize + dj) as usize * n + (i as isize + di) as usize]
            };
            let z: [[f64; 3]; 3] = [
                [at(-1, 1), at(0, 1), at(1, 1)],
                [at(-1, 0), at(0, 0), at(1, 0)],
                [at(-1, -1), at(0, -1), at(1, -1)],
            ];
            if z.iter().flatten().any(|v| v.is_nan()) {
                continue;
            }
            // Horn's weighted differences; row 0 is north (+y), column 0 west (-x).
            let gx = ((z[0][2] + 2.0 * z[1][2] + z[2][2]) - (z[0][0] + 2.0 * z[1][0] + z[2][0]))
                / (8.0 * c);
            let gy = ((z[0][0] + 2.0 * z[0][1] + z[0][2]) - (z[2][0] + 2.0 * z[2][1] + z[2][2]))
                / (8.0 * c);
            let steep = gx.hypot(gy) > tan_max;
            let mut rough = 0.0_f64;
            for (r, row) in z.iter().enumerate() {
                for (k, v) in row.iter().enumerate() {
                    let (dx, dy) = ((k as f64 - 1.0) * c, (1.0 - r as f64) * c);
                    rough = rough.max((v - z[1][1] - gx * dx - gy * dy).abs());
                }
            }
            mask[j * n + i] = u8::from(!steep && rough <= limits.max_roughness_m);
        }
    }
    mask
}

/// Normalised 1-D Gaussian weights for sigma in cells, out to 4 sigma.
fn kernel(sigma_cells: f64) -> Vec<f64> {
    let r = (4.0 * sigma_cells).ceil().max(1.0) as isize;
    let w: Vec<f64> = (-r..=r)
        .map(|k| (-(k as f64).powi(2) / (2.0 * sigma_cells * sigma_cells)).exp())
        .collect();
    let s: f64 = w.iter().sum();
    w.into_iter().map(|v| v / s).collect()
}

/// The probability of a safe touchdown for every aim node: the safe mask (1 safe, else 0)
/// convolved with the dispersion, separably; ground off the lattice is unsafe.
pub fn landing_probability(mask: &[u8], n: usize, sigma_cells: f64) -> Vec<f64> {
    let k = kernel(sigma_cells);
    let r = (k.len() / 2) as isize;
    let safe: Vec<f64> = mask.iter().map(|&m| f64::from(m == 1)).collect();
    let pass = |src: &[f64], along_rows: bool| -> Vec<f64> {
        let mut out = vec![0.0; n * n];
        for j in 0..n {
            for i in 0..n {
                let mut s = 0.0;
                for (t, w) in k.iter().enumerate() {
                    let o = t as isize - r;
                    let (ii, jj) = if along_rows {
                        (i as isize + o, j as isize)
                    } else {
                        (i as isize, j as isize + o)
                    };
                    if ii >= 0 && jj >= 0 && (ii as usize) < n && (jj as usize) < n {
                        s += w * src[jj as usize * n + ii as usize];
                    }
                }
                out[j * n + i] = s;
            }
        }
        out
    };
    pass(&pass(&safe, true), false)
}

/// Landing figures for one crater on `grid` (post spacing `post_m`). `None` when the lattice
/// cannot be placed on the grid or the floor holds no node.
pub fn landing(
    grid: &ElevationGrid,
    site: &LandingSite,
    limits: &LandingLimits,
    post_m: f64,
) -> Option<LandingReport> {
    let patch = Patch::build(
        grid,
        site.crater_lon_deg,
        site.crater_lat_deg,
        lattice_half_m(site, limits, post_m),
        post_m,
    )?;
    landing_on(&patch, site, limits)
}

/// Half-side of the lattice the landing needs round the crater centre, m: the floor, four
/// sigma of dispersion and two posts.
pub fn lattice_half_m(site: &LandingSite, limits: &LandingLimits, post_m: f64) -> f64 {
    site.floor_radius_m + 4.0 * limits.dispersion_3sigma_m / 3.0 + 2.0 * post_m
}

/// [`landing`] on a lattice already built round the crater centre, at least
/// [`lattice_half_m`] each way.
pub fn landing_on(
    patch: &Patch,
    site: &LandingSite,
    limits: &LandingLimits,
) -> Option<LandingReport> {
    let post_m = patch.cell_m;
    let inner = centre_square(patch, lattice_half_m(site, limits, post_m));
    let patch = inner.as_ref().unwrap_or(patch);
    let sigma = limits.dispersion_3sigma_m / 3.0;
    let n = patch.n;
    let mask = safe_mask(patch, limits);
    let p = landing_probability(&mask, n, sigma / post_m);
    let (ax, ay) = patch.frame.to_local(site.aim_lon_deg, site.aim_lat_deg);
    let node_of = |x: f64, y: f64| -> Option<usize> {
        let i = ((x + patch.half_m) / post_m).round();
        let j = ((y + patch.half_m) / post_m).round();
        (i >= 0.0 && j >= 0.0 && (i as usize) < n && (j as usize) < n)
            .then(|| j as usize * n + i as usize)
    };
    let p_aim = node_of(ax, ay).map_or(0.0, |k| p[k]);
    let (mut floor, mut safe, mut best) = (0usize, 0usize, None::<(f64, f64, usize)>);
    for j in 0..n {
        for i in 0..n {
            let (x, y) = patch.node_xy(i, j);
            if x.hypot(y) > site.floor_radius_m || mask[j * n + i] == 2 {
                continue;
            }
            floor += 1;
            safe += usize::from(mask[j * n + i] == 1);
            let k = j * n + i;
            let d = (x - ax).hypot(y - ay);
            // Highest probability; among equals the nearest to the aim point.
            if best.is_none_or(|(bp, bd, _)| p[k] > bp || (p[k] == bp && d < bd)) {
                best = Some((p[k], d, k));
            }
        }
    }
    let (p_best, best_d, k) = best?;
    let (bx, by) = patch.node_xy(k % n, k / n);
    let (best_lon_deg, best_lat_deg) = patch.frame.to_lonlat(bx, by);
    Some(LandingReport {
        p_aim,
        aim_lon_deg: site.aim_lon_deg,
        aim_lat_deg: site.aim_lat_deg,
        best_lon_deg,
        best_lat_deg,
        p_best,
        best_to_aim_m: best_d,
        safe_fraction: safe as f64 / floor.max(1) as f64,
        post_m,
    })
}

/// The nodes of `patch` within `half_m` of its centre each way, as a lattice of their own
/// (the same heights); `None` when that is the whole patch.
fn centre_square(patch: &Patch, half_m: f64) -> Option<Patch> {
    let steps = ((half_m / patch.cell_m).ceil() as usize).min(patch.n / 2);
    let skip = patch.n / 2 - steps;
    if skip == 0 {
        return None;
    }
    let n = 2 * steps + 1;
    let mut heights_m = Vec::with_capacity(n * n);
    for j in skip..skip + n {
        heights_m.extend_from_slice(&patch.heights_m[j * patch.n + skip..j * patch.n + skip + n]);
    }
    Some(Patch {
        frame: patch.frame,
        cell_m: patch.cell_m,
        half_m: steps as f64 * patch.cell_m,
        n,
        heights_m,
    })
}

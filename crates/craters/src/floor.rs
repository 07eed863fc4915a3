//! Floor and wall metrics over the grid's own pixels inside a crater.
//!
//! - Per-pixel slope: Horn (1981), "Hill shading and the reflectance map", Proc. IEEE 69:14,
//!   the same 3 x 3 formula and pixel ground sizes as `terrain::derivatives::slope_deg` (which
//!   is checked against `gdaldem slope`); pixels whose 3 x 3 neighbourhood is incomplete are
//!   skipped, as there.
//! - Floor surface: least squares z = a + b x + c y + e (x^2 + y^2) over the floor disc: the
//!   plane part gives the tilt, the whole is the "smooth bowl" whose residuals give the
//!   roughness, and its lowest value over the floor is the robust floor level.

use crate::profiles::Surface;
use crate::sampler::LocalSampler;
use crate::stats;

/// Pixels examined per crater at most; larger craters are subsampled on a regular stride.
const MAX_PIXELS: usize = 40_000;

#[derive(Clone, Debug, Default)]
pub struct FloorMetrics {
    /// Lowest value of the fitted bowl over the floor, relative to the regional plane.
    pub floor_level_m: f64,
    /// The same lowest value in heights above the sphere.
    pub floor_height_m: f64,
    pub tilt_deg: f64,
    pub tilt_azimuth_deg: f64,
    pub slope_p95_deg: f64,
    pub wall_slope_mean_deg: f64,
    pub roughness_rms_m: f64,
    pub obstacle_fraction: f64,
    pub baseline_m: f64,
}

pub struct FloorSpec {
    pub floor_radius_m: f64,
    pub wall_inner_m: f64,
    pub wall_outer_m: f64,
    pub obstacle_slope_deg: f64,
}

/// Horn slope at window pixel (c, r) from its 3 x 3 neighbourhood, or `None` at the window's
/// edge or next to nodata. Reads the three rows as slices: this runs for every pixel of the
/// crater.
#[inline]
fn horn_slope_deg(
    heights: &[f32],
    w: usize,
    h: usize,
    c: usize,
    r: usize,
    dx: f64,
    dy: f64,
) -> Option<f64> {
    if c == 0 || r == 0 || c + 1 >= w || r + 1 >= h {
        return None;
    }
    let top = heights.get((r - 1) * w + c - 1..(r - 1) * w + c + 2)?;
    let mid = heights.get(r * w + c - 1..r * w + c + 2)?;
    let bot = heights.get((r + 1) * w + c - 1..(r + 1) * w + c + 2)?;
    let mut z = [0.0f64; 9];
    for (k, &v) in top.iter().chain(mid).chain(bot).enumerate() {
        if v.is_nan() {
            return None;
        }
        z[k] = v as f64;
    }
    let gx = ((z[2] + 2.0 * z[5] + z[8]) - (z[0] + 2.0 * z[3] + z[6])) / (8.0 * dx);
    let gy = ((z[0] + 2.0 * z[1] + z[2]) - (z[6] + 2.0 * z[7] + z[8])) / (8.0 * dy);
    Some((gx * gx + gy * gy).sqrt().atan().to_degrees())
}

/// Working lists of [`measure`], kept from crater to crater.
#[derive(Clone, Debug, Default)]
pub struct FloorBuffers {
    /// Floor pixels: the fit's terms (1, x, y, x^2 + y^2) and the height.
    floor: Vec<([f64; 4], f64)>,
    /// Every floor or wall pixel in visiting order.
    pixels: Vec<FloorPixel>,
    slopes: Vec<f64>,
}

/// A pixel of the floor disc or the wall ring, for the slope pass.
#[derive(Clone, Copy, Debug)]
struct FloorPixel {
    col: usize,
    row: usize,
    /// Ground size (east-west, north-south), m.
    size: (f64, f64),
    on_floor: bool,
    on_wall: bool,
}

/// Why [`measure`] gave no metrics.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum FloorFail {
    /// The floor disc holds fewer than 4 valid pixels.
    TooFewPixels,
    /// The floor level lies above the caller's `highest_level_m`.
    TooHigh,
}

/// Measure the floor and wall of the crater centred at frame (cx, cy). `plane` is the regional
/// plane (frame coordinates) that the floor level is reported against. Stops before the
/// per-pixel slopes, the costly part, when the floor level comes out above `highest_level_m`
/// (pass `f64::INFINITY` for no limit): a survey's depth gate needs only the level.
pub fn measure(
    s: &LocalSampler,
    cx: f64,
    cy: f64,
    spec: &FloorSpec,
    plane: &Surface,
    highest_level_m: f64,
    buf: &mut FloorBuffers,
) -> Result<FloorMetrics, FloorFail> {
    let g = s.grid;
    let reach = spec.wall_outer_m.max(spec.floor_radius_m);
    let corners = [
        (-reach, -reach),
        (reach, -reach),
        (-reach, reach),
        (reach, reach),
    ]
    .map(|(x, y)| s.pixel_of(cx + x, cy + y));
    let cmin = corners
        .iter()
        .map(|p| p.0)
        .fold(f64::INFINITY, f64::min)
        .floor()
        .max(0.0) as usize;
    let cmax = (corners
        .iter()
        .map(|p| p.0)
        .fold(f64::NEG_INFINITY, f64::max)
        .ceil()
        .max(0.0) as usize)
        .min(g.width.saturating_sub(1));
    let rmin = corners
        .iter()
        .map(|p| p.1)
        .fold(f64::INFINITY, f64::min)
        .floor()
        .max(0.0) as usize;
    let rmax = (corners
        .iter()
        .map(|p| p.1)
        .fold(f64::NEG_INFINITY, f64::max)
        .ceil()
        .max(0.0) as usize)
        .min(g.height.saturating_sub(1));
    if cmin > cmax || rmin > rmax {
        return Err(FloorFail::TooFewPixels);
    }
    let count = (cmax - cmin + 1) * (rmax - rmin + 1);
    let stride = ((count as f64 / MAX_PIXELS as f64).sqrt().ceil() as usize).max(1);
    let (centre_col, _) = s.pixel_of(cx, cy);
    let FloorBuffers {
        floor,
        pixels,
        slopes,
    } = buf;
    floor.clear();
    pixels.clear();
    slopes.clear();
    let (heights, w, h) = (&g.heights_m[..], g.width, g.height);
    let (mut px_sum, mut px_n) = (0.0, 0usize);
    // First pass: which pixels are floor or wall, and the floor's heights for the fit.
    for r in (rmin..=rmax).step_by(stride) {
        // Ground pixel size along the row, at the crater's column (as terrain::derivatives does
        // per row at the window centre; identical for cylindrical grids).
        let raster_col = g.col0 as f64 + centre_col + 0.5;
        let raster_row = g.row0 as f64 + r as f64 + 0.5;
        let Some((dx, dy)) = g.geometry.pixel_size_m_at(raster_col, raster_row) else {
            continue;
        };
        for c in (cmin..=cmax).step_by(stride) {
            let Some((x, y)) = s.local_of(c, r) else {
                continue;
            };
            let (x, y) = (x - cx, y - cy);
            let rho = (x * x + y * y).sqrt();
            if rho > reach {
                continue;
            }
            let Some(z) = g.get(c, r) else { continue };
            let (on_floor, on_wall) = (
                rho <= spec.floor_radius_m,
                rho >= spec.wall_inner_m && rho <= spec.wall_outer_m,
            );
            if !(on_floor || on_wall) {
                continue;
            }
            if on_floor {
                floor.push(([1.0, x, y, x * x + y * y], z as f64));
                px_sum += (dx * dy).sqrt();
                px_n += 1;
            }
            pixels.push(FloorPixel {
                col: c,
                row: r,
                size: (dx, dy),
                on_floor,
                on_wall,
            });
        }
    }
    if floor.len() < 4 {
        return Err(FloorFail::TooFewPixels);
    }
    // With too few pixels for the curvature term, fall back to a plane.
    let coef = if floor.len() >= 8 {
        crate::lsq::fit_linear(floor.iter().map(|f| (f.0, f.1))).ok_or(FloorFail::TooFewPixels)?
    } else {
        let p = crate::lsq::fit_linear(floor.iter().map(|f| ([f.0[0], f.0[1], f.0[2]], f.1)))
            .ok_or(FloorFail::TooFewPixels)?;
        [p[0], p[1], p[2], 0.0]
    };
    let model = |f: &[f64; 4]| coef[0] + coef[1] * f[1] + coef[2] * f[2] + coef[3] * f[3];
    let rms = (floor
        .iter()
        .map(|f| (f.1 - model(&f.0)).powi(2))
        .sum::<f64>()
        / floor.len() as f64)
        .sqrt();
    let floor_level_m = floor
        .iter()
        .map(|f| model(&f.0) - plane.at(cx + f.0[1], cy + f.0[2]))
        .fold(f64::INFINITY, f64::min);
    if !(floor_level_m <= highest_level_m) {
        return Err(FloorFail::TooHigh);
    }
    let floor_height_m = floor
        .iter()
        .map(|f| model(&f.0))
        .fold(f64::INFINITY, f64::min);
    // Second pass: Horn slopes, once per pixel, in the first pass's order.
    let (mut wall_sum, mut wall_n) = (0.0, 0usize);
    for p in pixels.iter() {
        let slope = horn_slope_deg(heights, w, h, p.col, p.row, p.size.0, p.size.1);
        if let Some(sl) = slope {
            if p.on_floor {
                slopes.push(sl);
            }
            if p.on_wall {
                wall_sum += sl;
                wall_n += 1;
            }
        }
    }
    let (b, c) = (coef[1], coef[2]);
    let obstacles = slopes
        .iter()
        .filter(|&&sl| sl > spec.obstacle_slope_deg)
        .count();
    let n_slopes = slopes.len();
    Ok(FloorMetrics {
        floor_level_m,
        floor_height_m,
        tilt_deg: b.hypot(c).atan().to_degrees(),
        tilt_azimuth_deg: if b == 0.0 && c == 0.0 {
            0.0
        } else {
            (-b).atan2(-c).to_degrees().rem_euclid(360.0)
        },
        slope_p95_deg: if n_slopes > 0 {
            stats::quantile(slopes, 0.95)
        } else {
            0.0
        },
        wall_slope_mean_deg: if wall_n > 0 {
            wall_sum / wall_n as f64
        } else {
            0.0
        },
        roughness_rms_m: rms,
        obstacle_fraction: if n_slopes > 0 {
            obstacles as f64 / n_slopes as f64
        } else {
            0.0
        },
        baseline_m: if px_n > 0 { px_sum / px_n as f64 } else { 0.0 },
    })
}

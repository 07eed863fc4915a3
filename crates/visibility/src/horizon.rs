//! The local horizon around a site: elevation angle of the skyline at every azimuth, from an
//! elevation grid by ray marching, on a sphere.
//!
//! A terrain point at ground distance d and height h_t, seen from a site at height h_s, stands
//! at elevation atan2((R+h_t) cos g - (R+h_s), (R+h_t) sin g) with g = d/R: the exact form of
//! the usual (h_t - h_s - d^2/(2R)) / d, whose d^2/(2R) is the curvature drop. Where the grid
//! has no data the ray sees no terrain; past `max_distance_m` it sees only the sphere, whose
//! horizon for a raised site is the dip -acos(R/(R+h)) (0 at or below the datum).

use terrain::geodesy::destination;
use terrain::ElevationGrid;

/// A grid prepared for repeated horizon queries: its height ceiling and pixel size, found once.
#[derive(Clone, Debug)]
pub struct HorizonTerrain<'a> {
    pub grid: &'a ElevationGrid,
    /// Highest valid height in the grid, m: lets a ray stop when nothing further can rise above
    /// the skyline already found.
    pub height_max_m: f64,
    /// Ground step of the first ray samples, m (the smaller pixel side).
    pub pixel_m: f64,
    pub radius_m: f64,
}

impl<'a> HorizonTerrain<'a> {
    /// `None` when the grid holds no data or its pixel size cannot be found.
    pub fn new(grid: &'a ElevationGrid) -> Option<Self> {
        let (_, hi) = grid.min_max()?;
        let (px, py) = grid.geometry.pixel_size_m()?;
        let pixel_m = px.min(py);
        (pixel_m.is_finite() && pixel_m > 0.0).then_some(HorizonTerrain {
            grid,
            height_max_m: hi as f64,
            pixel_m,
            radius_m: grid.geometry.body_radius_m,
        })
    }
}

/// Skyline elevations at evenly spaced azimuths around a site.
#[derive(Clone, Debug, PartialEq)]
pub struct Horizon {
    /// Elevation, degrees, at azimuth `i * 360 / n` (clockwise from north); never below the
    /// sphere's horizon.
    pub elevation_deg: Vec<f64>,
    /// Height of the observer above the reference sphere (terrain + mast), m; 0 without a grid.
    pub site_height_m: f64,
    /// Horizon of the bare sphere for this observer, degrees (dip, <= 0).
    pub sphere_horizon_deg: f64,
    /// Terrain farther than this was not examined, m.
    pub max_distance_m: f64,
    /// Whether the grid supplied any terrain (false: sphere only).
    pub from_terrain: bool,
}

/// Dip of the bare sphere's horizon for an observer `height_m` above it, degrees.
pub fn sphere_dip_deg(radius_m: f64, height_m: f64) -> f64 {
    if height_m > 0.0 {
        -(radius_m / (radius_m + height_m))
            .clamp(-1.0, 1.0)
            .acos()
            .to_degrees()
    } else {
        0.0
    }
}

/// Growth of the ray step with distance: samples every 1 % of the distance once that exceeds
/// a pixel. A feature subtending less than that in range is below what a skyline needs.
const STEP_FRACTION: f64 = 0.01;

impl Horizon {
    /// March `n_azimuths` rays from (lon, lat) out to `max_distance_m`.
    pub fn compute(
        lon_deg: f64,
        lat_deg: f64,
        terrain: Option<&HorizonTerrain>,
        observer_height_m: f64,
        max_distance_m: f64,
        n_azimuths: usize,
    ) -> Horizon {
        Self::compute_rays(
            lon_deg,
            lat_deg,
            terrain,
            observer_height_m,
            max_distance_m,
            n_azimuths,
            None,
        )
    }

    /// As [`Horizon::compute`], marching only the rays whose `wanted[i]` is true (the others
    /// hold the sphere's horizon). The Earth margin needs only the azimuths the Earth can
    /// occupy, often a small sector.
    pub fn compute_rays(
        lon_deg: f64,
        lat_deg: f64,
        terrain: Option<&HorizonTerrain>,
        observer_height_m: f64,
        max_distance_m: f64,
        n_azimuths: usize,
        wanted: Option<&[bool]>,
    ) -> Horizon {
        let n = n_azimuths.max(4);
        let ground = terrain.and_then(|t| t.grid.sample_lonlat(lon_deg, lat_deg).map(|h| (t, h)));
        let Some((t, ground_m)) = ground else {
            let radius_m = terrain.map_or(terrain::MOON_RADIUS_M, |t| t.radius_m);
            let h = observer_height_m.max(0.0);
            let dip = sphere_dip_deg(radius_m, h);
            return Horizon {
                elevation_deg: vec![dip; n],
                site_height_m: h,
                sphere_horizon_deg: dip,
                max_distance_m,
                from_terrain: false,
            };
        };
        let hs = ground_m + observer_height_m;
        let dip = sphere_dip_deg(t.radius_m, hs);
        let steps = Steps::new(t.pixel_m, t.radius_m, max_distance_m);
        let elevation_deg = (0..n)
            .map(|i| {
                if wanted.is_some_and(|w| !w.get(i).copied().unwrap_or(true)) {
                    return dip;
                }
                ray_max_elevation_deg(
                    t,
                    &steps,
                    (lon_deg, lat_deg),
                    hs,
                    i as f64 * 360.0 / n as f64,
                )
                .max(dip)
            })
            .collect();
        Horizon {
            elevation_deg,
            site_height_m: hs,
            sphere_horizon_deg: dip,
            max_distance_m,
            from_terrain: true,
        }
    }

    /// Skyline elevation at any azimuth, linearly interpolated between the marched rays.
    pub fn at(&self, azimuth_deg: f64) -> f64 {
        let n = self.elevation_deg.len();
        let x = azimuth_deg.rem_euclid(360.0) / 360.0 * n as f64;
        let i = (x.floor() as usize) % n;
        let f = x - x.floor();
        self.elevation_deg[i] * (1.0 - f) + self.elevation_deg[(i + 1) % n] * f
    }

    /// (azimuth, elevation) pairs in degrees, for tables and polar plots.
    pub fn pairs(&self) -> Vec<(f64, f64)> {
        let n = self.elevation_deg.len();
        self.elevation_deg
            .iter()
            .enumerate()
            .map(|(i, &e)| (i as f64 * 360.0 / n as f64, e))
            .collect()
    }
}

/// The ray's sample distances with sin/cos of their central angles, shared by every ray of
/// a site.
struct Steps {
    d_m: Vec<f64>,
    sin_g: Vec<f64>,
    cos_g: Vec<f64>,
}

impl Steps {
    fn new(pixel_m: f64, radius_m: f64, max_distance_m: f64) -> Steps {
        let mut d_m = Vec::new();
        let mut d = pixel_m;
        while d <= max_distance_m {
            d_m.push(d);
            d += pixel_m.max(STEP_FRACTION * d);
        }
        let (sin_g, cos_g) = d_m.iter().map(|&d| (d / radius_m).sin_cos()).unzip();
        Steps { d_m, sin_g, cos_g }
    }
}

/// Exact positions (great-circle `destination`, then the grid's projection) are computed every
/// this many samples and the pixel position interpolated linearly between: over such a span
/// (at most 8 % of the distance) the ray's image in any of our projections is straight to far
/// below a pixel, and it saves most of the trigonometry.
const EXACT_EVERY: usize = 8;

fn window_pixel(
    t: &HorizonTerrain,
    site: (f64, f64),
    azimuth_deg: f64,
    d_m: f64,
) -> Option<(f64, f64)> {
    let (lon, lat) = destination(t.radius_m, site, azimuth_deg, d_m);
    let (col, row) = t.grid.geometry.lonlat_to_pixel(lon, lat)?;
    Some((
        col - 0.5 - t.grid.col0 as f64,
        row - 0.5 - t.grid.row0 as f64,
    ))
}

fn ray_max_elevation_deg(
    t: &HorizonTerrain,
    steps: &Steps,
    site: (f64, f64),
    hs: f64,
    azimuth_deg: f64,
) -> f64 {
    let r = t.radius_m;
    if t.height_max_m <= hs || steps.d_m.is_empty() {
        // No terrain rises to the observer: the sphere's dip is the skyline.
        return f64::NEG_INFINITY;
    }
    let (w, h) = (t.grid.width as f64, t.grid.height as f64);
    let n = steps.d_m.len();
    let mut best_tan = f64::NEG_INFINITY;
    let Some(mut a) = window_pixel(t, site, azimuth_deg, steps.d_m[0]) else {
        return best_tan;
    };
    let mut k0 = 0;
    'ray: while k0 < n {
        let k1 = (k0 + EXACT_EVERY).min(n - 1);
        let Some(b) = window_pixel(t, site, azimuth_deg, steps.d_m[k1]) else {
            break;
        };
        // A jump of half the window means the ray crossed a wrap seam: stop interpolating.
        let straight = (b.0 - a.0).abs() < w / 2.0 && (b.1 - a.1).abs() < h / 2.0;
        let last = if k1 == n - 1 { k1 + 1 } else { k1 };
        for j in k0..last.max(k0 + 1) {
            let (sg, cg) = (steps.sin_g[j], steps.cos_g[j]);
            // The highest terrain in the grid, placed here, would stand at this elevation; with
            // h_max > h_s that bound falls with distance, so once it is below the skyline found
            // so far no farther point can matter.
            let ceiling_tan = ((r + t.height_max_m) * cg - (r + hs)) / ((r + t.height_max_m) * sg);
            if ceiling_tan <= best_tan {
                break 'ray;
            }
            let (col, row) = if straight && k1 > k0 {
                let f = (steps.d_m[j] - steps.d_m[k0]) / (steps.d_m[k1] - steps.d_m[k0]);
                (a.0 + f * (b.0 - a.0), a.1 + f * (b.1 - a.1))
            } else {
                match window_pixel(t, site, azimuth_deg, steps.d_m[j]) {
                    Some(p) => p,
                    None => break 'ray,
                }
            };
            if col < -1.0 || row < -1.0 || col > w || row > h {
                // Left the window: over a few hundred km a ray does not come back into it.
                break 'ray;
            }
            if let Some(ht) = t.grid.sample(col, row) {
                let tan_e = ((r + ht) * cg - (r + hs)) / ((r + ht) * sg);
                best_tan = best_tan.max(tan_e);
            }
        }
        if k1 == n - 1 {
            break;
        }
        a = b;
        k0 = k1;
    }
    if best_tan.is_finite() {
        best_tan.atan().to_degrees()
    } else {
        f64::NEG_INFINITY
    }
}

/// Horizon profile around a site as (azimuth_deg, elevation_deg) pairs, `n_azimuths` evenly
/// spaced from north: for polar plots. Falls back to the sphere where the grid is missing.
pub fn horizon_profile(
    lon_deg: f64,
    lat_deg: f64,
    grid: Option<&ElevationGrid>,
    max_distance_m: f64,
    n_azimuths: usize,
) -> Vec<(f64, f64)> {
    let terrain = grid.and_then(HorizonTerrain::new);
    Horizon::compute(
        lon_deg,
        lat_deg,
        terrain.as_ref(),
        0.0,
        max_distance_m,
        n_azimuths,
    )
    .pairs()
}

//! Which craters to plant, where, in what order and in what state: a background population
//! with a power-law size-frequency distribution, a few breached rims and boulder-strewn
//! floors among it, and a set of fresh, complete host craters planted on purpose.

use crate::patch::PatchGrid;
use crate::published::SFD_CUMULATIVE_SLOPE;
use crate::spec::DemoSpec;
use rand::seq::SliceRandom;
use rand::Rng;

/// Smallest crater that gets a breached rim: below about 25 posts the cut sector (a rim only
/// 0.036 D high) hardly shows.
const BREACH_MIN_DIAMETER_M: f64 = 800.0;
/// A breached crater is chosen among the less degraded, so that its rim is still there to cut.
const BREACH_MAX_DEGRADATION: f64 = 0.03;
/// Diameter range for boulder-strewn floors: large enough for the floor to span many posts.
const BOULDER_DIAMETER_RANGE_M: (f64, f64) = (600.0, 3000.0);
/// Hosts keep `HOST_SPACING` times the sum of both radii between each other, and stay
/// `HOST_CLEARANCE` host radii plus `BACKGROUND_CLEARANCE` radii of every background crater
/// away from it (beyond its rim and steepest ejecta), so hosts stay complete and unmarked.
const HOST_SPACING: f64 = 2.5;
const HOST_CLEARANCE: f64 = 1.3;
const BACKGROUND_CLEARANCE: f64 = 2.0;
/// Craters larger than this degrade proportionally less (down to `LARGE_CRATER_MIN_FACTOR`)
/// for the same age: a demo choice so that old large craters stay recognisable, as they do on
/// the real highlands.
const LARGE_CRATER_REFERENCE_M: f64 = 1000.0;
const LARGE_CRATER_MIN_FACTOR: f64 = 0.25;
/// Attempts at a position before accepting the last one drawn.
const MAX_TRIES: usize = 2000;

/// A gap cut in a crater rim.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Breach {
    /// Centre of the gap, degrees clockwise from north.
    pub azimuth_deg: f64,
    pub width_deg: f64,
}

/// One crater to plant. Plans are kept in emplacement order, oldest first.
#[derive(Clone, Debug, PartialEq)]
pub struct CraterPlan {
    /// Centre as a fractional pixel position (pixel-corner convention).
    pub col_px: f64,
    pub row_px: f64,
    pub diameter_m: f64,
    /// Dimensionless degradation kappa t / R^2 (0 for fresh) and the same in m^2.
    pub degradation: f64,
    pub kappa_t_m2: f64,
    pub breach: Option<Breach>,
    pub boulder_floor: bool,
    pub host: bool,
}

impl CraterPlan {
    pub fn radius_m(&self) -> f64 {
        self.diameter_m / 2.0
    }
}

/// Ground distance in metres between two pixel positions, in the local frame at their mean
/// latitude (the patch is small enough that this is exact to well under a post).
pub fn ground_distance_m(grid: &PatchGrid, a: (f64, f64), b: (f64, f64)) -> f64 {
    let (_, lat) = grid.lonlat(0.5 * (a.0 + b.0), 0.5 * (a.1 + b.1));
    let (sx, sy) = grid.ground_step_m(lat);
    ((a.0 - b.0) * sx).hypot((a.1 - b.1) * sy)
}

/// Draw the whole population, in emplacement order (oldest first; hosts last).
pub fn plan_population(spec: &DemoSpec, grid: &PatchGrid, rng: &mut impl Rng) -> Vec<CraterPlan> {
    let (w, h) = (grid.width_px as f64, grid.height_px as f64);

    // Background: diameters by stratified inverse-CDF sampling of the truncated power law, so
    // the rare large craters of the tail appear in proportion even in one small draw.
    let n = spec.crater_count;
    let s = SFD_CUMULATIVE_SLOPE;
    let lo_over_hi = (spec.crater_min_diameter_m / spec.crater_max_diameter_m).powf(s);
    let mut background: Vec<(f64, f64)> = (0..n)
        .map(|i| {
            let u = (i as f64 + rng.gen::<f64>()) / n as f64;
            let d = spec.crater_min_diameter_m * (1.0 - u * (1.0 - lo_over_hi)).powf(-1.0 / s);
            (d, rng.gen::<f64>())
        })
        .collect();
    // Age fraction: 0 youngest, 1 oldest. Place the youngest first so that an older crater is
    // never put entirely inside a younger one's rim (it would be erased, yet listed in truth).
    background.sort_by(|a, b| a.1.total_cmp(&b.1));
    let mut placed: Vec<CraterPlan> = Vec::with_capacity(n);
    for &(diameter_m, age) in &background {
        let r_m = diameter_m / 2.0;
        let mut pos = (0.0, 0.0);
        for _ in 0..MAX_TRIES {
            pos = (rng.gen::<f64>() * w, rng.gen::<f64>() * h);
            let erased = placed
                .iter()
                .any(|y| ground_distance_m(grid, pos, (y.col_px, y.row_px)) + r_m < y.radius_m());
            if !erased {
                break;
            }
        }
        let fresh = age < spec.fresh_fraction;
        let degradation = if fresh {
            0.0
        } else {
            let t = ((age - spec.fresh_fraction) / (1.0 - spec.fresh_fraction).max(1e-9))
                .clamp(0.0, 1.0);
            let at_1km =
                spec.degradation_min * (spec.degradation_max / spec.degradation_min).powf(t);
            at_1km * (LARGE_CRATER_REFERENCE_M / diameter_m).clamp(LARGE_CRATER_MIN_FACTOR, 1.0)
        };
        placed.push(CraterPlan {
            col_px: pos.0,
            row_px: pos.1,
            diameter_m,
            degradation,
            kappa_t_m2: degradation * r_m * r_m,
            breach: None,
            boulder_floor: false,
            host: false,
        });
    }
    placed.reverse(); // oldest first

    let inside = |c: &CraterPlan| {
        let (sx, sy) = grid.ground_step_m(grid.lonlat(c.col_px, c.row_px).1);
        let (mx, my) = (c.radius_m() / sx, c.radius_m() / sy);
        c.col_px > mx && c.col_px < w - mx && c.row_px > my && c.row_px < h - my
    };
    let mut breach_candidates: Vec<usize> = (0..placed.len())
        .filter(|&i| {
            let c = &placed[i];
            c.diameter_m >= BREACH_MIN_DIAMETER_M
                && c.degradation <= BREACH_MAX_DEGRADATION
                && inside(c)
        })
        .collect();
    breach_candidates.shuffle(rng);
    for &i in breach_candidates.iter().take(spec.breached_count) {
        let width_deg =
            spec.breach_min_deg + rng.gen::<f64>() * (spec.breach_max_deg - spec.breach_min_deg);
        placed[i].breach = Some(Breach {
            azimuth_deg: rng.gen::<f64>() * 360.0,
            width_deg,
        });
    }
    let mut boulder_candidates: Vec<usize> = (0..placed.len())
        .filter(|&i| {
            let c = &placed[i];
            c.degradation == 0.0
                && c.breach.is_none()
                && (BOULDER_DIAMETER_RANGE_M.0..=BOULDER_DIAMETER_RANGE_M.1).contains(&c.diameter_m)
                && inside(c)
        })
        .collect();
    boulder_candidates.shuffle(rng);
    for &i in boulder_candidates.iter().take(spec.boulder_floor_count) {
        placed[i].boulder_floor = true;
    }
    let hosts = place_hosts(spec, grid, &placed, rng);
    placed.extend(hosts);
    placed
}

/// Fresh, complete hosts spread over the patch, with room for their near ejecta inside it, on
/// ground no background crater or its near ejecta touches. A host that finds no such place is
/// left out.
fn place_hosts(
    spec: &DemoSpec,
    grid: &PatchGrid,
    background: &[CraterPlan],
    rng: &mut impl Rng,
) -> Vec<CraterPlan> {
    let (w, h) = (grid.width_px as f64, grid.height_px as f64);
    let mut hosts: Vec<CraterPlan> = Vec::with_capacity(spec.host_count);
    for _ in 0..spec.host_count {
        let ln_span = (spec.host_max_diameter_m / spec.host_min_diameter_m).ln();
        let diameter_m = spec.host_min_diameter_m * (rng.gen::<f64>() * ln_span).exp();
        let r_m = diameter_m / 2.0;
        let margin_px = 2.0 * r_m / grid.post_m + 2.0;
        if w <= 2.0 * margin_px || h <= 2.0 * margin_px {
            continue;
        }
        for _ in 0..MAX_TRIES {
            let pos = (
                margin_px + rng.gen::<f64>() * (w - 2.0 * margin_px),
                margin_px + rng.gen::<f64>() * (h - 2.0 * margin_px),
            );
            let crowded = hosts.iter().any(|o| {
                ground_distance_m(grid, pos, (o.col_px, o.row_px))
                    < HOST_SPACING * (r_m + o.radius_m())
            }) || background.iter().any(|b| {
                ground_distance_m(grid, pos, (b.col_px, b.row_px))
                    < HOST_CLEARANCE * r_m + BACKGROUND_CLEARANCE * b.radius_m()
            });
            if !crowded {
                hosts.push(CraterPlan {
                    col_px: pos.0,
                    row_px: pos.1,
                    diameter_m,
                    degradation: 0.0,
                    kappa_t_m2: 0.0,
                    breach: None,
                    boulder_floor: false,
                    host: true,
                });
                break;
            }
        }
    }
    hosts
}

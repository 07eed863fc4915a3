//! Measuring one crater: iterate centre and radius from rim crests on radial profiles, then
//! report the rim, the floor and their uncertainties. See docs/metrics.md for each metric.

use crate::circle_fit::{self, Circle};
use crate::detect::DetectOptions;
use crate::error::CraterError;
use crate::floor::{self, FloorSpec};
use crate::profiles::{Crest, Profiles, RegionalBuffers, Surface};
use crate::sampler::LocalSampler;
use crate::{ellipse_fit, stats, CraterMeasurement};
use std::cell::RefCell;
use terrain::ElevationGrid;

/// Choices of the measurement; the defaults are what docs/metrics.md describes.
#[derive(Clone, Debug, PartialEq)]
pub struct MeasureOptions {
    /// Radial profiles per crater (at least 64).
    pub azimuths: usize,
    /// Rounds of crest finding and circle fitting that move the centre.
    pub iterations: usize,
    /// A crest counts towards completeness when within this fraction of R of the fitted circle.
    pub crest_tolerance_frac: f64,
    /// Floor disc radius as a fraction of R (at least 1.5 pixels).
    pub floor_radius_frac: f64,
    /// Inner wall annulus, fractions of R.
    pub wall_inner_frac: f64,
    pub wall_outer_frac: f64,
    /// Floor pixels steeper than this count as obstacles (15 deg: common practice for lander and
    /// rover slope limits, no source).
    pub obstacle_slope_deg: f64,
    /// Bootstrap resamples over azimuths for the uncertainties (0 disables; SDs are then 0).
    pub bootstrap_resamples: usize,
    pub seed: u64,
    /// Below this fraction of valid data in the disc out to 1.5 R the crater is not measured.
    pub min_valid_fraction: f64,
}

impl Default for MeasureOptions {
    fn default() -> Self {
        MeasureOptions {
            azimuths: 64,
            iterations: 3,
            crest_tolerance_frac: 0.15,
            floor_radius_frac: 0.3,
            wall_inner_frac: 0.5,
            wall_outer_frac: 0.9,
            obstacle_slope_deg: 15.0,
            bootstrap_resamples: 50,
            seed: 0x5eed_c0de,
            min_valid_fraction: 0.5,
        }
    }
}

/// Samples per profile at most: half a pixel apart, or coarser for craters more than about
/// 60 pixels across, where the crest is still located to a fraction of a pixel by its flanks.
const SAMPLES_PER_PROFILE: f64 = 72.0;

/// Profiles reach this many radii: the plane annulus is 1.6-2.4 R, the plain 2.0-2.5 R.
const PROFILE_REACH: f64 = 2.5;

struct Round {
    /// Regional plane: depth, relief and floor level are reported against it.
    plane: Surface,
    /// Crest heights relative to the plane.
    crest_z: Vec<f64>,
    circle: Circle,
    /// Index of each fitted point's azimuth, with its frame position.
    pts: Vec<(usize, (f64, f64))>,
}

/// Buffers reused from round to round of one measurement and from one measurement to the next
/// on the same thread: allocating and freeing them per crater cost a tenth of the time (the
/// allocator handed the memory back to the system and faulted it in again each time).
#[derive(Default)]
struct Scratch {
    raw: Profiles,
    /// `raw` less the regional plane (after a round: the profiles the round's numbers use).
    det: Profiles,
    /// `raw` less the quadratic surface, when the plane leaves too few crests.
    alt: Profiles,
    regional: RegionalBuffers,
    plain: Vec<f64>,
    floor: floor::FloorBuffers,
}

thread_local! {
    static SCRATCH: RefCell<Scratch> = RefCell::new(Scratch::default());
}

fn not_measurable(lon: f64, lat: f64, d: f64, reason: impl Into<String>) -> CraterError {
    CraterError::NotMeasurable {
        lon_deg: lon,
        lat_deg: lat,
        diameter_m: d,
        reason: reason.into(),
    }
}

/// Drops below a centimetre are below the vertical precision of any planetary DEM and are
/// taken as flat ground (common practice, no source).
const MIN_DROP_M: f64 = 0.01;

/// Accept crests that stand clearly above both neighbourhoods, relative to the crater's own
/// typical rim: a fifth of the median inner and outer drops (breached sectors fall far short).
fn accept(crests: &[Option<Crest>]) -> Vec<bool> {
    let mut inner: Vec<f64> = crests.iter().flatten().map(|c| c.inner_drop).collect();
    let mut outer: Vec<f64> = crests.iter().flatten().map(|c| c.outer_drop).collect();
    let (mi, mo) = (stats::median(&mut inner), stats::median(&mut outer));
    crests
        .iter()
        .map(|c| {
            c.is_some_and(|c| {
                c.inner_drop >= 0.25 * mi
                    && c.outer_drop >= 0.2 * mo
                    && c.outer_drop > MIN_DROP_M
                    && c.inner_drop > MIN_DROP_M
            })
        })
        .collect()
}

/// Crests on `profiles` (raw profiles less `surface`), their heights relative to `plane`,
/// and the accepted ones as frame points.
#[allow(clippy::type_complexity)]
fn crests_over(
    profiles: &Profiles,
    surface: &Surface,
    plane: &Surface,
    r: f64,
    band: (f64, f64),
    pixel_m: f64,
) -> (Vec<f64>, Vec<(usize, (f64, f64))>) {
    let centre = (profiles.cx, profiles.cy);
    let mut crests: Vec<Option<Crest>> = (0..profiles.n_az)
        .map(|i| profiles.crest(i, band.0 * r, band.1 * r, 0.4 * r, pixel_m, true))
        .collect();
    // A sharp rim shows in at least half the profiles' own corners (the rest miss by the
    // phase of the pixel grid), or in the mean profile of the rim's azimuths; a diffused one
    // in neither. Ours, set on the demo terrain and the analytic craters.
    let ok = accept(&crests);
    let (met, found) = crests
        .iter()
        .zip(&ok)
        .filter(|(_, ok)| **ok)
        .flat_map(|(c, _)| c)
        .fold((0usize, 0usize), |a, c| {
            (a.0 + c.flank_met as usize, a.1 + 1)
        });
    let sharp = 2 * met >= found || profiles.rim_is_sharp(band.0 * r, band.1 * r, pixel_m, &ok);
    if !sharp {
        for c in crests.iter_mut().flatten() {
            c.r = c.r_top;
        }
    }
    let at = |i: usize, c: &Crest| {
        (
            centre.0 + profiles.dir[i].0 * c.r,
            centre.1 + profiles.dir[i].1 * c.r,
        )
    };
    let crest_z: Vec<f64> = crests
        .iter()
        .enumerate()
        .map(|(i, c)| {
            c.map_or(f64::NAN, |c| {
                let (x, y) = at(i, &c);
                c.z + surface.at(x, y) - plane.at(x, y)
            })
        })
        .collect();
    let pts = crests
        .iter()
        .enumerate()
        .filter(|(i, _)| ok[*i])
        .filter_map(|(i, c)| c.map(|c| (i, at(i, &c))))
        .collect();
    (crest_z, pts)
}

fn round(
    s: &LocalSampler,
    sc: &mut Scratch,
    centre: (f64, f64),
    r: f64,
    band: (f64, f64),
    opts: &MeasureOptions,
    pixel_m: f64,
) -> Option<Round> {
    let r_max = PROFILE_REACH * r;
    let dr = (0.5 * pixel_m).max(r_max / SAMPLES_PER_PROFILE);
    sc.raw
        .resample(s, centre.0, centre.1, opts.azimuths, r_max, dr);
    let plane = sc.raw.regional(1.6 * r, 2.4 * r, false, &mut sc.regional)?;
    sc.det.detrend_from(&sc.raw, &plane);
    let need = (opts.azimuths / 8).max(6);
    let mut found = crests_over(&sc.det, &plane, &plane, r, band, pixel_m);
    if found.1.len() < need {
        // A small crater on a larger crater's curved floor sits in ground that rises in every
        // direction, and a plane leaves that rise to swamp its rim: retry over a quadratic
        // regional surface. Not the first choice: on an isolated crater the quadratic takes
        // the ejecta's outward fall for curvature and pulls broad rims outwards.
        let quad = sc.raw.regional(1.6 * r, 2.4 * r, true, &mut sc.regional)?;
        sc.alt.detrend_from(&sc.raw, &quad);
        found = crests_over(&sc.alt, &quad, &plane, r, band, pixel_m);
    }
    let (crest_z, pts) = found;
    if pts.len() < need {
        return None;
    }
    let xy: Vec<(f64, f64)> = pts.iter().map(|p| p.1).collect();
    let (circle, _) = circle_fit::robust_geometric(&xy)?;
    Some(Round {
        plane,
        crest_z,
        circle,
        pts,
    })
}

/// Measure the crater near (lon, lat) with provisional diameter `diameter_guess_m`.
///
/// Fails with [`CraterError::NotMeasurable`] when the rim cannot be traced (too few crests, no
/// data, centre wandering off to another feature) rather than returning made-up numbers.
pub fn measure(
    grid: &ElevationGrid,
    lon_deg: f64,
    lat_deg: f64,
    diameter_guess_m: f64,
    opts: &MeasureOptions,
) -> Result<CraterMeasurement, CraterError> {
    measure_screened(grid, lon_deg, lat_deg, diameter_guess_m, opts, 0.0, None)
}

/// [`measure`], giving up after the first round when the bowl is clearly shallower than
/// `min_depth_to_diameter`: the median crest height over the lowest detrended sample within
/// 0.3 R, over 2 R, below 0.35 of it. That rough depth is never smaller than the final one by
/// much (the lowest sample lies at or below the floor fit), so the screen only saves the
/// survey from fully measuring hollows its shape gates would reject (ours).
///
/// With `gates`, also stops as soon as the fitted diameter or the depth fails
/// [`crate::looks_like_crater`]'s diameter range or depth gate, before the costly floor slopes,
/// ellipse and bootstrap; what passes is the same measurement as without. It also stops when
/// the rim fitted by the first round lies more than 1.5 times outside the diameter range, or
/// by the second round more than 1.3 times: a screen like the shallow one, which on the
/// mosaic measured for it never stopped a measurement that would have passed.
pub(crate) fn measure_screened(
    grid: &ElevationGrid,
    lon_deg: f64,
    lat_deg: f64,
    diameter_guess_m: f64,
    opts: &MeasureOptions,
    min_depth_to_diameter: f64,
    gates: Option<&DetectOptions>,
) -> Result<CraterMeasurement, CraterError> {
    // The thread's buffers are taken out for the call, so a nested call (there is none)
    // would start from fresh ones instead of failing.
    let mut sc = SCRATCH.with(|s| std::mem::take(&mut *s.borrow_mut()));
    let out = measure_in(
        &mut sc,
        grid,
        lon_deg,
        lat_deg,
        diameter_guess_m,
        opts,
        min_depth_to_diameter,
        gates,
    );
    SCRATCH.with(|s| *s.borrow_mut() = sc);
    out
}

// `measure_screened`'s arguments and the thread's scratch buffers.
#[allow(clippy::too_many_arguments)]
fn measure_in(
    sc: &mut Scratch,
    grid: &ElevationGrid,
    lon_deg: f64,
    lat_deg: f64,
    diameter_guess_m: f64,
    opts: &MeasureOptions,
    min_depth_to_diameter: f64,
    gates: Option<&DetectOptions>,
) -> Result<CraterMeasurement, CraterError> {
    let nm = |reason: &str| not_measurable(lon_deg, lat_deg, diameter_guess_m, reason);
    let shallow = |reason: &str| CraterError::BelowDepthGate {
        lon_deg,
        lat_deg,
        diameter_m: diameter_guess_m,
        reason: reason.into(),
    };
    if opts.azimuths < 16
        || !(diameter_guess_m > 0.0)
        || !lon_deg.is_finite()
        || !lat_deg.is_finite()
    {
        return Err(CraterError::Options(format!(
            "measure needs >= 16 azimuths and a positive diameter (got {} and {diameter_guess_m})",
            opts.azimuths
        )));
    }
    let r0 = diameter_guess_m / 2.0;
    let geom = &grid.geometry;
    let (pc, pr) = geom
        .lonlat_to_pixel(lon_deg, lat_deg)
        .ok_or_else(|| nm("position is outside the map projection"))?;
    let (px_x, px_y) = geom
        .pixel_size_m_at(pc, pr)
        .ok_or_else(|| nm("no pixel size at this position"))?;
    let pixel_m = px_x.min(px_y);
    // Room for the centre to move by R/2 and the radius to grow by half while profiles reach 2.5 R.
    let s = LocalSampler::new(grid, lon_deg, lat_deg, r0 * (PROFILE_REACH * 1.5 + 0.6))
        .ok_or_else(|| nm("position is outside the map projection"))?;
    let (mut centre, mut r) = ((0.0, 0.0), r0);
    let mut last = None;
    for it in 0..opts.iterations.max(1) {
        let band = if it == 0 { (0.5, 1.5) } else { (0.7, 1.35) };
        let rd = round(&s, sc, centre, r, band, opts, pixel_m)
            .ok_or_else(|| nm("too few rim crests to fit a circle"))?;
        if it == 0 && min_depth_to_diameter > 0.0 {
            let mut zs: Vec<f64> = rd.pts.iter().map(|&(i, _)| rd.crest_z[i]).collect();
            let k_floor = ((0.3 * r / sc.det.dr) as usize).min(sc.det.n_r - 1);
            let low = (0..sc.det.n_az)
                .flat_map(|i| (0..=k_floor).map(move |k| (i, k)))
                .map(|(i, k)| sc.det.at(i, k))
                .filter(|z| z.is_finite())
                .fold(f64::INFINITY, f64::min);
            if (stats::median(&mut zs) - low) / (2.0 * r) < 0.35 * min_depth_to_diameter {
                return Err(shallow("far too shallow for a crater"));
            }
        }
        // A rim fitted far outside the survey's range after the first rounds does not come
        // back into it: stop (on a 144 Mpx mosaic surveyed for 1-2 km craters, none of 4,152
        // measurements more than 1.5 times out after the first round, nor of 1,950 more than
        // 1.3 times out after the second, passed; ours).
        if let Some(g) = gates {
            let reach = [1.5, 1.3].get(it).copied().unwrap_or(f64::INFINITY);
            if g.outside_range(2.0 * rd.circle.r, reach) {
                return Err(nm("the fitted rim is far outside the diameter range"));
            }
        }
        let moved =
            (rd.circle.cx - centre.0).hypot(rd.circle.cy - centre.1) + (rd.circle.r - r).abs();
        centre = (rd.circle.cx, rd.circle.cy);
        r = rd.circle.r;
        let converged = it > 0 && moved < 0.005 * r;
        if centre.0.hypot(centre.1) > 0.6 * r0 || r > 1.6 * r0 || r < 0.4 * r0 {
            return Err(nm("the rim fit drifted to another feature"));
        }
        if converged {
            // Profiles centred within 0.5% of R of the circle they gave: another round would
            // move nothing that matters, so this one is the final one.
            last = Some(rd);
            break;
        }
    }
    let rd = match last {
        Some(rd) => rd,
        None => round(&s, sc, centre, r, (0.7, 1.35), opts, pixel_m)
            .ok_or_else(|| nm("too few rim crests to fit a circle"))?,
    };
    let circle = rd.circle;
    let (cx, cy, r) = (circle.cx, circle.cy, circle.r);
    if gates.is_some_and(|g| g.outside_range(2.0 * r, 1.0)) {
        return Err(nm("the fitted rim is outside the diameter range"));
    }

    // Coverage over the disc out to 1.5 R, area-weighted (each sample stands for r dr dtheta).
    let p = &sc.det;
    // A raster spanning the whole circle of longitude has no east or west edge.
    let wraps = geom
        .projection
        .x_period(geom.body_radius_m)
        .is_some_and(|per| (per / geom.geotransform[1].abs() - geom.width as f64).abs() < 0.5);
    let (mut w_all, mut w_ok, mut cut) = (0.0, 0.0, false);
    for i in 0..p.n_az {
        for k in 0..p.n_r {
            let rk = k as f64 * p.dr;
            if rk > 1.5 * r {
                break;
            }
            let w = rk.max(0.5 * p.dr);
            w_all += w;
            if p.at(i, k).is_finite() {
                w_ok += w;
            } else {
                let (x, y) = (p.cx + p.dir[i].0 * rk, p.cy + p.dir[i].1 * rk);
                let (c, rr) = s.pixel_of(x, y);
                let (rc, rrow) = (c + grid.col0 as f64, rr + grid.row0 as f64);
                let col_edge = !wraps && (rc < 0.0 || rc > geom.width as f64 - 1.0);
                cut |= s.outside(x, y) || col_edge || rrow < 0.0 || rrow > geom.height as f64 - 1.0;
            }
        }
    }
    let valid_fraction = if w_all > 0.0 { w_ok / w_all } else { 0.0 };
    if valid_fraction < opts.min_valid_fraction {
        return Err(nm(&format!(
            "only {:.0}% of the crater has data",
            100.0 * valid_fraction
        )));
    }

    // Plain: detrended heights 2.0-2.5 R around the profile centre.
    let plain = &mut sc.plain;
    plain.clear();
    for i in 0..p.n_az {
        for k in ((2.0 * r / p.dr).ceil() as usize)..p.n_r {
            let z = p.at(i, k);
            if z.is_finite() && k as f64 * p.dr <= 2.5 * r {
                plain.push(z);
            }
        }
    }
    let plain_level = if plain.is_empty() {
        0.0
    } else {
        stats::median(plain)
    };

    // Rim crests near the fitted circle: completeness, the widest gap, heights.
    let n = opts.azimuths;
    let mut rim_r = vec![f32::NAN; n];
    let mut rim_h = vec![f32::NAN; n];
    let mut rim_pts = Vec::new();
    let mut crest_det = Vec::new();
    for &(i, (x, y)) in &rd.pts {
        let d = (x - cx).hypot(y - cy);
        if (d - r).abs() <= opts.crest_tolerance_frac * r {
            let z = rd.crest_z[i];
            rim_r[i] = d as f32;
            rim_h[i] = (z + rd.plane.at(x, y)) as f32;
            rim_pts.push((x, y));
            crest_det.push(z);
        }
    }
    if rim_pts.len() < 6 {
        return Err(nm("too few rim crests near the fitted circle"));
    }
    let has = rim_present(
        &rim_r,
        &heights_on_circle(&sc.det, (cx, cy), r),
        &crest_det,
        plain_level,
    );
    let completeness = has.iter().filter(|b| **b).count() as f64 / n as f64;
    let (gap_len, gap_mid) = widest_gap(&has);
    let step_deg = 360.0 / n as f64;
    let rim_heights: Vec<f64> = rim_h
        .iter()
        .filter(|v| v.is_finite())
        .map(|&v| v as f64)
        .collect();
    let rim_det_median = stats::median(&mut crest_det.clone());

    let spec = FloorSpec {
        floor_radius_m: (opts.floor_radius_frac * r).max(1.5 * pixel_m),
        wall_inner_m: opts.wall_inner_frac * r,
        wall_outer_m: opts.wall_outer_frac * r,
        obstacle_slope_deg: opts.obstacle_slope_deg,
    };
    // The survey's depth gate, d/D >= least, as a highest floor level; loosened by a hair so
    // rounding never stops a floor the exact test below would pass.
    let least = gates.map_or(0.0, |g| {
        g.min_fraction_of_fresh_depth * crate::survey::fresh_depth_to_diameter(2.0 * r)
    });
    let highest = if least > 0.0 {
        rim_det_median - least * 2.0 * r * (1.0 - 1e-9)
    } else {
        f64::INFINITY
    };
    let fl = match floor::measure(&s, cx, cy, &spec, &rd.plane, highest, &mut sc.floor) {
        Ok(fl) => fl,
        Err(floor::FloorFail::TooFewPixels) => {
            return Err(nm("the floor has too few valid pixels"))
        }
        Err(floor::FloorFail::TooHigh) => return Err(shallow("shallower than the depth gate")),
    };
    let depth = rim_det_median - fl.floor_level_m;
    if !(depth > 0.0) {
        return Err(nm("the rim does not stand above the floor"));
    }
    if depth / (2.0 * r) < least {
        return Err(shallow("shallower than the depth gate"));
    }

    let ell = ellipse_fit::fit(&rim_pts);
    let (major, minor, az) = match ell {
        Some(e) if e.semi_major < 2.0 * r && e.semi_minor > 0.5 * r => {
            (2.0 * e.semi_major, 2.0 * e.semi_minor, e.azimuth_deg)
        }
        _ => (2.0 * r, 2.0 * r, 0.0),
    };
    let (d_sd, depth_sd) = crate::bootstrap::spreads(&rim_pts, &crest_det, fl.floor_level_m, opts);
    let fit_rms = (rim_pts
        .iter()
        .map(|p| ((p.0 - cx).hypot(p.1 - cy) - r).powi(2))
        .sum::<f64>()
        / rim_pts.len() as f64)
        .sqrt();
    let (lon, lat) = s.lonlat(cx, cy);
    let diameter = 2.0 * r;
    Ok(CraterMeasurement {
        centre_lon_deg: lon,
        centre_lat_deg: lat,
        diameter_m: diameter,
        diameter_sd_m: d_sd,
        ellipse_major_m: major,
        ellipse_minor_m: minor,
        ellipticity: if major > 0.0 {
            1.0 - minor / major
        } else {
            0.0
        },
        ellipse_azimuth_deg: az,
        depth_m: depth,
        depth_sd_m: depth_sd,
        depth_to_diameter: depth / diameter,
        rim_relief_m: rim_det_median - plain_level,
        rim_completeness: completeness,
        rim_gap_deg: gap_len as f64 * step_deg,
        rim_gap_azimuth_deg: if gap_len == 0 {
            0.0
        } else {
            (gap_mid * step_deg).rem_euclid(360.0)
        },
        rim_height_sd_m: stats::sd(&rim_heights),
        floor_tilt_deg: fl.tilt_deg,
        floor_tilt_azimuth_deg: fl.tilt_azimuth_deg,
        floor_slope_p95_deg: fl.slope_p95_deg,
        wall_slope_mean_deg: fl.wall_slope_mean_deg,
        roughness_rms_m: fl.roughness_rms_m,
        roughness_baseline_m: fl.baseline_m,
        obstacle_fraction: fl.obstacle_fraction,
        obstacle_slope_threshold_deg: opts.obstacle_slope_deg,
        valid_fraction,
        edge_cut: cut,
        rim_crest_radius_m: rim_r,
        rim_crest_height_m: rim_h,
        floor_height_m: fl.floor_height_m,
        rim_fit_rms_m: fit_rms,
    })
}

/// Which azimuths have a rim. Normally those with an accepted crest near the circle. Where the
/// rim is breached, cut down below the surrounding plain somewhere (the lowest height on the
/// circle below the plain's median), the test is the one a cut rim's own definition implies:
/// an azimuth keeps its rim while its height on the circle stands at least halfway between
/// the intact rim (median crest) and the deepest cut. A cut blended into the rim over some
/// degrees then loses the azimuths cut by more than half, wherever the crest test would stop;
/// and an intact azimuth whose crest is masked by a bump just beside it still counts (ours).
fn rim_present(rim_r: &[f32], circle_h: &[f64], crest_det: &[f64], plain_level: f64) -> Vec<bool> {
    let crest_present: Vec<bool> = rim_r.iter().map(|v| v.is_finite()).collect();
    let lowest = circle_h
        .iter()
        .copied()
        .filter(|h| h.is_finite())
        .fold(f64::INFINITY, f64::min);
    // Comparisons that fail on NaN as well (no breach found).
    use std::cmp::Ordering::{Greater, Less};
    if crest_det.is_empty() || lowest.partial_cmp(&plain_level) != Some(Less) {
        return crest_present;
    }
    let intact = stats::median(&mut crest_det.to_vec());
    let half = 0.5 * (intact + lowest);
    if intact.partial_cmp(&plain_level) != Some(Greater) {
        return crest_present;
    }
    let above: Vec<bool> = circle_h.iter().map(|h| *h >= half).collect();
    // The cut: the run of azimuths below halfway around the lowest one. A breach spans tens
    // of degrees; a narrow dip is a small crater or a pit on the rim, not a breach.
    let n = above.len();
    let Some(low) = circle_h.iter().position(|h| *h == lowest) else {
        return crest_present;
    };
    let run = 1
        + (1..n).take_while(|j| !above[(low + j) % n]).count()
        + (1..n).take_while(|j| !above[(low + n - j) % n]).count();
    if (run as f64) < MIN_BREACH_DEG * n as f64 / 360.0 {
        return crest_present;
    }
    above
}

/// Narrowest cut taken for a breach (ours; the demo's breaches span 60-120 deg).
const MIN_BREACH_DEG: f64 = 45.0;

/// Detrended height of each profile where its ray crosses the circle (centre `c`, radius `r`)
/// in the profiles' frame; NaN where the ray misses it or there is no data.
fn heights_on_circle(p: &Profiles, c: (f64, f64), r: f64) -> Vec<f64> {
    let (ox, oy) = (c.0 - p.cx, c.1 - p.cy);
    let q = ox * ox + oy * oy - r * r;
    (0..p.n_az)
        .map(|i| {
            let b = p.dir[i].0 * ox + p.dir[i].1 * oy;
            let disc = b * b - q;
            if disc.is_nan() || disc < 0.0 {
                return f64::NAN;
            }
            let t = (b + disc.sqrt()) / p.dr;
            let k = t.floor();
            if k.is_nan() || k < 0.0 || k as usize + 1 >= p.n_r {
                return f64::NAN;
            }
            let (k, f) = (k as usize, t - k);
            p.at(i, k) * (1.0 - f) + p.at(i, k + 1) * f
        })
        .collect()
}

/// Longest circular run of azimuths without a crest: (length in azimuth steps, middle index).
fn widest_gap(has: &[bool]) -> (usize, f64) {
    let n = has.len();
    if has.iter().all(|h| !h) {
        return (n, 0.0);
    }
    let start = has.iter().position(|h| *h).unwrap_or(0);
    let (mut best, mut best_mid, mut run) = (0usize, 0.0, 0usize);
    for j in 1..=n {
        let i = (start + j) % n;
        if has[i] {
            run = 0;
        } else {
            run += 1;
            if run > best {
                best = run;
                // Middle of the run that ends at i.
                best_mid = (start + j) as f64 - (run as f64 - 1.0) / 2.0;
            }
        }
    }
    (best, best_mid.rem_euclid(n as f64))
}

#[cfg(test)]
mod tests {
    use super::{measure, measure_screened, widest_gap, MeasureOptions};
    use crate::detect::DetectOptions;

    use crate::test_grids as common;

    /// The survey's early gates change only how soon a failing crater is given up: a bowl
    /// inside the range measures exactly as without them, one outside it (by diameter or by
    /// depth) fails. A rimmed paraboloid 1.2 km across and 150 m deep (d/D 0.125).
    #[test]
    fn gates_stop_early_without_changing_what_passes() {
        let (d, depth) = (1200.0, 150.0);
        let g = common::grid_around(200, 200, 0.0, 180.0, 0.0, |x, y| {
            common::rimmed_bowl(x.hypot(y), d / 2.0, depth, 20.0)
        });
        let opts = MeasureOptions::default();
        let plain = measure(&g, 180.0, 0.0, d, &opts).expect("bowl measures");
        let gates = |lo: f64, hi: f64, frac: f64| DetectOptions {
            diameter_min_m: lo,
            diameter_max_m: hi,
            min_fraction_of_fresh_depth: frac,
            ..DetectOptions::default()
        };
        let run = |o: &DetectOptions| measure_screened(&g, 180.0, 0.0, d, &opts, 0.0, Some(o));
        assert_eq!(run(&gates(1000.0, 1500.0, 0.2)).expect("passes"), plain);
        assert!(
            run(&gates(1300.0, 2000.0, 0.2)).is_err(),
            "too small for the range"
        );
        assert!(
            run(&gates(500.0, 1100.0, 0.2)).is_err(),
            "too large for the range"
        );
        // Fresh d/D at 1.2 km is about 0.197 (Pike 1977, from memory); 0.125 is 0.63 of it.
        assert!(run(&gates(1000.0, 1500.0, 0.6)).is_ok());
        assert!(
            run(&gates(1000.0, 1500.0, 0.7)).is_err(),
            "shallower than the gate"
        );
    }

    #[test]
    fn widest_gap_wraps_around_north() {
        let mut has = vec![true; 8];
        has[7] = false;
        has[0] = false;
        has[1] = false;
        let (len, mid) = widest_gap(&has);
        assert_eq!(len, 3);
        assert!((mid - 0.0).abs() < 1e-9, "{mid}");
    }
}

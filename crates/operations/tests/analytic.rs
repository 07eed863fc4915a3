//! Cases worked out by hand on invented terrain: a paraboloid bowl whose outer slope is seen at
//! one elevation from its centre, a flat floor whose only safe ground is a disc, and a wall
//! with a bench that blocks a shot.

// The visibility crate's synthetic grids (geographic grid from a radial height function).
#[path = "../../visibility/tests/common/mod.rs"]
mod common;

use operations::landing::{landing, LandingLimits, LandingSite};
use operations::relay::RelayOrbit;
use operations::shots::{shots, Point, ShotLimits};
use operations::sky::{above_skyline, Site, SkyTracks, Track};
use visibility::frames::unit;
use visibility::{Horizon, HorizonSpec, HorizonTerrain, NodataRule};

const R: f64 = terrain::MOON_RADIUS_M;
/// Grid spacing, degrees: 30.3 m on the equator.
const PX_DEG: f64 = 0.001;
const PX_M: f64 = R * PX_DEG * std::f64::consts::PI / 180.0;

/// Bowl radius a, mast m, and the tangent t of the elevation at which the rim and all the
/// outer slope stand from the centre.
const A: f64 = 1500.0;
const MAST: f64 = 2.0;
const T: f64 = 0.267_949_192_4; // tan 15 deg

/// Rim height: the outer slope m + d t + d^2 / 2R (the sphere's drop made up) at d = a.
fn rim_m() -> f64 {
    MAST + A * T + A * A / (2.0 * R)
}

/// Inside: the paraboloid z = z_a (d/a)^2; outside: the slope that stays at elevation
/// atan(t) from an observer at the centre, `MAST` above the floor.
fn bowl(d: f64, _az: f64) -> f64 {
    if d <= A {
        rim_m() * (d / A).powi(2)
    } else {
        MAST + d * T + d * d / (2.0 * R)
    }
}

fn skyline(t: &HorizonTerrain, lon: f64, lat: f64, mast: f64) -> Horizon {
    let spec = HorizonSpec {
        observer_height_m: mast,
        max_distance_m: 12_000.0,
        sectors: 720,
        nodata: NodataRule::CountsAgainst,
    };
    Horizon::compute_sectors(lon, lat, Some(t), &spec, None)
}

/// Anchors north, east, south and west, `d_m` from 180 E 0 N, `height_m` above the sphere.
fn four_anchors(d_m: f64, height_m: f64) -> Vec<Point> {
    [0.0, 90.0, 180.0, 270.0]
        .iter()
        .map(|&az| {
            let (lon, lat) = terrain::geodesy::destination(R, (180.0, 0.0), az, d_m);
            Point {
                lon_deg: lon,
                lat_deg: lat,
                height_m,
            }
        })
        .collect()
}

#[test]
fn paraboloid_bowl_by_hand() {
    // Bowl centred at 180 E 0 N, 3 km across, its skyline seen from the centre at
    // e0 = atan(t) = 15 deg all round (the outer slope rises with the sphere's drop made up).
    let grid = common::geographic_grid(180.0, 0.0, 0.25, PX_DEG, bowl);
    let t = HorizonTerrain::new(&grid).unwrap();
    let e0 = T.atan().to_degrees();
    let sky = skyline(&t, 180.0, 0.0, MAST);
    let lowest = sky
        .elevation_deg
        .iter()
        .copied()
        .fold(f64::INFINITY, f64::min);
    let highest = sky
        .elevation_deg
        .iter()
        .copied()
        .fold(f64::NEG_INFINITY, f64::max);
    // The skyline is a lower bound: the arc minimum over a pixel lowers it by about
    // t x (pixel / distance) at the farthest distance read.
    assert!(
        highest <= e0 + 0.01 && lowest > e0 - 0.1,
        "{lowest}..{highest} vs {e0}"
    );

    // The operations' own skyline (the highest node in each sector, swept over the crater's
    // lattice) sees the same 15 deg all round, from above.
    let patch = structure::patch::Patch::build(&grid, 180.0, 0.0, 6000.0, PX_M).unwrap();
    let swept = operations::skyline::sweep(&patch, (0.0, 0.0), MAST, 5000.0, 720).unwrap();
    for (k, e) in swept.elevation_deg.iter().enumerate() {
        assert!((e - e0).abs() < 0.05, "sector {k}: {e} vs {e0}");
    }
    // The ground at the centre from the bilinear grid: the paraboloid 15 m out, 0.04 m.
    assert!(
        (swept.site_height_m - MAST).abs() < 0.1,
        "{}",
        swept.site_height_m
    );

    // Night on the floor: on the equator the Sun crosses the sky through the zenith (its
    // declination stays within 1.6 deg), so its upper limb (0.267 deg) stays below a skyline
    // at e0 for 2 (e0 - 0.267) / 360 of the time more than on open ground:
    // dark fraction 0.5 + (15 - 0.267) / 180 = 0.58185 (domain notes sec. 8).
    let tracks = SkyTracks::compute(&RelayOrbit::circle(13_000.0, 14.0));
    let site = Site::new(180.0, 0.0, sky.site_height_m, R);
    let sun = above_skyline(&tracks.sun, &site, &sky, 0.0);
    let dark = 1.0 - sun.fraction;
    let want = 0.5 + (e0 - 0.267) / 180.0;
    assert!((dark - want).abs() < 0.0015, "dark {dark}, by hand {want}");

    // The relay's cut-off: placed 75 deg of arc from the bowl along the equator at 64,500 km,
    // it stands at atan2(D cos 75 - rho, D sin 75) = 13.5 deg, under the 15 deg skyline.
    let d_km = 64_500.0;
    let relay = Track {
        start_jd_tt: 0.0,
        step_days: 0.25,
        positions_km: vec![unit(255.0, 0.0).map(|c| c * d_km)],
        radius_km: 0.0,
    };
    let rho = site.radius_km;
    let (s, c) = 75f64.to_radians().sin_cos();
    let el = (d_km * c - rho).atan2(d_km * s).to_degrees();
    let a = above_skyline(&relay, &site, &sky, 0.0);
    assert_eq!(a.fraction, 0.0);
    assert!(
        (a.worst_margin_deg - (el - e0)).abs() < 0.1,
        "{a:?} vs {}",
        el - e0
    );
    assert!((a.worst_azimuth_deg - 90.0).abs() < 1e-6);
    // With a margin of -2 deg (accepting 2 deg into the skyline) it is in view.
    let a = above_skyline(&relay, &site, &sky, -2.0);
    assert_eq!(a.fraction, 1.0);

    // Shots from the centre (launcher MAST above the floor) to four anchors on the rim:
    // range sqrt(a^2 + (z_a - m)^2) less the sphere's drop, elevation atan((z_a - m) / a) less
    // half the arc a / R; clearance (1 - u)(m + u (z_a - a^2/2R)) at ground fraction u, lowest
    // at the first sample (u = half a post / a) here.
    let from = Point {
        lon_deg: 180.0,
        lat_deg: 0.0,
        height_m: MAST,
    };
    let anchors = four_anchors(A, rim_m());
    let limits = ShotLimits {
        range_m: 2000.0,
        min_clearance_m: 1.0,
        end_exclusion_m: 60.0,
    };
    let rep = shots(&grid, &from, &anchors, &limits, PX_M).unwrap();
    let za = rim_m();
    let k = A * A / (2.0 * R);
    let range = (A * A + (za - MAST - k).powi(2)).sqrt();
    let elev = ((za - MAST - k) / A).atan().to_degrees();
    let steps = (A / (0.5 * PX_M)).ceil();
    let u1 = 1.0 / steps;
    let clear = (1.0 - u1) * (MAST + u1 * (za - k));
    for s in &rep.shots {
        assert!(
            (s.range_m - range).abs() < 0.5,
            "range {} vs {range}",
            s.range_m
        );
        assert!(
            (s.elevation_deg - elev).abs() < 0.01,
            "elev {} vs {elev}",
            s.elevation_deg
        );
        let c = s.clearance_m.unwrap();
        assert!((c - clear).abs() < 0.1, "clearance {c} vs {clear}");
        assert!(s.reachable);
    }
    assert!(rep.all_reachable);
    // A launcher 10 m short of the range reaches none.
    let short = ShotLimits {
        range_m: range - 10.0,
        ..limits
    };
    assert!(
        !shots(&grid, &from, &anchors, &short, PX_M)
            .unwrap()
            .all_reachable
    );
}

#[test]
fn flat_floor_with_a_safe_disc_matches_the_rayleigh_distribution() {
    // Safe ground only within r of the aim point: flat there, a cone of twice the slope limit
    // beyond (so a node is hazardous from where its Horn window reaches half a post onto the
    // cone, i.e. from r on). The chance of touching down within r of the aim for a circular
    // Gaussian of sigma s is 1 - exp(-r^2 / 2 s^2) (Rayleigh distribution; domain notes
    // sec. 8), here within 1 %.
    let r = 30.0 * PX_M;
    let sigma = 20.0 * PX_M;
    let cone = (24f64).to_radians().tan();
    let grid = common::geographic_grid(180.0, 0.0, 0.12, PX_DEG, move |d, _| {
        if d <= r {
            0.0
        } else {
            (d - r) * cone
        }
    });
    let site = LandingSite {
        crater_lon_deg: 180.0,
        crater_lat_deg: 0.0,
        floor_radius_m: 5.0 * PX_M,
        aim_lon_deg: 180.0,
        aim_lat_deg: 0.0,
    };
    let limits = LandingLimits {
        dispersion_3sigma_m: 3.0 * sigma,
        max_slope_deg: 12.0,
        max_roughness_m: 1.0e4,
    };
    let rep = landing(&grid, &site, &limits, PX_M).unwrap();
    let want = 1.0 - (-(r * r) / (2.0 * sigma * sigma)).exp();
    assert!(
        (rep.p_aim - want).abs() < 0.01 * want,
        "P {} vs Rayleigh {want}",
        rep.p_aim
    );
    // The aim is the centre of the disc: nothing on the floor does better.
    assert!(rep.best_to_aim_m < 1.0, "{rep:?}");
    assert_eq!(rep.safe_fraction, 1.0);
}

#[test]
fn a_bench_on_the_wall_blocks_the_shot_that_crosses_it() {
    // Floor flat out to 700 m, then a wall rising as 400 ((d - 700) / 800)^2 to a rim 400 m
    // high at 1500 m; to the east only, a bench 350 m high from 800 to 1100 m. The line from
    // a launcher 2 m up at the centre to the east anchor is 2 + 398 x 800 / 1500 = 214.3 m up
    // over the bench's inner edge: 135.7 m into it (less where the bilinear ground eases the
    // edge within a post). The other anchors see a clear wall.
    let grid = common::geographic_grid(180.0, 0.0, 0.05, PX_DEG, |d, az| {
        let bench = (az - 90.0).abs() < 30.0 && (800.0..=1100.0).contains(&d);
        if bench {
            350.0
        } else if d < 700.0 {
            0.0
        } else if d < 1500.0 {
            400.0 * ((d - 700.0) / 800.0).powi(2)
        } else {
            400.0
        }
    });
    let from = Point {
        lon_deg: 180.0,
        lat_deg: 0.0,
        height_m: 2.0,
    };
    let anchors = four_anchors(1500.0, 400.0);
    let limits = ShotLimits {
        range_m: 3000.0,
        min_clearance_m: 5.0,
        end_exclusion_m: 60.0,
    };
    let rep = shots(&grid, &from, &anchors, &limits, PX_M).unwrap();
    assert!(!rep.all_reachable);
    assert_eq!(rep.binding_anchor, 2, "{rep:?}");
    let east = &rep.shots[1];
    let c = east.clearance_m.unwrap();
    assert!(c < -125.0 && c > -136.0, "east clearance {c}");
    assert!(
        (east.clearance_at_m.unwrap() - 800.0).abs() < 35.0,
        "{east:?}"
    );
    assert!(!east.reachable);
    for i in [0, 2, 3] {
        assert!(rep.shots[i].reachable, "{:?}", rep.shots[i]);
    }
    assert!((rep.lowest_clearance_m.unwrap() - c).abs() < 1e-9);
}

//! How well a site is hidden from the Earth: the Earth's upper limb against the local horizon,
//! over every sub-Earth point of the libration envelope.
//!
//! For a sub-Earth point at central angle theta from the site, the Earth's centre stands at
//! geocentric elevation 90 - theta in the site's sky, along the great-circle azimuth towards the
//! sub-Earth point. From the site (radius rho = R_moon + h) at Earth distance D the topocentric
//! elevation is atan2(D cos theta - rho, D sin theta) (parallax lowers it by up to
//! asin(rho/D) ~ 0.28 deg) and the upper limb is higher by asin(R_earth / |D - rho|). Near the
//! horizon the limb sits at (90 - theta) + (R_earth - rho)/D, highest at the smallest D, so the
//! envelope's perigee distance (the smallest over the cycle) gives the conservative margin.
//!
//! The worst disc is found by branch and bound (`worst_disc`): no skyline is below the
//! sphere's horizon, which bounds every disc's clearance from below, so over a horizon marched
//! on demand ([`earth_margin_lazy`]) only the discs that can still be the worst are read.

use crate::constants::{EARTH_EQUATORIAL_RADIUS_KM, MOON_RADIUS_KM};
use crate::horizon::{wrap_sector, Horizon, LazyHorizon};
use crate::libration::LibrationEnvelope;
use serde::Serialize;
use terrain::geodesy::{azimuth_deg, central_angle_rad};

/// Topocentric elevations, degrees, of the Earth's centre and upper limb seen from a site of
/// height `site_height_m` when the sub-Earth point is `theta_deg` from it, at distance `d_km`.
pub fn earth_elevation_deg(theta_deg: f64, d_km: f64, site_height_m: f64) -> (f64, f64) {
    let rho = MOON_RADIUS_KM + site_height_m / 1000.0;
    let (s, c) = theta_deg.to_radians().sin_cos();
    let (v, h) = (d_km * c - rho, d_km * s);
    let centre = v.atan2(h).to_degrees();
    let range = v.hypot(h);
    (
        centre,
        centre
            + (EARTH_EQUATORIAL_RADIUS_KM / range)
                .clamp(-1.0, 1.0)
                .asin()
                .to_degrees(),
    )
}

/// The worst case of the Earth against the horizon for one site.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct EarthMargin {
    /// min over the envelope of (skyline - upper limb), degrees. Positive = always hidden.
    pub clearance_deg: f64,
    /// The same against the bare sphere's horizon (0 deg) for an observer on the datum.
    pub clearance_sphere_deg: f64,
    /// Smallest central angle to a sub-Earth point, minus 90 degrees.
    pub limb_margin_deg: f64,
    /// Where the worst case happens: azimuth of the Earth's centre, its upper limb, and the
    /// lowest skyline over the azimuths its disc spans.
    pub worst_azimuth_deg: f64,
    pub worst_limb_elevation_deg: f64,
    pub worst_horizon_deg: f64,
    /// Highest the Earth's upper limb gets over the bare sphere's horizon, degrees.
    pub highest_limb_elevation_deg: f64,
    /// Earth distance used (the envelope's smallest), km.
    pub earth_distance_km: f64,
    /// Whether the Earth can stand at the site's zenith (site inside the envelope).
    pub inside_envelope: bool,
}

/// The sub-Earth points to test from a site: the envelope's outline (every interior point is
/// farther from an outside site along its own azimuth), plus the site itself if the envelope
/// contains it.
fn test_points(env: &LibrationEnvelope, lon_deg: f64, lat_deg: f64) -> (Vec<(f64, f64)>, bool) {
    let inside = env.contains(lon_deg, lat_deg);
    let mut pts = env.outline.clone();
    if inside {
        pts.push((lon_deg, lat_deg));
    }
    (pts, inside)
}

/// Half-width in azimuth, degrees, of a disc of angular radius `radius_deg` whose centre stands
/// at elevation `centre_deg`: asin(sin r / cos e) (the tangents from the zenith to a small
/// circle, spherical trigonometry); 180 when the disc reaches the zenith.
pub fn disc_azimuth_half_width_deg(centre_deg: f64, radius_deg: f64) -> f64 {
    if radius_deg >= 90.0 - centre_deg.abs() {
        return 180.0;
    }
    (radius_deg.to_radians().sin() / centre_deg.to_radians().cos())
        .clamp(-1.0, 1.0)
        .asin()
        .to_degrees()
}

/// The Earth's disc in a site's sky for one sub-Earth point: the azimuths it spans and its
/// upper limb.
struct EarthDisc {
    theta_deg: f64,
    centre_azimuth_deg: f64,
    azimuth_from_deg: f64,
    azimuth_to_deg: f64,
    limb_deg: f64,
}

impl EarthDisc {
    fn new(site: (f64, f64), p: (f64, f64), d_km: f64, site_height_m: f64) -> Self {
        let theta_deg = central_angle_rad(site, p).to_degrees();
        // At the site itself the azimuth is undefined; the disc then spans every azimuth.
        let az = if theta_deg < 1e-9 {
            0.0
        } else {
            azimuth_deg(site, p)
        };
        let (centre, limb) = earth_elevation_deg(theta_deg, d_km, site_height_m);
        let half = disc_azimuth_half_width_deg(centre, limb - centre);
        EarthDisc {
            theta_deg,
            centre_azimuth_deg: az,
            azimuth_from_deg: az - half,
            azimuth_to_deg: az + half,
            limb_deg: limb,
        }
    }
}

/// Which of `n_sectors` azimuth sectors the Earth margin reads: every sector the Earth's disc
/// can reach from the site. The disc is widened by 0.01 deg for the site's height, unknown
/// here (a few km change the Earth's apparent radius by under 1e-4 deg).
pub fn sectors_needed(
    env: &LibrationEnvelope,
    lon_deg: f64,
    lat_deg: f64,
    n_sectors: usize,
) -> Vec<bool> {
    const HEIGHT_PAD_DEG: f64 = 0.01;
    let n = n_sectors.max(4);
    let (pts, inside) = test_points(env, lon_deg, lat_deg);
    if inside {
        return vec![true; n];
    }
    let w = 360.0 / n as f64;
    let mut wanted = vec![false; n];
    for p in pts {
        let disc = EarthDisc::new((lon_deg, lat_deg), p, env.distance_min_km, 0.0);
        let k0 = ((disc.azimuth_from_deg - HEIGHT_PAD_DEG) / w + 0.5).floor() as i64;
        let k1 = ((disc.azimuth_to_deg + HEIGHT_PAD_DEG) / w + 0.5).floor() as i64;
        if k1 - k0 >= n as i64 - 1 {
            return vec![true; n];
        }
        for k in k0..=k1 {
            wanted[wrap_sector(k, n as i64) as usize] = true;
        }
    }
    wanted
}

/// Earth margin of a site with its horizon, over the libration envelope: for every sub-Earth
/// point, the lowest skyline over every azimuth the Earth's disc spans against its upper limb.
pub fn earth_margin(
    env: &LibrationEnvelope,
    lon_deg: f64,
    lat_deg: f64,
    horizon: &Horizon,
) -> EarthMargin {
    // No floor: every disc is read, in outline order (the reference the lazy form matches).
    let floor_deg = f64::NEG_INFINITY;
    margin_over(
        env,
        (lon_deg, lat_deg),
        horizon.site_height_m,
        floor_deg,
        |from, to| horizon.lowest_between(from, to),
    )
}

/// [`earth_margin`] over a horizon marched on demand: the same margin, field for field, with
/// only the sectors of the discs that can still be the worst case marched.
pub fn earth_margin_lazy(
    env: &LibrationEnvelope,
    lon_deg: f64,
    lat_deg: f64,
    horizon: &mut LazyHorizon,
) -> EarthMargin {
    let (height_m, floor_deg) = (horizon.site_height_m, horizon.sphere_horizon_deg);
    margin_over(env, (lon_deg, lat_deg), height_m, floor_deg, |from, to| {
        horizon.lowest_between(from, to)
    })
}

/// The margin from the discs of every test point, with `sky(from, to)` the lowest skyline over
/// an azimuth range, never below `floor_deg`.
fn margin_over(
    env: &LibrationEnvelope,
    site: (f64, f64),
    site_height_m: f64,
    floor_deg: f64,
    sky: impl FnMut(f64, f64) -> f64,
) -> EarthMargin {
    let d_km = env.distance_min_km;
    let (pts, inside) = test_points(env, site.0, site.1);
    let discs: Vec<EarthDisc> = pts
        .iter()
        .map(|&p| EarthDisc::new(site, p, d_km, site_height_m))
        .collect();
    let mut m = EarthMargin {
        clearance_deg: f64::INFINITY,
        clearance_sphere_deg: f64::INFINITY,
        limb_margin_deg: f64::INFINITY,
        worst_azimuth_deg: f64::NAN,
        worst_limb_elevation_deg: f64::NAN,
        worst_horizon_deg: f64::NAN,
        highest_limb_elevation_deg: f64::NEG_INFINITY,
        earth_distance_km: d_km,
        inside_envelope: inside,
    };
    for disc in &discs {
        let (_, limb_datum) = earth_elevation_deg(disc.theta_deg, d_km, 0.0);
        m.clearance_sphere_deg = m.clearance_sphere_deg.min(-limb_datum);
        m.highest_limb_elevation_deg = m.highest_limb_elevation_deg.max(limb_datum);
        m.limb_margin_deg = m.limb_margin_deg.min(disc.theta_deg - 90.0);
    }
    if let Some(w) = worst_disc(&discs, floor_deg, sky) {
        let disc = &discs[w.index];
        m.clearance_deg = w.clearance_deg;
        m.worst_azimuth_deg = disc.centre_azimuth_deg;
        m.worst_limb_elevation_deg = disc.limb_deg;
        m.worst_horizon_deg = w.sky_deg;
    }
    m
}

/// The disc with the least clearance (skyline - upper limb) and the skyline it met.
struct Worst {
    index: usize,
    sky_deg: f64,
    clearance_deg: f64,
}

/// Branch and bound: no skyline is below `floor_deg`, so a disc's clearance is at least
/// `floor_deg - limb`. The discs are visited from the smallest such bound, and the search stops
/// once the next bound exceeds the least clearance found: no disc left can match it. Ties go
/// to the disc first in `discs` order, as in a plain scan with a strict `<`; `None` when no
/// clearance is below +inf (none is a number). With a floor of -inf every disc is read.
fn worst_disc(
    discs: &[EarthDisc],
    floor_deg: f64,
    mut sky: impl FnMut(f64, f64) -> f64,
) -> Option<Worst> {
    let bound = |i: usize| floor_deg - discs[i].limb_deg;
    let mut order: Vec<usize> = (0..discs.len()).collect();
    order.sort_by(|&a, &b| bound(a).total_cmp(&bound(b)).then(a.cmp(&b)));
    let mut best: Option<Worst> = None;
    for i in order {
        if best.as_ref().is_some_and(|w| bound(i) > w.clearance_deg) {
            break;
        }
        let disc = &discs[i];
        let sky_deg = sky(disc.azimuth_from_deg, disc.azimuth_to_deg);
        let c = sky_deg - disc.limb_deg;
        let better = match &best {
            None => c < f64::INFINITY,
            Some(w) => c < w.clearance_deg || (c == w.clearance_deg && i < w.index),
        };
        if better {
            best = Some(Worst {
                index: i,
                sky_deg,
                clearance_deg: c,
            });
        }
    }
    best
}

/// The envelope's outline seen from a site, as (azimuth, elevation of the Earth's centre) in
/// degrees: the boundary of the zone of sky the Earth can occupy, for a polar plot.
pub fn earth_zone_from_site(
    env: &LibrationEnvelope,
    lon_deg: f64,
    lat_deg: f64,
    site_height_m: f64,
) -> Vec<(f64, f64)> {
    let site = (lon_deg, lat_deg);
    env.outline
        .iter()
        .map(|&p| {
            let theta = central_angle_rad(site, p).to_degrees();
            (
                azimuth_deg(site, p),
                earth_elevation_deg(theta, env.distance_min_km, site_height_m).0,
            )
        })
        .collect()
}

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

use crate::constants::{EARTH_EQUATORIAL_RADIUS_KM, MOON_RADIUS_KM};
use crate::horizon::Horizon;
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
    /// Where the worst case happens: azimuth of the Earth, its upper limb and the skyline there.
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

/// Which of `n_azimuths` evenly spaced rays the Earth margin reads: the two rays either side
/// of every azimuth the Earth can stand at (the skyline is interpolated between them).
pub fn rays_needed(
    env: &LibrationEnvelope,
    lon_deg: f64,
    lat_deg: f64,
    n_azimuths: usize,
) -> Vec<bool> {
    let n = n_azimuths.max(4);
    let (pts, inside) = test_points(env, lon_deg, lat_deg);
    if inside {
        return vec![true; n];
    }
    let mut wanted = vec![false; n];
    for p in pts {
        let x = azimuth_deg((lon_deg, lat_deg), p) / 360.0 * n as f64;
        let i = x.floor() as usize;
        for k in [0, 1] {
            wanted[(i + k) % n] = true;
        }
    }
    wanted
}

/// Earth margin of a site with its horizon, over the libration envelope.
pub fn earth_margin(
    env: &LibrationEnvelope,
    lon_deg: f64,
    lat_deg: f64,
    horizon: &Horizon,
) -> EarthMargin {
    let site = (lon_deg, lat_deg);
    let d_km = env.distance_min_km;
    let (pts, inside) = test_points(env, lon_deg, lat_deg);
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
    for &p in &pts {
        let theta_deg = central_angle_rad(site, p).to_degrees();
        // At the site itself the azimuth is undefined; any skyline value bounds it the same way.
        let az = if theta_deg < 1e-9 {
            0.0
        } else {
            azimuth_deg(site, p)
        };
        let (_, limb) = earth_elevation_deg(theta_deg, d_km, horizon.site_height_m);
        let (_, limb_datum) = earth_elevation_deg(theta_deg, d_km, 0.0);
        let sky = horizon.at(az);
        let c = sky - limb;
        if c < m.clearance_deg {
            m.clearance_deg = c;
            m.worst_azimuth_deg = az;
            m.worst_limb_elevation_deg = limb;
            m.worst_horizon_deg = sky;
        }
        m.clearance_sphere_deg = m.clearance_sphere_deg.min(-limb_datum);
        m.highest_limb_elevation_deg = m.highest_limb_elevation_deg.max(limb_datum);
        m.limb_margin_deg = m.limb_margin_deg.min(theta_deg - 90.0);
    }
    m
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

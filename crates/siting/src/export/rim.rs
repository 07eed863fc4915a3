//! The fitted rim as a lon/lat polygon: counter-clockwise exterior ring (RFC 7946 §3.1.6),
//! split at the antimeridian into a multipolygon when it crosses 180 (RFC 7946 §3.1.9).

use craters::CraterMeasurement;
use terrain::geodesy::destination;
use terrain::projection::wrap_deg_180;

/// Vertices of a ring drawn from the fitted circle or ellipse when no crest profile exists.
const FALLBACK_VERTICES: usize = 72;

/// A rim outline in lon/lat degrees (longitudes in [-180, 180]); rings closed.
#[derive(Clone, Debug, PartialEq)]
pub enum RimShape {
    Polygon(Vec<[f64; 2]>),
    /// Pieces either side of the antimeridian, western-most first.
    MultiPolygon(Vec<Vec<[f64; 2]>>),
}

impl RimShape {
    pub fn rings(&self) -> Vec<&[[f64; 2]]> {
        match self {
            RimShape::Polygon(r) => vec![r.as_slice()],
            RimShape::MultiPolygon(rs) => rs.iter().map(|r| r.as_slice()).collect(),
        }
    }

    /// Well-known text, for GDAL.
    pub fn wkt(&self) -> String {
        let ring = |r: &[[f64; 2]]| {
            let pts: Vec<String> = r.iter().map(|p| format!("{} {}", p[0], p[1])).collect();
            format!("(({}))", pts.join(", "))
        };
        match self {
            RimShape::Polygon(r) => format!("MULTIPOLYGON ({})", ring(r)),
            RimShape::MultiPolygon(rs) => {
                format!(
                    "MULTIPOLYGON ({})",
                    rs.iter().map(|r| ring(r)).collect::<Vec<_>>().join(", ")
                )
            }
        }
    }
}

/// Twice the signed area of a ring (shoelace; positive when counter-clockwise).
pub fn signed_area2(ring: &[[f64; 2]]) -> f64 {
    ring.windows(2)
        .map(|w| w[0][0] * w[1][1] - w[1][0] * w[0][1])
        .sum()
}

/// Rim radius (metres) at each azimuth (clockwise from north, evenly spaced from 0): the
/// measured crest where there is one, the fitted ellipse (or circle) elsewhere.
fn radii(c: &CraterMeasurement) -> Vec<(f64, f64)> {
    let fitted = |az_deg: f64| -> f64 {
        let (a, b) = (c.ellipse_major_m / 2.0, c.ellipse_minor_m / 2.0);
        if a > 0.0 && b > 0.0 && a.is_finite() && b.is_finite() {
            let phi = (az_deg - c.ellipse_azimuth_deg).to_radians();
            a * b / ((b * phi.cos()).powi(2) + (a * phi.sin()).powi(2)).sqrt()
        } else {
            c.diameter_m / 2.0
        }
    };
    let crest = &c.rim_crest_radius_m;
    let measured = crest.iter().filter(|r| r.is_finite() && **r > 0.0).count();
    let n = if measured >= 3 {
        crest.len()
    } else {
        FALLBACK_VERTICES
    };
    (0..n)
        .map(|k| {
            let az = k as f64 * 360.0 / n as f64;
            let r = crest
                .get(k)
                .map(|&r| f64::from(r))
                .filter(|r| measured >= 3 && r.is_finite() && *r > 0.0);
            (az, r.unwrap_or_else(|| fitted(az)))
        })
        .collect()
}

/// The rim of `c` on a sphere of `radius_m`; None when the crater has no usable size.
pub fn rim_shape(c: &CraterMeasurement, radius_m: f64) -> Option<RimShape> {
    if !(c.diameter_m.is_finite()
        && c.diameter_m > 0.0
        && c.centre_lon_deg.is_finite()
        && c.centre_lat_deg.is_finite())
    {
        return None;
    }
    let centre = (wrap_deg_180(c.centre_lon_deg), c.centre_lat_deg);
    // Azimuths run clockwise, so walk them backwards for a counter-clockwise ring. Longitudes
    // are unwrapped around the centre so the ring is continuous even across 180.
    let mut ring: Vec<[f64; 2]> = radii(c)
        .into_iter()
        .rev()
        .map(|(az, r)| {
            let (lon, lat) = destination(radius_m, centre, az, r);
            [centre.0 + wrap_deg_180(lon - centre.0), lat]
        })
        .collect();
    if ring.iter().any(|p| !p[0].is_finite() || !p[1].is_finite()) {
        return None;
    }
    let first = ring[0];
    ring.push(first);
    let (lo, hi) = ring.iter().fold((f64::MAX, f64::MIN), |(lo, hi), p| {
        (lo.min(p[0]), hi.max(p[0]))
    });
    let shape = if hi > 180.0 {
        split(&ring, 180.0)
    } else if lo < -180.0 {
        split(&ring, -180.0)
    } else {
        RimShape::Polygon(ring)
    };
    Some(round_shape(shape))
}

/// Clip the unwrapped ring at longitude `cut` (+-180) and move the outer piece by 360 degrees.
fn split(ring: &[[f64; 2]], cut: f64) -> RimShape {
    let inner = clip(ring, cut, cut < 0.0);
    let outer: Vec<[f64; 2]> = clip(ring, cut, cut > 0.0)
        .into_iter()
        .map(|p| [p[0] - cut.signum() * 360.0, p[1]])
        .collect();
    let mut parts: Vec<Vec<[f64; 2]>> = [inner, outer]
        .into_iter()
        .filter(|r| r.len() >= 4)
        .collect();
    parts.sort_by(|a, b| a[0][0].total_cmp(&b[0][0]));
    match parts.len() {
        1 => RimShape::Polygon(parts.remove(0)),
        _ => RimShape::MultiPolygon(parts),
    }
}

/// Sutherland-Hodgman clipping (Sutherland and Hodgman 1974, Comm. ACM 17:32) of a closed ring
/// against the half-plane lon >= cut (`keep_east`) or lon <= cut; returns a closed ring.
fn clip(ring: &[[f64; 2]], cut: f64, keep_east: bool) -> Vec<[f64; 2]> {
    let inside = |p: [f64; 2]| if keep_east { p[0] >= cut } else { p[0] <= cut };
    let mut out: Vec<[f64; 2]> = Vec::new();
    for w in ring.windows(2) {
        let (a, b) = (w[0], w[1]);
        let crossing = || {
            let t = (cut - a[0]) / (b[0] - a[0]);
            [cut, a[1] + t * (b[1] - a[1])]
        };
        match (inside(a), inside(b)) {
            (true, true) => out.push(b),
            (true, false) => out.push(crossing()),
            (false, true) => {
                out.push(crossing());
                out.push(b);
            }
            (false, false) => {}
        }
    }
    out.dedup();
    if let Some(&first) = out.first() {
        if out.last() != Some(&first) {
            out.push(first);
        }
    }
    out
}

/// Coordinates to 1e-9 degree (about 0.03 mm on the Moon): stable text, no false precision.
fn round_shape(s: RimShape) -> RimShape {
    let r = |ring: Vec<[f64; 2]>| {
        ring.into_iter()
            .map(|p| [round9(p[0]), round9(p[1])])
            .collect()
    };
    match s {
        RimShape::Polygon(ring) => RimShape::Polygon(r(ring)),
        RimShape::MultiPolygon(rings) => RimShape::MultiPolygon(rings.into_iter().map(r).collect()),
    }
}

pub(crate) fn round9(v: f64) -> f64 {
    let r = (v * 1e9).round() / 1e9;
    if r == 0.0 {
        0.0
    } else {
        r
    }
}

//! Map projections on a sphere, closed form (Snyder 1987, "Map Projections: A Working Manual",
//! USGS Professional Paper 1395: equirectangular §12, polar stereographic §21, orthographic §20).
//!
//! Why not call PROJ per pixel: a survey converts hundreds of millions of coordinates, and the
//! spherical formulas are exact for the sphere every lunar product uses. The tests check each
//! formula against PROJ itself.

use serde::{Deserialize, Serialize};
use std::f64::consts::FRAC_PI_4;

/// A map projection of a sphere of radius `radius_m`, with false easting/northing in metres.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum MapProjection {
    /// Plain longitude/latitude in degrees (x = lon, y = lat).
    Geographic,
    /// Simple cylindrical: x = R (lon - lon0) cos(lat_ts), y = R lat.
    Equirectangular {
        lon0_deg: f64,
        lat_ts_deg: f64,
        false_easting_m: f64,
        false_northing_m: f64,
    },
    /// Polar stereographic on the north or south pole, true scale at `lat_ts_deg`.
    PolarStereographic {
        south: bool,
        lon0_deg: f64,
        lat_ts_deg: f64,
        false_easting_m: f64,
        false_northing_m: f64,
    },
    /// Orthographic view centred on (lon0, lat0).
    Orthographic {
        lon0_deg: f64,
        lat0_deg: f64,
        false_easting_m: f64,
        false_northing_m: f64,
    },
}

/// Wrap a longitude difference into [-180, 180).
pub fn wrap_deg_180(d: f64) -> f64 {
    let w = (d + 180.0).rem_euclid(360.0) - 180.0;
    if w.is_nan() {
        d
    } else {
        w
    }
}

impl MapProjection {
    /// Forward: lon/lat in degrees to map x/y (metres, or degrees for `Geographic`).
    /// Returns `None` where the projection is undefined (the far hemisphere of an orthographic view,
    /// the opposite pole of a polar stereographic one).
    pub fn forward(&self, radius_m: f64, lon_deg: f64, lat_deg: f64) -> Option<(f64, f64)> {
        let r = radius_m;
        match *self {
            MapProjection::Geographic => Some((lon_deg, lat_deg)),
            MapProjection::Equirectangular {
                lon0_deg,
                lat_ts_deg,
                false_easting_m,
                false_northing_m,
            } => {
                let dl = wrap_deg_180(lon_deg - lon0_deg).to_radians();
                Some((
                    false_easting_m + r * dl * lat_ts_deg.to_radians().cos(),
                    false_northing_m + r * lat_deg.to_radians(),
                ))
            }
            MapProjection::PolarStereographic {
                south,
                lon0_deg,
                lat_ts_deg,
                false_easting_m,
                false_northing_m,
            } => {
                let k0 = (1.0 + lat_ts_deg.to_radians().sin().abs()) / 2.0;
                let phi = lat_deg.to_radians();
                let dl = (lon_deg - lon0_deg).to_radians();
                let rho = if south {
                    if lat_deg >= 90.0 {
                        return None;
                    }
                    2.0 * r * k0 * (FRAC_PI_4 + phi / 2.0).tan()
                } else {
                    if lat_deg <= -90.0 {
                        return None;
                    }
                    2.0 * r * k0 * (FRAC_PI_4 - phi / 2.0).tan()
                };
                let (x, y) = if south {
                    (rho * dl.sin(), rho * dl.cos())
                } else {
                    (rho * dl.sin(), -rho * dl.cos())
                };
                Some((false_easting_m + x, false_northing_m + y))
            }
            MapProjection::Orthographic {
                lon0_deg,
                lat0_deg,
                false_easting_m,
                false_northing_m,
            } => {
                let (phi, phi0) = (lat_deg.to_radians(), lat0_deg.to_radians());
                let dl = (lon_deg - lon0_deg).to_radians();
                let cosc = phi0.sin() * phi.sin() + phi0.cos() * phi.cos() * dl.cos();
                if cosc < 0.0 {
                    return None;
                }
                let x = r * phi.cos() * dl.sin();
                let y = r * (phi0.cos() * phi.sin() - phi0.sin() * phi.cos() * dl.cos());
                Some((false_easting_m + x, false_northing_m + y))
            }
        }
    }

    /// Inverse: map x/y to lon/lat in degrees, longitude in [-180, 180).
    pub fn inverse(&self, radius_m: f64, x: f64, y: f64) -> Option<(f64, f64)> {
        let r = radius_m;
        let (lon, lat) = match *self {
            MapProjection::Geographic => (x, y),
            MapProjection::Equirectangular {
                lon0_deg,
                lat_ts_deg,
                false_easting_m,
                false_northing_m,
            } => {
                let lat = ((y - false_northing_m) / r).to_degrees();
                // Products round their pixel scale (LOLA: 7580.84 m), so edges may overshoot the pole slightly.
                if lat.abs() > 90.0 + 1e-3 {
                    return None;
                }
                let lon = lon0_deg
                    + ((x - false_easting_m) / (r * lat_ts_deg.to_radians().cos())).to_degrees();
                (lon, lat.clamp(-90.0, 90.0))
            }
            MapProjection::PolarStereographic {
                south,
                lon0_deg,
                lat_ts_deg,
                false_easting_m,
                false_northing_m,
            } => {
                let k0 = (1.0 + lat_ts_deg.to_radians().sin().abs()) / 2.0;
                let (x, y) = (x - false_easting_m, y - false_northing_m);
                let rho = x.hypot(y);
                let c = 2.0 * (rho / (2.0 * r * k0)).atan();
                if south {
                    let lat = -(std::f64::consts::FRAC_PI_2 - c);
                    (lon0_deg + x.atan2(y).to_degrees(), lat.to_degrees())
                } else {
                    let lat = std::f64::consts::FRAC_PI_2 - c;
                    (lon0_deg + x.atan2(-y).to_degrees(), lat.to_degrees())
                }
            }
            MapProjection::Orthographic {
                lon0_deg,
                lat0_deg,
                false_easting_m,
                false_northing_m,
            } => {
                let (x, y) = (x - false_easting_m, y - false_northing_m);
                let rho = x.hypot(y);
                if rho > r * (1.0 + 1e-12) {
                    return None;
                }
                let phi0 = lat0_deg.to_radians();
                if rho == 0.0 {
                    return Some((wrap_deg_180(lon0_deg), lat0_deg));
                }
                let c = (rho / r).min(1.0).asin();
                let lat = (c.cos() * phi0.sin() + y * c.sin() * phi0.cos() / rho).asin();
                let lon = lon0_deg.to_radians()
                    + (x * c.sin()).atan2(rho * phi0.cos() * c.cos() - y * phi0.sin() * c.sin());
                (lon.to_degrees(), lat.to_degrees())
            }
        };
        Some((wrap_deg_180(lon), lat))
    }

    /// Longitude period in map x units, where the map x wraps around the body (cylindrical grids).
    pub fn x_period(&self, radius_m: f64) -> Option<f64> {
        match *self {
            MapProjection::Geographic => Some(360.0),
            MapProjection::Equirectangular { lat_ts_deg, .. } => {
                Some(2.0 * std::f64::consts::PI * radius_m * lat_ts_deg.to_radians().cos())
            }
            _ => None,
        }
    }

    /// Parse the PROJ string GDAL gives for a spatial reference (`+proj=eqc +lat_ts=0 ...`).
    pub fn from_proj4(proj4: &str) -> Result<(MapProjection, Option<f64>), String> {
        let mut kind = "";
        let mut p = std::collections::HashMap::new();
        for tok in proj4.split_whitespace() {
            let tok = tok.trim_start_matches('+');
            if let Some((k, v)) = tok.split_once('=') {
                if k == "proj" {
                    kind = v;
                } else {
                    p.insert(k.to_string(), v.to_string());
                }
            }
        }
        let num = |k: &str| p.get(k).and_then(|v| v.parse::<f64>().ok()).unwrap_or(0.0);
        let radius = p
            .get("R")
            .or_else(|| p.get("a"))
            .and_then(|v| v.parse::<f64>().ok());
        let (fe, fn_) = (num("x_0"), num("y_0"));
        let proj = match kind {
            "longlat" | "latlong" | "lonlat" | "latlon" => MapProjection::Geographic,
            "eqc" => MapProjection::Equirectangular { lon0_deg: num("lon_0"), lat_ts_deg: num("lat_ts"), false_easting_m: fe, false_northing_m: fn_ },
            "stere" | "ups" | "sterea" => {
                let lat0 = num("lat_0");
                if (lat0.abs() - 90.0).abs() > 1e-6 {
                    return Err(format!("oblique stereographic (lat_0={lat0}) is not supported; only polar"));
                }
                // A scale factor k at the pole is the same as true scale at the latitude where
                // (1 + sin|lat_ts|)/2 = k (Snyder 1987 eq. 21-35 on the sphere).
                let k = p.get("k_0").or_else(|| p.get("k")).and_then(|v| v.parse::<f64>().ok());
                let lat_ts = match (p.get("lat_ts").and_then(|v| v.parse::<f64>().ok()), k) {
                    (Some(ts), _) => ts,
                    (None, Some(k)) if (0.5..=1.0).contains(&k) => (2.0 * k - 1.0).asin().to_degrees().copysign(lat0),
                    (None, Some(k)) => return Err(format!("polar stereographic scale factor k={k} is outside 0.5..1")),
                    (None, None) => lat0,
                };
                MapProjection::PolarStereographic { south: lat0 < 0.0, lon0_deg: num("lon_0"), lat_ts_deg: lat_ts, false_easting_m: fe, false_northing_m: fn_ }
            }
            "ortho" => MapProjection::Orthographic { lon0_deg: num("lon_0"), lat0_deg: num("lat_0"), false_easting_m: fe, false_northing_m: fn_ },
            "" => return Err("the spatial reference has no projection".into()),
            other => return Err(format!("map projection '{other}' is not supported (use equirectangular, polar stereographic, orthographic or geographic)")),
        };
        Ok((proj, radius))
    }
}

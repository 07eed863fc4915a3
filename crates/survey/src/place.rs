//! How a place and a candidate are written for a person: one longitude convention and one
//! candidate name, chosen here and read by every screen, printed table and export note.
//!
//! Longitudes inside the program are degrees east in any range (docs/ARCHITECTURE.md,
//! "Invariants"); only what a person reads is brought into the user's chosen range. Both
//! ranges are in use for the Moon: the IAU working group gives planetocentric longitude
//! positive east (Archinal et al. 2018, Celest. Mech. Dyn. Astron. 130:22), and products
//! come as 0..360 E or as -180..180 (domain-notes §2).

use serde::{Deserialize, Serialize};

/// Which range longitudes are shown in. Both are degrees east.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum LonConvention {
    /// -180..180, east positive: "-170.000°".
    #[default]
    Signed180,
    /// 0..360 east: "190.000° E". Keeps the far side (centred on 180) in one piece.
    East360,
}

impl LonConvention {
    pub const ALL: [LonConvention; 2] = [LonConvention::Signed180, LonConvention::East360];

    /// What a menu calls the convention.
    pub fn label(self) -> &'static str {
        match self {
            LonConvention::Signed180 => "-180..180°",
            LonConvention::East360 => "0..360° E",
        }
    }

    /// `lon_deg` (degrees east, any range) brought into this convention's range:
    /// [-180, 180) or [0, 360).
    pub fn normalise(self, lon_deg: f64) -> f64 {
        if !lon_deg.is_finite() {
            return lon_deg;
        }
        match self {
            LonConvention::Signed180 => {
                let w = terrain::projection::wrap_deg_180(lon_deg);
                // rem_euclid can round up to the full turn for a value a hair below it.
                if w >= 180.0 {
                    w - 360.0
                } else {
                    w
                }
            }
            LonConvention::East360 => {
                let w = lon_deg.rem_euclid(360.0);
                if w >= 360.0 {
                    0.0
                } else {
                    w
                }
            }
        }
    }

    /// A longitude as a person reads it, with `decimals` places: "-170.5°" or "189.5° E".
    /// A value that rounds to the end of the range is written at its start ("0° E", never
    /// "360° E").
    pub fn format_lon(self, lon_deg: f64, decimals: usize) -> String {
        if !lon_deg.is_finite() {
            return "no value".to_string();
        }
        // Round first, then wrap, so 359.9996 with 3 decimals reads "0.000° E".
        let scale = 10f64.powi(decimals.min(9) as i32);
        let v = self.normalise((self.normalise(lon_deg) * scale).round() / scale);
        let v = if v == 0.0 { 0.0 } else { v }; // no "-0°"
        match self {
            LonConvention::Signed180 => format!("{v:.decimals$}°"),
            LonConvention::East360 => format!("{v:.decimals$}° E"),
        }
    }
}

/// A latitude as a person reads it: planetocentric, north positive, "-45.250°".
pub fn format_lat(lat_deg: f64, decimals: usize) -> String {
    if !lat_deg.is_finite() {
        return "no value".to_string();
    }
    let scale = 10f64.powi(decimals.min(9) as i32);
    let v = (lat_deg * scale).round() / scale;
    let v = if v == 0.0 { 0.0 } else { v };
    format!("{v:.decimals$}°")
}

/// Why a typed position could not be read.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum PlaceParseError {
    #[error("type a longitude and a latitude, e.g. \"190.5, -45.2\"")]
    NotTwoNumbers,
    #[error("{0:?} is not a number")]
    NotANumber(String),
    #[error("latitude {0} is outside -90..90")]
    LatitudeOutOfRange(f64),
}

/// Read "lon, lat" typed by a person: two numbers separated by a comma or spaces, longitude
/// first. Either longitude range is accepted (190 and -170 are the same place); a trailing
/// E/W on the longitude and N/S on the latitude are honoured ("170 W, 45 S").
pub fn parse_lonlat(text: &str) -> Result<(f64, f64), PlaceParseError> {
    let tokens: Vec<&str> = text
        .split(|c: char| c == ',' || c == ';' || c.is_whitespace())
        .filter(|t| !t.is_empty())
        .collect();
    // A hemisphere letter may stand apart from its number: "170 W 45 S".
    let mut values: Vec<String> = Vec::new();
    for t in tokens {
        let is_letter = matches!(t.to_ascii_uppercase().as_str(), "E" | "W" | "N" | "S");
        match values.last_mut() {
            Some(last) if is_letter => last.push_str(t),
            _ => values.push(t.to_string()),
        }
    }
    let [lon, lat] = values.as_slice() else {
        return Err(PlaceParseError::NotTwoNumbers);
    };
    let lon_deg = signed_number(lon, 'E', 'W')?;
    let lat_deg = signed_number(lat, 'N', 'S')?;
    if !(-90.0..=90.0).contains(&lat_deg) {
        return Err(PlaceParseError::LatitudeOutOfRange(lat_deg));
    }
    Ok((lon_deg, lat_deg))
}

/// A number with an optional degree sign and hemisphere letter (`plus` keeps the sign,
/// `minus` flips it).
fn signed_number(token: &str, plus: char, minus: char) -> Result<f64, PlaceParseError> {
    let t = token.trim().trim_end_matches('°');
    let upper = t.to_ascii_uppercase();
    let (body, sign) = if let Some(b) = upper.strip_suffix(plus) {
        (b.to_string(), 1.0)
    } else if let Some(b) = upper.strip_suffix(minus) {
        (b.to_string(), -1.0)
    } else {
        (upper, 1.0)
    };
    let body = body.trim().trim_end_matches('°');
    body.parse::<f64>()
        .ok()
        .filter(|v| v.is_finite())
        .map(|v| v * sign)
        .ok_or_else(|| PlaceParseError::NotANumber(token.to_string()))
}

/// How a candidate is named for a person (screens, printed tables, notes): stable across
/// rankings and criteria, because it is the survey's id. Files keep the bare integer id.
pub fn candidate_name(id: u32) -> String {
    format!("C-{id:05}")
}

#[cfg(test)]
mod tests {
    use super::*;

    // Check values: a longitude 170 degrees west of the prime meridian is 190 degrees east,
    // since a full turn is 360 degrees (definition of east longitude, IAU WGCCRE, Archinal et
    // al. 2018); the far side is centred on 180 (domain-notes §2).
    #[test]
    fn the_two_conventions_name_the_same_meridian() {
        let s = LonConvention::Signed180;
        let e = LonConvention::East360;
        assert_eq!(s.format_lon(190.0, 0), "-170°");
        assert_eq!(e.format_lon(-170.0, 0), "190° E");
        assert_eq!(e.format_lon(190.0, 1), "190.0° E");
        assert_eq!(s.format_lon(-170.25, 2), "-170.25°");
        // The far side's centre: one value in each range.
        assert_eq!(s.format_lon(180.0, 0), "-180°");
        assert_eq!(e.format_lon(-180.0, 0), "180° E");
        // The prime meridian, from either side of it.
        assert_eq!(e.format_lon(360.0, 0), "0° E");
        assert_eq!(e.format_lon(-0.0, 0), "0° E");
        assert_eq!(s.format_lon(-0.0001, 2), "0.00°");
    }

    #[test]
    fn rounding_never_writes_the_end_of_the_range() {
        assert_eq!(LonConvention::East360.format_lon(359.9996, 3), "0.000° E");
        assert_eq!(
            LonConvention::Signed180.format_lon(179.9996, 3),
            "-180.000°"
        );
        assert_eq!(LonConvention::East360.format_lon(-0.0004, 3), "0.000° E");
    }

    #[test]
    fn normalise_keeps_each_range_half_open() {
        for (lon, s, e) in [
            (0.0, 0.0, 0.0),
            (190.0, -170.0, 190.0),
            (-190.0, 170.0, 170.0),
            (540.0, -180.0, 180.0),
            (-720.0, 0.0, 0.0),
        ] {
            assert_eq!(LonConvention::Signed180.normalise(lon), s, "{lon}");
            assert_eq!(LonConvention::East360.normalise(lon), e, "{lon}");
        }
    }

    #[test]
    fn latitudes_are_signed_north_positive() {
        assert_eq!(format_lat(-45.25, 2), "-45.25°");
        assert_eq!(format_lat(-0.0001, 1), "0.0°");
        assert_eq!(format_lat(f64::NAN, 1), "no value");
    }

    #[test]
    fn typed_places_are_read_in_either_range_and_with_hemispheres() {
        assert_eq!(parse_lonlat("190.5, -45.2"), Ok((190.5, -45.2)));
        assert_eq!(parse_lonlat(" -169.5  -45.2 "), Ok((-169.5, -45.2)));
        assert_eq!(parse_lonlat("170 W, 45 S"), Ok((-170.0, -45.0)));
        assert_eq!(parse_lonlat("170°E; 12.5°N"), Ok((170.0, 12.5)));
        assert_eq!(
            parse_lonlat("190"),
            Err(PlaceParseError::NotTwoNumbers),
            "one number"
        );
        assert!(matches!(
            parse_lonlat("east, 10"),
            Err(PlaceParseError::NotANumber(_))
        ));
        assert_eq!(
            parse_lonlat("10, 95"),
            Err(PlaceParseError::LatitudeOutOfRange(95.0))
        );
        assert!(parse_lonlat("nan, 10").is_err());
    }

    #[test]
    fn candidate_names_are_zero_padded_ids() {
        assert_eq!(candidate_name(12), "C-00012");
        assert_eq!(candidate_name(123_456), "C-123456");
    }
}

//! Seeds from a crater catalogue: a list of craters to measure instead of, or as well as,
//! detecting.
//!
//! Accepted inputs:
//! - CSV (`.csv`, `.txt`): a header row naming the columns, case-insensitive, any order:
//!   `lon_deg`, `lat_deg` and one of `diameter_m` or `diameter_km`; optionally `name`.
//!   Separated by commas, semicolons or tabs: the first of these that makes the header row
//!   name those columns separates the whole file. Fields follow RFC 4180: a field in double
//!   quotes may hold the separator, a doubled quote (`""`) and line breaks, and a row is
//!   numbered by the line it starts on. A leading UTF-8 byte-order mark is ignored; blank
//!   lines and lines starting with `#` are ignored. Numbers take a decimal point.
//!   Longitudes may run 0..360 or -180..180.
//! - Any vector file GDAL/OGR reads (GeoJSON, GeoPackage, shapefile, ...), first layer, in
//!   lon/lat: points carry a `diameter_m` or `diameter_km` attribute; polygons (rim outlines)
//!   give the circle of equal area, centred on the polygon's area centroid.
//!
//! Each bad row is reported with its line (CSV) or feature number (vector, 1-based); in
//! [`OnBadRow::Stop`] mode the first one ends the read with an error and nothing is returned.

mod csv;
mod ogr;

use crate::error::CraterError;
use serde::{Deserialize, Serialize};
use std::path::Path;
use terrain::LocalFrame;

/// One crater from a catalogue.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct CatalogueRow {
    /// Line number (CSV) or feature number (vector), 1-based.
    pub line: usize,
    /// Longitude in [-180, 180).
    pub lon_deg: f64,
    pub lat_deg: f64,
    pub diameter_m: f64,
    pub name: Option<String>,
}

/// A row that could not be used, and why.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct RowProblem {
    pub line: usize,
    pub reason: String,
}

/// What to do with a bad row.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum OnBadRow {
    /// Skip it and report it among the problems.
    Skip,
    /// Fail the whole read.
    Stop,
}

/// Read a catalogue. Returns the good rows and the problems with the skipped ones.
pub fn read(
    path: impl AsRef<Path>,
    on_bad: OnBadRow,
) -> Result<(Vec<CatalogueRow>, Vec<RowProblem>), CraterError> {
    read_on(path, on_bad, terrain::MOON_RADIUS_M)
}

/// As [`read`], on a body of `radius_m` (used for polygon areas).
pub fn read_on(
    path: impl AsRef<Path>,
    on_bad: OnBadRow,
    radius_m: f64,
) -> Result<(Vec<CatalogueRow>, Vec<RowProblem>), CraterError> {
    let path = path.as_ref();
    if !path.exists() {
        return Err(CraterError::Catalogue {
            path: path.into(),
            reason: "no such file".into(),
        });
    }
    let ext = path
        .extension()
        .and_then(|e| e.to_str())
        .unwrap_or("")
        .to_ascii_lowercase();
    collect(path, on_bad, |sink| {
        if ext == "csv" || ext == "txt" {
            csv::read(path, sink)
        } else {
            ogr::read(path, radius_m, sink)
        }
    })
}

/// Read a CSV catalogue held in memory (the bytes of a `.csv` file), exactly as [`read`] reads
/// one from disk. `name` only labels errors (a file name, or e.g. `<clipboard>`).
pub fn read_csv_bytes(
    bytes: &[u8],
    name: impl AsRef<Path>,
    on_bad: OnBadRow,
) -> Result<(Vec<CatalogueRow>, Vec<RowProblem>), CraterError> {
    let name = name.as_ref();
    collect(name, on_bad, |sink| csv::parse(bytes, name, sink))
}

type Sink<'a> = dyn FnMut(Result<CatalogueRow, RowProblem>) -> Result<(), CraterError> + 'a;

/// Run a format reader, keeping good rows and either keeping or stopping on bad ones.
fn collect(
    path: &Path,
    on_bad: OnBadRow,
    reader: impl FnOnce(&mut Sink<'_>) -> Result<(), CraterError>,
) -> Result<(Vec<CatalogueRow>, Vec<RowProblem>), CraterError> {
    let mut rows = Vec::new();
    let mut problems = Vec::new();
    let mut sink = |r: Result<CatalogueRow, RowProblem>| -> Result<(), CraterError> {
        match r {
            Ok(row) => rows.push(row),
            Err(p) if on_bad == OnBadRow::Stop => {
                return Err(CraterError::CatalogueRow {
                    path: path.into(),
                    line: p.line,
                    reason: p.reason,
                });
            }
            Err(p) => problems.push(p),
        }
        Ok(())
    };
    reader(&mut sink)?;
    Ok((rows, problems))
}

/// Check and normalise one crater's numbers.
fn check(
    line: usize,
    lon: f64,
    lat: f64,
    diameter_m: f64,
    name: Option<String>,
) -> Result<CatalogueRow, RowProblem> {
    let bad = |reason: String| RowProblem { line, reason };
    if !lon.is_finite() || !(-180.0..=360.0).contains(&lon) {
        return Err(bad(format!("longitude {lon} is outside -180..360")));
    }
    if !lat.is_finite() || !(-90.0..=90.0).contains(&lat) {
        return Err(bad(format!("latitude {lat} is outside -90..90")));
    }
    if !(diameter_m.is_finite() && diameter_m > 0.0) {
        return Err(bad(format!(
            "diameter {diameter_m} m is not a positive number"
        )));
    }
    Ok(CatalogueRow {
        line,
        lon_deg: terrain::projection::wrap_deg_180(lon),
        lat_deg: lat,
        diameter_m,
        name,
    })
}

/// Circle of equal area to a closed ring of lon/lat vertices (outer ring minus holes): centre
/// (area centroid, shoelace formula) and diameter, computed in a local azimuthal equidistant
/// frame around the vertices' mean, which keeps areas true to well under a percent for rings
/// up to a few hundred kilometres across.
pub fn equal_area_circle(
    radius_m: f64,
    outer: &[(f64, f64)],
    holes: &[Vec<(f64, f64)>],
) -> Option<(f64, f64, f64)> {
    if outer.len() < 3 {
        return None;
    }
    // Mean longitude unwrapped around the first vertex, so rings across 180 stay whole.
    let l0 = outer[0].0;
    let unwrap = |l: f64| l0 + terrain::projection::wrap_deg_180(l - l0);
    let n = outer.len() as f64;
    let (ml, mp) = outer
        .iter()
        .fold((0.0, 0.0), |a, p| (a.0 + unwrap(p.0) / n, a.1 + p.1 / n));
    let frame = LocalFrame::new(radius_m, ml, mp);
    let ring = |r: &[(f64, f64)]| -> (f64, f64, f64) {
        let pts: Vec<(f64, f64)> = r.iter().map(|p| frame.to_local(p.0, p.1)).collect();
        let (mut a, mut cx, mut cy) = (0.0, 0.0, 0.0);
        for i in 0..pts.len() {
            let (p, q) = (pts[i], pts[(i + 1) % pts.len()]);
            let cr = p.0 * q.1 - q.0 * p.1;
            a += cr;
            cx += (p.0 + q.0) * cr;
            cy += (p.1 + q.1) * cr;
        }
        let a = a / 2.0;
        if a == 0.0 {
            return (0.0, 0.0, 0.0);
        }
        (a.abs(), cx / (6.0 * a), cy / (6.0 * a))
    };
    let (mut area, ox, oy) = ring(outer);
    let (mut sx, mut sy) = (ox * area, oy * area);
    for h in holes {
        let (ha, hx, hy) = ring(h);
        area -= ha;
        sx -= hx * ha;
        sy -= hy * ha;
    }
    if !(area > 0.0) {
        return None;
    }
    let (lon, lat) = frame.to_lonlat(sx / area, sy / area);
    Some((lon, lat, 2.0 * (area / std::f64::consts::PI).sqrt()))
}

//! GeoJSON (RFC 7946) export: a FeatureCollection with one Feature per candidate, its rim as
//! geometry, its numbers as properties, and foreign members (RFC 7946 §6.1) naming the body,
//! the CRS, the provenance and the screening caution.
//!
//! Layout: one feature per line, keys sorted, so the file diffs well and reruns match byte
//! for byte.

use std::collections::BTreeMap;
use std::path::Path;

use serde_json::{json, Value};

use super::rim::{rim_shape, round9, RimShape};
use super::{row, Cell, ExportSet, MOON_CRS};
use crate::SitingError;

fn number(v: Option<f64>) -> Value {
    v.filter(|v| v.is_finite())
        .map_or(Value::Null, |v| json!(v))
}

fn rings_json(rings: &[[f64; 2]]) -> Value {
    Value::Array(rings.iter().map(|p| json!([p[0], p[1]])).collect())
}

fn geometry(shape: &RimShape) -> Value {
    let mut g = BTreeMap::new();
    match shape {
        RimShape::Polygon(r) => {
            g.insert("type", json!("Polygon"));
            g.insert("coordinates", json!([rings_json(r)]));
        }
        RimShape::MultiPolygon(rs) => {
            g.insert("type", json!("MultiPolygon"));
            g.insert(
                "coordinates",
                Value::Array(rs.iter().map(|r| json!([rings_json(r)])).collect()),
            );
        }
    }
    json!(g)
}

/// Longitude extent [west, east] of a shape; west > east when it crosses the antimeridian
/// (RFC 7946 §5.2), with latitude extent.
fn shape_bbox(shape: &RimShape) -> [f64; 4] {
    let all = shape
        .rings()
        .into_iter()
        .flatten()
        .copied()
        .collect::<Vec<_>>();
    let (s, n) = all
        .iter()
        .fold((f64::MAX, f64::MIN), |(s, n), p| (s.min(p[1]), n.max(p[1])));
    match shape {
        RimShape::MultiPolygon(rs) if rs.len() == 2 => {
            // Pieces are western-most first: the one touching -180 then the one touching 180.
            let east = rs[0].iter().map(|p| p[0]).fold(f64::MIN, f64::max);
            let west = rs[1].iter().map(|p| p[0]).fold(f64::MAX, f64::min);
            [west, s, east, n]
        }
        _ => {
            let (w, e) = all
                .iter()
                .fold((f64::MAX, f64::MIN), |(w, e), p| (w.min(p[0]), e.max(p[0])));
            [w, s, e, n]
        }
    }
}

/// The smallest longitude interval holding every feature's [west, east] (east < west when
/// crossing 180), found as the complement of the widest uncovered gap on the circle.
pub(crate) fn union_bbox(boxes: &[[f64; 4]]) -> Option<[f64; 4]> {
    if boxes.is_empty() {
        return None;
    }
    let s = boxes.iter().map(|b| b[1]).fold(f64::MAX, f64::min);
    let n = boxes.iter().map(|b| b[3]).fold(f64::MIN, f64::max);
    // Intervals as [start, end] with end >= start, start in [-180, 180).
    let mut iv: Vec<(f64, f64)> = boxes
        .iter()
        .map(|b| {
            let start = terrain::projection::wrap_deg_180(b[0]);
            let width = if b[2] >= b[0] {
                b[2] - b[0]
            } else {
                b[2] + 360.0 - b[0]
            };
            (start, start + width)
        })
        .collect();
    iv.sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.total_cmp(&b.1)));
    let mut merged: Vec<(f64, f64)> = Vec::new();
    for (a, b) in iv {
        match merged.last_mut() {
            Some(last) if a <= last.1 => last.1 = last.1.max(b),
            _ => merged.push((a, b)),
        }
    }
    // Gap after interval i runs to the start of i + 1 (the first one, plus 360, for the last).
    let mut widest = (f64::MIN, 0usize);
    for i in 0..merged.len() {
        let next = if i + 1 < merged.len() {
            merged[i + 1].0
        } else {
            merged[0].0 + 360.0
        };
        let gap = next - merged[i].1;
        if gap > widest.0 {
            widest = (gap, i);
        }
    }
    if widest.0 <= 0.0 {
        return Some([-180.0, s, 180.0, n]);
    }
    let i = widest.1;
    let west = if i + 1 < merged.len() {
        merged[i + 1].0
    } else {
        merged[0].0
    };
    let east = merged[i].1;
    let wrap_east = if east > 180.0 { east - 360.0 } else { east };
    Some([west, s, wrap_east, n])
}

/// The whole GeoJSON text.
pub fn to_geojson_string(set: &ExportSet<'_>) -> Result<String, SitingError> {
    set.check()?;
    let cols = set.columns();
    let radius_m = set.radius_m();
    let mut features = Vec::new();
    let mut boxes = Vec::new();
    for e in set.entries() {
        let cand = &set.survey.candidates[e.index];
        let mut props: BTreeMap<String, Value> = BTreeMap::new();
        for (col, cell) in cols.iter().zip(row(set, &e)) {
            let v = match cell {
                Cell::Int(i) => json!(i),
                Cell::Real(r) => number(r),
                Cell::Bool(b) => json!(b),
                Cell::Text(t) => json!(t),
            };
            props.insert(col.name.clone(), v);
        }
        // An array reads better than the joined text in GeoJSON; GDAL maps it to a string list.
        let fails: Vec<String> = e.failures().iter().map(|f| f.describe()).collect();
        props.insert("failed_requirements".into(), json!(fails));
        let mut f: BTreeMap<&str, Value> = BTreeMap::new();
        f.insert("type", json!("Feature"));
        f.insert("id", json!(e.id()));
        match rim_shape(&cand.crater, radius_m) {
            Some(shape) => {
                let b = shape_bbox(&shape);
                boxes.push(b);
                f.insert("bbox", json!(b.map(round9)));
                f.insert("geometry", geometry(&shape));
            }
            None => {
                f.insert("geometry", Value::Null);
            }
        }
        f.insert("properties", json!(props));
        features.push(serde_json::to_string(&f)?);
    }
    let mut out = String::from("{\"type\":\"FeatureCollection\",\n");
    if let Some(b) = union_bbox(&boxes) {
        out.push_str(&format!(
            "\"bbox\":{},\n",
            serde_json::to_string(&b.map(round9))?
        ));
    }
    let frame = json!({
        "body": "Moon",
        "crs": MOON_CRS,
        "sphere_radius_m": radius_m,
        "note": "longitude east and latitude in degrees on the body's reference sphere"
    });
    out.push_str(&format!(
        "\"reference_frame\":{},\n",
        serde_json::to_string(&frame)?
    ));
    out.push_str(&format!(
        "\"provenance\":{},\n",
        serde_json::to_string(set.provenance)?
    ));
    out.push_str(&format!(
        "\"screening_caution\":{},\n",
        serde_json::to_string(crate::SCREENING_CAUTION)?
    ));
    let robustness = match set.smaa {
        Some(s) => {
            json!({"settings": s.settings, "pool_size": s.pool.len(), "method": "SMAA (Lahdelma, Hokkanen and Salminen 1998)"})
        }
        None => Value::Null,
    };
    out.push_str(&format!(
        "\"robustness\":{},\n",
        serde_json::to_string(&robustness)?
    ));
    out.push_str("\"features\":[\n");
    out.push_str(&features.join(",\n"));
    out.push_str("\n]}\n");
    Ok(out)
}

/// Write the GeoJSON file atomically.
pub fn write_geojson(set: &ExportSet<'_>, path: &Path) -> Result<(), SitingError> {
    let text = to_geojson_string(set)?;
    crate::atomic::write_bytes(path, text.as_bytes())
}

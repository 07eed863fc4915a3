//! The areas a shortlist was judged against, exported with it: a GeoJSON file beside the
//! shortlist's and a layer of the GeoPackage. Each feature carries its area's file, the
//! file's SHA-256, which side was kept and the margin; rings are the vertices as read, in
//! lon/lat on the body's sphere (edges are great-circle arcs between them).

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

use serde_json::{json, Value};

use super::rim::round9;
use super::MOON_CRS;
use crate::areas::{Area, AreaFeature};
use crate::SitingError;

/// The layer's name inside the GeoPackage.
pub const LAYER_NAME: &str = "areas";

/// Where the areas go beside a shortlist GeoJSON: `shortlist.geojson` -> `shortlist.areas.geojson`.
pub fn beside(shortlist: &Path) -> PathBuf {
    let stem = shortlist
        .file_stem()
        .map_or_else(|| "shortlist".into(), |s| s.to_string_lossy().into_owned());
    shortlist.with_file_name(format!("{stem}.areas.geojson"))
}

/// One row per area feature: (properties in a fixed order, polygons).
pub(crate) fn rows(areas: &[Area]) -> Vec<(Vec<(&'static str, Value)>, &AreaFeature)> {
    let mut out = Vec::new();
    for (k, a) in areas.iter().enumerate() {
        for f in &a.features {
            let props = vec![
                ("area", json!(k + 1)),
                ("name", json!(f.label)),
                ("keep", json!(a.spec.keep.key())),
                ("margin_km", json!(a.spec.margin_km)),
                ("file", json!(a.spec.file)),
                ("file_sha256", json!(a.sha256)),
                ("why", json!(a.spec.why)),
            ];
            out.push((props, f));
        }
    }
    out
}

fn ring_json(r: &[(f64, f64)]) -> Value {
    Value::Array(
        r.iter()
            .map(|&(x, y)| json!([round9(x), round9(y)]))
            .collect(),
    )
}

/// A feature's polygons as a GeoJSON geometry.
fn geometry(f: &AreaFeature) -> Value {
    let polys: Vec<Value> = f
        .polygons
        .iter()
        .map(|p| Value::Array(p.iter().map(|r| ring_json(r)).collect()))
        .collect();
    if polys.len() == 1 {
        json!({"type": "Polygon", "coordinates": polys[0]})
    } else {
        json!({"type": "MultiPolygon", "coordinates": polys})
    }
}

/// The WKT of a feature's polygons, for OGR.
pub(crate) fn wkt(f: &AreaFeature) -> String {
    let ring = |r: &Vec<(f64, f64)>| {
        let pts: Vec<String> = r
            .iter()
            .map(|&(x, y)| format!("{} {}", round9(x), round9(y)))
            .collect();
        format!("({})", pts.join(","))
    };
    let poly = |p: &Vec<Vec<(f64, f64)>>| {
        format!("({})", p.iter().map(ring).collect::<Vec<_>>().join(","))
    };
    format!(
        "MULTIPOLYGON({})",
        f.polygons.iter().map(poly).collect::<Vec<_>>().join(",")
    )
}

/// The GeoJSON text: one feature per line, keys sorted; the CRS named in the 2008 `crs`
/// member (a foreign member under RFC 7946) so GDAL reads it back on the Moon.
pub fn to_geojson_string(areas: &[Area]) -> Result<String, SitingError> {
    let mut features = Vec::new();
    for (props, f) in rows(areas) {
        let props: BTreeMap<&str, Value> = props.into_iter().collect();
        let feature = json!({"type": "Feature", "properties": props, "geometry": geometry(f)});
        features.push(serde_json::to_string(&feature)?);
    }
    let mut out = String::from("{\"type\":\"FeatureCollection\",\n");
    out.push_str(&format!(
        "\"crs\":{},\n",
        serde_json::to_string(&json!({"type": "name", "properties": {"name": MOON_CRS}}))?
    ));
    out.push_str(&format!(
        "\"screening_caution\":{},\n",
        serde_json::to_string(crate::SCREENING_CAUTION)?
    ));
    out.push_str("\"features\":[\n");
    out.push_str(&features.join(",\n"));
    out.push_str("\n]}\n");
    Ok(out)
}

/// Write the areas' GeoJSON atomically.
pub fn write_geojson(areas: &[Area], path: &Path) -> Result<(), SitingError> {
    let text = to_geojson_string(areas)?;
    crate::atomic::write_bytes(path, text.as_bytes())
}

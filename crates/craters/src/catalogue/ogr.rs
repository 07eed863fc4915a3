//! Vector catalogues through GDAL/OGR: points with a diameter attribute, or rim polygons.

use super::{check, equal_area_circle, CatalogueRow, RowProblem};
use crate::error::CraterError;
use gdal::vector::{Geometry, LayerAccess, OGRwkbGeometryType as T};
use gdal::Dataset;
use std::path::Path;

fn ring(g: &Geometry) -> Vec<(f64, f64)> {
    let mut pts = Vec::new();
    g.get_points(&mut pts);
    let mut v: Vec<(f64, f64)> = pts.into_iter().map(|p| (p.0, p.1)).collect();
    if v.len() > 1 && v.first() == v.last() {
        v.pop();
    }
    v
}

/// Equal-area circle of a polygon (the largest part of a multipolygon).
fn polygon_circle(radius_m: f64, g: &Geometry) -> Option<(f64, f64, f64)> {
    let one = |p: &Geometry| -> Option<(f64, f64, f64)> {
        if p.geometry_count() == 0 {
            return None;
        }
        let outer = ring(&p.get_geometry(0));
        let holes: Vec<Vec<(f64, f64)>> = (1..p.geometry_count())
            .map(|i| ring(&p.get_geometry(i)))
            .collect();
        equal_area_circle(radius_m, &outer, &holes)
    };
    match gdal::vector::geometry_type_flatten(g.geometry_type()) {
        T::wkbPolygon => one(g),
        T::wkbMultiPolygon => (0..g.geometry_count())
            .filter_map(|i| one(&g.get_geometry(i)))
            .max_by(|a, b| a.2.total_cmp(&b.2)),
        _ => None,
    }
}

pub fn read(
    path: &Path,
    radius_m: f64,
    sink: &mut dyn FnMut(Result<CatalogueRow, RowProblem>) -> Result<(), CraterError>,
) -> Result<(), CraterError> {
    let fail = |reason: String| CraterError::Catalogue {
        path: path.into(),
        reason,
    };
    let ds =
        Dataset::open(path).map_err(|e| fail(format!("not a vector file GDAL reads ({e})")))?;
    if ds.layer_count() == 0 {
        return Err(fail("the file has no vector layer".into()));
    }
    let mut layer = ds.layer(0).map_err(|e| fail(e.to_string()))?;
    if let Some(srs) = layer.spatial_ref() {
        if srs.is_projected() {
            return Err(fail("the layer is in a projected CRS; give craters in lon/lat degrees (reproject it first)".into()));
        }
    }
    for (k, f) in layer.features().enumerate() {
        let line = k + 1;
        let bad = |reason: &str| RowProblem {
            line,
            reason: reason.to_string(),
        };
        let name = f
            .field_index("name")
            .ok()
            .and_then(|i| f.field_as_string(i).ok().flatten());
        let attr = |n: &str| {
            f.field_index(n)
                .ok()
                .and_then(|i| f.field_as_double(i).ok().flatten())
        };
        let diameter_attr = match (attr("diameter_m"), attr("diameter_km")) {
            (Some(m), _) => Some(m),
            (None, Some(km)) => Some(km * 1000.0),
            _ => None,
        };
        let row = match f.geometry() {
            None => Err(bad("feature has no geometry")),
            Some(g) => match gdal::vector::geometry_type_flatten(g.geometry_type()) {
                T::wkbPoint => match diameter_attr {
                    Some(d) => {
                        let (x, y, _) = g.get_point(0);
                        check(line, x, y, d, name)
                    }
                    None => Err(bad(
                        "point feature without a numeric diameter_m or diameter_km attribute",
                    )),
                },
                T::wkbPolygon | T::wkbMultiPolygon => match polygon_circle(radius_m, g) {
                    Some((lon, lat, d)) => check(line, lon, lat, d, name),
                    None => Err(bad("polygon is empty or has no area")),
                },
                _ => Err(bad(&format!(
                    "geometry type {} is neither a point nor a polygon",
                    g.geometry_name()
                ))),
            },
        };
        sink(row)?;
    }
    Ok(())
}

//! GeoPackage export (OGC 12-128) through GDAL/OGR: one multipolygon layer of rims in the IAU
//! 2015 Moon CRS, with the same columns as the CSV and the provenance as dataset metadata.

use std::path::Path;

use gdal::spatial_ref::{AxisMappingStrategy, SpatialRef};
use gdal::vector::{Geometry, LayerAccess, LayerOptions, OGRFieldType};
use gdal::{DriverManager, Metadata};

use super::rim::rim_shape;
use super::{row, Cell, ExportSet, MOON_CRS};
use crate::SitingError;

/// The layer's name inside the GeoPackage.
pub const LAYER_NAME: &str = "candidates";
/// Metadata domain of the provenance items.
pub const PROVENANCE_DOMAIN: &str = "";

fn gdal_err(path: &Path) -> impl Fn(gdal::errors::GdalError) -> std::io::Error + '_ {
    move |e| std::io::Error::other(format!("{}: {e}", path.display()))
}

/// Write the GeoPackage atomically (GDAL writes a temporary file that is then renamed).
pub fn write_gpkg(set: &ExportSet<'_>, path: &Path) -> Result<(), SitingError> {
    set.check()?;
    crate::atomic::write_by_path(path, |tmp| fill(set, tmp).map_err(gdal_err(path)))
}

fn fill(set: &ExportSet<'_>, tmp: &Path) -> gdal::errors::Result<()> {
    // GeoPackage records a modification time; pinning it to the caller's date keeps reruns
    // byte-identical. Thread-local so other GDAL users are not affected.
    gdal::config::set_thread_local_config_option("OGR_CURRENT_DATE", &set.provenance.date)?;
    let result = fill_inner(set, tmp);
    let _ = gdal::config::clear_thread_local_config_option("OGR_CURRENT_DATE");
    result
}

fn fill_inner(set: &ExportSet<'_>, tmp: &Path) -> gdal::errors::Result<()> {
    let driver = DriverManager::get_driver_by_name("GPKG")?;
    let mut ds = driver.create_vector_only(tmp)?;
    let mut srs = SpatialRef::from_definition(MOON_CRS)?;
    srs.set_axis_mapping_strategy(AxisMappingStrategy::TraditionalGisOrder);
    for (k, v) in set.provenance.pairs() {
        ds.set_metadata_item(k, &v, PROVENANCE_DOMAIN)?;
    }
    ds.set_metadata_item(
        "criteria_toml",
        &set.provenance.criteria_toml,
        PROVENANCE_DOMAIN,
    )?;
    let cols = set.columns();
    let radius_m = set.radius_m();
    {
        let layer = ds.create_layer(LayerOptions {
            name: LAYER_NAME,
            srs: Some(&srs),
            ty: gdal::vector::OGRwkbGeometryType::wkbMultiPolygon,
            options: None,
        })?;
        let sample = set.entries().next().map(|e| row(set, &e));
        for (i, c) in cols.iter().enumerate() {
            let ty = match sample.as_ref().and_then(|r| r.get(i)) {
                Some(Cell::Int(_)) => OGRFieldType::OFTInteger64,
                // 0/1: the gdal crate offers no boolean subtype.
                Some(Cell::Bool(_)) => OGRFieldType::OFTInteger,
                Some(Cell::Text(_)) => OGRFieldType::OFTString,
                _ => OGRFieldType::OFTReal,
            };
            gdal::vector::FieldDefn::new(&c.name, ty)?.add_to_layer(&layer)?;
        }
    }
    // One transaction for all features: GeoPackage is SQLite, which is slow per statement.
    let txn = ds.start_transaction()?;
    {
        let layer = txn.layer_by_name(LAYER_NAME)?;
        for e in set.entries() {
            let mut f = gdal::vector::Feature::new(layer.defn())?;
            for (i, cell) in row(set, &e).into_iter().enumerate() {
                match cell {
                    Cell::Int(v) => f.set_field_integer64(i, v)?,
                    Cell::Real(Some(v)) if v.is_finite() => f.set_field_double(i, v)?,
                    Cell::Real(_) => f.set_field_null(i)?,
                    Cell::Bool(b) => f.set_field_integer(i, i32::from(b))?,
                    Cell::Text(t) => f.set_field_string(i, &t)?,
                }
            }
            if let Some(shape) = rim_shape(&set.survey.candidates[e.index].crater, radius_m) {
                f.set_geometry(Geometry::from_wkt(&shape.wkt())?)?;
            }
            f.create(&layer)?;
        }
    }
    txn.commit()?;
    if !set.areas.is_empty() {
        add_areas(&mut ds, set.areas, &srs)?;
    }
    ds.close()
}

/// The areas as a second layer, one feature per area feature.
fn add_areas(
    ds: &mut gdal::Dataset,
    areas: &[crate::areas::Area],
    srs: &SpatialRef,
) -> gdal::errors::Result<()> {
    let rows = super::areas::rows(areas);
    {
        let layer = ds.create_layer(LayerOptions {
            name: super::areas::LAYER_NAME,
            srs: Some(srs),
            ty: gdal::vector::OGRwkbGeometryType::wkbMultiPolygon,
            options: None,
        })?;
        if let Some((props, _)) = rows.first() {
            for (name, v) in props {
                let ty = if v.is_number() {
                    OGRFieldType::OFTReal
                } else {
                    OGRFieldType::OFTString
                };
                gdal::vector::FieldDefn::new(name, ty)?.add_to_layer(&layer)?;
            }
        }
    }
    let txn = ds.start_transaction()?;
    {
        let layer = txn.layer_by_name(super::areas::LAYER_NAME)?;
        for (props, feature) in &rows {
            let mut f = gdal::vector::Feature::new(layer.defn())?;
            for (i, (_, v)) in props.iter().enumerate() {
                match v {
                    serde_json::Value::Number(n) => {
                        f.set_field_double(i, n.as_f64().unwrap_or(f64::NAN))?
                    }
                    serde_json::Value::String(t) => f.set_field_string(i, t)?,
                    _ => f.set_field_null(i)?,
                }
            }
            f.set_geometry(Geometry::from_wkt(&super::areas::wkt(feature))?)?;
            f.create(&layer)?;
        }
    }
    txn.commit()
}

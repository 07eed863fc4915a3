//! Test helpers: write small rasters through GDAL with chosen type, CRS, scale and nodata.
#![allow(dead_code)]

use gdal::raster::{Buffer, GdalType, RasterCreationOptions};
use gdal::spatial_ref::SpatialRef;
use gdal::DriverManager;
use std::path::{Path, PathBuf};

pub struct RasterSpec<'a> {
    pub crs: Option<&'a str>,
    pub geotransform: [f64; 6],
    pub scale: Option<f64>,
    pub offset: Option<f64>,
    pub nodata: Option<f64>,
}

pub fn write_raster<T: GdalType + Copy>(
    path: &Path,
    width: usize,
    height: usize,
    data: Vec<T>,
    spec: &RasterSpec,
) {
    let driver = DriverManager::get_driver_by_name("GTiff").unwrap();
    let opts = RasterCreationOptions::from_iter(["COMPRESS=DEFLATE"]);
    let mut ds = driver
        .create_with_band_type_with_options::<T, _>(path, width, height, 1, &opts)
        .unwrap();
    ds.set_geo_transform(&spec.geotransform).unwrap();
    if let Some(crs) = spec.crs {
        ds.set_spatial_ref(&SpatialRef::from_definition(crs).unwrap())
            .unwrap();
    }
    let mut band = ds.rasterband(1).unwrap();
    if let Some(s) = spec.scale {
        band.set_scale(s).unwrap();
    }
    if let Some(o) = spec.offset {
        band.set_offset(o).unwrap();
    }
    if let Some(nd) = spec.nodata {
        band.set_no_data_value(Some(nd)).unwrap();
    }
    let mut buf = Buffer::new((width, height), data);
    band.write((0, 0), (width, height), &mut buf).unwrap();
}

/// The real product in ../shared/data, or None (with a note printed) when it is absent.
pub fn lola_label() -> Option<PathBuf> {
    let dir = std::env::var("QUIETBOWL_LOLA_DIR")
        .map(PathBuf::from)
        .unwrap_or_else(|_| {
            Path::new(env!("CARGO_MANIFEST_DIR")).join("../../../shared/data/lola-ldem4")
        });
    let lbl = dir.join("LDEM_4.LBL");
    if lbl.exists() {
        Some(lbl)
    } else {
        eprintln!(
            "SKIPPED: the real LOLA product is absent at {} (set QUIETBOWL_LOLA_DIR)",
            dir.display()
        );
        None
    }
}

/// Radius used by every lunar CRS here (IAU 2015 mean radius, Archinal et al. 2018).
pub const R: f64 = 1_737_400.0;

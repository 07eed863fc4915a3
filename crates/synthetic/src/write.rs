//! Writing a generated patch: a compressed, tiled float32 GeoTIFF in IAU_2015:30115, a PAM
//! side file that keeps the IAU identifier, and `truth.json`; all three written in full beside
//! their targets before any is renamed into place (`terrain::atomic`), so a reader never sees
//! a half-written file and a failure leaves the old patch whole.
//!
//! Why the side file: GeoTIFF keys can name a CRS only by an EPSG code (OGC 19-008r4), so the
//! keys carry the projection's parameters and GDAL would read back an equivalent CRS without
//! its IAU identifier. GDAL reads `<file>.aux.xml` first and takes the CRS from there.

use crate::error::SynthError;
use crate::patch::CRS_AUTHORITY;
use crate::truth::TruthDocument;
use crate::DemoTerrain;
use gdal::raster::{Buffer, RasterCreationOptions};
use gdal::spatial_ref::SpatialRef;
use gdal::{DriverManager, Metadata};
use std::path::{Path, PathBuf};
use terrain::atomic;

pub const RASTER_FILE: &str = "farside-patch.tif";
pub const TRUTH_FILE: &str = "truth.json";

/// Creation options: DEFLATE with the floating-point predictor, 256 x 256 tiles.
const GTIFF_OPTIONS: [&str; 6] = [
    "COMPRESS=DEFLATE",
    "PREDICTOR=3",
    "ZLEVEL=9",
    "TILED=YES",
    "BLOCKXSIZE=256",
    "BLOCKYSIZE=256",
];

/// What [`write`] produced.
#[derive(Clone, Debug, PartialEq)]
pub struct DemoFiles {
    pub raster: PathBuf,
    pub raster_side_file: PathBuf,
    pub truth: PathBuf,
    pub raster_bytes: u64,
    pub heights_sha256: String,
}

/// Write `farside-patch.tif` (+ `.aux.xml`) and `truth.json` into `out_dir`, creating it.
pub fn write(terrain: &DemoTerrain, out_dir: &Path) -> Result<DemoFiles, SynthError> {
    let io = |path: &Path| {
        let path = path.to_path_buf();
        move |source| SynthError::Io { path, source }
    };
    std::fs::create_dir_all(out_dir).map_err(io(out_dir))?;
    let raster = out_dir.join(RASTER_FILE);
    let side = out_dir.join(format!("{RASTER_FILE}.aux.xml"));
    let truth = out_dir.join(TRUTH_FILE);
    let srs = SpatialRef::from_definition(CRS_AUTHORITY).map_err(|e| gdal_err(&raster, e))?;
    // GDAL's failure is kept whole; the staging helper only needs to know that it failed.
    let mut gdal_failure = None;
    let staged_raster = atomic::stage_by_path(&raster, |tmp| {
        write_geotiff(terrain, &srs, tmp).map_err(|e| {
            let text = e.to_string();
            gdal_failure = Some(e);
            std::io::Error::other(text)
        })
    });
    let staged_raster = match staged_raster {
        Ok(s) => s,
        Err(e) => return Err(gdal_failure.unwrap_or_else(|| io(&raster)(e))),
    };
    let side_text = pam_side_file(&srs).map_err(|e| gdal_err(&side, e))?;
    let heights_sha256 = terrain.heights_sha256();
    let doc = TruthDocument::new(
        &terrain.spec,
        &terrain.grid,
        RASTER_FILE,
        heights_sha256.clone(),
        terrain.craters.clone(),
    );
    let truth_text = doc.to_json()?;

    let staged_side = atomic::stage_bytes(&side, side_text.as_bytes()).map_err(io(&side))?;
    let staged_truth = atomic::stage_bytes(&truth, truth_text.as_bytes()).map_err(io(&truth))?;
    // Raster first, then its side file, then the truth that names the raster's checksum.
    staged_raster.commit().map_err(io(&raster))?;
    staged_side.commit().map_err(io(&side))?;
    staged_truth.commit().map_err(io(&truth))?;
    let raster_bytes = std::fs::metadata(&raster).map_err(io(&raster))?.len();
    Ok(DemoFiles {
        raster,
        raster_side_file: side,
        truth,
        raster_bytes,
        heights_sha256,
    })
}

fn write_geotiff(terrain: &DemoTerrain, srs: &SpatialRef, path: &Path) -> Result<(), SynthError> {
    let err = |e| gdal_err(path, e);
    let driver = DriverManager::get_driver_by_name("GTiff").map_err(err)?;
    let options = RasterCreationOptions::from_iter(GTIFF_OPTIONS);
    let (w, h) = (terrain.grid.width_px, terrain.grid.height_px);
    let mut ds = driver
        .create_with_band_type_with_options::<f32, _>(path, w, h, 1, &options)
        .map_err(err)?;
    ds.set_geo_transform(&terrain.grid.geotransform)
        .map_err(err)?;
    ds.set_spatial_ref(srs).map_err(err)?;
    ds.set_metadata_item("AREA_OR_POINT", "Area", "")
        .map_err(err)?;
    {
        let mut band = ds.rasterband(1).map_err(err)?;
        band.set_no_data_value(Some(f64::NAN)).map_err(err)?;
        let mut buffer = Buffer::new((w, h), terrain.heights_m.clone());
        band.write((0, 0), (w, h), &mut buffer).map_err(err)?;
    }
    ds.close().map_err(err)
}

/// GDAL's persistent auxiliary metadata (PAM) file holding the CRS as PROJJSON: WKT1 would
/// drop the identifier's version (IAU_2015 would read back as IAU), PROJJSON keeps it and GDAL
/// reads it back as given.
fn pam_side_file(srs: &SpatialRef) -> Result<String, gdal::errors::GdalError> {
    let wkt = srs.to_projjson()?;
    let escaped = wkt
        .replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;");
    // The default metadata domain is taken from here once the side file exists, so the
    // pixel-is-area flag must be repeated.
    Ok(format!(
        "<PAMDataset>\n  <SRS dataAxisToSRSAxisMapping=\"1,2\">{escaped}</SRS>\n  \
         <Metadata>\n    <MDI key=\"AREA_OR_POINT\">Area</MDI>\n  </Metadata>\n</PAMDataset>\n"
    ))
}

fn gdal_err(path: &Path, e: gdal::errors::GdalError) -> SynthError {
    SynthError::Gdal {
        path: path.to_path_buf(),
        reason: e.to_string(),
    }
}

use std::path::PathBuf;

/// What can go wrong reading terrain, each with what the user can do about it.
#[derive(Debug, thiserror::Error)]
pub enum TerrainError {
    #[error("cannot open {path}: {reason}. Check that the file exists and is a raster GDAL reads (GeoTIFF, PDS3/PDS4, ISIS3, VRT, JPEG2000)")]
    Open { path: PathBuf, reason: String },
    #[error("{path} has no coordinate reference system. Assign one, e.g. `gdal_edit.py -a_srs IAU_2015:30100 {path}` for lon/lat on the Moon")]
    NoCrs { path: PathBuf },
    #[error("{path} has no georeferencing (no geotransform). Assign one with gdal_edit.py -a_ullr or use a georeferenced product")]
    NoGeotransform { path: PathBuf },
    #[error("{path}: the CRS is on an Earth ellipsoid (semi-major axis {semi_major_m} m) but the file is used as lunar terrain; it is probably mislabelled. Fix the CRS (e.g. IAU_2015:30100) or pass --assume-body-radius to override")]
    EarthCrs { path: PathBuf, semi_major_m: f64 },
    #[error("{path}: unsupported CRS: {reason}")]
    UnsupportedCrs { path: PathBuf, reason: String },
    #[error("{path}: the raster is empty ({width} x {height} pixels)")]
    Empty {
        path: PathBuf,
        width: usize,
        height: usize,
    },
    #[error("{path}: the raster has no valid heights (all nodata or NaN)")]
    AllNodata { path: PathBuf },
    #[error("{path}: band data type {data_type} is not a supported elevation type (int16, uint16, int32, float32, float64)")]
    UnsupportedType { path: PathBuf, data_type: String },
    #[error("{path}: the raster declares {width} x {height} pixels, more than this tool accepts ({limit} pixels per side); the header is probably corrupt")]
    Oversized {
        path: PathBuf,
        width: usize,
        height: usize,
        limit: usize,
    },
    #[error("{path}: reading window at col {col}, row {row} ({width} x {height}) failed: {reason}. The file may be truncated")]
    Read {
        path: PathBuf,
        col: usize,
        row: usize,
        width: usize,
        height: usize,
        reason: String,
    },
    #[error("window at col {col}, row {row} ({width} x {height}) lies outside the {raster_width} x {raster_height} raster")]
    WindowOutside {
        col: isize,
        row: isize,
        width: usize,
        height: usize,
        raster_width: usize,
        raster_height: usize,
    },
    #[error("cannot write {path}: {reason}")]
    Write { path: PathBuf, reason: String },
    #[error("{0}")]
    Io(#[from] std::io::Error),
}

//! Open a raster through GDAL and read heights above the body's reference sphere by windows.

use crate::body::{Body, MOON_RADIUS_M};
use crate::error::TerrainError;
use crate::grid::{ElevationGrid, GridGeometry};
use crate::projection::MapProjection;
use gdal::raster::GdalDataType;
use gdal::Dataset;
use serde::{Deserialize, Serialize};
use std::path::{Path, PathBuf};
use std::sync::{Arc, Mutex};

/// Larger than any real lunar product per side (a 1 m/px global grid is about 11 million px
/// wide); a header past it is taken as corrupt rather than as a request for terabytes.
pub const MAX_SIDE_PX: usize = 50_000_000;

/// How the file's numbers became heights.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum HeightConvention {
    /// height = DN * scale + offset.
    ScaleOffset { scale: f64, offset: f64 },
    /// The band offset equals the reference radius (within 10 km): height = DN * scale; the
    /// offset would turn heights into planetary radii.
    RadiusOffsetIgnored { scale: f64, radius_offset_m: f64 },
    /// The stored values are planetary radii: height = DN * scale + offset - radius.
    RadiusValues {
        scale: f64,
        offset: f64,
        radius_m: f64,
    },
}

impl HeightConvention {
    #[inline]
    fn apply(&self, dn: f64) -> f64 {
        match *self {
            HeightConvention::ScaleOffset { scale, offset } => dn * scale + offset,
            HeightConvention::RadiusOffsetIgnored { scale, .. } => dn * scale,
            HeightConvention::RadiusValues {
                scale,
                offset,
                radius_m,
            } => dn * scale + offset - radius_m,
        }
    }

    /// One sentence for `describe`.
    pub fn explain(&self) -> String {
        match *self {
            HeightConvention::ScaleOffset { scale, offset } => {
                format!("height = DN x {scale} + {offset} m (band scale and offset applied)")
            }
            HeightConvention::RadiusOffsetIgnored { scale, radius_offset_m } => format!(
                "height = DN x {scale} m; the band offset {radius_offset_m} m is the reference-sphere radius, not a height shift, so it is not added"
            ),
            HeightConvention::RadiusValues { radius_m, .. } => {
                format!("stored values are planetary radii; height = value - {radius_m} m")
            }
        }
    }
}

/// Choices the user can make when a file is ambiguous.
#[derive(Clone, Debug, Default)]
pub struct OpenOptions {
    /// Use this reference radius (metres) even if the CRS names another body: the explicit
    /// override for mislabelled files.
    pub assume_body_radius_m: Option<f64>,
}

/// What the tool understood of a DEM file.
#[derive(Clone, Debug, Serialize, Deserialize)]
pub struct DemInfo {
    pub path: PathBuf,
    pub driver: String,
    pub width: usize,
    pub height: usize,
    pub data_type: String,
    pub crs_wkt: String,
    /// For example `IAU_2015:30115`, when the CRS carries an authority code.
    pub crs_authority: Option<String>,
    /// True when the file carried no authority code and `crs_authority` was recognised by
    /// comparing its definition with the IAU 2015 Moon CRSs.
    pub crs_authority_recognised: bool,
    pub crs_name: Option<String>,
    pub body: Body,
    pub body_radius_m: f64,
    /// True when `assume_body_radius_m` overrode the CRS.
    pub body_radius_overridden: bool,
    pub geometry: GridGeometry,
    pub nodata: Option<f64>,
    pub height_convention: HeightConvention,
    /// Ground pixel size at the raster centre (east-west, north-south), metres.
    pub pixel_size_m: (f64, f64),
    /// Longitude range as the file counts it (0..360 or -180..180), and latitude range.
    pub lon_range_deg: (f64, f64),
    pub lat_range_deg: (f64, f64),
    /// The raster covers the 180 meridian somewhere inside it (not only on an edge).
    pub crosses_180: bool,
}

/// An open DEM: read windows of heights from it. Safe to share between threads: a GDAL handle
/// serves one reader at a time, so each concurrent reader takes an idle handle from a small pool
/// (opening another when none is idle), and reads of different tiles decode in parallel.
pub struct Dem {
    idle_handles: Mutex<Vec<Dataset>>,
    /// The band's type converts to `f32` without loss (8/16-bit integers, float32).
    f32_exact: bool,
    info: DemInfo,
    geometry: Arc<GridGeometry>,
}

impl std::fmt::Debug for Dem {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("Dem").field("info", &self.info).finish()
    }
}

fn supported_type(t: GdalDataType) -> bool {
    matches!(
        t,
        GdalDataType::UInt8
            | GdalDataType::Int16
            | GdalDataType::UInt16
            | GdalDataType::Int32
            | GdalDataType::UInt32
            | GdalDataType::Float32
            | GdalDataType::Float64
    )
}

impl Dem {
    /// Open a raster and work out its geometry, body and height convention.
    pub fn open(path: impl AsRef<Path>, options: &OpenOptions) -> Result<Dem, TerrainError> {
        let path = path.as_ref().to_path_buf();
        let open_err = |reason: String| TerrainError::Open {
            path: path.clone(),
            reason,
        };
        if !path.exists() {
            return Err(open_err("no such file".into()));
        }
        let ds = Dataset::open(&path).map_err(|e| open_err(e.to_string()))?;
        let (width, height) = ds.raster_size();
        if width == 0 || height == 0 || ds.raster_count() == 0 {
            return Err(TerrainError::Empty {
                path,
                width,
                height,
            });
        }
        if width > MAX_SIDE_PX || height > MAX_SIDE_PX {
            return Err(TerrainError::Oversized {
                path,
                width,
                height,
                limit: MAX_SIDE_PX,
            });
        }
        let band = ds.rasterband(1).map_err(|e| open_err(e.to_string()))?;
        let band_type = band.band_type();
        if !supported_type(band_type) {
            return Err(TerrainError::UnsupportedType {
                path,
                data_type: band_type.name(),
            });
        }
        let geotransform = ds
            .geo_transform()
            .map_err(|_| TerrainError::NoGeotransform { path: path.clone() })?;
        if geotransform == [0.0, 1.0, 0.0, 0.0, 0.0, 1.0] {
            return Err(TerrainError::NoGeotransform { path });
        }
        let srs = ds
            .spatial_ref()
            .map_err(|_| TerrainError::NoCrs { path: path.clone() })?;
        let crs_wkt = srs.to_wkt().unwrap_or_default();
        if crs_wkt.is_empty() {
            return Err(TerrainError::NoCrs { path });
        }
        let proj4 = srs.to_proj4().map_err(|e| TerrainError::UnsupportedCrs {
            path: path.clone(),
            reason: e.to_string(),
        })?;
        let (projection, proj_radius) =
            MapProjection::from_proj4(&proj4).map_err(|reason| TerrainError::UnsupportedCrs {
                path: path.clone(),
                reason,
            })?;
        let semi_major = srs
            .semi_major()
            .ok()
            .or(proj_radius)
            .unwrap_or(MOON_RADIUS_M);
        let crs_body = Body::from_radius_m(semi_major);
        let (body_radius_m, overridden) = match options.assume_body_radius_m {
            Some(r) => (r, true),
            None if crs_body == Body::Earth => {
                return Err(TerrainError::EarthCrs {
                    path,
                    semi_major_m: semi_major,
                });
            }
            None => (semi_major, false),
        };
        let body = Body::from_radius_m(body_radius_m);
        let (crs_authority, crs_authority_recognised) = match (srs.auth_name(), srs.auth_code()) {
            (Some(name), Ok(code)) => (Some(format!("{name}:{code}")), false),
            _ => {
                let found = identify_iau_moon(&projection, semi_major);
                let recognised = found.is_some();
                (found, recognised)
            }
        };
        let scale = band.scale().unwrap_or(1.0);
        let offset = band.offset().unwrap_or(0.0);
        let nodata = band.no_data_value();
        let mut height_convention = if (offset - body_radius_m).abs() < 10_000.0
            || (offset > 0.0 && Body::from_radius_m(offset) != Body::Unknown)
        {
            HeightConvention::RadiusOffsetIgnored {
                scale,
                radius_offset_m: offset,
            }
        } else {
            HeightConvention::ScaleOffset { scale, offset }
        };
        let geometry = GridGeometry {
            width,
            height,
            geotransform,
            projection,
            body_radius_m,
        };
        let pixel_size_m = geometry.pixel_size_m().unwrap_or((f64::NAN, f64::NAN));
        let (lon_range_deg, lat_range_deg, crosses_180) = extent(&geometry);
        // Values stored as planetary radii (no offset): detect from a decimated look.
        if let HeightConvention::ScaleOffset { scale, offset } = height_convention {
            if let Some(median) = coarse_median(&ds, nodata) {
                let v = median * scale + offset;
                if (v - body_radius_m).abs() < 0.01 * body_radius_m {
                    height_convention = HeightConvention::RadiusValues {
                        scale,
                        offset,
                        radius_m: body_radius_m,
                    };
                }
            }
        }
        let info = DemInfo {
            path,
            driver: ds.driver().short_name(),
            width,
            height,
            data_type: band_type.name(),
            crs_wkt,
            crs_authority,
            crs_authority_recognised,
            crs_name: srs.name(),
            body,
            body_radius_m,
            body_radius_overridden: overridden,
            geometry: geometry.clone(),
            nodata,
            height_convention,
            pixel_size_m,
            lon_range_deg,
            lat_range_deg,
            crosses_180,
        };
        let f32_exact = matches!(
            band_type,
            GdalDataType::UInt8
                | GdalDataType::Int16
                | GdalDataType::UInt16
                | GdalDataType::Float32
        );
        Ok(Dem {
            idle_handles: Mutex::new(vec![ds]),
            f32_exact,
            info,
            geometry: Arc::new(geometry),
        })
    }

    pub fn info(&self) -> &DemInfo {
        &self.info
    }

    pub fn geometry(&self) -> Arc<GridGeometry> {
        self.geometry.clone()
    }

    pub fn width(&self) -> usize {
        self.info.width
    }

    pub fn height(&self) -> usize {
        self.info.height
    }

    /// Read a window of heights. Parts of the window outside the raster come back as NaN, so a
    /// window with a halo can be asked for at any position (for neighbourhood operations at the
    /// edges); on a global grid ([`GridGeometry::wrap_width_px`]) the columns instead wrap
    /// across the seam: the pieces on either side are read through GDAL and joined, and the
    /// window's geometry is moved to keep it within one turn (see [`ElevationGrid::col0`]).
    /// Rows beyond the poles stay NaN. Fails only if the window misses the raster entirely or
    /// GDAL cannot read it.
    pub fn read_window(
        &self,
        col: isize,
        row: isize,
        width: usize,
        height: usize,
    ) -> Result<ElevationGrid, TerrainError> {
        let rh = self.info.height as isize;
        let wrap_px = self.geometry.wrap_width_px();
        let pieces = column_pieces(col, width, self.info.width, wrap_px);
        let (r0, r1) = (row.max(0), (row + height as isize).min(rh));
        if height == 0 || pieces.is_empty() || r0 >= r1 {
            return Err(TerrainError::WindowOutside {
                col,
                row,
                width,
                height,
                raster_width: self.info.width,
                raster_height: self.info.height,
            });
        }
        let ih = (r1 - r0) as usize;
        let mut heights_m = vec![f32::NAN; width * height];
        let dst_r0 = (r0 - row) as usize;
        let read_px: usize = pieces.iter().map(|p| p.width * ih).sum();
        self.read_rows_into(
            &pieces,
            r0,
            &mut heights_m[dst_r0 * width..(dst_r0 + ih) * width],
            width,
            read_px >= PARALLEL_READ_MIN_PX,
        )?;
        // A window reaching across the seam gets the raster's geometry turned so that the
        // window's middle column is the middle of the turn: every lon/lat in it then maps to
        // one column inside it (the raster's own geometry would send half of it a turn away).
        let seam_shift = match wrap_px {
            Some(w) if col < 0 || col + width as isize > w as isize => {
                Some(col + (width / 2) as isize - (w / 2) as isize)
            }
            _ => None,
        };
        let (geometry, col0) = match seam_shift {
            Some(s) => (Arc::new(self.geometry.shifted_by_columns(s)), col - s),
            None => (self.geometry.clone(), col),
        };
        Ok(ElevationGrid {
            geometry,
            col0,
            row0: row,
            width,
            height,
            heights_m,
        })
    }

    /// Read raster rows `r0..` (as many as `dst` holds rows of `width`) of each column piece
    /// into `dst`. With `parallel`, as bands of rows, each through its own handle and
    /// converted on its own thread.
    fn read_rows_into(
        &self,
        pieces: &[ColumnPiece],
        r0: isize,
        dst: &mut [f32],
        width: usize,
        parallel: bool,
    ) -> Result<(), TerrainError> {
        let ih = dst.len() / width;
        let bands = if parallel {
            rayon::current_num_threads().clamp(1, 8)
        } else {
            1
        };
        let band_rows = ih.div_ceil(bands);
        let read_band = |k: usize, dst: &mut [f32]| -> Result<(), TerrainError> {
            let (band_r0, band_h) = (r0 + (k * band_rows) as isize, dst.len() / width);
            for p in pieces {
                let (c0, iw) = (p.src_col as isize, p.width);
                if self.f32_exact {
                    // Every value of the band's type is an f32: GDAL hands over half the bytes
                    // and the heights come out bit-identical to the f64 path.
                    let mut raw = vec![0f32; iw * band_h];
                    self.read_raw(c0, band_r0, iw, band_h, &mut raw)?;
                    self.convert_rows(&raw, iw, band_h, dst, width, 0, p.dst_col);
                } else {
                    let mut raw = vec![0f64; iw * band_h];
                    self.read_raw(c0, band_r0, iw, band_h, &mut raw)?;
                    self.convert_rows(&raw, iw, band_h, dst, width, 0, p.dst_col);
                }
            }
            Ok(())
        };
        if bands == 1 {
            read_band(0, dst)
        } else {
            use rayon::prelude::*;
            dst.par_chunks_mut(band_rows * width)
                .enumerate()
                .try_for_each(|(k, d)| read_band(k, d))
        }
    }

    fn read_raw<T: gdal::raster::GdalType + Copy>(
        &self,
        c0: isize,
        r0: isize,
        iw: usize,
        ih: usize,
        raw: &mut [T],
    ) -> Result<(), TerrainError> {
        self.with_handle(|ds| {
            let band = ds.rasterband(1)?;
            band.read_into_slice::<T>((c0, r0), (iw, ih), (iw, ih), raw, None)
        })
        .map_err(|e| self.read_err(c0, r0, iw, ih, e))
    }

    /// Raw band values (`iw x ih`) to heights, written into `heights_m` (rows of `width`) from
    /// row `dst_r0`, column `dst_c0`; no-data stays NaN.
    #[allow(clippy::too_many_arguments)]
    fn convert_rows<T: Copy + Into<f64>>(
        &self,
        raw: &[T],
        iw: usize,
        ih: usize,
        heights_m: &mut [f32],
        width: usize,
        dst_r0: usize,
        dst_c0: usize,
    ) {
        let nodata = self.info.nodata;
        let conv = &self.info.height_convention;
        for r in 0..ih {
            let dst_off = (dst_r0 + r) * width + dst_c0;
            for (dst, &v) in heights_m[dst_off..dst_off + iw]
                .iter_mut()
                .zip(&raw[r * iw..(r + 1) * iw])
            {
                let dn: f64 = v.into();
                let is_nodata = dn.is_nan()
                    || nodata.is_some_and(|nd| dn == nd || (nd.is_nan() && dn.is_nan()));
                if !is_nodata {
                    *dst = conv.apply(dn) as f32;
                }
            }
        }
    }

    /// Read a window of `width x height` *source* pixels at (col, row), resampled by GDAL to one
    /// output pixel per `factor x factor` source pixels (average). The returned grid's geometry is
    /// that of the whole raster at the coarser pixel size, and its `col0`/`row0` are counted in
    /// coarse pixels, so lon/lat lookups and derivatives (hillshade) work on it unchanged.
    /// Used for display pyramids: a large raster is looked at through a few such levels.
    pub fn read_window_decimated(
        &self,
        col: usize,
        row: usize,
        width: usize,
        height: usize,
        factor: usize,
    ) -> Result<ElevationGrid, TerrainError> {
        let factor = factor.max(1);
        let outside = || TerrainError::WindowOutside {
            col: col as isize,
            row: row as isize,
            width,
            height,
            raster_width: self.info.width,
            raster_height: self.info.height,
        };
        let (c1, r1) = (
            (col + width).min(self.info.width),
            (row + height).min(self.info.height),
        );
        if width == 0 || height == 0 || col >= c1 || row >= r1 {
            return Err(outside());
        }
        let (iw, ih) = (c1 - col, r1 - row);
        let (ow, oh) = (iw.div_ceil(factor), ih.div_ceil(factor));
        let mut raw = vec![0f64; ow * oh];
        {
            self.with_handle(|ds| {
                let band = ds.rasterband(1)?;
                band.read_into_slice::<f64>(
                    (col as isize, row as isize),
                    (iw, ih),
                    (ow, oh),
                    &mut raw,
                    Some(gdal::raster::ResampleAlg::Average),
                )
            })
            .map_err(|e| self.read_err(col as isize, row as isize, iw, ih, e))?;
        }
        let nodata = self.info.nodata;
        let conv = &self.info.height_convention;
        let heights_m = raw
            .iter()
            .map(|&dn| {
                let is_nodata = dn.is_nan() || nodata.is_some_and(|nd| dn == nd);
                if is_nodata {
                    f32::NAN
                } else {
                    conv.apply(dn) as f32
                }
            })
            .collect();
        let mut geometry = (*self.geometry).clone();
        geometry.geotransform[1] *= factor as f64;
        geometry.geotransform[2] *= factor as f64;
        geometry.geotransform[4] *= factor as f64;
        geometry.geotransform[5] *= factor as f64;
        geometry.width = self.info.width.div_ceil(factor);
        geometry.height = self.info.height.div_ceil(factor);
        Ok(ElevationGrid {
            geometry: Arc::new(geometry),
            col0: (col / factor) as isize,
            row0: (row / factor) as isize,
            width: ow,
            height: oh,
            heights_m,
        })
    }

    /// Read the whole raster. Only for rasters known to be small (demo terrain, tests).
    pub fn read_all(&self) -> Result<ElevationGrid, TerrainError> {
        self.read_window(0, 0, self.info.width, self.info.height)
    }

    /// Run `f` on an idle GDAL handle of this file, opening one more if all are busy.
    fn with_handle<T>(
        &self,
        f: impl FnOnce(&Dataset) -> gdal::errors::Result<T>,
    ) -> gdal::errors::Result<T> {
        let idle = self
            .idle_handles
            .lock()
            .unwrap_or_else(|p| p.into_inner())
            .pop();
        let ds = match idle {
            Some(ds) => ds,
            None => Dataset::open(&self.info.path)?,
        };
        let result = f(&ds);
        self.idle_handles
            .lock()
            .unwrap_or_else(|p| p.into_inner())
            .push(ds);
        result
    }

    fn read_err(
        &self,
        col: isize,
        row: isize,
        width: usize,
        height: usize,
        e: gdal::errors::GdalError,
    ) -> TerrainError {
        TerrainError::Read {
            path: self.info.path.clone(),
            col: col as usize,
            row: row as usize,
            width,
            height,
            reason: e.to_string(),
        }
    }

    /// Height range and valid fraction over the whole raster, reading strip by strip so memory
    /// stays bounded. Returns `None` for the range when there is no valid height.
    pub fn scan_stats(
        &self,
        mut progress: impl FnMut(usize, usize),
    ) -> Result<RasterStats, TerrainError> {
        let strip = (8_000_000 / self.info.width.max(1)).clamp(1, self.info.height);
        let (mut lo, mut hi, mut valid, mut total) = (f64::INFINITY, f64::NEG_INFINITY, 0u64, 0u64);
        let mut row = 0;
        while row < self.info.height {
            let h = strip.min(self.info.height - row);
            let g = self.read_window(0, row as isize, self.info.width, h)?;
            for &v in &g.heights_m {
                if !v.is_nan() {
                    valid += 1;
                    lo = lo.min(v as f64);
                    hi = hi.max(v as f64);
                }
            }
            total += g.heights_m.len() as u64;
            row += h;
            progress(row, self.info.height);
        }
        Ok(RasterStats {
            min_m: (valid > 0).then_some(lo),
            max_m: (valid > 0).then_some(hi),
            valid_fraction: valid as f64 / total.max(1) as f64,
        })
    }
}

/// A run of raster columns `src_col..src_col + width` that lands at window column `dst_col`.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
struct ColumnPiece {
    src_col: usize,
    width: usize,
    dst_col: usize,
}

/// The raster columns that fill window columns `col..col + width`: the part inside the raster
/// (one piece, or none), or on a global grid of `wrap_px` columns every window column, taken
/// modulo the width (a piece per stretch between seams).
fn column_pieces(
    col: isize,
    width: usize,
    raster_width: usize,
    wrap_px: Option<usize>,
) -> Vec<ColumnPiece> {
    match wrap_px {
        Some(w) if w > 0 => {
            let mut pieces = Vec::new();
            let mut dst_col = 0;
            while dst_col < width {
                let src_col = (col + dst_col as isize).rem_euclid(w as isize) as usize;
                let n = (w - src_col).min(width - dst_col);
                pieces.push(ColumnPiece {
                    src_col,
                    width: n,
                    dst_col,
                });
                dst_col += n;
            }
            pieces
        }
        _ => {
            let (c0, c1) = (
                col.max(0),
                (col + width as isize).min(raster_width as isize),
            );
            if c0 >= c1 {
                return Vec::new();
            }
            vec![ColumnPiece {
                src_col: c0 as usize,
                width: (c1 - c0) as usize,
                dst_col: (c0 - col) as usize,
            }]
        }
    }
}

/// Summary of every height in a raster.
#[derive(Clone, Debug, Serialize, Deserialize)]
pub struct RasterStats {
    pub min_m: Option<f64>,
    pub max_m: Option<f64>,
    pub valid_fraction: f64,
}

/// IAU 2015 Moon CRS codes we can recognise when a format (GeoTIFF keys, PDS labels) does not
/// carry the authority: the sphere and the projections this tool supports.
/// Windows of at least this many pixels are read in parallel bands of rows.
const PARALLEL_READ_MIN_PX: usize = 1 << 20;

const IAU_2015_MOON_CODES: [u32; 5] = [30100, 30110, 30115, 30130, 30135];

/// The IAU 2015 code whose definition (as PROJ gives it) equals this projection and radius.
fn identify_iau_moon(projection: &MapProjection, radius_m: f64) -> Option<String> {
    static KNOWN: std::sync::OnceLock<Vec<(String, MapProjection, f64)>> =
        std::sync::OnceLock::new();
    let known = KNOWN.get_or_init(|| {
        IAU_2015_MOON_CODES
            .iter()
            .filter_map(|code| {
                let name = format!("IAU_2015:{code}");
                let srs = gdal::spatial_ref::SpatialRef::from_definition(&name).ok()?;
                let (p, r) = MapProjection::from_proj4(&srs.to_proj4().ok()?).ok()?;
                Some((name, p, r?))
            })
            .collect()
    });
    known
        .iter()
        .find(|(_, p, r)| p == projection && (r - radius_m).abs() < 1e-3)
        .map(|(n, _, _)| n.clone())
}

/// Median of a small decimated read, to recognise files whose values are radii: first over a
/// central window of at most 512 x 512 px (a few blocks to decode, where a look at the whole
/// raster would decode every block of it on one thread), then, if that window holds no
/// value, over the whole raster.
fn coarse_median(ds: &Dataset, nodata: Option<f64>) -> Option<f64> {
    let band = ds.rasterband(1).ok()?;
    let (w, h) = band.size();
    let (cw, ch) = (w.min(512), h.min(512));
    let centre = ((w - cw) as isize / 2, (h - ch) as isize / 2);
    median_of_read(&band, centre, (cw, ch), nodata)
        .or_else(|| median_of_read(&band, (0, 0), (w, h), nodata))
}

fn median_of_read(
    band: &gdal::raster::RasterBand,
    at: (isize, isize),
    size: (usize, usize),
    nodata: Option<f64>,
) -> Option<f64> {
    let (bw, bh) = (size.0.min(64), size.1.min(64));
    let buf = band.read_as::<f64>(at, size, (bw, bh), None).ok()?;
    let mut v: Vec<f64> = buf
        .data()
        .iter()
        .copied()
        .filter(|x| !x.is_nan() && Some(*x) != nodata)
        .collect();
    if v.is_empty() {
        return None;
    }
    v.sort_by(|a, b| a.total_cmp(b));
    Some(v[v.len() / 2])
}

/// Lon and lat ranges of a grid and whether it covers the 180 meridian.
fn extent(g: &GridGeometry) -> ((f64, f64), (f64, f64), bool) {
    match g.projection {
        MapProjection::Geographic | MapProjection::Equirectangular { .. } => {
            // Cylindrical: longitude is linear in x, so the corners give the range in the
            // file's own counting (0..360 stays 0..360).
            let lon_of = |col: f64| -> f64 {
                let (x, _) = g.pixel_to_map(col, 0.0);
                match g.projection {
                    MapProjection::Geographic => x,
                    MapProjection::Equirectangular {
                        lon0_deg,
                        lat_ts_deg,
                        false_easting_m,
                        ..
                    } => {
                        lon0_deg
                            + ((x - false_easting_m)
                                / (g.body_radius_m * lat_ts_deg.to_radians().cos()))
                            .to_degrees()
                    }
                    _ => unreachable!(),
                }
            };
            let (a, b) = (lon_of(0.0), lon_of(g.width as f64));
            let (lo, hi) = (a.min(b), a.max(b));
            let lat_a = g.pixel_to_lonlat(0.0, 0.0).map(|p| p.1).unwrap_or(f64::NAN);
            let lat_b = g
                .pixel_to_lonlat(0.0, g.height as f64)
                .map(|p| p.1)
                .unwrap_or(f64::NAN);
            // 180 (or -180, 540...) strictly inside (lo, hi)?
            let k = ((lo - 180.0) / 360.0).floor() + 1.0;
            let crosses = 180.0 + 360.0 * k < hi - 1e-9;
            ((lo, hi), (lat_a.min(lat_b), lat_a.max(lat_b)), crosses)
        }
        _ => {
            // Other projections: sample the border and the centre; longitudes in [-180, 180).
            let n = 64;
            let mut pts = Vec::new();
            for i in 0..=n {
                let t = i as f64 / n as f64;
                let (w, h) = (g.width as f64, g.height as f64);
                for (c, r) in [
                    (t * w, 0.0),
                    (t * w, h),
                    (0.0, t * h),
                    (w, t * h),
                    (t * w, t * h),
                ] {
                    if let Some(p) = g.pixel_to_lonlat(c, r) {
                        pts.push(p);
                    }
                }
            }
            let lat_lo = pts.iter().map(|p| p.1).fold(f64::INFINITY, f64::min);
            let lat_hi = pts.iter().map(|p| p.1).fold(f64::NEG_INFINITY, f64::max);
            let lon_lo = pts.iter().map(|p| p.0).fold(f64::INFINITY, f64::min);
            let lon_hi = pts.iter().map(|p| p.0).fold(f64::NEG_INFINITY, f64::max);
            let crosses = pts.iter().any(|p| p.0 > 170.0) && pts.iter().any(|p| p.0 < -170.0);
            ((lon_lo, lon_hi), (lat_lo, lat_hi), crosses)
        }
    }
}

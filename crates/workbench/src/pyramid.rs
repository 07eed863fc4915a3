//! The terrain as the map shows it: a whole-raster overview read decimated once, plus one
//! detail window read on demand at the resolution the current zoom needs. Both are shaded on
//! a worker thread so panning and zooming never wait for GDAL. Each level keeps its heights,
//! hillshade and slope, so a change of layer re-colours without reading or deriving again.

use crate::shading::{self, Derived, MapLayer};
use egui::{ColorImage, TextureHandle, TextureOptions};
use std::sync::mpsc::{channel, Receiver};
use std::sync::Arc;
use terrain::{Dem, ElevationGrid, GridGeometry};

/// Longest side of the overview picture, pixels. Also kept under the smallest texture limit
/// GL drivers guarantee (2048).
pub const OVERVIEW_MAX_SIDE_PX: usize = 2048;
/// Longest side of a detail window, in output pixels.
const DETAIL_MAX_SIDE_PX: usize = 2048;

/// A window of the raster at one decimation factor, in source-pixel coordinates.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct WindowKey {
    pub factor: usize,
    pub col: usize,
    pub row: usize,
    pub width: usize,
    pub height: usize,
}

impl WindowKey {
    /// Source-pixel rectangle (min col, min row, max col, max row).
    pub fn bounds(&self) -> [f64; 4] {
        [
            self.col as f64,
            self.row as f64,
            (self.col + self.width) as f64,
            (self.row + self.height) as f64,
        ]
    }
}

struct Shaded {
    key: WindowKey,
    image: ColorImage,
    grid: ElevationGrid,
    derived: Derived,
    layer: MapLayer,
    /// Top of the slope scale (the overview's; a detail level reuses it).
    slope_top_deg: f32,
}

/// One shaded level on the GPU, with its heights kept for the cursor read-out and its
/// derivatives for re-colouring.
pub struct Level {
    pub key: WindowKey,
    pub texture: TextureHandle,
    pub grid: ElevationGrid,
    derived: Derived,
    /// The layer the texture shows.
    layer: MapLayer,
}

impl Level {
    /// Height at a source-pixel position (pixel-corner convention), if this level covers it.
    pub fn height_at(&self, col: f64, row: f64) -> Option<f64> {
        let f = self.key.factor as f64;
        self.grid.sample(
            col / f - 0.5 - self.grid.col0 as f64,
            row / f - 0.5 - self.grid.row0 as f64,
        )
    }
}

pub struct TerrainLayer {
    pub dem: Arc<Dem>,
    pub overview: Option<Level>,
    pub detail: Option<Level>,
    /// Height range of the overview, for the tint and the legend.
    pub range_m: Option<(f32, f32)>,
    /// Top of the slope colour scale, degrees (from the overview), for the legend.
    pub slope_top_deg: Option<f32>,
    /// What the levels are coloured as.
    layer: MapLayer,
    pending_overview: Option<Receiver<Result<Shaded, String>>>,
    pending_detail: Option<(WindowKey, Receiver<Result<Shaded, String>>)>,
    pub error: Option<String>,
}

/// Read a window, derive hillshade and slope once, and colour it as `layer`. The overview
/// (no `scales` yet) sets the height range and the top of the slope scale.
fn shade_window(
    dem: &Dem,
    key: WindowKey,
    scales: Option<((f32, f32), f32)>,
    layer: MapLayer,
) -> Result<Shaded, String> {
    let grid = dem
        .read_window_decimated(key.col, key.row, key.width, key.height, key.factor)
        .map_err(|e| e.to_string())?;
    let derived = Derived::of(&grid);
    let (range, slope_top_deg) = scales.unwrap_or_else(|| {
        (
            grid.min_max().unwrap_or((0.0, 1.0)),
            shading::slope_scale_top_deg(&derived.slope_deg),
        )
    });
    let image = shading::colour_level(&grid, &derived, layer, range, slope_top_deg);
    Ok(Shaded {
        key,
        image,
        grid,
        derived,
        layer,
        slope_top_deg,
    })
}

impl TerrainLayer {
    /// Start shading the overview in the background.
    pub fn new(dem: Arc<Dem>, ctx: &egui::Context) -> Self {
        let layer = MapLayer::default();
        let (w, h) = (dem.width(), dem.height());
        let factor = w.max(h).div_ceil(OVERVIEW_MAX_SIDE_PX).max(1);
        let key = WindowKey {
            factor,
            col: 0,
            row: 0,
            width: w,
            height: h,
        };
        let (tx, rx) = channel();
        let (dem2, ctx2) = (dem.clone(), ctx.clone());
        std::thread::spawn(move || {
            let _ = tx.send(shade_window(&dem2, key, None, layer));
            ctx2.request_repaint();
        });
        TerrainLayer {
            dem,
            overview: None,
            detail: None,
            range_m: None,
            slope_top_deg: None,
            layer,
            pending_overview: Some(rx),
            pending_detail: None,
            error: None,
        }
    }

    pub fn geometry(&self) -> Arc<GridGeometry> {
        self.dem.geometry()
    }

    pub fn is_loading(&self) -> bool {
        self.pending_overview.is_some() || self.pending_detail.is_some()
    }

    /// Collect finished work; upload to textures (re-coloured if the layer changed while
    /// it was being shaded).
    pub fn poll(&mut self, ctx: &egui::Context) {
        if let Some(rx) = &self.pending_overview {
            if let Ok(res) = rx.try_recv() {
                self.pending_overview = None;
                match res {
                    Ok(s) => {
                        self.range_m = s.grid.min_max();
                        self.slope_top_deg = Some(s.slope_top_deg);
                        self.overview = Some(Level::upload(ctx, "terrain-overview", s));
                    }
                    Err(e) => self.error = Some(e),
                }
            }
        }
        if let Some((_, rx)) = &self.pending_detail {
            if let Ok(res) = rx.try_recv() {
                self.pending_detail = None;
                match res {
                    Ok(s) => self.detail = Some(Level::upload(ctx, "terrain-detail", s)),
                    Err(e) => self.error = Some(e),
                }
            }
        }
        self.recolour();
    }

    /// Ask for the detail the view needs: `visible` is the source-pixel rectangle on screen and
    /// `src_px_per_point` how many source pixels one screen point covers. Does nothing while
    /// the overview is already fine enough or the current detail already covers the view.
    pub fn request_detail(
        &mut self,
        ctx: &egui::Context,
        visible: [f64; 4],
        src_px_per_point: f64,
    ) {
        let Some(overview) = &self.overview else {
            return;
        };
        let factor = if src_px_per_point <= 1.0 {
            1
        } else {
            1usize << (src_px_per_point.log2().floor() as u32).min(30)
        };
        if factor >= overview.key.factor {
            self.detail = None;
            return;
        }
        let covers = |k: &WindowKey| {
            let b = k.bounds();
            k.factor == factor
                && b[0] <= visible[0].max(0.0)
                && b[1] <= visible[1].max(0.0)
                && b[2] >= visible[2].min(self.dem.width() as f64)
                && b[3] >= visible[3].min(self.dem.height() as f64)
        };
        if self.detail.as_ref().is_some_and(|d| covers(&d.key))
            || self.pending_detail.as_ref().is_some_and(|(k, _)| covers(k))
        {
            return;
        }
        // Read a margin around the view so small pans need no new read.
        let (vw, vh) = (visible[2] - visible[0], visible[3] - visible[1]);
        let max_src = (DETAIL_MAX_SIDE_PX * factor) as f64;
        let (mw, mh) = ((vw * 1.5).min(max_src), (vh * 1.5).min(max_src));
        let cx = (visible[0] + visible[2]) / 2.0;
        let cy = (visible[1] + visible[3]) / 2.0;
        let snap = |v: f64| ((v.max(0.0) as usize) / factor) * factor;
        let col = snap(cx - mw / 2.0);
        let row = snap(cy - mh / 2.0);
        let width = (mw.ceil() as usize).min(self.dem.width().saturating_sub(col));
        let height = (mh.ceil() as usize).min(self.dem.height().saturating_sub(row));
        if width == 0 || height == 0 {
            return;
        }
        let key = WindowKey {
            factor,
            col,
            row,
            width,
            height,
        };
        let (tx, rx) = channel();
        let (dem, ctx2, layer) = (self.dem.clone(), ctx.clone(), self.layer);
        let scales = self.range_m.zip(self.slope_top_deg);
        std::thread::spawn(move || {
            let _ = tx.send(shade_window(&dem, key, scales, layer));
            ctx2.request_repaint();
        });
        self.pending_detail = Some((key, rx));
    }

    /// What the terrain is coloured as.
    pub fn layer(&self) -> MapLayer {
        self.layer
    }

    /// Colour the terrain as `layer`: the levels on screen are re-coloured from the hillshade
    /// and slope they keep (no read, no derivative computed again); work still pending is
    /// re-coloured when it arrives.
    pub fn set_layer(&mut self, layer: MapLayer) {
        self.layer = layer;
        self.recolour();
    }

    fn recolour(&mut self) {
        let (Some(range), Some(top)) = (self.range_m, self.slope_top_deg) else {
            return;
        };
        let layer = self.layer;
        for level in [&mut self.overview, &mut self.detail].into_iter().flatten() {
            if level.layer != layer {
                let image = shading::colour_level(&level.grid, &level.derived, layer, range, top);
                level.texture.set(image, TextureOptions::LINEAR);
                level.layer = layer;
            }
        }
    }

    /// Height under a source-pixel position from the finest level that covers it.
    pub fn height_at(&self, col: f64, row: f64) -> Option<f64> {
        self.detail
            .as_ref()
            .and_then(|d| d.height_at(col, row))
            .or_else(|| self.overview.as_ref()?.height_at(col, row))
    }
}

impl Level {
    fn upload(ctx: &egui::Context, name: &str, s: Shaded) -> Level {
        Level {
            key: s.key,
            texture: ctx.load_texture(name, s.image, TextureOptions::LINEAR),
            grid: s.grid,
            derived: s.derived,
            layer: s.layer,
        }
    }
}

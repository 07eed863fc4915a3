//! The crater sheet's two sky plots: the local horizon seen from the crater centre with the
//! zone of sky the Earth can occupy over all librations, and the zenith beam's track across the
//! galactic sky. All figures come from `visibility`; this module reads the terrain around the
//! site, asks for them on a worker thread and draws them.

use egui::Color32;
use egui_plot::{Legend, Line, Plot, PlotPoint, PlotPoints, Points, Polygon, Text};
use std::sync::mpsc::{channel, Receiver};
use std::sync::Arc;
use terrain::Dem;
use visibility::{HorizonTerrain, LibrationEnvelope, VisibilityOptions};

/// Longest side of the terrain window read for the horizon, output pixels.
const HORIZON_WINDOW_MAX_PX: usize = 1024;
/// Points along one sidereal month of beam track.
const TRACK_POINTS: usize = 720;

pub struct SkyFigures {
    /// (azimuth, elevation) of the skyline, degrees.
    pub horizon: Vec<(f64, f64)>,
    pub horizon_from_terrain: bool,
    /// Outline of the Earth's libration zone as (azimuth, elevation) of its centre, degrees.
    pub earth_zone: Vec<(f64, f64)>,
    /// Beam centre track in galactic (l, b), degrees, l in [0, 360).
    pub track: Vec<(f64, f64)>,
    pub plane_band_deg: f64,
}

fn compute(dem: Option<&Dem>, lon: f64, lat: f64) -> SkyFigures {
    let opts = VisibilityOptions::default();
    let grid = dem.and_then(|d| {
        let g = d.geometry();
        let (col, row) = g.lonlat_to_pixel(lon, lat)?;
        let (px, py) = g.pixel_size_m_at(col, row)?;
        let half = (opts.horizon_max_distance_m / px.min(py)).ceil() as usize;
        let (c0, r0) = (
            (col as usize).saturating_sub(half),
            (row as usize).saturating_sub(half),
        );
        let (w, h) = (
            (col as usize + half).min(d.width()) - c0,
            (row as usize + half).min(d.height()) - r0,
        );
        let factor = w.max(h).div_ceil(HORIZON_WINDOW_MAX_PX).max(1);
        let (c0, r0) = (c0 / factor * factor, r0 / factor * factor);
        d.read_window_decimated(c0, r0, w, h, factor).ok()
    });
    let terrain = grid.as_ref().and_then(HorizonTerrain::new);
    let hz = visibility::horizon::Horizon::compute(
        lon,
        lat,
        terrain.as_ref(),
        opts.observer_height_m,
        opts.horizon_max_distance_m,
        opts.horizon_azimuths,
    );
    let n = hz.elevation_deg.len();
    let horizon = hz
        .elevation_deg
        .iter()
        .enumerate()
        .map(|(i, e)| (i as f64 * 360.0 / n as f64, *e))
        .collect();
    let env = LibrationEnvelope::standard();
    let earth_zone = visibility::earth_zone_from_site(env, lon, lat, hz.site_height_m);
    let track = visibility::beam_track_galactic(
        lon,
        lat,
        env.start_jd_tt,
        visibility::sky::TRACK_PERIOD_DAYS,
        TRACK_POINTS,
    );
    SkyFigures {
        horizon,
        horizon_from_terrain: hz.from_terrain,
        earth_zone,
        track,
        plane_band_deg: opts.plane_band_deg,
    }
}

/// Sky figures for one candidate, computed once per selection in the background.
#[derive(Default)]
pub struct SkyView {
    for_index: Option<usize>,
    figures: Option<SkyFigures>,
    pending: Option<Receiver<SkyFigures>>,
}

impl SkyView {
    pub fn ui(
        &mut self,
        ui: &mut egui::Ui,
        index: usize,
        lon: f64,
        lat: f64,
        dem: Option<&Arc<Dem>>,
    ) {
        if self.for_index != Some(index) {
            self.for_index = Some(index);
            self.figures = None;
            let (tx, rx) = channel();
            let (dem, ctx) = (dem.cloned(), ui.ctx().clone());
            std::thread::spawn(move || {
                let _ = tx.send(compute(dem.as_deref(), lon, lat));
                ctx.request_repaint();
            });
            self.pending = Some(rx);
        }
        if let Some(f) = self.pending.as_ref().and_then(|rx| rx.try_recv().ok()) {
            self.figures = Some(f);
            self.pending = None;
        }
        let Some(f) = &self.figures else {
            ui.horizontal(|ui| {
                ui.spinner();
                ui.label("Tracing the horizon and the sky…");
            });
            return;
        };
        horizon_plot(ui, f);
        track_plot(ui, f);
    }
}

/// Polar position: zenith at the centre, the astronomical horizon on the ring of radius 90,
/// north up and east to the right; below-horizon elevations fall outside the ring.
fn polar(az_deg: f64, el_deg: f64) -> [f64; 2] {
    let r = 90.0 - el_deg;
    [r * az_deg.to_radians().sin(), r * az_deg.to_radians().cos()]
}

fn horizon_plot(ui: &mut egui::Ui, f: &SkyFigures) {
    ui.label(if f.horizon_from_terrain {
        "Skyline from the DEM around the crater centre"
    } else {
        "Skyline of the bare sphere (no terrain around the site)"
    });
    Plot::new("horizon-polar")
        .height(260.0)
        .data_aspect(1.0)
        .show_axes(false)
        .show_grid(false)
        .legend(Legend::default())
        .allow_scroll(false)
        .show(ui, |plot| {
            for el in [0.0, 30.0, 60.0] {
                let ring: PlotPoints = (0..=72).map(|k| polar(k as f64 * 5.0, el)).collect();
                plot.line(
                    Line::new("", ring)
                        .color(Color32::from_gray(if el == 0.0 { 150 } else { 80 }))
                        .width(1.0)
                        .allow_hover(false),
                );
            }
            for (az, name) in [(0.0, "N"), (90.0, "E"), (180.0, "S"), (270.0, "W")] {
                let p = polar(az, -8.0);
                plot.text(Text::new("", PlotPoint::new(p[0], p[1]), name).color(Color32::GRAY));
            }
            let mut sky: Vec<[f64; 2]> = f.horizon.iter().map(|&(a, e)| polar(a, e)).collect();
            if let Some(first) = sky.first().copied() {
                sky.push(first);
            }
            plot.line(
                Line::new("skyline", PlotPoints::from(sky))
                    .color(Color32::from_rgb(200, 180, 140))
                    .width(2.0),
            );
            let zone: Vec<[f64; 2]> = f.earth_zone.iter().map(|&(a, e)| polar(a, e)).collect();
            plot.polygon(
                Polygon::new("Earth over all librations", PlotPoints::from(zone))
                    .fill_color(Color32::from_rgba_unmultiplied(80, 140, 255, 60))
                    .stroke(egui::Stroke::new(1.5, Color32::from_rgb(90, 150, 255))),
            );
        });
}

fn track_plot(ui: &mut egui::Ui, f: &SkyFigures) {
    ui.label("Zenith beam over one month, galactic coordinates (centre at l = 0)");
    // Centre the galactic centre: l in (-180, 180].
    let wrap = |l: f64| if l > 180.0 { l - 360.0 } else { l };
    Plot::new("beam-track")
        .height(200.0)
        .legend(Legend::default())
        .x_axis_label("galactic longitude l [deg]")
        .y_axis_label("galactic latitude b [deg]")
        .include_y(-90.0)
        .include_y(90.0)
        .include_x(-180.0)
        .include_x(180.0)
        .allow_scroll(false)
        .show(ui, |plot| {
            let band = f.plane_band_deg;
            let plane = vec![
                [-180.0, -band],
                [180.0, -band],
                [180.0, band],
                [-180.0, band],
            ];
            plot.polygon(
                Polygon::new(
                    format!("galactic plane ±{band:.0}°"),
                    PlotPoints::from(plane),
                )
                .fill_color(Color32::from_rgba_unmultiplied(200, 120, 255, 40))
                .stroke(egui::Stroke::NONE),
            );
            // Break the line where it wraps from +180 to -180.
            let mut seg: Vec<[f64; 2]> = Vec::new();
            let mut first = true;
            for &(l, b) in &f.track {
                let x = wrap(l);
                if let Some(last) = seg.last() {
                    if (x - last[0]).abs() > 180.0 {
                        plot.line(
                            Line::new(
                                if first { "beam track" } else { "" },
                                PlotPoints::from(std::mem::take(&mut seg)),
                            )
                            .color(Color32::from_rgb(250, 210, 90))
                            .width(2.0),
                        );
                        first = false;
                    }
                }
                seg.push([x, b]);
            }
            plot.line(
                Line::new(if first { "beam track" } else { "" }, PlotPoints::from(seg))
                    .color(Color32::from_rgb(250, 210, 90))
                    .width(2.0),
            );
            plot.points(
                Points::new("galactic centre", vec![[0.0, 0.0]])
                    .radius(5.0)
                    .color(Color32::from_rgb(255, 90, 90)),
            );
        });
}

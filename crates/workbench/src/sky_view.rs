//! The crater sheet's Earth-and-sky page: the skyline seen from the crater centre as elevation
//! against azimuth, with the zone of sky the Earth's centre can occupy over all librations and
//! the shielding margin marked where it is smallest; the creeping-wave attenuation estimate
//! that `quietbowl site` prints; and the zenith beam's month across the galactic sky.
//! All figures come from `visibility`; this module reads the terrain around the site, asks for
//! them on a worker thread and draws them.

use crate::charts::{azimuth_grid, azimuth_tick, key_row, KeyEntry, KeyMark};
use egui::{Color32, RichText};
use egui_plot::{FilledArea, HLine, Line, LineStyle, Plot, PlotPoint, PlotPoints, Points, Text};
use std::sync::mpsc::{channel, Receiver};
use std::sync::Arc;
use survey::Candidate;
use terrain::Dem;
use visibility::diffraction::DiffractionEstimate;
use visibility::{EarthMargin, HorizonTerrain, LibrationEnvelope, VisibilityOptions};

/// Longest side of the terrain window read for the horizon, output pixels.
const HORIZON_WINDOW_MAX_PX: usize = 1024;
/// Points along one sidereal month of beam track.
const TRACK_POINTS: usize = 720;

pub const SKYLINE_COLOUR: Color32 = Color32::from_rgb(225, 200, 150);
const ZONE_FILL: Color32 = Color32::from_rgba_unmultiplied_const(90, 150, 255, 90);
const ZONE_EDGE: Color32 = Color32::from_rgb(110, 160, 255);
const MARGIN_COLOUR: Color32 = Color32::from_rgb(120, 230, 150);
const LIMB_COLOUR: Color32 = Color32::from_rgb(255, 120, 110);
const LEVEL_COLOUR: Color32 = Color32::from_gray(150);

pub struct SkyFigures {
    /// (azimuth, elevation) of the skyline, degrees.
    pub horizon: Vec<(f64, f64)>,
    pub horizon_from_terrain: bool,
    /// Outline of the Earth's libration zone as (azimuth, elevation) of its centre, degrees.
    pub earth_zone: Vec<(f64, f64)>,
    /// The worst case of the Earth against this skyline.
    pub margin: EarthMargin,
    /// Creeping-wave attenuation into the limb shadow (empty when not behind the limb).
    pub diffraction: Vec<DiffractionEstimate>,
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
    let margin = visibility::earth_margin(env, lon, lat, &hz);
    let diffraction = visibility::diffraction::estimate_for_margin(&margin);
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
        margin,
        diffraction,
        track,
        plane_band_deg: opts.plane_band_deg,
    }
}

/// What the figures were computed for: candidate index and centre (a new survey may put
/// another crater at the same index).
type SiteKey = (usize, u64, u64);

/// Sky figures for one candidate, computed once per selection in the background.
#[derive(Default)]
pub struct SkyView {
    for_site: Option<SiteKey>,
    figures: Option<SkyFigures>,
    pending: Option<Receiver<SkyFigures>>,
}

impl SkyView {
    /// The figures of candidate `index` at (lon, lat), started on a worker thread when the
    /// site changed; `None` until they arrive.
    pub fn figures(
        &mut self,
        ctx: &egui::Context,
        index: usize,
        lon: f64,
        lat: f64,
        dem: Option<&Arc<Dem>>,
    ) -> Option<&SkyFigures> {
        let key = (index, lon.to_bits(), lat.to_bits());
        if self.for_site != Some(key) {
            self.for_site = Some(key);
            self.figures = None;
            let (tx, rx) = channel();
            let (dem, ctx) = (dem.cloned(), ctx.clone());
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
        self.figures.as_ref()
    }

    /// The figures as they stand, without starting anything.
    pub fn current(&self) -> Option<&SkyFigures> {
        self.figures.as_ref()
    }

    /// The whole page for candidate `c` (survey index `index`).
    pub fn ui(&mut self, ui: &mut egui::Ui, index: usize, c: &Candidate, dem: Option<&Arc<Dem>>) {
        survey_figures(ui, c);
        let (lon, lat) = (c.crater.centre_lon_deg, c.crater.centre_lat_deg);
        let Some(f) = self.figures(ui.ctx(), index, lon, lat, dem) else {
            ui.horizontal(|ui| {
                ui.spinner();
                ui.label("Tracing the horizon and the sky…");
            });
            return;
        };
        ui.add_space(4.0);
        ui.strong(if f.horizon_from_terrain {
            "Skyline from the DEM around the crater centre"
        } else {
            "Skyline of the bare sphere (no terrain around the site)"
        });
        skyline_plot(ui, ("skyline", index), f, 240.0);
        skyline_key(ui);
        margin_note(ui, f, c);
        ui.add_space(4.0);
        diffraction_table(ui, f);
        ui.add_space(6.0);
        track_plot(ui, f);
    }
}

/// The survey's own visibility figures for the candidate, named as the metric registry
/// names them.
fn survey_figures(ui: &mut egui::Ui, c: &Candidate) {
    let Some(v) = &c.visibility else {
        ui.label("No visibility figures in this survey.");
        return;
    };
    let row = |ui: &mut egui::Ui, id: &str, text: String| {
        let hint = survey::metrics::metric(id)
            .map_or(String::new(), |m| format!("{}\nid: {id}", m.description));
        ui.label(text).on_hover_text(hint);
    };
    let m =
        |id: &str, v: f64| survey::metrics::metric(id).map_or(format!("{v:.2}"), |m| m.format(v));
    let label = survey::label_of;
    row(
        ui,
        "earth_clearance_deg",
        format!(
            "{}: {} over all librations (bare sphere {})",
            label("earth_clearance_deg"),
            m("earth_clearance_deg", v.earth_clearance_deg),
            m("earth_clearance_deg", v.earth_clearance_sphere_deg)
        ),
    );
    row(
        ui,
        "limb_margin_deg",
        format!(
            "{}: {}",
            label("limb_margin_deg"),
            m("limb_margin_deg", v.limb_margin_deg)
        ),
    );
    let widths = if v.gc_separation_hpbw.is_finite() && v.gc_separation_hpbw > 0.0 {
        format!(" ({:.1} beam widths)", v.gc_separation_hpbw)
    } else {
        String::new()
    };
    row(
        ui,
        "gc_separation_deg",
        format!(
            "{}: {}{widths}",
            label("gc_separation_deg"),
            m("gc_separation_deg", v.gc_separation_deg)
        ),
    );
    row(
        ui,
        "plane_fraction",
        format!(
            "{}: {} of the track within {:.0}° of the plane",
            label("plane_fraction"),
            m("plane_fraction", v.plane_fraction),
            v.plane_band_deg
        ),
    );
}

/// The Earth zone as a band over azimuth: runs of (azimuth, lowest, highest elevation) every
/// degree from 0 to 360, split where the zone is absent. An outline that winds once round the
/// sky encloses the nadir (or, above the horizon, the zenith): the band then reaches it.
pub fn zone_band(outline: &[(f64, f64)]) -> Vec<Vec<(f64, f64, f64)>> {
    if outline.len() < 3 {
        return Vec::new();
    }
    // Azimuths unwrapped so consecutive points differ by less than half a turn.
    let mut pts: Vec<(f64, f64)> = Vec::with_capacity(outline.len() + 1);
    let unwrap = |prev: f64, a: f64| {
        let mut u = a;
        while u - prev > 180.0 {
            u -= 360.0;
        }
        while u - prev < -180.0 {
            u += 360.0;
        }
        u
    };
    for &(a, e) in outline.iter().chain(outline.first()) {
        let u = pts.last().map_or(a, |p| unwrap(p.0, a));
        pts.push((u, e));
    }
    let winding = pts[pts.len() - 1].0 - pts[0].0;
    let around_pole = winding.abs() > 180.0;
    let mean_el = outline.iter().map(|p| p.1).sum::<f64>() / outline.len() as f64;
    let mut runs: Vec<Vec<(f64, f64, f64)>> = Vec::new();
    let mut run: Vec<(f64, f64, f64)> = Vec::new();
    for step in 0..=360 {
        let a = step as f64;
        let mut lo = f64::INFINITY;
        let mut hi = f64::NEG_INFINITY;
        let mut hits = 0;
        for seg in pts.windows(2) {
            let ((a0, e0), (a1, e1)) = (seg[0], seg[1]);
            if a0 == a1 {
                continue;
            }
            let (s0, s1) = (a0.min(a1), a0.max(a1));
            for turn in -3..=3 {
                let x = a + 360.0 * turn as f64;
                if x >= s0 && x <= s1 {
                    let e = e0 + (e1 - e0) * (x - a0) / (a1 - a0);
                    lo = lo.min(e);
                    hi = hi.max(e);
                    hits += 1;
                }
            }
        }
        let band = if around_pole && hits > 0 {
            if mean_el < 0.0 {
                Some((-90.0, hi))
            } else {
                Some((lo, 90.0))
            }
        } else if !around_pole && hits >= 2 {
            Some((lo, hi))
        } else {
            None
        };
        match band {
            Some((l, h)) => run.push((a, l, h)),
            None if !run.is_empty() => runs.push(std::mem::take(&mut run)),
            None => {}
        }
    }
    if !run.is_empty() {
        runs.push(run);
    }
    runs
}

/// Lowest and highest elevation a skyline plot shows: the whole lower sky (the Earth zone
/// of a far-side site lies far below the horizon) up to a little above the skyline.
pub(crate) fn elevation_bounds(f: &SkyFigures) -> (f64, f64) {
    let top = f
        .horizon
        .iter()
        .map(|p| p.1)
        .chain(f.earth_zone.iter().map(|p| p.1))
        .filter(|e| e.is_finite())
        .fold(0.0_f64, f64::max);
    (-90.0, (top + 10.0).min(90.0))
}

/// A skyline line, its ends joined across north (0 and 360 degrees).
pub(crate) fn skyline_points(f: &SkyFigures) -> Vec<[f64; 2]> {
    let mut pts: Vec<[f64; 2]> = f.horizon.iter().map(|&(a, e)| [a, e]).collect();
    if let Some(first) = f.horizon.first() {
        pts.push([first.0 + 360.0, first.1]);
    }
    pts
}

/// The area the Earth's centre covers over all librations, filled, with its outline.
pub(crate) fn draw_zone(
    plot: &mut egui_plot::PlotUi<'_>,
    f: &SkyFigures,
    fill: Color32,
    edge: Color32,
) {
    for run in zone_band(&f.earth_zone) {
        let xs: Vec<f64> = run.iter().map(|r| r.0).collect();
        let lo: Vec<f64> = run.iter().map(|r| r.1).collect();
        let hi: Vec<f64> = run.iter().map(|r| r.2).collect();
        plot.add(
            FilledArea::new("", &xs, &lo, &hi)
                .fill_color(fill)
                .stroke(egui::Stroke::new(1.0, edge))
                .allow_hover(false),
        );
    }
}

/// Elevation against azimuth (0-360 from north): the skyline, the astronomical horizon, the
/// Earth's libration zone and the margin at its worst azimuth. No legend inside: the key is
/// drawn under the plot by [`skyline_key`].
pub fn skyline_plot(
    ui: &mut egui::Ui,
    id: impl std::hash::Hash + std::fmt::Debug,
    f: &SkyFigures,
    height: f32,
) {
    let (lo, hi) = elevation_bounds(f);
    Plot::new(id)
        .height(height)
        .x_axis_label("azimuth from north, clockwise [°]")
        .y_axis_label("elevation [°]")
        .default_x_bounds(0.0, 360.0)
        .default_y_bounds(lo, hi)
        .x_grid_spacer(azimuth_grid)
        .y_grid_spacer(crate::charts::elevation_grid)
        .x_axis_formatter(azimuth_tick)
        .allow_scroll(false)
        .show(ui, |plot| {
            plot.hline(
                HLine::new("", 0.0)
                    .color(LEVEL_COLOUR)
                    .style(LineStyle::dashed_loose())
                    .width(1.0),
            );
            draw_zone(plot, f, ZONE_FILL, ZONE_EDGE);
            plot.line(
                Line::new("", PlotPoints::from(skyline_points(f)))
                    .color(SKYLINE_COLOUR)
                    .width(2.0),
            );
            margin_marker(plot, &f.margin);
        });
}

/// The margin at the worst azimuth: from the Earth's upper limb up (or down) to the skyline.
fn margin_marker(plot: &mut egui_plot::PlotUi<'_>, m: &EarthMargin) {
    let (az, limb, sky) = (
        m.worst_azimuth_deg,
        m.worst_limb_elevation_deg,
        m.worst_horizon_deg,
    );
    if !(az.is_finite() && limb.is_finite() && sky.is_finite()) {
        return;
    }
    plot.line(
        Line::new("", vec![[az, limb], [az, sky]])
            .color(MARGIN_COLOUR)
            .width(2.5),
    );
    plot.points(
        Points::new("", vec![[az, limb]])
            .color(LIMB_COLOUR)
            .radius(4.0),
    );
    let text = if m.clearance_deg >= 0.0 {
        format!("margin {:.1}°", m.clearance_deg)
    } else {
        format!("Earth {:.1}° above the skyline", -m.clearance_deg)
    };
    // Text on the side with more room, so it stays inside the plot.
    let anchor = if az > 270.0 {
        egui::Align2::RIGHT_CENTER
    } else {
        egui::Align2::LEFT_CENTER
    };
    let dx = if az > 270.0 { -3.0 } else { 3.0 };
    plot.text(
        Text::new("", PlotPoint::new(az + dx, 0.5 * (limb + sky)), text)
            .color(MARGIN_COLOUR)
            .anchor(anchor),
    );
}

pub fn skyline_key(ui: &mut egui::Ui) {
    key_row(
        ui,
        &[
            KeyEntry::new(SKYLINE_COLOUR, KeyMark::Line, "skyline"),
            KeyEntry::new(LEVEL_COLOUR, KeyMark::Dashed, "level (0°)"),
            KeyEntry::new(
                ZONE_EDGE,
                KeyMark::Fill,
                "Earth's centre over all librations",
            ),
            KeyEntry::new(LIMB_COLOUR, KeyMark::Dot, "Earth's upper limb, worst case"),
            KeyEntry::new(MARGIN_COLOUR, KeyMark::Line, "shielding margin there"),
        ],
    );
}

/// Where the worst case is, and how the drawn margin relates to the survey's figure.
fn margin_note(ui: &mut egui::Ui, f: &SkyFigures, c: &Candidate) {
    let m = &f.margin;
    if !m.worst_azimuth_deg.is_finite() {
        return;
    }
    ui.label(
        RichText::new(format!(
            "Smallest margin toward azimuth {:.0}°: Earth's upper limb at {:.1}°, skyline at {:.1}°.",
            m.worst_azimuth_deg, m.worst_limb_elevation_deg, m.worst_horizon_deg
        ))
        .small(),
    );
    // The plot traces its skyline from a decimated read of the open DEM; the survey's figure
    // (what the ranking uses) may differ by the resolution.
    if let Some(v) = &c.visibility {
        if (v.earth_clearance_deg - m.clearance_deg).abs() >= 0.05 {
            ui.label(
                RichText::new(format!(
                    "The plot's skyline is traced from the open DEM at display resolution; the survey's margin ({:.2}°) is the one ranked.",
                    v.earth_clearance_deg
                ))
                .small()
                .weak(),
            );
        }
    }
}

/// The creeping-wave attenuation estimate, as `quietbowl site` prints it.
fn diffraction_table(ui: &mut egui::Ui, f: &SkyFigures) {
    let hint = "ESTIMATE ONLY. First creeping-wave mode on a smooth sphere the Moon's size \
                (Fock 1946, J. Phys. USSR 10:130; Keller 1956, IRE Trans. Antennas Propag. AP-4:312), \
                at the bare-sphere angle into the shadow. Ignores the launch at the shadow \
                boundary, the regolith's conductivity, terrain edges and the Earth's ionosphere: \
                an order of magnitude, not a margin.";
    if f.diffraction.is_empty() {
        ui.label("Diffraction past the limb: no estimate (the Earth can rise over the bare sphere's horizon here).")
            .on_hover_text(hint);
        return;
    }
    ui.strong("Diffraction past the limb (estimate)")
        .on_hover_text(hint);
    ui.label(
        RichText::new(format!(
            "Attenuation of a wave creeping {:.1}° into the smooth sphere's shadow; hard / soft boundary.",
            f.diffraction[0].shadow_angle_deg
        ))
        .small(),
    );
    egui::Grid::new("sky-diffraction")
        .num_columns(2)
        .spacing([14.0, 2.0])
        .striped(true)
        .show(ui, |ui| {
            for d in &f.diffraction {
                ui.label(format!("{:.0} MHz", d.frequency_hz / 1e6));
                ui.label(format!(
                    "{:.0} dB / {:.0} dB",
                    d.attenuation_hard_db, d.attenuation_soft_db
                ))
                .on_hover_text(hint);
                ui.end_row();
            }
        });
}

const TRACK_COLOUR: Color32 = Color32::from_rgb(250, 210, 90);
const PLANE_FILL: Color32 = Color32::from_rgba_unmultiplied_const(200, 120, 255, 40);
const GC_COLOUR: Color32 = Color32::from_rgb(255, 90, 90);

fn track_plot(ui: &mut egui::Ui, f: &SkyFigures) {
    ui.strong("Zenith beam over one month, galactic coordinates (centre at l = 0)");
    // Centre the galactic centre: l in (-180, 180].
    let wrap = |l: f64| if l > 180.0 { l - 360.0 } else { l };
    Plot::new("beam-track")
        .height(180.0)
        .x_axis_label("galactic longitude l [°]")
        .y_axis_label("galactic latitude b [°]")
        .default_x_bounds(-180.0, 180.0)
        .default_y_bounds(-90.0, 90.0)
        .allow_scroll(false)
        .show(ui, |plot| {
            let band = f.plane_band_deg;
            plot.add(
                FilledArea::new("", &[-180.0, 180.0], &[-band, -band], &[band, band])
                    .fill_color(PLANE_FILL)
                    .allow_hover(false),
            );
            // Break the line where it wraps from +180 to -180.
            let mut seg: Vec<[f64; 2]> = Vec::new();
            for &(l, b) in &f.track {
                let x = wrap(l);
                if seg.last().is_some_and(|last| (x - last[0]).abs() > 180.0) {
                    plot.line(
                        Line::new("", PlotPoints::from(std::mem::take(&mut seg)))
                            .color(TRACK_COLOUR)
                            .width(2.0),
                    );
                }
                seg.push([x, b]);
            }
            plot.line(
                Line::new("", PlotPoints::from(seg))
                    .color(TRACK_COLOUR)
                    .width(2.0),
            );
            plot.points(
                Points::new("", vec![[0.0, 0.0]])
                    .radius(5.0)
                    .color(GC_COLOUR),
            );
        });
    let plane = format!("galactic plane ±{:.0}°", f.plane_band_deg);
    key_row(
        ui,
        &[
            KeyEntry::new(TRACK_COLOUR, KeyMark::Line, "beam centre's track"),
            KeyEntry::new(GC_COLOUR, KeyMark::Dot, "galactic centre"),
            KeyEntry::new(Color32::from_rgb(120, 72, 150), KeyMark::Fill, &plane),
        ],
    );
}

#[cfg(test)]
mod tests {
    use super::zone_band;

    #[test]
    fn a_zone_across_north_is_split_at_0_and_360() {
        // A square 20 deg wide centred on north, from -70 to -60 deg.
        let sq = [(350.0, -70.0), (10.0, -70.0), (10.0, -60.0), (350.0, -60.0)];
        let runs = zone_band(&sq);
        assert_eq!(runs.len(), 2, "{runs:?}");
        let first = &runs[0];
        assert_eq!((first[0].0, first.last().unwrap().0), (0.0, 10.0));
        assert!(first.iter().all(|r| r.1 == -70.0 && r.2 == -60.0));
        assert_eq!((runs[1][0].0, runs[1].last().unwrap().0), (350.0, 360.0));
    }

    #[test]
    fn a_zone_round_the_nadir_reaches_down_to_it() {
        let ring: Vec<(f64, f64)> = (0..36).map(|k| (k as f64 * 10.0, -75.0)).collect();
        let runs = zone_band(&ring);
        assert_eq!(runs.len(), 1);
        assert_eq!(runs[0].len(), 361);
        assert!(runs[0]
            .iter()
            .all(|r| r.1 == -90.0 && (r.2 + 75.0).abs() < 1e-9));
    }
}

//! The crater sheet's Operations page: the floor's hazard map with the lander's dispersion and
//! best aim point, the anchor shots over the ground beneath them, and the relay's and the
//! Sun's height above the lander's skyline over time. The figures are the survey's
//! (`operations::OperationsReport`, docs/operations.md); the pictures are drawn again here from
//! the DEM with the same library functions and the survey's recorded inputs, on a worker
//! thread, once per selected crater.

use crate::charts::{key_row, KeyEntry, KeyMark};
use crate::fit_plan::window_round;
use egui::{Color32, RichText, Stroke};
use egui_plot::{HLine, Line, LineStyle, Plot, PlotPoints};
use operations::landing::{safe_mask, LandingLimits};
use operations::shots::{Point, ShotLine};
use operations::sky::{Site, SkyTracks, Track, SERIES_START_JD_TT, SERIES_STEP_DAYS};
use operations::{OperationsInputs, SKYLINE_REACH_MAX_M, SKYLINE_REACH_MIN_M};
use std::sync::mpsc::{channel, Receiver};
use std::sync::Arc;
use structure::patch::Patch;
use survey::Candidate;
use terrain::{Dem, LocalFrame};

/// Days of the relay and Sun series drawn (two lunations).
const DAYS_SHOWN: f64 = 60.0;
/// Largest DEM window read for the page, pixels a side.
const WINDOW_MAX_PX: usize = 3000;
/// Points along each shot line.
const SHOT_SAMPLES: usize = 240;

const SAFE: Color32 = Color32::from_rgb(70, 150, 90);
const HAZARD: Color32 = Color32::from_rgb(190, 70, 60);
const NO_DATA: Color32 = Color32::from_rgb(25, 25, 25);
const LANDER: Color32 = Color32::WHITE;
const AIM: Color32 = Color32::from_rgb(90, 200, 250);
const ANCHOR: Color32 = Color32::from_rgb(255, 170, 60);
const RELAY: Color32 = Color32::from_rgb(110, 200, 255);
const SUN: Color32 = Color32::from_rgb(250, 210, 80);
const GROUND: Color32 = Color32::from_gray(170);

/// The operations metrics the page lists, by registry label, and the Earth margin beside them
/// (deep craters shield the Earth better and block the relay more: both in one place).
const FIGURES: [&str; 15] = [
    "landing_probability",
    "landing_best_probability",
    "landing_safe_fraction",
    "landing_best_offset_m",
    "shot_longest_range_m",
    "shot_lowest_clearance_m",
    "shots_all_reachable",
    "relay_visible_fraction",
    "relay_longest_outage_h",
    "relay_margin_deg",
    "relay_rim_worst_fraction",
    "earth_clearance_deg",
    "dark_fraction",
    "longest_dark_h",
    "sunlit_h_per_month",
];

/// One anchor shot drawn as height above the sphere against ground distance from the lander.
struct ShotProfile {
    ground: Vec<[f64; 2]>,
    line: Vec<[f64; 2]>,
}

/// Everything the page draws for one crater.
pub struct OperationsPictures {
    /// Hazard map over the plan square, north up.
    hazard: egui::ColorImage,
    half_m: f64,
    dispersion_3sigma_m: f64,
    post_m: f64,
    lander: (f64, f64),
    aim: Option<(f64, f64)>,
    anchors: Vec<(f64, f64)>,
    shots: Vec<ShotProfile>,
    /// Height above the lander's skyline, degrees, against days from the series' start.
    relay: Vec<[f64; 2]>,
    sun: Vec<[f64; 2]>,
    relay_margin_deg: f64,
}

type SiteKey = (usize, u64, u64);

/// The page's pictures for the selected crater, computed in the background.
#[derive(Default)]
pub struct OperationsView {
    for_site: Option<SiteKey>,
    pictures: Option<Result<OperationsPictures, String>>,
    pending: Option<Receiver<Result<OperationsPictures, String>>>,
    texture: Option<egui::TextureHandle>,
    /// 0-based anchor whose shot is drawn (the binding one when a crater is selected).
    shot: usize,
}

impl OperationsView {
    pub fn ui(
        &mut self,
        ui: &mut egui::Ui,
        index: usize,
        c: &Candidate,
        inputs: Option<&OperationsInputs>,
        dem: Option<&Arc<Dem>>,
    ) {
        figures_grid(ui, c);
        let (Some(report), Some(inputs)) = (&c.operations, inputs) else {
            ui.label(
                "No operations figures for this candidate: the survey was run with \
                 --no-operations or before they existed, or the crater has no reflector fit.",
            );
            return;
        };
        ui.label(
            RichText::new(format!(
                "Hazards from slope and roughness at the DEM's post spacing ({:.0} m): rocks and \
                 hazards smaller than a post are not seen. Relay near Earth-Moon L2 with a {:.1}° \
                 margin over the skyline; the night counts the Sun's upper limb.",
                report.landing.as_ref().map_or(f64::NAN, |l| l.post_m),
                inputs.relay_margin_deg
            ))
            .small(),
        );
        let Some(dem) = dem else {
            ui.label("The pictures need the DEM the survey was made from.");
            return;
        };
        self.start_if_new(ui.ctx(), index, c, inputs, dem);
        if let Some(rx) = &self.pending {
            if let Ok(p) = rx.try_recv() {
                self.pictures = Some(p);
                self.pending = None;
                self.texture = None;
            }
        }
        match &self.pictures {
            None => {
                ui.horizontal(|ui| {
                    ui.spinner();
                    ui.label("Drawing the floor, the shots and the sky…");
                });
            }
            Some(Err(e)) => {
                ui.colored_label(HAZARD, e);
            }
            Some(Ok(p)) => {
                let tex = self.texture.get_or_insert_with(|| {
                    ui.ctx().load_texture(
                        format!("operations-hazard-{index}"),
                        p.hazard.clone(),
                        egui::TextureOptions::NEAREST,
                    )
                });
                hazard_plan(ui, p, tex);
                shot_plot(ui, p, &mut self.shot);
                sky_plot(ui, p);
            }
        }
    }

    fn start_if_new(
        &mut self,
        ctx: &egui::Context,
        index: usize,
        c: &Candidate,
        inputs: &OperationsInputs,
        dem: &Arc<Dem>,
    ) {
        let key = (
            index,
            c.crater.centre_lon_deg.to_bits(),
            c.crater.centre_lat_deg.to_bits(),
        );
        if self.for_site == Some(key) {
            return;
        }
        self.for_site = Some(key);
        self.pictures = None;
        self.texture = None;
        self.shot = c
            .operations
            .as_ref()
            .and_then(|o| o.shots.as_ref())
            .map_or(0, |s| s.binding_anchor.saturating_sub(1));
        let (tx, rx) = channel();
        let (dem, c, inputs, ctx) = (dem.clone(), c.clone(), inputs.clone(), ctx.clone());
        std::thread::spawn(move || {
            let _ = tx.send(compute(&dem, &c, &inputs));
            ctx.request_repaint();
        });
        self.pending = Some(rx);
    }
}

/// The operations figures by registry label, the Earth margin among them.
fn figures_grid(ui: &mut egui::Ui, c: &Candidate) {
    egui::Grid::new("operations-figures")
        .striped(true)
        .num_columns(2)
        .show(ui, |ui| {
            for info in FIGURES.iter().filter_map(|id| survey::metric(id)) {
                ui.label(info.label).on_hover_text(info.hint());
                ui.label((info.get)(c).map_or("not computed".to_string(), |v| info.format(v)));
                ui.end_row();
            }
        });
}

/// Read the DEM round the crater and draw every picture of the page.
fn compute(
    dem: &Dem,
    c: &Candidate,
    inputs: &OperationsInputs,
) -> Result<OperationsPictures, String> {
    let report = c.operations.as_ref().ok_or("no operations figures")?;
    let fit = c.fit.as_ref().ok_or("no reflector fit")?;
    let m = &c.crater;
    let geom = dem.geometry();
    let radius_m = geom.body_radius_m;
    let frame = LocalFrame::new(radius_m, m.centre_lon_deg, m.centre_lat_deg);
    let local = |lon: f64, lat: f64| frame.to_local(lon, lat);
    let lander = local(report.lander_lon_deg, report.lander_lat_deg);
    let anchors: Vec<(f64, f64)> = fit
        .anchors
        .iter()
        .map(|a| local(a.lon_deg, a.lat_deg))
        .collect();
    let far = anchors
        .iter()
        .chain([&lander])
        .map(|p| p.0.hypot(p.1))
        .fold(m.diameter_m / 2.0, f64::max);
    let half_m = far * 1.15 + inputs.landing_dispersion_3sigma_m;
    let reach_m = (inputs.skyline_reach_diameters * m.diameter_m)
        .clamp(SKYLINE_REACH_MIN_M, SKYLINE_REACH_MAX_M);
    let (grid, post_m) = window_round(dem, &frame, half_m + reach_m, WINDOW_MAX_PX)?;
    let patch = Patch::build(
        &grid,
        m.centre_lon_deg,
        m.centre_lat_deg,
        half_m + reach_m,
        post_m,
    )
    .ok_or("the crater cannot be placed on the DEM")?;
    let hazard = hazard_image(&patch, inputs, half_m);
    let ground = |lon: f64, lat: f64| grid.sample_lonlat(lon, lat).filter(|h| h.is_finite());
    let lander_h = ground(report.lander_lon_deg, report.lander_lat_deg)
        .ok_or("no ground under the lander")?
        + inputs.mast_height_m;
    let from = Point {
        lon_deg: report.lander_lon_deg,
        lat_deg: report.lander_lat_deg,
        height_m: lander_h,
    };
    let shots = fit
        .anchors
        .iter()
        .map(|a| {
            let to = Point {
                lon_deg: a.lon_deg,
                lat_deg: a.lat_deg,
                height_m: a.height_m,
            };
            shot_profile(&ShotLine::new(radius_m, &from, &to), &ground)
        })
        .collect();
    // Only the days drawn: the series' start at its own step, not the whole nodal cycle.
    let span = DAYS_SHOWN + SERIES_STEP_DAYS;
    let orbit = operations::relay_orbit(inputs, None).map_err(|e| e.to_string())?;
    let tracks = SkyTracks::compute_over(&orbit, SERIES_START_JD_TT, span, SERIES_STEP_DAYS, span);
    let skyline = operations::skyline::sweep(
        &patch,
        patch
            .frame
            .to_local(report.lander_lon_deg, report.lander_lat_deg),
        inputs.mast_height_m,
        reach_m,
        operations::SKYLINE_SECTORS,
    )
    .ok_or("no skyline at the lander")?;
    let site = Site::new(
        report.lander_lon_deg,
        report.lander_lat_deg,
        skyline.site_height_m,
        radius_m,
    );
    let above = |track: &Track| -> Vec<[f64; 2]> {
        let n = (DAYS_SHOWN / track.step_days).ceil() as usize + 1;
        track
            .positions_km
            .iter()
            .take(n)
            .enumerate()
            .map(|(k, p)| {
                let (el, az, range) = site.look(p);
                let limb = (track.radius_km / range)
                    .clamp(-1.0, 1.0)
                    .asin()
                    .to_degrees();
                [k as f64 * track.step_days, el + limb - skyline.at(az)]
            })
            .collect()
    };
    Ok(OperationsPictures {
        hazard,
        half_m,
        dispersion_3sigma_m: inputs.landing_dispersion_3sigma_m,
        post_m,
        lander,
        aim: report
            .landing
            .as_ref()
            .map(|l| local(l.aim_lon_deg, l.aim_lat_deg)),
        anchors,
        shots,
        relay: above(&tracks.relay),
        sun: above(&tracks.sun),
        relay_margin_deg: inputs.relay_margin_deg,
    })
}

/// Safe ground green, hazards red, no data black, shaded by a lamp in the north-west so the
/// floor's shape shows; north up, over the square of half-side `half_m`.
fn hazard_image(patch: &Patch, inputs: &OperationsInputs, half_m: f64) -> egui::ColorImage {
    let limits = LandingLimits {
        dispersion_3sigma_m: inputs.landing_dispersion_3sigma_m,
        max_slope_deg: inputs.landing_max_slope_deg,
        max_roughness_m: inputs.landing_max_roughness_m,
    };
    let mask = safe_mask(patch, &limits);
    let n = patch.n;
    let skip = ((patch.half_m - half_m) / patch.cell_m).floor().max(0.0) as usize;
    let side = n - 2 * skip;
    let h = |i: usize, j: usize| patch.heights_m[j * n + i];
    let pixels = (0..side * side)
        .map(|k| {
            // Image rows run from the north; the patch's from the south.
            let (i, j) = (skip + k % side, skip + (side - 1 - k / side));
            let base = match mask[j * n + i] {
                1 => SAFE,
                0 => HAZARD,
                _ => return NO_DATA,
            };
            let (i0, i1, j0, j1) = (
                i.saturating_sub(1),
                (i + 1).min(n - 1),
                j.saturating_sub(1),
                (j + 1).min(n - 1),
            );
            let dzdx = (h(i1, j) - h(i0, j)) / ((i1 - i0).max(1) as f64 * patch.cell_m);
            let dzdy = (h(i, j1) - h(i, j0)) / ((j1 - j0).max(1) as f64 * patch.cell_m);
            // Lamp from the north-west, 45° up: brighter on slopes facing it.
            let shade = (0.75 + 0.5 * (-dzdx + dzdy) / 2f64.sqrt()).clamp(0.35, 1.15);
            let s = |v: u8| {
                (v as f64 * if shade.is_finite() { shade } else { 1.0 }).clamp(0.0, 255.0) as u8
            };
            Color32::from_rgb(s(base.r()), s(base.g()), s(base.b()))
        })
        .collect();
    egui::ColorImage {
        size: [side, side],
        source_size: egui::vec2(side as f32, side as f32),
        pixels,
    }
}

/// The shot from the launcher to an anchor: the line's height and the ground's height above
/// the sphere against ground distance from the launcher (`operations::shots::ShotLine`, the
/// line the survey's shot figures sample).
fn shot_profile(line: &ShotLine, ground: &dyn Fn(f64, f64) -> Option<f64>) -> ShotProfile {
    let mut out = ShotProfile {
        ground: Vec::with_capacity(SHOT_SAMPLES + 1),
        line: Vec::with_capacity(SHOT_SAMPLES + 1),
    };
    for k in 0..=SHOT_SAMPLES {
        let q = line.at(k as f64 / SHOT_SAMPLES as f64);
        out.line.push([q.ground_from_start_m, q.height_m]);
        if let Some(g) = ground(q.lon_deg, q.lat_deg) {
            out.ground.push([q.ground_from_start_m, g]);
        }
    }
    out
}

/// The hazard map, north up, with the dispersion circle round the lander, the structure's aim
/// point, the anchors and the shot lines in plan.
fn hazard_plan(ui: &mut egui::Ui, p: &OperationsPictures, tex: &egui::TextureHandle) {
    ui.separator();
    ui.strong("Landing: hazards on the floor");
    let side = ui.available_width().clamp(200.0, 420.0);
    let (rect, _) = ui.allocate_exact_size(egui::vec2(side, side), egui::Sense::hover());
    let painter = ui.painter_at(rect);
    painter.image(
        tex.id(),
        rect,
        egui::Rect::from_min_max(egui::pos2(0.0, 0.0), egui::pos2(1.0, 1.0)),
        Color32::WHITE,
    );
    let scale = side / (2.0 * p.half_m) as f32;
    let at = |(x, y): (f64, f64)| rect.center() + egui::vec2(x as f32 * scale, -y as f32 * scale);
    let lander = at(p.lander);
    for (k, &a) in p.anchors.iter().enumerate() {
        let q = at(a);
        painter.line_segment([lander, q], Stroke::new(1.0, ANCHOR.gamma_multiply(0.7)));
        painter.circle_filled(q, 4.0, ANCHOR);
        painter.text(
            q + egui::vec2(6.0, -6.0),
            egui::Align2::LEFT_BOTTOM,
            format!("{}", k + 1),
            egui::FontId::proportional(12.0),
            Color32::WHITE,
        );
    }
    if let Some(aim) = p.aim {
        let q = at(aim);
        for d in [egui::vec2(6.0, 0.0), egui::vec2(0.0, 6.0)] {
            painter.line_segment([q - d, q + d], Stroke::new(2.0, AIM));
        }
    }
    painter.circle_stroke(
        lander,
        p.dispersion_3sigma_m as f32 * scale,
        Stroke::new(1.5, LANDER),
    );
    painter.circle_filled(lander, 3.5, LANDER);
    key_row(
        ui,
        &[
            KeyEntry::new(SAFE, KeyMark::Fill, "safe ground"),
            KeyEntry::new(HAZARD, KeyMark::Fill, "too steep or rough"),
            KeyEntry::new(NO_DATA, KeyMark::Fill, "no data"),
            KeyEntry::new(LANDER, KeyMark::Line, "best aim point, 3-sigma dispersion"),
            KeyEntry::new(AIM, KeyMark::Dot, "where the structure wants the lander"),
            KeyEntry::new(ANCHOR, KeyMark::Dot, "rim anchors and shot lines"),
        ],
    );
    ui.label(
        RichText::new(format!(
            "North up, {:.1} km across; one cell per DEM post ({:.0} m).",
            2.0 * p.half_m / 1000.0,
            p.post_m
        ))
        .small(),
    );
}

/// One anchor shot over the ground beneath it.
fn shot_plot(ui: &mut egui::Ui, p: &OperationsPictures, chosen: &mut usize) {
    ui.separator();
    ui.horizontal(|ui| {
        ui.strong("Anchor shot over the wall");
        egui::ComboBox::from_id_salt("operations-shot")
            .selected_text(format!("anchor {}", *chosen + 1))
            .show_ui(ui, |ui| {
                for k in 0..p.shots.len() {
                    ui.selectable_value(chosen, k, format!("anchor {}", k + 1));
                }
            });
    });
    let Some(s) = p.shots.get(*chosen) else {
        ui.label("No anchors.");
        return;
    };
    Plot::new(("operations-shot-plot", *chosen))
        .height(200.0)
        .x_axis_label("ground distance from the lander [m]")
        .y_axis_label("height above the sphere [m]")
        .allow_scroll(false)
        .show(ui, |plot| {
            plot.line(
                Line::new("", PlotPoints::from(s.ground.clone()))
                    .color(GROUND)
                    .width(1.5),
            );
            plot.line(
                Line::new("", PlotPoints::from(s.line.clone()))
                    .color(ANCHOR)
                    .width(2.0),
            );
        });
    key_row(
        ui,
        &[
            KeyEntry::new(GROUND, KeyMark::Line, "ground under the shot"),
            KeyEntry::new(
                ANCHOR,
                KeyMark::Line,
                "straight shot line from the launcher",
            ),
        ],
    );
}

/// The relay's and the Sun's height above the lander's skyline over two lunations.
fn sky_plot(ui: &mut egui::Ui, p: &OperationsPictures) {
    ui.separator();
    ui.strong("Relay and Sun above the lander's skyline");
    Plot::new("operations-sky-plot")
        .height(200.0)
        .x_axis_label("days from the series' start")
        .y_axis_label("above the skyline [°]")
        .allow_scroll(false)
        .show(ui, |plot| {
            plot.hline(crate::charts::level_line());
            plot.hline(
                HLine::new("", p.relay_margin_deg)
                    .color(RELAY.gamma_multiply(0.6))
                    .style(LineStyle::dotted_loose()),
            );
            plot.line(
                Line::new("", PlotPoints::from(p.relay.clone()))
                    .color(RELAY)
                    .width(1.5),
            );
            plot.line(
                Line::new("", PlotPoints::from(p.sun.clone()))
                    .color(SUN)
                    .width(1.5),
            );
        });
    let margin = format!("relay margin {:.1}°", p.relay_margin_deg);
    key_row(
        ui,
        &[
            KeyEntry::new(RELAY, KeyMark::Line, "relay near L2"),
            KeyEntry::new(SUN, KeyMark::Line, "Sun's upper limb"),
            KeyEntry::new(Color32::from_gray(150), KeyMark::Dashed, "skyline"),
            KeyEntry::new(RELAY.gamma_multiply(0.6), KeyMark::Dashed, &margin),
        ],
    );
    ui.label(
        RichText::new(
            "Below the dashed line the skyline hides it: for the Sun that is night at the lander \
             (observing time), for the relay an outage.",
        )
        .small(),
    );
}

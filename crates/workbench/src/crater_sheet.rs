//! The crater sheet: everything about the selected candidate on one page: standing, metrics
//! with uncertainties, radial profiles, rim crest around the circle, visibility figures, and
//! the user's notes and verdict.

use crate::engine::SmaaRun;
use crate::profiles::{radial_profiles, RadialProfiles};
use crate::session::{candidate_label, Session};
use crate::SCREENING_CAUTION;
use egui::{Color32, RichText};
use egui_plot::{HLine, Legend, Line, Plot, PlotPoints, Points, VLine};
use siting::study::Decision;
use std::sync::Arc;
use survey::METRICS;
use terrain::Dem;

/// The pages of the crater sheet.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub enum SheetTab {
    #[default]
    Shape,
    Sky,
    Fit,
    Robustness,
    Numbers,
    Notes,
}

#[derive(Default)]
pub struct CraterSheet {
    pub tab: SheetTab,
    profiles: Option<(usize, Option<RadialProfiles>)>,
    smaa_run: Option<SmaaRun>,
    smaa_error: Option<String>,
    sky: crate::sky_view::SkyView,
    fit: crate::fit_view::FitView,
}

impl CraterSheet {
    pub fn ui(&mut self, ui: &mut egui::Ui, session: &mut Session, dem: Option<&Arc<Dem>>) {
        if let Some(done) = self.smaa_run.as_ref().and_then(SmaaRun::try_finish) {
            let generation = self.smaa_run.take().map_or(0, |r| r.generation);
            match done {
                Ok(r) => session.smaa = Some((generation, r)),
                Err(e) => self.smaa_error = Some(e),
            }
        }
        let Some(index) = session.selected else {
            ui.heading("Crater sheet");
            ui.label("Select a candidate in the list or on the map.");
            return;
        };
        let Some(c) = session.candidate(index).cloned() else {
            return;
        };
        let m = &c.crater;
        ui.heading(format!("Crater sheet: {}", candidate_label(c.id)));
        match session.ranking.rank(index) {
            Some(r) => {
                ui.label(
                    RichText::new(format!(
                        "Rank {r} of {}, score {:.3}",
                        session.ranking.passing_count(),
                        session.ranking.score(index).unwrap_or(0.0)
                    ))
                    .strong(),
                );
            }
            None => {
                ui.label(
                    RichText::new("Fails the limits:")
                        .strong()
                        .color(Color32::from_rgb(240, 140, 120)),
                );
                for reason in session.reasons(index) {
                    ui.label(format!("• {reason}"));
                }
            }
        }
        ui.label(RichText::new(SCREENING_CAUTION).small().italics());
        egui::Grid::new("sheet-key-figures")
            .num_columns(4)
            .spacing([14.0, 2.0])
            .show(ui, |ui| {
                ui.label("Diameter");
                ui.strong(format!("{:.0} ± {:.0} m", m.diameter_m, m.diameter_sd_m));
                ui.label("Depth");
                ui.strong(format!("{:.0} ± {:.0} m", m.depth_m, m.depth_sd_m));
                ui.end_row();
                ui.label("d/D");
                ui.strong(format!("{:.3}", m.depth_to_diameter));
                ui.label("Rim found");
                ui.strong(format!("{:.0}% of azimuths", m.rim_completeness * 100.0));
                ui.end_row();
                ui.label("Centre");
                ui.strong(format!(
                    "{:.3}°, {:.3}°",
                    m.centre_lon_deg, m.centre_lat_deg
                ));
                ui.end_row();
            });
        ui.separator();
        ui.horizontal(|ui| {
            for (tab, name) in [
                (SheetTab::Shape, "Shape"),
                (SheetTab::Sky, "Earth and sky"),
                (SheetTab::Fit, "Reflector"),
                (SheetTab::Robustness, "Robustness"),
                (SheetTab::Numbers, "All numbers"),
                (SheetTab::Notes, "Notes"),
            ] {
                ui.selectable_value(&mut self.tab, tab, name);
            }
        });
        ui.separator();
        egui::ScrollArea::vertical().id_salt("sheet-scroll").show(ui, |ui| match self.tab {
            SheetTab::Shape => {
                ui.strong("Radial profiles");
                if self.profiles.as_ref().map(|p| p.0) != Some(index) {
                    let p = dem.and_then(|d| radial_profiles(d, m.centre_lon_deg, m.centre_lat_deg, m.diameter_m / 2.0));
                    self.profiles = Some((index, p));
                }
                match self.profiles.as_ref().and_then(|p| p.1.as_ref()) {
                    Some(p) => profile_plot(ui, p, m.diameter_m / 2.0, m.floor_height_m),
                    None => { ui.label("Needs the DEM the survey was made from."); }
                }
                ui.add_space(6.0);
                ui.strong("Rim crest around the fitted circle");
                rim_plot(ui, &m.rim_crest_radius_m, m.diameter_m / 2.0);
                ui.label(format!("Crest found on {:.0}% of azimuths; widest gap {:.0}° centred at {:.0}°", m.rim_completeness * 100.0, m.rim_gap_deg, m.rim_gap_azimuth_deg));
            }
            SheetTab::Sky => {
                match &c.visibility {
                    Some(v) => {
                        ui.label(format!("Earth clearance over all librations: {:.2}° (bare sphere {:.2}°)", v.earth_clearance_deg, v.earth_clearance_sphere_deg));
                        ui.label(format!("Behind the libration-extended limb by {:.2}°", v.limb_margin_deg));
                        ui.label(format!("Beam's closest approach to the galactic centre: {:.1}°", v.gc_separation_deg));
                        ui.label(format!("Sky track within {:.0}° of the galactic plane: {:.0}%", v.plane_band_deg, v.plane_fraction * 100.0));
                    }
                    None => { ui.label("No visibility figures in this survey."); }
                }
                self.sky.ui(ui, index, m.centre_lon_deg, m.centre_lat_deg, dem);
            }
            SheetTab::Fit => {
                let survey = session.survey.clone();
                let spec = survey.as_ref().and_then(|s| s.parameters.structure.as_ref());
                let radius_m = survey.as_ref().map_or(terrain::MOON_RADIUS_M, |s| s.input.body_radius_m);
                let key = survey.as_ref().map_or(0, |s| Arc::as_ptr(s) as usize);
                self.fit.ui(ui, &c, spec, radius_m, key, dem);
            }
            SheetTab::Robustness => self.smaa_ui(ui, session, index),
            SheetTab::Numbers => {
                egui::Grid::new("sheet-metrics").striped(true).num_columns(2).show(ui, |ui| {
                    let sd = |name: &str| match name {
                        "diameter_m" => Some(m.diameter_sd_m),
                        "depth_m" => Some(m.depth_sd_m),
                        _ => None,
                    };
                    for info in METRICS {
                        ui.label(info.label).on_hover_text(info.hint());
                        let text = match ((info.get)(&c), sd(info.name)) {
                            (Some(v), Some(s)) => format!("{} ± {}", info.format(v), info.format(s)),
                            (Some(v), None) => info.format(v),
                            (None, _) => "not measured".into(),
                        };
                        ui.label(text);
                        ui.end_row();
                    }
                });
                if m.edge_cut {
                    ui.colored_label(Color32::YELLOW, "The measurement disc is cut by the raster edge: figures cover part of the crater.");
                }
            }
            SheetTab::Notes => {
                ui.strong("Your decision and notes");
                let review = session.review_mut(c.id);
                ui.horizontal(|ui| {
                    ui.selectable_value(&mut review.decision, Decision::Undecided, "Undecided");
                    ui.selectable_value(&mut review.decision, Decision::Accepted, "Keep");
                    ui.selectable_value(&mut review.decision, Decision::Rejected, "Set aside");
                });
                ui.add(egui::TextEdit::multiline(&mut review.note).hint_text("Notes on this crater (kept in the study)").desired_rows(6).desired_width(f32::INFINITY));
            }
        });
    }
}

impl CraterSheet {
    fn smaa_ui(&mut self, ui: &mut egui::Ui, session: &Session, index: usize) {
        let current = session
            .smaa
            .as_ref()
            .filter(|(g, _)| *g == session.ranking.generation)
            .map(|(_, r)| r);
        match current {
            Some(r) => match r.probabilities(index) {
                Some((p1, pn)) => {
                    ui.label(format!(
                        "Ranked first in {:.1}% of {} weight draws",
                        p1 * 100.0,
                        r.settings.samples
                    ));
                    ui.label(format!(
                        "In the best {} in {:.1}% of draws",
                        r.settings.top_n,
                        pn * 100.0
                    ));
                    ui.add(
                        egui::ProgressBar::new(pn as f32)
                            .desired_width(220.0)
                            .text(format!("top {}: {:.0}%", r.settings.top_n, pn * 100.0)),
                    );
                }
                None => {
                    ui.label(format!(
                        "Not among the {} best candidates analysed.",
                        r.pool.len()
                    ));
                }
            },
            None if self.smaa_run.is_some() => {
                ui.horizontal(|ui| {
                    ui.spinner();
                    ui.label("Drawing weights…");
                });
            }
            None => {
                ui.label(RichText::new("How often this candidate stays on top when the weights are drawn around the chosen ones.").small());
                if ui.button("Estimate rank probabilities").clicked() {
                    if let Some(table) = &session.prepared {
                        self.smaa_run = Some(SmaaRun::start(
                            table.clone(),
                            session.criteria.clone(),
                            session.ranking.generation,
                            ui.ctx(),
                        ));
                        self.smaa_error = None;
                    }
                }
            }
        }
        if let Some(e) = &self.smaa_error {
            ui.colored_label(Color32::from_rgb(240, 140, 120), e);
        }
    }
}

fn profile_plot(ui: &mut egui::Ui, p: &RadialProfiles, radius_m: f64, floor_m: f64) {
    Plot::new("radial-profiles")
        .height(200.0)
        .legend(Legend::default())
        .x_axis_label("distance from centre [km]")
        .y_axis_label("height [m]")
        .allow_scroll(false)
        .show(ui, |plot| {
            for (k, ray) in p.heights_m.iter().enumerate() {
                let pts: PlotPoints = p
                    .distance_m
                    .iter()
                    .zip(ray)
                    .filter(|(_, h)| h.is_finite())
                    .map(|(d, h)| [d / 1000.0, *h])
                    .collect();
                plot.line(
                    Line::new(if k == 0 { "each azimuth" } else { "" }, pts)
                        .color(Color32::from_rgba_unmultiplied(160, 185, 220, 90))
                        .width(1.0)
                        .allow_hover(false),
                );
            }
            let med: PlotPoints = p
                .distance_m
                .iter()
                .zip(&p.median_m)
                .filter(|(_, h)| h.is_finite())
                .map(|(d, h)| [d / 1000.0, *h])
                .collect();
            plot.line(
                Line::new("median", med)
                    .color(Color32::from_rgb(250, 210, 90))
                    .width(2.5),
            );
            plot.vline(
                VLine::new("fitted rim", radius_m / 1000.0).color(Color32::from_rgb(240, 120, 100)),
            );
            if floor_m.is_finite() {
                plot.hline(
                    HLine::new("floor level", floor_m).color(Color32::from_rgb(110, 200, 240)),
                );
            }
        });
}

fn rim_plot(ui: &mut egui::Ui, crest_m: &[f32], radius_m: f64) {
    let n = crest_m.len().max(1);
    let to_xy = |az_deg: f64, r: f64| {
        [
            r * az_deg.to_radians().sin() / 1000.0,
            r * az_deg.to_radians().cos() / 1000.0,
        ]
    };
    Plot::new("rim-crest")
        .height(220.0)
        .data_aspect(1.0)
        .legend(Legend::default())
        .x_axis_label("east [km]")
        .y_axis_label("north [km]")
        .allow_scroll(false)
        .show(ui, |plot| {
            let circle: PlotPoints = (0..=120).map(|k| to_xy(k as f64 * 3.0, radius_m)).collect();
            plot.line(
                Line::new("fitted circle", circle)
                    .color(Color32::from_gray(160))
                    .width(1.0),
            );
            let found: PlotPoints = crest_m
                .iter()
                .enumerate()
                .filter(|(_, r)| r.is_finite())
                .map(|(k, r)| to_xy(360.0 * k as f64 / n as f64, *r as f64))
                .collect();
            plot.points(
                Points::new("crest found", found)
                    .radius(2.5)
                    .color(Color32::from_rgb(250, 210, 90)),
            );
            let missing: PlotPoints = crest_m
                .iter()
                .enumerate()
                .filter(|(_, r)| !r.is_finite())
                .map(|(k, _)| to_xy(360.0 * k as f64 / n as f64, radius_m))
                .collect();
            plot.points(
                Points::new("no crest", missing)
                    .radius(2.0)
                    .color(Color32::from_rgb(230, 110, 100)),
            );
        });
}

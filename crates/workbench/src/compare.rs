//! Two to four candidates side by side, in a window of their own: every number the survey
//! holds, their median radial profiles overlaid, their skylines against the Earth's zone, and
//! their reflector plans. Candidates join with Ctrl-click in the candidate list (Cmd on a Mac)
//! or with "Add to comparison" on the crater sheet.

use crate::charts::{key_row, KeyEntry, KeyMark, COMPARE_COLOURS};
use crate::fit_plan::{backdrop, plan, plan_half_width_m};
use crate::profiles::{radial_profiles, RadialProfiles};
use crate::session::{candidate_label, Session};
use crate::sky_view::{SkyFigures, SkyView};
use egui::RichText;
use egui_plot::{Line, LineStyle, Plot, PlotPoints, VLine};
use std::collections::HashMap;
use std::sync::Arc;
use terrain::{Dem, LocalFrame};

/// At most this many candidates side by side: more no longer fit a screen's width.
pub const MAX_COMPARED: usize = 4;
/// Fewer than this is no comparison.
pub const MIN_COMPARED: usize = 2;

/// Which candidates are compared (indices into the survey, in the order they were added) and
/// whether the window is shown. Emptied when another survey is opened.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct CompareSet {
    pub indices: Vec<usize>,
    pub show: bool,
}

impl CompareSet {
    pub fn contains(&self, index: usize) -> bool {
        self.indices.contains(&index)
    }

    /// Add `index` or take it out. Adding to a full set does nothing and returns false. The
    /// window opens by itself when the second candidate joins.
    pub fn toggle(&mut self, index: usize) -> bool {
        if let Some(k) = self.indices.iter().position(|&i| i == index) {
            self.indices.remove(k);
            if self.indices.len() < MIN_COMPARED {
                self.show = false;
            }
            return true;
        }
        if self.indices.len() >= MAX_COMPARED {
            return false;
        }
        self.indices.push(index);
        if self.indices.len() == MIN_COMPARED {
            self.show = true;
        }
        true
    }

    pub fn clear(&mut self) {
        self.indices.clear();
        self.show = false;
    }
}

/// The candidate list's hook: a click with Ctrl (Cmd on a Mac) held puts the row's candidate
/// into the comparison or takes it out, instead of selecting it. True when it did.
pub fn table_click(ctx: &egui::Context, session: &mut Session, index: usize) -> bool {
    // The click's own modifiers too: all of a frame's events are read at once, so the key may
    // already be up again when the release of the button is seen.
    let command = ctx.input(|i| {
        i.modifiers.command
            || i.events.iter().any(|e| {
                matches!(e, egui::Event::PointerButton { pressed: false, modifiers, .. } if modifiers.command)
            })
    });
    if !command {
        return false;
    }
    session.compare.toggle(index);
    true
}

/// The comparison window with what it has computed for its candidates.
#[derive(Default)]
pub struct CompareView {
    /// The survey the caches below belong to (its address).
    survey_key: usize,
    sky: HashMap<usize, SkyView>,
    profiles: HashMap<usize, Option<RadialProfiles>>,
    backdrops: HashMap<usize, Option<egui::TextureHandle>>,
}

impl CompareView {
    /// Show the window when the session asks for it.
    pub fn window(&mut self, ctx: &egui::Context, session: &mut Session, dem: Option<&Arc<Dem>>) {
        let key = session
            .survey
            .as_ref()
            .map_or(0, |s| Arc::as_ptr(s) as usize);
        if key != self.survey_key {
            *self = CompareView {
                survey_key: key,
                ..CompareView::default()
            };
        }
        let n = session.candidate_count();
        session.compare.indices.retain(|&i| i < n);
        if !session.compare.show || session.compare.indices.len() < MIN_COMPARED {
            return;
        }
        let mut open = true;
        egui::Window::new("Compare candidates")
            .open(&mut open)
            .default_size([1240.0, 640.0])
            .vscroll(true)
            .show(ctx, |ui| self.body(ui, session, dem));
        if !open {
            session.compare.show = false;
        }
        let keep = &session.compare.indices;
        self.sky.retain(|i, _| keep.contains(i));
        self.profiles.retain(|i, _| keep.contains(i));
        self.backdrops.retain(|i, _| keep.contains(i));
    }

    fn body(&mut self, ui: &mut egui::Ui, session: &mut Session, dem: Option<&Arc<Dem>>) {
        let chosen = session.compare.indices.clone();
        let names: Vec<String> = chosen
            .iter()
            .filter_map(|&i| session.candidate(i).map(|c| candidate_label(c.id)))
            .collect();
        ui.label(RichText::new(format!("Comparing {}", names.join(", "))).strong());
        ui.label(
            RichText::new(format!(
                "Ctrl-click rows of the candidate list to add or remove (up to {MAX_COMPARED}). {}",
                crate::SCREENING_CAUTION
            ))
            .small(),
        );
        self.header(ui, session, &chosen);
        ui.separator();
        // Numbers beside the plots, so one look takes in both.
        ui.columns(2, |cols| {
            egui::CollapsingHeader::new("Numbers")
                .default_open(true)
                .show(&mut cols[0], |ui| numbers(ui, session, &chosen));
            egui::CollapsingHeader::new("Radial profiles")
                .default_open(true)
                .show(&mut cols[1], |ui| {
                    self.profiles_plot(ui, session, &chosen, dem)
                });
            egui::CollapsingHeader::new("Skylines and the Earth")
                .default_open(true)
                .show(&mut cols[1], |ui| self.skylines(ui, session, &chosen, dem));
        });
        egui::CollapsingHeader::new("Reflector fits")
            .default_open(true)
            .show(ui, |ui| self.fits(ui, session, &chosen, dem));
    }

    fn header(&mut self, ui: &mut egui::Ui, session: &mut Session, chosen: &[usize]) {
        let mut remove = None;
        ui.horizontal_wrapped(|ui| {
            for (k, &i) in chosen.iter().enumerate() {
                let Some(c) = session.candidate(i) else {
                    continue;
                };
                let (rect, _) =
                    ui.allocate_exact_size(egui::vec2(12.0, 12.0), egui::Sense::hover());
                ui.painter().rect_filled(rect, 2.0, COMPARE_COLOURS[k % 4]);
                let standing = match session.ranking.rank(i) {
                    Some(r) => format!(
                        "rank {r}, score {:.3}",
                        session.ranking.score(i).unwrap_or(0.0)
                    ),
                    None => "fails the limits".into(),
                };
                ui.label(RichText::new(candidate_label(c.id)).strong());
                ui.label(standing);
                if ui
                    .small_button("Show")
                    .on_hover_text("Select it: the crater sheet and the map follow")
                    .clicked()
                {
                    session.select(Some(i), false);
                }
                if ui.small_button("Remove").clicked() {
                    remove = Some(i);
                }
                ui.add_space(14.0);
            }
            if ui.button("Clear").clicked() {
                session.compare.clear();
            }
        });
        if let Some(i) = remove {
            session.compare.toggle(i);
        }
    }

    fn profiles_plot(
        &mut self,
        ui: &mut egui::Ui,
        session: &Session,
        chosen: &[usize],
        dem: Option<&Arc<Dem>>,
    ) {
        let Some(dem) = dem else {
            ui.label("Needs the DEM the survey was made from.");
            return;
        };
        for &i in chosen {
            if let (false, Some(c)) = (self.profiles.contains_key(&i), session.candidate(i)) {
                let m = &c.crater;
                let p =
                    radial_profiles(dem, m.centre_lon_deg, m.centre_lat_deg, m.diameter_m / 2.0);
                self.profiles.insert(i, p);
            }
        }
        ui.label(
            RichText::new("Median over azimuths of each crater's profile, height above its own floor level; dotted lines mark the fitted rims.")
                .small(),
        );
        Plot::new("compare-profiles")
            .height(220.0)
            .x_axis_label("distance from centre [km]")
            .y_axis_label("height above the crater's floor [m]")
            .allow_scroll(false)
            .show(ui, |plot| {
                for (k, &i) in chosen.iter().enumerate() {
                    let (Some(Some(p)), Some(c)) = (self.profiles.get(&i), session.candidate(i))
                    else {
                        continue;
                    };
                    let floor = c.crater.floor_height_m;
                    let base = if floor.is_finite() { floor } else { 0.0 };
                    let colour = COMPARE_COLOURS[k % 4];
                    let pts: PlotPoints = p
                        .distance_m
                        .iter()
                        .zip(&p.median_m)
                        .filter(|(_, h)| h.is_finite())
                        .map(|(d, h)| [d / 1000.0, h - base])
                        .collect();
                    plot.line(
                        Line::new(candidate_label(c.id), pts)
                            .color(colour)
                            .width(2.0),
                    );
                    plot.vline(
                        VLine::new("", c.crater.diameter_m / 2000.0)
                            .color(colour)
                            .style(LineStyle::dotted_dense()),
                    );
                }
            });
        self.candidate_key(ui, session, chosen);
    }

    fn skylines(
        &mut self,
        ui: &mut egui::Ui,
        session: &Session,
        chosen: &[usize],
        dem: Option<&Arc<Dem>>,
    ) {
        let ctx = ui.ctx().clone();
        let mut figures: Vec<(usize, &SkyFigures)> = Vec::new();
        for &i in chosen {
            let Some(c) = session.candidate(i) else {
                continue;
            };
            let (lon, lat) = (c.crater.centre_lon_deg, c.crater.centre_lat_deg);
            self.sky
                .entry(i)
                .or_default()
                .figures(&ctx, i, lon, lat, dem);
        }
        for (k, &i) in chosen.iter().enumerate() {
            if let Some(f) = self.sky.get(&i).and_then(SkyView::current) {
                figures.push((k, f));
            }
        }
        if figures.len() < chosen.len() {
            ui.horizontal(|ui| {
                ui.spinner();
                ui.label("Tracing the horizons…");
            });
        }
        let top = figures
            .iter()
            .map(|(_, f)| crate::sky_view::elevation_bounds(f).1)
            .fold(0.0_f64, f64::max);
        // The bounds follow the traced skylines: a plot keeps its bounds in memory, so its id
        // changes as skylines arrive.
        Plot::new(("compare-skylines", chosen, figures.len()))
            .height(240.0)
            .x_axis_label("azimuth from north, clockwise [°]")
            .y_axis_label("elevation [°]")
            .default_x_bounds(0.0, 360.0)
            .default_y_bounds(-90.0, top)
            .x_grid_spacer(crate::charts::azimuth_grid)
            .y_grid_spacer(crate::charts::elevation_grid)
            .x_axis_formatter(crate::charts::azimuth_tick)
            .allow_scroll(false)
            .show(ui, |plot| {
                plot.hline(crate::charts::level_line());
                for &(k, f) in &figures {
                    let colour = COMPARE_COLOURS[k % 4];
                    crate::sky_view::draw_zone(plot, f, colour.gamma_multiply(0.25), colour);
                    let pts = crate::sky_view::skyline_points(f);
                    plot.line(
                        Line::new("", PlotPoints::from(pts))
                            .color(colour)
                            .width(2.0),
                    );
                }
            });
        self.candidate_key(ui, session, chosen);
        ui.label(
            RichText::new("Filled outlines: where each crater sees the Earth's centre over all librations (below the level line: hidden).")
                .small(),
        );
        for &(k, f) in &figures {
            let Some(c) = session.candidate(chosen[k]) else {
                continue;
            };
            let m = &f.margin;
            if m.worst_azimuth_deg.is_finite() {
                ui.label(format!(
                    "{}: smallest shielding margin {:.1}° toward azimuth {:.0}°",
                    candidate_label(c.id),
                    m.clearance_deg,
                    m.worst_azimuth_deg
                ));
            }
        }
    }

    fn fits(
        &mut self,
        ui: &mut egui::Ui,
        session: &Session,
        chosen: &[usize],
        dem: Option<&Arc<Dem>>,
    ) {
        let survey = session.survey.clone();
        let spec = survey
            .as_ref()
            .and_then(|s| s.parameters.structure.as_ref());
        let radius_m = survey
            .as_ref()
            .map_or(terrain::MOON_RADIUS_M, |s| s.input.body_radius_m);
        if let Some(s) = spec {
            ui.label(
                RichText::new(format!("Structure: {}", crate::fit_view::describe_spec(s))).small(),
            );
        }
        ui.columns(chosen.len().max(1), |cols| {
            for (k, &i) in chosen.iter().enumerate() {
                let ui = &mut cols[k];
                let Some(c) = session.candidate(i) else {
                    continue;
                };
                ui.label(
                    RichText::new(candidate_label(c.id))
                        .strong()
                        .color(COMPARE_COLOURS[k % 4]),
                );
                let Some(fit) = &c.fit else {
                    ui.label("No reflector fit recorded.");
                    continue;
                };
                ui.label(crate::fit_view::verdict_words(fit.fit_ok));
                for r in &fit.reasons {
                    ui.label(RichText::new(format!("• {r}")).small());
                }
                let frame = LocalFrame::new(radius_m, fit.centre_lon_deg, fit.centre_lat_deg);
                let half_m = plan_half_width_m(fit, &frame);
                let tex = self
                    .backdrops
                    .entry(i)
                    .or_insert_with(|| {
                        dem.and_then(|d| backdrop(d, &frame, half_m)).map(|img| {
                            ui.ctx().load_texture(
                                format!("compare-backdrop-{i}"),
                                img,
                                egui::TextureOptions::LINEAR,
                            )
                        })
                    })
                    .as_ref();
                plan(ui, fit, spec, &frame, half_m, tex, c);
            }
        });
    }

    fn candidate_key(&self, ui: &mut egui::Ui, session: &Session, chosen: &[usize]) {
        let names: Vec<String> = chosen
            .iter()
            .map(|&i| {
                session
                    .candidate(i)
                    .map_or(String::new(), |c| candidate_label(c.id))
            })
            .collect();
        let entries: Vec<KeyEntry<'_>> = names
            .iter()
            .enumerate()
            .map(|(k, n)| KeyEntry::new(COMPARE_COLOURS[k % 4], KeyMark::Line, n))
            .collect();
        key_row(ui, &entries);
    }
}

/// Every metric of the survey, one row each, one column per candidate.
fn numbers(ui: &mut egui::Ui, session: &Session, chosen: &[usize]) {
    egui::Grid::new("compare-numbers")
        .num_columns(chosen.len() + 1)
        .striped(true)
        .spacing([18.0, 2.0])
        .show(ui, |ui| {
            ui.label("");
            for (k, &i) in chosen.iter().enumerate() {
                let name = session
                    .candidate(i)
                    .map_or(String::new(), |c| candidate_label(c.id));
                ui.label(RichText::new(name).strong().color(COMPARE_COLOURS[k % 4]));
            }
            ui.end_row();
            ui.label("Score");
            for &i in chosen {
                ui.label(
                    session
                        .ranking
                        .score(i)
                        .map_or("–".into(), |s| format!("{s:.3}")),
                );
            }
            ui.end_row();
            ui.label("Limits");
            for &i in chosen {
                if session.ranking.passed(i) {
                    ui.label("meets limits");
                } else {
                    ui.label("fails")
                        .on_hover_text(session.reasons(i).join("\n"));
                }
            }
            ui.end_row();
            for info in survey::METRICS {
                ui.label(info.label)
                    .on_hover_text(format!("{}\nid: {}", info.description, info.name));
                for &i in chosen {
                    let v = session.metric_value(info, i);
                    ui.label(v.map_or("not measured".into(), |v| {
                        info.format_in(v, session.lon_convention)
                    }));
                }
                ui.end_row();
            }
        });
}

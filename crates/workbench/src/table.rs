//! The candidate list: rank, score, whether it meets the limits and why not, Pareto flag,
//! rank probabilities after a robustness run, and every metric under its label and unit;
//! sortable by any column, filtered by text and by verdict, virtually scrolled so only visible
//! rows are built. Metric ids appear only in header tooltips ("id in files").

use crate::session::{candidate_label, Session};
use egui::{Align, Color32, RichText};
use egui_extras::{Column, TableBuilder};
use survey::METRICS;

const MEETS_COLOUR: Color32 = Color32::from_rgb(120, 200, 120);
const FAILS_COLOUR: Color32 = Color32::from_rgb(230, 130, 110);

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum SortKey {
    Rank,
    Id,
    Score,
    /// Share of weight draws ranking the candidate first (robustness run).
    RankFirst,
    /// Share of weight draws putting it in the top N.
    TopN,
    Metric(usize),
}

#[derive(Clone, Copy, Debug, PartialEq, Eq, Default)]
pub enum StatusFilter {
    #[default]
    All,
    Passing,
    Failing,
}

/// What the listed rows depend on: ranking generation, sort, direction, find text, verdict
/// filter, candidate count, which robustness run (if any) the probabilities come from, and
/// the shortlist's spread (km, bits).
type ViewKey = (
    u64,
    SortKey,
    bool,
    String,
    StatusFilter,
    usize,
    Option<u64>,
    u64,
);

pub struct CandidateTable {
    pub sort: SortKey,
    pub descending: bool,
    pub filter_text: String,
    pub status: StatusFilter,
    /// Candidate indices in display order, rebuilt only when its key changes.
    rows: Vec<u32>,
    /// Set instead of `rows` when the list is the ranking as it is (the common case while
    /// weights move): rows are read from the ranking's own order, place by place.
    rows_are_ranking: bool,
    rows_key: Option<ViewKey>,
}

impl Default for CandidateTable {
    fn default() -> Self {
        CandidateTable {
            sort: SortKey::Rank,
            descending: false,
            filter_text: String::new(),
            status: StatusFilter::All,
            rows: Vec::new(),
            rows_are_ranking: false,
            rows_key: None,
        }
    }
}

/// The robustness result that belongs to the ranking on screen, if any.
fn current_smaa(session: &Session) -> Option<&siting::SmaaResult> {
    session
        .smaa
        .as_ref()
        .filter(|(g, _)| *g == session.ranking.generation)
        .map(|(_, r)| r)
}

/// Whether a find text (lower case) matches candidate `i`: its name, or, for one that fails,
/// a limit it fails, by the reason's words or by the metric's label or id.
fn finds(session: &Session, i: usize, needle: &str) -> bool {
    if needle.is_empty() {
        return true;
    }
    let Some(candidates) = session.survey.as_ref().map(|s| &s.candidates) else {
        return false;
    };
    if candidate_label(candidates[i].id)
        .to_lowercase()
        .contains(needle)
    {
        return true;
    }
    if session.ranking.passed(i) {
        return false;
    }
    let Some(table) = &session.prepared else {
        return false;
    };
    table.failures(i).iter().any(|f| {
        f.in_words().to_lowercase().contains(needle)
            || survey::metric(&f.metric).map_or(f.metric.contains(needle), |m| m.matches(needle))
    })
}

/// "Spread": the least distance between any two candidates of the shortlist ("Meeting
/// limits" and exports), km; 0 is off. The shortlist is worked out again only on a change.
fn spread_control(ui: &mut egui::Ui, session: &mut Session) {
    ui.label("Spread");
    let mut km = session.spread.km;
    // A drag value (drag sideways or type): a slider would not fit the bar on one line.
    let r = ui.add(
        egui::DragValue::new(&mut km)
            .range(0.0..=f64::INFINITY)
            .speed(0.5)
            .max_decimals(1)
            .suffix(" km"),
    );
    ui.ctx().accesskit_node_builder(r.id, |node| {
        node.set_label("Spread of the shortlist [km]");
    });
    r.on_hover_text(
        "Shortlist (\"Meeting limits\" and exports) taken by rank with every pair at least this \
         far apart (great circle); 0 is off",
    );
    let km = if km.is_finite() { km.max(0.0) } else { 0.0 };
    if km != session.spread.km {
        session.spread.km = km;
        if let Some(survey) = session.survey.clone() {
            session.spread.update(&survey, &session.ranking);
        }
    }
}

/// A probability as a table cell.
fn percent(p: Option<f64>) -> String {
    p.map_or("–".into(), |p| format!("{:.1} %", p * 100.0))
}

impl CandidateTable {
    /// Candidate indices as currently listed (all of them: for tests and tools; the table
    /// itself reads only the rows it shows).
    pub fn rows(&self, session: &Session) -> Vec<u32> {
        if self.rows_are_ranking {
            session.ranking.order().to_vec()
        } else {
            self.rows.clone()
        }
    }

    /// How many rows are listed.
    fn row_count(&self, session: &Session) -> usize {
        if self.rows_are_ranking {
            session.ranking.len()
        } else {
            self.rows.len()
        }
    }

    /// Where candidate `index` is listed, if it is.
    fn row_of(&self, session: &Session, index: usize) -> Option<usize> {
        if self.rows_are_ranking {
            session.ranking.place(index).map(|p| p as usize - 1)
        } else {
            self.rows.iter().position(|&r| r as usize == index)
        }
    }

    fn rebuild(&mut self, session: &Session) {
        let key = (
            session.ranking.generation,
            self.sort,
            self.descending,
            self.filter_text.clone(),
            self.status,
            session.candidate_count(),
            session.smaa.as_ref().map(|(g, _)| *g),
            session.spread.km.to_bits(),
        );
        if self.rows_key.as_ref() == Some(&key) {
            return;
        }
        self.rows_are_ranking = false;
        let Some(survey) = &session.survey else {
            self.rows.clear();
            self.rows_key = Some(key);
            return;
        };
        let r = &session.ranking;
        let needle = self.filter_text.trim().to_lowercase();
        // With a spread, "Meeting limits" lists the spread shortlist only.
        let mut shortlisted = Vec::new();
        if let Some(list) = session.spread.list() {
            shortlisted.resize(survey.candidates.len(), false);
            for &i in list {
                shortlisted[i] = true;
            }
        }
        let keep = |i: usize| {
            let pass = r.passed(i);
            let status_ok = match self.status {
                StatusFilter::All => true,
                StatusFilter::Passing => pass && shortlisted.get(i).copied().unwrap_or(true),
                StatusFilter::Failing => !pass,
            };
            status_ok && finds(session, i, &needle)
        };
        let unfiltered = needle.is_empty() && self.status == StatusFilter::All;
        let by_rank = matches!(self.sort, SortKey::Rank | SortKey::Score);
        if by_rank && unfiltered && !self.descending && r.len() == survey.candidates.len() {
            self.rows.clear();
            self.rows_are_ranking = true;
            self.rows_key = Some(key);
            return;
        }
        let mut rows: Vec<u32> = match self.sort {
            SortKey::Rank | SortKey::Score => {
                let mut rows = Vec::new();
                r.walk(0, |i| {
                    if keep(i as usize) {
                        rows.push(i);
                    }
                    true
                });
                rows
            }
            _ => (0..survey.candidates.len() as u32)
                .filter(|&i| keep(i as usize))
                .collect(),
        };
        let smaa = current_smaa(session);
        let probability = |i: u32, first: bool| {
            let (p1, pn) = smaa?.probabilities(i as usize)?;
            Some(if first { p1 } else { pn })
        };
        let value = |i: u32| -> Option<f64> {
            match self.sort {
                SortKey::RankFirst => probability(i, true),
                SortKey::TopN => probability(i, false),
                SortKey::Metric(m) => session.metric_value(&METRICS[m], i as usize),
                SortKey::Rank | SortKey::Score | SortKey::Id => None,
            }
        };
        match self.sort {
            SortKey::Rank | SortKey::Score => {}
            SortKey::Id => rows.sort_by_key(|&i| survey.candidates[i as usize].id),
            SortKey::RankFirst | SortKey::TopN | SortKey::Metric(_) => {
                // Missing values sort last in either direction; probabilities read highest
                // first unless reversed.
                let descending =
                    self.descending != matches!(self.sort, SortKey::RankFirst | SortKey::TopN);
                rows.sort_by(|&a, &b| {
                    let (va, vb) = (value(a), value(b));
                    match (va, vb) {
                        (Some(x), Some(y)) => {
                            if descending {
                                y.total_cmp(&x)
                            } else {
                                x.total_cmp(&y)
                            }
                        }
                        (Some(_), None) => std::cmp::Ordering::Less,
                        (None, Some(_)) => std::cmp::Ordering::Greater,
                        (None, None) => std::cmp::Ordering::Equal,
                    }
                });
            }
        }
        if self.descending && matches!(self.sort, SortKey::Rank | SortKey::Score | SortKey::Id) {
            rows.reverse();
        }
        self.rows = rows;
        self.rows_key = Some(key);
    }

    fn header_button(&mut self, ui: &mut egui::Ui, key: SortKey, title: &str, hint: &str) {
        let resp = ui
            .add(egui::Button::new(RichText::new(title).strong()).frame(false))
            .on_hover_text(hint);
        if self.sort == key {
            // A painted triangle: the bundled fonts carry no arrow glyphs.
            let r = resp.rect;
            let (x, y, s) = (r.left() - 7.0, r.center().y, 4.0);
            let pts = if self.descending {
                vec![
                    egui::pos2(x - s, y - s / 2.0),
                    egui::pos2(x + s, y - s / 2.0),
                    egui::pos2(x, y + s),
                ]
            } else {
                vec![
                    egui::pos2(x - s, y + s / 2.0),
                    egui::pos2(x, y - s),
                    egui::pos2(x + s, y + s / 2.0),
                ]
            };
            ui.painter().add(egui::Shape::convex_polygon(
                pts,
                ui.visuals().strong_text_color(),
                egui::Stroke::NONE,
            ));
        }
        if resp.clicked() {
            if self.sort == key {
                self.descending = !self.descending;
            } else {
                self.sort = key;
                self.descending = false;
            }
        }
    }

    /// Start a robustness run of the current ranking, or take in a finished one.
    fn robustness_controls(&mut self, ui: &mut egui::Ui, session: &mut Session) {
        session.poll_robustness();
        if session.robustness.is_running() {
            ui.spinner();
            ui.label("Drawing weights…");
        } else if current_smaa(session).is_none() {
            let hint = "Draw the weights around the chosen ones many times and count how often \
                        each candidate comes first or in the top N (SMAA); adds two columns";
            if ui
                .button("Rank probabilities")
                .on_hover_text(hint)
                .clicked()
            {
                session.start_robustness(ui.ctx());
            }
        }
        if let Some(e) = session.robustness.error() {
            ui.colored_label(FAILS_COLOUR, e);
        }
    }

    pub fn ui(&mut self, ui: &mut egui::Ui, session: &mut Session) {
        // Wrapped, so the robustness button stays reachable in a narrow panel.
        ui.horizontal_wrapped(|ui| {
            ui.label("Find:");
            ui.add(
                egui::TextEdit::singleline(&mut self.filter_text)
                    .id(crate::keys::find_field_id())
                    .hint_text("name, or a limit it fails")
                    .desired_width(180.0),
            )
            .on_hover_text(
                "A candidate's name, or words of a limit it fails: \"diameter\", \"coverage\", \
                 or the limit's id in files",
            );
            ui.separator();
            ui.selectable_value(&mut self.status, StatusFilter::All, "All");
            ui.selectable_value(&mut self.status, StatusFilter::Passing, "Meeting limits");
            ui.selectable_value(&mut self.status, StatusFilter::Failing, "Failing");
            ui.separator();
            spread_control(ui, session);
            self.rebuild(session);
            ui.separator();
            ui.label(format!(
                "{} shown of {} ({} meet the limits)",
                self.row_count(session),
                session.candidate_count(),
                session.ranking.passing_count()
            ));
            ui.separator();
            self.robustness_controls(ui, session);
        });
        self.rebuild(session);
        let scroll_to = if session.scroll_table_to_selection {
            session.scroll_table_to_selection = false;
            session.selected.and_then(|s| self.row_of(session, s))
        } else {
            None
        };
        let Some(survey) = session.survey.clone() else {
            ui.label("No survey loaded.");
            return;
        };
        let top_n = current_smaa(session).map(|r| r.settings.top_n);
        let row_h = ui.text_style_height(&egui::TextStyle::Body) + 6.0;
        egui::ScrollArea::horizontal()
            .id_salt("candidate-table-h")
            .auto_shrink([false, false])
            .show(ui, |ui| {
                let mut builder = TableBuilder::new(ui)
                    .id_salt("candidate-table")
                    .striped(true)
                    .sense(egui::Sense::click())
                    .cell_layout(egui::Layout::right_to_left(Align::Center))
                    .column(Column::exact(52.0))
                    .column(Column::exact(78.0))
                    .column(Column::exact(58.0))
                    .column(Column::exact(96.0))
                    .column(
                        Column::initial(300.0)
                            .at_least(120.0)
                            .resizable(true)
                            .clip(true),
                    )
                    .column(Column::exact(56.0));
                if top_n.is_some() {
                    builder = builder.columns(Column::exact(76.0), 2);
                }
                let mut builder = builder
                    .columns(Column::auto().at_least(70.0).resizable(true), METRICS.len())
                    .auto_shrink([false, false])
                    .min_scrolled_height(0.0);
                if let Some(pos) = scroll_to {
                    builder = builder.scroll_to_row(pos, Some(Align::Center));
                }
                builder
                    .header(row_h + 14.0, |mut header| {
                        self.header_row(&mut header, top_n);
                    })
                    .body(|body| {
                        let (by_ranking, rows) = (self.rows_are_ranking, &self.rows);
                        let count = self.row_count(session);
                        body.rows(row_h, count, |mut row| {
                            let k = row.index();
                            let i = if by_ranking {
                                session.ranking.at(k)
                            } else {
                                rows.get(k).copied()
                            };
                            let Some(i) = i else {
                                return;
                            };
                            let i = i as usize;
                            let c = &survey.candidates[i];
                            let selected = session.selected == Some(i);
                            row.set_selected(selected);
                            let pass = session.ranking.passed(i);
                            // Listed in ranking order, the row is the place.
                            let rank = if by_ranking {
                                pass.then_some(k as u32 + 1)
                            } else {
                                session.ranking.rank(i)
                            };
                            row.col(|ui| {
                                ui.label(rank.map_or("–".into(), |r| r.to_string()));
                            });
                            let mut clicked = false;
                            row.col(|ui| {
                                clicked |= ui
                                    .selectable_label(selected, candidate_label(c.id))
                                    .clicked();
                            });
                            row.col(|ui| {
                                ui.label(format!("{:.3}", session.ranking.score(i).unwrap_or(0.0)));
                            });
                            let reasons = if pass { Vec::new() } else { session.reasons(i) };
                            row.col(|ui| {
                                if pass {
                                    ui.colored_label(MEETS_COLOUR, "meets limits");
                                } else {
                                    ui.colored_label(FAILS_COLOUR, "fails limits");
                                }
                            });
                            row.col(|ui| {
                                // Left-aligned, so the reason reads from its start when clipped.
                                ui.with_layout(egui::Layout::left_to_right(Align::Center), |ui| {
                                    if let Some(first) = reasons.first() {
                                        let more = match reasons.len() {
                                            1 => String::new(),
                                            n => format!(" (+{} more)", n - 1),
                                        };
                                        ui.label(format!("{first}{more}"))
                                            .on_hover_text(reasons.join("\n"));
                                    }
                                });
                            });
                            row.col(|ui| {
                                let front = session
                                    .prepared
                                    .as_ref()
                                    .is_some_and(|t| i < t.len() && t.pareto(i));
                                ui.label(if front { "yes" } else { "" });
                            });
                            if top_n.is_some() {
                                let p = current_smaa(session).and_then(|r| r.probabilities(i));
                                row.col(|ui| {
                                    ui.label(percent(p.map(|p| p.0)));
                                });
                                row.col(|ui| {
                                    ui.label(percent(p.map(|p| p.1)));
                                });
                            }
                            for m in METRICS {
                                row.col(|ui| {
                                    ui.label(m.format_number_in(
                                        session.metric_value(m, i),
                                        session.lon_convention,
                                    ));
                                });
                            }
                            if (clicked || row.response().clicked())
                                && !crate::compare::table_click(&row.response().ctx, session, i)
                            {
                                session.select(Some(i), false);
                            }
                        });
                    });
            });
    }

    /// The header: fixed columns, the robustness pair when there is a run, then each metric
    /// under its short label and unit, its label, meaning and file id in the tooltip.
    fn header_row(&mut self, header: &mut egui_extras::TableRow<'_, '_>, top_n: Option<usize>) {
        header.col(|ui| {
            self.header_button(
                ui,
                SortKey::Rank,
                "Rank",
                "1 = best among those that meet the limits",
            )
        });
        header.col(|ui| {
            self.header_button(
                ui,
                SortKey::Id,
                "Name",
                "stable candidate name from the survey",
            )
        });
        header.col(|ui| {
            self.header_button(
                ui,
                SortKey::Score,
                "Score",
                "weighted score, 0..1, higher is better",
            )
        });
        header.col(|ui| {
            ui.strong("Verdict").on_hover_text(format!(
                "Whether the candidate meets every limit of the criteria. {}",
                siting::VERDICT_SCOPE
            ));
        });
        header.col(|ui| {
            ui.with_layout(egui::Layout::left_to_right(Align::Center), |ui| {
                ui.strong("Why it fails")
                    .on_hover_text("The first limit the candidate misses; all of them on hover");
            });
        });
        header.col(|ui| {
            ui.strong("Pareto").on_hover_text(
                "yes: no other candidate that meets the limits is at least as good on every \
                 weighted criterion and better on one (it sits on the Pareto front)",
            );
        });
        if let Some(n) = top_n {
            header.col(|ui| {
                self.header_button(
                    ui,
                    SortKey::RankFirst,
                    "P(rank 1)",
                    "share of weight draws that rank it first",
                )
            });
            header.col(|ui| {
                self.header_button(
                    ui,
                    SortKey::TopN,
                    &format!("P(top {n})"),
                    &format!("share of weight draws that put it among the best {n}"),
                )
            });
        }
        for (k, m) in METRICS.iter().enumerate() {
            header.col(|ui| {
                self.header_button(ui, SortKey::Metric(k), &m.header(), &m.hint());
            });
        }
    }
}

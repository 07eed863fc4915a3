//! The candidate list: rank, score, pass/fail and every metric with its unit; sortable by any
//! column, filtered by text and by pass/fail, virtually scrolled so only visible rows are built.

use crate::session::{candidate_label, Session};
use egui::{Align, Color32, RichText};
use egui_extras::{Column, TableBuilder};
use survey::METRICS;

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum SortKey {
    Rank,
    Id,
    Score,
    Metric(usize),
}

#[derive(Clone, Copy, Debug, PartialEq, Eq, Default)]
pub enum StatusFilter {
    #[default]
    All,
    Passing,
    Failing,
}

type ViewKey = (u64, SortKey, bool, String, StatusFilter, usize);

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

/// Fixed decimals by unit so columns line up.
fn format_value(v: Option<f64>, unit: &str) -> String {
    match v {
        None => "–".to_owned(),
        Some(v) if !v.is_finite() => "–".to_owned(),
        Some(v) => match unit {
            "m" => format!("{v:.0}"),
            "deg" => format!("{v:.2}"),
            _ => format!("{v:.3}"),
        },
    }
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
        let keep = |i: usize| {
            let pass = r.passed(i);
            let status_ok = match self.status {
                StatusFilter::All => true,
                StatusFilter::Passing => pass,
                StatusFilter::Failing => !pass,
            };
            status_ok
                && (needle.is_empty()
                    || candidate_label(survey.candidates[i].id)
                        .to_lowercase()
                        .contains(&needle)
                    || (!pass
                        && session
                            .reasons(i)
                            .iter()
                            .any(|s| s.to_lowercase().contains(&needle))))
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
        match self.sort {
            SortKey::Rank | SortKey::Score => {}
            SortKey::Id => rows.sort_by_key(|&i| survey.candidates[i as usize].id),
            SortKey::Metric(m) => {
                let get = METRICS[m].get;
                // Missing values sort last in either direction.
                rows.sort_by(|&a, &b| {
                    let (va, vb) = (
                        get(&survey.candidates[a as usize]),
                        get(&survey.candidates[b as usize]),
                    );
                    match (va, vb) {
                        (Some(x), Some(y)) => {
                            if self.descending {
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

    pub fn ui(&mut self, ui: &mut egui::Ui, session: &mut Session) {
        ui.horizontal(|ui| {
            ui.label("Find:");
            ui.add(
                egui::TextEdit::singleline(&mut self.filter_text)
                    .id(crate::keys::find_field_id())
                    .hint_text("name or failure reason")
                    .desired_width(180.0),
            );
            ui.separator();
            ui.selectable_value(&mut self.status, StatusFilter::All, "All");
            ui.selectable_value(&mut self.status, StatusFilter::Passing, "Passing");
            ui.selectable_value(&mut self.status, StatusFilter::Failing, "Failing");
            self.rebuild(session);
            ui.separator();
            ui.label(format!(
                "{} shown of {} ({} pass)",
                self.row_count(session),
                session.candidate_count(),
                session.ranking.passing_count()
            ));
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
                    .column(Column::exact(52.0))
                    .columns(Column::auto().at_least(70.0).resizable(true), METRICS.len())
                    .auto_shrink([false, false])
                    .min_scrolled_height(0.0);
                if let Some(pos) = scroll_to {
                    builder = builder.scroll_to_row(pos, Some(Align::Center));
                }
                builder
                    .header(row_h + 14.0, |mut header| {
                        header.col(|ui| {
                            self.header_button(
                                ui,
                                SortKey::Rank,
                                "Rank",
                                "1 = best among those that pass",
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
                            ui.strong("Status");
                        });
                        for (k, m) in METRICS.iter().enumerate() {
                            header.col(|ui| {
                                let unit = if m.unit.is_empty() {
                                    String::new()
                                } else {
                                    format!(" [{}]", m.unit)
                                };
                                self.header_button(
                                    ui,
                                    SortKey::Metric(k),
                                    &format!("{}{unit}", m.name),
                                    m.description,
                                );
                            });
                        }
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
                            row.col(|ui| {
                                if pass {
                                    ui.colored_label(Color32::from_rgb(120, 200, 120), "pass");
                                } else {
                                    ui.colored_label(Color32::from_rgb(230, 130, 110), "fail")
                                        .on_hover_text(session.reasons(i).join("\n"));
                                }
                            });
                            for m in METRICS {
                                row.col(|ui| {
                                    ui.label(format_value((m.get)(c), m.unit));
                                });
                            }
                            if clicked || row.response().clicked() {
                                session.select(Some(i), false);
                            }
                        });
                    });
            });
    }
}

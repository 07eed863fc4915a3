//! Nothing the user decides is lost: the unsaved-changes mark in the title bar, the question
//! before anything would drop unsaved work (quit, opening another file, a new survey), the
//! autosaved recovery file and the offer to restore it after a crash.

use crate::app::WorkbenchApp;
use crate::open_dialog::{PathPrompt, PromptPurpose};
use crate::recovery::{Recovery, RecoveryStore};
use crate::session::Session;
use egui::RichText;
use std::path::PathBuf;
use std::time::{Duration, Instant};

/// How long the work must stay unchanged before it is written to the recovery file: a drag
/// writes once when it stops, not every frame (common practice, no source).
pub const AUTOSAVE_AFTER: Duration = Duration::from_secs(2);

/// Work that would replace what is open, held until the user says what to do with unsaved
/// changes.
#[derive(Clone, Debug, PartialEq)]
pub enum Guarded {
    Quit,
    Open(PathBuf),
    /// Start a survey of the open terrain (with the survey settings).
    Survey,
}

impl Guarded {
    fn question(&self) -> String {
        match self {
            Guarded::Quit => "Quit with unsaved changes?".into(),
            Guarded::Open(p) => format!(
                "Open {} and leave unsaved changes?",
                p.file_name()
                    .map(|n| n.to_string_lossy().into_owned())
                    .unwrap_or_else(|| p.display().to_string())
            ),
            Guarded::Survey => "Start a new survey and leave unsaved changes?".into(),
        }
    }
}

/// What was last written to the recovery file.
#[derive(Clone, Debug, PartialEq)]
struct Snapshot {
    key: Option<String>,
    criteria: crate::engine::Criteria,
    reviews: std::collections::BTreeMap<u32, siting::study::CandidateReview>,
}

impl Snapshot {
    fn of(s: &Session) -> Snapshot {
        Snapshot {
            key: s.survey_key.clone(),
            criteria: s.criteria.clone(),
            reviews: s.kept_reviews(),
        }
    }
}

/// The app's part in keeping work: recovery store, pending questions, title.
pub struct Persistence {
    /// Where the recovery file goes; `None`: no autosave (tests that do not ask for it).
    pub store: Option<RecoveryStore>,
    pub autosave_after: Duration,
    /// Last written to the recovery file, and the candidate for the next write with the
    /// time it was first seen.
    written: Option<Snapshot>,
    pending: Option<(Snapshot, Instant)>,
    /// The survey written for recovery, by survey key.
    survey_written: Option<(String, PathBuf)>,
    /// Unsaved work found at start, offered for restoring.
    pub offer: Option<Recovery>,
    /// Restoring: applied when the survey with its key has been opened.
    pending_restore: Option<Recovery>,
    /// Work waiting for an answer about unsaved changes.
    pub guard: Option<Guarded>,
    /// Work to do once the study has been saved (the user chose "Save first").
    pub after_save: Option<Guarded>,
    /// The user agreed to quit: the next close request goes through.
    pub quit_confirmed: bool,
    /// The title last sent to the window.
    title_sent: String,
}

impl Default for Persistence {
    fn default() -> Self {
        Persistence {
            store: None,
            autosave_after: AUTOSAVE_AFTER,
            written: None,
            pending: None,
            survey_written: None,
            offer: None,
            pending_restore: None,
            guard: None,
            after_save: None,
            quit_confirmed: false,
            title_sent: String::new(),
        }
    }
}

impl Persistence {
    /// Use `store` for recovery and look for work left there by a session that did not end
    /// cleanly.
    pub fn use_store(&mut self, store: RecoveryStore) -> Option<String> {
        let problem = match store.read() {
            Ok(found) => {
                self.offer = found;
                None
            }
            Err(e) => {
                // A damaged file is not offered; it is set aside so it does not come back.
                store.clear_work();
                Some(format!("Unsaved work could not be recovered: {e}"))
            }
        };
        self.store = Some(store);
        problem
    }

    /// Write the work to the recovery file when it has changed and then stayed unchanged
    /// for `autosave_after`; remove it when nothing is unsaved. Cheap when nothing changed.
    pub fn autosave(&mut self, session: &Session) -> Result<(), String> {
        let Some(store) = &self.store else {
            return Ok(());
        };
        // An offer not yet answered is not overwritten by the new session's state.
        if self.offer.is_some() || self.pending_restore.is_some() {
            return Ok(());
        }
        if !session.is_dirty() {
            if self.written.take().is_some() {
                store.clear();
                self.survey_written = None;
            }
            self.pending = None;
            return Ok(());
        }
        let now = Snapshot::of(session);
        if self.written.as_ref() == Some(&now) {
            self.pending = None;
            return Ok(());
        }
        let since = match &self.pending {
            Some((s, t)) if *s == now => *t,
            _ => {
                let t = Instant::now();
                self.pending = Some((now.clone(), t));
                t
            }
        };
        if since.elapsed() < self.autosave_after {
            return Ok(());
        }
        let (Some(survey), Some(key)) = (&session.survey, &session.survey_key) else {
            return Ok(());
        };
        let survey_file = if session.survey_unsaved {
            match &self.survey_written {
                Some((k, p)) if k == key => p.clone(),
                _ => {
                    let p = store.write_survey(survey).map_err(|e| e.to_string())?;
                    self.survey_written = Some((key.clone(), p.clone()));
                    p
                }
            }
        } else {
            match session.study_path.clone().or(session.survey_path.clone()) {
                Some(p) => p,
                None => return Ok(()),
            }
        };
        let r = Recovery::new(
            survey_file,
            key.clone(),
            session.study_path.clone(),
            session.criteria.clone(),
            session.criteria_baseline.clone(),
            now.reviews.clone(),
        );
        store.write(&r).map_err(|e| e.to_string())?;
        self.written = Some(now);
        self.pending = None;
        Ok(())
    }

    /// The session ends cleanly: nothing is left to recover.
    pub fn clean_exit(&mut self) {
        if let Some(store) = &self.store {
            store.clear();
        }
        self.written = None;
    }

    /// Apply restored work if `session` now holds the survey it belongs to.
    pub fn apply_restore(&mut self, session: &mut Session, path: Option<&PathBuf>) -> bool {
        let Some(r) = self.pending_restore.take() else {
            return false;
        };
        if session.survey_key.as_deref() != Some(r.survey_key.as_str()) {
            // The file no longer holds the survey the work was done on: applying it would
            // put decisions on other craters. The recovery file stays for another try.
            return false;
        }
        session.criteria_baseline = r.criteria_baseline;
        session.edit_criteria(r.criteria, None);
        session.reviews = r.reviews;
        session.study_path = r.study_path;
        if let Some(store) = &self.store {
            if path.is_some_and(|p| store.holds(p)) {
                session.survey_unsaved = true;
                session.survey_path = None;
            }
        }
        true
    }

    /// The window title: the open file, marked when something is unsaved.
    pub fn title(session: &Session) -> String {
        let name = session
            .study_path
            .as_ref()
            .or(session.survey_path.as_ref())
            .and_then(|p| p.file_name())
            .map(|n| n.to_string_lossy().into_owned())
            .or_else(|| {
                session
                    .survey
                    .as_ref()
                    .map(|_| "survey run here".to_owned())
            });
        let mark = if session.is_dirty() {
            "● unsaved changes – "
        } else {
            ""
        };
        match name {
            Some(n) => format!("{mark}{n} – quietbowl workbench"),
            None => "quietbowl workbench".into(),
        }
    }
}

impl WorkbenchApp {
    /// Do `action` now if nothing is unsaved, else ask first.
    pub fn guard_then(&mut self, ctx: &egui::Context, action: Guarded) {
        if self.session.is_dirty() {
            self.persistence.guard = Some(action);
        } else {
            self.perform(ctx, action);
        }
    }

    /// Do what was held for the question.
    pub fn perform(&mut self, ctx: &egui::Context, action: Guarded) {
        match action {
            Guarded::Quit => {
                self.persistence.quit_confirmed = true;
                self.persistence.clean_exit();
                ctx.send_viewport_cmd(egui::ViewportCommand::Close);
            }
            Guarded::Open(path) => self.open_path(ctx, &path),
            Guarded::Survey => self.survey_settings.open = true,
        }
    }

    /// Save the study where it was last saved, or ask where; then carry on with `then`.
    pub fn save_study_then(&mut self, ctx: &egui::Context, then: Option<Guarded>) {
        match self.session.study_path.clone() {
            Some(path) => {
                self.save_study_to(&path);
                if !self.session.is_dirty() {
                    if let Some(a) = then {
                        self.perform(ctx, a);
                    }
                }
            }
            None => {
                self.persistence.after_save = then;
                self.set_prompt(PathPrompt::new(
                    PromptPurpose::SaveStudy,
                    &self.start_dir().join("study.json"),
                ));
            }
        }
    }

    pub fn save_study_to(&mut self, path: &std::path::Path) {
        self.status = match self.session.save_study(path) {
            Ok(()) => {
                self.persistence.clean_exit();
                format!("Study saved to {}", path.display())
            }
            Err(e) => format!("Could not save the study: {e}"),
        };
    }

    /// Once per frame: a close request with unsaved work is held for the question; the
    /// recovery file and the title follow the session.
    pub fn persistence_frame(&mut self, ctx: &egui::Context) {
        if ctx.input(|i| i.viewport().close_requested()) {
            if self.session.is_dirty() && !self.persistence.quit_confirmed {
                ctx.send_viewport_cmd(egui::ViewportCommand::CancelClose);
                self.persistence.guard = Some(Guarded::Quit);
            } else {
                self.persistence.clean_exit();
            }
        }
        if let Err(e) = self.persistence.autosave(&self.session) {
            self.status = format!("Autosave failed: {e}");
        }
        let title = Persistence::title(&self.session);
        if title != self.persistence.title_sent {
            ctx.send_viewport_cmd(egui::ViewportCommand::Title(title.clone()));
            self.persistence.title_sent = title;
        }
        self.guard_ui(ctx);
        self.offer_ui(ctx);
    }

    fn guard_ui(&mut self, ctx: &egui::Context) {
        let Some(action) = self.persistence.guard.clone() else {
            return;
        };
        let mut answer = None;
        egui::Modal::new(egui::Id::unique("unsaved-changes")).show(ctx, |ui| {
            ui.set_width(420.0);
            ui.heading(action.question());
            ui.label(
                "Decisions, notes or criteria (or a survey run here) are not in any file yet. \
                 Save them in a study to keep them.",
            );
            ui.horizontal(|ui| {
                if ui.button("Save study first").clicked() {
                    answer = Some(0);
                }
                if ui.button("Discard changes").clicked() {
                    answer = Some(1);
                }
                if ui.button("Cancel").clicked() {
                    answer = Some(2);
                }
            });
        });
        if answer.is_some() {
            self.persistence.guard = None;
        }
        match answer {
            Some(0) => self.save_study_then(ctx, Some(action)),
            Some(1) => {
                self.persistence.clean_exit();
                self.session.mark_saved();
                self.session.survey_unsaved = false;
                self.perform(ctx, action);
            }
            _ => {}
        }
    }

    fn offer_ui(&mut self, ctx: &egui::Context) {
        let Some(offer) = &self.persistence.offer else {
            return;
        };
        let text = format!(
            "The workbench closed without saving {} decisions and notes and the criteria as \
             edited ({}), on {}.",
            offer.reviews.len(),
            offer.age_words(),
            offer
                .survey_file
                .file_name()
                .map(|n| n.to_string_lossy().into_owned())
                .unwrap_or_default()
        );
        let mut answer = None;
        egui::Window::new("Restore unsaved work?")
            .collapsible(false)
            .resizable(false)
            .anchor(egui::Align2::CENTER_CENTER, egui::Vec2::ZERO)
            .show(ctx, |ui| {
                ui.set_max_width(440.0);
                ui.label(text);
                ui.horizontal(|ui| {
                    if ui.button("Restore").clicked() {
                        answer = Some(true);
                    }
                    if ui
                        .button("Discard")
                        .on_hover_text("remove the recovery file")
                        .clicked()
                    {
                        answer = Some(false);
                    }
                });
            });
        match answer {
            Some(true) => {
                if let Some(r) = self.persistence.offer.take() {
                    let file = r.survey_file.clone();
                    self.status = format!("Restoring unsaved work on {}", file.display());
                    self.persistence.pending_restore = Some(r);
                    self.open_path(ctx, &file);
                }
            }
            Some(false) => {
                self.persistence.offer = None;
                self.persistence.clean_exit();
            }
            None => {}
        }
    }

    /// After a survey or study was adopted: restore pending work that belongs to it.
    pub fn restore_if_pending(&mut self) {
        let path = self.session.survey_path.clone();
        if self
            .persistence
            .apply_restore(&mut self.session, path.as_ref())
        {
            self.status = "Unsaved work restored.".into();
        }
    }

    /// A small text of what is unsaved, for the File menu.
    pub fn unsaved_note(&self) -> Option<RichText> {
        self.session
            .is_dirty()
            .then(|| RichText::new("unsaved changes").small().weak())
    }
}

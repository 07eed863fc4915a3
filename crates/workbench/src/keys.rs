//! The File and Edit menus and the keyboard: Ctrl+O open, Ctrl+S save the study, Ctrl+E
//! export, Ctrl+F find, Ctrl+Z / Ctrl+Shift+Z undo and redo criteria edits, and the arrow
//! keys or j/k to step through the candidates in the list's order.

use crate::app::WorkbenchApp;
use crate::open_dialog::{PathPrompt, PromptPurpose};
use crate::persistence::Guarded;
use egui::{Key, KeyboardShortcut, Modifiers};

pub const OPEN: KeyboardShortcut = KeyboardShortcut::new(Modifiers::COMMAND, Key::O);
pub const SAVE: KeyboardShortcut = KeyboardShortcut::new(Modifiers::COMMAND, Key::S);
pub const EXPORT: KeyboardShortcut = KeyboardShortcut::new(Modifiers::COMMAND, Key::E);
pub const FIND: KeyboardShortcut = KeyboardShortcut::new(Modifiers::COMMAND, Key::F);
pub const UNDO: KeyboardShortcut = KeyboardShortcut::new(Modifiers::COMMAND, Key::Z);
pub const REDO: KeyboardShortcut = KeyboardShortcut::new(
    Modifiers {
        shift: true,
        ..Modifiers::COMMAND
    },
    Key::Z,
);
/// Ctrl+Y: the other common redo key.
pub const REDO_Y: KeyboardShortcut = KeyboardShortcut::new(Modifiers::COMMAND, Key::Y);

/// Id of the candidate list's find field, so Ctrl+F can put the cursor in it.
pub fn find_field_id() -> egui::Id {
    egui::Id::unique("candidate-find-field")
}

impl WorkbenchApp {
    /// Keyboard shortcuts, read before the panels draw so a key acts in the same frame.
    pub(crate) fn shortcuts(&mut self, ctx: &egui::Context) {
        // Ctrl+Z inside a text field undoes typing there, not criteria.
        let typing = ctx.egui_wants_keyboard_input();
        let pressed = |s: &KeyboardShortcut| ctx.input_mut(|i| i.consume_shortcut(s));
        if pressed(&OPEN) {
            self.open_prompt();
        }
        if pressed(&SAVE) {
            self.save_study_then(ctx, None);
        }
        if pressed(&EXPORT) {
            self.export.open = true;
        }
        if pressed(&FIND) {
            ctx.memory_mut(|m| m.request_focus(find_field_id()));
        }
        if typing {
            return;
        }
        // Redo first: Ctrl+Shift+Z also matches Ctrl+Z when shift is ignored.
        if pressed(&REDO) || pressed(&REDO_Y) {
            self.session.redo_criteria();
        } else if pressed(&UNDO) {
            self.session.undo_criteria();
        }
        if ctx.memory(|m| m.focused().is_some()) {
            // A focused slider or button takes the arrow keys itself.
            return;
        }
        let step = ctx.input_mut(|i| {
            let down = i.consume_key(Modifiers::NONE, Key::ArrowDown)
                || i.consume_key(Modifiers::NONE, Key::J);
            let up = i.consume_key(Modifiers::NONE, Key::ArrowUp)
                || i.consume_key(Modifiers::NONE, Key::K);
            match (down, up) {
                (true, false) => 1,
                (false, true) => -1,
                _ => 0,
            }
        });
        if step != 0 {
            self.step_selection(step);
        }
    }

    /// Select the next (`step` 1) or previous (-1) candidate in the list's order; the first
    /// one when nothing is selected.
    pub fn step_selection(&mut self, step: isize) {
        let rows = self.table.rows(&self.session);
        let here = self
            .session
            .selected
            .and_then(|s| rows.iter().position(|&r| r as usize == s));
        let next = match here {
            Some(k) => k.checked_add_signed(step).filter(|&k| k < rows.len()),
            None => (!rows.is_empty()).then_some(0),
        };
        if let Some(k) = next {
            self.session.select(Some(rows[k] as usize), false);
            self.session.scroll_table_to_selection = true;
        }
    }

    fn open_prompt(&mut self) {
        let start = self.start_dir();
        self.set_prompt(PathPrompt::new(PromptPurpose::Open, &start));
    }

    pub(crate) fn file_menu(&mut self, ui: &mut egui::Ui) {
        let ctx = ui.ctx().clone();
        let shortcut = |s: &KeyboardShortcut| ctx.format_shortcut(s);
        if ui
            .add(egui::Button::new("Open…").shortcut_text(shortcut(&OPEN)))
            .clicked()
        {
            self.open_prompt();
        }
        let has_survey = self.session.survey.is_some();
        if ui
            .add_enabled(
                has_survey,
                egui::Button::new("Save study").shortcut_text(shortcut(&SAVE)),
            )
            .on_hover_text("survey, criteria, decisions and notes in one file")
            .clicked()
        {
            self.save_study_then(&ctx, None);
        }
        if ui
            .add_enabled(has_survey, egui::Button::new("Save study as…"))
            .clicked()
        {
            let start = self.start_dir().join("study.json");
            self.set_prompt(PathPrompt::new(PromptPurpose::SaveStudy, &start));
        }
        if ui
            .add_enabled(has_survey, egui::Button::new("Save survey…"))
            .on_hover_text("the survey alone, as the command line writes it")
            .clicked()
        {
            let start = self.start_dir().join("survey.json");
            self.set_prompt(PathPrompt::new(PromptPurpose::SaveSurvey, &start));
        }
        if ui
            .add(egui::Button::new("Export shortlist…").shortcut_text(shortcut(&EXPORT)))
            .clicked()
        {
            self.export.open = true;
        }
        ui.separator();
        for (keep, title, hint) in [
            (
                siting::areas::Keep::Inside,
                "Add study area…",
                "a polygon file (any vector OGR reads) candidates must lie inside",
            ),
            (
                siting::areas::Keep::Outside,
                "Add keep-out zone…",
                "a polygon file (any vector OGR reads) candidates must keep out of",
            ),
        ] {
            if ui
                .add_enabled(has_survey, egui::Button::new(title))
                .on_hover_text(hint)
                .clicked()
            {
                let start = self.start_dir();
                self.set_prompt(PathPrompt::new(PromptPurpose::AddArea(keep), &start));
            }
        }
        ui.separator();
        let can_survey =
            self.terrain.is_some() && self.job.is_none() && self.survey_runner.is_some();
        if ui
            .add_enabled(can_survey, egui::Button::new("Survey the open terrain…"))
            .on_hover_text("choose the diameter range, catalogue and reflector, then start")
            .clicked()
        {
            self.guard_then(&ctx, Guarded::Survey);
        }
        ui.separator();
        if ui.button("Quit").clicked() {
            ctx.send_viewport_cmd(egui::ViewportCommand::Close);
        }
    }

    pub(crate) fn edit_menu(&mut self, ui: &mut egui::Ui) {
        let ctx = ui.ctx().clone();
        let h = &self.session.history;
        let (can_undo, can_redo) = (h.can_undo(), h.can_redo());
        if ui
            .add_enabled(
                can_undo,
                egui::Button::new("Undo criteria change").shortcut_text(ctx.format_shortcut(&UNDO)),
            )
            .clicked()
        {
            self.session.undo_criteria();
        }
        if ui
            .add_enabled(
                can_redo,
                egui::Button::new("Redo criteria change").shortcut_text(ctx.format_shortcut(&REDO)),
            )
            .clicked()
        {
            self.session.redo_criteria();
        }
        ui.separator();
        if ui
            .button("Find a candidate")
            .on_hover_text(ctx.format_shortcut(&FIND))
            .clicked()
        {
            ctx.memory_mut(|m| m.request_focus(find_field_id()));
        }
    }
}

//! The workbench's working state as plain data: the survey it reads (never edits), the
//! criteria being edited (with their undo history), the ranking they produce, and the user's
//! selection and reviews, plus what was last saved, for the unsaved-changes mark.

use crate::engine::{self, Criteria, PreparedTable, Ranking, SmaaResult};
use siting::study::CandidateReview;
use std::collections::BTreeMap;
use std::path::PathBuf;
use std::sync::Arc;
use survey::SurveyFile;

/// Everything the panels share.
pub struct Session {
    pub survey: Option<Arc<SurveyFile>>,
    /// Where the survey (or study) was read from.
    pub survey_path: Option<PathBuf>,
    pub criteria: Criteria,
    /// What "reset" goes back to: the criteria as last loaded.
    pub criteria_baseline: Criteria,
    /// Why the edited criteria cannot be ranked (the last good ranking stays on screen).
    pub criteria_error: Option<String>,
    pub prepared: Option<Arc<PreparedTable>>,
    pub ranking: Ranking,
    /// Robustness analysis and the ranking generation it belongs to.
    pub smaa: Option<(u64, SmaaResult)>,
    /// The robustness run in the background, if one is going.
    pub robustness: crate::engine::RobustnessJob,
    /// Index into `survey.candidates`.
    pub selected: Option<usize>,
    /// Set when the selection came from outside the map, so the map centres on it once.
    pub centre_map_on_selection: bool,
    /// Set when the selection came from outside the table, so the table scrolls to it once.
    pub scroll_table_to_selection: bool,
    /// Decisions and notes on the open survey's candidates, by candidate id (kept in the
    /// study file). Reviews of other surveys are kept apart (see [`Session::set_survey`]).
    pub reviews: BTreeMap<u32, CandidateReview>,
    /// How longitudes are written on every screen (the user's choice).
    pub lon_convention: survey::LonConvention,
    /// Candidates chosen for the side-by-side comparison.
    pub compare: crate::compare::CompareSet,
    /// Identity of the open survey ([`survey_key`]); reviews belong to it.
    pub survey_key: Option<String>,
    /// Reviews of surveys opened earlier in this window, by survey key: never shown on
    /// another survey's candidates, given back if that survey is opened again.
    other_reviews: BTreeMap<String, BTreeMap<u32, CandidateReview>>,
    /// Undo and redo of criteria edits.
    pub history: CriteriaHistory,
    /// The criteria and reviews as last saved or read from a file.
    saved: SavedState,
    /// The survey was run in this window and is not yet in any file.
    pub survey_unsaved: bool,
    /// Where the study was last saved or read: saving again goes there without asking.
    pub study_path: Option<PathBuf>,
    /// The folder of the criteria file last loaded: relative area paths start there (else
    /// beside the study, else beside the survey).
    pub criteria_dir: Option<PathBuf>,
    /// The criteria's areas as last read (read again only when `criteria.areas` changes).
    pub areas: engine::LoadedAreas,
    /// The spread of the shortlist, km (0: off), and the shortlist it gives.
    pub spread: crate::engine::Spread,
    generation: u64,
}

/// What the unsaved-changes mark compares against.
#[derive(Clone, Debug, Default, PartialEq)]
struct SavedState {
    criteria: Option<Criteria>,
    reviews: BTreeMap<u32, CandidateReview>,
}

/// Earlier and undone criteria, newest last. Edits made during one pointer press (a drag)
/// are one step.
#[derive(Clone, Debug, Default)]
pub struct CriteriaHistory {
    undo: Vec<Criteria>,
    redo: Vec<Criteria>,
    /// Press time (bits) of the drag the last edit belonged to.
    gesture: Option<u64>,
}

/// Steps of criteria history kept (common practice, no source: enough for a session's
/// tuning; each step is a small struct).
const HISTORY_DEPTH: usize = 500;

impl CriteriaHistory {
    pub fn can_undo(&self) -> bool {
        !self.undo.is_empty()
    }
    pub fn can_redo(&self) -> bool {
        !self.redo.is_empty()
    }
    pub fn clear(&mut self) {
        *self = CriteriaHistory::default();
    }
}

/// A reviewer's entry that says something (the sheet creates empty ones when it is shown).
fn said(r: &CandidateReview) -> bool {
    *r != CandidateReview::default()
}

/// The identity of a survey for keeping reviews apart: a SHA-256 over the DEM checksum, the
/// tool version and the detection parameters, and every candidate's id and centre. A refit
/// (same craters, another reflector) keeps it; another survey, of the same DEM or not, gets
/// another, so a note on candidate 12 never lands on another survey's candidate 12.
pub fn survey_key(survey: &SurveyFile) -> String {
    use sha2::{Digest, Sha256};
    let mut h = Sha256::new();
    let p = &survey.parameters;
    h.update(survey.input.sha256.as_bytes());
    h.update([0]);
    h.update(survey.tool_version.as_bytes());
    h.update([0]);
    for v in [p.diameter_min_m, p.diameter_max_m] {
        h.update(v.to_le_bytes());
    }
    h.update((p.tile_px as u64).to_le_bytes());
    h.update(p.catalogue.as_deref().unwrap_or("").as_bytes());
    h.update([0, u8::from(p.detect)]);
    for c in &survey.candidates {
        h.update(c.id.to_le_bytes());
        h.update(c.crater.centre_lon_deg.to_le_bytes());
        h.update(c.crater.centre_lat_deg.to_le_bytes());
    }
    h.finalize().iter().map(|b| format!("{b:02x}")).collect()
}

impl Default for Session {
    fn default() -> Self {
        let criteria = Criteria::default_reflector();
        Session {
            survey: None,
            survey_path: None,
            criteria_baseline: criteria.clone(),
            criteria,
            criteria_error: None,
            prepared: None,
            ranking: Ranking::default(),
            smaa: None,
            robustness: Default::default(),
            selected: None,
            centre_map_on_selection: false,
            scroll_table_to_selection: false,
            reviews: BTreeMap::new(),
            lon_convention: Default::default(),
            compare: Default::default(),
            survey_key: None,
            other_reviews: BTreeMap::new(),
            history: CriteriaHistory::default(),
            saved: SavedState::default(),
            survey_unsaved: false,
            study_path: None,
            criteria_dir: None,
            areas: Default::default(),
            spread: Default::default(),
            generation: 0,
        }
    }
}

impl Session {
    /// Start the robustness analysis (SMAA) of the current ranking in the background.
    pub fn start_robustness(&mut self, ctx: &egui::Context) {
        let generation = self.ranking.generation;
        self.robustness
            .start(self.prepared.as_ref(), &self.criteria, generation, ctx);
    }

    /// Take in a finished robustness run, if one has just ended.
    pub fn poll_robustness(&mut self) {
        if let Some(done) = self.robustness.poll() {
            self.smaa = Some(done);
        }
    }

    pub fn with_survey(survey: SurveyFile) -> Self {
        let mut s = Session::default();
        s.set_survey(survey, None);
        s
    }

    pub fn with_survey_and_criteria(survey: SurveyFile, criteria: Criteria) -> Self {
        let mut s = Session {
            criteria_baseline: criteria.clone(),
            criteria,
            ..Session::default()
        };
        s.set_survey(survey, None);
        s
    }

    /// Open a survey read from `path` (or run here, when `None`). The reviews of the survey
    /// open so far are put aside under its key, and the new survey's own (if it was open
    /// before) come back: reviews never carry over from one survey to another.
    pub fn set_survey(&mut self, survey: SurveyFile, path: Option<PathBuf>) {
        let key = survey_key(&survey);
        if let Some(old) = self.survey_key.take() {
            let mut kept = std::mem::take(&mut self.reviews);
            kept.retain(|_, r| said(r));
            if !kept.is_empty() {
                self.other_reviews.insert(old, kept);
            }
        }
        self.reviews = self.other_reviews.remove(&key).unwrap_or_default();
        self.survey_key = Some(key);
        self.survey_unsaved = path.is_none();
        self.survey = Some(Arc::new(survey));
        self.survey_path = path;
        self.study_path = None;
        self.selected = None;
        self.compare.clear();
        self.prepared = None;
        self.smaa = None;
        self.rerank();
        self.mark_saved();
    }

    /// Record the present criteria and reviews as saved (after a save or a read).
    pub fn mark_saved(&mut self) {
        self.saved = SavedState {
            criteria: Some(self.criteria.clone()),
            reviews: self.kept_reviews(),
        };
    }

    /// The reviews that say something (decision or note).
    pub fn kept_reviews(&self) -> BTreeMap<u32, CandidateReview> {
        self.reviews
            .iter()
            .filter(|(_, r)| said(r))
            .map(|(k, v)| (*k, v.clone()))
            .collect()
    }

    /// Something the user decided (criteria, decisions, notes, a survey run here) is not in
    /// any file yet.
    pub fn is_dirty(&self) -> bool {
        if self.survey.is_none() {
            return false;
        }
        self.survey_unsaved
            || self.saved.criteria.as_ref() != Some(&self.criteria)
            || !self
                .reviews
                .iter()
                .filter(|(_, r)| said(r))
                .eq(self.saved.reviews.iter())
    }

    /// Adopt edited criteria and re-rank at once if anything changed; one undo step per
    /// edit, or per pointer press when `press_time` (the press the edit happens in) is given.
    pub fn edit_criteria(&mut self, edited: Criteria, press_time: Option<f64>) -> bool {
        if edited == self.criteria {
            return false;
        }
        let gesture = press_time.map(f64::to_bits);
        if gesture.is_none() || gesture != self.history.gesture {
            self.history.undo.push(self.criteria.clone());
            if self.history.undo.len() > HISTORY_DEPTH {
                self.history.undo.remove(0);
            }
            self.history.redo.clear();
        }
        self.history.gesture = gesture;
        self.criteria = edited;
        self.rerank();
        true
    }

    /// Go back one criteria edit. Returns whether there was one.
    pub fn undo_criteria(&mut self) -> bool {
        let Some(previous) = self.history.undo.pop() else {
            return false;
        };
        let now = std::mem::replace(&mut self.criteria, previous);
        self.history.redo.push(now);
        self.history.gesture = None;
        self.rerank();
        true
    }

    /// Redo the last undone criteria edit. Returns whether there was one.
    pub fn redo_criteria(&mut self) -> bool {
        let Some(next) = self.history.redo.pop() else {
            return false;
        };
        let now = std::mem::replace(&mut self.criteria, next);
        self.history.undo.push(now);
        self.history.gesture = None;
        self.rerank();
        true
    }

    /// Take a refit of the open survey (same candidates, new reflector fits): keep the
    /// selection, the reviews and the path, and rank again.
    pub fn replace_fits(&mut self, survey: SurveyFile) {
        self.survey = Some(Arc::new(survey));
        self.prepared = None;
        self.smaa = None;
        self.rerank();
    }

    /// The criteria as a file should keep them: with the reflector the fits were made for
    /// when the criteria name none, so a saved file reproduces what is on screen.
    pub fn criteria_to_save(&self) -> Criteria {
        let mut c = self.criteria.clone();
        if c.structure.is_none() {
            c.structure = self
                .survey
                .as_ref()
                .and_then(|s| s.parameters.structure.clone());
        }
        c
    }

    /// The folder relative area paths start from: the criteria file's, else the study's,
    /// else the survey's.
    pub fn areas_base(&self) -> Option<PathBuf> {
        self.criteria_dir.clone().or_else(|| {
            let file = self.study_path.as_ref().or(self.survey_path.as_ref())?;
            file.parent().map(PathBuf::from)
        })
    }

    /// Rank again with the current criteria. Called in the same frame as any criteria edit;
    /// the areas are read again only when `criteria.areas` changed.
    pub fn rerank(&mut self) {
        let Some(survey) = self.survey.clone() else {
            self.ranking = Ranking::default();
            return;
        };
        // The last good ranking stays on screen when the edited criteria cannot be ranked.
        let mut ranking = std::mem::take(&mut self.ranking);
        let base = self.areas_base();
        let result = self
            .areas
            .get(&self.criteria.areas, base.as_deref())
            .and_then(|areas| {
                engine::prepare(&survey, &self.criteria, &areas, self.prepared.as_ref())
            })
            .and_then(|table| {
                engine::rank_into(&table, &self.criteria, self.generation + 1, &mut ranking)?;
                Ok(table)
            });
        self.ranking = ranking;
        match result {
            Ok(table) => {
                self.generation += 1;
                self.prepared = Some(table);
                self.criteria_error = None;
            }
            Err(e) => self.criteria_error = Some(e),
        }
        self.spread.update(&survey, &self.ranking);
    }

    pub fn candidate_count(&self) -> usize {
        self.survey.as_ref().map_or(0, |s| s.candidates.len())
    }

    pub fn candidate(&self, index: usize) -> Option<&survey::Candidate> {
        self.survey.as_ref()?.candidates.get(index)
    }

    /// The value of metric `m` for candidate `index`: from the survey, or for a
    /// neighbourhood metric from the prepared table.
    pub fn metric_value(&self, m: &survey::MetricInfo, index: usize) -> Option<f64> {
        let survey = self.survey.as_ref()?;
        if index >= survey.candidates.len() {
            return None;
        }
        match &self.prepared {
            Some(t) if t.len() == survey.candidates.len() => t.metric_value(survey, m, index),
            _ => (m.get)(&survey.candidates[index]),
        }
    }

    /// Why candidate `index` fails, one line per requirement missed.
    pub fn reasons(&self, index: usize) -> Vec<String> {
        engine::reasons(self.prepared.as_deref(), index)
    }

    /// Select a candidate and ask the other views to bring it into sight.
    pub fn select(&mut self, index: Option<usize>, from_map: bool) {
        self.selected = index.filter(|&i| i < self.candidate_count());
        self.centre_map_on_selection = !from_map && self.selected.is_some();
        self.scroll_table_to_selection = from_map && self.selected.is_some();
    }

    /// Index of the candidate ranked `rank` (1-based) among those that pass.
    pub fn index_of_rank(&self, rank: u32) -> Option<usize> {
        let pos = usize::try_from(rank).ok()?.checked_sub(1)?;
        // Passing candidates fill the first places, so rank r is place r if it passes.
        (pos < self.ranking.passing_count())
            .then(|| self.ranking.at(pos))
            .flatten()
            .map(|i| i as usize)
    }

    pub fn review_mut(&mut self, id: u32) -> &mut CandidateReview {
        self.reviews.entry(id).or_default()
    }

    /// The study as `siting` saves it: survey, criteria and reviews.
    pub fn to_study(&self) -> Option<siting::Study> {
        let survey = self.survey.as_ref()?;
        let mut study = siting::Study::new((**survey).clone(), self.criteria.clone());
        study.reviews = self.kept_reviews();
        Some(study)
    }

    /// Save the study to `path` and mark everything in it saved.
    pub fn save_study(&mut self, path: &std::path::Path) -> Result<(), String> {
        let study = self.to_study().ok_or("Nothing to save yet: no survey.")?;
        study.save(path).map_err(|e| e.to_string())?;
        self.study_path = Some(path.to_path_buf());
        self.survey_unsaved = false;
        self.mark_saved();
        Ok(())
    }

    /// Write the open survey to `path` (a survey run in the window is then no longer unsaved).
    pub fn save_survey(&mut self, path: &std::path::Path) -> Result<(), String> {
        let survey = self.survey.as_ref().ok_or("No survey to save.")?;
        survey.write(path).map_err(|e| e.to_string())?;
        self.survey_path = Some(path.to_path_buf());
        self.survey_unsaved = false;
        Ok(())
    }

    pub fn adopt_study(&mut self, study: siting::Study, path: Option<PathBuf>) {
        self.criteria_dir = None;
        self.criteria = study.criteria.clone();
        self.criteria_baseline = study.criteria;
        self.history.clear();
        self.set_survey(study.survey, path.clone());
        // The study's reviews are the survey's: they replace any kept in this window.
        self.reviews = study.reviews;
        self.survey_unsaved = false;
        self.study_path = path;
        self.mark_saved();
    }
}

/// How a candidate is named on screen: stable across rankings.
pub fn candidate_label(id: u32) -> String {
    survey::candidate_name(id)
}

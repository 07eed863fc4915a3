//! The workbench's working state as plain data: the survey it reads (never edits), the
//! criteria being edited, the ranking they produce, and the user's selection and reviews.

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
    /// Index into `survey.candidates`.
    pub selected: Option<usize>,
    /// Set when the selection came from outside the map, so the map centres on it once.
    pub centre_map_on_selection: bool,
    /// Set when the selection came from outside the table, so the table scrolls to it once.
    pub scroll_table_to_selection: bool,
    /// Decisions and notes, by candidate id (kept in the study file).
    pub reviews: BTreeMap<u32, CandidateReview>,
    /// How longitudes are written on every screen (the user's choice).
    pub lon_convention: survey::LonConvention,
    /// Candidates chosen for the side-by-side comparison.
    pub compare: crate::compare::CompareSet,
    generation: u64,
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
            selected: None,
            centre_map_on_selection: false,
            scroll_table_to_selection: false,
            reviews: BTreeMap::new(),
            lon_convention: Default::default(),
            compare: Default::default(),
            generation: 0,
        }
    }
}

impl Session {
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

    pub fn set_survey(&mut self, survey: SurveyFile, path: Option<PathBuf>) {
        self.survey = Some(Arc::new(survey));
        self.survey_path = path;
        self.selected = None;
        self.compare.clear();
        self.prepared = None;
        self.rerank();
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

    /// Rank again with the current criteria. Called in the same frame as any criteria edit.
    pub fn rerank(&mut self) {
        let Some(survey) = self.survey.clone() else {
            self.ranking = Ranking::default();
            return;
        };
        // The last good ranking stays on screen when the edited criteria cannot be ranked.
        let mut ranking = std::mem::take(&mut self.ranking);
        let result =
            engine::prepare(&survey, &self.criteria, self.prepared.as_ref()).and_then(|table| {
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
    }

    pub fn candidate_count(&self) -> usize {
        self.survey.as_ref().map_or(0, |s| s.candidates.len())
    }

    pub fn candidate(&self, index: usize) -> Option<&survey::Candidate> {
        self.survey.as_ref()?.candidates.get(index)
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
        study.reviews = self
            .reviews
            .iter()
            .filter(|(_, r)| *r != &CandidateReview::default())
            .map(|(k, v)| (*k, v.clone()))
            .collect();
        Some(study)
    }

    pub fn adopt_study(&mut self, study: siting::Study, path: Option<PathBuf>) {
        self.criteria = study.criteria.clone();
        self.criteria_baseline = study.criteria;
        self.reviews = study.reviews;
        self.set_survey(study.survey, path);
    }
}

/// How a candidate is named on screen: stable across rankings.
pub fn candidate_label(id: u32) -> String {
    survey::candidate_name(id)
}

//! The prepared candidate table and the weighted ranking over it.
//!
//! Everything that does not depend on the weights (metric look-up, utilities, requirement
//! checks, Pareto flags) is done once in [`PreparedTable::new`] and stored column by column;
//! [`rank`] then forms the weighted sum (or product) over contiguous columns and sorts, so a
//! weight change re-ranks hundreds of thousands of candidates within a GUI frame.

use std::sync::OnceLock;

use rayon::prelude::*;
use survey::SurveyFile;

use crate::criteria::{Criteria, Requirement, ScoreMethod, SoftCriterion};
pub use crate::requirements::FailedRequirement;
use crate::SitingError;

/// Candidates per parallel work unit: large enough to amortise scheduling, small enough
/// to stay in cache across the criterion columns.
const CHUNK: usize = 8_192;

/// The weight-independent part of ranking a survey under some criteria.
#[derive(Debug)]
pub struct PreparedTable {
    ids: Vec<u32>,
    requirements: Vec<Requirement>,
    /// Criteria with their weights zeroed: what the columns were computed for.
    shapes: Vec<SoftCriterion>,
    /// `utilities[c][i]`: utility of candidate i on soft criterion c.
    utilities: Vec<Vec<f64>>,
    /// Natural logs of `utilities`, built on first use by the weighted product.
    log_utilities: OnceLock<Vec<Vec<f64>>>,
    failures: Vec<Vec<FailedRequirement>>,
    /// `failures[i].is_empty()`, kept flat: the re-rank reads it for every candidate.
    passed: Vec<bool>,
    pareto: Vec<bool>,
    /// Candidate indices ordered by (id, position): the tie-break, fixed per survey.
    tie_order: Vec<u32>,
}

fn shape_only(c: &SoftCriterion) -> SoftCriterion {
    SoftCriterion { weight: 0.0, why: String::new(), ..c.clone() }
}

fn metric_column(survey: &SurveyFile, name: &str) -> Vec<Option<f64>> {
    match survey::metrics::metric(name) {
        Some(m) => survey.candidates.par_iter().map(|c| (m.get)(c)).collect(),
        None => vec![None; survey.candidates.len()],
    }
}

impl PreparedTable {
    /// Do the weight-independent work for `survey` under `criteria` (validated first).
    pub fn new(survey: &SurveyFile, criteria: &Criteria) -> Result<PreparedTable, SitingError> {
        criteria.validate()?;
        let n = survey.candidates.len();
        let utilities: Vec<Vec<f64>> = criteria
            .criteria
            .iter()
            .map(|c| metric_column(survey, &c.metric).par_iter().map(|v| crate::utility::utility(c, *v)).collect())
            .collect();
        let mut failures: Vec<Vec<FailedRequirement>> = vec![Vec::new(); n];
        for req in &criteria.requirements {
            let col = metric_column(survey, &req.metric);
            for (f, v) in failures.iter_mut().zip(col) {
                if let Some(fail) = crate::requirements::check(req, v) {
                    f.push(fail);
                }
            }
        }
        let passed: Vec<bool> = failures.iter().map(|f| f.is_empty()).collect();
        let passing: Vec<usize> = (0..n).filter(|&i| passed[i]).collect();
        let pareto = crate::pareto::pareto_flags(&utilities, n, &passing);
        let ids: Vec<u32> = survey.candidates.iter().map(|c| c.id).collect();
        let mut tie_order: Vec<u32> = (0..n as u32).collect();
        tie_order.sort_by_key(|&i| (ids[i as usize], i));
        Ok(PreparedTable {
            ids,
            tie_order,
            requirements: criteria.requirements.clone(),
            shapes: criteria.criteria.iter().map(shape_only).collect(),
            utilities,
            log_utilities: OnceLock::new(),
            failures,
            passed,
            pareto,
        })
    }

    /// Bring the table up to date with edited criteria, recomputing only what changed.
    /// Returns true when anything was recomputed. Weight-only edits cost nothing here.
    pub fn refresh(&mut self, survey: &SurveyFile, criteria: &Criteria) -> Result<bool, SitingError> {
        if survey.candidates.len() != self.len() {
            return Err(SitingError::SurveyMismatch { survey: survey.candidates.len(), table: self.len() });
        }
        if self.stale_reason(criteria).is_none() {
            return Ok(false);
        }
        *self = PreparedTable::new(survey, criteria)?;
        Ok(true)
    }

    /// Why this table does not fit `criteria` (None when it does: only weights may differ).
    pub fn stale_reason(&self, criteria: &Criteria) -> Option<String> {
        if self.requirements != criteria.requirements {
            return Some("hard requirements changed".into());
        }
        if self.shapes.len() != criteria.criteria.len() {
            return Some("number of soft criteria changed".into());
        }
        self.shapes
            .iter()
            .zip(&criteria.criteria)
            .find(|(s, c)| **s != shape_only(c))
            .map(|(s, _)| format!("soft criterion on {} changed", s.metric))
    }

    pub fn len(&self) -> usize {
        self.ids.len()
    }

    pub fn is_empty(&self) -> bool {
        self.ids.is_empty()
    }

    pub fn id(&self, i: usize) -> u32 {
        self.ids[i]
    }

    pub fn passed(&self, i: usize) -> bool {
        self.passed[i]
    }

    pub fn failures(&self, i: usize) -> &[FailedRequirement] {
        &self.failures[i]
    }

    /// Non-dominated among the candidates that pass every hard requirement.
    pub fn pareto(&self, i: usize) -> bool {
        self.pareto[i]
    }

    /// Utility of candidate i on soft criterion c (criteria order).
    pub fn utility(&self, c: usize, i: usize) -> f64 {
        self.utilities[c][i]
    }

    pub fn criterion_count(&self) -> usize {
        self.utilities.len()
    }

    /// The metric names of the soft criteria, in order.
    pub fn criterion_metrics(&self) -> impl Iterator<Item = &str> {
        self.shapes.iter().map(|s| s.metric.as_str())
    }

    pub(crate) fn columns(&self) -> &[Vec<f64>] {
        &self.utilities
    }

    pub(crate) fn log_columns(&self) -> &[Vec<f64>] {
        self.log_utilities
            .get_or_init(|| self.utilities.iter().map(|col| col.par_iter().map(|u| u.ln()).collect()).collect())
    }
}

/// A ranking of every candidate under one set of weights.
#[derive(Clone, Debug, PartialEq)]
pub struct Ranking {
    pub method: ScoreMethod,
    /// Normalised weights (sum 1), in criteria order.
    pub weights: Vec<f64>,
    /// Score in [0, 1] per candidate, in survey order.
    pub scores: Vec<f64>,
    /// 1-based rank per candidate, in survey order.
    pub ranks: Vec<u32>,
    /// Candidate indices, best first.
    pub order: Vec<u32>,
}

/// Rank every candidate: those passing all hard requirements first, each group by score
/// (descending), ties by candidate id then survey position, so the order is total and a
/// rerun gives the same ranking.
pub fn rank(table: &PreparedTable, criteria: &Criteria) -> Result<Ranking, SitingError> {
    if let Some(reason) = table.stale_reason(criteria) {
        return Err(SitingError::StaleTable(reason));
    }
    criteria.validate()?;
    let weights = criteria.normalised_weights();
    let scores = score_all(table, &weights, criteria.scoring);
    let order = order_by_score(table, &scores);
    let mut ranks = vec![0u32; scores.len()];
    for (r, &i) in order.iter().enumerate() {
        ranks[i as usize] = r as u32 + 1;
    }
    Ok(Ranking { method: criteria.scoring, weights, scores, ranks, order })
}

/// Scores of all candidates under normalised `weights`.
pub(crate) fn score_all(table: &PreparedTable, weights: &[f64], method: ScoreMethod) -> Vec<f64> {
    let n = table.len();
    let mut scores = vec![0.0f64; n];
    let (columns, exp) = match method {
        ScoreMethod::WeightedSum => (table.columns(), false),
        ScoreMethod::WeightedProduct => (table.log_columns(), true),
    };
    scores.par_chunks_mut(CHUNK).enumerate().for_each(|(k, out)| {
        let (start, len) = (k * CHUNK, out.len());
        for (col, &w) in columns.iter().zip(weights) {
            // A zero weight leaves the criterion out; in the product it must not meet ln(0).
            if w == 0.0 {
                continue;
            }
            for (s, u) in out.iter_mut().zip(&col[start..start + len]) {
                *s += w * u;
            }
        }
        if exp {
            for s in out.iter_mut() {
                *s = s.exp();
            }
        }
        // Rounding in the sum may step a hair outside [0, 1]; scores are defined inside it.
        for s in out.iter_mut() {
            *s = if s.is_finite() { s.clamp(0.0, 1.0) } else { 0.0 };
        }
    });
    scores
}

/// Candidate indices best first: passing before failing, score descending, then id and
/// position (the table's fixed tie order, kept by the stable sort).
fn order_by_score(table: &PreparedTable, scores: &[f64]) -> Vec<u32> {
    // Non-negative f64 bit patterns sort like the values and stay below 2^63, so
    // (failed, -score) packs into one u64 key.
    let key = |i: u32| {
        let i = i as usize;
        (u64::from(!table.passed[i]) << 63) | ((u64::MAX >> 1) - scores[i].max(0.0).to_bits())
    };
    crate::order::sorted_values(&table.tie_order, key)
}

/// One row of a ranking, for tables and exports.
#[derive(Clone, Copy, Debug)]
pub struct RankedEntry<'a> {
    pub rank: u32,
    /// Position in the survey's candidate list.
    pub index: usize,
    pub score: f64,
    table: &'a PreparedTable,
}

impl<'a> RankedEntry<'a> {
    pub fn id(&self) -> u32 {
        self.table.id(self.index)
    }
    pub fn passed(&self) -> bool {
        self.table.passed(self.index)
    }
    pub fn failures(&self) -> &'a [FailedRequirement] {
        self.table.failures(self.index)
    }
    pub fn pareto(&self) -> bool {
        self.table.pareto(self.index)
    }
    /// Utilities in criteria order.
    pub fn utilities(&self) -> Vec<f64> {
        (0..self.table.criterion_count()).map(|c| self.table.utility(c, self.index)).collect()
    }
}

impl Ranking {
    /// Rows best first.
    pub fn entries<'a>(&'a self, table: &'a PreparedTable) -> impl Iterator<Item = RankedEntry<'a>> + 'a {
        self.order.iter().map(move |&i| {
            let i = i as usize;
            RankedEntry { rank: self.ranks[i], index: i, score: self.scores[i], table }
        })
    }
}

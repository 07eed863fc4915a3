//! The prepared candidate table and the weighted ranking over it.
//!
//! Everything that does not depend on the weights (metric look-up, utilities, requirement
//! checks, Pareto flags, the tie order within passing and within failing candidates) is done
//! once in [`PreparedTable::new`] and stored column by column;
//! [`rank`] then forms the weighted sum (or product) over contiguous columns and sorts, so a
//! weight change re-ranks hundreds of thousands of candidates within a GUI frame.

use std::sync::{Arc, OnceLock};

use rayon::prelude::*;
use survey::SurveyFile;

use crate::areas::{Area, AreaSpec};
use crate::criteria::{Criteria, Requirement, ScoreMethod, SoftCriterion};
use crate::neighbourhood::NeighbourhoodColumns;
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
    /// Indices of the candidates that pass, ordered by (id, position): the tie-break, fixed
    /// per survey and requirements, so a re-rank only sorts by score within each group.
    tie_passing: Vec<u32>,
    /// The same for the candidates that fail a requirement.
    tie_failing: Vec<u32>,
    /// The areas the failures were judged against, and the backup radius of the
    /// neighbourhood metrics: with the requirements, what makes the table stale.
    areas: Vec<AreaSpec>,
    backup_radius_km: f64,
    /// Candidate centres (lon, lat) and the sphere, for the neighbourhood metrics.
    points: Vec<(f64, f64)>,
    radius_m: f64,
    /// Built when a criterion or an export first asks for it.
    neighbourhood: OnceLock<NeighbourhoodColumns>,
}

fn shape_only(c: &SoftCriterion) -> SoftCriterion {
    SoftCriterion {
        weight: 0.0,
        why: String::new(),
        ..c.clone()
    }
}

fn metric_column(survey: &SurveyFile, name: &str) -> Vec<Option<f64>> {
    match survey::metrics::metric(name) {
        Some(m) => survey.candidates.par_iter().map(|c| (m.get)(c)).collect(),
        None => vec![None; survey.candidates.len()],
    }
}

impl PreparedTable {
    /// Do the weight-independent work for `survey` under `criteria` (validated first). The
    /// criteria's areas are read here, relative paths from the working folder; to read them
    /// once, or from the criteria file's folder, use [`PreparedTable::with_areas`].
    pub fn new(survey: &SurveyFile, criteria: &Criteria) -> Result<PreparedTable, SitingError> {
        criteria.validate()?;
        let areas = crate::areas::load_all(&criteria.areas, None)?;
        PreparedTable::with_areas(survey, criteria, &areas)
    }

    /// [`PreparedTable::new`] with the criteria's areas already read (`areas[k]` for
    /// `criteria.areas[k]`).
    pub fn with_areas(
        survey: &SurveyFile,
        criteria: &Criteria,
        areas: &[Area],
    ) -> Result<PreparedTable, SitingError> {
        criteria.validate()?;
        if areas.len() != criteria.areas.len()
            || areas.iter().zip(&criteria.areas).any(|(a, s)| a.spec != *s)
        {
            return Err(SitingError::StaleTable(
                "the areas read are not the criteria's areas".into(),
            ));
        }
        let n = survey.candidates.len();
        let points: Vec<(f64, f64)> = survey
            .candidates
            .iter()
            .map(|c| (c.crater.centre_lon_deg, c.crater.centre_lat_deg))
            .collect();
        let radius_m = body_radius_m(survey);
        let failures = failures(survey, criteria, areas, &points, radius_m);
        let passed: Vec<bool> = failures.iter().map(|f| f.is_empty()).collect();
        let neighbourhood = OnceLock::new();
        let mut table = PreparedTable {
            ids: survey.candidates.iter().map(|c| c.id).collect(),
            tie_passing: Vec::new(),
            tie_failing: Vec::new(),
            requirements: criteria.requirements.clone(),
            shapes: criteria.criteria.iter().map(shape_only).collect(),
            utilities: Vec::new(),
            log_utilities: OnceLock::new(),
            failures,
            passed,
            pareto: Vec::new(),
            areas: criteria.areas.clone(),
            backup_radius_km: criteria.backup_radius_km,
            points,
            radius_m,
            neighbourhood,
        };
        table.utilities = criteria
            .criteria
            .iter()
            .map(|c| {
                let col = match survey::metrics::metric(&c.metric) {
                    Some(m) if m.is_neighbourhood() => table
                        .neighbourhood()
                        .column(m.name)
                        .map_or_else(|| vec![None; n], <[_]>::to_vec),
                    _ => metric_column(survey, &c.metric),
                };
                col.par_iter()
                    .map(|v| crate::utility::utility(c, *v))
                    .collect()
            })
            .collect();
        let passing: Vec<usize> = (0..n).filter(|&i| table.passed[i]).collect();
        table.pareto = crate::pareto::pareto_flags(&table.utilities, n, &passing);
        let mut tie_order: Vec<u32> = (0..n as u32).collect();
        tie_order.sort_by_key(|&i| (table.ids[i as usize], i));
        (table.tie_passing, table.tie_failing) =
            tie_order.iter().partition(|&&i| table.passed[i as usize]);
        Ok(table)
    }

    /// The neighbourhood metrics of every candidate (computed on first use; they depend on
    /// the requirements and areas, never on the weights).
    pub fn neighbourhood(&self) -> &NeighbourhoodColumns {
        self.neighbourhood.get_or_init(|| {
            NeighbourhoodColumns::new(
                &self.points,
                &self.passed,
                self.radius_m,
                self.backup_radius_km,
            )
        })
    }

    /// The value of metric `m` for candidate `i`: from the survey, or the neighbourhood.
    pub fn metric_value(
        &self,
        survey: &SurveyFile,
        m: &survey::MetricInfo,
        i: usize,
    ) -> Option<f64> {
        if m.is_neighbourhood() {
            self.neighbourhood().column(m.name).and_then(|c| c[i])
        } else {
            (m.get)(&survey.candidates[i])
        }
    }

    /// Bring the table up to date with edited criteria, recomputing only what changed.
    /// Returns true when anything was recomputed. Weight-only edits cost nothing here.
    pub fn refresh(
        &mut self,
        survey: &SurveyFile,
        criteria: &Criteria,
    ) -> Result<bool, SitingError> {
        if survey.candidates.len() != self.len() {
            return Err(SitingError::SurveyMismatch {
                survey: survey.candidates.len(),
                table: self.len(),
            });
        }
        if self.stale_reason(criteria).is_none() {
            return Ok(false);
        }
        *self = PreparedTable::new(survey, criteria)?;
        Ok(true)
    }

    /// Whether `criteria` can be ranked on this table: not stale, and valid.
    pub fn check(&self, criteria: &Criteria) -> Result<(), SitingError> {
        if let Some(reason) = self.stale_reason(criteria) {
            return Err(SitingError::StaleTable(reason));
        }
        criteria.validate()?;
        Ok(())
    }

    /// Why this table does not fit `criteria` (None when it does: only weights may differ).
    pub fn stale_reason(&self, criteria: &Criteria) -> Option<String> {
        if self.requirements != criteria.requirements {
            return Some("hard requirements changed".into());
        }
        if self.areas != criteria.areas {
            return Some("areas changed".into());
        }
        if self.backup_radius_km != criteria.backup_radius_km {
            return Some("the backup radius changed".into());
        }
        if self.shapes.len() != criteria.criteria.len() {
            return Some("number of soft criteria changed".into());
        }
        self.shapes
            .iter()
            .zip(&criteria.criteria)
            .find(|(s, c)| **s != shape_only(c))
            .map(|(s, _)| format!("soft criterion on {} changed", survey::label_of(&s.metric)))
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
        self.log_utilities.get_or_init(|| {
            self.utilities
                .iter()
                .map(|col| col.par_iter().map(|u| u.ln()).collect())
                .collect()
        })
    }
}

/// The sphere the survey's places are on: its body radius, else the IAU Moon's.
pub fn body_radius_m(survey: &SurveyFile) -> f64 {
    let r = survey.input.body_radius_m;
    if r.is_finite() && r > 0.0 {
        r
    } else {
        terrain::MOON_RADIUS_M
    }
}

/// Every candidate's broken requirements, then its broken areas.
fn failures(
    survey: &SurveyFile,
    criteria: &Criteria,
    areas: &[Area],
    points: &[(f64, f64)],
    radius_m: f64,
) -> Vec<Vec<FailedRequirement>> {
    let mut failures: Vec<Vec<FailedRequirement>> = vec![Vec::new(); points.len()];
    for req in &criteria.requirements {
        let col = metric_column(survey, &req.metric);
        for (f, v) in failures.iter_mut().zip(col) {
            if let Some(fail) = crate::requirements::check(req, v) {
                f.push(fail);
            }
        }
    }
    let places: Vec<crate::areas::Place> = if areas.is_empty() {
        Vec::new()
    } else {
        points
            .par_iter()
            .map(|&(lon, lat)| crate::areas::Place::new(lon, lat))
            .collect()
    };
    for area in areas {
        for (f, s) in failures.iter_mut().zip(area.standings(radius_m, &places)) {
            if let Some(fail) = crate::requirements::check_area(area, s) {
                f.push(fail);
            }
        }
    }
    failures
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
    let mut draft = rank_on_demand(table, criteria)?;
    Ok(draft.complete())
}

/// [`rank`] with the order put together as it is read: every score is final at once, and a
/// place ([`RankingOnDemand::at`], [`RankingOnDemand::place`]) costs the sort of the few
/// hundred candidates whose scores lie near it, not of all of them. A window that shows the
/// first rows of a large survey then re-ranks in a fraction of the full sort, with the same
/// places the full sort gives. [`RankingOnDemand::complete`] gives the whole [`Ranking`].
pub fn rank_on_demand(
    table: &PreparedTable,
    criteria: &Criteria,
) -> Result<RankingOnDemand, SitingError> {
    rank_on_demand_reusing(table, criteria, None)
}

/// [`rank_on_demand`] into the buffers of an earlier ranking (a weight drag re-ranks every
/// frame; fresh megabytes each time cost page faults and clearing). On error `previous` is
/// dropped; check with [`PreparedTable::check`] first to keep it.
pub fn rank_on_demand_reusing(
    table: &PreparedTable,
    criteria: &Criteria,
    previous: Option<RankingOnDemand>,
) -> Result<RankingOnDemand, SitingError> {
    table.check(criteria)?;
    let (old_scores, old_items) = match previous {
        Some(p) => (
            Arc::try_unwrap(p.scores).unwrap_or_default(),
            p.shelves.into_items(),
        ),
        None => (Vec::new(), Vec::new()),
    };
    let weights = criteria.normalised_weights();
    let (scores, bounds) = score_all(table, &weights, criteria.scoring, old_scores);
    let groups = [
        crate::order::Group {
            values: &table.tie_passing,
            key_min: bounds[0].0,
            key_max: bounds[0].1,
        },
        crate::order::Group {
            values: &table.tie_failing,
            key_min: bounds[1].0,
            key_max: bounds[1].1,
        },
    ];
    // The passing group now; the failing one when a place in it is first read.
    let shelves = crate::order::Shelves::distribute(&groups, 1, old_items, &|i| {
        score_key(scores[i as usize])
    });
    Ok(RankingOnDemand {
        method: criteria.scoring,
        weights,
        passing: table.tie_passing.len(),
        scores: Arc::new(scores),
        shelves,
    })
}

/// A ranking whose scores are all known and whose order is sorted where it is read (see
/// [`rank_on_demand`]).
pub struct RankingOnDemand {
    pub method: ScoreMethod,
    /// Normalised weights (sum 1), in criteria order.
    pub weights: Vec<f64>,
    passing: usize,
    scores: Arc<Vec<f64>>,
    shelves: crate::order::Shelves,
}

impl std::fmt::Debug for RankingOnDemand {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("RankingOnDemand")
            .field("candidates", &self.scores.len())
            .field("passing", &self.passing)
            .finish_non_exhaustive()
    }
}

impl RankingOnDemand {
    /// Score in [0, 1] per candidate, in survey order (shared, not copied).
    pub fn scores(&self) -> &Arc<Vec<f64>> {
        &self.scores
    }

    pub fn len(&self) -> usize {
        self.scores.len()
    }

    pub fn is_empty(&self) -> bool {
        self.scores.is_empty()
    }

    /// Candidates that pass every hard requirement; they fill the first places.
    pub fn passing_count(&self) -> usize {
        self.passing
    }

    /// The candidate at 0-based place `pos` of the whole order.
    pub fn at(&mut self, pos: usize) -> Option<u32> {
        let scores = &self.scores;
        self.shelves.at(pos, &|i| score_key(scores[i as usize]))
    }

    /// Candidates from 0-based place `start` on, best first, while `f` asks for more.
    pub fn walk(&mut self, start: usize, f: impl FnMut(u32) -> bool) {
        let scores = &self.scores;
        self.shelves
            .walk(start, &|i| score_key(scores[i as usize]), f)
    }

    /// 1-based place of candidate `index` in the whole order (failed ones after all that
    /// pass); `table` is the one this ranking was made from.
    pub fn place(&mut self, table: &PreparedTable, index: usize) -> Option<u32> {
        let group = usize::from(!*table.passed.get(index)?);
        let scores = &self.scores;
        self.shelves
            .position_of(group, index as u32, &|i| score_key(scores[i as usize]))
            .map(|p| p as u32 + 1)
    }

    /// The whole ranking (sorting what has not been read yet).
    pub fn complete(&mut self) -> Ranking {
        let scores = &self.scores;
        let key = |i: u32| score_key(scores[i as usize]);
        self.shelves.complete(&key);
        let sorted = self.shelves.sorted(scores.len());
        Ranking {
            method: self.method,
            weights: self.weights.clone(),
            scores: scores.as_ref().clone(),
            ranks: sorted.ranks,
            order: sorted.order,
        }
    }
}

/// Sort key of a score in [0, 1]: non-negative f64 bit patterns order like the values, so
/// the complement sorts the best score first. Within each group (passing, then failing) the
/// order is by this key, equal keys in tie order.
pub fn score_key(score: f64) -> u64 {
    (u64::MAX >> 1) - score.max(0.0).to_bits()
}

/// Least and greatest sort key of the passing (first) and failing (second) candidates;
/// (MAX, 0) for an empty group.
type KeyBounds = [(u64, u64); 2];

fn widen(a: KeyBounds, b: KeyBounds) -> KeyBounds {
    [
        (a[0].0.min(b[0].0), a[0].1.max(b[0].1)),
        (a[1].0.min(b[1].0), a[1].1.max(b[1].1)),
    ]
}

/// Scores of all candidates under normalised `weights`, with the key bounds the sort needs
/// (gathered here, while the scores are at hand, to spare the sort a pass over them).
fn score_all(
    table: &PreparedTable,
    weights: &[f64],
    method: ScoreMethod,
    buffer: Vec<f64>,
) -> (Vec<f64>, KeyBounds) {
    let n = table.len();
    let mut scores = buffer;
    scores.resize(n, 0.0);
    let (columns, exp) = match method {
        ScoreMethod::WeightedSum => (table.columns(), false),
        ScoreMethod::WeightedProduct => (table.log_columns(), true),
    };
    let empty: KeyBounds = [(u64::MAX, 0); 2];
    let bounds = scores
        .par_chunks_mut(CHUNK)
        .enumerate()
        .map(|(k, out)| {
            let (start, len) = (k * CHUNK, out.len());
            // The buffer may hold an earlier ranking's scores.
            out.fill(0.0);
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
            let mut b = empty;
            for (s, &pass) in out.iter_mut().zip(&table.passed[start..start + len]) {
                *s = if s.is_finite() {
                    s.clamp(0.0, 1.0)
                } else {
                    0.0
                };
                let key = score_key(*s);
                let g = &mut b[usize::from(!pass)];
                *g = (g.0.min(key), g.1.max(key));
            }
            b
        })
        .reduce(|| empty, widen);
    (scores, bounds)
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
        (0..self.table.criterion_count())
            .map(|c| self.table.utility(c, self.index))
            .collect()
    }
}

impl Ranking {
    /// Rows best first.
    pub fn entries<'a>(
        &'a self,
        table: &'a PreparedTable,
    ) -> impl Iterator<Item = RankedEntry<'a>> + 'a {
        self.order.iter().map(move |&i| {
            let i = i as usize;
            RankedEntry {
                rank: self.ranks[i],
                index: i,
                score: self.scores[i],
                table,
            }
        })
    }
}

//! The one seam between the workbench and the ranking library (`siting`): criteria in, ranking
//! out, plus the robustness analysis, exports and study files. The panels only see the plain
//! [`Ranking`] view below; all ranking logic stays in `siting`.

use crate::export_dialog::{ExportFormat, ExportRequest};
use std::sync::mpsc::{channel, Receiver};
use std::sync::{Arc, Mutex, MutexGuard, OnceLock};
use survey::SurveyFile;

pub use siting::{Criteria, PreparedTable, Requirement, SmaaResult, SoftCriterion};

/// What the views read of a ranking, indexed like `survey.candidates`: a view onto the
/// library's ranking and the table it was ranked on, shared rather than copied (a weight drag
/// re-ranks every frame, and copying 500,000 rows per frame costs more than reading the few
/// that are drawn). The order is the library's on-demand one: a place costs the sort of the
/// candidates scored near it, so a frame that shows the first rows does not sort them all;
/// the places are those of the full sort.
#[derive(Clone, Debug, Default)]
pub struct Ranking {
    /// Bumped on every new ranking so views know to refresh their caches.
    pub generation: u64,
    /// Scores per candidate (shared with the library's ranking).
    scores: Option<Arc<Vec<f64>>>,
    passing: usize,
    /// The library's ranking, its order sorted where it is read.
    on_demand: Option<Arc<Mutex<siting::RankingOnDemand>>>,
    /// The whole library ranking, made the first time something needs all of it (exports,
    /// the whole order).
    whole: OnceLock<Arc<siting::Ranking>>,
    /// The table the ranking was made from: pass/fail and reasons.
    table: Option<Arc<PreparedTable>>,
}

impl Ranking {
    pub fn len(&self) -> usize {
        self.scores.as_ref().map_or(0, |s| s.len())
    }

    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    fn on_demand(&self) -> Option<MutexGuard<'_, siting::RankingOnDemand>> {
        self.on_demand
            .as_ref()
            .map(|m| m.lock().unwrap_or_else(|p| p.into_inner()))
    }

    /// The library's whole ranking (sorted in full on first use: exports, tests).
    pub fn full(&self) -> Option<&Arc<siting::Ranking>> {
        if let Some(w) = self.whole.get() {
            return Some(w);
        }
        let whole = Arc::new(self.on_demand()?.complete());
        Some(self.whole.get_or_init(|| whole))
    }

    /// Candidate indices, best first (passing by score, then failed): the whole order, sorted
    /// in full. Views read places one at a time with [`Ranking::at`] instead.
    pub fn order(&self) -> &[u32] {
        self.full().map_or(&[], |f| &f.order)
    }

    /// The candidate at 0-based place `pos` of the order.
    pub fn at(&self, pos: usize) -> Option<u32> {
        match self.whole.get() {
            Some(w) => w.order.get(pos).copied(),
            None => self.on_demand()?.at(pos),
        }
    }

    /// Candidates from place `start` on, best first, while `f` asks for more. `f` must not
    /// read this ranking (the order is held for the walk).
    pub fn walk(&self, start: usize, mut f: impl FnMut(u32) -> bool) {
        if let Some(w) = self.whole.get() {
            for &i in w.order.iter().skip(start) {
                if !f(i) {
                    return;
                }
            }
            return;
        }
        if let Some(mut od) = self.on_demand() {
            od.walk(start, f);
        }
    }

    /// What the order sorts candidate `index` by: failing after passing, then the library's
    /// score key; candidates equal on it follow the ranking's tie order ([`Ranking::place`]).
    pub fn sort_key(&self, index: usize) -> (bool, u64) {
        (
            !self.passed(index),
            siting::ranking::score_key(self.score(index).unwrap_or(0.0)),
        )
    }

    /// Score in [0, 1] of candidate `index`, higher is better.
    pub fn score(&self, index: usize) -> Option<f64> {
        self.scores.as_ref()?.get(index).copied()
    }

    /// Candidate `index` passes every hard requirement.
    pub fn passed(&self, index: usize) -> bool {
        self.table
            .as_ref()
            .is_some_and(|t| index < t.len() && t.passed(index))
    }

    /// 1-based rank of candidate `index` among passing candidates; `None` for failed ones.
    pub fn rank(&self, index: usize) -> Option<u32> {
        if !self.passed(index) {
            return None;
        }
        // Passing candidates come first, so their place in the whole order is their rank.
        self.place(index)
    }

    /// 1-based place of candidate `index` in the whole order (failed ones after all that pass).
    pub fn place(&self, index: usize) -> Option<u32> {
        match self.whole.get() {
            Some(w) => w.ranks.get(index).copied(),
            None => self.on_demand()?.place(self.table.as_ref()?, index),
        }
    }

    pub fn passing_count(&self) -> usize {
        self.passing
    }

    /// Lowest and highest score among passing candidates, if any pass: the scores at the
    /// ends of the passing places.
    pub fn passing_score_range(&self) -> Option<(f64, f64)> {
        let n = self.passing_count();
        let at = |k: usize| self.score(self.at(k)? as usize);
        if n > 0 {
            at(n - 1).zip(at(0))
        } else {
            None
        }
    }
}

/// The weight-independent table for the current survey and criteria, rebuilt only when a
/// requirement, an area or a criterion's shape changes (weights alone reuse it). `areas` are
/// the criteria's areas as read ([`LoadedAreas`]).
pub fn prepare(
    survey: &SurveyFile,
    criteria: &Criteria,
    areas: &[siting::areas::Area],
    current: Option<&Arc<PreparedTable>>,
) -> Result<Arc<PreparedTable>, String> {
    if let Some(t) = current {
        if t.len() == survey.candidates.len() && t.stale_reason(criteria).is_none() {
            return Ok(t.clone());
        }
    }
    PreparedTable::with_areas(survey, criteria, areas)
        .map(Arc::new)
        .map_err(|e| e.to_string())
}

/// The criteria's areas as last read, with the specs and folder they were read for: read
/// again only when `criteria.areas` (or the folder relative paths start from) changes, never
/// per frame or on a weight change.
#[derive(Clone, Debug, Default)]
pub struct LoadedAreas {
    specs: Vec<siting::areas::AreaSpec>,
    base: Option<std::path::PathBuf>,
    areas: Arc<Vec<siting::areas::Area>>,
}

impl LoadedAreas {
    /// The areas for `specs` (relative paths from `base`), read unless already held.
    pub fn get(
        &mut self,
        specs: &[siting::areas::AreaSpec],
        base: Option<&std::path::Path>,
    ) -> Result<Arc<Vec<siting::areas::Area>>, String> {
        if self.specs != specs || self.base.as_deref() != base {
            let areas = siting::areas::load_all(specs, base).map_err(|e| e.to_string())?;
            *self = LoadedAreas {
                specs: specs.to_vec(),
                base: base.map(std::path::Path::to_path_buf),
                areas: Arc::new(areas),
            };
        }
        Ok(self.areas.clone())
    }

    /// The areas held (those of the last criteria read without error).
    pub fn areas(&self) -> &Arc<Vec<siting::areas::Area>> {
        &self.areas
    }
}

/// The shortlist spread apart: passing candidates taken by rank, every pair at least `km`
/// apart (`siting`'s greedy spread), worked out again only when the ranking or the distance
/// changes, never per frame.
#[derive(Clone, Debug, Default)]
pub struct Spread {
    /// Least distance between any two listed candidates, km (0: off).
    pub km: f64,
    /// The ranking generation and distance `list` was made for.
    made_for: Option<(u64, u64)>,
    /// Indices into `survey.candidates`, best first (empty when off).
    list: Vec<usize>,
}

impl Spread {
    pub fn is_on(&self) -> bool {
        self.km > 0.0
    }

    /// The spread shortlist (None when the spread is off).
    pub fn list(&self) -> Option<&[usize]> {
        self.is_on().then_some(self.list.as_slice())
    }

    /// Work the list out again if the ranking or the distance changed since.
    pub fn update(&mut self, survey: &SurveyFile, ranking: &Ranking) {
        let key = (ranking.generation, self.km.to_bits());
        if self.made_for == Some(key) {
            return;
        }
        self.made_for = Some(key);
        self.list.clear();
        if !self.is_on() {
            return;
        }
        let passing = &ranking.order()[..ranking.passing_count()];
        self.list = siting::neighbourhood::spread_by_rank(
            survey,
            passing.iter().map(|&i| i as usize),
            passing.len(),
            self.km,
        );
    }
}

/// Rank with `siting` and turn the result into the views' form.
pub fn rank(
    table: &Arc<PreparedTable>,
    criteria: &Criteria,
    generation: u64,
) -> Result<Ranking, String> {
    let mut out = Ranking::default();
    rank_into(table, criteria, generation, &mut out)?;
    Ok(out)
}

/// [`rank`] into an earlier ranking (left as it was on error).
pub fn rank_into(
    table: &Arc<PreparedTable>,
    criteria: &Criteria,
    generation: u64,
    out: &mut Ranking,
) -> Result<(), String> {
    // Checked first, so an error leaves the earlier ranking as it was.
    table.check(criteria).map_err(|e| e.to_string())?;
    // The earlier ranking's buffers are reused when nothing else holds them.
    out.scores = None;
    let previous = out
        .on_demand
        .take()
        .and_then(|a| Arc::try_unwrap(a).ok())
        .map(|m| m.into_inner().unwrap_or_else(|p| p.into_inner()));
    let od = siting::rank_on_demand_reusing(table, criteria, previous).map_err(|e| {
        *out = Ranking::default();
        e.to_string()
    })?;
    out.scores = Some(od.scores().clone());
    out.passing = od.passing_count();
    out.on_demand = Some(Arc::new(Mutex::new(od)));
    out.whole = OnceLock::new();
    out.table = Some(table.clone());
    out.generation = generation;
    Ok(())
}

/// One line in words per requirement a candidate misses.
pub fn reasons(table: Option<&PreparedTable>, index: usize) -> Vec<String> {
    match table {
        Some(t) if index < t.len() => t.failures(index).iter().map(|f| f.in_words()).collect(),
        _ => Vec::new(),
    }
}

/// The robustness analysis running in the background for one ranking generation.
pub struct SmaaRun {
    pub generation: u64,
    rx: Receiver<Result<SmaaResult, String>>,
}

impl SmaaRun {
    pub fn start(
        table: Arc<PreparedTable>,
        criteria: Criteria,
        generation: u64,
        ctx: &egui::Context,
    ) -> SmaaRun {
        let (tx, rx) = channel();
        let ctx = ctx.clone();
        std::thread::spawn(move || {
            let _ = tx.send(siting::smaa(&table, &criteria).map_err(|e| e.to_string()));
            ctx.request_repaint();
        });
        SmaaRun { generation, rx }
    }

    pub fn try_finish(&self) -> Option<Result<SmaaResult, String>> {
        self.rx.try_recv().ok()
    }
}

/// The one robustness run of the window, started from the candidate list or the crater sheet;
/// its result goes to `Session::smaa` with the ranking generation it belongs to.
#[derive(Default)]
pub struct RobustnessJob {
    run: Option<SmaaRun>,
    error: Option<String>,
}

impl RobustnessJob {
    /// Start a run on the session's current ranking (nothing happens without one).
    pub fn start(
        &mut self,
        table: Option<&Arc<PreparedTable>>,
        criteria: &Criteria,
        generation: u64,
        ctx: &egui::Context,
    ) {
        if let Some(table) = table {
            self.run = Some(SmaaRun::start(
                table.clone(),
                criteria.clone(),
                generation,
                ctx,
            ));
            self.error = None;
        }
    }

    /// Take in a finished run: the result with its generation, or keep the error to show.
    pub fn poll(&mut self) -> Option<(u64, SmaaResult)> {
        let done = self.run.as_ref().and_then(SmaaRun::try_finish)?;
        let generation = self.run.take().map_or(0, |r| r.generation);
        match done {
            Ok(r) => Some((generation, r)),
            Err(e) => {
                self.error = Some(e);
                None
            }
        }
    }

    pub fn is_running(&self) -> bool {
        self.run.is_some()
    }

    pub fn error(&self) -> Option<&str> {
        self.error.as_deref()
    }
}

/// The areas as a second GeoJSON file beside a GeoJSON shortlist (none when no areas).
fn write_areas_beside(
    areas: &[siting::areas::Area],
    shortlist: &std::path::Path,
) -> Result<(), siting::SitingError> {
    if areas.is_empty() {
        return Ok(());
    }
    siting::export::areas::write_geojson(areas, &siting::export::areas::beside(shortlist))
}

/// Write the shortlist through `siting`'s exporters.
pub fn export(session: &crate::session::Session, req: &ExportRequest) -> Result<String, String> {
    let (Some(survey), Some(table), Some(full)) =
        (&session.survey, &session.prepared, session.ranking.full())
    else {
        return Err("Nothing to export: no ranked survey.".into());
    };
    let provenance = siting::Provenance::new(
        survey,
        session.criteria.to_toml(),
        siting::export::date::today(),
    )
    .with_areas(session.areas.areas());
    let limit = req.passing_only.then(|| session.ranking.passing_count());
    let smaa = session
        .smaa
        .as_ref()
        .filter(|(g, _)| *g == session.ranking.generation)
        .map(|(_, s)| s);
    let reviews = session.kept_reviews();
    let set = siting::export::ExportSet {
        survey,
        criteria: &session.criteria,
        table,
        ranking: full,
        smaa,
        provenance: &provenance,
        limit,
        decisions: Some(siting::export::Decisions {
            reviews: &reviews,
            only_kept: req.only_kept,
        }),
        areas: session.areas.areas(),
        only: session.spread.list(),
    };
    let res = match req.format {
        ExportFormat::GeoJson => siting::export::geojson::write_geojson(&set, &req.path)
            .and_then(|()| write_areas_beside(set.areas, &req.path)),
        ExportFormat::GeoPackage => siting::export::gpkg::write_gpkg(&set, &req.path),
        ExportFormat::Csv => siting::export::csv::write_csv(&set, &req.path),
        ExportFormat::MapPicture => return Err("pictures are written by the window".into()),
    };
    let written = set.entries_count();
    res.map(|()| format!("Wrote {written} candidates to {}", req.path.display()))
        .map_err(|e| e.to_string())
}

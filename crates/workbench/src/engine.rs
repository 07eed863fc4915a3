//! The one seam between the workbench and the ranking library (`siting`): criteria in, ranking
//! out, plus the robustness analysis, exports and study files. The panels only see the plain
//! [`Ranking`] view below; all ranking logic stays in `siting`.

use crate::export_dialog::{ExportFormat, ExportRequest};
use std::sync::mpsc::{channel, Receiver};
use std::sync::Arc;
use survey::SurveyFile;

pub use siting::{Criteria, PreparedTable, Requirement, SmaaResult, SoftCriterion};

/// What the views read of a ranking, indexed like `survey.candidates`: a view onto the
/// library's own ranking and the table it was ranked on, shared rather than copied (a
/// weight drag re-ranks every frame, and copying 500,000 rows per frame costs more than
/// reading the few that are drawn).
#[derive(Clone, Debug, Default)]
pub struct Ranking {
    /// Bumped on every new ranking so views know to refresh their caches.
    pub generation: u64,
    /// The library's own ranking, for exports.
    pub full: Option<Arc<siting::Ranking>>,
    /// The table the ranking was made from: pass/fail and reasons.
    table: Option<Arc<PreparedTable>>,
}

impl Ranking {
    pub fn len(&self) -> usize {
        self.full.as_ref().map_or(0, |f| f.scores.len())
    }

    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// Candidate indices, best first (passing by score, then failed).
    pub fn order(&self) -> &[u32] {
        self.full.as_ref().map_or(&[], |f| &f.order)
    }

    /// Score in [0, 1] of candidate `index`, higher is better.
    pub fn score(&self, index: usize) -> Option<f64> {
        self.full.as_ref()?.scores.get(index).copied()
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
        self.full.as_ref()?.ranks.get(index).copied()
    }

    pub fn passing_count(&self) -> usize {
        // `order` lists every passing candidate before any failed one.
        self.order().partition_point(|&i| self.passed(i as usize))
    }

    /// Lowest and highest score among passing candidates, if any pass. `order` sorts those
    /// that pass by score, so its ends give the range without reading every score.
    pub fn passing_score_range(&self) -> Option<(f64, f64)> {
        let n = self.passing_count();
        let at = |k: usize| self.score(*self.order().get(k)? as usize);
        if n > 0 {
            at(n - 1).zip(at(0))
        } else {
            None
        }
    }
}

/// The weight-independent table for the current survey and criteria, rebuilt only when a
/// requirement or a criterion's shape changes (weights alone reuse it).
pub fn prepare(
    survey: &SurveyFile,
    criteria: &Criteria,
    current: Option<&Arc<PreparedTable>>,
) -> Result<Arc<PreparedTable>, String> {
    if let Some(t) = current {
        if t.len() == survey.candidates.len() && t.stale_reason(criteria).is_none() {
            return Ok(t.clone());
        }
    }
    PreparedTable::new(survey, criteria)
        .map(Arc::new)
        .map_err(|e| e.to_string())
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
    let full = siting::rank(table, criteria).map_err(|e| e.to_string())?;
    out.full = Some(Arc::new(full));
    out.table = Some(table.clone());
    out.generation = generation;
    Ok(())
}

/// One readable line per requirement a candidate misses.
pub fn reasons(table: Option<&PreparedTable>, index: usize) -> Vec<String> {
    match table {
        Some(t) if index < t.len() => t.failures(index).iter().map(|f| f.describe()).collect(),
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

/// Write the shortlist through `siting`'s exporters.
pub fn export(session: &crate::session::Session, req: &ExportRequest) -> Result<String, String> {
    let (Some(survey), Some(table), Some(full)) =
        (&session.survey, &session.prepared, &session.ranking.full)
    else {
        return Err("Nothing to export: no ranked survey.".into());
    };
    let provenance = siting::Provenance::new(
        survey,
        session.criteria.to_toml(),
        siting::export::date::today(),
    );
    let limit = req.passing_only.then(|| session.ranking.passing_count());
    let smaa = session
        .smaa
        .as_ref()
        .filter(|(g, _)| *g == session.ranking.generation)
        .map(|(_, s)| s);
    let set = siting::export::ExportSet {
        survey,
        criteria: &session.criteria,
        table,
        ranking: full,
        smaa,
        provenance: &provenance,
        limit,
    };
    let res = match req.format {
        ExportFormat::GeoJson => siting::export::geojson::write_geojson(&set, &req.path),
        ExportFormat::GeoPackage => siting::export::gpkg::write_gpkg(&set, &req.path),
        ExportFormat::Csv => siting::export::csv::write_csv(&set, &req.path),
        ExportFormat::MapPicture => return Err("pictures are written by the window".into()),
    };
    res.map(|()| {
        format!(
            "Wrote {} candidates to {}",
            limit.unwrap_or(survey.candidates.len()),
            req.path.display()
        )
    })
    .map_err(|e| e.to_string())
}

//! The one seam between the workbench and the ranking library (`siting`): criteria in, ranking
//! out, plus the robustness analysis, exports and study files. The panels only see the plain
//! [`Ranking`] view below; all ranking logic stays in `siting`.

use crate::export_dialog::{ExportFormat, ExportRequest};
use std::sync::mpsc::{channel, Receiver};
use std::sync::Arc;
use survey::SurveyFile;

pub use siting::{Criteria, PreparedTable, Requirement, SmaaResult, SoftCriterion};

/// What the views read of a ranking, indexed like `survey.candidates`.
#[derive(Clone, Debug, Default)]
pub struct Ranking {
    /// Score in [0, 1] per candidate, higher is better.
    pub score: Vec<f64>,
    /// Passes every hard requirement.
    pub pass: Vec<bool>,
    /// 1-based rank among passing candidates; `None` for failed ones.
    pub rank: Vec<Option<u32>>,
    /// Candidate indices, best first (passing by score, then failed).
    pub order: Vec<u32>,
    /// Bumped on every new ranking so views know to refresh their caches.
    pub generation: u64,
    /// The library's own ranking, for exports.
    pub full: Option<Arc<siting::Ranking>>,
}

impl Ranking {
    pub fn len(&self) -> usize {
        self.score.len()
    }

    pub fn is_empty(&self) -> bool {
        self.score.is_empty()
    }

    pub fn passing_count(&self) -> usize {
        self.pass.iter().filter(|p| **p).count()
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
    table: &PreparedTable,
    criteria: &Criteria,
    generation: u64,
) -> Result<Ranking, String> {
    let full = siting::rank(table, criteria).map_err(|e| e.to_string())?;
    let n = full.scores.len();
    let pass: Vec<bool> = (0..n).map(|i| table.passed(i)).collect();
    let rank = (0..n).map(|i| pass[i].then_some(full.ranks[i])).collect();
    Ok(Ranking {
        score: full.scores.clone(),
        pass,
        rank,
        order: full.order.clone(),
        generation,
        full: Some(Arc::new(full)),
    })
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
    let provenance = siting::Provenance::new(survey, session.criteria.to_toml(), siting::export::date::today());
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

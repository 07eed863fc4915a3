//! Exports of a ranked survey: GeoJSON (RFC 7946), CSV, GeoPackage (OGC 12-128 via GDAL).
//! Each carries the same columns (see [`columns`]) and the same [`Provenance`], and each is
//! written atomically; the same inputs give byte-identical files.

pub mod areas;
pub mod csv;
pub mod date;
pub mod geojson;
pub mod gpkg;
pub mod rim;

use serde::{Deserialize, Serialize};
use survey::{SurveyFile, SurveyParameters};

use crate::criteria::Criteria;
use crate::ranking::{PreparedTable, RankedEntry, Ranking};
use crate::smaa::SmaaResult;
use crate::study::{CandidateReview, Decision};
use crate::SitingError;

/// The geographic CRS every export is in: IAU 2015 Moon, sphere of 1737.4 km (domain notes 2).
pub const MOON_CRS: &str = "IAU_2015:30100";

/// Where an export's numbers come from, recorded inside it.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Provenance {
    /// quietbowl version that wrote the export.
    pub tool_version: String,
    /// quietbowl version that ran the survey.
    pub survey_tool_version: String,
    pub dem_path: String,
    pub dem_sha256: String,
    pub dem_size_bytes: u64,
    pub body_radius_m: f64,
    pub survey_parameters: SurveyParameters,
    /// Set when the survey is one shard of a split run.
    pub survey_shard: Option<survey::model::Shard>,
    /// The criteria in force, as TOML text.
    pub criteria_toml: String,
    /// Supplied by the caller (ISO 8601), so reruns can be byte-identical.
    pub date: String,
    /// The area files the ranking was judged against, with their SHA-256.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub areas: Vec<AreaRecord>,
}

/// An area file as the provenance records it.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct AreaRecord {
    pub file: String,
    pub sha256: String,
    pub keep: crate::areas::Keep,
    pub margin_km: f64,
}

impl Provenance {
    /// `criteria_toml`: the criteria file's text when one was read, else
    /// [`Criteria::to_toml`] of the criteria in force.
    pub fn new(
        survey: &SurveyFile,
        criteria_toml: impl Into<String>,
        date: impl Into<String>,
    ) -> Provenance {
        Provenance {
            tool_version: crate::TOOL_VERSION.to_string(),
            survey_tool_version: survey.tool_version.clone(),
            dem_path: survey.input.path.clone(),
            dem_sha256: survey.input.sha256.clone(),
            dem_size_bytes: survey.input.size_bytes,
            body_radius_m: survey.input.body_radius_m,
            survey_parameters: survey.parameters.clone(),
            survey_shard: survey.shard,
            criteria_toml: criteria_toml.into(),
            date: date.into(),
            areas: Vec::new(),
        }
    }

    /// The same, recording the area files read.
    pub fn with_areas(mut self, areas: &[crate::areas::Area]) -> Provenance {
        self.areas = areas
            .iter()
            .map(|a| AreaRecord {
                file: a.spec.file.clone(),
                sha256: a.sha256.clone(),
                keep: a.spec.keep,
                margin_km: a.spec.margin_km,
            })
            .collect();
        self
    }

    /// (key, value) pairs in a fixed order, for formats that hold flat text.
    pub fn pairs(&self) -> Vec<(&'static str, String)> {
        let p = &self.survey_parameters;
        let mut pairs = vec![
            ("tool_version", self.tool_version.clone()),
            ("survey_tool_version", self.survey_tool_version.clone()),
            ("date", self.date.clone()),
            ("dem_path", self.dem_path.clone()),
            ("dem_sha256", self.dem_sha256.clone()),
            ("dem_size_bytes", self.dem_size_bytes.to_string()),
            ("body_radius_m", self.body_radius_m.to_string()),
            ("survey_diameter_min_m", p.diameter_min_m.to_string()),
            ("survey_diameter_max_m", p.diameter_max_m.to_string()),
            ("survey_tile_px", p.tile_px.to_string()),
            ("survey_catalogue", p.catalogue.clone().unwrap_or_default()),
            ("survey_detect", p.detect.to_string()),
            (
                "survey_operations",
                p.operations.as_ref().map_or_else(
                    || "not computed".to_string(),
                    |o| serde_json::to_string(o).unwrap_or_default(),
                ),
            ),
            (
                "survey_shard",
                self.survey_shard
                    .map(|s| format!("{}/{}", s.index, s.count))
                    .unwrap_or_default(),
            ),
            ("crs", MOON_CRS.to_string()),
            ("screening_caution", crate::SCREENING_CAUTION.to_string()),
        ];
        if !self.areas.is_empty() {
            pairs.push(("areas", self.areas_text()));
        }
        pairs
    }

    /// The area files in one line: "keep outside by 5 km: zones.geojson (sha256 ab12...); ...".
    pub fn areas_text(&self) -> String {
        self.areas
            .iter()
            .map(|a| {
                format!(
                    "keep {} by {} km: {} (sha256 {})",
                    a.keep.key(),
                    a.margin_km,
                    a.file,
                    a.sha256
                )
            })
            .collect::<Vec<_>>()
            .join("; ")
    }
}

/// Everything an export needs.
#[derive(Clone, Copy)]
pub struct ExportSet<'a> {
    pub survey: &'a SurveyFile,
    pub criteria: &'a Criteria,
    pub table: &'a PreparedTable,
    pub ranking: &'a Ranking,
    pub smaa: Option<&'a SmaaResult>,
    pub provenance: &'a Provenance,
    /// Export only the best N candidates (None: all).
    pub limit: Option<usize>,
    /// Reviewers' decisions and notes, exported as two more columns (None: no such columns).
    pub decisions: Option<Decisions<'a>>,
    /// The areas the ranking was judged against (exported beside the shortlist).
    pub areas: &'a [crate::areas::Area],
    /// Export only these candidates (indices into the survey, e.g. a spread shortlist),
    /// in ranking order; None: all (subject to `limit`).
    pub only: Option<&'a [usize]>,
}

/// Decisions and notes by candidate id (as the study file keeps them), for export.
#[derive(Clone, Copy)]
pub struct Decisions<'a> {
    pub reviews: &'a std::collections::BTreeMap<u32, CandidateReview>,
    /// Export only the candidates marked kept.
    pub only_kept: bool,
}

impl Decisions<'_> {
    fn kept(&self, id: u32) -> bool {
        self.reviews
            .get(&id)
            .is_some_and(|r| r.decision == Decision::Accepted)
    }
}

/// How a decision reads in an export cell.
pub fn decision_text(d: Decision) -> &'static str {
    match d {
        Decision::Undecided => "",
        Decision::Accepted => "kept",
        Decision::Rejected => "set aside",
    }
}

impl<'a> ExportSet<'a> {
    fn check(&self) -> Result<(), SitingError> {
        let (s, t) = (self.survey.candidates.len(), self.table.len());
        if s != t || self.ranking.scores.len() != t {
            return Err(SitingError::SurveyMismatch {
                survey: s,
                table: t,
            });
        }
        Ok(())
    }

    pub(crate) fn entries(&self) -> impl Iterator<Item = RankedEntry<'a>> + 'a {
        let only = self.decisions.filter(|d| d.only_kept);
        let listed = self.only;
        self.ranking
            .entries(self.table)
            .filter(move |e| listed.is_none_or(|l| l.contains(&e.index)))
            .filter(move |e| only.is_none_or(|d| d.kept(e.id())))
            .take(self.limit.unwrap_or(usize::MAX))
    }

    /// How many candidates the export holds.
    pub fn entries_count(&self) -> usize {
        self.entries().count()
    }

    /// The columns of this export: [`columns`], then `decision` and `note` when decisions
    /// are exported.
    pub fn columns(&self) -> Vec<Column> {
        let mut cols = columns(self.criteria);
        if self.decisions.is_some() {
            for name in ["decision", "note"] {
                cols.push(Column {
                    name: name.to_string(),
                    unit: "",
                });
            }
        }
        cols
    }

    /// Sphere radius for drawing rims: the survey's, else the IAU Moon radius.
    pub(crate) fn radius_m(&self) -> f64 {
        crate::ranking::body_radius_m(self.survey)
    }
}

/// A cell of an export row.
#[derive(Clone, Debug, PartialEq)]
pub enum Cell {
    Int(i64),
    Real(Option<f64>),
    Bool(bool),
    Text(String),
}

/// An export column: a name (units in it where the metric name carries them) and a unit
/// ("1" for dimensionless).
#[derive(Clone, Debug, PartialEq)]
pub struct Column {
    pub name: String,
    pub unit: &'static str,
}

/// The columns of every export, in order.
pub fn columns(criteria: &Criteria) -> Vec<Column> {
    let col = |name: &str, unit: &'static str| Column {
        name: name.to_string(),
        unit,
    };
    let mut cols = vec![
        col("rank", "1"),
        col("id", "1"),
        col("source", ""),
        col("centre_lon_deg", "deg"),
        col("centre_lat_deg", "deg"),
        col("score", "1"),
        col("passed", ""),
        col("pareto", ""),
        col("failed_requirements", ""),
    ];
    for m in survey::METRICS {
        cols.push(col(m.name, if m.unit.is_empty() { "1" } else { m.unit }));
    }
    cols.push(col("edge_cut", ""));
    for c in &criteria.criteria {
        cols.push(Column {
            name: format!("utility_{}", c.metric),
            unit: "1",
        });
    }
    cols.push(col("smaa_p_rank1", "1"));
    cols.push(col("smaa_p_top_n", "1"));
    cols
}

/// One row's cells, matching [`columns`].
pub(crate) fn row(set: &ExportSet<'_>, e: &RankedEntry<'_>) -> Vec<Cell> {
    let cand = &set.survey.candidates[e.index];
    let source = match cand.source {
        survey::CandidateSource::Detected => "detected".to_string(),
        survey::CandidateSource::Catalogue { row } => format!("catalogue row {row}"),
    };
    let fails: Vec<String> = e.failures().iter().map(|f| f.describe()).collect();
    let mut cells = vec![
        Cell::Int(i64::from(e.rank)),
        Cell::Int(i64::from(e.id())),
        Cell::Text(source),
        Cell::Real(Some(terrain::projection::wrap_deg_180(
            cand.crater.centre_lon_deg,
        ))),
        Cell::Real(Some(cand.crater.centre_lat_deg)),
        Cell::Real(Some(e.score)),
        Cell::Bool(e.passed()),
        Cell::Bool(e.pareto()),
        Cell::Text(fails.join("; ")),
    ];
    for m in survey::METRICS {
        let v = set.table.metric_value(set.survey, m, e.index);
        cells.push(Cell::Real(v.filter(|v| v.is_finite())));
    }
    cells.push(Cell::Bool(cand.crater.edge_cut));
    cells.extend(e.utilities().into_iter().map(|u| Cell::Real(Some(u))));
    let p = set.smaa.and_then(|s| s.probabilities(e.index));
    cells.push(Cell::Real(p.map(|p| p.0)));
    cells.push(Cell::Real(p.map(|p| p.1)));
    if let Some(d) = &set.decisions {
        let review = d.reviews.get(&e.id());
        cells.push(Cell::Text(
            decision_text(review.map_or(Decision::Undecided, |r| r.decision)).to_string(),
        ));
        cells.push(Cell::Text(
            review.map_or_else(String::new, |r| r.note.clone()),
        ));
    }
    cells
}

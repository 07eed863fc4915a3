//! Semantic checks of a criteria set, shared by the file parser (which knows source lines) and
//! code that edits criteria directly (which does not).

use super::{Criteria, UtilityShape, WeightSampling, MAX_ANCHOR_COUNT, MIN_ANCHOR_COUNT};
use structure::{Shape, StructureSpec};

/// Largest accepted robustness sample count: beyond it a run takes minutes, which is
/// almost certainly a typo.
const MAX_SAMPLES: usize = 10_000_000;

/// A problem with a criteria set, with the line (and for syntax errors the column) it is on.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
#[error("{}{problem}", location(*line, *column))]
pub struct CriteriaError {
    pub line: Option<usize>,
    pub column: Option<usize>,
    pub problem: CriteriaProblem,
}

fn location(line: Option<usize>, column: Option<usize>) -> String {
    match (line, column) {
        (Some(l), Some(c)) => format!("line {l}, column {c}: "),
        (Some(l), None) => format!("line {l}: "),
        _ => String::new(),
    }
}

#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum CriteriaProblem {
    #[error("{0}")]
    Syntax(String),
    #[error("format is \"{found}\", expected \"quietbowl-criteria\": this is not a criteria file")]
    NotCriteria { found: String },
    #[error(
        "criteria layout version {found} is not supported (this build reads version {supported})"
    )]
    UnsupportedVersion { found: i64, supported: u32 },
    #[error("{key} = \"{found}\" is not one of: {allowed}")]
    UnknownChoice {
        key: &'static str,
        found: String,
        allowed: &'static str,
    },
    #[error("unknown metric \"{name}\"; known metrics: {known}")]
    UnknownMetric { name: String, known: String },
    #[error("requirement on {metric} has neither min nor max")]
    NoBound { metric: String },
    #[error("requirement on {metric}: min {min} is greater than max {max}")]
    MinAboveMax { metric: String, min: f64, max: f64 },
    #[error("{field} of {metric} is not a finite number")]
    NotFinite { metric: String, field: &'static str },
    #[error("criterion on {metric}: weight {weight} is negative")]
    NegativeWeight { metric: String, weight: f64 },
    #[error("every soft criterion has weight 0, so no score can be formed")]
    AllWeightsZero,
    #[error("no soft criteria: add at least one [[criterion]] to rank by")]
    NoCriteria,
    #[error("metric {metric} already has a soft criterion (line {first_line})")]
    DuplicateCriterion { metric: String, first_line: usize },
    #[error("criterion on {metric}: {reason}")]
    BadUtility { metric: String, reason: String },
    #[error("robustness: {0}")]
    BadRobustness(String),
    #[error("structure: {0}")]
    BadStructure(String),
    #[error("operations: {0}")]
    BadOperations(String),
    #[error("area {file}: {reason}")]
    BadArea { file: String, reason: String },
    #[error("{label} depends on which candidates meet the requirements, so it cannot be one; use it as a weighted criterion")]
    NeighbourhoodRequirement { label: String },
    #[error("neighbourhood: backup_radius_km must be a finite number above 0 (got {0})")]
    BadBackupRadius(f64),
}

/// Source lines of one requirement or criterion and its keys (None when built in code).
#[derive(Clone, Debug, Default)]
pub(crate) struct ItemLines {
    pub item: Option<usize>,
    pub metric: Option<usize>,
    pub min: Option<usize>,
    pub max: Option<usize>,
    pub worst: Option<usize>,
    pub ideal: Option<usize>,
    pub weight: Option<usize>,
    pub points: Option<usize>,
}

/// Source lines of the `[structure]` table and its keys (None when absent or built in code).
#[derive(Clone, Debug, Default)]
pub(crate) struct StructureLines {
    pub table: Option<usize>,
    pub aperture: Option<usize>,
    pub focal_length: Option<usize>,
    pub f_over_d: Option<usize>,
    pub cap_radius: Option<usize>,
    pub anchor_count: Option<usize>,
    pub min_clearance: Option<usize>,
    pub max_anchor_height_difference: Option<usize>,
}

pub(crate) struct Lines {
    pub file: Option<usize>,
    pub robustness: Option<usize>,
    pub requirements: Vec<ItemLines>,
    pub criteria: Vec<ItemLines>,
    pub structure: StructureLines,
    /// Line of the `[operations]` table.
    pub operations: Option<usize>,
    /// Line of each area's margin (or of the entry when it has none).
    pub areas: Vec<Option<usize>>,
    pub neighbourhood: Option<usize>,
}

impl Lines {
    pub fn none(c: &Criteria) -> Lines {
        Lines {
            file: None,
            robustness: None,
            requirements: vec![ItemLines::default(); c.requirements.len()],
            criteria: vec![ItemLines::default(); c.criteria.len()],
            structure: StructureLines::default(),
            operations: None,
            areas: vec![None; c.areas.len()],
            neighbourhood: None,
        }
    }
}

/// 1-based line and column (in characters) of a byte offset.
pub(crate) fn line_col(text: &str, offset: usize) -> (usize, usize) {
    let mut offset = offset.min(text.len());
    while !text.is_char_boundary(offset) {
        offset -= 1;
    }
    let before = &text[..offset];
    let line = before.matches('\n').count() + 1;
    let column = before.rsplit('\n').next().map_or(0, |l| l.chars().count()) + 1;
    (line, column)
}

fn err(line: Option<usize>, problem: CriteriaProblem) -> CriteriaError {
    CriteriaError {
        line,
        column: None,
        problem,
    }
}

fn check_metric(name: &str, line: Option<usize>) -> Result<(), CriteriaError> {
    if survey::metrics::metric(name).is_some() {
        return Ok(());
    }
    let known = survey::METRICS
        .iter()
        .map(|m| m.name)
        .collect::<Vec<_>>()
        .join(", ");
    Err(err(
        line,
        CriteriaProblem::UnknownMetric {
            name: name.to_string(),
            known,
        },
    ))
}

fn check_areas(c: &Criteria, lines: &Lines) -> Result<(), CriteriaError> {
    for (i, a) in c.areas.iter().enumerate() {
        let line = lines.areas.get(i).copied().flatten();
        let reason = if a.file.trim().is_empty() {
            Some("file is empty".to_string())
        } else if !(a.margin_km.is_finite() && a.margin_km >= 0.0) {
            Some(format!(
                "margin_km must be a finite number of km, 0 or more (got {})",
                a.margin_km
            ))
        } else {
            None
        };
        if let Some(reason) = reason {
            return Err(err(
                line,
                CriteriaProblem::BadArea {
                    file: a.file.clone(),
                    reason,
                },
            ));
        }
    }
    if !(c.backup_radius_km.is_finite() && c.backup_radius_km > 0.0) {
        return Err(err(
            lines.neighbourhood,
            CriteriaProblem::BadBackupRadius(c.backup_radius_km),
        ));
    }
    Ok(())
}

pub(crate) fn validate(c: &Criteria, lines: &Lines) -> Result<(), CriteriaError> {
    let blank = ItemLines::default();
    check_areas(c, lines)?;
    for (i, r) in c.requirements.iter().enumerate() {
        let l = lines.requirements.get(i).unwrap_or(&blank);
        check_metric(&r.metric, l.metric.or(l.item))?;
        if let Some(m) = survey::metrics::metric(&r.metric).filter(|m| m.is_neighbourhood()) {
            return Err(err(
                l.metric.or(l.item),
                CriteriaProblem::NeighbourhoodRequirement {
                    label: m.label.to_string(),
                },
            ));
        }
        for (v, field, line) in [(r.min, "min", l.min), (r.max, "max", l.max)] {
            if v.is_some_and(|v| !v.is_finite()) {
                return Err(err(
                    line.or(l.item),
                    CriteriaProblem::NotFinite {
                        metric: r.metric.clone(),
                        field,
                    },
                ));
            }
        }
        match (r.min, r.max) {
            (None, None) => {
                return Err(err(
                    l.item,
                    CriteriaProblem::NoBound {
                        metric: r.metric.clone(),
                    },
                ))
            }
            (Some(min), Some(max)) if min > max => {
                return Err(err(
                    l.min.or(l.item),
                    CriteriaProblem::MinAboveMax {
                        metric: r.metric.clone(),
                        min,
                        max,
                    },
                ))
            }
            _ => {}
        }
    }
    if c.criteria.is_empty() {
        return Err(err(lines.file, CriteriaProblem::NoCriteria));
    }
    let mut seen: Vec<(&str, usize)> = Vec::new();
    for (i, s) in c.criteria.iter().enumerate() {
        let l = lines.criteria.get(i).unwrap_or(&blank);
        check_metric(&s.metric, l.metric.or(l.item))?;
        if let Some((_, first)) = seen.iter().find(|(m, _)| *m == s.metric) {
            return Err(err(
                l.metric.or(l.item),
                CriteriaProblem::DuplicateCriterion {
                    metric: s.metric.clone(),
                    first_line: *first,
                },
            ));
        }
        seen.push((&s.metric, l.item.unwrap_or(0)));
        for (v, field, line) in [
            (s.worst, "worst", l.worst),
            (s.ideal, "ideal", l.ideal),
            (s.weight, "weight", l.weight),
        ] {
            if !v.is_finite() {
                return Err(err(
                    line.or(l.item),
                    CriteriaProblem::NotFinite {
                        metric: s.metric.clone(),
                        field,
                    },
                ));
            }
        }
        if s.weight < 0.0 {
            return Err(err(
                l.weight.or(l.item),
                CriteriaProblem::NegativeWeight {
                    metric: s.metric.clone(),
                    weight: s.weight,
                },
            ));
        }
        let bad = |reason: String, line: Option<usize>| {
            err(
                line.or(l.item),
                CriteriaProblem::BadUtility {
                    metric: s.metric.clone(),
                    reason,
                },
            )
        };
        if s.worst == s.ideal {
            return Err(bad(
                format!(
                    "worst and ideal are both {}: no direction to prefer",
                    s.worst
                ),
                l.ideal,
            ));
        }
        if let UtilityShape::Breakpoints { points } = &s.shape {
            check_points(points, s.worst, s.ideal).map_err(|reason| bad(reason, l.points))?;
        }
    }
    if c.criteria.iter().all(|s| s.weight == 0.0) {
        let line = lines.criteria.iter().find_map(|l| l.weight).or(lines.file);
        return Err(err(line, CriteriaProblem::AllWeightsZero));
    }
    let r = &c.robustness;
    let robust = |m: &str| {
        err(
            lines.robustness,
            CriteriaProblem::BadRobustness(m.to_string()),
        )
    };
    if r.samples == 0 || r.samples > MAX_SAMPLES {
        return Err(robust(&format!(
            "samples must be between 1 and {MAX_SAMPLES}"
        )));
    }
    if r.top_n == 0 || r.pool == 0 {
        return Err(robust("top_n and pool must be at least 1"));
    }
    if let WeightSampling::AroundChosen { spread } = r.sampling {
        if !(0.0..1.0).contains(&spread) {
            return Err(robust(
                "spread must be in [0, 1): a factor 1 - spread must stay positive",
            ));
        }
    }
    if let Some(spec) = &c.structure {
        check_structure(spec, &lines.structure)?;
    }
    if let Some(o) = &c.operations {
        o.validate()
            .map_err(|m| err(lines.operations, CriteriaProblem::BadOperations(m)))?;
    }
    Ok(())
}

/// The reflector's numbers, each refused at its own line with the criteria file's key name.
fn check_structure(s: &StructureSpec, l: &StructureLines) -> Result<(), CriteriaError> {
    let bad = |line: Option<usize>, m: String| {
        Err(err(line.or(l.table), CriteriaProblem::BadStructure(m)))
    };
    let positive = |v: f64| v.is_finite() && v > 0.0;
    let non_negative = |v: f64| v.is_finite() && v >= 0.0;
    if !positive(s.aperture_m) {
        return bad(
            l.aperture,
            format!(
                "aperture_diameter_m must be a positive number of metres (got {})",
                s.aperture_m
            ),
        );
    }
    match s.shape {
        Shape::Paraboloid { focal_length_m } if !positive(focal_length_m) => {
            return bad(
                l.focal_length,
                format!(
                    "focal_length_m must be a positive number of metres (got {focal_length_m})"
                ),
            );
        }
        Shape::ParaboloidRatio { f_over_d } if !positive(f_over_d) => {
            return bad(
                l.f_over_d,
                format!("f_over_d must be a positive number (got {f_over_d})"),
            );
        }
        Shape::SphericalCap { radius_m } if !positive(radius_m) => {
            return bad(
                l.cap_radius,
                format!("cap_radius_m must be a positive number of metres (got {radius_m})"),
            );
        }
        Shape::SphericalCap { radius_m } if radius_m < s.aperture_m / 2.0 => {
            return bad(
                l.cap_radius,
                format!(
                    "cap_radius_m {radius_m} is less than half the {} m aperture: a sphere that small cannot span it",
                    s.aperture_m
                ),
            );
        }
        _ => {}
    }
    if !(MIN_ANCHOR_COUNT..=MAX_ANCHOR_COUNT).contains(&s.anchors) {
        return bad(
            l.anchor_count,
            format!(
                "anchor_count must be from {MIN_ANCHOR_COUNT} to {MAX_ANCHOR_COUNT} (got {})",
                s.anchors
            ),
        );
    }
    if !non_negative(s.min_clearance_m) {
        return bad(
            l.min_clearance,
            format!(
                "min_clearance_m must be zero or a positive number of metres (got {})",
                s.min_clearance_m
            ),
        );
    }
    if !non_negative(s.max_anchor_height_difference_m) {
        return bad(
            l.max_anchor_height_difference,
            format!(
                "max_anchor_height_difference_m must be zero or a positive number of metres (got {})",
                s.max_anchor_height_difference_m
            ),
        );
    }
    // Whatever else the fit itself refuses (kept in step with the rules above).
    s.validate().or_else(|e| bad(l.table, e.to_string()))
}

fn check_points(points: &[[f64; 2]], worst: f64, ideal: f64) -> Result<(), String> {
    if points.len() < 2 {
        return Err("breakpoints need at least two points".into());
    }
    if points.iter().flatten().any(|v| !v.is_finite()) {
        return Err("every breakpoint must be a finite number".into());
    }
    if points.windows(2).any(|w| w[1][0] <= w[0][0]) {
        return Err("breakpoint values must be strictly increasing".into());
    }
    if points.iter().any(|p| !(0.0..=1.0).contains(&p[1])) {
        return Err("breakpoint utilities must lie in [0, 1]".into());
    }
    if !points.iter().any(|p| p[0] == worst && p[1] == 0.0) {
        return Err(format!(
            "worst ({worst}) must be a breakpoint with utility 0"
        ));
    }
    if !points.iter().any(|p| p[0] == ideal && p[1] == 1.0) {
        return Err(format!(
            "ideal ({ideal}) must be a breakpoint with utility 1"
        ));
    }
    Ok(())
}

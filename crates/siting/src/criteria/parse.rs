//! TOML text to [`Criteria`], keeping the source line of every item so that semantic errors
//! (unknown metric, min above max, ...) can point at it.

use serde::Deserialize;
use toml::Spanned;

use super::validate::{line_col, CriteriaError, CriteriaProblem, ItemLines, Lines, StructureLines};
use super::{
    Criteria, Requirement, RobustnessSettings, ScoreMethod, SoftCriterion, UtilityShape,
    WeightSampling, CRITERIA_FORMAT, CRITERIA_VERSION,
};
use crate::areas::{AreaSpec, Keep};
use structure::{Shape, StructureSpec};

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawFile {
    format: Spanned<String>,
    version: Spanned<i64>,
    #[serde(default)]
    title: String,
    scoring: Option<Spanned<String>>,
    robustness: Option<Spanned<RawRobustness>>,
    #[serde(default)]
    requirement: Vec<Spanned<RawRequirement>>,
    #[serde(default)]
    criterion: Vec<Spanned<RawCriterion>>,
    structure: Option<Spanned<RawStructure>>,
    operations: Option<Spanned<operations::OperationsInputs>>,
    #[serde(default)]
    area: Vec<Spanned<RawArea>>,
    neighbourhood: Option<Spanned<RawNeighbourhood>>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawArea {
    file: Spanned<String>,
    layer: Option<String>,
    filter: Option<String>,
    keep: Spanned<String>,
    margin_km: Option<Spanned<f64>>,
    #[serde(default)]
    why: String,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawNeighbourhood {
    backup_radius_km: Spanned<f64>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawRequirement {
    metric: Spanned<String>,
    min: Option<Spanned<f64>>,
    max: Option<Spanned<f64>>,
    #[serde(default)]
    why: String,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawCriterion {
    metric: Spanned<String>,
    worst: Spanned<f64>,
    ideal: Spanned<f64>,
    weight: Spanned<f64>,
    shape: Option<Spanned<String>>,
    points: Option<Spanned<Vec<[f64; 2]>>>,
    #[serde(default)]
    why: String,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawRobustness {
    samples: Option<Spanned<i64>>,
    seed: Option<Spanned<i64>>,
    weights: Option<Spanned<String>>,
    spread: Option<Spanned<f64>>,
    top_n: Option<Spanned<i64>>,
    pool: Option<Spanned<i64>>,
}

/// The `[structure]` table: the reflector to fit, in our own flat key names. Every key is
/// optional; a missing one takes the structure crate's default.
#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawStructure {
    aperture_diameter_m: Option<Spanned<f64>>,
    shape: Option<Spanned<String>>,
    focal_length_m: Option<Spanned<f64>>,
    f_over_d: Option<Spanned<f64>>,
    cap_radius_m: Option<Spanned<f64>>,
    anchor_count: Option<Spanned<i64>>,
    min_clearance_m: Option<Spanned<f64>>,
    max_anchor_height_difference_m: Option<Spanned<f64>>,
}

pub(super) fn parse(text: &str) -> Result<Criteria, CriteriaError> {
    let raw: RawFile = toml::from_str(text).map_err(|e| {
        let (line, column) = match e.span() {
            Some(span) => {
                let (l, c) = line_col(text, span.start);
                (Some(l), Some(c))
            }
            None => (None, None),
        };
        CriteriaError {
            line,
            column,
            problem: CriteriaProblem::Syntax(e.message().trim().to_string()),
        }
    })?;
    let at = |span: std::ops::Range<usize>| line_col(text, span.start).0;
    let bad = |span: std::ops::Range<usize>, problem: CriteriaProblem| CriteriaError {
        line: Some(at(span)),
        column: None,
        problem,
    };

    if raw.format.get_ref() != CRITERIA_FORMAT {
        return Err(bad(
            raw.format.span(),
            CriteriaProblem::NotCriteria {
                found: raw.format.get_ref().clone(),
            },
        ));
    }
    let version = *raw.version.get_ref();
    if version != i64::from(CRITERIA_VERSION) {
        return Err(bad(
            raw.version.span(),
            CriteriaProblem::UnsupportedVersion {
                found: version,
                supported: CRITERIA_VERSION,
            },
        ));
    }
    let scoring = match &raw.scoring {
        None => ScoreMethod::default(),
        Some(s) => match s.get_ref().as_str() {
            "weighted_sum" => ScoreMethod::WeightedSum,
            "weighted_product" => ScoreMethod::WeightedProduct,
            other => {
                return Err(bad(
                    s.span(),
                    CriteriaProblem::UnknownChoice {
                        key: "scoring",
                        found: other.to_string(),
                        allowed: "weighted_sum, weighted_product",
                    },
                ))
            }
        },
    };

    let mut lines = Lines {
        file: Some(1),
        robustness: None,
        requirements: Vec::new(),
        criteria: Vec::new(),
        structure: StructureLines::default(),
        operations: None,
        areas: Vec::new(),
        neighbourhood: None,
    };
    let mut requirements = Vec::with_capacity(raw.requirement.len());
    for r in &raw.requirement {
        let r_ref = r.get_ref();
        lines.requirements.push(ItemLines {
            item: Some(at(r.span())),
            metric: Some(at(r_ref.metric.span())),
            min: r_ref.min.as_ref().map(|v| at(v.span())),
            max: r_ref.max.as_ref().map(|v| at(v.span())),
            ..ItemLines::default()
        });
        requirements.push(Requirement {
            metric: r_ref.metric.get_ref().clone(),
            min: r_ref.min.as_ref().map(|v| *v.get_ref()),
            max: r_ref.max.as_ref().map(|v| *v.get_ref()),
            why: r_ref.why.clone(),
        });
    }

    let mut criteria = Vec::with_capacity(raw.criterion.len());
    for c in &raw.criterion {
        let c_ref = c.get_ref();
        let shape = match (
            c_ref.shape.as_ref().map(|s| s.get_ref().as_str()),
            &c_ref.points,
        ) {
            (None | Some("linear"), None) => UtilityShape::Linear,
            (Some("breakpoints"), Some(p)) => UtilityShape::Breakpoints {
                points: p.get_ref().clone(),
            },
            (Some("breakpoints"), None) => {
                return Err(bad(
                    c.span(),
                    CriteriaProblem::BadUtility {
                        metric: c_ref.metric.get_ref().clone(),
                        reason: "shape \"breakpoints\" needs a `points` list".into(),
                    },
                ))
            }
            (None | Some("linear"), Some(p)) => {
                return Err(bad(
                    p.span(),
                    CriteriaProblem::BadUtility {
                        metric: c_ref.metric.get_ref().clone(),
                        reason: "`points` given but shape is not \"breakpoints\"".into(),
                    },
                ))
            }
            (Some(other), _) => {
                let span = c_ref
                    .shape
                    .as_ref()
                    .map(|s| s.span())
                    .unwrap_or_else(|| c.span());
                return Err(bad(
                    span,
                    CriteriaProblem::UnknownChoice {
                        key: "shape",
                        found: other.to_string(),
                        allowed: "linear, breakpoints",
                    },
                ));
            }
        };
        lines.criteria.push(ItemLines {
            item: Some(at(c.span())),
            metric: Some(at(c_ref.metric.span())),
            worst: Some(at(c_ref.worst.span())),
            ideal: Some(at(c_ref.ideal.span())),
            weight: Some(at(c_ref.weight.span())),
            points: c_ref.points.as_ref().map(|p| at(p.span())),
            ..ItemLines::default()
        });
        criteria.push(SoftCriterion {
            metric: c_ref.metric.get_ref().clone(),
            worst: *c_ref.worst.get_ref(),
            ideal: *c_ref.ideal.get_ref(),
            shape,
            weight: *c_ref.weight.get_ref(),
            why: c_ref.why.clone(),
        });
    }

    let robustness = match &raw.robustness {
        None => RobustnessSettings::default(),
        Some(r) => {
            lines.robustness = Some(at(r.span()));
            robustness(r.get_ref(), &bad)?
        }
    };

    let structure = match &raw.structure {
        None => None,
        Some(t) => {
            let (spec, l) = structure_table(t, &at, &bad)?;
            lines.structure = l;
            Some(spec)
        }
    };

    lines.operations = raw.operations.as_ref().map(|t| at(t.span()));
    let mut areas = Vec::with_capacity(raw.area.len());
    for a in &raw.area {
        let r = a.get_ref();
        let keep = match r.keep.get_ref().as_str() {
            "inside" => Keep::Inside,
            "outside" => Keep::Outside,
            other => {
                return Err(bad(
                    r.keep.span(),
                    CriteriaProblem::UnknownChoice {
                        key: "keep",
                        found: other.to_string(),
                        allowed: "inside, outside",
                    },
                ))
            }
        };
        lines.areas.push(Some(at(r
            .margin_km
            .as_ref()
            .map_or_else(|| a.span(), |m| m.span()))));
        areas.push(AreaSpec {
            file: r.file.get_ref().clone(),
            layer: r.layer.clone(),
            filter: r.filter.clone(),
            keep,
            margin_km: r.margin_km.as_ref().map_or(0.0, |m| *m.get_ref()),
            why: r.why.clone(),
        });
    }
    let backup_radius_km = match &raw.neighbourhood {
        None => super::DEFAULT_BACKUP_RADIUS_KM,
        Some(n) => {
            lines.neighbourhood = Some(at(n.get_ref().backup_radius_km.span()));
            *n.get_ref().backup_radius_km.get_ref()
        }
    };

    let out = Criteria {
        title: raw.title,
        scoring,
        requirements,
        criteria,
        robustness,
        structure,
        operations: raw.operations.map(Spanned::into_inner),
        areas,
        backup_radius_km,
    };
    super::validate::validate(&out, &lines)?;
    Ok(out)
}

fn robustness(
    r: &RawRobustness,
    bad: &dyn Fn(std::ops::Range<usize>, CriteriaProblem) -> CriteriaError,
) -> Result<RobustnessSettings, CriteriaError> {
    let d = RobustnessSettings::default();
    let count = |v: &Option<Spanned<i64>>,
                 key: &'static str,
                 default: usize|
     -> Result<usize, CriteriaError> {
        match v {
            None => Ok(default),
            Some(s) => usize::try_from(*s.get_ref())
                .ok()
                .filter(|n| *n >= 1)
                .ok_or_else(|| {
                    bad(
                        s.span(),
                        CriteriaProblem::BadRobustness(format!(
                            "{key} must be a whole number >= 1"
                        )),
                    )
                }),
        }
    };
    let seed = match &r.seed {
        None => d.seed,
        Some(s) => u64::try_from(*s.get_ref()).map_err(|_| {
            bad(
                s.span(),
                CriteriaProblem::BadRobustness("seed must be >= 0".into()),
            )
        })?,
    };
    let spread_default = match d.sampling {
        WeightSampling::AroundChosen { spread } => spread,
        WeightSampling::UniformSimplex => 0.5,
    };
    let sampling = match r.weights.as_ref().map(|w| (w.get_ref().as_str(), w.span())) {
        None | Some(("around_chosen", _)) => WeightSampling::AroundChosen {
            spread: r.spread.as_ref().map_or(spread_default, |s| *s.get_ref()),
        },
        Some(("uniform_simplex", _)) => WeightSampling::UniformSimplex,
        Some((other, span)) => {
            return Err(bad(
                span,
                CriteriaProblem::UnknownChoice {
                    key: "weights",
                    found: other.to_string(),
                    allowed: "around_chosen, uniform_simplex",
                },
            ))
        }
    };
    if let (Some(s), WeightSampling::UniformSimplex) = (&r.spread, sampling) {
        return Err(bad(
            s.span(),
            CriteriaProblem::BadRobustness(
                "spread applies only to weights = \"around_chosen\"".into(),
            ),
        ));
    }
    Ok(RobustnessSettings {
        samples: count(&r.samples, "samples", d.samples)?,
        seed,
        sampling,
        top_n: count(&r.top_n, "top_n", d.top_n)?,
        pool: count(&r.pool, "pool", d.pool)?,
    })
}

/// The `[structure]` table to a [`StructureSpec`] and the lines of its keys. Only what needs
/// the raw table is checked here (which keys go with which shape, whole anchor counts); the
/// numbers are checked by `validate`, for files and for criteria edited in code alike.
fn structure_table(
    t: &Spanned<RawStructure>,
    at: &dyn Fn(std::ops::Range<usize>) -> usize,
    bad: &dyn Fn(std::ops::Range<usize>, CriteriaProblem) -> CriteriaError,
) -> Result<(StructureSpec, StructureLines), CriteriaError> {
    let r = t.get_ref();
    let line = |v: &Option<Spanned<f64>>| v.as_ref().map(|v| at(v.span()));
    let lines = StructureLines {
        table: Some(at(t.span())),
        aperture: line(&r.aperture_diameter_m),
        focal_length: line(&r.focal_length_m),
        f_over_d: line(&r.f_over_d),
        cap_radius: line(&r.cap_radius_m),
        anchor_count: r.anchor_count.as_ref().map(|v| at(v.span())),
        min_clearance: line(&r.min_clearance_m),
        max_anchor_height_difference: line(&r.max_anchor_height_difference_m),
    };
    let d = StructureSpec::default();
    let problem = |m: String| CriteriaProblem::BadStructure(m);
    let value = |v: &Option<Spanned<f64>>| v.as_ref().map(|v| *v.get_ref());
    let kind = r.shape.as_ref().map(|s| (s.get_ref().as_str(), s.span()));
    let shape = match kind {
        None | Some(("paraboloid", _)) => {
            if let Some(c) = &r.cap_radius_m {
                return Err(bad(
                    c.span(),
                    problem("cap_radius_m applies only to shape = \"spherical_cap\"".into()),
                ));
            }
            match (&r.focal_length_m, &r.f_over_d) {
                (Some(f), Some(q)) => {
                    let later = if f.span().start > q.span().start {
                        f.span()
                    } else {
                        q.span()
                    };
                    return Err(bad(
                        later,
                        problem(
                            "give the paraboloid's focal_length_m or its f_over_d, not both".into(),
                        ),
                    ));
                }
                (Some(f), None) => Shape::Paraboloid {
                    focal_length_m: *f.get_ref(),
                },
                (None, Some(q)) => Shape::ParaboloidRatio {
                    f_over_d: *q.get_ref(),
                },
                (None, None) => d.shape,
            }
        }
        Some(("spherical_cap", span)) => {
            for (v, key) in [
                (&r.focal_length_m, "focal_length_m"),
                (&r.f_over_d, "f_over_d"),
            ] {
                if let Some(v) = v {
                    return Err(bad(
                        v.span(),
                        problem(format!("{key} applies only to shape = \"paraboloid\"")),
                    ));
                }
            }
            match value(&r.cap_radius_m) {
                Some(radius_m) => Shape::SphericalCap { radius_m },
                None => {
                    return Err(bad(
                        span,
                        problem("shape = \"spherical_cap\" needs cap_radius_m".into()),
                    ))
                }
            }
        }
        Some((other, span)) => {
            return Err(bad(
                span,
                CriteriaProblem::UnknownChoice {
                    key: "shape",
                    found: other.to_string(),
                    allowed: "paraboloid, spherical_cap",
                },
            ))
        }
    };
    let anchors = match &r.anchor_count {
        None => d.anchors,
        Some(n) => u32::try_from(*n.get_ref()).map_err(|_| {
            bad(
                n.span(),
                problem(format!(
                    "anchor_count must be a whole number from {} to {} (got {})",
                    super::MIN_ANCHOR_COUNT,
                    super::MAX_ANCHOR_COUNT,
                    n.get_ref()
                )),
            )
        })?,
    };
    let spec = StructureSpec {
        aperture_m: value(&r.aperture_diameter_m).unwrap_or(d.aperture_m),
        shape,
        anchors,
        min_clearance_m: value(&r.min_clearance_m).unwrap_or(d.min_clearance_m),
        max_anchor_height_difference_m: value(&r.max_anchor_height_difference_m)
            .unwrap_or(d.max_anchor_height_difference_m),
    };
    Ok((spec, lines))
}

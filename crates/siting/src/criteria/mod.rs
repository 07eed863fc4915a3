//! The criteria a survey is judged by: hard requirements (pass or fail, with the margin) and
//! soft criteria (utility between a worst-acceptable and an ideal value, weighted), plus the
//! scoring variant and the robustness-analysis settings. Plain data so a GUI can edit it; read
//! from and written to our own versioned TOML layout (see docs/siting.md).

mod edit;
mod parse;
mod validate;
mod write;

pub use operations::OperationsInputs;
use serde::{Deserialize, Serialize};
pub use structure::{Shape, StructureSpec};

pub use edit::{CurveEnd, PointRole};
pub use validate::{CriteriaError, CriteriaProblem};

/// The value of the `format` key every criteria file starts with.
pub const CRITERIA_FORMAT: &str = "quietbowl-criteria";
/// Layout version of the criteria file. Bump on incompatible change; `parse` then refuses or
/// migrates older files with a reason.
pub const CRITERIA_VERSION: u32 = 1;

/// Anchors a criteria file may ask for. Issue 7 names 3 to 8 as the useful range; 12 leaves
/// room without reaching layouts the screening is not meant for (no source).
pub const MIN_ANCHOR_COUNT: u32 = structure::MIN_ANCHORS;
pub const MAX_ANCHOR_COUNT: u32 = 12;

/// The shipped defaults for a crater-hosted reflector about a kilometre across.
pub const DEFAULT_REFLECTOR_TOML: &str =
    include_str!("../../../../assets/criteria/reflector-1km.toml");

/// How utilities are combined into one score.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum ScoreMethod {
    /// Sum of weight x utility (weights normalised to sum 1).
    #[default]
    WeightedSum,
    /// Product of utility ^ weight (weights normalised): a zero on any weighted criterion
    /// zeroes the score, so weak spots cannot be bought back by strengths elsewhere.
    WeightedProduct,
}

impl ScoreMethod {
    pub fn key(self) -> &'static str {
        match self {
            ScoreMethod::WeightedSum => "weighted_sum",
            ScoreMethod::WeightedProduct => "weighted_product",
        }
    }
}

/// A pass/fail bound on one metric. At least one of `min`, `max` is set.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Requirement {
    pub metric: String,
    pub min: Option<f64>,
    pub max: Option<f64>,
    /// Why the bound is what it is (kept with the file, shown in exports).
    pub why: String,
}

/// How a metric value maps to a utility in [0, 1].
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case", tag = "kind")]
pub enum UtilityShape {
    /// 0 at `worst`, 1 at `ideal`, straight between, clamped outside.
    Linear,
    /// Piecewise linear through (value, utility) points, ascending in value, flat beyond the
    /// ends. `worst` must be one of the points with utility 0 and `ideal` one with utility 1;
    /// the curve may rise and fall (a preferred middle value).
    Breakpoints { points: Vec<[f64; 2]> },
}

/// A weighted soft criterion on one metric.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct SoftCriterion {
    pub metric: String,
    /// Worst acceptable value: utility 0.
    pub worst: f64,
    /// Ideal value: utility 1.
    pub ideal: f64,
    pub shape: UtilityShape,
    /// Relative importance, >= 0; normalised over all criteria when scoring.
    pub weight: f64,
    pub why: String,
}

/// How weights are drawn in the robustness analysis.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case", tag = "kind")]
pub enum WeightSampling {
    /// Each chosen weight times (1 + spread x u), u uniform in [-1, 1], then renormalised.
    AroundChosen { spread: f64 },
    /// Uniform on the simplex (Dirichlet(1)): no preference information at all.
    UniformSimplex,
}

/// Settings of the stochastic multicriteria acceptability analysis, kept in the criteria file
/// so a rerun repeats it exactly.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct RobustnessSettings {
    pub samples: usize,
    pub seed: u64,
    pub sampling: WeightSampling,
    /// "Top N" for the reported probability of reaching the top N.
    pub top_n: usize,
    /// How many of the best-ranked passing candidates take part.
    pub pool: usize,
}

impl Default for RobustnessSettings {
    fn default() -> Self {
        RobustnessSettings {
            samples: 10_000,
            seed: 1,
            sampling: WeightSampling::AroundChosen { spread: 0.5 },
            top_n: 10,
            pool: 1_000,
        }
    }
}

/// A whole criteria set.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Criteria {
    pub title: String,
    pub scoring: ScoreMethod,
    pub requirements: Vec<Requirement>,
    pub criteria: Vec<SoftCriterion>,
    pub robustness: RobustnessSettings,
    /// The reflector to fit into every candidate (the `[structure]` table). `None`: rank the
    /// survey's fits as they are. When it differs from the spec the survey was fitted with, the
    /// command line and the workbench refit the survey (`survey::refit`) before ranking.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub structure: Option<StructureSpec>,
    /// The operations inputs (the `[operations]` table: landing dispersion and limits,
    /// launcher, relay orbit and margin). `None`: the survey's own, or the defaults. The
    /// survey computes the operations figures; a file whose table differs from the inputs the
    /// survey recorded is reported by `rank`, which cannot recompute them.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub operations: Option<operations::OperationsInputs>,
    /// Study areas and keep-out zones (`[[area]]`), each a hard requirement.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub areas: Vec<crate::areas::AreaSpec>,
    /// Radius of the "backup sites within" neighbourhood metric, km (`[neighbourhood]`).
    #[serde(default = "default_backup_radius_km")]
    pub backup_radius_km: f64,
}

/// Default radius for counting backup sites, km: common practice, no source (a day's
/// traverse for a crewed or robotic rover is of this order; invented for the demo scale).
pub const DEFAULT_BACKUP_RADIUS_KM: f64 = 10.0;

fn default_backup_radius_km() -> f64 {
    DEFAULT_BACKUP_RADIUS_KM
}

impl Criteria {
    /// Read a criteria file's text. Errors point at the line (and column for syntax errors).
    pub fn parse(text: &str) -> Result<Criteria, CriteriaError> {
        parse::parse(text)
    }

    /// The shipped criteria for a crater-hosted reflector about a kilometre across.
    pub fn default_reflector() -> Criteria {
        // The shipped file is checked by a test; failing here is a build defect, not bad input.
        parse::parse(DEFAULT_REFLECTOR_TOML).expect("shipped criteria file is valid")
    }

    /// Check a criteria set built or edited in code (no line numbers to give).
    pub fn validate(&self) -> Result<(), CriteriaError> {
        validate::validate(self, &validate::Lines::none(self))
    }

    /// The canonical TOML text of this criteria set (comments are not kept; `why` notes are).
    pub fn to_toml(&self) -> String {
        write::to_toml(self)
    }

    /// Weights normalised to sum 1 (zeros when all are zero, which `validate` refuses).
    pub fn normalised_weights(&self) -> Vec<f64> {
        let total: f64 = self.criteria.iter().map(|c| c.weight.max(0.0)).sum();
        self.criteria
            .iter()
            .map(|c| {
                if total > 0.0 {
                    c.weight.max(0.0) / total
                } else {
                    0.0
                }
            })
            .collect()
    }
}

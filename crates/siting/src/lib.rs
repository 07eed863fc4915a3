//! Turns a survey into a defensible, reproducible shortlist: hard requirements, weighted soft
//! criteria, Pareto flags, a robustness analysis over uncertain weights, exports (GeoJSON,
//! CSV, GeoPackage) with provenance, and the study file that keeps it all together.
//!
//! The ranking API is built for interactive use: [`PreparedTable::new`] does the per-candidate
//! work once (metric look-up, utilities, requirements, Pareto); [`rank`] then only forms a
//! weighted sum over contiguous columns and sorts, so it can run each time a weight moves.
//! Methods and their sources: docs/siting.md.

pub mod areas;
pub mod atomic;
pub mod breakdown;
pub mod criteria;
mod error;
pub mod export;
pub mod neighbourhood;
mod order;
pub mod pareto;
pub mod ranking;
pub mod requirements;
pub mod smaa;
pub mod study;
pub mod table;
pub mod utility;
pub mod words;

pub use breakdown::{score_breakdown, CriterionPart, ScoreBreakdown};
pub use criteria::{
    Criteria, CriteriaError, Requirement, ScoreMethod, SoftCriterion, UtilityShape, WeightSampling,
};
pub use error::SitingError;
pub use export::Provenance;
pub use ranking::{
    rank, rank_on_demand, rank_on_demand_reusing, FailedRequirement, PreparedTable, RankedEntry,
    Ranking, RankingOnDemand,
};
pub use smaa::{smaa, SmaaResult};
pub use study::Study;
pub use words::{dish_summary, structure_summary};

/// Shown with every ranking the tool presents (DEVELOPERS.md; domain notes section 9). It is
/// `visibility::CAUTION`, the lowest crate that prints a report, so there is one wording.
pub const SCREENING_CAUTION: &str = visibility::CAUTION;

/// What every verdict ("meets limits", "fits the stated envelope on this DEM") leaves out;
/// shown beside the caution wherever verdicts are shown.
pub const VERDICT_SCOPE: &str = "Verdicts are screening only: loads, cable dynamics, ground bearing, thermal effects and DEM vertical error are not assessed.";

/// Tool name and version recorded in every export and study file.
pub const TOOL_VERSION: &str = concat!("quietbowl ", env!("CARGO_PKG_VERSION"));

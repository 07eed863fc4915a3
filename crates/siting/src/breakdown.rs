//! Why one candidate has the score it has: per soft criterion, its share of the total weight,
//! the candidate's utility on it and what that adds to (or multiplies into) the score.
//!
//! The ranking itself ([`crate::rank`]) works on prepared columns for speed; this reads one
//! candidate's metrics afresh through the same utility function and weights, so the parts
//! give back the ranked score (a test holds the two to each other).

use crate::criteria::{Criteria, ScoreMethod};
use crate::SitingError;
use survey::Candidate;

/// One soft criterion's part in a candidate's score.
#[derive(Clone, Debug, PartialEq)]
pub struct CriterionPart {
    /// The metric id the criterion reads (for files; screens show its label).
    pub metric: String,
    /// The candidate's value of that metric (`None`: not measured, which earns utility 0).
    pub value: Option<f64>,
    /// The criterion's weight over the sum of all weights, 0..1.
    pub weight_share: f64,
    /// The candidate's utility on the criterion, 0..1.
    pub utility: f64,
    /// Weighted sum: `weight_share * utility`, and the parts add up to the score.
    /// Weighted product: `utility ^ weight_share`, and the parts multiply to the score.
    pub contribution: f64,
}

/// A candidate's score taken apart by criterion, in criteria order.
#[derive(Clone, Debug, PartialEq)]
pub struct ScoreBreakdown {
    pub method: ScoreMethod,
    pub parts: Vec<CriterionPart>,
    /// The score the parts make, in [0, 1]: what the ranking gives the candidate.
    pub score: f64,
}

/// Take `candidate`'s score under `criteria` apart by criterion. Fails only when the criteria
/// are invalid (the ranking refuses them too).
///
/// ```
/// use siting::{Criteria, breakdown::score_breakdown};
/// let c = Criteria::default_reflector();
/// let candidate: survey::Candidate = serde_json::from_value(serde_json::json!({
///     "id": 1, "source": "detected", "crater": craters::CraterMeasurement::default() })).unwrap();
/// let b = score_breakdown(&c, &candidate).unwrap();
/// let shares: f64 = b.parts.iter().map(|p| p.weight_share).sum();
/// assert!((shares - 1.0).abs() < 1e-12);
/// ```
pub fn score_breakdown(
    criteria: &Criteria,
    candidate: &Candidate,
) -> Result<ScoreBreakdown, SitingError> {
    criteria.validate()?;
    let shares = criteria.normalised_weights();
    let parts: Vec<CriterionPart> = criteria
        .criteria
        .iter()
        .zip(shares)
        .map(|(c, share)| {
            let value = survey::metrics::metric(&c.metric).and_then(|m| (m.get)(candidate));
            let utility = crate::utility::utility(c, value);
            let contribution = match criteria.scoring {
                ScoreMethod::WeightedSum => share * utility,
                // A zero weight leaves the criterion out (factor 1), as in the ranking.
                ScoreMethod::WeightedProduct if share == 0.0 => 1.0,
                ScoreMethod::WeightedProduct => utility.powf(share),
            };
            CriterionPart {
                metric: c.metric.clone(),
                value,
                weight_share: share,
                utility,
                contribution,
            }
        })
        .collect();
    let raw = match criteria.scoring {
        ScoreMethod::WeightedSum => parts.iter().map(|p| p.contribution).sum::<f64>(),
        ScoreMethod::WeightedProduct => parts.iter().map(|p| p.contribution).product::<f64>(),
    };
    // The ranking clamps the same way: rounding may step a hair outside [0, 1].
    let score = if raw.is_finite() {
        raw.clamp(0.0, 1.0)
    } else {
        0.0
    };
    Ok(ScoreBreakdown {
        method: criteria.scoring,
        parts,
        score,
    })
}

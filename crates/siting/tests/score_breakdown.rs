//! A candidate's score taken apart by criterion, against a hand-worked example (the arithmetic
//! is in the comments) and against the ranking's own scores.

mod common;

use common::{good, random_survey, with_crater, with_vis};
use siting::breakdown::score_breakdown;
use siting::{rank, Criteria, PreparedTable, ScoreMethod, SoftCriterion, UtilityShape};

fn soft(metric: &str, worst: f64, ideal: f64, shape: UtilityShape, weight: f64) -> SoftCriterion {
    SoftCriterion {
        metric: metric.into(),
        worst,
        ideal,
        shape,
        weight,
        why: String::new(),
    }
}

/// Tilt (linear, weight 2), d/D (breakpoints 0.10 -> 0, 0.15 -> 1, 0.25 -> 1, 0.30 -> 0,
/// weight 2) and closest approach to the galactic centre (linear 0 -> 45 deg, weight 1).
fn three() -> Criteria {
    let mut c = Criteria::default_reflector();
    c.requirements.clear();
    c.scoring = ScoreMethod::WeightedSum;
    c.criteria = vec![
        soft("floor_tilt_deg", 10.0, 0.0, UtilityShape::Linear, 2.0),
        soft(
            "depth_to_diameter",
            0.10,
            0.15,
            UtilityShape::Breakpoints {
                points: vec![[0.10, 0.0], [0.15, 1.0], [0.25, 1.0], [0.30, 0.0]],
            },
            2.0,
        ),
        soft("gc_separation_deg", 0.0, 45.0, UtilityShape::Linear, 1.0),
    ];
    c
}

fn tilt2_dd0125(gc_deg: Option<f64>) -> survey::Candidate {
    let c = with_crater(good(7, 180.0, 10.0), |m| {
        m.floor_tilt_deg = 2.0;
        m.depth_to_diameter = 0.125;
    });
    match gc_deg {
        Some(g) => with_vis(c, |v| v.gc_separation_deg = g),
        None => {
            let mut c = c;
            c.visibility = None;
            c
        }
    }
}

#[test]
fn weighted_sum_parts_match_hand_worked_example() {
    // Shares: 2/5 = 0.4, 2/5 = 0.4, 1/5 = 0.2.
    // Utilities: tilt (10 - 2) / 10 = 0.8; d/D halfway from 0.10 to 0.15 = 0.5;
    // galactic centre not measured (no visibility figures) = 0.
    // Contributions: 0.4 * 0.8 = 0.32, 0.4 * 0.5 = 0.20, 0.2 * 0 = 0; score 0.52.
    let b = score_breakdown(&three(), &tilt2_dd0125(None)).unwrap();
    let expect = [
        ("floor_tilt_deg", Some(2.0), 0.4, 0.8, 0.32),
        ("depth_to_diameter", Some(0.125), 0.4, 0.5, 0.20),
        ("gc_separation_deg", None, 0.2, 0.0, 0.0),
    ];
    assert_eq!(b.parts.len(), 3);
    for (p, (metric, value, share, utility, contribution)) in b.parts.iter().zip(expect) {
        assert_eq!(p.metric, metric);
        assert_eq!(p.value, value, "{metric}");
        assert!((p.weight_share - share).abs() < 1e-12, "{metric} share");
        assert!((p.utility - utility).abs() < 1e-12, "{metric} utility");
        assert!(
            (p.contribution - contribution).abs() < 1e-12,
            "{metric} contribution"
        );
    }
    assert!((b.score - 0.52).abs() < 1e-12, "score {}", b.score);
}

#[test]
fn weighted_product_parts_match_hand_worked_example() {
    // Galactic centre at 22.5 deg: utility 0.5. Factors 0.8^0.4, 0.5^0.4, 0.5^0.2;
    // score = exp(0.4 ln 0.8 + 0.6 ln 0.5) = 0.603418 (python3 math.exp).
    let mut c = three();
    c.scoring = ScoreMethod::WeightedProduct;
    let b = score_breakdown(&c, &tilt2_dd0125(Some(22.5))).unwrap();
    assert!((b.parts[0].contribution - 0.8f64.powf(0.4)).abs() < 1e-12);
    assert!((b.parts[2].contribution - 0.5f64.powf(0.2)).abs() < 1e-12);
    assert!((b.score - 0.603_418).abs() < 1e-6, "score {}", b.score);
    // A criterion at utility 0 zeroes the product.
    let b = score_breakdown(&c, &tilt2_dd0125(None)).unwrap();
    assert_eq!(b.score, 0.0);
}

#[test]
fn parts_give_back_the_ranked_score_of_every_candidate() {
    let s = random_survey(300, 42);
    for method in [ScoreMethod::WeightedSum, ScoreMethod::WeightedProduct] {
        let mut c = Criteria::default_reflector();
        c.scoring = method;
        let t = PreparedTable::new(&s, &c).unwrap();
        let r = rank(&t, &c).unwrap();
        for (i, cand) in s.candidates.iter().enumerate() {
            let b = score_breakdown(&c, cand).unwrap();
            assert!(
                (b.score - r.scores[i]).abs() < 1e-12,
                "{method:?} candidate {i}: parts {} ranking {}",
                b.score,
                r.scores[i]
            );
        }
    }
}

#[test]
fn invalid_criteria_are_refused() {
    let mut c = three();
    for k in &mut c.criteria {
        k.weight = 0.0;
    }
    assert!(score_breakdown(&c, &good(1, 180.0, 0.0)).is_err());
}

//! Utilities, scores, ranking order, hard requirements and Pareto flags, checked against
//! values worked by hand (the arithmetic is in the comments).

mod common;

use common::{criteria, good, survey, with_crater, with_vis};
use proptest::prelude::*;
use siting::utility::utility;
use siting::{
    rank, Criteria, PreparedTable, ScoreMethod, SitingError, SoftCriterion, UtilityShape,
};

const TWO: &str = r#"
[[requirement]]
metric = "diameter_m"
min = 800.0
max = 2000.0

[[criterion]]
metric = "floor_tilt_deg"
worst = 10.0
ideal = 0.0
weight = 3.0

[[criterion]]
metric = "rim_completeness"
worst = 0.5
ideal = 1.0
weight = 1.0
"#;

/// A: tilt 2, completeness 0.7; B: 5, 1.0; C: 0, 0.4; D: 3, 0.6, diameter 2300 (fails);
/// E: like A but diameter 700 (fails). ids are given out of order on purpose.
fn abcd() -> survey::SurveyFile {
    let mk = |id, tilt, compl, diam| {
        with_crater(good(id, 180.0, 10.0), |c| {
            c.floor_tilt_deg = tilt;
            c.rim_completeness = compl;
            c.diameter_m = diam;
        })
    };
    survey(vec![
        mk(30, 2.0, 0.7, 1000.0),
        mk(10, 5.0, 1.0, 1000.0),
        mk(20, 0.0, 0.4, 1000.0),
        mk(40, 3.0, 0.6, 2300.0),
        mk(5, 2.0, 0.7, 700.0),
    ])
}

#[test]
fn linear_and_breakpoint_utilities_match_hand_values() {
    let lin = SoftCriterion {
        metric: "floor_tilt_deg".into(),
        worst: 10.0,
        ideal: 0.0,
        shape: UtilityShape::Linear,
        weight: 1.0,
        why: String::new(),
    };
    // (10 - 2.5) / 10 = 0.75; beyond the ends clamped; missing gets 0.
    assert_eq!(utility(&lin, Some(2.5)), 0.75);
    assert_eq!(utility(&lin, Some(-3.0)), 1.0);
    assert_eq!(utility(&lin, Some(40.0)), 0.0);
    assert_eq!(utility(&lin, None), 0.0);
    assert_eq!(utility(&lin, Some(f64::NAN)), 0.0);
    let peak = SoftCriterion {
        metric: "depth_to_diameter".into(),
        worst: 0.3,
        ideal: 0.2,
        shape: UtilityShape::Breakpoints {
            points: vec![[0.15, 0.0], [0.2, 1.0], [0.3, 0.0]],
        },
        weight: 1.0,
        why: String::new(),
    };
    // 0.175 is halfway up the first leg: 0.5; 0.25 halfway down the second: 0.5.
    assert!((utility(&peak, Some(0.175)) - 0.5).abs() < 1e-12);
    assert!((utility(&peak, Some(0.25)) - 0.5).abs() < 1e-12);
    assert_eq!(utility(&peak, Some(0.2)), 1.0);
    assert_eq!(utility(&peak, Some(0.1)), 0.0);
}

#[test]
fn weighted_sum_ranking_matches_hand_worked_example() {
    let s = abcd();
    let c = criteria(TWO);
    let t = PreparedTable::new(&s, &c).unwrap();
    let r = rank(&t, &c).unwrap();
    // Weights 3:1 -> 0.75, 0.25. Utilities (tilt, compl): A (0.8, 0.4), B (0.5, 1.0),
    // C (1.0, 0.0), D (0.7, 0.2), E (0.8, 0.4).
    // Scores: A 0.6 + 0.1 = 0.7; B 0.375 + 0.25 = 0.625; C 0.75; D 0.525 + 0.05 = 0.575; E 0.7.
    let expect = [0.7, 0.625, 0.75, 0.575, 0.7];
    for (i, e) in expect.iter().enumerate() {
        assert!(
            (r.scores[i] - e).abs() < 1e-12,
            "candidate {i}: {} vs {e}",
            r.scores[i]
        );
    }
    // Passing first (C, A, B), then failing by score, E (0.7) before D (0.575).
    let ids: Vec<u32> = r.entries(&t).map(|e| e.id()).collect();
    assert_eq!(ids, vec![20, 30, 10, 5, 40]);
    assert_eq!(r.ranks, vec![2, 3, 1, 5, 4]);
}

#[test]
fn failed_requirements_list_every_bound_and_margin() {
    let s = abcd();
    let c = criteria(TWO);
    let t = PreparedTable::new(&s, &c).unwrap();
    let d = t.failures(3);
    assert_eq!(d.len(), 1);
    // 2300 - 2000 = 300 above the max.
    assert_eq!(
        (d[0].metric.as_str(), d[0].value, d[0].margin),
        ("diameter_m", Some(2300.0), Some(300.0))
    );
    assert_eq!(d[0].describe(), "diameter_m 2300 above max 2000 by 300");
    // 800 - 700 = 100 below the min.
    assert_eq!(t.failures(4)[0].margin, Some(100.0));
    assert!(t.passed(0) && !t.passed(3));
}

#[test]
fn unmeasured_metric_fails_requirement_and_scores_zero() {
    let mut unmeasured = good(2, 180.0, 0.0);
    unmeasured.visibility = None;
    let s = survey(vec![good(1, 180.0, 0.0), unmeasured]);
    let c = criteria(
        "[[requirement]]\nmetric = \"earth_clearance_deg\"\nmin = 1.0\n\
         [[criterion]]\nmetric = \"gc_separation_deg\"\nworst = 0.0\nideal = 45.0\nweight = 1.0\n",
    );
    let t = PreparedTable::new(&s, &c).unwrap();
    let f = &t.failures(1)[0];
    assert_eq!((f.value, f.margin), (None, None));
    assert_eq!(f.describe(), "earth_clearance_deg not measured");
    let r = rank(&t, &c).unwrap();
    assert_eq!(r.scores, vec![1.0, 0.0]);
}

#[test]
fn weighted_product_matches_hand_worked_example() {
    let s = abcd();
    let mut c = criteria(TWO);
    c.scoring = ScoreMethod::WeightedProduct;
    let t = PreparedTable::new(&s, &c).unwrap();
    let r = rank(&t, &c).unwrap();
    // A: 0.8^0.75 * 0.4^0.25 = exp(0.75 ln 0.8 + 0.25 ln 0.4) = 0.672717...;
    // B: 0.5^0.75 * 1 = 0.594604...; C: completeness utility 0 -> 0.
    assert!((r.scores[0] - 0.8f64.powf(0.75) * 0.4f64.powf(0.25)).abs() < 1e-12);
    assert!((r.scores[0] - 0.672717).abs() < 1e-6);
    assert!((r.scores[1] - 0.594604).abs() < 1e-6);
    assert_eq!(r.scores[2], 0.0);
    let ids: Vec<u32> = r.entries(&t).take(3).map(|e| e.id()).collect();
    assert_eq!(ids, vec![30, 10, 20]);
}

#[test]
fn pareto_flags_match_hand_checked_set() {
    // Utilities (tilt, compl): A (0.8, 0.4), B (0.5, 1.0), C (1.0, 0.0) trade off: none beats
    // another on both. D (0.7, 0.2) is beaten by A on both. Failing candidates are not flagged.
    let s = abcd();
    let c = criteria(TWO);
    let t = PreparedTable::new(&s, &c).unwrap();
    let flags: Vec<bool> = (0..5).map(|i| t.pareto(i)).collect();
    assert_eq!(flags, vec![true, true, true, false, false]);
    // Make D pass: it is still dominated by A.
    let mut s2 = abcd();
    s2.candidates[3].crater.diameter_m = 1000.0;
    let t2 = PreparedTable::new(&s2, &c).unwrap();
    assert!(!t2.pareto(3));
    // Equal utility vectors do not dominate each other: E (same as A) made to pass stays flagged.
    s2.candidates[4].crater.diameter_m = 1000.0;
    let t3 = PreparedTable::new(&s2, &c).unwrap();
    assert!(t3.pareto(0) && t3.pareto(4));
}

#[test]
fn ties_are_broken_by_candidate_id() {
    let s = survey(vec![
        good(9, 180.0, 0.0),
        good(3, 181.0, 0.0),
        good(7, 182.0, 0.0),
    ]);
    let c = criteria(TWO);
    let t = PreparedTable::new(&s, &c).unwrap();
    let r = rank(&t, &c).unwrap();
    let ids: Vec<u32> = r.entries(&t).map(|e| e.id()).collect();
    assert_eq!(ids, vec![3, 7, 9]);
}

#[test]
fn weight_change_reranks_without_rebuilding_but_shape_change_needs_refresh() {
    let s = abcd();
    let mut c = criteria(TWO);
    let mut t = PreparedTable::new(&s, &c).unwrap();
    // Swap to 1:3: A 0.2 + 0.3 = 0.5, B 0.125 + 0.75 = 0.875, C 0.25 -> B, A, C.
    c.criteria[0].weight = 1.0;
    c.criteria[1].weight = 3.0;
    let r = rank(&t, &c).unwrap();
    assert_eq!(
        r.entries(&t).take(3).map(|e| e.id()).collect::<Vec<_>>(),
        vec![10, 30, 20]
    );
    c.criteria[0].worst = 20.0;
    assert!(matches!(rank(&t, &c), Err(SitingError::StaleTable(_))));
    assert!(t.refresh(&s, &c).unwrap());
    assert!(rank(&t, &c).is_ok());
    assert!(!t.refresh(&s, &c).unwrap());
}

#[test]
fn default_criteria_rank_a_random_survey() {
    let s = common::random_survey(2000, 7);
    let c = Criteria::default_reflector();
    let t = PreparedTable::new(&s, &c).unwrap();
    let r = rank(&t, &c).unwrap();
    let mut seen = r.order.clone();
    seen.sort_unstable();
    assert_eq!(seen, (0..2000).collect::<Vec<u32>>());
    // Passing rows come first and scores do not increase within each group.
    let rows: Vec<(bool, f64)> = r.entries(&t).map(|e| (e.passed(), e.score)).collect();
    for w in rows.windows(2) {
        assert!(w[0].0 >= w[1].0);
        if w[0].0 == w[1].0 {
            assert!(w[0].1 >= w[1].1);
        }
    }
    // Every Pareto candidate passes; the top passing candidate is on the Pareto front
    // (a maximiser of a positively weighted sum is non-dominated).
    let best = r.order[0] as usize;
    if t.passed(best) {
        assert!(t.pareto(best));
    }
    assert!((0..2000).all(|i| !t.pareto(i) || t.passed(i)));
    let _ = with_vis(good(0, 0.0, 0.0), |_| {});
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 64, ..ProptestConfig::default() })]

    #[test]
    fn scorer_never_panics_and_scores_stay_in_unit_interval(
        values in proptest::collection::vec((proptest::num::f64::ANY, proptest::num::f64::ANY), 1..30),
        w1 in 0.0f64..10.0, w2 in 0.0f64..10.0, product in any::<bool>(),
    ) {
        let cands = values.iter().enumerate().map(|(i, &(tilt, compl))| {
            with_crater(good(i as u32, 180.0, 0.0), |c| { c.floor_tilt_deg = tilt; c.rim_completeness = compl; })
        }).collect();
        let s = survey(cands);
        let mut c = criteria(TWO);
        c.criteria[0].weight = w1;
        c.criteria[1].weight = w2 + 1e-9;
        if product { c.scoring = ScoreMethod::WeightedProduct; }
        let t = PreparedTable::new(&s, &c).unwrap();
        let r = rank(&t, &c).unwrap();
        for &x in &r.scores { prop_assert!((0.0..=1.0).contains(&x), "score {x}"); }
        let mut ranks = r.ranks.clone();
        ranks.sort_unstable();
        prop_assert_eq!(ranks, (1..=values.len() as u32).collect::<Vec<_>>());
    }
}

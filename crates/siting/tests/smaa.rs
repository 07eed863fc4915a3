//! Robustness analysis (SMAA, Lahdelma, Hokkanen and Salminen 1998): seeded determinism and
//! acceptability indices checked against values derived by hand.

mod common;

use common::{criteria, good, survey, with_crater};
use siting::criteria::{RobustnessSettings, WeightSampling};
use siting::smaa::smaa_with;
use siting::{smaa, PreparedTable};

const TWO: &str = r#"
[[criterion]]
metric = "floor_tilt_deg"
worst = 10.0
ideal = 0.0
weight = 1.0

[[criterion]]
metric = "rim_completeness"
worst = 0.0
ideal = 1.0
weight = 1.0
"#;

/// Candidates with utilities (tilt, completeness) as given.
fn trade_off(us: &[(f64, f64)]) -> survey::SurveyFile {
    survey(
        us.iter()
            .enumerate()
            .map(|(i, &(a, b))| {
                with_crater(good(i as u32, 180.0, 0.0), |c| {
                    c.floor_tilt_deg = 10.0 * (1.0 - a);
                    c.rim_completeness = b;
                })
            })
            .collect(),
    )
}

fn settings(samples: usize, sampling: WeightSampling, top_n: usize) -> RobustnessSettings {
    RobustnessSettings {
        samples,
        seed: 42,
        sampling,
        top_n,
        pool: 1000,
    }
}

#[test]
fn same_seed_gives_identical_results_and_another_seed_differs() {
    let s = common::random_survey(300, 3);
    let c = siting::Criteria::default_reflector();
    let t = PreparedTable::new(&s, &c).unwrap();
    let a = smaa(&t, &c).unwrap();
    let b = smaa(&t, &c).unwrap();
    assert_eq!(a, b);
    let mut other = c.robustness.clone();
    other.seed += 1;
    let d = smaa_with(&t, &c, &other).unwrap();
    assert_eq!(a.pool, d.pool);
    assert_ne!(a.p_rank1, d.p_rank1);
    // Probabilities: P(rank 1) sums to 1 over the pool; P(top N) sums to N.
    let sum1: f64 = a.p_rank1.iter().sum();
    let sum_n: f64 = a.p_top_n.iter().sum();
    assert!((sum1 - 1.0).abs() < 1e-9);
    assert!((sum_n - c.robustness.top_n.min(a.pool.len()) as f64).abs() < 1e-9);
}

#[test]
fn dominating_candidate_ranks_first_under_every_weight() {
    // Candidate 0 beats every other on both criteria: any non-negative weights rank it first.
    let s = trade_off(&[(0.9, 0.9), (0.8, 0.5), (0.5, 0.8), (0.1, 0.1)]);
    let c = criteria(TWO);
    let t = PreparedTable::new(&s, &c).unwrap();
    for sampling in [
        WeightSampling::UniformSimplex,
        WeightSampling::AroundChosen { spread: 0.9 },
    ] {
        let r = smaa_with(&t, &c, &settings(2000, sampling, 2)).unwrap();
        assert_eq!(r.probabilities(0), Some((1.0, 1.0)));
        // Candidate 3 is dominated by everyone: never in the top 2.
        assert_eq!(r.probabilities(3), Some((0.0, 0.0)));
    }
}

#[test]
fn uniform_simplex_acceptabilities_match_hand_derivation() {
    // Two criteria, weights (w, 1 - w) with w uniform on [0, 1] (Dirichlet(1) in 2-D).
    // A = (1, 0) scores w; B = (0, 1) scores 1 - w; C = (0.6, 0.6) scores 0.6.
    // C is first when w < 0.6 and 1 - w < 0.6, i.e. 0.4 < w < 0.6: P = 0.2.
    // A is first when w > 0.6: 0.4; B when w < 0.4: 0.4 (worked by hand).
    let s = trade_off(&[(1.0, 0.0), (0.0, 1.0), (0.6, 0.6)]);
    let c = criteria(TWO);
    let t = PreparedTable::new(&s, &c).unwrap();
    let n = 20_000;
    let r = smaa_with(&t, &c, &settings(n, WeightSampling::UniformSimplex, 2)).unwrap();
    // Tolerance: 4 binomial standard errors, sqrt(0.4 * 0.6 / 20000) = 0.0035.
    let tol = 4.0 * (0.24f64 / n as f64).sqrt();
    let p = |i| r.probabilities(i).unwrap();
    assert!((p(0).0 - 0.4).abs() < tol, "{:?}", p(0));
    assert!((p(1).0 - 0.4).abs() < tol, "{:?}", p(1));
    assert!((p(2).0 - 0.2).abs() < tol, "{:?}", p(2));
    // Top 2: C is last only when it is beaten by both, impossible (max(w, 1 - w) >= 0.5 and
    // min(w, 1 - w) <= 0.5 < 0.6), so P(top 2) = 1 for C; the last is then A when w < 0.5,
    // so A reaches the top 2 with P = 0.5.
    assert_eq!(p(2).1, 1.0);
    assert!((p(0).1 - 0.5).abs() < tol, "{:?}", p(0));
    // Central weight of A: mean of (w, 1 - w) over w in (0.6, 1]: (0.8, 0.2).
    let cw = r.central_weights[r.pool.iter().position(|&i| i == 0).unwrap()]
        .clone()
        .unwrap();
    assert!(
        (cw[0] - 0.8).abs() < 0.01 && (cw[1] - 0.2).abs() < 0.01,
        "{cw:?}"
    );
}

#[test]
fn around_chosen_weights_stay_within_the_spread() {
    // Chosen weights 1:1. With spread 0.2 each factor lies in [0.8, 1.2], so w stays in
    // [0.8 / 2.0, 1.2 / 2.0] = [0.4, 0.6]: A scores w <= 0.6 and B 1 - w <= 0.6, so C
    // (0.6, 0.6) is never beaten (a tie goes to the better rank under the chosen weights, C's).
    // So P(C first) = 1.
    let s = trade_off(&[(1.0, 0.0), (0.0, 1.0), (0.6, 0.6)]);
    let c = criteria(TWO);
    let t = PreparedTable::new(&s, &c).unwrap();
    let r = smaa_with(
        &t,
        &c,
        &settings(3000, WeightSampling::AroundChosen { spread: 0.2 }, 1),
    )
    .unwrap();
    assert_eq!(r.probabilities(2), Some((1.0, 1.0)));
}

#[test]
fn failing_candidates_are_left_out_of_the_pool() {
    let mut s = trade_off(&[(0.9, 0.9), (0.5, 0.5)]);
    s.candidates[0].crater.diameter_m = 5000.0;
    let c = criteria(&format!(
        "[[requirement]]\nmetric = \"diameter_m\"\nmax = 2000.0\n{TWO}"
    ));
    let t = PreparedTable::new(&s, &c).unwrap();
    let r = smaa(&t, &c).unwrap();
    assert_eq!(r.pool, vec![1]);
    assert_eq!(r.probabilities(0), None);
    assert_eq!(r.probabilities(1), Some((1.0, 1.0)));
}

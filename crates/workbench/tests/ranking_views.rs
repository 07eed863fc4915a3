//! The views read the ranking place by place ([`engine::Ranking::at`], `place`, `walk`) while
//! the library sorts only where they read: every such read must give what the full sort gives
//! (`siting::rank`, itself checked against a plain stable sort in siting's tests), on a survey
//! large enough to be split into many key ranges.

mod common;

use quietbowl_workbench::engine;
use std::sync::Arc;

#[test]
fn places_read_one_by_one_are_the_full_rankings() {
    let survey = common::large_survey(40_000);
    let criteria = common::test_criteria();
    let table = engine::prepare(&survey, &criteria, &[], None).expect("table");
    let full = siting::rank(&table, &criteria).expect("full ranking");
    let fresh = || engine::rank(&table, &criteria, 1).expect("ranking");
    let n = full.order.len();
    assert_eq!(fresh().len(), n);

    // Places in a scattered order (a prime stride), before anything else was read.
    let r = fresh();
    for k in 0..n {
        let pos = (k * 7919) % n;
        assert_eq!(r.at(pos), Some(full.order[pos]), "place {pos}");
    }
    assert_eq!(r.at(n), None);

    // Places of candidates, and ranks (places of passing ones), again from a fresh ranking.
    let r = fresh();
    for i in (0..n).step_by(7) {
        assert_eq!(r.place(i), Some(full.ranks[i]), "candidate {i}");
        let passes = table.passed(i);
        assert_eq!(r.rank(i), passes.then_some(full.ranks[i]));
    }

    // A walk from the top, stopped part way, and one from the middle.
    let r = fresh();
    let mut walked = Vec::new();
    r.walk(0, |i| {
        walked.push(i);
        walked.len() < 1000
    });
    assert_eq!(walked, full.order[..1000]);
    let mut rest = Vec::new();
    r.walk(n / 2, |i| {
        rest.push(i);
        true
    });
    assert_eq!(rest, full.order[n / 2..]);

    // What the map and the table read besides places.
    let r = fresh();
    let passing = full
        .order
        .iter()
        .take_while(|&&i| table.passed(i as usize))
        .count();
    assert_eq!(r.passing_count(), passing);
    assert!(passing > 0 && passing < n, "both groups are exercised");
    let score = |k: usize| full.scores[full.order[k] as usize];
    assert_eq!(
        r.passing_score_range(),
        Some((score(passing - 1), score(0)))
    );

    // The whole ranking, when asked for, is the library's full sort.
    assert_eq!(r.full().map(Arc::as_ref), Some(&full));
    assert_eq!(r.order(), &full.order[..]);

    // A re-rank into an earlier ranking (its buffers reused, some shelves already sorted)
    // gives the new weights' ranking, read place by place and whole.
    let mut r = fresh();
    assert_eq!(r.at(0), Some(full.order[0]));
    let mut heavier = criteria.clone();
    heavier.criteria[0].weight = 3.0;
    engine::rank_into(&table, &heavier, 2, &mut r).expect("re-rank");
    let full2 = siting::rank(&table, &heavier).expect("full ranking");
    assert_ne!(full2.order, full.order, "the weight changes the order");
    for pos in (0..n).step_by(97) {
        assert_eq!(
            r.at(pos),
            Some(full2.order[pos]),
            "place {pos} after the re-rank"
        );
    }
    assert_eq!(r.score(5), Some(full2.scores[5]));
    assert_eq!(r.order(), &full2.order[..]);
}

//! The criteria file: the shipped default, errors that point at the right line, canonical
//! text round trip, and no panic on any input.

mod common;

use common::criteria_text;
use proptest::prelude::*;
use siting::criteria::{CriteriaProblem, DEFAULT_REFLECTOR_TOML};
use siting::{Criteria, UtilityShape};

/// 1-based line of the first occurrence of `needle` in `text`.
fn line_of(text: &str, needle: &str) -> usize {
    let at = text.find(needle).expect("needle in text");
    text[..at].matches('\n').count() + 1
}

#[test]
fn shipped_reflector_criteria_parse_and_cover_the_brief() {
    let c = Criteria::default_reflector();
    let req = |m: &str| {
        c.requirements
            .iter()
            .find(|r| r.metric == m)
            .unwrap_or_else(|| panic!("requirement {m}"))
    };
    // Ranges from the project brief (issue 5): diameter about 0.8-2 km, d/D about 0.15-0.3.
    assert_eq!(
        (req("diameter_m").min, req("diameter_m").max),
        (Some(800.0), Some(2000.0))
    );
    assert_eq!(
        (req("depth_to_diameter").min, req("depth_to_diameter").max),
        (Some(0.15), Some(0.3))
    );
    assert!(req("earth_clearance_deg").min.unwrap() > 0.0);
    assert_eq!(req("far_side_band").min, Some(1.0));
    let soft: Vec<&str> = c.criteria.iter().map(|s| s.metric.as_str()).collect();
    for m in [
        "depth_to_diameter",
        "rim_completeness",
        "rim_gap_deg",
        "floor_tilt_deg",
        "roughness_rms_m",
        "obstacle_fraction",
        "earth_clearance_deg",
        "gc_separation_deg",
    ] {
        assert!(soft.contains(&m), "soft criterion on {m}");
    }
    // d/D peaks near 0.2 (Pike 1977, from memory; "common practice" per the brief).
    let dd = c
        .criteria
        .iter()
        .find(|s| s.metric == "depth_to_diameter")
        .unwrap();
    assert_eq!(dd.ideal, 0.2);
    assert!(matches!(dd.shape, UtilityShape::Breakpoints { .. }));
}

#[test]
fn every_default_value_is_explained_in_a_comment() {
    // Each requirement and criterion block starts with a comment line after `metric = ...`.
    let lines: Vec<&str> = DEFAULT_REFLECTOR_TOML.lines().collect();
    for (i, l) in lines.iter().enumerate() {
        if l.starts_with("metric = ") {
            assert!(
                lines[i + 1].starts_with('#'),
                "no explanation after line {}: {l}",
                i + 1
            );
        }
    }
}

#[test]
fn canonical_text_reads_back_to_the_same_criteria() {
    let c = Criteria::default_reflector();
    let again = Criteria::parse(&c.to_toml()).expect("canonical text parses");
    assert_eq!(c, again);
    assert_eq!(c.to_toml(), again.to_toml());
}

fn problem_and_line(text: &str) -> (CriteriaProblem, Option<usize>) {
    let e = Criteria::parse(text).expect_err("must be refused");
    (e.problem, e.line)
}

const GOOD: &str =
    "[[criterion]]\nmetric = \"floor_tilt_deg\"\nworst = 10.0\nideal = 0.0\nweight = 1.0\n";

#[test]
fn unknown_metric_is_refused_at_its_line() {
    let t = criteria_text(&format!(
        "{GOOD}\n[[requirement]]\nmetric = \"crater_beauty\"\nmin = 1.0\n"
    ));
    let (p, line) = problem_and_line(&t);
    assert!(
        matches!(p, CriteriaProblem::UnknownMetric { ref name, .. } if name == "crater_beauty"),
        "{p:?}"
    );
    assert_eq!(line, Some(line_of(&t, "metric = \"crater_beauty\"")));
    let msg = Criteria::parse(&t).unwrap_err().to_string();
    assert!(
        msg.starts_with(&format!("line {}:", line.unwrap())) && msg.contains("diameter_m"),
        "{msg}"
    );
}

#[test]
fn min_above_max_is_refused_at_its_line() {
    let t = criteria_text(&format!(
        "{GOOD}\n[[requirement]]\nmetric = \"diameter_m\"\nmin = 3000.0\nmax = 800.0\n"
    ));
    let (p, line) = problem_and_line(&t);
    assert!(matches!(p, CriteriaProblem::MinAboveMax { .. }), "{p:?}");
    assert_eq!(line, Some(line_of(&t, "min = 3000.0")));
}

#[test]
fn negative_weight_is_refused_at_its_line() {
    let t = criteria_text(
        "[[criterion]]\nmetric = \"floor_tilt_deg\"\nworst = 10.0\nideal = 0.0\nweight = -2.0\n",
    );
    let (p, line) = problem_and_line(&t);
    assert!(matches!(p, CriteriaProblem::NegativeWeight { .. }), "{p:?}");
    assert_eq!(line, Some(line_of(&t, "weight = -2.0")));
}

#[test]
fn all_zero_weights_are_refused() {
    let t = criteria_text(&GOOD.replace("weight = 1.0", "weight = 0.0"));
    let (p, line) = problem_and_line(&t);
    assert_eq!(p, CriteriaProblem::AllWeightsZero);
    assert_eq!(line, Some(line_of(&t, "weight = 0.0")));
}

#[test]
fn syntax_error_gives_line_and_column() {
    let t = criteria_text(&format!("{GOOD}weight = = 3\n"));
    let e = Criteria::parse(&t).unwrap_err();
    assert!(matches!(e.problem, CriteriaProblem::Syntax(_)));
    assert_eq!(e.line, Some(line_of(&t, "weight = = 3")));
    assert!(e.column.is_some());
}

#[test]
fn misspelt_key_is_refused_at_its_line() {
    let t = criteria_text(&GOOD.replace("weight = 1.0", "wieght = 1.0"));
    let e = Criteria::parse(&t).unwrap_err();
    assert!(
        e.to_string().contains("wieght") || e.to_string().contains("weight"),
        "{e}"
    );
    assert!(e.line.is_some());
}

#[test]
fn other_refusals_name_the_problem() {
    let cases = [
        ("no soft criteria", criteria_text(""), "no soft criteria"),
        (
            "no bound",
            criteria_text(&format!("{GOOD}[[requirement]]\nmetric = \"diameter_m\"\n")),
            "neither min nor max",
        ),
        (
            "worst = ideal",
            criteria_text(&GOOD.replace("ideal = 0.0", "ideal = 10.0")),
            "no direction",
        ),
        (
            "shape",
            criteria_text(&GOOD.replace("weight = 1.0", "weight = 1.0\nshape = \"wiggly\"")),
            "wiggly",
        ),
        (
            "points order",
            criteria_text(&GOOD.replace(
                "weight = 1.0",
                "weight = 1.0\nshape = \"breakpoints\"\npoints = [[10.0, 0.0], [0.0, 1.0]]",
            )),
            "strictly increasing",
        ),
        (
            "worst not a point",
            criteria_text(&GOOD.replace(
                "weight = 1.0",
                "weight = 1.0\nshape = \"breakpoints\"\npoints = [[0.0, 1.0], [5.0, 0.0]]",
            )),
            "worst (10)",
        ),
        (
            "duplicate",
            criteria_text(&format!("{GOOD}\n{GOOD}")),
            "already has a soft criterion",
        ),
        (
            "version",
            criteria_text(GOOD).replace("version = 1", "version = 7"),
            "version 7",
        ),
        (
            "format",
            criteria_text(GOOD).replace("quietbowl-criteria", "something-else"),
            "not a criteria file",
        ),
        (
            "robustness",
            criteria_text(&format!("[robustness]\nspread = 1.5\n{GOOD}")),
            "spread",
        ),
        (
            "nan",
            criteria_text(&GOOD.replace("worst = 10.0", "worst = nan")),
            "not a finite number",
        ),
    ];
    for (what, text, expect) in cases {
        let e = Criteria::parse(&text).expect_err(what);
        assert!(e.to_string().contains(expect), "{what}: {e}");
        assert!(e.line.is_some(), "{what}: no line in {e}");
    }
}

#[test]
fn edited_criteria_are_validated_without_lines() {
    let mut c = Criteria::default_reflector();
    c.criteria[0].weight = -1.0;
    let e = c.validate().unwrap_err();
    assert!(matches!(e.problem, CriteriaProblem::NegativeWeight { .. }));
    assert_eq!(e.line, None);
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 256, ..ProptestConfig::default() })]

    #[test]
    fn parser_never_panics_on_any_text(s in ".{0,400}") {
        let _ = Criteria::parse(&s);
    }

    #[test]
    fn parser_never_panics_on_a_mangled_default(cut in 0usize..4000, insert in ".{0,12}") {
        let mut t = DEFAULT_REFLECTOR_TOML.to_string();
        let mut at = cut.min(t.len());
        while !t.is_char_boundary(at) { at -= 1; }
        t.insert_str(at, &insert);
        if let Err(e) = Criteria::parse(&t) {
            prop_assert!(!e.to_string().is_empty());
        }
    }

    #[test]
    fn parser_never_panics_on_any_numbers(w in proptest::num::f64::ANY, lo in proptest::num::f64::ANY, hi in proptest::num::f64::ANY) {
        let t = criteria_text(&format!(
            "[[requirement]]\nmetric = \"diameter_m\"\nmin = {lo:?}\nmax = {hi:?}\n[[criterion]]\nmetric = \"floor_tilt_deg\"\nworst = {lo:?}\nideal = {hi:?}\nweight = {w:?}\n"));
        let _ = Criteria::parse(&t);
    }
}

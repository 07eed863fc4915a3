//! The `[operations]` table of a criteria file: the shipped defaults are the built-in ones,
//! missing keys take them, the canonical text reads back, bad values are refused at the
//! table's line, and the operations metrics serve as requirements and criteria.

mod common;

use common::criteria_text;
use siting::criteria::{CriteriaProblem, OperationsInputs};
use siting::Criteria;

const GOOD: &str =
    "[[criterion]]\nmetric = \"relay_visible_fraction\"\nworst = 0.9\nideal = 1.0\nweight = 1.0\n";

#[test]
fn shipped_table_holds_the_built_in_defaults() {
    assert_eq!(
        Criteria::default_reflector().operations,
        Some(OperationsInputs::default())
    );
}

#[test]
fn missing_keys_take_the_defaults_and_the_text_reads_back() {
    let text = criteria_text(&format!(
        "[operations]\nlanding_dispersion_3sigma_m = 250.0\naim = \"floor_centre\"\n\n{GOOD}"
    ));
    let c = Criteria::parse(&text).unwrap();
    let o = c.operations.clone().unwrap();
    assert_eq!(o.landing_dispersion_3sigma_m, 250.0);
    assert_eq!(o.aim, operations::AimRule::FloorCentre);
    assert_eq!(
        o.relay_margin_deg,
        OperationsInputs::default().relay_margin_deg
    );
    let again = Criteria::parse(&c.to_toml()).unwrap();
    assert_eq!(again, c);
}

#[test]
fn bad_values_are_refused_at_the_tables_line() {
    let text = criteria_text(&format!(
        "\n[operations]\nlanding_max_slope_deg = 95.0\n\n{GOOD}"
    ));
    let e = Criteria::parse(&text).unwrap_err();
    assert_eq!(e.line, Some(5), "{e}");
    assert!(
        matches!(e.problem, CriteriaProblem::BadOperations(_)),
        "{e}"
    );
    assert!(e.to_string().contains("landing_max_slope_deg"), "{e}");
    // A misspelt key is a syntax error at its line.
    let text = criteria_text(&format!("[operations]\nrelay_margin = 5.0\n\n{GOOD}"));
    let e = Criteria::parse(&text).unwrap_err();
    assert!(e.to_string().contains("relay_margin"), "{e}");
    assert_eq!(e.line, Some(5), "{e}");
}

#[test]
fn operations_metrics_are_requirements_and_criteria() {
    let text = criteria_text(&format!(
        "[[requirement]]\nmetric = \"shots_all_reachable\"\nmin = 1.0\n\n[[criterion]]\nmetric = \"landing_best_probability\"\nworst = 0.5\nideal = 0.99\nweight = 1.0\n\n{GOOD}"
    ));
    let c = Criteria::parse(&text).unwrap();
    assert_eq!(c.requirements[0].metric, "shots_all_reachable");
    assert_eq!(c.criteria.len(), 2);
}

//! The criteria_parse target's steps, shared by the fuzz target
//! (fuzz/fuzz_targets/criteria_parse.rs) and its replay test on stable
//! (crates/siting/tests/fuzz_regressions.rs), both through `#[path]`.
//!
//! Criteria file text -> `Criteria::parse` (TOML syntax, layout, semantic validation).
//! Anything the parser accepts must also pass `validate`, write back to canonical text that
//! reads as the same criteria, and give utilities in [0, 1].

use siting::Criteria;

pub fn run(data: &[u8]) {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    let c = match Criteria::parse(text) {
        Ok(c) => c,
        Err(e) => {
            // The message the command line prints must build without panicking.
            let _ = e.to_string();
            return;
        }
    };
    c.validate()
        .expect("parse accepted criteria that validate refuses");
    let again = Criteria::parse(&c.to_toml())
        .expect("canonical text of accepted criteria does not read back");
    assert_eq!(again, c, "canonical text reads back as other criteria");
    assert!(c
        .normalised_weights()
        .iter()
        .all(|w| w.is_finite() && *w >= 0.0));
    for s in &c.criteria {
        for v in [
            s.worst,
            s.ideal,
            0.5 * s.worst + 0.5 * s.ideal,
            0.0,
            f64::MIN,
            f64::MAX,
            f64::NAN,
        ] {
            let u = siting::utility::utility(s, Some(v));
            assert!((0.0..=1.0).contains(&u), "utility {u} outside [0, 1]");
        }
    }
}

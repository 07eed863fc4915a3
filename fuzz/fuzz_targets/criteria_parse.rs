//! Criteria file text -> `Criteria::parse` (TOML syntax, layout, semantic validation).
//! Anything the parser accepts must also pass `validate`, write back to canonical text that
//! reads as the same criteria, and give utilities in [0, 1]. The replay test with the same
//! steps is crates/siting/tests/fuzz_regressions.rs.
#![no_main]

use libfuzzer_sys::fuzz_target;
use siting::Criteria;

fuzz_target!(|data: &[u8]| {
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
    let canonical = c.to_toml();
    let again = Criteria::parse(&canonical)
        .expect("canonical text of accepted criteria does not read back");
    assert_eq!(again, c, "canonical text reads back as other criteria");
    let weights = c.normalised_weights();
    assert!(weights.iter().all(|w| w.is_finite() && *w >= 0.0));
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
});

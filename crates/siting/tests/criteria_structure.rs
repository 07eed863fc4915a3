//! The `[structure]` table of a criteria file (layout: docs/siting.md, "Criteria file"): what it
//! reads into, the canonical text, and every refusal at the right line.

mod common;

use common::criteria_text;
use proptest::prelude::*;
use siting::criteria::{CriteriaProblem, Shape, StructureSpec};
use siting::Criteria;

const GOOD: &str =
    "[[criterion]]\nmetric = \"floor_tilt_deg\"\nworst = 10.0\nideal = 0.0\nweight = 1.0\n";

/// 1-based line of the first occurrence of `needle` in `text`.
fn line_of(text: &str, needle: &str) -> usize {
    let at = text.find(needle).expect("needle in text");
    text[..at].matches('\n').count() + 1
}

fn with_structure(table: &str) -> String {
    criteria_text(&format!("[structure]\n{table}\n{GOOD}"))
}

fn spec_of(table: &str) -> StructureSpec {
    Criteria::parse(&with_structure(table))
        .expect("valid structure table")
        .structure
        .expect("structure kept")
}

#[test]
fn structure_table_reads_each_shape_and_fills_defaults() {
    let s = spec_of(
        "aperture_diameter_m = 300.0\nshape = \"paraboloid\"\nfocal_length_m = 120.0\nanchor_count = 4\nmin_clearance_m = 5.0\nmax_anchor_height_difference_m = 30.0",
    );
    assert_eq!(
        s,
        StructureSpec {
            aperture_m: 300.0,
            shape: Shape::Paraboloid {
                focal_length_m: 120.0
            },
            anchors: 4,
            min_clearance_m: 5.0,
            max_anchor_height_difference_m: 30.0
        }
    );
    assert_eq!(
        spec_of("f_over_d = 0.4").shape,
        Shape::ParaboloidRatio { f_over_d: 0.4 }
    );
    let cap = spec_of("aperture_diameter_m = 400\nshape = \"spherical_cap\"\ncap_radius_m = 500.0");
    assert_eq!(
        (cap.aperture_m, cap.shape),
        (400.0, Shape::SphericalCap { radius_m: 500.0 })
    );
    // An empty table is the demo's default dish.
    assert_eq!(spec_of(""), StructureSpec::default());
    // No table: the survey's fits are ranked as they are.
    assert_eq!(
        Criteria::parse(&criteria_text(GOOD)).unwrap().structure,
        None
    );
    assert_eq!(Criteria::default_reflector().structure, None);
}

#[test]
fn structure_table_round_trips_through_the_canonical_text() {
    for table in [
        "",
        "focal_length_m = 150.0\nanchor_count = 8",
        "shape = \"spherical_cap\"\ncap_radius_m = 290.5\nmin_clearance_m = 0.0",
    ] {
        let c = Criteria::parse(&with_structure(table)).unwrap();
        let text = c.to_toml();
        assert!(
            text.contains("\n[structure]\naperture_diameter_m = "),
            "{text}"
        );
        let again = Criteria::parse(&text).expect("canonical text parses");
        assert_eq!(again, c);
        assert_eq!(again.to_toml(), text);
    }
    assert!(!Criteria::default_reflector()
        .to_toml()
        .contains("[structure]"));
}

#[test]
fn structure_mistakes_are_refused_at_their_line() {
    let cases: &[(&str, &str, &str)] = &[
        (
            "f_over_d = 0.5\nfocal_length_m = 175.0",
            "focal_length_m = 175.0",
            "not both",
        ),
        (
            "focal_length_m = 175.0\nf_over_d = 0.5",
            "f_over_d = 0.5",
            "not both",
        ),
        (
            "anchor_count = 2",
            "anchor_count = 2",
            "anchor_count must be from 3 to 12 (got 2)",
        ),
        (
            "anchor_count = 13",
            "anchor_count = 13",
            "anchor_count must be from 3 to 12 (got 13)",
        ),
        (
            "anchor_count = -4",
            "anchor_count = -4",
            "anchor_count must be a whole number",
        ),
        (
            "aperture_diameter_m = -350.0",
            "aperture_diameter_m",
            "aperture_diameter_m must be a positive number",
        ),
        (
            "aperture_diameter_m = 0.0",
            "aperture_diameter_m",
            "aperture_diameter_m must be a positive number",
        ),
        (
            "aperture_diameter_m = nan",
            "aperture_diameter_m",
            "aperture_diameter_m must be a positive number",
        ),
        (
            "focal_length_m = -1.0",
            "focal_length_m",
            "focal_length_m must be a positive number",
        ),
        (
            "f_over_d = 0.0",
            "f_over_d",
            "f_over_d must be a positive number",
        ),
        (
            "min_clearance_m = -0.5",
            "min_clearance_m",
            "min_clearance_m must be zero or a positive",
        ),
        (
            "max_anchor_height_difference_m = -10.0",
            "max_anchor_height",
            "must be zero or a positive",
        ),
        (
            "max_anchor_height_difference_m = inf",
            "max_anchor_height",
            "must be zero or a positive",
        ),
        (
            "shape = \"spherical_cap\"\ncap_radius_m = 100.0",
            "cap_radius_m",
            "less than half the 350 m aperture",
        ),
        (
            "shape = \"spherical_cap\"\ncap_radius_m = -400.0",
            "cap_radius_m",
            "cap_radius_m must be a positive",
        ),
        ("shape = \"spherical_cap\"", "shape =", "needs cap_radius_m"),
        (
            "shape = \"spherical_cap\"\ncap_radius_m = 400.0\nf_over_d = 0.5",
            "f_over_d",
            "applies only to shape = \"paraboloid\"",
        ),
        (
            "cap_radius_m = 400.0",
            "cap_radius_m",
            "applies only to shape = \"spherical_cap\"",
        ),
        (
            "shape = \"saddle\"",
            "shape =",
            "shape = \"saddle\" is not one of: paraboloid, spherical_cap",
        ),
        ("aperture_m = 350.0", "aperture_m", "aperture_m"),
        ("anchor_count = 6.5", "anchor_count", "6.5"),
    ];
    for (table, at, expect) in cases {
        let text = with_structure(table);
        let e = Criteria::parse(&text).expect_err(table);
        assert_eq!(e.line, Some(line_of(&text, at)), "{table}: {e}");
        let msg = e.to_string();
        assert!(msg.contains(expect), "{table}: {msg}");
        assert!(
            msg.starts_with(&format!("line {}", line_of(&text, at))),
            "{msg}"
        );
    }
}

#[test]
fn edited_structure_is_validated_without_lines() {
    let mut c = Criteria::default_reflector();
    c.structure = Some(StructureSpec {
        anchors: 20,
        ..StructureSpec::default()
    });
    let e = c.validate().unwrap_err();
    assert!(
        matches!(e.problem, CriteriaProblem::BadStructure(ref m) if m.contains("anchor_count")),
        "{e}"
    );
    assert_eq!(e.line, None);
    c.structure = Some(StructureSpec::default());
    c.validate().expect("the default dish is valid");
}

#[test]
fn criteria_saved_without_a_structure_still_read() {
    // Study files written before the table existed carry criteria without the key.
    let mut v = serde_json::to_value(Criteria::default_reflector()).unwrap();
    assert!(
        v.get("structure").is_none(),
        "absent structure is not written"
    );
    v.as_object_mut().unwrap().remove("structure");
    let c: Criteria = serde_json::from_value(v).unwrap();
    assert_eq!(c.structure, None);
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 256, ..ProptestConfig::default() })]

    #[test]
    fn structure_numbers_never_panic(a in proptest::num::f64::ANY, f in proptest::num::f64::ANY, n in any::<i64>(), c in proptest::num::f64::ANY) {
        let t = with_structure(&format!("aperture_diameter_m = {a:?}\nf_over_d = {f:?}\nanchor_count = {n}\nmin_clearance_m = {c:?}"));
        if let Err(e) = Criteria::parse(&t) {
            prop_assert!(e.line.is_some());
        }
    }
}

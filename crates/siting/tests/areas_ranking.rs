//! Areas and neighbourhood metrics in criteria files and in the prepared table: `[[area]]`
//! and `[neighbourhood]` read, checked and written back; areas as hard requirements; the
//! neighbourhood metrics as weighted criteria only, recomputed with the requirements and
//! never on a weight change. Candidates and areas are invented (this checks our logic; the
//! geometry's outside check is areas_geodesic.rs).

mod common;

use std::path::Path;

use common::{criteria, criteria_text, good, survey};
use siting::{Criteria, PreparedTable};

const AREA_BLOCK: &str = r#"
[[area]]
file = "zones.geojson"
layer = "zones"
filter = "kind = 'keep out'"
keep = "outside"
margin_km = 5.0
why = "another mission's landing ellipse"

[[area]]
file = "study.gpkg"
keep = "inside"
why = "the survey's agreed region"

[neighbourhood]
backup_radius_km = 25.0

[[criterion]]
metric = "depth_to_diameter"
worst = 0.1
ideal = 0.2
weight = 1.0
"#;

#[test]
fn areas_and_the_backup_radius_read_and_write_back() {
    let c = criteria(AREA_BLOCK);
    assert_eq!(c.areas.len(), 2);
    assert_eq!(c.areas[0].keep, siting::areas::Keep::Outside);
    assert_eq!(c.areas[0].filter.as_deref(), Some("kind = 'keep out'"));
    assert_eq!(c.areas[0].margin_km, 5.0);
    assert_eq!(c.areas[1].margin_km, 0.0);
    assert_eq!(c.backup_radius_km, 25.0);
    let again = Criteria::parse(&c.to_toml()).expect("written criteria read back");
    assert_eq!(again, c);
}

#[test]
fn bad_area_entries_point_at_their_line() {
    let bad_keep = criteria_text(&AREA_BLOCK.replace("keep = \"inside\"", "keep = \"near\""));
    let e = Criteria::parse(&bad_keep).unwrap_err();
    assert_eq!(e.line, Some(15), "{e}");
    assert!(
        e.to_string()
            .contains("keep = \"near\" is not one of: inside, outside"),
        "{e}"
    );
    let bad_margin = criteria_text(&AREA_BLOCK.replace("margin_km = 5.0", "margin_km = -1.0"));
    let e = Criteria::parse(&bad_margin).unwrap_err();
    assert_eq!(e.line, Some(10), "{e}");
    assert!(e.to_string().contains("margin_km must be"), "{e}");
    let bad_radius =
        criteria_text(&AREA_BLOCK.replace("backup_radius_km = 25.0", "backup_radius_km = 0.0"));
    let e = Criteria::parse(&bad_radius).unwrap_err();
    assert!(e.to_string().contains("backup_radius_km"), "{e}");
}

#[test]
fn neighbourhood_metrics_are_refused_as_requirements() {
    let text = criteria_text(
        "[[requirement]]\nmetric = \"backup_sites\"\nmin = 1.0\n\n\
         [[criterion]]\nmetric = \"depth_to_diameter\"\nworst = 0.1\nideal = 0.2\nweight = 1.0\n",
    );
    let e = Criteria::parse(&text).unwrap_err();
    assert_eq!(e.line, Some(5), "{e}");
    assert!(
        e.to_string()
            .contains("Backup sites nearby depends on which candidates meet the requirements"),
        "{e}"
    );
}

/// A keep-out square of 1° around (10 E, 0 N) as GeoJSON.
fn keep_out(dir: &Path) -> String {
    let p = dir.join("keep-out.geojson");
    std::fs::write(
        &p,
        r#"{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"name":"Old landing site"},
        "geometry":{"type":"Polygon","coordinates":[[[9.5,-0.5],[10.5,-0.5],[10.5,0.5],[9.5,0.5],[9.5,-0.5]]]}}]}"#,
    )
    .unwrap();
    p.to_string_lossy().into_owned()
}

#[test]
fn an_area_is_a_hard_requirement_named_in_the_reason() {
    let dir = tempfile::tempdir().unwrap();
    let file = keep_out(dir.path());
    let c = criteria(&format!(
        "[[area]]\nfile = {file:?}\nkeep = \"outside\"\nmargin_km = 10.0\n\n\
         [[criterion]]\nmetric = \"depth_to_diameter\"\nworst = 0.1\nideal = 0.2\nweight = 1.0\n"
    ));
    // Inside; 0.2° (6.06 km) outside the east edge; 1° (30.3 km) outside it.
    let s = survey(vec![
        good(1, 10.0, 0.0),
        good(2, 10.7, 0.0),
        good(3, 11.5, 0.0),
    ]);
    let t = PreparedTable::new(&s, &c).unwrap();
    assert!(!t.passed(0) && !t.passed(1) && t.passed(2));
    let words = t.failures(0)[0].in_words();
    assert!(
        words.starts_with("Keep-out zone “Old landing site”: 15.2 km inside it (at least 10.0 km outside required)"),
        "{words}"
    );
    let words = t.failures(1)[0].in_words();
    assert!(
        words.starts_with("Keep-out zone “Old landing site”: 6.06 km outside, 3.94 km short of the 10.0 km margin"),
        "{words}"
    );
    assert!(t.failures(1)[0].describe().contains("Old landing site"));
}

#[test]
fn far_outside_a_study_area_reads_as_more_than_a_bound() {
    let dir = tempfile::tempdir().unwrap();
    let file = keep_out(dir.path());
    let c = criteria(&format!(
        "[[area]]\nfile = {file:?}\nkeep = \"inside\"\n\n\
         [[criterion]]\nmetric = \"depth_to_diameter\"\nworst = 0.1\nideal = 0.2\nweight = 1.0\n"
    ));
    // 20° east of the square: about 585 km from it, beyond the 100 km of exact measurement.
    let s = survey(vec![good(1, 30.0, 0.0), good(2, 10.0, 0.2)]);
    let t = PreparedTable::new(&s, &c).unwrap();
    assert!(!t.passed(0) && t.passed(1));
    let words = t.failures(0)[0].in_words();
    assert!(
        words.starts_with("Study area “keep-out.geojson”: more than 5")
            && words.ends_with(" km outside it (must be inside)"),
        "{words}"
    );
}

#[test]
fn neighbourhood_metrics_follow_the_requirements_not_the_weights() {
    let text = "[[requirement]]\nmetric = \"diameter_m\"\nmin = 1000.0\n\n\
         [[criterion]]\nmetric = \"backup_sites\"\nworst = 0.0\nideal = 2.0\nweight = 1.0\n\n\
         [[criterion]]\nmetric = \"nearest_qualifying_m\"\nworst = 20000.0\nideal = 1000.0\nweight = 1.0\n";
    let mut c = criteria(text);
    // Three candidates 0.1° apart (3.03 km); the middle one too small to qualify.
    let mut small = good(2, 0.1, 0.0);
    small.crater.diameter_m = 500.0;
    let s = survey(vec![good(1, 0.0, 0.0), small, good(3, 0.2, 0.0)]);
    let mut t = PreparedTable::new(&s, &c).unwrap();
    let n = t.neighbourhood().clone();
    let step = 1_737_400.0 * 0.1_f64.to_radians();
    assert!((n.nearest_qualifying_m[0].unwrap() - 2.0 * step).abs() < 1e-6);
    assert!((n.nearest_qualifying_m[1].unwrap() - step).abs() < 1e-6);
    assert_eq!(n.backup_sites, vec![Some(1.0), Some(2.0), Some(1.0)]);
    // A weight change keeps the table; a requirement change rebuilds the metrics.
    c.criteria[0].weight = 3.0;
    assert!(!t.refresh(&s, &c).unwrap());
    c.requirements[0].min = Some(100.0);
    assert!(t.refresh(&s, &c).unwrap());
    assert_eq!(t.neighbourhood().backup_sites, vec![Some(2.0); 3]);
    assert!((t.neighbourhood().nearest_qualifying_m[0].unwrap() - step).abs() < 1e-6);
}

//! `quietbowl rank --outside` and `--spread` on the demo terrain, through the real binary: a
//! keep-out square around the rank 1 candidate makes it fail with a reason naming the area,
//! the areas go with the exports (a GeoJSON beside the shortlist, a GeoPackage layer, the
//! file's SHA-256 in the provenance), and `--spread 5` gives a top 10 with every pair at
//! least 5 km apart.
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

fn root() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../..")
}

fn qb(args: &[&str]) -> Output {
    let out = Command::new(env!("CARGO_BIN_EXE_quietbowl"))
        .args(args)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "quietbowl {args:?}: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    out
}

/// The demo survey as README's example runs it.
fn demo_survey(dir: &Path) -> PathBuf {
    let survey = dir.join("survey.json");
    let demo = root().join("demo-terrain/farside-patch.tif");
    qb(&[
        "survey",
        demo.to_str().unwrap(),
        "--diameter",
        "800..2500",
        "--no-checkpoint",
        "--out",
        survey.to_str().unwrap(),
    ]);
    survey
}

/// The CSV export's rows as maps from column name (units stripped) to cell.
fn csv_rows(path: &Path) -> Vec<std::collections::HashMap<String, String>> {
    let text = std::fs::read_to_string(path).unwrap();
    let body: String = text
        .lines()
        .filter(|l| !l.starts_with('#'))
        .map(|l| format!("{l}\n"))
        .collect();
    let mut r = csv::Reader::from_reader(body.as_bytes());
    let header: Vec<String> = r
        .headers()
        .unwrap()
        .iter()
        .map(|h| h.split(" [").next().unwrap_or(h).to_string())
        .collect();
    r.records()
        .map(|rec| {
            header
                .iter()
                .cloned()
                .zip(rec.unwrap().iter().map(str::to_string))
                .collect()
        })
        .collect()
}

fn num(row: &std::collections::HashMap<String, String>, key: &str) -> f64 {
    row[key]
        .parse()
        .unwrap_or_else(|_| panic!("{key} = {:?}", row[key]))
}

/// Great-circle distance on the IAU Moon sphere (haversine, Sinnott 1984, Sky & Telescope
/// 68:159), computed here apart from the code under test.
fn haversine_km(a: (f64, f64), b: (f64, f64)) -> f64 {
    let (l1, p1, l2, p2) = (
        a.0.to_radians(),
        a.1.to_radians(),
        b.0.to_radians(),
        b.1.to_radians(),
    );
    let h = ((p2 - p1) / 2.0).sin().powi(2) + p1.cos() * p2.cos() * ((l2 - l1) / 2.0).sin().powi(2);
    2.0 * 1737.4 * h.sqrt().asin()
}

#[test]
fn a_keep_out_around_rank_one_fails_it_and_spread_keeps_the_top_ten_apart() {
    let d = tempfile::tempdir().unwrap();
    let survey = demo_survey(d.path());
    let s = survey.to_str().unwrap();
    let base_csv = d.path().join("base.csv");
    qb(&[
        "rank",
        s,
        "--no-robustness",
        "--csv",
        base_csv.to_str().unwrap(),
    ]);
    let rows = csv_rows(&base_csv);
    let first = &rows[0];
    assert_eq!(first["rank"], "1");
    let (id, lon, lat) = (
        first["id"].clone(),
        num(first, "centre_lon_deg"),
        num(first, "centre_lat_deg"),
    );

    // A square 0.1° on a side around it.
    let square = d.path().join("keep-out.geojson");
    let h = 0.05;
    let ring = [
        [lon - h, lat - h],
        [lon + h, lat - h],
        [lon + h, lat + h],
        [lon - h, lat + h],
        [lon - h, lat - h],
    ];
    std::fs::write(
        &square,
        serde_json::json!({"type": "FeatureCollection", "features": [{"type": "Feature",
            "properties": {"name": "Test keep-out"},
            "geometry": {"type": "Polygon", "coordinates": [ring]}}]})
        .to_string(),
    )
    .unwrap();
    let (csv, json, gpkg) = (
        d.path().join("out.csv"),
        d.path().join("out.geojson"),
        d.path().join("out.gpkg"),
    );
    let out = qb(&[
        "rank",
        s,
        "--no-robustness",
        "--outside",
        square.to_str().unwrap(),
        "--margin",
        "1",
        "--csv",
        csv.to_str().unwrap(),
        "--geojson",
        json.to_str().unwrap(),
        "--gpkg",
        gpkg.to_str().unwrap(),
    ]);
    let rows = csv_rows(&csv);
    let was_first = rows.iter().find(|r| r["id"] == id).unwrap();
    assert_eq!(was_first["passed"], "false", "{was_first:?}");
    assert!(
        was_first["failed_requirements"]
            .contains("area \"Test keep-out\" keep outside by 1000 m: -"),
        "{:?}",
        was_first["failed_requirements"]
    );
    assert_ne!(rows[0]["id"], id);
    let printed = String::from_utf8_lossy(&out.stdout);
    assert!(printed.contains(siting::SCREENING_CAUTION), "{printed}");
    // The areas beside the shortlist, and their file's checksum in the provenance.
    let areas = std::fs::read_to_string(d.path().join("out.areas.geojson")).unwrap();
    assert!(
        areas.contains("Test keep-out") && areas.contains("IAU_2015:30100"),
        "{areas}"
    );
    let sha = sha256_hex(&square);
    assert!(areas.contains(&sha));
    let shortlist = std::fs::read_to_string(&json).unwrap();
    assert!(
        shortlist.contains(&sha),
        "the provenance names the area file's sha256"
    );
    let layers = Command::new("ogrinfo")
        .args(["-so", "-q"])
        .arg(&gpkg)
        .output()
        .unwrap();
    let layers = String::from_utf8_lossy(&layers.stdout);
    assert!(
        layers.contains("candidates") && layers.contains("areas"),
        "{layers}"
    );

    // In words, as the terminal shows a failing row.
    let words = siting_words(&survey, &square);
    assert!(
        words.starts_with("Keep-out zone “Test keep-out”: ")
            && words.contains(" inside it (at least 1.00 km outside required)"),
        "{words}"
    );

    let spread_csv = d.path().join("spread.csv");
    let out = qb(&[
        "rank",
        s,
        "--no-robustness",
        "--spread",
        "5",
        "--top",
        "10",
        "--csv",
        spread_csv.to_str().unwrap(),
    ]);
    assert!(String::from_utf8_lossy(&out.stdout).contains("every pair at least 5 km apart"));
    let rows = csv_rows(&spread_csv);
    assert_eq!(rows.len(), 10, "ten passing candidates at least 5 km apart");
    let places: Vec<(f64, f64)> = rows
        .iter()
        .map(|r| (num(r, "centre_lon_deg"), num(r, "centre_lat_deg")))
        .collect();
    for (i, a) in places.iter().enumerate() {
        for b in &places[i + 1..] {
            let km = haversine_km(*a, *b);
            assert!(km >= 5.0, "{a:?} and {b:?} are {km:.2} km apart");
        }
    }
    assert!(rows.iter().all(|r| r["passed"] == "true"));
}

fn sha256_hex(path: &Path) -> String {
    let out = Command::new("sha256sum").arg(path).output().unwrap();
    String::from_utf8_lossy(&out.stdout)
        .split_whitespace()
        .next()
        .unwrap()
        .to_string()
}

/// The failing rank-1 candidate's reason in words, from the library as the table prints it.
fn siting_words(survey: &Path, square: &Path) -> String {
    let s = survey::SurveyFile::read(survey).unwrap();
    let mut c = siting::Criteria::default_reflector();
    c.areas.push(siting::areas::AreaSpec {
        file: square.to_string_lossy().into_owned(),
        layer: None,
        filter: None,
        keep: siting::areas::Keep::Outside,
        margin_km: 1.0,
        why: String::new(),
    });
    let t = siting::PreparedTable::new(&s, &c).unwrap();
    (0..t.len())
        .flat_map(|i| t.failures(i).iter())
        .find(|f| f.area.is_some())
        .expect("an area failure")
        .in_words()
}

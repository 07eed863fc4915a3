//! `quietbowl rank --criteria` with a `[structure]` table, through the real binary: criteria
//! asking for another dish refit the survey first and say so; criteria asking for the survey's
//! own dish do not.
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

fn root() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../..")
}

fn qb(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_quietbowl"))
        .args(args)
        .output()
        .unwrap()
}

/// Fields of one CSV line (RFC 4180 quoting; the export writes no line breaks inside fields).
fn fields(line: &str) -> Vec<String> {
    let (mut out, mut cur, mut quoted, mut chars) =
        (Vec::new(), String::new(), false, line.chars().peekable());
    while let Some(ch) = chars.next() {
        match (ch, quoted) {
            ('"', true) if chars.peek() == Some(&'"') => {
                cur.push('"');
                chars.next();
            }
            ('"', _) => quoted = !quoted,
            (',', false) => out.push(std::mem::take(&mut cur)),
            (c, _) => cur.push(c),
        }
    }
    out.push(cur);
    out
}

/// Rows of the CSV export whose fit_ok column reads 1.
fn fitting_rows(csv: &Path) -> usize {
    let text = std::fs::read_to_string(csv).unwrap();
    let mut rows = text.lines().filter(|l| !l.starts_with('#'));
    let header = fields(rows.next().unwrap());
    let k = header
        .iter()
        .position(|h| h.starts_with("fit_ok"))
        .expect("fit_ok column");
    rows.filter(|r| fields(r).get(k).map(String::as_str) == Some("1"))
        .count()
}

#[test]
fn criteria_with_another_dish_refit_the_survey_before_ranking() {
    let d = tempfile::tempdir().unwrap();
    let survey = d.path().join("survey.json");
    let demo = root().join("demo-terrain/farside-patch.tif");
    let out = qb(&[
        "survey",
        demo.to_str().unwrap(),
        "--diameter",
        "1200..4000",
        "--no-checkpoint",
        "--out",
        survey.to_str().unwrap(),
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let before = std::fs::read(&survey).unwrap();
    let base = std::fs::read_to_string(root().join("assets/criteria/reflector-1km.toml")).unwrap();
    let rank = |name: &str, structure: &str| -> (String, usize) {
        let criteria = d.path().join(format!("{name}.toml"));
        std::fs::write(&criteria, format!("{base}{structure}")).unwrap();
        let csv = d.path().join(format!("{name}.csv"));
        let out = qb(&[
            "rank",
            survey.to_str().unwrap(),
            "--criteria",
            criteria.to_str().unwrap(),
            "--no-robustness",
            "--csv",
            csv.to_str().unwrap(),
        ]);
        let err = String::from_utf8_lossy(&out.stderr).into_owned();
        assert!(out.status.success(), "{name}: {err}");
        (err, fitting_rows(&csv))
    };
    let (quiet, n_default) = rank("as-surveyed", "");
    assert!(!quiet.contains("refit"), "{quiet}");
    // An empty table is the default dish, which the survey was fitted with: nothing to refit.
    let (same, n_same) = rank("same-dish", "\n[structure]\n");
    assert!(!same.contains("refit"), "{same}");
    assert_eq!(n_same, n_default);
    let (said, n_wide) = rank("wide-dish", "\n[structure]\naperture_diameter_m = 700.0\n");
    assert!(
        said.contains("refitting its") && said.contains("a 700 m paraboloid at f/D 0.50"),
        "{said}"
    );
    assert!(said.contains("refitted"), "{said}");
    assert!(
        n_wide < n_default,
        "{n_wide} craters take the 700 m dish, {n_default} the 350 m one"
    );
    assert_eq!(
        std::fs::read(&survey).unwrap(),
        before,
        "the survey file is left as it was"
    );
}

//! The operations figures through the real binary: `survey --operations FILE` records the
//! file's inputs and computes the figures, `--no-operations` leaves them out, `site` prints
//! them and a bad table is refused with its reason.
use std::path::{Path, PathBuf};
use std::process::Command;

fn qb() -> Command {
    Command::new(env!("CARGO_BIN_EXE_quietbowl"))
}

/// Run `cmd`, which must succeed; its standard output.
fn stdout_of(cmd: &mut Command) -> Vec<u8> {
    let out = cmd.output().unwrap();
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(out.status.success(), "{err}");
    out.stdout
}

fn dem() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../../demo-terrain/farside-patch.tif")
}

fn survey(dir: &Path, name: &str, extra: &[&str]) -> serde_json::Value {
    let out_path = dir.join(name);
    // Large craters only, so the debug-build test stays quick.
    stdout_of(
        qb().arg("survey")
            .arg(dem())
            .args([
                "--diameter",
                "1500..4000",
                "--no-visibility",
                "--no-checkpoint",
            ])
            .args(extra)
            .arg("--out")
            .arg(&out_path),
    );
    serde_json::from_str(&std::fs::read_to_string(out_path).unwrap()).unwrap()
}

#[test]
fn survey_reads_the_operations_table_or_leaves_the_figures_out() {
    let dir = tempfile::tempdir().unwrap();
    let table = dir.path().join("ops.toml");
    std::fs::write(
        &table,
        "[operations]\nrelay_margin_deg = 8.0\nlauncher_range_m = 900.0\n",
    )
    .unwrap();
    let s = survey(
        dir.path(),
        "with.json",
        &["--operations", table.to_str().unwrap()],
    );
    assert_eq!(s["parameters"]["operations"]["relay_margin_deg"], 8.0);
    assert_eq!(s["parameters"]["operations"]["launcher_range_m"], 900.0);
    let cands = s["candidates"].as_array().unwrap();
    assert!(cands.iter().any(|c| c["operations"].is_object()));
    for c in cands.iter().filter(|c| c["fit"].is_object()) {
        assert!(
            c["operations"]["relay"]["lander"]["fraction"].is_number(),
            "{c}"
        );
    }

    let s = survey(dir.path(), "without.json", &["--no-operations"]);
    assert!(s["parameters"].get("operations").is_none());
    assert!(s["candidates"]
        .as_array()
        .unwrap()
        .iter()
        .all(|c| c.get("operations").is_none()));

    std::fs::write(&table, "[operations]\nlanding_max_slope_deg = 120.0\n").unwrap();
    let out = qb()
        .arg("survey")
        .arg(dem())
        .args(["--operations", table.to_str().unwrap(), "--out"])
        .arg(dir.path().join("bad.json"))
        .output()
        .unwrap();
    assert!(!out.status.success());
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("landing_max_slope_deg"), "{err}");
}

#[test]
fn site_prints_the_operations_in_text_and_json() {
    let text = String::from_utf8(stdout_of(
        qb().arg("site").arg(dem()).args(["--at", "180,16"]),
    ))
    .unwrap();
    for needle in [
        "landing:",
        "relay near L2",
        "night at the lander",
        "cannot see rocks smaller than a post",
    ] {
        assert!(text.contains(needle), "{needle}: {text}");
    }
    let json = stdout_of(
        qb().arg("site")
            .arg(dem())
            .args(["--at", "180,16", "--json"]),
    );
    let v: serde_json::Value = serde_json::from_slice(&json).unwrap();
    let f = v["operations"]["relay"]["lander"]["fraction"]
        .as_f64()
        .unwrap();
    assert!(f >= 0.99, "{v}");
}

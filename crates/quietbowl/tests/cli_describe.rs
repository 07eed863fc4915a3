//! `quietbowl describe` through the real binary.
use std::path::{Path, PathBuf};
use std::process::Command;

fn qb() -> Command {
    Command::new(env!("CARGO_BIN_EXE_quietbowl"))
}

fn root() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../..")
}

#[test]
fn describe_lola_reports_heights_and_the_radius_offset_finding() {
    let lbl = root().join("../shared/data/lola-ldem4/LDEM_4.LBL");
    if !lbl.exists() {
        eprintln!(
            "SKIPPED: the real LOLA product is absent at {}",
            lbl.display()
        );
        return;
    }
    let out = qb().arg("describe").arg(&lbl).output().unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let text = String::from_utf8(out.stdout).unwrap();
    // LDEM_4.LBL: MINIMUM -17758 and MAXIMUM 21008 DN at 0.5 m/DN (the product's own label).
    assert!(
        text.contains("-8.88 km") && text.contains("+10.50 km"),
        "{text}"
    );
    assert!(
        text.contains("reference-sphere radius, not a height shift"),
        "{text}"
    );
    assert!(text.contains("7580.84 m"), "{text}");
    let out = qb()
        .args(["describe", "--json"])
        .arg(&lbl)
        .output()
        .unwrap();
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(
        v["info"]["height_convention"]["kind"],
        "radius_offset_ignored"
    );
    assert!((v["stats"]["max_m"].as_f64().unwrap() - 10504.0).abs() <= 1.0);
}

#[test]
fn describe_demo_terrain_reports_30_m_pixels_straddling_180() {
    let dem = root().join("demo-terrain/farside-patch.tif");
    let out = qb()
        .args(["describe", "--json"])
        .arg(&dem)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let info = &v["info"];
    let (ew, ns) = (
        info["pixel_size_m"][0].as_f64().unwrap(),
        info["pixel_size_m"][1].as_f64().unwrap(),
    );
    assert!(
        (ew - 30.0).abs() < 1.5 && (ns - 30.0).abs() < 1.5,
        "{ew} {ns}"
    );
    assert_eq!(info["crosses_180"], true);
    let (lo, hi) = (
        info["lon_range_deg"][0].as_f64().unwrap(),
        info["lon_range_deg"][1].as_f64().unwrap(),
    );
    assert!(lo < 180.0 && hi > 180.0, "{lo} {hi}");
    assert_eq!(info["crs_authority"], "IAU_2015:30115");
}

#[test]
fn describe_a_missing_file_fails_with_a_message_not_a_panic() {
    let out = qb()
        .args(["describe", "/nonexistent/x.tif"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains("no such file") && !err.contains("panicked"),
        "{err}"
    );
}

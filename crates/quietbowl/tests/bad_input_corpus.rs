//! The bad-input corpus (tests/bad-input/ plus rasters generated here through GDAL) run through
//! the real binary: every case must end with a clear message and a non-zero exit, never a panic
//! and never an output file.
use gdal::raster::Buffer;
use gdal::spatial_ref::SpatialRef;
use gdal::DriverManager;
use std::path::{Path, PathBuf};
use std::process::Command;

fn root() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../..")
}

fn corpus(name: &str) -> PathBuf {
    root().join("tests/bad-input").join(name)
}

/// Write a small GeoTIFF; `crs` None leaves it without a CRS.
fn raster(path: &Path, w: usize, h: usize, data: Vec<f32>, crs: Option<&str>, gt: [f64; 6]) {
    let driver = DriverManager::get_driver_by_name("GTiff").unwrap();
    let mut ds = driver
        .create_with_band_type::<f32, _>(path, w, h, 1)
        .unwrap();
    ds.set_geo_transform(&gt).unwrap();
    if let Some(c) = crs {
        ds.set_spatial_ref(&SpatialRef::from_definition(c).unwrap())
            .unwrap();
    }
    let mut band = ds.rasterband(1).unwrap();
    band.write((0, 0), (w, h), &mut Buffer::new((w, h), data))
        .unwrap();
}

/// Run the binary; it must fail cleanly, say something containing `expect`, and leave `out`
/// (if given) unwritten.
fn fails_cleanly(args: &[&str], expect: &str, out: Option<&Path>) {
    let res = Command::new(env!("CARGO_BIN_EXE_quietbowl"))
        .args(args)
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&res.stderr);
    assert!(!res.status.success(), "{args:?} succeeded");
    assert_ne!(res.status.code(), Some(101), "{args:?} panicked: {err}");
    assert!(!err.contains("panicked"), "{args:?} panicked: {err}");
    assert!(
        err.to_lowercase().contains(&expect.to_lowercase()),
        "{args:?}: expected '{expect}' in: {err}"
    );
    if let Some(out) = out {
        assert!(!out.exists(), "{args:?} left {} behind", out.display());
        let dir = out.parent().unwrap();
        if let Ok(entries) = std::fs::read_dir(dir) {
            for e in entries.flatten() {
                assert!(
                    // Temporary files are hidden (a leading dot; terrain::atomic).
                    !e.file_name().to_string_lossy().starts_with('.'),
                    "{args:?} left a temporary file {:?}",
                    e.path()
                );
            }
        }
    }
}

const GT: [f64; 6] = [179.0, 0.01, 0.0, 17.0, 0.0, -0.01];

#[test]
fn generated_rasters_fail_cleanly() {
    let d = tempfile::tempdir().unwrap();
    let p = |n: &str| d.path().join(n);
    let out = p("survey.json");
    let o = out.to_str().unwrap();

    raster(
        &p("full.tif"),
        100,
        100,
        (0..10_000).map(|i| (i % 97) as f32).collect(),
        Some("IAU_2015:30100"),
        GT,
    );
    let bytes = std::fs::read(p("full.tif")).unwrap();
    std::fs::write(p("truncated.tif"), &bytes[..bytes.len() / 2]).unwrap();
    fails_cleanly(
        &["survey", p("truncated.tif").to_str().unwrap(), "--out", o],
        "truncated",
        Some(&out),
    );

    raster(&p("nocrs.tif"), 50, 50, vec![1.0; 2500], None, GT);
    fails_cleanly(
        &["describe", p("nocrs.tif").to_str().unwrap()],
        "no coordinate reference system",
        None,
    );
    fails_cleanly(
        &["survey", p("nocrs.tif").to_str().unwrap(), "--out", o],
        "-a_srs",
        Some(&out),
    );

    raster(
        &p("earth.tif"),
        50,
        50,
        vec![1.0; 2500],
        Some("EPSG:4326"),
        GT,
    );
    fails_cleanly(
        &["survey", p("earth.tif").to_str().unwrap(), "--out", o],
        "mislabelled",
        Some(&out),
    );

    raster(
        &p("allnodata.tif"),
        50,
        50,
        vec![f32::NAN; 2500],
        Some("IAU_2015:30100"),
        GT,
    );
    fails_cleanly(
        &["survey", p("allnodata.tif").to_str().unwrap(), "--out", o],
        "no valid heights",
        Some(&out),
    );

    raster(&p("one.tif"), 1, 1, vec![5.0], Some("IAU_2015:30100"), GT);
    fails_cleanly(
        &["survey", p("one.tif").to_str().unwrap(), "--out", o],
        "too small",
        Some(&out),
    );
}

#[test]
fn text_corpus_fails_cleanly() {
    let d = tempfile::tempdir().unwrap();
    let out = d.path().join("out.json");
    let o = out.to_str().unwrap();
    let demo = root().join("demo-terrain/farside-patch.tif");
    let demo = demo.to_str().unwrap();
    fails_cleanly(
        &["describe", corpus("huge-header.vrt").to_str().unwrap()],
        "header is probably corrupt",
        None,
    );
    fails_cleanly(
        &[
            "survey",
            corpus("huge-header.vrt").to_str().unwrap(),
            "--out",
            o,
        ],
        "header is probably corrupt",
        Some(&out),
    );
    fails_cleanly(
        &["describe", corpus("missing-image.lbl").to_str().unwrap()],
        "NOT_THERE.IMG",
        None,
    );
    fails_cleanly(
        &[
            "merge",
            corpus("future-schema-survey.json").to_str().unwrap(),
            "--out",
            o,
        ],
        "newer",
        Some(&out),
    );
    // A catalogue with broken rows stops at the first, naming its line...
    fails_cleanly(
        &[
            "survey",
            demo,
            "--catalogue",
            corpus("broken-rows-catalogue.csv").to_str().unwrap(),
            "--catalogue-only",
            "--out",
            o,
        ],
        "line 3",
        Some(&out),
    );
    // ...and an output in a place that cannot be written is refused without leaving anything.
    let ro = d.path().join("read-only");
    std::fs::create_dir(&ro).unwrap();
    let mut perm = std::fs::metadata(&ro).unwrap().permissions();
    perm.set_readonly(true);
    std::fs::set_permissions(&ro, perm).unwrap();
    // root ignores directory permissions; a path under a regular file is unwritable for anyone.
    let blocked = if std::fs::write(ro.join("probe"), b"x").is_ok() {
        std::fs::write(d.path().join("a-file"), b"x").unwrap();
        d.path().join("a-file").join("survey.json")
    } else {
        ro.join("survey.json")
    };
    fails_cleanly(
        &[
            "survey",
            demo,
            "--diameter",
            "2000..4000",
            "--out",
            blocked.to_str().unwrap(),
        ],
        "writing",
        Some(&blocked),
    );
}

#[test]
fn catalogue_with_broken_rows_can_skip_them_and_reports_each_line() {
    let d = tempfile::tempdir().unwrap();
    let out = d.path().join("seeded.json");
    let demo = root().join("demo-terrain/farside-patch.tif");
    let res = Command::new(env!("CARGO_BIN_EXE_quietbowl"))
        .args([
            "survey",
            demo.to_str().unwrap(),
            "--catalogue",
            corpus("broken-rows-catalogue.csv").to_str().unwrap(),
            "--catalogue-only",
            "--skip-bad-rows",
            "--no-checkpoint",
            "--out",
            out.to_str().unwrap(),
        ])
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&res.stderr);
    assert!(res.status.success(), "{err}");
    for line in [3, 4, 5, 6] {
        assert!(
            err.contains(&format!("line {line}")),
            "line {line} not reported: {err}"
        );
    }
}

#[test]
fn criteria_with_every_kind_of_mistake_and_bad_rank_inputs_fail_cleanly() {
    let d = tempfile::tempdir().unwrap();
    let survey = d.path().join("survey.json");
    let demo = root().join("demo-terrain/farside-patch.tif");
    let st = Command::new(env!("CARGO_BIN_EXE_quietbowl"))
        .args([
            "survey",
            demo.to_str().unwrap(),
            "--diameter",
            "1500..3000",
            "--no-checkpoint",
            "--out",
            survey.to_str().unwrap(),
        ])
        .status()
        .unwrap();
    assert!(st.success());
    let s = survey.to_str().unwrap();
    let out = d.path().join("shortlist.geojson");
    let o = out.to_str().unwrap();
    for (file, expect) in [
        (
            "unknown-metric.toml",
            "line 6: unknown metric \"crater_beauty\"",
        ),
        (
            "min-above-max.toml",
            "line 7: requirement on diameter_m: min 2000 is greater than max 800",
        ),
        (
            "negative-weight.toml",
            "line 9: criterion on diameter_m: weight -2 is negative",
        ),
        ("all-zero-weights.toml", "every soft criterion has weight 0"),
        ("syntax-error.toml", "line 5"),
        ("future-version.toml", "version 9 is not supported"),
        (
            "structure-focal-and-ratio.toml",
            "line 9: structure: give the paraboloid's focal_length_m or its f_over_d, not both",
        ),
        (
            "structure-too-many-anchors.toml",
            "line 7: structure: anchor_count must be from 3 to 12 (got 24)",
        ),
        (
            "structure-negative-aperture.toml",
            "line 14: structure: aperture_diameter_m must be a positive number of metres",
        ),
        (
            "structure-cap-without-radius.toml",
            "line 7: structure: shape = \"spherical_cap\" needs cap_radius_m",
        ),
    ] {
        let c = corpus("criteria").join(file);
        fails_cleanly(
            &["rank", s, "--criteria", c.to_str().unwrap(), "--geojson", o],
            expect,
            Some(&out),
        );
    }
    fails_cleanly(
        &[
            "rank",
            corpus("future-schema-survey.json").to_str().unwrap(),
            "--geojson",
            o,
        ],
        "newer",
        Some(&out),
    );
    // Criteria asking for another dish than the survey's need its DEM to refit: a survey whose
    // DEM is gone is refused with the places looked at and the way out.
    let mut moved: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(&survey).unwrap()).unwrap();
    moved["input"]["path"] = "/nonexistent/farside-patch.tif".into();
    let moved_path = d.path().join("moved.json");
    std::fs::write(&moved_path, serde_json::to_string(&moved).unwrap()).unwrap();
    let wide = d.path().join("wide.toml");
    std::fs::write(
        &wide,
        format!(
            "{}\n[structure]\naperture_diameter_m = 700.0\n",
            siting_default_criteria()
        ),
    )
    .unwrap();
    let args = [
        "rank",
        moved_path.to_str().unwrap(),
        "--criteria",
        wide.to_str().unwrap(),
        "--geojson",
        o,
    ];
    fails_cleanly(
        &args,
        "/nonexistent/farside-patch.tif) was not found",
        Some(&out),
    );
    fails_cleanly(&args, "--dem FILE", Some(&out));
    std::fs::write(d.path().join("a-file"), b"x").unwrap();
    let blocked = d.path().join("a-file").join("x.gpkg");
    fails_cleanly(
        &["rank", s, "--gpkg", blocked.to_str().unwrap()],
        "cannot write",
        Some(&blocked),
    );
}

fn siting_default_criteria() -> String {
    std::fs::read_to_string(root().join("assets/criteria/reflector-1km.toml")).unwrap()
}

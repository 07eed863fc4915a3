//! Invented candidates for driving the interface in tests (not science: the UI tests check
//! what the panels show and do, not the numbers' truth).

#![allow(dead_code)]

use craters::CraterMeasurement;
use serde_json::json;
use survey::{Candidate, SurveyFile, SCHEMA_VERSION};

/// (id, diameter_m, depth_to_diameter, rim_completeness, roughness_rms_m)
pub const ROWS: [(u32, f64, f64, f64, f64); 6] = [
    (1, 20_000.0, 0.20, 0.95, 5.0),
    (2, 5_000.0, 0.15, 0.90, 0.5),
    (3, 500.0, 0.10, 0.80, 1.0),
    (4, 12_000.0, 0.05, 0.30, 2.0),
    (5, 9_000.0, 0.10, 0.70, 3.0),
    (6, 7_000.0, 0.08, 0.75, 2.5),
];

pub fn candidate(
    id: u32,
    diameter_m: f64,
    dd: f64,
    completeness: f64,
    roughness_m: f64,
    lon: f64,
    lat: f64,
) -> Candidate {
    let crater = CraterMeasurement {
        centre_lon_deg: lon,
        centre_lat_deg: lat,
        diameter_m,
        diameter_sd_m: diameter_m * 0.01,
        ellipse_major_m: diameter_m * 1.02,
        ellipse_minor_m: diameter_m * 0.98,
        ellipticity: 1.0 - 0.98 / 1.02,
        depth_m: diameter_m * dd,
        depth_sd_m: 5.0,
        depth_to_diameter: dd,
        rim_relief_m: diameter_m * 0.03,
        rim_completeness: completeness,
        rim_gap_deg: (1.0 - completeness) * 360.0,
        rim_crest_radius_m: (0..36)
            .map(|k| {
                if (k as f64) < completeness * 36.0 {
                    (diameter_m / 2.0) as f32
                } else {
                    f32::NAN
                }
            })
            .collect(),
        rim_crest_height_m: vec![0.0; 36],
        floor_slope_p95_deg: 8.0,
        roughness_rms_m: roughness_m,
        valid_fraction: 1.0,
        floor_height_m: -diameter_m * dd,
        ..Default::default()
    };
    // Through JSON so fields the model adds later (with serde defaults) need no change here.
    let value = json!({ "id": id, "source": "detected", "crater": crater, "visibility": null });
    serde_json::from_value(value).expect("test candidate matches the survey model")
}

pub fn survey_of(candidates: Vec<Candidate>) -> SurveyFile {
    let value = json!({
        "schema_version": SCHEMA_VERSION,
        "tool_version": "test",
        "input": {
            "path": "/nonexistent/terrain.tif",
            "size_bytes": 0,
            "sha256": "",
            "crs_wkt": "",
            "crs_authority": null,
            "body_radius_m": 1_737_400.0,
        },
        "parameters": { "diameter_min_m": 500.0, "diameter_max_m": 50_000.0, "tile_px": 1024, "catalogue": null, "detect": true },
        "candidates": [],
    });
    let mut survey: SurveyFile =
        serde_json::from_value(value).expect("test survey matches the survey model");
    survey.candidates = candidates;
    survey
}

/// Six candidates spread over a few degrees of the far side.
pub fn small_survey() -> SurveyFile {
    survey_of(
        ROWS.iter()
            .enumerate()
            .map(|(k, &(id, d, dd, c, r))| {
                candidate(
                    id,
                    d,
                    dd,
                    c,
                    r,
                    170.0 + k as f64 * 1.5,
                    -10.0 + (k % 3) as f64 * 2.0,
                )
            })
            .collect(),
    )
}

/// `n` candidates on a deterministic pseudo-random spread (for speed measurements).
pub fn large_survey(n: usize) -> SurveyFile {
    let mut state = 0x9E37_79B9_7F4A_7C15u64;
    let mut next = move || {
        state ^= state << 13;
        state ^= state >> 7;
        state ^= state << 17;
        (state >> 11) as f64 / (1u64 << 53) as f64
    };
    survey_of(
        (0..n)
            .map(|i| {
                let d = 1_000.0 + next() * 30_000.0;
                candidate(
                    i as u32 + 1,
                    d,
                    0.05 + next() * 0.15,
                    0.3 + next() * 0.7,
                    0.3 + next() * 5.0,
                    150.0 + next() * 60.0,
                    -40.0 + next() * 80.0,
                )
            })
            .collect(),
    )
}

/// Criteria for the test surveys: two limits and four weighted measures, all linear.
pub fn test_criteria() -> siting::Criteria {
    use siting::{Criteria, Requirement, ScoreMethod, SoftCriterion, UtilityShape};
    let req = |m: &str, min: Option<f64>| Requirement {
        metric: m.into(),
        min,
        max: None,
        why: "test".into(),
    };
    let soft = |m: &str, worst: f64, ideal: f64| SoftCriterion {
        metric: m.into(),
        worst,
        ideal,
        shape: UtilityShape::Linear,
        weight: 1.0,
        why: "test".into(),
    };
    Criteria {
        title: "test criteria".into(),
        scoring: ScoreMethod::WeightedSum,
        requirements: vec![
            req("diameter_m", Some(1_000.0)),
            req("rim_completeness", Some(0.5)),
        ],
        criteria: vec![
            soft("depth_to_diameter", 0.05, 0.2),
            soft("rim_completeness", 0.3, 1.0),
            soft("roughness_rms_m", 5.0, 0.5),
            soft("diameter_m", 1_000.0, 20_000.0),
        ],
        robustness: Default::default(),
        structure: None,
        operations: None,
        areas: Vec::new(),
        backup_radius_km: siting::criteria::DEFAULT_BACKUP_RADIUS_KM,
    }
}

/// Reason given to the non-fitting candidate of [`survey_with_fits`].
pub const FIT_FAILURE_REASON: &str = "anchor 2 would stand where no rim crest was traced";

/// An invented placement of a 350 m dish centred at (lon, lat): six anchors 250 m out, a round
/// aperture edge and a 12 x 12 clearance map rising from 12 m at the axis.
pub fn invented_fit(lon: f64, lat: f64, fit_ok: bool) -> structure::StructureFit {
    let frame = terrain::LocalFrame::new(1_737_400.0, lon, lat);
    let ring = |r_m: f64, n: usize| -> Vec<(f64, f64)> {
        (0..=n)
            .map(|k| {
                let a = (k % n) as f64 / n as f64 * std::f64::consts::TAU;
                frame.to_lonlat(r_m * a.sin(), r_m * a.cos())
            })
            .collect()
    };
    let anchors = ring(250.0, 6)[..6]
        .iter()
        .enumerate()
        .map(|(k, &(lon_deg, lat_deg))| structure::Anchor {
            lon_deg,
            lat_deg,
            azimuth_deg: k as f64 * 60.0,
            height_m: 50.0 + k as f64,
            span_m: 80.0,
            on_crest: fit_ok || k != 1,
        })
        .collect();
    let size = 12;
    let cell_m = 350.0 / size as f64;
    let mut map = structure::ClearanceMap {
        centre_lon_deg: lon,
        centre_lat_deg: lat,
        cell_m,
        size,
        values_m: vec![],
    };
    map.values_m = (0..size * size)
        .map(|k| {
            let (x, y) = map.cell_centre_xy_m(k % size, k / size);
            let r = x.hypot(y);
            if r <= 175.0 {
                (12.0 + r / 10.0) as f32
            } else {
                f32::NAN
            }
        })
        .collect();
    structure::StructureFit {
        fit_ok,
        reasons: if fit_ok {
            vec![]
        } else {
            vec![FIT_FAILURE_REASON.into()]
        },
        centre_lon_deg: lon,
        centre_lat_deg: lat,
        vertex_height_m: -40.0,
        aperture_edge_height_m: 3.75,
        min_clearance_m: 12.0,
        min_clearance_lon_deg: lon,
        min_clearance_lat_deg: lat,
        headroom_m: 4.0,
        anchor_height_spread_m: 5.0,
        max_span_m: 80.0,
        aperture_valid_fraction: 1.0,
        anchors,
        aperture_outline_lonlat: ring(175.0, 64),
        clearance_map: map,
        ..Default::default()
    }
}

/// [`small_survey`] with the default structure: candidate 1 fits, candidate 2 does not
/// (an anchor off the crest), the rest carry no fit.
pub fn survey_with_fits() -> SurveyFile {
    let mut s = small_survey();
    s.parameters.structure = Some(structure::StructureSpec::default());
    for c in &mut s.candidates {
        let (lon, lat) = (c.crater.centre_lon_deg, c.crater.centre_lat_deg);
        c.fit = match c.id {
            1 => Some(invented_fit(lon, lat, true)),
            2 => Some(invented_fit(lon, lat, false)),
            _ => None,
        };
    }
    s
}

/// Where the candidate with this id sits in the open survey's list.
#[allow(dead_code)] // not every test file uses every helper
pub fn index_of_id(s: &quietbowl_workbench::Session, id: u32) -> usize {
    s.survey
        .as_ref()
        .expect("a survey is open")
        .candidates
        .iter()
        .position(|c| c.id == id)
        .expect("the id is in the survey")
}

/// Step the window until the background job has ended (or fail after a minute).
#[allow(dead_code)]
pub fn until_job_ends(h: &mut egui_kittest::Harness<'static, quietbowl_workbench::WorkbenchApp>) {
    let start = std::time::Instant::now();
    while h.state().job.is_some() {
        assert!(
            start.elapsed() < std::time::Duration::from_secs(60),
            "the job did not end"
        );
        std::thread::sleep(std::time::Duration::from_millis(20));
        h.step();
    }
}

/// A 1600 x 1000 window on `survey` with the test criteria, the crater sheet on `tab`, and the
/// candidate `id` selected by clicking its name in the list.
pub fn harness_on_page(
    tab: quietbowl_workbench::crater_sheet::SheetTab,
    id: u32,
    survey: SurveyFile,
) -> egui_kittest::Harness<'static, quietbowl_workbench::WorkbenchApp> {
    use egui_kittest::kittest::Queryable;
    use quietbowl_workbench::{Session, WorkbenchApp};
    let mut app = WorkbenchApp::new(Session::with_survey_and_criteria(survey, test_criteria()));
    app.sheet.tab = tab;
    let mut h = egui_kittest::Harness::builder()
        .with_size(egui::vec2(1600.0, 1000.0))
        .build_ui_state(|ui, app: &mut WorkbenchApp| app.ui(ui), app);
    h.get_by_label(&quietbowl_workbench::session::candidate_label(id))
        .click();
    h.run_steps(8);
    h
}

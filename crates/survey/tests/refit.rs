//! Refitting a finished survey with another structure. The checks are self-consistency (the
//! refit must reproduce what the survey run itself fits) and plain geometry (a wider dish fits
//! no crater a narrower one of the same shape could not be hung in more easily).
use std::path::{Path, PathBuf};
use std::sync::atomic::AtomicBool;
use std::sync::{Mutex, OnceLock};
use structure::StructureSpec;
use survey::{RunOptions, SurveyError, SurveyFile};

fn demo() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../../demo-terrain/farside-patch.tif")
}

/// Large craters only so the debug-build test stays quick; 1024 px tiles so there are several
/// tiles, halos cut by the raster edge, and candidates near tile edges.
fn run_with(structure: Option<StructureSpec>) -> SurveyFile {
    let opts = RunOptions {
        diameter_min_m: Some(1200.0),
        diameter_max_m: Some(6000.0),
        tile_px: 1024,
        visibility: false,
        structure,
        ..RunOptions::default()
    };
    survey::run(&demo(), &opts, &|_| {}, &AtomicBool::new(false))
        .expect("demo survey")
        .survey
}

/// The survey with the default dish, made once for all the tests here.
fn surveyed() -> &'static SurveyFile {
    static S: OnceLock<SurveyFile> = OnceLock::new();
    S.get_or_init(|| run_with(Some(StructureSpec::default())))
}

fn refit(file: &SurveyFile, spec: &StructureSpec) -> SurveyFile {
    survey::refit(file, &demo(), spec, &|_| {}, &AtomicBool::new(false)).expect("refit")
}

fn fit_count(s: &SurveyFile) -> usize {
    s.candidates
        .iter()
        .filter(|c| c.fit.as_ref().is_some_and(|f| f.fit_ok))
        .count()
}

#[test]
fn refit_with_the_survey_spec_gives_the_same_file_byte_for_byte() {
    let spec = StructureSpec::default();
    let surveyed = surveyed();
    assert!(
        surveyed
            .candidates
            .iter()
            .filter(|c| c.fit.is_some())
            .count()
            >= 5,
        "too few fitted candidates to compare"
    );
    let text = surveyed.to_json();
    let again = refit(surveyed, &spec).to_json();
    if again != text {
        let line = again.lines().zip(text.lines()).position(|(a, b)| a != b);
        panic!(
            "refit changed the survey, first at line {line:?}: {:?}",
            line.map(|i| (again.lines().nth(i), text.lines().nth(i)))
        );
    }
    // A survey run without a structure, refitted, equals one run with it: the refit adds
    // exactly what the run would have fitted.
    let bare = run_with(None);
    assert!(bare.candidates.iter().all(|c| c.fit.is_none()));
    assert_eq!(refit(&bare, &spec).to_json(), text);
}

#[test]
fn a_wider_dish_fits_fewer_demo_craters() {
    let narrow = StructureSpec::default();
    // Same f/D, twice the aperture: it needs a wider bowl inside the crest.
    let wide = StructureSpec {
        aperture_m: 2.0 * narrow.aperture_m,
        ..narrow.clone()
    };
    let surveyed = surveyed();
    let widened = refit(surveyed, &wide);
    assert_eq!(widened.parameters.structure.as_ref(), Some(&wide));
    assert_eq!(widened.candidates.len(), surveyed.candidates.len());
    let (n_narrow, n_wide) = (fit_count(surveyed), fit_count(&widened));
    assert!(
        n_wide < n_narrow,
        "{n_wide} craters take the 700 m dish, {n_narrow} the 350 m one"
    );
    let lost: Vec<u32> = surveyed
        .candidates
        .iter()
        .zip(&widened.candidates)
        .filter(|(a, b)| {
            a.fit.as_ref().is_some_and(|f| f.fit_ok) && !b.fit.as_ref().is_some_and(|f| f.fit_ok)
        })
        .map(|(a, _)| a.id)
        .collect();
    assert!(!lost.is_empty());
    // Only the fit moved: the measurements and ids are the survey's (compared as written,
    // since a missing crest radius is NaN and NaN != NaN).
    for (a, b) in surveyed.candidates.iter().zip(&widened.candidates) {
        let as_written = |c: &survey::Candidate| {
            serde_json::to_string(&(c.id, &c.source, &c.crater, &c.visibility)).unwrap()
        };
        assert_eq!(as_written(a), as_written(b));
    }
    // And back: refitting the wide survey with the narrow dish restores the original.
    assert_eq!(refit(&widened, &narrow).to_json(), surveyed.to_json());
}

#[test]
fn refit_refuses_another_dem_a_bad_spec_and_stops_when_cancelled() {
    let surveyed = surveyed();
    let other = demo().with_file_name("truth.json");
    let e = survey::refit(
        surveyed,
        &other,
        &StructureSpec::default(),
        &|_| {},
        &AtomicBool::new(false),
    )
    .unwrap_err();
    assert!(matches!(e, SurveyError::DemMismatch { .. }), "{e}");

    let bad = StructureSpec {
        aperture_m: -1.0,
        ..StructureSpec::default()
    };
    let e = survey::refit(surveyed, &demo(), &bad, &|_| {}, &AtomicBool::new(false)).unwrap_err();
    assert!(e.to_string().contains("aperture_m"), "{e}");

    let e = survey::refit(
        surveyed,
        &demo(),
        &StructureSpec::default(),
        &|_| {},
        &AtomicBool::new(true),
    )
    .unwrap_err();
    assert!(matches!(e, SurveyError::RefitCancelled), "{e}");

    // Progress counts every candidate once and ends at the total.
    let seen = Mutex::new(Vec::new());
    refit_with_progress(surveyed, &seen);
    let seen = seen.into_inner().unwrap();
    let total = surveyed.candidates.len();
    assert_eq!(seen.iter().max(), Some(&total));
    assert_eq!(
        seen.len(),
        total + 1,
        "one report before starting, one per candidate"
    );
}

fn refit_with_progress(s: &SurveyFile, seen: &Mutex<Vec<usize>>) {
    survey::refit(
        s,
        &demo(),
        &StructureSpec::default(),
        &|p| seen.lock().unwrap().push(p.candidates_done),
        &AtomicBool::new(false),
    )
    .expect("refit");
}

#[test]
fn the_recorded_dem_is_found_beside_the_survey_or_reported_missing() {
    let mut s = surveyed().clone();
    let d = tempfile::tempdir().unwrap();
    // A relative path recorded from another working folder: found by its name beside the survey.
    std::fs::copy(demo(), d.path().join("farside-patch.tif")).unwrap();
    s.input.path = "elsewhere/farside-patch.tif".into();
    let found = survey::locate_dem(&s, Some(&d.path().join("survey.json")))
        .expect("found beside the survey");
    assert_eq!(found, d.path().join("farside-patch.tif"));
    s.input.path = "/no/such/folder/terrain.tif".into();
    let e = survey::locate_dem(&s, Some(&d.path().join("survey.json"))).unwrap_err();
    assert!(
        matches!(e, SurveyError::DemNotFound { ref tried, .. } if tried.len() == 2),
        "{e}"
    );
    assert!(e.to_string().contains("/no/such/folder/terrain.tif"));
}

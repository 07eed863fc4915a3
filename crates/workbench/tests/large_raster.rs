//! Opening a DEM that has no survey beside it, driven through AccessKit (egui_kittest): a
//! raster above the size limit opens for viewing with an offer to survey it, and the survey
//! starts only when the offer is taken; a raster under the limit is surveyed at once, as
//! before. The limit is lowered for the test so a small raster stands in for a large one.

mod common;

use egui_kittest::kittest::Queryable;
use egui_kittest::Harness;
use gdal::raster::{Buffer, RasterCreationOptions};
use gdal::spatial_ref::SpatialRef;
use gdal::DriverManager;
use quietbowl_workbench::app::{SurveyOffer, ASK_BEFORE_SURVEY_ABOVE_PX};
use quietbowl_workbench::job::{JobControl, SurveyRunner};
use quietbowl_workbench::{Session, WorkbenchApp};
use std::path::Path;
use std::sync::atomic::{AtomicUsize, Ordering};
use std::sync::Arc;

const WIDTH_PX: usize = 64;
const HEIGHT_PX: usize = 48;

/// A small lunar DEM (geographic on a sphere of the IAU 2015 mean radius, 1737.4 km;
/// Archinal et al. 2018, Celestial Mechanics and Dynamical Astronomy 130:22) of invented
/// gentle relief.
fn write_dem(path: &Path) {
    let driver = DriverManager::get_driver_by_name("GTiff").expect("GTiff driver");
    let opts = RasterCreationOptions::from_iter(["COMPRESS=DEFLATE"]);
    let mut ds = driver
        .create_with_band_type_with_options::<f32, _>(path, WIDTH_PX, HEIGHT_PX, 1, &opts)
        .expect("create test DEM");
    ds.set_geo_transform(&[170.0, 0.01, 0.0, -10.0, 0.0, -0.01])
        .expect("geotransform");
    ds.set_spatial_ref(
        &SpatialRef::from_proj4("+proj=longlat +R=1737400 +no_defs").expect("lunar CRS"),
    )
    .expect("CRS");
    let data: Vec<f32> = (0..WIDTH_PX * HEIGHT_PX)
        .map(|k| ((k % WIDTH_PX) as f32 * 0.3).sin() * 40.0 + (k / WIDTH_PX) as f32)
        .collect();
    let mut band = ds.rasterband(1).expect("band");
    let mut buf = Buffer::new((WIDTH_PX, HEIGHT_PX), data);
    band.write((0, 0), (WIDTH_PX, HEIGHT_PX), &mut buf)
        .expect("write heights");
}

/// A survey runner that only counts its calls and returns an empty survey.
fn counting_runner(calls: Arc<AtomicUsize>) -> SurveyRunner {
    Arc::new(
        move |_dem: &Path,
              _settings: &quietbowl_workbench::survey_settings::SurveySettings,
              _ctl: &JobControl| {
            calls.fetch_add(1, Ordering::SeqCst);
            Ok(common::survey_of(vec![]))
        },
    )
}

fn harness(limit_px: u64, calls: Arc<AtomicUsize>) -> Harness<'static, WorkbenchApp> {
    let mut app = WorkbenchApp::new(Session::default());
    app.survey_runner = Some(counting_runner(calls));
    app.ask_before_survey_above_px = limit_px;
    Harness::builder()
        .with_size(egui::vec2(1600.0, 1000.0))
        .build_ui_state(|ui, app: &mut WorkbenchApp| app.ui(ui), app)
}

fn open(h: &mut Harness<'static, WorkbenchApp>, path: &Path) {
    let ctx = h.ctx.clone();
    h.state_mut().open_path(&ctx, path);
    h.run_steps(4);
}

#[test]
fn large_raster_opens_for_viewing_and_offers_the_survey() {
    let dir = tempfile::tempdir().expect("temp dir");
    let dem = dir.path().join("wide.tif");
    write_dem(&dem);
    let calls = Arc::new(AtomicUsize::new(0));
    // 64 x 48 = 3072 px stands for a raster above the limit.
    let mut h = harness(1_000, calls.clone());
    open(&mut h, &dem);

    assert!(h.state().terrain.is_some(), "the terrain is shown");
    assert!(h.state().job.is_none(), "no survey started unasked");
    assert_eq!(calls.load(Ordering::SeqCst), 0);
    let offer = h.state().survey_offer.clone().expect("a survey is offered");
    assert_eq!((offer.width_px, offer.height_px), (WIDTH_PX, HEIGHT_PX));
    // The offer names the size of the raster written above.
    h.get_by_label_contains("It is large: 64 x 48 px");
    h.get_by_label_contains("A survey would take roughly");

    h.get_by_label("Survey it in the background").click();
    h.run_steps(2);
    assert!(h.state().survey_offer.is_none(), "the offer is taken");
    common::until_job_ends(&mut h);
    assert_eq!(calls.load(Ordering::SeqCst), 1, "the survey ran once");
}

#[test]
fn declining_the_offer_keeps_the_view_and_no_survey_runs() {
    let dir = tempfile::tempdir().expect("temp dir");
    let dem = dir.path().join("wide.tif");
    write_dem(&dem);
    let calls = Arc::new(AtomicUsize::new(0));
    let mut h = harness(1_000, calls.clone());
    open(&mut h, &dem);
    h.get_by_label("Just view it").click();
    h.run_steps(4);
    assert!(h.state().survey_offer.is_none());
    assert!(h.query_by_label("Survey it in the background").is_none());
    assert!(h.state().terrain.is_some());
    assert!(h.state().job.is_none());
    assert_eq!(calls.load(Ordering::SeqCst), 0);
}

#[test]
fn small_raster_is_surveyed_on_opening_as_before() {
    let dir = tempfile::tempdir().expect("temp dir");
    let dem = dir.path().join("small.tif");
    write_dem(&dem);
    let calls = Arc::new(AtomicUsize::new(0));
    // The shipped limit (25 Mpx) is far above 3072 px.
    let mut h = harness(ASK_BEFORE_SURVEY_ABOVE_PX, calls.clone());
    open(&mut h, &dem);
    assert!(h.state().survey_offer.is_none());
    assert!(h.query_by_label("Survey it in the background").is_none());
    common::until_job_ends(&mut h);
    assert_eq!(calls.load(Ordering::SeqCst), 1, "surveyed without asking");
}

#[test]
fn offer_estimates_a_mosaic_in_minutes() {
    // 20,000 x 20,000 px at our measured default-survey rate (0.7 Mpx/s, docs/performance.md,
    // "## Survey"): 400 Mpx, 571 s, said as 10 min. Arithmetic on our own constant.
    let offer = SurveyOffer {
        dem_path: "mosaic.vrt".into(),
        width_px: 20_000,
        height_px: 20_000,
    };
    assert_eq!(offer.pixels(), 400_000_000);
    let text = offer.describe();
    assert!(text.contains("20,000 x 20,000 px (400 Mpx)"), "{text}");
    assert!(text.contains("roughly 10 min"), "{text}");
}

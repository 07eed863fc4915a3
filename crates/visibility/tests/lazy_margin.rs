//! The Earth margin the site figures use (sectors marched on demand, discs visited by branch
//! and bound) equals, field for field, the plain scan over a horizon marched in full over the
//! sectors the Earth's disc can reach, on the demo terrain and on the LOLA product when present.

mod common;

use std::path::{Path, PathBuf};
use terrain::{Dem, ElevationGrid, OpenOptions};
use visibility::horizon::{Horizon, HorizonTerrain, LazyHorizon, NodataRule};
use visibility::{earth_margin, earth_margin_lazy, LibrationEnvelope, VisibilityOptions};

/// Both margins of one site, as their `Debug` text: every field, NaN and the sign of zero
/// included (f64's `Debug` is the shortest text that reads back to the same bits); then how
/// many sectors the lazy one read and how many the full one marched.
fn both(
    lon: f64,
    lat: f64,
    t: &HorizonTerrain,
    o: &VisibilityOptions,
) -> (String, String, usize, usize) {
    let env = LibrationEnvelope::standard();
    let wanted = visibility::earth::sectors_needed(env, lon, lat, o.horizon_azimuths);
    let spec = o.horizon_spec(o.horizon_azimuths);
    let full = Horizon::compute_sectors(lon, lat, Some(t), &spec, Some(&wanted));
    let reference = earth_margin(env, lon, lat, &full);
    let mut lazy = LazyHorizon::new(lon, lat, Some(t), &spec, Some(&wanted));
    let m = earth_margin_lazy(env, lon, lat, &mut lazy);
    assert_eq!(
        (
            lazy.site_height_m,
            lazy.sphere_horizon_deg,
            lazy.from_terrain
        ),
        (
            full.site_height_m,
            full.sphere_horizon_deg,
            full.from_terrain
        )
    );
    let marched = wanted.iter().filter(|&&w| w).count();
    (
        format!("{m:?}"),
        format!("{reference:?}"),
        lazy.sectors_read(),
        marched,
    )
}

/// Compares the two margins at `sites`; returns how many had terrain, and the sectors read
/// by the lazy margins and marched by the full ones, summed.
fn check_sites(
    grid: &ElevationGrid,
    sites: &[(f64, f64)],
    o: &VisibilityOptions,
) -> (usize, usize, usize) {
    let t = HorizonTerrain::new(grid).expect("grid has data");
    let (mut with_terrain, mut read, mut marched) = (0, 0, 0);
    for &(lon, lat) in sites {
        let (lazy, reference, r, m) = both(lon, lat, &t, o);
        assert_eq!(lazy, reference, "site {lon} {lat}");
        with_terrain += usize::from(grid.sample_lonlat(lon, lat).is_some());
        (read, marched) = (read + r, marched + m);
    }
    (with_terrain, read, marched)
}

/// Sites over a grid's extent: a golden-ratio scatter (deterministic), in (lon, lat).
fn scatter(grid: &ElevationGrid, n: usize) -> Vec<(f64, f64)> {
    let geo = &grid.geometry;
    (0..n)
        .filter_map(|i| {
            let u = (i as f64 * 0.618_033_988_75 + 0.1).fract();
            let v = (i as f64 * 0.754_877_666_25 + 0.3).fract();
            let col = grid.col0 as f64 + u * grid.width as f64;
            let row = grid.row0 as f64 + v * grid.height as f64;
            geo.pixel_to_lonlat(col, row)
        })
        .collect()
}

fn demo_path() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../../demo-terrain/farside-patch.tif")
}

#[test]
fn lazy_margin_equals_the_full_one_on_the_demo_terrain() {
    let dem = Dem::open(demo_path(), &OpenOptions::default()).expect("the demo DEM opens");
    let grid = dem.read_all().expect("the demo DEM reads");
    let sites = scatter(&grid, 160);
    let mut o = VisibilityOptions::default();
    let (with_terrain, read, marched) = check_sites(&grid, &sites, &o);
    assert_eq!(with_terrain, sites.len());
    // The branch and bound leaves sectors unread (about a third here, from a trial run).
    assert!(read < marched * 9 / 10, "{read} sectors read of {marched}");
    // A mast, the other nodata rule and coarser sectors change which discs are read.
    o.observer_height_m = 40.0;
    o.horizon_nodata = NodataRule::Skip;
    o.horizon_azimuths = 90;
    assert_eq!(check_sites(&grid, &sites[..40], &o).0, 40);
}

#[test]
fn lazy_margin_equals_the_full_one_on_lola_ldem4() {
    let Some(dem) = common::lola_ldem4() else {
        println!("SKIPPED: LOLA LDEM_4.LBL not found (set QUIETBOWL_LOLA_DIR)");
        return;
    };
    // Windows of 30 x 30 degrees round far-side and limb points, where the Earth's disc is
    // near the horizon and the terrain decides the margin.
    let geo = dem.geometry();
    let o = VisibilityOptions::default();
    for (lon, lat) in [(179.4, -5.9), (95.0, 0.0), (-95.0, 20.0), (120.0, -60.0)] {
        let (col, row) = geo
            .lonlat_to_pixel(lon, lat)
            .expect("site maps to the grid");
        let grid = dem
            .read_window(col as isize - 60, row as isize - 60, 120, 120)
            .expect("window reads");
        let sites = scatter(&grid, 30);
        assert!(check_sites(&grid, &sites, &o).0 >= 25, "{lon} {lat}");
    }
}

//! The horizon and Earth margin on the real LOLA 4 pixel-per-degree product, when present.

mod common;

use visibility::{site_visibility, VisibilityOptions};

#[test]
fn daedalus_floor_is_walled_in_on_lola_ldem4() {
    let Some(dem) = common::lola_ldem4() else {
        println!("SKIPPED: LOLA LDEM_4.LBL not found (set QUIETBOWL_LOLA_DIR)");
        return;
    };
    // Daedalus: 5.9 S, 179.4 E, about 93 km across and about 3 km deep (IAU Gazetteer of
    // Planetary Nomenclature for position and size; depth from memory).
    let (lon, lat) = (179.4, -5.9);
    let geo = dem.geometry();
    let Some((col, row)) = geo.lonlat_to_pixel(lon, lat) else {
        panic!("site maps to the grid")
    };
    let grid = dem
        .read_window(col as isize - 40, row as isize - 40, 80, 80)
        .expect("window reads");
    let v = site_visibility(lon, lat, Some(&grid), &VisibilityOptions::default());
    assert!(v.horizon_from_terrain, "{v:?}");
    // The rim stands about 3 km above the floor 45 km away: the ground 45 km north of the
    // site must be well above the site itself.
    let north =
        terrain::geodesy::destination(grid.geometry.body_radius_m, (lon, lat), 0.0, 45_000.0);
    let rim = grid.sample_lonlat(north.0, north.1).expect("rim sampled");
    assert!(
        rim - v.site_height_m > 1500.0,
        "rim {rim} floor {}",
        v.site_height_m
    );
    let p = visibility::horizon_profile(lon, lat, Some(&grid), 250_000.0, 36);
    // At 7.6 km pixels the walls of a 3 km deep, 93 km crater stand a few degrees all round.
    assert!(p.iter().all(|&(_, e)| e > 0.5), "{p:?}");
    assert!(
        v.earth_clearance_deg > v.earth_clearance_sphere_deg && v.earth_clearance_deg > 60.0,
        "{v:?}"
    );
}

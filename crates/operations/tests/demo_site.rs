//! The demo terrain (invented, demo-terrain/farside-patch.tif) at 180 E 16 N, the patch's
//! centre on open ground: the relay is in view at least 99 % of the time and the dark share
//! lies within 0.45-0.55 (issue 19). A shipped input that fails to open fails the test.

use operations::{Operations, OperationsInputs};
use std::path::Path;
use terrain::{Dem, OpenOptions};

#[test]
fn demo_centre_keeps_the_relay_and_half_the_month_dark() {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("../../demo-terrain/farside-patch.tif");
    let dem = Dem::open(&path, &OpenOptions::default()).expect("the shipped demo DEM opens");
    let (col, row) = dem
        .geometry()
        .lonlat_to_pixel(180.0, 16.0)
        .expect("180 E 16 N is on the demo");
    // 12 km each way: more than the 5 km the skyline reads at a point.
    let r = 400isize;
    let grid = dem
        .read_window(
            col as isize - r,
            row as isize - r,
            2 * r as usize + 1,
            2 * r as usize + 1,
        )
        .expect("window");
    let post_m = terrain::GridGeometry::pixel_size_m(&grid.geometry)
        .map(|(a, b)| a.min(b))
        .unwrap();
    let ops = Operations::new(&OperationsInputs::default(), None).unwrap();
    let rep = ops
        .for_point(&grid, post_m, 180.0, 16.0)
        .expect("ground at the centre");
    let relay = rep.relay.lander;
    assert!(relay.fraction >= 0.99, "relay in view {relay:?}");
    let dark = rep.night.lander.dark_fraction;
    assert!((0.45..=0.55).contains(&dark), "dark share {dark}");
    // Open ground: the landing round the point finds safe ground.
    let landing = rep.landing.expect("landing figures");
    assert!(landing.p_best > 0.5, "{landing:?}");
}

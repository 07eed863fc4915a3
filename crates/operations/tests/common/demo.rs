//! The shipped demo terrain (invented, demo-terrain/farside-patch.tif), whole, and its post
//! spacing (the smaller pixel side), for the skyline test and bench. A demo that fails to open
//! fails them.

use std::path::Path;
use terrain::{Dem, ElevationGrid, OpenOptions};

pub fn demo_grid() -> (ElevationGrid, f64) {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("../../demo-terrain/farside-patch.tif");
    let dem = Dem::open(&path, &OpenOptions::default()).expect("the shipped demo DEM opens");
    let grid = dem.read_all().expect("the demo reads");
    let post_m = grid
        .geometry
        .pixel_size_m()
        .map(|(a, b)| a.min(b))
        .expect("pixel size");
    (grid, post_m)
}

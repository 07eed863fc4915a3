//! The pyramid's skyline against the full-resolution sweep (every node one by one out to the
//! reach) on the demo terrain (invented, demo-terrain/farside-patch.tif), and the rings'
//! cover of the reach.

use super::{rings, Skylines, Square};
use crate::{SKYLINE_REACH_MAX_M, SKYLINE_SECTORS};
use structure::patch::Patch;

#[path = "../../tests/common/demo.rs"]
mod demo;

/// Nodes no sweep can stop short of: the full-resolution sweep.
const ALL_POSTS: i64 = 1 << 40;

#[test]
fn rings_cover_every_node_of_the_reach_once() {
    for (centre, near, reach) in [
        ([50, 50], 48, (0, 100)),
        ([3, 97], 48, (0, 100)),
        ([40, 61], 8, (5, 120)),
        ([0, 0], 2, (0, 40)),
        ([77, 12], 5, (33, 90)),
        ([10, 10], ALL_POSTS, (0, 30)),
    ] {
        let sq = Square {
            lo: [reach.0; 2],
            hi: [reach.1; 2],
        };
        let side = (reach.1 + 1) as usize;
        let mut count = vec![0u32; side * side];
        for (level, region, hole) in rings(centre, near, sq) {
            super::for_ring(region, hole, |bi, bj| {
                let b = 1usize << level;
                for j in bj * b..(bj + 1) * b {
                    for i in bi * b..(bi + 1) * b {
                        if i < side && j < side {
                            count[j * side + i] += 1;
                        }
                    }
                }
            });
        }
        for j in reach.0 as usize..side {
            for i in reach.0 as usize..side {
                let c = count[j * side + i];
                assert_eq!(c, 1, "node ({i}, {j}) read {c} times, {centre:?} {near}");
            }
        }
    }
}

/// Places of the demo survey (lon, lat, degrees), rounded: crater floors from a 250 m crater
/// to a 5.3 km one, anchors on rims (the ground round them mostly below: the elevation there
/// rises with distance), and the patch's open centre.
const PLACES: [(f64, f64); 8] = [
    (-179.246_200, 16.610_524), // floor, 253 m crater
    (-179.985_383, 16.764_861), // floor, 597 m crater
    (179.933_833, 16.955_144),  // floor, 935 m crater
    (179.926_001, 16.972_526),  // anchor on its rim
    (179.025_904, 16.305_919),  // floor, 5,264 m crater
    (179.068_408, 16.375_738),  // anchor on its rim
    (179.107_120, 16.305_121),  // another
    (180.0, 16.0),              // open ground
];

#[test]
fn demo_skylines_equal_the_full_sweep_in_every_sector() {
    let (grid, post_m) = demo::demo_grid();
    let mast = crate::OperationsInputs::default().mast_height_m;
    let (mut read_fast, mut read_full) = (0, 0);
    for &(lon, lat) in &PLACES {
        for reach in [1500.0, SKYLINE_REACH_MAX_M] {
            // The lattice round a point 300 m off, so the point is not on a node.
            let patch = Patch::build(&grid, lon + 0.01, lat, reach + 1000.0, post_m).expect("on");
            let p = patch.frame.to_local(lon, lat);
            let mut fast = Skylines::new(&patch);
            let mut full = Skylines::with_near_posts(&patch, ALL_POSTS);
            let a = fast.sweep(p, mast, reach, SKYLINE_SECTORS).expect("ground");
            let b = full.sweep(p, mast, reach, SKYLINE_SECTORS).expect("ground");
            for (k, (x, y)) in a.elevation_deg.iter().zip(&b.elevation_deg).enumerate() {
                assert!(
                    x == y,
                    "({lon}, {lat}) reach {reach} m, sector {k}: {x} deg, full sweep {y} deg"
                );
            }
            read_fast += fast.last_read();
            read_full += full.last_read();
        }
    }
    // The equality is not bought by reading everything: the pyramid leaves most shut.
    assert!(
        4 * read_fast < read_full,
        "read {read_fast} nodes and blocks against {read_full}"
    );
}

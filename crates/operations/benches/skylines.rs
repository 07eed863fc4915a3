//! Speed of one candidate's lattice and skylines on the demo terrain (invented,
//! demo-terrain/farside-patch.tif): the lattice round the crater built before timing, then the
//! skylines at the lander and at every anchor on it (the pyramid included), as
//! `Operations::for_candidate` sweeps them. Three real
//! candidates of the demo survey: a small crater (reach at its 500 m floor), a 935 m one
//! (2.8 km reach) and a 5.3 km one (the 8 km cap). Their places are copied from a demo survey
//! (`quietbowl survey demo-terrain/farside-patch.tif`), rounded.

use criterion::{criterion_group, criterion_main, Criterion};
use operations::{SKYLINE_REACH_MAX_M, SKYLINE_REACH_MIN_M, SKYLINE_SECTORS};
use std::hint::black_box;
use structure::patch::Patch;
use terrain::ElevationGrid;

#[path = "../tests/common/demo.rs"]
mod demo;

/// A crater of the demo survey: diameter, centre, lander and anchors (lon, lat degrees).
struct Candidate {
    name: &'static str,
    diameter_m: f64,
    centre: (f64, f64),
    points: &'static [(f64, f64)],
}

const CANDIDATES: [Candidate; 3] = [
    Candidate {
        name: "crater_253m",
        diameter_m: 253.0,
        centre: (-179.246_200, 16.612_503),
        points: &[
            (-179.246_200, 16.610_524),
            (-179.245_039, 16.616_294),
            (-179.241_985, 16.613_730),
            (-179.242_915, 16.609_988),
            (-179.246_661, 16.608_802),
            (-179.250_256, 16.611_112),
        ],
    },
    Candidate {
        name: "crater_935m",
        diameter_m: 935.0,
        centre: (179.926_593, 16.958_112),
        points: &[
            (179.933_833, 16.955_144),
            (179.926_001, 16.972_526),
            (179.941_534, 16.964_002),
            (179.936_428, 16.948_436),
            (179.923_140, 16.941_486),
            (179.912_868, 16.951_239),
        ],
    },
    Candidate {
        name: "crater_5264m",
        diameter_m: 5264.0,
        centre: (179.016_627, 16.304_930),
        points: &[
            (179.025_904, 16.305_919),
            (179.068_408, 16.375_738),
            (179.107_120, 16.305_121),
            (179.068_719, 16.235_335),
            (178.974_535, 16.216_696),
        ],
    },
];

/// The lattice round the candidate (holding the reach round every point) and the reach.
fn lattice(grid: &ElevationGrid, post_m: f64, c: &Candidate) -> (Patch, f64) {
    let reach = (3.0 * c.diameter_m).clamp(SKYLINE_REACH_MIN_M, SKYLINE_REACH_MAX_M);
    let frame = terrain::LocalFrame::new(grid.geometry.body_radius_m, c.centre.0, c.centre.1);
    let spread = c
        .points
        .iter()
        .map(|&(lon, lat)| {
            let (x, y) = frame.to_local(lon, lat);
            x.hypot(y)
        })
        .fold(0.0, f64::max);
    let patch =
        Patch::build(grid, c.centre.0, c.centre.1, spread + reach, post_m).expect("on the demo");
    (patch, reach)
}

fn bench(cr: &mut Criterion) {
    let (grid, post_m) = demo::demo_grid();
    let mast = operations::OperationsInputs::default().mast_height_m;
    for c in &CANDIDATES {
        let (patch, reach) = lattice(&grid, post_m, c);
        cr.bench_function(&format!("lattice_{}", c.name), |b| {
            b.iter(|| lattice(&grid, post_m, black_box(c)).0.n)
        });
        let points: Vec<(f64, f64)> = c
            .points
            .iter()
            .map(|&(lon, lat)| patch.frame.to_local(lon, lat))
            .collect();
        cr.bench_function(&format!("skylines_{}", c.name), |b| {
            b.iter(|| {
                let mut skylines = operations::skyline::Skylines::new(&patch);
                points
                    .iter()
                    .map(|&p| {
                        skylines
                            .sweep(black_box(p), mast, reach, SKYLINE_SECTORS)
                            .map_or(0.0, |h| h.elevation_deg[0])
                    })
                    .sum::<f64>()
            })
        });
    }
}

criterion_group!(benches, bench);
criterion_main!(benches);

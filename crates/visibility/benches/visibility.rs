//! Speed of the visibility step: 500 sites over an invented grid shaped like the demo patch
//! (60 km square at 30 m posts around 180 E, 16 N, with an 8 km, 1.6 km deep bowl), in bulk
//! (parallel) and one at a time. The envelope is built before timing,
//! as it is once per process in use.

use criterion::{criterion_group, criterion_main, Criterion};
use std::hint::black_box;

#[path = "../tests/common/mod.rs"]
mod common;

fn sites() -> Vec<(f64, f64)> {
    // A deterministic scatter (golden-ratio sequence) over 1.6 x 1.6 degrees around 180 E, 16 N.
    (0..500)
        .map(|i| {
            let u = (i as f64 * 0.618_033_988_75).fract();
            let v = (i as f64 * 0.754_877_666_25).fract();
            (179.2 + 1.6 * u, 15.2 + 1.6 * v)
        })
        .collect()
}

fn bench(c: &mut Criterion) {
    let grid =
        common::geographic_grid(180.0, 16.0, 1.0, 0.001, common::bowl(1600.0, 4000.0, 300.0));
    let opts = visibility::VisibilityOptions::default();
    let sites = sites();
    let _ = visibility::LibrationEnvelope::standard();
    let _ = visibility::PoleCycle::standard();
    c.bench_function("bulk_500_sites_with_grid", |b| {
        b.iter(|| visibility::bulk(black_box(&sites), Some(&grid), &opts))
    });
    let prepared = visibility::HorizonTerrain::new(&grid);
    c.bench_function("one_site_with_prepared_grid", |b| {
        b.iter(|| {
            visibility::site_visibility_prepared(
                black_box(180.0),
                black_box(16.0),
                prepared.as_ref(),
                &opts,
            )
        })
    });
    c.bench_function("libration_envelope_compute", |b| {
        b.iter(|| visibility::LibrationEnvelope::compute(2_460_676.5, 6800.0, 0.25))
    });
}

criterion_group! {
    name = benches;
    config = Criterion::default().sample_size(10);
    targets = bench
}
criterion_main!(benches);

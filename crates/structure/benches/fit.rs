//! Time to fit the default 350 m reflector in one 1.5 km synthetic crater (a paraboloid bowl
//! with d/D 0.2 on 30 m posts, the demo's class of host).

use criterion::{criterion_group, criterion_main, Criterion};
use structure::{fit, StructureSpec};

#[path = "../tests/common/mod.rs"]
mod common;

fn bench(c: &mut Criterion) {
    // D = 1500 m, d = 300 m: focal length of the bowl R^2 / (4 d) = 750^2 / 1200 m.
    let (radius, depth) = (750.0, 300.0);
    let focal = radius * radius / (4.0 * depth);
    let shape = |x: f64, y: f64| common::paraboloid_crater(x, y, 4000.0, focal, radius) + 0.01 * x;
    let (grid, centre) = common::grid(200, 30.0, shape);
    let crater = common::measured(centre, common::crest_radius(radius), shape);
    let spec = StructureSpec::default();
    let f = fit(&grid, &crater, &spec).expect("fit");
    println!(
        "fit_ok {} min clearance {} m headroom {} m max span {} m",
        f.fit_ok, f.min_clearance_m, f.headroom_m, f.max_span_m
    );
    c.bench_function("fit_350m_dish_in_1500m_crater", |b| {
        b.iter(|| fit(&grid, &crater, &spec).map(|f| f.fit_ok))
    });
}

criterion_group!(benches, bench);
criterion_main!(benches);

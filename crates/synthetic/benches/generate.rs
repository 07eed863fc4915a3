//! Generation speed of the demo patch: the full default 2000 x 2000 scene and a quarter-size one.

use criterion::{criterion_group, criterion_main, Criterion};
use synthetic::{generate, DemoSpec};

fn bench_generate(c: &mut Criterion) {
    let mut group = c.benchmark_group("generate");
    group.sample_size(10);
    let small = DemoSpec::small(1, 15.0);
    group.bench_function("small_15km_500px", |b| {
        b.iter(|| generate(&small).map(|t| t.heights_m.len()))
    });
    let full = DemoSpec::default();
    group.bench_function("default_60km_2000px", |b| {
        b.iter(|| generate(&full).map(|t| t.heights_m.len()))
    });
    group.finish();
}

criterion_group!(benches, bench_generate);
criterion_main!(benches);

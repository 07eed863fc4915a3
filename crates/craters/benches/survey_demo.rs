//! The whole demo patch through detect + measure + merge (`survey_grid` on one window holding
//! the whole raster, which is what the survey's tiling does per tile).

use craters::{survey_grid, DetectOptions, MeasureOptions};
use criterion::{criterion_group, criterion_main, Criterion};
use terrain::{Dem, OpenOptions};

const DEMO: &str = concat!(
    env!("CARGO_MANIFEST_DIR"),
    "/../../demo-terrain/farside-patch.tif"
);

fn bench(c: &mut Criterion) {
    let dem = match Dem::open(DEMO, &OpenOptions::default()) {
        Ok(d) => d,
        Err(e) => {
            println!("SKIPPED survey_demo: demo terrain not available ({e}); generate it first");
            return;
        }
    };
    let read = std::time::Instant::now();
    let grid = dem.read_all().expect("read the demo terrain");
    println!(
        "read {} x {} px in {:?}",
        grid.width,
        grid.height,
        read.elapsed()
    );
    let opts = DetectOptions::for_grid(&grid).expect("options");
    // Process CPU time (user + system, clock ticks of 10 ms, Linux): a load-independent
    // companion to the wall clock on a shared machine.
    let cpu_s = || {
        let s = std::fs::read_to_string("/proc/self/stat").ok()?;
        let f: Vec<&str> = s.rsplit(')').next()?.split_whitespace().collect();
        Some((f.get(11)?.parse::<f64>().ok()? + f.get(12)?.parse::<f64>().ok()?) / 100.0)
    };
    let (t0, c0) = (std::time::Instant::now(), cpu_s());
    let n = survey_grid(&grid, &opts, &MeasureOptions::default())
        .map(|v| v.len())
        .unwrap_or(0);
    let cpu = cpu_s().zip(c0).map_or(f64::NAN, |(a, b)| a - b);
    println!(
        "{n} craters from {:.0} m to {:.0} m in {:?} wall, {cpu:.2} s CPU",
        opts.diameter_min_m,
        opts.diameter_max_m,
        t0.elapsed()
    );
    let mut g = c.benchmark_group("survey_demo");
    g.sample_size(10);
    g.bench_function("survey_grid_whole_patch", |b| {
        b.iter(|| survey_grid(&grid, &opts, &MeasureOptions::default()).map(|v| v.len()))
    });
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);

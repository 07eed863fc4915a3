//! Per-crater measurement throughput on synthetic rimmed bowls (craters per second).

use craters::{measure, MeasureOptions};
use criterion::{criterion_group, criterion_main, Criterion, Throughput};
use rayon::prelude::*;
use std::sync::Arc;
use terrain::{ElevationGrid, GridGeometry, LocalFrame, MapProjection, MOON_RADIUS_M};

const PIXEL_M: f64 = 30.0;
const SIDE: usize = 16; // craters per side
const CELL_PX: usize = 80; // grid cell per crater

/// A field of SIDE x SIDE rimmed paraboloids 12-36 px across at 16 N, and their centres.
fn field() -> (ElevationGrid, Vec<(f64, f64, f64)>) {
    let n = SIDE * CELL_PX;
    let y_c = MOON_RADIUS_M * 16f64.to_radians();
    let geometry = GridGeometry {
        width: n,
        height: n,
        geotransform: [
            -(n as f64) / 2.0 * PIXEL_M,
            PIXEL_M,
            0.0,
            y_c + n as f64 / 2.0 * PIXEL_M,
            0.0,
            -PIXEL_M,
        ],
        projection: MapProjection::Equirectangular {
            lon0_deg: 180.0,
            lat_ts_deg: 0.0,
            false_easting_m: 0.0,
            false_northing_m: 0.0,
        },
        body_radius_m: MOON_RADIUS_M,
    };
    let mut craters = Vec::new();
    let mut heights = vec![0f32; n * n];
    for cj in 0..SIDE {
        for ci in 0..SIDE {
            let d_px = 12.0 + 24.0 * ((ci * SIDE + cj) % 7) as f64 / 6.0;
            let (cc, cr) = (
                (ci * CELL_PX + CELL_PX / 2) as f64 + 0.3,
                (cj * CELL_PX + CELL_PX / 2) as f64 + 0.6,
            );
            let (lon, lat) = geometry.pixel_to_lonlat(cc, cr).expect("lonlat");
            let frame = LocalFrame::new(MOON_RADIUS_M, lon, lat);
            let rr = d_px * PIXEL_M / 2.0;
            for r in cj * CELL_PX..(cj + 1) * CELL_PX {
                for c in ci * CELL_PX..(ci + 1) * CELL_PX {
                    let (plon, plat) = geometry
                        .pixel_to_lonlat(c as f64 + 0.5, r as f64 + 0.5)
                        .expect("lonlat");
                    let (x, y) = frame.to_local(plon, plat);
                    let rho = x.hypot(y);
                    let (d, h) = (0.2 * 2.0 * rr, 0.036 * 2.0 * rr);
                    heights[r * n + c] = if rho <= rr {
                        h - d + d * (rho / rr).powi(2)
                    } else {
                        h * (rr / rho).powi(3)
                    } as f32;
                }
            }
            craters.push((lon, lat, 2.0 * rr));
        }
    }
    (
        ElevationGrid {
            geometry: Arc::new(geometry),
            col0: 0,
            row0: 0,
            width: n,
            height: n,
            heights_m: heights,
        },
        craters,
    )
}

fn bench(c: &mut Criterion) {
    let (grid, craters) = field();
    let opts = MeasureOptions::default();
    let ok = craters
        .iter()
        .filter(|k| measure(&grid, k.0, k.1, 1.1 * k.2, &opts).is_ok())
        .count();
    println!("{ok} of {} synthetic craters measured", craters.len());
    // On-CPU time of this thread (Linux scheduler statistics, ns): unlike the wall clock it
    // does not grow when other processes share the cores.
    let on_cpu_ns = || {
        std::fs::read_to_string("/proc/thread-self/schedstat")
            .ok()
            .and_then(|s| s.split_whitespace().next()?.parse::<f64>().ok())
    };
    if let Some(t0) = on_cpu_ns() {
        let rounds = 20;
        for _ in 0..rounds {
            std::hint::black_box(
                craters
                    .iter()
                    .filter_map(|k| measure(&grid, k.0, k.1, 1.1 * k.2, &opts).ok())
                    .count(),
            );
        }
        if let Some(t1) = on_cpu_ns() {
            let per = (t1 - t0) / (rounds * craters.len()) as f64;
            println!(
                "on-CPU time {:.1} us per crater, {:.0} craters per CPU-second (one thread)",
                per / 1e3,
                1e9 / per
            );
        }
    }
    let mut g = c.benchmark_group("measure");
    g.throughput(Throughput::Elements(craters.len() as u64));
    g.bench_function("one_thread", |b| {
        b.iter(|| {
            craters
                .iter()
                .filter_map(|k| measure(&grid, k.0, k.1, 1.1 * k.2, &opts).ok())
                .count()
        })
    });
    g.bench_function("rayon", |b| {
        b.iter(|| {
            craters
                .par_iter()
                .filter_map(|k| measure(&grid, k.0, k.1, 1.1 * k.2, &opts).ok())
                .count()
        })
    });
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);

//! Real data: large lunar craters on LOLA's LDEM_4 (about 7.6 km pixels), detected and measured
//! and compared with the IAU Gazetteer of Planetary Nomenclature.
//!
//! Check values: centre latitude, east longitude and diameter as listed by the IAU Gazetteer of
//! Planetary Nomenclature (USGS Astrogeology), all from memory: nobody here could check the
//! printed values, so tolerances are the matching rule (centre within 0.25 D, diameter
//! within 20%), far wider than any likely slip of memory.

use craters::{measure, survey_grid, DetectOptions, MeasureOptions};
use std::path::PathBuf;
use std::sync::Arc;
use terrain::{Dem, ElevationGrid, OpenOptions};

/// (name, latitude deg, east longitude deg, diameter km): IAU Gazetteer, from memory.
const GAZETTEER: &[(&str, f64, f64, f64)] = &[
    ("Copernicus", 9.62, 339.92, 96.07),
    ("Tycho", -43.31, 348.64, 85.29),
    ("Plato", 51.62, 350.62, 100.68),
    ("Theophilus", -11.45, 26.28, 98.59),
    ("Langrenus", -8.86, 61.04, 131.98),
    ("Petavius", -25.33, 60.79, 184.0),
    ("Ptolemaeus", -9.16, 358.16, 153.67),
    ("Clavius", -58.62, 345.27, 230.8),
    ("Humboldt", -27.2, 80.9, 207.0),
    ("Tsiolkovskiy", -20.38, 129.1, 185.0),
    ("Gassendi", -17.55, 320.04, 110.0),
    ("Daedalus", -5.9, 179.4, 93.0),
    ("Arzachel", -18.2, 358.1, 96.0),
    ("Alphonsus", -13.39, 357.15, 110.5),
    ("Aristoteles", 50.24, 17.32, 87.6),
    ("Longomontanus", -49.5, 338.1, 145.0),
    ("Hilbert", -17.9, 108.2, 151.0),
    ("Icarus", -5.3, 186.8, 96.0),
];

fn lola_dir() -> Option<PathBuf> {
    let dir = std::env::var_os("QUIETBOWL_LOLA_DIR")
        .map(PathBuf::from)
        .unwrap_or_else(|| {
            PathBuf::from(concat!(
                env!("CARGO_MANIFEST_DIR"),
                "/../../../shared/data/lola-ldem4"
            ))
        });
    dir.join("LDEM_4.LBL").exists().then_some(dir)
}

/// A window of the global grid around (lon, lat), wrapping across the 0/360 seam (the grid
/// covers every longitude, so columns past the last one are the first ones again).
fn window(all: &ElevationGrid, lon: f64, lat: f64, half_m: f64) -> ElevationGrid {
    let geom = all.geometry.clone();
    let (c, r) = geom.lonlat_to_pixel(lon, lat).expect("pixel");
    let (dx, dy) = geom.pixel_size_m_at(c, r).expect("pixel size");
    let (hx, hy) = ((half_m / dx).ceil() as isize, (half_m / dy).ceil() as isize);
    let (c0, r0) = (c as isize - hx, r as isize - hy);
    let (w, h) = ((2 * hx) as usize, (2 * hy) as usize);
    let mut heights_m = vec![f32::NAN; w * h];
    for j in 0..h {
        let rr = r0 + j as isize;
        if rr < 0 || rr >= all.height as isize {
            continue;
        }
        for i in 0..w {
            let cc = (c0 + i as isize).rem_euclid(all.width as isize) as usize;
            heights_m[j * w + i] = all.heights_m[rr as usize * all.width + cc];
        }
    }
    ElevationGrid {
        geometry: Arc::new((*geom).clone()),
        col0: c0,
        row0: r0,
        width: w,
        height: h,
        heights_m,
    }
}

fn matches(m: &craters::CraterMeasurement, lon: f64, lat: f64, d_m: f64) -> bool {
    let off = terrain::geodesy::distance_m(
        terrain::MOON_RADIUS_M,
        (m.centre_lon_deg, m.centre_lat_deg),
        (lon, lat),
    );
    off <= 0.25 * d_m && (m.diameter_m / d_m - 1.0).abs() <= 0.2
}

#[test]
fn large_craters_on_lola_ldem4_match_the_iau_gazetteer() {
    let Some(dir) = lola_dir() else {
        println!("SKIPPED: LOLA LDEM_4 not found (set QUIETBOWL_LOLA_DIR or place it in ../shared/data/lola-ldem4)");
        return;
    };
    let dem = Dem::open(dir.join("LDEM_4.LBL"), &OpenOptions::default()).expect("open LDEM_4");
    let all = dem.read_all().expect("read LDEM_4");
    let detect_opts = DetectOptions {
        diameter_min_m: 60_000.0,
        diameter_max_m: 400_000.0,
        ..DetectOptions::default()
    };
    let (mut detected, mut seeded) = (0, 0);
    for &(name, lat, lon_e, d_km) in GAZETTEER {
        let d_m = d_km * 1000.0;
        let lon = terrain::projection::wrap_deg_180(lon_e);
        let g = window(&all, lon, lat, 2.5 * d_m);
        let found = survey_grid(&g, &detect_opts, &MeasureOptions::default()).expect("survey");
        let hit = found.iter().find(|m| matches(m, lon, lat, d_m));
        let seed = measure(&g, lon, lat, d_m, &MeasureOptions::default());
        let seed_ok = seed.as_ref().is_ok_and(|m| matches(m, lon, lat, d_m));
        println!(
            "{name:14} D {d_km:6.1} km  detected: {}  seeded: {}",
            hit.map_or("no".to_string(), |m| format!(
                "D {:6.1} km d/D {:.3} completeness {:.2}",
                m.diameter_m / 1e3,
                m.depth_to_diameter,
                m.rim_completeness
            )),
            match &seed {
                Ok(m) => format!(
                    "D {:6.1} km{}",
                    m.diameter_m / 1e3,
                    if seed_ok { "" } else { " (no match)" }
                ),
                Err(e) => format!("error {e}"),
            }
        );
        detected += hit.is_some() as usize;
        seeded += seed_ok as usize;
    }
    let n = GAZETTEER.len() as f64;
    let (recall, seed_recall) = (detected as f64 / n, seeded as f64 / n);
    println!("LOLA LDEM_4 recall: detected {detected}/{} = {recall:.2}; measured from gazetteer seeds {seeded}/{} = {seed_recall:.2}", GAZETTEER.len(), GAZETTEER.len());
    assert!(recall >= 0.8, "detection recall {recall:.2} below 0.8");
    assert!(
        seed_recall >= 0.8,
        "seeded measurement recall {seed_recall:.2} below 0.8"
    );
}

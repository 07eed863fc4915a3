//! Diagnostics on the demo terrain: for every planted crater of 8 px and more, was it proposed,
//! can it be measured from its planted position, and does the measurement pass the gates.
//! `cargo run --release -p quietbowl-craters --example demo_eval [DEMO_DIR]`

use craters::{detect, looks_like_crater, measure, DetectOptions, MeasureOptions};
use serde_json::Value;

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let dir = std::env::args().nth(1).unwrap_or_else(|| concat!(env!("CARGO_MANIFEST_DIR"), "/../../demo-terrain").to_string());
    let truth: Value = serde_json::from_str(&std::fs::read_to_string(format!("{dir}/truth.json"))?)?;
    let dem = terrain::Dem::open(format!("{dir}/farside-patch.tif"), &Default::default())?;
    let grid = dem.read_all()?;
    let opts = DetectOptions { diameter_min_m: 192.0, diameter_max_m: 10_000.0, ..DetectOptions::default() };
    let t = std::time::Instant::now();
    let dets = detect(&grid, &opts)?;
    println!("{} proposals in {:?}", dets.len(), t.elapsed());
    if let Ok(path) = std::env::var("QB_PROPOSALS") {
        let mut out = String::from("lon,lat,d,score,cue\n");
        for p in &dets {
            out += &format!("{},{},{:.1},{:.4},{:?}\n", p.lon_deg, p.lat_deg, p.diameter_m, p.score, p.cue);
        }
        std::fs::write(path, out)?;
    }
    let r = terrain::MOON_RADIUS_M;
    let (mut n, mut proposed, mut seeded_ok, mut seeded_gate) = (0, 0, 0, 0);
    let mut reasons = std::collections::BTreeMap::new();
    for c in truth["craters"].as_array().ok_or("no craters")? {
        let (lon, lat, d) = (c["lon_deg"].as_f64().unwrap_or(0.0), c["lat_deg"].as_f64().unwrap_or(0.0), c["rim_crest_diameter_m"].as_f64().unwrap_or(0.0));
        if d < 240.0 {
            continue;
        }
        let Some((col, row)) = grid.geometry.lonlat_to_pixel(lon, lat) else { continue };
        let m = 0.75 * d / 30.0;
        if col < m || row < m || col > 2000.0 - m || row > 2000.0 - m {
            continue;
        }
        n += 1;
        let near = dets.iter().any(|p| terrain::geodesy::distance_m(r, (p.lon_deg, p.lat_deg), (lon, lat)) < 0.25 * d && (p.diameter_m / d).ln().abs() < 0.7);
        proposed += near as usize;
        match measure(&grid, lon, lat, d, &MeasureOptions::default()) {
            Ok(ms) => {
                let ok = terrain::geodesy::distance_m(r, (ms.centre_lon_deg, ms.centre_lat_deg), (lon, lat)) < 0.25 * d && (ms.diameter_m / d - 1.0).abs() < 0.2;
                seeded_ok += ok as usize;
                let gate = looks_like_crater(&ms, &opts);
                seeded_gate += (ok && gate) as usize;
                if !ok {
                    *reasons.entry(format!("mismatch {}", if ms.diameter_m > d { "bigger" } else { "smaller" })).or_insert(0) += 1;
                } else if !gate {
                    let why = if ms.rim_completeness < 0.35 { "completeness" } else if ms.rim_fit_rms_m > 0.06 * ms.diameter_m { "rms" } else if ms.depth_to_diameter < 0.2 * craters::fresh_depth_to_diameter(ms.diameter_m) { "shallow" } else { "other" };
                    *reasons.entry(format!("gate {why}")).or_insert(0) += 1;
                }
                // Measured over planted rim-crest diameter by degradation (QB_RATIO=1).
                if std::env::var_os("QB_RATIO").is_some() {
                    println!("ratio {} {:.4} {:.4} {:.4} {:.3} {:.3}", c["degradation"].as_str().unwrap_or("?"), c["kappa_t_m2"].as_f64().unwrap_or(0.0) / (c["diameter_m"].as_f64().unwrap_or(1.0) / 2.0).powi(2), ms.diameter_m / d, d / c["diameter_m"].as_f64().unwrap_or(1.0), ms.rim_completeness, ms.depth_to_diameter);
                }
                if std::env::var_os("QB_VERBOSE").is_some() && !(ok && gate) {
                    println!("  id {} D {:.0} kappa/R2 {:.3}: got D {:.0} off {:.0} compl {:.2} rms/D {:.3} d/D {:.3} (true {:.3})", c["id"], d, c["kappa_t_m2"].as_f64().unwrap_or(0.0) / (c["diameter_m"].as_f64().unwrap_or(1.0) / 2.0).powi(2), ms.diameter_m, terrain::geodesy::distance_m(r, (ms.centre_lon_deg, ms.centre_lat_deg), (lon, lat)), ms.rim_completeness, ms.rim_fit_rms_m / ms.diameter_m, ms.depth_to_diameter, c["depth_m"].as_f64().unwrap_or(0.0) / d);
                }
            }
            Err(e) => {
                let s = e.to_string();
                let key = s.split(": ").last().unwrap_or("").to_string();
                *reasons.entry(key).or_insert(0) += 1;
            }
        }
    }
    if let Ok(path) = std::env::var("QB_DUMP") {
        let all = craters::survey_grid(&grid, &opts, &MeasureOptions::default())?;
        let mut out = String::from("lon,lat,d,dd,compl,gap,rms_d,sd_depth,ell,relief_depth,valid,matched\n");
        let planted: Vec<(f64, f64, f64)> = truth["craters"].as_array().ok_or("no craters")?.iter().map(|c| (c["lon_deg"].as_f64().unwrap_or(0.0), c["lat_deg"].as_f64().unwrap_or(0.0), c["rim_crest_diameter_m"].as_f64().unwrap_or(0.0))).collect();
        for m in &all {
            let matched = planted.iter().any(|p| terrain::geodesy::distance_m(r, (m.centre_lon_deg, m.centre_lat_deg), (p.0, p.1)) <= 0.25 * p.2 && (m.diameter_m / p.2 - 1.0).abs() <= 0.2);
            out += &format!("{},{},{:.1},{:.4},{:.3},{:.1},{:.4},{:.3},{:.3},{:.3},{:.3},{}\n", m.centre_lon_deg, m.centre_lat_deg, m.diameter_m, m.depth_to_diameter, m.rim_completeness, m.rim_gap_deg, m.rim_fit_rms_m / m.diameter_m, m.rim_height_sd_m / m.depth_m, m.ellipticity, m.rim_relief_m / m.depth_m, m.valid_fraction, matched as u8);
        }
        std::fs::write(path, out)?;
    }
    println!("{n} planted >= 8 px inside: proposed {proposed}, seeded measurement matches {seeded_ok}, and passes gates {seeded_gate}");
    println!("{reasons:#?}");
    Ok(())
}

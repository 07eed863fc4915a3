//! Detection + measurement + merge over one window of analytic craters, including a crater
//! nested on a larger crater's floor and one with a breached rim.

mod common;
use common::*;
use craters::{survey_grid, DetectOptions, MeasureOptions};

struct Planted {
    x: f64,
    y: f64,
    d: f64,
    breach: bool,
}

const PLANTED: [Planted; 4] = [
    Planted {
        x: 0.0,
        y: 0.0,
        d: 4500.0,
        breach: false,
    },
    Planted {
        x: 450.0,
        y: -300.0,
        d: 600.0,
        breach: false,
    }, // on the big crater's floor
    Planted {
        x: -3900.0,
        y: 3900.0,
        d: 900.0,
        breach: false,
    },
    Planted {
        x: 3800.0,
        y: -3700.0,
        d: 1500.0,
        breach: true,
    },
];

fn height(x: f64, y: f64) -> f64 {
    let mut z = 0.0;
    for p in &PLANTED {
        let (u, v) = (x - p.x, y - p.y);
        let r = u.hypot(v);
        let mut c = rimmed_bowl(r, p.d / 2.0, 0.18 * p.d, 0.03 * p.d);
        if p.breach {
            let az = azimuth(u, v);
            if az > 180.0 && az < 260.0 {
                let floor = 0.03 * p.d - 0.18 * p.d;
                c = c.min(floor * (1.0 - (r / p.d).min(1.0)));
            }
        }
        z += c;
    }
    // Gentle regional slope and deterministic small-scale texture.
    z + 0.01 * x + 0.8 * ((x / 97.0).sin() * (y / 131.0).cos())
}

#[test]
fn survey_finds_planted_craters_including_nested_and_breached_ones() {
    let g = grid_around(420, 420, 16.0, 180.0, 16.0, height);
    let opts = DetectOptions {
        diameter_min_m: 400.0,
        diameter_max_m: 6000.0,
        ..DetectOptions::default()
    };
    let found = survey_grid(&g, &opts, &MeasureOptions::default()).expect("survey");
    for p in &PLANTED {
        let (lon, lat) = lonlat(180.0, 16.0, p.x, p.y);
        let hit = found.iter().find(|m| {
            dist((m.centre_lon_deg, m.centre_lat_deg), (lon, lat)) < 0.25 * p.d
                && (m.diameter_m / p.d - 1.0).abs() < 0.2
        });
        let m = hit.unwrap_or_else(|| {
            panic!(
                "missed crater D={} at ({}, {}); found {:?}",
                p.d,
                p.x,
                p.y,
                found
                    .iter()
                    .map(|m| (m.diameter_m as i64, m.centre_lon_deg, m.centre_lat_deg))
                    .collect::<Vec<_>>()
            )
        });
        if p.breach {
            assert!(
                m.rim_completeness < 0.9 && m.rim_gap_deg >= 60.0,
                "breach not seen: {} {}",
                m.rim_completeness,
                m.rim_gap_deg
            );
        }
    }
    assert!(
        found.len() <= PLANTED.len() + 1,
        "{} craters reported for 4 planted: {:?}",
        found.len(),
        found
            .iter()
            .map(|m| (
                m.diameter_m as i64,
                m.depth_to_diameter,
                m.rim_completeness,
                m.centre_lon_deg,
                m.centre_lat_deg
            ))
            .collect::<Vec<_>>()
    );
}

//! `quietbowl site <DEM> --at LON,LAT`: the visibility report of one point.

use anyhow::{bail, Context};
use std::path::PathBuf;
use terrain::{Dem, OpenOptions};
use visibility::{NodataRule, VisibilityOptions};

#[derive(clap::Args)]
pub struct Args {
    /// The DEM whose terrain shapes the horizon.
    dem: PathBuf,
    /// The site, as LON,LAT in degrees (east longitude, -180..180 or 0..360).
    #[arg(long, value_name = "LON,LAT", allow_hyphen_values = true)]
    at: String,
    /// Print JSON instead of text.
    #[arg(long)]
    json: bool,
    /// Read a hole in the DEM on the way to the horizon as no lower than the ground around it
    /// (by default a hole shields nothing, as if it were a notch).
    #[arg(long)]
    horizon_nodata_skip: bool,
}

fn parse_at(s: &str) -> anyhow::Result<(f64, f64)> {
    let (lon, lat) = s
        .split_once(',')
        .context("--at takes LON,LAT, e.g. --at 180,16")?;
    let lon: f64 = lon
        .trim()
        .parse()
        .with_context(|| format!("longitude '{lon}' is not a number"))?;
    let lat: f64 = lat
        .trim()
        .parse()
        .with_context(|| format!("latitude '{lat}' is not a number"))?;
    if !(lon.is_finite() && lat.is_finite() && (-90.0..=90.0).contains(&lat)) {
        bail!("--at {s}: latitude must lie in -90..90 and both must be finite");
    }
    Ok((lon, lat))
}

pub fn run(a: Args) -> anyhow::Result<()> {
    let (lon, lat) = parse_at(&a.at)?;
    let dem = Dem::open(&a.dem, &OpenOptions::default())
        .with_context(|| format!("reading {}", a.dem.display()))?;
    let opts = VisibilityOptions {
        horizon_nodata: if a.horizon_nodata_skip {
            NodataRule::Skip
        } else {
            NodataRule::CountsAgainst
        },
        ..VisibilityOptions::default()
    };
    // Read the terrain around the site out to the horizon distance (or the whole DEM if smaller).
    let g = dem.geometry();
    let (col, row) = g
        .lonlat_to_pixel(lon, lat)
        .context("the site is outside the DEM's projection")?;
    let (px_ew, px_ns) = dem.info().pixel_size_m;
    let reach_px = |px: f64| (opts.horizon_max_distance_m / px).ceil().min(20_000.0) as isize;
    let (rx, ry) = (reach_px(px_ew), reach_px(px_ns));
    let grid = dem
        .read_window(
            col as isize - rx,
            row as isize - ry,
            (2 * rx + 1) as usize,
            (2 * ry + 1) as usize,
        )
        .ok();
    if grid.is_none() {
        eprintln!("note: the site lies outside the DEM; the horizon is the bare sphere's");
    }
    let report = visibility::site_report(lon, lat, grid.as_ref(), &opts)?;
    if a.json {
        println!("{}", serde_json::to_string_pretty(&report)?);
    } else {
        print!("{}", report.to_text());
    }
    Ok(())
}

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
    /// Operations inputs for the figures at the point (a TOML file with an [operations]
    /// table, such as a criteria file). Default: the built-in values.
    #[arg(long, value_name = "FILE", conflicts_with = "no_operations")]
    operations: Option<PathBuf>,
    /// Leave out the operations figures (landing round the point, relay, night).
    #[arg(long)]
    no_operations: bool,
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
    let ops = if a.no_operations {
        None
    } else {
        operations_at(&a, grid.as_ref(), lon, lat)?
    };
    if a.json {
        let mut v = serde_json::to_value(&report)?;
        if let (Some(map), Some((_, o))) = (v.as_object_mut(), &ops) {
            map.insert("operations".into(), serde_json::to_value(o)?);
        }
        println!("{}", serde_json::to_string_pretty(&v)?);
    } else {
        print!("{}", report.to_text_body());
        if let Some((inputs, o)) = &ops {
            print!("{}", o.to_text(inputs));
        }
        println!("\n{}", report.caution);
    }
    Ok(())
}

/// Landing round the point (the point as the aim), relay and night there; `None` (with a note)
/// when the point has no terrain.
fn operations_at(
    a: &Args,
    grid: Option<&terrain::ElevationGrid>,
    lon: f64,
    lat: f64,
) -> anyhow::Result<Option<(operations::OperationsInputs, operations::OperationsReport)>> {
    let inputs = match &a.operations {
        Some(path) => super::survey::read_operations(path)?,
        None => operations::OperationsInputs::default(),
    };
    let post_m = grid
        .and_then(|g| g.geometry.pixel_size_m())
        .map(|(a, b)| a.min(b))
        .filter(|p| p.is_finite() && *p > 0.0);
    let (Some(grid), Some(post_m)) = (grid, post_m) else {
        eprintln!("note: no terrain at the site; the operations figures need it and are left out");
        return Ok(None);
    };
    let ops = operations::Operations::new(&inputs, None)?;
    let report = ops.for_point(grid, post_m, lon, lat);
    if report.is_none() {
        eprintln!("note: the DEM has no height at the site; the operations figures are left out");
    }
    Ok(report.map(|r| (inputs, r)))
}

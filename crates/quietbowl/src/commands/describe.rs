//! `quietbowl describe <DEM>`: what the tool understood of a file.

use super::bar;
use anyhow::Context;
use serde::Serialize;
use std::path::PathBuf;
use terrain::ingest::RasterStats;
use terrain::{Dem, DemInfo, MapProjection, OpenOptions};

#[derive(clap::Args)]
pub struct Args {
    /// Any raster GDAL reads: GeoTIFF, PDS3 label, PDS4, ISIS3 cube, VRT, JPEG2000.
    dem: PathBuf,
    /// Print JSON instead of text.
    #[arg(long)]
    json: bool,
    /// Take heights as above a sphere of this radius (m), whatever the CRS says: for files whose
    /// CRS names the wrong body.
    #[arg(long, value_name = "METRES")]
    assume_body_radius: Option<f64>,
}

#[derive(Serialize)]
struct Description<'a> {
    info: &'a DemInfo,
    stats: RasterStats,
}

fn projection_text(p: &MapProjection) -> String {
    match p {
        MapProjection::Geographic => "geographic (longitude/latitude in degrees)".into(),
        MapProjection::Equirectangular {
            lon0_deg,
            lat_ts_deg,
            ..
        } => format!(
            "equirectangular, centre longitude {lon0_deg}, true scale at latitude {lat_ts_deg}"
        ),
        MapProjection::PolarStereographic {
            south,
            lon0_deg,
            lat_ts_deg,
            ..
        } => format!(
            "{} polar stereographic, longitude {lon0_deg} down, true scale at {lat_ts_deg}",
            if *south { "south" } else { "north" }
        ),
        MapProjection::Orthographic {
            lon0_deg, lat0_deg, ..
        } => format!("orthographic centred on {lon0_deg}, {lat0_deg}"),
    }
}

pub fn run(a: Args) -> anyhow::Result<()> {
    let dem = Dem::open(
        &a.dem,
        &OpenOptions {
            assume_body_radius_m: a.assume_body_radius,
        },
    )
    .with_context(|| format!("reading {}", a.dem.display()))?;
    let info = dem.info();
    let pb = bar(info.height as u64, "scanning heights");
    if a.json {
        pb.set_draw_target(indicatif::ProgressDrawTarget::hidden());
    }
    let stats = dem
        .scan_stats(|done, _| pb.set_position(done as u64))
        .with_context(|| format!("reading heights from {}", a.dem.display()))?;
    pb.finish_and_clear();
    if a.json {
        println!(
            "{}",
            serde_json::to_string_pretty(&Description { info, stats })?
        );
        return Ok(());
    }
    let km = |m: f64| format!("{:+.2} km", m / 1000.0);
    println!("file          {}", info.path.display());
    println!("driver        {}", info.driver);
    println!(
        "size          {} x {} px, {} band",
        info.width, info.height, info.data_type
    );
    let authority = match (&info.crs_authority, info.crs_authority_recognised) {
        (Some(a), false) => a.clone(),
        (Some(a), true) => format!("same definition as {a}; the file itself carries no code"),
        (None, _) => "no authority code".into(),
    };
    println!(
        "CRS           {} [{authority}]",
        info.crs_name.as_deref().unwrap_or("unnamed")
    );
    println!(
        "projection    {}",
        projection_text(&info.geometry.projection)
    );
    println!(
        "body          {}, reference sphere {} m{}",
        info.body.name(),
        info.body_radius_m,
        if info.body_radius_overridden {
            " (given with --assume-body-radius)"
        } else {
            ""
        }
    );
    println!(
        "pixel size    {:.2} m east-west x {:.2} m north-south (ground, at the raster centre)",
        info.pixel_size_m.0, info.pixel_size_m.1
    );
    println!("heights       {}", info.height_convention.explain());
    match (stats.min_m, stats.max_m) {
        (Some(lo), Some(hi)) => println!(
            "value range   {lo:.1} m .. {hi:.1} m ({} .. {}) above the reference sphere",
            km(lo),
            km(hi)
        ),
        _ => println!("value range   none: every pixel is nodata"),
    }
    println!(
        "valid         {:.2} % of pixels",
        stats.valid_fraction * 100.0
    );
    if let Some(nd) = info.nodata {
        println!("nodata value  {nd}");
    }
    let (lo, hi) = info.lon_range_deg;
    let convention = if hi > 180.0 + 1e-6 {
        "0..360 east"
    } else {
        "-180..180"
    };
    println!(
        "extent        lon {lo:.4} .. {hi:.4} ({convention}), lat {:.4} .. {:.4}{}",
        info.lat_range_deg.0,
        info.lat_range_deg.1,
        if info.crosses_180 {
            "; straddles the 180 meridian"
        } else {
            ""
        }
    );
    Ok(())
}

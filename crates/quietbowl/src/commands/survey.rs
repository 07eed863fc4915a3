//! `quietbowl survey <DEM> --out survey.json`: find and measure every crater in a range.

use super::bar;
use crate::diameter_range;
use anyhow::Context;
use craters::catalogue::OnBadRow;
use std::path::PathBuf;
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::Arc;
use std::time::Instant;
use survey::{RunOptions, SurveyError};
use terrain::OpenOptions;

#[derive(clap::Args)]
pub struct Args {
    /// The DEM to survey.
    dem: PathBuf,
    /// Diameter range, MIN..MAX in metres or with km (e.g. 800..2000, 0.5km..8km). Default:
    /// 3 pixels up to a third of a tile.
    #[arg(long, value_name = "MIN..MAX", value_parser = diameter_range::parse)]
    diameter: Option<(Option<f64>, Option<f64>)>,
    /// Crater list to measure: CSV (lon_deg, lat_deg, diameter_m or diameter_km; separated by
    /// commas, semicolons or tabs), GeoJSON points or polygons, or any vector file OGR reads.
    #[arg(long, value_name = "FILE")]
    catalogue: Option<PathBuf>,
    /// Skip catalogue rows that cannot be read (each is reported with its line) instead of stopping.
    #[arg(long)]
    skip_bad_rows: bool,
    /// Measure only the catalogue's craters; do not detect.
    #[arg(long, requires = "catalogue")]
    catalogue_only: bool,
    /// Leave out the Earth and sky visibility columns.
    #[arg(long)]
    no_visibility: bool,
    /// Read a hole in the DEM on the way to the horizon as no lower than the ground around it
    /// (by default a hole shields nothing, as if it were a notch).
    #[arg(long)]
    horizon_nodata_skip: bool,
    /// Tile core size in pixels.
    #[arg(long, default_value_t = 2048, value_name = "PX")]
    tile: usize,
    /// Take heights as above a sphere of this radius (m), whatever the CRS says.
    #[arg(long, value_name = "METRES")]
    assume_body_radius: Option<f64>,
    /// Working-memory budget for tile windows, e.g. 2G or 512M (the tile size shrinks to fit).
    #[arg(long, default_value = "2G", value_name = "SIZE", value_parser = parse_memory)]
    memory: usize,
    /// Survey only share K of N of the tiles (for running on several machines; combine the
    /// outputs with `quietbowl merge`).
    #[arg(long, value_name = "K/N", value_parser = survey::Shard::parse)]
    shard: Option<survey::Shard>,
    /// The structure to fit into every candidate (TOML: aperture_m, shape, anchors,
    /// min_clearance_m, max_anchor_height_difference_m). Default: a 350 m paraboloid, f/D 0.5.
    #[arg(long, value_name = "FILE", conflicts_with = "no_structure")]
    structure: Option<PathBuf>,
    /// Do not fit a structure.
    #[arg(long)]
    no_structure: bool,
    /// Operations inputs (landing limits, launcher, relay orbit and margin): a TOML file with
    /// an [operations] table, such as a criteria file. Default: the built-in values, those of
    /// assets/criteria/reflector-1km.toml.
    #[arg(long, value_name = "FILE", conflicts_with = "no_operations")]
    operations: Option<PathBuf>,
    /// Do not compute the operations figures (landing, anchor shots, relay, night).
    #[arg(long)]
    no_operations: bool,
    /// Do not keep a checkpoint of finished tiles beside the output.
    #[arg(long)]
    no_checkpoint: bool,
    /// Where to write the survey (JSON).
    #[arg(long, value_name = "FILE")]
    out: PathBuf,
}

/// `2G`, `512M`, `1500000000`.
fn parse_memory(s: &str) -> Result<usize, String> {
    let t = s.trim();
    let (num, mult) = match t.chars().last() {
        Some('G' | 'g') => (&t[..t.len() - 1], 1usize << 30),
        Some('M' | 'm') => (&t[..t.len() - 1], 1usize << 20),
        _ => (t, 1usize),
    };
    let v: f64 = num
        .parse()
        .map_err(|_| format!("'{s}' is not a memory size (examples: 2G, 512M)"))?;
    if !(v.is_finite() && v > 0.0) {
        return Err(format!("'{s}' must be a positive size"));
    }
    Ok((v * mult as f64) as usize)
}

/// The `[operations]` table of a TOML file (missing keys take their defaults), with a
/// relative relay-orbit CSV path made relative to the file's folder.
pub fn read_operations(path: &std::path::Path) -> anyhow::Result<operations::OperationsInputs> {
    #[derive(serde::Deserialize)]
    struct WithTable {
        operations: Option<operations::OperationsInputs>,
    }
    let text =
        std::fs::read_to_string(path).with_context(|| format!("reading {}", path.display()))?;
    let mut doc: toml::Table =
        toml::from_str(&text).with_context(|| format!("{} is not a TOML file", path.display()))?;
    // Only the one table matters here; the rest (a criteria file's) is not ours to judge.
    doc.retain(|k, _| k == "operations");
    let table: WithTable = doc
        .try_into()
        .with_context(|| format!("{}: the [operations] table", path.display()))?;
    let mut inputs = table
        .operations
        .with_context(|| format!("{} has no [operations] table", path.display()))?;
    inputs
        .validate()
        .map_err(|e| anyhow::anyhow!("{}: operations: {e}", path.display()))?;
    if let Some(csv) = &inputs.relay_orbit_csv {
        let p = std::path::Path::new(csv);
        if p.is_relative() {
            let base = path.parent().unwrap_or(std::path::Path::new(""));
            inputs.relay_orbit_csv = Some(base.join(p).display().to_string());
        }
    }
    Ok(inputs)
}

pub fn run(a: Args) -> anyhow::Result<()> {
    super::ensure_writable(&a.out).context("writing the survey")?;
    let (dmin, dmax) = a.diameter.unwrap_or((None, None));
    let structure = match (&a.structure, a.no_structure) {
        (_, true) => None,
        (Some(path), false) => {
            let text = std::fs::read_to_string(path)
                .with_context(|| format!("reading {}", path.display()))?;
            let spec: structure::StructureSpec = toml::from_str(&text)
                .with_context(|| format!("{} is not a structure description", path.display()))?;
            Some(spec)
        }
        (None, false) => Some(structure::StructureSpec::default()),
    };
    let operations = if a.no_operations {
        None
    } else {
        Some(match &a.operations {
            Some(path) => read_operations(path)?,
            None => operations::OperationsInputs::default(),
        })
    };
    let opts = RunOptions {
        diameter_min_m: dmin,
        diameter_max_m: dmax,
        tile_px: a.tile,
        catalogue: a.catalogue.clone(),
        catalogue_on_bad_row: if a.skip_bad_rows {
            OnBadRow::Skip
        } else {
            OnBadRow::Stop
        },
        detect: !a.catalogue_only,
        visibility: !a.no_visibility,
        visibility_options: visibility::VisibilityOptions {
            horizon_nodata: if a.horizon_nodata_skip {
                visibility::NodataRule::Skip
            } else {
                visibility::NodataRule::CountsAgainst
            },
            ..visibility::VisibilityOptions::default()
        },
        open: OpenOptions {
            assume_body_radius_m: a.assume_body_radius,
        },
        memory_budget_bytes: a.memory,
        shard: a.shard,
        checkpoint: (!a.no_checkpoint).then(|| survey::checkpoint::path_beside(&a.out)),
        structure,
        operations,
    };
    let cancel = Arc::new(AtomicBool::new(false));
    {
        let cancel = cancel.clone();
        // A second Ctrl-C while the first is being honoured ends the process at once.
        let _ = ctrlc::set_handler(move || {
            if cancel.swap(true, Ordering::SeqCst) {
                std::process::exit(130);
            }
            eprintln!("\ncancelling after the tiles in progress; nothing will be written");
        });
    }
    let pb = bar(0, "surveying tiles");
    let start = Instant::now();
    let outcome = survey::run(
        &a.dem,
        &opts,
        &|p| {
            pb.set_length(p.tiles_total as u64);
            pb.set_position(p.tiles_done as u64);
            pb.set_message(format!("surveying tiles, {} candidates", p.candidates));
        },
        &cancel,
    );
    pb.finish_and_clear();
    let outcome = match outcome {
        Err(SurveyError::Cancelled) => {
            eprintln!("survey cancelled; {} was not written", a.out.display());
            if let Some(cp) = &opts.checkpoint {
                eprintln!(
                    "finished tiles are kept in {}: run the same command again to resume",
                    cp.display()
                );
            }
            std::process::exit(130);
        }
        r => r.with_context(|| format!("surveying {}", a.dem.display()))?,
    };
    for p in &outcome.skipped_rows {
        eprintln!("skipped catalogue line {}: {}", p.line, p.reason);
    }
    outcome
        .survey
        .write(&a.out)
        .with_context(|| format!("writing {}", a.out.display()))?;
    if let Some(cp) = &opts.checkpoint {
        let _ = std::fs::remove_file(cp);
    }
    let secs = start.elapsed().as_secs_f64();
    let n = outcome.survey.candidates.len();
    println!(
        "{n} candidates from a {} x {} px DEM in {secs:.2} s ({:.1} Mpx/s, {:.0} candidates/s{}); written to {}",
        outcome.width_px,
        outcome.height_px,
        outcome.pixels_computed as f64 / 1e6 / secs.max(1e-9),
        n as f64 / secs.max(1e-9),
        if outcome.tiles_resumed > 0 { format!(", {} tiles taken from the checkpoint", outcome.tiles_resumed) } else { String::new() },
        a.out.display()
    );
    println!("{}", siting::SCREENING_CAUTION);
    Ok(())
}

//! `quietbowl`: the command line and the workbench launcher. Parses arguments and wires the
//! library crates together; every computation lives in a library.

mod commands;
mod diameter_range;

use clap::{Parser, Subcommand};
use std::path::PathBuf;
use std::process::ExitCode;

/// Choose lunar craters to host a large far-side structure, from orbital elevation data.
#[derive(Parser)]
#[command(
    name = "quietbowl",
    version,
    about,
    long_about = None,
    after_help = format!("{}\n{}", siting::SCREENING_CAUTION, siting::VERDICT_SCOPE),
)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// Tell what the tool understood of a DEM: driver, size, CRS and body, pixel size,
    /// height convention, value range, valid fraction, extent.
    Describe(commands::describe::Args),
    /// Write the invented demo terrain (a far-side highland patch) and its ground truth.
    MakeDemoTerrain {
        /// Output folder.
        #[arg(long, default_value = "demo-terrain")]
        out: PathBuf,
    },
    /// Find and measure every crater in a diameter range, with Earth and sky visibility.
    Survey(commands::survey::Args),
    /// Print the visibility report of one point: horizon, Earth margin, sky track.
    Site(commands::site::Args),
    /// Apply criteria to a survey: requirements, weighted ranking, robustness, and exports
    /// (GeoJSON, CSV, GeoPackage).
    Rank(commands::rank::Args),
    /// Open the desktop workbench: a DEM, survey, study or criteria file, or the demo terrain.
    Workbench {
        /// File to open; default: the demo terrain (its stored survey if present).
        file: Option<PathBuf>,
        /// Select the candidate of this rank once ranked.
        #[arg(long, value_name = "N")]
        select_rank: Option<u32>,
        /// Write a PNG of the window once it is ready, then close.
        #[arg(long, value_name = "PNG")]
        screenshot: Option<PathBuf>,
    },
    /// Combine the outputs of `survey --shard K/N` into one survey file.
    Merge {
        /// Every shard's survey file, in any order.
        #[arg(required = true)]
        parts: Vec<PathBuf>,
        /// Where to write the merged survey.
        #[arg(long, value_name = "FILE")]
        out: PathBuf,
    },
}

/// Blocks of a few megabytes (a crater's lattices and pyramids, made and freed per crater on
/// every worker) are served from glibc's heaps and kept there when freed, instead of each
/// being a fresh mapping returned to the system at once: that cost a page fault per page on
/// the next crater and a TLB flush on every core per return. glibc's default threshold adapts
/// only up to the largest block freed so far; this fixes it at its ceiling (32 MB on 64-bit
/// systems, mallopt(3)) and trims the heap top only past 512 MB of slack (ours: the demo
/// survey's system time fell from about 0.9 s to 0.5 s).
#[cfg(all(target_os = "linux", target_env = "gnu"))]
fn keep_freed_blocks() {
    // SAFETY: mallopt only sets the allocator's parameters, and runs first in main, before
    // any other thread starts. A value it refuses leaves the default (return value ignored).
    unsafe {
        libc::mallopt(libc::M_MMAP_THRESHOLD, 32 << 20);
        libc::mallopt(libc::M_TRIM_THRESHOLD, 512 << 20);
    }
}

#[cfg(not(all(target_os = "linux", target_env = "gnu")))]
fn keep_freed_blocks() {}

fn main() -> ExitCode {
    keep_freed_blocks();
    let cli = Cli::parse();
    // GDAL's own messages would repeat what our errors already say, with less context.
    gdal::config::set_error_handler(|_, _, _| {});
    let result = match cli.command {
        Command::Describe(a) => commands::describe::run(a),
        Command::MakeDemoTerrain { out } => commands::make_demo(&out),
        Command::Survey(a) => commands::survey::run(a),
        Command::Site(a) => commands::site::run(a),
        Command::Rank(a) => commands::rank::run(a),
        Command::Workbench {
            file,
            select_rank,
            screenshot,
        } => commands::workbench(file, select_rank, screenshot),
        Command::Merge { parts, out } => commands::merge(&parts, &out),
    };
    match result {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("error: {e:#}");
            ExitCode::FAILURE
        }
    }
}

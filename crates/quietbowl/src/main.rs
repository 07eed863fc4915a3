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

/// The global allocator: mimalloc (Leijen, Zorn and de Moura 2019, "Mimalloc: Free List
/// Sharding in Action", Microsoft Research MSR-TR-2019-18, from memory). The survey makes and
/// frees blocks of megabytes to tens of megabytes per crater and per pyramid level on every
/// worker. glibc's allocator hands such blocks back to the system when they are
/// freed, so the next one page-faults every page again and each hand-back flushes the TLB of
/// every core: on a 3000 x 3000 px grid this took 7.1 s of system time against 14.6 s of user
/// time, and 2-3 s with mimalloc, which keeps freed memory for reuse a while (ours).
#[global_allocator]
static ALLOCATOR: mimalloc::MiMalloc = mimalloc::MiMalloc;

fn main() -> ExitCode {
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

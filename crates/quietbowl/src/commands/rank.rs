//! `quietbowl rank <survey.json>`: apply criteria, rank, print the shortlist, write exports.

use anyhow::Context;
use siting::export::{csv::write_csv, geojson::write_geojson, gpkg::write_gpkg, ExportSet, Provenance};
use siting::{Criteria, PreparedTable};
use std::path::PathBuf;
use survey::SurveyFile;

#[derive(clap::Args)]
pub struct Args {
    /// A survey file written by `quietbowl survey` (or `merge`).
    survey: PathBuf,
    /// Criteria file (TOML). Default: the shipped one for a kilometre-class reflector
    /// (assets/criteria/reflector-1km.toml).
    #[arg(long, value_name = "FILE")]
    criteria: Option<PathBuf>,
    /// Rows to print, and to export when --export-top is given.
    #[arg(long, default_value_t = 20, value_name = "N")]
    top: usize,
    /// Export only the best --top candidates instead of all of them.
    #[arg(long)]
    export_top: bool,
    /// Write the ranked candidates as GeoJSON (RFC 7946).
    #[arg(long, value_name = "FILE")]
    geojson: Option<PathBuf>,
    /// Write them as CSV (units in the column names).
    #[arg(long, value_name = "FILE")]
    csv: Option<PathBuf>,
    /// Write them as a GeoPackage in IAU_2015:30100.
    #[arg(long, value_name = "FILE")]
    gpkg: Option<PathBuf>,
    /// Skip the robustness analysis (SMAA) over uncertain weights.
    #[arg(long)]
    no_robustness: bool,
    /// Date recorded in the exports (YYYY-MM-DD). Default: $SOURCE_DATE_EPOCH if set, else today (UTC).
    #[arg(long, value_name = "DATE")]
    date: Option<String>,
}

pub fn run(a: Args) -> anyhow::Result<()> {
    for out in [&a.geojson, &a.csv, &a.gpkg].into_iter().flatten() {
        super::ensure_writable(out).context("writing the exports")?;
    }
    let survey = SurveyFile::read(&a.survey).with_context(|| format!("reading {}", a.survey.display()))?;
    let (criteria, criteria_text) = match &a.criteria {
        Some(path) => {
            let text = std::fs::read_to_string(path).with_context(|| format!("reading {}", path.display()))?;
            let c = Criteria::parse(&text).map_err(|e| anyhow::anyhow!("{}: {e}", path.display()))?;
            (c, text)
        }
        None => {
            let c = Criteria::default_reflector();
            let text = c.to_toml();
            (c, text)
        }
    };
    let table = PreparedTable::new(&survey, &criteria).context("preparing the ranking")?;
    let ranking = siting::rank(&table, &criteria).context("ranking")?;
    let smaa = if a.no_robustness { None } else { Some(siting::smaa(&table, &criteria).context("robustness analysis")?) };
    println!("{}", siting::table::render_table(&survey, &table, &ranking, smaa.as_ref(), a.top).trim_end());
    let provenance = Provenance::new(&survey, criteria_text, a.date.unwrap_or_else(siting::export::date::today));
    let set = ExportSet {
        survey: &survey,
        criteria: &criteria,
        table: &table,
        ranking: &ranking,
        smaa: smaa.as_ref(),
        provenance: &provenance,
        limit: a.export_top.then_some(a.top),
    };
    if let Some(p) = &a.geojson {
        write_geojson(&set, p).with_context(|| format!("writing {}", p.display()))?;
        eprintln!("wrote {}", p.display());
    }
    if let Some(p) = &a.csv {
        write_csv(&set, p).with_context(|| format!("writing {}", p.display()))?;
        eprintln!("wrote {}", p.display());
    }
    if let Some(p) = &a.gpkg {
        write_gpkg(&set, p).with_context(|| format!("writing {}", p.display()))?;
        eprintln!("wrote {}", p.display());
    }
    Ok(())
}

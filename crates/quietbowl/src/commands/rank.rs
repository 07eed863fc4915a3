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

/// Civil date (UTC) of a Unix time, by Hinnant's days-from-civil inverse
/// (H. Hinnant, "chrono-Compatible Low-Level Date Algorithms", 2013).
fn civil_date(unix_s: i64) -> String {
    let z = unix_s.div_euclid(86_400) + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z - era * 146_097;
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let d = doy - (153 * mp + 2) / 5 + 1;
    let m = if mp < 10 { mp + 3 } else { mp - 9 };
    let y = yoe + era * 400 + i64::from(m <= 2);
    format!("{y:04}-{m:02}-{d:02}")
}

fn export_date(given: Option<String>) -> String {
    if let Some(d) = given {
        return d;
    }
    let now = std::env::var("SOURCE_DATE_EPOCH").ok().and_then(|s| s.parse::<i64>().ok()).unwrap_or_else(|| {
        std::time::SystemTime::now().duration_since(std::time::UNIX_EPOCH).map(|d| d.as_secs() as i64).unwrap_or(0)
    });
    civil_date(now)
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
    let provenance = Provenance::new(&survey, criteria_text, export_date(a.date));
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

#[cfg(test)]
mod tests {
    #[test]
    fn civil_date_matches_known_days() {
        // 2000-03-01 is day 11017 of the Unix epoch; 1970-01-01 is 0 (proleptic Gregorian).
        assert_eq!(super::civil_date(0), "1970-01-01");
        assert_eq!(super::civil_date(11_017 * 86_400), "2000-03-01");
        assert_eq!(super::civil_date(951_782_400), "2000-02-29");
    }
}

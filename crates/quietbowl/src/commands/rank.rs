//! `quietbowl rank <survey.json>`: apply criteria, rank, print the shortlist, write exports.

use anyhow::Context;
use siting::areas::{AreaSpec, Keep};
use siting::export::{
    csv::write_csv, geojson::write_geojson, gpkg::write_gpkg, ExportSet, Provenance,
};
use siting::{Criteria, PreparedTable};
use std::path::{Path, PathBuf};
use std::sync::atomic::AtomicBool;
use std::time::Instant;
use structure::StructureSpec;
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
    /// The survey's DEM, for refitting when the criteria's [structure] differs from the
    /// survey's. Default: the DEM recorded in the survey (looked for beside the survey too).
    #[arg(long, value_name = "FILE")]
    dem: Option<PathBuf>,
    /// A study area: candidates must lie inside its polygons (any vector dataset OGR reads,
    /// lunar lon/lat or a lunar projection). Repeatable; added to the criteria's [[area]]s.
    #[arg(long, value_name = "FILE")]
    inside: Vec<String>,
    /// A keep-out zone: candidates must lie outside its polygons. Repeatable.
    #[arg(long, value_name = "FILE")]
    outside: Vec<String>,
    /// How far inside a --inside area, or outside an --outside one, a candidate must be (km).
    #[arg(long, value_name = "KM", default_value_t = 0.0)]
    margin: f64,
    /// Make the shortlist greedy by rank with every pair at least KM apart (great circle on
    /// the body's sphere): printed, and exported in place of the whole ranking.
    #[arg(long, value_name = "KM")]
    spread: Option<f64>,
}

/// The areas given on the command line, as criteria entries.
fn command_line_areas(a: &Args) -> anyhow::Result<Vec<AreaSpec>> {
    if !(a.margin.is_finite() && a.margin >= 0.0) {
        anyhow::bail!(
            "--margin must be a number of km, 0 or more (got {})",
            a.margin
        );
    }
    let spec = |file: &String, keep| AreaSpec {
        file: file.clone(),
        layer: None,
        filter: None,
        keep,
        margin_km: a.margin,
        why: "given on the command line".into(),
    };
    Ok(a.inside
        .iter()
        .map(|f| spec(f, Keep::Inside))
        .chain(a.outside.iter().map(|f| spec(f, Keep::Outside)))
        .collect())
}

pub fn run(a: Args) -> anyhow::Result<()> {
    for out in [&a.geojson, &a.csv, &a.gpkg].into_iter().flatten() {
        super::ensure_writable(out).context("writing the exports")?;
    }
    let survey =
        SurveyFile::read(&a.survey).with_context(|| format!("reading {}", a.survey.display()))?;
    let (mut criteria, mut criteria_text) = match &a.criteria {
        Some(path) => {
            let text = std::fs::read_to_string(path)
                .with_context(|| format!("reading {}", path.display()))?;
            let c =
                Criteria::parse(&text).map_err(|e| anyhow::anyhow!("{}: {e}", path.display()))?;
            (c, text)
        }
        None => {
            let c = Criteria::default_reflector();
            let text = c.to_toml();
            (c, text)
        }
    };
    let survey = match &criteria.structure {
        Some(spec) if !survey::fitted_for(&survey, spec) => {
            refit(&a.survey, a.dem.as_deref(), survey, spec)?
        }
        _ => survey,
    };
    // The operations figures are the survey's; they cannot be recomputed here.
    if let Some(o) = &criteria.operations {
        if survey.parameters.operations.as_ref() != Some(o) {
            eprintln!(
                "note: the criteria's [operations] differ from the inputs the survey's operations figures were computed with ({}); \
                 the ranking reads the survey's figures. Survey again with --operations {} to use the criteria's",
                if survey.parameters.operations.is_some() { "see its parameters" } else { "none: it has no operations figures" },
                a.criteria.as_ref().map_or("FILE".to_string(), |p| p.display().to_string())
            );
        }
    }
    // Areas of the criteria file are found from its folder; those of the command line from here.
    let base = a.criteria.as_deref().and_then(Path::parent);
    let mut areas =
        siting::areas::load_all(&criteria.areas, base).context("reading the criteria's areas")?;
    let extra = command_line_areas(&a)?;
    if !extra.is_empty() {
        areas.extend(
            siting::areas::load_all(&extra, None)
                .context("reading the areas given on the command line")?,
        );
        criteria.areas.extend(extra);
        criteria_text = criteria.to_toml();
    }
    let table =
        PreparedTable::with_areas(&survey, &criteria, &areas).context("preparing the ranking")?;
    let ranking = siting::rank(&table, &criteria).context("ranking")?;
    let spread = match a.spread {
        Some(km) if !(km.is_finite() && km > 0.0) => {
            anyhow::bail!("--spread must be a distance in km above 0 (got {km})")
        }
        Some(km) => Some(spread_shortlist(&survey, &table, &ranking, a.top, km)),
        None => None,
    };
    let smaa = if a.no_robustness {
        None
    } else {
        Some(siting::smaa(&table, &criteria).context("robustness analysis")?)
    };
    let text = match &spread {
        Some(list) => siting::table::render_rows(&survey, &table, &ranking, smaa.as_ref(), list),
        None => siting::table::render_table(&survey, &table, &ranking, smaa.as_ref(), a.top),
    };
    if let (Some(km), Some(list)) = (a.spread, &spread) {
        println!(
            "Spread shortlist: {} of the passing candidates, taken by rank, every pair at least {km} km apart",
            list.len()
        );
    }
    println!("{}", text.trim_end());
    let provenance = Provenance::new(
        &survey,
        criteria_text,
        a.date.unwrap_or_else(siting::export::date::today),
    )
    .with_areas(&areas);
    let set = ExportSet {
        survey: &survey,
        criteria: &criteria,
        table: &table,
        ranking: &ranking,
        smaa: smaa.as_ref(),
        provenance: &provenance,
        limit: a.export_top.then_some(a.top),
        decisions: None,
        areas: &areas,
        only: spread.as_deref(),
    };
    if let Some(p) = &a.geojson {
        write_geojson(&set, p).with_context(|| format!("writing {}", p.display()))?;
        eprintln!("wrote {}", p.display());
        if !areas.is_empty() {
            let beside = siting::export::areas::beside(p);
            siting::export::areas::write_geojson(&areas, &beside)
                .with_context(|| format!("writing {}", beside.display()))?;
            eprintln!("wrote {}", beside.display());
        }
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

/// The best `count` passing candidates taken by rank, each at least `km` from those before.
fn spread_shortlist(
    survey: &SurveyFile,
    table: &PreparedTable,
    ranking: &siting::Ranking,
    count: usize,
    km: f64,
) -> Vec<usize> {
    let passing = ranking
        .order
        .iter()
        .map(|&i| i as usize)
        .filter(|&i| table.passed(i));
    siting::neighbourhood::spread_by_rank(survey, passing, count, km)
}

/// A structure for the terminal, or "no structure".
fn describe(spec: Option<&StructureSpec>) -> String {
    spec.map_or_else(
        || "no structure".into(),
        |s| format!("a {}", siting::structure_summary(s)),
    )
}

/// Fit the criteria's structure into every candidate again, on the survey's DEM, before ranking.
/// The survey file on disk is left as it is.
fn refit(
    survey_path: &Path,
    dem: Option<&Path>,
    survey: SurveyFile,
    spec: &StructureSpec,
) -> anyhow::Result<SurveyFile> {
    let dem_path = match dem {
        Some(d) => d.to_path_buf(),
        None => survey::locate_dem(&survey, Some(survey_path)).context(
            "the criteria's [structure] differs from the survey's, so the survey must be refitted on its DEM. \
             Hint: name the DEM with --dem FILE, or drop the [structure] table to rank the survey's own fits",
        )?,
    };
    eprintln!(
        "the criteria ask for {}; {} was fitted for {}: refitting its {} candidates on {}",
        describe(Some(spec)),
        survey_path.display(),
        describe(survey.parameters.structure.as_ref()),
        survey.candidates.len(),
        dem_path.display()
    );
    let pb = super::bar(survey.candidates.len() as u64, "refitting the structure");
    let start = Instant::now();
    let out = survey::refit(
        &survey,
        &dem_path,
        spec,
        &|p| pb.set_position(p.candidates_done as u64),
        &AtomicBool::new(false),
    );
    pb.finish_and_clear();
    let out = out.with_context(|| {
        format!(
            "refitting {} on {} (hint: --dem names the DEM the survey was made from)",
            survey_path.display(),
            dem_path.display()
        )
    })?;
    eprintln!(
        "refitted {} candidates in {:.2} s; the refit serves this ranking, {} is left as it was",
        out.candidates.len(),
        start.elapsed().as_secs_f64(),
        survey_path.display()
    );
    Ok(out)
}

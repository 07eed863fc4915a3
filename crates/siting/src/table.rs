//! The ranked table as terminal text, with the screening caution.

use std::fmt::Write;

use survey::SurveyFile;

use crate::ranking::{PreparedTable, Ranking};
use crate::smaa::SmaaResult;

/// A number with precision fitted to its size, for people (exports keep full precision).
pub fn fmt_num(v: f64) -> String {
    let a = v.abs();
    if !v.is_finite() {
        "-".into()
    } else if a >= 100.0 {
        format!("{v:.0}")
    } else if a >= 1.0 {
        format!("{v:.2}")
    } else {
        format!("{v:.3}")
    }
}

fn metric(survey: &SurveyFile, i: usize, name: &str, decimals: usize) -> String {
    survey::metrics::metric(name)
        .and_then(|m| (m.get)(&survey.candidates[i]))
        .filter(|v| v.is_finite())
        .map_or_else(|| "-".to_string(), |v| format!("{v:.decimals$}"))
}

/// The best `top_n` rows as a fixed-width table, then the failed requirements of the rows
/// shown, then the screening caution.
pub fn render_table(
    survey: &SurveyFile,
    table: &PreparedTable,
    ranking: &Ranking,
    smaa: Option<&SmaaResult>,
    top_n: usize,
) -> String {
    let mut out = String::new();
    if survey.candidates.len() != table.len() {
        let _ = writeln!(
            out,
            "survey ({} candidates) and ranking ({}) do not belong together",
            survey.candidates.len(),
            table.len()
        );
        let _ = writeln!(out, "{}", crate::SCREENING_CAUTION);
        return out;
    }
    let mut head = format!(
        "{:>5} {:>7} {:>10} {:>8} {:>8} {:>6} {:>6} {:>6} {:>7} {:>7} {:>6} {:>4}",
        "rank",
        "id",
        "lon_deg",
        "lat_deg",
        "diam_m",
        "d/D",
        "compl",
        "tilt",
        "earth",
        "gc_sep",
        "score",
        "pass"
    );
    if let Some(s) = smaa {
        let _ = write!(
            head,
            " {:>6} {:>7}",
            "P(1)",
            format!("P(<={})", s.settings.top_n)
        );
    }
    let _ = writeln!(out, "{head}");
    let mut notes = Vec::new();
    for e in ranking.entries(table).take(top_n) {
        let i = e.index;
        let c = &survey.candidates[i].crater;
        let lon = terrain::projection::wrap_deg_180(c.centre_lon_deg);
        let pass = if e.passed() {
            "yes".to_string()
        } else {
            format!("no{}", e.failures().len())
        };
        let mut line = format!(
            "{:>5} {:>7} {:>10.4} {:>8.4} {:>8} {:>6} {:>6} {:>6} {:>7} {:>7} {:>6.3} {:>4}",
            e.rank,
            e.id(),
            lon,
            c.centre_lat_deg,
            metric(survey, i, "diameter_m", 0),
            metric(survey, i, "depth_to_diameter", 3),
            metric(survey, i, "rim_completeness", 2),
            metric(survey, i, "floor_tilt_deg", 1),
            metric(survey, i, "earth_clearance_deg", 2),
            metric(survey, i, "gc_separation_deg", 1),
            e.score,
            pass
        );
        if let Some(s) = smaa {
            match s.probabilities(i) {
                Some((p1, pn)) => {
                    let _ = write!(line, " {p1:>6.3} {pn:>7.3}");
                }
                None => {
                    let _ = write!(line, " {:>6} {:>7}", "-", "-");
                }
            }
        }
        let _ = writeln!(out, "{}", line.trim_end());
        if !e.passed() {
            let why: Vec<String> = e.failures().iter().map(|f| f.describe()).collect();
            notes.push(format!("  id {}: {}", e.id(), why.join("; ")));
        }
    }
    if !notes.is_empty() {
        let _ = writeln!(out, "\nfailed requirements:");
        for n in notes {
            let _ = writeln!(out, "{n}");
        }
    }
    let _ = writeln!(out, "\nlon/lat deg; diam_m rim diameter; compl rim completeness; tilt floor tilt deg; earth Earth clearance deg; gc_sep galactic-centre separation deg.");
    let _ = writeln!(out, "{}", crate::SCREENING_CAUTION);
    out
}

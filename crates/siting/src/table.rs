//! The ranked table as terminal text, in the metrics' labels, with the screening caution.

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

/// The metrics the terminal table shows, in order, after rank and id.
const TABLE_METRICS: [&str; 8] = [
    "lon_deg",
    "lat_deg",
    "diameter_m",
    "depth_to_diameter",
    "rim_completeness",
    "floor_tilt_deg",
    "earth_clearance_deg",
    "gc_separation_deg",
];

/// One cell of a metric column: the number in the header's unit (`survey::METRICS`);
/// longitudes in -180..180, the workbench's default convention.
fn metric_cell(survey: &SurveyFile, i: usize, name: &str) -> String {
    let Some(m) = survey::metrics::metric(name) else {
        return "-".into();
    };
    m.format_number((m.get)(&survey.candidates[i]))
}

/// Right-aligned columns, each as wide as its widest cell or header.
fn aligned(rows: &[Vec<String>]) -> Vec<String> {
    let cols = rows.iter().map(Vec::len).max().unwrap_or(0);
    let width: Vec<usize> = (0..cols)
        .map(|k| {
            rows.iter()
                .filter_map(|r| r.get(k))
                .map(|c| c.chars().count())
                .max()
                .unwrap_or(0)
        })
        .collect();
    rows.iter()
        .map(|r| {
            let cells: Vec<String> = r
                .iter()
                .zip(&width)
                .map(|(c, &w)| format!("{c:>w$}"))
                .collect();
            cells.join("  ").trim_end().to_string()
        })
        .collect()
}

/// The best `top_n` rows as a fixed-width table (headers in the metrics' short labels and
/// units), then why each row shown fails the limits, in words, then what the short labels
/// stand for, then the screening caution and what the verdicts leave out.
pub fn render_table(
    survey: &SurveyFile,
    table: &PreparedTable,
    ranking: &Ranking,
    smaa: Option<&SmaaResult>,
    top_n: usize,
) -> String {
    let first: Vec<usize> = ranking
        .order
        .iter()
        .take(top_n)
        .map(|&i| i as usize)
        .collect();
    render_rows(survey, table, ranking, smaa, &first)
}

/// [`render_table`] of the candidates `shown` (indices into the survey, e.g. a spread
/// shortlist), in ranking order.
pub fn render_rows(
    survey: &SurveyFile,
    table: &PreparedTable,
    ranking: &Ranking,
    smaa: Option<&SmaaResult>,
    shown_rows: &[usize],
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
    let shown: Vec<&survey::MetricInfo> = TABLE_METRICS
        .iter()
        .filter_map(|n| survey::metrics::metric(n))
        .collect();
    let mut head: Vec<String> = vec!["Rank".into(), "Id".into()];
    head.extend(shown.iter().map(|m| m.header()));
    head.extend(["Score".into(), "Meets limits".into()]);
    if let Some(s) = smaa {
        head.extend(["P(rank 1)".into(), format!("P(top {})", s.settings.top_n)]);
    }
    let mut rows = vec![head];
    let mut notes = Vec::new();
    let listed: std::collections::HashSet<usize> = shown_rows.iter().copied().collect();
    for e in ranking
        .entries(table)
        .filter(|e| listed.contains(&e.index))
        .take(listed.len())
    {
        let i = e.index;
        let mut row = vec![e.rank.to_string(), e.id().to_string()];
        row.extend(shown.iter().map(|m| metric_cell(survey, i, m.name)));
        row.push(format!("{:.3}", e.score));
        row.push(if e.passed() {
            "yes".to_string()
        } else {
            format!("no ({})", e.failures().len())
        });
        if let Some(s) = smaa {
            let (p1, pn) = s
                .probabilities(i)
                .map_or(("-".into(), "-".into()), |(p1, pn)| {
                    (format!("{p1:.3}"), format!("{pn:.3}"))
                });
            row.extend([p1, pn]);
        }
        rows.push(row);
        if !e.passed() {
            let why: Vec<String> = e.failures().iter().map(|f| f.in_words()).collect();
            notes.push(format!("  id {}: {}", e.id(), why.join("; ")));
        }
    }
    for line in aligned(&rows) {
        let _ = writeln!(out, "{line}");
    }
    if !notes.is_empty() {
        let _ = writeln!(out, "\nWhy these fail the limits:");
        for n in notes {
            let _ = writeln!(out, "{n}");
        }
    }
    let key: Vec<String> = shown
        .iter()
        .filter(|m| m.short != m.label)
        .map(|m| format!("{} = {}", m.short, m.label))
        .collect();
    let _ = writeln!(out, "\n{}.", key.join("; "));
    let _ = writeln!(out, "{}", crate::VERDICT_SCOPE);
    let _ = writeln!(out, "{}", crate::SCREENING_CAUTION);
    out
}

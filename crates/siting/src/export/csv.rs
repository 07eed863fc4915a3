//! CSV export (RFC 4180 quoting): provenance as leading `#` lines, then a header row whose
//! names carry units in brackets (`diameter_m [m]`, `[1]` for dimensionless), then one row
//! per candidate best first. Empty cell = not measured / not analysed.

use std::fmt::Write;
use std::path::Path;

use super::{row, Cell, ExportSet};
use crate::SitingError;

fn field(s: &str) -> String {
    if s.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_string()
    }
}

/// Shortest text that reads back to the same number (Rust's `Display` for f64: no
/// exponent, platform-independent).
fn real(v: Option<f64>) -> String {
    v.filter(|v| v.is_finite())
        .map(|v| v.to_string())
        .unwrap_or_default()
}

/// The whole CSV text.
pub fn to_csv_string(set: &ExportSet<'_>) -> Result<String, SitingError> {
    set.check()?;
    let mut out = String::new();
    for (k, v) in set.provenance.pairs() {
        let _ = writeln!(out, "# {k}: {}", v.replace(['\n', '\r'], " "));
    }
    for line in set.provenance.criteria_toml.lines() {
        let _ = writeln!(out, "# criteria | {line}");
    }
    let header: Vec<String> = set
        .columns()
        .iter()
        .map(|c| {
            field(&if c.unit.is_empty() {
                c.name.clone()
            } else {
                format!("{} [{}]", c.name, c.unit)
            })
        })
        .collect();
    let _ = writeln!(out, "{}", header.join(","));
    for e in set.entries() {
        let cells: Vec<String> = row(set, &e)
            .into_iter()
            .map(|c| match c {
                Cell::Int(i) => i.to_string(),
                Cell::Real(r) => real(r),
                Cell::Bool(b) => b.to_string(),
                Cell::Text(t) => field(&t),
            })
            .collect();
        let _ = writeln!(out, "{}", cells.join(","));
    }
    Ok(out)
}

/// Write the CSV file atomically.
pub fn write_csv(set: &ExportSet<'_>, path: &Path) -> Result<(), SitingError> {
    let text = to_csv_string(set)?;
    crate::atomic::write_bytes(path, text.as_bytes())
}

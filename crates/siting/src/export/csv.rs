//! CSV export: provenance as leading `#` lines, then a header row whose names carry units in
//! brackets (`diameter_m [m]`, `[1]` for dimensionless), then one row per candidate best
//! first. Empty cell = not measured / not analysed. Rows are written by the `csv` crate with
//! RFC 4180 quoting (Shafranovich 2005): a field is quoted only when it holds a comma, a
//! double quote or a line break; lines end in LF.

use std::path::Path;

use super::{row, Cell, ExportSet};
use crate::SitingError;

/// Shortest text that reads back to the same number (Rust's `Display` for f64: no
/// exponent, platform-independent).
fn real(v: Option<f64>) -> String {
    v.filter(|v| v.is_finite())
        .map(|v| v.to_string())
        .unwrap_or_default()
}

/// The record writer every row goes through.
fn writer(out: Vec<u8>) -> csv::Writer<Vec<u8>> {
    csv::WriterBuilder::new()
        .quote_style(csv::QuoteStyle::Necessary)
        .terminator(csv::Terminator::Any(b'\n'))
        .from_writer(out)
}

/// Writing into memory fails only if the `csv` crate does; say so rather than panic.
fn csv_error(e: impl std::fmt::Display) -> SitingError {
    SitingError::Write {
        path: "<CSV in memory>".into(),
        source: std::io::Error::other(e.to_string()),
    }
}

/// The provenance comment lines: `# key: value`, then the criteria text line by line.
fn provenance_lines(set: &ExportSet<'_>) -> String {
    let mut out = String::new();
    for (k, v) in set.provenance.pairs() {
        out.push_str(&format!("# {k}: {}\n", v.replace(['\n', '\r'], " ")));
    }
    for line in set.provenance.criteria_toml.lines() {
        out.push_str(&format!("# criteria | {line}\n"));
    }
    out
}

/// The whole CSV text.
pub fn to_csv_string(set: &ExportSet<'_>) -> Result<String, SitingError> {
    set.check()?;
    let mut w = writer(provenance_lines(set).into_bytes());
    w.write_record(set.columns().iter().map(|c| {
        if c.unit.is_empty() {
            c.name.clone()
        } else {
            format!("{} [{}]", c.name, c.unit)
        }
    }))
    .map_err(csv_error)?;
    for e in set.entries() {
        w.write_record(row(set, &e).into_iter().map(|c| match c {
            Cell::Int(i) => i.to_string(),
            Cell::Real(r) => real(r),
            Cell::Bool(b) => b.to_string(),
            Cell::Text(t) => t,
        }))
        .map_err(csv_error)?;
    }
    let bytes = w.into_inner().map_err(csv_error)?;
    String::from_utf8(bytes).map_err(csv_error)
}

/// Write the CSV file atomically.
pub fn write_csv(set: &ExportSet<'_>, path: &Path) -> Result<(), SitingError> {
    let text = to_csv_string(set)?;
    crate::atomic::write_bytes(path, text.as_bytes())
}

#[cfg(test)]
mod tests {
    #[test]
    fn fields_are_quoted_as_rfc_4180_asks_and_only_then() {
        // RFC 4180 section 2, rules 5 to 7: fields holding commas, double quotes or line
        // breaks are enclosed in double quotes, and a quote inside is doubled.
        let mut w = super::writer(Vec::new());
        w.write_record(["plain", "a,b", "say \"x\"", "two\nlines", "", "1.5", "r\r"])
            .expect("write");
        let text = String::from_utf8(w.into_inner().expect("flush")).expect("utf-8");
        assert_eq!(
            text,
            "plain,\"a,b\",\"say \"\"x\"\"\",\"two\nlines\",,1.5,\"r\r\"\n"
        );
    }
}

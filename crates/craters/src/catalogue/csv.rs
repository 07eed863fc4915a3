//! The CSV catalogue reader (header convention in the parent module). Tokenising is the `csv`
//! crate's: RFC 4180 fields (Shafranovich 2005), so a double-quoted field may hold the
//! separator, a doubled quote and line breaks; LF, CRLF or CR line ends.

use super::{check, CatalogueRow, RowProblem};
use crate::error::CraterError;
use std::path::Path;

/// Separators tried on the header row, in this order; the first that makes the header name
/// the needed columns reads the whole file. Semicolons are what spreadsheets write where the
/// decimal separator is a comma, tabs what they write as "tab-separated text" (IANA
/// text/tab-separated-values); common practice, no standard covers the choice.
const SEPARATORS: [u8; 3] = [b',', b';', b'\t'];

struct Columns {
    lon: usize,
    lat: usize,
    diameter: usize,
    diameter_scale: f64,
    name: Option<usize>,
}

fn columns(header: &[String]) -> Result<Columns, String> {
    let find = |n: &str| header.iter().position(|h| h.eq_ignore_ascii_case(n));
    let lon = find("lon_deg").ok_or("the header has no lon_deg column")?;
    let lat = find("lat_deg").ok_or("the header has no lat_deg column")?;
    let (diameter, diameter_scale) = match (find("diameter_m"), find("diameter_km")) {
        (Some(i), None) => (i, 1.0),
        (None, Some(i)) => (i, 1000.0),
        (Some(_), Some(_)) => {
            return Err("the header has both diameter_m and diameter_km; keep one".into())
        }
        (None, None) => return Err("the header has no diameter_m or diameter_km column".into()),
    };
    Ok(Columns {
        lon,
        lat,
        diameter,
        diameter_scale,
        name: find("name"),
    })
}

/// One record that is neither blank nor a comment.
struct Record {
    /// The line it starts on, 1-based.
    line: usize,
    fields: Vec<String>,
    /// It runs to the end of the text with an odd number of double quotes: a quote opened
    /// and never closed (the `csv` crate takes the rest of the text into that field).
    unterminated: bool,
}

struct Records<'a> {
    text: &'a str,
    reader: csv::Reader<&'a [u8]>,
    record: csv::StringRecord,
}

impl<'a> Records<'a> {
    fn new(text: &'a str, separator: u8) -> Records<'a> {
        let reader = csv::ReaderBuilder::new()
            .has_headers(false)
            .flexible(true)
            .trim(csv::Trim::All)
            .comment(Some(b'#'))
            .delimiter(separator)
            .from_reader(text.as_bytes());
        Records {
            text,
            reader,
            record: csv::StringRecord::new(),
        }
    }

    /// The next record, skipping blank lines and comments (`#` first on the line, also after
    /// leading blanks).
    fn next_record(&mut self) -> Result<Option<Record>, String> {
        loop {
            let more = self
                .reader
                .read_record(&mut self.record)
                .map_err(|e| e.to_string())?;
            if !more {
                return Ok(None);
            }
            let blank = self.record.len() == 1 && self.record[0].is_empty();
            if blank || self.record.get(0).is_some_and(|f| f.starts_with('#')) {
                continue;
            }
            let (start, line) = self.record.position().map_or((0, 1), |p| {
                record_start(self.text.as_bytes(), p.byte() as usize, p.line() as usize)
            });
            let end = self.reader.position().byte() as usize;
            let unterminated = end >= self.text.len()
                && self
                    .text
                    .as_bytes()
                    .get(start..)
                    .is_some_and(|rest| rest.iter().filter(|&&b| b == b'"').count() % 2 == 1);
            return Ok(Some(Record {
                line,
                fields: self.record.iter().map(str::to_string).collect(),
                unterminated,
            }));
        }
    }
}

/// Byte offset and line (1-based) where a record really starts. The `csv` crate (1.4) gives a
/// record the position where the previous one ended, before the empty lines and comments it
/// skipped; skip them the same way here.
fn record_start(text: &[u8], mut byte: usize, mut line: usize) -> (usize, usize) {
    while let Some(&b) = text.get(byte) {
        match b {
            b'\n' => line += 1,
            b'\r' => {}
            b'#' => {
                while text.get(byte).is_some_and(|&c| c != b'\n' && c != b'\r') {
                    byte += 1;
                }
                continue;
            }
            _ => break,
        }
        byte += 1;
    }
    (byte, line)
}

/// The separator whose reading of the header names the needed columns, and those columns.
fn header(text: &str) -> Result<(u8, Columns), String> {
    let mut first_problem = None;
    for separator in SEPARATORS {
        let Some(h) = Records::new(text, separator).next_record()? else {
            return Err("the file is empty (no header row)".into());
        };
        if h.unterminated {
            return Err(format!(
                "line {}: header: unterminated double quote",
                h.line
            ));
        }
        match columns(&h.fields) {
            Ok(c) => return Ok((separator, c)),
            Err(r) => {
                first_problem.get_or_insert(format!(
                    "line {}: {r}. Expected a header such as lon_deg,lat_deg,diameter_km,name \
                     (separated by commas, semicolons or tabs)",
                    h.line
                ));
            }
        }
    }
    Err(first_problem.unwrap_or_default())
}

pub fn read(
    path: &Path,
    sink: &mut dyn FnMut(Result<CatalogueRow, RowProblem>) -> Result<(), CraterError>,
) -> Result<(), CraterError> {
    let bytes = std::fs::read(path).map_err(|e| CraterError::Catalogue {
        path: path.into(),
        reason: e.to_string(),
    })?;
    parse(&bytes, path, sink)
}

/// The CSV text of a catalogue already in memory; `path` only names it in errors.
pub fn parse(
    bytes: &[u8],
    path: &Path,
    sink: &mut dyn FnMut(Result<CatalogueRow, RowProblem>) -> Result<(), CraterError>,
) -> Result<(), CraterError> {
    let fail = |reason: String| CraterError::Catalogue {
        path: path.into(),
        reason,
    };
    let text = std::str::from_utf8(bytes).map_err(|e| fail(format!("not UTF-8 text ({e})")))?;
    // Spreadsheets put a byte-order mark (U+FEFF) first in "UTF-8 CSV". The `csv` crate would
    // skip it too, but stripped here the byte offsets `Records` compares count from the header.
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let (separator, cols) = header(text).map_err(fail)?;
    let mut records = Records::new(text, separator);
    // The header again: `header` read it on a reader of its own.
    records.next_record().map_err(fail)?;
    while let Some(r) = records.next_record().map_err(fail)? {
        sink(row(&cols, separator, r))?;
    }
    Ok(())
}

/// One data record to a checked catalogue row, or why it cannot be one.
fn row(c: &Columns, separator: u8, r: Record) -> Result<CatalogueRow, RowProblem> {
    let line = r.line;
    let fields = r.fields;
    if r.unterminated {
        return Err(RowProblem {
            line,
            reason: "unterminated double quote".into(),
        });
    }
    let need = c.lon.max(c.lat).max(c.diameter) + 1;
    if fields.len() < need {
        return Err(RowProblem {
            line,
            reason: format!(
                "{} fields, the header asks for at least {need}",
                fields.len()
            ),
        });
    }
    let num = |idx: usize, what: &str| -> Result<f64, RowProblem> {
        let text = &fields[idx];
        text.parse::<f64>().map_err(|_| {
            let hint = if separator != b',' && text.contains(',') {
                " (numbers take a decimal point, not a comma)"
            } else {
                ""
            };
            RowProblem {
                line,
                reason: format!("{what} '{text}' is not a number{hint}"),
            }
        })
    };
    let lon = num(c.lon, "lon_deg")?;
    let lat = num(c.lat, "lat_deg")?;
    let d = num(c.diameter, "diameter")? * c.diameter_scale;
    let name = c
        .name
        .and_then(|n| fields.get(n))
        .filter(|s| !s.is_empty())
        .cloned();
    check(line, lon, lat, d, name)
}

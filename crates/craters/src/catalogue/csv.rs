//! The CSV catalogue reader (header convention in the parent module).

use super::{check, CatalogueRow, RowProblem};
use crate::error::CraterError;
use std::path::Path;

/// Split one CSV line on commas, honouring double quotes ("" inside quotes is a quote).
fn split(line: &str) -> Result<Vec<String>, String> {
    let mut out = Vec::new();
    let mut cur = String::new();
    let mut quoted = false;
    let mut chars = line.chars().peekable();
    while let Some(c) = chars.next() {
        match (c, quoted) {
            ('"', true) if chars.peek() == Some(&'"') => {
                cur.push('"');
                chars.next();
            }
            ('"', _) => quoted = !quoted,
            (',', false) => out.push(std::mem::take(&mut cur)),
            (c, _) => cur.push(c),
        }
    }
    if quoted {
        return Err("unterminated double quote".into());
    }
    out.push(cur);
    Ok(out.into_iter().map(|s| s.trim().to_string()).collect())
}

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
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let mut cols: Option<Columns> = None;
    for (i, raw) in text.lines().enumerate() {
        let line = i + 1;
        let trimmed = raw.trim();
        if trimmed.is_empty() || trimmed.starts_with('#') {
            continue;
        }
        let fields = match split(trimmed) {
            Ok(f) => f,
            Err(reason) => {
                if cols.is_none() {
                    return Err(fail(format!("line {line}: header: {reason}")));
                }
                sink(Err(RowProblem { line, reason }))?;
                continue;
            }
        };
        let Some(c) = &cols else {
            cols = Some(columns(&fields).map_err(|r| {
                fail(format!(
                    "line {line}: {r}. Expected a header such as lon_deg,lat_deg,diameter_km,name"
                ))
            })?);
            continue;
        };
        let need = c.lon.max(c.lat).max(c.diameter) + 1;
        if fields.len() < need {
            sink(Err(RowProblem {
                line,
                reason: format!(
                    "{} fields, the header asks for at least {need}",
                    fields.len()
                ),
            }))?;
            continue;
        }
        let num = |idx: usize, what: &str| -> Result<f64, RowProblem> {
            fields[idx].parse::<f64>().map_err(|_| RowProblem {
                line,
                reason: format!("{what} '{}' is not a number", fields[idx]),
            })
        };
        let row = (|| {
            let lon = num(c.lon, "lon_deg")?;
            let lat = num(c.lat, "lat_deg")?;
            let d = num(c.diameter, "diameter")? * c.diameter_scale;
            let name = c
                .name
                .and_then(|n| fields.get(n))
                .filter(|s| !s.is_empty())
                .cloned();
            check(line, lon, lat, d, name)
        })();
        sink(row)?;
    }
    if cols.is_none() {
        return Err(fail("the file is empty (no header row)".into()));
    }
    Ok(())
}

//! `--diameter MIN..MAX`: metres by default, or with a `km` or `m` suffix on each bound.

/// Parse one bound: `800`, `800m`, `0.8km`.
fn bound_m(s: &str) -> Result<f64, String> {
    let s = s.trim();
    let (num, factor) = if let Some(n) = s.strip_suffix("km") {
        (n, 1000.0)
    } else if let Some(n) = s.strip_suffix('m') {
        (n, 1.0)
    } else {
        (s, 1.0)
    };
    let v: f64 = num
        .trim()
        .parse()
        .map_err(|_| format!("'{s}' is not a diameter (examples: 800, 800m, 0.8km)"))?;
    if !(v.is_finite() && v > 0.0) {
        return Err(format!("'{s}' must be a positive diameter"));
    }
    Ok(v * factor)
}

/// Parse `MIN..MAX` into metres; either side may be empty to keep the default.
pub fn parse(s: &str) -> Result<(Option<f64>, Option<f64>), String> {
    let (lo, hi) = s.split_once("..").ok_or_else(|| {
        format!("'{s}' is not a range; write MIN..MAX, e.g. 800..2000 or 0.8km..2km")
    })?;
    let lo = if lo.trim().is_empty() {
        None
    } else {
        Some(bound_m(lo)?)
    };
    let hi = if hi.trim().is_empty() {
        None
    } else {
        Some(bound_m(hi)?)
    };
    if let (Some(a), Some(b)) = (lo, hi) {
        if a > b {
            return Err(format!(
                "the range {s} runs backwards (min {a} m > max {b} m)"
            ));
        }
    }
    Ok((lo, hi))
}

#[cfg(test)]
mod tests {
    use super::parse;

    #[test]
    fn parses_metres_and_kilometres() {
        assert_eq!(parse("800..2000").unwrap(), (Some(800.0), Some(2000.0)));
        assert_eq!(parse("0.8km..2km").unwrap(), (Some(800.0), Some(2000.0)));
        assert_eq!(parse("..5km").unwrap(), (None, Some(5000.0)));
        assert!(parse("2000..800").is_err());
        assert!(parse("abc").is_err());
        assert!(parse("-1..5").is_err());
    }
}

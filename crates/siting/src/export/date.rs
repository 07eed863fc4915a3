//! The date recorded in export provenance.

/// Civil date (UTC, `YYYY-MM-DD`) of a Unix time, proleptic Gregorian, by the inverse of
/// H. Hinnant's days-from-civil ("chrono-Compatible Low-Level Date Algorithms", 2013).
pub fn civil_date(unix_s: i64) -> String {
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

/// Today's date for provenance: `$SOURCE_DATE_EPOCH` when set (reproducible builds
/// convention, reproducible-builds.org), else the system clock, in UTC.
pub fn today() -> String {
    let now = std::env::var("SOURCE_DATE_EPOCH")
        .ok()
        .and_then(|s| s.trim().parse::<i64>().ok())
        .unwrap_or_else(|| {
            std::time::SystemTime::now()
                .duration_since(std::time::UNIX_EPOCH)
                .map(|d| d.as_secs() as i64)
                .unwrap_or(0)
        });
    civil_date(now)
}

#[cfg(test)]
mod tests {
    #[test]
    fn civil_date_matches_known_days() {
        // 1970-01-01 is Unix day 0; 951,782,400 s is 2000-02-29 00:00 UTC and 951,868,800 s
        // is 2000-03-01 (leap day of a year divisible by 400).
        assert_eq!(super::civil_date(0), "1970-01-01");
        assert_eq!(super::civil_date(951_782_400), "2000-02-29");
        assert_eq!(super::civil_date(951_868_800), "2000-03-01");
        assert_eq!(super::civil_date(-86_400), "1969-12-31");
    }
}

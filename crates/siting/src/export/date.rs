//! The date recorded in export provenance.

use jiff::tz::Offset;
use jiff::Timestamp;

/// Civil date (UTC, `YYYY-MM-DD`, proleptic Gregorian) of a Unix time; `None` outside the
/// years -9999..=9999 that `jiff` represents.
pub fn civil_date(unix_s: i64) -> Option<String> {
    let t = Timestamp::from_second(unix_s).ok()?;
    Some(Offset::UTC.to_datetime(t).date().to_string())
}

/// Today's date for provenance: `$SOURCE_DATE_EPOCH` when set to a usable number
/// (reproducible builds convention, reproducible-builds.org), else the system clock, in UTC.
pub fn today() -> String {
    std::env::var("SOURCE_DATE_EPOCH")
        .ok()
        .and_then(|s| s.trim().parse::<i64>().ok())
        .and_then(civil_date)
        .unwrap_or_else(|| Offset::UTC.to_datetime(Timestamp::now()).date().to_string())
}

#[cfg(test)]
mod tests {
    use super::civil_date;

    #[test]
    fn civil_date_matches_known_days() {
        // 1970-01-01 is Unix day 0 (POSIX.1-2017, "Seconds Since the Epoch"); 951,782,400 s
        // = 11,016 days is 2000-02-29 00:00 UTC and 951,868,800 s is 2000-03-01 (2000 is a
        // leap year, being divisible by 400).
        assert_eq!(civil_date(0).as_deref(), Some("1970-01-01"));
        assert_eq!(civil_date(951_782_400).as_deref(), Some("2000-02-29"));
        assert_eq!(civil_date(951_868_800).as_deref(), Some("2000-03-01"));
        assert_eq!(civil_date(-86_400).as_deref(), Some("1969-12-31"));
        assert_eq!(civil_date(i64::MAX), None);
    }
}

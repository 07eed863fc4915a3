//! Earth shielding and the sky a zenith-fixed beam sees, for a site on the Moon.
//!
//! Knows nothing of craters or ranking: it takes a site (lon, lat) and optionally an elevation
//! grid around it.

mod report;
pub use report::SiteVisibility;

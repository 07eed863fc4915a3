//! Earth shielding and the sky a zenith-fixed beam sees, for a site on the Moon.
//!
//! Knows nothing of craters or ranking: it takes a site (lon, lat) and optionally an elevation
//! grid around it. See `docs/visibility.md` for every output's definition and source.
//!
//! ```
//! use visibility::{site_visibility, VisibilityOptions};
//! let v = site_visibility(180.0, 16.0, None, &VisibilityOptions::default());
//! assert!(v.earth_clearance_deg > 0.0 && v.far_side_band);
//! ```

pub mod constants;
pub mod diffraction;
pub mod earth;
pub mod ephemeris;
pub mod frames;
pub mod horizon;
pub mod libration;
mod options;
mod report;
pub mod sky;

pub use earth::{earth_margin, earth_margin_lazy, earth_zone_from_site, EarthMargin};
pub use horizon::{horizon_profile, Horizon, HorizonSpec, HorizonTerrain, LazyHorizon, NodataRule};
pub use libration::{LibrationEnvelope, SubEarthPoint};
pub use options::{validate_site, VisibilityError, VisibilityOptions};
pub use report::{EnvelopeSummary, HorizonRow, SiteReport, SiteVisibility, SkySummary, CAUTION};
pub use sky::{beam_track_galactic, PoleCycle};

use constants::FAR_SIDE_BAND_HALF_WIDTH_DEG;
use terrain::projection::wrap_deg_180;
use terrain::ElevationGrid;

/// Within the far-side band used for radio quiet (common practice, no source).
pub fn in_far_side_band(lon_deg: f64) -> bool {
    wrap_deg_180(lon_deg - 180.0).abs() <= FAR_SIDE_BAND_HALF_WIDTH_DEG
}

/// A site's figures, its horizon (only the sectors the margin read are marched) and its Earth
/// margin.
fn compute<'a>(
    lon_deg: f64,
    lat_deg: f64,
    terrain: Option<&'a HorizonTerrain<'a>>,
    opts: &VisibilityOptions,
) -> (SiteVisibility, LazyHorizon<'a>, EarthMargin) {
    let env = LibrationEnvelope::standard();
    let wanted =
        terrain.map(|_| earth::sectors_needed(env, lon_deg, lat_deg, opts.horizon_azimuths));
    let mut horizon = LazyHorizon::new(
        lon_deg,
        lat_deg,
        terrain,
        &opts.horizon_spec(opts.horizon_azimuths),
        wanted.as_deref(),
    );
    let margin = earth_margin_lazy(env, lon_deg, lat_deg, &mut horizon);
    let cycle = PoleCycle::standard();
    let gc = cycle.gc_separation_deg(lat_deg);
    let (hpbw, _) = sky::beam_widths_deg(opts.aperture_m, opts.frequency_hz);
    let v = SiteVisibility {
        earth_clearance_deg: margin.clearance_deg,
        earth_clearance_sphere_deg: margin.clearance_sphere_deg,
        limb_margin_deg: margin.limb_margin_deg,
        far_side_band: in_far_side_band(lon_deg),
        gc_separation_deg: gc,
        plane_fraction: cycle.plane_fraction(lat_deg, opts.plane_band_deg),
        plane_band_deg: opts.plane_band_deg,
        gc_separation_hpbw: gc / hpbw,
        beam_hpbw_deg: hpbw,
        site_height_m: horizon.site_height_m,
        horizon_from_terrain: horizon.from_terrain,
    };
    (v, horizon, margin)
}

/// The visibility figures of one site, or why they cannot be computed.
pub fn try_site_visibility(
    lon_deg: f64,
    lat_deg: f64,
    grid: Option<&ElevationGrid>,
    opts: &VisibilityOptions,
) -> Result<SiteVisibility, VisibilityError> {
    validate_site(lon_deg, lat_deg)?;
    opts.validate()?;
    let terrain = grid.and_then(HorizonTerrain::new);
    Ok(compute(lon_deg, lat_deg, terrain.as_ref(), opts).0)
}

/// The visibility figures of one site with a grid already prepared by [`HorizonTerrain::new`]
/// (which scans the whole grid once): the fast path for callers looping over many sites.
pub fn site_visibility_prepared(
    lon_deg: f64,
    lat_deg: f64,
    terrain: Option<&HorizonTerrain>,
    opts: &VisibilityOptions,
) -> Result<SiteVisibility, VisibilityError> {
    validate_site(lon_deg, lat_deg)?;
    opts.validate()?;
    Ok(compute(lon_deg, lat_deg, terrain, opts).0)
}

/// The visibility figures of one site. With an invalid site or options every number is NaN;
/// use [`try_site_visibility`] to learn why. Scans the grid for its height range on every
/// call: for many sites on one grid use [`bulk`] or [`site_visibility_prepared`].
pub fn site_visibility(
    lon_deg: f64,
    lat_deg: f64,
    grid: Option<&ElevationGrid>,
    opts: &VisibilityOptions,
) -> SiteVisibility {
    try_site_visibility(lon_deg, lat_deg, grid, opts).unwrap_or_else(|_| invalid())
}

fn invalid() -> SiteVisibility {
    let nan = f64::NAN;
    SiteVisibility {
        earth_clearance_deg: nan,
        earth_clearance_sphere_deg: nan,
        limb_margin_deg: nan,
        gc_separation_deg: nan,
        plane_fraction: nan,
        plane_band_deg: nan,
        gc_separation_hpbw: nan,
        beam_hpbw_deg: nan,
        site_height_m: nan,
        ..SiteVisibility::default()
    }
}

/// [`site_visibility`] for many (lon, lat) sites in parallel, sharing one grid. The libration
/// envelope and the pole cycle are computed once per process, the grid's height range once
/// per call. Output order follows `sites`.
pub fn bulk(
    sites: &[(f64, f64)],
    grid: Option<&ElevationGrid>,
    opts: &VisibilityOptions,
) -> Vec<SiteVisibility> {
    use rayon::prelude::*;
    if opts.validate().is_err() {
        return vec![invalid(); sites.len()];
    }
    let terrain = grid.and_then(HorizonTerrain::new);
    // Build the shared caches before the threads race for them.
    let _ = (LibrationEnvelope::standard(), PoleCycle::standard());
    sites
        .par_iter()
        .map(|&(lon, lat)| match validate_site(lon, lat) {
            Ok(()) => compute(lon, lat, terrain.as_ref(), opts).0,
            Err(_) => invalid(),
        })
        .collect()
}

/// The full report for one point: horizon table, Earth margin, sky track summary.
pub fn site_report(
    lon_deg: f64,
    lat_deg: f64,
    grid: Option<&ElevationGrid>,
    opts: &VisibilityOptions,
) -> Result<SiteReport, VisibilityError> {
    validate_site(lon_deg, lat_deg)?;
    opts.validate()?;
    let terrain = grid.and_then(HorizonTerrain::new);
    let (v, horizon, earth) = compute(lon_deg, lat_deg, terrain.as_ref(), opts);
    let env = LibrationEnvelope::standard();
    let cycle = PoleCycle::standard();
    // The table: every 10 deg, the 1-degree sector centred there.
    let fine = Horizon::compute_sectors(
        lon_deg,
        lat_deg,
        terrain.as_ref(),
        &opts.horizon_spec(360),
        None,
    );
    let horizon_table = (0..36)
        .map(|i| HorizonRow {
            azimuth_deg: i as f64 * 10.0,
            elevation_deg: fine.elevation_deg[i * 10],
        })
        .collect();
    let (hpbw, null) = sky::beam_widths_deg(opts.aperture_m, opts.frequency_hz);
    let track = beam_track_galactic(
        lon_deg,
        lat_deg,
        env.start_jd_tt,
        sky::TRACK_PERIOD_DAYS,
        720,
    );
    let b = track
        .iter()
        .map(|p| p.1)
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), x| {
            (lo.min(x), hi.max(x))
        });
    let sky = SkySummary {
        gc_separation_deg: v.gc_separation_deg,
        gc_separation_worst_month_deg: cycle.gc_separation_worst_month_deg(lat_deg),
        gc_lunar_dec_min_deg: cycle.gc_dec_min_deg,
        gc_lunar_dec_max_deg: cycle.gc_dec_max_deg,
        aperture_m: opts.aperture_m,
        frequency_hz: opts.frequency_hz,
        beam_hpbw_deg: hpbw,
        beam_first_null_deg: null,
        gc_separation_hpbw: v.gc_separation_hpbw,
        plane_band_deg: opts.plane_band_deg,
        plane_fraction: v.plane_fraction,
        month_track_b_min_deg: b.0,
        month_track_b_max_deg: b.1,
        month_gc_separation_deg: sky::track_gc_separation_deg(&track),
    };
    let diffraction_estimate = diffraction::estimate_for_margin(&earth);
    Ok(SiteReport {
        lon_deg,
        lat_deg,
        site_height_m: horizon.site_height_m,
        horizon_from_terrain: horizon.from_terrain,
        horizon_max_distance_m: horizon.max_distance_m,
        sphere_horizon_deg: horizon.sphere_horizon_deg,
        horizon_table,
        earth,
        far_side_band: v.far_side_band,
        envelope: EnvelopeSummary {
            start_jd_tt: env.start_jd_tt,
            step_days: env.step_days,
            samples: env.samples.len(),
            lon_min_deg: env.lon_min_deg,
            lon_max_deg: env.lon_max_deg,
            lat_min_deg: env.lat_min_deg,
            lat_max_deg: env.lat_max_deg,
            distance_min_km: env.distance_min_km,
            distance_max_km: env.distance_max_km,
        },
        sky,
        diffraction_estimate,
        caution: CAUTION.to_string(),
    })
}

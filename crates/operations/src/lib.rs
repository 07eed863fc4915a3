//! Operations from the crater floor, per candidate: can a lander set down on the floor, can it
//! shoot anchors to the rim, does the relay near Earth-Moon L2 stay in view over the walls,
//! and how long is the night. See docs/operations.md for every figure's formula, source and
//! limits.
//!
//! Knows nothing of ranking or the GUI. A survey builds one [`Operations`] (which samples the
//! relay's and the Sun's positions in the Moon's body frame once) and calls
//! [`Operations::for_candidate`] for every candidate with a structure fit.

pub mod inputs;
pub mod landing;
pub mod night;
pub mod relay;
pub mod shots;
pub mod sky;
pub mod skyline;
pub mod sun;
mod text;

pub use inputs::{AimRule, OperationsInputs};
pub use landing::LandingReport;
pub use night::NightFigures;
pub use shots::{Shot, ShotsReport};
pub use sky::{AboveSkyline, SkyTracks};

use craters::CraterMeasurement;
use serde::{Deserialize, Serialize};
use std::path::Path;
use structure::patch::Patch;
use structure::StructureFit;
use terrain::ElevationGrid;
use thiserror::Error;

#[derive(Debug, Error, Clone, PartialEq)]
pub enum OperationsError {
    #[error("operations: {0}")]
    Inputs(String),
    #[error("relay orbit {path}: {reason}")]
    RelayOrbit { path: String, reason: String },
}

/// Sectors of every skyline the operations read (0.5 deg, as the Earth margin).
pub const SKYLINE_SECTORS: usize = 720;
/// The skylines read terrain at least this far from each point, and at most, m (the reach
/// is `skyline_reach_diameters` crater diameters between the two).
pub const SKYLINE_REACH_MIN_M: f64 = 500.0;
pub const SKYLINE_REACH_MAX_M: f64 = 8_000.0;
/// Reach of the skyline at a point with no crater (the `site` command), m.
pub const SKYLINE_REACH_POINT_M: f64 = 5_000.0;

/// The relay link from one place and from the rim.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct RelayReport {
    pub lander: AboveSkyline,
    /// One per anchor, in the fit's order.
    pub anchors: Vec<AboveSkyline>,
    /// 1-based numbers of the anchors with the most and the least time in view (0: none).
    pub best_anchor: usize,
    pub worst_anchor: usize,
}

/// The night at the lander and on the rim.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct NightReport {
    pub lander: NightFigures,
    pub anchors: Vec<NightFigures>,
    /// 1-based number of the anchor with the most sunlit hours (where power would be; 0: none).
    pub best_lit_anchor: usize,
}

/// The operations figures of one candidate.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct OperationsReport {
    /// Where the lander stands: the best aim point, or the aim point when the floor has no
    /// safe node.
    pub lander_lon_deg: f64,
    pub lander_lat_deg: f64,
    pub landing: Option<LandingReport>,
    pub shots: Option<ShotsReport>,
    pub relay: RelayReport,
    pub night: NightReport,
}

impl OperationsReport {
    /// The best-lit anchor's night figures, if the fit has anchors.
    pub fn rim_night(&self) -> Option<&NightFigures> {
        self.night
            .anchors
            .get(self.night.best_lit_anchor.checked_sub(1)?)
    }

    /// The relay figures of the anchor with the least time in view, if any.
    pub fn rim_relay_worst(&self) -> Option<&AboveSkyline> {
        self.relay
            .anchors
            .get(self.relay.worst_anchor.checked_sub(1)?)
    }
}

/// The inputs checked and the sky sampled, ready for many candidates.
#[derive(Clone, Debug)]
pub struct Operations {
    pub inputs: OperationsInputs,
    pub tracks: SkyTracks,
}

/// The relay's orbit the inputs name: their CSV (a relative path taken from `base`) or the
/// default circle.
pub fn relay_orbit(
    inputs: &OperationsInputs,
    base: Option<&Path>,
) -> Result<relay::RelayOrbit, OperationsError> {
    Ok(match &inputs.relay_orbit_csv {
        Some(p) => {
            let path = Path::new(p);
            let path = match base {
                Some(b) if path.is_relative() => b.join(path),
                _ => path.to_path_buf(),
            };
            relay::RelayOrbit::from_csv(&path, inputs.relay_period_days)?
        }
        None => relay::RelayOrbit::circle(inputs.relay_orbit_radius_km, inputs.relay_period_days),
    })
}

impl Operations {
    /// Check the inputs, read the relay orbit (a relative CSV path is taken from `base`) and
    /// sample the relay and the Sun over the series.
    pub fn new(
        inputs: &OperationsInputs,
        base: Option<&Path>,
    ) -> Result<Operations, OperationsError> {
        inputs.validate().map_err(OperationsError::Inputs)?;
        Ok(Operations {
            inputs: inputs.clone(),
            tracks: SkyTracks::compute(&relay_orbit(inputs, base)?),
        })
    }

    /// Every figure for one candidate with a fit. `None` when the lander's place has no data.
    pub fn for_candidate(
        &self,
        grid: &ElevationGrid,
        post_m: f64,
        crater: &CraterMeasurement,
        fit: &StructureFit,
    ) -> Option<OperationsReport> {
        let (aim_lon, aim_lat) = match self.inputs.aim {
            AimRule::Structure => (fit.centre_lon_deg, fit.centre_lat_deg),
            AimRule::FloorCentre => (crater.centre_lon_deg, crater.centre_lat_deg),
        };
        let site = landing::LandingSite {
            crater_lon_deg: crater.centre_lon_deg,
            crater_lat_deg: crater.centre_lat_deg,
            floor_radius_m: craters::MeasureOptions::default().wall_inner_frac * crater.diameter_m
                / 2.0,
            aim_lon_deg: aim_lon,
            aim_lat_deg: aim_lat,
        };
        let anchors: Vec<shots::Point> = fit
            .anchors
            .iter()
            .filter(|a| a.height_m.is_finite())
            .map(|a| shots::Point {
                lon_deg: a.lon_deg,
                lat_deg: a.lat_deg,
                height_m: a.height_m,
            })
            .collect();
        let reach = self.inputs.skyline_reach_diameters * crater.diameter_m;
        self.report(grid, post_m, &site, &anchors, reach)
    }

    /// The figures for a lander aimed at a point with no crater or structure (the `site`
    /// command): aim points within the dispersion's 3-sigma radius, no anchors. `None` when
    /// the point has no data.
    pub fn for_point(
        &self,
        grid: &ElevationGrid,
        post_m: f64,
        lon: f64,
        lat: f64,
    ) -> Option<OperationsReport> {
        let site = landing::LandingSite {
            crater_lon_deg: lon,
            crater_lat_deg: lat,
            floor_radius_m: self.inputs.landing_dispersion_3sigma_m,
            aim_lon_deg: lon,
            aim_lat_deg: lat,
        };
        self.report(grid, post_m, &site, &[], SKYLINE_REACH_POINT_M)
    }

    fn limits(&self) -> (landing::LandingLimits, shots::ShotLimits) {
        let inp = &self.inputs;
        (
            landing::LandingLimits {
                dispersion_3sigma_m: inp.landing_dispersion_3sigma_m,
                max_slope_deg: inp.landing_max_slope_deg,
                max_roughness_m: inp.landing_max_roughness_m,
            },
            shots::ShotLimits {
                range_m: inp.launcher_range_m,
                min_clearance_m: inp.shot_min_clearance_m,
                end_exclusion_m: inp.shot_end_exclusion_m,
            },
        )
    }

    /// Relay and night at local (x, y) of the lattice of `skylines`, `mast_height_m` above
    /// the ground, the skyline read out to `reach_m`. `None` without ground there.
    fn sky_at(
        &self,
        skylines: &mut skyline::Skylines,
        (x, y): (f64, f64),
        reach_m: f64,
    ) -> Option<(AboveSkyline, NightFigures)> {
        let patch = skylines.patch();
        let skyline =
            skylines.sweep((x, y), self.inputs.mast_height_m, reach_m, SKYLINE_SECTORS)?;
        let (lon, lat) = patch.frame.to_lonlat(x, y);
        let site = sky::Site::new(lon, lat, skyline.site_height_m, patch.frame.radius_m);
        let relay =
            sky::relay_above_skyline(&self.tracks, &site, &skyline, self.inputs.relay_margin_deg);
        let sun = sky::above_skyline(&self.tracks.sun, &site, &skyline, 0.0);
        Some((relay, NightFigures::from_sun(&sun)))
    }

    /// Landing on the site's floor, the lander at the best aim point, shots to the anchors,
    /// relay and night at the lander and at every anchor.
    fn report(
        &self,
        grid: &ElevationGrid,
        post_m: f64,
        site: &landing::LandingSite,
        anchors: &[shots::Point],
        reach_m: f64,
    ) -> Option<OperationsReport> {
        let (landing_limits, shot_limits) = self.limits();
        // One lattice round the crater centre serves the landing and every skyline: it holds
        // the landing's floor and dispersion, and the reach round the aim point and anchors.
        let frame = terrain::LocalFrame::new(
            grid.geometry.body_radius_m,
            site.crater_lon_deg,
            site.crater_lat_deg,
        );
        let spread_m = anchors
            .iter()
            .map(|a| (a.lon_deg, a.lat_deg))
            .chain([(site.aim_lon_deg, site.aim_lat_deg)])
            .map(|(lon, lat)| {
                let (x, y) = frame.to_local(lon, lat);
                x.hypot(y)
            })
            .fold(site.floor_radius_m, f64::max);
        let reach_m = reach_m.clamp(SKYLINE_REACH_MIN_M, SKYLINE_REACH_MAX_M);
        let half = landing::lattice_half_m(site, &landing_limits, post_m).max(spread_m + reach_m);
        let patch = Patch::build(grid, site.crater_lon_deg, site.crater_lat_deg, half, post_m)?;
        let landing = landing::landing_on(&patch, site, &landing_limits);
        let (lon, lat) = match &landing {
            Some(l) if l.p_best > 0.0 => (l.best_lon_deg, l.best_lat_deg),
            _ => (site.aim_lon_deg, site.aim_lat_deg),
        };
        let lander = shots::Point {
            lon_deg: lon,
            lat_deg: lat,
            height_m: grid.sample_lonlat(lon, lat)? + self.inputs.mast_height_m,
        };
        let shots = shots::shots(grid, &lander, anchors, &shot_limits, post_m);
        let mut skylines = skyline::Skylines::new(&patch);
        let (relay_l, night_l) =
            self.sky_at(&mut skylines, patch.frame.to_local(lon, lat), reach_m)?;
        let mut relay_a = Vec::with_capacity(anchors.len());
        let mut night_a = Vec::with_capacity(anchors.len());
        for a in anchors {
            let (r, n) = self.sky_at(
                &mut skylines,
                patch.frame.to_local(a.lon_deg, a.lat_deg),
                reach_m,
            )?;
            relay_a.push(r);
            night_a.push(n);
        }
        // 1-based index of the anchor `better` prefers to every other (0: none).
        let pick = |better: &dyn Fn(usize, usize) -> bool| -> usize {
            (0..relay_a.len())
                .reduce(|b, i| if better(i, b) { i } else { b })
                .map_or(0, |i| i + 1)
        };
        let key = |a: &AboveSkyline| (a.fraction, a.worst_margin_deg);
        let best_anchor = pick(&|i, b| key(&relay_a[i]) > key(&relay_a[b]));
        let worst_anchor = pick(&|i, b| key(&relay_a[i]) < key(&relay_a[b]));
        let best_lit_anchor =
            pick(&|i, b| night_a[i].sunlit_h_per_month > night_a[b].sunlit_h_per_month);
        Some(OperationsReport {
            lander_lon_deg: lon,
            lander_lat_deg: lat,
            landing,
            shots,
            relay: RelayReport {
                lander: relay_l,
                anchors: relay_a,
                best_anchor,
                worst_anchor,
            },
            night: NightReport {
                lander: night_l,
                anchors: night_a,
                best_lit_anchor,
            },
        })
    }
}

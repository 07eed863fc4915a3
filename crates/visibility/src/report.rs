//! What the crate hands out: the per-site figures that join the survey table
//! ([`SiteVisibility`]) and the full report for one point ([`SiteReport`]).

use crate::diffraction::DiffractionEstimate;
use crate::earth::EarthMargin;
use serde::{Deserialize, Serialize};
use std::fmt::Write;

/// The per-site visibility figures that join the survey table.
#[derive(Clone, Debug, Default, PartialEq, Serialize, Deserialize)]
pub struct SiteVisibility {
    /// Smallest margin, over the whole libration envelope, between the local horizon (terrain or
    /// sphere, whichever is higher) and the Earth's upper limb. Positive = Earth hidden.
    pub earth_clearance_deg: f64,
    /// The same with the bare sphere's horizon only (no terrain), for comparison.
    pub earth_clearance_sphere_deg: f64,
    /// Angular distance of the site behind the libration-extended limb on the sphere.
    pub limb_margin_deg: f64,
    /// Within 45 degrees of the 180 meridian (common practice, no source).
    pub far_side_band: bool,
    /// Closest approach of a zenith-fixed beam to the galactic centre over the 18.6-year cycle.
    pub gc_separation_deg: f64,
    /// Fraction of the beam's sky track within `plane_band_deg` of the galactic plane.
    pub plane_fraction: f64,
    pub plane_band_deg: f64,
    /// `gc_separation_deg` in half-power beam widths of the configured aperture and frequency.
    #[serde(default)]
    pub gc_separation_hpbw: f64,
    /// Half-power beam width (Airy pattern, about 1.029 lambda/D) of the configured aperture and
    /// frequency, degrees.
    #[serde(default)]
    pub beam_hpbw_deg: f64,
    /// Height of the observer above the reference sphere, m (0 when no terrain was available).
    #[serde(default)]
    pub site_height_m: f64,
    /// Whether the horizon came from the elevation grid (false: bare sphere only).
    #[serde(default)]
    pub horizon_from_terrain: bool,
}

/// One line of the horizon table.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct HorizonRow {
    pub azimuth_deg: f64,
    pub elevation_deg: f64,
}

/// The libration envelope as used for the margin.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct EnvelopeSummary {
    pub start_jd_tt: f64,
    pub step_days: f64,
    pub samples: usize,
    pub lon_min_deg: f64,
    pub lon_max_deg: f64,
    pub lat_min_deg: f64,
    pub lat_max_deg: f64,
    pub distance_min_km: f64,
    pub distance_max_km: f64,
}

/// The sky a zenith-fixed beam at the site sweeps.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct SkySummary {
    /// Closest approach to the galactic centre over the 18.6-year cycle, degrees.
    pub gc_separation_deg: f64,
    /// The monthly closest approach at the least favourable epoch of the cycle, degrees.
    pub gc_separation_worst_month_deg: f64,
    /// Range of the galactic centre's lunar declination over the cycle, degrees.
    pub gc_lunar_dec_min_deg: f64,
    pub gc_lunar_dec_max_deg: f64,
    pub aperture_m: f64,
    pub frequency_hz: f64,
    pub beam_hpbw_deg: f64,
    pub beam_first_null_deg: f64,
    pub gc_separation_hpbw: f64,
    pub plane_band_deg: f64,
    pub plane_fraction: f64,
    /// Galactic latitude range of the track over one sidereal month from the envelope's start.
    pub month_track_b_min_deg: f64,
    pub month_track_b_max_deg: f64,
    /// Closest approach to the galactic centre during that month, degrees.
    pub month_gc_separation_deg: f64,
}

/// Everything the crate knows about one point, for the terminal (`to_text`) or JSON.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct SiteReport {
    pub lon_deg: f64,
    pub lat_deg: f64,
    pub site_height_m: f64,
    pub horizon_from_terrain: bool,
    pub horizon_max_distance_m: f64,
    pub sphere_horizon_deg: f64,
    /// Skyline every 10 degrees of azimuth from north.
    pub horizon_table: Vec<HorizonRow>,
    pub earth: EarthMargin,
    pub far_side_band: bool,
    pub envelope: EnvelopeSummary,
    pub sky: SkySummary,
    /// Creeping-wave attenuation into the limb shadow on a smooth sphere. An estimate (see
    /// `diffraction.rs`); empty when the site is not behind the limb.
    pub diffraction_estimate: Vec<DiffractionEstimate>,
    pub caution: String,
}

/// The one screening caution of the whole tool, printed with every report and every ranking
/// (`siting::SCREENING_CAUTION` is this constant; domain notes section 9).
pub const CAUTION: &str = "Screening estimates from orbital data; real site decisions rest on mission-grade analysis and the responsible engineering authority's review.";

impl SiteReport {
    /// A fixed-format text rendering for the terminal, without the caution (a caller that
    /// prints more after it puts the caution last).
    pub fn to_text_body(&self) -> String {
        let mut s = String::new();
        let e = &self.earth;
        let _ = writeln!(
            s,
            "Site lon {:.4} deg, lat {:.4} deg, observer {:.1} m above the sphere",
            self.lon_deg, self.lat_deg, self.site_height_m
        );
        let _ = writeln!(
            s,
            "Horizon: {} out to {:.0} km (sphere horizon {:.3} deg)",
            if self.horizon_from_terrain {
                "terrain"
            } else {
                "bare sphere (no terrain at the site)"
            },
            self.horizon_max_distance_m / 1000.0,
            self.sphere_horizon_deg
        );
        let _ = writeln!(s, "  azimuth   elevation");
        for r in &self.horizon_table {
            let _ = writeln!(s, "  {:>6.1}   {:>8.3}", r.azimuth_deg, r.elevation_deg);
        }
        let _ = writeln!(
            s,
            "\nEarth (libration envelope, Earth at its nearest {:.0} km):",
            e.earth_distance_km
        );
        let _ = writeln!(
            s,
            "  clearance                 {:>9.3} deg  ({})",
            e.clearance_deg,
            if e.clearance_deg > 0.0 {
                "always hidden"
            } else {
                "Earth can be seen"
            }
        );
        let _ = writeln!(
            s,
            "  clearance, bare sphere    {:>9.3} deg",
            e.clearance_sphere_deg
        );
        let _ = writeln!(
            s,
            "  behind the extended limb  {:>9.3} deg",
            e.limb_margin_deg
        );
        let _ = writeln!(
            s,
            "  worst case: Earth at azimuth {:.1} deg, upper limb {:.3} deg, skyline {:.3} deg",
            e.worst_azimuth_deg, e.worst_limb_elevation_deg, e.worst_horizon_deg
        );
        let _ = writeln!(
            s,
            "  within 45 deg of the 180 meridian: {}",
            if self.far_side_band { "yes" } else { "no" }
        );
        let v = &self.envelope;
        let _ = writeln!(
            s,
            "  envelope: lon {:.3}..{:.3} deg, lat {:.3}..{:.3} deg, distance {:.0}..{:.0} km ({} samples every {} d)",
            v.lon_min_deg,
            v.lon_max_deg,
            v.lat_min_deg,
            v.lat_max_deg,
            v.distance_min_km,
            v.distance_max_km,
            v.samples,
            v.step_days
        );
        if !self.diffraction_estimate.is_empty() {
            let _ = writeln!(
                s,
                "  diffraction into the shadow (ESTIMATE, smooth sphere, hard/soft boundary):"
            );
            for d in &self.diffraction_estimate {
                let _ = writeln!(
                    s,
                    "    {:>5.1} MHz at {:.2} deg: {:.0} / {:.0} dB",
                    d.frequency_hz / 1e6,
                    d.shadow_angle_deg,
                    d.attenuation_hard_db,
                    d.attenuation_soft_db
                );
            }
        }
        let k = &self.sky;
        let _ = writeln!(s, "\nSky of a zenith-fixed beam:");
        let _ = writeln!(
            s,
            "  closest to the galactic centre over 18.6 yr  {:>8.3} deg = {:.2} beam widths",
            k.gc_separation_deg, k.gc_separation_hpbw
        );
        let _ = writeln!(
            s,
            "  monthly closest approach ranges up to        {:>8.3} deg",
            k.gc_separation_worst_month_deg
        );
        let _ = writeln!(
            s,
            "  galactic centre lunar declination            {:.3}..{:.3} deg",
            k.gc_lunar_dec_min_deg, k.gc_lunar_dec_max_deg
        );
        let _ = writeln!(
            s,
            "  beam at {:.2} MHz, aperture {:.0} m: half-power {:.3} deg, first null {:.3} deg",
            k.frequency_hz / 1e6,
            k.aperture_m,
            k.beam_hpbw_deg,
            k.beam_first_null_deg
        );
        let _ = writeln!(
            s,
            "  time within {:.1} deg of the galactic plane   {:>7.1} %",
            k.plane_band_deg,
            100.0 * k.plane_fraction
        );
        let _ = writeln!(
            s,
            "  one month's track: galactic b {:.2}..{:.2} deg, closest to centre {:.3} deg",
            k.month_track_b_min_deg, k.month_track_b_max_deg, k.month_gc_separation_deg
        );
        s
    }

    /// [`SiteReport::to_text_body`] followed by the caution.
    pub fn to_text(&self) -> String {
        format!("{}\n{}\n", self.to_text_body(), self.caution)
    }
}

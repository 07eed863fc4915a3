//! The target structure: what a reflector team states about the dish it wants to hang in a
//! crater. Read from the criteria file (serde) and edited in the GUI.

use crate::error::StructureError;
use serde::{Deserialize, Serialize};

/// Surface shape of the reflector, axis vertical, sag measured up from the vertex.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
#[serde(tag = "kind", rename_all = "snake_case", deny_unknown_fields)]
pub enum Shape {
    /// z = r^2 / (4 f).
    Paraboloid { focal_length_m: f64 },
    /// Paraboloid given by focal ratio: f = f_over_d * aperture.
    ParaboloidRatio { f_over_d: f64 },
    /// Spherical cap of radius R: z = R - sqrt(R^2 - r^2); needs R >= aperture / 2.
    SphericalCap { radius_m: f64 },
}

/// The structure to fit. Every number of [`Default`] is illustrative (the demo's reflector class),
/// not a requirement taken from any mission.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct StructureSpec {
    /// Diameter of the aperture (the rim of the surface seen from above).
    pub aperture_m: f64,
    pub shape: Shape,
    /// Rim anchors, evenly spaced in azimuth around the aperture centre, free to rotate.
    pub anchors: u32,
    /// Smallest vertical gap wanted between the surface and the ground under it.
    pub min_clearance_m: f64,
    /// Largest difference allowed between the highest and the lowest anchor.
    pub max_anchor_height_difference_m: f64,
}

/// Demo reflector class: a 350 m dish (illustrative).
pub const DEFAULT_APERTURE_M: f64 = 350.0;
/// f/D 0.5: prime-focus reflectors are commonly built between f/D 0.3 and 0.6, and 0.5 keeps
/// the edge sag at D/8 (44 m for 350 m) so the dish sits in the bowl of a simple crater
/// (common practice, no source).
pub const DEFAULT_F_OVER_D: f64 = 0.5;
/// Six anchors: fewest that keep every span within 60 degrees of its neighbours (illustrative).
pub const DEFAULT_ANCHORS: u32 = 6;
/// 10 m under the surface: room for DEM error at 30 m posts and for boulders (illustrative).
pub const DEFAULT_MIN_CLEARANCE_M: f64 = 10.0;
/// 100 m between the highest and lowest anchor (illustrative): about what masts on the low
/// side of the rim might make up. Crests of kilometre craters on rough highland ground vary by
/// tens of metres around the rim (the demo's hosts by 17-86 m over six anchors), so a tighter
/// limit rejects craters for unevenness that masts would absorb.
pub const DEFAULT_MAX_ANCHOR_HEIGHT_DIFFERENCE_M: f64 = 100.0;

/// Fewest anchors that hold a surface in place.
pub const MIN_ANCHORS: u32 = 3;
/// Most anchors the fit lays out. The crater measurement traces the crest at 64 azimuths, 5.6
/// degrees apart (`craters::MeasureOptions::default`), and the crest between them is a straight
/// chord. At 12 anchors, 30 degrees apart, each spans five traced azimuths; much denser rings
/// put neighbouring anchors on neighbouring chords, where their heights and the rotation search
/// read the interpolation between traced azimuths more than the rim (common practice, no
/// source). The criteria file allows the same range.
pub const MAX_ANCHORS: u32 = 12;

impl Default for StructureSpec {
    fn default() -> Self {
        StructureSpec {
            aperture_m: DEFAULT_APERTURE_M,
            shape: Shape::ParaboloidRatio {
                f_over_d: DEFAULT_F_OVER_D,
            },
            anchors: DEFAULT_ANCHORS,
            min_clearance_m: DEFAULT_MIN_CLEARANCE_M,
            max_anchor_height_difference_m: DEFAULT_MAX_ANCHOR_HEIGHT_DIFFERENCE_M,
        }
    }
}

impl StructureSpec {
    /// Check every number before a fit: positive sizes, a cap at least as wide as the aperture,
    /// [`MIN_ANCHORS`] to [`MAX_ANCHORS`] anchors, non-negative clearance and anchor height
    /// difference.
    pub fn validate(&self) -> Result<(), StructureError> {
        let bad = |m: String| Err(StructureError::Spec(m));
        let pos = |v: f64| v.is_finite() && v > 0.0;
        if !pos(self.aperture_m) {
            return bad(format!(
                "aperture_m must be a positive number of metres (got {})",
                self.aperture_m
            ));
        }
        match self.shape {
            Shape::Paraboloid { focal_length_m } if !pos(focal_length_m) => {
                return bad(format!(
                    "focal_length_m must be positive (got {focal_length_m})"
                ));
            }
            Shape::ParaboloidRatio { f_over_d } if !pos(f_over_d) => {
                return bad(format!("f_over_d must be positive (got {f_over_d})"))
            }
            Shape::SphericalCap { radius_m }
                if !(pos(radius_m) && radius_m >= self.aperture_m / 2.0) =>
            {
                return bad(format!(
                    "a spherical cap of radius_m {radius_m} cannot span an aperture of {} m: the radius must be at least half the aperture",
                    self.aperture_m
                ));
            }
            _ => {}
        }
        if !(MIN_ANCHORS..=MAX_ANCHORS).contains(&self.anchors) {
            return bad(format!(
                "anchors must be between {MIN_ANCHORS} and {MAX_ANCHORS} (got {})",
                self.anchors
            ));
        }
        if !(self.min_clearance_m.is_finite() && self.min_clearance_m >= 0.0) {
            return bad(format!(
                "min_clearance_m must be zero or positive (got {})",
                self.min_clearance_m
            ));
        }
        if !(self.max_anchor_height_difference_m.is_finite()
            && self.max_anchor_height_difference_m >= 0.0)
        {
            return bad(format!(
                "max_anchor_height_difference_m must be zero or positive (got {})",
                self.max_anchor_height_difference_m
            ));
        }
        Ok(())
    }

    pub fn aperture_radius_m(&self) -> f64 {
        self.aperture_m / 2.0
    }

    /// Height of the surface above its vertex at squared distance `r2_m2` from the axis. Only
    /// meaningful for a validated spec and r <= aperture / 2.
    #[inline]
    pub fn sag_m(&self, r2_m2: f64) -> f64 {
        match self.shape {
            Shape::Paraboloid { focal_length_m } => r2_m2 / (4.0 * focal_length_m),
            Shape::ParaboloidRatio { f_over_d } => r2_m2 / (4.0 * f_over_d * self.aperture_m),
            Shape::SphericalCap { radius_m } => {
                radius_m - (radius_m * radius_m - r2_m2).max(0.0).sqrt()
            }
        }
    }

    /// Height of the aperture edge above the vertex.
    pub fn edge_sag_m(&self) -> f64 {
        let a = self.aperture_radius_m();
        self.sag_m(a * a)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn default_spec_is_valid_and_its_edge_sag_is_an_eighth_of_the_aperture() {
        // Paraboloid, f/D = 0.5: sag(D/2) = (D/2)^2 / (4 * 0.5 D) = D / 8 (algebra).
        let s = StructureSpec::default();
        s.validate().expect("default valid");
        assert!((s.edge_sag_m() - 350.0 / 8.0).abs() < 1e-12);
    }

    #[test]
    fn bad_specs_are_refused_with_the_field_named() {
        let cap = StructureSpec {
            shape: Shape::SphericalCap { radius_m: 100.0 },
            ..Default::default()
        };
        assert!(matches!(cap.validate(), Err(StructureError::Spec(m)) if m.contains("radius_m")));
        let two = StructureSpec {
            anchors: 2,
            ..Default::default()
        };
        assert!(matches!(two.validate(), Err(StructureError::Spec(m)) if m.contains("anchors")));
        let nan = StructureSpec {
            aperture_m: f64::NAN,
            ..Default::default()
        };
        assert!(nan.validate().is_err());
    }

    #[test]
    fn anchor_count_is_accepted_from_3_to_12_and_refused_just_outside() {
        // The documented range (docs/structure-fit.md, docs/siting.md): 3 to 12.
        let with = |anchors| StructureSpec {
            anchors,
            ..Default::default()
        };
        for ok in [3, 12] {
            with(ok).validate().expect("inside the range");
        }
        for bad in [2, 13] {
            assert!(
                matches!(with(bad).validate(), Err(StructureError::Spec(m)) if m.contains("between 3 and 12")),
                "{bad} anchors accepted"
            );
        }
    }
}

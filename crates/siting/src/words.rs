//! What a person reads about the criteria beyond the metric labels (those live in
//! `survey::METRICS`): which dish is being fitted.

use structure::{Shape, StructureSpec};

use crate::criteria::Criteria;

/// A structure in one line: "350 m paraboloid at f/D 0.50, 6 anchors; clearance at least
/// 10 m; anchor heights within 100 m".
pub fn structure_summary(s: &StructureSpec) -> String {
    let shape = match s.shape {
        Shape::Paraboloid { focal_length_m } => {
            format!("paraboloid, focal length {focal_length_m:.0} m")
        }
        Shape::ParaboloidRatio { f_over_d } => format!("paraboloid at f/D {f_over_d:.2}"),
        Shape::SphericalCap { radius_m } => format!("spherical cap of radius {radius_m:.0} m"),
    };
    format!(
        "{:.0} m {shape}, {} anchors; clearance at least {:.0} m; anchor heights within {:.0} m",
        s.aperture_m, s.anchors, s.min_clearance_m, s.max_anchor_height_difference_m
    )
}

/// The dish the ranking judges, for the line under the criteria's title: the criteria's own
/// `[structure]` when they have one, else the one the survey was fitted with
/// (`survey.parameters.structure`, passed as `survey_structure`).
pub fn dish_summary(criteria: &Criteria, survey_structure: Option<&StructureSpec>) -> String {
    match (&criteria.structure, survey_structure) {
        (Some(s), _) => format!("Dish: {} (set by these criteria)", structure_summary(s)),
        (None, Some(s)) => format!("Dish: {} (as the survey was fitted)", structure_summary(s)),
        (None, None) => "Dish: none (the survey holds no reflector fits)".to_string(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_shipped_criteria_name_the_dish_the_survey_was_fitted_with() {
        let c = Criteria::default_reflector();
        let fitted = StructureSpec::default();
        assert_eq!(
            dish_summary(&c, Some(&fitted)),
            "Dish: 350 m paraboloid at f/D 0.50, 6 anchors; clearance at least 10 m; \
             anchor heights within 100 m (as the survey was fitted)"
        );
    }

    #[test]
    fn criteria_with_a_structure_name_their_own() {
        let mut c = Criteria::default_reflector();
        c.structure = Some(StructureSpec {
            aperture_m: 1000.0,
            shape: Shape::SphericalCap { radius_m: 800.0 },
            ..StructureSpec::default()
        });
        let text = dish_summary(&c, Some(&StructureSpec::default()));
        assert!(
            text.starts_with("Dish: 1000 m spherical cap of radius 800 m")
                && text.ends_with("(set by these criteria)"),
            "{text}"
        );
    }

    #[test]
    fn the_title_of_the_shipped_criteria_claims_no_other_dish() {
        // The title once promised a 1 km aperture while a 350 m dish was fitted.
        let title = Criteria::default_reflector().title;
        assert!(!title.contains(" km aperture"), "{title}");
    }
}

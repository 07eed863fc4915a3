//! The crater sheet's Shape page: radial height profiles, the rim crest's departure from the
//! fitted circle against azimuth (metre-level, not at true scale) with the azimuths where no
//! crest was traced shaded, and the shape figures that say something for this crater.

use crate::charts::{azimuth_grid, azimuth_tick, key_row, KeyEntry, KeyMark};
use crate::profiles::RadialProfiles;
use craters::CraterMeasurement;
use egui::{Color32, RichText};
use egui_plot::{FilledArea, HLine, Line, Plot, PlotPoints, Points, Span, VLine};

/// What the ± on the diameter covers (craters::bootstrap, docs/metrics.md step 7).
pub const DIAMETER_SPREAD_HINT: &str = "± is one standard deviation from a bootstrap over \
azimuths (Efron 1979): the rim-crest points are resampled with replacement (50 seeded resamples \
with the default measurement) and the circle refitted each time. It covers how the crest \
scatters around the circle; not the DEM's own height or position error, nor a bias in where \
the crest is picked.";

/// What the ± on the depth covers.
pub const DEPTH_SPREAD_HINT: &str = "± is one standard deviation of the rim-crest median from \
the same bootstrap over azimuths, with the floor level held fixed: it covers how the rim height \
scatters, not the floor level's uncertainty or the DEM's vertical error.";

const PROFILE_COLOUR: Color32 = Color32::from_rgba_unmultiplied_const(160, 185, 220, 90);
const MEDIAN_COLOUR: Color32 = Color32::from_rgb(250, 210, 90);
const RIM_COLOUR: Color32 = Color32::from_rgb(240, 120, 100);
const FLOOR_COLOUR: Color32 = Color32::from_rgb(110, 200, 240);
const CREST_COLOUR: Color32 = Color32::from_rgb(250, 210, 90);
const CIRCLE_COLOUR: Color32 = Color32::from_gray(170);
const SPREAD_FILL: Color32 = Color32::from_rgba_unmultiplied_const(170, 170, 170, 45);
const GAP_FILL: Color32 = Color32::from_rgba_unmultiplied_const(230, 110, 100, 55);

/// The Shape page for crater `m`, with its radial profiles when the DEM is open.
pub fn shape_ui(ui: &mut egui::Ui, m: &CraterMeasurement, profiles: Option<&RadialProfiles>) {
    ui.strong("Radial profiles");
    match profiles {
        Some(p) => {
            profile_plot(
                ui,
                "radial-profiles",
                p,
                m.diameter_m / 2.0,
                m.floor_height_m,
            );
            key_row(
                ui,
                &[
                    KeyEntry::new(PROFILE_COLOUR, KeyMark::Line, "each azimuth"),
                    KeyEntry::new(MEDIAN_COLOUR, KeyMark::Line, "median"),
                    KeyEntry::new(RIM_COLOUR, KeyMark::Line, "fitted rim"),
                    KeyEntry::new(FLOOR_COLOUR, KeyMark::Line, "floor level"),
                ],
            );
        }
        None => {
            ui.label("Needs the DEM the survey was made from.");
        }
    }
    ui.add_space(6.0);
    ui.strong("Rim crest against the fitted circle");
    ui.label(
        RichText::new(format!(
            "Crest radius minus the fitted radius ({}), in metres: deviations are drawn far larger than true scale.",
            survey::metrics::metric("diameter_m")
                .map_or(format!("{:.0} m", m.diameter_m / 2.0), |d| d.format(m.diameter_m / 2.0))
        ))
        .small(),
    );
    rim_deviation_plot(
        ui,
        &m.rim_crest_radius_m,
        m.diameter_m / 2.0,
        m.diameter_sd_m / 2.0,
    );
    key_row(
        ui,
        &[
            KeyEntry::new(CREST_COLOUR, KeyMark::Dot, "crest traced"),
            KeyEntry::new(CIRCLE_COLOUR, KeyMark::Dashed, "fitted circle"),
            KeyEntry::new(Color32::from_gray(120), KeyMark::Fill, "radius ± 1 SD"),
            KeyEntry::new(
                Color32::from_rgb(150, 80, 75),
                KeyMark::Fill,
                "no crest traced",
            ),
        ],
    );
    shape_lines(ui, m);
}

/// Only the figures that say something: a complete rim has no gap, a level floor no tilt
/// direction, a round rim no major axis.
pub fn shape_lines(ui: &mut egui::Ui, m: &CraterMeasurement) {
    let label = survey::label_of;
    let fmt =
        |id: &str, v: f64| survey::metrics::metric(id).map_or(format!("{v:.2}"), |x| x.format(v));
    let hint = |id: &str| {
        survey::metrics::metric(id)
            .map_or(String::new(), |x| format!("{}\nid: {id}", x.description))
    };
    ui.label(format!(
        "{}: {} of azimuths",
        label("rim_completeness"),
        fmt("rim_completeness", m.rim_completeness)
    ))
    .on_hover_text(hint("rim_completeness"));
    if m.rim_gap_deg > 0.0 {
        ui.label(format!(
            "{}: {} centred toward {:.0}°",
            label("rim_gap_deg"),
            fmt("rim_gap_deg", m.rim_gap_deg),
            m.rim_gap_azimuth_deg
        ))
        .on_hover_text(hint("rim_gap_deg"));
    }
    if m.rim_fit_rms_m > 0.0 {
        ui.label(format!(
            "Crest points scatter {:.1} m (RMS) about the fitted circle",
            m.rim_fit_rms_m
        ));
    }
    if m.ellipticity >= 0.005 {
        ui.label(format!(
            "{}: {}, major axis toward {:.0}°",
            label("ellipticity"),
            fmt("ellipticity", m.ellipticity),
            m.ellipse_azimuth_deg
        ))
        .on_hover_text(hint("ellipticity"));
    }
    if m.floor_tilt_deg >= 0.05 {
        ui.label(format!(
            "{}: {} downhill toward {:.0}°",
            label("floor_tilt_deg"),
            fmt("floor_tilt_deg", m.floor_tilt_deg),
            m.floor_tilt_azimuth_deg
        ))
        .on_hover_text(hint("floor_tilt_deg"));
    }
}

/// Heights along every ray, their median, the fitted rim and the floor level.
pub fn profile_plot(
    ui: &mut egui::Ui,
    id: impl std::hash::Hash + std::fmt::Debug,
    p: &RadialProfiles,
    radius_m: f64,
    floor_m: f64,
) {
    Plot::new(id)
        .height(200.0)
        .x_axis_label("distance from centre [km]")
        .y_axis_label("height above the reference sphere [m]")
        .allow_scroll(false)
        .show(ui, |plot| {
            for ray in &p.heights_m {
                let pts: PlotPoints = p
                    .distance_m
                    .iter()
                    .zip(ray)
                    .filter(|(_, h)| h.is_finite())
                    .map(|(d, h)| [d / 1000.0, *h])
                    .collect();
                plot.line(
                    Line::new("", pts)
                        .color(PROFILE_COLOUR)
                        .width(1.0)
                        .allow_hover(false),
                );
            }
            let med: PlotPoints = p
                .distance_m
                .iter()
                .zip(&p.median_m)
                .filter(|(_, h)| h.is_finite())
                .map(|(d, h)| [d / 1000.0, *h])
                .collect();
            plot.line(Line::new("median", med).color(MEDIAN_COLOUR).width(2.5));
            plot.vline(VLine::new("fitted rim", radius_m / 1000.0).color(RIM_COLOUR));
            if floor_m.is_finite() {
                plot.hline(HLine::new("floor level", floor_m).color(FLOOR_COLOUR));
            }
        });
}

/// Runs of azimuth steps without a crest, as (first, last) step indices; a run across north
/// comes as two runs, one ending at the last step and one starting at step 0.
pub fn gap_runs(crest_m: &[f32]) -> Vec<(usize, usize)> {
    let mut runs = Vec::new();
    let mut start: Option<usize> = None;
    for (k, r) in crest_m.iter().enumerate() {
        match (r.is_finite(), start) {
            (false, None) => start = Some(k),
            (true, Some(s)) => {
                runs.push((s, k - 1));
                start = None;
            }
            _ => {}
        }
    }
    if let Some(s) = start {
        runs.push((s, crest_m.len() - 1));
    }
    runs
}

fn rim_deviation_plot(ui: &mut egui::Ui, crest_m: &[f32], radius_m: f64, radius_sd_m: f64) {
    let n = crest_m.len().max(1);
    let step = 360.0 / n as f64;
    let dev: Vec<Option<[f64; 2]>> = crest_m
        .iter()
        .enumerate()
        .map(|(k, r)| {
            r.is_finite()
                .then_some([k as f64 * step, *r as f64 - radius_m])
        })
        .collect();
    let reach = dev
        .iter()
        .flatten()
        .map(|p| p[1].abs())
        .fold(radius_sd_m.abs().max(1.0), f64::max)
        * 1.25;
    Plot::new("rim-deviation")
        .height(170.0)
        .x_axis_label("azimuth from north, clockwise [°]")
        .y_axis_label("crest minus fitted radius [m]")
        .default_x_bounds(0.0, 360.0)
        .default_y_bounds(-reach, reach)
        .x_grid_spacer(azimuth_grid)
        .x_axis_formatter(azimuth_tick)
        .allow_scroll(false)
        .show(ui, |plot| {
            for (a, b) in gap_runs(crest_m) {
                let (x0, x1) = (
                    (a as f64 - 0.5) * step,
                    ((b as f64 + 0.5) * step).min(360.0),
                );
                plot.span(
                    Span::new("", x0.max(0.0)..=x1)
                        .fill(GAP_FILL)
                        .border_width(0.0),
                );
            }
            if radius_sd_m > 0.0 {
                plot.add(
                    FilledArea::new(
                        "",
                        &[0.0, 360.0],
                        &[-radius_sd_m, -radius_sd_m],
                        &[radius_sd_m, radius_sd_m],
                    )
                    .fill_color(SPREAD_FILL)
                    .allow_hover(false),
                );
            }
            plot.hline(
                HLine::new("", 0.0)
                    .color(CIRCLE_COLOUR)
                    .style(egui_plot::LineStyle::dashed_loose()),
            );
            // Lines join neighbouring crests only; a gap breaks them.
            let mut seg: Vec<[f64; 2]> = Vec::new();
            for p in &dev {
                match p {
                    Some(p) => seg.push(*p),
                    None if !seg.is_empty() => plot.line(
                        Line::new("", PlotPoints::from(std::mem::take(&mut seg)))
                            .color(CREST_COLOUR.gamma_multiply(0.6))
                            .width(1.0),
                    ),
                    None => {}
                }
            }
            if !seg.is_empty() {
                plot.line(
                    Line::new("", PlotPoints::from(seg))
                        .color(CREST_COLOUR.gamma_multiply(0.6))
                        .width(1.0),
                );
            }
            let pts: Vec<[f64; 2]> = dev.iter().flatten().copied().collect();
            plot.points(
                Points::new("crest", PlotPoints::from(pts))
                    .radius(2.5)
                    .color(CREST_COLOUR),
            );
        });
}

#[cfg(test)]
mod tests {
    use super::gap_runs;

    #[test]
    fn gaps_are_found_at_both_ends_and_inside() {
        let n = f32::NAN;
        assert_eq!(gap_runs(&[1.0, 1.0, 1.0]), vec![]);
        assert_eq!(
            gap_runs(&[n, 1.0, n, n, 1.0, n]),
            vec![(0, 0), (2, 3), (5, 5)]
        );
    }
}

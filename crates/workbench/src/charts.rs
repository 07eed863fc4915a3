//! Pieces shared by the sheet's and the comparison's plots: a key drawn under a plot (so it
//! never covers the data), an azimuth axis from north, and the colours that tell compared
//! candidates apart.

use egui::{Color32, Sense, Stroke, Vec2};
use egui_plot::{GridInput, GridMark};
use std::ops::RangeInclusive;

/// How an entry of a key is drawn.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum KeyMark {
    Line,
    Dashed,
    Fill,
    Dot,
}

/// One entry of a key under a plot.
pub struct KeyEntry<'a> {
    pub colour: Color32,
    pub mark: KeyMark,
    pub text: &'a str,
}

impl<'a> KeyEntry<'a> {
    pub fn new(colour: Color32, mark: KeyMark, text: &'a str) -> Self {
        KeyEntry { colour, mark, text }
    }
}

/// A plot's key as a wrapped row of swatches and words, placed under the plot.
pub fn key_row(ui: &mut egui::Ui, entries: &[KeyEntry<'_>]) {
    ui.horizontal_wrapped(|ui| {
        ui.spacing_mut().item_spacing.x = 4.0;
        for e in entries {
            let (rect, _) = ui.allocate_exact_size(Vec2::new(18.0, 12.0), Sense::hover());
            let p = ui.painter();
            let (l, r, y) = (rect.left(), rect.right(), rect.center().y);
            match e.mark {
                KeyMark::Line => {
                    p.line_segment([(l, y).into(), (r, y).into()], Stroke::new(2.0, e.colour));
                }
                KeyMark::Dashed => {
                    for k in 0..3 {
                        let x0 = l + k as f32 * 6.5;
                        p.line_segment(
                            [(x0, y).into(), ((x0 + 4.0).min(r), y).into()],
                            Stroke::new(1.5, e.colour),
                        );
                    }
                }
                KeyMark::Fill => {
                    p.rect_filled(rect.shrink(1.0), 1.0, e.colour);
                }
                KeyMark::Dot => {
                    p.circle_filled(rect.center(), 4.0, e.colour);
                }
            }
            ui.label(egui::RichText::new(e.text).small());
            ui.add_space(8.0);
        }
    });
}

/// Grid marks every 15 degrees of azimuth, stronger every 45 and 90.
/// The level line (0 degrees of elevation) of a skyline or sky plot, dashed grey.
pub fn level_line() -> egui_plot::HLine {
    egui_plot::HLine::new("", 0.0)
        .color(Color32::from_gray(150))
        .style(egui_plot::LineStyle::dashed_loose())
}

/// Elevation marks every 10 degrees with the 30-degree ones stronger, so a skyline plot of
/// -90..+30 degrees labels -90, -60, -30, 0 and 30 rather than the level line alone.
pub fn elevation_grid(input: GridInput) -> Vec<GridMark> {
    marks_every(input, 10.0, &[30.0])
}

/// Azimuth marks every 15 degrees, the 45-degree ones stronger and the cardinal ones strongest.
pub fn azimuth_grid(input: GridInput) -> Vec<GridMark> {
    marks_every(input, 15.0, &[90.0, 45.0])
}

/// Marks every `step` over the input's bounds, each carrying as its size the first of `strong`
/// (largest first) it is a multiple of, else `step`.
fn marks_every(input: GridInput, step: f64, strong: &[f64]) -> Vec<GridMark> {
    let (lo, hi) = input.bounds;
    let mut marks = Vec::new();
    let mut v = (lo / step).floor() * step;
    while v <= hi {
        let step_size = strong
            .iter()
            .copied()
            .find(|s| v.rem_euclid(*s) == 0.0)
            .unwrap_or(step);
        marks.push(GridMark {
            value: v,
            step_size,
        });
        v += step;
    }
    marks
}

/// Tick labels of an azimuth axis: degrees, with the compass point at the cardinal ones.
pub fn azimuth_tick(mark: GridMark, _range: &RangeInclusive<f64>) -> String {
    let a = mark.value;
    if mark.step_size < 45.0 {
        return String::new();
    }
    match a.rem_euclid(360.0) as i64 {
        0 => format!("{a:.0}° N"),
        90 => format!("{a:.0}° E"),
        180 => format!("{a:.0}° S"),
        270 => format!("{a:.0}° W"),
        _ => format!("{a:.0}°"),
    }
}

/// Colours of the compared candidates, in the order they were chosen.
pub const COMPARE_COLOURS: [Color32; 4] = [
    Color32::from_rgb(250, 200, 70),
    Color32::from_rgb(90, 180, 250),
    Color32::from_rgb(240, 110, 150),
    Color32::from_rgb(130, 220, 140),
];

//! The map's keys: what the terrain colours mean (height above the reference sphere, slope,
//! or plain relief) and what every mark on the map is (rim colours with their score values,
//! failing rims, dots, the selection, the placed reflector, the go-to point).

use crate::marks::{draw_legend_mark, LegendMark};
use crate::shading::{self, MapLayer};
use egui::{Align2, Color32, FontId, Painter, Pos2, Rect, Shape, Stroke, StrokeKind, Vec2};

/// The placed reflector's aperture edge when the structure fits, and when it does not.
pub const APERTURE_FITS_COLOUR: Color32 = Color32::WHITE;
pub const APERTURE_MISFIT_COLOUR: Color32 = Color32::from_rgb(240, 140, 120);
/// A rim anchor of the placed reflector.
pub const ANCHOR_COLOUR: Color32 = Color32::from_rgb(255, 170, 40);
/// The point the map was last sent to (View > go to lon, lat).
pub const GOTO_COLOUR: Color32 = Color32::from_rgb(90, 220, 255);

const BG: Color32 = Color32::from_black_alpha(175);
const TEXT: Color32 = Color32::WHITE;
const NOTE: Color32 = Color32::from_gray(190);

/// What the legends need to know about the map as drawn.
pub struct LegendState {
    pub layer: MapLayer,
    /// Height range the tint stretches over, metres.
    pub height_range_m: Option<(f32, f32)>,
    /// Top of the slope colour scale, degrees.
    pub slope_top_deg: Option<f32>,
    /// Radius of the sphere heights are measured from, metres.
    pub body_radius_m: f64,
    /// Lowest and highest score among passing candidates (the ends of the rim colours);
    /// `None` when no candidate passes or there is no survey.
    pub score_range: Option<(f64, f64)>,
    pub show_failing: bool,
    pub goto_shown: bool,
    /// The criteria's areas drawn on the map: name and which side candidates keep to.
    pub areas: Vec<(String, siting::areas::Keep)>,
}

/// What the height legend says heights are measured from: "above the 1737.4 km sphere".
pub fn height_reference(body_radius_m: f64) -> String {
    format!("above the {:.1} km sphere", body_radius_m / 1000.0)
}

/// Draw the terrain key and the marks key along the bottom left of `rect`; returns the
/// boxes they cover (so labels keep clear of them).
pub fn draw_legends(painter: &Painter, rect: Rect, state: &LegendState) -> Vec<Rect> {
    let terrain = terrain_legend(painter, rect.left_bottom() + Vec2::new(10.0, -10.0), state);
    let marks_at = Pos2::new(terrain.max.x + 8.0, rect.max.y - 10.0);
    let marks = marks_legend(painter, marks_at, state);
    vec![terrain, marks]
}

/// Terrain key with its lower-left corner at `corner`.
fn terrain_legend(painter: &Painter, corner: Pos2, state: &LegendState) -> Rect {
    let (bar_w, bar_h) = (14.0, 110.0);
    let reference = height_reference(state.body_radius_m);
    let (title, sub, scale): (&str, String, Option<Scale>) = match state.layer {
        MapLayer::HeightTint => (
            "Height, m",
            reference,
            state.height_range_m.map(|(lo, hi)| Scale {
                colour: shading::tint,
                ticks: [lo, (lo + hi) / 2.0, hi].map(|v| format!("{v:.0}")),
            }),
        ),
        MapLayer::Slope => (
            "Slope, degrees",
            "Horn (1981), at the pixel size shown".to_string(),
            state.slope_top_deg.map(|top| Scale {
                colour: shading::slope_colour,
                ticks: [
                    "0".to_string(),
                    format!("{:.0}", top / 2.0),
                    format!("{top:.0} and steeper"),
                ],
            }),
        ),
        MapLayer::Relief => (
            "Shaded relief",
            format!(
                "lamp from azimuth {:.0}°, {:.0}° up",
                shading::LAMP_AZIMUTH_DEG,
                shading::LAMP_ALTITUDE_DEG
            ),
            None,
        ),
    };
    let font = FontId::proportional(12.0);
    let small = FontId::proportional(11.0);
    let title_g = painter.layout_no_wrap(title.to_string(), font, TEXT);
    let sub_g = painter.layout_no_wrap(sub, small.clone(), NOTE);
    let body_h = if scale.is_some() { bar_h + 8.0 } else { 0.0 };
    let tick_w = scale.as_ref().map_or(0.0, |s| {
        s.ticks
            .iter()
            .map(|t| {
                painter
                    .layout_no_wrap(t.clone(), small.clone(), TEXT)
                    .size()
                    .x
            })
            .fold(0.0, f32::max)
    });
    let w = (title_g.size().x)
        .max(sub_g.size().x)
        .max(bar_w + 6.0 + tick_w)
        + 16.0;
    let h = 8.0 + title_g.size().y + sub_g.size().y + 6.0 + body_h;
    let bx = Rect::from_min_size(corner - Vec2::new(0.0, h), Vec2::new(w, h));
    painter.rect_filled(bx, 4.0, BG);
    let mut y = bx.min.y + 6.0;
    let x = bx.min.x + 8.0;
    let th = title_g.size().y;
    painter.galley(Pos2::new(x, y), title_g, TEXT);
    y += th;
    let sh = sub_g.size().y;
    painter.galley(Pos2::new(x, y), sub_g, NOTE);
    y += sh + 6.0;
    if let Some(scale) = scale {
        let bar = Rect::from_min_size(Pos2::new(x, y), Vec2::new(bar_w, bar_h));
        vertical_ramp(painter, bar, scale.colour);
        for (t, text) in [1.0, 0.5, 0.0].into_iter().zip(scale.ticks.iter().rev()) {
            let ty = bar.max.y - bar_h * t;
            painter.line_segment(
                [Pos2::new(bar.max.x, ty), Pos2::new(bar.max.x + 3.0, ty)],
                Stroke::new(1.0, TEXT),
            );
            painter.text(
                Pos2::new(bar.max.x + 6.0, ty),
                Align2::LEFT_CENTER,
                text,
                small.clone(),
                TEXT,
            );
        }
    }
    bx
}

struct Scale {
    colour: fn(f32) -> Color32,
    /// Bottom, middle, top.
    ticks: [String; 3],
}

fn vertical_ramp(painter: &Painter, bar: Rect, colour: fn(f32) -> Color32) {
    let steps = 48;
    let h = bar.height() / steps as f32;
    for i in 0..steps {
        let t = (i as f32 + 0.5) / steps as f32;
        let y0 = bar.max.y - h * (i + 1) as f32;
        painter.rect_filled(
            Rect::from_min_size(Pos2::new(bar.min.x, y0), Vec2::new(bar.width(), h + 0.5)),
            0.0,
            colour(t),
        );
    }
    painter.rect_stroke(
        bar,
        0.0,
        Stroke::new(1.0, Color32::from_gray(200)),
        StrokeKind::Outside,
    );
}

/// Row height and icon column of the marks key, points.
const ROW_PT: f32 = 18.0;
const ICON_PT: f32 = 26.0;

/// A row of the marks key: an icon and what it means.
enum Icon {
    Mark(LegendMark),
    Ring(Color32),
    Anchor,
    Goto,
    Area(siting::areas::Keep),
    Nothing,
}

/// Marks key with its lower-left corner at `corner`.
fn marks_legend(painter: &Painter, corner: Pos2, state: &LegendState) -> Rect {
    let small = FontId::proportional(11.0);
    let mut rows: Vec<(Icon, String)> = vec![
        (
            Icon::Mark(LegendMark::Passing(0.8)),
            "Rim of a crater that meets every limit".into(),
        ),
        (
            Icon::Mark(LegendMark::Failing),
            if state.show_failing {
                "Rim of a crater that fails a limit".into()
            } else {
                "Fails a limit (hidden now)".into()
            },
        ),
        (
            Icon::Mark(LegendMark::Dot(0.8)),
            "Rim too small or crowded to outline".into(),
        ),
        (Icon::Mark(LegendMark::Selected), "Selected crater".into()),
        (
            Icon::Ring(APERTURE_FITS_COLOUR),
            "Placed reflector aperture: fits".into(),
        ),
        (
            Icon::Ring(APERTURE_MISFIT_COLOUR),
            "Placed reflector aperture: does not fit".into(),
        ),
        (Icon::Anchor, "Rim anchor of the placed reflector".into()),
    ];
    if state.goto_shown {
        rows.push((Icon::Goto, "Place you went to".into()));
    }
    for (name, keep) in &state.areas {
        rows.push((Icon::Area(*keep), format!("{}: {name}", keep.noun())));
    }
    rows.push((Icon::Nothing, "No mark: no crater found there".into()));
    let title = "Rim colour: score";
    let note = match state.score_range {
        Some(_) => "stretched over the passing craters' scores",
        None => "no crater passes: nothing to colour",
    };
    let text_w = rows
        .iter()
        .map(|(_, t)| {
            painter
                .layout_no_wrap(t.clone(), small.clone(), TEXT)
                .size()
                .x
        })
        .chain([
            painter
                .layout_no_wrap(title.into(), FontId::proportional(12.0), TEXT)
                .size()
                .x
                - ICON_PT,
            painter
                .layout_no_wrap(note.into(), small.clone(), NOTE)
                .size()
                .x
                - ICON_PT,
        ])
        .fold(0.0, f32::max);
    let w = 16.0 + ICON_PT + text_w.max(150.0);
    let ramp_h = if state.score_range.is_some() {
        30.0
    } else {
        0.0
    };
    let h = 8.0 + 16.0 + 14.0 + ramp_h + 6.0 + ROW_PT * rows.len() as f32 + 4.0;
    let bx = Rect::from_min_size(corner - Vec2::new(0.0, h), Vec2::new(w, h));
    painter.rect_filled(bx, 4.0, BG);
    let x = bx.min.x + 8.0;
    let mut y = bx.min.y + 6.0;
    painter.text(
        Pos2::new(x, y),
        Align2::LEFT_TOP,
        title,
        FontId::proportional(12.0),
        TEXT,
    );
    y += 16.0;
    painter.text(Pos2::new(x, y), Align2::LEFT_TOP, note, small.clone(), NOTE);
    y += 14.0;
    if let Some((lo, hi)) = state.score_range {
        let bar = Rect::from_min_size(Pos2::new(x, y + 2.0), Vec2::new(w - 16.0, 10.0));
        let steps = 48;
        let sw = bar.width() / steps as f32;
        for i in 0..steps {
            let t = (i as f64 + 0.5) / steps as f64;
            painter.rect_filled(
                Rect::from_min_size(
                    Pos2::new(bar.min.x + sw * i as f32, bar.min.y),
                    Vec2::new(sw + 0.5, bar.height()),
                ),
                0.0,
                shading::score_colour(t),
            );
        }
        for (t, v, align) in [
            (0.0, lo, Align2::LEFT_TOP),
            (0.5, (lo + hi) / 2.0, Align2::CENTER_TOP),
            (1.0, hi, Align2::RIGHT_TOP),
        ] {
            let px = bar.min.x + bar.width() * t;
            painter.text(
                Pos2::new(px, bar.max.y + 2.0),
                align,
                format!("{v:.3}"),
                small.clone(),
                TEXT,
            );
        }
        y += ramp_h;
    }
    y += 6.0;
    for (icon, text) in rows {
        let c = Pos2::new(x + ICON_PT / 2.0, y + ROW_PT / 2.0);
        draw_icon(painter, &icon, c);
        let colour = if matches!(icon, Icon::Nothing) {
            NOTE
        } else {
            TEXT
        };
        painter.text(
            Pos2::new(x + ICON_PT + 4.0, c.y),
            Align2::LEFT_CENTER,
            text,
            small.clone(),
            colour,
        );
        y += ROW_PT;
    }
    bx
}

fn draw_icon(painter: &Painter, icon: &Icon, c: Pos2) {
    match *icon {
        Icon::Mark(LegendMark::Dot(t)) => draw_legend_mark(painter, LegendMark::Dot(t), c, 0.0),
        Icon::Mark(m) => draw_legend_mark(painter, m, c, 6.5),
        Icon::Ring(colour) => {
            painter.circle_stroke(c, 6.5, Stroke::new(1.5, colour));
        }
        Icon::Anchor => draw_anchor(painter, c),
        Icon::Goto => draw_goto(painter, c),
        Icon::Area(keep) => {
            let r = Rect::from_center_size(c, Vec2::splat(11.0));
            let stroke = Stroke::new(2.0, crate::map_draw::colour_of(keep));
            let corners = [
                r.left_top(),
                r.right_top(),
                r.right_bottom(),
                r.left_bottom(),
                r.left_top(),
            ];
            match keep {
                siting::areas::Keep::Inside => {
                    painter.add(Shape::line(corners.to_vec(), stroke));
                }
                siting::areas::Keep::Outside => {
                    painter.extend(Shape::dashed_line(&corners, stroke, 3.0, 2.0));
                }
            }
        }
        Icon::Nothing => {}
    }
}

/// A rim anchor as the map draws it.
pub fn draw_anchor(painter: &Painter, p: Pos2) {
    painter.circle_filled(p, 3.0, ANCHOR_COLOUR);
    painter.circle_stroke(p, 3.0, Stroke::new(1.0, Color32::BLACK));
}

/// The go-to point: a crosshair over a dark one.
pub fn draw_goto(painter: &Painter, p: Pos2) {
    for (w, colour) in [(3.5, Color32::from_black_alpha(190)), (1.5, GOTO_COLOUR)] {
        let s = Stroke::new(w, colour);
        for d in [Vec2::X, Vec2::Y] {
            painter.add(Shape::line_segment([p - d * 8.0, p - d * 3.0], s));
            painter.add(Shape::line_segment([p + d * 3.0, p + d * 8.0], s));
        }
    }
}

#[cfg(test)]
mod tests {
    /// The lunar reference sphere: IAU mean radius 1737.4 km (Archinal et al. 2018, Celest.
    /// Mech. Dyn. Astron. 130:22; domain-notes §2).
    #[test]
    fn height_legend_names_the_lunar_reference_sphere() {
        assert_eq!(
            super::height_reference(terrain::MOON_RADIUS_M),
            "above the 1737.4 km sphere"
        );
    }
}

//! The reflector plan: clearance cells, rim anchors with their spans, the aperture edge and the
//! crater rim over grey shaded relief, in the local frame of the structure's axis (x east,
//! y north). Drawing and DEM look-ups only.

use crate::shading::{LAMP_ALTITUDE_DEG, LAMP_AZIMUTH_DEG};
use egui::{Align2, Color32, FontId, Pos2, Rect, Sense, Shape, Stroke, Vec2};
use structure::{StructureFit, StructureSpec};
use survey::Candidate;
use terrain::{Dem, LocalFrame};

const FAIL_COLOUR: Color32 = Color32::from_rgb(240, 140, 120);
/// Clearance below the spec's minimum.
const SHORT_COLOUR: Color32 = Color32::from_rgb(230, 60, 50);
/// Clearance ramp: tight (at the minimum) to ample (the largest on the map).
const TIGHT_RGB: [u8; 3] = [252, 232, 90];
const AMPLE_RGB: [u8; 3] = [60, 110, 235];
const CELL_ALPHA: f32 = 0.62;
const OUTLINE_COLOUR: Color32 = Color32::WHITE;
const ANCHOR_COLOUR: Color32 = Color32::from_rgb(255, 170, 40);
/// Backdrop resolution, pixels a side, and the largest DEM window read for it.
const BACKDROP_PX: usize = 200;
const BACKDROP_WINDOW_MAX_PX: usize = 1024;
const LEGEND_W: f32 = 96.0;
/// The plan reaches this much beyond the farthest anchor.
pub const PLAN_MARGIN: f64 = 1.15;

/// Colour of a clearance value: red under the minimum, else yellow (tight) to blue (ample).
pub fn clearance_colour(v_m: f32, min_m: f32, max_m: f32) -> Color32 {
    // Half a decimetre of slack: the fit's own minimum cell sits at the limit to rounding.
    if v_m < min_m - 0.05 {
        return SHORT_COLOUR;
    }
    let t = ((v_m - min_m) / (max_m - min_m).max(1e-3)).clamp(0.0, 1.0);
    let mix = |k: usize| {
        (TIGHT_RGB[k] as f32 + (AMPLE_RGB[k] as f32 - TIGHT_RGB[k] as f32) * t).round() as u8
    };
    Color32::from_rgb(mix(0), mix(1), mix(2))
}

/// Half the side of the plan square: the farthest anchor or aperture edge, plus a margin.
pub fn plan_half_width_m(f: &StructureFit, frame: &LocalFrame) -> f64 {
    let far = f
        .anchors
        .iter()
        .map(|a| (a.lon_deg, a.lat_deg))
        .chain(f.aperture_outline_lonlat.iter().copied())
        .map(|(lon, lat)| {
            let (x, y) = frame.to_local(lon, lat);
            x.abs().max(y.abs())
        })
        .fold(
            f.clearance_map.cell_m * f.clearance_map.size as f64 / 2.0,
            f64::max,
        );
    (far * PLAN_MARGIN).max(1.0)
}

/// The DEM window holding a square of half-side `half_m` round the frame's centre (at most
/// `max_px` a side), and the DEM's post there (the smaller side), m.
pub fn window_round(
    dem: &Dem,
    frame: &LocalFrame,
    half_m: f64,
    max_px: usize,
) -> Result<(terrain::ElevationGrid, f64), String> {
    let geom = dem.geometry();
    let (col, row) = geom
        .lonlat_to_pixel(frame.centre_lon_deg, frame.centre_lat_deg)
        .ok_or("the crater lies off the DEM")?;
    let (dx, dy) = geom
        .pixel_size_m_at(col, row)
        .ok_or("the DEM's pixel size is unknown here")?;
    let post_m = dx.min(dy);
    // The square's corners are sqrt(2) half-widths out; a little more covers projection skew.
    let half_px = (half_m * 1.6 / post_m).ceil() as usize + 2;
    if 2 * half_px > max_px {
        return Err(format!(
            "the surroundings span more than {max_px} px of the DEM; not drawn"
        ));
    }
    let grid = dem
        .read_window(
            col.floor() as isize - half_px as isize,
            row.floor() as isize - half_px as isize,
            2 * half_px,
            2 * half_px,
        )
        .map_err(|e| e.to_string())?;
    Ok((grid, post_m))
}

/// Grey hillshade of the DEM resampled onto the plan square (nearest pixel).
pub fn backdrop(dem: &Dem, frame: &LocalFrame, half_m: f64) -> Option<egui::ColorImage> {
    let geom = dem.geometry();
    let (grid, _) = window_round(dem, frame, half_m, BACKDROP_WINDOW_MAX_PX).ok()?;
    let shade = terrain::derivatives::hillshade(&grid, LAMP_AZIMUTH_DEG, LAMP_ALTITUDE_DEG, 1.0);
    let n = BACKDROP_PX;
    let pixels = (0..n * n)
        .map(|k| {
            let (i, j) = (k % n, k / n);
            let x = ((i as f64 + 0.5) / n as f64 * 2.0 - 1.0) * half_m;
            let y = (1.0 - (j as f64 + 0.5) / n as f64 * 2.0) * half_m;
            let (lon, lat) = frame.to_lonlat(x, y);
            let s = geom.lonlat_to_pixel(lon, lat).and_then(|(c, r)| {
                // Bilinear between pixel centres, so the relief does not show the DEM's posts.
                let (fc, fr) = (c - grid.col0 as f64 - 0.5, r - grid.row0 as f64 - 0.5);
                let (c0, r0) = (fc.floor(), fr.floor());
                let at = |dc: f64, dr: f64| {
                    let (cc, rr) = (c0 + dc, r0 + dr);
                    (cc >= 0.0
                        && rr >= 0.0
                        && (cc as usize) < grid.width
                        && (rr as usize) < grid.height)
                        .then(|| shade[rr as usize * grid.width + cc as usize] as f64)
                        .filter(|s| !s.is_nan())
                };
                let (tc, tr) = (fc - c0, fr - r0);
                let top = at(0.0, 0.0)? * (1.0 - tc) + at(1.0, 0.0)? * tc;
                let bottom = at(0.0, 1.0)? * (1.0 - tc) + at(1.0, 1.0)? * tc;
                Some((top * (1.0 - tr) + bottom * tr) as f32)
            });
            match s {
                Some(s) => Color32::from_gray((30.0 + 0.75 * s).clamp(0.0, 255.0) as u8),
                None => Color32::from_gray(24),
            }
        })
        .collect();
    Some(egui::ColorImage::new([n, n], pixels))
}

pub fn plan(
    ui: &mut egui::Ui,
    f: &StructureFit,
    spec: Option<&StructureSpec>,
    frame: &LocalFrame,
    half_m: f64,
    backdrop: Option<&egui::TextureHandle>,
    c: &Candidate,
) {
    let side = (ui.available_width() - LEGEND_W).clamp(120.0, 420.0);
    let (response, painter) = ui.allocate_painter(Vec2::new(side + LEGEND_W, side), Sense::hover());
    let sq = Rect::from_min_size(response.rect.min, Vec2::splat(side));
    let scale = side as f64 / (2.0 * half_m);
    let to_screen = |x: f64, y: f64| {
        Pos2::new(
            sq.center().x + (x * scale) as f32,
            sq.center().y - (y * scale) as f32,
        )
    };
    let painter_sq = painter.with_clip_rect(sq);
    painter.rect_filled(sq, 0.0, Color32::from_gray(24));
    if let Some(t) = backdrop {
        painter_sq.image(
            t.id(),
            sq,
            Rect::from_min_max(Pos2::ZERO, Pos2::new(1.0, 1.0)),
            Color32::WHITE,
        );
    }

    // Clearance cells, in the map's own frame (centred on the same axis).
    let map = &f.clearance_map;
    let cells: Vec<f32> = map
        .values_m
        .iter()
        .copied()
        .filter(|v| v.is_finite())
        .collect();
    let min_ok = spec.map_or(0.0, |s| s.min_clearance_m as f32);
    let hi = cells.iter().copied().fold(min_ok + 1.0, f32::max);
    let mframe = LocalFrame::new(frame.radius_m, map.centre_lon_deg, map.centre_lat_deg);
    let (ox, oy) = frame.to_local(mframe.centre_lon_deg, mframe.centre_lat_deg);
    for row in 0..map.size {
        for col in 0..map.size {
            let Some(v) = map.get(col, row) else { continue };
            let (x, y) = map.cell_centre_xy_m(col, row);
            let h = map.cell_m / 2.0;
            let r = Rect::from_two_pos(
                to_screen(ox + x - h, oy + y - h),
                to_screen(ox + x + h, oy + y + h),
            );
            painter_sq.rect_filled(
                r,
                0.0,
                clearance_colour(v, min_ok, hi).gamma_multiply(CELL_ALPHA),
            );
        }
    }

    // Crater rim (fitted circle) for context.
    let (cx, cy) = frame.to_local(c.crater.centre_lon_deg, c.crater.centre_lat_deg);
    let rim_r = (c.crater.diameter_m / 2.0 * scale) as f32;
    painter_sq.circle_stroke(
        to_screen(cx, cy),
        rim_r,
        Stroke::new(1.0, Color32::from_rgba_unmultiplied(200, 200, 200, 140)),
    );

    // Aperture edge and anchors with their spans to it.
    let outline: Vec<Pos2> = f
        .aperture_outline_lonlat
        .iter()
        .map(|&(lon, lat)| {
            let (x, y) = frame.to_local(lon, lat);
            to_screen(x, y)
        })
        .collect();
    painter_sq.add(Shape::line(outline, Stroke::new(2.0, OUTLINE_COLOUR)));
    let a_r = spec.map_or(0.0, |s| s.aperture_radius_m());
    for (k, a) in f.anchors.iter().enumerate() {
        let (x, y) = frame.to_local(a.lon_deg, a.lat_deg);
        let p = to_screen(x, y);
        let az = a.azimuth_deg.to_radians();
        if a_r > 0.0 {
            let edge = to_screen(a_r * az.sin(), a_r * az.cos());
            painter_sq.line_segment(
                [p, edge],
                Stroke::new(1.0, ANCHOR_COLOUR.gamma_multiply(0.8)),
            );
        }
        if a.on_crest {
            painter_sq.circle_filled(p, 5.0, ANCHOR_COLOUR);
        } else {
            painter_sq.circle_stroke(p, 5.0, Stroke::new(2.0, FAIL_COLOUR));
        }
        painter_sq.text(
            p + Vec2::new(7.0, -7.0),
            Align2::LEFT_BOTTOM,
            format!("{}", k + 1),
            FontId::proportional(12.0),
            Color32::WHITE,
        );
    }
    // Where the clearance is smallest.
    let (mx, my) = frame.to_local(f.min_clearance_lon_deg, f.min_clearance_lat_deg);
    let mp = to_screen(mx, my);
    let s = Stroke::new(2.0, Color32::BLACK);
    painter_sq.line_segment([mp - Vec2::splat(5.0), mp + Vec2::splat(5.0)], s);
    painter_sq.line_segment([mp + Vec2::new(-5.0, 5.0), mp + Vec2::new(5.0, -5.0)], s);

    // North arrow and a scale bar.
    let n_at = sq.right_top() + Vec2::new(-16.0, 10.0);
    painter.arrow(
        n_at + Vec2::new(0.0, 18.0),
        Vec2::new(0.0, -14.0),
        Stroke::new(1.5, Color32::WHITE),
    );
    painter.text(
        n_at + Vec2::new(0.0, 20.0),
        Align2::CENTER_TOP,
        "N",
        FontId::proportional(11.0),
        Color32::WHITE,
    );
    let bar_m = [500.0, 200.0, 100.0, 50.0, 20.0, 10.0]
        .into_iter()
        .find(|m| m * scale <= side as f64 / 3.0)
        .unwrap_or(10.0);
    let b0 = sq.left_bottom() + Vec2::new(10.0, -10.0);
    let b1 = b0 + Vec2::new((bar_m * scale) as f32, 0.0);
    painter.line_segment([b0, b1], Stroke::new(2.0, Color32::WHITE));
    painter.text(
        b0 + Vec2::new(0.0, -4.0),
        Align2::LEFT_BOTTOM,
        format!("{bar_m:.0} m"),
        FontId::proportional(11.0),
        Color32::WHITE,
    );

    legend(
        &painter,
        Rect::from_min_max(sq.right_top() + Vec2::new(10.0, 0.0), response.rect.max),
        min_ok,
        hi,
    );

    // Pointer read-out of the clearance cell under it.
    if let Some(p) = response.hover_pos().filter(|p| sq.contains(*p)) {
        let x = (p.x - sq.center().x) as f64 / scale - ox;
        let y = (sq.center().y - p.y) as f64 / scale - oy;
        let h = map.size as f64 / 2.0;
        let (col, row) = ((x / map.cell_m + h).floor(), (h - y / map.cell_m).floor());
        if col >= 0.0 && row >= 0.0 {
            if let Some(v) = map.get(col as usize, row as usize) {
                response
                    .clone()
                    .on_hover_text_at_pointer(format!("clearance {v:.1} m"));
            }
        }
    }
    response.widget_info(|| egui::WidgetInfo::labeled(egui::Role::Canvas, true, "Reflector plan"));
}

fn legend(painter: &egui::Painter, r: Rect, lo: f32, hi: f32) {
    let font = FontId::proportional(11.0);
    painter.text(
        r.left_top(),
        Align2::LEFT_TOP,
        "Clearance",
        font.clone(),
        Color32::WHITE,
    );
    let bar = Rect::from_min_size(
        r.left_top() + Vec2::new(0.0, 18.0),
        Vec2::new(14.0, (r.height() * 0.45).max(60.0)),
    );
    let steps = 32;
    for i in 0..steps {
        let t = i as f32 / steps as f32;
        let y = bar.bottom() - bar.height() * (t + 1.0 / steps as f32);
        let cell = Rect::from_min_size(
            Pos2::new(bar.left(), y),
            Vec2::new(bar.width(), bar.height() / steps as f32 + 0.5),
        );
        painter.rect_filled(
            cell,
            0.0,
            clearance_colour(lo + (hi - lo) * (t + 0.5 / steps as f32), lo, hi),
        );
    }
    for (t, v) in [(1.0, hi), (0.0, lo)] {
        painter.text(
            Pos2::new(bar.right() + 5.0, bar.bottom() - bar.height() * t),
            Align2::LEFT_CENTER,
            format!("{v:.0} m"),
            font.clone(),
            Color32::WHITE,
        );
    }
    let short = Rect::from_min_size(
        bar.left_bottom() + Vec2::new(0.0, 10.0),
        Vec2::new(14.0, 10.0),
    );
    painter.rect_filled(short, 0.0, SHORT_COLOUR);
    painter.text(
        short.right_center() + Vec2::new(5.0, 0.0),
        Align2::LEFT_CENTER,
        format!("< {lo:.0} m"),
        font.clone(),
        Color32::WHITE,
    );
    let mut y = short.bottom() + 14.0;
    let mut item = |draw: &dyn Fn(Pos2), text: &str| {
        draw(Pos2::new(bar.center().x, y));
        painter.text(
            Pos2::new(bar.right() + 5.0, y),
            Align2::LEFT_CENTER,
            text,
            font.clone(),
            Color32::WHITE,
        );
        y += 16.0;
    };
    item(
        &|p| {
            painter.circle_filled(p, 4.5, ANCHOR_COLOUR);
        },
        "anchor",
    );
    item(
        &|p| {
            painter.circle_stroke(p, 4.5, Stroke::new(2.0, FAIL_COLOUR));
        },
        "off crest",
    );
    item(
        &|p| {
            painter.line_segment(
                [p - Vec2::new(7.0, 0.0), p + Vec2::new(7.0, 0.0)],
                Stroke::new(2.0, OUTLINE_COLOUR),
            );
        },
        "aperture",
    );
    item(
        &|p| {
            painter.circle_stroke(p, 5.0, Stroke::new(1.0, Color32::GRAY));
        },
        "crater rim",
    );
    item(
        &|p| {
            let s = Stroke::new(2.0, Color32::from_gray(20));
            painter.circle_filled(p, 7.0, Color32::from_gray(200));
            painter.line_segment([p - Vec2::splat(4.0), p + Vec2::splat(4.0)], s);
            painter.line_segment([p + Vec2::new(-4.0, 4.0), p + Vec2::new(4.0, -4.0)], s);
        },
        "tightest",
    );
}

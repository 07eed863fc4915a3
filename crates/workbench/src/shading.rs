//! Turn a height grid into a picture: hillshade (from `terrain`) times an elevation tint.
//! Presentation only; the hillshade itself is computed by `terrain::derivatives`.

use egui::{Color32, ColorImage};
use terrain::ElevationGrid;

/// Lamp for display shading: from the north-west, 45 degrees up (the cartographic habit, so
/// craters read as hollows rather than domes; common practice, no source).
pub const LAMP_AZIMUTH_DEG: f64 = 315.0;
pub const LAMP_ALTITUDE_DEG: f64 = 45.0;

/// Stops of the elevation tint, low to high: deep blue-grey hollows to warm sand highlands.
const TINT_STOPS: [[u8; 3]; 6] = [
    [38, 52, 92],
    [58, 104, 140],
    [96, 150, 140],
    [170, 180, 120],
    [214, 176, 112],
    [236, 226, 206],
];

/// Colour for a fraction 0..1 along the elevation tint.
pub fn tint(t: f32) -> Color32 {
    let t = t.clamp(0.0, 1.0) * (TINT_STOPS.len() - 1) as f32;
    let i = (t.floor() as usize).min(TINT_STOPS.len() - 2);
    let f = t - i as f32;
    let (a, b) = (TINT_STOPS[i], TINT_STOPS[i + 1]);
    let mix = |k: usize| (a[k] as f32 + (b[k] as f32 - a[k] as f32) * f).round() as u8;
    Color32::from_rgb(mix(0), mix(1), mix(2))
}

/// Colour for a score 0..1: dull violet (poor) through teal to bright yellow (best).
pub fn score_colour(t: f64) -> Color32 {
    const STOPS: [[u8; 3]; 4] = [[94, 60, 153], [33, 145, 140], [94, 201, 98], [253, 231, 37]];
    let t = (t.clamp(0.0, 1.0) as f32) * 3.0;
    let i = (t.floor() as usize).min(2);
    let f = t - i as f32;
    let (a, b) = (STOPS[i], STOPS[i + 1]);
    let mix = |k: usize| (a[k] as f32 + (b[k] as f32 - a[k] as f32) * f).round() as u8;
    Color32::from_rgb(mix(0), mix(1), mix(2))
}

/// Shaded relief of a grid, tinted by height within `range_m`. Nodata is transparent.
/// The hillshade's one-pixel border (no full 3x3 neighbourhood) is shaded flat.
pub fn shaded_relief(grid: &ElevationGrid, range_m: (f32, f32)) -> ColorImage {
    let shade = terrain::derivatives::hillshade(grid, LAMP_AZIMUTH_DEG, LAMP_ALTITUDE_DEG, 1.0);
    let flat = (255.0 * LAMP_ALTITUDE_DEG.to_radians().sin()) as f32;
    let span = (range_m.1 - range_m.0).max(1e-3);
    let pixels = grid
        .heights_m
        .iter()
        .zip(&shade)
        .map(|(&h, &s)| {
            if h.is_nan() {
                return Color32::TRANSPARENT;
            }
            let c = tint((h - range_m.0) / span);
            let s = if s.is_nan() { flat } else { s };
            // Keep some colour in deep shadow so tint stays legible.
            let k = 0.25 + 0.85 * s / 255.0;
            let m = |v: u8| (v as f32 * k).clamp(0.0, 255.0) as u8;
            Color32::from_rgb(m(c.r()), m(c.g()), m(c.b()))
        })
        .collect();
    ColorImage::new([grid.width, grid.height], pixels)
}

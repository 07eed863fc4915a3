//! Turn a height grid into a picture in one of the map's layers: grey hillshade, hillshade
//! tinted by height, or slope in colour. Presentation only; hillshade and slope are computed
//! by `terrain::derivatives` (Horn 1981).

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

/// Colour at fraction `t` (0..1) of a scale through evenly spaced `stops` (at least two),
/// mixed linearly between neighbours.
fn ramp(stops: &[[u8; 3]], t: f32) -> Color32 {
    let t = t.clamp(0.0, 1.0) * (stops.len() - 1) as f32;
    let i = (t.floor() as usize).min(stops.len() - 2);
    let f = t - i as f32;
    let (a, b) = (stops[i], stops[i + 1]);
    let mix = |k: usize| (a[k] as f32 + (b[k] as f32 - a[k] as f32) * f).round() as u8;
    Color32::from_rgb(mix(0), mix(1), mix(2))
}

/// Colour for a fraction 0..1 along the elevation tint.
pub fn tint(t: f32) -> Color32 {
    ramp(&TINT_STOPS, t)
}

/// Colour for a score 0..1: dull violet (poor) through teal to bright yellow (best).
pub fn score_colour(t: f64) -> Color32 {
    const STOPS: [[u8; 3]; 4] = [[94, 60, 153], [33, 145, 140], [94, 201, 98], [253, 231, 37]];
    ramp(&STOPS, t as f32)
}

/// What the terrain picture shows.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
pub enum MapLayer {
    /// Grey hillshade alone.
    Relief,
    /// Hillshade tinted by height.
    #[default]
    HeightTint,
    /// Horn slope in colour over a faint hillshade.
    Slope,
}

impl MapLayer {
    pub const ALL: [MapLayer; 3] = [MapLayer::Relief, MapLayer::HeightTint, MapLayer::Slope];

    pub fn label(self) -> &'static str {
        match self {
            MapLayer::Relief => "Shaded relief",
            MapLayer::HeightTint => "Height tint",
            MapLayer::Slope => "Slope",
        }
    }
}

/// Stops of the slope colours, flat to steep: pale cream through orange to deep wine (a
/// sequential scale kept apart from the rims' violet-to-yellow score scale).
const SLOPE_STOPS: [[u8; 3]; 5] = [
    [250, 248, 232],
    [250, 214, 128],
    [238, 140, 60],
    [196, 58, 48],
    [104, 18, 58],
];

/// Colour for a fraction 0..1 of the slope scale.
pub fn slope_colour(t: f32) -> Color32 {
    ramp(&SLOPE_STOPS, t)
}

/// The per-pixel numbers a terrain picture is coloured from, computed once per shaded level
/// (a worker thread does it when the level is read), so switching layers only re-colours.
pub struct Derived {
    /// Hillshade 0..255 (Horn 1981 gradient, lamp [`LAMP_AZIMUTH_DEG`], [`LAMP_ALTITUDE_DEG`]).
    pub hillshade: Vec<f32>,
    /// Horn slope in degrees at the level's pixel size (ground spacing).
    pub slope_deg: Vec<f32>,
}

impl Derived {
    pub fn of(grid: &ElevationGrid) -> Derived {
        Derived {
            hillshade: terrain::derivatives::hillshade(
                grid,
                LAMP_AZIMUTH_DEG,
                LAMP_ALTITUDE_DEG,
                1.0,
            ),
            slope_deg: terrain::derivatives::slope_deg(grid),
        }
    }
}

/// Top of the slope colour scale for a level: the 99th percentile of its slopes rounded up
/// to a round number of degrees, so a few cliffs do not wash out the rest.
pub fn slope_scale_top_deg(slope_deg: &[f32]) -> f32 {
    let mut v: Vec<f32> = slope_deg
        .iter()
        .copied()
        .filter(|s| s.is_finite())
        .collect();
    if v.is_empty() {
        return 30.0;
    }
    let k = ((v.len() - 1) as f64 * 0.99).round() as usize;
    let (_, p99, _) = v.select_nth_unstable_by(k, f32::total_cmp);
    let p99 = *p99;
    [1.0, 2.0, 5.0, 10.0, 15.0, 20.0, 30.0, 45.0, 60.0]
        .into_iter()
        .find(|&top| top >= p99)
        .unwrap_or(90.0)
}

/// The terrain picture of a level in `layer`: heights tinted within `range_m`, slopes
/// coloured from 0 to `slope_top_deg`. Nodata is transparent. The derivatives' one-pixel
/// border (no full 3x3 neighbourhood) is shaded flat and coloured as level ground.
pub fn colour_level(
    grid: &ElevationGrid,
    derived: &Derived,
    layer: MapLayer,
    range_m: (f32, f32),
    slope_top_deg: f32,
) -> ColorImage {
    let flat = (255.0 * LAMP_ALTITUDE_DEG.to_radians().sin()) as f32;
    let span = (range_m.1 - range_m.0).max(1e-3);
    let top = slope_top_deg.max(1e-3);
    let pixels = grid
        .heights_m
        .iter()
        .zip(&derived.hillshade)
        .zip(&derived.slope_deg)
        .map(|((&h, &s), &slope)| {
            if h.is_nan() {
                return Color32::TRANSPARENT;
            }
            let s = if s.is_nan() { flat } else { s } / 255.0;
            let (c, k) = match layer {
                MapLayer::Relief => (Color32::WHITE, 0.08 + 0.9 * s),
                // Keep some colour in deep shadow so the tint stays legible.
                MapLayer::HeightTint => (tint((h - range_m.0) / span), 0.25 + 0.85 * s),
                // A faint relief under the slope colours, for orientation.
                MapLayer::Slope => (
                    slope_colour(if slope.is_nan() { 0.0 } else { slope / top }),
                    0.7 + 0.4 * s,
                ),
            };
            let m = |v: u8| (v as f32 * k).clamp(0.0, 255.0) as u8;
            Color32::from_rgb(m(c.r()), m(c.g()), m(c.b()))
        })
        .collect();
    ColorImage::new([grid.width, grid.height], pixels)
}

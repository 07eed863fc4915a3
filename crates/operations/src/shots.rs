//! Anchor shots: straight lines from the lander's launcher to each rim anchor the structure fit
//! placed, on the sphere (no curvature shortcut): slant range, elevation angle at the launcher
//! and the lowest height of the line above the terrain, leaving out the last metres before the
//! anchor (where the line meets the ground it is aimed at).

use serde::{Deserialize, Serialize};
use terrain::ElevationGrid;
use visibility::frames::{dot, lonlat, unit, Vec3};

/// One end of a shot: a point on the body, `height_m` above the sphere.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Point {
    pub lon_deg: f64,
    pub lat_deg: f64,
    pub height_m: f64,
}

/// What the launcher can do and what the line needs.
#[derive(Clone, Copy, Debug)]
pub struct ShotLimits {
    pub range_m: f64,
    pub min_clearance_m: f64,
    /// The last metres (ground distance) before the anchor left out of the clearance.
    pub end_exclusion_m: f64,
}

/// One shot.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Shot {
    pub range_m: f64,
    /// Above the launcher's local horizontal, degrees.
    pub elevation_deg: f64,
    /// Lowest height of the line above the terrain, m (null: the ground under the line is not
    /// all known).
    pub clearance_m: Option<f64>,
    /// Ground distance from the launcher to where that lowest point is, m.
    pub clearance_at_m: Option<f64>,
    pub reachable: bool,
}

/// The shots to every anchor and their summary.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct ShotsReport {
    pub shots: Vec<Shot>,
    pub longest_range_m: f64,
    /// Lowest clearance over every shot, m (null when no shot's ground is all known).
    pub lowest_clearance_m: Option<f64>,
    pub all_reachable: bool,
    /// 1-based number of the anchor with the least slack (range or clearance), the one that
    /// binds the layout.
    pub binding_anchor: usize,
}

fn position_m(p: &Point, radius_m: f64) -> Vec3 {
    unit(p.lon_deg, p.lat_deg).map(|c| c * (radius_m + p.height_m))
}

/// The straight line of a shot from `from` to `to` on a sphere of radius `radius_m`.
pub struct ShotLine {
    a: Vec3,
    v: Vec3,
    radius_m: f64,
    /// Great-circle ground distance from `from` to `to`, m.
    pub ground_m: f64,
    /// Straight-line length, m.
    pub range_m: f64,
    /// Above `from`'s local horizontal, degrees.
    pub elevation_deg: f64,
}

/// A point of a shot line: where it stands over the ground and how high above the sphere.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct LinePoint {
    pub lon_deg: f64,
    pub lat_deg: f64,
    pub height_m: f64,
    /// Ground distance from the launcher, m (the fraction of the line times its ground
    /// distance).
    pub ground_from_start_m: f64,
}

impl ShotLine {
    pub fn new(radius_m: f64, from: &Point, to: &Point) -> ShotLine {
        let (a, b) = (position_m(from, radius_m), position_m(to, radius_m));
        let v = [b[0] - a[0], b[1] - a[1], b[2] - a[2]];
        let range_m = dot(&v, &v).sqrt();
        let up = unit(from.lon_deg, from.lat_deg);
        let elevation_deg = (dot(&v, &up) / range_m)
            .clamp(-1.0, 1.0)
            .asin()
            .to_degrees();
        let ground_m = terrain::geodesy::distance_m(
            radius_m,
            (from.lon_deg, from.lat_deg),
            (to.lon_deg, to.lat_deg),
        );
        ShotLine {
            a,
            v,
            radius_m,
            ground_m,
            range_m,
            elevation_deg,
        }
    }

    /// The point a fraction `f` (0 at `from`, 1 at `to`) along the line.
    pub fn at(&self, f: f64) -> LinePoint {
        let q = [0, 1, 2].map(|k| self.a[k] + f * self.v[k]);
        let (lon_deg, lat_deg) = lonlat(&q);
        LinePoint {
            lon_deg,
            lat_deg,
            height_m: dot(&q, &q).sqrt() - self.radius_m,
            ground_from_start_m: f * self.ground_m,
        }
    }
}

/// One straight shot from `from` to `to` over `grid`, sampled every half post.
pub fn shot(
    grid: &ElevationGrid,
    from: &Point,
    to: &Point,
    limits: &ShotLimits,
    post_m: f64,
) -> Shot {
    let line = ShotLine::new(grid.geometry.body_radius_m, from, to);
    let ground_m = line.ground_m;
    let steps = (ground_m / (0.5 * post_m)).ceil().max(1.0) as usize;
    let mut lowest: Option<(f64, f64)> = None;
    let mut known = true;
    for k in 1..steps {
        let f = k as f64 / steps as f64;
        if (1.0 - f) * ground_m < limits.end_exclusion_m {
            break;
        }
        let q = line.at(f);
        let Some(g) = grid.sample_lonlat(q.lon_deg, q.lat_deg) else {
            known = false;
            continue;
        };
        let c = q.height_m - g;
        if lowest.is_none_or(|(lc, _)| c < lc) {
            lowest = Some((c, q.ground_from_start_m));
        }
    }
    let clearance_m = lowest.filter(|_| known).map(|(c, _)| c);
    Shot {
        range_m: line.range_m,
        elevation_deg: line.elevation_deg,
        clearance_m,
        clearance_at_m: lowest.map(|(_, d)| d),
        reachable: line.range_m <= limits.range_m
            && clearance_m.is_some_and(|c| c >= limits.min_clearance_m),
    }
}

/// Shots from the launcher at `from` to every anchor; `None` without anchors.
pub fn shots(
    grid: &ElevationGrid,
    from: &Point,
    anchors: &[Point],
    limits: &ShotLimits,
    post_m: f64,
) -> Option<ShotsReport> {
    if anchors.is_empty() {
        return None;
    }
    let shots: Vec<Shot> = anchors
        .iter()
        .map(|a| shot(grid, from, a, limits, post_m))
        .collect();
    // Slack in metres: range to spare, or clearance above the need (unknown ground: none).
    let slack = |s: &Shot| {
        (limits.range_m - s.range_m).min(
            s.clearance_m
                .map_or(f64::NEG_INFINITY, |c| c - limits.min_clearance_m),
        )
    };
    let binding = (0..shots.len())
        .min_by(|&i, &j| slack(&shots[i]).total_cmp(&slack(&shots[j])))
        .unwrap_or(0);
    Some(ShotsReport {
        longest_range_m: shots.iter().map(|s| s.range_m).fold(0.0, f64::max),
        lowest_clearance_m: shots.iter().filter_map(|s| s.clearance_m).reduce(f64::min),
        all_reachable: shots.iter().all(|s| s.reachable),
        binding_anchor: binding + 1,
        shots,
    })
}

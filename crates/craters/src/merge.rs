//! One measurement per crater: duplicates from overlapping tiles, scale levels and cues are
//! merged with an R-tree (rstar) over points on the sphere in 3-D, which makes the test
//! indifferent to the 180 meridian and the poles.
//!
//! Two measurements are the same crater only if their centres are within 0.3 of the smaller
//! diameter AND the diameters agree within 25%: a small crater on a large crater's floor
//! stays a crater of its own.

use crate::CraterMeasurement;
use rstar::primitives::GeomWithData;
use rstar::RTree;

const CENTRE_FRACTION: f64 = 0.3;
const DIAMETER_RATIO: f64 = 1.25;

/// Position on a sphere of `radius_m` (metres, x towards lon 0 lat 0, z north).
pub fn cartesian(radius_m: f64, lon_deg: f64, lat_deg: f64) -> [f64; 3] {
    let (l, p) = (lon_deg.to_radians(), lat_deg.to_radians());
    [
        radius_m * p.cos() * l.cos(),
        radius_m * p.cos() * l.sin(),
        radius_m * p.sin(),
    ]
}

/// True when two measurements describe the same crater (see the module doc).
pub fn same_crater(radius_m: f64, a: &CraterMeasurement, b: &CraterMeasurement) -> bool {
    let d = dist(radius_m, a, b);
    let (small, big) = (
        a.diameter_m.min(b.diameter_m),
        a.diameter_m.max(b.diameter_m),
    );
    d <= CENTRE_FRACTION * small && big <= DIAMETER_RATIO * small
}

/// Which of two duplicates to keep: whole over edge-cut, then better covered, then the rim
/// traced as crests on more azimuths, then the tighter rim fit; position breaks the last ties.
fn better(a: &CraterMeasurement, b: &CraterMeasurement) -> std::cmp::Ordering {
    (b.edge_cut)
        .cmp(&a.edge_cut)
        .then(a.valid_fraction.total_cmp(&b.valid_fraction))
        .then(a.crest_fraction().total_cmp(&b.crest_fraction()))
        .then((b.rim_fit_rms_m / b.diameter_m).total_cmp(&(a.rim_fit_rms_m / a.diameter_m)))
        .then(b.centre_lat_deg.total_cmp(&a.centre_lat_deg))
        .then(b.centre_lon_deg.total_cmp(&a.centre_lon_deg))
}

/// Merge duplicates on the Moon (IAU mean radius). Output sorted by latitude, then longitude.
pub fn merge_duplicates(v: Vec<CraterMeasurement>) -> Vec<CraterMeasurement> {
    merge_duplicates_on(terrain::MOON_RADIUS_M, v)
}

/// Merge duplicates on a body of `radius_m`.
pub fn merge_duplicates_on(radius_m: f64, mut v: Vec<CraterMeasurement>) -> Vec<CraterMeasurement> {
    v.retain(|m| {
        m.diameter_m > 0.0 && m.centre_lon_deg.is_finite() && m.centre_lat_deg.is_finite()
    });
    v.sort_by(|a, b| better(b, a));
    let mut tree: RTree<GeomWithData<[f64; 3], usize>> = RTree::new();
    let mut kept: Vec<CraterMeasurement> = Vec::new();
    for m in v {
        let p = cartesian(radius_m, m.centre_lon_deg, m.centre_lat_deg);
        let reach = CENTRE_FRACTION * m.diameter_m;
        if tree
            .locate_within_distance(p, reach * reach)
            .any(|q| same_crater(radius_m, &kept[q.data], &m))
        {
            continue;
        }
        tree.insert(GeomWithData::new(p, kept.len()));
        kept.push(m);
    }
    let mut kept = drop_fragments(radius_m, kept, &tree);
    kept.sort_by(|a, b| {
        a.centre_lat_deg
            .total_cmp(&b.centre_lat_deg)
            .then(a.centre_lon_deg.total_cmp(&b.centre_lon_deg))
    });
    kept
}

/// A rim traced as crests ([`CraterMeasurement::crest_fraction`]) on under 60% of the
/// azimuths that overlaps, by more than half their mean radius, a crater whose rim is traced
/// on at least 0.2 more of them is taken for a piece of that
/// crater's wall or of its breach, not a crater of its own (common practice, no source). A
/// small crater on a large one's floor keeps its full rim and stays.
fn drop_fragments(
    radius_m: f64,
    kept: Vec<CraterMeasurement>,
    tree: &RTree<GeomWithData<[f64; 3], usize>>,
) -> Vec<CraterMeasurement> {
    let max_d = kept.iter().map(|m| m.diameter_m).fold(0.0, f64::max);
    let fragment: Vec<bool> = kept
        .iter()
        .map(|m| {
            if m.crest_fraction() >= 0.6 {
                return false;
            }
            let p = cartesian(radius_m, m.centre_lon_deg, m.centre_lat_deg);
            let reach = 0.25 * (m.diameter_m + max_d);
            tree.locate_within_distance(p, reach * reach).any(|q| {
                let o = &kept[q.data];
                let d = dist(radius_m, m, o);
                o.crest_fraction() >= m.crest_fraction() + 0.2
                    && d < 0.25 * (m.diameter_m + o.diameter_m)
            })
        })
        .collect();
    kept.into_iter()
        .zip(fragment)
        .filter(|(_, f)| !f)
        .map(|(m, _)| m)
        .collect()
}

fn dist(radius_m: f64, a: &CraterMeasurement, b: &CraterMeasurement) -> f64 {
    let (pa, pb) = (
        cartesian(radius_m, a.centre_lon_deg, a.centre_lat_deg),
        cartesian(radius_m, b.centre_lon_deg, b.centre_lat_deg),
    );
    ((pa[0] - pb[0]).powi(2) + (pa[1] - pb[1]).powi(2) + (pa[2] - pb[2]).powi(2)).sqrt()
}

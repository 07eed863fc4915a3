//! Candidates among candidates: the neighbourhood metrics (distance to the nearest other
//! candidate that meets every requirement, how many such lie within a radius) and the spread
//! shortlist (greedy by rank, every pair at least some distance apart). Distances are great
//! circles on the body's sphere; candidates are found through an R*-tree (`rstar`) of their
//! unit vectors, where the chord orders points as the great circle does.

use rayon::prelude::*;
use rstar::{primitives::GeomWithData, RTree};

use crate::areas::sphere::{unit, V3};

type Point = GeomWithData<V3, u32>;

/// Chord on the unit sphere for a great-circle distance of `d_m` on a sphere of `radius_m`.
fn chord(d_m: f64, radius_m: f64) -> f64 {
    2.0 * (d_m / radius_m / 2.0)
        .min(std::f64::consts::FRAC_PI_2)
        .sin()
}

/// Great-circle distance for a squared chord on the unit sphere.
fn arc_m(chord2: f64, radius_m: f64) -> f64 {
    2.0 * (chord2.sqrt() / 2.0).min(1.0).asin() * radius_m
}

/// The neighbourhood columns, in survey order.
#[derive(Clone, Debug, PartialEq)]
pub struct NeighbourhoodColumns {
    /// Metres to the nearest other qualifying candidate; None when there is none.
    pub nearest_qualifying_m: Vec<Option<f64>>,
    /// Other qualifying candidates within the backup radius.
    pub backup_sites: Vec<Option<f64>>,
}

impl NeighbourhoodColumns {
    /// `points`: (lon, lat) degrees of every candidate; `qualifies[i]`: candidate i meets
    /// every requirement and area.
    pub fn new(
        points: &[(f64, f64)],
        qualifies: &[bool],
        radius_m: f64,
        backup_radius_km: f64,
    ) -> NeighbourhoodColumns {
        let tree = RTree::bulk_load(
            points
                .iter()
                .enumerate()
                .filter(|(i, _)| qualifies[*i])
                .map(|(i, &(lon, lat))| GeomWithData::new(unit(lon, lat), i as u32))
                .collect::<Vec<Point>>(),
        );
        let reach = chord(backup_radius_km * 1000.0, radius_m);
        let (nearest_qualifying_m, backup_sites) = points
            .par_iter()
            .enumerate()
            .with_min_len(1024)
            .map(|(i, &(lon, lat))| {
                let p = unit(lon, lat);
                let nearest = tree
                    .nearest_neighbor_iter_with_distance_2(&p)
                    .find(|(q, _)| q.data != i as u32)
                    .map(|(_, d2)| arc_m(d2, radius_m));
                let count = tree
                    .locate_within_distance(p, reach * reach)
                    .filter(|q| q.data != i as u32)
                    .count();
                (nearest, Some(count as f64))
            })
            .unzip();
        NeighbourhoodColumns {
            nearest_qualifying_m,
            backup_sites,
        }
    }

    /// The column of a neighbourhood metric by its id.
    pub fn column(&self, name: &str) -> Option<&[Option<f64>]> {
        match name {
            survey::metrics::NEAREST_QUALIFYING_M => Some(&self.nearest_qualifying_m),
            survey::metrics::BACKUP_SITES => Some(&self.backup_sites),
            _ => None,
        }
    }
}

/// A shortlist of `count` candidates taken greedily in `order` (best first), skipping any
/// closer than `min_separation_km` (great circle on a sphere of `radius_m`) to one already
/// taken. Returns indices into `points`, best first.
pub fn spread_shortlist(
    points: &[(f64, f64)],
    order: impl IntoIterator<Item = usize>,
    count: usize,
    min_separation_km: f64,
    radius_m: f64,
) -> Vec<usize> {
    let reach = chord(min_separation_km * 1000.0, radius_m);
    let mut taken: RTree<Point> = RTree::new();
    let mut out = Vec::with_capacity(count);
    for i in order {
        if out.len() >= count {
            break;
        }
        let p = unit(points[i].0, points[i].1);
        // Strictly closer than the separation is too close; exactly at it is allowed.
        let too_close = taken
            .nearest_neighbor_iter_with_distance_2(&p)
            .next()
            .is_some_and(|(_, d2)| d2 < reach * reach * (1.0 - 1e-12));
        if !too_close {
            taken.insert(GeomWithData::new(p, i as u32));
            out.push(i);
        }
    }
    out
}

/// [`spread_shortlist`] of a survey's candidates: the first `count` of `passing_order`
/// (indices into `survey.candidates`, best first), each at least `min_separation_km` from
/// those taken before, on the survey body's sphere.
pub fn spread_by_rank(
    survey: &survey::SurveyFile,
    passing_order: impl IntoIterator<Item = usize>,
    count: usize,
    min_separation_km: f64,
) -> Vec<usize> {
    let points: Vec<(f64, f64)> = survey
        .candidates
        .iter()
        .map(|c| (c.crater.centre_lon_deg, c.crater.centre_lat_deg))
        .collect();
    spread_shortlist(
        &points,
        passing_order,
        count,
        min_separation_km,
        crate::ranking::body_radius_m(survey),
    )
}

/// Great-circle distance in metres between two (lon, lat) points on a sphere of `radius_m`.
pub fn distance_m(radius_m: f64, a: (f64, f64), b: (f64, f64)) -> f64 {
    terrain::geodesy::distance_m(radius_m, a, b)
}

#[cfg(test)]
mod tests {
    use super::*;

    const R: f64 = 1_737_400.0;

    #[test]
    fn counts_and_nearest_leave_the_candidate_itself_out() {
        // Three qualifying points along the equator 0.1° apart (3.03 km on the Moon) and one
        // that does not qualify in between.
        let pts = [(0.0, 0.0), (0.1, 0.0), (0.2, 0.0), (0.05, 0.0)];
        let q = [true, true, true, false];
        let n = NeighbourhoodColumns::new(&pts, &q, R, 5.0);
        let step = R * 0.1_f64.to_radians();
        assert!((n.nearest_qualifying_m[0].unwrap() - step).abs() < 1e-6);
        assert!((n.nearest_qualifying_m[3].unwrap() - step / 2.0).abs() < 1e-6);
        assert_eq!(n.backup_sites[0], Some(1.0));
        assert_eq!(n.backup_sites[1], Some(2.0));
        assert_eq!(n.backup_sites[3], Some(3.0));
    }

    #[test]
    fn the_spread_shortlist_skips_what_is_too_close() {
        let pts = [(0.0, 0.0), (0.1, 0.0), (0.2, 0.0), (0.3, 0.0)];
        let picked = spread_shortlist(&pts, 0..4, 3, 5.0, R);
        assert_eq!(picked, vec![0, 2]);
    }
}

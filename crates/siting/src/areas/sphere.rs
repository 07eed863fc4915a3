//! Polygons on the body's sphere: edges are great-circle arcs between vertices, a ring encloses
//! the smaller of the two regions it divides the sphere into, and a point's signed distance to
//! a set of polygons is measured in the azimuthal equidistant frame centred on the point
//! (`terrain::LocalFrame`, Snyder 1987 §25), where distances from the centre are true.
//!
//! Only the edges near the point are looked at: every edge sits in an R*-tree (`rstar`) by
//! the box around its arc on the unit sphere, the nearest edge is found through the tree, and
//! the edges within a hair of it are projected, densified, into the point's frame. There
//! `geo` gives the distance to each piece and the orientation tests that decide the side.

use geo::{Distance, Euclidean, Kernel, Orientation};
use rstar::{PointDistance, RTree, RTreeObject, AABB};
use terrain::LocalFrame;

/// Longest piece an arc is cut into in the local frame, radians (0.25°, about 7.6 km on the
/// Moon). A great circle's image bends by less than a metre over such a piece for edges within
/// 1,000 km of the centre, far below the 0.5 % the distances are checked to.
const PIECE_RAD: f64 = 0.25_f64 * std::f64::consts::PI / 180.0;

/// Edges whose distance lies within this much of the nearest one are all looked at (radians;
/// about 2 mm on the Moon): the two edges meeting at a nearest vertex tie up to rounding.
const TIE_RAD: f64 = 1.0e-9;

pub type V3 = [f64; 3];

pub fn unit(lon_deg: f64, lat_deg: f64) -> V3 {
    let (sl, cl) = lon_deg.to_radians().sin_cos();
    let (sp, cp) = lat_deg.to_radians().sin_cos();
    [cp * cl, cp * sl, sp]
}

pub fn lonlat(v: V3) -> (f64, f64) {
    (
        v[1].atan2(v[0]).to_degrees(),
        v[2].clamp(-1.0, 1.0).asin().to_degrees(),
    )
}

fn dot(a: V3, b: V3) -> f64 {
    a[0] * b[0] + a[1] * b[1] + a[2] * b[2]
}

fn cross(a: V3, b: V3) -> V3 {
    [
        a[1] * b[2] - a[2] * b[1],
        a[2] * b[0] - a[0] * b[2],
        a[0] * b[1] - a[1] * b[0],
    ]
}

fn normalise(a: V3) -> V3 {
    let n = dot(a, a).sqrt();
    [a[0] / n, a[1] / n, a[2] / n]
}

/// Angle between two unit vectors, radians (atan2 form: exact at small and large angles).
pub fn angle(a: V3, b: V3) -> f64 {
    let c = cross(a, b);
    dot(c, c).sqrt().atan2(dot(a, b))
}

/// The point a fraction `t` along the arc from `a` to `b` (spherical interpolation).
fn slerp(a: V3, b: V3, t: f64) -> V3 {
    let w = angle(a, b);
    if w < 1e-15 {
        return a;
    }
    let (s0, s1) = (((1.0 - t) * w).sin() / w.sin(), (t * w).sin() / w.sin());
    normalise([
        s0 * a[0] + s1 * b[0],
        s0 * a[1] + s1 * b[1],
        s0 * a[2] + s1 * b[2],
    ])
}

/// A ring: vertices (unit vectors, not repeated at the end) running with the enclosed region
/// on the left seen from outside the sphere (anticlockwise), holes the other way round.
#[derive(Clone, Debug)]
pub struct Ring {
    pub vertices: Vec<V3>,
}

impl Ring {
    fn vertex(&self, i: isize) -> V3 {
        let n = self.vertices.len() as isize;
        self.vertices[i.rem_euclid(n) as usize]
    }
}

/// One edge of one ring, as the tree holds it.
#[derive(Clone, Debug)]
pub struct Edge {
    a: V3,
    b: V3,
    /// Unit normal of the arc's great circle (a x b), pointing to the arc's left.
    normal: V3,
    pub feature: u32,
    ring: u32,
    envelope: AABB<V3>,
}

impl Edge {
    fn new(a: V3, b: V3, feature: u32, ring: u32) -> Edge {
        // The arc bulges outward from its chord by at most 1 - cos(w/2).
        let bulge = 1.0 - (angle(a, b) / 2.0).cos() + 1e-12;
        let lo = std::array::from_fn(|k| a[k].min(b[k]) - bulge);
        let hi = std::array::from_fn(|k| a[k].max(b[k]) + bulge);
        Edge {
            a,
            b,
            normal: normalise(cross(a, b)),
            feature,
            ring,
            envelope: AABB::from_corners(lo, hi),
        }
    }

    /// Angle from `p` to the nearest point of the arc, radians.
    fn angle_to(&self, p: V3) -> f64 {
        // The foot of p on the great circle lies within the arc when it is on the inner side
        // of both end planes.
        let inside_a = dot(cross(self.normal, self.a), p) >= 0.0;
        let inside_b = dot(cross(self.b, self.normal), p) >= 0.0;
        if inside_a && inside_b && self.normal.iter().all(|v| v.is_finite()) {
            dot(self.normal, p).clamp(-1.0, 1.0).asin().abs()
        } else {
            angle(p, self.a).min(angle(p, self.b))
        }
    }
}

impl RTreeObject for Edge {
    type Envelope = AABB<V3>;
    fn envelope(&self) -> AABB<V3> {
        self.envelope
    }
}

impl PointDistance for Edge {
    /// Squared chord to the nearest point of the arc: never less than the squared distance to
    /// the box around it, as the tree's pruning needs, and in the order of arc distances.
    fn distance_2(&self, p: &V3) -> f64 {
        let c = 2.0 * (self.angle_to(*p) / 2.0).sin();
        c * c
    }
}

/// Polygons of any number of features, indexed for the nearest edge.
pub struct SphereIndex {
    rings: Vec<Ring>,
    tree: RTree<Edge>,
    /// A cap holding every vertex (centre, angular radius), when it is smaller than a
    /// hemisphere: then every edge lies in it too, and a point's angle to the centre minus the
    /// radius is a lower bound of its distance to any edge.
    cap: Option<(V3, f64)>,
}

/// A point to judge: its unit vector and its (lon, lat) degrees.
#[derive(Clone, Copy, Debug)]
pub struct Place {
    pub unit: V3,
    pub lon_deg: f64,
    pub lat_deg: f64,
}

impl Place {
    pub fn new(lon_deg: f64, lat_deg: f64) -> Place {
        Place {
            unit: unit(lon_deg, lat_deg),
            lon_deg,
            lat_deg,
        }
    }
}

/// A point's position relative to the polygons: which feature's edge is nearest, how far it
/// is (metres) and whether the point is inside. When `exact` is false the point lies beyond
/// the horizon asked for, outside every polygon, and `distance_m` is a lower bound.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Nearest {
    pub feature: u32,
    pub distance_m: f64,
    pub inside: bool,
    pub exact: bool,
}

impl Nearest {
    /// Signed distance in metres: positive inside, negative outside.
    pub fn signed_m(&self) -> f64 {
        if self.inside {
            self.distance_m
        } else {
            -self.distance_m
        }
    }
}

/// A piece of an edge in the local frame, with where it sits in its ring.
struct Piece {
    a: geo::Coord,
    b: geo::Coord,
    ring: u32,
}

impl SphereIndex {
    /// `rings`: each with the feature it belongs to.
    pub fn new(rings: Vec<(u32, Ring)>) -> SphereIndex {
        let mut edges = Vec::new();
        let mut kept = Vec::with_capacity(rings.len());
        for (r, (feature, ring)) in rings.into_iter().enumerate() {
            let n = ring.vertices.len();
            for i in 0..n {
                let (a, b) = (ring.vertices[i], ring.vertices[(i + 1) % n]);
                edges.push(Edge::new(a, b, feature, r as u32));
            }
            kept.push(ring);
        }
        let all: Vec<V3> = kept
            .iter()
            .flat_map(|r| r.vertices.iter().copied())
            .collect();
        let cap = (!all.is_empty())
            .then(|| {
                let (lon, lat) = centre_of(&all);
                let c = unit(lon, lat);
                let radius = all.iter().map(|&v| angle(c, v)).fold(0.0, f64::max);
                (c, radius)
            })
            .filter(|(_, r)| *r < 89.0_f64.to_radians());
        SphereIndex {
            rings: kept,
            tree: RTree::bulk_load(edges),
            cap,
        }
    }

    pub fn edge_count(&self) -> usize {
        self.tree.size()
    }

    /// Where the point (degrees) lies relative to the polygons on a sphere of `radius_m`;
    /// None when there are no edges. Exact within `horizon_m` of the polygons' cap; beyond
    /// it only a lower bound of the distance (the cap's), which spares the index.
    pub fn nearest(&self, radius_m: f64, place: &Place, horizon_m: f64) -> Option<Nearest> {
        let (p, lon_deg, lat_deg) = (place.unit, place.lon_deg, place.lat_deg);
        if let Some((c, r)) = self.cap {
            // Compared as cosines first: a dot product spares the angle for most points.
            let reach = r + horizon_m / radius_m;
            if reach < std::f64::consts::PI && dot(p, c) < reach.cos() {
                let beyond = angle(p, c) - r;
                return Some(Nearest {
                    feature: 0,
                    distance_m: beyond * radius_m,
                    inside: false,
                    exact: false,
                });
            }
        }
        let mut near = self.tree.nearest_neighbor_iter_with_distance_2(&p);
        let (first, d2) = near.next()?;
        let limit = 2.0 * ((chord_angle(d2) + TIE_RAD) / 2.0).sin();
        let mut edges = vec![first];
        edges.extend(
            near.take_while(|(_, d2)| d2.sqrt() <= limit)
                .map(|(e, _)| e),
        );
        let frame = LocalFrame::new(radius_m, lon_deg, lat_deg);
        let pieces: Vec<Piece> = edges
            .iter()
            .flat_map(|e| SphereIndex::pieces(&frame, e))
            .collect();
        let origin = geo::Coord { x: 0.0, y: 0.0 };
        let dist = |p: &Piece| Euclidean.distance(origin, &geo::Line::new(p.a, p.b));
        let (best, distance_m) = pieces
            .iter()
            .map(|p| (p, dist(p)))
            .min_by(|a, b| a.1.total_cmp(&b.1))?;
        let close: Vec<&Piece> = pieces
            .iter()
            .filter(|p| dist(p) <= distance_m + TIE_RAD * radius_m)
            .collect();
        let feature = edges
            .iter()
            .find(|e| e.ring == best.ring)
            .map_or(first.feature, |e| e.feature);
        Some(Nearest {
            feature,
            distance_m,
            inside: side(origin, best, &close),
            exact: true,
        })
    }

    /// An edge cut into pieces no longer than [`PIECE_RAD`], in the frame.
    fn pieces(frame: &LocalFrame, e: &Edge) -> Vec<Piece> {
        let n = (angle(e.a, e.b) / PIECE_RAD).ceil().max(1.0) as u32;
        let at = |k: u32| {
            let v = match k {
                0 => e.a,
                k if k == n => e.b,
                k => slerp(e.a, e.b, f64::from(k) / f64::from(n)),
            };
            let (x, y) = frame.to_local_unit(v);
            geo::Coord { x, y }
        };
        (0..n)
            .map(|k| Piece {
                a: at(k),
                b: at(k + 1),
                ring: e.ring,
            })
            .collect()
    }

    /// The vertices of ring `r`, for drawing and export.
    pub fn ring(&self, r: usize) -> &Ring {
        &self.rings[r]
    }
}

fn chord_angle(d2: f64) -> f64 {
    2.0 * (d2.sqrt() / 2.0).min(1.0).asin()
}

fn left_of(origin: geo::Coord, p: &Piece) -> bool {
    geo::kernels::RobustKernel::orient2d(p.a, p.b, origin) == Orientation::CounterClockwise
}

/// Whether `origin` is on the enclosed side of the boundary whose nearest piece is `best`
/// (`close`: every piece as near, `best` among them). Nearest within a piece: the side of that
/// piece. Nearest at a corner shared by an incoming and an outgoing piece: inside iff left of
/// both when the corner turns left (convex), left of either when it turns right (reflex).
fn side(origin: geo::Coord, best: &Piece, close: &[&Piece]) -> bool {
    let foot = nearest_on(origin, best);
    let at =
        |c: geo::Coord| (c.x - foot.x).hypot(c.y - foot.y) <= 1e-9 * (1.0 + foot.x.hypot(foot.y));
    let corner = if at(best.b) {
        best.b
    } else if at(best.a) {
        best.a
    } else {
        return left_of(origin, best);
    };
    let incoming = close.iter().find(|p| p.ring == best.ring && at(p.b));
    let outgoing = close.iter().find(|p| p.ring == best.ring && at(p.a));
    match (incoming, outgoing) {
        (Some(i), Some(o)) => {
            let convex =
                geo::kernels::RobustKernel::orient2d(i.a, corner, o.b) != Orientation::Clockwise;
            let (li, lo) = (left_of(origin, i), left_of(origin, o));
            if convex {
                li && lo
            } else {
                li || lo
            }
        }
        _ => left_of(origin, best),
    }
}

/// The point of segment `p` nearest to `o`.
fn nearest_on(o: geo::Coord, p: &Piece) -> geo::Coord {
    let d = p.b - p.a;
    let len2 = d.x * d.x + d.y * d.y;
    if len2 == 0.0 {
        return p.a;
    }
    let t = (((o.x - p.a.x) * d.x + (o.y - p.a.y) * d.y) / len2).clamp(0.0, 1.0);
    p.a + d * t
}

/// A ring of (lon, lat) degrees to unit vectors, turned so its enclosed region (the smaller
/// one: the bounded one in an azimuthal equidistant frame centred on the ring) is on the left
/// for an outer ring and on the right for a hole.
pub fn orient_ring(points: &[(f64, f64)], hole: bool) -> Ring {
    use geo::Winding;
    let (lon0, lat0) = centre_of(
        &points
            .iter()
            .map(|&(lon, lat)| unit(lon, lat))
            .collect::<Vec<_>>(),
    );
    let mut ring = planar(&LocalFrame::new(1.0, lon0, lat0), points);
    ring.close();
    let mut vertices: Vec<V3> = points.iter().map(|&(lon, lat)| unit(lon, lat)).collect();
    if ring.is_ccw() == hole {
        vertices.reverse();
    }
    Ring { vertices }
}

/// (lon, lat) degrees into a local frame, as a `geo` line string.
pub fn planar(frame: &LocalFrame, points: &[(f64, f64)]) -> geo::LineString {
    points
        .iter()
        .map(|&(lon, lat)| {
            let (x, y) = frame.to_local(lon, lat);
            geo::Coord { x, y }
        })
        .collect()
}

/// The mean direction of some unit vectors, as (lon, lat) degrees.
pub fn centre_of(vs: &[V3]) -> (f64, f64) {
    let s = vs
        .iter()
        .fold([0.0; 3], |s, v| [s[0] + v[0], s[1] + v[1], s[2] + v[2]]);
    lonlat(normalise(s))
}

/// Vertices of a ring densified to [`PIECE_RAD`] along its arcs, as (lon, lat) degrees,
/// closed (first vertex repeated at the end).
pub fn densified(ring: &Ring) -> Vec<(f64, f64)> {
    let n = ring.vertices.len();
    let mut out = Vec::with_capacity(n + 1);
    for i in 0..n {
        let (a, b) = (ring.vertex(i as isize), ring.vertex(i as isize + 1));
        let k = (angle(a, b) / PIECE_RAD).ceil().max(1.0) as u32;
        for j in 0..k {
            out.push(lonlat(slerp(a, b, f64::from(j) / f64::from(k))));
        }
    }
    if let Some(&first) = out.first() {
        out.push(first);
    }
    out
}

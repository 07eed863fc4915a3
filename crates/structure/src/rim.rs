//! The rim crest as the crater measurement traced it: a closed polygon in the crater's local
//! frame, one vertex per measured azimuth, through which anchor rays are cast.

use crate::error::StructureError;
use craters::CraterMeasurement;

/// Crest polygon around the crater centre (local frame, metres). Azimuths without a crest get
/// a radius interpolated between their nearest neighbours that have one, and are remembered as
/// gaps: an anchor there would stand on a breach rather than on the crest.
#[derive(Clone, Debug)]
pub struct Crest {
    pts: Vec<(f64, f64)>,
    missing: Vec<bool>,
}

/// A ray from a point inside the crater meeting the crest.
#[derive(Clone, Copy, Debug)]
pub struct Hit {
    /// Distance along the ray, metres.
    pub t_m: f64,
    pub x_m: f64,
    pub y_m: f64,
}

thread_local! {
    /// [`Crest::ray_hit`]'s working list of vertex sides.
    static SIDES: std::cell::RefCell<Vec<f64>> = const { std::cell::RefCell::new(Vec::new()) };
}

impl Crest {
    pub fn from_measurement(m: &CraterMeasurement) -> Result<Crest, StructureError> {
        let r = &m.rim_crest_radius_m;
        let n = r.len();
        let ok: Vec<bool> = r.iter().map(|v| v.is_finite() && *v > 0.0).collect();
        let count = ok.iter().filter(|b| **b).count();
        if n < 8 || count < 3 {
            return Err(StructureError::Crater(format!(
                "the rim crest was traced at only {count} of {n} azimuths; at least 3 are needed"
            )));
        }
        let mut radius = vec![0.0; n];
        for i in 0..n {
            radius[i] = if ok[i] {
                r[i] as f64
            } else {
                // Nearest traced azimuth on each side, walking round the circle.
                let back = (1..n).find(|k| ok[(i + n - k) % n]).unwrap_or(1);
                let fwd = (1..n).find(|k| ok[(i + k) % n]).unwrap_or(1);
                let (rb, rf) = (r[(i + n - back) % n] as f64, r[(i + fwd) % n] as f64);
                rb + (rf - rb) * back as f64 / (back + fwd) as f64
            };
        }
        let pts = (0..n)
            .map(|i| {
                let az = (i as f64 * 360.0 / n as f64).to_radians();
                (radius[i] * az.sin(), radius[i] * az.cos())
            })
            .collect();
        Ok(Crest {
            pts,
            missing: ok.iter().map(|b| !b).collect(),
        })
    }

    pub fn max_radius_m(&self) -> f64 {
        self.pts.iter().map(|p| p.0.hypot(p.1)).fold(0.0, f64::max)
    }

    /// First crossing of the crest by the ray from `o` along unit vector `u`.
    pub fn ray_hit(&self, o: (f64, f64), u: (f64, f64)) -> Option<Hit> {
        // Which side of the ray's line each vertex lies on (the numerator of `s` in the exact
        // test), all at once in a loop the compiler vectorises. An edge whose two ends lie
        // clearly on one side cannot be crossed and is skipped: "clearly" keeps a margin of
        // 1e-9 of their sizes, far above round-off and above the exact test's own 1e-12
        // tolerance on `s`, so every edge that test could accept still reaches it, and the hit
        // is the same to the bit. Only the two or so edges the line crosses are tested.
        // `sides[n]` repeats `sides[0]`, closing the ring. The list lives in a per-thread
        // buffer, filled without being zeroed first.
        SIDES.with(|buf| {
            let mut sides = buf.borrow_mut();
            sides.clear();
            sides.extend(
                self.pts
                    .iter()
                    .map(|p| (p.0 - o.0) * u.1 - (p.1 - o.1) * u.0),
            );
            if let Some(&first) = sides.first() {
                sides.push(first);
            }
            self.first_crossing(&sides, o, u)
        })
    }

    fn first_crossing(&self, sides: &[f64], o: (f64, f64), u: (f64, f64)) -> Option<Hit> {
        let n = self.pts.len();
        let mut best: Option<f64> = None;
        // Edges to test, 64 at a time as bits of a mask built without branches.
        for chunk in (0..n).step_by(64) {
            let mut mask = 0u64;
            for k in 0..(n - chunk).min(64) {
                let (sa, sb) = (sides[chunk + k], sides[chunk + k + 1]);
                let skip =
                    (sa * sb > 0.0) & (sa.abs().min(sb.abs()) > 1e-9 * (sa.abs() + sb.abs()));
                mask |= u64::from(!skip) << k;
            }
            while mask != 0 {
                let i = chunk + mask.trailing_zeros() as usize;
                mask &= mask - 1;
                let a = self.pts[i];
                let b = self.pts[if i + 1 == n { 0 } else { i + 1 }];
                let e = (b.0 - a.0, b.1 - a.1);
                let den = u.0 * e.1 - u.1 * e.0;
                if den.abs() < 1e-12 {
                    continue;
                }
                let w = (a.0 - o.0, a.1 - o.1);
                let t = (w.0 * e.1 - w.1 * e.0) / den;
                let s = (w.0 * u.1 - w.1 * u.0) / den;
                if t > 0.0 && (-1e-12..=1.0 + 1e-12).contains(&s) && best.is_none_or(|bt| t < bt) {
                    best = Some(t);
                }
            }
        }
        best.map(|t| Hit {
            t_m: t,
            x_m: o.0 + t * u.0,
            y_m: o.1 + t * u.1,
        })
    }

    /// Distance from `p` to the crest, positive inside the polygon and negative outside.
    pub fn signed_distance_m(&self, p: (f64, f64)) -> f64 {
        let n = self.pts.len();
        let (mut d2, mut inside) = (f64::INFINITY, false);
        for i in 0..n {
            let a = self.pts[i];
            let b = self.pts[(i + 1) % n];
            let e = (b.0 - a.0, b.1 - a.1);
            let len2 = e.0 * e.0 + e.1 * e.1;
            let s = if len2 > 0.0 {
                (((p.0 - a.0) * e.0 + (p.1 - a.1) * e.1) / len2).clamp(0.0, 1.0)
            } else {
                0.0
            };
            let (dx, dy) = (p.0 - a.0 - s * e.0, p.1 - a.1 - s * e.1);
            d2 = d2.min(dx * dx + dy * dy);
            // Crossing-number test (Shimrat 1962, Comm. ACM 5:434), ray towards +x.
            if (a.1 > p.1) != (b.1 > p.1) && p.0 < a.0 + (p.1 - a.1) * e.0 / e.1 {
                inside = !inside;
            }
        }
        if inside {
            d2.sqrt()
        } else {
            -d2.sqrt()
        }
    }

    /// True when the crest azimuth nearest to `p` (seen from the crater centre) has no crest.
    pub fn in_gap(&self, p: (f64, f64)) -> bool {
        let n = self.pts.len();
        let az = p.0.atan2(p.1).to_degrees().rem_euclid(360.0);
        let i = (az / (360.0 / n as f64)).round() as usize % n;
        self.missing[i]
    }
}

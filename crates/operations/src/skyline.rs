//! The skyline the operations read: the highest terrain in each of 720 azimuth sectors round a
//! point, swept over the crater's lattice (`structure::patch`, the DEM resampled at its post
//! spacing in the crater's local azimuthal equidistant frame).
//!
//! Every lattice node within reach stands at elevation atan2((R + h) cos g - (R + h_s),
//! (R + h) sin g), g = d / R (the exact form on the sphere, as `visibility::horizon`), and
//! counts in every sector its post-wide footprint overlaps (half-width atan(post / 2d)): an
//! upper bound of the skyline in each sector, so a source above it is above the terrain
//! anywhere in the sector. (The Earth margin reads a lower bound instead, `Horizon`: each
//! errs on the cautious side of its own question.) One pass over the nodes, no trigonometry of
//! map projections: a skyline costs tens of microseconds where a march costs milliseconds.
//!
//! Limits: distances and azimuths are the frame's, exact from the crater centre and off by
//! under 0.05 deg over the few kilometres the skylines read (the meridians converge by about
//! (s / R) tan(lat) radians at a distance s from the centre); terrain beyond the reach is not
//! read; missing heights raise nothing.

use structure::patch::Patch;
use visibility::horizon::sphere_dip_deg;
use visibility::Horizon;

/// The skyline at local (x0, y0) of `patch`, `mast_m` above the ground there, in `sectors`
/// sectors, reading nodes out to `reach_m`. `None` without ground at the point.
pub fn sweep(
    patch: &Patch,
    (x0, y0): (f64, f64),
    mast_m: f64,
    reach_m: f64,
    sectors: usize,
) -> Option<Horizon> {
    let r = patch.frame.radius_m;
    let ground = patch.sample(x0, y0);
    if !ground.is_finite() {
        return None;
    }
    let hs = ground + mast_m;
    let dip = sphere_dip_deg(r, hs);
    let n = sectors.max(4);
    let w = std::f64::consts::TAU / n as f64;
    let mut spans = SpanMax::new(n);
    let c = patch.cell_m;
    let reach2 = reach_m * reach_m;
    // Only the nodes in the square round the point that holds the reach.
    let span = |v: f64| {
        let lo = ((v - reach_m + patch.half_m) / c).floor().max(0.0) as usize;
        let hi = (((v + reach_m + patch.half_m) / c).ceil() as usize + 1).min(patch.n);
        lo..hi
    };
    for j in span(y0) {
        for i in span(x0) {
            let h = patch.heights_m[j * patch.n + i];
            let (x, y) = patch.node_xy(i, j);
            let (dx, dy) = (x - x0, y - y0);
            let d2 = dx * dx + dy * dy;
            if !h.is_finite() || d2 > reach2 || d2 < 0.25 * c * c {
                continue;
            }
            let d = d2.sqrt();
            // sin and cos of g = d / R by their series: g stays under 0.005 rad within the
            // 8 km reach, where the next terms are below 1e-13 of the first.
            let g = d / r;
            let g2 = g * g;
            let (sg, cg) = (g * (1.0 - g2 / 6.0), 1.0 - g2 * (0.5 - g2 / 24.0));
            let tan_e = ((r + h) * cg - (r + hs)) / ((r + h) * sg);
            // The footprint's half-width 0.5 c / d is above atan(0.5 c / d): a little wider,
            // so still an upper bound. Sector indices offset by n to stay positive.
            let az = atan2_approx(dx, dy);
            let half = 0.5 * c / d + AZIMUTH_ERROR_RAD;
            let k0 = ((az - half) / w + 0.5 + n as f64) as i64 - n as i64;
            let k1 = ((az + half) / w + 0.5 + n as f64) as i64 - n as i64;
            spans.raise(k0, k1, tan_e);
        }
    }
    Some(Horizon {
        elevation_deg: spans
            .finish()
            .into_iter()
            .map(|t| t.atan().to_degrees().max(dip))
            .collect(),
        site_height_m: hs,
        sphere_horizon_deg: dip,
        max_distance_m: reach_m,
        from_terrain: true,
    })
}

/// The largest value raised over each of `n` circular sectors, where each value covers a run
/// of sectors: a run is split into two overlapping power-of-two blocks (as a sparse table,
/// Bender and Farach-Colton 2000, used in reverse), so a raise costs two writes whatever its
/// length, and the blocks are pushed down to single sectors once at the end.
struct SpanMax {
    n: usize,
    /// levels[l][i]: the largest value over sectors i .. i + 2^l, on a doubled circle.
    levels: Vec<Vec<f64>>,
    whole: f64,
}

impl SpanMax {
    fn new(n: usize) -> SpanMax {
        let depth = (usize::BITS - n.leading_zeros()) as usize;
        SpanMax {
            n,
            levels: vec![vec![f64::NEG_INFINITY; 2 * n]; depth],
            whole: f64::NEG_INFINITY,
        }
    }

    /// Raise sectors k0..=k1 (any integers, k0 <= k1, taken round the circle) to at least v.
    fn raise(&mut self, k0: i64, k1: i64, v: f64) {
        let len = (k1 - k0 + 1).max(1) as usize;
        if len >= self.n {
            self.whole = self.whole.max(v);
            return;
        }
        let a = k0.rem_euclid(self.n as i64) as usize;
        let l = (usize::BITS - 1 - len.leading_zeros()) as usize;
        let row = &mut self.levels[l];
        for i in [a, a + len - (1 << l)] {
            if v > row[i] {
                row[i] = v;
            }
        }
    }

    fn finish(mut self) -> Vec<f64> {
        for l in (1..self.levels.len()).rev() {
            let half = 1 << (l - 1);
            let (lower, upper) = self.levels.split_at_mut(l);
            let (below, here) = (&mut lower[l - 1], &upper[0]);
            for (i, &v) in here.iter().enumerate() {
                if v > f64::NEG_INFINITY {
                    below[i] = below[i].max(v);
                    if i + half < below.len() {
                        below[i + half] = below[i + half].max(v);
                    }
                }
            }
        }
        let base = &self.levels[0];
        (0..self.n)
            .map(|k| base[k].max(base[k + self.n]).max(self.whole))
            .collect()
    }
}

/// Largest error of [`atan2_approx`], radians (with room).
pub const AZIMUTH_ERROR_RAD: f64 = 2e-5;

/// atan2(y, x) in (-pi, pi] from the minimax polynomial of Hastings (1955), as printed in
/// Abramowitz and Stegun 1964, eq. 4.4.49 (|error| <= 1e-5 on [-1, 1], from memory; the
/// crate's tests measure it), folded to the other octants.
pub fn atan2_approx(y: f64, x: f64) -> f64 {
    use std::f64::consts::{FRAC_PI_2, PI};
    let (ax, ay) = (x.abs(), y.abs());
    if ax == 0.0 && ay == 0.0 {
        return 0.0;
    }
    let (t, swap) = if ay <= ax {
        (ay / ax, false)
    } else {
        (ax / ay, true)
    };
    let t2 = t * t;
    let mut a = t
        * (0.999_866_0
            + t2 * (-0.330_299_5 + t2 * (0.180_141_0 + t2 * (-0.085_133_0 + t2 * 0.020_835_1))));
    if swap {
        a = FRAC_PI_2 - a;
    }
    if x < 0.0 {
        a = PI - a;
    }
    if y < 0.0 {
        -a
    } else {
        a
    }
}

#[cfg(test)]
mod tests {
    #[test]
    fn atan2_approx_is_within_its_stated_error() {
        let mut worst: f64 = 0.0;
        for k in 0..100_000 {
            let a = k as f64 * std::f64::consts::TAU / 100_000.0 - std::f64::consts::PI + 1e-7;
            for r in [1e-3, 1.0, 7e5] {
                let (y, x) = (r * a.sin(), r * a.cos());
                worst = worst.max((super::atan2_approx(y, x) - y.atan2(x)).abs());
            }
        }
        assert!(worst < super::AZIMUTH_ERROR_RAD, "{worst}");
        assert!(
            worst > 1e-7,
            "an exact atan2 would not need the allowance: {worst}"
        );
    }

    #[test]
    fn span_max_matches_raising_every_sector() {
        let n = 720;
        let mut fast = super::SpanMax::new(n);
        let mut slow = vec![f64::NEG_INFINITY; n];
        let mut x = 12345u64;
        for _ in 0..5000 {
            x = x
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            let k0 = (x >> 33) as i64 % 2000 - 1000;
            let len = ((x >> 13) % 900) as i64;
            let v = ((x >> 3) % 10_000) as f64;
            fast.raise(k0, k0 + len, v);
            for k in k0..=k0 + len {
                let s = &mut slow[k.rem_euclid(n as i64) as usize];
                *s = s.max(v);
            }
        }
        assert_eq!(fast.finish(), slow);
    }
}

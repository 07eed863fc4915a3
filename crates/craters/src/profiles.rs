//! Radial elevation profiles around a provisional centre, removal of the regional slope and
//! the rim crest on each profile.
//!
//! The crest is the highest point of the detrended profile within a search band around the
//! provisional radius that is also a local maximum and stands above both its inner and its
//! outer neighbourhood. Picking rim crests on radial profiles is common practice in lunar
//! morphometry (Pike 1977, "Size-dependence in the shape of fresh impact craters on the Moon",
//! Impact and Explosion Cratering, pp. 489-509, from memory); the drop thresholds are ours. A
//! breached sector rises monotonically from floor to plain and yields no crest there.

use crate::sampler::LocalSampler;

/// Heights along `n_az` rays from (cx, cy), azimuths clockwise from north starting at 0,
/// radii `k * dr` for k in 0..n_r. NaN where there is no data.
#[derive(Clone, Debug)]
pub struct Profiles {
    pub cx: f64,
    pub cy: f64,
    pub n_az: usize,
    pub n_r: usize,
    pub dr: f64,
    pub z: Vec<f64>,
    /// Unit direction (east, north) of each azimuth.
    pub dir: Vec<(f64, f64)>,
}

impl Profiles {
    pub fn sample(s: &LocalSampler, cx: f64, cy: f64, n_az: usize, r_max: f64, dr: f64) -> Profiles {
        let n_r = (r_max / dr).ceil() as usize + 1;
        let dir: Vec<(f64, f64)> = (0..n_az)
            .map(|i| {
                let t = (i as f64 * 360.0 / n_az as f64).to_radians();
                (t.sin(), t.cos())
            })
            .collect();
        let mut z = vec![f64::NAN; n_az * n_r];
        for (i, d) in dir.iter().enumerate() {
            for k in 0..n_r {
                let r = k as f64 * dr;
                let (x, y) = (cx + d.0 * r, cy + d.1 * r);
                let (c, r) = s.pixel_of(x, y);
                z[i * n_r + k] = bilinear(s.grid, c, r);
            }
        }
        Profiles { cx, cy, n_az, n_r, dr, z, dir }
    }

    #[inline]
    pub fn at(&self, i: usize, k: usize) -> f64 {
        self.z[i * self.n_r + k]
    }

    /// Local (x, y) of sample (i, k) relative to the profile centre.
    #[inline]
    pub fn offset(&self, i: usize, r: f64) -> (f64, f64) {
        (self.dir[i].0 * r, self.dir[i].1 * r)
    }

    /// Least-squares regional surface over the annulus [r_in, r_out] around the profile
    /// centre, refitted once without samples beyond 2.5 robust standard deviations so a
    /// neighbouring crater in the annulus does not tilt it. `None` with too few samples.
    pub fn regional(&self, r_in: f64, r_out: f64, quadratic: bool) -> Option<Surface> {
        let k0 = (r_in / self.dr).ceil() as usize;
        let k1 = ((r_out / self.dr).floor() as usize).min(self.n_r - 1);
        let scale = r_out.max(1e-9);
        let mut pts = Vec::new();
        for i in 0..self.n_az {
            for k in k0..=k1 {
                let z = self.at(i, k);
                if z.is_finite() {
                    let (x, y) = self.offset(i, k as f64 * self.dr);
                    pts.push((x / scale, y / scale, z));
                }
            }
        }
        let fit = |pts: &[(f64, f64, f64)]| -> Option<[f64; 6]> {
            if quadratic {
                crate::lsq::fit_linear(pts.iter().map(|p| ([1.0, p.0, p.1, p.0 * p.0, p.0 * p.1, p.1 * p.1], p.2)))
            } else {
                crate::lsq::fit_linear(pts.iter().map(|p| ([1.0, p.0, p.1], p.2))).map(|c| [c[0], c[1], c[2], 0.0, 0.0, 0.0])
            }
        };
        let eval = |c: &[f64; 6], p: &(f64, f64, f64)| c[0] + c[1] * p.0 + c[2] * p.1 + c[3] * p.0 * p.0 + c[4] * p.0 * p.1 + c[5] * p.1 * p.1;
        let mut c = fit(&pts)?;
        let mut res: Vec<f64> = pts.iter().map(|q| (q.2 - eval(&c, q)).abs()).collect();
        let mad = crate::stats::median(&mut res) * 1.4826;
        if mad > 0.0 {
            let kept: Vec<_> = pts.iter().copied().filter(|q| (q.2 - eval(&c, q)).abs() <= 2.5 * mad).collect();
            if kept.len() >= pts.len() / 2 {
                c = fit(&kept)?;
            }
        }
        Some(Surface { c, x0: self.cx, y0: self.cy, scale })
    }

    /// The profiles with a surface subtracted.
    pub fn detrended(&self, s: &Surface) -> Profiles {
        let mut out = self.clone();
        for i in 0..self.n_az {
            for k in 0..self.n_r {
                let (x, y) = self.offset(i, k as f64 * self.dr);
                out.z[i * self.n_r + k] -= s.at(self.cx + x, self.cy + y);
            }
        }
        out
    }

    /// Crest candidate on profile `i` within radii [lo, hi]; neighbourhoods of width `nb`.
    pub fn crest(&self, i: usize, lo: f64, hi: f64, nb: f64, px_m: f64) -> Option<Crest> {
        let k_lo = ((lo / self.dr).floor() as usize).max(1);
        let k_hi = ((hi / self.dr).ceil() as usize).min(self.n_r - 2);
        if k_hi <= k_lo {
            return None;
        }
        let mut best: Option<(usize, f64)> = None;
        for k in k_lo..=k_hi {
            let z = self.at(i, k);
            if z.is_finite() && best.is_none_or(|b| z > b.1) {
                best = Some((k, z));
            }
        }
        let (k, zc) = best?;
        let (zm, zp) = (self.at(i, k - 1), self.at(i, k + 1));
        // Must be a true local maximum, not the band edge on a monotonic slope.
        if !(zm.is_finite() && zp.is_finite()) || zm > zc || zp > zc || k == k_lo || k == k_hi {
            return None;
        }
        let nbk = ((nb / self.dr).round() as usize).max(2);
        let inner = (k.saturating_sub(nbk)..k).map(|j| self.at(i, j)).filter(|z| z.is_finite()).fold(f64::INFINITY, f64::min);
        let outer = (k + 1..=(k + nbk).min(self.n_r - 1)).map(|j| self.at(i, j)).filter(|z| z.is_finite()).fold(f64::INFINITY, f64::min);
        if !(inner.is_finite() && outer.is_finite()) {
            return None;
        }
        // Parabolic interpolation of the peak between samples.
        let den = zm - 2.0 * zc + zp;
        let off = if den < 0.0 { (0.5 * (zm - zp) / den).clamp(-0.5, 0.5) } else { 0.0 };
        let z_peak = zc - 0.25 * (zm - zp) * off;
        let r = self.flank_intersection(i, k, px_m, z_peak).unwrap_or((k as f64 + off) * self.dr);
        Some(Crest { r, z: z_peak, inner_drop: z_peak - inner, outer_drop: z_peak - outer })
    }

    /// Radius where straight lines through the inner and the outer flank meet, both fitted on
    /// samples one to two pixels from the highest sample. On a sharp rim the highest bilinear
    /// sample sits on the pixel centre next to the crest, on the gentler (outer) side, which
    /// biases the crest outwards by up to a pixel; the flanks are clear of that.
    /// `None` if the flanks do not form a sharp peak near the highest sample: on a rim rounded
    /// over several pixels (a degraded crater) the lines meet well above the top and inside
    /// it, and the parabola through the top samples is the better estimate.
    fn flank_intersection(&self, i: usize, k: usize, px_m: f64, z_peak: f64) -> Option<f64> {
        let j0 = ((px_m / self.dr).ceil() as usize).max(1);
        let j1 = ((2.0 * px_m / self.dr).ceil() as usize).max(j0 + 1);
        if k < j1 || k + j1 >= self.n_r {
            return None;
        }
        let line = |ks: &mut dyn Iterator<Item = usize>| -> Option<(f64, f64)> {
            let pts: Vec<(f64, f64)> = ks.map(|j| (j as f64 * self.dr, self.at(i, j))).collect();
            if pts.iter().any(|p| !p.1.is_finite()) {
                return None;
            }
            let n = pts.len() as f64;
            let (mr, mz) = pts.iter().fold((0.0, 0.0), |a, p| (a.0 + p.0 / n, a.1 + p.1 / n));
            let sxx: f64 = pts.iter().map(|p| (p.0 - mr).powi(2)).sum();
            let sxz: f64 = pts.iter().map(|p| (p.0 - mr) * (p.1 - mz)).sum();
            let b = sxz / sxx;
            Some((mz - b * mr, b))
        };
        let (a1, b1) = line(&mut (k - j1..=k - j0))?;
        let (a2, b2) = line(&mut (k + j0..=k + j1))?;
        if !(b1 > 0.0 && b2 < b1) {
            return None;
        }
        let r = (a2 - a1) / (b1 - b2);
        let rk = k as f64 * self.dr;
        let overshoot = a1 + b1 * r - z_peak;
        (r.is_finite() && (r - rk).abs() <= px_m && overshoot <= 0.25 * b1 * px_m).then_some(r)
    }
}

/// A rim-crest candidate on one profile; `z` is detrended height.
#[derive(Clone, Copy, Debug)]
pub struct Crest {
    pub r: f64,
    pub z: f64,
    pub inner_drop: f64,
    pub outer_drop: f64,
}

/// A regional surface z = c0 + c1 u + c2 v + c3 u^2 + c4 u v + c5 v^2 with u, v the frame
/// coordinates relative to (x0, y0) divided by `scale` (for conditioning).
#[derive(Clone, Copy, Debug)]
pub struct Surface {
    pub c: [f64; 6],
    pub x0: f64,
    pub y0: f64,
    pub scale: f64,
}

impl Surface {
    /// Height of the surface at frame (x, y).
    #[inline]
    pub fn at(&self, x: f64, y: f64) -> f64 {
        let (u, v) = ((x - self.x0) / self.scale, (y - self.y0) / self.scale);
        let c = &self.c;
        c[0] + c[1] * u + c[2] * v + c[3] * u * u + c[4] * u * v + c[5] * v * v
    }
}

/// Bilinear height at a window position (pixel-centre convention), NaN outside the window or
/// next to nodata; the same value as `ElevationGrid::sample`, without its per-neighbour
/// checks, because profiles take tens of thousands of samples per crater.
#[inline]
fn bilinear(g: &terrain::ElevationGrid, c: f64, r: f64) -> f64 {
    let (w, h) = (g.width, g.height);
    if !(c >= 0.0 && r >= 0.0 && c <= (w - 1) as f64 && r <= (h - 1) as f64) {
        return f64::NAN;
    }
    let (c0, r0) = ((c as usize).min(w.saturating_sub(2)), (r as usize).min(h.saturating_sub(2)));
    let (fc, fr) = (c - c0 as f64, r - r0 as f64);
    let i = r0 * w + c0;
    let hm = &g.heights_m;
    let (h00, h10) = (hm[i] as f64, hm[(i + 1).min(hm.len() - 1)] as f64);
    let (h01, h11) = (hm[(i + w).min(hm.len() - 1)] as f64, hm[(i + w + 1).min(hm.len() - 1)] as f64);
    // NaN in any neighbour propagates, as nodata should.
    h00 * (1.0 - fc) * (1.0 - fr) + h10 * fc * (1.0 - fr) + h01 * (1.0 - fc) * fr + h11 * fc * fr
}

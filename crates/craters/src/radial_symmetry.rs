//! Radial-symmetry voting: the fast radial symmetry transform of Loy and Zelinsky (2003),
//! "Fast radial symmetry for detecting points of interest", IEEE Trans. PAMI 25:959, kept to
//! its negative (dark-blob) half: every cell on a slope votes for the cell `n` cells downhill,
//! so the inner wall of a bowl votes for its centre even where the rim is breached and the
//! floor does not hold water. Votes are weighted by slope relative to the level's median slope.

/// A symmetry peak: cell position, the voting radius that scored best, and the score.
#[derive(Clone, Copy, Debug)]
pub struct Peak {
    pub i: usize,
    pub j: usize,
    pub radius_cells: f64,
    pub score: f64,
}

/// Loy and Zelinsky's normalising constant k_n and radial strictness alpha (their values).
fn k_n(n: f64) -> f64 {
    if n <= 1.0 {
        8.0
    } else {
        9.9
    }
}
const ALPHA: i32 = 2;

/// Separable Gaussian blur of `v` in place, `tmp` (resized to w x h) holding the row pass.
fn gaussian_blur(v: &mut [f32], tmp: &mut Vec<f32>, w: usize, h: usize, sigma: f64) {
    let rad = (2.0 * sigma).ceil() as usize;
    let k: Vec<f32> = (-(rad as isize)..=rad as isize)
        .map(|x| (-(x * x) as f64 / (2.0 * sigma * sigma)).exp() as f32)
        .collect();
    let ks: f32 = k.iter().sum();
    let k: Vec<f32> = k.iter().map(|kv| kv / ks).collect();
    // Taps falling outside the window count as zero (the kernel is not renormalised there).
    tmp.clear();
    tmp.resize(w * h, 0.0);
    for (src, dst) in v.chunks_exact(w).zip(tmp.chunks_exact_mut(w)) {
        for (t, &kv) in k.iter().enumerate() {
            // dst[i] += kv * src[i + t - rad] wherever that index exists.
            let (d0, s0) = if t < rad { (rad - t, 0) } else { (0, t - rad) };
            let len = w.saturating_sub(d0.max(s0));
            for (d, s) in dst[d0..d0 + len].iter_mut().zip(&src[s0..s0 + len]) {
                *d += kv * s;
            }
        }
    }
    v.fill(0.0);
    for j in 0..h {
        let dst = &mut v[j * w..(j + 1) * w];
        for (t, &kv) in k.iter().enumerate() {
            let jj = j as isize + t as isize - rad as isize;
            if jj < 0 || jj as usize >= h {
                continue;
            }
            for (d, s) in dst
                .iter_mut()
                .zip(&tmp[jj as usize * w..(jj as usize + 1) * w])
            {
                *d += kv * s;
            }
        }
    }
}

/// A cell steeper than the level's median slope: position, downhill unit vector and weight
/// (slope over the median).
type Voter = (u32, u32, f32, f32, f32);

/// One worker's buffers for the transform at one radius, reused from radius to radius (fresh
/// buffers per radius made the kernel zero hundreds of megabytes of pages per survey).
#[derive(Default)]
struct Slot {
    /// Votes per cell, saturating: only min(votes, k_n) <= 9.9 is read.
    votes: Vec<u8>,
    /// The weighted votes, then the transform itself.
    field: Vec<f32>,
    /// The blur's row pass.
    tmp: Vec<f32>,
}

impl Slot {
    /// The blurred transform at radius `n` cells into `self.field`.
    fn transform(&mut self, voters: &[Voter], w: usize, h: usize, n: f64) {
        let (votes, field) = (&mut self.votes, &mut self.field);
        votes.clear();
        votes.resize(w * h, 0);
        field.clear();
        field.resize(w * h, 0.0);
        for &(i, j, ux, uy, wt) in voters {
            let ti = i as isize - round_small(ux as f64 * n);
            let tj = j as isize - round_small(uy as f64 * n);
            if ti >= 0 && tj >= 0 && (ti as usize) < w && (tj as usize) < h {
                let t = tj as usize * w + ti as usize;
                votes[t] = votes[t].saturating_add(1);
                field[t] += wt;
            }
        }
        let kn = k_n(n) as f32;
        for (fv, &ov) in field.iter_mut().zip(votes.iter()) {
            *fv = (*fv / kn) * ((ov as f32).min(kn) / kn).powi(ALPHA);
        }
        gaussian_blur(field, &mut self.tmp, w, h, (0.25 * n).max(0.5));
    }
}

/// The cells steeper than the level's median slope (central-difference gradients; NaN
/// neighbours give no vote), or `None` where no cell has a slope. Cells flatter than the median
/// are background and cast no vote.
fn voters(z: &[f32], w: usize, h: usize) -> Option<Vec<Voter>> {
    // The gradient is computed twice (for the median, then for the voters) rather than kept:
    // a w x h array of it cost more in fresh pages than the second pass costs in arithmetic.
    let gradient = |i: usize, j: usize| {
        let gx = (z[j * w + i + 1] - z[j * w + i - 1]) * 0.5;
        let gy = (z[(j + 1) * w + i] - z[(j - 1) * w + i]) * 0.5;
        let m = gx.hypot(gy);
        (m.is_finite() && m > 0.0).then_some((gx, gy, m))
    };
    let cells = || (1..h - 1).flat_map(|j| (1..w - 1).map(move |i| (i, j)));
    let mut mags = Vec::with_capacity((w - 2) * (h - 2));
    mags.extend(cells().filter_map(|(i, j)| gradient(i, j).map(|g| g.2 as f64)));
    if mags.is_empty() {
        return None;
    }
    let med = crate::stats::median(&mut mags).max(1e-12) as f32;
    // Untouched capacity costs no memory: reserve for every sloping cell.
    let mut out = Vec::with_capacity(mags.len());
    drop(mags);
    out.extend(cells().filter_map(|(i, j)| {
        let (gx, gy, m) = gradient(i, j)?;
        (m > med).then_some((i as u32, j as u32, gx / m, gy / m, m / med))
    }));
    Some(out)
}

/// `x.round() as isize` for the small finite values of the voting (|x| < 2^52) without the
/// library call baseline x86-64 makes for `round`: truncate (exact below 2^52), then step away
/// from zero when the dropped part is at least a half, the rule of `f64::round`.
#[inline]
fn round_small(x: f64) -> isize {
    let t = x as i64;
    let f = x - t as f64;
    (t + i64::from(f >= 0.5) - i64::from(f <= -0.5)) as isize
}

/// Peaks of the summed transform over `radii` (cells) scoring at least `min_score`.
pub fn peaks(z: &[f32], w: usize, h: usize, radii: &[f64], min_score: f64) -> Vec<Peak> {
    if w < 3 || h < 3 || radii.is_empty() || z.len() < w * h {
        return Vec::new();
    }
    let Some(voters) = voters(z, w, h) else {
        return Vec::new();
    };
    // Radii vote independently: as many at a time as there are workers (rayon), summed in
    // the radii's order afterwards, each cell keeping the first radius that scored best.
    use rayon::prelude::*;
    let workers = rayon::current_num_threads().clamp(1, radii.len());
    let mut slots: Vec<Slot> = (0..workers).map(|_| Slot::default()).collect();
    let mut total = vec![0f32; w * h];
    let mut best = vec![(f32::NEG_INFINITY, 0u32); w * h];
    for (c, chunk) in radii.chunks(workers).enumerate() {
        slots
            .par_iter_mut()
            .zip(chunk.par_iter())
            .for_each(|(slot, &n)| slot.transform(&voters, w, h, n));
        for (k, slot) in slots.iter().take(chunk.len()).enumerate() {
            let r = (c * workers + k) as u32;
            for ((t, b), &v) in total.iter_mut().zip(best.iter_mut()).zip(&slot.field) {
                *t += v;
                if v > b.0 {
                    *b = (v, r);
                }
            }
        }
    }
    drop(slots);
    let sup = (radii[0].round() as isize).max(2);
    let mut out = Vec::new();
    for j in 0..h {
        for i in 0..w {
            let v = total[j * w + i];
            if (v as f64) < min_score {
                continue;
            }
            let mut is_max = true;
            'nb: for dj in -sup..=sup {
                for di in -sup..=sup {
                    let (ii, jj) = (i as isize + di, j as isize + dj);
                    if (di, dj) == (0, 0)
                        || ii < 0
                        || jj < 0
                        || ii >= w as isize
                        || jj >= h as isize
                    {
                        continue;
                    }
                    let u = total[jj as usize * w + ii as usize];
                    // Ties broken by position so a flat-topped peak yields one cell.
                    if u > v || (u == v && (jj, ii) < (j as isize, i as isize)) {
                        is_max = false;
                        break 'nb;
                    }
                }
            }
            if is_max {
                let best = best[j * w + i].1 as usize;
                out.push(Peak {
                    i,
                    j,
                    radius_cells: radii[best],
                    score: v as f64,
                });
            }
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn round_small_is_round() {
        let halfway = [
            0.5,
            1.5,
            2.5,
            -0.5,
            -1.5,
            0.49999999999999994,
            -0.49999999999999994,
        ];
        let spread = (0..200_001).map(|k| (k as f64 - 100_000.0) * 0.000_731);
        for x in halfway.into_iter().chain(spread) {
            assert_eq!(round_small(x), x.round() as isize, "{x}");
        }
    }

    /// Loy and Zelinsky 2003, sec. 3: a dark disc of radius r votes for its centre most
    /// strongly at n = r, where the wall's downhill gradients all point at the centre.
    #[test]
    fn a_bowl_peaks_at_its_centre_at_its_radius() {
        let (w, h, r) = (64usize, 56usize, 9.0);
        let (ci, cj) = (30.0, 25.0);
        // A bowl with a steep wall (a rim step 0.8 r..r) on flat ground.
        let z: Vec<f32> = (0..w * h)
            .map(|k| {
                let rho = ((k % w) as f64 - ci).hypot((k / w) as f64 - cj) / r;
                (-10.0 * (1.0 - ((rho - 0.8) / 0.2).clamp(0.0, 1.0)) - rho) as f32
            })
            .collect();
        let radii: Vec<f64> = (4..=14).map(f64::from).collect();
        let found = peaks(&z, w, h, &radii, 0.0);
        let top = found
            .iter()
            .max_by(|a, b| a.score.total_cmp(&b.score))
            .expect("a peak");
        assert_eq!((top.i, top.j), (30, 25));
        assert!(
            (top.radius_cells - r).abs() <= 1.0,
            "radius {}",
            top.radius_cells
        );
    }
}

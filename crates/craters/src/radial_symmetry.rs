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

/// Output rows voted per strip. Each strip is voted with the rows its votes and its blur reach
/// beyond it, into buffers of its own size: no grid-sized buffer but the summed transform and
/// the best radius per cell is ever made (fresh grid-sized buffers cost more in zeroed pages
/// than the strips' overlap costs in arithmetic), and the strips' buffers stay in the cache.
const STRIP_ROWS: usize = 64;

/// One voting radius and what its transform needs, worked out once per level.
struct Radius {
    /// Cells.
    n: f64,
    kn: f32,
    /// The blur's reach in rows (taps out to 2 sigma, sigma = max(n / 4, 1/2)) and its
    /// normalised Gaussian taps, `rad` either side.
    rad: usize,
    taps: Vec<f32>,
}

impl Radius {
    fn new(n: f64) -> Radius {
        let sigma = (0.25 * n).max(0.5);
        let rad = (2.0 * sigma).ceil() as usize;
        let k: Vec<f32> = (-(rad as isize)..=rad as isize)
            .map(|x| (-(x * x) as f64 / (2.0 * sigma * sigma)).exp() as f32)
            .collect();
        let ks: f32 = k.iter().sum();
        Radius {
            n,
            kn: k_n(n) as f32,
            rad,
            taps: k.iter().map(|kv| kv / ks).collect(),
        }
    }
}

/// The radii of one level, and how far beyond a strip its blur reads (`rad_max` rows) and its
/// votes come from (`vote_reach` rows: a vote lands round(u n) <= ceil(n) rows away).
struct Plan {
    radii: Vec<Radius>,
    rad_max: usize,
    vote_reach: usize,
}

/// A cell steeper than the level's median slope: column, row, downhill unit vector and weight
/// (slope over the median).
type Voter = (u32, u32, f32, f32, f32);

/// The central-difference gradient at interior cell (i, j) and its magnitude; `None` without
/// a slope (flat, or a NaN neighbour).
#[inline]
fn gradient(z: &[f32], w: usize, i: usize, j: usize) -> Option<(f32, f32, f32)> {
    let gx = (z[j * w + i + 1] - z[j * w + i - 1]) * 0.5;
    let gy = (z[(j + 1) * w + i] - z[(j - 1) * w + i]) * 0.5;
    let m = gx.hypot(gy);
    (m.is_finite() && m > 0.0).then_some((gx, gy, m))
}

/// The median slope of the interior cells that have one, or `None` where none has.
fn median_slope(z: &[f32], w: usize, h: usize) -> Option<f32> {
    let mut mags: Vec<f32> = Vec::with_capacity((w - 2) * (h - 2));
    mags.extend(
        (1..h - 1)
            .flat_map(|j| (1..w - 1).map(move |i| (i, j)))
            .filter_map(|(i, j)| gradient(z, w, i, j).map(|g| g.2)),
    );
    (!mags.is_empty()).then(|| crate::stats::median_f32(&mut mags).max(1e-12) as f32)
}

/// One worker's buffers for a strip, reused from strip to strip.
#[derive(Default)]
struct Strip {
    voters: Vec<Voter>,
    /// Votes per cell, saturating: only min(votes, k_n) <= 9.9 is read.
    votes: Vec<u8>,
    /// The weighted votes, then the transform itself.
    field: Vec<f32>,
    /// The blur's row pass.
    rows: Vec<f32>,
    /// The largest transform per output cell so far.
    best_value: Vec<f32>,
}

impl Strip {
    /// Output rows `r0..r1`: the blurred transform summed over `radii` in their order into
    /// `total` and, per cell, the index of the first radius with the largest transform into
    /// `best` (both slices hold rows r0..r1 only).
    fn vote(
        &mut self,
        (z, w, h): (&[f32], usize, usize),
        med: f32,
        plan: &Plan,
        (r0, r1): (usize, usize),
        total: &mut [f32],
        best: &mut [u16],
    ) {
        // The rows the blur reads, and the rows whose votes can land in them.
        let (f0, f1) = (r0.saturating_sub(plan.rad_max), (r1 + plan.rad_max).min(h));
        let reach = plan.vote_reach;
        let (v0, v1) = (f0.saturating_sub(reach).max(1), (f1 + reach).min(h - 1));
        self.voters.clear();
        for j in v0..v1 {
            for i in 1..w - 1 {
                if let Some((gx, gy, m)) = gradient(z, w, i, j) {
                    if m > med {
                        self.voters
                            .push((i as u32, j as u32, gx / m, gy / m, m / med));
                    }
                }
            }
        }
        total.fill(0.0);
        best.fill(0);
        self.best_value.clear();
        self.best_value.resize(total.len(), f32::NEG_INFINITY);
        for (r, radius) in plan.radii.iter().enumerate() {
            self.transform((w, f0, f1), radius);
            self.blur_into((w, h), (f0, f1), (r0, r1), radius);
            let cells = total.iter_mut().zip(best.iter_mut());
            for (((t, b), bv), &v) in cells.zip(self.best_value.iter_mut()).zip(&self.field) {
                *t += v;
                if v > *bv {
                    (*b, *bv) = (r as u16, v);
                }
            }
        }
    }

    /// The unblurred transform at `radius` over rows f0..f1 into `self.field`.
    fn transform(&mut self, (w, f0, f1): (usize, usize, usize), radius: &Radius) {
        let n = radius.n;
        let cells = (f1 - f0) * w;
        let (votes, field) = (&mut self.votes, &mut self.field);
        votes.clear();
        votes.resize(cells, 0);
        field.clear();
        field.resize(cells, 0.0);
        for &(i, j, ux, uy, wt) in &self.voters {
            let ti = i as isize - round_small(ux as f64 * n);
            let tj = j as isize - round_small(uy as f64 * n);
            if ti >= 0 && tj >= f0 as isize && (ti as usize) < w && (tj as usize) < f1 {
                let t = (tj as usize - f0) * w + ti as usize;
                votes[t] = votes[t].saturating_add(1);
                field[t] += wt;
            }
        }
        let kn = radius.kn;
        for (fv, &ov) in field.iter_mut().zip(votes.iter()) {
            *fv = (*fv / kn) * ((ov as f32).min(kn) / kn).powi(ALPHA);
        }
    }

    /// Separable Gaussian blur of the transform (rows f0..f1 in `self.field`), taps falling
    /// outside the grid counted as zero (the kernel is not renormalised there); output rows
    /// r0..r1 left in `self.field`, whose other rows the blur reaches.
    fn blur_into(
        &mut self,
        (w, h): (usize, usize),
        (f0, f1): (usize, usize),
        (r0, r1): (usize, usize),
        radius: &Radius,
    ) {
        let (rad, k) = (radius.rad, &radius.taps);
        let rows = &mut self.rows;
        rows.clear();
        rows.resize(self.field.len(), 0.0);
        for (src, dst) in self.field.chunks_exact(w).zip(rows.chunks_exact_mut(w)) {
            for (t, &kv) in k.iter().enumerate() {
                // dst[i] += kv * src[i + t - rad] wherever that index exists.
                let (d0, s0) = if t < rad { (rad - t, 0) } else { (0, t - rad) };
                let len = w.saturating_sub(d0.max(s0));
                for (d, s) in dst[d0..d0 + len].iter_mut().zip(&src[s0..s0 + len]) {
                    *d += kv * s;
                }
            }
        }
        self.field.truncate((r1 - r0) * w);
        self.field.fill(0.0);
        for j in r0..r1 {
            let dst = &mut self.field[(j - r0) * w..(j - r0 + 1) * w];
            for (t, &kv) in k.iter().enumerate() {
                let jj = j as isize + t as isize - rad as isize;
                if jj < 0 || jj as usize >= h {
                    continue;
                }
                // Within f0..f1: the strip's rows reach plan.rad_max >= rad beyond r0..r1.
                let q = jj as usize - f0;
                debug_assert!((jj as usize) < f1);
                for (d, s) in dst.iter_mut().zip(&rows[q * w..(q + 1) * w]) {
                    *d += kv * s;
                }
            }
        }
    }
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
    peaks_in_strips(z, w, h, radii, min_score, STRIP_ROWS)
}

/// [`peaks`], voting `strip_rows` output rows at a time (the result does not depend on it).
fn peaks_in_strips(
    z: &[f32],
    w: usize,
    h: usize,
    radii: &[f64],
    min_score: f64,
    strip_rows: usize,
) -> Vec<Peak> {
    if w < 3 || h < 3 || radii.is_empty() || z.len() < w * h {
        return Vec::new();
    }
    let Some(med) = median_slope(z, w, h) else {
        return Vec::new();
    };
    // Best radii are kept as 16-bit indices.
    let radii = &radii[..radii.len().min(usize::from(u16::MAX))];
    let plan = {
        let radii: Vec<Radius> = radii.iter().map(|&n| Radius::new(n)).collect();
        let n_max = radii.iter().map(|r| r.n).fold(0.0, f64::max);
        Plan {
            rad_max: radii.iter().map(|r| r.rad).max().unwrap_or(0),
            vote_reach: n_max.ceil() as usize + 1,
            radii,
        }
    };
    // Strips of rows in parallel (rayon), each summing the radii in their order.
    use rayon::prelude::*;
    let mut total = vec![0f32; w * h];
    let mut best = vec![0u16; w * h];
    total
        .par_chunks_mut(strip_rows.max(1) * w)
        .zip(best.par_chunks_mut(strip_rows.max(1) * w))
        .enumerate()
        .for_each_init(Strip::default, |strip, (k, (tot, bst))| {
            let r0 = k * strip_rows.max(1);
            let r1 = r0 + tot.len() / w;
            strip.vote((z, w, h), med, &plan, (r0, r1), tot, bst);
        });
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
                let best = usize::from(best[j * w + i]);
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

    /// Strips are an implementation detail: any strip height gives the same peaks, to the
    /// bit, as voting the grid whole (a rough terrain of overlapping bowls and a slope).
    #[test]
    fn strips_give_the_whole_grids_peaks() {
        let (w, h) = (90usize, 131usize);
        let mut x = 7u64;
        let mut noise = || {
            x = x
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            ((x >> 40) as f64 / (1u64 << 24) as f64 - 0.5) * 0.3
        };
        let bowls = [
            (20.0, 30.0, 9.0),
            (60.0, 64.0, 14.0),
            (45.0, 100.0, 6.0),
            (70.0, 120.0, 11.0),
        ];
        let z: Vec<f32> = (0..w * h)
            .map(|k| {
                let (i, j) = ((k % w) as f64, (k / w) as f64);
                let depth: f64 = bowls
                    .iter()
                    .map(|&(ci, cj, r)| {
                        let rho = (i - ci).hypot(j - cj) / r;
                        if rho < 1.0 {
                            r * (rho * rho - 1.0)
                        } else {
                            0.0
                        }
                    })
                    .sum();
                (depth + 0.05 * j + noise()) as f32
            })
            .collect();
        let radii: Vec<f64> = (2..=9).map(f64::from).collect();
        let key = |p: &[Peak]| -> Vec<(usize, usize, u64, u64)> {
            p.iter()
                .map(|p| (p.i, p.j, p.radius_cells.to_bits(), p.score.to_bits()))
                .collect()
        };
        let whole = key(&peaks_in_strips(&z, w, h, &radii, 0.5, h));
        assert!(whole.len() >= 4, "{} peaks", whole.len());
        for rows in [1, 5, 17, 64] {
            assert_eq!(
                key(&peaks_in_strips(&z, w, h, &radii, 0.5, rows)),
                whole,
                "{rows} rows"
            );
        }
    }

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

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

fn gaussian_blur(v: &mut [f32], w: usize, h: usize, sigma: f64) {
    let rad = (2.0 * sigma).ceil() as usize;
    let k: Vec<f32> = (-(rad as isize)..=rad as isize)
        .map(|x| (-(x * x) as f64 / (2.0 * sigma * sigma)).exp() as f32)
        .collect();
    let ks: f32 = k.iter().sum();
    let k: Vec<f32> = k.iter().map(|kv| kv / ks).collect();
    // Taps falling outside the window count as zero (the kernel is not renormalised there).
    let mut tmp = vec![0f32; w * h];
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

/// Peaks of the summed transform over `radii` (cells) scoring at least `min_score`.
pub fn peaks(z: &[f32], w: usize, h: usize, radii: &[f64], min_score: f64) -> Vec<Peak> {
    if w < 3 || h < 3 || radii.is_empty() {
        return Vec::new();
    }
    // Central-difference gradient per cell; NaN neighbours give no vote.
    let mut grad = vec![(0f32, 0f32, 0f32); w * h];
    let mut mags = Vec::new();
    for j in 1..h - 1 {
        for i in 1..w - 1 {
            let gx = (z[j * w + i + 1] - z[j * w + i - 1]) * 0.5;
            let gy = (z[(j + 1) * w + i] - z[(j - 1) * w + i]) * 0.5;
            let m = gx.hypot(gy);
            if m.is_finite() && m > 0.0 {
                grad[j * w + i] = (gx / m, gy / m, m);
                mags.push(m as f64);
            }
        }
    }
    if mags.is_empty() {
        return Vec::new();
    }
    let med = crate::stats::median(&mut mags).max(1e-12) as f32;
    // Radii vote independently: one task per radius (rayon), summed afterwards.
    use rayon::prelude::*;
    // Cells flatter than the median slope are background and cast no vote.
    let voters: Vec<(u32, u32, f32, f32, f32)> = (1..h - 1)
        .flat_map(|j| (1..w - 1).map(move |i| (i, j)))
        .filter_map(|(i, j)| {
            let (ux, uy, g) = grad[j * w + i];
            (g > med).then_some((i as u32, j as u32, ux, uy, g / med))
        })
        .collect();
    let per_radius: Vec<Vec<f32>> = radii
        .par_iter()
        .map(|&n| {
            let mut o = vec![0f32; w * h];
            let mut m = vec![0f32; w * h];
            for &(i, j, ux, uy, wt) in &voters {
                let ti = i as isize - (ux as f64 * n).round() as isize;
                let tj = j as isize - (uy as f64 * n).round() as isize;
                if ti >= 0 && tj >= 0 && (ti as usize) < w && (tj as usize) < h {
                    let t = tj as usize * w + ti as usize;
                    o[t] += 1.0;
                    m[t] += wt;
                }
            }
            let kn = k_n(n) as f32;
            // Reuse the vote buffer for the transform.
            for (ov, &mv) in o.iter_mut().zip(&m) {
                *ov = (mv / kn) * (ov.min(kn) / kn).powi(ALPHA);
            }
            drop(m);
            gaussian_blur(&mut o, w, h, (0.25 * n).max(0.5));
            o
        })
        .collect();
    let mut total = vec![0f32; w * h];
    for f in &per_radius {
        for (t, v) in total.iter_mut().zip(f) {
            *t += v;
        }
    }
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
                let (best, _) =
                    per_radius
                        .iter()
                        .enumerate()
                        .fold((0, f32::NEG_INFINITY), |b, (r, f)| {
                            if f[j * w + i] > b.1 {
                                (r, f[j * w + i])
                            } else {
                                b
                            }
                        });
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

//! Closed depressions by priority-flood sink filling: Barnes, Lehman and Mulla (2014),
//! "Priority-Flood: An optimal depression-filling and watershed-labeling algorithm for digital
//! elevation models", Computers & Geosciences 62:117, in the variant that sends cells inside a
//! depression through a plain queue instead of the priority queue (their "improved" form).
//!
//! The flood enters from the window edge and from every nodata cell: water can leave there,
//! so a depression cut by the edge is not closed and is not reported.

use std::cmp::Ordering;
use std::collections::{BinaryHeap, VecDeque};

#[derive(Clone, Copy, PartialEq)]
struct Cell(f32, u32);
impl Eq for Cell {}
impl Ord for Cell {
    fn cmp(&self, o: &Self) -> Ordering {
        // Min-heap on height, ties by index for determinism.
        o.0.total_cmp(&self.0).then_with(|| o.1.cmp(&self.1))
    }
}
impl PartialOrd for Cell {
    fn partial_cmp(&self, o: &Self) -> Option<Ordering> {
        Some(self.cmp(o))
    }
}

const NB: [(isize, isize); 8] = [
    (-1, -1),
    (0, -1),
    (1, -1),
    (-1, 0),
    (1, 0),
    (-1, 1),
    (0, 1),
    (1, 1),
];

/// Heights with every closed depression filled to its spill level.
pub fn fill(z: &[f32], w: usize, h: usize) -> Vec<f32> {
    let mut filled = z.to_vec();
    let mut closed = vec![false; w * h];
    let mut open = BinaryHeap::new();
    let mut pit = VecDeque::new();
    for j in 0..h {
        for i in 0..w {
            let k = j * w + i;
            if z[k].is_nan() {
                closed[k] = true;
                continue;
            }
            let border = i == 0 || j == 0 || i + 1 == w || j + 1 == h;
            let by_nodata = !border
                && NB.iter().any(|&(di, dj)| {
                    z[(j as isize + dj) as usize * w + (i as isize + di) as usize].is_nan()
                });
            if border || by_nodata {
                closed[k] = true;
                open.push(Cell(z[k], k as u32));
            }
        }
    }
    loop {
        let c = match pit.pop_front() {
            Some(c) => c,
            None => match open.pop() {
                Some(Cell(_, k)) => k as usize,
                None => break,
            },
        };
        let (ci, cj) = ((c % w) as isize, (c / w) as isize);
        for &(di, dj) in &NB {
            let (ni, nj) = (ci + di, cj + dj);
            if ni < 0 || nj < 0 || ni >= w as isize || nj >= h as isize {
                continue;
            }
            let n = nj as usize * w + ni as usize;
            if closed[n] {
                continue;
            }
            closed[n] = true;
            if filled[n] <= filled[c] {
                filled[n] = filled[c];
                pit.push_back(n);
            } else {
                open.push(Cell(filled[n], n as u32));
            }
        }
    }
    filled
}

/// One closed depression: a connected set of cells the fill raised.
#[derive(Clone, Debug)]
pub struct Depression {
    /// Centroid of the filled cells (cell coordinates, fractional).
    pub ci: f64,
    pub cj: f64,
    pub cells: usize,
    pub max_depth: f64,
}

/// Connected (8-neighbour) regions raised by more than `min_depth` by the fill.
pub fn find(z: &[f32], w: usize, h: usize, min_depth: f64) -> Vec<Depression> {
    let filled = fill(z, w, h);
    let depth = |k: usize| (filled[k] - z[k]) as f64;
    let mut seen = vec![false; w * h];
    let mut out = Vec::new();
    let mut stack = Vec::new();
    for start in 0..w * h {
        if seen[start] || z[start].is_nan() || depth(start) <= 0.0 {
            continue;
        }
        seen[start] = true;
        stack.push(start);
        let (mut n, mut si, mut sj, mut maxd) = (0usize, 0.0, 0.0, 0.0f64);
        while let Some(c) = stack.pop() {
            let (ci, cj) = (c % w, c / w);
            n += 1;
            si += ci as f64;
            sj += cj as f64;
            maxd = maxd.max(depth(c));
            for &(di, dj) in &NB {
                let (ni, nj) = (ci as isize + di, cj as isize + dj);
                if ni < 0 || nj < 0 || ni >= w as isize || nj >= h as isize {
                    continue;
                }
                let k = nj as usize * w + ni as usize;
                if !seen[k] && !z[k].is_nan() && depth(k) > 0.0 {
                    seen[k] = true;
                    stack.push(k);
                }
            }
        }
        if maxd > min_depth {
            out.push(Depression {
                ci: si / n as f64,
                cj: sj / n as f64,
                cells: n,
                max_depth: maxd,
            });
        }
    }
    out
}

#[cfg(test)]
mod tests {
    #[test]
    fn fill_raises_a_pit_to_its_spill_point_and_leaves_slopes_alone() {
        // 5x5 plane rising to the east with a one-cell pit: the pit fills to its lowest neighbour.
        let w = 5;
        let mut z: Vec<f32> = (0..25).map(|k| (k % w) as f32).collect();
        z[2 * w + 2] = -3.0;
        let f = super::fill(&z, w, 5);
        assert_eq!(f[2 * w + 2], 1.0);
        for k in 0..25 {
            if k != 2 * w + 2 {
                assert_eq!(f[k], z[k]);
            }
        }
    }
}

//! The lattice's max-pooled pyramid: level l holds, for each block of 2^l x 2^l posts (those
//! on the lattice's last row and column may hold fewer), the highest height of the block's
//! nodes (missing heights ignored; NEG_INFINITY where the block has none) and which node it
//! is (the first in row-major order among equals). Levels are built
//! from the one below when a skyline first reads them, so skylines that read only the
//! full-resolution lattice build none.

use structure::patch::Patch;

pub(super) struct Level {
    /// Blocks per side.
    pub n: usize,
    /// Row-major from the south-west corner, as the lattice.
    pub heights_m: Vec<f64>,
    /// The lattice indices [i, j] of each block's highest node (its first node where it has
    /// none), kept beside the height so a skyline reads it without touching the lattice.
    pub highest: Vec<[u32; 2]>,
}

#[derive(Default)]
pub(super) struct Pyramid {
    /// levels[l - 1] is level l (level 0 is the lattice itself).
    levels: Vec<Level>,
}

impl Pyramid {
    /// Build the levels up to `top` not yet built.
    pub(super) fn build_to(&mut self, patch: &Patch, top: usize) {
        while self.levels.len() < top {
            let next = match self.levels.last() {
                Some(below) => pool(&below.heights_m, below.n, |i, j| {
                    below.highest[j * below.n + i]
                }),
                None => pool(&patch.heights_m, patch.n, |i, j| [i as u32, j as u32]),
            };
            self.levels.push(next);
        }
    }

    /// Level `l` (1 ..= the highest built).
    pub(super) fn level(&self, l: usize) -> &Level {
        &self.levels[l - 1]
    }
}

/// The highest height of each 2 x 2 block of an `n` x `n` grid, and where it stands, from
/// the grid's heights and the lattice index of each cell's highest node.
fn pool(heights: &[f64], n: usize, index: impl Fn(usize, usize) -> [u32; 2]) -> Level {
    let m = n.div_ceil(2);
    let mut out = Level {
        n: m,
        heights_m: vec![f64::NEG_INFINITY; m * m],
        highest: vec![[0, 0]; m * m],
    };
    // Two rows of the grid make one row of blocks (the last may have one).
    for (jb, rows) in heights.chunks(2 * n).enumerate() {
        let (upper, lower) = rows.split_at(n);
        for ib in 0..m {
            let cols = 2 * ib..(2 * ib + 2).min(n);
            let mut best = (f64::NEG_INFINITY, 2 * ib, 2 * jb);
            for (j, row) in [(2 * jb, upper), (2 * jb + 1, lower)] {
                for i in cols.clone().filter(|&i| i < row.len()) {
                    // A NaN never compares above.
                    if row[i] > best.0 {
                        best = (row[i], i, j);
                    }
                }
            }
            out.heights_m[jb * m + ib] = best.0;
            out.highest[jb * m + ib] = index(best.1, best.2);
        }
    }
    out
}

#[cfg(test)]
mod tests {
    #[test]
    fn pool_keeps_the_highest_of_each_block_and_skips_missing() {
        let nan = f64::NAN;
        #[rustfmt::skip]
        let h = [
            1.0, 2.0, 9.0,
            3.0, nan, nan,
            nan, nan, 4.0,
        ];
        let l = super::pool(&h, 3, |i, j| [i as u32, j as u32]);
        assert_eq!(l.n, 2);
        assert_eq!(l.heights_m, vec![3.0, 9.0, f64::NEG_INFINITY, 4.0]);
        assert_eq!(l.highest, vec![[0, 1], [2, 0], [0, 2], [2, 2]]);
        let top = super::pool(&l.heights_m, 2, |i, j| l.highest[j * 2 + i]);
        assert_eq!((top.heights_m, top.highest), (vec![9.0], vec![[2, 0]]));
    }
}

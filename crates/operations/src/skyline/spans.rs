//! The largest value raised over each of `n` circular sectors, where each value covers a run
//! of sectors: a run is split into two overlapping power-of-two blocks (as a sparse table,
//! Bender and Farach-Colton 2000, used in reverse), so a raise costs two writes whatever its
//! length, and the blocks are pushed down to single sectors once at the end. The table is kept
//! between skylines: a reset clears only the levels the last skyline wrote.

use visibility::horizon::wrap_sector;

pub(super) struct SpanMax {
    n: usize,
    /// levels[l][i]: the largest value over sectors i .. i + 2^l, on a doubled circle.
    levels: Vec<Vec<f64>>,
    /// Levels written since the last reset: 0 .. used.
    used: usize,
    whole: f64,
}

impl SpanMax {
    pub(super) fn new(n: usize) -> SpanMax {
        let depth = (usize::BITS - n.leading_zeros()) as usize;
        SpanMax {
            n,
            levels: vec![vec![f64::NEG_INFINITY; 2 * n]; depth],
            used: depth,
            whole: f64::NEG_INFINITY,
        }
    }

    pub(super) fn sectors(&self) -> usize {
        self.n
    }

    /// Every sector back to nothing raised.
    pub(super) fn reset(&mut self) {
        for row in &mut self.levels[..self.used] {
            row.fill(f64::NEG_INFINITY);
        }
        self.used = 0;
        self.whole = f64::NEG_INFINITY;
    }

    /// Raise sectors k0..=k1 (any integers, k0 <= k1, taken round the circle) to at least v.
    pub(super) fn raise(&mut self, k0: i64, k1: i64, v: f64) {
        let len = (k1 - k0 + 1).max(1) as usize;
        if len >= self.n {
            self.whole = self.whole.max(v);
            return;
        }
        let a = wrap_sector(k0, self.n as i64) as usize;
        let l = (usize::BITS - 1 - len.leading_zeros()) as usize;
        self.used = self.used.max(l + 1);
        let row = &mut self.levels[l];
        for i in [a, a + len - (1 << l)] {
            if v > row[i] {
                row[i] = v;
            }
        }
    }

    /// The largest value raised over each sector (NEG_INFINITY where none), pushing the
    /// written levels down first.
    pub(super) fn finish(&mut self) -> impl Iterator<Item = f64> + '_ {
        for l in (1..self.used).rev() {
            let half = 1 << (l - 1);
            let (lower, upper) = self.levels.split_at_mut(l);
            let (below, here) = (&mut lower[l - 1], &upper[0]);
            // Block i of level l is blocks i and i + half of level l - 1 (values never NaN).
            for shift in [0, half] {
                for (b, &v) in below[shift..].iter_mut().zip(here) {
                    if v > *b {
                        *b = v;
                    }
                }
            }
        }
        self.used = self.used.max(1);
        let (base, n, whole) = (&self.levels[0], self.n, self.whole);
        (0..n).map(move |k| base[k].max(base[k + n]).max(whole))
    }
}

#[cfg(test)]
mod tests {
    #[test]
    fn span_max_matches_raising_every_sector() {
        let n = 720;
        let mut fast = super::SpanMax::new(n);
        // Twice over one table: the second round must not see the first one's raises.
        for round in 0..2u64 {
            fast.reset();
            let mut slow = vec![f64::NEG_INFINITY; n];
            let mut x = 12345u64 + round;
            for _ in 0..5000 >> (3 * round) {
                x = x
                    .wrapping_mul(6364136223846793005)
                    .wrapping_add(1442695040888963407);
                let k0 = (x >> 33) as i64 % 2000 - 1000;
                let len = ((x >> 13) % (900 >> (3 * round))) as i64;
                let v = ((x >> 3) % 10_000) as f64 - 1000.0 * round as f64;
                fast.raise(k0, k0 + len, v);
                for k in k0..=k0 + len {
                    let s = &mut slow[k.rem_euclid(n as i64) as usize];
                    *s = s.max(v);
                }
            }
            assert_eq!(fast.finish().collect::<Vec<_>>(), slow, "round {round}");
        }
    }
}

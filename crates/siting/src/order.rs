//! Ordering candidates by a 64-bit key, for the ranking: the candidates come in groups
//! (those that pass every requirement, then those that do not), each group already in its
//! tie order, and each group is sorted by key with equal keys kept in that order.
//!
//! A large group is sorted in two stages, both radix sorts (Knuth, "The Art of Computer
//! Programming" vol. 3, 2nd ed. 1998, section 5.2.5):
//! - a most-significant-digit distribution of the group into key ranges, stable, with both
//!   cores filling the ranges side by side;
//! - each run of ranges of about `PART_ITEMS` candidates (small enough to stay in one core's
//!   cache with its scratch) sorted on its own by a stable least-significant-digit radix
//!   sort, the runs shared out between the cores.
//!
//! The places (`ranks`) are written as each part of the order is finished, while it is in cache.
//!
//! Both stages sort on a 32-bit window of the key: its offset from the group's least key,
//! shifted so the window spans the group's whole range. Candidates that agree on the window
//! but not on the whole key (rare for scores: the window resolves about one part in 4e9 of
//! the range) are then put in order on the whole key. Nothing has to be merged at the end,
//! which is what keeps a 500,000-row re-rank inside a GUI frame.

use rayon::prelude::*;
use std::cell::RefCell;
use std::sync::atomic::{AtomicU32, AtomicU64, Ordering::Relaxed};

/// Bits of the first (most significant) digit: 2048 key ranges.
const TOP_BITS: u32 = 11;
const TOP: usize = 1 << TOP_BITS;
/// Digit width of the in-cache sort: 2^11 counters fit in the first-level cache; three passes
/// cover the 32-bit window.
const DIGIT_BITS: u32 = 11;
const BUCKETS: usize = 1 << DIGIT_BITS;
/// Candidates per in-cache sort: 16k items of 8 bytes plus as much scratch fill half of a
/// 512 KB second-level cache (the project machine's per core).
const PART_ITEMS: usize = 1 << 14;
/// Candidates per parallel work unit of the distribution.
const CHUNK: usize = 1 << 16;
/// Below this a group is sorted by a plain stable comparison sort: the radix machinery
/// costs more than it saves.
const SMALL: usize = 1 << 13;

thread_local! {
    /// The distribution's buffer, kept between sorts on the same thread: a weight drag sorts
    /// every frame, and fresh megabytes each time cost page faults and zeroing.
    static PLACED: RefCell<Vec<AtomicU64>> = const { RefCell::new(Vec::new()) };
}

/// One group: candidate indices in tie order and the least and greatest key among them.
pub(crate) struct Group<'a> {
    pub values: &'a [u32],
    pub key_min: u64,
    pub key_max: u64,
}

/// The groups one after another, each in key order: `order` lists the values, `ranks[v]`
/// is the 1-based place of value `v` in `order` (0 for values in no group).
pub(crate) struct Sorted {
    pub order: Vec<u32>,
    pub ranks: Vec<u32>,
}

/// Sort `groups` by `key` (ascending, equal keys in input order) into one order, with the
/// place of each value; `ranks_len` is one more than the largest value.
pub(crate) fn sort_groups<K>(groups: &[Group], ranks_len: usize, key: K) -> Sorted
where
    K: Fn(u32) -> u64 + Sync,
{
    let n: usize = groups.iter().map(|g| g.values.len()).sum();
    let mut order = vec![0u32; n];
    // Each place is written once, by whichever core sorted that part of the order; relaxed
    // atomics make the scattered writes safe without locks (a relaxed store is a plain store).
    let ranks: Vec<AtomicU32> = (0..ranks_len).map(|_| AtomicU32::new(0)).collect();
    let mut rest: &mut [u32] = &mut order;
    let mut base = 0;
    for g in groups {
        let (mine, after) = std::mem::take(&mut rest).split_at_mut(g.values.len());
        rest = after;
        let places = Places {
            ranks: &ranks,
            base,
        };
        base += g.values.len();
        if g.values.len() < SMALL || g.key_min >= g.key_max {
            sort_small(g.values, &key, mine);
            places.record(0, mine);
        } else {
            // The buffer is borrowed for this thread's sort; a sort started on the same
            // thread meanwhile (rayon may run one while this one waits) takes a fresh one.
            let done = PLACED.with(|p| match p.try_borrow_mut() {
                Ok(mut placed) => {
                    sort_large(g, &key, mine, &mut placed, &places);
                    true
                }
                Err(_) => false,
            });
            if !done {
                sort_large(g, &key, mine, &mut Vec::new(), &places);
            }
        }
    }
    // Same size and alignment: collected in place.
    let ranks = ranks.into_iter().map(AtomicU32::into_inner).collect();
    Sorted { order, ranks }
}

/// Where the places of one group's values go: `ranks[v]` = 1-based place of `v` in the
/// whole order, the group starting at `base`.
struct Places<'a> {
    ranks: &'a [AtomicU32],
    base: usize,
}

impl Places<'_> {
    /// Record that `values` fill the group's order from position `start` on. Written while
    /// each part of the order is still in cache, so no second pass over the order is needed.
    fn record(&self, start: usize, values: &[u32]) {
        let first = self.base + start + 1;
        for (k, &v) in values.iter().enumerate() {
            if let Some(r) = self.ranks.get(v as usize) {
                r.store((first + k) as u32, Relaxed);
            }
        }
    }
}

/// `values` ordered by `key`, equal keys in input order: the one-group case.
#[cfg(test)]
pub(crate) fn sorted_values<K>(values: &[u32], key: K) -> Vec<u32>
where
    K: Fn(u32) -> u64 + Sync,
{
    let (key_min, key_max) = values
        .iter()
        .fold((u64::MAX, 0), |(a, b), &v| (a.min(key(v)), b.max(key(v))));
    let len = values.iter().map(|&v| v as usize + 1).max().unwrap_or(0);
    let g = Group {
        values,
        key_min,
        key_max,
    };
    sort_groups(&[g], len, key).order
}

fn sort_small<K: Fn(u32) -> u64>(values: &[u32], key: &K, out: &mut [u32]) {
    let mut keyed: Vec<(u64, u32)> = values.iter().map(|&v| (key(v), v)).collect();
    // Stable: equal keys keep their input order.
    keyed.sort_by_key(|&(k, _)| k);
    for (o, (_, v)) in out.iter_mut().zip(keyed) {
        *o = v;
    }
}

/// The two-stage radix sort of one large group into `out`; `placed` is scratch.
fn sort_large<K>(g: &Group, key: &K, out: &mut [u32], placed: &mut Vec<AtomicU64>, places: &Places)
where
    K: Fn(u32) -> u64 + Sync,
{
    let values = g.values;
    let n = values.len();
    let span = g.key_max - g.key_min;
    let span_bits = 64 - span.leading_zeros();
    let shift = span_bits.saturating_sub(32);
    let used_bits = span_bits - shift;
    let (key_min, exact) = (g.key_min, shift == 0);
    // Clamped so a key outside the stated bounds cannot wrap around (it would still sort
    // to an end of the group, not corrupt anything).
    let window = |v: u32| (key(v).saturating_sub(key_min).min(span) >> shift) as u32;
    let top = |w: u32| (w >> used_bits.saturating_sub(TOP_BITS)) as usize;

    // Stage 1: count each chunk's candidates per key range, then place them: chunk c's
    // candidates of range d follow chunk c-1's, so the distribution is stable.
    let counts: Vec<Vec<u32>> = values
        .par_chunks(CHUNK)
        .map(|vs| {
            let mut h = vec![0u32; TOP];
            for &v in vs {
                h[top(window(v))] += 1;
            }
            h
        })
        .collect();
    let mut next = counts.clone();
    let mut range_start = vec![0usize; TOP + 1];
    let mut sum = 0usize;
    for d in 0..TOP {
        range_start[d] = sum;
        for (nx, c) in next.iter_mut().zip(&counts) {
            nx[d] = sum as u32;
            sum += c[d] as usize;
        }
    }
    range_start[TOP] = sum;
    // Each slot is written once by one core; relaxed atomics make that safe without locks
    // (a relaxed store is a plain store). Left-over contents are all overwritten.
    if placed.len() < n {
        placed.resize_with(n, || AtomicU64::new(0));
    }
    let placed = &placed[..n];
    values
        .par_chunks(CHUNK)
        .zip(next.par_iter_mut())
        .for_each(|(vs, nx)| {
            for &v in vs {
                let w = window(v);
                let d = top(w);
                if let Some(slot) = placed.get(nx[d] as usize) {
                    slot.store((u64::from(w) << 32) | u64::from(v), Relaxed);
                }
                nx[d] += 1;
            }
        });

    // Stage 2: whole key ranges gathered into parts of about PART_ITEMS, each sorted alone.
    let mut parts: Vec<(usize, &mut [u32])> = Vec::new();
    let mut rest = out;
    let mut start = 0;
    for d in 0..TOP {
        let end = range_start[d + 1];
        if end - start >= PART_ITEMS || (d + 1 == TOP && end > start) {
            let (mine, after) = std::mem::take(&mut rest).split_at_mut(end - start);
            rest = after;
            parts.push((start, mine));
            start = end;
        }
    }
    parts.into_par_iter().for_each_init(
        || (Vec::new(), Vec::new()),
        |(items, scratch): &mut (Vec<u64>, Vec<u64>), (start, mine)| {
            items.clear();
            items.extend(
                placed[start..start + mine.len()]
                    .iter()
                    .map(|x| x.load(Relaxed)),
            );
            radix_on_window(items, scratch);
            if !exact {
                order_window_ties(items, key);
            }
            for (o, &x) in mine.iter_mut().zip(items.iter()) {
                *o = x as u32;
            }
            places.record(start, mine);
        },
    );
}

/// Stable least-significant-digit radix sort of `(window << 32) | value` items on the window.
fn radix_on_window(items: &mut Vec<u64>, scratch: &mut Vec<u64>) {
    let m = items.len();
    let mut counts = [[0u32; BUCKETS]; 3];
    for &x in items.iter() {
        let w = (x >> 32) as usize;
        counts[0][w & (BUCKETS - 1)] += 1;
        counts[1][(w >> DIGIT_BITS) & (BUCKETS - 1)] += 1;
        counts[2][(w >> (2 * DIGIT_BITS)) & (BUCKETS - 1)] += 1;
    }
    scratch.clear();
    scratch.resize(m, 0);
    for (p, c) in counts.iter_mut().enumerate() {
        // A digit shared by every item cannot change the order: skip the pass.
        if c.iter().any(|&k| k as usize == m) {
            continue;
        }
        let mut sum = 0;
        for x in c.iter_mut() {
            let t = *x;
            *x = sum;
            sum += t;
        }
        let shift = 32 + p as u32 * DIGIT_BITS;
        for &x in items.iter() {
            let d = ((x >> shift) as usize) & (BUCKETS - 1);
            if let Some(s) = scratch.get_mut(c[d] as usize) {
                *s = x;
            }
            c[d] += 1;
        }
        std::mem::swap(items, scratch);
    }
}

/// Runs that agree on the window: order them on the whole key (stable).
fn order_window_ties<K: Fn(u32) -> u64>(items: &mut [u64], key: &K) {
    let m = items.len();
    let mut start = 0;
    while start < m {
        let w = items[start] >> 32;
        let mut end = start + 1;
        while end < m && items[end] >> 32 == w {
            end += 1;
        }
        match end - start {
            1 => {}
            2 => {
                if key(items[start + 1] as u32) < key(items[start] as u32) {
                    items.swap(start, start + 1);
                }
            }
            _ => {
                let mut run: Vec<(u64, u64)> = items[start..end]
                    .iter()
                    .map(|&x| (key(x as u32), x))
                    .collect();
                run.sort_by_key(|&(k, _)| k);
                for (slot, (_, x)) in items[start..end].iter_mut().zip(run) {
                    *slot = x;
                }
            }
        }
        start = end;
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Pseudo-random stream from Knuth's MMIX linear congruential constants.
    fn stream(n: u32) -> Vec<u64> {
        let mut x: u64 = 1;
        (0..n)
            .map(|_| {
                x = x
                    .wrapping_mul(6364136223846793005)
                    .wrapping_add(1442695040888963407);
                x
            })
            .collect()
    }

    fn check(keys: impl Fn(u64) -> u64, n: u32) {
        let key_of: Vec<u64> = stream(n).into_iter().map(keys).collect();
        // Input order reversed, so stability is checked against a non-trivial order.
        let values: Vec<u32> = (0..n).rev().collect();
        let mut expect = values.clone();
        expect.sort_by_key(|&v| key_of[v as usize]);
        assert_eq!(sorted_values(&values, |v| key_of[v as usize]), expect);
    }

    /// A score in [0, 1] as the ranking keys it: descending score, ascending key.
    fn score_key(s: f64) -> u64 {
        (u64::MAX >> 1) - s.max(0.0).to_bits()
    }

    fn unit(x: u64) -> f64 {
        (x >> 11) as f64 / (1u64 << 53) as f64
    }

    #[test]
    fn radix_order_matches_std_stable_sort() {
        // Few distinct keys (stability), keys only in the low bits (exact window), full-width
        // keys, score-like keys, score-like keys with a third at exactly zero (a wide range
        // with its bulk in few key ranges), and scores rounded to a coarse step (long runs
        // of equal keys); the small path and the two-stage path.
        for n in [1_000, 20_000, 200_000] {
            check(|x| ((x >> 20) % 5000) | (x & (1 << 63)), n);
            check(|x| x >> 40, n);
            check(|x| x, n);
            check(|x| (x >> 40) << 40, n);
            check(|x| score_key(unit(x)), n);
            check(|x| score_key(if x % 3 == 0 { 0.0 } else { unit(x) }), n);
            check(|x| score_key((unit(x) * 1000.0).round() / 1000.0), n);
            check(|x| score_key(0.25 + unit(x) * 1e-12), n);
        }
        check(|x| x, 0);
        check(|_| 7, 50_000);
    }

    #[test]
    fn groups_follow_each_other_and_ranks_invert_the_order() {
        let n = 60_000u32;
        let key_of: Vec<u64> = stream(n).into_iter().map(|x| score_key(unit(x))).collect();
        let key = |v: u32| key_of[v as usize];
        let (a, b): (Vec<u32>, Vec<u32>) = (0..n).partition(|v| v % 4 != 0);
        let group = |values: &[u32]| {
            let min = values.iter().map(|&v| key(v)).min().unwrap_or(0);
            let max = values.iter().map(|&v| key(v)).max().unwrap_or(0);
            (min, max)
        };
        let ((amin, amax), (bmin, bmax)) = (group(&a), group(&b));
        let sorted = sort_groups(
            &[
                Group {
                    values: &a,
                    key_min: amin,
                    key_max: amax,
                },
                Group {
                    values: &b,
                    key_min: bmin,
                    key_max: bmax,
                },
            ],
            n as usize,
            key,
        );
        let mut expect_a = a.clone();
        expect_a.sort_by_key(|&v| key(v));
        let mut expect_b = b.clone();
        expect_b.sort_by_key(|&v| key(v));
        expect_a.extend(expect_b);
        assert_eq!(sorted.order, expect_a);
        for (r, &v) in sorted.order.iter().enumerate() {
            assert_eq!(sorted.ranks[v as usize], r as u32 + 1);
        }
    }
}

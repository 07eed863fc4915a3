//! Ordering candidates by a 64-bit key, for the ranking: the candidates come in groups
//! (those that pass every requirement, then those that do not), each group already in its
//! tie order, and each group is sorted by key with equal keys kept in that order.
//!
//! A large group is sorted in two stages, both radix sorts (Knuth, "The Art of Computer
//! Programming" vol. 3, 2nd ed. 1998, section 5.2.5):
//! - a most-significant-digit distribution of the group into key ranges ("shelves"), stable,
//!   with both cores filling the shelves side by side;
//! - each shelf sorted on its own, either when a reader first asks for a place on it
//!   ([`Shelves::at`], [`Shelves::position_of`]) or all at once ([`Shelves::complete`]): runs
//!   of shelves of about `PART_ITEMS` candidates (small enough to stay in one core's cache with
//!   their scratch) by a stable least-significant-digit radix sort, shared out between the
//!   cores.
//!
//! A window showing the first rows of 500,000 thus needs the distribution and a shelf or two,
//! not the whole sort: the workbench re-ranks every frame while a weight is dragged.
//!
//! Both stages sort on a 32-bit window of the key: its offset from the group's least key,
//! shifted so the window spans the group's whole range. Candidates that agree on the window
//! but not on the whole key (rare for scores: the window resolves about one part in 4e9 of
//! the range) are then put in order on the whole key. Nothing has to be merged at the end.

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
/// Items per 64-byte cache line, the unit the distribution writes in.
const LINE: usize = 8;
/// Candidates per parallel work unit of the distribution.
const CHUNK: usize = 1 << 16;
/// Below this a group is one shelf, sorted by a plain stable comparison sort: the radix
/// machinery costs more than it saves.
const SMALL: usize = 1 << 13;
/// A shelf sorted alone uses the radix sort from this size, a comparison sort below it (the
/// radix sort's three passes over 2048 counters each cost more on a few hundred items).
const RADIX_MIN: usize = 1 << 10;

thread_local! {
    /// The distribution's items in input order, kept between sorts on the same thread: a
    /// weight drag re-ranks every frame, and fresh megabytes each time cost page faults.
    static KEYED: RefCell<Vec<u64>> = const { RefCell::new(Vec::new()) };
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
/// place of each value; `ranks_len` is one more than the largest value. (The ranking does the
/// same through [`Shelves`], reading places before it completes.)
#[cfg(test)]
pub(crate) fn sort_groups<K>(groups: &[Group], ranks_len: usize, key: K) -> Sorted
where
    K: Fn(u32) -> u64 + Sync,
{
    let mut shelves = Shelves::distribute(groups, groups.len(), Vec::new(), &key);
    shelves.complete(&key);
    shelves.sorted(ranks_len)
}

/// How one group's keys map to the 32-bit window and its window to a shelf.
#[derive(Clone, Copy, Debug)]
struct Span {
    /// First place of the group in the whole order, and its size.
    base: usize,
    len: usize,
    /// The group's shelves: `first_shelf..first_shelf + shelves`.
    first_shelf: usize,
    shelves: usize,
    key_min: u64,
    span: u64,
    shift: u32,
    /// Right shift from window to shelf; `None` when the group is a single shelf.
    top_shift: Option<u32>,
    /// The window is the whole key offset: no ties to order on the whole key.
    exact: bool,
}

impl Span {
    fn window(&self, key: u64) -> u32 {
        // Clamped so a key outside the stated bounds cannot wrap around (it would still sort
        // to an end of the group, not corrupt anything).
        (key.saturating_sub(self.key_min).min(self.span) >> self.shift) as u32
    }

    fn shelf(&self, window: u32) -> usize {
        self.first_shelf + self.top_shift.map_or(0, |s| (window >> s) as usize)
    }
}

/// The groups distributed onto shelves (the first stage done), each shelf sorted when first
/// read. Every read gives the place it would have in the fully sorted order.
#[derive(Debug)]
pub(crate) struct Shelves {
    /// `(window << 32) | value`, group after group, each group's shelves in key order.
    items: Vec<AtomicU64>,
    /// Shelf `s` holds `items[bounds[s]..bounds[s + 1]]`.
    bounds: Vec<usize>,
    sorted: Vec<bool>,
    spans: Vec<Span>,
    /// Each group's candidates while it waits to be distributed.
    pending: Vec<Option<Vec<u32>>>,
}

impl Shelves {
    /// The first stage for the first `now` groups: each group's candidates onto its
    /// shelves, stable. The later groups are distributed when a place in them is first read
    /// (or on [`Shelves::complete`]): the candidates that fail a requirement come after all
    /// that pass, and a window showing the first rows never needs them.
    ///
    /// `items` is an earlier value's buffer ([`Shelves::into_items`]) or empty: every slot is
    /// written before it is read, so it is reused as it is.
    pub(crate) fn distribute<K>(
        groups: &[Group],
        now: usize,
        mut items: Vec<AtomicU64>,
        key: &K,
    ) -> Shelves
    where
        K: Fn(u32) -> u64 + Sync,
    {
        let n: usize = groups.iter().map(|g| g.values.len()).sum();
        items.truncate(n);
        items.resize_with(n, || AtomicU64::new(0));
        let mut spans = Vec::with_capacity(groups.len());
        let (mut base, mut shelves) = (0, 0);
        for g in groups {
            let len = g.values.len();
            let span = g.key_max.saturating_sub(g.key_min);
            let span_bits = 64 - span.leading_zeros();
            let shift = span_bits.saturating_sub(32);
            let used_bits = span_bits - shift;
            let one_shelf = len < SMALL || g.key_min >= g.key_max;
            let sp = Span {
                base,
                len,
                first_shelf: shelves,
                shelves: if one_shelf { 1 } else { TOP },
                key_min: g.key_min,
                span,
                shift,
                top_shift: (!one_shelf).then(|| used_bits.saturating_sub(TOP_BITS)),
                exact: shift == 0,
            };
            shelves += sp.shelves;
            base += len;
            spans.push(sp);
        }
        // Until its group is distributed, each of its shelves reads as empty at its end.
        let mut bounds = vec![0usize; shelves + 1];
        for sp in &spans {
            bounds[sp.first_shelf + 1..=sp.first_shelf + sp.shelves].fill(sp.base + sp.len);
            bounds[sp.first_shelf] = sp.base;
        }
        let mut out = Shelves {
            items,
            bounds,
            sorted: vec![false; shelves],
            spans,
            pending: groups.iter().map(|g| Some(g.values.to_vec())).collect(),
        };
        for g in 0..now.min(groups.len()) {
            out.fill(g, key);
        }
        out
    }

    /// The item buffer, for a later [`Shelves::distribute`].
    pub(crate) fn into_items(self) -> Vec<AtomicU64> {
        self.items
    }

    /// Distribute group `g` if it is still pending.
    fn fill<K: Fn(u32) -> u64 + Sync>(&mut self, g: usize, key: &K) {
        let Some(values) = self.pending.get_mut(g).and_then(Option::take) else {
            return;
        };
        let sp = self.spans[g];
        let (base, len, first) = (sp.base, sp.len, sp.first_shelf);
        let mine = &self.items[base..base + len];
        let bounds = &mut self.bounds[first..=first + sp.shelves];
        let item = |v: u32| (u64::from(sp.window(key(v))) << 32) | u64::from(v);
        if sp.top_shift.is_none() {
            for (slot, &v) in mine.iter().zip(&values) {
                slot.store(item(v), Relaxed);
            }
            return;
        }
        // Count each chunk's candidates per shelf, then place them: chunk c's candidates of
        // shelf d follow chunk c-1's, so the distribution is stable. The items are made once,
        // in input order, while counting. The buffer is taken out of the thread's slot, not
        // borrowed: a sort started meanwhile on this thread (rayon may run one while this one
        // waits) finds it empty.
        let mut keyed = KEYED.with(|k| std::mem::take(&mut *k.borrow_mut()));
        // Every item is overwritten below, so a buffer of the right size is not cleared.
        keyed.resize(len, 0);
        let counts: Vec<Vec<u32>> = values
            .par_chunks(CHUNK)
            .zip(keyed.par_chunks_mut(CHUNK))
            .map(|(vs, out)| {
                let mut h = vec![0u32; TOP];
                for (o, &v) in out.iter_mut().zip(vs) {
                    let x = item(v);
                    *o = x;
                    h[sp.shelf((x >> 32) as u32) - first] += 1;
                }
                h
            })
            .collect();
        let mut next = counts.clone();
        let mut sum = 0usize;
        for d in 0..TOP {
            bounds[d] = base + sum;
            for (nx, c) in next.iter_mut().zip(&counts) {
                nx[d] = sum as u32;
                sum += c[d] as usize;
            }
        }
        bounds[TOP] = base + sum;
        // Items are gathered per shelf in a cache line's worth (software write combining): a
        // store straight to its shelf would miss the cache every time, a full line written at
        // once misses once.
        keyed
            .par_chunks(CHUNK)
            .zip(next.par_iter_mut())
            .for_each(|(xs, nx)| {
                let mut lines = vec![[0u64; LINE]; TOP];
                let mut fill = vec![0u8; TOP];
                let mut put = |d: usize, xs: &[u64]| {
                    let at = nx[d] as usize;
                    if let Some(slots) = mine.get(at..at + xs.len()) {
                        for (slot, &x) in slots.iter().zip(xs) {
                            slot.store(x, Relaxed);
                        }
                    }
                    nx[d] += xs.len() as u32;
                };
                for &x in xs {
                    let d = sp.shelf((x >> 32) as u32) - first;
                    let f = usize::from(fill[d]);
                    lines[d][f] = x;
                    if f + 1 == LINE {
                        put(d, &lines[d]);
                        fill[d] = 0;
                    } else {
                        fill[d] = f as u8 + 1;
                    }
                }
                for d in 0..TOP {
                    put(d, &lines[d][..usize::from(fill[d])]);
                }
            });
        KEYED.with(|k| *k.borrow_mut() = keyed);
    }

    /// Number of places.
    #[cfg(test)]
    pub(crate) fn len(&self) -> usize {
        self.items.len()
    }

    fn span_of_shelf(&self, s: usize) -> &Span {
        self.spans
            .iter()
            .find(|sp| s >= sp.first_shelf && s < sp.first_shelf + sp.shelves)
            .unwrap_or(&self.spans[0])
    }

    /// Sort shelf `s` if it is not yet.
    fn sort_shelf<K: Fn(u32) -> u64>(&mut self, s: usize, key: &K) {
        if self.sorted[s] {
            return;
        }
        let (a, b) = (self.bounds[s], self.bounds[s + 1]);
        if b - a > 1 {
            let exact = self.span_of_shelf(s).exact;
            let mut items: Vec<u64> = self.items[a..b].iter().map(|x| x.load(Relaxed)).collect();
            sort_items(&mut items, &mut Vec::new(), exact, key);
            for (slot, x) in self.items[a..b].iter().zip(items) {
                slot.store(x, Relaxed);
            }
        }
        self.sorted[s] = true;
    }

    /// The value at 0-based place `pos` of the whole order.
    pub(crate) fn at<K: Fn(u32) -> u64 + Sync>(&mut self, pos: usize, key: &K) -> Option<u32> {
        if pos >= self.items.len() {
            return None;
        }
        if let Some(g) = self.spans.iter().position(|sp| pos < sp.base + sp.len) {
            self.fill(g, key);
        }
        let s = self.bounds.partition_point(|&b| b <= pos) - 1;
        self.sort_shelf(s, key);
        Some(self.items[pos].load(Relaxed) as u32)
    }

    /// Values from place `start` on, in order, while `f` asks for more: shelf by shelf, each
    /// sorted (and its group distributed) when the walk reaches it.
    pub(crate) fn walk<K: Fn(u32) -> u64 + Sync>(
        &mut self,
        start: usize,
        key: &K,
        mut f: impl FnMut(u32) -> bool,
    ) {
        for g in 0..self.spans.len() {
            let sp = self.spans[g];
            if sp.base + sp.len <= start {
                continue;
            }
            self.fill(g, key);
            for s in sp.first_shelf..sp.first_shelf + sp.shelves {
                let (a, b) = (self.bounds[s], self.bounds[s + 1]);
                if b <= start || a == b {
                    continue;
                }
                self.sort_shelf(s, key);
                for x in &self.items[a.max(start)..b] {
                    if !f(x.load(Relaxed) as u32) {
                        return;
                    }
                }
            }
        }
    }

    /// The 0-based place of value `v`, which belongs to group `group`.
    pub(crate) fn position_of<K: Fn(u32) -> u64 + Sync>(
        &mut self,
        group: usize,
        v: u32,
        key: &K,
    ) -> Option<usize> {
        let sp = *self.spans.get(group)?;
        if sp.len == 0 {
            return None;
        }
        self.fill(group, key);
        let s = sp.shelf(sp.window(key(v)));
        self.sort_shelf(s, key);
        let (a, b) = (self.bounds[s], self.bounds[s + 1]);
        (a..b).find(|&p| self.items[p].load(Relaxed) as u32 == v)
    }

    /// Sort every shelf not yet sorted: runs of whole shelves of about `PART_ITEMS`
    /// candidates (a run of shelves sorted together comes out as each sorted alone, since
    /// the shelves split the window into consecutive ranges), shared out between the cores.
    pub(crate) fn complete<K: Fn(u32) -> u64 + Sync>(&mut self, key: &K) {
        for g in 0..self.spans.len() {
            self.fill(g, key);
        }
        let mut parts: Vec<(usize, usize, bool)> = Vec::new();
        for sp in &self.spans {
            let (mut start, mut open) = (sp.first_shelf, false);
            for s in sp.first_shelf..sp.first_shelf + sp.shelves {
                open |= !self.sorted[s];
                let (a, b) = (self.bounds[start], self.bounds[s + 1]);
                if b - a >= PART_ITEMS || s + 1 == sp.first_shelf + sp.shelves {
                    if open && b - a > 1 {
                        parts.push((a, b, sp.exact));
                    }
                    (start, open) = (s + 1, false);
                }
            }
        }
        let items = &self.items;
        parts.into_par_iter().for_each_init(
            || (Vec::new(), Vec::new()),
            |(buf, scratch): &mut (Vec<u64>, Vec<u64>), (a, b, exact)| {
                buf.clear();
                buf.extend(items[a..b].iter().map(|x| x.load(Relaxed)));
                sort_items(buf, scratch, exact, key);
                for (slot, &x) in items[a..b].iter().zip(buf.iter()) {
                    slot.store(x, Relaxed);
                }
            },
        );
        self.sorted.iter_mut().for_each(|s| *s = true);
    }

    /// The whole order and every value's place, once [`Shelves::complete`] has run.
    pub(crate) fn sorted(&self, ranks_len: usize) -> Sorted {
        let order: Vec<u32> = self
            .items
            .par_iter()
            .map(|x| x.load(Relaxed) as u32)
            .collect();
        // Each place is written once; relaxed atomics make the scattered writes safe without
        // locks.
        let ranks: Vec<AtomicU32> = (0..ranks_len).map(|_| AtomicU32::new(0)).collect();
        order.par_chunks(CHUNK).enumerate().for_each(|(c, vs)| {
            for (k, &v) in vs.iter().enumerate() {
                if let Some(r) = ranks.get(v as usize) {
                    r.store((c * CHUNK + k + 1) as u32, Relaxed);
                }
            }
        });
        // Same size and alignment: collected in place.
        let ranks = ranks.into_iter().map(AtomicU32::into_inner).collect();
        Sorted { order, ranks }
    }
}

/// `(window << 32) | value` items in window order, equal windows in their present order, then
/// runs that agree on the window in whole-key order (unless the window is `exact`).
fn sort_items<K: Fn(u32) -> u64>(
    items: &mut Vec<u64>,
    scratch: &mut Vec<u64>,
    exact: bool,
    key: &K,
) {
    if items.len() >= RADIX_MIN {
        radix_on_window(items, scratch);
    } else {
        // Stable: equal windows keep their order.
        items.sort_by_key(|&x| x >> 32);
    }
    if !exact {
        order_window_ties(items, key);
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

    /// Places read shelf by shelf, in a scattered order and before anything else is sorted,
    /// are the places of the full sort; so are the positions found from the values, and a
    /// completion after some reads changes nothing.
    #[test]
    fn places_read_before_the_sort_are_the_sorted_places() {
        for (n, coarse) in [(60_000u32, false), (60_000, true), (5_000, false)] {
            let key_of: Vec<u64> = stream(n)
                .into_iter()
                .map(|x| {
                    let s = unit(x);
                    score_key(if coarse {
                        (s * 300.0).round() / 300.0
                    } else {
                        s
                    })
                })
                .collect();
            let key = |v: u32| key_of[v as usize];
            let (a, b): (Vec<u32>, Vec<u32>) = (0..n).rev().partition(|v| v % 3 != 0);
            let bounds = |vs: &[u32]| {
                let ks = vs.iter().map(|&v| key(v));
                (ks.clone().min().unwrap_or(u64::MAX), ks.max().unwrap_or(0))
            };
            let groups = [(&a, bounds(&a)), (&b, bounds(&b))].map(|(values, (lo, hi))| Group {
                values,
                key_min: lo,
                key_max: hi,
            });
            let full = sort_groups(&groups, n as usize, key);
            let mut lazy = Shelves::distribute(&groups, 1, Vec::new(), &key);
            assert_eq!(lazy.len(), n as usize);
            let step = 7919; // a prime: visits every place once, far from in order
            for k in 0..n as usize {
                let pos = (k * step) % n as usize;
                assert_eq!(lazy.at(pos, &key), Some(full.order[pos]), "place {pos}");
            }
            assert_eq!(lazy.at(n as usize, &key), None);
            let mut walker = Shelves::distribute(&groups, 0, Vec::new(), &key);
            for start in [0, 1, n as usize / 3, n as usize - 1] {
                let mut seen = Vec::new();
                walker.walk(start, &key, |v| {
                    seen.push(v);
                    true
                });
                assert_eq!(seen, full.order[start..], "walk from {start}");
            }
            // Reusing a used buffer (its old contents must not show through).
            let mut fresh = Shelves::distribute(&groups, 0, walker.into_items(), &key);
            for v in (0..n).step_by(13) {
                let group = usize::from(v % 3 == 0);
                let pos = fresh.position_of(group, v, &key);
                assert_eq!(pos, Some(full.ranks[v as usize] as usize - 1), "value {v}");
            }
            fresh.complete(&key);
            let again = fresh.sorted(n as usize);
            assert_eq!(again.order, full.order);
            assert_eq!(again.ranks, full.ranks);
        }
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

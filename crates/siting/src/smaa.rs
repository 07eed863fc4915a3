//! Stochastic multicriteria acceptability analysis (SMAA; Lahdelma, Hokkanen and Salminen
//! 1998, European Journal of Operational Research 106:137-143): draw weight vectors from a
//! distribution that stands for what the team does not know about its weights, rank the
//! candidates under each, and report how often each candidate ranks first (the first rank
//! acceptability index) and reaches the top N, with its central weight vector (the mean of
//! the weights under which it ranks first).
//!
//! Weight draws (docs/siting.md):
//! - around the chosen weights: each normalised weight times (1 + spread x u), u uniform in
//!   [-1, 1], then renormalised; criteria weighted 0 stay out;
//! - uniform on the simplex: Dirichlet(1), drawn as normalised standard exponentials
//!   (Devroye 1986, "Non-Uniform Random Variate Generation", Springer, ch. XI).
//!
//! Determinism: the draws are split into fixed blocks, each with its own ChaCha8 stream of
//! the one seed, and counts are merged in block order, so the result does not depend on the
//! number of threads.

use std::collections::HashMap;

use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;
use rayon::prelude::*;

use crate::criteria::{Criteria, RobustnessSettings, ScoreMethod, WeightSampling};
use crate::ranking::{rank, PreparedTable};
use crate::SitingError;

/// Weight draws per block: one ChaCha stream each.
const BLOCK: usize = 256;

/// The outcome of a robustness analysis over the candidates in `pool`.
#[derive(Clone, Debug, PartialEq)]
pub struct SmaaResult {
    pub settings: RobustnessSettings,
    /// Candidate indices analysed, in their rank order under the chosen weights.
    pub pool: Vec<u32>,
    /// Share of draws in which each pool member ranked first.
    pub p_rank1: Vec<f64>,
    /// Share of draws in which each pool member was among the `settings.top_n` best.
    pub p_top_n: Vec<f64>,
    /// Mean normalised weights over the draws where each member ranked first (None if never).
    pub central_weights: Vec<Option<Vec<f64>>>,
    position: HashMap<u32, usize>,
}

impl SmaaResult {
    /// (P(rank 1), P(top N)) of candidate `index`, or None when it was not in the pool.
    pub fn probabilities(&self, index: usize) -> Option<(f64, f64)> {
        let p = *self.position.get(&u32::try_from(index).ok()?)?;
        Some((self.p_rank1[p], self.p_top_n[p]))
    }
}

/// Run the analysis with the settings in `criteria.robustness`.
pub fn smaa(table: &PreparedTable, criteria: &Criteria) -> Result<SmaaResult, SitingError> {
    smaa_with(table, criteria, &criteria.robustness)
}

struct Tally {
    first: Vec<u64>,
    top: Vec<u64>,
    weight_sums: Vec<f64>,
}

/// Run the analysis with explicit settings (the GUI's "what if" without editing criteria).
pub fn smaa_with(
    table: &PreparedTable,
    criteria: &Criteria,
    settings: &RobustnessSettings,
) -> Result<SmaaResult, SitingError> {
    let mut checked = criteria.clone();
    checked.robustness = settings.clone();
    checked.validate()?;
    let ranking = rank(table, criteria)?;
    let pool: Vec<u32> = ranking
        .order
        .iter()
        .copied()
        .filter(|&i| table.passed(i as usize))
        .take(settings.pool)
        .collect();
    let (k, m) = (pool.len(), table.criterion_count());
    let product = criteria.scoring == ScoreMethod::WeightedProduct;
    // Row-major copy of the pool's utilities (or their logs): one contiguous row per draw.
    let mut rows = Vec::with_capacity(k * m);
    for &i in &pool {
        for c in 0..m {
            let u = table.utility(c, i as usize);
            rows.push(if product { u.ln() } else { u });
        }
    }
    let base = ranking.weights.clone();
    let blocks = settings.samples.div_ceil(BLOCK);
    let tallies: Vec<Tally> = (0..blocks)
        .into_par_iter()
        .map(|b| {
            let count = BLOCK.min(settings.samples - b * BLOCK);
            run_block(&rows, k, m, &base, settings, b as u64, count)
        })
        .collect();
    let mut first = vec![0u64; k];
    let mut top = vec![0u64; k];
    let mut weight_sums = vec![0.0; k * m];
    for t in tallies {
        first.iter_mut().zip(&t.first).for_each(|(a, b)| *a += b);
        top.iter_mut().zip(&t.top).for_each(|(a, b)| *a += b);
        weight_sums
            .iter_mut()
            .zip(&t.weight_sums)
            .for_each(|(a, b)| *a += b);
    }
    let n = settings.samples as f64;
    let central_weights = (0..k)
        .map(|j| {
            (first[j] > 0).then(|| {
                weight_sums[j * m..(j + 1) * m]
                    .iter()
                    .map(|s| s / first[j] as f64)
                    .collect()
            })
        })
        .collect();
    Ok(SmaaResult {
        settings: settings.clone(),
        position: pool.iter().enumerate().map(|(p, &i)| (i, p)).collect(),
        pool,
        p_rank1: first.iter().map(|&c| c as f64 / n).collect(),
        p_top_n: top.iter().map(|&c| c as f64 / n).collect(),
        central_weights,
    })
}

fn draw_weights(rng: &mut ChaCha8Rng, base: &[f64], sampling: WeightSampling, out: &mut [f64]) {
    match sampling {
        WeightSampling::AroundChosen { spread } => {
            for (w, b) in out.iter_mut().zip(base) {
                *w = b * (1.0 + spread * (2.0 * rng.gen::<f64>() - 1.0));
            }
        }
        WeightSampling::UniformSimplex => {
            for w in out.iter_mut() {
                *w = -(1.0 - rng.gen::<f64>()).ln();
            }
        }
    }
    let total: f64 = out.iter().sum();
    if total > 0.0 {
        out.iter_mut().for_each(|w| *w /= total);
    }
}

fn run_block(
    rows: &[f64],
    k: usize,
    m: usize,
    base: &[f64],
    s: &RobustnessSettings,
    block: u64,
    count: usize,
) -> Tally {
    let mut rng = ChaCha8Rng::seed_from_u64(s.seed);
    rng.set_stream(block);
    let mut t = Tally {
        first: vec![0; k],
        top: vec![0; k],
        weight_sums: vec![0.0; k * m],
    };
    let mut w = vec![0.0; m];
    let mut scores = vec![0.0; k];
    let mut idx: Vec<usize> = (0..k).collect();
    // Higher score first; equal scores by rank under the chosen weights, so ties never
    // depend on the sort's internals.
    let better =
        |scores: &[f64], a: usize, b: usize| scores[b].total_cmp(&scores[a]).then(a.cmp(&b));
    for _ in 0..count {
        draw_weights(&mut rng, base, s.sampling, &mut w);
        for (j, score) in scores.iter_mut().enumerate() {
            let row = &rows[j * m..(j + 1) * m];
            // Weight 0 must not meet ln(0) in the product form.
            *score = row
                .iter()
                .zip(&w)
                .filter(|(_, &w)| w != 0.0)
                .map(|(u, w)| w * u)
                .sum();
        }
        if k == 0 {
            continue;
        }
        let best = (1..k).fold(0, |b, j| if better(&scores, j, b).is_lt() { j } else { b });
        t.first[best] += 1;
        t.weight_sums[best * m..(best + 1) * m]
            .iter_mut()
            .zip(&w)
            .for_each(|(a, b)| *a += b);
        if k <= s.top_n {
            t.top.iter_mut().for_each(|c| *c += 1);
        } else {
            idx.iter_mut().enumerate().for_each(|(p, v)| *v = p);
            idx.select_nth_unstable_by(s.top_n - 1, |&a, &b| better(&scores, a, b));
            idx[..s.top_n].iter().for_each(|&j| t.top[j] += 1);
        }
    }
    t
}

//! Pareto (non-dominated) flags over the soft criteria's utilities.
//!
//! Candidate a dominates b when a's utility is at least b's on every criterion and greater on
//! at least one (Pareto optimality; e.g. Miettinen 1999, "Nonlinear Multiobjective
//! Optimization", Kluwer). Utilities rather than raw values are compared, so each
//! criterion's direction (more or less is better, or a preferred middle) is respected.
//!
//! Scan: sort by utility sum, descending. Any dominator of a candidate has a strictly larger
//! sum, so it comes first; and if it is itself dominated, a front member dominates both. So
//! each candidate need only be checked against the front found so far (Kung, Luccio and
//! Preparata 1975, J. ACM 22:469, use the same observation). Cost O(n log n + n F k) for a
//! front of F.

/// Non-dominated flags for the candidates in `members` (indices into the columns); others
/// get false. `columns[c][i]` is the utility of candidate i on criterion c.
pub fn pareto_flags(columns: &[Vec<f64>], n: usize, members: &[usize]) -> Vec<bool> {
    let mut flags = vec![false; n];
    let k = columns.len();
    if k == 0 {
        for &i in members {
            flags[i] = true;
        }
        return flags;
    }
    let row = |i: usize| -> Vec<f64> { columns.iter().map(|c| c[i]).collect() };
    let mut rows: Vec<(f64, usize, Vec<f64>)> = members
        .iter()
        .map(|&i| {
            let r = row(i);
            (r.iter().sum(), i, r)
        })
        .collect();
    rows.sort_by(|a, b| b.0.total_cmp(&a.0).then(a.1.cmp(&b.1)));
    let mut front: Vec<&[f64]> = Vec::new();
    for (_, i, r) in &rows {
        let dominated = front.iter().any(|f| dominates(f, r));
        if !dominated {
            flags[*i] = true;
            front.push(r);
        }
    }
    flags
}

/// True when `a` dominates `b`.
pub fn dominates(a: &[f64], b: &[f64]) -> bool {
    let mut better = false;
    for (x, y) in a.iter().zip(b) {
        if x < y {
            return false;
        }
        if x > y {
            better = true;
        }
    }
    better
}

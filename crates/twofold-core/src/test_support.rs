//! Tables shared by the unit tests of several modules.

use crate::data::Observations;

/// Coded rows of a full 2^k in standard (Yates) order, first factor fastest.
pub(crate) fn full(k: usize) -> Vec<Vec<f64>> {
    crate::design::FractionalDesign::full(k)
        .unwrap()
        .coded_rows()
}

/// `n` runs of a full 2^k in standard order, repeated: replicate I, then replicate II, ...
pub(crate) fn replicated_full(k: usize, n: usize) -> Vec<Vec<f64>> {
    full(k).into_iter().cycle().take(n).collect()
}

/// The table of `k` factors at `levels` with every response of `y` present, unblocked, no run
/// excluded.
pub(crate) fn observations(k: usize, levels: Vec<Vec<f64>>, y: &[f64]) -> Observations {
    Observations::new(
        k,
        levels,
        vec![],
        y.iter().map(|&v| Some(v)).collect(),
        vec![],
    )
    .unwrap()
}

/// Every p-subset of `0..m`, in lexicographic order, handed to `visit` (nothing when p > m).
pub(crate) fn all_subsets(m: usize, p: usize, mut visit: impl FnMut(&[usize])) {
    if p > m {
        return;
    }
    let mut idx: Vec<usize> = (0..p).collect();
    loop {
        visit(&idx);
        let Some(i) = (0..p).rev().find(|&i| idx[i] < m - p + i) else {
            return;
        };
        idx[i] += 1;
        for j in i + 1..p {
            idx[j] = idx[j - 1] + 1;
        }
    }
}

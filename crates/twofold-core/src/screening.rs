//! Non-regular two-level screening designs of 12, 20, 24, 28, 36, 40, 44 and 48 runs, after
//! Plackett & Burman (1946), "The design of optimum multifactorial experiments", *Biometrika*
//! 33(4), 305–325, with the partial aliasing of main effects and two-factor interactions.
//!
//! # Construction
//! Each design is the N − 1 columns of a normalised Hadamard matrix of order N (first column all
//! +1 dropped):
//! - **N = q + 1 with q a prime ≡ 3 (mod 4)** (12, 20, 24, 44, 48): the cyclic construction.
//!   Row i (0 ≤ i < q) has `+` in column j when `j − i` is 0 or a quadratic residue mod q and `−`
//!   otherwise; a last row of minus signs completes it (Paley 1933, *J. Math. Phys.* 12,
//!   311–320). Plackett & Burman's generating rows for 12, 20 and 24 runs are exactly these
//!   first rows (`+ + − + + + − − − + −` for 12 runs; checked in the tests, from memory).
//! - **N = 2(q + 1) with q a prime ≡ 1 (mod 4)** (28 with q = 13, 36 with q = 17): Paley's
//!   second construction from the symmetric conference matrix `C = [[0, 1ᵀ], [1, Q]]`, `Q` the
//!   Jacobsthal matrix, as `H = C ⊗ [[1, 1], [1, −1]] + I ⊗ [[1, −1], [−1, −1]]`.
//! - **N = 40**: the doubling `[[H₂₀, H₂₀], [H₂₀, −H₂₀]]` of the 20-run matrix (Sylvester).
//!
//! Plackett & Burman list other (equivalent up to sign and order) matrices for 28 and 36 runs;
//! any Hadamard matrix gives a design with every main effect orthogonal to every other, which
//! the tests check for every size.
//!
//! # Which columns
//! With k < N − 1 factors, the columns are chosen to make the partial aliasing of main effects
//! with two-factor interactions small: the sum over triples of columns of `(J₃/N)²`, where `J₃`
//! is the absolute sum of the three columns' product, is the first term of Tang & Deng's (1999)
//! generalised minimum aberration (*Annals of Statistics* 27(6), 1914–1926; from memory); it is
//! minimised by a column-exchange search from the first k columns (not proven optimal).
//!
//! # Partial aliases
//! `A = (X₁ᵀX₁)⁻¹X₁ᵀX₂` with `X₁` the intercept and main-effect columns and `X₂` the
//! two-factor interaction columns (Montgomery, *Design and Analysis of Experiments*, the alias
//! matrix of section 10.x; from memory): the expected estimate of a main-effect coefficient is
//! its true value plus `Σ A_ij β_j` over the interactions.

use nalgebra::DMatrix;

use crate::term::Term;

/// Run sizes offered (multiples of four that are not powers of two, up to 48).
pub const SCREENING_RUNS: [usize; 8] = [12, 20, 24, 28, 36, 40, 44, 48];

/// Partial alias coefficients smaller than this are zero (they are ratios of small integers).
pub const ALIAS_ZERO: f64 = 1e-9;

/// Why a screening design cannot be made.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum ScreeningError {
    /// The run size is not offered.
    #[error("{0} runs is not a screening-design size (12, 20, 24, 28, 36, 40, 44 or 48)")]
    Runs(usize),
    /// Too many or too few factors.
    #[error("a {runs}-run screening design holds 2 to {} factors, not {factors}", (runs - 1).min(crate::term::MAX_FACTORS))]
    Factors {
        /// Runs.
        runs: usize,
        /// Factors asked.
        factors: usize,
    },
}

/// A screening design: `rows[run][factor]` is −1 or +1.
#[derive(Debug, Clone, PartialEq)]
pub struct ScreeningDesign {
    /// Runs N.
    pub runs: usize,
    /// Factors k.
    pub factors: usize,
    /// Which of the N − 1 columns of the full design each factor uses (0-based).
    pub columns: Vec<usize>,
    /// The coded runs in standard order.
    pub rows: Vec<Vec<i8>>,
    /// Σ over triples of factors of `(J₃/N)²` (0 for a design without partial aliasing of main
    /// effects with two-factor interactions).
    pub b3: f64,
}

fn is_prime(n: usize) -> bool {
    n >= 2
        && (2..)
            .take_while(|d| d * d <= n)
            .all(|d| !n.is_multiple_of(d))
}

/// Legendre symbol of `a` mod prime `q`: 0, +1 (quadratic residue) or −1.
fn chi(a: i64, q: i64) -> i8 {
    let a = a.rem_euclid(q);
    if a == 0 {
        return 0;
    }
    let residue = (1..q).any(|x| (x * x) % q == a);
    if residue { 1 } else { -1 }
}

/// A Hadamard matrix of order `n` (rows of ±1), or `None` for an order not built here.
fn hadamard(n: usize) -> Option<Vec<Vec<i8>>> {
    let q = n - 1;
    if is_prime(q) && q % 4 == 3 {
        // Cyclic rows plus a row of minus signs; bordered by a first column of +1.
        let q = q as i64;
        let mut h = Vec::with_capacity(n);
        for i in 0..q {
            let mut row = vec![1i8];
            row.extend((0..q).map(|j| if chi(j - i, q) >= 0 { 1 } else { -1 }));
            h.push(row);
        }
        let mut last = vec![1i8];
        last.extend(std::iter::repeat_n(-1i8, q as usize));
        h.push(last);
        return Some(h);
    }
    if n.is_multiple_of(2) {
        let q = n / 2 - 1;
        if is_prime(q) && q % 4 == 1 {
            // Conference matrix C of order q + 1, symmetric.
            let m = q + 1;
            let c = |i: usize, j: usize| -> i8 {
                match (i, j) {
                    (0, 0) => 0,
                    (0, _) | (_, 0) => 1,
                    _ => chi(j as i64 - i as i64, q as i64),
                }
            };
            let mut h = vec![vec![0i8; n]; n];
            for i in 0..m {
                for j in 0..m {
                    let (a, b) = if i == j {
                        // 0 ⊗ [[1,1],[1,−1]] + [[1,−1],[−1,−1]]
                        ([1, -1], [-1, -1])
                    } else {
                        let v = c(i, j);
                        ([v, v], [v, -v])
                    };
                    h[2 * i][2 * j] = a[0];
                    h[2 * i][2 * j + 1] = a[1];
                    h[2 * i + 1][2 * j] = b[0];
                    h[2 * i + 1][2 * j + 1] = b[1];
                }
            }
            return Some(normalised(h));
        }
        if n.is_multiple_of(4) && SCREENING_RUNS.contains(&(n / 2)) {
            let half = hadamard(n / 2)?;
            let mut h = Vec::with_capacity(n);
            for r in &half {
                let mut row = r.clone();
                row.extend(r.iter().copied());
                h.push(row);
            }
            for r in &half {
                let mut row = r.clone();
                row.extend(r.iter().map(|v| -v));
                h.push(row);
            }
            return Some(normalised(h));
        }
    }
    None
}

/// Rows multiplied by the sign of their first entry, so the first column is all +1.
fn normalised(mut h: Vec<Vec<i8>>) -> Vec<Vec<i8>> {
    for row in &mut h {
        if row[0] < 0 {
            row.iter_mut().for_each(|v| *v = -*v);
        }
    }
    h
}

/// The N × (N − 1) screening design of `runs` runs, columns in construction order.
pub fn full_screening(runs: usize) -> Result<Vec<Vec<i8>>, ScreeningError> {
    if !SCREENING_RUNS.contains(&runs) {
        return Err(ScreeningError::Runs(runs));
    }
    let h = hadamard(runs).ok_or(ScreeningError::Runs(runs))?;
    Ok(h.into_iter().map(|r| r[1..].to_vec()).collect())
}

/// `J₃` of three columns: |Σ over runs of their product|.
fn j3(m: &[Vec<i8>], a: usize, b: usize, c: usize) -> i64 {
    m.iter()
        .map(|r| i64::from(r[a] * r[b] * r[c]))
        .sum::<i64>()
        .abs()
}

fn b3_of(m: &[Vec<i8>], cols: &[usize]) -> f64 {
    let n = m.len() as f64;
    let mut s = 0.0;
    for x in 0..cols.len() {
        for y in x + 1..cols.len() {
            for z in y + 1..cols.len() {
                let j = j3(m, cols[x], cols[y], cols[z]) as f64 / n;
                s += j * j;
            }
        }
    }
    s
}

/// The `runs`-run screening design for `factors` factors (see the module documentation for the
/// choice of columns).
pub fn plackett_burman(runs: usize, factors: usize) -> Result<ScreeningDesign, ScreeningError> {
    let m = full_screening(runs)?;
    if !(2..runs).contains(&factors) || factors > crate::term::MAX_FACTORS {
        return Err(ScreeningError::Factors { runs, factors });
    }
    let mut cols: Vec<usize> = (0..factors).collect();
    let mut best = b3_of(&m, &cols);
    // Column exchange: swap a used column for an unused one while it lowers B3.
    let mut improved = factors < runs - 1;
    let mut passes = 0;
    while improved && passes < 20 {
        improved = false;
        passes += 1;
        for slot in 0..factors {
            for cand in 0..runs - 1 {
                if cols.contains(&cand) {
                    continue;
                }
                let old = cols[slot];
                cols[slot] = cand;
                let b = b3_of(&m, &cols);
                if b < best - 1e-12 {
                    best = b;
                    improved = true;
                } else {
                    cols[slot] = old;
                }
            }
        }
    }
    cols.sort_unstable();
    let b3 = b3_of(&m, &cols);
    let rows = m
        .iter()
        .map(|r| cols.iter().map(|&c| r[c]).collect())
        .collect();
    Ok(ScreeningDesign {
        runs,
        factors,
        columns: cols,
        rows,
        b3,
    })
}

/// The run sheet of a screening design: `replicates` copies of its runs, then
/// `centre_points` centre points, one block; in random order from `seed` when `randomise`
/// (the same shuffle as regular plans, [`crate::plan::shuffled_positions`]). With `fold`, the
/// full fold-over follows as block 2: every run with every sign switched, in its own random
/// order (seed + 1), so the first block keeps its order. The fold-over's runs make each main
/// effect orthogonal to every two-factor interaction: the product of a main-effect column with a
/// two-factor interaction column is of odd degree, so its sum over a run and its mirror image
/// cancels (Box, Hunter & Hunter, *Statistics for Experimenters*, on folding over; from memory).
/// Runs are listed in run order.
pub fn screening_runs(
    design: &ScreeningDesign,
    replicates: usize,
    centre_points: usize,
    seed: u64,
    randomise: bool,
    fold: bool,
) -> Vec<crate::plan::PlannedRun> {
    use crate::plan::PlannedRun;
    let mut sheet: Vec<PlannedRun> = Vec::new();
    for rep in 1..=replicates.max(1) {
        for row in &design.rows {
            sheet.push(PlannedRun {
                std_order: sheet.len() + 1,
                run_order: 0,
                block: 1,
                centre: false,
                replicate: u32::try_from(rep).unwrap_or(u32::MAX),
                levels: row.clone(),
            });
        }
    }
    for _ in 0..centre_points {
        sheet.push(PlannedRun {
            std_order: sheet.len() + 1,
            run_order: 0,
            block: 1,
            centre: true,
            replicate: 1,
            levels: vec![0; design.factors],
        });
    }
    let order: Vec<usize> = if randomise {
        crate::plan::shuffled_positions(sheet.len(), seed)
    } else {
        (0..sheet.len()).collect()
    };
    for (position, &i) in order.iter().enumerate() {
        sheet[i].run_order = position + 1;
    }
    sheet.sort_by_key(|r| r.run_order);
    if fold {
        let first = sheet.len();
        let mut mirror: Vec<PlannedRun> = design
            .rows
            .iter()
            .enumerate()
            .map(|(i, row)| PlannedRun {
                std_order: first + i + 1,
                run_order: 0,
                block: 2,
                centre: false,
                replicate: 1,
                levels: row.iter().map(|v| -v).collect(),
            })
            .collect();
        let order: Vec<usize> = if randomise {
            crate::plan::shuffled_positions(mirror.len(), seed.wrapping_add(1))
        } else {
            (0..mirror.len()).collect()
        };
        for (position, &i) in order.iter().enumerate() {
            mirror[i].run_order = first + position + 1;
        }
        mirror.sort_by_key(|r| r.run_order);
        sheet.extend(mirror);
    }
    sheet
}

/// One main effect's partial aliases: the two-factor interactions with a non-zero coefficient.
#[derive(Debug, Clone, PartialEq)]
pub struct PartialAliases {
    /// The main effect (or the intercept, [`Term::IDENTITY`]).
    pub term: Term,
    /// Each interaction with its coefficient in the alias matrix, in the trade's order.
    pub aliases: Vec<(Term, f64)>,
}

/// The alias matrix `(X₁ᵀX₁)⁻¹X₁ᵀX₂` of coded `rows` (intercept and main effects against every
/// two-factor interaction), listing the non-zero entries of every main effect (and of the
/// intercept when it has any). `None` when the main effects are not estimable.
pub fn partial_aliases(rows: &[Vec<i8>]) -> Option<Vec<PartialAliases>> {
    let n = rows.len();
    let k = rows.first()?.len();
    let pairs: Vec<(usize, usize)> = (0..k)
        .flat_map(|a| (a + 1..k).map(move |b| (a, b)))
        .collect();
    let x1 = DMatrix::from_fn(n, k + 1, |r, c| {
        if c == 0 {
            1.0
        } else {
            f64::from(rows[r][c - 1])
        }
    });
    let x2 = DMatrix::from_fn(n, pairs.len(), |r, c| {
        let (a, b) = pairs[c];
        f64::from(rows[r][a] * rows[r][b])
    });
    let xtx = x1.transpose() * &x1;
    let inv = xtx.try_inverse()?;
    let alias = inv * x1.transpose() * x2;
    let mut out = Vec::new();
    for row in 0..=k {
        let term = if row == 0 {
            Term::IDENTITY
        } else {
            Term::main(row - 1)
        };
        let aliases: Vec<(Term, f64)> = pairs
            .iter()
            .enumerate()
            .filter_map(|(c, &(a, b))| {
                let v = alias[(row, c)];
                (v.abs() > ALIAS_ZERO).then(|| (Term::main(a).times(Term::main(b)), v))
            })
            .collect();
        if row > 0 || !aliases.is_empty() {
            out.push(PartialAliases { term, aliases });
        }
    }
    Some(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn signs(row: &[i8]) -> String {
        row.iter().map(|&v| if v > 0 { '+' } else { '-' }).collect()
    }

    #[test]
    fn every_size_is_balanced_and_orthogonal() {
        for n in SCREENING_RUNS {
            let m = full_screening(n).unwrap_or_else(|e| panic!("{e}"));
            assert_eq!(m.len(), n);
            for c in 0..n - 1 {
                let sum: i32 = m.iter().map(|r| i32::from(r[c])).sum();
                assert_eq!(sum, 0, "{n} runs: column {c} is not balanced");
                for d in c + 1..n - 1 {
                    let dot: i32 = m.iter().map(|r| i32::from(r[c] * r[d])).sum();
                    assert_eq!(dot, 0, "{n} runs: columns {c} and {d} are not orthogonal");
                }
            }
        }
    }

    #[test]
    fn generating_rows_are_plackett_and_burmans() {
        // Plackett & Burman (1946), the generating rows for N = 12, 20 and 24 (from memory;
        // the same rows appear in Montgomery's and Box, Hunter & Hunter's tables).
        let published = [
            (12, "++-+++---+-"),
            (20, "++--++++-+-+----++-"),
            (24, "+++++-+-++--++--+-+----"),
        ];
        for (n, row) in published {
            let m = full_screening(n).unwrap_or_else(|e| panic!("{e}"));
            assert_eq!(signs(&m[0]), row, "{n} runs");
            // The other rows are its cyclic shifts, then a row of minus signs.
            assert_eq!(signs(&m[n - 1]), "-".repeat(n - 1));
            let shifted: String = row[n - 2..].chars().chain(row[..n - 2].chars()).collect();
            assert_eq!(signs(&m[1]), shifted, "{n} runs, second row");
        }
    }

    #[test]
    fn twelve_runs_alias_each_main_effect_with_every_other_interaction_by_a_third() {
        // The well-known partial aliasing of the 12-run design (common knowledge of the trade,
        // recomputed here): each main effect carries ±1/3 of every two-factor interaction not
        // containing it, and none of those containing it.
        let d = plackett_burman(12, 11).unwrap_or_else(|e| panic!("{e}"));
        let list = partial_aliases(&d.rows).unwrap_or_default();
        assert_eq!(
            list.len(),
            11,
            "no intercept row: interactions are orthogonal to it"
        );
        for p in &list {
            let i = p.term.factors().next().unwrap_or(99);
            assert_eq!(p.aliases.len(), 45, "C(10, 2) interactions without {i}");
            for (t, v) in &p.aliases {
                assert!(!t.contains(i));
                assert!((v.abs() - 1.0 / 3.0).abs() < 1e-12, "{t:?}: {v}");
            }
        }
        // Every triple has |J3| = 4: B3 = C(11, 3) / 9.
        assert!((d.b3 - 165.0 / 9.0).abs() < 1e-9);
    }

    #[test]
    fn fewer_factors_choose_columns_with_less_partial_aliasing() {
        // 20 runs, 5 factors: the exchange must not be worse than the first five columns.
        let m = full_screening(20).unwrap_or_else(|e| panic!("{e}"));
        let first = b3_of(&m, &[0, 1, 2, 3, 4]);
        let d = plackett_burman(20, 5).unwrap_or_else(|e| panic!("{e}"));
        assert!(d.b3 <= first + 1e-12, "{} > {first}", d.b3);
        assert_eq!(d.rows[0].len(), 5);
        for c in 0..5 {
            assert_eq!(d.rows.iter().map(|r| i32::from(r[c])).sum::<i32>(), 0);
        }
    }

    #[test]
    fn the_fold_over_clears_every_main_effect_of_the_interactions() {
        let d = plackett_burman(12, 7).unwrap_or_else(|e| panic!("{e}"));
        let sheet = screening_runs(&d, 1, 0, 9, true, true);
        assert_eq!(sheet.len(), 24);
        assert_eq!(sheet.iter().filter(|r| r.block == 2).count(), 12);
        // The first block keeps the order it has without the fold-over.
        let alone = screening_runs(&d, 1, 0, 9, true, false);
        assert_eq!(&sheet[..12], &alone[..]);
        let rows: Vec<Vec<i8>> = sheet.iter().map(|r| r.levels.clone()).collect();
        let list = partial_aliases(&rows).unwrap_or_default();
        assert!(list.iter().all(|p| p.aliases.is_empty()), "{list:?}");
    }

    #[test]
    fn sizes_and_factor_counts_are_checked() {
        assert_eq!(full_screening(16), Err(ScreeningError::Runs(16)));
        assert_eq!(
            plackett_burman(12, 12),
            Err(ScreeningError::Factors {
                runs: 12,
                factors: 12
            })
        );
    }
}

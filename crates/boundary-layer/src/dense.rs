//! Linear solves of the coupled Newton system.
//!
//! The Newton system of a 160-panel section has about 580 unknowns. Only a third of its columns
//! are dense (the mass defects: every station's edge speed depends on every mass defect); the
//! others (each station's θ and N or C_E) are read only by the residuals of their own station
//! and the next. [`BorderedSystem`] holds the matrix in that form and eliminates the local
//! columns first with sparse row operations, leaving a dense system of a third of the size
//! (Schur complement), which [`solve`] factorises.
//!
//! [`solve`] is LU factorisation with partial pivoting, blocked so that most of the work is one
//! matrix product per block of columns: an unblocked elimination streams the whole trailing
//! matrix through the cache once per column. Each block of [`BLOCK`] columns is factorised on
//! its own and the trailing matrix is updated by one product (nalgebra's `gemm`), the
//! right-looking blocked LU of Golub & Van Loan (2013), *Matrix Computations*, 4th ed.,
//! §3.2.11. Same pivoting, same result to round-off as the unblocked algorithm.
//!
//! Invariant: `None` (never a panic, never a silent wrong answer) when a pivot is exactly zero or
//! the solution is not finite.

use nalgebra::{DMatrix, DVector};

/// Columns per block (our choice: 48 keeps a block panel of a 600-row matrix, 230 kB, in the
/// second-level cache; on the E387 point, factorising the whole 576-row Newton matrix, 32 and
/// 64 were no faster, within the run-to-run scatter of about 20 %). On the 225-row Schur
/// complement the gain over nalgebra's LU is smaller: the whole point takes 67 ms with it and
/// 71 ms without (means of 21 runs each, interleaved).
const BLOCK: usize = 48;

/// Solves `a · x = b` for square `a`, factorising `a` in place (it is consumed). `None` if `a`
/// is singular (a zero pivot) or the solution is not finite.
pub(crate) fn solve(a: DMatrix<f64>, b: &DVector<f64>) -> Option<DVector<f64>> {
    let n = a.nrows();
    if a.ncols() != n || b.len() != n {
        return None;
    }
    let mut lu = a;
    let mut pivots = vec![0usize; n];
    // Copies of the current L21 and U12 blocks for the product (allocated once).
    let width = BLOCK.min(n);
    let mut l21 = DMatrix::<f64>::zeros(n, width);
    let mut u12 = DMatrix::<f64>::zeros(width, n);
    for k in (0..n).step_by(BLOCK) {
        let kb = BLOCK.min(n - k);
        // Unblocked elimination of the panel of columns k..k+kb, rows swapped across the
        // whole matrix.
        for j in k..k + kb {
            let (offset, max) =
                lu.view((j, j), (n - j, 1))
                    .iter()
                    .enumerate()
                    .fold((0, 0.0f64), |best, (i, v)| {
                        if v.abs() > best.1 {
                            (i, v.abs())
                        } else {
                            best
                        }
                    });
            if max == 0.0 || !max.is_finite() {
                return None;
            }
            let p = j + offset;
            pivots[j] = p;
            if p != j {
                lu.swap_rows(j, p);
            }
            let inverse = 1.0 / lu[(j, j)];
            for i in j + 1..n {
                lu[(i, j)] *= inverse;
            }
            for c in j + 1..k + kb {
                let factor = lu[(j, c)];
                if factor != 0.0 {
                    for i in j + 1..n {
                        lu[(i, c)] -= lu[(i, j)] * factor;
                    }
                }
            }
        }
        let rest = n - k - kb;
        if rest == 0 {
            continue;
        }
        // U12 = L11⁻¹ A12 (L11 unit lower triangular).
        for c in k + kb..n {
            for j in k..k + kb {
                let factor = lu[(j, c)];
                if factor != 0.0 {
                    for i in j + 1..k + kb {
                        lu[(i, c)] -= lu[(i, j)] * factor;
                    }
                }
            }
        }
        // A22 −= L21 U12.
        let mut l21 = l21.view_mut((0, 0), (rest, kb));
        l21.copy_from(&lu.view((k + kb, k), (rest, kb)));
        let mut u12 = u12.view_mut((0, 0), (kb, rest));
        u12.copy_from(&lu.view((k, k + kb), (kb, rest)));
        lu.view_mut((k + kb, k + kb), (rest, rest))
            .gemm(-1.0, &l21, &u12, 1.0);
    }
    // Forward substitution (unit L) on the permuted right-hand side, then back substitution.
    let mut x = b.clone();
    for (j, &p) in pivots.iter().enumerate() {
        x.swap_rows(j, p);
    }
    lu.solve_lower_triangular_with_diag_mut(&mut x, 1.0);
    if !lu.solve_upper_triangular_mut(&mut x) {
        return None;
    }
    x.iter().all(|v| v.is_finite()).then_some(x)
}

/// Threshold of the pivot choice in the local columns: a pivot may be as small as this fraction
/// of the largest entry in its column. 0.1 is the usual default of sparse LU codes (Duff,
/// Erisman & Reid, *Direct Methods for Sparse Matrices*, 1986, §7.8, from memory); it bounds the
/// growth of an entry in one elimination step by 1 + 1/0.1 = 11 instead of 2.
const PIVOT_THRESHOLD: f64 = 0.1;

/// Where a column of a [`BorderedSystem`] is kept.
#[derive(Debug, Clone, Copy)]
enum Slot {
    /// Position among the local columns (elimination order).
    Local(usize),
    /// Position among the dense columns.
    Dense(usize),
}

/// A square linear system whose "local" columns have few nonzero entries, each near the
/// diagonal (a station's θ and N/C_E appear only in the residuals of that station and of the
/// next one), while the other, "dense", columns are full (the mass defects, on which every edge
/// speed depends): a sparse matrix bordered by a dense block of columns.
///
/// [`BorderedSystem::solve`] is Gaussian elimination with threshold partial pivoting of the
/// matrix with its columns reordered, local columns first (in the order given) and dense columns
/// after them. The local columns are eliminated with sparse row operations, the dense part of
/// each row (kept row by row) updated alongside; the rows left over form the Schur complement
/// on the dense columns, a square system of their size solved by [`solve`]; the local unknowns
/// follow by back substitution. For the Newton system of a 160-panel section (579 unknowns,
/// 225 of them dense) the dense factorisation shrinks by about (579/225)³ ≈ 17.
#[derive(Debug, Clone)]
pub(crate) struct BorderedSystem {
    slots: Vec<Slot>,
    local_columns: Vec<usize>,
    dense_columns: Vec<usize>,
    /// Local entries of each row: (local position, value).
    rows: Vec<Vec<(usize, f64)>>,
    /// Dense part, row by row: row i at `dense[i·d .. (i + 1)·d]`.
    dense: Vec<f64>,
}

impl BorderedSystem {
    /// A zero system of size `local.len() + dense.len()`, or `None` unless the two lists
    /// together name every column exactly once.
    pub(crate) fn new(local: Vec<usize>, dense: Vec<usize>) -> Option<Self> {
        let n = local.len() + dense.len();
        let mut slots = vec![None; n];
        let named = local
            .iter()
            .enumerate()
            .map(|(k, &c)| (c, Slot::Local(k)))
            .chain(dense.iter().enumerate().map(|(j, &c)| (c, Slot::Dense(j))));
        for (c, slot) in named {
            match slots.get_mut(c) {
                Some(s @ None) => *s = Some(slot),
                _ => return None,
            }
        }
        Some(Self {
            slots: slots.into_iter().collect::<Option<Vec<_>>>()?,
            dense: vec![0.0; n * dense.len()],
            rows: vec![Vec::new(); n],
            local_columns: local,
            dense_columns: dense,
        })
    }

    /// Adds `value` to the entry (`row`, `column`).
    pub(crate) fn add(&mut self, row: usize, column: usize, value: f64) {
        match self.slots[column] {
            Slot::Local(k) => match self.rows[row].iter_mut().find(|e| e.0 == k) {
                Some(e) => e.1 += value,
                None => self.rows[row].push((k, value)),
            },
            Slot::Dense(j) => self.dense[row * self.dense_columns.len() + j] += value,
        }
    }

    /// The dense part of `row`, in the order of the dense columns given to [`Self::new`].
    pub(crate) fn dense_row_mut(&mut self, row: usize) -> &mut [f64] {
        let d = self.dense_columns.len();
        &mut self.dense[row * d..(row + 1) * d]
    }

    /// Solves the system for the right-hand side `b`; `None` as for [`solve`].
    pub(crate) fn solve(self, b: &DVector<f64>) -> Option<DVector<f64>> {
        let Self {
            local_columns,
            dense_columns,
            mut rows,
            mut dense,
            ..
        } = self;
        let n = rows.len();
        let (s, d) = (local_columns.len(), dense_columns.len());
        if b.len() != n {
            return None;
        }
        let mut column_rows: Vec<Vec<usize>> = vec![Vec::new(); s];
        for (i, row) in rows.iter().enumerate() {
            for &(k, _) in row {
                column_rows[k].push(i);
            }
        }
        let mut rhs: Vec<f64> = b.iter().copied().collect();
        let entry = |row: &[(usize, f64)], k: usize| {
            row.iter().find(|&&(c, _)| c == k).map_or(0.0, |&(_, v)| v)
        };
        let mut pivots = Vec::with_capacity(s); // (row, value) of each local column's pivot
        let mut used = vec![false; n];
        for k in 0..s {
            let candidates: Vec<usize> = column_rows[k]
                .iter()
                .copied()
                .filter(|&i| !used[i])
                .collect();
            // Threshold pivoting: of the rows whose entry is at least PIVOT_THRESHOLD times the
            // largest in the column, the one with the fewest live local entries, so that a row
            // of the next station (which also reads that station's columns) is not chosen when
            // a row of this station will do, and fill-in does not spread downstream.
            let largest = candidates
                .iter()
                .map(|&i| entry(&rows[i], k).abs())
                .fold(0.0f64, f64::max);
            let (p, pivot) = candidates
                .iter()
                .map(|&i| (i, entry(&rows[i], k)))
                .filter(|&(_, v)| v.abs() >= PIVOT_THRESHOLD * largest)
                .min_by(|a, b| {
                    rows[a.0]
                        .len()
                        .cmp(&rows[b.0].len())
                        .then(b.1.abs().total_cmp(&a.1.abs()))
                })
                .unwrap_or((usize::MAX, 0.0));
            if pivot == 0.0 || !pivot.is_finite() {
                return None;
            }
            used[p] = true;
            pivots.push((p, pivot));
            let pivot_entries: Vec<(usize, f64)> =
                rows[p].iter().copied().filter(|&(c, _)| c > k).collect();
            for i in candidates.into_iter().filter(|&i| i != p) {
                let factor = entry(&rows[i], k) / pivot;
                // The entry is eliminated: drop it, so a row's length counts its live entries.
                rows[i].retain(|e| e.0 != k);
                if factor == 0.0 {
                    continue;
                }
                for &(c, v) in &pivot_entries {
                    match rows[i].iter_mut().find(|e| e.0 == c) {
                        Some(e) => e.1 -= factor * v,
                        None => {
                            rows[i].push((c, -factor * v));
                            column_rows[c].push(i);
                        }
                    }
                }
                let (target, source) = if i < p {
                    let (head, tail) = dense.split_at_mut(p * d);
                    (&mut head[i * d..(i + 1) * d], &tail[..d])
                } else {
                    let (head, tail) = dense.split_at_mut(i * d);
                    (&mut tail[..d], &head[p * d..(p + 1) * d])
                };
                for (t, v) in target.iter_mut().zip(source) {
                    *t -= factor * v;
                }
                rhs[i] -= factor * rhs[p];
            }
        }
        // Schur complement on the dense columns: the rows not used as pivots.
        let rest: Vec<usize> = (0..n).filter(|&i| !used[i]).collect();
        let schur = DMatrix::from_fn(d, d, |r, j| dense[rest[r] * d + j]);
        let x_dense = solve(
            schur,
            &DVector::from_iterator(d, rest.iter().map(|&i| rhs[i])),
        )?;
        let mut x_local = vec![0.0; s];
        for k in (0..s).rev() {
            let (p, pivot) = pivots[k];
            let local_sum: f64 = rows[p]
                .iter()
                .filter(|&&(c, _)| c > k)
                .map(|&(c, v)| v * x_local[c])
                .sum();
            let dense_sum: f64 = dense[p * d..(p + 1) * d]
                .iter()
                .zip(x_dense.iter())
                .map(|(v, x)| v * x)
                .sum();
            x_local[k] = (rhs[p] - local_sum - dense_sum) / pivot;
        }
        let mut x = DVector::<f64>::zeros(n);
        for (&c, v) in local_columns.iter().zip(&x_local) {
            x[c] = *v;
        }
        for (&c, v) in dense_columns.iter().zip(x_dense.iter()) {
            x[c] = *v;
        }
        x.iter().all(|v| v.is_finite()).then_some(x)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A deterministic, well-conditioned but non-symmetric test matrix (diagonally weighted
    /// pseudo-random entries) of size `n`.
    fn matrix(n: usize) -> DMatrix<f64> {
        let mut state: u64 = 0x2545_f491_4f6c_dd1d;
        DMatrix::from_fn(n, n, |i, j| {
            state ^= state << 13;
            state ^= state >> 7;
            state ^= state << 17;
            let r = (state >> 11) as f64 / (1u64 << 53) as f64 - 0.5;
            r + if i == j { 0.5 } else { 0.0 }
        })
    }

    #[test]
    fn agrees_with_the_unblocked_factorisation() {
        // Sizes below, at and across block boundaries. The reference is nalgebra's unblocked LU
        // with the same partial pivoting; the two differ only by the order of the round-off, so
        // the solutions agree to a few hundred ulps of the condition-scaled solution (1e-10
        // relative allows a condition number up to about 1e5, far above these matrices').
        for n in [1, 5, BLOCK, BLOCK + 1, 2 * BLOCK + 7, 300] {
            let a = matrix(n);
            let b = DVector::from_fn(n, |i, _| (i as f64 * 0.37).sin());
            let blocked = solve(a.clone(), &b).expect("regular");
            let reference = a.clone().lu().solve(&b).expect("regular");
            let scale = reference.amax();
            for (x, y) in blocked.iter().zip(reference.iter()) {
                assert!((x - y).abs() <= 1e-10 * scale, "n {n}: {x} vs {y}");
            }
            // And the residual itself is at round-off level.
            let residual = (&a * &blocked - &b).amax();
            assert!(
                residual <= 1e-10 * b.amax().max(1.0),
                "n {n}: residual {residual}"
            );
        }
    }

    #[test]
    fn a_matrix_that_needs_pivoting_is_solved() {
        // Zero leading pivot: without row exchanges the elimination would divide by zero.
        let a = DMatrix::from_row_slice(3, 3, &[0.0, 2.0, 1.0, 1.0, 1.0, 0.0, 3.0, 0.0, 1.0]);
        let x = DVector::from_vec(vec![1.0, -2.0, 0.5]);
        let solved = solve(a.clone(), &(&a * &x)).expect("regular");
        assert!((solved - x).amax() < 1e-14);
    }

    /// The bordered system of `a` with the given local columns (the rest dense, ascending).
    fn bordered(a: &DMatrix<f64>, local: &[usize]) -> BorderedSystem {
        let dense = (0..a.ncols()).filter(|c| !local.contains(c)).collect();
        let mut system = BorderedSystem::new(local.to_vec(), dense).expect("a partition");
        for ((i, j), &v) in a
            .iter()
            .enumerate()
            .map(|(k, v)| ((k % a.nrows(), k / a.nrows()), v))
        {
            if v != 0.0 {
                system.add(i, j, v);
            }
        }
        system
    }

    /// A matrix with the Newton system's pattern: `stations` blocks of three rows and columns;
    /// each block reads its own θ (column 3g) and third variable (3g + 2) and those of the
    /// block before; every row reads every m (3g + 1).
    fn station_pattern(stations: usize) -> DMatrix<f64> {
        let n = 3 * stations;
        let full = matrix(n);
        DMatrix::from_fn(n, n, |i, j| {
            let (row_station, column_station) = (i / 3, j / 3);
            let local = j % 3 != 1;
            let near = column_station == row_station || column_station + 1 == row_station;
            if !local || near {
                full[(i, j)] + if i == j { 2.0 } else { 0.0 }
            } else {
                0.0
            }
        })
    }

    #[test]
    fn bordered_system_agrees_with_the_dense_factorisation() {
        // The same system solved with the local columns eliminated sparsely and by nalgebra's
        // LU: the solutions agree to round-off (threshold pivoting allows a growth of 11 per
        // step instead of 2, still far inside 1e-10 relative for these matrices), also when
        // the "local" columns are not sparse at all (correctness does not depend on the
        // pattern, only the cost does).
        for stations in [1, 2, 7, 40] {
            let a = station_pattern(stations);
            let n = a.nrows();
            let b = DVector::from_fn(n, |i, _| (i as f64 * 0.61).cos());
            let reference = a.clone().lu().solve(&b).expect("regular");
            let scale = reference.amax();
            let patterned: Vec<usize> = (0..n).filter(|j| j % 3 != 1).collect();
            let dense_matrix = matrix(n);
            let dense_reference = dense_matrix.clone().lu().solve(&b).expect("regular");
            let cases = [
                (&a, patterned.clone(), &reference, scale),
                (
                    &dense_matrix,
                    patterned,
                    &dense_reference,
                    dense_reference.amax(),
                ),
                (&a, Vec::new(), &reference, scale),
            ];
            for (m, local, expected, scale) in cases {
                let x = bordered(m, &local).solve(&b).expect("regular");
                for (u, v) in x.iter().zip(expected.iter()) {
                    assert!((u - v).abs() <= 1e-10 * scale, "{stations}: {u} vs {v}");
                }
            }
        }
    }

    #[test]
    fn bordered_system_rejects_bad_layouts_and_singular_systems() {
        assert!(
            BorderedSystem::new(vec![0, 1], vec![1]).is_none(),
            "column named twice"
        );
        assert!(
            BorderedSystem::new(vec![0], vec![2]).is_none(),
            "column 1 missing"
        );
        // A zero local column: no pivot.
        let mut a = station_pattern(3);
        a.column_mut(3).fill(0.0);
        let b = DVector::from_element(9, 1.0);
        let local: Vec<usize> = (0..9).filter(|j| j % 3 != 1).collect();
        assert!(bordered(&a, &local).solve(&b).is_none());
        // A singular Schur complement: two equal dense columns.
        let mut a = station_pattern(3);
        let copy = a.column(1).clone_owned();
        a.column_mut(4).copy_from(&copy);
        assert!(bordered(&a, &local).solve(&b).is_none());
        // NaN anywhere.
        let mut a = station_pattern(3);
        a[(5, 0)] = f64::NAN;
        assert!(bordered(&a, &local).solve(&b).is_none());
        // Wrong right-hand-side length.
        let a = station_pattern(3);
        assert!(bordered(&a, &local).solve(&DVector::zeros(8)).is_none());
    }

    #[test]
    fn singular_or_non_finite_systems_give_none() {
        let singular = DMatrix::from_row_slice(2, 2, &[1.0, 2.0, 2.0, 4.0]);
        assert!(solve(singular, &DVector::from_vec(vec![1.0, 1.0])).is_none());
        let nan = DMatrix::from_row_slice(2, 2, &[1.0, f64::NAN, 0.0, 1.0]);
        assert!(solve(nan, &DVector::from_vec(vec![1.0, 1.0])).is_none());
        assert!(solve(DMatrix::identity(2, 2), &DVector::from_vec(vec![1.0])).is_none());
    }
}

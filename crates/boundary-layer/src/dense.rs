//! Dense linear solve of the coupled Newton system: LU factorisation with partial pivoting,
//! blocked so that most of the work is one matrix product per block of columns.
//!
//! The Newton system of a 160-panel section has about 600 unknowns and is dense (every station's
//! edge speed depends on every mass defect). An unblocked elimination streams the whole trailing
//! matrix (about 3 MB) through the cache once per column and was nine tenths of the cost of a
//! point; here each block of [`BLOCK`] columns is factorised on its own, and the trailing matrix
//! is updated by one product (nalgebra's `gemm`), the right-looking blocked LU of Golub & Van Loan
//! (2013), *Matrix Computations*, 4th ed., §3.2.11. Same pivoting, same result to round-off as the
//! unblocked algorithm.
//!
//! Invariant: `None` (never a panic, never a silent wrong answer) when a pivot is exactly zero or
//! the solution is not finite.

use nalgebra::{DMatrix, DVector};

/// Columns per block (our choice: 48 keeps a block panel of a 600-row matrix, 230 kB, in the
/// second-level cache; on the E387 point 32 and 64 were no faster, within the run-to-run
/// scatter of about 20 %).
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

    #[test]
    fn singular_or_non_finite_systems_give_none() {
        let singular = DMatrix::from_row_slice(2, 2, &[1.0, 2.0, 2.0, 4.0]);
        assert!(solve(singular, &DVector::from_vec(vec![1.0, 1.0])).is_none());
        let nan = DMatrix::from_row_slice(2, 2, &[1.0, f64::NAN, 0.0, 1.0]);
        assert!(solve(nan, &DVector::from_vec(vec![1.0, 1.0])).is_none());
        assert!(solve(DMatrix::identity(2, 2), &DVector::from_vec(vec![1.0])).is_none());
    }
}

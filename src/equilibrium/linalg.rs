//! Small dense linear solves for the equilibrium Newton steps (a handful of reactions).
//!
//! Cholesky factorisation of the formed Hessian, Householder QR of its tall factor with a
//! Sherman-Morrison rank-one update, and LU factorisation with partial pivoting as a fallback
//! (Golub & Van Loan, Matrix Computations, 4th ed., sections 4.2, 5.2, 2.1.4 and 3.4). The
//! fallback LU and the rank come from nalgebra (on stack matrices of the exact size for the LU,
//! so no solve allocates); the Cholesky and QR kernels are written out here because they are
//! faster on these sizes, as measured by `cargo bench --bench linalg` (figures beside each).

use nalgebra::{DMatrix, SMatrix, SVector};

/// Solve `a x = b` for a symmetric positive-definite `a` (row-major, `n` x `n`) by Cholesky
/// factorisation in place (closed forms for n = 1 and 2): `a`'s lower triangle is overwritten
/// and `b` holds `x`. Returns false when `a` is not numerically positive definite.
///
/// Written out rather than nalgebra's Cholesky: `cargo bench --bench linalg` (criterion
/// medians, 2-core machine under load) gave 16 ns against 29 ns for 2 x 2, 45 against 63 ns
/// for 3 x 3 and 63 against 91 ns for 4 x 4.
pub fn solve_spd(a: &mut [f64], b: &mut [f64], n: usize) -> bool {
    if n == 1 {
        if a[0] > 0.0 && a[0].is_finite() {
            b[0] /= a[0];
            return true;
        }
        return false;
    }
    if n == 2 {
        let det = a[0] * a[3] - a[1] * a[2];
        // Sylvester's criterion with a margin against cancellation.
        if !(a[0] > 0.0 && det > 1e-10 * a[0] * a[3] && det.is_finite()) {
            return false;
        }
        let x0 = (a[3] * b[0] - a[1] * b[1]) / det;
        let x1 = (a[0] * b[1] - a[2] * b[0]) / det;
        b[0] = x0;
        b[1] = x1;
        return true;
    }
    for j in 0..n {
        let mut d = a[j * n + j];
        for k in 0..j {
            d -= a[j * n + k] * a[j * n + k];
        }
        if !(d > 1e-10 * a[j * n + j].abs()) || !d.is_finite() {
            return false;
        }
        let d = d.sqrt();
        a[j * n + j] = d;
        for i in (j + 1)..n {
            let mut s = a[i * n + j];
            for k in 0..j {
                s -= a[i * n + k] * a[j * n + k];
            }
            a[i * n + j] = s / d;
        }
    }
    for i in 0..n {
        let mut s = b[i];
        for k in 0..i {
            s -= a[i * n + k] * b[k];
        }
        b[i] = s / a[i * n + i];
    }
    for i in (0..n).rev() {
        let mut s = b[i];
        for k in (i + 1)..n {
            s -= a[k * n + i] * b[k];
        }
        b[i] = s / a[i * n + i];
    }
    true
}

/// Solve `a x = b` (row-major `n` x `n`, `n` at most [`MAX_DIM`]) by LU factorisation with
/// partial pivoting (nalgebra, on a stack matrix of size `n`); `b` holds `x` on return. Returns
/// false for a matrix whose pivot falls below 1e-14 of its largest entry (numerically
/// singular), or a solution that is not finite. nalgebra's LU was the faster from 3 x 3 up in
/// `cargo bench --bench linalg` (44 against 52 ns for 3 x 3, 81 against 102 ns for 4 x 4); this
/// is the rarely taken fallback, so one implementation serves every size.
pub fn solve_general(a: &[f64], b: &mut [f64], n: usize) -> bool {
    if n == 0 || n > MAX_DIM || a.len() < n * n || b.len() < n {
        return false;
    }
    let scale = a[..n * n].iter().fold(0.0f64, |m, v| m.max(v.abs()));
    if !(scale > 0.0) || !scale.is_finite() {
        return false;
    }
    macro_rules! fixed_size {
        ($($k:literal)*) => {
            match n {
                $($k => {
                    let lu = SMatrix::<f64, $k, $k>::from_row_slice(&a[..$k * $k]).lu();
                    if lu.u().diagonal().iter().any(|d| !(d.abs() > 1e-14 * scale)) {
                        return false;
                    }
                    let Some(x) = lu.solve(&SVector::<f64, $k>::from_column_slice(&b[..$k]))
                    else {
                        return false;
                    };
                    b[..$k].copy_from_slice(x.as_slice());
                })*
                _ => return false,
            }
        };
    }
    fixed_size!(1 2 3 4 5 6 7 8 9 10 11 12);
    b[..n].iter().all(|v| v.is_finite())
}

/// Most unknowns (reactions in one stage) the small solvers handle.
pub const MAX_DIM: usize = 12;

/// Solve (A^T A - c c^T) x = b for a tall `rows` x `cols` matrix A (column-major, overwritten)
/// without forming A^T A: Householder QR of A gives A^T A = R^T R (the Cholesky factor, computed
/// stably even when A^T A is too ill-conditioned to form), and the Sherman-Morrison formula
/// takes the rank-one term (Golub & Van Loan, 4th ed., sections 5.2 and 2.1.4). On return `b`
/// holds x. Returns false when A is rank deficient or the matrix is not positive definite.
///
/// Written out rather than nalgebra's QR: the rows are the species present (a count known only
/// at run time) and `cargo bench --bench linalg` gave 85 ns against 142 ns for nalgebra's QR of
/// a 6 x 2 stack matrix with the same Sherman-Morrison step.
pub fn solve_gram_minus_rank_one(
    a: &mut [f64],
    rows: usize,
    cols: usize,
    c: &[f64],
    b: &mut [f64],
) -> bool {
    if cols == 0 || cols > MAX_DIM || rows < cols {
        return false;
    }
    // Householder QR in place; R's diagonal kept apart. Rank is judged per column, against the
    // column's own norm (columns may differ by many decades).
    let mut r_diag = [0.0f64; MAX_DIM];
    let mut column_norm = [0.0f64; MAX_DIM];
    for k in 0..cols {
        column_norm[k] = a[k * rows..(k + 1) * rows]
            .iter()
            .map(|v| v * v)
            .sum::<f64>()
            .sqrt();
    }
    for k in 0..cols {
        let col = &mut a[k * rows..(k + 1) * rows];
        let norm = col[k..].iter().map(|v| v * v).sum::<f64>().sqrt();
        if !(norm > 0.0) || !norm.is_finite() {
            return false;
        }
        let alpha = if col[k] > 0.0 { -norm } else { norm };
        // v = x - alpha e1, stored in place of the column; beta = 2 / v^T v.
        col[k] -= alpha;
        let vtv: f64 = col[k..].iter().map(|v| v * v).sum();
        r_diag[k] = alpha;
        if vtv == 0.0 {
            continue;
        }
        for j in (k + 1)..cols {
            let (left, right) = a.split_at_mut(j * rows);
            let v = &left[k * rows + k..k * rows + rows];
            let x = &mut right[k..rows];
            let dot: f64 = v.iter().zip(x.iter()).map(|(p, q)| p * q).sum();
            let f = 2.0 * dot / vtv;
            for (xi, vi) in x.iter_mut().zip(v) {
                *xi -= f * vi;
            }
        }
    }
    if (0..cols).any(|k| !(r_diag[k].abs() > 1e-13 * column_norm[k])) {
        return false;
    }
    // R[i][j] (i < j) = a[j * rows + i]; R[i][i] = r_diag[i].
    let r = |i: usize, j: usize| if i == j { r_diag[i] } else { a[j * rows + i] };
    let solve_normal = |v: &mut [f64]| {
        // R^T w = v (forward), then R y = w (backward).
        for i in 0..cols {
            let mut s = v[i];
            for k in 0..i {
                s -= r(k, i) * v[k];
            }
            v[i] = s / r(i, i);
        }
        for i in (0..cols).rev() {
            let mut s = v[i];
            for k in (i + 1)..cols {
                s -= r(i, k) * v[k];
            }
            v[i] = s / r(i, i);
        }
    };
    solve_normal(b);
    let mut z = [0.0f64; MAX_DIM];
    z[..cols].copy_from_slice(&c[..cols]);
    solve_normal(&mut z[..cols]);
    let c_z: f64 = c[..cols].iter().zip(&z[..cols]).map(|(p, q)| p * q).sum();
    let c_y: f64 = c[..cols].iter().zip(b.iter()).map(|(p, q)| p * q).sum();
    let denominator = 1.0 - c_z;
    if !(denominator > 1e-14) || !denominator.is_finite() {
        return false;
    }
    let f = c_y / denominator;
    for (bi, zi) in b[..cols].iter_mut().zip(&z[..cols]) {
        *bi += f * zi;
    }
    b[..cols].iter().all(|v| v.is_finite())
}

/// Rank of a row-major `rows` x `cols` matrix: the singular values (nalgebra's SVD) above 1e-10
/// of the largest. Used when a stage is built, not in a solve.
pub fn rank(matrix: &[f64], rows: usize, cols: usize) -> usize {
    if rows == 0 || cols == 0 || matrix.len() < rows * cols {
        return 0;
    }
    let m = DMatrix::from_row_slice(rows, cols, &matrix[..rows * cols]);
    if !m.iter().all(|v| v.is_finite()) {
        return 0;
    }
    let singular = m.singular_values();
    let largest = singular.iter().fold(0.0f64, |a, b| a.max(*b));
    if largest == 0.0 {
        return 0;
    }
    singular.iter().filter(|s| **s > 1e-10 * largest).count()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn general_solve_recovers_a_known_solution() {
        // A 3x3 matrix with known solution x = (1, -2, 3).
        let a = [4.0, 1.0, 0.5, 1.0, 3.0, 0.2, 0.5, 0.2, 2.0];
        let x = [1.0, -2.0, 3.0];
        let mut b: Vec<f64> = (0..3)
            .map(|i| (0..3).map(|k| a[i * 3 + k] * x[k]).sum())
            .collect();
        let mut b2 = b.clone();
        assert!(solve_general(&a, &mut b, 3));
        let mut a3 = a;
        assert!(solve_spd(&mut a3, &mut b2, 3));
        for i in 0..3 {
            assert!((b[i] - x[i]).abs() < 1e-12);
            assert!((b2[i] - x[i]).abs() < 1e-12);
        }
        // Closed forms for 1 and 2 unknowns.
        let mut b1 = [3.0];
        assert!(solve_spd(&mut [2.0], &mut b1, 1) && b1[0] == 1.5);
        let mut b2 = [5.0, 5.0];
        assert!(solve_spd(&mut [2.0, 1.0, 1.0, 3.0], &mut b2, 2));
        assert!((b2[0] - 2.0).abs() < 1e-12 && (b2[1] - 1.0).abs() < 1e-12);
        assert!(!solve_spd(&mut [1.0, 2.0, 2.0, 1.0], &mut b2, 2));
    }

    #[test]
    fn gram_minus_rank_one_matches_the_formed_matrix() {
        // A (3 x 2, column-major), c; compare with Gaussian elimination on A^T A - c c^T.
        let a = [1.0, 2.0, 0.5, -1.0, 0.3, 2.0];
        let c = [0.2, -0.1];
        let mut m = [0.0; 4];
        for i in 0..2 {
            for j in 0..2 {
                let dot: f64 = (0..3).map(|k| a[i * 3 + k] * a[j * 3 + k]).sum();
                m[i * 2 + j] = dot - c[i] * c[j];
            }
        }
        let mut b1 = [1.0, -2.0];
        let mut b2 = b1;
        assert!(solve_general(&m, &mut b1, 2));
        let mut a2 = a;
        assert!(solve_gram_minus_rank_one(&mut a2, 3, 2, &c, &mut b2));
        assert!((b1[0] - b2[0]).abs() < 1e-12 && (b1[1] - b2[1]).abs() < 1e-12);
        // Rank deficient A is refused.
        let mut d = [1.0, 2.0, 3.0, 2.0, 4.0, 6.0];
        assert!(!solve_gram_minus_rank_one(
            &mut d,
            3,
            2,
            &[0.0, 0.0],
            &mut [1.0, 1.0]
        ));
    }

    #[test]
    fn indefinite_and_singular_are_reported() {
        let mut b = [1.0, 1.0];
        let s = [1.0, 2.0, 2.0, 4.0];
        assert!(!solve_general(&s, &mut b, 2));
        assert_eq!(rank(&[1.0, 2.0, 2.0, 4.0], 2, 2), 1);
        assert_eq!(rank(&[1.0, 0.0, 0.0, 1.0], 2, 2), 2);
    }
}

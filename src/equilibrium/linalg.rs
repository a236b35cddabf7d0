//! Small dense linear solves for the equilibrium Newton steps (a handful of reactions).
//!
//! Cholesky factorisation for the symmetric positive-definite Hessian of the extent problem,
//! with Gaussian elimination with partial pivoting as a fallback when round-off spoils
//! definiteness (Golub & Van Loan, Matrix Computations, 4th ed., sections 3.2 and 4.2).

/// Solve `a x = b` for a symmetric positive-definite `a` (row-major, `n` x `n`) by Cholesky
/// factorisation in place: `a`'s lower triangle is overwritten with the factor and `b` with `x`.
/// Returns false when `a` is not numerically positive definite (then both are spoiled).
pub fn solve_spd(a: &mut [f64], b: &mut [f64], n: usize) -> bool {
    for j in 0..n {
        let mut d = a[j * n + j];
        for k in 0..j {
            d -= a[j * n + k] * a[j * n + k];
        }
        if d <= 0.0 || !d.is_finite() {
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

/// Solve `a x = b` by Gaussian elimination with partial pivoting; `a` is overwritten and `b`
/// holds `x` on return. Returns false for a (numerically) singular matrix.
pub fn solve_general(a: &mut [f64], b: &mut [f64], n: usize) -> bool {
    let scale = a.iter().fold(0.0f64, |m, v| m.max(v.abs()));
    if !(scale > 0.0) || !scale.is_finite() {
        return false;
    }
    for col in 0..n {
        let mut pivot = col;
        for row in (col + 1)..n {
            if a[row * n + col].abs() > a[pivot * n + col].abs() {
                pivot = row;
            }
        }
        if a[pivot * n + col].abs() <= 1e-14 * scale {
            return false;
        }
        if pivot != col {
            for k in 0..n {
                a.swap(col * n + k, pivot * n + k);
            }
            b.swap(col, pivot);
        }
        for row in (col + 1)..n {
            let f = a[row * n + col] / a[col * n + col];
            if f != 0.0 {
                for k in col..n {
                    a[row * n + k] -= f * a[col * n + k];
                }
                b[row] -= f * b[col];
            }
        }
    }
    for i in (0..n).rev() {
        let mut s = b[i];
        for k in (i + 1)..n {
            s -= a[i * n + k] * b[k];
        }
        b[i] = s / a[i * n + i];
    }
    true
}

/// Largest system the stack-allocated Cholesky handles (reactions in one stage).
pub const MAX_DIM: usize = 12;

/// Rank of a row-major `rows` x `cols` matrix by elimination with a relative tolerance.
pub fn rank(matrix: &[f64], rows: usize, cols: usize) -> usize {
    let mut a = matrix.to_vec();
    let scale = a.iter().fold(0.0f64, |m, v| m.max(v.abs()));
    if scale == 0.0 {
        return 0;
    }
    let mut rank = 0;
    for col in 0..cols {
        if rank == rows {
            break;
        }
        let mut pivot = rank;
        for row in (rank + 1)..rows {
            if a[row * cols + col].abs() > a[pivot * cols + col].abs() {
                pivot = row;
            }
        }
        if a[pivot * cols + col].abs() <= 1e-10 * scale {
            continue;
        }
        for k in 0..cols {
            a.swap(rank * cols + k, pivot * cols + k);
        }
        for row in (rank + 1)..rows {
            let f = a[row * cols + col] / a[rank * cols + col];
            for k in col..cols {
                a[row * cols + k] -= f * a[rank * cols + k];
            }
        }
        rank += 1;
    }
    rank
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn spd_and_general_agree() {
        // A 3x3 SPD matrix with known solution x = (1, -2, 3).
        let a = [4.0, 1.0, 0.5, 1.0, 3.0, 0.2, 0.5, 0.2, 2.0];
        let x = [1.0, -2.0, 3.0];
        let mut b: Vec<f64> = (0..3)
            .map(|i| (0..3).map(|k| a[i * 3 + k] * x[k]).sum())
            .collect();
        let mut b2 = b.clone();
        let mut a1 = a;
        assert!(solve_spd(&mut a1, &mut b, 3));
        let mut a2 = a;
        assert!(solve_general(&mut a2, &mut b2, 3));
        for i in 0..3 {
            assert!((b[i] - x[i]).abs() < 1e-12);
            assert!((b2[i] - x[i]).abs() < 1e-12);
        }
    }

    #[test]
    fn indefinite_and_singular_are_reported() {
        let mut a = [1.0, 2.0, 2.0, 1.0];
        let mut b = [1.0, 1.0];
        assert!(!solve_spd(&mut a, &mut b, 2));
        let mut s = [1.0, 2.0, 2.0, 4.0];
        assert!(!solve_general(&mut s, &mut b, 2));
        assert_eq!(rank(&[1.0, 2.0, 2.0, 4.0], 2, 2), 1);
        assert_eq!(rank(&[1.0, 0.0, 0.0, 1.0], 2, 2), 2);
    }
}

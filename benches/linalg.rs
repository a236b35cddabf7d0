//! The small dense solves of the extent Newton steps against the same solves by nalgebra on
//! stack matrices of the same fixed size: which to keep is decided by these numbers (cited beside
//! the hand-written kernels in `src/equilibrium/linalg.rs`). The matrices are Hessians of the
//! shape the stages meet: one reaction, reforming + shift, four reactions; and the tall factor
//! of a two-reaction Hessian over six species.

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use nalgebra::{SMatrix, SVector};
use syntrain::equilibrium::linalg;

/// A symmetric positive-definite n x n matrix (row-major) with a known structure.
fn spd<const N: usize>() -> [[f64; N]; N] {
    let mut a = [[0.0; N]; N];
    for (i, row) in a.iter_mut().enumerate() {
        for (j, v) in row.iter_mut().enumerate() {
            *v = 1.0 / (1.0 + (i as f64 - j as f64).abs()) + if i == j { N as f64 } else { 0.0 };
        }
    }
    a
}

fn flat<const N: usize>(a: &[[f64; N]; N]) -> Vec<f64> {
    a.iter().flat_map(|r| r.iter().copied()).collect()
}

macro_rules! spd_case {
    ($c:expr, $n:literal) => {{
        const N: usize = $n;
        let c: &mut Criterion = $c;
        let a = spd::<N>();
        let a_flat = flat(&a);
        let b: Vec<f64> = (0..N).map(|i| 1.0 + i as f64).collect();
        c.bench_function(&format!("spd {N}x{N}, hand-written"), |bench| {
            bench.iter(|| {
                let mut m = [0.0; 16];
                m[..N * N].copy_from_slice(&a_flat);
                let mut x = [0.0; 4];
                x[..N].copy_from_slice(&b);
                let ok = linalg::solve_spd(&mut m[..N * N], &mut x[..N], black_box(N));
                (ok, x)
            })
        });
        let m = SMatrix::<f64, N, N>::from_fn(|i, j| a[i][j]);
        let v = SVector::<f64, N>::from_fn(|i, _| b[i]);
        c.bench_function(&format!("spd {N}x{N}, nalgebra Cholesky"), |bench| {
            bench.iter(|| black_box(m).cholesky().map(|ch| ch.solve(&black_box(v))))
        });
        c.bench_function(
            &format!("general {N}x{N}, nalgebra LU via linalg"),
            |bench| {
                bench.iter(|| {
                    let mut m = [0.0; 16];
                    m[..N * N].copy_from_slice(&a_flat);
                    let mut x = [0.0; 4];
                    x[..N].copy_from_slice(&b);
                    let ok = linalg::solve_general(&m[..N * N], &mut x[..N], black_box(N));
                    (ok, x)
                })
            },
        );
        c.bench_function(&format!("general {N}x{N}, nalgebra LU"), |bench| {
            bench.iter(|| black_box(m).lu().solve(&black_box(v)))
        });
    }};
}

fn gram(c: &mut Criterion) {
    // A (6 x 2, column-major): reforming and shift rows scaled by 1/sqrt(n_i); c = dnu/sqrt(n_T).
    let amounts: [f64; 6] = [0.02, 0.3, 0.15, 0.05, 0.45, 1e-9];
    let rows = [
        [-1.0, -1.0, 1.0, 0.0, 3.0, 0.0],
        [0.0, -1.0, -1.0, 1.0, 1.0, 0.0],
    ];
    let mut a = [0.0; 12];
    for k in 0..2 {
        for i in 0..6 {
            a[k * 6 + i] = rows[k][i] / amounts[i].sqrt();
        }
    }
    let total: f64 = amounts.iter().sum();
    let cv = [2.0 / total.sqrt(), 0.0];
    let b = [1.0, -0.5];
    c.bench_function("gram 6x2 minus rank one, hand-written QR", |bench| {
        bench.iter(|| {
            let mut m = black_box(a);
            let mut x = b;
            let ok = linalg::solve_gram_minus_rank_one(&mut m, 6, 2, &cv, &mut x);
            (ok, x)
        })
    });
    let m = SMatrix::<f64, 6, 2>::from_column_slice(&a);
    let cvec = SVector::<f64, 2>::from_column_slice(&cv);
    let bvec = SVector::<f64, 2>::from_column_slice(&b);
    c.bench_function("gram 6x2 minus rank one, nalgebra QR", |bench| {
        bench.iter(|| {
            // A^T A = R^T R; (R^T R - c c^T)^-1 b by Sherman-Morrison.
            let r = black_box(m).qr().r();
            let solve = |v: &SVector<f64, 2>| {
                let w = r.tr_solve_upper_triangular(v)?;
                r.solve_upper_triangular(&w)
            };
            let y = solve(&bvec)?;
            let z = solve(&cvec)?;
            let f = cvec.dot(&y) / (1.0 - cvec.dot(&z));
            Some(y + z * f)
        })
    });
}

fn benches(c: &mut Criterion) {
    spd_case!(c, 1);
    spd_case!(c, 2);
    spd_case!(c, 3);
    spd_case!(c, 4);
    gram(c);
}

criterion_group!(small_solves, benches);
criterion_main!(small_solves);

//! Tests of the extent solver against worked examples and invariants.

use super::*;

/// Species order used below: CH4, H2O, CO, H2, CO2.
fn reforming_and_shift() -> ExtentSystem {
    ExtentSystem::new(
        5,
        &[
            vec![-1.0, -1.0, 1.0, 3.0, 0.0],
            vec![0.0, -1.0, -1.0, 1.0, 1.0],
        ],
    )
    .unwrap()
}

/// Species order: CO, H2O, CO2, H2.
fn shift_only() -> ExtentSystem {
    ExtentSystem::new(4, &[vec![-1.0, -1.0, 1.0, 1.0]]).unwrap()
}

fn fractions(n: &[f64], inert: f64) -> Vec<f64> {
    let t: f64 = n.iter().sum::<f64>() + inert;
    n.iter().map(|v| v / t).collect()
}

#[test]
fn shift_with_unit_k_reacts_half_the_steam_at_any_pressure_or_inert() {
    // Smith, Van Ness & Abbott, Introduction to Chemical Engineering Thermodynamics, 7th ed.,
    // Example 13.5: K = 1, 1 mol CO + 1 mol H2O -> half the steam reacted, independent of P and
    // of inerts (no mole change).
    let s = shift_only();
    for (ln_p, inert) in [(0.0, 0.0), (3.0, 0.0), (0.0, 5.0), (-2.0, 1.0)] {
        let sol = s
            .solve(&[1.0, 1.0, 0.0, 0.0], inert, &[0.0], ln_p, None)
            .unwrap();
        assert!(sol.converged());
        assert!((sol.extents[0] - 0.5).abs() < 1e-12, "{:?}", sol.extents);
    }
    // Same example: 2 H2O : 1 CO -> 2/3 of the CO (1/3 of the steam); 1 H2O : 2 CO -> 2/3 of
    // the steam.
    let sol = s
        .solve(&[1.0, 2.0, 0.0, 0.0], 0.0, &[0.0], 0.0, None)
        .unwrap();
    assert!((sol.extents[0] - 2.0 / 3.0).abs() < 1e-12);
    let sol = s
        .solve(&[2.0, 1.0, 0.0, 0.0], 0.0, &[0.0], 0.0, None)
        .unwrap();
    assert!((sol.extents[0] - 2.0 / 3.0).abs() < 1e-12);
}

#[test]
fn simultaneous_reforming_and_shift_worked_example_from_book_data() {
    // Smith, Van Ness & Abbott, 7th ed., Example 13.14: 2 mol CH4 + 3 mol H2O at 1000 K, 1 bar,
    // with the book's dfG(1000 K) (J/mol): CH4 19 720, H2O -192 420, CO -200 240, CO2 -395 790
    // (values from memory). Book result y(CH4, H2O, CO, H2, CO2) =
    // 0.0196, 0.0980, 0.1743, 0.6710, 0.0371.
    let r = 8.314; // J/(mol K), as the book uses
    let dg_reforming = -200_240.0 - 19_720.0 + 192_420.0;
    let dg_shift = -395_790.0 + 200_240.0 + 192_420.0;
    let ln_k = [-dg_reforming / (r * 1000.0), -dg_shift / (r * 1000.0)];
    let s = reforming_and_shift();
    let sol = s
        .solve(&[2.0, 3.0, 0.0, 0.0, 0.0], 0.0, &ln_k, 0.0, None)
        .unwrap();
    assert!(sol.converged() && sol.max_residual() < 1e-9);
    let y = fractions(&sol.amounts, 0.0);
    let book = [0.0196, 0.0980, 0.1743, 0.6710, 0.0371];
    for (got, want) in y.iter().zip(book) {
        assert!((got - want).abs() < 5e-4, "y = {y:?}, book {book:?}");
    }
}

#[test]
fn limiting_reactant_driven_to_1e_minus_15_keeps_precision() {
    // Shift with a very large K: CO is driven to ~1e-15 of the total. Reference: the closed form
    // of K = (1 - e)^2 / (e (9 + e)) for 1 CO + 10 H2O with e the CO left, solved by fixed point
    // in double precision (common practice).
    let k: f64 = 1.0e13;
    let mut e: f64 = 1.0 / (9.0 * k);
    for _ in 0..20 {
        e = (1.0 - e).powi(2) / (k * (9.0 + e));
    }
    let s = shift_only();
    let sol = s
        .solve(&[1.0, 10.0, 0.0, 0.0], 0.0, &[k.ln()], 0.0, None)
        .unwrap();
    assert!(sol.converged());
    let co = sol.amounts[0];
    assert!(((co - e) / e).abs() < 1e-9, "CO {co:e} vs {e:e}");
    assert!(co / 11.0 < 2e-15);
    // Element balance (C, H, O) to 1e-12 relative.
    let c = sol.amounts[0] + sol.amounts[2];
    let o = sol.amounts[0] + sol.amounts[1] + 2.0 * sol.amounts[2];
    let h = 2.0 * sol.amounts[1] + 2.0 * sol.amounts[3];
    assert!((c - 1.0).abs() < 1e-12 && (o - 11.0).abs() < 11e-12 && (h - 20.0).abs() < 20e-12);
}

#[test]
fn reverse_running_and_frozen_reactions() {
    let s = shift_only();
    // CO2 + H2 only: the shift runs backward (K = 1: symmetric, half converted).
    let sol = s
        .solve(&[0.0, 0.0, 1.0, 1.0], 0.0, &[0.0], 0.0, None)
        .unwrap();
    assert!(sol.converged());
    assert!((sol.extents[0] + 0.5).abs() < 1e-12);
    // CO + H2 only: nothing can react (no steam, no CO2); frozen, zero extent.
    let sol = s
        .solve(&[1.0, 0.0, 0.0, 1.0], 0.0, &[0.0], 0.0, None)
        .unwrap();
    assert!(sol.frozen[0] && sol.extents[0] == 0.0 && sol.converged());
}

#[test]
fn scale_invariance_over_twelve_decades() {
    // Scaling every inlet amount scales every outlet amount (common practice: equilibrium is
    // intensive). Compared at 1e-6 ... 1e6.
    let s = reforming_and_shift();
    let ln_k = [2.0, 0.5];
    let base = s
        .solve(&[1.0, 3.0, 0.0, 0.1, 0.05], 0.2, &ln_k, 3.0, None)
        .unwrap();
    for scale in [1e-6, 1e-3, 1.0, 1e3, 1e6] {
        let inlet: Vec<f64> = [1.0, 3.0, 0.0, 0.1, 0.05]
            .iter()
            .map(|v| v * scale)
            .collect();
        let sol = s.solve(&inlet, 0.2 * scale, &ln_k, 3.0, None).unwrap();
        for (a, b) in sol.amounts.iter().zip(&base.amounts) {
            assert!(
                (a / scale - b).abs() <= 1e-12 * b.abs().max(1e-300),
                "{a} {b}"
            );
        }
    }
}

#[test]
fn warm_start_converges_in_few_steps_and_bad_input_is_refused() {
    let s = reforming_and_shift();
    let ln_k = [1.0, 0.3];
    let cold = s
        .solve(&[1.0, 3.0, 0.0, 0.0, 0.0], 0.0, &ln_k, 2.0, None)
        .unwrap();
    let warm = s
        .solve(
            &[1.0, 3.0, 0.0, 0.0, 0.0],
            0.0,
            &[1.01, 0.3],
            2.0,
            Some(&cold.extents),
        )
        .unwrap();
    assert!(
        warm.converged() && warm.iterations <= 4,
        "{}",
        warm.iterations
    );
    assert!(s
        .solve(&[-1.0, 3.0, 0.0, 0.0, 0.0], 0.0, &ln_k, 0.0, None)
        .is_err());
    assert!(s.solve(&[0.0; 5], 0.0, &ln_k, 0.0, None).is_err());
    assert!(s
        .solve(&[1.0, 3.0, 0.0, 0.0, 0.0], 0.0, &[f64::NAN, 0.0], 0.0, None)
        .is_err());
    // Dependent reactions are refused when the system is built.
    assert!(ExtentSystem::new(2, &[vec![1.0, -1.0], vec![-2.0, 2.0]]).is_err());
}

/// A small deterministic generator for the stress tests (Knuth's MMIX LCG constants).
struct Lcg(u64);

impl Lcg {
    fn next(&mut self) -> f64 {
        self.0 = self
            .0
            .wrapping_mul(6_364_136_223_846_793_005)
            .wrapping_add(1_442_695_040_888_963_407);
        (self.0 >> 11) as f64 / (1u64 << 53) as f64
    }
}

#[test]
fn every_random_case_converges_with_balanced_elements() {
    // Invariant (convexity gives one root, so a sound solver always finds it): 20000 random
    // feeds over six decades, some species absent, ln K from -30 to 30 (species down to 1e-40 of
    // the total), P/P0 from 1e-2 to 1e3, with inerts. (Beyond ln K 40, a few cases in 1e5 with
    // species near 1e-90 of the total are reported as not converged, never as an answer.)
    let s = reforming_and_shift();
    let mut rng = Lcg(12345);
    for case in 0..20000 {
        let mut inlet = [0.0; 5];
        for v in inlet.iter_mut() {
            let r = rng.next();
            *v = if r < 0.3 {
                0.0
            } else {
                10f64.powf(-6.0 + 7.0 * rng.next())
            };
        }
        if inlet.iter().all(|v| *v == 0.0) {
            inlet[0] = 1.0;
        }
        let ln_k = [-30.0 + 60.0 * rng.next(), -30.0 + 60.0 * rng.next()];
        let ln_p = (10f64.powf(-2.0 + 5.0 * rng.next())).ln();
        let inert = if rng.next() < 0.5 { 0.0 } else { rng.next() };
        let sol = s.solve(&inlet, inert, &ln_k, ln_p, None).unwrap();
        assert!(
            sol.converged(),
            "case {case}: {inlet:?} lnK {ln_k:?} lnp {ln_p}: {sol:?}"
        );
        let n = &sol.amounts;
        // The equilibrium conditions recomputed from the amounts (not the solver's residuals),
        // for every reaction whose species are all present.
        let total: f64 = n.iter().sum::<f64>() + inert;
        for j in 0..2 {
            if (0..5).all(|i| s.nu(j, i) == 0.0 || n[i] > 0.0) && !sol.frozen[j] {
                let ln_q: f64 = (0..5)
                    .filter(|&i| s.nu(j, i) != 0.0)
                    .map(|i| s.nu(j, i) * ((n[i] / total).ln() + ln_p))
                    .sum();
                assert!((ln_q - ln_k[j]).abs() < 1e-9, "case {case}: reaction {j}");
            }
        }
        // C, H, O of CH4, H2O, CO, H2, CO2 conserved to 1e-12 relative.
        let c = |a: &[f64]| a[0] + a[2] + a[4];
        let h = |a: &[f64]| 4.0 * a[0] + 2.0 * a[1] + 2.0 * a[3];
        let o = |a: &[f64]| a[1] + a[2] + 2.0 * a[4];
        for f in [c, h, o] {
            let (x, y) = (f(&inlet), f(n));
            assert!((x - y).abs() <= 1e-12 * x.max(y).max(1e-300), "case {case}");
        }
        assert!(n.iter().all(|v| *v >= 0.0));
    }
}

#[test]
fn a_sensitivity_that_cannot_be_solved_is_reported() {
    // d xi / d lnK = H^-1: for shift at K = 1 from 1 CO + 1 H2O (Smith, Van Ness & Abbott,
    // 7th ed., Example 13.5: half converted), H = sum nu^2 / n = 4 / 0.5 = 8, so d xi / d lnK
    // = 1/8. With no amount left H is zero (singular): reported, not silently zeros.
    let s = shift_only();
    let sol = s
        .solve(&[1.0, 1.0, 0.0, 0.0], 0.0, &[0.0], 0.0, None)
        .unwrap();
    let mut out = [f64::NAN];
    assert!(s.sensitivity(&sol, 0.0, &[1.0], &mut out, &mut ExtentWork::default()));
    assert!((out[0] - 0.125).abs() < 1e-12, "{out:?}");
    let mut broken = sol.clone();
    broken.amounts = vec![0.0; 4];
    let mut out = [f64::NAN];
    assert!(!s.sensitivity(&broken, 0.0, &[1.0], &mut out, &mut ExtentWork::default()));
    assert_eq!(out[0], 0.0);
    // Mismatched lengths are refused, not indexed.
    assert!(!s.sensitivity(&sol, 0.0, &[], &mut [0.0], &mut ExtentWork::default()));
}

/// The same system without its stack kernel: every solve takes the general loop.
fn general_only(s: &ExtentSystem) -> ExtentSystem {
    let mut g = s.clone();
    g.small = None;
    g
}

/// Solve with and without the stack kernel; both converged, and the amounts equal within
/// `rel` (relative to the larger, floor 1e-300).
fn kernel_agrees(s: &ExtentSystem, inlet: &[f64], inert: f64, ln_k: &[f64], ln_p: f64, rel: f64) {
    let fast = s.solve(inlet, inert, ln_k, ln_p, None).unwrap();
    let slow = general_only(s)
        .solve(inlet, inert, ln_k, ln_p, None)
        .unwrap();
    assert!(fast.converged() && slow.converged(), "{fast:?} {slow:?}");
    for (a, b) in fast.amounts.iter().zip(&slow.amounts) {
        assert!(
            (a - b).abs() <= rel * a.abs().max(b.abs()).max(1e-300),
            "{:?} against {:?}",
            fast.amounts,
            slow.amounts
        );
    }
}

#[test]
fn the_stack_kernel_takes_the_common_sizes_only() {
    assert!(reforming_and_shift().small.is_some());
    assert!(shift_only().small.is_some());
    // Three species, or three reactions: the general loop alone.
    assert!(ExtentSystem::new(3, &[vec![-2.0, 1.0, 1.0]])
        .unwrap()
        .small
        .is_none());
    let three = ExtentSystem::new(
        6,
        &[
            vec![-1.0, -1.0, 1.0, 3.0, 0.0, 0.0],
            vec![0.0, -1.0, -1.0, 1.0, 1.0, 0.0],
            vec![-1.0, 0.0, 0.0, 2.0, 0.0, 1.0],
        ],
    )
    .unwrap();
    assert!(three.small.is_none());
}

#[test]
fn the_stack_kernel_meets_the_general_loop() {
    // The same convex problem (Smith & Missen, ch. 4) has one root: the kernel and the general
    // loop must find it to round-off, at reformer, shift and methanator conditions (ln K of
    // reforming 5.5 and shift -0.2 near 1140 K; shift 3.2 near 620 K; reforming -20 near 560 K,
    // from memory) and at extreme ones.
    let rs = reforming_and_shift();
    for (inlet, inert, ln_k, ln_p) in [
        ([0.27, 0.82, 0.0, 0.01, 0.002], 0.004, [5.5, -0.2], 3.3),
        ([0.27, 0.82, 0.0, 0.01, 0.002], 0.004, [-3.0, 1.5], 0.0),
        ([1e-6, 0.3, 0.004, 0.7, 0.002], 0.2, [-20.0, 7.0], 3.3),
        ([0.5, 0.5, 0.0, 0.0, 0.0], 0.0, [30.0, -5.0], 5.0),
        ([0.1, 2.0, 0.3, 0.5, 0.2], 1.0, [0.0, 0.0], -3.0),
    ] {
        kernel_agrees(&rs, &inlet, inert, &ln_k, ln_p, 1e-10);
    }
    let shift = shift_only();
    for (inlet, ln_k) in [
        ([0.09, 0.34, 0.056, 0.48], 3.2),
        ([0.09, 0.34, 0.056, 0.48], -2.0),
        ([1.0, 1.0, 0.0, 0.0], 0.0),
        ([0.001, 0.4, 0.1, 0.5], 12.0),
    ] {
        kernel_agrees(&shift, &inlet, 0.03, &[ln_k], 2.0, 1e-10);
    }
}

#[test]
fn the_stack_kernel_sums_logarithms_where_a_product_would_leave_the_range() {
    // Half coefficients (no whole powers) and amounts near 1e-200 (a product of four of them
    // underflows): the kernel sums logarithms one by one and still meets the general loop.
    let half =
        ExtentSystem::new(4, &[vec![-1.0, -0.5, 1.0, 2.0], vec![0.0, -1.0, -1.0, 1.0]]).unwrap();
    assert!(half.small.is_some());
    kernel_agrees(&half, &[0.4, 0.3, 0.01, 0.02], 0.1, &[2.0, 0.5], 1.0, 1e-10);
    let rs = reforming_and_shift();
    kernel_agrees(
        &rs,
        &[0.3, 0.6, 1e-200, 1e-200, 0.05],
        0.0,
        &[-400.0, 1.0],
        0.0,
        1e-9,
    );
}

#[test]
fn the_stack_kernel_gives_up_to_the_general_loop_where_it_must() {
    // Amounts spanning more than eight decades take the general loop's QR path: a methane slip
    // of 1e-12 of the total (a deep methanator) is still solved, and to the same answer.
    let rs = reforming_and_shift();
    kernel_agrees(
        &rs,
        &[1e-12, 0.3, 1e-3, 0.7, 1e-3],
        0.0,
        &[-30.0, 8.0],
        3.0,
        1e-9,
    );
}

#[test]
fn a_warm_start_takes_the_chebyshev_step_and_one_iteration_fewer() {
    // From the answer at reformer ln K (5.5, -0.2) to the answer 5 K hotter (ln K of reforming
    // up by about 0.1, of shift down by about 0.03: van 't Hoff with 225 and -33 kJ/mol at
    // 1140 K, from memory): the stack kernel's Chebyshev steps (third order) need fewer
    // iterations than the general loop's Newton steps, and land on the same answer.
    let rs = reforming_and_shift();
    let inlet = [0.27, 0.82, 0.0, 0.01, 0.002];
    let before = rs.solve(&inlet, 0.004, &[5.5, -0.2], 3.3, None).unwrap();
    let after = [5.6, -0.23];
    let fast = rs
        .solve(&inlet, 0.004, &after, 3.3, Some(&before.extents))
        .unwrap();
    let slow = general_only(&rs)
        .solve(&inlet, 0.004, &after, 3.3, Some(&before.extents))
        .unwrap();
    assert!(fast.converged() && slow.converged());
    for (a, b) in fast.amounts.iter().zip(&slow.amounts) {
        assert!((a - b).abs() <= 1e-12 * a.max(*b), "{fast:?} {slow:?}");
    }
    assert!(
        fast.iterations < slow.iterations,
        "{} against {}",
        fast.iterations,
        slow.iterations
    );
    // A lone shift likewise (ln K 3.2 to 3.0).
    let shift = shift_only();
    let inlet = [0.09, 0.34, 0.056, 0.48];
    let before = shift.solve(&inlet, 0.03, &[3.2], 2.0, None).unwrap();
    let fast = shift
        .solve(&inlet, 0.03, &[3.0], 2.0, Some(&before.extents))
        .unwrap();
    let slow = general_only(&shift)
        .solve(&inlet, 0.03, &[3.0], 2.0, Some(&before.extents))
        .unwrap();
    assert!((fast.extents[0] - slow.extents[0]).abs() <= 1e-12 * slow.extents[0].abs());
    assert!(
        fast.iterations < slow.iterations,
        "{} against {}",
        fast.iterations,
        slow.iterations
    );
}

#[test]
fn a_warm_start_the_kernel_cannot_take_goes_to_the_general_loop() {
    let rs = reforming_and_shift();
    let inlet = [0.27, 0.82, 0.0, 0.01, 0.002];
    let cold = rs.solve(&inlet, 0.004, &[5.5, -0.2], 3.3, None).unwrap();
    // A start that would drive methane below zero: refused as a start, same answer.
    let warm = rs
        .solve(&inlet, 0.004, &[5.5, -0.2], 3.3, Some(&[0.5, 0.0]))
        .unwrap();
    assert!(warm.converged());
    for (a, b) in warm.amounts.iter().zip(&cold.amounts) {
        assert!((a - b).abs() <= 1e-12 * a.max(*b));
    }
    assert_eq!(warm.frozen, vec![false, false]);
    assert_eq!(warm.residuals.len(), 2);
    // A methanator-like start whose methane is 1e-12 of the total: amounts over more than
    // eight decades, which the kernel leaves to the general loop's QR path; the answer is the
    // general loop's.
    let inlet = [1e-12, 0.3, 1e-3, 0.7, 1e-3];
    let ln_k = [-30.0, 8.0];
    let first = rs.solve(&inlet, 0.0, &ln_k, 3.0, None).unwrap();
    let warm = rs
        .solve(&inlet, 0.0, &[-30.2, 8.1], 3.0, Some(&first.extents))
        .unwrap();
    let slow = general_only(&rs)
        .solve(&inlet, 0.0, &[-30.2, 8.1], 3.0, Some(&first.extents))
        .unwrap();
    assert!(warm.converged() && slow.converged());
    for (a, b) in warm.amounts.iter().zip(&slow.amounts) {
        assert!((a - b).abs() <= 1e-9 * a.max(*b), "{warm:?} {slow:?}");
    }
}

#[test]
fn the_kernel_sensitivity_is_the_general_one() {
    // d xi / d lnK = H^-1 rhs: the kernel's closed form and the general basis's factorisation
    // of the same Hessian agree, for two reactions and for one.
    let rs = reforming_and_shift();
    let sol = rs
        .solve(
            &[0.27, 0.82, 0.0, 0.01, 0.002],
            0.004,
            &[5.5, -0.2],
            3.3,
            None,
        )
        .unwrap();
    let rhs = [0.0209, -0.0031];
    let (mut fast, mut slow) = ([0.0; 2], [0.0; 2]);
    assert!(rs.sensitivity(&sol, 0.004, &rhs, &mut fast, &mut ExtentWork::default()));
    assert!(general_only(&rs).sensitivity(
        &sol,
        0.004,
        &rhs,
        &mut slow,
        &mut ExtentWork::default()
    ));
    for (a, b) in fast.iter().zip(&slow) {
        assert!((a - b).abs() <= 1e-12 * b.abs(), "{fast:?} {slow:?}");
    }
    // One reaction: 1 CO + 1 H2O at K = 1 (Smith, Van Ness & Abbott, 7th ed., Example 13.5),
    // H = sum nu^2 / n = 4 / 0.5 = 8.
    let s = shift_only();
    let sol = s
        .solve(&[1.0, 1.0, 0.0, 0.0], 0.0, &[0.0], 0.0, None)
        .unwrap();
    let mut out = [0.0];
    assert!(s.sensitivity(&sol, 0.0, &[1.0], &mut out, &mut ExtentWork::default()));
    assert!((out[0] - 0.125).abs() < 1e-12, "{out:?}");
}

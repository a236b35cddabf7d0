//! The Newton iteration of [`super::extents`] for the common small stages, on the stack: one or
//! two working reactions (a shift converter; reforming with shift; a methanator) over
//! six species or fewer, every one of them present and changed by a working
//! reaction. The species count is a constant of each instance, so every loop is unrolled.
//!
//! It takes the steps of the general loop in `extents.rs` (the same Hessian, closed-form 2 x 2
//! solve, fraction-to-boundary rule and backtracking on |g|^2) without its slices, iterator
//! chains and calls, with one logarithm a reaction in the gradient instead of one a species
//! ([`SmallSystem::gradient`]), and near the answer with Chebyshev's third-order correction of
//! the Newton step ([`SmallSystem::chebyshev`]), so that a warm start needs an iteration fewer.
//! It stops at the first iteration that would need the general machinery (amounts spanning
//! eight decades or more, which take the QR path; a Hessian that is not positive definite; a
//! failed line search, which rebuilds the basis), leaving that iteration undone, and the general
//! loop carries on from the same state.
//!
//! Hand-written on purpose (callgrind instructions a solve, `examples/profile_stage.rs`, the
//! general loop alone -> with this kernel and the stage's own savings of the same change: one
//! division in the NASA polynomials, the outlet enthalpy from the last equilibrium's H/RT):
//! reforming + shift warm-started from a 5 K neighbour 9 530 -> 5 540; the same from cold
//! 12 650 -> 8 410; adiabatic shift 28 700 -> 11 400. Criterion medians, one run alternated
//! with the general loop's release: 0.72-0.77 -> 0.42-0.51 us, 1.02-1.07 -> 0.67-0.71 us and
//! 2.03-2.21 -> 0.81 us (DEVELOPERS.md, Tests and benchmarks).

/// The working reactions of one solve, copied onto the stack.
#[derive(Debug, Clone)]
pub struct SmallSystem<const M: usize, const N: usize> {
    /// Coefficients of each working reaction over the species.
    nu: [[f64; N]; M],
    /// Gas mole change of each working reaction.
    dnu: [f64; M],
    /// The coefficients as powers of the numerator and the denominator, when every one is a
    /// whole number of magnitude at most [`MAX_POWER`].
    powers: Option<Powers<M, N>>,
    /// For one reaction of two reactants and two products, each with coefficient one, and no
    /// mole change (the shift): the reactants' and the products' indices. Its equilibrium is
    /// then found in closed form ([`SmallSystem::pair_extent`]) and Newton's steps only polish.
    pair: Option<[usize; 4]>,
}

/// What changes from solve to solve: ln K of each working reaction, the amount of gas species
/// in no reaction, and ln(P / P0).
#[derive(Debug, Clone, Copy)]
pub struct Conditions<const M: usize> {
    /// ln K of each working reaction.
    pub ln_k: [f64; M],
    /// Amount of gas species in no reaction.
    pub inert: f64,
    /// ln(P / P0).
    pub ln_p: f64,
}

/// The whole coefficients of the working reactions split by side: products' in the numerator,
/// reactants' in the denominator.
#[derive(Debug, Clone)]
struct Powers<const M: usize, const N: usize> {
    numerator: [[u8; N]; M],
    denominator: [[u8; N]; M],
    /// The power of the total amount: -dnu_k on its side (ln y_i = ln n_i - ln n_T).
    total_numerator: [u8; M],
    total_denominator: [u8; M],
}

/// The Hessian of a Newton step, kept for a second right-hand side: H_00, H_01 and H_11 (one
/// reaction: H_00 alone), the reciprocal of its determinant (of H_00), and of the total.
struct Hessian {
    h: [f64; 3],
    inv_det: f64,
    /// 1 / n_T at the point it was taken.
    inv_total: f64,
}

impl Hessian {
    /// H^-1 b by the closed form.
    #[inline(always)]
    fn solve<const M: usize>(&self, b: [f64; M]) -> [f64; M] {
        let mut x = [0.0f64; M];
        if M == 1 {
            x[0] = b[0] * self.inv_det;
        } else {
            let [a0, a1, a3] = self.h;
            x[0] = (a3 * b[0] - a1 * b[1]) * self.inv_det;
            x[1] = (a0 * b[1] - a1 * b[0]) * self.inv_det;
        }
        x
    }
}

/// Largest relative change of any amount under a Newton step at which the Chebyshev
/// correction is tried (a warm start; farther out Newton's own steps are the safer).
const CHEBYSHEV_REACH: f64 = 0.25;

/// Largest coefficient magnitude taken as repeated products in the gradient.
const MAX_POWER: f64 = 4.0;

/// Where the iteration stands; the general loop's variables of the same names.
pub struct SmallState<'a> {
    /// Amounts (every one positive).
    pub n: &'a mut [f64],
    /// Gradient at `n` (written by the kernel).
    pub g: &'a mut [f64],
    /// Working extents taken so far.
    pub w: &'a mut [f64],
    /// |g|^2 at `n` (written by the kernel).
    pub merit: f64,
    /// Newton iterations taken.
    pub iterations: usize,
}

/// Fraction of the distance to the boundary a step may take (as in the general loop).
const FRACTION_TO_BOUNDARY: f64 = super::basis::FRACTION_TO_BOUNDARY;

impl<const M: usize, const N: usize> SmallSystem<M, N> {
    /// A system of the given rows (coefficients over the species, and gas mole changes) whose
    /// sums of logarithms are taken as the logarithm of one product where the coefficients
    /// allow it (see [`SmallSystem::gradient`]).
    pub fn new(nu: [[f64; N]; M], dnu: [f64; M]) -> SmallSystem<M, N> {
        let mut powers = Powers {
            numerator: [[0; N]; M],
            denominator: [[0; N]; M],
            total_numerator: [0; M],
            total_denominator: [0; M],
        };
        let mut whole = true;
        for k in 0..M {
            let e = dnu[k] as i8;
            whole &= f64::from(e) == dnu[k] && dnu[k].abs() <= MAX_POWER;
            powers.total_numerator[k] = (-e).max(0) as u8;
            powers.total_denominator[k] = e.max(0) as u8;
        }
        for k in 0..M {
            for i in 0..N {
                let v = nu[k][i];
                let e = v as i8;
                whole &= f64::from(e) == v && v.abs() <= MAX_POWER;
                powers.numerator[k][i] = e.max(0) as u8;
                powers.denominator[k][i] = (-e).max(0) as u8;
            }
        }
        // One reaction of two reactants and two products, each once, and no mole change (the
        // water-gas shift): its equilibrium is the root of a quadratic.
        let mut pair = None;
        if M == 1 && dnu[0] == 0.0 {
            let (mut reactants, mut products) = ([0usize; 2], [0usize; 2]);
            let (mut r, mut p, mut other) = (0, 0, false);
            for (i, &v) in nu[0].iter().enumerate() {
                if v == -1.0 && r < 2 {
                    reactants[r] = i;
                    r += 1;
                } else if v == 1.0 && p < 2 {
                    products[p] = i;
                    p += 1;
                } else if v != 0.0 {
                    other = true;
                }
            }
            if r == 2 && p == 2 && !other {
                pair = Some([reactants[0], reactants[1], products[0], products[1]]);
            }
        }
        SmallSystem {
            nu,
            dnu,
            powers: whole.then_some(powers),
            pair,
        }
    }

    /// The extent that brings a reaction of [`SmallSystem::pair`]'s form to equilibrium from
    /// `n`: with c, d the reactants, a, b the products and K = exp(ln K), the root in
    /// (-min(a, b), min(c, d)) of (1 - K) x^2 + (a + b + K (c + d)) x + (ab - K cd) = 0, taken
    /// as C/q with q = -(B + sqrt(B^2 - 4AC))/2 (the form without cancellation; Press et al.,
    /// Numerical Recipes, 3rd ed., 5.6). `None` when it does not lie strictly inside.
    #[inline(always)]
    fn pair_extent(&self, [r0, r1, p0, p1]: [usize; 4], n: &[f64; N], ln_k: f64) -> Option<f64> {
        let (c, d, a, b) = (n[r0], n[r1], n[p0], n[p1]);
        let k = ln_k.exp();
        let quad = 1.0 - k;
        let lin = a + b + k * (c + d);
        let constant = a * b - k * c * d;
        let q = -0.5 * (lin + (lin * lin - 4.0 * quad * constant).max(0.0).sqrt());
        let x = constant / q;
        let inside = x > -a.min(b) && x < c.min(d) && x.is_finite();
        inside.then_some(x)
    }

    /// Gradient g_k = sum_i nu_ki ln n_i + dnu_k (ln(P/P0) - ln n_T) - ln K_k into `g`, and
    /// the total n_T; returns |g|^2.
    ///
    /// With whole coefficients the sum of logarithms, with the total's, is the logarithm of one
    /// quotient of products (ln(n_CO n_H2^3 / (n_CH4 n_H2O n_T^2)) for reforming): one
    /// logarithm a reaction instead of one a species and one for the total, the logarithms
    /// being most of a Newton step's cost. The
    /// quotient carries a few units of round-off (1e-15 in g, far below the 1e-11 tolerance);
    /// where a product would leave the normal range the logarithms are summed one by one.
    #[inline(always)]
    fn gradient(&self, at: &Conditions<M>, n: &[f64; N], g: &mut [f64; M], total: &mut f64) -> f64 {
        let mut sum = 0.0;
        for &v in n {
            sum += v;
        }
        *total = sum + at.inert;
        let mut merit = 0.0;
        let Some(powers) = &self.powers else {
            for k in 0..M {
                let r = self.log_sum(k, n, *total) + self.dnu[k] * at.ln_p - at.ln_k[k];
                g[k] = r;
                merit += r * r;
            }
            return merit;
        };
        // x^e for e = 0..=4 of every amount and of the total (the rest of a row unused).
        let table = |x: f64| {
            let x2 = x * x;
            [1.0, x, x2, x2 * x, x2 * x2, 1.0, 1.0, 1.0]
        };
        let mut power = [[1.0f64; 8]; N];
        for i in 0..N {
            power[i] = table(n[i]);
        }
        let total_power = table(*total);
        // Every quotient first, then the logarithms one after the other.
        let mut quotient = [0.0f64; M];
        let mut in_range = [false; M];
        for k in 0..M {
            let mut num = total_power[usize::from(powers.total_numerator[k]) & 7];
            let mut den = total_power[usize::from(powers.total_denominator[k]) & 7];
            for i in 0..N {
                num *= power[i][usize::from(powers.numerator[k][i]) & 7];
                den *= power[i][usize::from(powers.denominator[k][i]) & 7];
            }
            quotient[k] = num / den;
            in_range[k] = (1e-280..1e280).contains(&num)
                && (1e-280..1e280).contains(&den)
                && quotient[k].is_normal();
        }
        for k in 0..M {
            let s = if in_range[k] {
                quotient[k].ln()
            } else {
                self.log_sum(k, n, *total)
            };
            let r = s + self.dnu[k] * at.ln_p - at.ln_k[k];
            g[k] = r;
            merit += r * r;
        }
        merit
    }

    /// sum_i nu_ki ln n_i - dnu_k ln n_T, one logarithm a species. Kept out of line: inlined,
    /// its logarithms were computed ahead on every call whether the quotient needed them or
    /// not.
    #[cold]
    #[inline(never)]
    fn log_sum(&self, k: usize, n: &[f64; N], total: f64) -> f64 {
        let mut s = 0.0;
        for i in 0..N {
            if self.nu[k][i] != 0.0 {
                s += self.nu[k][i] * n[i].ln();
            }
        }
        s - self.dnu[k] * total.ln()
    }

    /// Newton direction H d = -g by the closed form of the general loop's 1 x 1 or 2 x 2
    /// Hessian, with the Hessian for a second right-hand side; `None` where the general loop
    /// would leave the closed form (amounts spanning eight decades or more, or a Hessian that is
    /// not positive definite).
    #[inline(always)]
    fn direction(
        &self,
        n: &[f64; N],
        total: f64,
        g: &[f64; M],
    ) -> Option<([f64; M], Hessian, [f64; N])> {
        let (mut smallest, mut largest) = (f64::INFINITY, 0.0f64);
        let inv_total = 1.0 / total;
        let mut inv_n = [0.0f64; N];
        let hessian = if M == 1 {
            let mut h00 = 0.0;
            for i in 0..N {
                let (ni, a) = (n[i], self.nu[0][i]);
                smallest = if ni < smallest { ni } else { smallest };
                largest = if ni > largest { ni } else { largest };
                inv_n[i] = 1.0 / ni;
                h00 += a * a * inv_n[i];
            }
            let h = h00 - self.dnu[0] * self.dnu[0] * inv_total;
            if !(largest < 1e8 * smallest && h > 0.0 && h.is_finite()) {
                return None;
            }
            Hessian {
                h: [h, 0.0, 0.0],
                inv_det: 1.0 / h,
                inv_total,
            }
        } else {
            let (mut h00, mut h01, mut h11) = (0.0, 0.0, 0.0);
            for i in 0..N {
                let (ni, a, b) = (n[i], self.nu[0][i], self.nu[1][i]);
                smallest = if ni < smallest { ni } else { smallest };
                largest = if ni > largest { ni } else { largest };
                let w = 1.0 / ni;
                inv_n[i] = w;
                h00 += a * a * w;
                h01 += a * b * w;
                h11 += b * b * w;
            }
            let (d0, d1) = (self.dnu[0], self.dnu[1]);
            let a0 = h00 - d0 * d0 * inv_total;
            let a1 = h01 - d0 * d1 * inv_total;
            let a3 = h11 - d1 * d1 * inv_total;
            let det = a0 * a3 - a1 * a1;
            if !(largest < 1e8 * smallest && a0 > 0.0 && det > 1e-10 * a0 * a3 && det.is_finite()) {
                return None;
            }
            Hessian {
                h: [a0, a1, a3],
                inv_det: 1.0 / det,
                inv_total,
            }
        };
        let mut minus_g = [0.0f64; M];
        for k in 0..M {
            minus_g[k] = -g[k];
        }
        Some((hessian.solve(minus_g), hessian, inv_n))
    }

    /// The Chebyshev correction of a Newton step `newton` whose amount changes are `dn`
    /// (Traub, Iterative Methods for the Solution of Equations, 1964, ch. 5): with T the third
    /// derivative of the convex function, T(d, d)_k = -sum_i nu_ki (dn_i/n_i)^2 + dnu_k
    /// (dn_T/n_T)^2, the step d = d_N - H^-1 T(d_N, d_N) / 2 meets the gradient to third order,
    /// so a warm start needs one Newton iteration fewer.
    #[inline(always)]
    fn chebyshev(
        &self,
        hessian: &Hessian,
        newton: &[f64; M],
        inv_n: &[f64; N],
        dn: &[f64; N],
    ) -> [f64; M] {
        let mut dn_total = 0.0;
        for k in 0..M {
            dn_total += self.dnu[k] * newton[k];
        }
        let relative_total = dn_total * hessian.inv_total;
        let mut relative = [0.0f64; N];
        for i in 0..N {
            let r = dn[i] * inv_n[i];
            relative[i] = r * r;
        }
        let mut rhs = [0.0f64; M];
        for k in 0..M {
            let mut t = self.dnu[k] * relative_total * relative_total;
            for i in 0..N {
                t -= self.nu[k][i] * relative[i];
            }
            rhs[k] = -0.5 * t;
        }
        let e = hessian.solve(rhs);
        let mut step = *newton;
        for k in 0..M {
            step[k] += e[k];
        }
        step
    }

    /// Amount changes of `step` and the largest multiple of it (at most one) that keeps every
    /// amount above 1 - [`FRACTION_TO_BOUNDARY`] of its value.
    #[inline(always)]
    fn amount_change(&self, step: &[f64; M], n: &[f64; N]) -> ([f64; N], f64) {
        let mut dn = [0.0f64; N];
        let mut alpha: f64 = 1.0;
        for i in 0..N {
            let mut d = 0.0;
            for k in 0..M {
                d += self.nu[k][i] * step[k];
            }
            dn[i] = d;
            // The division only where the full step would cross the bound (rare): it is on the
            // path from one Newton step to the next.
            if d < -FRACTION_TO_BOUNDARY * n[i] {
                alpha = alpha.min(FRACTION_TO_BOUNDARY * n[i] / -d);
            }
        }
        (dn, alpha)
    }

    /// The gradient at `state.n`, then Newton iterations until every |g_k| is within
    /// `tolerance`, `limit` iterations are taken, or an iteration needs the general loop (left
    /// undone). True when converged.
    pub fn iterate(
        &self,
        at: &Conditions<M>,
        state: &mut SmallState<'_>,
        tolerance: f64,
        limit: usize,
        min_step: f64,
    ) -> bool {
        let mut n = [0.0f64; N];
        n.copy_from_slice(&state.n[..N]);
        let mut g = [0.0f64; M];
        let mut total = 0.0;
        if let Some(pair) = self.pair {
            if let Some(x) = self.pair_extent(pair, &n, at.ln_k[0]) {
                let mut moved = n;
                for i in 0..N {
                    moved[i] += self.nu[0][i] * x;
                }
                if moved.iter().all(|v| *v > 0.0) {
                    n = moved;
                    state.w[0] += x;
                }
            }
        }
        let mut merit = self.gradient(at, &n, &mut g, &mut total);
        let mut converged = g.iter().all(|r| r.abs() <= tolerance);
        while !converged && state.iterations < limit {
            let Some((newton, hessian, inv_n)) = self.direction(&n, total, &g) else {
                break;
            };
            let (newton_dn, newton_alpha) = self.amount_change(&newton, &n);
            // Near the answer (every amount changed by a quarter at most) the Chebyshev step;
            // should it not lower |g|^2 at its full length, the Newton step after all.
            let near =
                newton_alpha == 1.0 && (0..N).all(|i| newton_dn[i].abs() <= CHEBYSHEV_REACH * n[i]);
            let (mut step, mut dn, mut alpha) = (newton, newton_dn, newton_alpha);
            let mut corrected = false;
            if near {
                step = self.chebyshev(&hessian, &newton, &inv_n, &newton_dn);
                (dn, alpha) = self.amount_change(&step, &n);
                corrected = true;
            }
            let mut trial = [0.0f64; N];
            let mut trial_g = [0.0f64; M];
            let mut trial_total = 0.0;
            let mut accepted = false;
            while alpha > min_step {
                let mut positive = true;
                for i in 0..N {
                    trial[i] = n[i] + alpha * dn[i];
                    positive &= trial[i] > 0.0;
                }
                if positive {
                    let m = self.gradient(at, &trial, &mut trial_g, &mut trial_total);
                    if m < (1.0 - 1e-4 * alpha) * merit || m == 0.0 {
                        merit = m;
                        accepted = true;
                        break;
                    }
                }
                if corrected {
                    (step, dn, alpha) = (newton, newton_dn, newton_alpha);
                    corrected = false;
                    continue;
                }
                alpha *= 0.5;
            }
            if !accepted {
                break;
            }
            state.iterations += 1;
            n = trial;
            g = trial_g;
            total = trial_total;
            for k in 0..M {
                state.w[k] += alpha * step[k];
            }
            converged = g.iter().all(|r| r.abs() <= tolerance);
        }
        state.n[..N].copy_from_slice(&n);
        state.g[..M].copy_from_slice(&g);
        state.merit = merit;
        converged
    }
}

/// The kernel of an extent system, prepared once from its rows when it has one or two reactions
/// over four to six species.
#[derive(Debug, Clone)]
pub enum Prepared {
    /// One reaction over four species (a shift converter).
    R1S4(SmallSystem<1, 4>),
    /// One reaction over five species.
    R1S5(SmallSystem<1, 5>),
    /// One reaction over six species.
    R1S6(SmallSystem<1, 6>),
    /// Two reactions over four species.
    R2S4(SmallSystem<2, 4>),
    /// Two reactions over five species (reforming with shift; a methanator).
    R2S5(SmallSystem<2, 5>),
    /// Two reactions over six species.
    R2S6(SmallSystem<2, 6>),
}

/// `$body` with `$s` bound to the system inside whichever size `$prepared` holds.
macro_rules! each_size {
    ($prepared:expr, $s:ident => $body:expr) => {
        match $prepared {
            Prepared::R1S4($s) => $body,
            Prepared::R1S5($s) => $body,
            Prepared::R1S6($s) => $body,
            Prepared::R2S4($s) => $body,
            Prepared::R2S5($s) => $body,
            Prepared::R2S6($s) => $body,
        }
    };
}

impl Prepared {
    /// The kernel of `nr` rows over `ns` species (row-major `nu`, gas mole changes `dnu`), or
    /// `None` for a size it does not take.
    pub fn new(nu: &[f64], dnu: &[f64], nr: usize, ns: usize) -> Option<Prepared> {
        fn rows<const M: usize, const N: usize>(nu: &[f64], dnu: &[f64]) -> SmallSystem<M, N> {
            let mut a = [[0.0; N]; M];
            let mut d = [0.0; M];
            for k in 0..M {
                a[k].copy_from_slice(&nu[k * N..(k + 1) * N]);
                d[k] = dnu[k];
            }
            SmallSystem::new(a, d)
        }
        if nu.len() != nr * ns || dnu.len() != nr {
            return None;
        }
        Some(match (nr, ns) {
            (1, 4) => Prepared::R1S4(rows(nu, dnu)),
            (1, 5) => Prepared::R1S5(rows(nu, dnu)),
            (1, 6) => Prepared::R1S6(rows(nu, dnu)),
            (2, 4) => Prepared::R2S4(rows(nu, dnu)),
            (2, 5) => Prepared::R2S5(rows(nu, dnu)),
            (2, 6) => Prepared::R2S6(rows(nu, dnu)),
            _ => return None,
        })
    }

    /// H x = rhs at `amounts` (every one positive) with `inert` more in the total, by the
    /// kernel's closed form, into `x`: the sensitivity of the equilibrium extents to ln K.
    /// False, with `x` untouched, where the kernel's Newton step would give up (amounts spanning
    /// eight decades or more, a Hessian not positive definite, an amount not positive).
    pub fn solve_hessian(&self, amounts: &[f64], inert: f64, rhs: &[f64], x: &mut [f64]) -> bool {
        fn solve<const M: usize, const N: usize>(
            s: &SmallSystem<M, N>,
            (amounts, inert, rhs, x): (&[f64], f64, &[f64], &mut [f64]),
        ) -> bool {
            if amounts.len() != N || rhs.len() != M || x.len() != M {
                return false;
            }
            let mut n = [0.0f64; N];
            n.copy_from_slice(amounts);
            if !n.iter().all(|v| *v > 0.0) {
                return false;
            }
            let total = n.iter().sum::<f64>() + inert;
            // The Newton step of gradient -rhs is H^-1 rhs.
            let mut minus = [0.0f64; M];
            for k in 0..M {
                minus[k] = -rhs[k];
            }
            match s.direction(&n, total, &minus) {
                Some((solved, _, _)) => {
                    x.copy_from_slice(&solved);
                    true
                }
                None => false,
            }
        }
        let args = (amounts, inert, rhs, x);
        each_size!(self, s => solve(s, args))
    }

    /// True when the kernel finds the equilibrium in closed form (a lone shift), so that any
    /// start with every amount present serves.
    pub fn closed_form(&self) -> bool {
        each_size!(self, s => s.pair.is_some())
    }

    /// The coefficient rows, row-major (one row per reaction over the species).
    pub fn rows(&self) -> &[f64] {
        each_size!(self, s => s.nu.as_flattened())
    }

    /// [`SmallSystem::iterate`] at `ln_k` (one per reaction), `inert` and `ln_p`.
    pub fn iterate(
        &self,
        (ln_k, inert, ln_p): (&[f64], f64, f64),
        state: &mut SmallState<'_>,
        tolerance: f64,
        limit: usize,
        min_step: f64,
    ) -> bool {
        fn at<const M: usize>(ln_k: &[f64], inert: f64, ln_p: f64) -> Conditions<M> {
            let mut k = [0.0; M];
            k.copy_from_slice(&ln_k[..M]);
            Conditions {
                ln_k: k,
                inert,
                ln_p,
            }
        }
        each_size!(self, s => s.iterate(&at(ln_k, inert, ln_p), state, tolerance, limit, min_step))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// g_k = sum_i nu_ki ln n_i + dnu_k (ln(P/P0) - ln n_T) - ln K_k, written out (the
    /// definition of the module documentation of `extents.rs`).
    fn direct<const M: usize, const N: usize>(
        nu: &[[f64; N]; M],
        at: &Conditions<M>,
        n: &[f64; N],
    ) -> [f64; M] {
        let total: f64 = n.iter().sum::<f64>() + at.inert;
        let mut g = [0.0; M];
        for k in 0..M {
            let dnu: f64 = nu[k].iter().sum();
            let s: f64 = (0..N).map(|i| nu[k][i] * n[i].ln()).sum();
            g[k] = s + dnu * (at.ln_p - total.ln()) - at.ln_k[k];
        }
        g
    }

    fn check<const M: usize, const N: usize>(nu: [[f64; N]; M], n: [f64; N], whole: bool) {
        let dnu = nu.map(|r| r.iter().sum());
        let system = SmallSystem::new(nu, dnu);
        assert_eq!(system.powers.is_some(), whole);
        let at = Conditions {
            ln_k: [1.5; M],
            inert: 0.07,
            ln_p: 3.3,
        };
        let mut g = [0.0; M];
        let mut total = 0.0;
        let merit = system.gradient(&at, &n, &mut g, &mut total);
        let want = direct(&nu, &at, &n);
        for k in 0..M {
            // A few units of round-off on terms of magnitude up to 1e3.
            assert!((g[k] - want[k]).abs() <= 1e-12, "{g:?} against {want:?}");
        }
        assert!((merit - want.iter().map(|r| r * r).sum::<f64>()).abs() <= 1e-9 * merit.max(1.0));
        assert!((total - (n.iter().sum::<f64>() + 0.07)).abs() <= 1e-15);
    }

    #[test]
    fn the_gradient_is_the_sum_of_logarithms_whichever_way_it_is_taken() {
        // Reforming and shift over CH4, H2O, CO, H2, CO2: whole powers, one quotient each.
        let rs = [[-1.0, -1.0, 1.0, 3.0, 0.0], [0.0, -1.0, -1.0, 1.0, 1.0]];
        check(rs, [0.1, 0.4, 0.2, 0.5, 0.1], true);
        check(rs, [1e-9, 2.0, 3e-7, 2.5, 0.3], true);
        // Products beyond the normal range: the logarithms summed one by one.
        check(rs, [0.3, 0.6, 1e-200, 1e-200, 0.05], true);
        check(rs, [1e-150, 1e-150, 0.3, 0.6, 0.05], true);
        // CO2 methanation (a power of four) and a lone shift.
        check(
            [[0.0, 2.0, 1.0, -4.0, -1.0]],
            [0.01, 0.3, 0.02, 0.6, 0.005],
            true,
        );
        check([[-1.0, -1.0, 1.0, 1.0]], [0.09, 0.34, 0.056, 0.48], true);
        // A half coefficient, or a power above four: no whole powers, logarithms throughout.
        check([[-1.0, -0.5, 1.0, 2.0]], [0.4, 0.3, 0.01, 0.02], false);
        check([[-1.0, -5.0, 1.0, 2.0]], [0.4, 0.3, 0.01, 0.02], false);
    }

    #[test]
    fn the_shift_equilibrium_is_the_root_of_a_quadratic() {
        // Species CO, H2O, CO2, H2. Smith, Van Ness & Abbott, Introduction to Chemical
        // Engineering Thermodynamics, 7th ed., Example 13.5: K = 1 from 1 CO + 1 H2O reacts half;
        // from 1 CO + 2 H2O two thirds of the CO.
        let shift = SmallSystem::<1, 4>::new([[-1.0, -1.0, 1.0, 1.0]], [0.0]);
        let pair = shift.pair.unwrap();
        let x = shift
            .pair_extent(pair, &[1.0, 1.0, 1e-300, 1e-300], 0.0)
            .unwrap();
        assert!((x - 0.5).abs() < 1e-15, "{x}");
        let x = shift
            .pair_extent(pair, &[1.0, 2.0, 1e-300, 1e-300], 0.0)
            .unwrap();
        assert!((x - 2.0 / 3.0).abs() < 1e-15, "{x}");
        // Any K, either side of one, from any start: the quotient of the moved amounts is K
        // (to round-off), and the move runs backward when the start lies beyond equilibrium.
        for (n, ln_k) in [
            ([0.09, 0.34, 0.056, 0.48], 3.2),
            ([0.09, 0.34, 0.056, 0.48], -2.0),
            ([0.002, 0.25, 0.12, 0.6], 5.0),
            ([0.3, 0.3, 0.3, 0.3], 0.7),
        ] {
            let x = shift.pair_extent(pair, &n, ln_k).unwrap();
            let q = ((n[2] + x) * (n[3] + x) / ((n[0] - x) * (n[1] - x))).ln();
            assert!((q - ln_k).abs() < 1e-12, "{n:?} {ln_k}: {q}");
        }
        // Only the shift's form has the closed form.
        assert!(SmallSystem::<2, 5>::new(
            [[-1.0, -1.0, 1.0, 3.0, 0.0], [0.0, -1.0, -1.0, 1.0, 1.0]],
            [2.0, 0.0]
        )
        .pair
        .is_none());
        assert!(SmallSystem::<1, 4>::new([[-2.0, 1.0, 1.0, 0.0]], [0.0])
            .pair
            .is_none());
        assert!(
            SmallSystem::<1, 5>::new([[-1.0, -1.0, 1.0, 3.0, 0.0]], [2.0])
                .pair
                .is_none()
        );
    }

    #[test]
    fn a_species_count_or_reaction_count_outside_the_kernel_is_refused() {
        let row = [-1.0, -1.0, 1.0, 1.0, 0.0, 0.0, 0.0];
        assert!(Prepared::new(&row[..4], &[0.0], 1, 4).is_some());
        assert!(Prepared::new(&row[..6], &[0.0], 1, 6).is_some());
        assert!(Prepared::new(&row[..3], &[0.0], 1, 3).is_none());
        assert!(Prepared::new(&row, &[0.0], 1, 7).is_none());
        // Lengths that do not match the sizes.
        assert!(Prepared::new(&row[..5], &[0.0], 1, 4).is_none());
        assert!(Prepared::new(&row[..4], &[0.0, 0.0], 1, 4).is_none());
    }
}

//! The working reaction basis of one extent solve, and the Newton pieces that act on it.
//!
//! The equilibrium does not depend on which independent combinations of the reactions are
//! solved for, but round-off does: a species at 1e-20 of the total that two reactions both
//! change cannot follow a joint Newton step (its change is the difference of two large extents).
//! When that happens the basis is rebuilt by Gaussian elimination so that each such species is
//! changed by one working reaction only; the working equations are then combinations of the
//! original ones (rows and ln K alike), and the extents of the original reactions are recovered
//! from the combination matrix. Newton steps use the QR factorisation of A_ia = nu_ai / sqrt(n_i)
//! so that the Hessian A^T A - c c^T is never formed (Golub & Van Loan, Matrix Computations, 4th
//! ed., 5.2 and 2.1.4).

use super::linalg;

/// Fraction of the distance to the boundary (an amount reaching zero) a step may take.
pub const FRACTION_TO_BOUNDARY: f64 = 0.99;
/// Most species one extent system may have.
pub const MAX_SPECIES: usize = 32;
/// A species below this fraction of the total counts as scarce when the basis is rebuilt.
const SCARCE_FRACTION: f64 = 1e-8;

/// Working reactions: `m` rows over `ns` species, each a combination of the active reactions.
/// The buffers are kept between solves (a workspace owns the basis), so loading a basis does not
/// allocate once they have grown to the system's size.
#[derive(Debug, Clone)]
pub struct Basis {
    pub ns: usize,
    pub m: usize,
    /// Row-major coefficients, `nu[k * ns + i]`.
    nu: Vec<f64>,
    /// Gas mole change of each working reaction.
    dnu: Vec<f64>,
    /// ln K of each working reaction.
    ln_k: Vec<f64>,
    /// Working row k = sum_j combination[k * m + j] * (active reaction j); valid once rebased.
    combination: Vec<f64>,
    /// Rows already used as a pivot when rebuilding.
    pivot: Vec<bool>,
    rebased: bool,
    /// For each species: does a working reaction change it?
    in_rows: [bool; MAX_SPECIES],
    /// Where the rows came from: (extent system id, bit set of its active reactions).
    source: Option<(u64, u64)>,
}

impl Default for Basis {
    fn default() -> Self {
        Basis {
            ns: 0,
            m: 0,
            nu: Vec::new(),
            dnu: Vec::new(),
            ln_k: Vec::new(),
            combination: Vec::new(),
            pivot: Vec::new(),
            rebased: false,
            in_rows: [false; MAX_SPECIES],
            source: None,
        }
    }
}

impl Basis {
    /// Load only the ln K of the rows already loaded from the same `source` (an extent system
    /// and its active reactions): true when that was possible (the basis not rebuilt since).
    pub fn reload_ln_k(&mut self, source: (u64, u64), ln_k: impl Iterator<Item = f64>) -> bool {
        if self.rebased || self.source != Some(source) {
            return false;
        }
        for (slot, k) in self.ln_k.iter_mut().zip(ln_k) {
            *slot = k;
        }
        true
    }

    /// Load the given reactions themselves: (coefficient row, gas mole change, ln K), from
    /// `source` (see [`Basis::reload_ln_k`]).
    pub fn load<'r>(
        &mut self,
        source: (u64, u64),
        rows: impl Iterator<Item = (&'r [f64], f64, f64)>,
        ns: usize,
    ) {
        self.source = Some(source);
        self.nu.clear();
        self.dnu.clear();
        self.ln_k.clear();
        for (row, d, k) in rows {
            self.nu.extend_from_slice(&row[..ns]);
            self.dnu.push(d);
            self.ln_k.push(k);
        }
        self.ns = ns;
        self.m = self.dnu.len();
        self.rebased = false;
        self.update_in_rows();
    }

    fn update_in_rows(&mut self) {
        let ns = self.ns;
        for i in 0..ns {
            self.in_rows[i] = (0..self.m).any(|k| self.nu[k * ns + i] != 0.0);
        }
    }

    /// True once the basis has been rebuilt (its rows are combinations of the originals).
    pub fn rebased(&self) -> bool {
        self.rebased
    }

    #[inline]
    pub fn row(&self, k: usize) -> &[f64] {
        &self.nu[k * self.ns..(k + 1) * self.ns]
    }

    /// Gradient g_k = sum_i nu_ki ln n_i + dnu_k (ln(P/P0) - ln n_T) - ln K_k into `g`; returns
    /// |g|^2. `ln_n` receives ln n_i (zero for absent species).
    pub fn gradient(
        &self,
        n: &[f64],
        inert: f64,
        ln_p: f64,
        ln_n: &mut [f64],
        g: &mut [f64],
    ) -> f64 {
        let total: f64 = n.iter().sum::<f64>() + inert;
        let ln_total = total.ln();
        for (l, ni) in ln_n.iter_mut().zip(n) {
            *l = if *ni > 0.0 { ni.ln() } else { 0.0 };
        }
        let mut merit = 0.0;
        for (k, gk) in g.iter_mut().enumerate().take(self.m) {
            let s: f64 = self
                .row(k)
                .iter()
                .zip(ln_n.iter())
                .map(|(a, b)| a * b)
                .sum();
            let r = s + self.dnu[k] * (ln_p - ln_total) - self.ln_k[k];
            *gk = r;
            merit += r * r;
        }
        merit
    }

    /// Solve H x = rhs in place, H = A^T A - c c^T with A_ik = nu_ki / sqrt(n_i) and
    /// c_k = dnu_k / sqrt(n_T), by QR of A; falls back to the formed Hessian with Gaussian
    /// elimination. `scratch` needs m^2 entries.
    pub fn newton_solve(
        &self,
        n: &[f64],
        inert: f64,
        rhs: &mut [f64],
        scratch: &mut [f64],
    ) -> bool {
        let m = self.m;
        let total: f64 = n.iter().sum::<f64>() + inert;
        // While the amounts span fewer than eight decades the formed Hessian is accurate enough
        // and its Cholesky factor is the cheaper way. The span and the Hessian come from one
        // pass over the species.
        let (smallest, largest) = self.hessian(n, total, scratch);
        if largest < 1e8 * smallest {
            let mut x = [0.0f64; linalg::MAX_DIM];
            x[..m].copy_from_slice(&rhs[..m]);
            if linalg::solve_spd(&mut scratch[..m * m], &mut x[..m], m) {
                rhs[..m].copy_from_slice(&x[..m]);
                return true;
            }
            self.hessian(n, total, scratch);
        }
        let mut a = [0.0f64; MAX_SPECIES * linalg::MAX_DIM];
        let mut rows = 0;
        let mut inv_sqrt = [0.0f64; MAX_SPECIES];
        let mut index = [0usize; MAX_SPECIES];
        for (i, &ni) in n.iter().enumerate() {
            if ni > 0.0 && self.in_rows[i] {
                inv_sqrt[rows] = 1.0 / ni.sqrt();
                index[rows] = i;
                rows += 1;
            }
        }
        for k in 0..m {
            let row = self.row(k);
            for r in 0..rows {
                a[k * rows + r] = row[index[r]] * inv_sqrt[r];
            }
        }
        let mut c = [0.0f64; linalg::MAX_DIM];
        let inv_sqrt_total = 1.0 / total.sqrt();
        for k in 0..m {
            c[k] = self.dnu[k] * inv_sqrt_total;
        }
        let mut x = [0.0f64; linalg::MAX_DIM];
        x[..m].copy_from_slice(&rhs[..m]);
        if linalg::solve_gram_minus_rank_one(&mut a[..rows * m], rows, m, &c[..m], &mut x[..m]) {
            rhs[..m].copy_from_slice(&x[..m]);
            return true;
        }
        linalg::solve_general(&scratch[..m * m], &mut rhs[..m], m)
    }

    /// H_ab = sum_i nu_ai nu_bi / n_i - dnu_a dnu_b / n_T into `h` (m x m, row-major); returns
    /// the smallest and largest amount of the species present in a working reaction.
    fn hessian(&self, n: &[f64], total: f64, h: &mut [f64]) -> (f64, f64) {
        let (m, ns) = (self.m, self.ns);
        let n = &n[..ns];
        let in_rows = &self.in_rows[..ns];
        let (mut smallest, mut largest) = (f64::INFINITY, 0.0f64);
        let inv_total = 1.0 / total;
        // One and two working reactions (a shift converter; reforming with shift) are the
        // common stages: their sums run over the rows directly.
        if m == 1 {
            let r0 = &self.nu[..ns];
            let mut h00 = 0.0;
            for ((&ni, &a), &used) in n.iter().zip(r0).zip(in_rows) {
                if ni > 0.0 && used {
                    smallest = if ni < smallest { ni } else { smallest };
                    largest = if ni > largest { ni } else { largest };
                    h00 += a * a / ni;
                }
            }
            h[0] = h00 - self.dnu[0] * self.dnu[0] * inv_total;
            return (smallest, largest);
        }
        if m == 2 {
            let (r0, r1) = self.nu[..2 * ns].split_at(ns);
            let (mut h00, mut h01, mut h11) = (0.0, 0.0, 0.0);
            for (((&ni, &a), &b), &used) in n.iter().zip(r0).zip(r1).zip(in_rows) {
                if ni > 0.0 && used {
                    smallest = if ni < smallest { ni } else { smallest };
                    largest = if ni > largest { ni } else { largest };
                    let w = 1.0 / ni;
                    h00 += a * a * w;
                    h01 += a * b * w;
                    h11 += b * b * w;
                }
            }
            let (d0, d1) = (self.dnu[0], self.dnu[1]);
            h[0] = h00 - d0 * d0 * inv_total;
            h[1] = h01 - d0 * d1 * inv_total;
            h[2] = h[1];
            h[3] = h11 - d1 * d1 * inv_total;
            return (smallest, largest);
        }
        let h = &mut h[..m * m];
        h.fill(0.0);
        for (i, (&ni, &used)) in n.iter().zip(in_rows).enumerate() {
            if !(ni > 0.0 && used) {
                continue;
            }
            smallest = smallest.min(ni);
            largest = largest.max(ni);
            let w = 1.0 / ni;
            for a in 0..m {
                let va = self.nu[a * ns + i];
                if va == 0.0 {
                    continue;
                }
                let wa = va * w;
                for b in a..m {
                    h[a * m + b] += wa * self.nu[b * ns + i];
                }
            }
        }
        for a in 0..m {
            for b in a..m {
                let v = h[a * m + b] - self.dnu[a] * self.dnu[b] * inv_total;
                h[a * m + b] = v;
                h[b * m + a] = v;
            }
        }
        (smallest, largest)
    }

    /// One pass of one-reaction steps in log space: for each working reaction, the species with
    /// the largest curvature nu^2/n is moved to n_s exp(-g_k / nu_s), where the reaction alone
    /// would be at equilibrium if only that species changed; each step is capped at half the
    /// distance to any flow reaching zero. Steps are added to the working extents `w`.
    pub fn log_relaxation(&self, n: &mut [f64], w: &mut [f64], inert: f64, ln_p: f64) {
        let mut total: f64 = n.iter().sum::<f64>() + inert;
        for k in 0..self.m {
            let row = &self.nu[k * self.ns..(k + 1) * self.ns];
            let mut g = -self.ln_k[k] + self.dnu[k] * (ln_p - total.ln());
            let mut stiff = (usize::MAX, 0.0f64);
            for (i, (&nu, &ni)) in row.iter().zip(n.iter()).enumerate() {
                if nu != 0.0 && ni > 0.0 {
                    g += nu * ni.ln();
                    let curvature = nu * nu / ni;
                    if curvature > stiff.1 {
                        stiff = (i, curvature);
                    }
                }
            }
            if stiff.0 == usize::MAX {
                continue;
            }
            let s = stiff.0;
            let nu_s = row[s];
            let exponent = (-g / nu_s).clamp(-50.0, 50.0);
            let mut d = n[s] * exponent.exp_m1() / nu_s;
            for (&nu, &ni) in row.iter().zip(n.iter()) {
                let dn = nu * d;
                if dn < 0.0 && -dn > 0.5 * ni {
                    d *= 0.5 * ni / -dn;
                }
            }
            for (ni, &nu) in n.iter_mut().zip(row) {
                *ni += nu * d;
            }
            w[k] += d;
            total += self.dnu[k] * d;
        }
    }

    /// Rebuild the basis so that each scarce species (below 1e-8 of the total, scarcest first)
    /// is changed by one working reaction only. Working extents `w` are carried over so that
    /// sum_k w_k row_k is unchanged. Returns true when anything changed.
    pub fn rebase(&mut self, n: &[f64], inert: f64, w: &mut [f64]) -> bool {
        let total: f64 = n.iter().sum::<f64>() + inert;
        let mut order = [0usize; MAX_SPECIES];
        let mut count = 0;
        for i in 0..self.ns {
            if n[i] > 0.0 && n[i] < SCARCE_FRACTION * total {
                order[count] = i;
                count += 1;
            }
        }
        let order = &mut order[..count];
        order.sort_unstable_by(|a, b| n[*a].total_cmp(&n[*b]).then(a.cmp(b)));
        let m = self.m;
        if !self.rebased {
            self.combination.clear();
            self.combination.resize(m * m, 0.0);
            for k in 0..m {
                self.combination[k * m + k] = 1.0;
            }
            self.pivot.clear();
            self.pivot.resize(m, false);
            self.rebased = true;
        }
        let ns = self.ns;
        let mut changed = false;
        for &i in order.iter() {
            let mut rows_with = [0usize; linalg::MAX_DIM];
            let mut count = 0;
            for k in 0..m {
                if self.nu[k * ns + i] != 0.0 {
                    rows_with[count] = k;
                    count += 1;
                }
            }
            let rows_with = &rows_with[..count];
            if rows_with.len() < 2 {
                continue;
            }
            let Some(&p) = rows_with
                .iter()
                .filter(|&&k| !self.pivot[k])
                .max_by(|a, b| {
                    self.nu[**a * ns + i]
                        .abs()
                        .total_cmp(&self.nu[**b * ns + i].abs())
                })
            else {
                continue;
            };
            self.pivot[p] = true;
            for &q in rows_with.iter().filter(|&&q| q != p) {
                let f = self.nu[q * ns + i] / self.nu[p * ns + i];
                for c in 0..ns {
                    let v = self.nu[p * ns + c];
                    self.nu[q * ns + c] -= f * v;
                }
                self.nu[q * ns + i] = 0.0;
                self.dnu[q] -= f * self.dnu[p];
                self.ln_k[q] -= f * self.ln_k[p];
                for c in 0..m {
                    let v = self.combination[p * m + c];
                    self.combination[q * m + c] -= f * v;
                }
                // sum w row stays the same: row_q' = row_q - f row_p  =>  w_p' = w_p + f w_q.
                w[p] += f * w[q];
                changed = true;
            }
        }
        if changed {
            self.update_in_rows();
        }
        changed
    }

    /// Extents of the active reactions from the working extents: xi_j = sum_k w_k C_kj.
    pub fn original_extents(&self, w: &[f64], out: &mut [f64]) {
        if !self.rebased() {
            out[..self.m].copy_from_slice(&w[..self.m]);
            return;
        }
        for (j, o) in out.iter_mut().enumerate().take(self.m) {
            *o = (0..self.m)
                .map(|k| w[k] * self.combination[k * self.m + j])
                .sum();
        }
    }
}

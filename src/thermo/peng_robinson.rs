//! The Peng-Robinson equation of state for a gas mixture: compressibility, fugacity coefficients
//! and residual enthalpy.
//!
//! Peng & Robinson, "A new two-constant equation of state", Ind. Eng. Chem. Fundam. 15 (1976)
//! 59-64:
//!
//! ```text
//! P = R T / (v - b) - a(T) / (v (v + b) + b (v - b))
//! a_i = Omega_a R^2 Tc_i^2 / Pc_i * [1 + kappa_i (1 - sqrt(T / Tc_i))]^2
//! b_i = Omega_b R Tc_i / Pc_i
//! kappa_i = 0.37464 + 1.54226 w - 0.26992 w^2                      (1976)
//! kappa_i = 0.379642 + 1.48503 w - 0.164423 w^2 + 0.016666 w^3      (1978, for w > 0.491)
//! ```
//!
//! Omega_a and Omega_b are the exact roots of the critical conditions (printed in the paper as
//! 0.45724 and 0.07780; [`OMEGA_A`], [`OMEGA_B`]).
//! The 1978 polynomial (Robinson & Peng, GPA Research Report RR-28, 1978) is taken for acentric
//! factors above 0.491 only; no species of the shipped database comes near (water 0.344).
//! Mixtures take the van der Waals one-fluid rules a = sum_i sum_j y_i y_j sqrt(a_i a_j)
//! (1 - k_ij), b = sum_i y_i b_i with every binary parameter k_ij zero, so that
//! a = (sum_i y_i sqrt(a_i))^2 and sum_j y_j a_ij = sqrt(a_i) sum_j y_j sqrt(a_j): the whole
//! evaluation is linear in the number of species and needs no work memory.
//!
//! With A = a P / (R T)^2 and B = b P / (R T) the compressibility solves
//! Z^3 - (1 - B) Z^2 + (A - 3 B^2 - 2 B) Z - (A B - B^2 - B^3) = 0. The vapour root is taken:
//! the largest real root (the gas of a reactor at 150-1000 degC and up to some 50 bar has one
//! real root, or a largest one well above the others; a liquid root is never wanted here). It
//! is found in closed form (Cardano, or the trigonometric form for three real roots) and
//! polished by Newton steps on the cubic. Then
//!
//! ```text
//! ln phi_i = b_i/b (Z - 1) - ln(Z - B)
//!            - A / (2 sqrt2 B) (2 sqrt(a_i) / sqrt(a) - b_i/b) ln[(Z + (1+sqrt2) B) / (Z + (1-sqrt2) B)]
//! H - H_ig = R T (Z - 1) + (T da/dT - a) / (2 sqrt2 b) ln[(Z + (1+sqrt2) B) / (Z + (1-sqrt2) B)]
//! ```
//!
//! (e.g. Poling, Prausnitz & O'Connell, The Properties of Gases and Liquids, 5th ed., ch. 5 and
//! 6). The ideal-gas reference of H_ig is the same temperature; H - H_ig is in J/mol of mixture.

use crate::error::{Error, Result};
use crate::quantity::R_GAS;

use super::species::Critical;
use super::SpeciesDb;

const SQRT2: f64 = std::f64::consts::SQRT_2;
/// Omega_a of a_c = Omega_a R^2 Tc^2 / Pc: the exact root of the critical conditions, which
/// Peng & Robinson (1976) print rounded as 0.45724.
pub const OMEGA_A: f64 = 0.457_235_528_921_382_2;
/// Omega_b of b = Omega_b R Tc / Pc: the exact root of the critical conditions, printed rounded
/// as 0.07780.
pub const OMEGA_B: f64 = 0.077_796_073_903_888_46;
/// Acentric factor above which the 1978 kappa polynomial is used.
pub const KAPPA_1978_ABOVE: f64 = 0.491;

/// The constants of one species in the Peng-Robinson equation.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PrComponent {
    /// sqrt(a_c) = sqrt(Omega_a R^2 Tc^2 / Pc), sqrt(Pa m^6 / mol^2).
    sqrt_ac: f64,
    /// b = Omega_b R Tc / Pc, m^3/mol.
    b: f64,
    /// kappa of the alpha function.
    kappa: f64,
    /// Critical temperature, K.
    tc: f64,
}

impl PrComponent {
    /// The constants of a species from its critical temperature and pressure and acentric
    /// factor.
    pub fn new(critical: &Critical) -> PrComponent {
        PrComponent::from_constants(
            critical.temperature_k,
            critical.pressure_pa,
            critical.acentric_factor,
        )
    }

    /// The constants from Tc (K), Pc (Pa) and the acentric factor.
    pub fn from_constants(tc_k: f64, pc_pa: f64, omega: f64) -> PrComponent {
        let kappa = if omega > KAPPA_1978_ABOVE {
            0.379642 + omega * (1.48503 + omega * (-0.164423 + omega * 0.016666))
        } else {
            0.37464 + omega * (1.54226 - omega * 0.26992)
        };
        let ac = OMEGA_A * R_GAS * R_GAS * tc_k * tc_k / pc_pa;
        PrComponent {
            sqrt_ac: ac.sqrt(),
            b: OMEGA_B * R_GAS * tc_k / pc_pa,
            kappa,
            tc: tc_k,
        }
    }

    /// sqrt(a(T)) and its temperature derivative.
    #[inline]
    fn sqrt_a(&self, t: f64) -> (f64, f64) {
        let sr = (t / self.tc).sqrt();
        let m = 1.0 + self.kappa * (1.0 - sr);
        // d m / dT = -kappa / (2 sqrt(T Tc))
        let dm = -self.kappa * 0.5 / (t * self.tc).sqrt();
        let sign = if m < 0.0 { -1.0 } else { 1.0 };
        (self.sqrt_ac * m.abs(), self.sqrt_ac * sign * dm)
    }

    /// The co-volume b, m^3/mol.
    pub fn b(&self) -> f64 {
        self.b
    }

    /// a(T), Pa m^6/mol^2.
    pub fn a(&self, temperature_k: f64) -> f64 {
        let (s, _) = self.sqrt_a(temperature_k);
        s * s
    }
}

/// The state of a mixture at one temperature and pressure.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct PrState {
    /// Compressibility factor Z = P v / (R T) of the vapour root.
    pub z: f64,
    /// Residual (departure) enthalpy H - H_ig, J/mol of mixture.
    pub residual_enthalpy_j_per_mol: f64,
}

/// Compressibility, residual enthalpy and the fugacity coefficient of every component
/// (`ln_phi`, same order as `components`) of the mixture of mole fractions `y` (normalised here;
/// amounts do as well) at `temperature_k` and `pressure_pa`. No heap allocation. An error when
/// the slices differ in length, the amounts are not positive in sum, or no vapour root exists.
pub fn evaluate(
    components: &[PrComponent],
    y: &[f64],
    temperature_k: f64,
    pressure_pa: f64,
    ln_phi: &mut [f64],
) -> Result<PrState> {
    let n = components.len();
    if y.len() != n || ln_phi.len() != n {
        return Err(Error::InvalidValue {
            field: "Peng-Robinson mixture".into(),
            value: format!(
                "{n} components, {} amounts, {} outputs",
                y.len(),
                ln_phi.len()
            ),
            reason: "one amount and one output per component are needed".into(),
        });
    }
    let t = temperature_k;
    let p = pressure_pa;
    if !(t > 0.0 && t.is_finite() && p > 0.0 && p.is_finite()) {
        return Err(Error::InvalidValue {
            field: "Peng-Robinson state".into(),
            value: format!("{t} K, {p} Pa"),
            reason: "temperature and pressure must be positive and finite".into(),
        });
    }
    let total: f64 = y.iter().sum();
    if !(total > 0.0 && total.is_finite()) {
        return Err(Error::InvalidValue {
            field: "Peng-Robinson mixture".into(),
            value: format!("{total}"),
            reason: "the amounts must have a positive, finite sum".into(),
        });
    }
    // S = sum y_i sqrt(a_i), dS/dT, b = sum y_i b_i.
    let (mut s, mut ds, mut b) = (0.0, 0.0, 0.0);
    for (c, &yi) in components.iter().zip(y) {
        let yi = yi / total;
        let (sa, dsa) = c.sqrt_a(t);
        s += yi * sa;
        ds += yi * dsa;
        b += yi * c.b;
    }
    let a = s * s;
    let da_dt = 2.0 * s * ds;
    let rt = R_GAS * t;
    let big_a = a * p / (rt * rt);
    let big_b = b * p / rt;
    let z = vapour_root(big_a, big_b).ok_or_else(|| Error::InvalidValue {
        field: "Peng-Robinson compressibility".into(),
        value: format!("A = {big_a:.6e}, B = {big_b:.6e} at {t:.2} K, {p:.0} Pa"),
        reason: "the cubic has no vapour root above B".into(),
    })?;
    let log_term = ((z + (1.0 + SQRT2) * big_b) / (z + (1.0 - SQRT2) * big_b)).ln();
    let ln_zb = (z - big_b).ln();
    let f = big_a / (2.0 * SQRT2 * big_b) * log_term;
    for (c, out) in components.iter().zip(ln_phi.iter_mut()) {
        let (sa, _) = c.sqrt_a(t);
        let br = c.b / b;
        *out = br * (z - 1.0) - ln_zb - f * (2.0 * sa / s - br);
    }
    let h_res = rt * (z - 1.0) + (t * da_dt - a) / (2.0 * SQRT2 * b) * log_term;
    Ok(PrState {
        z,
        residual_enthalpy_j_per_mol: h_res,
    })
}

/// The largest real root of Z^3 - (1 - B) Z^2 + (A - 3B^2 - 2B) Z - (AB - B^2 - B^3) if it
/// lies above B (a physical volume), polished by Newton steps.
pub fn vapour_root(big_a: f64, big_b: f64) -> Option<f64> {
    let c2 = -(1.0 - big_b);
    let c1 = big_a - 3.0 * big_b * big_b - 2.0 * big_b;
    let c0 = -(big_a * big_b - big_b * big_b - big_b * big_b * big_b);
    // Depressed cubic Z = x - c2/3: x^3 + p x + q = 0.
    let shift = c2 / 3.0;
    let pp = c1 - c2 * c2 / 3.0;
    let qq = 2.0 * c2 * c2 * c2 / 27.0 - c2 * c1 / 3.0 + c0;
    let disc = qq * qq / 4.0 + pp * pp * pp / 27.0;
    let mut z = if disc > 0.0 {
        // One real root (Cardano).
        let sq = disc.sqrt();
        (-qq / 2.0 + sq).cbrt() + (-qq / 2.0 - sq).cbrt() - shift
    } else {
        // Three real roots; the largest is k = 0 of the trigonometric form.
        let r = (-pp / 3.0).sqrt();
        let arg = if r > 0.0 {
            (3.0 * qq / (2.0 * pp * r)).clamp(-1.0, 1.0)
        } else {
            0.0
        };
        2.0 * r * (arg.acos() / 3.0).cos() - shift
    };
    for _ in 0..3 {
        let f = ((z + c2) * z + c1) * z + c0;
        let df = (3.0 * z + 2.0 * c2) * z + c1;
        if df == 0.0 {
            break;
        }
        let step = f / df;
        z -= step;
        if step.abs() <= 1e-15 * z.abs() {
            break;
        }
    }
    (z.is_finite() && z > big_b).then_some(z)
}

/// Residual enthalpy of a whole stream, W: n (H - H_ig) of the gas of `flows` (mol/s, one per
/// database species) at `temperature_k` and `pressure_pa`, over the species present. An error
/// names a species present without critical constants. Allocates (a few short vectors): for
/// the balances of units solved as a real gas, not for a hot loop.
pub fn stream_residual_enthalpy_w(
    db: &SpeciesDb,
    flows: &[f64],
    temperature_k: f64,
    pressure_pa: f64,
) -> Result<f64> {
    let mut comps = Vec::new();
    let mut amounts = Vec::new();
    for (i, &n) in flows.iter().enumerate() {
        if n > 0.0 {
            let sp = db.by_index(i);
            let c = sp.critical.as_ref().ok_or_else(|| Error::InvalidValue {
                field: format!("critical constants of {}", sp.name),
                value: "none".into(),
                reason: "the gas model peng-robinson needs them for every species present".into(),
            })?;
            comps.push(PrComponent::new(c));
            amounts.push(n);
        }
    }
    let total: f64 = amounts.iter().sum();
    if comps.is_empty() || !(total > 0.0) {
        return Ok(0.0);
    }
    let mut ln_phi = vec![0.0; comps.len()];
    let state = evaluate(&comps, &amounts, temperature_k, pressure_pa, &mut ln_phi)?;
    Ok(total * state.residual_enthalpy_j_per_mol)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn methane() -> PrComponent {
        // Tc, Pc, omega of methane from the table of the species database.
        PrComponent::from_constants(190.6, 4_600_155.0, 0.008)
    }

    #[test]
    fn the_root_solves_the_cubic_and_tends_to_one_at_low_pressure() {
        let c = [methane()];
        let mut ln_phi = [0.0];
        let s = evaluate(&c, &[1.0], 1100.0, 1.0, &mut ln_phi).unwrap();
        // An ideal gas at 1 Pa (definition of the residual properties).
        assert!((s.z - 1.0).abs() < 1e-8 && ln_phi[0].abs() < 1e-8);
        assert!(s.residual_enthalpy_j_per_mol.abs() < 1e-4);
        for (a, b) in [(0.01, 0.005), (0.3, 0.05), (2.0, 0.1)] {
            let z = vapour_root(a, b).unwrap();
            let f = z * z * z - (1.0 - b) * z * z + (a - 3.0 * b * b - 2.0 * b) * z
                - (a * b - b * b - b * b * b);
            assert!(f.abs() < 1e-14, "{a} {b}: {f}");
        }
    }

    #[test]
    fn the_vapour_root_is_the_largest_of_three() {
        // Pure water at 400 K and 2 bar (below its vapour pressure curve only as a liquid at
        // higher pressure): three real roots; the vapour one is near 1.
        let water = [PrComponent::from_constants(647.3, 22_048_321.0, 0.344)];
        let mut ln_phi = [0.0];
        let s = evaluate(&water, &[1.0], 400.0, 2.0e5, &mut ln_phi).unwrap();
        assert!(s.z > 0.9 && s.z < 1.0, "{}", s.z);
    }

    #[test]
    fn fugacity_coefficients_are_the_derivatives_of_the_mixture_value() {
        // ln phi_i is the partial molar quantity of n ln phi_mix: d(sum n_k ln phi_k)/dn_i =
        // ln phi_i (thermodynamic identity), by central differences.
        let comps = [
            methane(),
            PrComponent::from_constants(647.3, 22_048_321.0, 0.344),
            PrComponent::from_constants(33.2, 1_296_960.0, -0.22),
        ];
        let n = [0.2, 0.5, 1.3];
        let (t, p) = (500.0, 3.0e6);
        let mut ln_phi = [0.0; 3];
        evaluate(&comps, &n, t, p, &mut ln_phi).unwrap();
        // n ln phi of the mixture = sum n_i ln phi_i.
        let g_res = |n: &[f64]| {
            let mut lp = [0.0; 3];
            evaluate(&comps, n, t, p, &mut lp).unwrap();
            n.iter().zip(&lp).map(|(a, b)| a * b).sum::<f64>()
        };
        for i in 0..3 {
            let h = 1e-5;
            let mut up = n;
            up[i] += h;
            let mut dn = n;
            dn[i] -= h;
            let d = (g_res(&up) - g_res(&dn)) / (2.0 * h);
            assert!((d - ln_phi[i]).abs() < 1e-7, "{i}: {d} vs {}", ln_phi[i]);
        }
    }

    #[test]
    fn residual_enthalpy_is_the_temperature_derivative_of_ln_phi() {
        // H_res / (R T^2) = -d(ln phi_mix)/dT at fixed P and composition (thermodynamic
        // identity).
        let comps = [
            methane(),
            PrComponent::from_constants(304.2, 7_376_460.0, 0.2252),
        ];
        let y = [0.6, 0.4];
        let (t, p) = (600.0, 4.0e6);
        let mix = |t: f64| {
            let mut lp = [0.0; 2];
            evaluate(&comps, &y, t, p, &mut lp).unwrap();
            y[0] * lp[0] + y[1] * lp[1]
        };
        let mut lp = [0.0; 2];
        let s = evaluate(&comps, &y, t, p, &mut lp).unwrap();
        let h = 1e-3;
        let d = (mix(t + h) - mix(t - h)) / (2.0 * h);
        let expected = -d * R_GAS * t * t;
        assert!(
            (s.residual_enthalpy_j_per_mol - expected).abs() < 1e-5 * expected.abs(),
            "{} vs {expected}",
            s.residual_enthalpy_j_per_mol
        );
    }

    #[test]
    fn bad_input_is_an_error() {
        let c = [methane()];
        let mut ln_phi = [0.0];
        assert!(evaluate(&c, &[0.0], 500.0, 1e5, &mut ln_phi).is_err());
        assert!(evaluate(&c, &[1.0], -1.0, 1e5, &mut ln_phi).is_err());
        assert!(evaluate(&c, &[1.0, 1.0], 500.0, 1e5, &mut ln_phi).is_err());
    }
}

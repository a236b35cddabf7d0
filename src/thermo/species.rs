//! Species records and their NASA 7-coefficient polynomials.
//!
//! The polynomial form is that of the NASA Glenn thermodynamic database (McBride, Zehe & Gordon,
//! NASA/TP-2002-211556, and the older 7-term form of NASA TM-4513, McBride, Gordon & Reno 1993):
//!
//! ```text
//! Cp/R   = a1 + a2 T + a3 T^2 + a4 T^3 + a5 T^4
//! H/(RT) = a1 + a2 T/2 + a3 T^2/3 + a4 T^3/4 + a5 T^4/5 + a6/T
//! S/R    = a1 ln T + a2 T + a3 T^2/2 + a4 T^3/3 + a5 T^4/4 + a7
//! ```
//!
//! with one set of coefficients below the break temperature and one above. H includes the
//! formation enthalpy at 298.15 K; the standard-state pressure is 1 bar. Properties outside a
//! record's temperature range are an error, never a silent extrapolation.

use crate::error::{Error, Result};
use crate::quantity::R_GAS;

/// Phase of a species record.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Phase {
    /// Ideal gas.
    Gas,
    /// Pure solid (activity one), e.g. graphite.
    Solid,
}

/// Two-range NASA 7-coefficient polynomial.
#[derive(Debug, Clone, PartialEq)]
pub struct Nasa7 {
    /// Lowest valid temperature, K.
    pub t_min_k: f64,
    /// Break temperature between the two ranges, K.
    pub t_mid_k: f64,
    /// Highest valid temperature, K.
    pub t_max_k: f64,
    /// Coefficients a1..a7 for t_min..t_mid.
    pub low: [f64; 7],
    /// Coefficients a1..a7 for t_mid..t_max.
    pub high: [f64; 7],
}

impl Nasa7 {
    #[inline]
    fn coefficients(&self, t: f64) -> &[f64; 7] {
        if t < self.t_mid_k {
            &self.low
        } else {
            &self.high
        }
    }

    /// True when `t` (K) is inside the valid range of the record.
    #[inline]
    pub fn in_range(&self, t: f64) -> bool {
        t >= self.t_min_k && t <= self.t_max_k
    }

    /// Cp/R at `t` K (no range check).
    #[inline]
    pub fn cp_r(&self, t: f64) -> f64 {
        let a = self.coefficients(t);
        a[0] + t * (a[1] + t * (a[2] + t * (a[3] + t * a[4])))
    }

    /// H/(RT) at `t` K (no range check).
    #[inline]
    pub fn h_rt(&self, t: f64) -> f64 {
        let a = self.coefficients(t);
        h_polynomial(a, t) + a[5] / t
    }

    /// H/(RT) at `t` K with 1/t given (no division; no range check).
    #[inline]
    pub fn h_rt_with_inverse(&self, t: f64, inv_t: f64) -> f64 {
        let a = self.coefficients(t);
        h_polynomial(a, t) + a[5] * inv_t
    }

    /// H/(RT) and G/(RT) at `t` K with ln(t) and 1/t given (one selection of the coefficients
    /// and no division: a stage takes both for every species at each temperature it visits).
    #[inline]
    pub fn h_rt_and_g_rt(&self, t: f64, ln_t: f64, inv_t: f64) -> (f64, f64) {
        let a = self.coefficients(t);
        let a5_t = a[5] * inv_t;
        (
            h_polynomial(a, t) + a5_t,
            g_polynomial(a, t, ln_t) + a5_t - a[6],
        )
    }

    /// S/R at `t` K and the standard pressure (no range check).
    #[inline]
    pub fn s_r(&self, t: f64) -> f64 {
        let a = self.coefficients(t);
        a[0] * t.ln() + t * (a[1] + t * (a[2] / 2.0 + t * (a[3] / 3.0 + t * a[4] / 4.0))) + a[6]
    }

    /// G/(RT) = H/(RT) - S/R at `t` K and the standard pressure (no range check).
    #[inline]
    pub fn g_rt(&self, t: f64) -> f64 {
        self.g_rt_ln(t, t.ln())
    }

    /// G/(RT) at `t` K with `ln_t` = ln(t) given, so that a loop over species at one
    /// temperature takes the logarithm once (the same value as [`Nasa7::g_rt`], bit for bit).
    #[inline]
    pub fn g_rt_ln(&self, t: f64, ln_t: f64) -> f64 {
        let a = self.coefficients(t);
        g_polynomial(a, t, ln_t) + a[5] / t - a[6]
    }
}

/// H/(RT) of the NASA form less its a6/T term: a1 + a2 T/2 + a3 T^2/3 + a4 T^3/4 + a5 T^4/5
/// (McBride, Zehe & Gordon, NASA/TP-2002-211556), with constant reciprocals rather than
/// divisions (a stage evaluates these a few dozen times a solve).
#[inline]
fn h_polynomial(a: &[f64; 7], t: f64) -> f64 {
    const THIRD: f64 = 1.0 / 3.0;
    const FIFTH: f64 = 1.0 / 5.0;
    a[0] + t * (a[1] * 0.5 + t * (a[2] * THIRD + t * (a[3] * 0.25 + t * (a[4] * FIFTH))))
}

/// G/(RT) of the NASA form less its a6/T - a7 terms: a1 (1 - ln T) - a2 T/2 - a3 T^2/6
/// - a4 T^3/12 - a5 T^4/20.
#[inline]
fn g_polynomial(a: &[f64; 7], t: f64, ln_t: f64) -> f64 {
    const SIXTH: f64 = 1.0 / 6.0;
    const TWELFTH: f64 = 1.0 / 12.0;
    const TWENTIETH: f64 = 1.0 / 20.0;
    a[0] * (1.0 - ln_t)
        - t * (a[1] * 0.5 + t * (a[2] * SIXTH + t * (a[3] * TWELFTH + t * (a[4] * TWENTIETH))))
}

/// One species: identity, composition and thermochemistry.
#[derive(Debug, Clone)]
pub struct Species {
    /// Identifier used in flowsheets and reports (e.g. `CH4`, `n-C4H10`, `C(gr)`).
    pub name: String,
    /// Plain-language description ("methane").
    pub description: String,
    /// Chemical formula as written in the record.
    pub formula: String,
    /// Atoms per molecule, by element symbol, sorted by symbol.
    pub elements: Vec<(String, f64)>,
    /// Gas or solid.
    pub phase: Phase,
    /// Molar mass, kg/mol.
    pub molar_mass_kg_per_mol: f64,
    /// Where the record comes from.
    pub source: String,
    /// Critical constants for the Peng-Robinson gas model; `None` when the record gives none
    /// (the species then cannot take part in a Peng-Robinson stage).
    pub critical: Option<Critical>,
    /// NASA 7-coefficient polynomial.
    pub nasa7: Nasa7,
}

/// Critical temperature, critical pressure and acentric factor of a gas species, with the
/// published table they come from.
#[derive(Debug, Clone, PartialEq)]
pub struct Critical {
    /// Critical temperature, K.
    pub temperature_k: f64,
    /// Critical pressure, Pa.
    pub pressure_pa: f64,
    /// Acentric factor (Pitzer), dimensionless.
    pub acentric_factor: f64,
    /// Where the three values come from.
    pub source: String,
}

impl Species {
    /// Error unless `t` (K) is inside the record's range.
    pub fn check_range(&self, temperature_k: f64) -> Result<()> {
        if self.nasa7.in_range(temperature_k) {
            Ok(())
        } else {
            Err(Error::OutOfRange {
                species: self.name.clone(),
                temperature_k,
                min_k: self.nasa7.t_min_k,
                max_k: self.nasa7.t_max_k,
            })
        }
    }

    /// Standard molar heat capacity, J/(mol K).
    pub fn cp(&self, temperature_k: f64) -> Result<f64> {
        self.check_range(temperature_k)?;
        Ok(R_GAS * self.nasa7.cp_r(temperature_k))
    }

    /// Standard molar enthalpy including the formation enthalpy at 298.15 K, J/mol.
    pub fn enthalpy(&self, temperature_k: f64) -> Result<f64> {
        self.check_range(temperature_k)?;
        Ok(R_GAS * temperature_k * self.nasa7.h_rt(temperature_k))
    }

    /// Standard molar entropy at 1 bar, J/(mol K).
    pub fn entropy(&self, temperature_k: f64) -> Result<f64> {
        self.check_range(temperature_k)?;
        Ok(R_GAS * self.nasa7.s_r(temperature_k))
    }

    /// Standard molar Gibbs energy G = H - T S at 1 bar, J/mol.
    pub fn gibbs(&self, temperature_k: f64) -> Result<f64> {
        self.check_range(temperature_k)?;
        Ok(R_GAS * temperature_k * self.nasa7.g_rt(temperature_k))
    }

    /// Atoms of `element` per molecule (zero if absent).
    pub fn atoms(&self, element: &str) -> f64 {
        self.elements
            .iter()
            .find(|(e, _)| e == element)
            .map_or(0.0, |(_, n)| *n)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn constant_cp(cp_r: f64, h298: f64, s298: f64) -> Nasa7 {
        // Cp constant: H = Cp (T - 298.15) + h298, S = Cp ln(T/298.15) + s298
        let t0 = 298.15;
        let a6 = h298 / R_GAS - cp_r * t0;
        let a7 = s298 / R_GAS - cp_r * t0.ln();
        let c = [cp_r, 0.0, 0.0, 0.0, 0.0, a6, a7];
        Nasa7 {
            t_min_k: 200.0,
            t_mid_k: 1000.0,
            t_max_k: 3000.0,
            low: c,
            high: c,
        }
    }

    #[test]
    fn polynomial_forms_are_consistent() {
        // Analytic identities of the NASA form (McBride, Zehe & Gordon 2002): G = H - TS and
        // dH/dT = Cp; checked on an arbitrary coefficient set by finite differences.
        let n = Nasa7 {
            t_min_k: 200.0,
            t_mid_k: 1000.0,
            t_max_k: 3500.0,
            low: [3.5, 1e-3, -2e-6, 1.5e-9, -4e-13, -1.0e4, 2.0],
            high: [3.5, 1e-3, -2e-6, 1.5e-9, -4e-13, -1.0e4, 2.0],
        };
        for t in [300.0, 700.0, 1500.0] {
            assert!((n.g_rt(t) - (n.h_rt(t) - n.s_r(t))).abs() < 1e-12);
            let d = 1e-3;
            let dh = ((t + d) * n.h_rt(t + d) - (t - d) * n.h_rt(t - d)) / (2.0 * d);
            assert!((dh - n.cp_r(t)).abs() < 1e-6);
            let ds = (n.s_r(t + d) - n.s_r(t - d)) / (2.0 * d);
            assert!((ds - n.cp_r(t) / t).abs() < 1e-8);
        }
    }

    #[test]
    fn out_of_range_is_an_error() {
        let s = Species {
            name: "X".into(),
            description: String::new(),
            formula: "X".into(),
            elements: vec![],
            phase: Phase::Gas,
            molar_mass_kg_per_mol: 0.01,
            source: String::new(),
            critical: None,
            nasa7: constant_cp(3.5, 0.0, 130.0),
        };
        assert!(s.cp(150.0).is_err());
        assert!(s.enthalpy(3500.0).is_err());
        // Constant-Cp record: H(298.15) is the anchor exactly.
        assert!((s.enthalpy(298.15).unwrap()).abs() < 1e-9);
        assert!((s.entropy(298.15).unwrap() - 130.0).abs() < 1e-9);
    }
}

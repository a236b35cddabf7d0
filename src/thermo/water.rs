//! Saturation line of water: IAPWS-IF97 Region 4.
//!
//! The saturation pressure of water as a function of temperature, and its inverse, from the
//! Industrial Formulation 1997 for the Thermodynamic Properties of Water and Steam (IAPWS-IF97),
//! as revised in IAPWS R7-97(2012), Section 8 "Equations for Region 4":
//! - eq. (30), the basic equation p_s(T), with the auxiliary variable θ of eq. (29b);
//! - eq. (31), the backward equation T_s(p), with the auxiliary variable β of eq. (29a).
//!
//! Both come from the implicit quadratic eq. (28) with the ten coefficients n1..n10 of Table 34;
//! eq. (31) is its exact inverse, so the round trip p_s(T_s(p)) is consistent to rounding.
//! Both are valid along the whole vapour-liquid line from 273.15 K to the critical point
//! (647.096 K, 22.064 MPa, the critical-point constants of IAPWS-IF97). Outside that range water
//! has no saturation state in this formulation, and the functions return `Error::InvalidValue`
//! rather than extrapolate.
//!
//! In a steam-reforming train this sets the steam drum and waste-heat boiler pressure from the
//! boiling temperature and back, and the dew point of process water.

use crate::error::{Error, Result};

/// Critical temperature of water, K (IAPWS-IF97 critical-point constant).
pub const CRITICAL_TEMPERATURE_K: f64 = 647.096;
/// Critical pressure of water, Pa (IAPWS-IF97 critical-point constant, 22.064 MPa).
pub const CRITICAL_PRESSURE_PA: f64 = 22.064e6;
/// Lowest temperature of the IAPWS-IF97 saturation line, K.
pub const SATURATION_MIN_TEMPERATURE_K: f64 = 273.15;
/// Lowest pressure of the IAPWS-IF97 saturation line, Pa: eq. (30) at 273.15 K is
/// 611.212677 Pa, which IAPWS-IF97 quotes rounded as 611.213 Pa. The unrounded value is the
/// bound here, so that the saturation pressure at 273.15 K is itself accepted by
/// [`saturation_temperature_k`].
pub const SATURATION_MIN_PRESSURE_PA: f64 = 611.212677;

/// Coefficients n1..n10 of eqs. (28) to (31), IAPWS-IF97 Table 34.
const N: [f64; 10] = [
    0.116_705_214_527_67e4,
    -0.724_213_167_032_06e6,
    -0.170_738_469_400_92e2,
    0.120_208_247_024_70e5,
    -0.323_255_503_223_33e7,
    0.149_151_086_135_30e2,
    -0.482_326_573_615_91e4,
    0.405_113_405_420_57e6,
    -0.238_555_575_678_49,
    0.650_175_348_447_98e3,
];

/// Reference temperature T* of eqs. (29b) and (31), K.
const T_STAR_K: f64 = 1.0;
/// Reference pressure p* of eqs. (29a) and (30), Pa (1 MPa).
const P_STAR_PA: f64 = 1.0e6;

/// Saturation pressure of water, Pa, for 273.15 K <= T <= 647.096 K (IAPWS-IF97 eq. 30).
///
/// Returns `Error::InvalidValue` (field "temperature") outside that range or for a value that is
/// not a number.
pub fn saturation_pressure_pa(temperature_k: f64) -> Result<f64> {
    if !(SATURATION_MIN_TEMPERATURE_K..=CRITICAL_TEMPERATURE_K).contains(&temperature_k) {
        return Err(Error::InvalidValue {
            field: "temperature".to_string(),
            value: format!("{temperature_k} K"),
            reason: format!(
                "the saturation line of water (IAPWS-IF97 Region 4) runs from \
                 {SATURATION_MIN_TEMPERATURE_K} K to the critical temperature \
                 {CRITICAL_TEMPERATURE_K} K (0 to 373.946 degC); give a temperature in that range"
            ),
        });
    }
    let [n1, n2, n3, n4, n5, n6, n7, n8, n9, n10] = N;
    let t = temperature_k / T_STAR_K;
    // Eq. (29b).
    let theta = t + n9 / (t - n10);
    let theta2 = theta * theta;
    let a = theta2 + n1 * theta + n2;
    let b = n3 * theta2 + n4 * theta + n5;
    let c = n6 * theta2 + n7 * theta + n8;
    // Eq. (30).
    let ratio = 2.0 * c / (-b + (b * b - 4.0 * a * c).sqrt());
    Ok(ratio.powi(4) * P_STAR_PA)
}

/// Saturation temperature, K, for 611.213 Pa <= p <= 22.064 MPa (IAPWS-IF97 eq. 31).
///
/// The lower bound is taken unrounded, 611.212677 Pa (see [`SATURATION_MIN_PRESSURE_PA`]).
/// Returns `Error::InvalidValue` (field "pressure") outside that range or for a value that is not
/// a number.
pub fn saturation_temperature_k(pressure_pa: f64) -> Result<f64> {
    if !(SATURATION_MIN_PRESSURE_PA..=CRITICAL_PRESSURE_PA).contains(&pressure_pa) {
        return Err(Error::InvalidValue {
            field: "pressure".to_string(),
            value: format!("{pressure_pa} Pa"),
            reason: format!(
                "the saturation line of water (IAPWS-IF97 Region 4) runs from 611.213 Pa \
                 (at 273.15 K) to the critical pressure {} MPa; give an absolute pressure \
                 in that range",
                CRITICAL_PRESSURE_PA / 1.0e6
            ),
        });
    }
    let [n1, n2, n3, n4, n5, n6, n7, n8, n9, n10] = N;
    // Eq. (29a).
    let beta = (pressure_pa / P_STAR_PA).powf(0.25);
    let beta2 = beta * beta;
    let e = beta2 + n3 * beta + n6;
    let f = n1 * beta2 + n4 * beta + n7;
    let g = n2 * beta2 + n5 * beta + n8;
    let d = 2.0 * g / (-f - (f * f - 4.0 * e * g).sqrt());
    // Eq. (31).
    let sum = n10 + d;
    Ok((sum - (sum * sum - 4.0 * (n9 + n10 * d)).sqrt()) / 2.0 * T_STAR_K)
}

/// Enthalpies of saturated water and steam and the latent heat of vaporisation, from the
/// auxiliary equations of the IAPWS Revised Supplementary Release on Saturation Properties of
/// Ordinary Water Substance (IAPWS SR1-86(1992); Wagner & Pruss, J. Phys. Chem. Ref. Data 22,
/// 783 (1993)): vapour pressure (eq. 1), saturated liquid and vapour densities (eqs. 2 and 3),
/// the auxiliary quantity alpha (eq. 4), and h' = alpha + (T/rho') dp/dT, h'' = alpha +
/// (T/rho'') dp/dT (eqs. 6 and 7, from the Clapeyron relation). The latent heat is
/// h'' - h' = T dp/dT (1/rho'' - 1/rho'), in which alpha cancels. Valid from the triple point
/// (273.16 K) to the critical point (647.096 K); enthalpies are on the IAPWS reference (internal
/// energy and entropy of the saturated liquid zero at the triple point).
mod saturation_enthalpy {
    use crate::error::{Error, Result};

    /// Triple-point temperature, K (IAPWS SR1-86).
    const TRIPLE_K: f64 = 273.16;
    /// Critical temperature, K (IAPWS SR1-86).
    const CRITICAL_K: f64 = 647.096;
    /// Critical pressure, Pa (IAPWS SR1-86, 22.064 MPa).
    const CRITICAL_PA: f64 = 22.064e6;
    /// Critical density, kg/m3 (IAPWS SR1-86).
    const CRITICAL_DENSITY: f64 = 322.0;
    /// Molar mass of ordinary water, kg/mol (IAPWS, 18.015268 g/mol).
    const MOLAR_MASS: f64 = 0.018_015_268;
    /// Reference alpha0 of eq. (4), J/kg.
    const ALPHA0: f64 = 1000.0;

    /// Eq. (1): coefficients a1..a6 and exponents of tau.
    const A: [(f64, f64); 6] = [
        (-7.859_517_83, 1.0),
        (1.844_082_59, 1.5),
        (-11.786_649_7, 3.0),
        (22.680_741_1, 3.5),
        (-15.961_871_9, 4.0),
        (1.801_225_02, 7.5),
    ];
    /// Eq. (2): coefficients b1..b6 and exponents of tau.
    const B: [(f64, f64); 6] = [
        (1.992_740_64, 1.0 / 3.0),
        (1.099_653_42, 2.0 / 3.0),
        (-0.510_839_303, 5.0 / 3.0),
        (-1.754_934_79, 16.0 / 3.0),
        (-45.517_035_2, 43.0 / 3.0),
        (-6.746_944_50e5, 110.0 / 3.0),
    ];
    /// Eq. (3): coefficients c1..c6 and exponents of tau.
    const C: [(f64, f64); 6] = [
        (-2.031_502_40, 2.0 / 6.0),
        (-2.683_029_40, 4.0 / 6.0),
        (-5.386_264_92, 8.0 / 6.0),
        (-17.299_160_5, 18.0 / 6.0),
        (-44.758_658_1, 37.0 / 6.0),
        (-63.920_106_3, 71.0 / 6.0),
    ];
    /// Eq. (4): d_alpha, then d1..d5 with their exponents of theta.
    const D_ALPHA: f64 = -1_135.905_627_715;
    const D: [(f64, f64); 5] = [
        (-5.651_349_98e-8, -19.0),
        (2_690.666_31, 1.0),
        (127.287_297, 4.5),
        (-135.003_439, 5.0),
        (0.981_825_814, 54.5),
    ];

    fn check(temperature_k: f64) -> Result<()> {
        if (TRIPLE_K..=CRITICAL_K).contains(&temperature_k) {
            Ok(())
        } else {
            Err(Error::InvalidValue {
                field: "temperature".to_string(),
                value: format!("{temperature_k} K"),
                reason: format!(
                    "saturated water and steam exist from the triple point {TRIPLE_K} K to the \
                     critical temperature {CRITICAL_K} K (0.01 to 373.946 degC); give a \
                     temperature in that range"
                ),
            })
        }
    }

    /// (p_sat in Pa, dp_sat/dT in Pa/K), eq. (1) and its derivative.
    fn pressure_and_slope(t: f64) -> (f64, f64) {
        let tau = 1.0 - t / CRITICAL_K;
        let (mut s, mut ds) = (0.0, 0.0);
        for (a, e) in A {
            s += a * tau.powf(e);
            ds += a * e * tau.powf(e - 1.0);
        }
        let p = CRITICAL_PA * (CRITICAL_K / t * s).exp();
        // d/dT [(Tc/T) S(tau)] with dtau/dT = -1/Tc.
        let dlnp_dt = -CRITICAL_K / (t * t) * s - ds / t;
        (p, p * dlnp_dt)
    }

    fn liquid_density(t: f64) -> f64 {
        let tau = 1.0 - t / CRITICAL_K;
        CRITICAL_DENSITY * (1.0 + B.iter().map(|(b, e)| b * tau.powf(*e)).sum::<f64>())
    }

    fn vapour_density(t: f64) -> f64 {
        let tau = 1.0 - t / CRITICAL_K;
        CRITICAL_DENSITY * C.iter().map(|(c, e)| c * tau.powf(*e)).sum::<f64>().exp()
    }

    fn alpha(t: f64) -> f64 {
        let theta = t / CRITICAL_K;
        ALPHA0 * (D_ALPHA + D.iter().map(|(d, e)| d * theta.powf(*e)).sum::<f64>())
    }

    /// Specific enthalpy of saturated liquid water h', J/kg, for 273.16-647.096 K (IAPWS
    /// SR1-86(1992) eq. 6; zero internal energy and entropy of the liquid at the triple point).
    pub fn saturated_liquid_enthalpy_j_per_kg(temperature_k: f64) -> Result<f64> {
        check(temperature_k)?;
        let (_, slope) = pressure_and_slope(temperature_k);
        Ok(alpha(temperature_k) + temperature_k / liquid_density(temperature_k) * slope)
    }

    /// Specific enthalpy of saturated steam h'', J/kg, for 273.16-647.096 K (IAPWS
    /// SR1-86(1992) eq. 7, same reference as the liquid).
    pub fn saturated_vapour_enthalpy_j_per_kg(temperature_k: f64) -> Result<f64> {
        check(temperature_k)?;
        let (_, slope) = pressure_and_slope(temperature_k);
        Ok(alpha(temperature_k) + temperature_k / vapour_density(temperature_k) * slope)
    }

    /// Latent heat of vaporisation h'' - h', J/kg, for 273.16-647.096 K (IAPWS SR1-86(1992),
    /// Clapeyron: T dp/dT (1/rho'' - 1/rho')); zero at the critical point.
    pub fn latent_heat_j_per_kg(temperature_k: f64) -> Result<f64> {
        check(temperature_k)?;
        let (_, slope) = pressure_and_slope(temperature_k);
        let dv = 1.0 / vapour_density(temperature_k) - 1.0 / liquid_density(temperature_k);
        Ok((temperature_k * slope * dv).max(0.0))
    }

    /// Molar latent heat of vaporisation, J/mol, for 273.16-647.096 K (IAPWS SR1-86(1992); molar
    /// mass 18.015268 g/mol). Returns `Error::InvalidValue` (field "temperature") outside that
    /// range.
    pub fn latent_heat_j_per_mol(temperature_k: f64) -> Result<f64> {
        Ok(latent_heat_j_per_kg(temperature_k)? * MOLAR_MASS)
    }

    #[cfg(test)]
    mod tests {
        use super::*;

        fn assert_relative(actual: f64, expected: f64, tolerance: f64, what: &str) {
            let relative = ((actual - expected) / expected).abs();
            assert!(
                relative <= tolerance,
                "{what}: got {actual:.12e}, expected {expected:.12e}, relative {relative:.3e}"
            );
        }

        #[test]
        fn auxiliary_equations_match_the_iapws_package() {
            // PyPI iapws 1.5.5, IAPWS95._Liquid_Enthalpy(T), IAPWS95._Vapor_Enthalpy(T) in kJ/kg:
            // the same SR1-86(1992) auxiliary equations, computed apart.
            let cases = [
                (273.16, 0.000_611_786_157_633_707_8, 2_500.538_604_506_273_3),
                (298.15, 104.828_030_853_242_99, 2_546.721_538_211_788),
                (373.15, 419.162_834_831_931_55, 2_675.760_469_758_062_8),
                (423.15, 632.147_354_710_031_5, 2_746.047_455_100_035),
                (473.15, 852.174_495_616_943_1, 2_791.951_645_336_269_4),
                (523.15, 1_085.612_494_175_096_8, 2_800.855_106_480_844_4),
                (573.15, 1_344.771_962_580_985, 2_749.330_032_755_661_7),
                (623.15, 1_670.960_582_894_588, 2_563.990_191_769_576),
                (640.0, 1_841.184_198_879_653_4, 2_394.683_648_876_21),
                (647.0, 2_030.864_294_471_334_5, 2_148.680_264_097_699),
            ];
            for (t, h_liquid, h_vapour) in cases {
                let hl = saturated_liquid_enthalpy_j_per_kg(t).unwrap();
                let hv = saturated_vapour_enthalpy_j_per_kg(t).unwrap();
                // h' is tiny at the triple point: compare it absolutely there (J/kg).
                assert!(
                    (hl - h_liquid * 1e3).abs() <= 1e-9 * 1e3 * h_vapour,
                    "h'({t} K)"
                );
                assert_relative(hv, h_vapour * 1e3, 1e-9, &format!("h''({t} K)"));
                let l = latent_heat_j_per_kg(t).unwrap();
                assert_relative(l, (h_vapour - h_liquid) * 1e3, 1e-9, &format!("L({t} K)"));
            }
        }

        #[test]
        fn latent_heat_matches_iapws_97() {
            // PyPI iapws 1.5.5, IAPWS97(T=..., x=1).h - IAPWS97(T=..., x=0).h in kJ/kg (the
            // industrial formulation, Regions 1, 2 and 4); the auxiliary equations agree to
            // 0.05 % or better here (measured), checked at 0.2 %.
            let cases = [
                (273.16, 2_500.910_382_856_415_7),
                (298.15, 2_441.705_672_938_702),
                (373.15, 2_256.472_874_223_13),
                (423.15, 2_113.667_582_474_519_3),
                (473.15, 1_939.668_495_928_860_5),
                (523.15, 1_715.325_257_721_524_2),
                (573.15, 1_404.802_403_524_243_6),
                (623.15, 892.733_785_613_828_6),
            ];
            for (t, l_kj_kg) in cases {
                let l = latent_heat_j_per_mol(t).unwrap();
                assert_relative(l, l_kj_kg * 1e3 * MOLAR_MASS, 2e-3, &format!("L({t} K)"));
            }
        }

        #[test]
        fn latent_heat_matches_iapws_95() {
            // PyPI iapws 1.5.5, IAPWS95(T=..., x=1).h - IAPWS95(T=..., x=0).h in kJ/kg (the
            // scientific formulation); agreement 0.05 % or better (measured), checked at 0.1 %.
            let cases = [
                (273.16, 2_500.914_579_683_874),
                (300.0, 2_437.289_241_241_198),
                (373.15, 2_256.403_721_526_581_6),
                (473.15, 1_939.735_728_166_521_8),
                (573.15, 1_404.630_834_984_135),
                (640.0, 553.732_051_276_230_3),
            ];
            for (t, l_kj_kg) in cases {
                let l = latent_heat_j_per_kg(t).unwrap();
                assert_relative(l, l_kj_kg * 1e3, 1e-3, &format!("L({t} K)"));
            }
        }

        #[test]
        fn ends_and_outside_of_the_line() {
            // At the critical point the liquid and vapour densities meet: no latent heat.
            assert!(latent_heat_j_per_mol(CRITICAL_K).unwrap().abs() < 1e-6);
            assert!(latent_heat_j_per_mol(TRIPLE_K).unwrap() > 45_000.0);
            for t in [273.15, 200.0, 647.1, 1000.0, f64::NAN] {
                match latent_heat_j_per_mol(t) {
                    Err(Error::InvalidValue { field, reason, .. }) => {
                        assert_eq!(field, "temperature");
                        assert!(reason.contains("273.16 K") && reason.contains("647.096 K"));
                    }
                    other => panic!("{t} K: expected InvalidValue, got {other:?}"),
                }
            }
        }
    }
}

/// Triple-point temperature of water, K (IAPWS): the lowest temperature at which liquid water
/// is handled (the latent-heat equations start there).
pub const TRIPLE_POINT_TEMPERATURE_K: f64 = 273.16;

/// True when pure water at `temperature_k` and `pressure_pa` is liquid, by the IAPWS-IF97
/// saturation line: liquid strictly below the saturation temperature T_s(p) of eq. (31), steam
/// at or above it (at exactly T_s(p) the water is taken as saturated steam).
///
/// Below the lowest pressure of the line (611.213 Pa) water is vapour. Above the critical
/// pressure it is taken as vapour at or above the critical temperature (the ideal-gas model,
/// as for superheated steam); below the critical temperature it would be compressed liquid
/// beyond the saturation line, which is not modelled, and that is an error. Liquid water below
/// the triple point (0.01 degC) would freeze: an error too.
pub fn is_liquid(temperature_k: f64, pressure_pa: f64) -> Result<bool> {
    if !(temperature_k.is_finite() && temperature_k > 0.0) {
        return Err(Error::InvalidValue {
            field: "temperature".to_string(),
            value: format!("{temperature_k} K"),
            reason: "give a positive absolute temperature".to_string(),
        });
    }
    if !(pressure_pa.is_finite() && pressure_pa > 0.0) {
        return Err(Error::InvalidValue {
            field: "pressure".to_string(),
            value: format!("{pressure_pa} Pa"),
            reason: "give a positive absolute pressure".to_string(),
        });
    }
    if pressure_pa < SATURATION_MIN_PRESSURE_PA {
        return Ok(false);
    }
    if pressure_pa > CRITICAL_PRESSURE_PA {
        if temperature_k >= CRITICAL_TEMPERATURE_K {
            return Ok(false);
        }
        return Err(Error::InvalidValue {
            field: "pressure".to_string(),
            value: format!("{:.4} bar", pressure_pa / 1e5),
            reason: format!(
                "water at {:.2} degC above the critical pressure {:.2} bar is compressed liquid \
                 beyond the saturation line, which the water model (IAPWS-IF97 saturation line \
                 and latent heat) does not cover; give a pressure below the critical pressure \
                 or a temperature above the critical temperature {:.3} degC",
                temperature_k - 273.15,
                CRITICAL_PRESSURE_PA / 1e5,
                CRITICAL_TEMPERATURE_K - 273.15
            ),
        });
    }
    let saturation_k = saturation_temperature_k(pressure_pa)?;
    if temperature_k >= saturation_k {
        return Ok(false);
    }
    if temperature_k < TRIPLE_POINT_TEMPERATURE_K {
        return Err(Error::InvalidValue {
            field: "temperature".to_string(),
            value: format!("{:.2} degC", temperature_k - 273.15),
            reason: "liquid water below its triple point (0.01 degC) would freeze; give a \
                     temperature of at least 0.01 degC"
                .to_string(),
        });
    }
    Ok(true)
}

/// Molar enthalpy and heat capacity of pure water, liquid or steam, J/mol and J/(mol K):
/// the ideal-gas enthalpy of the species record `water` (NASA polynomial, formation enthalpy
/// basis shared with every process gas) plus the IAPWS-IF97 departure from the ideal gas at the
/// same temperature, M_w [h_IF97(T, p) - h°_IF97(T)] ([`super::if97::departure`]: Region 1 for
/// `liquid`, Region 2 for steam; h° is the ideal-gas part of Region 2). The departure holds the
/// latent heat and the pressure effect on the liquid, and the residual enthalpy of steam at
/// pressure. The heat capacity is the derivative at constant pressure, built the same way.
///
/// Returns `Error::InvalidValue` where IF97 Regions 1 and 2 do not reach (liquid above
/// 623.15 K, steam above 1073.15 K, Region 3) or outside the record's range.
pub fn pure_water_enthalpy_and_cp(
    water: &crate::thermo::Species,
    temperature_k: f64,
    pressure_pa: f64,
    liquid: bool,
) -> Result<(f64, f64)> {
    use super::if97::{departure, Region, MOLAR_MASS_KG_PER_MOL};
    let region = if liquid {
        Region::Liquid
    } else {
        Region::Steam
    };
    let (dh, dcp) = departure(region, temperature_k, pressure_pa)?;
    let h = water.enthalpy(temperature_k)? + MOLAR_MASS_KG_PER_MOL * dh;
    let cp = water.cp(temperature_k)? + MOLAR_MASS_KG_PER_MOL * dcp;
    Ok((h, cp))
}

pub use saturation_enthalpy::{
    latent_heat_j_per_kg, latent_heat_j_per_mol, saturated_liquid_enthalpy_j_per_kg,
    saturated_vapour_enthalpy_j_per_kg,
};

#[cfg(test)]
mod tests {
    use super::*;

    fn assert_relative(actual: f64, expected: f64, tolerance: f64, what: &str) {
        let relative = ((actual - expected) / expected).abs();
        assert!(
            relative <= tolerance,
            "{what}: got {actual:.12e}, expected {expected:.12e}, relative error {relative:.3e} \
             > {tolerance:.1e}"
        );
    }

    /// The IF97 verification tables print nine significant digits, so a relative error of 1e-9
    /// is below their own rounding (up to 4e-9). Check that the value rounds to every printed
    /// digit, i.e. lies within half a unit of the ninth digit.
    fn assert_table_value(actual: f64, table: f64, what: &str) {
        let printed = format!("{table:.8e}");
        assert_eq!(format!("{actual:.8e}"), printed, "{what}: {actual:.12e}");
        let half_unit = 0.5 * 10f64.powi(table.abs().log10().floor() as i32 - 8);
        assert!(
            (actual - table).abs() <= half_unit,
            "{what}: {actual:.12e} vs {printed}"
        );
    }

    /// The reason of an InvalidValue error, after checking the field.
    fn invalid_reason(result: Result<f64>, field: &str) -> String {
        match result {
            Err(Error::InvalidValue {
                field: f, reason, ..
            }) => {
                assert_eq!(f, field);
                reason
            }
            other => panic!("expected Error::InvalidValue, got {other:?}"),
        }
    }

    #[test]
    fn saturation_pressure_matches_if97_table_35() {
        // IAPWS-IF97 (IAPWS R7-97(2012)), Table 35 verification values for eq. (30), p_s in MPa.
        let cases = [
            (300.0, 0.353_658_941e-2),
            (500.0, 0.263_889_776e1),
            (600.0, 0.123_443_146e2),
        ];
        for (t_k, p_mpa) in cases {
            let p_mpa_computed = saturation_pressure_pa(t_k).unwrap() / 1.0e6;
            assert_table_value(p_mpa_computed, p_mpa, &format!("p_s({t_k} K), MPa"));
        }
    }

    #[test]
    fn saturation_temperature_matches_if97_table_36() {
        // IAPWS-IF97 (IAPWS R7-97(2012)), Table 36 verification values for eq. (31), T_s in K.
        let cases = [
            (0.1, 0.372_755_919e3),
            (1.0, 0.453_035_632e3),
            (10.0, 0.584_149_488e3),
        ];
        for (p_mpa, t_k) in cases {
            let t = saturation_temperature_k(p_mpa * 1.0e6).unwrap();
            assert_table_value(t, t_k, &format!("T_s({p_mpa} MPa), K"));
        }
    }

    #[test]
    fn saturation_pressure_matches_iapws_package() {
        // PyPI iapws 1.5.5, IAPWS97(T=..., x=0).P in MPa (the same eq. (30), computed apart).
        let cases = [
            (273.16, 0.000_611_657_000_010_665_3),
            (298.15, 0.003_169_746_854_952_362_6),
            (373.15, 0.101_417_977_921_310_13),
            (423.15, 0.476_101_381_081_492),
            (473.15, 1.554_671_868_269_825_3),
            (523.15, 3.975_939_070_835_327_3),
            (573.15, 8.587_708_329_557_278),
            (623.15, 16.529_164_252_604_478),
        ];
        for (t_k, p_mpa) in cases {
            let p = saturation_pressure_pa(t_k).unwrap();
            assert_relative(p, p_mpa * 1.0e6, 1e-12, &format!("p_s({t_k} K)"));
        }
    }

    #[test]
    fn saturation_temperature_matches_iapws_package() {
        // PyPI iapws 1.5.5, IAPWS97(P=..., x=0).T in K, with P in MPa (the same eq. (31)).
        let cases = [
            (0.001, 280.119_632_412_561_03),
            (0.101_325, 373.124_300_000_480_56),
            (0.5, 424.986_243_876_845_1),
            (2.0, 485.534_535_318_490_5),
            (3.0, 507.008_445_006_252_2),
            (5.0, 537.092_871_186_330_2),
            (15.0, 615.307_871_248_982_1),
            (20.0, 638.895_911_545_705_1),
            (22.0, 646.856_565_224_764_5),
        ];
        for (p_mpa, t_k) in cases {
            let t = saturation_temperature_k(p_mpa * 1.0e6).unwrap();
            assert_relative(t, t_k, 1e-12, &format!("T_s({p_mpa} MPa)"));
        }
    }

    #[test]
    fn agrees_with_the_scientific_formulation_iapws_95() {
        // PyPI iapws 1.5.5, IAPWS95(T=..., x=0).P in MPa: the scientific formulation, which IF97
        // approximates; IF97 Region 4 differs from it by about 1e-4 relative here (measured).
        let pressures = [
            (300.0, 0.003_536_806_752_274_016),
            (373.15, 0.101_417_996_659_950_91),
            (500.0, 2.639_195_871_761_741),
            (600.0, 12.344_824_357_185_512),
            (640.0, 20.265_209_268_029_473),
        ];
        for (t_k, p_mpa) in pressures {
            let p = saturation_pressure_pa(t_k).unwrap();
            assert_relative(p, p_mpa * 1.0e6, 2e-4, &format!("p_s({t_k} K) vs IAPWS-95"));
        }
        // PyPI iapws 1.5.5, IAPWS95(P=..., x=0).T in K; IF97 differs by under 10 mK here.
        let temperatures = [
            (0.101_325, 373.124_296_038_756_1),
            (1.0, 453.028_007_883_499_8),
            (10.0, 584.147_140_946_733_9),
            (20.0, 638.899_241_809_126_8),
        ];
        for (p_mpa, t_k) in temperatures {
            let t = saturation_temperature_k(p_mpa * 1.0e6).unwrap();
            assert!(
                (t - t_k).abs() < 0.01,
                "T_s({p_mpa} MPa) = {t} vs IAPWS-95 {t_k}"
            );
        }
    }

    #[test]
    fn round_trip_is_consistent() {
        // Eqs. (30) and (31) both solve the quadratic eq. (28) of IAPWS-IF97, so each is the
        // exact inverse of the other and the round trip holds to rounding over the whole line.
        let steps = 400;
        for i in 0..=steps {
            let t_k = 273.15 + (647.0 - 273.15) * f64::from(i) / f64::from(steps);
            let p = saturation_pressure_pa(t_k).unwrap();
            let back = saturation_temperature_k(p).unwrap();
            assert_relative(back, t_k, 1e-12, &format!("T_s(p_s({t_k} K))"));
        }
        for p_pa in [
            611.3, 1.0e3, 1.0e4, 1.0e5, 1.0e6, 4.0e6, 1.0e7, 2.0e7, 2.2e7,
        ] {
            let t = saturation_temperature_k(p_pa).unwrap();
            let back = saturation_pressure_pa(t).unwrap();
            assert_relative(back, p_pa, 1e-11, &format!("p_s(T_s({p_pa} Pa))"));
        }
    }

    #[test]
    fn ends_of_the_line() {
        // IAPWS-IF97 eq. (30) at 273.15 K gives 611.212677 Pa (quoted there as 611.213 Pa).
        let p_min = saturation_pressure_pa(SATURATION_MIN_TEMPERATURE_K).unwrap();
        assert_relative(p_min, 611.212_677, 1e-9, "p_s(273.15 K)");
        let t_min = saturation_temperature_k(p_min).unwrap();
        assert_relative(t_min, 273.15, 1e-9, "T_s(p_s(273.15 K))");
        let t_low = saturation_temperature_k(SATURATION_MIN_PRESSURE_PA).unwrap();
        assert_relative(t_low, 273.15, 1e-9, "T_s(611.212677 Pa)");
        // IAPWS-IF97 critical-point constants: the line ends at 647.096 K and 22.064 MPa.
        let p_c = saturation_pressure_pa(CRITICAL_TEMPERATURE_K).unwrap();
        assert_relative(p_c, CRITICAL_PRESSURE_PA, 1e-9, "p_s(T_c)");
        let t_c = saturation_temperature_k(CRITICAL_PRESSURE_PA).unwrap();
        assert_relative(t_c, CRITICAL_TEMPERATURE_K, 1e-9, "T_s(p_c)");
    }

    #[test]
    fn saturation_pressure_rises_with_temperature() {
        // Clausius-Clapeyron: dp_s/dT > 0 along the whole line (common practice).
        let mut previous = 0.0;
        for i in 0..=1000 {
            let t_k = 273.15 + (647.096 - 273.15) * f64::from(i) / 1000.0;
            let p = saturation_pressure_pa(t_k).unwrap();
            assert!(p > previous, "p_s not increasing at {t_k} K");
            previous = p;
        }
    }

    #[test]
    fn temperature_outside_the_line_is_invalid() {
        for t_k in [
            273.14,
            200.0,
            0.0,
            -10.0,
            647.097,
            700.0,
            1123.15,
            f64::NAN,
            f64::INFINITY,
        ] {
            let reason = invalid_reason(saturation_pressure_pa(t_k), "temperature");
            assert!(reason.contains("273.15 K"), "{t_k}: {reason}");
            assert!(reason.contains("647.096 K"), "{t_k}: {reason}");
        }
        let message = saturation_pressure_pa(700.0).unwrap_err().to_string();
        assert!(
            message.starts_with("temperature: value 700 K is not allowed"),
            "{message}"
        );
    }

    #[test]
    fn liquid_below_the_saturation_line_and_steam_at_or_above_it() {
        // IAPWS-IF97 Table 36: T_s(1 MPa) = 453.035632 K.
        assert!(is_liquid(453.0, 1.0e6).unwrap());
        assert!(!is_liquid(453.04, 1.0e6).unwrap());
        // At exactly T_s(p) water is saturated steam (the rule stated above).
        let t_s = saturation_temperature_k(1.0e6).unwrap();
        assert!(!is_liquid(t_s, 1.0e6).unwrap());
        assert!(is_liquid(t_s - 1e-9, 1.0e6).unwrap());
        // PyPI iapws 1.5.5: IAPWS97(T=423.15, P=3).phase is "Liquid" (region 1) and
        // IAPWS97(T=673.15, P=3).region is 2 (steam).
        assert!(is_liquid(423.15, 3.0e6).unwrap());
        assert!(!is_liquid(673.15, 3.0e6).unwrap());
        // Below the triple-point pressure there is no liquid.
        assert!(!is_liquid(280.0, 500.0).unwrap());
        // Above the critical point: vapour (ideal gas) above T_c, an error below it.
        assert!(!is_liquid(700.0, 25.0e6).unwrap());
        let e = is_liquid(500.0, 25.0e6).unwrap_err().to_string();
        assert!(e.contains("critical pressure"), "{e}");
        // Liquid below the triple point would freeze.
        let e = is_liquid(273.15, 1.0e5).unwrap_err().to_string();
        assert!(e.contains("freeze"), "{e}");
        assert!(is_liquid(f64::NAN, 1.0e5).is_err());
        assert!(is_liquid(300.0, -1.0).is_err());
    }

    #[test]
    fn pressure_outside_the_line_is_invalid() {
        for p_pa in [
            611.2,
            100.0,
            0.0,
            -1.0e5,
            22.065e6,
            3.0e7,
            f64::NAN,
            f64::NEG_INFINITY,
        ] {
            let reason = invalid_reason(saturation_temperature_k(p_pa), "pressure");
            assert!(reason.contains("611.213 Pa"), "{p_pa}: {reason}");
            assert!(reason.contains("22.064 MPa"), "{p_pa}: {reason}");
        }
        let message = saturation_temperature_k(3.0e7).unwrap_err().to_string();
        assert!(
            message.starts_with("pressure: value 30000000 Pa is not allowed"),
            "{message}"
        );
    }
}

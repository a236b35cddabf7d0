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

//! Water and steam from the IAPWS Industrial Formulation 1997 (IAPWS-IF97, as revised in IAPWS
//! R7-97(2012)): the basic equations of Region 1 (compressed and saturated liquid, eq. 7 with
//! the coefficients of Table 2) and Region 2 (steam, eq. 15: the ideal-gas part of eq. 16 with
//! Table 10 and the residual part of eq. 17 with Table 11), both dimensionless Gibbs free
//! energies g(p, T)/(RT) from which volume, enthalpy, internal energy, entropy, isobaric heat
//! capacity and the speed of sound follow by the relations of Tables 3 and 12. The saturation
//! line between them is Region 4 ([`super::water`]); the boundary between Region 2 and Region 3
//! is the B23 equation (eq. 5, Table 1).
//!
//! Ranges (IAPWS-IF97 Section 4): Region 1 is 273.15 K <= T <= 623.15 K at p_s(T) <= p <= 100
//! MPa; Region 2 is 273.15 K <= T <= 623.15 K at 0 < p <= p_s(T), 623.15 K < T <= 863.15 K at
//! 0 < p <= p_B23(T), 863.15 K < T <= 1073.15 K at 0 < p <= 100 MPa. Region 3 (near the
//! critical point, above 623.15 K and p_B23) and Region 5 (above 1073.15 K) are not given here:
//! a point there, or outside every region, is `Error::InvalidValue`, never an extrapolation.
//! The equations are taken up to the saturation line itself from either side (Region 1 at
//! p >= p_s(T), Region 2 at p <= p_s(T)), with a relative slack of 1e-9 on the pressure so that
//! a temperature found from T_s(p) is accepted on its own line.
//!
//! The inverse T(p, h) is a Newton search on h(T, p) at fixed pressure, kept inside a bracket
//! by bisection whenever a step would leave it (cp > 0 in both regions, so h rises with T).
//!
//! All values are SI: K, Pa, J/kg, J/(kg K), m3/kg, m/s.

use crate::error::{Error, Result};

use super::water::{saturation_pressure_pa, CRITICAL_PRESSURE_PA, SATURATION_MIN_PRESSURE_PA};

/// Specific gas constant of water in IAPWS-IF97, J/(kg K) (eq. 1).
pub const SPECIFIC_GAS_CONSTANT_J_PER_KG_K: f64 = 461.526;
/// Molar mass of ordinary water, kg/mol (IAPWS, 18.015268 g/mol).
pub const MOLAR_MASS_KG_PER_MOL: f64 = 0.018_015_268;
/// Lowest temperature of Regions 1 and 2, K.
pub const MIN_TEMPERATURE_K: f64 = 273.15;
/// Highest temperature of Region 1 (and of the Region 2 part below the saturation line), K.
pub const REGION1_MAX_TEMPERATURE_K: f64 = 623.15;
/// Temperature above which Region 2 runs up to 100 MPa (the upper end of the B23 line), K.
pub const B23_MAX_TEMPERATURE_K: f64 = 863.15;
/// Highest temperature of Region 2, K.
pub const REGION2_MAX_TEMPERATURE_K: f64 = 1073.15;
/// Highest pressure of Regions 1 and 2, Pa (100 MPa).
pub const MAX_PRESSURE_PA: f64 = 100.0e6;

/// Relative slack on the pressure at the saturation line and the B23 line (see the module
/// docs).
const LINE_SLACK: f64 = 1e-9;

/// Region 1, Table 2: (I_i, J_i, n_i) of eq. (7).
const REGION1: [(i32, i32, f64); 34] = [
    (0, -2, 1.4632971213167e-01),
    (0, -1, -8.4548187169114e-01),
    (0, 0, -3.7563603672040e+00),
    (0, 1, 3.3855169168385e+00),
    (0, 2, -9.5791963387872e-01),
    (0, 3, 1.5772038513228e-01),
    (0, 4, -1.6616417199501e-02),
    (0, 5, 8.1214629983568e-04),
    (1, -9, 2.8319080123804e-04),
    (1, -7, -6.0706301565874e-04),
    (1, -1, -1.8990068218419e-02),
    (1, 0, -3.2529748770505e-02),
    (1, 1, -2.1841717175414e-02),
    (1, 3, -5.2838357969930e-05),
    (2, -3, -4.7184321073267e-04),
    (2, 0, -3.0001780793026e-04),
    (2, 1, 4.7661393906987e-05),
    (2, 3, -4.4141845330846e-06),
    (2, 17, -7.2694996297594e-16),
    (3, -4, -3.1679644845054e-05),
    (3, 0, -2.8270797985312e-06),
    (3, 6, -8.5205128120103e-10),
    (4, -5, -2.2425281908000e-06),
    (4, -2, -6.5171222895601e-07),
    (4, 10, -1.4341729937924e-13),
    (5, -8, -4.0516996860117e-07),
    (8, -11, -1.2734301741641e-09),
    (8, -6, -1.7424871230634e-10),
    (21, -29, -6.8762131295531e-19),
    (23, -31, 1.4478307828521e-20),
    (29, -38, 2.6335781662795e-23),
    (30, -39, -1.1947622640071e-23),
    (31, -40, 1.8228094581404e-24),
    (32, -41, -9.3537087292458e-26),
];

/// Region 2 ideal-gas part, Table 10: (J°_i, n°_i) of eq. (16).
const REGION2_IDEAL: [(i32, f64); 9] = [
    (0, -9.6927686500217e+00),
    (1, 1.0086655968018e+01),
    (-5, -5.6087911283020e-03),
    (-4, 7.1452738081455e-02),
    (-3, -4.0710498223928e-01),
    (-2, 1.4240819171444e+00),
    (-1, -4.3839511319450e+00),
    (2, -2.8408632460772e-01),
    (3, 2.1268463753307e-02),
];

/// Region 2 residual part, Table 11: (I_i, J_i, n_i) of eq. (17).
const REGION2_RESIDUAL: [(i32, i32, f64); 43] = [
    (1, 0, -1.7731742473213e-03),
    (1, 1, -1.7834862292358e-02),
    (1, 2, -4.5996013696365e-02),
    (1, 3, -5.7581259083432e-02),
    (1, 6, -5.0325278727930e-02),
    (2, 1, -3.3032641670203e-05),
    (2, 2, -1.8948987516315e-04),
    (2, 4, -3.9392777243355e-03),
    (2, 7, -4.3797295650573e-02),
    (2, 36, -2.6674547914087e-05),
    (3, 0, 2.0481737692309e-08),
    (3, 1, 4.3870667284435e-07),
    (3, 3, -3.2277677238570e-05),
    (3, 6, -1.5033924542148e-03),
    (3, 35, -4.0668253562649e-02),
    (4, 1, -7.8847309559367e-10),
    (4, 2, 1.2790717852285e-08),
    (4, 3, 4.8225372718507e-07),
    (5, 7, 2.2922076337661e-06),
    (6, 3, -1.6714766451061e-11),
    (6, 16, -2.1171472321355e-03),
    (6, 35, -2.3895741934104e+01),
    (7, 0, -5.9059564324270e-18),
    (7, 11, -1.2621808899101e-06),
    (7, 25, -3.8946842435739e-02),
    (8, 8, 1.1256211360459e-11),
    (8, 36, -8.2311340897998e+00),
    (9, 13, 1.9809712802088e-08),
    (10, 4, 1.0406965210174e-19),
    (10, 10, -1.0234747095929e-13),
    (10, 14, -1.0018179379511e-09),
    (16, 29, -8.0882908646985e-11),
    (16, 50, 1.0693031879409e-01),
    (18, 57, -3.3662250574171e-01),
    (20, 20, 8.9185845355421e-25),
    (20, 35, 3.0629316876232e-13),
    (20, 48, -4.2002467698208e-06),
    (21, 21, -5.9056029685639e-26),
    (22, 53, 3.7826947613457e-06),
    (23, 39, -1.2768608934681e-15),
    (24, 26, 7.3087610595061e-29),
    (24, 40, 5.5414715350778e-17),
    (24, 58, -9.4369707241210e-07),
];

/// B23 boundary, Table 1: n1, n2, n3 of eq. (5) (p in MPa, T in K).
const B23: [f64; 3] = [
    0.348_051_856_289_69e3,
    -0.116_718_598_799_75e1,
    0.101_929_700_393_26e-2,
];

/// Which basic equation holds at a point.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Region {
    /// Region 1: liquid water (compressed or saturated).
    Liquid,
    /// Region 2: steam (saturated or superheated).
    Steam,
}

/// Properties of water or steam at one (T, p), from one basic equation.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Properties {
    /// Specific volume, m3/kg.
    pub volume_m3_per_kg: f64,
    /// Specific enthalpy, J/kg (IAPWS reference: liquid at the triple point has zero internal
    /// energy and entropy).
    pub enthalpy_j_per_kg: f64,
    /// Specific internal energy, J/kg.
    pub internal_energy_j_per_kg: f64,
    /// Specific entropy, J/(kg K).
    pub entropy_j_per_kg_k: f64,
    /// Specific isobaric heat capacity, J/(kg K).
    pub cp_j_per_kg_k: f64,
    /// Speed of sound, m/s.
    pub speed_of_sound_m_per_s: f64,
}

fn invalid(field: &str, value: String, reason: String) -> Error {
    Error::InvalidValue {
        field: field.to_string(),
        value,
        reason,
    }
}

fn check_finite_positive(temperature_k: f64, pressure_pa: f64) -> Result<()> {
    if !(temperature_k.is_finite() && temperature_k > 0.0) {
        return Err(invalid(
            "temperature",
            format!("{temperature_k} K"),
            "give a positive absolute temperature".to_string(),
        ));
    }
    if !(pressure_pa.is_finite() && pressure_pa > 0.0) {
        return Err(invalid(
            "pressure",
            format!("{pressure_pa} Pa"),
            "give a positive absolute pressure".to_string(),
        ));
    }
    Ok(())
}

/// Pressure of the boundary between Regions 2 and 3, Pa, for 623.15-863.15 K (IAPWS-IF97
/// eq. 5).
pub fn b23_pressure_pa(temperature_k: f64) -> f64 {
    let t = temperature_k;
    (B23[0] + B23[1] * t + B23[2] * t * t) * 1.0e6
}

/// Highest pressure of Region 2 at a temperature, Pa: the saturation pressure up to 623.15 K,
/// the B23 line up to 863.15 K, 100 MPa above.
fn region2_max_pressure_pa(temperature_k: f64) -> Result<f64> {
    Ok(if temperature_k <= REGION1_MAX_TEMPERATURE_K {
        saturation_pressure_pa(temperature_k)?
    } else if temperature_k <= B23_MAX_TEMPERATURE_K {
        b23_pressure_pa(temperature_k)
    } else {
        MAX_PRESSURE_PA
    })
}

fn outside(temperature_k: f64, pressure_pa: f64, what: &str) -> Error {
    invalid(
        "temperature and pressure",
        format!("{temperature_k} K, {pressure_pa} Pa"),
        format!(
            "{what}; IAPWS-IF97 Regions 1 and 2 cover liquid water from 273.15 K to 623.15 K \
             up to 100 MPa and steam from 273.15 K to 1073.15 K below the saturation line and \
             the Region 2/3 boundary (Region 3 near the critical point and Region 5 above \
             1073.15 K are not modelled)"
        ),
    )
}

/// The region of a point: Region 1 (liquid) strictly below the saturation temperature at the
/// pressure (T < T_s(p), equivalently p > p_s(T)), Region 2 (steam) at or above it, as
/// [`super::water::is_liquid`] decides. Returns `Error::InvalidValue` outside both regions
/// (below 273.15 K, above 1073.15 K or 100 MPa, or in Region 3).
pub fn region(temperature_k: f64, pressure_pa: f64) -> Result<Region> {
    check_finite_positive(temperature_k, pressure_pa)?;
    if !(MIN_TEMPERATURE_K..=REGION2_MAX_TEMPERATURE_K).contains(&temperature_k) {
        return Err(outside(
            temperature_k,
            pressure_pa,
            "the temperature is outside 273.15-1073.15 K",
        ));
    }
    if pressure_pa > MAX_PRESSURE_PA {
        return Err(outside(
            temperature_k,
            pressure_pa,
            "the pressure is above 100 MPa",
        ));
    }
    if temperature_k <= REGION1_MAX_TEMPERATURE_K {
        // p > p_s(T) is liquid; at p_s(T) and below, steam.
        if pressure_pa > saturation_pressure_pa(temperature_k)? {
            return Ok(Region::Liquid);
        }
        return Ok(Region::Steam);
    }
    if pressure_pa <= region2_max_pressure_pa(temperature_k)? {
        return Ok(Region::Steam);
    }
    Err(outside(
        temperature_k,
        pressure_pa,
        "the point lies in Region 3 (above 623.15 K and the Region 2/3 boundary)",
    ))
}

/// Properties from the Region 1 equation. Returns `Error::InvalidValue` outside 273.15-623.15 K,
/// above 100 MPa, or below the saturation pressure (by more than the slack of the module docs).
pub fn region1(temperature_k: f64, pressure_pa: f64) -> Result<Properties> {
    check_finite_positive(temperature_k, pressure_pa)?;
    if !(MIN_TEMPERATURE_K..=REGION1_MAX_TEMPERATURE_K).contains(&temperature_k)
        || pressure_pa > MAX_PRESSURE_PA
    {
        return Err(outside(
            temperature_k,
            pressure_pa,
            "liquid water (Region 1) is given from 273.15 K to 623.15 K up to 100 MPa",
        ));
    }
    let p_s = saturation_pressure_pa(temperature_k)?;
    if pressure_pa < p_s * (1.0 - LINE_SLACK) {
        return Err(outside(
            temperature_k,
            pressure_pa,
            &format!(
                "water at this temperature is liquid only at or above its saturation pressure \
                 {p_s:.6} Pa"
            ),
        ));
    }
    Ok(region1_unchecked(temperature_k, pressure_pa))
}

/// `x^(first + k)` for k = 0..N, by repeated products from one `powi`.
fn powers<const N: usize>(x: f64, first: i32) -> [f64; N] {
    let mut out = [0.0; N];
    let mut v = x.powi(first);
    for o in &mut out {
        *o = v;
        v *= x;
    }
    out
}

fn region1_unchecked(temperature_k: f64, pressure_pa: f64) -> Properties {
    let pi = pressure_pa / 16.53e6;
    let tau = 1386.0 / temperature_k;
    let (a, b) = (7.1 - pi, tau - 1.222);
    // Powers by table: a^k for k = 0..=32 and b^k for k = -43..=32 (the exponents of Table 2
    // and of the derivatives), by repeated products rather than six powi calls a term; measured
    // with callgrind, this took the water enthalpies of a train solve from about a fifth of its
    // instructions to a few per cent.
    let pa: [f64; 33] = powers(a, 0);
    let pb: [f64; 76] = powers(b, -43);
    let a_at = |k: i32| pa[k as usize];
    let b_at = |k: i32| pb[(k + 43) as usize];
    let (mut g, mut g_p, mut g_pp, mut g_t, mut g_tt, mut g_pt) = (0.0, 0.0, 0.0, 0.0, 0.0, 0.0);
    for (i, j, n) in REGION1 {
        let (fi, fj) = (f64::from(i), f64::from(j));
        let ai = a_at(i);
        let bj = b_at(j);
        g += n * ai * bj;
        if i != 0 {
            let ai1 = a_at(i - 1);
            g_p -= n * fi * ai1 * bj;
            if i != 1 {
                g_pp += n * fi * (fi - 1.0) * a_at(i - 2) * bj;
            }
            if j != 0 {
                g_pt -= n * fi * ai1 * fj * b_at(j - 1);
            }
        }
        if j != 0 {
            g_t += n * ai * fj * b_at(j - 1);
            if j != 1 {
                g_tt += n * ai * fj * (fj - 1.0) * b_at(j - 2);
            }
        }
    }
    let rt = SPECIFIC_GAS_CONSTANT_J_PER_KG_K * temperature_k;
    let w2 = rt * g_p * g_p / ((g_p - tau * g_pt).powi(2) / (tau * tau * g_tt) - g_pp);
    Properties {
        volume_m3_per_kg: pi * g_p * rt / pressure_pa,
        enthalpy_j_per_kg: rt * tau * g_t,
        internal_energy_j_per_kg: rt * (tau * g_t - pi * g_p),
        entropy_j_per_kg_k: SPECIFIC_GAS_CONSTANT_J_PER_KG_K * (tau * g_t - g),
        cp_j_per_kg_k: -SPECIFIC_GAS_CONSTANT_J_PER_KG_K * tau * tau * g_tt,
        speed_of_sound_m_per_s: w2.sqrt(),
    }
}

/// The ideal-gas part of Region 2 at tau = 540 K / T: (gamma°_tau, gamma°_tautau) and the
/// pressure-free part of gamma° (eq. 16 without ln pi).
fn region2_ideal(tau: f64) -> (f64, f64, f64) {
    let (mut g, mut g_t, mut g_tt) = (0.0, 0.0, 0.0);
    for (j, n) in REGION2_IDEAL {
        let fj = f64::from(j);
        g += n * tau.powi(j);
        if j != 0 {
            g_t += n * fj * tau.powi(j - 1);
            if j != 1 {
                g_tt += n * fj * (fj - 1.0) * tau.powi(j - 2);
            }
        }
    }
    (g, g_t, g_tt)
}

fn check_region2(temperature_k: f64, pressure_pa: f64) -> Result<()> {
    check_finite_positive(temperature_k, pressure_pa)?;
    if !(MIN_TEMPERATURE_K..=REGION2_MAX_TEMPERATURE_K).contains(&temperature_k) {
        return Err(outside(
            temperature_k,
            pressure_pa,
            "steam (Region 2) is given from 273.15 K to 1073.15 K",
        ));
    }
    let p_max = region2_max_pressure_pa(temperature_k)?;
    if pressure_pa > p_max * (1.0 + LINE_SLACK) {
        return Err(outside(
            temperature_k,
            pressure_pa,
            &format!(
                "steam at this temperature is given only up to {p_max:.6} Pa (the saturation \
                 pressure, or the Region 2/3 boundary above 623.15 K)"
            ),
        ));
    }
    Ok(())
}

/// Properties from the Region 2 equation (ideal-gas and residual parts). Returns
/// `Error::InvalidValue` outside 273.15-1073.15 K or above the pressure limit of Region 2 at
/// the temperature (saturation pressure, B23 line, 100 MPa).
pub fn region2(temperature_k: f64, pressure_pa: f64) -> Result<Properties> {
    check_region2(temperature_k, pressure_pa)?;
    Ok(region2_unchecked(temperature_k, pressure_pa))
}

fn region2_unchecked(temperature_k: f64, pressure_pa: f64) -> Properties {
    let pi = pressure_pa / 1.0e6;
    let tau = 540.0 / temperature_k;
    let (g0_rest, g0_t, g0_tt) = region2_ideal(tau);
    let g0 = pi.ln() + g0_rest;
    let b = tau - 0.5;
    // Powers by table (see region 1): pi^k for k = 0..=24 and b^k for k = 0..=58.
    let pp: [f64; 25] = powers(pi, 0);
    let pb: [f64; 59] = powers(b, 0);
    let (mut r, mut r_p, mut r_pp, mut r_t, mut r_tt, mut r_pt) = (0.0, 0.0, 0.0, 0.0, 0.0, 0.0);
    for (i, j, n) in REGION2_RESIDUAL {
        let (fi, fj) = (f64::from(i), f64::from(j));
        let pi_i = pp[i as usize];
        let pi_i1 = pp[(i - 1) as usize];
        let bj = pb[j as usize];
        r += n * pi_i * bj;
        r_p += n * fi * pi_i1 * bj;
        if i != 1 {
            r_pp += n * fi * (fi - 1.0) * pp[(i - 2) as usize] * bj;
        }
        if j != 0 {
            let bj1 = pb[(j - 1) as usize];
            r_t += n * pi_i * fj * bj1;
            r_pt += n * fi * pi_i1 * fj * bj1;
            if j != 1 {
                r_tt += n * pi_i * fj * (fj - 1.0) * pb[(j - 2) as usize];
            }
        }
    }
    let rt = SPECIFIC_GAS_CONSTANT_J_PER_KG_K * temperature_k;
    let (g_p, g_t, g_tt) = (1.0 / pi + r_p, g0_t + r_t, g0_tt + r_tt);
    let w2 = rt * (1.0 + 2.0 * pi * r_p + pi * pi * r_p * r_p)
        / ((1.0 - pi * pi * r_pp)
            + (1.0 + pi * r_p - tau * pi * r_pt).powi(2) / (tau * tau * g_tt));
    Properties {
        volume_m3_per_kg: pi * g_p * rt / pressure_pa,
        enthalpy_j_per_kg: rt * tau * g_t,
        internal_energy_j_per_kg: rt * (tau * g_t - pi * g_p),
        entropy_j_per_kg_k: SPECIFIC_GAS_CONSTANT_J_PER_KG_K * (tau * g_t - (g0 + r)),
        cp_j_per_kg_k: -SPECIFIC_GAS_CONSTANT_J_PER_KG_K * tau * tau * g_tt,
        speed_of_sound_m_per_s: w2.sqrt(),
    }
}

/// Properties at (T, p) by the region of the point ([`region`]).
pub fn properties(temperature_k: f64, pressure_pa: f64) -> Result<Properties> {
    match region(temperature_k, pressure_pa)? {
        Region::Liquid => Ok(region1_unchecked(temperature_k, pressure_pa)),
        Region::Steam => Ok(region2_unchecked(temperature_k, pressure_pa)),
    }
}

/// Properties from the equation of a given region (liquid: Region 1, steam: Region 2), each
/// checked against its own range; for a phase already known (a saturated liquid at T_s(p) is
/// Region 1, while [`region`] would call the point steam).
pub fn properties_in(region: Region, temperature_k: f64, pressure_pa: f64) -> Result<Properties> {
    match region {
        Region::Liquid => region1(temperature_k, pressure_pa),
        Region::Steam => region2(temperature_k, pressure_pa),
    }
}

/// Specific enthalpy of the ideal-gas part of Region 2 alone, h°(T) = R T tau gamma°_tau, J/kg
/// (eq. 16; independent of pressure), with its derivative cp°(T), J/(kg K). Valid for
/// 273.15-1073.15 K; `Error::InvalidValue` outside.
pub fn ideal_gas_enthalpy_and_cp(temperature_k: f64) -> Result<(f64, f64)> {
    if !(MIN_TEMPERATURE_K..=REGION2_MAX_TEMPERATURE_K).contains(&temperature_k) {
        return Err(invalid(
            "temperature",
            format!("{temperature_k} K"),
            "the ideal-gas part of IAPWS-IF97 Region 2 is given from 273.15 K to 1073.15 K"
                .to_string(),
        ));
    }
    let tau = 540.0 / temperature_k;
    let (_, g_t, g_tt) = region2_ideal(tau);
    let rt = SPECIFIC_GAS_CONSTANT_J_PER_KG_K * temperature_k;
    Ok((
        rt * tau * g_t,
        -SPECIFIC_GAS_CONSTANT_J_PER_KG_K * tau * tau * g_tt,
    ))
}

/// Specific enthalpy of the ideal-gas part of Region 2, h°(T), J/kg (see
/// [`ideal_gas_enthalpy_and_cp`]).
pub fn ideal_gas_enthalpy_j_per_kg(temperature_k: f64) -> Result<f64> {
    Ok(ideal_gas_enthalpy_and_cp(temperature_k)?.0)
}

/// Departure of real water or steam from the ideal gas at the same temperature, in the given
/// region: (h(T, p) - h°(T), cp(T, p) - cp°(T)), J/kg and J/(kg K). For steam it is the residual
/// enthalpy of Region 2; for liquid it also holds the latent heat.
pub fn departure(region: Region, temperature_k: f64, pressure_pa: f64) -> Result<(f64, f64)> {
    let real = properties_in(region, temperature_k, pressure_pa)?;
    let (h0, cp0) = ideal_gas_enthalpy_and_cp(temperature_k)?;
    Ok((real.enthalpy_j_per_kg - h0, real.cp_j_per_kg_k - cp0))
}

/// Temperature range of a region at a pressure, K: liquid from 273.15 K to the saturation
/// temperature (or 623.15 K); steam from the saturation temperature (or 273.15 K below the
/// triple-point pressure) to 1073.15 K. `Error::InvalidValue` where the region does not exist
/// at that pressure.
pub fn temperature_range_k(region: Region, pressure_pa: f64) -> Result<(f64, f64)> {
    check_finite_positive(MIN_TEMPERATURE_K, pressure_pa)?;
    if pressure_pa > MAX_PRESSURE_PA {
        return Err(outside(
            MIN_TEMPERATURE_K,
            pressure_pa,
            "the pressure is above 100 MPa",
        ));
    }
    let on_line = (SATURATION_MIN_PRESSURE_PA..=CRITICAL_PRESSURE_PA).contains(&pressure_pa);
    let t_s = if on_line {
        Some(super::water::saturation_temperature_k(pressure_pa)?)
    } else {
        None
    };
    match region {
        Region::Liquid => {
            if pressure_pa < SATURATION_MIN_PRESSURE_PA {
                return Err(outside(
                    MIN_TEMPERATURE_K,
                    pressure_pa,
                    "no liquid water below the triple-point pressure",
                ));
            }
            let top = t_s.map_or(REGION1_MAX_TEMPERATURE_K, |t| {
                t.min(REGION1_MAX_TEMPERATURE_K)
            });
            Ok((MIN_TEMPERATURE_K, top))
        }
        Region::Steam => {
            let bottom = match t_s {
                Some(t) if t > REGION1_MAX_TEMPERATURE_K => b23_temperature_k(pressure_pa),
                Some(t) => t,
                None if pressure_pa < SATURATION_MIN_PRESSURE_PA => MIN_TEMPERATURE_K,
                None => b23_temperature_k(pressure_pa),
            };
            Ok((bottom, REGION2_MAX_TEMPERATURE_K))
        }
    }
}

/// Temperature of the B23 line at a pressure, K (IAPWS-IF97 eq. 6 with n3, n4, n5 of Table 1),
/// clamped to 623.15-863.15 K.
fn b23_temperature_k(pressure_pa: f64) -> f64 {
    const N4: f64 = 0.572_544_598_627_46e3;
    const N5: f64 = 0.139_188_397_788_70e2;
    let pi = pressure_pa / 1.0e6;
    let t = N4 + ((pi - N5).max(0.0) / B23[2]).sqrt();
    t.clamp(REGION1_MAX_TEMPERATURE_K, B23_MAX_TEMPERATURE_K)
}

/// Newton's method for an increasing function g(x) on [lo, hi], safeguarded by bisection: a
/// step that would leave the bracket, or a slope that is not positive, bisects instead. `f`
/// returns (g(x), g'(x)); the search stops when |g| <= `tolerance` or the bracket is shorter than
/// 1e-12 of x. Returns the root, or an `Error::NotConverged` naming `what`. The ends are
/// evaluated first: g(lo) > 0 or g(hi) < 0 means there is no root in the bracket (an
/// `Error::InvalidValue` with field `what`).
pub fn increasing_root(
    what: &str,
    lo: f64,
    hi: f64,
    tolerance: f64,
    mut f: impl FnMut(f64) -> Result<(f64, f64)>,
) -> Result<f64> {
    let (mut lo, mut hi) = (lo, hi);
    let (g_lo, _) = f(lo)?;
    if g_lo >= 0.0 {
        if g_lo.abs() <= tolerance {
            return Ok(lo);
        }
        return Err(invalid(
            what,
            format!("{lo} K"),
            "the root lies below the range".into(),
        ));
    }
    let (g_hi, _) = f(hi)?;
    if g_hi <= 0.0 {
        if g_hi.abs() <= tolerance {
            return Ok(hi);
        }
        return Err(invalid(
            what,
            format!("{hi} K"),
            "the root lies above the range".into(),
        ));
    }
    // Start by false position between the ends.
    let mut x = lo + (hi - lo) * (-g_lo) / (g_hi - g_lo);
    for _ in 0..200 {
        let (g, slope) = f(x)?;
        if !g.is_finite() {
            break;
        }
        if g.abs() <= tolerance || hi - lo <= 1e-12 * x {
            return Ok(x);
        }
        if g < 0.0 {
            lo = x;
        } else {
            hi = x;
        }
        let newton = x - g / slope;
        x = if slope > 0.0 && newton > lo && newton < hi {
            newton
        } else {
            0.5 * (lo + hi)
        };
    }
    Err(Error::NotConverged {
        what: what.to_string(),
        iterations: 200,
        residual: f64::NAN,
        hint: String::new(),
    })
}

/// Temperature of water or steam in a given region at a pressure from its specific enthalpy,
/// K: the inverse of h(T, p) at fixed p within [`temperature_range_k`], by
/// [`increasing_root`] to 1e-9 J/kg. `Error::InvalidValue` when the enthalpy lies outside the
/// region at that pressure.
pub fn temperature_k(region: Region, pressure_pa: f64, enthalpy_j_per_kg: f64) -> Result<f64> {
    let (lo, hi) = temperature_range_k(region, pressure_pa)?;
    increasing_root("enthalpy", lo, hi, 1e-9, |t| {
        let pr = properties_in(region, t, pressure_pa)?;
        Ok((pr.enthalpy_j_per_kg - enthalpy_j_per_kg, pr.cp_j_per_kg_k))
    })
}

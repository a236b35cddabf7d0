//! Quantities with units: reading them from input text into SI, and converting back for reports.
//!
//! Inside syntrain every number is SI: K, Pa (absolute), mol/s or kg/s, J/mol, W. Input arrives as
//! text with a unit ("850 degC", "25 barg", "1200 kmol/h"); this module reads the number, looks up
//! the unit, converts to SI and checks that the value is physically possible. A number without a
//! unit is refused (except for fractions): a silently assumed unit is how factor-of-ten errors get
//! into a heat and mass balance. Units are case-sensitive ("MPa" is not "mPa"); a unit that matches
//! only when case is ignored is answered with a "did you mean" hint.
//!
//! Sources of the definitions used:
//! - Celsius and kelvin, T/K = t/°C + 273.15: ISO 80000-5.
//! - Fahrenheit, T/K = (t/°F + 459.67)/1.8, and the temperature interval 1 °F = 5/9 K: NIST SP 811,
//!   Appendix B.
//! - 1 bar = 1e5 Pa and the standard atmosphere 1 atm = 101 325 Pa: ISO 80000-4 (the atmosphere
//!   as defined by the 10th CGPM, 1954).
//! - 1 psi = 1 lbf/in² = 0.453 592 37 kg × 9.806 65 m/s² / (0.0254 m)² ≈ 6894.757 Pa: NIST SP 811.
//! - International Table calorie, 1 cal = 4.1868 J (for Gcal/h): NIST SP 811.
//! - Normal conditions 273.15 K and 101 325 Pa for "normal cubic metres" (Nm3): DIN 1343.
//! - Molar gas constant R = 8.314 462 618 15324 J/(mol K), exact since the 2019 SI: CODATA 2018.
//! - Gauge pressures (barg, psig, ...) are referred to one standard atmosphere: common practice.

use crate::error::{Error, Result};

/// Molar gas constant, J/(mol K) (CODATA 2018, exact).
pub const R_GAS: f64 = 8.31446261815324;
/// Normal temperature for normal cubic metres, K (DIN 1343).
pub const NORMAL_TEMPERATURE_K: f64 = 273.15;
/// Normal pressure for normal cubic metres, Pa (DIN 1343).
pub const NORMAL_PRESSURE_PA: f64 = 101_325.0;
/// Thermochemical standard-state pressure, Pa (1 bar).
pub const STANDARD_PRESSURE_PA: f64 = 1.0e5;
/// One standard atmosphere, Pa (ISO 80000-4); also the reference of gauge pressures.
pub const ATMOSPHERE_PA: f64 = 101_325.0;
/// Offset between kelvin and degrees Celsius, K (ISO 80000-5).
pub const CELSIUS_OFFSET_K: f64 = 273.15;
/// One pound-force per square inch, Pa (NIST SP 811: 0.45359237 kg × 9.80665 m/s² / (0.0254 m)²).
pub const PSI_PA: f64 = 0.453_592_37 * 9.806_65 / (0.0254 * 0.0254);
/// International Table calorie, J (NIST SP 811).
pub const CALORIE_IT_J: f64 = 4.1868;

const SECONDS_PER_HOUR: f64 = 3600.0;

/// Ideal-gas molar volume at DIN 1343 normal conditions, m3/mol (= R*273.15/101325 ≈ 0.0224140).
pub const fn normal_molar_volume_m3_per_mol() -> f64 {
    R_GAS * NORMAL_TEMPERATURE_K / NORMAL_PRESSURE_PA
}

/// A flow rate read from input: molar or mass, in SI.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Flow {
    /// Molar flow, mol/s (from kmol/h, mol/s, kmol/s, mol/h or Nm3/h).
    Molar(f64),
    /// Mass flow, kg/s (from kg/h, kg/s or t/h).
    Mass(f64),
}

/// One accepted unit: its spellings and the conversion of a number in it to SI.
struct UnitDef<T: 'static> {
    names: &'static [&'static str],
    to_si: fn(f64) -> T,
}

/// The units of one kind of quantity, with hints for spellings that are refused on purpose.
struct Kind<T: 'static> {
    /// What the quantity is, for messages ("temperature").
    what: &'static str,
    /// An example of a well-written value.
    example: &'static str,
    units: &'static [UnitDef<T>],
    /// Refused spellings and why (unit, explanation).
    hints: &'static [(&'static str, &'static str)],
}

/// Shorthand for a table entry.
const fn unit<T>(names: &'static [&'static str], to_si: fn(f64) -> T) -> UnitDef<T> {
    UnitDef { names, to_si }
}

impl<T> Kind<T> {
    fn names(&self) -> impl Iterator<Item = &'static str> + '_ {
        self.units.iter().flat_map(|u| u.names.iter().copied())
    }

    fn accepted(&self) -> String {
        self.names().collect::<Vec<_>>().join(", ")
    }
}

const TEMPERATURE: Kind<f64> = Kind {
    what: "temperature",
    example: "850 degC",
    units: &[
        unit(&["K"], |x| x),
        unit(&["degC", "C", "°C"], |x| x + CELSIUS_OFFSET_K),
        unit(&["degF", "F", "°F"], |x| {
            (x - 32.0) * 5.0 / 9.0 + CELSIUS_OFFSET_K
        }),
    ],
    hints: &[("°K", "kelvin takes no degree sign; write K")],
};

const TEMPERATURE_DIFFERENCE: Kind<f64> = Kind {
    what: "temperature difference",
    example: "30 K",
    units: &[
        unit(&["K", "degC", "C", "°C", "delta_degC"], |x| x),
        unit(&["degF", "F", "°F", "delta_degF"], |x| x * 5.0 / 9.0),
    ],
    hints: &[("°K", "kelvin takes no degree sign; write K")],
};

const PRESSURE: Kind<f64> = Kind {
    what: "pressure",
    example: "25 barg",
    units: &[
        unit(&["bar", "bara"], |x| x * 1.0e5),
        unit(&["barg"], |x| x * 1.0e5 + ATMOSPHERE_PA),
        unit(&["mbar"], |x| x * 1.0e2),
        unit(&["Pa"], |x| x),
        unit(&["kPa"], |x| x * 1.0e3),
        unit(&["kPag"], |x| x * 1.0e3 + ATMOSPHERE_PA),
        unit(&["MPa"], |x| x * 1.0e6),
        unit(&["MPag"], |x| x * 1.0e6 + ATMOSPHERE_PA),
        unit(&["atm"], |x| x * ATMOSPHERE_PA),
        unit(&["psia"], |x| x * PSI_PA),
        unit(&["psig"], |x| x * PSI_PA + ATMOSPHERE_PA),
    ],
    hints: &[(
        "psi",
        "'psi' alone says neither absolute nor gauge; write psia or psig",
    )],
};

const PRESSURE_DIFFERENCE_HINT: &str =
    "a pressure difference has no absolute or gauge reference; drop the 'a' or 'g'";

const PRESSURE_DIFFERENCE: Kind<f64> = Kind {
    what: "pressure difference",
    example: "0.5 bar",
    units: &[
        unit(&["bar"], |x| x * 1.0e5),
        unit(&["mbar"], |x| x * 1.0e2),
        unit(&["Pa"], |x| x),
        unit(&["kPa"], |x| x * 1.0e3),
        unit(&["MPa"], |x| x * 1.0e6),
        unit(&["psi"], |x| x * PSI_PA),
    ],
    hints: &[
        ("bara", PRESSURE_DIFFERENCE_HINT),
        ("barg", PRESSURE_DIFFERENCE_HINT),
        ("psia", PRESSURE_DIFFERENCE_HINT),
        ("psig", PRESSURE_DIFFERENCE_HINT),
        ("kPag", PRESSURE_DIFFERENCE_HINT),
        ("MPag", PRESSURE_DIFFERENCE_HINT),
    ],
};

const DUTY: Kind<f64> = Kind {
    what: "duty",
    example: "12.5 MW",
    units: &[
        unit(&["W"], |x| x),
        unit(&["kW"], |x| x * 1.0e3),
        unit(&["MW"], |x| x * 1.0e6),
        unit(&["MJ/h"], |x| x * 1.0e6 / SECONDS_PER_HOUR),
        unit(&["GJ/h"], |x| x * 1.0e9 / SECONDS_PER_HOUR),
        unit(&["Gcal/h"], |x| x * CALORIE_IT_J * 1.0e9 / SECONDS_PER_HOUR),
    ],
    hints: &[],
};

const SPECIFIC_ENERGY: Kind<f64> = Kind {
    what: "specific energy",
    example: "2.5 GJ/t",
    units: &[
        unit(&["J/kg"], |x| x),
        unit(&["kJ/kg", "MJ/t"], |x| x * 1.0e3),
        unit(&["MJ/kg", "GJ/t"], |x| x * 1.0e6),
        unit(&["kWh/t"], |x| x * 3.6e3),
        unit(&["Gcal/t"], |x| x * CALORIE_IT_J * 1.0e6),
    ],
    hints: &[("GJ/tonne", "write the tonne as t (1 t = 1000 kg)")],
};

const FLOW: Kind<Flow> = Kind {
    what: "flow",
    example: "1200 kmol/h",
    units: &[
        unit(&["kmol/h"], |x| Flow::Molar(x * 1.0e3 / SECONDS_PER_HOUR)),
        unit(&["mol/s"], Flow::Molar),
        unit(&["kmol/s"], |x| Flow::Molar(x * 1.0e3)),
        unit(&["mol/h"], |x| Flow::Molar(x / SECONDS_PER_HOUR)),
        unit(&["Nm3/h", "Nm³/h"], |x| {
            Flow::Molar(x / SECONDS_PER_HOUR / normal_molar_volume_m3_per_mol())
        }),
        unit(&["kg/h"], |x| Flow::Mass(x / SECONDS_PER_HOUR)),
        unit(&["kg/s"], Flow::Mass),
        unit(&["t/h"], |x| Flow::Mass(x * 1.0e3 / SECONDS_PER_HOUR)),
    ],
    hints: &[
        (
            "m3/h",
            "an actual volume flow depends on temperature and pressure; give normal cubic \
             metres (Nm3/h, DIN 1343: 0 degC, 101325 Pa), a molar flow or a mass flow",
        ),
        (
            "Sm3/h",
            "'standard' cubic metres have several reference conditions; convert to Nm3/h \
             (DIN 1343: 0 degC, 101325 Pa) or kmol/h",
        ),
    ],
};

const FRACTION: Kind<f64> = Kind {
    what: "fraction",
    example: "0.85",
    units: &[unit(&["%"], |x| x / 100.0), unit(&["ppm"], |x| x * 1.0e-6)],
    hints: &[],
};

fn fail<T>(field: &str, text: &str, reason: String) -> Result<T> {
    Err(Error::Quantity {
        field: field.to_string(),
        value: text.to_string(),
        reason,
    })
}

fn invalid<T>(field: &str, text: &str, reason: String) -> Result<T> {
    Err(Error::InvalidValue {
        field: field.to_string(),
        value: text.trim().to_string(),
        reason,
    })
}

/// The SI number inside a parsed quantity, for the range checks.
trait SiValue: Copy {
    fn si(self) -> f64;
}

impl SiValue for f64 {
    fn si(self) -> f64 {
        self
    }
}

impl SiValue for Flow {
    fn si(self) -> f64 {
        match self {
            Flow::Molar(x) | Flow::Mass(x) => x,
        }
    }
}

/// Format a number for a message: up to six significant digits, no trailing zeros.
fn short(x: f64) -> String {
    if x == 0.0 || !x.is_finite() {
        return format!("{x}");
    }
    let magnitude = x.abs().log10().floor();
    if !(-3.0..7.0).contains(&magnitude) {
        return format!("{x:.5e}");
    }
    // Decimals such that six significant digits show; magnitude is within -3..7 here.
    let decimals = (5.0 - magnitude).max(0.0) as usize;
    let fixed = format!("{x:.decimals$}");
    if fixed.contains('.') {
        fixed
            .trim_end_matches('0')
            .trim_end_matches('.')
            .to_string()
    } else {
        fixed
    }
}

/// Split "850 degC" into the number 850 and the unit "degC" (unit empty if none was written);
/// the error is the reason for an `Error::Quantity`.
///
/// Whitespace between number and unit is optional; whitespace inside the unit is dropped
/// ("kmol / h" reads as "kmol/h"). No unit of syntrain starts with a digit, sign, '.' or 'e'.
fn split_number(text: &str, example: &str) -> std::result::Result<(f64, String), String> {
    let trimmed = text.trim();
    let write = format!("write a number and a unit, e.g. '{example}'");
    if trimmed.is_empty() {
        return Err(format!("the value is empty; {write}"));
    }
    let is_number_char = |c: char| c.is_ascii_digit() || matches!(c, '+' | '-' | '.' | 'e' | 'E');
    let end = trimmed
        .find(|c| !is_number_char(c))
        .unwrap_or(trimmed.len());
    let (number, rest) = trimmed.split_at(end);
    if !number.contains(|c: char| c.is_ascii_digit()) {
        let word = trimmed.trim_start_matches(['+', '-']).to_ascii_lowercase();
        if word.starts_with("nan") || word.starts_with("inf") {
            return Err(format!("not a finite number; {write}"));
        }
        return Err(format!("does not start with a number; {write}"));
    }
    let unit: String = rest.split_whitespace().collect();
    let malformed = format!(
        "the number is malformed; write one number with a decimal point and no thousands \
         separators, then the unit, e.g. '{example}'"
    );
    if unit.starts_with(|c: char| c.is_ascii_digit() || matches!(c, ',' | '_')) {
        return Err(malformed);
    }
    let value: f64 = number.parse().map_err(|_| malformed)?;
    if !value.is_finite() {
        return Err(format!("'{number}' is too large to be a finite number"));
    }
    Ok((value, unit))
}

/// Convert `value` in `unit` to SI with the table of `kind`; the error is the reason for an
/// `Error::Quantity`, saying why the unit is refused and which ones are accepted.
fn convert<T: Copy>(value: f64, unit: &str, kind: &Kind<T>) -> std::result::Result<T, String> {
    if let Some(def) = kind.units.iter().find(|u| u.names.contains(&unit)) {
        return Ok((def.to_si)(value));
    }
    let (what, accepted, example) = (kind.what, kind.accepted(), kind.example);
    if unit.is_empty() {
        return Err(format!(
            "no unit given; a {what} needs a unit: use one of {accepted} (e.g. '{example}')"
        ));
    }
    if let Some((_, hint)) = kind.hints.iter().find(|(name, _)| *name == unit) {
        return Err(format!("{hint}; use one of {accepted}"));
    }
    let unknown = format!("unknown {what} unit '{unit}'");
    match kind.names().find(|name| name.eq_ignore_ascii_case(unit)) {
        Some(name) => Err(format!(
            "{unknown} (units are case-sensitive: did you mean '{name}'?); use one of {accepted}"
        )),
        None => Err(format!("{unknown}; use one of {accepted}")),
    }
}

/// Read a quantity of `kind` and check that its SI value is finite.
fn parse_kind<T: SiValue>(field: &str, text: &str, kind: &Kind<T>) -> Result<T> {
    let quantity = split_number(text, kind.example)
        .and_then(|(value, unit)| convert(value, &unit, kind))
        .or_else(|reason| fail(field, text, reason))?;
    if !quantity.si().is_finite() {
        return invalid(
            field,
            text,
            "too large: not a finite number in SI units".into(),
        );
    }
    Ok(quantity)
}

/// Read an absolute temperature, K.
///
/// Units: K, degC, C, °C, degF, F, °F. The temperature must be above 0 K.
pub fn parse_temperature(field: &str, text: &str) -> Result<f64> {
    let t_k = parse_kind(field, text, &TEMPERATURE)?;
    if t_k <= 0.0 {
        let reason = format!(
            "this is {} K, at or below absolute zero; a temperature must be above 0 K \
             (-273.15 degC, -459.67 degF)",
            short(t_k)
        );
        return invalid(field, text, reason);
    }
    Ok(t_k)
}

/// Read a temperature difference (approach, rise, drop), K.
///
/// Units: K, degC, C, °C, delta_degC (all 1 K), degF, F, °F, delta_degF (5/9 K). A difference may
/// be negative or zero.
pub fn parse_temperature_difference(field: &str, text: &str) -> Result<f64> {
    parse_kind(field, text, &TEMPERATURE_DIFFERENCE)
}

/// Read an absolute pressure, Pa.
///
/// Units: bar and bara (absolute), barg (gauge, + 1.01325 bar), mbar, Pa, kPa, kPag, MPa, MPag,
/// atm, psia, psig (gauge, + 1 atm = 14.695949 psi). The absolute pressure must be above 0.
pub fn parse_pressure(field: &str, text: &str) -> Result<f64> {
    let p_pa = parse_kind(field, text, &PRESSURE)?;
    if p_pa <= 0.0 {
        let reason = format!(
            "this is {} Pa absolute; an absolute pressure must be above 0 (gauge pressures are \
             referred to 1 atm, so barg must be above -1.01325 and psig above -14.695949)",
            short(p_pa)
        );
        return invalid(field, text, reason);
    }
    Ok(p_pa)
}

/// Read a pressure difference (pressure drop), Pa.
///
/// Units: bar, mbar, Pa, kPa, MPa, psi. The difference must be zero or positive.
pub fn parse_pressure_difference(field: &str, text: &str) -> Result<f64> {
    let dp_pa = parse_kind(field, text, &PRESSURE_DIFFERENCE)?;
    if dp_pa < 0.0 {
        let reason = "a pressure difference must be zero or positive; give the drop as a \
                      positive number";
        return invalid(field, text, reason.into());
    }
    Ok(dp_pa)
}

/// Read a heat duty or power, W.
///
/// Units: W, kW, MW, MJ/h, GJ/h, Gcal/h (International Table calorie). Any sign: positive is heat
/// added to the process.
pub fn parse_duty(field: &str, text: &str) -> Result<f64> {
    parse_kind(field, text, &DUTY)
}

/// Read a specific energy (heat per mass, such as the regeneration heat of a solvent per tonne
/// of CO2 removed), J/kg.
///
/// Units: J/kg, kJ/kg, MJ/t (1e3 J/kg), MJ/kg, GJ/t (1e6 J/kg), kWh/t (3.6e3 J/kg), Gcal/t
/// (International Table calorie, 4.1868e6 J/kg). The value must be zero or positive.
pub fn parse_specific_energy(field: &str, text: &str) -> Result<f64> {
    let e = parse_kind(field, text, &SPECIFIC_ENERGY)?;
    if e < 0.0 {
        return invalid(
            field,
            text,
            "a specific energy here is heat needed, zero or positive".into(),
        );
    }
    Ok(e)
}

/// Read a flow rate: molar (mol/s) or mass (kg/s).
///
/// Molar units: kmol/h, mol/s, kmol/s, mol/h, Nm3/h (ideal gas at DIN 1343 normal conditions,
/// 22.414 m3/kmol). Mass units: kg/h, kg/s, t/h. The flow must be zero or positive.
pub fn parse_flow(field: &str, text: &str) -> Result<Flow> {
    let flow = parse_kind(field, text, &FLOW)?;
    if flow.si() < 0.0 {
        let reason = "a flow must be zero or positive; to send material the other way, connect \
                      the stream the other way";
        return invalid(field, text, reason.into());
    }
    Ok(flow)
}

/// Read a fraction (mole fraction, conversion, efficiency) as a number within 0..=1.
///
/// Accepts a plain number ("0.85"), a percentage ("85 %", "85%") or parts per million ("50 ppm").
pub fn parse_fraction(field: &str, text: &str) -> Result<f64> {
    let (value, unit) = split_number(text, FRACTION.example).or_else(|r| fail(field, text, r))?;
    let fraction = match unit.as_str() {
        "" => value,
        _ => convert(value, &unit, &FRACTION).or_else(|r| fail(field, text, r))?,
    };
    if !(0.0..=1.0).contains(&fraction) {
        let hint = if unit.is_empty() && value > 1.0 && value <= 100.0 {
            format!("; for a percentage write '{} %'", short(value))
        } else {
            String::new()
        };
        let shown = short(fraction);
        let reason =
            format!("a fraction must be within 0 and 1 (0 % to 100 %), this is {shown}{hint}");
        return invalid(field, text, reason);
    }
    Ok(fraction)
}

/// Kelvin to degrees Celsius (ISO 80000-5).
pub fn kelvin_to_degc(t_k: f64) -> f64 {
    t_k - CELSIUS_OFFSET_K
}

/// Pascal to bar (absolute stays absolute).
pub fn pa_to_bar(p_pa: f64) -> f64 {
    p_pa / 1.0e5
}

/// Absolute pascal to bar gauge (referred to 1 atm, common practice).
pub fn pa_to_barg(p_pa: f64) -> f64 {
    (p_pa - ATMOSPHERE_PA) / 1.0e5
}

/// mol/s to kmol/h.
pub fn mol_s_to_kmol_h(n: f64) -> f64 {
    n * SECONDS_PER_HOUR / 1.0e3
}

/// mol/s to normal cubic metres per hour (ideal gas, DIN 1343 normal conditions).
pub fn mol_s_to_nm3_h(n: f64) -> f64 {
    n * SECONDS_PER_HOUR * normal_molar_volume_m3_per_mol()
}

/// kg/s to kg/h.
pub fn kg_s_to_kg_h(m: f64) -> f64 {
    m * SECONDS_PER_HOUR
}

/// W to kW.
pub fn w_to_kw(w: f64) -> f64 {
    w / 1.0e3
}

/// W to MW.
pub fn w_to_mw(w: f64) -> f64 {
    w / 1.0e6
}

#[cfg(test)]
mod tests {
    use super::*;

    type Parser = fn(&str, &str) -> Result<f64>;

    /// Flow as its SI number, so all parsers share one signature in the tables.
    fn flow(field: &str, text: &str) -> Result<f64> {
        parse_flow(field, text).map(SiValue::si)
    }

    fn close(actual: f64, expected: f64, abs_tol: f64, what: &str) {
        let ok = (actual - expected).abs() <= abs_tol;
        assert!(ok, "{what}: got {actual}, expected {expected} ± {abs_tol}");
    }

    /// (parser, text, expected SI value, absolute tolerance).
    #[rustfmt::skip]
    const GOOD: &[(Parser, &str, f64, f64)] = &[
        // ISO 80000-5: T/K = t/°C + 273.15, so 0 degC is 273.15 K exactly.
        (parse_temperature, "0 degC", 273.15, 0.0),
        (parse_temperature, "0 C", 273.15, 0.0),
        (parse_temperature, "0 °C", 273.15, 0.0),
        (parse_temperature, "  0   degC ", 273.15, 0.0),
        (parse_temperature, "850degC", 1123.15, 1e-12),
        (parse_temperature, "850 deg C", 1123.15, 1e-12),
        (parse_temperature, "+8.5e2 degC", 1123.15, 1e-12),
        (parse_temperature, "-273.14 degC", 0.01, 1e-9),
        (parse_temperature, "1123.15 K", 1123.15, 0.0),
        (parse_temperature, "1e3 K", 1000.0, 0.0),
        // NIST SP 811, B.9: T/K = (t/°F + 459.67)/1.8; 32 °F is 0 °C exactly.
        (parse_temperature, "32 degF", 273.15, 0.0),
        (parse_temperature, "212 F", 373.15, 1e-12),
        (parse_temperature, "-40 °F", 233.15, 1e-12),
        (parse_temperature, "1000 degF", (1000.0 + 459.67) / 1.8, 1e-12),
        (parse_temperature, "-459 degF", 0.67 / 1.8, 1e-9),
        // NIST SP 811, B.9: a temperature interval of 1 °C is 1 K, of 1 °F is 5/9 K.
        (parse_temperature_difference, "30 K", 30.0, 0.0),
        (parse_temperature_difference, "30 degC", 30.0, 0.0),
        (parse_temperature_difference, "30 C", 30.0, 0.0),
        (parse_temperature_difference, "30 delta_degC", 30.0, 0.0),
        (parse_temperature_difference, "9 degF", 5.0, 1e-12),
        (parse_temperature_difference, "18 delta_degF", 10.0, 1e-12),
        (parse_temperature_difference, "0 K", 0.0, 0.0),
        (parse_temperature_difference, "-15 K", -15.0, 0.0),
        // ISO 80000-4: 1 bar = 1e5 Pa; 1 atm = 101325 Pa (10th CGPM, 1954).
        (parse_pressure, "1 atm", 101_325.0, 0.0),
        (parse_pressure, "30 bar", 3.0e6, 0.0),
        (parse_pressure, "30 bara", 3.0e6, 0.0),
        (parse_pressure, "500 mbar", 5.0e4, 0.0),
        (parse_pressure, "101325 Pa", 101_325.0, 0.0),
        (parse_pressure, "250 kPa", 2.5e5, 0.0),
        (parse_pressure, "2.5 MPa", 2.5e6, 0.0),
        // NIST SP 811, B.8: 1 psi = 6894.757 Pa.
        (parse_pressure, "1 psia", 6894.757, 1e-3),
        // Gauge referred to 1 atm = 1.01325 bar = 14.695949 psi: common practice.
        (parse_pressure, "0 barg", 101_325.0, 0.0),
        (parse_pressure, "25 barg", 2_601_325.0, 1e-6),
        (parse_pressure, "-1 barg", 1325.0, 1e-9),
        (parse_pressure, "100 kPag", 201_325.0, 1e-9),
        (parse_pressure, "2 MPag", 2_101_325.0, 1e-9),
        (parse_pressure, "0 psig", 101_325.0, 0.0),
        (parse_pressure, "300 psig", (300.0 + 14.695_949) * 6894.757, 1.0),
        // ISO 80000-4 and NIST SP 811, as above.
        (parse_pressure_difference, "0.5 bar", 5.0e4, 0.0),
        (parse_pressure_difference, "20 mbar", 2.0e3, 0.0),
        (parse_pressure_difference, "150 kPa", 1.5e5, 0.0),
        (parse_pressure_difference, "0.1 MPa", 1.0e5, 0.0),
        (parse_pressure_difference, "700 Pa", 700.0, 0.0),
        (parse_pressure_difference, "0 bar", 0.0, 0.0),
        (parse_pressure_difference, "10 psi", 68_947.57, 1e-2),
        // 1 h = 3600 s (ISO 80000-3). NIST SP 811: International Table calorie = 4.1868 J, so
        // 1 Gcal/h = 1.163 MW.
        (parse_duty, "1500 W", 1500.0, 0.0),
        (parse_duty, "250 kW", 2.5e5, 0.0),
        (parse_duty, "12.5 MW", 1.25e7, 0.0),
        (parse_duty, "-5 MW", -5.0e6, 0.0),
        (parse_duty, "3.6 GJ/h", 1.0e6, 1e-6),
        (parse_duty, "3600 MJ/h", 1.0e6, 1e-6),
        (parse_duty, "1 Gcal/h", 1.163e6, 1e-6),
        // 1 h = 3600 s (ISO 80000-3): 3.6 kmol/h = 1 mol/s; 3.6 t/h = 1 kg/s.
        (flow, "3.6 kmol/h", 1.0, 0.0),
        (flow, "2.5 mol/s", 2.5, 0.0),
        (flow, "0.5 kmol/s", 500.0, 0.0),
        (flow, "7200 mol/h", 2.0, 0.0),
        (flow, "0 kmol/h", 0.0, 0.0),
        (flow, "1e-6 kmol/h", 1.0e-6 / 3.6, 1e-20),
        // DIN 1343: 22.414 Nm3 of ideal gas is 1 kmol, so 22414 Nm3/h is 277.78 mol/s.
        (flow, "22414 Nm3/h", 1.0e6 / 3600.0, 0.02),
        (flow, "22414 Nm³/h", 1.0e6 / 3600.0, 0.02),
        (flow, "3600 kg/h", 1.0, 0.0),
        (flow, "1.5 kg/s", 1.5, 0.0),
        (flow, "36 t/h", 10.0, 0.0),
        // Fractions: plain, percent (ISO 80000-1: % = 0.01) and ppm (1e-6).
        (parse_fraction, "0.85", 0.85, 0.0),
        (parse_fraction, "85 %", 0.85, 0.0),
        (parse_fraction, "85%", 0.85, 0.0),
        (parse_fraction, "0", 0.0, 0.0),
        (parse_fraction, "1", 1.0, 0.0),
        (parse_fraction, "100 %", 1.0, 0.0),
        (parse_fraction, "50 ppm", 5.0e-5, 1e-18),
        (parse_fraction, "1e-3", 1e-3, 0.0),
    ];

    /// (parser, text, true for Error::Quantity or false for Error::InvalidValue, words in reason).
    #[rustfmt::skip]
    const BAD: &[(Parser, &str, bool, &str)] = &[
        // A missing unit is refused and the reason lists the accepted units.
        (parse_temperature, "850", true, "no unit given; a temperature needs a unit: use one of K, degC, C, °C, degF, F, °F"),
        (parse_temperature_difference, "10", true, "no unit given; a temperature difference needs a unit: use one of K, degC"),
        (parse_pressure, "25", true, "no unit given; a pressure needs a unit: use one of bar, bara, barg"),
        (parse_pressure_difference, "0.3", true, "use one of bar, mbar, Pa, kPa, MPa, psi"),
        (parse_duty, "12", true, "use one of W, kW, MW, MJ/h, GJ/h, Gcal/h"),
        (flow, "1200", true, "use one of kmol/h, mol/s, kmol/s, mol/h, Nm3/h, Nm³/h, kg/h, kg/s, t/h"),
        // Unknown units, with the accepted ones, and a "did you mean" for a wrong case.
        (parse_temperature, "850 Kelvin", true, "unknown temperature unit 'Kelvin'; use one of K, degC"),
        (parse_pressure, "25 torr", true, "unknown pressure unit 'torr'; use one of bar"),
        (parse_duty, "5 hp", true, "unknown duty unit 'hp'; use one of W"),
        (flow, "5 lb/h", true, "unknown flow unit 'lb/h'; use one of kmol/h"),
        (parse_fraction, "0.5 K", true, "unknown fraction unit 'K'; use one of %, ppm"),
        (parse_temperature, "850 degc", true, "did you mean 'degC'?"),
        (parse_pressure, "2 mpa", true, "did you mean 'MPa'?"),
        (flow, "10 KMOL/H", true, "did you mean 'kmol/h'?"),
        // Spellings refused on purpose, with the reason.
        (parse_temperature, "300 °K", true, "no degree sign"),
        (parse_pressure, "300 psi", true, "write psia or psig"),
        (parse_pressure_difference, "0.5 barg", true, "no absolute or gauge reference"),
        (parse_pressure_difference, "0.5 bara", true, "no absolute or gauge reference"),
        (parse_pressure_difference, "5 psig", true, "no absolute or gauge reference; drop the 'a' or 'g'; use one of bar"),
        (flow, "5000 m3/h", true, "give normal cubic metres (Nm3/h"),
        (flow, "5000 Sm3/h", true, "several reference conditions"),
        // Text that is not a finite number.
        (parse_temperature, "NaN K", true, "not a finite number"),
        (parse_temperature, "nan K", true, "not a finite number"),
        (parse_temperature, "inf K", true, "not a finite number"),
        (parse_temperature, "-inf degC", true, "not a finite number"),
        (parse_temperature, "infinity K", true, "not a finite number"),
        (parse_temperature, "1e400 K", true, "too large to be a finite number"),
        (parse_temperature, "hot", true, "does not start with a number"),
        (parse_temperature, "K", true, "does not start with a number"),
        (parse_temperature, "degC 850", true, "does not start with a number"),
        (parse_temperature, ". K", true, "does not start with a number"),
        (parse_temperature, "- K", true, "does not start with a number"),
        (parse_fraction, "half", true, "does not start with a number"),
        (parse_temperature, "", true, "the value is empty"),
        (parse_fraction, "   ", true, "the value is empty"),
        // Malformed numbers.
        (parse_pressure, "1,5 bar", true, "malformed; write one number with a decimal point and no thousands"),
        (flow, "1,200 kmol/h", true, "malformed"),
        (flow, "1 200 kmol/h", true, "malformed"),
        (flow, "1.2.3 kmol/h", true, "malformed"),
        (flow, "1e5e3 kmol/h", true, "malformed"),
        (flow, "5-3 kmol/h", true, "malformed"),
        (flow, "1_000 kmol/h", true, "malformed"),
        (flow, "e5 kmol/h", true, "malformed"),
        (flow, "5e kmol/h", true, "malformed"),
        (flow, "1e+ kmol/h", true, "malformed"),
        // Impossible values.
        (parse_temperature, "0 K", false, "at or below absolute zero; a temperature must be above 0 K"),
        (parse_temperature, "-1 K", false, "above 0 K"),
        (parse_temperature, "-273.15 degC", false, "above 0 K"),
        (parse_temperature, "-300 degC", false, "this is -26.85 K"),
        (parse_temperature, "-459.67 degF", false, "above 0 K"),
        (parse_temperature, "-500 F", false, "above 0 K"),
        (parse_pressure, "0 bar", false, "an absolute pressure must be above 0"),
        (parse_pressure, "-1 bara", false, "must be above 0"),
        (parse_pressure, "-2 barg", false, "this is -98675 Pa absolute"),
        (parse_pressure, "-1.01325 barg", false, "must be above 0"),
        (parse_pressure, "-15 psig", false, "must be above 0"),
        (parse_pressure, "0 Pa", false, "must be above 0"),
        (parse_pressure_difference, "-0.2 bar", false, "must be zero or positive"),
        (flow, "-1 kmol/h", false, "a flow must be zero or positive"),
        (flow, "-0.1 kg/s", false, "zero or positive"),
        (flow, "-5 Nm3/h", false, "zero or positive"),
        (parse_fraction, "85", false, "this is 85; for a percentage write '85 %'"),
        (parse_fraction, "1.5", false, "a fraction must be within 0 and 1"),
        (parse_fraction, "-0.1", false, "within 0 and 1"),
        (parse_fraction, "120 %", false, "this is 1.2"),
        (parse_fraction, "-5 %", false, "within 0 and 1"),
        (parse_fraction, "2e6 ppm", false, "within 0 and 1"),
        (parse_duty, "1e308 GJ/h", false, "too large"),
        (parse_pressure, "1e308 MPa", false, "too large"),
        (flow, "1e308 kmol/s", false, "too large"),
    ];

    #[test]
    fn good_values_convert_to_si() {
        for &(parse, text, expected, tol) in GOOD {
            match parse("f", text) {
                Ok(si) => close(si, expected, tol, text),
                Err(e) => panic!("{text}: {e}"),
            }
        }
    }

    #[test]
    fn bad_values_give_the_right_error() {
        for &(parse, text, quantity_error, needle) in BAD {
            let reason = match (parse("some.field", text), quantity_error) {
                (
                    Err(Error::Quantity {
                        field,
                        value,
                        reason,
                    }),
                    true,
                ) => {
                    assert_eq!(value, text, "Quantity keeps the text as given");
                    (field, reason)
                }
                (
                    Err(Error::InvalidValue {
                        field,
                        value,
                        reason,
                    }),
                    false,
                ) => {
                    assert_eq!(value, text.trim(), "InvalidValue keeps the trimmed text");
                    (field, reason)
                }
                (other, _) => panic!("{text}: wrong outcome {other:?}"),
            };
            assert_eq!(reason.0, "some.field", "{text}");
            assert!(
                reason.1.contains(needle),
                "{text}: '{}' lacks '{needle}'",
                reason.1
            );
        }
        // The number shown in a range message is not a fraction of the percentage.
        let message = parse_fraction("x", "250").unwrap_err().to_string();
        assert!(!message.contains("percentage"), "{message}");
    }

    #[test]
    fn messages_name_the_field() {
        let message = parse_pressure("reformer.pressure", "25")
            .unwrap_err()
            .to_string();
        assert!(
            message.starts_with("reformer.pressure: cannot read '25': no unit"),
            "{message}"
        );
        let message = parse_temperature("t_in", "-300 degC")
            .unwrap_err()
            .to_string();
        assert!(
            message.starts_with("t_in: value -300 degC is not allowed"),
            "{message}"
        );
    }

    #[test]
    fn constants() {
        // CODATA 2018: R = N_A k = 6.022 140 76e23 mol-1 × 1.380 649e-23 J/K, both exact.
        close(R_GAS, 6.022_140_76e23 * 1.380_649e-23, 1e-14, "R");
        // DIN 1343: molar volume of the ideal gas at 273.15 K and 101325 Pa, 22.414 m3/kmol.
        close(normal_molar_volume_m3_per_mol() * 1.0e3, 22.414, 1e-3, "Vm");
        // CODATA 2018 molar volume of ideal gas (273.15 K, 101.325 kPa), from memory.
        let vm = normal_molar_volume_m3_per_mol();
        close(vm, 22.413_969_54e-3, 1e-11, "Vm");
        // NIST SP 811, Appendix B.8: 1 psi = 6.894 757 E+03 Pa.
        close(PSI_PA, 6894.757, 1e-3, "psi");
        // NIST SP 811: 1 atm = 14.695 95 psi; the brief's gauge offset is 14.695949 psi.
        close(ATMOSPHERE_PA / PSI_PA, 14.695_949, 1e-6, "atm in psi");
    }

    #[test]
    fn flow_kind_is_kept() {
        assert_eq!(parse_flow("f", "3.6 kmol/h").unwrap(), Flow::Molar(1.0));
        assert_eq!(parse_flow("f", "36 t/h").unwrap(), Flow::Mass(10.0));
        assert!(matches!(parse_flow("f", "1 Nm3/h"), Ok(Flow::Molar(_))));
        assert!(matches!(parse_flow("f", "1 kg/h"), Ok(Flow::Mass(_))));
    }

    #[test]
    fn report_conversions() {
        // ISO 80000-5: 273.15 K is 0 degC. ISO 80000-4: 1 bar = 1e5 Pa.
        assert_eq!(kelvin_to_degc(273.15), 0.0);
        assert_eq!(pa_to_bar(2.5e6), 25.0);
        close(pa_to_barg(2_601_325.0), 25.0, 1e-12, "barg");
        close(mol_s_to_kmol_h(1.0), 3.6, 1e-12, "kmol/h");
        // DIN 1343: 1 kmol/h of ideal gas is 22.414 Nm3/h.
        close(mol_s_to_nm3_h(1.0 / 3.6), 22.414, 1e-3, "Nm3/h");
        assert_eq!(kg_s_to_kg_h(1.0), 3600.0);
        assert_eq!(w_to_kw(2500.0), 2.5);
        assert_eq!(w_to_mw(2.5e6), 2.5);
        // Round trips through the parsers.
        let round_trips: [(f64, f64); 6] = [
            (
                kelvin_to_degc(parse_temperature("f", "871.3 degC").unwrap()),
                871.3,
            ),
            (pa_to_barg(parse_pressure("f", "27.4 barg").unwrap()), 27.4),
            (mol_s_to_kmol_h(flow("f", "1234.5 kmol/h").unwrap()), 1234.5),
            (mol_s_to_nm3_h(flow("f", "1e5 Nm3/h").unwrap()), 1.0e5),
            (kg_s_to_kg_h(flow("f", "45000 kg/h").unwrap()), 45_000.0),
            (w_to_kw(parse_duty("f", "750 kW").unwrap()), 750.0),
        ];
        for (got, expected) in round_trips {
            close(got, expected, 1e-9 * expected, "round trip");
        }
    }

    #[test]
    fn specific_energies_read_per_kilogram() {
        // 1 t = 1000 kg (SI), 1 kWh = 3.6 MJ, 1 cal(IT) = 4.1868 J (NIST SP 811).
        let e = |t: &str| parse_specific_energy("f", t).unwrap();
        assert_eq!(e("2.5 GJ/t"), 2.5e6);
        assert_eq!(e("2.5 MJ/kg"), 2.5e6);
        assert_eq!(e("2500 kJ/kg"), 2.5e6);
        assert_eq!(e("100 kWh/t"), 3.6e5);
        assert!((e("0.6 Gcal/t") - 0.6 * 4.1868e6).abs() < 1e-6);
        assert!(parse_specific_energy("f", "2.5 GJ").is_err());
        assert!(parse_specific_energy("f", "-1 GJ/t").is_err());
        let msg = parse_specific_energy("f", "2.5 GJ/tonne")
            .unwrap_err()
            .to_string();
        assert!(msg.contains("as t"), "{msg}");
    }

    #[test]
    fn message_numbers_are_short() {
        assert_eq!(short(-26.850000000000023), "-26.85");
        assert_eq!(short(0.0), "0");
        assert_eq!(short(1325.0), "1325");
        assert_eq!(short(1.5e-9), "1.50000e-9");
        assert_eq!(short(f64::INFINITY), "inf");
    }
}

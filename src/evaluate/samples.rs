//! The samples file of `syntrain evaluate`: one row per laboratory sample of a reactor outlet,
//! read with the `csv` crate. Columns (header names are fixed; order is free):
//!
//! - `sample`: an id, an ISO date (`2026-03-14`) or date-time (`2026-03-14T08:30`, seconds
//!   and a trailing `Z` allowed), echoed as given;
//! - `unit`: a reactor of the flowsheet (reformer, pre-reformer, shift converter, methanator);
//! - `temperature_C`: the measured outlet temperature, degC;
//! - `pressure_bar` (optional): the outlet pressure, bar abs; else the model's;
//! - one column per measured species by formula (`H2`, `CO`, `CO2`, `CH4`, `N2`, `Ar`, ...):
//!   the outlet's dry-basis mol %;
//! - a measured inlet (optional): `inlet_temperature_C`, `inlet:SPECIES` (dry mol %),
//!   `inlet_flow_kmol_h` (the dry gas flow), `inlet_H2O_pct_wet`.
//!
//! Empty cells are not measured. Unknown columns, unknown units, units that are not reactors
//! and cells that are not numbers are errors naming the file, row (line) and column.

use crate::error::{Error, Position, Result};
use crate::flowsheet::Flowsheet;
use crate::quantity::CELSIUS_OFFSET_K;
use crate::thermo::SpeciesDb;

/// Unit types whose outlet can be evaluated against equilibrium.
pub const REACTOR_TYPES: [&str; 4] = ["reformer", "prereformer", "shift", "methanator"];

/// A measured inlet of a sample.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct MeasuredInlet {
    /// Inlet temperature, K, where measured.
    pub temperature_k: Option<f64>,
    /// Dry mol % by database species index.
    pub dry_pct: Vec<(usize, f64)>,
    /// Dry gas flow, mol/s, where measured.
    pub dry_flow_mol_s: Option<f64>,
    /// Water, mol % of the wet gas, where measured.
    pub water_pct_wet: Option<f64>,
}

/// One sample as read.
#[derive(Debug, Clone, PartialEq)]
pub struct Sample {
    /// The `sample` cell exactly as written.
    pub id: String,
    /// Its time in days since 1970-01-01 when the id is an ISO date or date-time.
    pub days: Option<f64>,
    /// Line of the row in the file (the header is line 1).
    pub line: usize,
    /// The unit sampled.
    pub unit: String,
    /// Outlet temperature, K.
    pub temperature_k: f64,
    /// Outlet pressure, Pa abs, where measured.
    pub pressure_pa: Option<f64>,
    /// Outlet dry mol % by database species index, in column order.
    pub dry_pct: Vec<(usize, f64)>,
    /// The measured inlet, where any inlet column has a value (its composition given).
    pub inlet: Option<MeasuredInlet>,
}

/// What a column holds.
#[derive(Debug, Clone, Copy, PartialEq)]
enum Column {
    Sample,
    Unit,
    Temperature,
    Pressure,
    Outlet(usize),
    InletTemperature,
    Inlet(usize),
    InletFlow,
    InletWater,
}

/// Read the samples of `text` (`origin` names the file in errors) for `flowsheet`.
pub fn read(
    db: &SpeciesDb,
    flowsheet: &Flowsheet,
    origin: &str,
    text: &str,
) -> Result<Vec<Sample>> {
    let at = |line: usize, column: usize, input: &str, message: String| Error::Input {
        file: origin.to_string(),
        position: Some(Position { line, column }),
        input: input.to_string(),
        message,
    };
    let mut reader = csv::ReaderBuilder::new()
        .has_headers(true)
        .trim(csv::Trim::All)
        .from_reader(text.as_bytes());
    let header = reader
        .headers()
        .map_err(|e| at(1, 1, "header", format!("cannot read the header: {e}")))?
        .clone();
    let mut columns = Vec::with_capacity(header.len());
    for (k, name) in header.iter().enumerate() {
        let species =
            |s: &str| {
                db.index_of(s).ok_or_else(|| {
                    at(
                        1,
                        k + 1,
                        name,
                        format!(
                        "unknown column '{name}': not a species of the data ({}); the columns are \
                         sample, unit, temperature_C, pressure_bar, species formulas (dry mol %), \
                         inlet_temperature_C, inlet:SPECIES, inlet_flow_kmol_h, inlet_H2O_pct_wet",
                        db.all().iter().map(|s| s.name.as_str()).collect::<Vec<_>>().join(", ")
                    ),
                    )
                })
            };
        let column = match name {
            "sample" => Column::Sample,
            "unit" => Column::Unit,
            "temperature_C" => Column::Temperature,
            "pressure_bar" => Column::Pressure,
            "inlet_temperature_C" => Column::InletTemperature,
            "inlet_flow_kmol_h" => Column::InletFlow,
            "inlet_H2O_pct_wet" => Column::InletWater,
            _ => match name.strip_prefix("inlet:") {
                Some(s) => Column::Inlet(species(s)?),
                None => Column::Outlet(species(name)?),
            },
        };
        if matches!(column, Column::Outlet(i) | Column::Inlet(i) if db.by_index(i).name == "H2O") {
            return Err(at(
                1,
                k + 1,
                name,
                "an analysis is on a dry basis; give the inlet's water as inlet_H2O_pct_wet".into(),
            ));
        }
        if columns.contains(&column) {
            return Err(at(1, k + 1, name, format!("column '{name}' appears twice")));
        }
        columns.push(column);
    }
    for (need, what) in [
        (Column::Sample, "sample"),
        (Column::Unit, "unit"),
        (Column::Temperature, "temperature_C"),
    ] {
        if !columns.contains(&need) {
            return Err(at(1, 1, what, format!("the header has no '{what}' column")));
        }
    }
    let mut samples = Vec::new();
    for record in reader.records() {
        let record = record.map_err(|e| {
            let line = e.position().map_or(0, |p| p.line() as usize);
            at(line, 1, "row", format!("cannot read this row: {e}"))
        })?;
        let line = record.position().map_or(0, |p| p.line() as usize);
        if record.iter().all(str::is_empty) {
            continue;
        }
        let mut sample = Sample {
            id: String::new(),
            days: None,
            line,
            unit: String::new(),
            temperature_k: f64::NAN,
            pressure_pa: None,
            dry_pct: Vec::new(),
            inlet: None,
        };
        let mut inlet = MeasuredInlet::default();
        for (k, (cell, column)) in record.iter().zip(&columns).enumerate() {
            if cell.is_empty() {
                continue;
            }
            let name = &header[k];
            let number = |lo: f64, hi: f64, unit: &str| -> Result<f64> {
                let v: f64 = cell.parse().map_err(|_| {
                    at(
                        line,
                        k + 1,
                        name,
                        format!("'{cell}' is not a number ({unit})"),
                    )
                })?;
                if !(v.is_finite() && v >= lo && v <= hi) {
                    return Err(at(
                        line,
                        k + 1,
                        name,
                        format!("{cell} {unit} is outside {lo}..{hi}"),
                    ));
                }
                Ok(v)
            };
            match *column {
                Column::Sample => {
                    sample.id = cell.to_string();
                    sample.days = parse_date(cell);
                }
                Column::Unit => {
                    let Some(unit) = flowsheet.units().iter().find(|u| u.name == cell) else {
                        let names: Vec<&str> =
                            flowsheet.units().iter().map(|u| u.name.as_str()).collect();
                        return Err(at(
                            line,
                            k + 1,
                            name,
                            format!(
                                "no unit '{cell}' in the flowsheet; its units: {}",
                                names.join(", ")
                            ),
                        ));
                    };
                    if !REACTOR_TYPES.contains(&unit.unit_type.name) {
                        return Err(at(
                            line,
                            k + 1,
                            name,
                            format!(
                                "unit '{cell}' is a {}, not a reactor ({})",
                                unit.unit_type.name,
                                REACTOR_TYPES.join(", ")
                            ),
                        ));
                    }
                    sample.unit = cell.to_string();
                }
                Column::Temperature => {
                    sample.temperature_k = number(-50.0, 1500.0, "degC")? + CELSIUS_OFFSET_K
                }
                Column::Pressure => {
                    sample.pressure_pa = Some(number(0.01, 500.0, "bar abs")? * 1e5)
                }
                Column::Outlet(i) => sample.dry_pct.push((i, number(0.0, 100.0, "mol % dry")?)),
                Column::InletTemperature => {
                    inlet.temperature_k = Some(number(-50.0, 1500.0, "degC")? + CELSIUS_OFFSET_K)
                }
                Column::Inlet(i) => inlet.dry_pct.push((i, number(0.0, 100.0, "mol % dry")?)),
                Column::InletFlow => {
                    inlet.dry_flow_mol_s = Some(number(1e-9, 1e9, "kmol/h")? / 3.6)
                }
                Column::InletWater => inlet.water_pct_wet = Some(number(0.0, 99.0, "mol % wet")?),
            }
        }
        let missing = |what: &str| {
            let k = header.iter().position(|h| h == what).unwrap_or(0);
            at(line, k + 1, what, format!("the sample has no {what}"))
        };
        if sample.id.is_empty() {
            return Err(missing("sample"));
        }
        if sample.unit.is_empty() {
            return Err(missing("unit"));
        }
        if sample.temperature_k.is_nan() {
            return Err(missing("temperature_C"));
        }
        if sample.dry_pct.len() < 2 {
            return Err(at(
                line,
                1,
                "analysis",
                "the outlet analysis needs at least two species".into(),
            ));
        }
        let any_inlet = inlet != MeasuredInlet::default();
        if any_inlet {
            if inlet.dry_pct.is_empty() {
                let k = columns
                    .iter()
                    .position(|c| {
                        matches!(
                            c,
                            Column::InletTemperature | Column::InletFlow | Column::InletWater
                        )
                    })
                    .unwrap_or(0);
                return Err(at(
                    line,
                    k + 1,
                    &header[k],
                    "a measured inlet needs its dry analysis (inlet:SPECIES columns)".into(),
                ));
            }
            sample.inlet = Some(inlet);
        }
        samples.push(sample);
    }
    if samples.is_empty() {
        return Err(at(1, 1, "rows", "the samples file has no rows".into()));
    }
    Ok(samples)
}

/// Days since 1970-01-01 of an ISO date `YYYY-MM-DD` or date-time `YYYY-MM-DDTHH:MM[:SS][Z]`
/// (a space may stand for the `T`); `None` for anything else.
pub fn parse_date(text: &str) -> Option<f64> {
    let b = text.as_bytes();
    if b.len() < 10 || b[4] != b'-' || b[7] != b'-' {
        return None;
    }
    let num = |s: &str| -> Option<i64> {
        s.bytes()
            .all(|c| c.is_ascii_digit())
            .then(|| s.parse().ok())?
    };
    let (y, m, d) = (num(&text[0..4])?, num(&text[5..7])?, num(&text[8..10])?);
    if !(1..=12).contains(&m) || d < 1 || d > days_in_month(y, m) {
        return None;
    }
    let mut seconds = 0.0;
    if b.len() > 10 {
        if b[10] != b'T' && b[10] != b' ' {
            return None;
        }
        let rest = text[11..].trim_end_matches('Z');
        let parts: Vec<&str> = rest.split(':').collect();
        if !(2..=3).contains(&parts.len()) || parts.iter().any(|p| p.len() != 2) {
            return None;
        }
        let (h, mi) = (num(parts[0])?, num(parts[1])?);
        let s = if parts.len() == 3 { num(parts[2])? } else { 0 };
        if h > 23 || mi > 59 || s > 59 {
            return None;
        }
        seconds = (h * 3600 + mi * 60 + s) as f64;
    }
    Some(days_from_civil(y, m, d) as f64 + seconds / 86_400.0)
}

/// Days from 1970-01-01 of a proleptic Gregorian date (H. Hinnant, "chrono-Compatible
/// Low-Level Date Algorithms", days_from_civil).
pub fn days_from_civil(y: i64, m: i64, d: i64) -> i64 {
    let y = if m <= 2 { y - 1 } else { y };
    let era = y.div_euclid(400);
    let yoe = y - era * 400;
    let mp = (m + 9) % 12;
    let doy = (153 * mp + 2) / 5 + d - 1;
    let doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
    era * 146_097 + doe - 719_468
}

/// The date `YYYY-MM-DD` of a day count from 1970-01-01 (the same source, civil_from_days).
pub fn date_text(days: i64) -> String {
    let z = days + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z - era * 146_097;
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let d = doy - (153 * mp + 2) / 5 + 1;
    let m = if mp < 10 { mp + 3 } else { mp - 9 };
    let y = yoe + era * 400 + i64::from(m <= 2);
    format!("{y:04}-{m:02}-{d:02}")
}

fn days_in_month(y: i64, m: i64) -> i64 {
    match m {
        2 if (y % 4 == 0 && y % 100 != 0) || y % 400 == 0 => 29,
        2 => 28,
        4 | 6 | 9 | 11 => 30,
        _ => 31,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn dates_count_days_from_1970() {
        // 2000-03-01 is day 11 017 after 1970-01-01 (30 years with 7 leap days: 10 957, plus
        // 31 + 29 days of January and February 2000).
        assert_eq!(parse_date("2000-03-01"), Some(11_017.0));
        assert_eq!(parse_date("1970-01-01T12:00"), Some(0.5));
        assert_eq!(parse_date("1970-01-02 06:00:00Z"), Some(1.25));
        assert_eq!(date_text(11_017), "2000-03-01");
        assert_eq!(date_text(-1), "1969-12-31");
        for bad in [
            "2026-02-29",
            "2026-13-01",
            "week 3",
            "2026-01-01T25:00",
            "2026-1-01",
        ] {
            assert_eq!(parse_date(bad), None, "{bad}");
        }
        assert_eq!(
            parse_date("2024-02-29"),
            Some(days_from_civil(2024, 2, 29) as f64)
        );
    }
}

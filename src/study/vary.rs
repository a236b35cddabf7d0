//! What a study varies, as written on the command line or in a cases file.
//!
//! - `PATH=FROM..TO:COUNT`: COUNT values evenly spaced from FROM to TO, both ends included
//!   (`units.reformer.outlet-temperature=820 degC..900 degC:17`);
//! - `PATH=V1,V2,...`: a list of values;
//! - `PATH~normal(MEAN,SD)`, `PATH~uniform(A,B)`, `PATH~triangular(A,MODE,B)`: a distribution
//!   to draw from (see [`super::distribution`]).
//!
//! PATH is an input path of the flowsheet (`Flowsheet::input`), or
//! `units.NAME.steam-to-carbon`, the steam-to-carbon ratio at that unit's inlet, met by scaling
//! the steam feed. Values carry units read by the input's kind ("820 degC", "10 K",
//! "3105 kmol/h", "88 %"); a bare number is read in SI except for fractions and ratios. The
//! unit of the first value written is the unit the study reports that input in.

use super::distribution::Distribution;
use crate::error::{Error, Result};
use crate::flowsheet::Flowsheet;
use crate::units::unit::{Param, ValueKind, WrittenUnit};

/// The suffix of the settable steam-to-carbon ratio at a unit's inlet.
pub const STEAM_TO_CARBON_KEY: &str = "steam-to-carbon";

/// Where a study input goes.
#[derive(Debug, Clone, PartialEq)]
pub enum InputTarget {
    /// A slot of the flowsheet's parameter vector, with how its values are written.
    Slot(Param, ValueKind),
    /// The steam-to-carbon ratio at this unit's inlet (mol/mol), met by scaling a steam feed.
    SteamToCarbon {
        /// The unit's name.
        unit: String,
    },
}

/// One input a study sets: its path, where it goes and the unit it is reported in.
#[derive(Debug, Clone, PartialEq)]
pub struct StudyInput {
    /// The input path as written.
    pub path: String,
    /// Where it goes.
    pub target: InputTarget,
    /// The unit its values are shown in (that of the first value written).
    pub unit: WrittenUnit,
}

impl StudyInput {
    /// Resolve `path` on `flowsheet`, taking the display unit from `first` (a value as
    /// written). An unknown path is an error listing the nearest valid ones.
    pub fn resolve(flowsheet: &Flowsheet, path: &str, first: &str) -> Result<StudyInput> {
        let path = path.trim();
        let target = match flowsheet.input(path) {
            Ok(slot) => InputTarget::Slot(slot, flowsheet.inputs()[slot.0].value),
            Err(e) => match steam_to_carbon_unit(flowsheet, path) {
                Some(unit) => InputTarget::SteamToCarbon { unit },
                None => return Err(e),
            },
        };
        let unit = match &target {
            InputTarget::Slot(_, kind) => kind.written_unit(path, first)?,
            InputTarget::SteamToCarbon { .. } => {
                plain_number(path, first)?;
                WrittenUnit {
                    name: String::new(),
                    offset: 0.0,
                    scale: 1.0,
                }
            }
        };
        Ok(StudyInput {
            path: path.to_string(),
            target,
            unit,
        })
    }

    /// A value as written (with its unit) to SI.
    pub fn parse(&self, text: &str) -> Result<f64> {
        match &self.target {
            InputTarget::Slot(_, kind) => kind.parse(&self.path, text),
            InputTarget::SteamToCarbon { .. } => {
                let v = plain_number(&self.path, text)?;
                if v > 0.0 {
                    Ok(v)
                } else {
                    Err(invalid(
                        &self.path,
                        text,
                        "a steam-to-carbon ratio must be above 0",
                    ))
                }
            }
        }
    }

    /// A value as written, shown in this input's unit: the number itself when it is written in
    /// that unit (so "820 degC" shows as 820 exactly), else converted from SI.
    pub fn shown(&self, text: &str, si: f64) -> f64 {
        match split_value(text) {
            Some((number, unit)) if unit == self.unit.name => number,
            _ => self.unit.from_si(si),
        }
    }

    /// The kind of a difference of two values of this input (a standard deviation): an
    /// absolute temperature or pressure spreads by a temperature or pressure difference.
    pub fn difference_kind(&self) -> Option<ValueKind> {
        match &self.target {
            InputTarget::Slot(_, ValueKind::Temperature) => Some(ValueKind::TemperatureDifference),
            InputTarget::Slot(_, ValueKind::Pressure) => Some(ValueKind::PressureDifference),
            InputTarget::Slot(_, kind) => Some(*kind),
            InputTarget::SteamToCarbon { .. } => None,
        }
    }
}

/// How one input varies.
#[derive(Debug, Clone)]
pub enum Variation {
    /// A list of values: (shown in the input's unit, SI), in order.
    Values(Vec<(f64, f64)>),
    /// A distribution to draw from.
    Draw(Distribution),
}

/// One `--vary` setting read.
#[derive(Debug, Clone)]
pub struct Vary {
    /// The input.
    pub input: StudyInput,
    /// Its values or distribution.
    pub variation: Variation,
}

/// Read a `--vary` setting (see the module documentation).
pub fn parse_vary(flowsheet: &Flowsheet, text: &str) -> Result<Vary> {
    let field = "--vary";
    let (path, rest, draw) = match (text.find('='), text.find('~')) {
        (Some(e), Some(t)) if t < e => (&text[..t], &text[t + 1..], true),
        (Some(e), _) => (&text[..e], &text[e + 1..], false),
        (None, Some(t)) => (&text[..t], &text[t + 1..], true),
        (None, None) => {
            return Err(invalid(
                field,
                text,
                "write PATH=FROM..TO:COUNT (e.g. 'units.hts.approach.shift=0 K..40 K:9'), \
                 PATH=V1,V2,... or PATH~normal(MEAN,SD)",
            ))
        }
    };
    if draw {
        let (input, distribution) = Distribution::parse(flowsheet, path, rest)?;
        return Ok(Vary {
            input,
            variation: Variation::Draw(distribution),
        });
    }
    if let Some((range, count)) = rest.rsplit_once(':').filter(|(r, _)| r.contains("..")) {
        let (from, to) = range.split_once("..").unwrap_or((range, range));
        let input = StudyInput::resolve(flowsheet, path, from)?;
        let count: usize = count.trim().parse().map_err(|_| {
            invalid(
                field,
                text,
                "the count after ':' must be a whole number of values, 1 or more",
            )
        })?;
        if count == 0 || count > 100_000_000 {
            return Err(invalid(
                field,
                text,
                "the count after ':' must be 1 to 100000000 values",
            ));
        }
        let (from_si, to_si) = (input.parse(from)?, input.parse(to)?);
        let (a, b) = (input.shown(from, from_si), input.shown(to, to_si));
        let values = (0..count)
            .map(|k| {
                let shown = if count == 1 {
                    a
                } else {
                    let (k, n) = (k as f64, (count - 1) as f64);
                    (a * (n - k) + b * k) / n
                };
                (shown, input.unit.offset + input.unit.scale * shown)
            })
            .collect();
        return Ok(Vary {
            input,
            variation: Variation::Values(values),
        });
    }
    let items: Vec<&str> = rest.split(',').collect();
    let input = StudyInput::resolve(flowsheet, path, items[0])?;
    let values = items
        .iter()
        .map(|item| {
            let si = input.parse(item)?;
            Ok((input.shown(item, si), si))
        })
        .collect::<Result<Vec<_>>>()?;
    Ok(Vary {
        input,
        variation: Variation::Values(values),
    })
}

/// `units.NAME.steam-to-carbon` where NAME is a unit of the flowsheet.
fn steam_to_carbon_unit(flowsheet: &Flowsheet, path: &str) -> Option<String> {
    let name = path
        .strip_prefix("units.")?
        .strip_suffix(STEAM_TO_CARBON_KEY)?
        .strip_suffix('.')?;
    flowsheet
        .units()
        .iter()
        .any(|u| u.name == name)
        .then(|| name.to_string())
}

/// The number and the unit of a value as written ("820 degC" -> (820, "degC")).
pub fn split_value(text: &str) -> Option<(f64, &str)> {
    let t = text.trim();
    let end = t
        .find(|c: char| !(c.is_ascii_digit() || matches!(c, '+' | '-' | '.' | 'e' | 'E')))
        .unwrap_or(t.len());
    let number: f64 = t[..end].parse().ok()?;
    Some((number, t[end..].trim()))
}

/// A bare finite number.
fn plain_number(field: &str, text: &str) -> Result<f64> {
    match text.trim().parse::<f64>() {
        Ok(v) if v.is_finite() => Ok(v),
        _ => Err(invalid(field, text, "write a plain number (mol/mol)")),
    }
}

fn invalid(field: &str, value: &str, reason: &str) -> Error {
    Error::InvalidValue {
        field: field.to_string(),
        value: value.to_string(),
        reason: reason.to_string(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::thermo::SpeciesDb;

    fn demo(db: &SpeciesDb) -> Flowsheet {
        let path =
            std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("flowsheets/demo-train.yaml");
        Flowsheet::from_file(&path, db).unwrap()
    }

    fn values(v: &Vary) -> Vec<(f64, f64)> {
        match &v.variation {
            Variation::Values(list) => list.clone(),
            Variation::Draw(_) => panic!("a draw"),
        }
    }

    #[test]
    fn a_range_has_both_ends_and_the_unit_of_its_first_value() {
        let db = SpeciesDb::embedded().unwrap();
        let fs = demo(&db);
        let v = parse_vary(
            &fs,
            "units.reformer.outlet-temperature=820 degC..1173.15 K:5",
        )
        .unwrap();
        assert_eq!(v.input.unit.name, "degC");
        let got = values(&v);
        let shown: Vec<f64> = got.iter().map(|x| x.0).collect();
        // 1173.15 K is 900 degC (ITS-90: 0 degC = 273.15 K).
        assert_eq!(shown.len(), 5);
        for (s, want) in shown.iter().zip([820.0, 840.0, 860.0, 880.0, 900.0]) {
            assert!((s - want).abs() < 1e-9, "{shown:?}");
        }
        for (s, si) in &got {
            assert!((s + 273.15 - si).abs() < 1e-9);
        }
        assert!(matches!(v.input.target, InputTarget::Slot(..)));
        let one = parse_vary(&fs, "units.hts.approach.shift=7 K..9 K:1").unwrap();
        assert_eq!(values(&one), [(7.0, 7.0)]);
    }

    #[test]
    fn a_list_and_the_steam_to_carbon_ratio() {
        let db = SpeciesDb::embedded().unwrap();
        let fs = demo(&db);
        let v = parse_vary(&fs, "feeds.process-steam.total=3000 kmol/h,3600 kmol/h").unwrap();
        // 3600 kmol/h = 1 kmol/s = 1000 mol/s.
        let got = values(&v);
        assert_eq!((got[0].0, got[1].0), (3000.0, 3600.0));
        assert!((got[0].1 - 3000.0 / 3.6).abs() < 1e-9 && (got[1].1 - 1000.0).abs() < 1e-9);
        let sc = parse_vary(&fs, "units.reformer.steam-to-carbon=2.5..3.5:3").unwrap();
        assert_eq!(
            sc.input.target,
            InputTarget::SteamToCarbon {
                unit: "reformer".into()
            }
        );
        assert_eq!(values(&sc), [(2.5, 2.5), (3.0, 3.0), (3.5, 3.5)]);
        assert!(sc.input.difference_kind().is_none());
        assert!(parse_vary(&fs, "units.reformer.steam-to-carbon=0,3").is_err());
        assert!(parse_vary(&fs, "units.nowhere.steam-to-carbon=3").is_err());
    }

    #[test]
    fn bad_settings_are_refused_with_the_reason() {
        let db = SpeciesDb::embedded().unwrap();
        let fs = demo(&db);
        for (text, says) in [
            ("units.hts.approach.shift", "PATH=FROM..TO:COUNT"),
            ("units.hts.approach.shift=0 K..10 K:0", "1 to"),
            ("units.hts.approach.shift=0 K..10 K:x", "whole number"),
            (
                "units.hts.aproach.shift=0 K..10 K:3",
                "units.hts.approach.shift",
            ),
            ("units.hts.approach.shift=0 bar..10 bar:3", "bar"),
        ] {
            let e = parse_vary(&fs, text).unwrap_err().to_string();
            assert!(e.contains(says), "{text}: {e}");
        }
    }

    #[test]
    fn differences_of_absolute_temperatures_and_pressures() {
        let db = SpeciesDb::embedded().unwrap();
        let fs = demo(&db);
        let kind = |path: &str, first: &str| {
            StudyInput::resolve(&fs, path, first)
                .unwrap()
                .difference_kind()
        };
        assert_eq!(
            kind("units.reformer.outlet-temperature", "860 degC"),
            Some(ValueKind::TemperatureDifference)
        );
        assert_eq!(
            kind("feeds.natural-gas.pressure", "30 bar"),
            Some(ValueKind::PressureDifference)
        );
        assert_eq!(
            kind("units.hts.approach.shift", "8 K"),
            Some(ValueKind::TemperatureDifference)
        );
        assert_eq!(split_value("820 degC"), Some((820.0, "degC")));
        assert_eq!(split_value(" 2.5 "), Some((2.5, "")));
        assert_eq!(split_value("degC"), None);
    }
}

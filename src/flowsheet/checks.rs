//! Checks across the keys of one feed or one unit entry (either `flows` or `total`; either
//! `outlet-temperature` or `duty`; the number of inlets and outlets of each type; ...), run while
//! the entry is parsed so that a failure is reported at the entry's line and column with its
//! path (`units.hts-cooler`).
//!
//! [`Checked`] reads an entry through its derived `Deserialize` inside the YAML parser's own
//! mapping visit, then runs [`Check::check`]; an error returned there gets the position of the
//! mapping from the parser.

use std::fmt;
use std::marker::PhantomData;

use serde::de::{
    self, value::MapAccessDeserializer, Deserialize, Deserializer, MapAccess, Visitor,
};

use super::feeds::MOLE_FRACTION_SUM_TOLERANCE;
use super::yaml::{
    FeedModel, HeatExchangeModel, KnockoutModel, MethanatorModel, MixerModel, PrereformerModel,
    PurifierModel, ReformerModel, ShiftModel, SplitterModel, UnitType,
};

/// A check across the keys of one entry; the error is the message (the parser adds the path and
/// the position).
pub trait Check {
    /// Check the entry.
    fn check(&self) -> Result<(), String>;
}

/// An entry read and then checked.
#[derive(Debug, Clone)]
pub struct Checked<T>(pub T);

impl<'de, T: Deserialize<'de> + Check> Deserialize<'de> for Checked<T> {
    fn deserialize<D: Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        struct CheckVisitor<T>(PhantomData<T>);

        impl<'de, T: Deserialize<'de> + Check> Visitor<'de> for CheckVisitor<T> {
            type Value = Checked<T>;

            fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
                f.write_str("a mapping of keys to values")
            }

            fn visit_map<A: MapAccess<'de>>(self, map: A) -> Result<Self::Value, A::Error> {
                let value = T::deserialize(MapAccessDeserializer::new(map))?;
                value.check().map_err(de::Error::custom)?;
                Ok(Checked(value))
            }
        }

        d.deserialize_map(CheckVisitor(PhantomData))
    }
}

impl Check for FeedModel {
    fn check(&self) -> Result<(), String> {
        match (&self.flows, &self.total, &self.mole_fractions) {
            (Some(_), Some(_), _) => Err(
                "give either `flows` (per species) or `total` with `mole-fractions`, not both"
                    .into(),
            ),
            (Some(_), None, Some(_)) => Err("`mole-fractions` go with `total`; give either \
                                            `flows` (per species) or `total` with \
                                            `mole-fractions`"
                .into()),
            (Some(flows), None, None) => {
                if flows.is_empty() {
                    return Err("`flows` is empty; give at least one species".into());
                }
                if flows.iter().all(|(_, f)| flow_si(f.0) <= 0.0) {
                    return Err(
                        "the feed has no flow at all; give at least one species a flow \
                                above zero"
                            .into(),
                    );
                }
                Ok(())
            }
            (None, Some(total), Some(fractions)) => {
                let sum: f64 = fractions.iter().map(|(_, x)| x.0).sum();
                if (sum - 1.0).abs() > MOLE_FRACTION_SUM_TOLERANCE {
                    return Err(format!(
                        "the mole fractions sum to {sum:.6}; they must sum to 1 within \
                         {MOLE_FRACTION_SUM_TOLERANCE:e}"
                    ));
                }
                if flow_si(total.0) <= 0.0 {
                    return Err("the feed has no flow at all: `total` is zero".into());
                }
                Ok(())
            }
            (None, Some(_), None) => {
                Err("`total` needs `mole-fractions` (e.g. mole-fractions: {H2O: 1})".into())
            }
            (None, None, Some(_)) => {
                Err("`mole-fractions` need a `total` flow (e.g. total: 2950 kmol/h)".into())
            }
            (None, None, None) => Err("the feed has no flow: give `flows` (per species) or \
                                       `total` with `mole-fractions`"
                .into()),
        }
    }
}

/// The SI number of a molar or mass flow.
fn flow_si(flow: crate::quantity::Flow) -> f64 {
    match flow {
        crate::quantity::Flow::Molar(n) | crate::quantity::Flow::Mass(n) => n,
    }
}

/// The number of inlets and outlets each type takes.
pub fn check_ports(t: UnitType, from: &[String], to: &[String]) -> Result<(), String> {
    let n_in = from.len();
    let (inlets_ok, wanted) = match t {
        UnitType::Mixer => (n_in >= 1, "at least 1 inlet"),
        _ => (n_in == 1, "exactly 1 inlet"),
    };
    if !inlets_ok {
        return Err(format!("a {t} takes {wanted} in `from`; {n_in} given"));
    }
    let n_out = to.len();
    let outlets = match t {
        UnitType::Knockout => Some((2, "2 outlets in `to`: [gas, condensate]")),
        UnitType::Purifier => Some((2, "2 outlets in `to`: [product, tail gas]")),
        UnitType::Splitter => None,
        _ => Some((1, "1 outlet in `to`")),
    };
    match outlets {
        Some((n, text)) if n_out != n => Err(format!("a {t} has {text}; {n_out} given")),
        None if n_out < 2 => Err(format!(
            "a splitter needs at least 2 outlets in `to`; {n_out} given"
        )),
        _ => Ok(()),
    }
}

/// Either one key or the other, not both and not neither.
fn one_of(a: (&str, bool), b: (&str, bool), what: &str) -> Result<(), String> {
    match (a.1, b.1) {
        (true, true) => Err(format!("give either `{}` or `{}`, not both", a.0, b.0)),
        (false, false) => Err(format!("{what} needs `{}` or `{}`", a.0, b.0)),
        _ => Ok(()),
    }
}

/// A required key.
fn required<T>(value: &Option<T>, key: &str, what: &str, example: &str) -> Result<(), String> {
    match value {
        Some(_) => Ok(()),
        None => Err(format!("{what} needs `{key}` (e.g. {key}: {example})")),
    }
}

impl Check for MixerModel {
    fn check(&self) -> Result<(), String> {
        check_ports(self.unit_type, &self.from.0, &self.to.0)
    }
}

impl Check for SplitterModel {
    fn check(&self) -> Result<(), String> {
        check_ports(self.unit_type, &self.from.0, &self.to.0)?;
        let outlets = &self.to.0;
        one_of(
            ("fractions", self.fractions.is_some()),
            ("flows", self.flows.is_some()),
            "a splitter (by outlet name; one outlet may be left out and takes the rest)",
        )?;
        let (key, names): (&str, Vec<&String>) = match (&self.fractions, &self.flows) {
            (Some(f), _) => ("fractions", f.iter().map(|(k, _)| k).collect()),
            (_, Some(f)) => ("flows", f.iter().map(|(k, _)| k).collect()),
            (None, None) => return Ok(()),
        };
        if let Some(name) = names.iter().find(|n| !outlets.contains(n)) {
            return Err(format!(
                "`{key}`: '{name}' is not an outlet of this splitter; its outlets (`to`) are {}",
                outlets.join(", ")
            ));
        }
        let missing = outlets.len() - names.len();
        if missing > 1 {
            return Err(format!(
                "`{key}`: {missing} outlets have no entry; give every outlet but at most one \
                 (which takes the rest)"
            ));
        }
        if let Some(flows) = &self.flows {
            if let Some((name, _)) = flows
                .iter()
                .find(|(_, f)| matches!(f.0, crate::quantity::Flow::Mass(_)))
            {
                return Err(format!(
                    "`flows.{name}`: a splitter takes molar flows (kmol/h, mol/s, Nm3/h); a mass \
                     flow would need the inlet's molar mass, known only when solving"
                ));
            }
        }
        Ok(())
    }
}

impl Check for HeatExchangeModel {
    fn check(&self) -> Result<(), String> {
        check_ports(self.unit_type, &self.from.0, &self.to.0)?;
        one_of(
            ("outlet-temperature", self.outlet_temperature.is_some()),
            ("duty", self.duty.is_some()),
            &format!("a {}", self.unit_type),
        )
    }
}

impl Check for ReformerModel {
    fn check(&self) -> Result<(), String> {
        check_ports(self.unit_type, &self.from.0, &self.to.0)?;
        required(
            &self.outlet_temperature,
            "outlet-temperature",
            "a reformer",
            "865 degC",
        )
    }
}

impl Check for PrereformerModel {
    fn check(&self) -> Result<(), String> {
        check_ports(self.unit_type, &self.from.0, &self.to.0)
    }
}

impl Check for ShiftModel {
    fn check(&self) -> Result<(), String> {
        check_ports(self.unit_type, &self.from.0, &self.to.0)
    }
}

impl Check for MethanatorModel {
    fn check(&self) -> Result<(), String> {
        check_ports(self.unit_type, &self.from.0, &self.to.0)
    }
}

impl Check for KnockoutModel {
    fn check(&self) -> Result<(), String> {
        check_ports(self.unit_type, &self.from.0, &self.to.0)
    }
}

impl Check for PurifierModel {
    fn check(&self) -> Result<(), String> {
        check_ports(self.unit_type, &self.from.0, &self.to.0)?;
        required(
            &self.hydrogen_recovery,
            "hydrogen-recovery",
            "a purifier",
            "0.88",
        )?;
        required(
            &self.tail_gas_pressure,
            "tail-gas-pressure",
            "a purifier",
            "1.3 bar",
        )?;
        one_of(
            ("purity", self.purity.is_some()),
            ("impurity-split", self.impurity_split.is_some()),
            "a purifier",
        )
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn names(n: &[&str]) -> Vec<String> {
        n.iter().map(|s| s.to_string()).collect()
    }

    #[test]
    fn ports_per_type() {
        let one = names(&["a"]);
        let two = names(&["a", "b"]);
        assert!(check_ports(UnitType::Mixer, &two, &one).is_ok());
        // A mixer with no inlet is told what a mixer takes, not what a cooler takes.
        let none = check_ports(UnitType::Mixer, &[], &one).unwrap_err();
        assert_eq!(none, "a mixer takes at least 1 inlet in `from`; 0 given");
        let many = check_ports(UnitType::Cooler, &two, &one).unwrap_err();
        assert_eq!(many, "a cooler takes exactly 1 inlet in `from`; 2 given");
        assert!(check_ports(UnitType::Cooler, &two, &one).is_err());
        assert!(check_ports(UnitType::Knockout, &one, &two).is_ok());
        assert!(check_ports(UnitType::Purifier, &one, &one).is_err());
        assert!(check_ports(UnitType::Splitter, &one, &one).is_err());
        assert!(check_ports(UnitType::Splitter, &one, &two).is_ok());
    }
}

//! Checks across the keys of one feed entry (either `flows` or `total` with `mole-fractions`),
//! run while the entry is parsed so that a failure is reported at the entry's line and column
//! with its path (`feeds.natural-gas`). Unit entries are checked by their own types.
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
use super::yaml::FeedModel;

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

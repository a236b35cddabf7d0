//! Values of the flowsheet file that are read, checked and converted to SI while the YAML is
//! parsed, so that a bad value is reported with the file, line and column of the value itself
//! (the YAML parser adds the path, e.g. `feeds.natural-gas.temperature`, and the position).
//!
//! Quantities go through the parsers of [`crate::quantity`]: a unit is always required (except
//! for fractions), and impossible values (T <= 0 K, P <= 0, a negative flow, NaN, infinity) are
//! refused there.

use std::fmt;
use std::marker::PhantomData;

use serde::de::{self, Deserialize, Deserializer, MapAccess, SeqAccess, Visitor};

use crate::error::{Error, Result};
use crate::quantity::{self, Flow};

/// Turn a quantity error of the parsers into the text of a YAML error (the YAML parser puts the
/// path of the field in front of it, so the field name given to the parser is dropped).
fn message(err: Error) -> String {
    match err {
        Error::Quantity { value, reason, .. } => format!("cannot read '{value}': {reason}"),
        Error::InvalidValue { value, reason, .. } => {
            format!("value {value} is not allowed: {reason}")
        }
        other => other.to_string(),
    }
}

/// Visitor that takes a scalar as text (numbers are written back as text so that the quantity
/// parser can say that a unit is missing) and hands it to `parse`.
struct TextVisitor<T> {
    expecting: &'static str,
    parse: fn(&str) -> Result<T>,
}

impl<T> TextVisitor<T> {
    fn run<E: de::Error>(&self, text: &str) -> std::result::Result<T, E> {
        (self.parse)(text).map_err(|e| E::custom(message(e)))
    }
}

impl<'de, T> Visitor<'de> for TextVisitor<T> {
    type Value = T;

    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str(self.expecting)
    }

    fn visit_str<E: de::Error>(self, v: &str) -> std::result::Result<T, E> {
        self.run(v)
    }

    fn visit_i64<E: de::Error>(self, v: i64) -> std::result::Result<T, E> {
        self.run(&v.to_string())
    }

    fn visit_u64<E: de::Error>(self, v: u64) -> std::result::Result<T, E> {
        self.run(&v.to_string())
    }

    fn visit_f64<E: de::Error>(self, v: f64) -> std::result::Result<T, E> {
        // YAML's .nan and .inf arrive here; the parser refuses them by their text.
        self.run(&v.to_string())
    }
}

/// Declare a newtype holding an SI value read by one of the quantity parsers.
macro_rules! quantity_type {
    ($(#[$doc:meta])* $name:ident, $ty:ty, $expecting:literal, $parse:expr) => {
        $(#[$doc])*
        #[derive(Debug, Clone, Copy, PartialEq)]
        pub struct $name(pub $ty);

        impl<'de> Deserialize<'de> for $name {
            fn deserialize<D: Deserializer<'de>>(d: D) -> std::result::Result<Self, D::Error> {
                d.deserialize_any(TextVisitor {
                    expecting: $expecting,
                    parse: |text| $parse("", text).map($name),
                })
            }
        }
    };
}

quantity_type!(
    /// An absolute temperature, K.
    Temperature,
    f64,
    "a temperature with its unit, e.g. '850 degC'",
    quantity::parse_temperature
);
quantity_type!(
    /// A temperature difference (approach), K.
    TemperatureDifference,
    f64,
    "a temperature difference with its unit, e.g. '10 K'",
    quantity::parse_temperature_difference
);
quantity_type!(
    /// An absolute pressure, Pa.
    Pressure,
    f64,
    "a pressure with its unit, e.g. '25 bar' or '24 barg'",
    quantity::parse_pressure
);
quantity_type!(
    /// A pressure drop, Pa (zero or positive).
    PressureDrop,
    f64,
    "a pressure difference with its unit, e.g. '0.5 bar'",
    quantity::parse_pressure_difference
);
quantity_type!(
    /// A heat duty, W (positive: heat added to the process stream).
    Duty,
    f64,
    "a duty with its unit, e.g. '12.5 MW'",
    quantity::parse_duty
);
quantity_type!(
    /// A molar or mass flow, SI (zero or positive).
    FlowRate,
    Flow,
    "a flow with its unit, e.g. '1200 kmol/h'",
    quantity::parse_flow
);
quantity_type!(
    /// A fraction within 0 and 1 (plain number, '%' or 'ppm').
    Fraction,
    f64,
    "a fraction, e.g. 0.88 or '88 %'",
    quantity::parse_fraction
);

/// One stream name or a list of them (`from: a` or `from: [a, b]`).
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct Names(pub Vec<String>);

impl<'de> Deserialize<'de> for Names {
    fn deserialize<D: Deserializer<'de>>(d: D) -> std::result::Result<Self, D::Error> {
        struct NamesVisitor;

        impl<'de> Visitor<'de> for NamesVisitor {
            type Value = Names;

            fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
                f.write_str("a stream name or a list of stream names")
            }

            fn visit_str<E: de::Error>(self, v: &str) -> std::result::Result<Names, E> {
                Ok(Names(vec![check_name(v)?]))
            }

            fn visit_seq<A: SeqAccess<'de>>(
                self,
                mut seq: A,
            ) -> std::result::Result<Names, A::Error> {
                let mut names: Vec<String> = Vec::new();
                while let Some(name) = seq.next_element::<String>()? {
                    let name = check_name(&name)?;
                    if names.contains(&name) {
                        return Err(de::Error::custom(format!(
                            "stream '{name}' is listed twice; list each stream once"
                        )));
                    }
                    names.push(name);
                }
                if names.is_empty() {
                    return Err(de::Error::custom(
                        "the list is empty; give at least one stream name",
                    ));
                }
                Ok(Names(names))
            }
        }

        d.deserialize_any(NamesVisitor)
    }
}

/// A name must be non-empty and have no leading or trailing blanks.
fn check_name<E: de::Error>(name: &str) -> std::result::Result<String, E> {
    if name.trim().is_empty() {
        return Err(E::custom("a name must not be empty"));
    }
    if name.trim() != name {
        return Err(E::custom(format!(
            "name '{name}' has leading or trailing blanks; remove them"
        )));
    }
    Ok(name.to_string())
}

/// A mapping that keeps the file order and refuses a key given twice (a repeated key in YAML
/// would otherwise silently replace the first one).
#[derive(Debug, Clone, PartialEq)]
pub struct OrderedMap<V>(pub Vec<(String, V)>);

impl<V> Default for OrderedMap<V> {
    fn default() -> Self {
        OrderedMap(Vec::new())
    }
}

impl<V> OrderedMap<V> {
    /// The entries in file order.
    pub fn iter(&self) -> impl Iterator<Item = &(String, V)> {
        self.0.iter()
    }

    /// True when there are no entries.
    pub fn is_empty(&self) -> bool {
        self.0.is_empty()
    }

    /// Number of entries.
    pub fn len(&self) -> usize {
        self.0.len()
    }
}

impl<'de, V: Deserialize<'de>> Deserialize<'de> for OrderedMap<V> {
    fn deserialize<D: Deserializer<'de>>(d: D) -> std::result::Result<Self, D::Error> {
        struct MapVisitor<V>(PhantomData<V>);

        impl<'de, V: Deserialize<'de>> Visitor<'de> for MapVisitor<V> {
            type Value = OrderedMap<V>;

            fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
                f.write_str("a mapping of names to values")
            }

            fn visit_map<A: MapAccess<'de>>(
                self,
                mut map: A,
            ) -> std::result::Result<Self::Value, A::Error> {
                let mut entries: Vec<(String, V)> = Vec::new();
                while let Some(key) = map.next_key::<String>()? {
                    let key = check_name(&key)?;
                    if entries.iter().any(|(k, _)| *k == key) {
                        return Err(de::Error::custom(format!(
                            "'{key}' is given twice; give each entry once"
                        )));
                    }
                    let value = map.next_value::<V>()?;
                    entries.push((key, value));
                }
                Ok(OrderedMap(entries))
            }
        }

        d.deserialize_map(MapVisitor(PhantomData))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[derive(Debug, serde::Deserialize)]
    #[serde(deny_unknown_fields)]
    struct Probe {
        t: Option<Temperature>,
        f: Option<Fraction>,
        names: Option<Names>,
        map: Option<OrderedMap<FlowRate>>,
    }

    fn probe(text: &str) -> std::result::Result<Probe, String> {
        serde_norway::from_str::<Probe>(text).map_err(|e| e.to_string())
    }

    #[test]
    fn quantities_convert_to_si() {
        // ISO 80000-5: T/K = t/degC + 273.15.
        let p = probe("t: 850 degC\nf: 88 %\n").unwrap();
        assert_eq!(p.t, Some(Temperature(1123.15)));
        assert_eq!(p.f, Some(Fraction(0.88)));
        assert_eq!(probe("f: 1\n").unwrap().f, Some(Fraction(1.0)));
    }

    #[test]
    fn bad_quantities_name_the_field_and_position() {
        let e = probe("f: 0.5\nt: 850\n").unwrap_err();
        assert!(e.starts_with("t: cannot read '850': no unit given"), "{e}");
        assert!(e.ends_with("at line 2 column 4"), "{e}");
        let e = probe("t: .nan\n").unwrap_err();
        assert!(e.contains("not a finite number"), "{e}");
        let e = probe("t: -300 degC\n").unwrap_err();
        assert!(e.contains("value -300 degC is not allowed"), "{e}");
    }

    #[test]
    fn names_accept_one_or_a_list() {
        assert_eq!(probe("names: a\n").unwrap().names.unwrap().0, vec!["a"]);
        let p = probe("names: [a, b]\n").unwrap();
        assert_eq!(p.names.unwrap().0, vec!["a", "b"]);
        assert!(probe("names: []\n")
            .unwrap_err()
            .contains("the list is empty"));
        assert!(probe("names: [a, a]\n")
            .unwrap_err()
            .contains("listed twice"));
        assert!(probe("names: ' a'\n").unwrap_err().contains("blanks"));
    }

    #[test]
    fn ordered_map_keeps_order_and_refuses_repeats() {
        let p = probe("map: {b: 1 mol/s, a: 2 mol/s}\n").unwrap();
        let keys: Vec<&str> = p
            .map
            .as_ref()
            .unwrap()
            .iter()
            .map(|(k, _)| k.as_str())
            .collect();
        assert_eq!(keys, vec!["b", "a"]);
        let e = probe("map: {a: 1 mol/s, a: 2 mol/s}\n").unwrap_err();
        assert!(e.contains("'a' is given twice"), "{e}");
    }
}

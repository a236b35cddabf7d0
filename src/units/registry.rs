//! The one list of unit types. Everything that lists them (the flowsheet reader, the
//! `unit-types` command, reports) reads it here; adding a unit type is a new file in this folder
//! plus one line below.

use super::unit::UnitType;
use super::{
    autothermal, boiler, exchanger, furnace, knockout, methanator, mixer, prereformer, purifier,
    reformer, separator, shift, splitter, thermal,
};

/// Every unit type, in the order `unit-types` lists them (the order of a train).
pub static UNIT_TYPES: &[&UnitType] = &[
    &mixer::TYPE,
    &splitter::TYPE,
    &thermal::HEATER,
    &thermal::COOLER,
    &boiler::TYPE,
    &exchanger::TYPE,
    &prereformer::TYPE,
    &reformer::TYPE,
    &autothermal::TYPE,
    &furnace::TYPE,
    &shift::TYPE,
    &methanator::TYPE,
    &knockout::TYPE,
    &separator::TYPE,
    &purifier::TYPE,
];

/// The unit type of this name.
pub fn unit_type(name: &str) -> Option<&'static UnitType> {
    UNIT_TYPES.iter().copied().find(|t| t.name == name)
}

/// The names of every unit type, for messages.
pub fn names() -> Vec<&'static str> {
    UNIT_TYPES.iter().map(|t| t.name).collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_are_unique_and_kebab_case() {
        let names = names();
        for (i, n) in names.iter().enumerate() {
            assert!(!names[i + 1..].contains(n), "{n} twice");
            assert!(n.chars().all(|c| c.is_ascii_lowercase() || c == '-'), "{n}");
        }
        assert_eq!(unit_type("shift").map(|t| t.name), Some("shift"));
        assert!(unit_type("shfit").is_none());
    }

    #[test]
    fn every_type_documents_its_keys_once() {
        for t in UNIT_TYPES {
            for (i, k) in t.keys.iter().enumerate() {
                assert!(
                    !t.keys[i + 1..].iter().any(|o| o.key == k.key),
                    "{}: key {} twice",
                    t.name,
                    k.key
                );
                assert!(
                    !k.meaning.is_empty(),
                    "{}: {} has no meaning",
                    t.name,
                    k.key
                );
            }
            assert!(!t.summary.is_empty() && t.example.contains(t.name));
        }
    }
}

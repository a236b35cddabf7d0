//! The species database: the records shipped in `data/species.yaml` (embedded in the binary, so
//! syntrain works from any folder), plus any records a user adds from a file of the same format.
//!
//! Each record is checked when read: temperature ranges in order, molar mass consistent with the
//! elements (IUPAC conventional atomic weights, IUPAC 2013), and the two polynomial ranges
//! continuous at the break temperature.

use std::collections::HashMap;
use std::path::Path;

use serde::Deserialize;

use super::species::{Nasa7, Phase, Species};
use crate::error::{Error, Result};
use crate::quantity::{parse_pressure, STANDARD_PRESSURE_PA};

/// The database text shipped with syntrain.
pub const EMBEDDED_SPECIES_YAML: &str = include_str!("../../data/species.yaml");

/// Conventional atomic weights, g/mol (IUPAC 2013 conventional values; He and Ar standard).
const ATOMIC_WEIGHTS: &[(&str, f64)] = &[
    ("H", 1.008),
    ("He", 4.002602),
    ("C", 12.011),
    ("N", 14.007),
    ("O", 15.999),
    ("Ar", 39.95),
    ("S", 32.06),
];

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct FileModel {
    species: Vec<RecordModel>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields, rename_all = "kebab-case")]
struct RecordModel {
    name: String,
    #[serde(default)]
    description: String,
    formula: String,
    elements: std::collections::BTreeMap<String, f64>,
    phase: Phase,
    molar_mass: f64,
    source: String,
    standard_pressure: String,
    nasa7: Nasa7Model,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields, rename_all = "kebab-case")]
struct Nasa7Model {
    temperature_ranges: [f64; 3],
    low: [f64; 7],
    high: [f64; 7],
}

/// A set of species records, looked up by name.
#[derive(Debug, Clone)]
pub struct SpeciesDb {
    species: Vec<Species>,
    index: HashMap<String, usize>,
}

impl SpeciesDb {
    /// The database shipped with syntrain.
    pub fn embedded() -> Result<SpeciesDb> {
        let mut db = SpeciesDb {
            species: Vec::new(),
            index: HashMap::new(),
        };
        db.add_yaml("<embedded data/species.yaml>", EMBEDDED_SPECIES_YAML)?;
        Ok(db)
    }

    /// The shipped database plus the records of a user file (same format as data/species.yaml).
    /// A user record may not reuse the name of an existing one.
    pub fn embedded_with_file(path: &Path) -> Result<SpeciesDb> {
        let mut db = SpeciesDb::embedded()?;
        db.add_file(path)?;
        Ok(db)
    }

    /// Add the records of a YAML file.
    pub fn add_file(&mut self, path: &Path) -> Result<()> {
        let text = std::fs::read_to_string(path).map_err(|source| Error::Io {
            action: "reading",
            path: path.to_path_buf(),
            source,
        })?;
        self.add_yaml(&path.display().to_string(), &text)
    }

    /// Add the records of YAML text; `origin` names it in error messages.
    pub fn add_yaml(&mut self, origin: &str, text: &str) -> Result<()> {
        let model: FileModel = serde_norway::from_str(text).map_err(|e| Error::yaml(origin, &e))?;
        for record in model.species {
            let species = convert(record)?;
            if self.index.contains_key(&species.name) {
                return Err(Error::SpeciesRecord {
                    species: species.name,
                    reason: format!(
                        "defined twice ({origin} repeats a name already in the database); \
                         give the new record a name of its own"
                    ),
                });
            }
            self.index.insert(species.name.clone(), self.species.len());
            self.species.push(species);
        }
        Ok(())
    }

    /// All records, in file order.
    pub fn all(&self) -> &[Species] {
        &self.species
    }

    /// Number of records.
    pub fn len(&self) -> usize {
        self.species.len()
    }

    /// True when there are no records.
    pub fn is_empty(&self) -> bool {
        self.species.is_empty()
    }

    /// Index of a species by name.
    pub fn index_of(&self, name: &str) -> Option<usize> {
        self.index.get(name).copied()
    }

    /// A species by index.
    pub fn by_index(&self, index: usize) -> &Species {
        &self.species[index]
    }

    /// A species by name, or an error listing the known names.
    pub fn get(&self, name: &str) -> Result<&Species> {
        self.lookup(name, "")
    }

    /// Index of a species by name, or an error naming where it was met.
    pub fn require(&self, name: &str, context: &str) -> Result<usize> {
        self.index_of(name).ok_or_else(|| Error::UnknownSpecies {
            name: name.to_string(),
            context: context.to_string(),
            known: self.names().join(", "),
        })
    }

    /// A species by name, or an error naming where it was met (`context`, e.g. " in feed 'x'").
    pub fn lookup(&self, name: &str, context: &str) -> Result<&Species> {
        Ok(&self.species[self.require(name, context)?])
    }

    /// Names of all records, in file order.
    pub fn names(&self) -> Vec<&str> {
        self.species.iter().map(|s| s.name.as_str()).collect()
    }
}

fn convert(r: RecordModel) -> Result<Species> {
    let bad = |reason: String| Error::SpeciesRecord {
        species: r.name.clone(),
        reason,
    };
    let [t_min, t_mid, t_max] = r.nasa7.temperature_ranges;
    if !(t_min > 0.0 && t_min < t_mid && t_mid < t_max && t_max.is_finite()) {
        return Err(bad(format!(
            "temperature-ranges [{t_min}, {t_mid}, {t_max}] must be increasing, positive, finite"
        )));
    }
    if r.nasa7
        .low
        .iter()
        .chain(&r.nasa7.high)
        .any(|a| !a.is_finite())
    {
        return Err(bad("a NASA coefficient is not a finite number".into()));
    }
    if r.elements.is_empty() {
        return Err(bad("no elements given".into()));
    }
    let mut mass = 0.0;
    for (element, count) in &r.elements {
        if !(*count > 0.0 && count.is_finite()) {
            return Err(bad(format!(
                "element {element}: count {count} must be positive"
            )));
        }
        match ATOMIC_WEIGHTS.iter().find(|(e, _)| e == element) {
            Some((_, w)) => mass += w * count,
            None => {
                return Err(bad(format!(
                    "element '{element}' is not known; known: {}",
                    ATOMIC_WEIGHTS
                        .iter()
                        .map(|(e, _)| *e)
                        .collect::<Vec<_>>()
                        .join(", ")
                )))
            }
        }
    }
    if !(r.molar_mass > 0.0) || ((r.molar_mass - mass) / mass).abs() > 1e-3 {
        return Err(bad(format!(
            "molar-mass {} g/mol does not match its elements ({mass:.5} g/mol)",
            r.molar_mass
        )));
    }
    // Records at another standard pressure (1 atm, say) are brought to 1 bar: for an ideal gas
    // S(1 bar) = S(P_ref) + R ln(P_ref / 1 bar), i.e. a7 grows by ln(P_ref / 1 bar); a solid's
    // properties do not depend on the pressure at this level.
    let p_ref = parse_pressure(
        &format!("species {}: standard-pressure", r.name),
        &r.standard_pressure,
    )?;
    let shift = match r.phase {
        Phase::Gas => (p_ref / STANDARD_PRESSURE_PA).ln(),
        Phase::Solid => 0.0,
    };
    let (mut low, mut high) = (r.nasa7.low, r.nasa7.high);
    low[6] += shift;
    high[6] += shift;
    let nasa7 = Nasa7 {
        t_min_k: t_min,
        t_mid_k: t_mid,
        t_max_k: t_max,
        low,
        high,
    };
    // Continuity at the break: evaluate both ranges at t_mid.
    let lo = Nasa7 {
        high: nasa7.low,
        ..nasa7.clone()
    };
    let hi = Nasa7 {
        low: nasa7.high,
        ..nasa7.clone()
    };
    let jumps = [
        ("Cp/R", (lo.cp_r(t_mid) - hi.cp_r(t_mid)).abs(), 0.02),
        ("H/RT", (lo.h_rt(t_mid) - hi.h_rt(t_mid)).abs(), 2e-3),
        ("S/R", (lo.s_r(t_mid) - hi.s_r(t_mid)).abs(), 2e-3),
    ];
    for (what, jump, limit) in jumps {
        if jump > limit {
            return Err(bad(format!(
                "{what} jumps by {jump:.2e} at the break temperature {t_mid} K (limit {limit:.0e})"
            )));
        }
    }
    Ok(Species {
        name: r.name.clone(),
        description: r.description,
        formula: r.formula,
        elements: r.elements.into_iter().collect(),
        phase: r.phase,
        molar_mass_kg_per_mol: r.molar_mass / 1000.0,
        source: r.source,
        nasa7,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    const ONE: &str = r#"
species:
  - name: XE1
    formula: H2
    elements: {H: 2}
    phase: gas
    molar-mass: 2.016
    source: test record
    standard-pressure: 1 bar
    nasa7:
      temperature-ranges: [200.0, 1000.0, 3000.0]
      low: [3.5, 0, 0, 0, 0, -1043.5, -1.0]
      high: [3.5, 0, 0, 0, 0, -1043.5, -1.0]
"#;

    #[test]
    fn embedded_database_has_the_required_species() {
        let db = SpeciesDb::embedded().unwrap();
        for name in [
            "CH4", "C2H6", "C3H8", "n-C4H10", "i-C4H10", "C2H4", "H2O", "H2", "CO", "CO2", "N2",
            "O2", "Ar", "He", "NH3", "C(gr)",
        ] {
            let s = db.get(name).unwrap();
            assert!(!s.source.is_empty(), "{name} has no source");
        }
        assert_eq!(db.get("C(gr)").unwrap().phase, Phase::Solid);
    }

    #[test]
    fn user_records_are_added_and_checked() {
        let mut db = SpeciesDb::embedded().unwrap();
        let n = db.len();
        db.add_yaml("user.yaml", ONE).unwrap();
        assert_eq!(db.len(), n + 1);
        // The same name twice is refused.
        assert!(db.add_yaml("user.yaml", ONE).is_err());
        // Wrong molar mass is refused.
        let wrong = ONE.replace("2.016", "3.0").replace("XE1", "XE2");
        assert!(matches!(
            db.add_yaml("u", &wrong),
            Err(Error::SpeciesRecord { .. })
        ));
        // An unknown key is refused with a line number.
        let typo = ONE.replace("formula", "formulae").replace("XE1", "XE3");
        match db.add_yaml("u.yaml", &typo) {
            Err(Error::Yaml { location, .. }) => assert!(location.starts_with(':')),
            other => panic!("expected a YAML error, got {other:?}"),
        }
    }

    #[test]
    fn a_record_at_one_atmosphere_is_brought_to_one_bar() {
        // Ideal gas: S(1 bar) - S(1 atm) = R ln(1.01325) = 0.1094 J/(mol K) (NIST-JANAF (Chase
        // 1998) introduction: the change of standard state from 1 atm to 1 bar).
        let mut db = SpeciesDb::embedded().unwrap();
        db.add_yaml("u", &ONE.replace("XE1", "XB")).unwrap();
        db.add_yaml(
            "u",
            &ONE.replace("XE1", "XA")
                .replace("standard-pressure: 1 bar", "standard-pressure: 1 atm"),
        )
        .unwrap();
        let s_bar = db.get("XB").unwrap().entropy(500.0).unwrap();
        let s_atm = db.get("XA").unwrap().entropy(500.0).unwrap();
        assert!((s_atm - s_bar - 0.10938).abs() < 1e-4, "{}", s_atm - s_bar);
        let h = db.get("XA").unwrap().enthalpy(500.0).unwrap();
        assert_eq!(h, db.get("XB").unwrap().enthalpy(500.0).unwrap());
        // A missing standard pressure is refused.
        let none = ONE
            .replace("XE1", "XC")
            .replace("    standard-pressure: 1 bar\n", "");
        assert!(db.add_yaml("u", &none).is_err());
    }

    #[test]
    fn unknown_species_lists_known_names() {
        let db = SpeciesDb::embedded().unwrap();
        let err = db.lookup("CH5", " in feed 'ng'").unwrap_err().to_string();
        assert!(err.contains("CH5") && err.contains("CH4") && err.contains("feed 'ng'"));
    }
}

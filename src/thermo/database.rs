//! The species database: the records shipped in `data/species.yaml` (embedded in the binary, so
//! syntrain works from any folder), plus any records a user adds from a file of the same format.
//!
//! Each record is checked when read: temperatures in increasing order, molar mass consistent with the atoms (IUPAC conventional atomic weights, IUPAC 2013), and the
//! two polynomial ranges continuous at the break temperature. A file is added all or nothing.
//!
//! The keys are syntrain's own (DEVELOPERS.md, "Species records"); the polynomial is the
//! published NASA 7-coefficient form of [`super::species`]. A file that still uses an earlier
//! key (`elements`, `temperature-ranges`, `low`, `high`) is refused with a message naming the
//! key to write instead.

use std::collections::HashMap;
use std::path::Path;

use serde::Deserialize;

use super::species::{Critical, Nasa7, Phase, Species};
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

/// Keys of the first release's species files and the keys that replaced them (first column:
/// where the key sits). Files with an old key are refused with a message naming the new one.
const RENAMED_KEYS: &[(&str, &str, &str)] = &[
    ("record", "elements", "atoms"),
    ("nasa7", "temperature-ranges", "from-k, break-k and to-k"),
    ("nasa7", "low", "below-break"),
    ("nasa7", "high", "above-break"),
];

/// Keys that belong to other file formats, never to ours, with what to write instead.
const FOREIGN_KEYS: &[(&str, &str)] = &[
    ("thermo", "nasa7"),
    ("composition", "atoms"),
    ("note", "source"),
];

/// A species file: `species:` followed by a list of records.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct FileModel {
    species: Vec<RecordModel>,
}

/// One record, keys in kebab-case (see DEVELOPERS.md, "Species records").
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields, rename_all = "kebab-case")]
struct RecordModel {
    name: String,
    #[serde(default)]
    description: String,
    formula: String,
    /// Atoms per molecule by element symbol.
    atoms: std::collections::BTreeMap<String, f64>,
    phase: Phase,
    molar_mass: f64,
    source: String,
    standard_pressure: String,
    /// Critical constants for the Peng-Robinson gas model (optional).
    #[serde(default)]
    critical: Option<CriticalModel>,
    nasa7: Nasa7Model,
}

/// Critical temperature and pressure and acentric factor, with their source.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields, rename_all = "kebab-case")]
struct CriticalModel {
    temperature_k: f64,
    pressure_pa: f64,
    acentric_factor: f64,
    source: String,
}

/// The two NASA 7-coefficient sets and the temperatures that bound them, K.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields, rename_all = "kebab-case")]
struct Nasa7Model {
    from_k: f64,
    break_k: f64,
    to_k: f64,
    below_break: [f64; 7],
    above_break: [f64; 7],
}

/// A set of species records, looked up by name.
#[derive(Debug, Clone)]
pub struct SpeciesDb {
    species: Vec<Species>,
    index: HashMap<String, usize>,
    /// Index of H2O, looked up on every solve (kept here so that no hash is computed there).
    water: Option<usize>,
}

impl SpeciesDb {
    /// The database shipped with syntrain.
    pub fn embedded() -> Result<SpeciesDb> {
        let mut db = SpeciesDb {
            species: Vec::new(),
            index: HashMap::new(),
            water: None,
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

    /// Add the records of YAML text; `origin` names it in error messages. All or nothing: every
    /// record is read and checked first, and the database changes only when all of them pass.
    pub fn add_yaml(&mut self, origin: &str, text: &str) -> Result<()> {
        let model: FileModel = serde_norway::from_str(text)
            .map_err(|e| old_key_error(origin, text).unwrap_or_else(|| Error::yaml(origin, &e)))?;
        let mut added: Vec<Species> = Vec::with_capacity(model.species.len());
        for record in model.species {
            let species = convert(record)?;
            let repeated = self.index.contains_key(&species.name)
                || added.iter().any(|s| s.name == species.name);
            if repeated {
                return Err(Error::SpeciesRecord {
                    species: species.name,
                    reason: format!(
                        "defined twice ({origin} repeats a name already in the database or in \
                         the same file); give the new record a name of its own"
                    ),
                });
            }
            added.push(species);
        }
        for species in added {
            if species.name == "H2O" {
                self.water = Some(self.species.len());
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

    /// The index of water (H2O), where the database has it.
    pub fn water(&self) -> Option<usize> {
        self.water
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

/// The error for a file that failed to read and holds a key of the first release or of another
/// format, naming the record and the key to write instead; None when it holds no such key.
fn old_key_error(origin: &str, text: &str) -> Option<Error> {
    use serde_norway::Value;
    let value: Value = serde_norway::from_str(text).ok()?;
    let records = value.get("species")?.as_sequence()?;
    for (k, record) in records.iter().enumerate() {
        let name = record
            .get("name")
            .and_then(Value::as_str)
            .map_or_else(|| format!("number {} in {origin}", k + 1), str::to_string);
        let fail = |reason: String| {
            Some(Error::SpeciesRecord {
                species: name.clone(),
                reason,
            })
        };
        for (place, old, new) in RENAMED_KEYS {
            let holder = match *place {
                "record" => Some(record),
                _ => record.get(*place),
            };
            if holder.and_then(|h| h.get(*old)).is_some() {
                let at = if *place == "record" {
                    String::new()
                } else {
                    format!(" under '{place}'")
                };
                return fail(format!(
                    "key '{old}'{at} is an earlier name and is no longer read; write '{new}' \
                     instead (see DEVELOPERS.md, \"Species records\")"
                ));
            }
        }
        for (foreign, ours) in FOREIGN_KEYS {
            if record.get(*foreign).is_some() {
                return fail(format!(
                    "key '{foreign}' is not a key of syntrain species files; write '{ours}' \
                     (see DEVELOPERS.md, \"Species records\")"
                ));
            }
        }
    }
    None
}

fn convert(r: RecordModel) -> Result<Species> {
    let bad = |reason: String| Error::SpeciesRecord {
        species: r.name.clone(),
        reason,
    };
    let (t_min, t_mid, t_max) = (r.nasa7.from_k, r.nasa7.break_k, r.nasa7.to_k);
    if !(t_min > 0.0 && t_min < t_mid && t_mid < t_max && t_max.is_finite()) {
        return Err(bad(format!(
            "from-k {t_min}, break-k {t_mid}, to-k {t_max} must be increasing, positive and \
             finite"
        )));
    }
    if r.nasa7
        .below_break
        .iter()
        .chain(&r.nasa7.above_break)
        .any(|a| !a.is_finite())
    {
        return Err(bad("a NASA coefficient is not a finite number".into()));
    }
    if r.atoms.is_empty() {
        return Err(bad("no atoms given".into()));
    }
    let mut mass = 0.0;
    for (element, count) in &r.atoms {
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
    let (mut low, mut high) = (r.nasa7.below_break, r.nasa7.above_break);
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
    let critical = match r.critical {
        None => None,
        Some(c) => {
            if !(c.temperature_k > 0.0 && c.temperature_k.is_finite()) {
                return Err(bad(format!(
                    "critical temperature-k {} must be positive and finite",
                    c.temperature_k
                )));
            }
            if !(c.pressure_pa > 0.0 && c.pressure_pa.is_finite()) {
                return Err(bad(format!(
                    "critical pressure-pa {} must be positive and finite",
                    c.pressure_pa
                )));
            }
            if !(c.acentric_factor > -1.0 && c.acentric_factor < 2.0) {
                return Err(bad(format!(
                    "acentric-factor {} must lie between -1 and 2",
                    c.acentric_factor
                )));
            }
            if c.source.trim().is_empty() {
                return Err(bad("critical constants need a source".into()));
            }
            if r.phase != Phase::Gas {
                return Err(bad("only a gas species takes critical constants".into()));
            }
            Some(Critical {
                temperature_k: c.temperature_k,
                pressure_pa: c.pressure_pa,
                acentric_factor: c.acentric_factor,
                source: c.source,
            })
        }
    };
    Ok(Species {
        name: r.name.clone(),
        description: r.description,
        formula: r.formula,
        elements: r.atoms.into_iter().collect(),
        phase: r.phase,
        molar_mass_kg_per_mol: r.molar_mass / 1000.0,
        source: r.source,
        critical,
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
    atoms: {H: 2}
    phase: gas
    molar-mass: 2.016
    source: test record
    standard-pressure: 1 bar
    nasa7:
      from-k: 200.0
      break-k: 1000.0
      to-k: 3000.0
      below-break: [3.5, 0, 0, 0, 0, -1043.5, -1.0]
      above-break: [3.5, 0, 0, 0, 0, -1043.5, -1.0]
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
            if s.phase == Phase::Gas {
                // Every shipped gas record carries critical constants with their source.
                let c = s
                    .critical
                    .as_ref()
                    .unwrap_or_else(|| panic!("{name}: no critical"));
                assert!(c.temperature_k > 0.0 && c.pressure_pa > 0.0 && !c.source.is_empty());
            }
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
            Err(Error::Yaml { position, .. }) => assert!(position.is_some_and(|p| p.line > 0)),
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
    fn a_bad_record_leaves_the_database_unchanged() {
        // Two records in one file, the second with a molar mass that does not match its atoms
        // (H2 is 2.016 g/mol, IUPAC 2013): nothing of the file may be added.
        let mut db = SpeciesDb::embedded().unwrap();
        let n = db.len();
        let second = ONE
            .replace("species:\n", "")
            .replace("XE1", "XE2")
            .replace("2.016", "3.0");
        let text = format!("{}{second}", ONE.trim_end_matches('\n'));
        assert!(text.matches("- name:").count() == 2, "{text}");
        match db.add_yaml("u.yaml", &text) {
            Err(Error::SpeciesRecord { species, .. }) => assert_eq!(species, "XE2"),
            other => panic!("expected a record error, got {other:?}"),
        }
        assert_eq!(db.len(), n);
        assert!(db.index_of("XE1").is_none());
        // The same name twice in one file is refused as a whole too.
        let twice = format!("{}{}", ONE, ONE.replace("species:\n", ""));
        assert!(db.add_yaml("u.yaml", &twice).is_err());
        assert_eq!(db.len(), n);
        // A good file goes in whole.
        db.add_yaml("u.yaml", ONE).unwrap();
        assert_eq!(db.len(), n + 1);
    }

    #[test]
    fn earlier_keys_are_refused_with_the_new_name() {
        let mut db = SpeciesDb::embedded().unwrap();
        let old = ONE
            .replace("atoms:", "elements:")
            .replace(
                "      from-k: 200.0\n      break-k: 1000.0\n      to-k: 3000.0\n",
                "      temperature-ranges: [200.0, 1000.0, 3000.0]\n",
            )
            .replace("below-break:", "low:")
            .replace("above-break:", "high:");
        let err = db.add_yaml("old.yaml", &old).unwrap_err().to_string();
        assert!(err.contains("XE1") && err.contains("'elements'"), "{err}");
        assert!(err.contains("'atoms'"), "{err}");
        let nasa_only = old.replace("elements:", "atoms:");
        let err = db.add_yaml("old.yaml", &nasa_only).unwrap_err().to_string();
        assert!(
            err.contains("'temperature-ranges'") && err.contains("break-k"),
            "{err}"
        );
        let foreign = ONE.replace("    formula: H2\n", "    formula: H2\n    note: x\n");
        let err = db.add_yaml("f.yaml", &foreign).unwrap_err().to_string();
        assert!(err.contains("'note'") && err.contains("'source'"), "{err}");
        // The shipped file uses only the new keys.
        assert!(!EMBEDDED_SPECIES_YAML.contains("temperature-ranges"));
        assert!(!EMBEDDED_SPECIES_YAML.contains("elements: {"));
    }

    #[test]
    fn temperatures_must_increase() {
        // A narrow record is allowed (solves outside its range are errors where they happen);
        // temperatures out of order are not.
        let mut db = SpeciesDb::embedded().unwrap();
        let narrow = ONE
            .replace("from-k: 200.0", "from-k: 760.0")
            .replace("break-k: 1000.0", "break-k: 770.0")
            .replace("to-k: 3000.0", "to-k: 780.0");
        assert!(db.add_yaml("n.yaml", &narrow).is_ok());
        let mut db = SpeciesDb::embedded().unwrap();
        let crossed = ONE.replace("break-k: 1000.0", "break-k: 5000.0");
        let err = db.add_yaml("c.yaml", &crossed).unwrap_err().to_string();
        assert!(err.contains("increasing"), "{err}");
    }

    #[test]
    fn unknown_species_lists_known_names() {
        let db = SpeciesDb::embedded().unwrap();
        let err = db.lookup("CH5", " in feed 'ng'").unwrap_err().to_string();
        assert!(err.contains("CH5") && err.contains("CH4") && err.contains("feed 'ng'"));
    }
}

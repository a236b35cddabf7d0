//! The unit framework: what a unit type is ([`UnitType`], one static per unit file, listed once
//! in [`super::registry`]), the small trait each type implements ([`UnitKind`]: read its keys,
//! build itself from its specification, solve), and the generic machinery around it: reading a
//! unit's entry ([`UnitBuilder`]), the numeric inputs it registers ([`ParamTable`], one slot per
//! input path such as `units.hts.approach.shift`), and the object a compiled flowsheet solves
//! ([`Unit`]).
//!
//! The style follows the small-trait pattern of scientific Rust crates: a model implements a
//! few required methods and the drivers stay generic over it. A unit type never sees YAML: the
//! flowsheet layer hands it an [`Entry`] of plain values, and it never sees the command line.

use std::fmt;

use super::{Stream, UnitResult};
use crate::diagnostics::FigureKind;
use crate::equilibrium::{SolverOptions, StageWorkspace};
use crate::error::{Error, Result};
use crate::quantity::{self, Flow};
use crate::thermo::SpeciesDb;

/// A value of a unit entry as written: a scalar (numbers keep their text, so that a missing
/// unit of measure can be named), a list or a mapping in file order.
#[derive(Debug, Clone, PartialEq)]
pub enum EntryValue {
    /// A scalar as text.
    Scalar(String),
    /// A list.
    List(Vec<EntryValue>),
    /// A mapping, in file order.
    Map(Vec<(String, EntryValue)>),
}

impl EntryValue {
    fn kind(&self) -> &'static str {
        match self {
            EntryValue::Scalar(_) => "a single value",
            EntryValue::List(_) => "a list",
            EntryValue::Map(_) => "a mapping",
        }
    }
}

/// The keys of one unit entry besides `name`, `type`, `from` and `to`, in file order.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Entry {
    /// (key, value) pairs.
    pub fields: Vec<(String, EntryValue)>,
}

/// What kind of value a key takes (for reading it and for `unit-types`).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ValueKind {
    /// An absolute temperature ("865 degC", "1138 K").
    Temperature,
    /// A temperature difference ("10 K").
    TemperatureDifference,
    /// An absolute pressure ("1.3 bar", "24 barg").
    Pressure,
    /// A pressure difference ("0.3 bar").
    PressureDifference,
    /// A heat duty, heat added to the process stream ("12.5 MW", "-3000 kW").
    Duty,
    /// A molar flow ("120 kmol/h", "2700 Nm3/h").
    MolarFlow,
    /// Heat per mass ("2.5 GJ/t", "2.5 MJ/kg"), J/kg.
    SpecificEnergy,
    /// A fraction 0..1 (0.88, "88 %", "50 ppm").
    Fraction,
    /// A pure number not below zero (a ratio such as steam-to-carbon, 2.5).
    Ratio,
    /// One word of a fixed list.
    Choice(&'static [&'static str]),
    /// A mapping of reaction names to temperature differences.
    PerReaction(&'static [&'static str]),
    /// A mapping of species names to fractions.
    PerSpecies,
    /// A mapping of outlet stream names to values (one outlet may be left out).
    PerOutlet,
    /// A name of this flowsheet (a stream or a unit), or a list of names.
    Names,
}

impl ValueKind {
    /// How the value is written, for `unit-types`.
    pub fn describe(&self) -> String {
        match self {
            ValueKind::Temperature => "temperature (degC, K, degF)".into(),
            ValueKind::TemperatureDifference => "temperature difference (K)".into(),
            ValueKind::Pressure => "absolute or gauge pressure (bar, barg, kPa, MPa, psia)".into(),
            ValueKind::PressureDifference => "pressure difference (bar, kPa, mbar)".into(),
            ValueKind::Duty => "duty, heat added to the stream (kW, MW, Gcal/h)".into(),
            ValueKind::MolarFlow => "molar flow (kmol/h, mol/s, Nm3/h)".into(),
            ValueKind::SpecificEnergy => "heat per mass (GJ/t, MJ/kg, kJ/kg)".into(),
            ValueKind::Fraction => "fraction (0.88, 88 %, 50 ppm)".into(),
            ValueKind::Ratio => "number (2.5)".into(),
            ValueKind::Choice(options) => format!("one of: {}", options.join(", ")),
            ValueKind::PerReaction(reactions) => {
                format!(
                    "reaction: temperature difference, for {}",
                    reactions.join(", ")
                )
            }
            ValueKind::PerSpecies => "species: fraction".into(),
            ValueKind::PerOutlet => "outlet stream: value".into(),
            ValueKind::Names => "stream or unit name(s) of this flowsheet".into(),
        }
    }

    /// Read a value of this kind written with its unit ("820 degC", "10 K", "3105 kmol/h",
    /// "88 %") to SI. `field` names it in errors. Kinds that are not one number are refused.
    pub fn parse(&self, field: &str, text: &str) -> Result<f64> {
        match self {
            ValueKind::Temperature => quantity::parse_temperature(field, text),
            ValueKind::TemperatureDifference | ValueKind::PerReaction(_) => {
                quantity::parse_temperature_difference(field, text)
            }
            ValueKind::Pressure => quantity::parse_pressure(field, text),
            ValueKind::PressureDifference => quantity::parse_pressure_difference(field, text),
            ValueKind::Duty => quantity::parse_duty(field, text),
            ValueKind::SpecificEnergy => quantity::parse_specific_energy(field, text),
            ValueKind::MolarFlow => match quantity::parse_flow(field, text)? {
                Flow::Molar(n) => Ok(n),
                Flow::Mass(_) => Err(Error::InvalidValue {
                    field: field.to_string(),
                    value: text.to_string(),
                    reason: "give a molar flow (kmol/h, mol/s, Nm3/h), not a mass flow".into(),
                }),
            },
            ValueKind::Fraction | ValueKind::PerSpecies => quantity::parse_fraction(field, text),
            ValueKind::Ratio => match text.trim().parse::<f64>() {
                Ok(x) if x.is_finite() && x >= 0.0 => Ok(x),
                _ => Err(Error::InvalidValue {
                    field: field.to_string(),
                    value: text.to_string(),
                    reason: "give a number not below zero, without a unit (e.g. 2.5)".into(),
                }),
            },
            ValueKind::Choice(_) | ValueKind::PerOutlet | ValueKind::Names => {
                Err(Error::InvalidValue {
                    field: field.to_string(),
                    value: text.to_string(),
                    reason: "this key is not a number".into(),
                })
            }
        }
    }

    /// The unit a value of this kind was written in (`"820 degC"` -> degC), as a linear map
    /// from SI, so that values can be shown back in the unit the user chose. Found by reading
    /// 0 and 1 of that unit through [`ValueKind::parse`], so it holds for every unit the parser
    /// knows (offsets such as degC, barg and degF included).
    pub fn written_unit(&self, field: &str, text: &str) -> Result<WrittenUnit> {
        self.parse(field, text)?;
        let trimmed = text.trim();
        let end = trimmed
            .find(|c: char| !(c.is_ascii_digit() || matches!(c, '+' | '-' | '.' | 'e' | 'E')))
            .unwrap_or(trimmed.len());
        let name = trimmed[end..].trim().to_string();
        // A fraction written as a bare number, or 0 and 1 outside a kind's range (absolute zero),
        // are read at two other points of the same unit.
        let at = |x: f64| self.parse(field, &format!("{x} {name}"));
        let (a, b) = match (at(0.0), at(1.0)) {
            (Ok(a), Ok(b)) => (a, b - a),
            _ => {
                let (lo, hi) = (at(1000.0)?, at(2000.0)?);
                (2.0 * lo - hi, (hi - lo) / 1000.0)
            }
        };
        Ok(WrittenUnit {
            name,
            offset: a,
            scale: b,
        })
    }

    /// The kind of quantity a parameter of this kind holds.
    pub fn figure_kind(&self) -> FigureKind {
        match self {
            ValueKind::Temperature => FigureKind::Temperature,
            ValueKind::TemperatureDifference | ValueKind::PerReaction(_) => {
                FigureKind::TemperatureDifference
            }
            ValueKind::Pressure | ValueKind::PressureDifference => FigureKind::Pressure,
            ValueKind::MolarFlow => FigureKind::MolarFlow,
            ValueKind::Fraction | ValueKind::PerSpecies => FigureKind::Fraction,
            _ => FigureKind::Number,
        }
    }
}

/// The unit a value was written in, as a linear map from SI: `si = offset + scale * value`.
#[derive(Debug, Clone, PartialEq)]
pub struct WrittenUnit {
    /// The unit as written ("degC", "K", "kmol/h"; empty for a bare number).
    pub name: String,
    /// SI value of zero in this unit.
    pub offset: f64,
    /// SI size of one of this unit.
    pub scale: f64,
}

impl WrittenUnit {
    /// A value in SI expressed in this unit.
    pub fn from_si(&self, si: f64) -> f64 {
        (si - self.offset) / self.scale
    }
}

/// One key of a unit type, as `unit-types` shows it.
#[derive(Debug, Clone, Copy)]
pub struct KeyDoc {
    /// The key as written (`outlet-temperature`).
    pub key: &'static str,
    /// What it takes.
    pub value: ValueKind,
    /// Its default as text; `None` when it is required or one of a choice of keys.
    pub default: Option<&'static str>,
    /// What it means.
    pub meaning: &'static str,
}

/// The inlets or outlets a unit type takes.
#[derive(Debug, Clone, Copy)]
pub struct Ports {
    /// Fewest.
    pub min: usize,
    /// Most (`None`: no limit).
    pub max: Option<usize>,
    /// What they are, in order, for `unit-types` and messages ("gas, condensate").
    pub meaning: &'static str,
}

impl Ports {
    /// Exactly `n`.
    pub const fn exactly(n: usize, meaning: &'static str) -> Ports {
        Ports {
            min: n,
            max: Some(n),
            meaning,
        }
    }

    /// `n` or more.
    pub const fn at_least(n: usize, meaning: &'static str) -> Ports {
        Ports {
            min: n,
            max: None,
            meaning,
        }
    }

    /// True when `n` ports are allowed.
    pub fn allows(&self, n: usize) -> bool {
        n >= self.min && self.max.is_none_or(|m| n <= m)
    }

    /// "exactly 1", "at least 2", "1 to 3".
    pub fn count_text(&self) -> String {
        match self.max {
            Some(m) if m == self.min => format!("exactly {m}"),
            Some(m) => format!("{} to {m}", self.min),
            None => format!("at least {}", self.min),
        }
    }
}

/// Ports written as named keys (`hot-from`, `hot-to`, ...) instead of `from` and `to`: each key
/// holds one stream name; the flowsheet reader makes the inlet list of `inlets` and the outlet
/// list of `outlets` followed by those of `optional_outlets` that are given, in this order.
#[derive(Debug, Clone, Copy)]
pub struct NamedPorts {
    /// Inlet keys, in inlet order (all required).
    pub inlets: &'static [&'static str],
    /// Outlet keys, in outlet order (all required).
    pub outlets: &'static [&'static str],
    /// Outlet keys that may be left out, after the required ones, in order.
    pub optional_outlets: &'static [&'static str],
}

impl NamedPorts {
    /// Every port key: inlets, outlets, optional outlets.
    pub fn keys(&self) -> impl Iterator<Item = &'static str> + '_ {
        self.inlets
            .iter()
            .chain(self.outlets)
            .chain(self.optional_outlets)
            .copied()
    }

    /// The key written for position `index` of the inlet (`list` = "from") or outlet ("to")
    /// list (exact when the optional outlets given are the first of them, as with one).
    pub fn key_of(&self, list: &str, index: usize) -> Option<&'static str> {
        if list == "from" {
            return self.inlets.get(index).copied();
        }
        self.outlets
            .iter()
            .chain(self.optional_outlets)
            .nth(index)
            .copied()
    }

    /// "hot-from, cold-from" style list of the keys, optional ones marked.
    pub fn describe(&self) -> String {
        let mut keys: Vec<String> = self
            .inlets
            .iter()
            .chain(self.outlets)
            .map(|k| k.to_string())
            .collect();
        keys.extend(
            self.optional_outlets
                .iter()
                .map(|k| format!("{k} (optional)")),
        );
        keys.join(", ")
    }
}

/// A unit type: its documentation and its constructor. One static per unit file.
pub struct UnitType {
    /// The type as written in flowsheets (`shift`).
    pub name: &'static str,
    /// One line on what it does and how it is solved.
    pub summary: &'static str,
    /// Its inlets (`from`).
    pub inlets: Ports,
    /// Its outlets (`to`).
    pub outlets: Ports,
    /// Ports written as named keys instead of `from` and `to` (`None`: `from` and `to`).
    pub named_ports: Option<&'static NamedPorts>,
    /// Its keys.
    pub keys: &'static [KeyDoc],
    /// A short example entry (YAML).
    pub example: &'static str,
    /// Read an entry and build the unit ([`build`]`::<U>` for a [`UnitKind`] `U`).
    pub build: fn(&mut BuildInput<'_>) -> Result<Box<dyn Unit>>,
}

impl fmt::Debug for UnitType {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.debug_struct("UnitType")
            .field("name", &self.name)
            .finish()
    }
}

/// A numeric input slot of a flowsheet (an index into its parameter vector).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub struct Param(pub usize);

/// One numeric input: its path, its value in the file (SI) and how it reads.
#[derive(Debug, Clone, PartialEq)]
pub struct ParamInfo {
    /// Input path (`units.hts.approach.shift`, `feeds.natural-gas.flows.CH4`).
    pub path: String,
    /// The value in the file, or the default where the file leaves it out, SI.
    pub default: f64,
    /// How it reads.
    pub kind: FigureKind,
    /// How it is written (the units a value may be given in).
    pub value: ValueKind,
}

/// Every numeric input of a flowsheet, by slot.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct ParamTable {
    params: Vec<ParamInfo>,
}

impl ParamTable {
    /// Register an input and return its slot.
    pub fn add(&mut self, path: String, default: f64, value: ValueKind) -> Param {
        self.params.push(ParamInfo {
            path,
            default,
            kind: value.figure_kind(),
            value,
        });
        Param(self.params.len() - 1)
    }

    /// The inputs, by slot.
    pub fn all(&self) -> &[ParamInfo] {
        &self.params
    }

    /// The values in the file, by slot (the parameter vector of the flowsheet as written).
    pub fn defaults(&self) -> Vec<f64> {
        self.params.iter().map(|p| p.default).collect()
    }

    /// The slot of an input path.
    pub fn find(&self, path: &str) -> Option<Param> {
        self.params.iter().position(|p| p.path == path).map(Param)
    }
}

/// What a unit type's `build` reads from.
pub struct BuildInput<'a> {
    /// The species database.
    pub db: &'a SpeciesDb,
    /// The unit's name.
    pub name: &'a str,
    /// Its type.
    pub unit_type: &'static UnitType,
    /// Its outlet stream names, in order.
    pub outlets: &'a [String],
    /// Its inlet stream names, in order.
    pub inlets: &'a [String],
    /// Its entry.
    pub entry: &'a Entry,
    /// Where it registers its numeric inputs.
    pub params: &'a mut ParamTable,
}

/// Sets one numeric input into a unit's specification.
pub type Setter<S> = Box<dyn Fn(&mut S, f64) + Send + Sync>;

/// Reads a unit's entry for its [`UnitKind::read`]: every value read is checked and converted
/// to SI, every numeric one registered as an input with the setter that puts it back into the
/// specification, and keys that are never read are refused when reading is done.
pub struct UnitBuilder<'a, 'b, S> {
    input: &'b mut BuildInput<'a>,
    read: Vec<bool>,
    setters: Vec<(Param, Setter<S>)>,
}

impl<'a, 'b, S: 'static> UnitBuilder<'a, 'b, S> {
    fn new(input: &'b mut BuildInput<'a>) -> UnitBuilder<'a, 'b, S> {
        let n = input.entry.fields.len();
        UnitBuilder {
            input,
            read: vec![false; n],
            setters: Vec::new(),
        }
    }

    /// The species database.
    pub fn db(&self) -> &'a SpeciesDb {
        self.input.db
    }

    /// The unit's outlet stream names.
    pub fn outlets(&self) -> &'a [String] {
        self.input.outlets
    }

    /// The unit's inlet stream names.
    pub fn inlets(&self) -> &'a [String] {
        self.input.inlets
    }

    /// True when the entry has this key.
    pub fn has(&self, key: &str) -> bool {
        self.input.entry.fields.iter().any(|(k, _)| k == key)
    }

    /// The value of a key, marked as read.
    pub fn value(&mut self, key: &str) -> Option<&'a EntryValue> {
        let entry: &'a Entry = self.input.entry;
        let i = entry.fields.iter().position(|(k, _)| k == key)?;
        self.read[i] = true;
        Some(&entry.fields[i].1)
    }

    /// An error on a key of this unit.
    pub fn error(&self, field: &str, reason: impl Into<String>) -> Error {
        Error::UnitSpec {
            unit: self.input.name.to_string(),
            field: field.to_string(),
            reason: reason.into(),
        }
    }

    fn scalar(&self, field: &str, v: &'a EntryValue) -> Result<&'a str> {
        match v {
            EntryValue::Scalar(s) => Ok(s),
            other => Err(self.error(
                field,
                format!("expected a single value, found {}", other.kind()),
            )),
        }
    }

    /// Parse a scalar of a numeric kind to SI.
    fn parse(&self, field: &str, kind: ValueKind, text: &str) -> Result<f64> {
        if matches!(
            kind,
            ValueKind::Choice(_) | ValueKind::PerOutlet | ValueKind::Names
        ) {
            return Err(self.error(field, "is not a number"));
        }
        kind.parse(field, text)
            .map_err(|e| self.error(field, quantity_reason(e)))
    }

    /// Register a numeric input `units.NAME.SUBPATH` with its value and setter.
    pub fn register(
        &mut self,
        subpath: &str,
        value: f64,
        kind: ValueKind,
        set: impl Fn(&mut S, f64) + Send + Sync + 'static,
    ) -> Param {
        let path = format!("units.{}.{subpath}", self.input.name);
        let p = self.input.params.add(path, value, kind);
        self.setters.push((p, Box::new(set)));
        p
    }

    /// A numeric key: read, converted to SI, and registered as an input (with `default` when
    /// the entry leaves it out; not registered when it is left out and has no default).
    pub fn number(
        &mut self,
        key: &str,
        kind: ValueKind,
        default: Option<f64>,
        set: impl Fn(&mut S, f64) + Send + Sync + 'static,
    ) -> Result<Option<f64>> {
        let value = match self.value(key) {
            Some(v) => {
                let text = self.scalar(key, v)?;
                Some(self.parse(key, kind, text)?)
            }
            None => default,
        };
        if let Some(x) = value {
            self.register(key, x, kind, set);
        }
        Ok(value)
    }

    /// A required numeric key.
    pub fn required(
        &mut self,
        key: &str,
        kind: ValueKind,
        example: &str,
        set: impl Fn(&mut S, f64) + Send + Sync + 'static,
    ) -> Result<f64> {
        let name = self.input.unit_type.name;
        self.number(key, kind, None, set)?.ok_or_else(|| {
            self.error(
                key,
                format!("a {name} needs `{key}` (e.g. {key}: {example})"),
            )
        })
    }

    /// A word of a fixed list.
    pub fn choice(&mut self, key: &str, options: &'static [&'static str]) -> Result<Option<usize>> {
        let Some(v) = self.value(key) else {
            return Ok(None);
        };
        let text = self.scalar(key, v)?;
        options
            .iter()
            .position(|o| *o == text)
            .map(Some)
            .ok_or_else(|| {
                self.error(
                    key,
                    format!(
                        "'{text}' is not known; choose one of: {}",
                        options.join(", ")
                    ),
                )
            })
    }

    /// A mapping of names to numbers of one kind, in file order (`None` when left out).
    pub fn map(&mut self, key: &str, kind: ValueKind) -> Result<Option<Vec<(String, f64)>>> {
        let Some(v) = self.value(key) else {
            return Ok(None);
        };
        let EntryValue::Map(pairs) = v else {
            return Err(self.error(
                key,
                format!("expected a mapping (name: value), found {}", v.kind()),
            ));
        };
        let mut out = Vec::with_capacity(pairs.len());
        for (name, value) in pairs {
            let field = format!("{key}.{name}");
            if out.iter().any(|(n, _): &(String, f64)| n == name) {
                return Err(self.error(&field, "is given twice"));
            }
            let text = self.scalar(&field, value)?;
            out.push((name.clone(), self.parse(&field, kind, text)?));
        }
        Ok(Some(out))
    }

    /// The approach temperature of each of `reactions` under `approach`, zero where not given,
    /// as (reaction, K) pairs in the order of `reactions`; each registered as
    /// `units.NAME.approach.REACTION`. Unknown reactions are refused.
    pub fn approaches(
        &mut self,
        reactions: &'static [&'static str],
        set: fn(&mut S, usize, f64),
    ) -> Result<Vec<(String, f64)>> {
        let given = self
            .map("approach", ValueKind::PerReaction(reactions))?
            .unwrap_or_default();
        if let Some((name, _)) = given.iter().find(|(n, _)| !reactions.contains(&n.as_str())) {
            return Err(self.error(
                &format!("approach.{name}"),
                format!(
                    "reaction '{name}' is not part of this unit; its reactions are: {}",
                    reactions.join(", ")
                ),
            ));
        }
        let mut out = Vec::with_capacity(reactions.len());
        for (j, reaction) in reactions.iter().enumerate() {
            let value = given
                .iter()
                .find(|(n, _)| n == reaction)
                .map_or(0.0, |(_, v)| *v);
            self.register(
                &format!("approach.{reaction}"),
                value,
                ValueKind::TemperatureDifference,
                move |s, v| set(s, j, v),
            );
            out.push((reaction.to_string(), value));
        }
        Ok(out)
    }

    /// The pressure drop (default zero), registered as `units.NAME.pressure-drop`.
    pub fn pressure_drop(&mut self, set: fn(&mut S, f64)) -> Result<f64> {
        Ok(self
            .number(
                "pressure-drop",
                ValueKind::PressureDifference,
                Some(0.0),
                set,
            )?
            .unwrap_or(0.0))
    }

    /// Refuse keys the type does not document, naming the keys it takes (before reading, so
    /// that a misspelt key is named as such rather than as a missing one).
    fn check_keys(&self) -> Result<()> {
        let t = self.input.unit_type;
        for (key, _) in &self.input.entry.fields {
            if !t.keys.iter().any(|k| k.key == key) {
                let known: Vec<&str> = t.keys.iter().map(|k| k.key).collect();
                let ports = t
                    .named_ports
                    .map_or_else(|| "from, to".to_string(), |n| n.describe());
                return Err(self.error(
                    key,
                    format!(
                        "unknown key for a {}; its keys are: name, type, {ports}, {} (see \
                         `syntrain unit-types {}`)",
                        t.name,
                        known.join(", "),
                        t.name
                    ),
                ));
            }
        }
        Ok(())
    }

    /// The setters, once every key of the entry was read (a documented key that the type's
    /// `read` left unread is a fault of the type, said as such).
    fn finish(self) -> Result<Vec<(Param, Setter<S>)>> {
        if let Some(i) = self.read.iter().position(|r| !r) {
            let key = &self.input.entry.fields[i].0;
            return Err(self.error(
                key,
                format!(
                    "is documented for a {} but was not read (a fault of the unit type, please \
                     report it)",
                    self.input.unit_type.name
                ),
            ));
        }
        Ok(self.setters)
    }
}

/// The reason of a quantity error without its field (the unit error names the field).
fn quantity_reason(e: Error) -> String {
    match e {
        Error::Quantity { value, reason, .. } => format!("cannot read '{value}': {reason}"),
        Error::InvalidValue { value, reason, .. } => {
            format!("value {value} is not allowed: {reason}")
        }
        other => other.to_string(),
    }
}

/// The small trait of a unit type: read its keys into a specification (SI), build itself from
/// a specification (checks, equilibrium stage built once), give that specification back, and
/// solve for a set of inlets. Everything else (inputs, re-solving with new values, the flowsheet)
/// is generic over it.
pub trait UnitKind: Send + Sync + fmt::Debug + Sized + 'static {
    /// The specification in SI.
    type Spec: Clone + Send + Sync + fmt::Debug + 'static;

    /// Read the entry (keys, values, checks across keys), registering every numeric input.
    fn read(b: &mut UnitBuilder<'_, '_, Self::Spec>) -> Result<Self::Spec>;

    /// Build the unit from a specification.
    fn new(db: &SpeciesDb, name: &str, spec: &Self::Spec) -> Result<Self>;

    /// The specification it was built from.
    fn spec(&self) -> &Self::Spec;

    /// Solve for these inlets into `out`, reusing its buffers and the work memory of `scratch`
    /// (no heap allocation once warm, errors and warnings aside); `guess`: the equilibrium
    /// extents of a previous solve of this unit (ignored by units without an equilibrium stage).
    fn solve_into(
        &self,
        db: &SpeciesDb,
        inlets: &[&Stream],
        guess: Option<&[f64]>,
        scratch: &mut UnitScratch,
        out: &mut UnitResult,
    ) -> Result<()>;

    /// Solve with the numbers of `spec` in place of those the unit was built with (a study's
    /// changed inputs; the same keys). The default builds the unit anew from `spec`, so every
    /// check of [`UnitKind::new`] runs; a unit whose build is costly (an equilibrium stage)
    /// overrides it to run the same checks on the numbers and solve with what it built.
    #[allow(clippy::too_many_arguments)]
    fn solve_spec_into(
        &self,
        db: &SpeciesDb,
        name: &str,
        spec: &Self::Spec,
        inlets: &[&Stream],
        guess: Option<&[f64]>,
        scratch: &mut UnitScratch,
        out: &mut UnitResult,
    ) -> Result<()> {
        Self::new(db, name, spec)?.solve_into(db, inlets, guess, scratch, out)
    }

    /// Solve into a new result.
    fn solve(
        &self,
        db: &SpeciesDb,
        inlets: &[&Stream],
        guess: Option<&[f64]>,
    ) -> Result<UnitResult> {
        let mut out = UnitResult::default();
        self.solve_into(db, inlets, guess, &mut UnitScratch::default(), &mut out)?;
        Ok(out)
    }
}

/// Per-thread work memory of one unit, kept in a flowsheet's workspace and reused across solves
/// so that a unit's temporaries need no heap allocation once they have their size; with the
/// flowsheet's solver options, which the flowsheet sets before each solve.
#[derive(Debug, Default)]
pub struct UnitScratch {
    /// Flow vectors for a unit's temporaries (one entry per database species once sized).
    pub flows: [Vec<f64>; 3],
    /// The equilibrium stage's work memory.
    pub stage: StageWorkspace,
    /// Tolerances and iteration limits of the equilibrium stages (the flowsheet's `solver:`).
    pub options: SolverOptions,
    /// Work memory of the carbon check along a reforming unit's path.
    pub(crate) carbon: super::chemistry::CarbonScratch,
    /// Heat the unit must deliver to the units it heats (a furnace firing a reformer), W: the
    /// sum of their duties, set by the flowsheet before each solve (zero for other units).
    pub heat_demand_w: f64,
}

/// What a compiled flowsheet solves: a built unit with its inputs.
pub trait Unit: Send + Sync + fmt::Debug {
    /// Solve with the parameter vector `params` (by slot; `defaults` are the values the unit was
    /// built with), writing into `out` (its buffers reused).
    fn solve_into(
        &self,
        cx: &UnitContext<'_>,
        inlets: &[&Stream],
        guess: Option<&[f64]>,
        scratch: &mut UnitScratch,
        out: &mut UnitResult,
    ) -> Result<()>;

    /// Solve into a new result.
    fn solve(
        &self,
        cx: &UnitContext<'_>,
        inlets: &[&Stream],
        guess: Option<&[f64]>,
    ) -> Result<UnitResult> {
        let mut out = UnitResult::default();
        self.solve_into(cx, inlets, guess, &mut UnitScratch::default(), &mut out)?;
        Ok(out)
    }
}

/// The shared inputs of a unit solve.
#[derive(Debug, Clone, Copy)]
pub struct UnitContext<'a> {
    /// The species database.
    pub db: &'a SpeciesDb,
    /// The unit's name.
    pub name: &'a str,
    /// The parameter vector, by slot.
    pub params: &'a [f64],
    /// The values the flowsheet was built with, by slot.
    pub defaults: &'a [f64],
}

/// A unit of kind `U` with the setters of its inputs.
struct Compiled<U: UnitKind> {
    unit: U,
    setters: Vec<(Param, Setter<U::Spec>)>,
}

impl<U: UnitKind> fmt::Debug for Compiled<U> {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.debug_struct("Compiled")
            .field("unit", &self.unit)
            .field("inputs", &self.setters.len())
            .finish()
    }
}

impl<U: UnitKind> Unit for Compiled<U> {
    fn solve_into(
        &self,
        cx: &UnitContext<'_>,
        inlets: &[&Stream],
        guess: Option<&[f64]>,
        scratch: &mut UnitScratch,
        out: &mut UnitResult,
    ) -> Result<()> {
        // Bit-for-bit the values it was built with: solve it as it is. Otherwise solve it with
        // its specification carrying the new values (checked as a build checks them).
        let same = self
            .setters
            .iter()
            .all(|(p, _)| cx.params[p.0].to_bits() == cx.defaults[p.0].to_bits());
        if same {
            return self.unit.solve_into(cx.db, inlets, guess, scratch, out);
        }
        let mut spec = self.unit.spec().clone();
        for (p, set) in &self.setters {
            set(&mut spec, cx.params[p.0]);
        }
        self.unit
            .solve_spec_into(cx.db, cx.name, &spec, inlets, guess, scratch, out)
    }
}

/// Read an entry into a unit of kind `U`: the constructor of a [`UnitType`].
pub fn build<U: UnitKind>(input: &mut BuildInput<'_>) -> Result<Box<dyn Unit>> {
    let (db, name) = (input.db, input.name);
    let mut b = UnitBuilder::new(input);
    b.check_keys()?;
    let spec = U::read(&mut b)?;
    let setters = b.finish()?;
    Ok(Box::new(Compiled {
        unit: U::new(db, name, &spec)?,
        setters,
    }))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn written_units_map_si_back() {
        let cases = [
            // 0 degC = 273.15 K (ITS-90 definition of the Celsius scale)
            (ValueKind::Temperature, "820 degC", "degC", 1093.15, 820.0),
            (ValueKind::Temperature, "1100 K", "K", 1100.0, 1100.0),
            // degF: T/K = (T/degF + 459.67) * 5/9 (definition)
            (
                ValueKind::Temperature,
                "100 degF",
                "degF",
                310.927_777_777_777_8,
                100.0,
            ),
            (ValueKind::TemperatureDifference, "10 K", "K", 10.0, 10.0),
            // 1 bar = 1e5 Pa; gauge referred to 1 atm = 101 325 Pa (definitions)
            (ValueKind::Pressure, "30 bar", "bar", 30e5, 30.0),
            (ValueKind::Pressure, "24 barg", "barg", 25.01325e5, 24.0),
            (
                ValueKind::MolarFlow,
                "3600 kmol/h",
                "kmol/h",
                1000.0,
                3600.0,
            ),
            (ValueKind::Fraction, "88 %", "%", 0.88, 88.0),
            (ValueKind::Fraction, "0.88", "", 0.88, 0.88),
            (ValueKind::Duty, "2 MW", "MW", 2e6, 2.0),
        ];
        for (kind, text, name, si, back) in cases {
            let unit = kind.written_unit("x", text).unwrap();
            assert_eq!(unit.name, name, "{text}");
            assert!((kind.parse("x", text).unwrap() - si).abs() < 1e-9 * si.abs().max(1.0));
            assert!(
                (unit.from_si(si) - back).abs() < 1e-9 * back.abs().max(1.0),
                "{text}"
            );
        }
        assert!(ValueKind::MolarFlow.parse("x", "10 t/h").is_err());
        assert!(ValueKind::Choice(&["a"]).written_unit("x", "1").is_err());
    }

    #[test]
    fn ports_say_how_many() {
        assert_eq!(Ports::exactly(1, "").count_text(), "exactly 1");
        assert_eq!(Ports::at_least(2, "").count_text(), "at least 2");
        let range = Ports {
            min: 1,
            max: Some(3),
            meaning: "",
        };
        assert_eq!(range.count_text(), "1 to 3");
        assert!(range.allows(3) && !range.allows(4) && !range.allows(0));
        assert!(Ports::at_least(2, "").allows(50));
    }

    #[test]
    fn value_kinds_describe_themselves_and_read_as_their_quantity() {
        assert_eq!(
            ValueKind::Temperature.describe(),
            "temperature (degC, K, degF)"
        );
        assert_eq!(ValueKind::Choice(&["a", "b"]).describe(), "one of: a, b");
        assert!(ValueKind::PerReaction(&["shift"])
            .describe()
            .contains("shift"));
        let kinds = [
            (ValueKind::Temperature, FigureKind::Temperature),
            (
                ValueKind::TemperatureDifference,
                FigureKind::TemperatureDifference,
            ),
            (
                ValueKind::PerReaction(&[]),
                FigureKind::TemperatureDifference,
            ),
            (ValueKind::Pressure, FigureKind::Pressure),
            (ValueKind::PressureDifference, FigureKind::Pressure),
            (ValueKind::MolarFlow, FigureKind::MolarFlow),
            (ValueKind::Fraction, FigureKind::Fraction),
            (ValueKind::PerSpecies, FigureKind::Fraction),
            (ValueKind::Duty, FigureKind::Number),
        ];
        for (v, f) in kinds {
            assert_eq!(v.figure_kind(), f, "{v:?}");
        }
        assert_eq!(EntryValue::Scalar("1".into()).kind(), "a single value");
        assert_eq!(EntryValue::List(vec![]).kind(), "a list");
        assert_eq!(EntryValue::Map(vec![]).kind(), "a mapping");
    }
}

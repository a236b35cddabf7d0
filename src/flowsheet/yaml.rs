//! The flowsheet file as written: serde model of the YAML (kebab-case keys, unknown keys refused
//! everywhere) and the parse that keeps file, line and column on every error.
//!
//! Each unit's keys depend on its `type`, and each unit type reads its own keys (the registry,
//! [`crate::units::registry`]): here a unit entry's `name`, `type`, `from` and `to` are read and
//! checked (unknown type, number of inlets and outlets) with the entry's line and column, and
//! its other keys are kept as plain values for its type. The file is read in two passes: the
//! first only to learn each unit's `name`, so that paths in messages name units by name
//! (`units.reformer.outlet-temperature`) rather than by position. Errors in the keys of a type
//! are found when the unit is built; the flowsheet layer gives them their position.
//!
//! Besides `title`, `solver`, `feeds` and `units` a file may hold `targets` (design targets,
//! [`TargetModel`]; their paths and bounds are checked in [`super::targets`]) and
//! `steam-feed` (the feed a steam-to-carbon target scales), and `gas-model` (`ideal`, the
//! default, or `peng-robinson`: the gas model of every equilibrium stage, kept in the solver
//! options; a reactor may set its own with its `gas-model` key).

use std::fmt;

use serde::de::{self, DeserializeSeed, Deserializer, MapAccess, SeqAccess, Visitor};
use serde::Deserialize;
use serde_norway::Value;

use super::checks::Checked;
use super::recycle::RecycleOptions;
use super::values::{
    FlowRate, Fraction, Names, OrderedMap, Pressure, Temperature, TemperatureDifference,
};
use crate::equilibrium::SolverOptions;
use crate::error::{Error, Position, Result};
use crate::thermo::GasModel;
use crate::units::registry;
use crate::units::unit::{Entry, EntryValue, NamedPorts, UnitType};

/// The whole file as written (quantities already in SI).
#[derive(Debug, Clone)]
pub struct FileModel {
    /// Title of the flowsheet.
    pub title: Option<String>,
    /// Tolerances and iteration limits of the equilibrium stages (`solver:`), and their gas
    /// model (`gas-model:`).
    pub solver: SolverOptions,
    /// How recycles are solved (`solver:` keys `recycle-tolerance`, `recycle-iterations`,
    /// `tear-streams`).
    pub recycle: RecycleOptions,
    /// First guesses of tear streams (`solver: tear-guess`), by stream name, as written.
    pub tear_guess: Vec<(String, FeedModel)>,
    /// Feeds, in file order.
    pub feeds: OrderedMap<FeedModel>,
    /// Units, in file order.
    pub units: Vec<UnitModel>,
    /// Design targets, in file order (`targets:`; empty without).
    pub targets: Vec<TargetModel>,
    /// The feed a steam-to-carbon target scales (`steam-feed:`).
    pub steam_feed: Option<String>,
    /// The plant's energy figures (`energy:`; defaults without).
    pub energy: super::energy::EnergyModel,
}

/// A design target as written: vary one input between two values so that one result equals a
/// number (see [`super::targets`]). Paths and bounds are checked when the flowsheet is built.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields, rename_all = "kebab-case")]
pub struct TargetModel {
    /// Input path to vary (`units.reformer.outlet-temperature`).
    pub vary: String,
    /// Lower and upper value of the input, with units (`[800 degC, 950 degC]`).
    pub between: Vec<Value>,
    /// Result path to meet (`streams.reformed-gas.dry_mol_pct.CH4`).
    pub so_that: String,
    /// The value the result must reach, in the result path's own unit.
    pub equals: f64,
    /// How close, in the result's unit (default 1e-4).
    #[serde(default)]
    pub tolerance: Option<f64>,
}

/// A plain YAML scalar as text (`800 degC`, `0.3`); `None` for a list or mapping.
pub fn scalar_text(v: &Value) -> Option<String> {
    match v {
        Value::String(s) => Some(s.clone()),
        Value::Number(n) => Some(n.to_string()),
        Value::Tagged(t) => scalar_text(&t.value),
        _ => None,
    }
}

/// A feed stream as written.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields, rename_all = "kebab-case")]
pub struct FeedModel {
    /// Temperature.
    pub temperature: Temperature,
    /// Pressure.
    pub pressure: Pressure,
    /// Flow of each species (molar or mass).
    #[serde(default)]
    pub flows: Option<OrderedMap<FlowRate>>,
    /// Total flow (molar or mass), with `mole-fractions`.
    #[serde(default)]
    pub total: Option<FlowRate>,
    /// Mole fraction of each species, with `total`; they must sum to 1.
    #[serde(default)]
    pub mole_fractions: Option<OrderedMap<Fraction>>,
}

/// One unit entry as written: its name, type, inlets and outlets, and the keys of its type as
/// plain values (the unit type reads them; see [`crate::units::unit::UnitBuilder`]).
#[derive(Debug, Clone)]
pub struct UnitModel {
    /// Unit name.
    pub name: String,
    /// Unit type, from the registry.
    pub unit_type: &'static UnitType,
    /// Inlet stream names.
    pub from: Vec<String>,
    /// Outlet stream names.
    pub to: Vec<String>,
    /// The other keys, in file order.
    pub entry: Entry,
    /// The units this one heats (`heats:`, a flowsheet-level link for a type that documents
    /// the key, such as a furnace firing a reformer); empty for other types.
    pub heats: Vec<String>,
}

/// A YAML value as a plain entry value (numbers and booleans keep their text).
fn entry_value(v: Value) -> EntryValue {
    match v {
        Value::Null => EntryValue::Scalar(String::new()),
        Value::Bool(b) => EntryValue::Scalar(b.to_string()),
        Value::Number(n) => EntryValue::Scalar(n.to_string()),
        Value::String(s) => EntryValue::Scalar(s),
        Value::Sequence(items) => EntryValue::List(items.into_iter().map(entry_value).collect()),
        Value::Mapping(m) => EntryValue::Map(
            m.into_iter()
                .map(|(k, v)| (key_text(k), entry_value(v)))
                .collect(),
        ),
        Value::Tagged(t) => entry_value(t.value),
    }
}

/// A mapping key as text.
fn key_text(k: Value) -> String {
    match k {
        Value::String(s) => s,
        Value::Number(n) => n.to_string(),
        Value::Bool(b) => b.to_string(),
        other => format!("{other:?}"),
    }
}

/// What the first pass learnt about one unit entry: its name, for paths in messages, and its
/// type as written.
#[derive(Debug, Clone, Default)]
struct Preview {
    name: Option<String>,
    type_name: Option<String>,
}

/// Parse the text of a flowsheet file; `origin` names it in messages.
pub fn parse(origin: &str, text: &str) -> Result<FileModel> {
    let previews = preview(origin, text)?;
    // An unknown type is said at its own line and column (a check inside the second pass
    // would only have the entry's).
    for (i, p) in previews.iter().enumerate() {
        if let Some(t) = &p.type_name {
            if registry::unit_type(t).is_none() {
                use super::locate::{locate, Step};
                let at = [Step::Key("units"), Step::Index(i), Step::Key("type")];
                let unit = p.name.clone().unwrap_or_else(|| format!("[{i}]"));
                return Err(Error::Yaml {
                    path: origin.to_string(),
                    position: locate(text, &at),
                    message: format!(
                        "units.{unit}.type: unknown unit type '{t}'; the types are: {} (see \
                         `syntrain unit-types`)",
                        registry::names().join(", ")
                    ),
                });
            }
        }
    }
    let seed = FileSeed {
        previews: &previews,
    };
    let deserializer = serde_norway::Deserializer::from_str(text);
    seed.deserialize(deserializer)
        .map_err(|e| yaml_error(origin, &e, &previews))
}

/// First pass: the type and name of each unit entry, where they can be read.
fn preview(origin: &str, text: &str) -> Result<Vec<Preview>> {
    let value: Value = serde_norway::from_str(text).map_err(|e| yaml_error(origin, &e, &[]))?;
    let units = match value.get("units").and_then(Value::as_sequence) {
        Some(units) => units,
        None => return Ok(Vec::new()),
    };
    let previews: Vec<Preview> = units
        .iter()
        .map(|unit| Preview {
            name: unit.get("name").and_then(Value::as_str).map(str::to_string),
            type_name: unit.get("type").and_then(Value::as_str).map(str::to_string),
        })
        .collect();
    for (i, (unit, p)) in units.iter().zip(&previews).enumerate() {
        check_port_keys(origin, text, i, unit, p)?;
    }
    Ok(previews)
}

/// Ports of a unit entry written the way its type takes them: `from` and `to`, or the named
/// port keys of a type that has them (each one stream name). Checked in the first pass so that
/// the error points at the key itself.
fn check_port_keys(
    origin: &str,
    text: &str,
    i: usize,
    unit: &Value,
    preview: &Preview,
) -> Result<()> {
    use super::locate::{locate, locate_key, Step};
    let Some(t) = preview.type_name.as_deref().and_then(registry::unit_type) else {
        return Ok(());
    };
    let Some(map) = unit.as_mapping() else {
        return Ok(());
    };
    let entry = [Step::Key("units"), Step::Index(i)];
    let label = preview.name.clone().unwrap_or_else(|| format!("[{i}]"));
    let fail = |key: &str, position, message: String| Error::Yaml {
        path: origin.to_string(),
        position,
        message: format!("units.{label}.{key}: {message}"),
    };
    let keys: Vec<&str> = map.keys().filter_map(Value::as_str).collect();
    match t.named_ports {
        Some(named) => {
            for key in ["from", "to"] {
                if keys.contains(&key) {
                    return Err(fail(
                        key,
                        locate_key(text, &entry, key),
                        format!(
                            "{} {} names its streams by port, not in `from` and `to`: write {}",
                            article(t.name),
                            t.name,
                            named.describe()
                        ),
                    ));
                }
            }
            for key in named.inlets.iter().chain(named.outlets) {
                if !keys.contains(key) {
                    return Err(fail(
                        key,
                        locate(text, &entry),
                        format!(
                            "{} {} needs `{key}` (one stream name); its ports are: {}",
                            article(t.name),
                            t.name,
                            named.describe()
                        ),
                    ));
                }
            }
            for key in named.keys() {
                if let Some(v) = unit.get(key) {
                    if !v.is_string() {
                        let mut at = entry.to_vec();
                        at.push(Step::Key(key));
                        return Err(fail(
                            key,
                            locate(text, &at),
                            "expected one stream name".to_string(),
                        ));
                    }
                }
            }
        }
        None => {
            let port_of = |key: &str| {
                registry::UNIT_TYPES
                    .iter()
                    .find(|o| o.named_ports.is_some_and(|n| n.keys().any(|k| k == key)))
            };
            for key in &keys {
                if let Some(other) = port_of(key) {
                    return Err(fail(
                        key,
                        locate_key(text, &entry, key),
                        format!(
                            "`{key}` is a port of {} {}; {} {} takes its streams in `from` \
                             and `to`",
                            article(other.name),
                            other.name,
                            article(t.name),
                            t.name
                        ),
                    ));
                }
            }
        }
    }
    Ok(())
}

/// A YAML error with file, line and column; the position suffix of the parser's message is
/// dropped (it is in the location) and `units[i]` in the path becomes `units.<name>`.
fn yaml_error(origin: &str, err: &serde_norway::Error, previews: &[Preview]) -> Error {
    let mut message = err.to_string();
    let mut position = None;
    if let Some(l) = err.location() {
        position = Some(Position {
            line: l.line(),
            column: l.column(),
        });
        let suffix = format!(" at line {} column {}", l.line(), l.column());
        if let Some(stripped) = message.strip_suffix(&suffix) {
            message = stripped.to_string();
        }
    }
    if let Some(rest) = message.strip_prefix("units[") {
        if let Some((index, tail)) = rest.split_once(']') {
            let name = index
                .parse::<usize>()
                .ok()
                .and_then(|i| previews.get(i))
                .and_then(|p| p.name.clone());
            if let Some(name) = name {
                message = format!("units.{name}{tail}");
            }
        }
    }
    Error::Yaml {
        path: origin.to_string(),
        position,
        message,
    }
}

const FILE_KEYS: &[&str] = &[
    "title",
    "solver",
    "gas-model",
    "feeds",
    "units",
    "targets",
    "steam-feed",
    "energy",
];

/// The `solver:` key: tolerances and iteration limits of the equilibrium stages, each optional
/// (the defaults of [`SolverOptions`]), and of the recycle iteration ([`RecycleOptions`]).
#[derive(Debug, Clone, Default, Deserialize)]
#[serde(deny_unknown_fields, rename_all = "kebab-case")]
pub struct SolverModel {
    /// Working residual of the extent Newton iteration (ln-space).
    pub extent_tolerance: Option<f64>,
    /// Largest residual a converged extent solve may report (ln-space).
    pub extent_reported_tolerance: Option<f64>,
    /// Newton iterations of one extent solve.
    pub extent_iteration_limit: Option<usize>,
    /// Energy residual of an adiabatic or fixed-duty stage, relative to n R T of its inlet.
    pub energy_tolerance: Option<f64>,
    /// Bracket length at which a temperature search stops.
    pub temperature_step_tolerance: Option<TemperatureDifference>,
    /// Equilibrium evaluations of one temperature search.
    pub temperature_iteration_limit: Option<usize>,
    /// Largest scaled change of the tear streams of a converged recycle.
    pub recycle_tolerance: Option<f64>,
    /// Recycle iterations allowed.
    pub recycle_iterations: Option<usize>,
    /// Tear streams (chosen when not given).
    pub tear_streams: Option<Names>,
    /// Bounds of Wegstein's factor q: [lower, upper].
    pub wegstein_bounds: Option<[f64; 2]>,
    /// First guesses of tear streams, written as feeds (temperature, pressure, flows).
    pub tear_guess: Option<OrderedMap<FeedModel>>,
}

impl SolverModel {
    /// The options: the defaults with the values given; refused unless every tolerance is
    /// positive and finite and every limit at least one.
    pub fn options(&self) -> std::result::Result<SolverOptions, String> {
        let d = SolverOptions::default();
        let o = SolverOptions {
            extent_tolerance: self.extent_tolerance.unwrap_or(d.extent_tolerance),
            extent_reported_tolerance: self
                .extent_reported_tolerance
                .unwrap_or(d.extent_reported_tolerance),
            extent_iteration_limit: self
                .extent_iteration_limit
                .unwrap_or(d.extent_iteration_limit),
            energy_tolerance: self.energy_tolerance.unwrap_or(d.energy_tolerance),
            temperature_step_tolerance_k: self
                .temperature_step_tolerance
                .map_or(d.temperature_step_tolerance_k, |t| t.0),
            temperature_iteration_limit: self
                .temperature_iteration_limit
                .unwrap_or(d.temperature_iteration_limit),
            ..d
        };
        if o.is_valid() {
            Ok(o)
        } else {
            Err("every tolerance must be positive and finite and every limit at least 1".into())
        }
    }

    /// The recycle options: the defaults with the values given, checked as [`Self::options`].
    pub fn recycle_options(&self) -> std::result::Result<RecycleOptions, String> {
        let d = RecycleOptions::default();
        let o = RecycleOptions {
            tolerance: self.recycle_tolerance.unwrap_or(d.tolerance),
            iteration_limit: self.recycle_iterations.unwrap_or(d.iteration_limit),
            tear_streams: self
                .tear_streams
                .as_ref()
                .map_or_else(Vec::new, |n| n.0.clone()),
            wegstein_bounds: self.wegstein_bounds.unwrap_or(d.wegstein_bounds),
        };
        if o.is_valid() {
            Ok(o)
        } else {
            Err(
                "every tolerance must be positive and finite, every limit at least 1, and \
                 `wegstein-bounds` two finite numbers, lower first, below 1"
                    .into(),
            )
        }
    }
}

struct FileSeed<'a> {
    previews: &'a [Preview],
}

impl<'de> DeserializeSeed<'de> for FileSeed<'_> {
    type Value = FileModel;

    fn deserialize<D: Deserializer<'de>>(self, d: D) -> std::result::Result<FileModel, D::Error> {
        d.deserialize_map(self)
    }
}

impl<'de> Visitor<'de> for FileSeed<'_> {
    type Value = FileModel;

    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str(
            "a flowsheet with the keys title, solver, gas-model, feeds, units, targets, \
             steam-feed and energy",
        )
    }

    fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> std::result::Result<FileModel, A::Error> {
        let mut title: Option<String> = None;
        let mut feeds: Option<OrderedMap<FeedModel>> = None;
        let mut units: Option<Vec<UnitModel>> = None;
        let mut solver: Option<SolverOptions> = None;
        let mut recycle = RecycleOptions::default();
        let mut tear_guess = Vec::new();
        let mut targets: Option<Vec<TargetModel>> = None;
        let mut steam_feed: Option<String> = None;
        let mut energy: Option<super::energy::EnergyModel> = None;
        let mut gas_model: Option<GasModel> = None;
        while let Some(key) = map.next_key::<String>()? {
            match key.as_str() {
                "solver" if solver.is_none() => {
                    let model: SolverModel = map.next_value()?;
                    solver = Some(model.options().map_err(de::Error::custom)?);
                    recycle = model.recycle_options().map_err(de::Error::custom)?;
                    if let Some(guesses) = model.tear_guess {
                        tear_guess = guesses.0;
                    }
                }
                "gas-model" if gas_model.is_none() => {
                    let label: String = map.next_value()?;
                    gas_model = Some(GasModel::from_label(&label).ok_or_else(|| {
                        de::Error::custom(format!(
                            "gas-model `{label}` is not known; write one of: {}",
                            GasModel::NAMES.join(", ")
                        ))
                    })?);
                }
                "title" if title.is_none() => title = Some(map.next_value()?),
                "feeds" if feeds.is_none() => {
                    let checked: OrderedMap<Checked<FeedModel>> = map.next_value()?;
                    feeds = Some(OrderedMap(
                        checked.0.into_iter().map(|(k, v)| (k, v.0)).collect(),
                    ))
                }
                "units" if units.is_none() => {
                    units = Some(map.next_value_seed(UnitsSeed {
                        previews: self.previews,
                    })?)
                }
                "targets" if targets.is_none() => targets = Some(map.next_value()?),
                "steam-feed" if steam_feed.is_none() => steam_feed = Some(map.next_value()?),
                "energy" if energy.is_none() => energy = Some(map.next_value()?),
                "title" | "solver" | "gas-model" | "feeds" | "units" | "targets" | "steam-feed"
                | "energy" => return Err(de::Error::custom(format!("duplicate key `{key}`"))),
                other => return Err(de::Error::unknown_field(other, FILE_KEYS)),
            }
        }
        let feeds = feeds.ok_or_else(|| de::Error::missing_field("feeds"))?;
        if feeds.is_empty() {
            return Err(de::Error::custom(
                "`feeds` is empty; give at least one feed stream",
            ));
        }
        let units = units.ok_or_else(|| de::Error::missing_field("units"))?;
        let mut solver = solver.unwrap_or_default();
        if let Some(model) = gas_model {
            solver.gas_model = model;
        }
        Ok(FileModel {
            title,
            solver,
            recycle,
            tear_guess,
            feeds,
            units,
            targets: targets.unwrap_or_default(),
            steam_feed,
            energy: energy.unwrap_or_default(),
        })
    }
}

/// Take the flowsheet-level key `heats` out of a unit's entry, for a type that documents it
/// (required when its documentation gives no default); other types leave it in the entry, where
/// their reader refuses it as an unknown key.
fn take_heats(unit_type: &UnitType, entry: &mut Entry) -> std::result::Result<Vec<String>, String> {
    let Some(doc) = unit_type.keys.iter().find(|k| k.key == "heats") else {
        return Ok(Vec::new());
    };
    let Some(at) = entry.fields.iter().position(|(k, _)| k == "heats") else {
        if doc.default.is_none() {
            return Err(format!(
                "a {} needs `heats`: the name of the unit it heats, or a list of names",
                unit_type.name
            ));
        }
        return Ok(Vec::new());
    };
    let (_, value) = entry.fields.remove(at);
    let name = |v: &EntryValue| match v {
        EntryValue::Scalar(s) if !s.trim().is_empty() => Ok(s.trim().to_string()),
        _ => Err("`heats` takes a unit name or a list of unit names".to_string()),
    };
    let names = match &value {
        EntryValue::List(items) => items
            .iter()
            .map(name)
            .collect::<std::result::Result<Vec<_>, _>>()?,
        other => vec![name(other)?],
    };
    if names.is_empty() {
        return Err("`heats` is empty; name the unit(s) it heats".into());
    }
    if let Some((_, n)) = names
        .iter()
        .enumerate()
        .find(|(i, n)| names[..*i].contains(n))
    {
        return Err(format!("`heats` lists unit '{n}' twice"));
    }
    Ok(names)
}

struct UnitsSeed<'a> {
    previews: &'a [Preview],
}

impl<'de> DeserializeSeed<'de> for UnitsSeed<'_> {
    type Value = Vec<UnitModel>;

    fn deserialize<D: Deserializer<'de>>(self, d: D) -> std::result::Result<Self::Value, D::Error> {
        d.deserialize_seq(self)
    }
}

impl<'de> Visitor<'de> for UnitsSeed<'_> {
    type Value = Vec<UnitModel>;

    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("a list of units")
    }

    fn visit_seq<A: SeqAccess<'de>>(
        self,
        mut seq: A,
    ) -> std::result::Result<Self::Value, A::Error> {
        let mut units = Vec::new();
        loop {
            let preview = self.previews.get(units.len()).cloned().unwrap_or_default();
            match seq.next_element_seed(UnitSeed { preview })? {
                Some(unit) => units.push(unit),
                None => break,
            }
        }
        if units.is_empty() {
            return Err(de::Error::custom(
                "`units` is empty; give at least one unit",
            ));
        }
        Ok(units)
    }
}

struct UnitSeed {
    preview: Preview,
}

/// Reads a unit's `type` and finds it in the registry, so that an unknown type is an error at
/// the value's own line and column.
struct TypeSeed;

impl<'de> DeserializeSeed<'de> for TypeSeed {
    type Value = &'static UnitType;

    fn deserialize<D: Deserializer<'de>>(self, d: D) -> std::result::Result<Self::Value, D::Error> {
        let t = String::deserialize(d)?;
        registry::unit_type(&t).ok_or_else(|| {
            de::Error::custom(format!(
                "unknown unit type '{t}'; the types are: {} (see `syntrain unit-types`)",
                registry::names().join(", ")
            ))
        })
    }
}

impl<'de> DeserializeSeed<'de> for UnitSeed {
    type Value = UnitModel;

    fn deserialize<D: Deserializer<'de>>(self, d: D) -> std::result::Result<UnitModel, D::Error> {
        d.deserialize_map(self)
    }
}

impl<'de> Visitor<'de> for UnitSeed {
    type Value = UnitModel;

    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("a unit: a mapping with name, type, from, to and the keys of its type")
    }

    /// Name, type, from and to are read and checked here, so that their errors (an unknown
    /// type, a wrong number of inlets or outlets) carry the entry's line and column; the keys of
    /// the type are kept as plain values for the type to read.
    fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> std::result::Result<UnitModel, A::Error> {
        let mut name: Option<String> = None;
        let mut unit_type: Option<&'static UnitType> = None;
        let mut from: Option<Names> = None;
        let mut to: Option<Names> = None;
        let mut entry = Entry::default();
        while let Some(key) = map.next_key::<String>()? {
            let duplicate = match key.as_str() {
                "name" => name.is_some(),
                "type" => unit_type.is_some(),
                "from" => from.is_some(),
                "to" => to.is_some(),
                other => entry.fields.iter().any(|(k, _)| k == other),
            };
            if duplicate {
                return Err(de::Error::custom(format!("duplicate key `{key}`")));
            }
            match key.as_str() {
                "name" => name = Some(map.next_value()?),
                "type" => unit_type = Some(map.next_value_seed(TypeSeed)?),
                "from" => from = Some(map.next_value()?),
                "to" => to = Some(map.next_value()?),
                _ => {
                    let value: Value = map.next_value()?;
                    entry.fields.push((key, entry_value(value)));
                }
            }
        }
        let name = name
            .or(self.preview.name)
            .ok_or_else(|| de::Error::missing_field("name"))?;
        let unit_type = unit_type.ok_or_else(|| de::Error::missing_field("type"))?;
        let (from, to) = match unit_type.named_ports {
            Some(named) => named_ports(named, unit_type.name, from, to, &mut entry)?,
            None => (
                from.ok_or_else(|| de::Error::missing_field("from"))?.0,
                to.ok_or_else(|| de::Error::missing_field("to"))?.0,
            ),
        };
        for (ports, list, key) in [
            (&unit_type.inlets, &from, "from"),
            (&unit_type.outlets, &to, "to"),
        ] {
            if !ports.allows(list.len()) {
                let what = if key == "from" { "inlet" } else { "outlet" };
                return Err(de::Error::custom(format!(
                    "a {} takes {} {what}(s) in `{key}` ({}); {} given",
                    unit_type.name,
                    ports.count_text(),
                    ports.meaning,
                    list.len()
                )));
            }
        }
        let heats = take_heats(unit_type, &mut entry).map_err(de::Error::custom)?;
        Ok(UnitModel {
            name,
            unit_type,
            from,
            to,
            entry,
            heats,
        })
    }
}

/// "an" before a vowel, else "a" (for unit type names in messages).
fn article(word: &str) -> &'static str {
    if word.starts_with(['a', 'e', 'i', 'o', 'u']) {
        "an"
    } else {
        "a"
    }
}

/// The inlets and outlets of a unit with named ports, taken out of its entry (the first pass
/// checked them where they are written; these errors are the fallback).
fn named_ports<E: de::Error>(
    named: &NamedPorts,
    type_name: &str,
    from: Option<Names>,
    to: Option<Names>,
    entry: &mut Entry,
) -> std::result::Result<(Vec<String>, Vec<String>), E> {
    if from.is_some() || to.is_some() {
        return Err(E::custom(format!(
            "{} {type_name} names its streams by port, not in `from` and `to`: write {}",
            article(type_name),
            named.describe()
        )));
    }
    let mut take = |key: &str, required: bool| -> std::result::Result<Option<String>, E> {
        match entry.fields.iter().position(|(k, _)| k == key) {
            Some(i) => match entry.fields.remove(i).1 {
                EntryValue::Scalar(s) if !s.is_empty() => Ok(Some(s)),
                _ => Err(E::custom(format!("`{key}`: expected one stream name"))),
            },
            None if required => Err(E::custom(format!(
                "{} {type_name} needs `{key}` (one stream name); its ports are: {}",
                article(type_name),
                named.describe()
            ))),
            None => Ok(None),
        }
    };
    let mut inlets = Vec::with_capacity(named.inlets.len());
    for key in named.inlets {
        inlets.extend(take(key, true)?);
    }
    let mut outlets = Vec::with_capacity(named.outlets.len() + named.optional_outlets.len());
    for key in named.outlets {
        outlets.extend(take(key, true)?);
    }
    for key in named.optional_outlets {
        outlets.extend(take(key, false)?);
    }
    Ok((inlets, outlets))
}

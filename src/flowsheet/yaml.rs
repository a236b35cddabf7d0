//! The flowsheet file as written: serde model of the YAML (kebab-case keys, unknown keys refused
//! everywhere) and the parse that keeps file, line and column on every error.
//!
//! Each unit's keys depend on its `type`. serde's internally tagged enums buffer the entry before
//! they read it, and an error found in the buffer loses its line and column. The file is therefore
//! read in two passes: the first reads it as a plain YAML value only to learn each unit's `type`
//! and `name`; the second reads the file again with those types known in advance, so that every
//! unit entry is read straight into the struct of its type, and an unknown or misplaced key or a
//! bad value is reported at its own line and column. Paths in messages name units by name
//! (`units.reformer.outlet-temperature`) rather than by position.

use std::fmt;

use serde::de::{self, DeserializeSeed, Deserializer, IgnoredAny, MapAccess, SeqAccess, Visitor};
use serde::Deserialize;
use serde_norway::Value;

use super::checks::Checked;
use super::values::{
    Duty, FlowRate, Fraction, Names, OrderedMap, Pressure, PressureDrop, Temperature,
    TemperatureDifference,
};
use crate::error::{Error, Result};

/// The whole file as written (quantities already in SI).
#[derive(Debug, Clone)]
pub struct FileModel {
    /// Title of the flowsheet.
    pub title: Option<String>,
    /// Feeds, in file order.
    pub feeds: OrderedMap<FeedModel>,
    /// Units, in file order.
    pub units: Vec<UnitModel>,
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

/// The unit types of the file (`type:` key).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum UnitType {
    /// Adiabatic mixing of two or more streams.
    Mixer,
    /// One stream split into two or more of the same composition.
    Splitter,
    /// Heat added to reach an outlet temperature or a duty.
    Heater,
    /// Heat removed to reach an outlet temperature or a duty.
    Cooler,
    /// Steam-methane reformer at a given outlet temperature.
    Reformer,
    /// Adiabatic pre-reformer.
    Prereformer,
    /// Water-gas shift converter (adiabatic unless an outlet temperature is given).
    Shift,
    /// Adiabatic methanator.
    Methanator,
    /// Knockout drum: gas and condensate.
    Knockout,
    /// Hydrogen purifier (pressure-swing adsorption): product and tail gas.
    Purifier,
}

impl UnitType {
    /// All types, for messages.
    pub const ALL: [UnitType; 10] = [
        UnitType::Mixer,
        UnitType::Splitter,
        UnitType::Heater,
        UnitType::Cooler,
        UnitType::Reformer,
        UnitType::Prereformer,
        UnitType::Shift,
        UnitType::Methanator,
        UnitType::Knockout,
        UnitType::Purifier,
    ];

    /// The name as written in the file.
    pub fn name(self) -> &'static str {
        match self {
            UnitType::Mixer => "mixer",
            UnitType::Splitter => "splitter",
            UnitType::Heater => "heater",
            UnitType::Cooler => "cooler",
            UnitType::Reformer => "reformer",
            UnitType::Prereformer => "prereformer",
            UnitType::Shift => "shift",
            UnitType::Methanator => "methanator",
            UnitType::Knockout => "knockout",
            UnitType::Purifier => "purifier",
        }
    }

    fn from_name(name: &str) -> Option<UnitType> {
        UnitType::ALL.into_iter().find(|t| t.name() == name)
    }
}

impl fmt::Display for UnitType {
    fn fmt(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// Declare the struct of one unit type: the common keys (`name`, `type`, `from`, `to`) and the
/// type's own keys, with unknown keys refused.
macro_rules! unit_model {
    ($(#[$doc:meta])* $name:ident { $($(#[$fdoc:meta])* $field:ident : $ty:ty),* $(,)? }) => {
        $(#[$doc])*
        #[derive(Debug, Clone, Deserialize)]
        #[serde(deny_unknown_fields, rename_all = "kebab-case")]
        pub struct $name {
            /// Unit name.
            pub name: String,
            /// Unit type (checked in the first pass; kept so the key is known).
            #[serde(rename = "type")]
            pub unit_type: UnitType,
            /// Inlet stream names.
            pub from: Names,
            /// Outlet stream names.
            pub to: Names,
            $($(#[$fdoc])* #[serde(default)] pub $field: $ty,)*
        }
    };
}

unit_model!(
    /// A mixer: no keys of its own (outlet at the lowest inlet pressure).
    MixerModel {
        /// Pressure drop below the lowest inlet pressure.
        pressure_drop: Option<PressureDrop>,
    }
);

unit_model!(
    /// A splitter: the fraction or the flow of each outlet, by outlet name (one outlet may be
    /// left out and takes the rest).
    SplitterModel {
        /// Fraction of the inlet to each named outlet.
        fractions: Option<OrderedMap<Fraction>>,
        /// Molar flow to each named outlet.
        flows: Option<OrderedMap<FlowRate>>,
        /// Pressure drop.
        pressure_drop: Option<PressureDrop>,
    }
);

unit_model!(
    /// A heater or cooler: outlet temperature or duty.
    HeatExchangeModel {
        /// Outlet temperature.
        outlet_temperature: Option<Temperature>,
        /// Duty (heat added to the process stream; negative for a cooler).
        duty: Option<Duty>,
        /// Pressure drop.
        pressure_drop: Option<PressureDrop>,
    }
);

/// Approach temperatures of the reforming and shift reactions.
#[derive(Debug, Clone, Copy, Default, Deserialize)]
#[serde(deny_unknown_fields, rename_all = "kebab-case")]
pub struct ReformingApproach {
    /// Approach to equilibrium of `reforming` (CH4 + H2O = CO + 3 H2).
    pub reforming: Option<TemperatureDifference>,
    /// Approach to equilibrium of `shift` (CO + H2O = CO2 + H2).
    pub shift: Option<TemperatureDifference>,
}

/// Approach temperature of the shift reaction.
#[derive(Debug, Clone, Copy, Default, Deserialize)]
#[serde(deny_unknown_fields, rename_all = "kebab-case")]
pub struct ShiftApproach {
    /// Approach to equilibrium of `shift` (CO + H2O = CO2 + H2).
    pub shift: Option<TemperatureDifference>,
}

unit_model!(
    /// A reformer at a given outlet temperature.
    ReformerModel {
        /// Outlet temperature (required).
        outlet_temperature: Option<Temperature>,
        /// Pressure drop.
        pressure_drop: Option<PressureDrop>,
        /// Approach temperatures.
        approach: Option<ReformingApproach>,
    }
);

unit_model!(
    /// An adiabatic pre-reformer.
    PrereformerModel {
        /// Pressure drop.
        pressure_drop: Option<PressureDrop>,
        /// Approach temperatures.
        approach: Option<ReformingApproach>,
    }
);

/// Shift catalyst as written.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum ShiftCatalystModel {
    /// Iron-chromium (high-temperature shift).
    IronChromium,
    /// Copper-zinc for medium-temperature shift.
    MediumTemperatureCopper,
    /// Copper-zinc for low-temperature shift (`copper` is read as this).
    #[serde(alias = "copper")]
    LowTemperatureCopper,
}

unit_model!(
    /// A shift converter.
    ShiftModel {
        /// Outlet temperature (isothermal); adiabatic when left out.
        outlet_temperature: Option<Temperature>,
        /// Pressure drop.
        pressure_drop: Option<PressureDrop>,
        /// Approach temperature.
        approach: Option<ShiftApproach>,
        /// Catalyst (`iron-chromium`, `medium-temperature-copper`, `low-temperature-copper`;
        /// `copper` means low-temperature copper), for the temperature-limit cautions; the unit
        /// layer infers it from the inlet temperature (and says so) when left out.
        catalyst: Option<ShiftCatalystModel>,
    }
);

unit_model!(
    /// An adiabatic methanator.
    MethanatorModel {
        /// Pressure drop.
        pressure_drop: Option<PressureDrop>,
        /// Approach temperatures.
        approach: Option<ReformingApproach>,
    }
);

unit_model!(
    /// A knockout drum.
    KnockoutModel {
        /// Drum temperature; the inlet's when left out.
        temperature: Option<Temperature>,
        /// Pressure drop.
        pressure_drop: Option<PressureDrop>,
    }
);

/// What goes with the hydrogen into the purifier product: one fraction for every impurity
/// (`impurity-split: 0.001`) or one per species (`impurity-split: {N2: 0.02, CH4: 0.001}`).
#[derive(Debug, Clone)]
pub enum ImpuritySplit {
    /// One fraction for every impurity.
    All(Fraction),
    /// A fraction per species (species not named go to the tail gas).
    PerSpecies(OrderedMap<Fraction>),
}

impl<'de> Deserialize<'de> for ImpuritySplit {
    fn deserialize<D: Deserializer<'de>>(d: D) -> std::result::Result<Self, D::Error> {
        struct SplitVisitor;

        impl<'de> Visitor<'de> for SplitVisitor {
            type Value = ImpuritySplit;

            fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
                f.write_str("a fraction, or a mapping of species to fractions")
            }

            fn visit_str<E: de::Error>(self, v: &str) -> std::result::Result<Self::Value, E> {
                Fraction::deserialize(de::value::StrDeserializer::new(v)).map(ImpuritySplit::All)
            }

            fn visit_f64<E: de::Error>(self, v: f64) -> std::result::Result<Self::Value, E> {
                Fraction::deserialize(de::value::F64Deserializer::new(v)).map(ImpuritySplit::All)
            }

            fn visit_u64<E: de::Error>(self, v: u64) -> std::result::Result<Self::Value, E> {
                Fraction::deserialize(de::value::U64Deserializer::new(v)).map(ImpuritySplit::All)
            }

            fn visit_i64<E: de::Error>(self, v: i64) -> std::result::Result<Self::Value, E> {
                Fraction::deserialize(de::value::I64Deserializer::new(v)).map(ImpuritySplit::All)
            }

            fn visit_map<A: MapAccess<'de>>(
                self,
                map: A,
            ) -> std::result::Result<Self::Value, A::Error> {
                OrderedMap::deserialize(de::value::MapAccessDeserializer::new(map))
                    .map(ImpuritySplit::PerSpecies)
            }
        }

        d.deserialize_any(SplitVisitor)
    }
}

unit_model!(
    /// A hydrogen purifier: product and tail gas.
    PurifierModel {
        /// Fraction of the inlet hydrogen recovered in the product (required).
        hydrogen_recovery: Option<Fraction>,
        /// Hydrogen mole fraction of the product.
        purity: Option<Fraction>,
        /// Fraction of each impurity that goes to the product.
        impurity_split: Option<ImpuritySplit>,
        /// With a purity: how readily each impurity reaches the product, 0..1 per species
        /// (defaults in the unit's documentation, common practice).
        impurity_weights: Option<OrderedMap<Fraction>>,
        /// Tail-gas pressure (required).
        tail_gas_pressure: Option<Pressure>,
        /// Pressure drop of the product below the inlet.
        pressure_drop: Option<PressureDrop>,
    }
);

/// One unit entry as written, by type.
#[derive(Debug, Clone)]
pub enum UnitModel {
    /// `mixer`
    Mixer(MixerModel),
    /// `splitter`
    Splitter(SplitterModel),
    /// `heater` or `cooler`
    HeatExchange(HeatExchangeModel),
    /// `reformer`
    Reformer(ReformerModel),
    /// `prereformer`
    Prereformer(PrereformerModel),
    /// `shift`
    Shift(ShiftModel),
    /// `methanator`
    Methanator(MethanatorModel),
    /// `knockout`
    Knockout(KnockoutModel),
    /// `purifier`
    Purifier(PurifierModel),
}

/// The common keys of a unit entry.
pub struct Common<'a> {
    /// Unit name.
    pub name: &'a str,
    /// Unit type.
    pub unit_type: UnitType,
    /// Inlet stream names.
    pub from: &'a [String],
    /// Outlet stream names.
    pub to: &'a [String],
}

impl UnitModel {
    /// Name, type, inlets and outlets.
    pub fn common(&self) -> Common<'_> {
        macro_rules! common {
            ($m:expr) => {
                Common {
                    name: &$m.name,
                    unit_type: $m.unit_type,
                    from: &$m.from.0,
                    to: &$m.to.0,
                }
            };
        }
        match self {
            UnitModel::Mixer(m) => common!(m),
            UnitModel::Splitter(m) => common!(m),
            UnitModel::HeatExchange(m) => common!(m),
            UnitModel::Reformer(m) => common!(m),
            UnitModel::Prereformer(m) => common!(m),
            UnitModel::Shift(m) => common!(m),
            UnitModel::Methanator(m) => common!(m),
            UnitModel::Knockout(m) => common!(m),
            UnitModel::Purifier(m) => common!(m),
        }
    }
}

/// What the first pass learnt about one unit entry.
#[derive(Debug, Clone, Default)]
struct Preview {
    unit_type: Option<UnitType>,
    name: Option<String>,
}

/// Parse the text of a flowsheet file; `origin` names it in messages.
pub fn parse(origin: &str, text: &str) -> Result<FileModel> {
    let previews = preview(origin, text)?;
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
    Ok(units
        .iter()
        .map(|unit| Preview {
            unit_type: unit
                .get("type")
                .and_then(Value::as_str)
                .and_then(UnitType::from_name),
            name: unit.get("name").and_then(Value::as_str).map(str::to_string),
        })
        .collect())
}

/// A YAML error with file, line and column; the position suffix of the parser's message is
/// dropped (it is in the location) and `units[i]` in the path becomes `units.<name>`.
fn yaml_error(origin: &str, err: &serde_norway::Error, previews: &[Preview]) -> Error {
    let mut message = err.to_string();
    let mut location = String::new();
    if let Some(l) = err.location() {
        location = format!(":{}:{}", l.line(), l.column());
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
        location,
        message,
    }
}

const FILE_KEYS: &[&str] = &["title", "feeds", "units"];

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
        f.write_str("a flowsheet with the keys title, feeds and units")
    }

    fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> std::result::Result<FileModel, A::Error> {
        let mut title: Option<String> = None;
        let mut feeds: Option<OrderedMap<FeedModel>> = None;
        let mut units: Option<Vec<UnitModel>> = None;
        while let Some(key) = map.next_key::<String>()? {
            match key.as_str() {
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
                "title" | "feeds" | "units" => {
                    return Err(de::Error::custom(format!("duplicate key `{key}`")))
                }
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
        Ok(FileModel {
            title,
            feeds,
            units,
        })
    }
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

/// Reads only `type` of an entry whose type the first pass could not read, so that the parser
/// gives its own message (unknown variant) at the value's position.
struct TypeOnly;

impl<'de> Visitor<'de> for TypeOnly {
    type Value = ();

    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("a unit: a mapping with name, type, from, to and the keys of its type")
    }

    fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> std::result::Result<(), A::Error> {
        let mut seen = false;
        while let Some(key) = map.next_key::<String>()? {
            if key == "type" {
                map.next_value::<UnitType>()?;
                seen = true;
            } else {
                map.next_value::<IgnoredAny>()?;
            }
        }
        if !seen {
            return Err(de::Error::missing_field("type"));
        }
        Ok(())
    }
}

impl<'de> DeserializeSeed<'de> for UnitSeed {
    type Value = UnitModel;

    fn deserialize<D: Deserializer<'de>>(self, d: D) -> std::result::Result<UnitModel, D::Error> {
        let unit_type = match self.preview.unit_type {
            Some(t) => t,
            None => {
                d.deserialize_map(TypeOnly)?;
                return Err(de::Error::custom(
                    "the unit's `type` could not be read; give one of mixer, splitter, heater, \
                     cooler, reformer, prereformer, shift, methanator, knockout, purifier",
                ));
            }
        };
        Ok(match unit_type {
            UnitType::Mixer => UnitModel::Mixer(Checked::deserialize(d)?.0),
            UnitType::Splitter => UnitModel::Splitter(Checked::deserialize(d)?.0),
            UnitType::Heater | UnitType::Cooler => {
                UnitModel::HeatExchange(Checked::deserialize(d)?.0)
            }
            UnitType::Reformer => UnitModel::Reformer(Checked::deserialize(d)?.0),
            UnitType::Prereformer => UnitModel::Prereformer(Checked::deserialize(d)?.0),
            UnitType::Shift => UnitModel::Shift(Checked::deserialize(d)?.0),
            UnitType::Methanator => UnitModel::Methanator(Checked::deserialize(d)?.0),
            UnitType::Knockout => UnitModel::Knockout(Checked::deserialize(d)?.0),
            UnitType::Purifier => UnitModel::Purifier(Checked::deserialize(d)?.0),
        })
    }
}

//! Unit entries as written -> the unit layer's specifications ([`UnitSpec`]) in SI, with the
//! checks that need more than one key (outlet temperature or duty, purity or impurity split,
//! the number of inlets and outlets of each type), and the unit prepared once for solving.

use super::checks::check_ports;
use super::values::{FlowRate, Fraction, OrderedMap};
use super::yaml::{
    Common, ImpuritySplit, ReformingApproach, ShiftApproach, ShiftCatalystModel, UnitModel,
    UnitType,
};
use crate::error::{Error, Result};
use crate::quantity::Flow;
use crate::thermo::SpeciesDb;
use crate::units::{
    KnockoutSpec, MethanatorSpec, MixerSpec, PreparedUnit, PrereformerSpec, PurifierProduct,
    PurifierSpec, ReformerSpec, ShiftCatalyst, ShiftSpec, Split, SplitterSpec, ThermalSpec,
    ThermalTarget, UnitSpec,
};

/// A unit of a checked flowsheet: its connections, its spec in SI and the prepared unit.
#[derive(Debug, Clone)]
pub struct FlowsheetUnit {
    /// Unit name.
    pub name: String,
    /// Unit type as written.
    pub unit_type: UnitType,
    /// Inlet stream names.
    pub inlets: Vec<String>,
    /// Outlet stream names (in the order of the unit's outlets).
    pub outlets: Vec<String>,
    /// The specification in SI.
    pub spec: UnitSpec,
    /// The unit with its spec checked and its equilibrium stage built, ready to solve.
    pub prepared: PreparedUnit,
}

/// Convert a unit entry, check its connections and prepare it.
pub fn convert(db: &SpeciesDb, model: &UnitModel) -> Result<FlowsheetUnit> {
    let common = model.common();
    check_ports(common.unit_type, common.from, common.to)
        .map_err(|reason| spec_error(common.name, "from, to", reason))?;
    let spec = unit_spec(db, &common, model)?;
    let prepared = spec.prepare(db, common.name)?;
    Ok(FlowsheetUnit {
        name: common.name.to_string(),
        unit_type: common.unit_type,
        inlets: common.from.to_vec(),
        outlets: common.to.to_vec(),
        spec,
        prepared,
    })
}

fn spec_error(unit: &str, field: &str, reason: impl Into<String>) -> Error {
    Error::UnitSpec {
        unit: unit.to_string(),
        field: field.to_string(),
        reason: reason.into(),
    }
}

fn drop_pa(drop: &Option<super::values::PressureDrop>) -> f64 {
    drop.map_or(0.0, |d| d.0)
}

fn reforming_approaches(approach: &Option<ReformingApproach>) -> Vec<(String, f64)> {
    let a = approach.unwrap_or_default();
    let mut out = Vec::new();
    if let Some(r) = a.reforming {
        out.push(("reforming".to_string(), r.0));
    }
    if let Some(s) = a.shift {
        out.push(("shift".to_string(), s.0));
    }
    out
}

fn shift_approaches(approach: &Option<ShiftApproach>) -> Vec<(String, f64)> {
    approach
        .and_then(|a| a.shift)
        .map(|s| vec![("shift".to_string(), s.0)])
        .unwrap_or_default()
}

fn unit_spec(db: &SpeciesDb, common: &Common<'_>, model: &UnitModel) -> Result<UnitSpec> {
    let name = common.name;
    Ok(match model {
        UnitModel::Mixer(m) => UnitSpec::Mixer(MixerSpec {
            pressure_drop_pa: drop_pa(&m.pressure_drop),
        }),
        UnitModel::Splitter(m) => UnitSpec::Splitter(SplitterSpec {
            split: split(name, common.to, &m.fractions, &m.flows)?,
            pressure_drop_pa: drop_pa(&m.pressure_drop),
        }),
        UnitModel::HeatExchange(m) => {
            let target = match (m.outlet_temperature, m.duty) {
                (Some(t), None) => ThermalTarget::OutletTemperature(t.0),
                (None, Some(q)) => ThermalTarget::Duty(q.0),
                (Some(_), Some(_)) => {
                    return Err(spec_error(
                        name,
                        "outlet-temperature, duty",
                        "give either `outlet-temperature` or `duty`, not both",
                    ))
                }
                (None, None) => {
                    return Err(spec_error(
                        name,
                        "outlet-temperature",
                        format!(
                            "a {} needs `outlet-temperature` or `duty`",
                            common.unit_type
                        ),
                    ))
                }
            };
            let spec = ThermalSpec {
                target,
                pressure_drop_pa: drop_pa(&m.pressure_drop),
            };
            match common.unit_type {
                UnitType::Cooler => UnitSpec::Cooler(spec),
                _ => UnitSpec::Heater(spec),
            }
        }
        UnitModel::Reformer(m) => {
            let t = m.outlet_temperature.ok_or_else(|| {
                spec_error(
                    name,
                    "outlet-temperature",
                    "a reformer needs `outlet-temperature` (e.g. 865 degC)",
                )
            })?;
            UnitSpec::Reformer(ReformerSpec {
                outlet_temperature_k: t.0,
                pressure_drop_pa: drop_pa(&m.pressure_drop),
                approaches: reforming_approaches(&m.approach),
            })
        }
        UnitModel::Prereformer(m) => UnitSpec::Prereformer(PrereformerSpec {
            pressure_drop_pa: drop_pa(&m.pressure_drop),
            approaches: reforming_approaches(&m.approach),
        }),
        UnitModel::Shift(m) => UnitSpec::Shift(ShiftSpec {
            outlet_temperature_k: m.outlet_temperature.map(|t| t.0),
            pressure_drop_pa: drop_pa(&m.pressure_drop),
            approaches: shift_approaches(&m.approach),
            catalyst: m.catalyst.map(|c| match c {
                ShiftCatalystModel::IronChromium => ShiftCatalyst::IronChromium,
                ShiftCatalystModel::MediumTemperatureCopper => {
                    ShiftCatalyst::MediumTemperatureCopper
                }
                ShiftCatalystModel::LowTemperatureCopper => ShiftCatalyst::LowTemperatureCopper,
            }),
        }),
        UnitModel::Methanator(m) => UnitSpec::Methanator(MethanatorSpec {
            pressure_drop_pa: drop_pa(&m.pressure_drop),
            approaches: reforming_approaches(&m.approach),
        }),
        UnitModel::Knockout(m) => UnitSpec::Knockout(KnockoutSpec {
            temperature_k: m.temperature.map(|t| t.0),
            pressure_drop_pa: drop_pa(&m.pressure_drop),
        }),
        UnitModel::Purifier(m) => {
            let recovery = m.hydrogen_recovery.ok_or_else(|| {
                spec_error(
                    name,
                    "hydrogen-recovery",
                    "a purifier needs `hydrogen-recovery` (e.g. 0.88)",
                )
            })?;
            let tail = m.tail_gas_pressure.ok_or_else(|| {
                spec_error(
                    name,
                    "tail-gas-pressure",
                    "a purifier needs `tail-gas-pressure` (e.g. 1.3 bar)",
                )
            })?;
            let product = match (&m.purity, &m.impurity_split) {
                (Some(x), None) => PurifierProduct::Purity(x.0),
                (None, Some(split)) => PurifierProduct::ImpuritySplit(impurity_split(db, split)),
                (Some(_), Some(_)) => {
                    return Err(spec_error(
                        name,
                        "purity, impurity-split",
                        "give either the product `purity` or the `impurity-split`, not both",
                    ))
                }
                (None, None) => {
                    return Err(spec_error(
                        name,
                        "purity",
                        "a purifier needs the product `purity` (e.g. 0.999) or the \
                         `impurity-split`",
                    ))
                }
            };
            UnitSpec::Purifier(PurifierSpec {
                hydrogen_recovery: recovery.0,
                product,
                pressure_drop_pa: drop_pa(&m.pressure_drop),
                tail_gas_pressure_pa: tail.0,
                impurity_weights: m
                    .impurity_weights
                    .as_ref()
                    .map(|w| w.iter().map(|(k, v)| (k.clone(), v.0)).collect())
                    .unwrap_or_default(),
            })
        }
    })
}

/// One fraction for all impurities becomes one entry per database species other than H2.
fn impurity_split(db: &SpeciesDb, split: &ImpuritySplit) -> Vec<(String, f64)> {
    match split {
        ImpuritySplit::All(f) => db
            .names()
            .into_iter()
            .filter(|n| *n != "H2")
            .map(|n| (n.to_string(), f.0))
            .collect(),
        ImpuritySplit::PerSpecies(map) => map.iter().map(|(k, v)| (k.clone(), v.0)).collect(),
    }
}

/// The splitter's fractions or flows, keyed by outlet name, in outlet order (`None` for the
/// one outlet that is left out and takes the rest). The names were checked while parsing.
fn split(
    name: &str,
    outlets: &[String],
    fractions: &Option<OrderedMap<Fraction>>,
    flows: &Option<OrderedMap<FlowRate>>,
) -> Result<Split> {
    match (fractions, flows) {
        (Some(f), None) => Ok(Split::Fractions(
            outlets.iter().map(|o| entry(f, o).map(|x| x.0)).collect(),
        )),
        (None, Some(f)) => {
            let mut out = Vec::with_capacity(outlets.len());
            for o in outlets {
                out.push(match entry(f, o) {
                    None => None,
                    Some(FlowRate(Flow::Molar(n))) => Some(n),
                    Some(FlowRate(Flow::Mass(_))) => {
                        return Err(spec_error(name, &format!("flows.{o}"), "give a molar flow"))
                    }
                });
            }
            Ok(Split::Flows(out))
        }
        _ => Err(spec_error(
            name,
            "fractions, flows",
            "give either `fractions` or `flows` per outlet",
        )),
    }
}

/// The entry of an outlet.
fn entry<V: Copy>(map: &OrderedMap<V>, outlet: &str) -> Option<V> {
    map.iter().find(|(k, _)| k == outlet).map(|(_, v)| *v)
}

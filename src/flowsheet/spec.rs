//! Unit entries -> built units: each entry is read by its own type from the registry (its keys,
//! values and the checks across them), and every numeric input it has is registered in the
//! flowsheet's parameter table under its input path (`units.hts.approach.shift`).

use std::sync::Arc;

use super::yaml::UnitModel;
use crate::error::Result;
use crate::thermo::SpeciesDb;
use crate::units::unit::{BuildInput, ParamTable, Unit, UnitType};

/// A unit of a compiled flowsheet: its connections and the built unit.
#[derive(Debug, Clone)]
pub struct FlowsheetUnit {
    /// Unit name.
    pub name: String,
    /// Unit type, from the registry.
    pub unit_type: &'static UnitType,
    /// Inlet stream names.
    pub inlets: Vec<String>,
    /// Outlet stream names (in the order of the unit's outlets).
    pub outlets: Vec<String>,
    /// The built unit.
    pub(crate) unit: Arc<dyn Unit>,
}

/// Build a unit from its entry, registering its numeric inputs.
pub fn build(db: &SpeciesDb, model: &UnitModel, params: &mut ParamTable) -> Result<FlowsheetUnit> {
    let mut input = BuildInput {
        db,
        name: &model.name,
        unit_type: model.unit_type,
        outlets: &model.to,
        inlets: &model.from,
        entry: &model.entry,
        params,
    };
    let unit = (model.unit_type.build)(&mut input)?;
    Ok(FlowsheetUnit {
        name: model.name.clone(),
        unit_type: model.unit_type,
        inlets: model.from.clone(),
        outlets: model.to.clone(),
        unit: Arc::from(unit),
    })
}

//! Unit operations: each turns its inlet streams and its specification into outlet streams, a
//! duty (heat added to the process stream; negative means removed), key figures and warnings.
//!
//! Units know nothing of YAML or the command line: their specifications arrive in SI units
//! (K, Pa, mol/s, W) from the flowsheet layer.

//!
//! Use: build a [`UnitSpec`], [`UnitSpec::prepare`] it once (this checks the spec and builds any
//! equilibrium stage), then [`PreparedUnit::solve`] it as often as needed, optionally warm-started
//! from the previous [`UnitResult`]. [`solve_unit`] does both in one call.
//!
//! | type | inlets | outlets | method |
//! |---|---|---|---|
//! | `mixer` | 1 or more | 1 | adiabatic, Newton on T |
//! | `splitter` | 1 | 2 or more | fractions or flows |
//! | `heater`, `cooler` | 1 | 1 | outlet T or duty (Newton on T) |
//! | `reformer` | 1 | 1 | C2+ reformed, then reforming + shift equilibrium at outlet T |
//! | `prereformer` | 1 | 1 | adiabatic; C2+ reformed, reforming + shift equilibrium |
//! | `shift` | 1 | 1 | shift equilibrium, adiabatic or at outlet T |
//! | `methanator` | 1 | 1 | adiabatic; reforming backward + shift equilibrium |
//! | `knockout` | 1 | 2 (gas, condensate) | Raoult's law, IAPWS-IF97 saturation |
//! | `purifier` | 1 | 2 (product, tail gas) | hydrogen recovery + purity or split |

mod chemistry;
mod common;
pub mod knockout;
pub mod methanator;
pub mod mixer;
pub mod prereformer;
pub mod purifier;
pub mod reformer;
pub mod shift;
pub mod splitter;
pub mod stream;
#[cfg(test)]
mod test_support;
pub mod thermal;

pub use knockout::{Knockout, KnockoutSpec};
pub use methanator::{Methanator, MethanatorSpec};
pub use mixer::{Mixer, MixerSpec};
pub use prereformer::{Prereformer, PrereformerSpec};
pub use purifier::{Purifier, PurifierProduct, PurifierSpec};
pub use reformer::{Reformer, ReformerSpec};
pub use shift::{Shift, ShiftCatalyst, ShiftSpec};
pub use splitter::{Split, Splitter, SplitterSpec};
pub use stream::{Stream, StreamPhase};
pub use thermal::{Thermal, ThermalKind, ThermalSpec, ThermalTarget};

use crate::equilibrium::StageResult;
use crate::error::Result;
use crate::thermo::SpeciesDb;

pub use crate::diagnostics::{FigureKind, Warning};

/// One key figure of a unit ("methane slip (dry)", "CO conversion", "temperature rise").
#[derive(Debug, Clone, PartialEq)]
pub struct Figure {
    /// Stable machine key, kebab-case ("methane-slip-dry").
    pub key: &'static str,
    /// Label for reports ("methane slip, dry").
    pub label: &'static str,
    /// Value in SI (fractions as fractions, temperatures in K, flows in mol/s).
    pub value: f64,
    /// How to read and convert it.
    pub kind: FigureKind,
}

/// What a unit produced.
#[derive(Debug, Clone)]
pub struct UnitResult {
    /// Outlet streams, in the order of the unit's `to` list.
    pub outlets: Vec<Stream>,
    /// Heat added to the process streams, W (negative: removed).
    pub duty_w: f64,
    /// Approach temperature used per reaction, K (empty for units without equilibrium).
    pub approaches: Vec<(String, f64)>,
    /// Key figures for the unit table and summary.
    pub figures: Vec<Figure>,
    /// The equilibrium stage's own result (converged, iterations, residuals), where there is one.
    pub equilibrium: Option<StageResult>,
    /// Cautions from common practice (catalyst temperature limits, dew point, carbon), as data.
    pub warnings: Vec<Warning>,
}

/// The specification of one unit, by type.
#[derive(Debug, Clone, PartialEq)]
pub enum UnitSpec {
    /// Adiabatic mixer.
    Mixer(MixerSpec),
    /// Stream splitter.
    Splitter(SplitterSpec),
    /// Heater (outlet temperature or duty).
    Heater(ThermalSpec),
    /// Cooler (outlet temperature or duty), no condensation.
    Cooler(ThermalSpec),
    /// Steam reformer at a fixed outlet temperature.
    Reformer(ReformerSpec),
    /// Adiabatic pre-reformer.
    Prereformer(PrereformerSpec),
    /// Shift converter (HTS, MTS, LTS).
    Shift(ShiftSpec),
    /// Adiabatic methanator.
    Methanator(MethanatorSpec),
    /// Knockout drum (condenses water).
    Knockout(KnockoutSpec),
    /// Hydrogen purifier (e.g. pressure-swing adsorption).
    Purifier(PurifierSpec),
}

impl UnitSpec {
    /// The unit's type name as written in flowsheets (`reformer`, `shift`, ...).
    pub fn type_name(&self) -> &'static str {
        match self {
            UnitSpec::Mixer(_) => "mixer",
            UnitSpec::Splitter(_) => "splitter",
            UnitSpec::Heater(_) => "heater",
            UnitSpec::Cooler(_) => "cooler",
            UnitSpec::Reformer(_) => "reformer",
            UnitSpec::Prereformer(_) => "prereformer",
            UnitSpec::Shift(_) => "shift",
            UnitSpec::Methanator(_) => "methanator",
            UnitSpec::Knockout(_) => "knockout",
            UnitSpec::Purifier(_) => "purifier",
        }
    }

    /// Allowed number of inlets: (least, most); `None` for no upper limit (the mixer).
    pub fn inlet_count(&self) -> (usize, Option<usize>) {
        match self {
            UnitSpec::Mixer(_) => (1, None),
            _ => (1, Some(1)),
        }
    }

    /// Number of outlets, in the order of [`UnitResult::outlets`]: a splitter has one per split
    /// entry; a knockout [gas, condensate]; a purifier [product, tail gas]; the others one.
    pub fn outlet_count(&self) -> usize {
        match self {
            UnitSpec::Splitter(s) => match &s.split {
                Split::Fractions(v) | Split::Flows(v) => v.len(),
            },
            UnitSpec::Knockout(_) | UnitSpec::Purifier(_) => 2,
            _ => 1,
        }
    }

    /// True for units with an equilibrium stage (their results carry `equilibrium`).
    pub fn has_equilibrium(&self) -> bool {
        matches!(
            self,
            UnitSpec::Reformer(_)
                | UnitSpec::Prereformer(_)
                | UnitSpec::Shift(_)
                | UnitSpec::Methanator(_)
        )
    }

    /// Check the spec and prepare the unit (equilibrium stages built once) under `unit_name`.
    pub fn prepare(&self, db: &SpeciesDb, unit_name: &str) -> Result<PreparedUnit> {
        let n = unit_name;
        let core = match self {
            UnitSpec::Mixer(s) => Core::Mixer(Mixer::new(db, n, s)?),
            UnitSpec::Splitter(s) => Core::Splitter(Splitter::new(n, s)?),
            UnitSpec::Heater(s) => Core::Thermal(Thermal::new(db, n, ThermalKind::Heater, s)?),
            UnitSpec::Cooler(s) => Core::Thermal(Thermal::new(db, n, ThermalKind::Cooler, s)?),
            UnitSpec::Reformer(s) => Core::Reformer(Box::new(Reformer::new(db, n, s)?)),
            UnitSpec::Prereformer(s) => Core::Prereformer(Box::new(Prereformer::new(db, n, s)?)),
            UnitSpec::Shift(s) => Core::Shift(Box::new(Shift::new(db, n, s)?)),
            UnitSpec::Methanator(s) => Core::Methanator(Box::new(Methanator::new(db, n, s)?)),
            UnitSpec::Knockout(s) => Core::Knockout(Knockout::new(db, n, s)?),
            UnitSpec::Purifier(s) => Core::Purifier(Purifier::new(db, n, s)?),
        };
        Ok(PreparedUnit {
            name: unit_name.to_string(),
            spec: self.clone(),
            core,
        })
    }
}

/// A unit with its spec checked and its equilibrium stage (if any) built: solve it many times.
#[derive(Debug, Clone)]
pub struct PreparedUnit {
    name: String,
    spec: UnitSpec,
    core: Core,
}

#[derive(Debug, Clone)]
enum Core {
    Mixer(Mixer),
    Splitter(Splitter),
    Thermal(Thermal),
    Reformer(Box<Reformer>),
    Prereformer(Box<Prereformer>),
    Shift(Box<Shift>),
    Methanator(Box<Methanator>),
    Knockout(Knockout),
    Purifier(Purifier),
}

impl PreparedUnit {
    /// The unit's name.
    pub fn name(&self) -> &str {
        &self.name
    }

    /// The spec it was prepared from.
    pub fn spec(&self) -> &UnitSpec {
        &self.spec
    }

    /// Solve the unit for these inlets. `warm_start`: a previous result of this unit, whose
    /// equilibrium extents start the stage's Newton iteration (ignored for units without a stage
    /// or when the extents do not fit the new inlet).
    pub fn solve(
        &self,
        db: &SpeciesDb,
        inlets: &[&Stream],
        warm_start: Option<&UnitResult>,
    ) -> Result<UnitResult> {
        let guess = warm_start
            .and_then(|r| r.equilibrium.as_ref())
            .map(|e| e.extents.as_slice());
        match &self.core {
            Core::Mixer(u) => u.solve(db, inlets),
            Core::Splitter(u) => u.solve(db, inlets),
            Core::Thermal(u) => u.solve(db, inlets),
            Core::Reformer(u) => u.solve(db, inlets, guess),
            Core::Prereformer(u) => u.solve(db, inlets, guess),
            Core::Shift(u) => u.solve(db, inlets, guess),
            Core::Methanator(u) => u.solve(db, inlets, guess),
            Core::Knockout(u) => u.solve(db, inlets),
            Core::Purifier(u) => u.solve(db, inlets),
        }
    }
}

/// Prepare and solve a unit in one call (a study solving many times should keep the
/// [`PreparedUnit`] from [`UnitSpec::prepare`] instead).
pub fn solve_unit(
    db: &SpeciesDb,
    unit_name: &str,
    spec: &UnitSpec,
    inlets: &[&Stream],
) -> Result<UnitResult> {
    spec.prepare(db, unit_name)?.solve(db, inlets, None)
}

#[cfg(test)]
#[path = "train_tests.rs"]
mod train_tests;

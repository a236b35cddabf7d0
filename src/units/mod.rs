//! Unit operations: each turns its inlet streams and its specification into outlet streams, a
//! duty (heat added to the process stream; negative means removed), key figures and warnings.
//!
//! Units know nothing of YAML or the command line: a unit type is one file here that owns its
//! keys (documented for `syntrain unit-types`), its ports, its numeric inputs, its checks, its
//! solve, its figures and its warnings, and implements the small trait [`UnitKind`]
//! ([`unit`]); the one list of types is [`registry`]. A flowsheet builds each unit from its
//! entry once and solves it as often as needed, with new input values where a study changes
//! them. A unit can also be used on its own: `Reformer::new(db, name, &spec)?.solve(...)`.

pub mod autothermal;
pub mod boiler;
mod chemistry;
pub mod combustion;
mod common;
pub mod exchanger;
pub mod furnace;
pub mod knockout;
pub mod limits;
pub mod methanator;
pub mod mixer;
pub mod prereformer;
pub mod purifier;
mod reactor;
pub mod reformer;
pub mod registry;
pub mod separator;
pub mod shift;
pub mod splitter;
pub mod stream;
#[cfg(test)]
mod test_support;
pub mod thermal;
pub mod unit;

pub use exchanger::{Exchanger, ExchangerSpec, ExchangerTarget};
pub use furnace::{Furnace, FurnaceSpec};
pub use knockout::{Knockout, KnockoutSpec};
pub use limits::OperatingLimits;
pub use methanator::{Methanator, MethanatorSpec};
pub use mixer::{Mixer, MixerSpec};
pub use prereformer::{Prereformer, PrereformerSpec};
pub use purifier::{Purifier, PurifierProduct, PurifierSpec};
pub use reformer::{Reformer, ReformerSpec};
pub use separator::{Separator, SeparatorSpec};
pub use shift::{Shift, ShiftCatalyst, ShiftSpec};
pub use splitter::{Split, Splitter, SplitterSpec};
pub use stream::{Stream, StreamPhase};
pub use thermal::{Cooler, Heater, Thermal, ThermalKind, ThermalSpec, ThermalTarget};
pub use unit::{Unit, UnitKind, UnitType};

use crate::equilibrium::StageResult;

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
#[derive(Debug, Clone, Default)]
pub struct UnitResult {
    /// Outlet streams, in the order of the unit's `to` list.
    pub outlets: Vec<Stream>,
    /// Heat added to the process streams, W (negative: removed).
    pub duty_w: f64,
    /// Approach temperature used per reaction, K (empty for units without equilibrium).
    pub approaches: Vec<(&'static str, f64)>,
    /// Key figures for the unit table and summary.
    pub figures: Vec<Figure>,
    /// The equilibrium stage's own result (converged, iterations, residuals), where there is one.
    pub equilibrium: Option<StageResult>,
    /// Cautions from common practice (catalyst temperature limits, dew point, carbon), as data.
    pub warnings: Vec<Warning>,
    /// Inlets whose flow the unit sets (the make-up fuel of a furnace, the feed water of a
    /// boiler): (inlet position, total molar flow in mol/s). The unit solves with that flow, and
    /// the flowsheet rescales the inlet stream to it (composition, temperature and pressure
    /// kept), so that every balance sees the flow used. Such an inlet must be a feed.
    pub inlet_flows: Vec<(usize, f64)>,
}

impl UnitResult {
    /// Start a new solve in this result: `n` outlets whose flow vectors hold `species` entries,
    /// every list emptied, buffers kept (no heap allocation once they have their size).
    pub fn reset(&mut self, n: usize, species: usize) {
        self.outlets.truncate(n);
        while self.outlets.len() < n {
            self.outlets
                .push(Stream::vapour(vec![0.0; species], 0.0, 0.0));
        }
        for s in &mut self.outlets {
            s.flows.clear();
            s.flows.resize(species, 0.0);
        }
        self.duty_w = 0.0;
        self.approaches.clear();
        self.figures.clear();
        self.warnings.clear();
        self.inlet_flows.clear();
    }

    /// Set outlet `k` (its flow vector reused).
    pub fn set_outlet(
        &mut self,
        k: usize,
        flows: &[f64],
        temperature_k: f64,
        pressure_pa: f64,
        phase: StreamPhase,
    ) {
        let s = &mut self.outlets[k];
        s.flows.clear();
        s.flows.extend_from_slice(flows);
        s.temperature_k = temperature_k;
        s.pressure_pa = pressure_pa;
        s.phase = phase;
    }
}

#[cfg(test)]
#[path = "train_tests.rs"]
mod train_tests;

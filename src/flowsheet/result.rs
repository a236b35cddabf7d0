//! The solved flowsheet: every stream, every unit, the plant summary and the balance checks.
//! This is what reports render; it holds SI values only.

use crate::units::{Stream, UnitResult};

/// Where a stream comes from.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum StreamSource {
    /// A feed of the flowsheet file.
    Feed,
    /// An outlet of the named unit.
    Unit(String),
}

/// One solved stream.
#[derive(Debug, Clone)]
pub struct SolvedStream {
    /// Stream name as in the file.
    pub name: String,
    /// Its state.
    pub stream: Stream,
    /// The feed or unit that makes it.
    pub source: StreamSource,
    /// The unit that uses it; `None` for a product.
    pub destination: Option<String>,
}

/// One solved unit.
#[derive(Debug, Clone)]
pub struct SolvedUnit {
    /// Unit name as in the file.
    pub name: String,
    /// Unit type (`reformer`, `shift`, ...).
    pub type_name: String,
    /// Inlet stream names.
    pub inlets: Vec<String>,
    /// Outlet stream names, in the order of the unit's outlets.
    pub outlets: Vec<String>,
    /// What the unit computed.
    pub result: UnitResult,
}

/// Plant figures an engineer looks at first.
#[derive(Debug, Clone, Default)]
pub struct Summary {
    /// Hydrogen in the purifier product(s), mol/s (None without a purifier).
    pub hydrogen_product_mol_s: Option<f64>,
    /// Hydrogen made, mol/s: the hydrogen in the purifier product(s) where the train has a
    /// purifier; otherwise the hydrogen leaving in the train's products (streams no unit uses)
    /// less the hydrogen fed. None only when the species data hold no H2.
    pub hydrogen_made_mol_s: Option<f64>,
    /// Hydrogen made per mole of organic carbon fed in all feeds (every gas carbon but CO and
    /// CO2, as in the steam-to-carbon ratio), mol/mol; None without organic carbon fed.
    pub hydrogen_per_carbon_fed: Option<f64>,
    /// Methane slip, dry mole fraction, at each reformer outlet: (unit, fraction).
    pub methane_slip_dry: Vec<(String, f64)>,
    /// CO slip, dry mole fraction, at each shift outlet: (unit, fraction).
    pub co_slip_dry: Vec<(String, f64)>,
    /// Steam-to-carbon ratio at each reformer and pre-reformer inlet: (unit, ratio).
    pub steam_to_carbon: Vec<(String, f64)>,
    /// Carbon margin at each reformer and pre-reformer: the smallest 1 - a of the carbon
    /// activities checked (figure `carbon-margin`; below zero, carbon formation is possible):
    /// (unit, margin).
    pub carbon_margin: Vec<(String, f64)>,
    /// Sum of positive duties, W.
    pub heating_duty_w: f64,
    /// Sum of negative duties, W (a negative number).
    pub cooling_duty_w: f64,
    /// LHV of the feeds that go to process units, W ([`super::energy`]).
    pub feed_lhv_w: f64,
    /// LHV of the feeds burnt in fired units (make-up fuel), W.
    pub fuel_lhv_w: f64,
    /// Steam leaving the plant less steam taken in, kg/s.
    pub steam_export_kg_s: f64,
    /// The steam credit used, J/kg (`energy.steam-credit`).
    pub steam_credit_j_per_kg: f64,
    /// (feed LHV + fuel LHV - steam export x steam credit) per Nm3 of hydrogen made, J/Nm3;
    /// None without hydrogen made.
    pub net_specific_energy_j_per_nm3: Option<f64>,
    /// Feed LHV per Nm3 of hydrogen made, J/Nm3.
    pub feed_specific_energy_j_per_nm3: Option<f64>,
    /// Fuel LHV per Nm3 of hydrogen made, J/Nm3.
    pub fuel_specific_energy_j_per_nm3: Option<f64>,
}

/// The whole solved flowsheet.
#[derive(Debug, Clone)]
pub struct FlowsheetResult {
    /// Title from the file.
    pub title: String,
    /// Streams: feeds first in file order, then unit outlets in solve order.
    pub streams: Vec<SolvedStream>,
    /// Units in solve order.
    pub units: Vec<SolvedUnit>,
    /// Plant summary.
    pub summary: Summary,
    /// Warnings of all units (each names its unit) and of the flowsheet, as data.
    pub warnings: Vec<crate::diagnostics::Warning>,
    /// Largest relative element-balance error, products vs feeds (per element, relative to
    /// its feed amount).
    pub element_balance_residual: f64,
    /// |H products - H feeds - sum of duties| relative to the feed enthalpy magnitude (the sum of
    /// |H| over the feeds, formation enthalpies included) or the sum of |duty|, whichever is
    /// larger.
    pub energy_balance_residual: f64,
    /// The design targets this solve met (file targets first, then those added in code); empty
    /// without targets.
    pub targets: Vec<super::targets::TargetOutcome>,
    /// How the recycles converged; `None` for a flowsheet without cycles.
    pub recycle: Option<RecycleRecord>,
}

/// How a flowsheet's recycle iteration ended ([`super::recycle`]).
#[derive(Debug, Clone, PartialEq)]
pub struct RecycleRecord {
    /// The tear streams, in the order they were named or chosen.
    pub tear_streams: Vec<String>,
    /// Iterations taken (each solves every unit on a cycle once).
    pub iterations: usize,
    /// Largest scaled change of the tears in the last iteration (dimensionless).
    pub residual: f64,
    /// Why the iteration stopped.
    pub termination: RecycleTermination,
}

/// Why a recycle iteration stopped.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum RecycleTermination {
    /// Not solved yet (a fresh workspace).
    #[default]
    NotSolved,
    /// Every tear changed by no more than the tolerance.
    Converged,
    /// The iteration limit was reached first (a solve reports this as an error).
    IterationLimit,
}

impl RecycleTermination {
    /// True for [`RecycleTermination::Converged`].
    pub fn is_converged(self) -> bool {
        self == RecycleTermination::Converged
    }
}

impl std::fmt::Display for RecycleTermination {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(match self {
            RecycleTermination::NotSolved => "not solved",
            RecycleTermination::Converged => "converged",
            RecycleTermination::IterationLimit => "iteration limit reached",
        })
    }
}

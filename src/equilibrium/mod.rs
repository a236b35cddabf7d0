//! The equilibrium stage: extents of independent reactions at their approach temperatures, with
//! the energy balance closed at a fixed outlet temperature, adiabatically, or at a fixed duty.
//!
//! [`extents`] is the numerical core (convex extent formulation, Newton with a positivity-keeping
//! line search); [`stage`] adds the species data, approach temperatures and energy modes;
//! [`root`] is the safeguarded Newton search on one unknown that every temperature search uses
//! (the stage's, and the energy balances of the units on a fixed composition); [`approach`] reads
//! approach temperatures back from compositions; [`options`] holds the tolerances and limits of
//! a solve and the reasons a solve stops.

pub mod approach;
mod basis;
pub mod extents;
pub mod linalg;
pub mod options;
pub mod root;
mod small;
pub mod stage;

pub use approach::{approach_from_quotient, approach_sign, equilibrium_temperature, ln_quotient};
pub use extents::{ExtentSolution, ExtentSystem};
pub use options::{SolverOptions, StageTermination};
pub use root::{Root, RootOptions, Termination};
pub use stage::{
    Direction, EnergyMode, EquilibriumStage, SolveSettings, StageInlet, StageReaction, StageResult,
    StageWorkspace,
};

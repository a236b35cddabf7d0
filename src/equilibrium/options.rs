//! Tolerances and limits of a stage solve, its gas model, and why a solve stopped.
//!
//! The defaults are the values the engine has always used; a flowsheet may set them per run
//! (the flowsheet layer reads them and fills [`SolverOptions`]; this module knows no file
//! format).

use crate::thermo::GasModel;

/// Tolerances and iteration limits of an equilibrium stage solve, and its gas model.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SolverOptions {
    /// Largest residual of the working equilibrium equations at which the extent Newton
    /// iteration stops, ln-space (dimensionless, sum nu ln(y P/P0) - ln K). Default 1e-11.
    pub extent_tolerance: f64,
    /// Largest residual of the original reactions a converged extent solve may report,
    /// ln-space (dimensionless). Default 1e-10.
    pub extent_reported_tolerance: f64,
    /// Newton iterations allowed in one extent solve (count). Default 200.
    pub extent_iteration_limit: usize,
    /// Largest energy residual |H_out - H_in - duty| / (n_in R T_in) of a converged adiabatic or
    /// fixed-duty stage (dimensionless; 1e-10 is about 1e-8 K of outlet temperature). Default
    /// 1e-10.
    pub energy_tolerance: f64,
    /// Bracket length at which the temperature search stops, K (the round-off floor of the
    /// energy residual; the energy tolerance still decides convergence). Default 1e-9 K.
    pub temperature_step_tolerance_k: f64,
    /// Equilibrium evaluations the temperature search may take (count). Default 100.
    pub temperature_iteration_limit: usize,
    /// Gas model of the stage: ideal (activity y P/P0) or Peng-Robinson (phi y P/P0, residual
    /// enthalpies in the energy balance). Default ideal.
    pub gas_model: GasModel,
    /// Largest change of any ln phi between two passes at which the fugacity loop of a
    /// Peng-Robinson stage stops (dimensionless). Default 1e-12.
    pub fugacity_tolerance: f64,
    /// Passes of the fugacity loop allowed at one temperature (count). Default 50.
    pub fugacity_iteration_limit: usize,
}

impl Default for SolverOptions {
    fn default() -> Self {
        SolverOptions {
            extent_tolerance: 1e-11,
            extent_reported_tolerance: 1e-10,
            extent_iteration_limit: 200,
            energy_tolerance: 1e-10,
            temperature_step_tolerance_k: 1e-9,
            temperature_iteration_limit: 100,
            gas_model: GasModel::Ideal,
            fugacity_tolerance: 1e-12,
            fugacity_iteration_limit: 50,
        }
    }
}

impl SolverOptions {
    /// True when every tolerance is positive and finite and every limit at least one.
    pub fn is_valid(&self) -> bool {
        // Non-short-circuit `&`: every stage solve asks, and the branch-free form is a few
        // instructions.
        let positive = |v: f64| (v > 0.0) & (v < f64::INFINITY);
        positive(self.extent_tolerance)
            & positive(self.extent_reported_tolerance)
            & positive(self.energy_tolerance)
            & positive(self.temperature_step_tolerance_k)
            & positive(self.fugacity_tolerance)
            & (self.fugacity_iteration_limit >= 1)
            & (self.extent_iteration_limit >= 1)
            & (self.temperature_iteration_limit >= 1)
    }
}

/// Why an extent solve or a stage solve stopped.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum StageTermination {
    /// Not solved yet (a fresh result).
    #[default]
    NotSolved,
    /// Every residual within its tolerance.
    Converged,
    /// The extent Newton iteration reached its limit while still making progress.
    ExtentIterationLimit,
    /// The extent Newton iteration reached its limit and its last step found no decrease of
    /// the residual along the Newton direction.
    LineSearchFailed,
    /// The extent Newton iteration reached its limit and its last Newton system could not be
    /// solved (the Hessian numerically singular).
    SingularStep,
    /// The working equations converged but a residual of the original reactions (or the energy
    /// residual, after the temperature bracket narrowed to round-off) stayed above its
    /// tolerance.
    ResidualAboveTolerance,
    /// The temperature search reached its limit of evaluations.
    TemperatureIterationLimit,
    /// The outlet temperature would lie outside the species data range (or outside the range
    /// the approaches leave).
    OutsideDataRange,
    /// A value that is not finite came up.
    NotFinite,
    /// The fugacity loop of a Peng-Robinson stage reached its limit of passes
    /// ([`SolverOptions::fugacity_iteration_limit`]) with ln phi still changing by more than
    /// [`SolverOptions::fugacity_tolerance`].
    FugacityIterationLimit,
}

impl StageTermination {
    /// True for [`StageTermination::Converged`].
    pub fn is_converged(self) -> bool {
        self == StageTermination::Converged
    }
}

impl std::fmt::Display for StageTermination {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(match self {
            StageTermination::NotSolved => "not solved",
            StageTermination::Converged => "converged",
            StageTermination::ExtentIterationLimit => "extent iteration limit reached",
            StageTermination::LineSearchFailed => "line search found no decrease",
            StageTermination::SingularStep => "Newton system singular",
            StageTermination::ResidualAboveTolerance => "residual above tolerance",
            StageTermination::TemperatureIterationLimit => "temperature iteration limit reached",
            StageTermination::OutsideDataRange => "outside the species data range",
            StageTermination::NotFinite => "a value that is not finite",
            StageTermination::FugacityIterationLimit => "fugacity iteration limit reached",
        })
    }
}

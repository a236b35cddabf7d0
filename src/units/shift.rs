//! Shift converter (high-, medium- or low-temperature shift): `shift` (CO + H2O = CO2 + H2) at
//! equilibrium with its approach temperature; methane and every other species pass inert.
//! Adiabatic unless an outlet temperature is given (a cooled or isothermal converter).
//!
//! Catalyst cautions are common practice (no single source): iron-chromium (HTS) is kept below
//! about 480-500 degC; copper (LTS, MTS) below about 250-270 degC, with the inlet at least about
//! 15-20 K above the water dew point so that no water condenses on the catalyst.

use super::common::{
    build_stage, check_pressure_drop, check_temperature, degc, dew_point_k, dry_fraction, figure,
    frozen_warnings, reactor_inlet, resolve_approaches, run_stage, spec_error, stage_approaches,
    Key,
};
use super::{FigureKind, Stream, UnitResult};
use crate::equilibrium::{Direction, EnergyMode, EquilibriumStage, StageInlet};
use crate::error::{Result, ResultExt};
use crate::quantity::CELSIUS_OFFSET_K;
use crate::thermo::SpeciesDb;

/// The reactions of a shift converter's equilibrium stage.
pub const SHIFT_REACTIONS: [&str; 1] = ["shift"];

/// Highest outlet for an iron-chromium catalyst before a warning, K (480 degC; common practice:
/// kept below about 480-500 degC).
pub const IRON_CHROMIUM_MAX_K: f64 = 480.0 + CELSIUS_OFFSET_K;
/// Highest outlet for a copper catalyst before a warning, K (270 degC; common practice: kept
/// below about 250-270 degC).
pub const COPPER_MAX_K: f64 = 270.0 + CELSIUS_OFFSET_K;
/// Smallest inlet margin above the water dew point for a copper catalyst, K (common practice:
/// at least about 15-20 K).
pub const COPPER_DEW_MARGIN_K: f64 = 20.0;
/// Inlet temperature below which a copper catalyst is assumed when none is given, K (260 degC).
pub const COPPER_INFERENCE_BELOW_K: f64 = 260.0 + CELSIUS_OFFSET_K;

/// Shift catalyst type, for the temperature cautions.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ShiftCatalyst {
    /// Iron-chromium (high-temperature shift).
    IronChromium,
    /// Copper-zinc (low- and medium-temperature shift).
    Copper,
}

impl ShiftCatalyst {
    fn label(self) -> &'static str {
        match self {
            ShiftCatalyst::IronChromium => "iron-chromium",
            ShiftCatalyst::Copper => "copper",
        }
    }
}

/// Specification of a shift converter.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct ShiftSpec {
    /// Outlet temperature, K; `None` for an adiabatic converter.
    pub outlet_temperature_k: Option<f64>,
    /// Pressure drop across the bed, Pa.
    pub pressure_drop_pa: f64,
    /// Approach temperature by reaction name (`shift`), K; zero when unlisted.
    pub approaches: Vec<(String, f64)>,
    /// Catalyst, for the cautions; `None`: inferred from the inlet temperature (said so).
    pub catalyst: Option<ShiftCatalyst>,
}

/// A shift converter ready to solve.
#[derive(Debug, Clone)]
pub struct Shift {
    name: String,
    spec: ShiftSpec,
    key: Key,
    stage: EquilibriumStage,
}

impl Shift {
    /// Check the spec and build the equilibrium stage.
    pub fn new(db: &SpeciesDb, name: &str, spec: &ShiftSpec) -> Result<Shift> {
        if let Some(t) = spec.outlet_temperature_k {
            if !(t.is_finite() && t > 0.0) {
                return Err(spec_error(
                    name,
                    "outlet-temperature",
                    format!("{t} K must be a positive absolute temperature"),
                ));
            }
        }
        let approaches = resolve_approaches(name, &spec.approaches, &SHIFT_REACTIONS)?;
        check_pressure_drop(name, spec.pressure_drop_pa)?;
        // The stage finds the direction of a lone reaction from the inlet (Direction::Auto).
        let stage = build_stage(db, name, &SHIFT_REACTIONS, &approaches, &[Direction::Auto])?;
        Ok(Shift {
            name: name.to_string(),
            spec: spec.clone(),
            key: Key::new(db, name)?,
            stage,
        })
    }

    /// The spec.
    pub fn spec(&self) -> &ShiftSpec {
        &self.spec
    }

    /// Solve; `guess`: the stage extent of a previous solve (a warm start).
    pub fn solve(
        &self,
        db: &SpeciesDb,
        inlets: &[&Stream],
        guess: Option<&[f64]>,
    ) -> Result<UnitResult> {
        let name = &self.name;
        let key = &self.key;
        let (inlet, p) = reactor_inlet(db, name, "shift", inlets, self.spec.pressure_drop_pa)?;
        let t_in = inlet.temperature_k;
        let mode = match self.spec.outlet_temperature_k {
            Some(t) => {
                check_temperature(db, name, "outlet-temperature", &inlet.flows, t)?;
                EnergyMode::FixedTemperature { temperature_k: t }
            }
            None => EnergyMode::Adiabatic,
        };
        let h_in = inlet
            .enthalpy_w(db)
            .context(|| format!("unit '{name}', inlet enthalpy"))?;
        let stage = run_stage(
            &self.stage,
            db,
            name,
            StageInlet {
                flows: &inlet.flows,
                temperature_k: t_in,
                pressure_pa: p,
            },
            mode,
            guess,
        )?;
        let t_out = stage.outlet_temperature_k;
        let out = stage.outlet_flows.clone();
        let duty = match mode {
            EnergyMode::Adiabatic => 0.0,
            _ => crate::thermo::mixture::enthalpy(db, &out, t_out)? - h_in,
        };
        let mut figures = Vec::with_capacity(5);
        let co_in = inlet.flows[key.co];
        if co_in > 0.0 {
            figures.push(figure(
                "co-conversion",
                "CO conversion",
                1.0 - out[key.co] / co_in,
                FigureKind::Fraction,
            ));
        }
        figures.push(figure(
            "co-slip-dry",
            "CO slip, dry",
            dry_fraction(key, &out, key.co),
            FigureKind::Fraction,
        ));
        figures.push(figure(
            "temperature-rise",
            "temperature rise",
            t_out - t_in,
            FigureKind::TemperatureDifference,
        ));
        let dew = dew_point_k(key, &inlet.flows, inlet.pressure_pa);
        if let Some(dew) = dew {
            figures.push(figure(
                "inlet-dew-point-margin",
                "inlet above water dew point",
                t_in - dew,
                FigureKind::TemperatureDifference,
            ));
        }
        let mut warnings = Vec::new();
        frozen_warnings(name, &self.stage, &stage, &mut warnings);
        let catalyst = match self.spec.catalyst {
            Some(c) => c,
            None => {
                let c = if t_in < COPPER_INFERENCE_BELOW_K {
                    ShiftCatalyst::Copper
                } else {
                    ShiftCatalyst::IronChromium
                };
                warnings.push(format!(
                    "unit '{name}': no catalyst given; {} assumed from the inlet temperature {} \
                     (copper below 260 degC) for the temperature cautions",
                    c.label(),
                    degc(t_in)
                ));
                c
            }
        };
        match catalyst {
            ShiftCatalyst::IronChromium if t_out > IRON_CHROMIUM_MAX_K => warnings.push(format!(
                "unit '{name}': outlet {} is above about 480 degC, where an iron-chromium \
                 catalyst is usually kept below (common practice: 480-500 degC)",
                degc(t_out)
            )),
            ShiftCatalyst::Copper if t_out > COPPER_MAX_K => warnings.push(format!(
                "unit '{name}': outlet {} is above about 270 degC, where a copper catalyst is \
                 usually kept below (common practice: 250-270 degC)",
                degc(t_out)
            )),
            _ => {}
        }
        if let Some(dew) = dew {
            if t_in <= dew {
                warnings.push(format!(
                    "unit '{name}': inlet {} is at or below the water dew point {}: water \
                     would condense on the catalyst",
                    degc(t_in),
                    degc(dew)
                ));
            } else if catalyst == ShiftCatalyst::Copper && t_in - dew < COPPER_DEW_MARGIN_K {
                warnings.push(format!(
                    "unit '{name}': inlet {} is only {:.1} K above the water dew point {}; a \
                     copper catalyst is usually fed at least about 15-20 K above it (common \
                     practice)",
                    degc(t_in),
                    t_in - dew,
                    degc(dew)
                ));
            }
        }
        Ok(UnitResult {
            outlets: vec![Stream::vapour(out, t_out, p)],
            duty_w: duty,
            approaches: stage_approaches(&self.stage),
            figures,
            equilibrium: Some(stage),
            warnings,
        })
    }
}

#[cfg(test)]
#[path = "shift_tests.rs"]
mod tests;

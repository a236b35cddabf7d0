//! Shift converter (high-, medium- or low-temperature shift): `shift` (CO + H2O = CO2 + H2) at
//! equilibrium with its approach temperature; methane and every other species pass inert.
//! Adiabatic unless an outlet temperature is given (a cooled or isothermal converter).
//!
//! Catalyst windows are common practice (no single source; see [`super::limits`]), each end
//! settable per unit: iron-chromium (HTS) fed at 320-380 degC and kept below 480 degC;
//! medium-temperature copper (MTS) fed at 200-240 degC and kept below 350 degC; low-temperature
//! copper (LTS) fed at 190-230 degC and kept below 260 degC (`catalyst-temperature`). Every
//! charge is fed at least 15 K above the water dew point of its inlet so that no water
//! condenses on it (`dew-point`; common practice 15-20 K).

use super::common::{
    check_temperature, dew_point_k, dry_fraction, figure, reactor_inlet, spec_error,
};
use super::limits::{self, key_doc, LimitKey, OperatingLimits};
use super::reactor::{read_gas_model, ReactorCore, GAS_MODEL_KEY};
use super::unit::{build, KeyDoc, Ports, UnitBuilder, UnitKind, UnitScratch, UnitType, ValueKind};
use super::{FigureKind, Stream, UnitResult, Warning};
use crate::equilibrium::{Direction, EnergyMode};
use crate::error::{Result, ResultExt};
use crate::quantity::CELSIUS_OFFSET_K;
use crate::thermo::{GasModel, SpeciesDb};

/// The reactions of a shift converter's equilibrium stage.
pub const SHIFT_REACTIONS: [&str; 1] = ["shift"];

/// Highest outlet for an iron-chromium catalyst before a warning, K (480 degC; common practice:
/// kept below about 480-500 degC).
pub const IRON_CHROMIUM_MAX_K: f64 = 480.0 + CELSIUS_OFFSET_K;
/// Highest outlet for a medium-temperature copper catalyst before a warning, K (350 degC;
/// common practice: kept below about 330-350 degC).
pub const MEDIUM_TEMPERATURE_COPPER_MAX_K: f64 = 350.0 + CELSIUS_OFFSET_K;
/// Highest outlet for a low-temperature copper catalyst before a warning, K (260 degC; common
/// practice: kept below about 250-270 degC).
pub const COPPER_MAX_K: f64 = 260.0 + CELSIUS_OFFSET_K;
/// Inlet temperature below which a copper catalyst is assumed when none is given, K (260 degC).
pub const COPPER_INFERENCE_BELOW_K: f64 = 260.0 + CELSIUS_OFFSET_K;

/// Shift catalyst type, for the temperature cautions.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ShiftCatalyst {
    /// Iron-chromium (high-temperature shift).
    IronChromium,
    /// Copper-zinc for medium-temperature shift (fed at about 200-240 degC).
    MediumTemperatureCopper,
    /// Copper-zinc for low-temperature shift.
    LowTemperatureCopper,
}

impl ShiftCatalyst {
    /// The name as written in flowsheets.
    pub fn label(self) -> &'static str {
        match self {
            ShiftCatalyst::IronChromium => "iron-chromium",
            ShiftCatalyst::MediumTemperatureCopper => "medium-temperature-copper",
            ShiftCatalyst::LowTemperatureCopper => "low-temperature-copper",
        }
    }

    /// The catalyst in a message ("an iron-chromium catalyst").
    pub fn described(self) -> &'static str {
        match self {
            ShiftCatalyst::IronChromium => "an iron-chromium catalyst",
            ShiftCatalyst::MediumTemperatureCopper => "a medium-temperature copper catalyst",
            ShiftCatalyst::LowTemperatureCopper => "a low-temperature copper catalyst",
        }
    }

    /// Highest outlet temperature before a warning, K (common practice).
    pub fn max_outlet_k(self) -> f64 {
        match self {
            ShiftCatalyst::IronChromium => IRON_CHROMIUM_MAX_K,
            ShiftCatalyst::MediumTemperatureCopper => MEDIUM_TEMPERATURE_COPPER_MAX_K,
            ShiftCatalyst::LowTemperatureCopper => COPPER_MAX_K,
        }
    }

    /// The usual inlet window, K (common practice): iron-chromium 320-380 degC,
    /// medium-temperature copper 200-240 degC, low-temperature copper 190-230 degC.
    pub fn inlet_window_k(self) -> (f64, f64) {
        let (lo, hi) = match self {
            ShiftCatalyst::IronChromium => (320.0, 380.0),
            ShiftCatalyst::MediumTemperatureCopper => (200.0, 240.0),
            ShiftCatalyst::LowTemperatureCopper => (190.0, 230.0),
        };
        (lo + CELSIUS_OFFSET_K, hi + CELSIUS_OFFSET_K)
    }

    /// True for the copper catalysts.
    pub fn is_copper(self) -> bool {
        !matches!(self, ShiftCatalyst::IronChromium)
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
    /// Operating limits set in the file (`None`: the catalyst's defaults, [`super::limits`]).
    pub limits: OperatingLimits,
    /// Gas model of the equilibrium (`None`: the flowsheet's).
    pub gas_model: Option<GasModel>,
}

/// The limit keys of a shift converter and a methanator.
pub(crate) const LIMIT_KEYS: [LimitKey; 4] = [
    LimitKey::InletMin,
    LimitKey::InletMax,
    LimitKey::OutletMax,
    LimitKey::DewPointMargin,
];

/// A shift converter ready to solve.
#[derive(Debug, Clone)]
pub struct Shift {
    core: ReactorCore,
    spec: ShiftSpec,
}

/// The catalyst assumed when none is given: copper below an inlet of 260 degC (low-temperature
/// copper, or medium-temperature copper when the outlet passes the low-temperature limit, so
/// that a medium-temperature converter raises no alarm meant for a low-temperature charge),
/// iron-chromium otherwise.
fn infer_catalyst(t_in: f64, t_out: f64) -> ShiftCatalyst {
    if t_in >= COPPER_INFERENCE_BELOW_K {
        ShiftCatalyst::IronChromium
    } else if t_out > COPPER_MAX_K {
        ShiftCatalyst::MediumTemperatureCopper
    } else {
        ShiftCatalyst::LowTemperatureCopper
    }
}

/// The catalysts as written, in the order of [`ShiftCatalyst`]; `copper` is read as
/// low-temperature copper.
const CATALYSTS: [&str; 4] = [
    "iron-chromium",
    "medium-temperature-copper",
    "low-temperature-copper",
    "copper",
];

/// The `shift` unit type.
pub static TYPE: UnitType = UnitType {
    name: "shift",
    summary: "Shift converter (high-, medium- or low-temperature): shift at equilibrium with its \
              approach temperature, adiabatic unless an outlet temperature is given; catalyst \
              temperature and dew-point cautions.",
    inlets: Ports::exactly(1, "process gas"),
    outlets: Ports::exactly(1, "shifted gas"),
    named_ports: None,
    keys: &[
        KeyDoc {
            key: "outlet-temperature",
            value: ValueKind::Temperature,
            default: Some("adiabatic"),
            meaning: "outlet temperature of a cooled (isothermal) converter",
        },
        KeyDoc {
            key: "catalyst",
            value: ValueKind::Choice(&CATALYSTS),
            default: Some("from the inlet temperature, said in a warning"),
            meaning: "catalyst, for the temperature cautions (common practice limits)",
        },
        KeyDoc {
            key: "pressure-drop",
            value: ValueKind::PressureDifference,
            default: Some("0 bar"),
            meaning: "pressure lost across the unit",
        },
        KeyDoc {
            key: "approach",
            value: ValueKind::PerReaction(&SHIFT_REACTIONS),
            default: Some("0 K for each reaction"),
            meaning:
                "approach temperature of the shift; a positive one leaves more CO than equilibrium",
        },
        key_doc(
            LimitKey::InletMin,
            "by catalyst: iron-chromium 320 degC, medium-temperature copper 200 degC, \
             low-temperature copper 190 degC",
        ),
        key_doc(
            LimitKey::InletMax,
            "by catalyst: iron-chromium 380 degC, medium-temperature copper 240 degC, \
             low-temperature copper 230 degC",
        ),
        key_doc(
            LimitKey::OutletMax,
            "by catalyst: iron-chromium 480 degC, medium-temperature copper 350 degC, \
             low-temperature copper 260 degC",
        ),
        key_doc(LimitKey::DewPointMargin, "15 K"),
        GAS_MODEL_KEY,
    ],
    example: "- name: hts\n  type: shift\n  from: hts-feed\n  to: hts-exit\n  catalyst: \
              iron-chromium\n  approach: {shift: 8 K}",
    build: build::<Shift>,
};

impl UnitKind for Shift {
    type Spec = ShiftSpec;

    fn read(b: &mut UnitBuilder<'_, '_, ShiftSpec>) -> Result<ShiftSpec> {
        let t = b.number(
            "outlet-temperature",
            ValueKind::Temperature,
            None,
            |s, v| s.outlet_temperature_k = Some(v),
        )?;
        let catalyst = b.choice("catalyst", &CATALYSTS)?.map(|i| match i {
            0 => ShiftCatalyst::IronChromium,
            1 => ShiftCatalyst::MediumTemperatureCopper,
            _ => ShiftCatalyst::LowTemperatureCopper,
        });
        let drop = b.pressure_drop(|s, v| s.pressure_drop_pa = v)?;
        let approaches = b.approaches(&SHIFT_REACTIONS, |s, j, v| s.approaches[j].1 = v)?;
        let limits = limits::read(b, &LIMIT_KEYS, |s: &mut ShiftSpec| &mut s.limits)?;
        let gas_model = read_gas_model(b)?;
        Ok(ShiftSpec {
            outlet_temperature_k: t,
            pressure_drop_pa: drop,
            approaches,
            catalyst,
            limits,
            gas_model,
        })
    }

    /// Check the spec and build the equilibrium stage.
    fn new(db: &SpeciesDb, name: &str, spec: &ShiftSpec) -> Result<Shift> {
        check_numbers(name, spec)?;
        Ok(Shift {
            // The stage finds the direction of a lone reaction from the inlet (Direction::Auto).
            core: ReactorCore::new(
                db,
                name,
                &SHIFT_REACTIONS,
                &spec.approaches,
                &[Direction::Auto],
                spec.pressure_drop_pa,
            )?
            .with_gas_model(spec.gas_model),
            spec: spec.clone(),
        })
    }

    fn spec(&self) -> &ShiftSpec {
        &self.spec
    }

    super::reactor::reactor_solve_entries!(ShiftSpec, check_numbers);
}

impl Shift {
    /// Solve with the numbers of `spec` and the approaches `approaches_k` (stage order; `None`:
    /// those the stage was built with).
    #[allow(clippy::too_many_arguments)]
    fn run(
        &self,
        db: &SpeciesDb,
        spec: &ShiftSpec,
        approaches_k: Option<&[f64]>,
        inlets: &[&Stream],
        guess: Option<&[f64]>,
        scratch: &mut UnitScratch,
        result: &mut UnitResult,
    ) -> Result<()> {
        let (name, key) = (&self.core.name, &self.core.key);
        let (inlet, p) = reactor_inlet(db, name, "shift", inlets, spec.pressure_drop_pa)?;
        let t_in = inlet.temperature_k;
        let mode = match spec.outlet_temperature_k {
            Some(t) => {
                check_temperature(db, name, "outlet-temperature", &inlet.flows, t)?;
                EnergyMode::FixedTemperature { temperature_k: t }
            }
            None => EnergyMode::Adiabatic,
        };
        let h_in = inlet
            .enthalpy_w(db)
            .context(|| format!("unit '{name}', inlet enthalpy"))?;
        self.core.solve_stage(
            db,
            &inlet.flows,
            t_in,
            p,
            mode,
            guess,
            approaches_k,
            &scratch.options,
            &mut scratch.stage,
            result,
        )?;
        self.core
            .finish(db, &inlet.flows, |_| false, approaches_k, result);
        let residual = ReactorCore::residual_enthalpy_change(result);
        let UnitResult {
            outlets,
            duty_w,
            figures,
            warnings,
            ..
        } = result;
        let t_out = outlets[0].temperature_k;
        let out = &outlets[0].flows;
        *duty_w = match (mode, residual) {
            (EnergyMode::Adiabatic, _) => 0.0,
            (_, Some(r)) => crate::thermo::mixture::enthalpy(db, out, t_out)? - h_in + r,
            _ => crate::thermo::mixture::enthalpy(db, out, t_out)? - h_in,
        };
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
            dry_fraction(key, out, key.co),
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
        let catalyst = match spec.catalyst {
            Some(c) => c,
            None => {
                let c = infer_catalyst(t_in, t_out);
                warnings.push(
                    Warning::new(
                        "catalyst-assumed",
                        "no catalyst given; {subject} assumed from the inlet {value} (copper \
                         below an inlet of {limit}; medium-temperature copper when the outlet \
                         passes the low-temperature copper limit) for the temperature \
                         cautions; set `catalyst` to be sure",
                    )
                    .value(t_in, FigureKind::Temperature)
                    .limit(COPPER_INFERENCE_BELOW_K)
                    .subject(c.label())
                    .for_unit(name.as_str()),
                );
                c
            }
        };
        let (inlet_min, inlet_max) = catalyst.inlet_window_k();
        limits::catalyst_warnings(
            name,
            &spec.limits,
            (inlet_min, inlet_max, catalyst.max_outlet_k()),
            catalyst.described(),
            t_in,
            t_out,
            dew,
            warnings,
        );
        Ok(())
    }
}

/// The checks of a shift converter's numbers besides the approaches and pressure drop.
fn check_numbers(name: &str, spec: &ShiftSpec) -> Result<()> {
    spec.limits.check(name)?;
    if let Some(t) = spec.outlet_temperature_k {
        if !(t.is_finite() && t > 0.0) {
            return Err(spec_error(
                name,
                "outlet-temperature",
                format!("{t} K must be a positive absolute temperature"),
            ));
        }
    }
    Ok(())
}

#[cfg(test)]
#[path = "shift_tests.rs"]
mod tests;

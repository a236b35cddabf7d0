//! Heater and cooler: a vapour stream brought to an outlet temperature, or given a duty, with an
//! optional pressure drop. For a given duty the outlet temperature solves H(T) = H_in + duty by
//! Newton's method with dH/dT = sum n_i Cp_i (ideal gas, NASA polynomials).
//!
//! A cooler does not condense: when its outlet lies below the water dew point it warns and the
//! outlet stays all vapour (use a knockout to condense the water).

use super::common::{
    check_inlets, check_pressure_drop, check_temperature, degc, dew_point_k, figure,
    outlet_pressure, require_vapour, spec_error, temperature_at_enthalpy, Key,
};
use super::{FigureKind, Stream, UnitResult};
use crate::error::{Result, ResultExt};
use crate::thermo::{mixture, SpeciesDb};

/// What a heater or cooler is asked for.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum ThermalTarget {
    /// Outlet temperature, K.
    OutletTemperature(f64),
    /// Heat added to the stream, W (positive for a heater, negative for a cooler).
    Duty(f64),
}

/// Specification of a heater or a cooler.
#[derive(Debug, Clone, PartialEq)]
pub struct ThermalSpec {
    /// Outlet temperature or duty.
    pub target: ThermalTarget,
    /// Pressure drop, Pa.
    pub pressure_drop_pa: f64,
}

/// Heating or cooling.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ThermalKind {
    /// Adds heat.
    Heater,
    /// Removes heat.
    Cooler,
}

impl ThermalKind {
    fn name(self) -> &'static str {
        match self {
            ThermalKind::Heater => "heater",
            ThermalKind::Cooler => "cooler",
        }
    }
}

/// A heater or cooler ready to solve.
#[derive(Debug, Clone)]
pub struct Thermal {
    name: String,
    kind: ThermalKind,
    spec: ThermalSpec,
    key: Key,
}

impl Thermal {
    /// Check the spec and prepare.
    pub fn new(
        db: &SpeciesDb,
        name: &str,
        kind: ThermalKind,
        spec: &ThermalSpec,
    ) -> Result<Thermal> {
        match spec.target {
            ThermalTarget::OutletTemperature(t) if !(t.is_finite() && t > 0.0) => {
                return Err(spec_error(
                    name,
                    "outlet-temperature",
                    format!("{t} K must be a positive absolute temperature"),
                ));
            }
            ThermalTarget::Duty(q) if !q.is_finite() => {
                return Err(spec_error(name, "duty", format!("{q} W must be finite")));
            }
            ThermalTarget::Duty(q) if kind == ThermalKind::Heater && q < 0.0 => {
                return Err(spec_error(
                    name,
                    "duty",
                    format!(
                        "a heater asked to remove {:.3} kW; use a cooler, or give a positive duty",
                        -q / 1e3
                    ),
                ));
            }
            ThermalTarget::Duty(q) if kind == ThermalKind::Cooler && q > 0.0 => {
                return Err(spec_error(
                    name,
                    "duty",
                    format!(
                        "a cooler asked to add {:.3} kW; use a heater, or give a negative duty \
                         (heat removed)",
                        q / 1e3
                    ),
                ));
            }
            _ => {}
        }
        check_pressure_drop(name, spec.pressure_drop_pa)?;
        Ok(Thermal {
            name: name.to_string(),
            kind,
            spec: spec.clone(),
            key: Key::new(db, name)?,
        })
    }

    /// The spec.
    pub fn spec(&self) -> &ThermalSpec {
        &self.spec
    }

    /// Heater or cooler.
    pub fn kind(&self) -> ThermalKind {
        self.kind
    }

    /// Heat or cool the inlet.
    pub fn solve(&self, db: &SpeciesDb, inlets: &[&Stream]) -> Result<UnitResult> {
        let name = &self.name;
        check_inlets(db, name, self.kind.name(), inlets, 1, Some(1))?;
        require_vapour(db, name, inlets)?;
        let inlet = inlets[0];
        let p = outlet_pressure(name, inlet.pressure_pa, self.spec.pressure_drop_pa)?;
        let h_in = inlet
            .enthalpy_w(db)
            .context(|| format!("unit '{name}', inlet enthalpy"))?;
        let (t_out, duty) = match self.spec.target {
            ThermalTarget::OutletTemperature(t) => {
                let t_in = inlet.temperature_k;
                let wrong = match self.kind {
                    ThermalKind::Heater => t < t_in,
                    ThermalKind::Cooler => t > t_in,
                };
                if wrong {
                    let (asked, other) = match self.kind {
                        ThermalKind::Heater => ("cool", "cooler"),
                        ThermalKind::Cooler => ("heat", "heater"),
                    };
                    return Err(spec_error(
                        name,
                        "outlet-temperature",
                        format!(
                            "a {} asked to {asked}: inlet {}, outlet {}; use a {other} or \
                             change the outlet temperature",
                            self.kind.name(),
                            degc(t_in),
                            degc(t)
                        ),
                    ));
                }
                check_temperature(db, name, "outlet-temperature", &inlet.flows, t)?;
                let h_out = mixture::enthalpy(db, &inlet.flows, t)?;
                (t, h_out - h_in)
            }
            ThermalTarget::Duty(q) => {
                let t =
                    temperature_at_enthalpy(db, name, &inlet.flows, h_in + q, inlet.temperature_k)?;
                (t, q)
            }
        };
        let outlet = Stream::vapour(inlet.flows.clone(), t_out, p);
        let mut figures = vec![figure(
            "temperature-change",
            "temperature change",
            t_out - inlet.temperature_k,
            FigureKind::TemperatureDifference,
        )];
        let mut warnings = Vec::new();
        if let Some(dew) = dew_point_k(&self.key, &outlet.flows, p) {
            figures.push(figure(
                "outlet-dew-point-margin",
                "outlet above water dew point",
                t_out - dew,
                FigureKind::TemperatureDifference,
            ));
            if t_out < dew {
                warnings.push(format!(
                    "unit '{name}': outlet {} is below the water dew point {}; the {} does not \
                     condense water: use a knockout",
                    degc(t_out),
                    degc(dew),
                    self.kind.name()
                ));
            }
        }
        Ok(UnitResult {
            outlets: vec![outlet],
            duty_w: duty,
            approaches: Vec::new(),
            figures,
            equilibrium: None,
            warnings,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::units::test_support::{assert_balances, db, gas};

    fn unit(db: &SpeciesDb, kind: ThermalKind, target: ThermalTarget) -> Thermal {
        let spec = ThermalSpec {
            target,
            pressure_drop_pa: 0.5e5,
        };
        Thermal::new(db, "hx", kind, &spec).unwrap()
    }

    #[test]
    fn heater_by_temperature_and_by_duty_agree() {
        let db = db();
        let s = gas(
            &db,
            &[("CH4", 1.0), ("H2O", 3.0), ("H2", 0.05)],
            650.0,
            30e5,
        );
        let h = unit(
            &db,
            ThermalKind::Heater,
            ThermalTarget::OutletTemperature(900.0),
        );
        let r = h.solve(&db, &[&s]).unwrap();
        assert_balances(&db, &[&s], &r);
        assert!(r.duty_w > 0.0);
        assert_eq!(r.outlets[0].pressure_pa, 29.5e5);
        let q = unit(&db, ThermalKind::Heater, ThermalTarget::Duty(r.duty_w));
        let r2 = q.solve(&db, &[&s]).unwrap();
        assert_balances(&db, &[&s], &r2);
        assert!((r2.outlets[0].temperature_k - 900.0).abs() < 1e-8);
        assert!(r2.warnings.is_empty());
    }

    #[test]
    fn cooler_below_the_dew_point_warns() {
        let db = db();
        let s = gas(&db, &[("H2", 3.0), ("H2O", 1.0)], 700.0, 25e5);
        let c = unit(
            &db,
            ThermalKind::Cooler,
            ThermalTarget::OutletTemperature(320.0),
        );
        let r = c.solve(&db, &[&s]).unwrap();
        assert_balances(&db, &[&s], &r);
        assert!(r.duty_w < 0.0);
        assert!(r.warnings[0].contains("use a knockout"), "{:?}", r.warnings);
    }

    #[test]
    fn wrong_direction_is_an_error_naming_both_temperatures() {
        let db = db();
        let s = gas(&db, &[("H2", 1.0)], 600.0, 25e5);
        let c = unit(
            &db,
            ThermalKind::Cooler,
            ThermalTarget::OutletTemperature(700.0),
        );
        let e = c.solve(&db, &[&s]).unwrap_err().to_string();
        assert!(
            e.contains("unit 'hx'") && e.contains("326.9 degC") && e.contains("426.9 degC"),
            "{e}"
        );
        let h = unit(
            &db,
            ThermalKind::Heater,
            ThermalTarget::OutletTemperature(500.0),
        );
        assert!(h
            .solve(&db, &[&s])
            .unwrap_err()
            .to_string()
            .contains("asked to cool"));
        let spec = ThermalSpec {
            target: ThermalTarget::Duty(-1.0),
            pressure_drop_pa: 0.0,
        };
        assert!(Thermal::new(&db, "hx", ThermalKind::Heater, &spec).is_err());
        // Outside the species data (200-3000 K) is an error, not an extrapolation.
        let h = unit(
            &db,
            ThermalKind::Heater,
            ThermalTarget::OutletTemperature(3500.0),
        );
        assert!(h.solve(&db, &[&s]).is_err());
        let h = unit(&db, ThermalKind::Heater, ThermalTarget::Duty(1e9));
        assert!(h.solve(&db, &[&s]).is_err());
    }
}

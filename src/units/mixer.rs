//! Mixer: adiabatic mixing of any number of vapour inlets.
//!
//! Energy balance H_out(T) = sum H_in, solved by Newton's method on T with dH/dT = sum n_i Cp_i
//! (ideal-gas mixture, NASA polynomials). The outlet leaves at the lowest inlet pressure less an
//! optional pressure drop. Liquid inlets are refused: mixing condensate into gas would need the
//! water's vaporisation in the same balance, which this unit does not do.

use super::common::{
    check_inlets, check_pressure_drop, degc, dew_point_k, enthalpy_sum, figure, outlet_pressure,
    require_vapour, temperature_at_enthalpy, Key,
};
use super::{FigureKind, Stream, UnitResult};
use crate::error::{Result, ResultExt};
use crate::thermo::SpeciesDb;

/// Specification of a mixer.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct MixerSpec {
    /// Pressure drop below the lowest inlet pressure, Pa (usually zero).
    pub pressure_drop_pa: f64,
}

/// A mixer ready to solve.
#[derive(Debug, Clone)]
pub struct Mixer {
    name: String,
    spec: MixerSpec,
    key: Key,
}

impl Mixer {
    /// Check the spec and prepare.
    pub fn new(db: &SpeciesDb, name: &str, spec: &MixerSpec) -> Result<Mixer> {
        check_pressure_drop(name, spec.pressure_drop_pa)?;
        Ok(Mixer {
            name: name.to_string(),
            spec: spec.clone(),
            key: Key::new(db, name)?,
        })
    }

    /// The spec.
    pub fn spec(&self) -> &MixerSpec {
        &self.spec
    }

    /// Mix the inlets.
    pub fn solve(&self, db: &SpeciesDb, inlets: &[&Stream]) -> Result<UnitResult> {
        let name = &self.name;
        check_inlets(db, name, "mixer", inlets, 1, None)?;
        require_vapour(db, name, inlets)?;
        let mut flows = vec![0.0; db.len()];
        let mut p_min = f64::INFINITY;
        let (mut nt, mut n_total) = (0.0, 0.0);
        for s in inlets {
            for (o, n) in flows.iter_mut().zip(&s.flows) {
                *o += n;
            }
            p_min = p_min.min(s.pressure_pa);
            let n = s.total();
            nt += n * s.temperature_k;
            n_total += n;
        }
        let pressure = outlet_pressure(name, p_min, self.spec.pressure_drop_pa)?;
        let h_in = enthalpy_sum(db, inlets).context(|| format!("unit '{name}', inlet enthalpy"))?;
        let start = if n_total > 0.0 {
            nt / n_total
        } else {
            inlets[0].temperature_k
        };
        let t = temperature_at_enthalpy(db, name, &flows, h_in, start)?;
        let outlet = Stream::vapour(flows, t, pressure);
        let mut figures = Vec::new();
        let mut warnings = Vec::new();
        if let Some(sc) = self.key.steam_to_carbon(&outlet.flows) {
            if outlet.flows[self.key.h2o] > 0.0 {
                figures.push(figure(
                    "steam-to-carbon",
                    "steam-to-carbon ratio",
                    sc,
                    FigureKind::Number,
                ));
            }
        }
        if let Some(dew) = dew_point_k(&self.key, &outlet.flows, pressure) {
            figures.push(figure(
                "dew-point",
                "water dew point of the outlet",
                dew,
                FigureKind::Temperature,
            ));
            if t < dew {
                warnings.push(format!(
                    "unit '{name}': the mixed gas at {} is below its water dew point {}; water \
                     would condense (the mixer treats the outlet as all vapour)",
                    degc(t),
                    degc(dew)
                ));
            }
        }
        Ok(UnitResult {
            outlets: vec![outlet],
            duty_w: 0.0,
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
    use crate::units::test_support::{assert_balances, db, fig, gas};
    use crate::units::StreamPhase;

    #[test]
    fn steam_and_gas_mix_adiabatically() {
        let db = db();
        let ng = gas(&db, &[("CH4", 1.0), ("C2H6", 0.05)], 650.0, 30e5);
        let steam = gas(&db, &[("H2O", 3.3)], 660.0, 31e5);
        let m = Mixer::new(&db, "mix", &MixerSpec::default()).unwrap();
        let r = m.solve(&db, &[&ng, &steam]).unwrap();
        assert_balances(&db, &[&ng, &steam], &r);
        let out = &r.outlets[0];
        assert!(out.temperature_k > 650.0 && out.temperature_k < 660.0);
        assert_eq!(out.pressure_pa, 30e5);
        assert!((fig(&r, "steam-to-carbon") - 3.0).abs() < 1e-12);
        // Equal temperatures mix to that temperature exactly (ideal gas: no heat of mixing).
        let a = gas(&db, &[("H2", 1.0)], 500.0, 2e5);
        let b = gas(&db, &[("N2", 2.0)], 500.0, 3e5);
        let r = m.solve(&db, &[&a, &b]).unwrap();
        assert!((r.outlets[0].temperature_k - 500.0).abs() < 1e-9);
        assert_balances(&db, &[&a, &b], &r);
    }

    #[test]
    fn liquid_inlets_and_no_inlets_are_refused() {
        let db = db();
        let m = Mixer::new(&db, "mix", &MixerSpec::default()).unwrap();
        let mut water = gas(&db, &[("H2O", 1.0)], 300.0, 2e5);
        water.phase = StreamPhase::Liquid;
        let gas = gas(&db, &[("H2", 1.0)], 500.0, 2e5);
        let e = m.solve(&db, &[&gas, &water]).unwrap_err().to_string();
        assert!(e.contains("unit 'mix'") && e.contains("liquid"), "{e}");
        let e = m.solve(&db, &[]).unwrap_err().to_string();
        assert!(e.contains("unit 'mix'") && e.contains("at least 1"), "{e}");
        let bad = MixerSpec {
            pressure_drop_pa: -1.0,
        };
        assert!(Mixer::new(&db, "mix", &bad).is_err());
    }
}

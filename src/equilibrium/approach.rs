//! Approach temperatures read back from a composition: the temperature at which a reaction's
//! equilibrium constant equals a reaction quotient, and the approach that temperature means.
//!
//! Convention (the stage's own): reaction j takes its equilibrium constant at
//! T_eq = T - s dT, with s = +1 when it runs in its endothermic direction and -1 in its
//! exothermic direction ([`approach_sign`]). Reading a measured outlet back therefore solves
//! ln K(T_eq) = ln Q for T_eq and gives dT = s (T - T_eq). The equation in T_eq is solved by the
//! safeguarded Newton search of [`super::root`] with the exact slope of van 't Hoff,
//! d lnK/dT = dH/(R T^2).

use super::root::{self, Evaluation, RootOptions, Termination};
use crate::error::{Error, Result};
use crate::quantity::STANDARD_PRESSURE_PA;
use crate::reaction::Reaction;
use crate::thermo::SpeciesDb;

/// Largest |ln K(T_eq) - ln Q| accepted by [`equilibrium_temperature`] (dimensionless; about
/// 1e-10 K for reforming or shift, whose d lnK/dT is a few 1e-3 to 1e-2 per K).
pub const QUOTIENT_TOLERANCE: f64 = 1e-12;

/// Sign s of a reaction's approach: +1 when it runs in its endothermic direction, -1 in its
/// exothermic direction. `delta_h` is its enthalpy change as written (any unit, only the sign
/// counts), `direction` the sign of its extent (+1 as written, -1 against). A reaction with
/// `delta_h * direction` of zero counts as endothermic.
#[inline]
pub fn approach_sign(delta_h: f64, direction: f64) -> f64 {
    if delta_h * direction >= 0.0 {
        1.0
    } else {
        -1.0
    }
}

/// sum_i nu_i ln phi_i of `reaction` in the gas of `flows` at `temperature_k` and
/// `pressure_pa` as a Peng-Robinson gas ([`crate::thermo::peng_robinson`], every species
/// present), the term that turns [`ln_quotient`] into the quotient of fugacities:
/// sum nu ln(phi y P/P0) = ln Q + this. An error names a species present without critical
/// constants.
pub fn ln_fugacity_coefficient_term(
    db: &SpeciesDb,
    reaction: &Reaction,
    flows: &[f64],
    temperature_k: f64,
    pressure_pa: f64,
) -> Result<f64> {
    use crate::thermo::peng_robinson::{evaluate, PrComponent};
    let mut comps = Vec::new();
    let mut amounts = Vec::new();
    let mut index = vec![usize::MAX; db.len()];
    for (i, &n) in flows.iter().enumerate() {
        if n > 0.0 {
            let sp = db.by_index(i);
            let c = sp.critical.as_ref().ok_or_else(|| Error::InvalidValue {
                field: format!("critical constants of {}", sp.name),
                value: "none".into(),
                reason: "the gas model peng-robinson needs them for every species present".into(),
            })?;
            index[i] = comps.len();
            comps.push(PrComponent::new(c));
            amounts.push(n);
        }
    }
    let mut ln_phi = vec![0.0; comps.len()];
    evaluate(&comps, &amounts, temperature_k, pressure_pa, &mut ln_phi)?;
    let mut term = 0.0;
    for (i, nu) in &reaction.stoichiometry {
        match index.get(*i) {
            Some(&k) if k != usize::MAX => term += nu * ln_phi[k],
            _ => {
                return Err(Error::InvalidValue {
                    field: format!("flow of {} for {}", db.by_index(*i).name, reaction.name),
                    value: "0 mol/s".into(),
                    reason: "every species of the reaction must be present".into(),
                })
            }
        }
    }
    Ok(term)
}

/// ln Q = sum nu ln(y P / P0) of a gas reaction at the given flows (mol/s, one per database
/// species) and pressure (Pa). An error when a species of the reaction is absent (ln Q is not
/// finite) or the flows do not match the database.
pub fn ln_quotient(
    db: &SpeciesDb,
    reaction: &Reaction,
    flows: &[f64],
    pressure_pa: f64,
) -> Result<f64> {
    if flows.len() != db.len() {
        return Err(Error::InvalidValue {
            field: "flows".into(),
            value: format!("{} flows", flows.len()),
            reason: format!("expected one flow per database species ({})", db.len()),
        });
    }
    let total: f64 = flows.iter().sum();
    let ln_p = (pressure_pa / STANDARD_PRESSURE_PA).ln();
    let mut ln_q = 0.0;
    for (i, nu) in &reaction.stoichiometry {
        let n = flows[*i];
        if !(n > 0.0 && n.is_finite() && total.is_finite() && ln_p.is_finite()) {
            return Err(Error::InvalidValue {
                field: format!("flow of {} for {}", db.by_index(*i).name, reaction.name),
                value: format!("{n} mol/s at {pressure_pa} Pa"),
                reason: "every species of the reaction must be present, with a finite positive \
                         pressure, for its quotient to be defined"
                    .into(),
            });
        }
        ln_q += nu * ((n / total).ln() + ln_p);
    }
    Ok(ln_q)
}

/// The temperature (K) inside `bracket_k` at which the reaction's equilibrium constant equals
/// the quotient: ln K(T) = `ln_q`. ln K is monotone where dH keeps its sign; the ends of the
/// bracket must straddle the root and lie inside the data range of the reaction's species.
pub fn equilibrium_temperature(
    db: &SpeciesDb,
    reaction: &Reaction,
    ln_q: f64,
    bracket_k: (f64, f64),
) -> Result<f64> {
    let (lo, hi) = bracket_k;
    let bad = |reason: String| Error::InvalidValue {
        field: format!("equilibrium temperature of {}", reaction.name),
        value: format!("ln Q {ln_q}, bracket {lo}-{hi} K"),
        reason,
    };
    if !(ln_q.is_finite() && lo.is_finite() && hi.is_finite() && lo > 0.0 && lo < hi) {
        return Err(bad(
            "ln Q must be finite and the bracket positive and increasing".into(),
        ));
    }
    for (i, _) in &reaction.stoichiometry {
        let sp = db.by_index(*i);
        sp.check_range(lo)?;
        sp.check_range(hi)?;
    }
    // ln K(T) - ln Q and its slope dH/(R T^2) = (sum nu H/RT) / T.
    let gap = |t: f64| -> (f64, f64) {
        let (mut g, mut h) = (0.0, 0.0);
        for (i, nu) in &reaction.stoichiometry {
            let nasa = &db.by_index(*i).nasa7;
            g += nu * nasa.g_rt(t);
            h += nu * nasa.h_rt(t);
        }
        (-g - ln_q, h / t)
    };
    let (at_lo, at_hi) = (gap(lo).0, gap(hi).0);
    if at_lo == 0.0 {
        return Ok(lo);
    }
    if at_hi == 0.0 {
        return Ok(hi);
    }
    if at_lo.signum() == at_hi.signum() {
        return Err(bad(format!(
            "ln K - ln Q has the same sign at both ends ({at_lo:.4e}, {at_hi:.4e}): the \
             equilibrium temperature lies outside the bracket"
        )));
    }
    // Searched as an increasing function: ln K - ln Q for an endothermic reaction, its
    // negative for an exothermic one.
    let sign = if at_hi > at_lo { 1.0 } else { -1.0 };
    let options = RootOptions {
        residual_tolerance: QUOTIENT_TOLERANCE,
        step_tolerance: 1e-10,
        max_iterations: 100,
    };
    let r = root::solve_increasing(lo, hi, 0.5 * (lo + hi), options, |t| {
        let (v, slope) = gap(t);
        Ok::<_, Error>(Evaluation {
            value: sign * v,
            slope: Some(sign * slope),
        })
    })?;
    match r.termination {
        Termination::Converged => Ok(r.x),
        // Round-off floor of ln K: the bracket is shorter than 1e-10 K.
        Termination::BracketNarrowed if r.residual <= 1e3 * QUOTIENT_TOLERANCE => Ok(r.x),
        termination => Err(Error::NotConverged {
            what: format!("equilibrium temperature of {}", reaction.name),
            iterations: r.iterations,
            residual: r.residual,
            hint: format!("; the search stopped: {termination}"),
        }),
    }
}

/// The approach temperature (K) that a measured quotient means at stream temperature
/// `temperature_k`: dT = s (T - T_eq) with ln K(T_eq) = `ln_q` ([`equilibrium_temperature`] in
/// `bracket_k`) and s = [`approach_sign`] of dH at the stream temperature and the running
/// `direction` (+1 as written, -1 against), as the stage takes it. An outlet the stage made at
/// approach X gives back X.
pub fn approach_from_quotient(
    db: &SpeciesDb,
    reaction: &Reaction,
    ln_q: f64,
    temperature_k: f64,
    direction: f64,
    bracket_k: (f64, f64),
) -> Result<f64> {
    let t_eq = equilibrium_temperature(db, reaction, ln_q, bracket_k)?;
    let delta_h = reaction.delta_h(db, temperature_k)?;
    let s = approach_sign(delta_h, direction);
    Ok(s * (temperature_k - t_eq))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::equilibrium::{Direction, EnergyMode, EquilibriumStage, StageInlet, StageReaction};

    fn db() -> SpeciesDb {
        SpeciesDb::embedded().unwrap()
    }

    fn flows(db: &SpeciesDb, pairs: &[(&str, f64)]) -> Vec<f64> {
        let mut v = vec![0.0; db.len()];
        for (name, n) in pairs {
            v[db.index_of(name).unwrap()] = *n;
        }
        v
    }

    #[test]
    fn the_sign_follows_the_heat_of_the_running_direction() {
        // Design convention: s = +1 endothermic direction, -1 exothermic direction. Reforming
        // dH298 = +206.17 kJ/mol, shift -41.17 kJ/mol (NIST-JANAF, Chase 1998).
        assert_eq!(approach_sign(206.17e3, 1.0), 1.0);
        assert_eq!(approach_sign(206.17e3, -1.0), -1.0);
        assert_eq!(approach_sign(-41.17e3, 1.0), -1.0);
        assert_eq!(approach_sign(-41.17e3, -1.0), 1.0);
    }

    #[test]
    fn k_equals_one_at_the_published_temperatures() {
        // NIST-JANAF (Chase 1998), derived: shift K = 1 near 1097 K, reforming K = 1 near 892 K
        // (within 3 K, as in the JANAF data checks of the species records).
        let db = db();
        for (name, published, bracket) in [
            ("shift", 1097.0, (700.0, 1500.0)),
            ("reforming", 892.0, (600.0, 1200.0)),
        ] {
            let r = Reaction::named(&db, name).unwrap();
            let t = equilibrium_temperature(&db, &r, 0.0, bracket).unwrap();
            assert!((t - published).abs() < 3.0, "{name}: {t}");
            // ln K there from the reaction module's own path (Gibbs energies with range checks).
            assert!(r.ln_k(&db, t).unwrap().abs() < 1e-11, "{name}");
        }
    }

    #[test]
    fn a_quotient_outside_the_bracket_is_an_error() {
        let db = db();
        let shift = Reaction::named(&db, "shift").unwrap();
        // ln K of shift is positive below 1097 K, so ln Q = 5 (K = 148) lies far below 700 K.
        assert!(equilibrium_temperature(&db, &shift, 5.0, (700.0, 1500.0)).is_err());
        assert!(equilibrium_temperature(&db, &shift, f64::NAN, (700.0, 1500.0)).is_err());
        assert!(equilibrium_temperature(&db, &shift, 0.0, (1500.0, 700.0)).is_err());
        // Outside the species data (200-6000 K at most): refused, not extrapolated.
        assert!(equilibrium_temperature(&db, &shift, 0.0, (100.0, 1500.0)).is_err());
        let empty = vec![0.0; db.len()];
        assert!(ln_quotient(&db, &shift, &empty, 1e5).is_err());
    }

    /// Solve a stage at the given approaches, read every approach back from the outlet.
    fn round_trip(
        db: &SpeciesDb,
        reactions: &[(&str, Direction)],
        approaches: &[f64],
        inlet: StageInlet<'_>,
        mode: EnergyMode,
    ) {
        let stage = EquilibriumStage::new(
            db,
            reactions
                .iter()
                .zip(approaches)
                .map(|((name, direction), a)| StageReaction {
                    reaction: Reaction::named(db, name).unwrap(),
                    approach_k: *a,
                    direction: *direction,
                })
                .collect(),
        )
        .unwrap();
        let r = stage.solve(db, inlet, mode, None).unwrap();
        assert!(r.converged());
        let t = r.outlet_temperature_k;
        for (j, sr) in stage.reactions().iter().enumerate() {
            let ln_q = ln_quotient(db, &sr.reaction, &r.outlet_flows, inlet.pressure_pa).unwrap();
            // The running direction the stage used: s_j = approach_sign(dH(T), direction).
            let dh = sr.reaction.delta_h(db, t).unwrap();
            let direction = r.approach_signs[j] * dh.signum();
            let back =
                approach_from_quotient(db, &sr.reaction, ln_q, t, direction, (400.0, 1500.0))
                    .unwrap();
            // Equilibrium residual 1e-10 in ln space over d lnK/dT of 1e-3..3e-2 per K: the
            // approach comes back within about 1e-7 K; 1e-6 K leaves room.
            assert!(
                (back - approaches[j]).abs() < 1e-6,
                "{}: {back} for {} ({mode:?})",
                sr.reaction.name,
                approaches[j]
            );
        }
    }

    #[test]
    fn an_outlet_made_at_an_approach_gives_that_approach_back() {
        let db = db();
        // Reformer (invented feed, S/C 3) at 860 degC and 25 bar, reforming forward.
        let feed = flows(
            &db,
            &[("CH4", 1.0), ("H2O", 3.0), ("CO2", 0.01), ("N2", 0.02)],
        );
        let inlet = StageInlet {
            flows: &feed,
            temperature_k: 800.0,
            pressure_pa: 25e5,
        };
        let fixed = EnergyMode::FixedTemperature {
            temperature_k: 1133.15,
        };
        for (reforming, shift) in [(0.0, 0.0), (10.0, 0.0), (25.0, -5.0), (-8.0, 12.0)] {
            round_trip(
                &db,
                &[
                    ("reforming", Direction::Forward),
                    ("shift", Direction::Auto),
                ],
                &[reforming, shift],
                inlet,
                fixed,
            );
        }
        // High-temperature shift from 350 degC, adiabatic (invented gas).
        let gas = flows(
            &db,
            &[
                ("H2", 0.49),
                ("CO", 0.105),
                ("CO2", 0.055),
                ("CH4", 0.035),
                ("H2O", 0.31),
                ("N2", 0.005),
            ],
        );
        let hts = StageInlet {
            flows: &gas,
            temperature_k: 623.15,
            pressure_pa: 27e5,
        };
        for approach in [0.0, 5.0, 20.0, -10.0] {
            round_trip(
                &db,
                &[("shift", Direction::Auto)],
                &[approach],
                hts,
                EnergyMode::Adiabatic,
            );
        }
    }
}

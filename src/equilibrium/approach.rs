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

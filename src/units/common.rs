//! Helpers shared by the unit operations: inlet and spec checks, energy balances on a fixed
//! composition (safeguarded Newton's method on temperature with the exact derivative
//! dH/dT = sum n_i Cp_i), the water dew point (IAPWS-IF97 saturation line), approach lists, and
//! figure building.

use super::{Figure, FigureKind, Stream, StreamPhase, Warning};
use crate::equilibrium::root::{self, Evaluation, RootOptions, Termination};
use crate::equilibrium::{Direction, EquilibriumStage, StageReaction, StageResult};
use crate::error::{Error, Result, ResultExt};
use crate::quantity::{kelvin_to_degc, R_GAS};
use crate::reaction::{organic_carbon_atoms, Reaction};
use crate::thermo::{water, Phase, SpeciesDb};

/// Database indices of the species the units look at by name.
#[derive(Debug, Clone)]
pub(crate) struct Key {
    pub h2o: usize,
    pub h2: usize,
    pub co: usize,
    pub co2: usize,
    pub ch4: usize,
    /// Species holding organic carbon (every gas with carbon other than CO and CO2):
    /// (index, carbon atoms).
    pub organic: Vec<(usize, f64)>,
    /// Carbon-bearing gases other than CH4, CO and CO2 (what a reformer may have to convert).
    pub other_carbon: Vec<usize>,
}

impl Key {
    pub(crate) fn new(db: &SpeciesDb, unit: &str) -> Result<Key> {
        let ctx = format!(" (needed by unit '{unit}')");
        Ok(Key {
            h2o: db.require("H2O", &ctx)?,
            h2: db.require("H2", &ctx)?,
            co: db.require("CO", &ctx)?,
            co2: db.require("CO2", &ctx)?,
            ch4: db.require("CH4", &ctx)?,
            organic: db
                .all()
                .iter()
                .enumerate()
                .map(|(i, s)| (i, organic_carbon_atoms(s)))
                .filter(|(_, c)| *c > 0.0)
                .collect(),
            other_carbon: db
                .all()
                .iter()
                .enumerate()
                .filter(|(_, s)| {
                    s.phase == Phase::Gas
                        && s.atoms("C") > 0.0
                        && !matches!(s.name.as_str(), "CH4" | "CO" | "CO2")
                })
                .map(|(i, _)| i)
                .collect(),
        })
    }

    /// Organic carbon (carbon in every gas species but CO and CO2), mol/s.
    pub(crate) fn organic_carbon(&self, flows: &[f64]) -> f64 {
        self.organic.iter().map(|(i, c)| flows[*i] * c).sum()
    }

    /// Steam-to-carbon ratio, H2O / organic carbon (None without organic carbon).
    pub(crate) fn steam_to_carbon(&self, flows: &[f64]) -> Option<f64> {
        let c = self.organic_carbon(flows);
        (c > 0.0).then(|| flows[self.h2o] / c)
    }
}

/// A spec error naming the unit and the field.
pub(crate) fn spec_error(unit: &str, field: &str, reason: impl Into<String>) -> Error {
    Error::UnitSpec {
        unit: unit.to_string(),
        field: field.to_string(),
        reason: reason.into(),
    }
}

/// Check the number of inlets and that each is a well-formed stream for this database.
pub(crate) fn check_inlets(
    db: &SpeciesDb,
    unit: &str,
    type_name: &str,
    inlets: &[&Stream],
    min: usize,
    max: Option<usize>,
) -> Result<()> {
    let n = inlets.len();
    if n < min || max.is_some_and(|m| n > m) {
        let wanted = match max {
            Some(m) if m == min => format!("exactly {min}"),
            Some(m) => format!("{min} to {m}"),
            None => format!("at least {min}"),
        };
        return Err(spec_error(
            unit,
            "inlets",
            format!("a {type_name} takes {wanted} inlet stream(s), {n} given"),
        ));
    }
    for (k, s) in inlets.iter().enumerate() {
        // Named only when there is something to say (no allocation on the normal path).
        let field = || format!("inlet {}", k + 1);
        if s.flows.len() != db.len() {
            return Err(spec_error(
                unit,
                &field(),
                format!(
                    "has {} flows, expected one per database species ({})",
                    s.flows.len(),
                    db.len()
                ),
            ));
        }
        // One branch-free pass: a negative flow shows in the smallest, one that is not finite
        // in the sum (NaN and infinities propagate); the culprit is looked for only then.
        let (mut total, mut smallest) = (0.0f64, 0.0f64);
        for &v in &s.flows {
            total += v;
            smallest = if v < smallest { v } else { smallest };
        }
        let suspect = !(smallest >= 0.0 && total.is_finite());
        if let Some((i, v)) = suspect
            .then(|| {
                s.flows
                    .iter()
                    .enumerate()
                    .find(|(_, v)| !(v.is_finite() && **v >= 0.0))
            })
            .flatten()
        {
            return Err(spec_error(
                unit,
                &field(),
                format!(
                    "flow of {} is {v} mol/s; flows must be finite and non-negative",
                    db.by_index(i).name
                ),
            ));
        }
        if !(s.temperature_k.is_finite() && s.temperature_k > 0.0) {
            return Err(spec_error(
                unit,
                &field(),
                format!("temperature {} K must be positive", s.temperature_k),
            ));
        }
        if !(s.pressure_pa.is_finite() && s.pressure_pa > 0.0) {
            return Err(spec_error(
                unit,
                &field(),
                format!("pressure {} Pa must be positive", s.pressure_pa),
            ));
        }
    }
    Ok(())
}

/// Refuse liquid inlets and solids in units that work on the gas only.
pub(crate) fn require_vapour(db: &SpeciesDb, unit: &str, inlets: &[&Stream]) -> Result<()> {
    for (k, s) in inlets.iter().enumerate() {
        if s.phase == StreamPhase::Liquid {
            return Err(spec_error(
                unit,
                &format!("inlet {}", k + 1),
                "is liquid water; this unit takes vapour only: raise it to steam in a heater \
                 (to a temperature above its saturation temperature) or mix it into hot gas in \
                 a mixer first",
            ));
        }
        if let Some((i, _)) = s
            .flows
            .iter()
            .enumerate()
            .find(|(i, v)| **v > 0.0 && db.by_index(*i).phase != Phase::Gas)
        {
            return Err(spec_error(
                unit,
                &format!("inlet {}", k + 1),
                format!(
                    "carries the solid {}; process streams are gas only",
                    db.by_index(i).name
                ),
            ));
        }
    }
    Ok(())
}

/// Outlet pressure after a pressure drop; the drop must be finite, non-negative and leave P > 0.
pub(crate) fn outlet_pressure(unit: &str, inlet_pa: f64, drop_pa: f64) -> Result<f64> {
    check_pressure_drop(unit, drop_pa)?;
    let p = inlet_pa - drop_pa;
    if p > 0.0 {
        Ok(p)
    } else {
        Err(spec_error(
            unit,
            "pressure-drop",
            format!(
                "{:.4} bar is not less than the inlet pressure {:.4} bar; give a smaller drop",
                drop_pa / 1e5,
                inlet_pa / 1e5
            ),
        ))
    }
}

/// A pressure drop must be finite and not negative (checked when a unit is prepared).
pub(crate) fn check_pressure_drop(unit: &str, drop_pa: f64) -> Result<()> {
    if drop_pa.is_finite() && drop_pa >= 0.0 {
        Ok(())
    } else {
        Err(spec_error(
            unit,
            "pressure-drop",
            format!("{drop_pa} Pa must be finite and not negative"),
        ))
    }
}

/// The single vapour inlet of a reactor and its outlet pressure after `drop_pa`.
pub(crate) fn reactor_inlet<'a>(
    db: &SpeciesDb,
    unit: &str,
    type_name: &str,
    inlets: &[&'a Stream],
    drop_pa: f64,
) -> Result<(&'a Stream, f64)> {
    check_inlets(db, unit, type_name, inlets, 1, Some(1))?;
    require_vapour(db, unit, inlets)?;
    let inlet = inlets[0];
    refuse_oxygen(db, unit, inlet)?;
    Ok((inlet, outlet_pressure(unit, inlet.pressure_pa, drop_pa)?))
}

/// Refuse free oxygen (any gas of oxygen atoms alone, O2 above all) in the inlet of a catalytic
/// reactor: its reactions have no oxidation, so the oxygen would pass through beside the
/// hydrogen, a mixture that burns. An oxidising reformer is a unit of its own.
pub(crate) fn refuse_oxygen(db: &SpeciesDb, unit: &str, inlet: &Stream) -> Result<()> {
    let total = inlet.total();
    for (i, n) in inlet.flows.iter().enumerate() {
        let s = db.by_index(i);
        let oxidant = s.phase == Phase::Gas && s.elements.iter().all(|(e, _)| e == "O");
        if *n > 0.0 && oxidant {
            return Err(spec_error(
                unit,
                "inlet",
                format!(
                    "carries free oxygen: {} is {:.6} mol % ({:.1} ppm) of the inlet. The \
                     catalytic reactors model no oxidation, so it would pass through beside the \
                     hydrogen; remove it upstream (an oxidising reformer is a separate unit)",
                    s.name,
                    100.0 * n / total,
                    1e6 * n / total
                ),
            ));
        }
    }
    Ok(())
}

/// Temperature range (K) in which every species with a non-zero flow has data.
pub(crate) fn data_range(db: &SpeciesDb, flows: &[f64]) -> (f64, f64) {
    let mut lo: f64 = 0.0;
    let mut hi: f64 = f64::INFINITY;
    for (i, n) in flows.iter().enumerate() {
        if *n != 0.0 {
            let nasa = &db.by_index(i).nasa7;
            lo = lo.max(nasa.t_min_k);
            hi = hi.min(nasa.t_max_k);
        }
    }
    (lo, hi)
}

/// Error unless `t` is inside the data range of every species present (no extrapolation).
pub(crate) fn check_temperature(
    db: &SpeciesDb,
    unit: &str,
    field: &str,
    flows: &[f64],
    t: f64,
) -> Result<()> {
    let (lo, hi) = data_range(db, flows);
    if t.is_finite() && t >= lo && t <= hi {
        Ok(())
    } else {
        Err(spec_error(
            unit,
            field,
            format!(
                "{t:.2} K ({:.2} degC) is outside the species data range {lo:.2}-{hi:.2} K of \
                 this stream (no extrapolation is done)",
                kelvin_to_degc(t)
            ),
        ))
    }
}

/// Enthalpy (W) and heat capacity (W/K) of a fixed composition at `t` (no range check).
fn enthalpy_and_cp(db: &SpeciesDb, flows: &[f64], t: f64) -> (f64, f64) {
    let (mut h, mut cp) = (0.0, 0.0);
    for (i, n) in flows.iter().enumerate() {
        if *n != 0.0 {
            let nasa = &db.by_index(i).nasa7;
            h += n * nasa.h_rt(t);
            cp += n * nasa.cp_r(t);
        }
    }
    (h * R_GAS * t, cp * R_GAS)
}

/// Largest energy residual |H(T) - target| / (n R T_start) of a fixed-composition energy
/// balance (about 2e-11 K of temperature; the enthalpy itself is exact to round-off).
const FIXED_COMPOSITION_ENERGY_TOLERANCE: f64 = 1e-13;

/// Temperature (K) at which a fixed vapour composition has enthalpy `target_w`, by the
/// safeguarded Newton search of [`root::solve_increasing`] with dH/dT = sum n_i Cp_i inside the
/// data range, on the residual (H(T) - target) / (n R T_start).
pub(crate) fn temperature_at_enthalpy(
    db: &SpeciesDb,
    unit: &str,
    flows: &[f64],
    target_w: f64,
    start_k: f64,
) -> Result<f64> {
    let (lo, hi) = data_range(db, flows);
    let total: f64 = flows.iter().sum();
    if total <= 0.0 {
        return Ok(start_k);
    }
    let reference_k = if start_k.is_finite() && start_k > 0.0 {
        start_k
    } else {
        hi
    };
    let scale = total * R_GAS * reference_k;
    let options = RootOptions {
        residual_tolerance: FIXED_COMPOSITION_ENERGY_TOLERANCE,
        step_tolerance: 1e-11,
        max_iterations: 100,
    };
    let root = root::solve_increasing(lo, hi, reference_k, options, |t| {
        let (h, cp) = enthalpy_and_cp(db, flows, t);
        Ok::<_, Error>(Evaluation {
            value: (h - target_w) / scale,
            slope: Some(cp / scale),
        })
    })?;
    let outside = |side: &str| {
        spec_error(
            unit,
            "energy balance",
            format!(
                "the outlet temperature would lie {side} the species data range \
                 {lo:.2}-{hi:.2} K (no extrapolation is done); check the duty"
            ),
        )
    };
    match root.termination {
        Termination::RootAboveBracket => Err(outside("above")),
        Termination::RootBelowBracket => Err(outside("below")),
        _ if root.within(FIXED_COMPOSITION_ENERGY_TOLERANCE) => Ok(root.x),
        termination => Err(Error::NotConverged {
            what: format!("energy balance of unit '{unit}'"),
            iterations: root.iterations,
            residual: root.residual,
            hint: format!("; the temperature search stopped: {termination}"),
        }),
    }
}

/// Enthalpy of a set of streams, W.
pub(crate) fn enthalpy_sum(db: &SpeciesDb, streams: &[&Stream]) -> Result<f64> {
    let mut h = 0.0;
    for s in streams {
        h += s.enthalpy_w(db)?;
    }
    Ok(h)
}

/// Water dew point of a vapour stream at its own pressure, K (None when the water partial
/// pressure lies below the triple point or above the critical pressure, or there is no water).
pub(crate) fn dew_point_k(key: &Key, flows: &[f64], pressure_pa: f64) -> Option<f64> {
    let total: f64 = flows.iter().sum();
    if total <= 0.0 {
        return None;
    }
    let p_w = flows[key.h2o] / total * pressure_pa;
    // The range of the saturation line checked here rather than through the error of
    // `saturation_temperature_k`, which would be built (and allocated) only to be dropped.
    if !(water::SATURATION_MIN_PRESSURE_PA..=water::CRITICAL_PRESSURE_PA).contains(&p_w) {
        return None;
    }
    water::saturation_temperature_k(p_w).ok()
}

/// Mole fraction on a dry basis (water left out) of species `i`.
pub(crate) fn dry_fraction(key: &Key, flows: &[f64], i: usize) -> f64 {
    crate::thermo::mixture::dry_mole_fraction(flows, Some(key.h2o), i)
}

/// Approach temperature of each of `allowed` reactions from a (name, K) list; unknown names,
/// repeats and non-finite values are errors naming the unit.
pub(crate) fn resolve_approaches(
    unit: &str,
    given: &[(String, f64)],
    allowed: &[&str],
) -> Result<Vec<f64>> {
    let mut out = vec![0.0; allowed.len()];
    let mut seen = vec![false; allowed.len()];
    for (name, value) in given {
        let Some(j) = allowed.iter().position(|a| a == name) else {
            return Err(spec_error(
                unit,
                "approach",
                format!(
                    "reaction '{name}' is not part of this unit; its reactions are: {}",
                    allowed.join(", ")
                ),
            ));
        };
        if seen[j] {
            return Err(spec_error(
                unit,
                "approach",
                format!("reaction '{name}' is given twice"),
            ));
        }
        if !value.is_finite() {
            return Err(spec_error(
                unit,
                "approach",
                format!("{name}: {value} K must be a finite temperature difference"),
            ));
        }
        seen[j] = true;
        out[j] = *value;
    }
    Ok(out)
}

/// The equilibrium stage of a unit: the named reactions with their approaches (K) and
/// directions, errors naming the unit.
pub(crate) fn build_stage(
    db: &SpeciesDb,
    unit: &str,
    reactions: &[&str],
    approaches: &[f64],
    directions: &[Direction],
) -> Result<EquilibriumStage> {
    let mut list = Vec::with_capacity(reactions.len());
    for ((r, a), d) in reactions.iter().zip(approaches).zip(directions) {
        list.push(StageReaction {
            reaction: Reaction::named(db, r)?,
            approach_k: *a,
            direction: *d,
        });
    }
    EquilibriumStage::new(db, list).context(|| format!("unit '{unit}'"))
}

/// Solve a stage into `r` with stage work memory `ws` and the solver `options`; errors and an
/// unconverged result are reported with the unit's name.
#[allow(clippy::too_many_arguments)]
pub(crate) fn run_stage_into(
    stage: &EquilibriumStage,
    db: &SpeciesDb,
    unit: &str,
    inlet: crate::equilibrium::StageInlet<'_>,
    mode: crate::equilibrium::EnergyMode,
    guess: Option<&[f64]>,
    approaches_k: Option<&[f64]>,
    options: &crate::equilibrium::SolverOptions,
    ws: &mut crate::equilibrium::StageWorkspace,
    r: &mut StageResult,
) -> Result<()> {
    let settings = crate::equilibrium::SolveSettings {
        guess,
        approaches_k,
        options: *options,
    };
    stage
        .solve_into(db, inlet, mode, settings, ws, r)
        .map_err(|e| e.context(format!("unit '{unit}'")))?;
    if !r.converged() {
        return Err(Error::NotConverged {
            what: "equilibrium stage".into(),
            iterations: r.iterations,
            residual: r.max_residual().max(r.energy_residual),
            hint: format!(
                " ({}); check the inlet composition, temperatures and approaches",
                r.termination
            ),
        }
        .context(format!("unit '{unit}'")));
    }
    Ok(())
}

/// Warnings for the reactions a stage could not run at all (a species on each side absent and
/// not formable: a reformer without steam, a shift converter without CO and steam).
pub(crate) fn frozen_warnings(
    unit: &str,
    stage: &EquilibriumStage,
    result: &StageResult,
    warnings: &mut Vec<Warning>,
) {
    for (r, frozen) in stage.reactions().iter().zip(&result.frozen) {
        if *frozen {
            warnings.push(
                Warning::new(
                    "reaction-frozen",
                    "reaction {subject} cannot proceed (a species on each side is absent from \
                     the inlet); it was left unreacted",
                )
                .subject(r.reaction.name.as_str())
                .for_unit(unit),
            );
        }
    }
}

/// The (reaction name, approach) pairs a stage used.
pub(crate) fn stage_approaches(
    reactions: &'static [&'static str],
    stage: &EquilibriumStage,
    approaches_k: Option<&[f64]>,
    out: &mut Vec<(&'static str, f64)>,
) {
    out.clear();
    out.extend(
        reactions
            .iter()
            .zip(stage.reactions())
            .enumerate()
            .map(|(j, (name, r))| (*name, approaches_k.map_or(r.approach_k, |a| a[j]))),
    );
}

/// A figure.
pub(crate) fn figure(
    key: &'static str,
    label: &'static str,
    value: f64,
    kind: FigureKind,
) -> Figure {
    Figure {
        key,
        label,
        value,
        kind,
    }
}

/// A temperature for messages: "412.3 degC".
pub(crate) fn degc(t_k: f64) -> String {
    format!("{:.1} degC", kelvin_to_degc(t_k))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::units::test_support::{db, flows};

    #[test]
    fn newton_on_temperature_inverts_the_enthalpy() {
        let db = db();
        let n = flows(&db, &[("H2", 3.0), ("CO", 1.0), ("H2O", 2.0)]);
        let h = crate::thermo::mixture::enthalpy(&db, &n, 812.34).unwrap();
        let t = temperature_at_enthalpy(&db, "u", &n, h, 400.0).unwrap();
        assert!((t - 812.34).abs() < 1e-9);
        // From a start far on the other side, and from a start outside the data range.
        for start in [2900.0, 250.0, 1e5, f64::NAN] {
            let t = temperature_at_enthalpy(&db, "u", &n, h, start).unwrap();
            assert!((t - 812.34).abs() < 1e-9, "from {start}: {t}");
        }
        // Outside the data range (200-3000 K here, data/species.yaml) is an error naming the
        // side, not an extrapolation.
        let h_top = crate::thermo::mixture::enthalpy(&db, &n, 3000.0).unwrap();
        let h_bottom = crate::thermo::mixture::enthalpy(&db, &n, 200.0).unwrap();
        let above = temperature_at_enthalpy(&db, "u", &n, h_top + 1.0, 400.0).unwrap_err();
        assert!(
            above.to_string().contains("above the species data range"),
            "{above}"
        );
        let below = temperature_at_enthalpy(&db, "u", &n, h_bottom - 1.0, 400.0).unwrap_err();
        assert!(
            below.to_string().contains("below the species data range"),
            "{below}"
        );
    }

    #[test]
    fn dew_point_follows_the_saturation_line() {
        // IAPWS-IF97 Table 36: T_s(0.1 MPa) = 372.755919 K; water at 0.1 MPa partial pressure.
        let db = db();
        let key = Key::new(&db, "u").unwrap();
        let n = flows(&db, &[("H2", 1.0), ("H2O", 1.0)]);
        let t = dew_point_k(&key, &n, 2.0e5).unwrap();
        assert!((t - 372.755_919).abs() < 1e-6);
        assert!(dew_point_k(&key, &flows(&db, &[("H2", 1.0)]), 2.0e5).is_none());
    }

    #[test]
    fn approaches_are_checked() {
        let a = resolve_approaches("r", &[("shift".into(), 5.0)], &["reforming", "shift"]);
        assert_eq!(a.unwrap(), vec![0.0, 5.0]);
        let e = resolve_approaches("r", &[("shfit".into(), 5.0)], &["reforming", "shift"]);
        assert!(e.unwrap_err().to_string().contains("unit 'r'"));
        assert!(resolve_approaches("r", &[("shift".into(), f64::NAN)], &["shift"]).is_err());
        assert!(outlet_pressure("r", 1e5, 2e5).is_err());
        assert!(outlet_pressure("r", 1e5, -1.0).is_err());
    }
}

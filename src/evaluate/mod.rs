//! Laboratory samples of reactor outlets held against equilibrium: the approach temperature of
//! each reaction that a measured analysis means, and its trend over months of samples.
//!
//! For each sample the unit's inlet is the flowsheet's own (the compiled flowsheet solved at
//! its file values; the stage's inlet is its outlet less the reactions' extents, so a reformer's
//! complete conversion of the higher hydrocarbons is included), or the measured inlet where the
//! sample gives one. The wet outlet is rebuilt from that inlet by the unit's reactions, their
//! extents fitted to the dry analysis by weighted least squares ([`fit`]); each reaction's
//! approach then comes from its reaction quotient at the measured outlet temperature and
//! pressure, by the functions and sign convention of the solver
//! ([`crate::equilibrium::approach`]): an outlet the solver made at approach X gives back X.
//! The gas model is the one the unit was solved with (the flowsheet's `gas-model`, or the
//! unit's own): for Peng-Robinson the approach is where sum nu ln(phi y P/P0) = ln K(T_eq),
//! with phi of the reconciled outlet at the measured temperature and pressure.
//!
//! Dated samples make trends and, with a limit on a result, the date at which the flowsheet
//! along the trend crosses it ([`forecast`]): an extrapolation.

pub mod fit;
pub mod forecast;
pub mod plot;
pub mod samples;

pub use fit::{ExtentFit, GrossError, Measurement};
pub use forecast::{Crossing, ExponentialTrend, Limit, LinearTrend, Trend};
pub use samples::{MeasuredInlet, Sample};

use crate::diagnostics::{FigureKind, Warning};
use crate::equilibrium::approach::{
    approach_from_quotient, ln_fugacity_coefficient_term, ln_quotient,
};
use crate::error::{Error, Result};
use crate::flowsheet::{Flowsheet, FlowsheetResult};
use crate::reaction::{organic_carbon_atoms, Reaction};
use crate::thermo::{GasModel, SpeciesDb};

/// Analyser accuracy assumed per species, absolute mol % dry (common practice, from memory:
/// a process gas chromatograph reads the main components to a few tenths of a mol % and an
/// infrared or low-range channel CO, CO2 and CH4 to a few hundredths). Other species: 0.05.
pub const DEFAULT_ACCURACY_PCT: [(&str, f64); 6] = [
    ("H2", 0.3),
    ("CO", 0.02),
    ("CO2", 0.05),
    ("CH4", 0.02),
    ("N2", 0.05),
    ("Ar", 0.02),
];

/// Accuracy of species not in [`DEFAULT_ACCURACY_PCT`], mol % dry.
pub const OTHER_ACCURACY_PCT: f64 = 0.05;

/// A species of a reaction's quotient measured below this is flagged, mol % dry (common
/// practice, from memory: about 50 ppm for a process chromatograph without a trace channel).
pub const DETECTION_LIMIT_PCT: f64 = 0.005;

/// An approach more negative than this is flagged, K (common practice: a degree or so either
/// side of zero is within the usual error of an outlet thermocouple and an analysis).
pub const NEGATIVE_APPROACH_MARGIN_K: f64 = 1.0;

/// Temperatures searched for a reaction's equilibrium temperature, K (inside every species
/// record's range, which covers at least 300-1500 K).
pub const EQUILIBRIUM_SEARCH_K: (f64, f64) = (300.0, 1500.0);

/// How samples are evaluated.
#[derive(Debug, Clone, PartialEq)]
pub struct Options {
    /// Analyser accuracy set by the user: (species index, absolute mol % dry); these replace the
    /// defaults.
    pub accuracy_pct: Vec<(usize, f64)>,
    /// A limit to forecast the crossing of.
    pub limit: Option<Limit>,
    /// How far past the last sample the forecast looks, days.
    pub horizon_days: f64,
}

impl Default for Options {
    fn default() -> Options {
        Options {
            accuracy_pct: Vec::new(),
            limit: None,
            horizon_days: 3650.0,
        }
    }
}

impl Options {
    /// The accuracy used for species `i`, mol % dry.
    pub fn accuracy(&self, db: &SpeciesDb, i: usize) -> f64 {
        if let Some((_, a)) = self.accuracy_pct.iter().find(|(k, _)| *k == i) {
            return *a;
        }
        let name = &db.by_index(i).name;
        DEFAULT_ACCURACY_PCT
            .iter()
            .find(|(s, _)| s == name)
            .map_or(OTHER_ACCURACY_PCT, |(_, a)| *a)
    }

    /// Read `SPECIES=ABS_MOL_PCT` (`--accuracy CO=0.01`) into the options.
    pub fn add_accuracy(&mut self, db: &SpeciesDb, text: &str) -> Result<()> {
        let bad = |reason: String| Error::InvalidValue {
            field: "--accuracy".into(),
            value: text.to_string(),
            reason,
        };
        let (species, value) = text
            .split_once('=')
            .ok_or_else(|| bad("write SPECIES=ABS_MOL_PCT, e.g. CO=0.02".into()))?;
        let i = db
            .index_of(species.trim())
            .ok_or_else(|| bad(format!("unknown species '{}'", species.trim())))?;
        let v: f64 = value
            .trim()
            .parse()
            .map_err(|_| bad("the accuracy must be a number of mol % dry".into()))?;
        if !(v > 0.0 && v.is_finite()) {
            return Err(bad("the accuracy must be positive".into()));
        }
        self.accuracy_pct.retain(|(k, _)| *k != i);
        self.accuracy_pct.push((i, v));
        Ok(())
    }
}

/// One sample evaluated.
#[derive(Debug, Clone, PartialEq)]
pub struct SampleResult {
    /// The sample as read.
    pub sample: Sample,
    /// "model" or "measured": where the inlet came from.
    pub inlet_source: &'static str,
    /// Approach per reaction, K (`None` where it could not be found; a warning says why).
    pub approaches_k: Vec<(String, Option<f64>)>,
    /// Fitted extent per reaction, mol/s.
    pub extents_mol_s: Vec<(String, f64)>,
    /// The measured species: (name, measured dry mol %, fitted dry mol %, accuracy).
    pub analysis: Vec<(String, f64, f64, f64)>,
    /// Sum of the measured dry mol %.
    pub analysis_total_pct: f64,
    /// The reconciled wet outlet, mol/s per database species.
    pub outlet_flows: Vec<f64>,
    /// Outlet pressure used, Pa abs.
    pub pressure_pa: f64,
    /// Gas model of the approaches: the one the unit was solved with.
    pub gas_model: GasModel,
    /// Weighted sum of squares of the fit.
    pub chi_square: f64,
    /// Warnings, as data.
    pub warnings: Vec<Warning>,
}

/// Every sample evaluated, the trends of the dated ones and the forecast crossing.
#[derive(Debug, Clone, PartialEq)]
pub struct Evaluation {
    /// The flowsheet's title.
    pub title: String,
    /// Samples in file order.
    pub samples: Vec<SampleResult>,
    /// One trend per unit and reaction with at least three dated samples.
    pub trends: Vec<Trend>,
    /// The limit's crossing, where a limit was given.
    pub crossing: Option<Crossing>,
}

/// Evaluate `samples` against `flowsheet` (solved once at its file values for the inlets).
pub fn evaluate(
    db: &SpeciesDb,
    flowsheet: &Flowsheet,
    samples: &[Sample],
    options: &Options,
) -> Result<Evaluation> {
    let model = flowsheet.solve(db)?;
    let results = samples
        .iter()
        .map(|s| evaluate_sample(db, &model, s, options))
        .collect::<Result<Vec<_>>>()?;
    let trends = trends(&results);
    let crossing = match &options.limit {
        Some(limit) => Some(forecast::crossing(
            db,
            flowsheet,
            &trends,
            limit,
            options.horizon_days,
        )?),
        None => None,
    };
    Ok(Evaluation {
        title: flowsheet.title().to_string(),
        samples: results,
        trends,
        crossing,
    })
}

/// The trend of every unit and reaction with three dated samples or more, in order of first
/// appearance.
pub fn trends(results: &[SampleResult]) -> Vec<Trend> {
    let mut keys: Vec<(String, String)> = Vec::new();
    for r in results {
        for (reaction, _) in &r.approaches_k {
            let key = (r.sample.unit.clone(), reaction.clone());
            if !keys.contains(&key) {
                keys.push(key);
            }
        }
    }
    keys.iter()
        .filter_map(|(unit, reaction)| {
            let points: Vec<(f64, f64)> = results
                .iter()
                .filter(|r| &r.sample.unit == unit)
                .filter_map(|r| {
                    let a = r.approaches_k.iter().find(|(n, _)| n == reaction)?.1?;
                    Some((r.sample.days?, a))
                })
                .collect();
            Trend::fit(unit, reaction, &points)
        })
        .collect()
}

/// Evaluate one sample against the solved flowsheet `model`.
pub fn evaluate_sample(
    db: &SpeciesDb,
    model: &FlowsheetResult,
    sample: &Sample,
    options: &Options,
) -> Result<SampleResult> {
    let context = |reason: String| Error::InvalidValue {
        field: format!(
            "sample '{}' (line {}), unit '{}'",
            sample.id, sample.line, sample.unit
        ),
        value: String::new(),
        reason,
    };
    let unit = model
        .units
        .iter()
        .find(|u| u.name == sample.unit)
        .ok_or_else(|| context("the unit is not in the solved flowsheet".into()))?;
    let stage = unit
        .result
        .equilibrium
        .as_ref()
        .ok_or_else(|| context("the unit has no equilibrium stage".into()))?;
    let reactions = unit
        .result
        .approaches
        .iter()
        .map(|(name, _)| Reaction::named(db, name))
        .collect::<Result<Vec<Reaction>>>()?;
    let outlet = unit
        .result
        .outlets
        .first()
        .ok_or_else(|| context("the unit has no outlet".into()))?;
    // The stage's inlet: its outlet less the extents (includes any complete conversion of the
    // higher hydrocarbons before the stage).
    let mut stage_inlet = stage.outlet_flows.clone();
    for (r, x) in reactions.iter().zip(&stage.extents) {
        for (i, nu) in &r.stoichiometry {
            stage_inlet[*i] -= nu * x;
        }
    }
    for v in &mut stage_inlet {
        if v.abs() < 1e-12 * stage.outlet_flows.iter().sum::<f64>() {
            *v = v.max(0.0);
        }
    }
    let (inlet, start, inlet_source) = match &sample.inlet {
        None => (stage_inlet, Some(stage.extents.clone()), "model"),
        Some(measured) => {
            let reforms = matches!(unit.type_name.as_str(), "reformer" | "prereformer");
            let flows = measured_inlet(db, measured, &unit_inlet(db, model, unit)?, reforms)
                .map_err(|e| context(e.to_string()))?;
            (flows, None, "measured")
        }
    };
    let measured: Vec<Measurement> = sample
        .dry_pct
        .iter()
        .map(|(i, v)| (*i, *v, options.accuracy(db, *i)))
        .collect();
    let fit = fit::fit_extents(db, &reactions, &inlet, &measured, start.as_deref())
        .map_err(|e| context(e.to_string()))?;
    let pressure_pa = sample.pressure_pa.unwrap_or(outlet.pressure_pa);
    let t = sample.temperature_k;
    let mut warnings = Vec::new();
    let mut approaches_k = Vec::with_capacity(reactions.len());
    for (j, r) in reactions.iter().enumerate() {
        // The running direction the solver used: s_j = approach_sign(dH(T), direction).
        let dh_model = r.delta_h(db, stage.outlet_temperature_k)?;
        let sign = stage.approach_signs.get(j).copied().unwrap_or(1.0);
        let direction = sign * if dh_model >= 0.0 { 1.0 } else { -1.0 };
        let approach =
            ln_quotient(db, r, &fit.outlet_flows, pressure_pa)
                .and_then(|ln_q| match stage.gas_model {
                    GasModel::Ideal => Ok(ln_q),
                    GasModel::PengRobinson => Ok(ln_q
                        + ln_fugacity_coefficient_term(db, r, &fit.outlet_flows, t, pressure_pa)?),
                })
                .and_then(|ln_q| {
                    approach_from_quotient(db, r, ln_q, t, direction, EQUILIBRIUM_SEARCH_K)
                });
        match approach {
            Ok(a) => {
                if a < -NEGATIVE_APPROACH_MARGIN_K {
                    warnings.push(
                        Warning::new(
                            "approach-negative",
                            "approach of {subject} is {value}, past equilibrium: check the \
                             outlet temperature and the analysis",
                        )
                        .value(a, FigureKind::TemperatureDifference)
                        .limit(-NEGATIVE_APPROACH_MARGIN_K)
                        .subject(r.name.clone())
                        .for_unit(&sample.unit),
                    );
                }
                approaches_k.push((r.name.clone(), Some(a)));
            }
            Err(_) => {
                warnings.push(
                    Warning::new(
                        "approach-undefined",
                        "no approach for {subject}: a species of its quotient is absent from \
                         the rebuilt outlet, or equilibrium lies outside 300-1500 K",
                    )
                    .subject(r.name.clone())
                    .for_unit(&sample.unit),
                );
                approaches_k.push((r.name.clone(), None));
            }
        }
    }
    if let Some(g) = fit::gross_error(db, &reactions, &inlet, &measured, &fit) {
        warnings.push(
            Warning::new(
                "analysis-misfit",
                "the analysis does not fit the balance: {subject} is off by {value} against \
                 the rest of the analysis ({limit} is three times its accuracy)",
            )
            .value(g.misfit_pct / 100.0, FigureKind::Fraction)
            .limit(fit::MISFIT_ACCURACIES * g.accuracy_pct / 100.0)
            .subject(db.by_index(g.species).name.clone())
            .for_unit(&sample.unit),
        );
    }
    for (i, v) in &sample.dry_pct {
        let in_quotient = reactions.iter().any(|r| r.coefficient(*i) != 0.0);
        if in_quotient && *v < DETECTION_LIMIT_PCT {
            warnings.push(
                Warning::new(
                    "below-detection-limit",
                    "{subject} measured at {value}, below a usual detection limit of {limit}: \
                     the approach from it is uncertain",
                )
                .value(v / 100.0, FigureKind::Fraction)
                .limit(DETECTION_LIMIT_PCT / 100.0)
                .subject(db.by_index(*i).name.clone())
                .for_unit(&sample.unit),
            );
        }
    }
    let analysis = measured
        .iter()
        .zip(&fit.fitted_pct)
        .map(|((i, v, a), f)| (db.by_index(*i).name.clone(), *v, *f, *a))
        .collect();
    Ok(SampleResult {
        sample: sample.clone(),
        inlet_source,
        approaches_k,
        extents_mol_s: reactions
            .iter()
            .zip(&fit.extents)
            .map(|(r, x)| (r.name.clone(), *x))
            .collect(),
        analysis,
        analysis_total_pct: sample.dry_pct.iter().map(|(_, v)| v).sum(),
        outlet_flows: fit.outlet_flows,
        pressure_pa,
        gas_model: stage.gas_model,
        chi_square: fit.chi_square,
        warnings,
    })
}

/// The model's inlet stream of a unit (its first inlet), mol/s per species.
fn unit_inlet(
    db: &SpeciesDb,
    model: &FlowsheetResult,
    unit: &crate::flowsheet::SolvedUnit,
) -> Result<Vec<f64>> {
    let name = unit.inlets.first().ok_or_else(|| Error::InvalidValue {
        field: format!("unit '{}'", unit.name),
        value: String::new(),
        reason: "it has no inlet".into(),
    })?;
    let s = model
        .streams
        .iter()
        .find(|s| &s.name == name)
        .ok_or_else(|| Error::InvalidValue {
            field: format!("stream '{name}'"),
            value: String::new(),
            reason: "not in the solved flowsheet".into(),
        })?;
    debug_assert_eq!(s.stream.flows.len(), db.len());
    Ok(s.stream.flows.clone())
}

/// The wet inlet of a measured dry analysis: scaled to the measured dry flow (else the model's),
/// its water from the measured wet %, else from the model's steam-to-carbon ratio at the unit
/// (where both have organic carbon), else the model's water-to-dry-gas ratio. A reformer or
/// pre-reformer then reforms the higher hydrocarbons completely, as the unit does.
pub fn measured_inlet(
    db: &SpeciesDb,
    measured: &MeasuredInlet,
    model_inlet: &[f64],
    reforms_higher: bool,
) -> Result<Vec<f64>> {
    let water = db.index_of("H2O").ok_or_else(|| Error::InvalidValue {
        field: "species data".into(),
        value: String::new(),
        reason: "no H2O".into(),
    })?;
    let model_dry: f64 = model_inlet
        .iter()
        .enumerate()
        .filter(|(i, _)| *i != water)
        .map(|(_, v)| v)
        .sum();
    let total_pct: f64 = measured.dry_pct.iter().map(|(_, v)| v).sum();
    if !(total_pct > 0.0) {
        return Err(Error::InvalidValue {
            field: "inlet analysis".into(),
            value: format!("{total_pct} mol %"),
            reason: "the measured inlet analysis sums to zero".into(),
        });
    }
    let dry = measured.dry_flow_mol_s.unwrap_or(model_dry);
    let mut flows = vec![0.0; db.len()];
    for (i, v) in &measured.dry_pct {
        flows[*i] = dry * v / total_pct;
    }
    let organic = |f: &[f64]| -> f64 {
        f.iter()
            .enumerate()
            .map(|(i, v)| v * organic_carbon_atoms(db.by_index(i)))
            .sum()
    };
    flows[water] = match measured.water_pct_wet {
        Some(p) => dry * p / (100.0 - p),
        None if organic(model_inlet) > 0.0 && organic(&flows) > 0.0 => {
            model_inlet[water] / organic(model_inlet) * organic(&flows)
        }
        None => model_inlet[water] / model_dry * dry,
    };
    if reforms_higher {
        for k in 0..db.len() {
            if let Some(r) = Reaction::steam_reforming_of(db, k) {
                let r = r?;
                let n = flows[k];
                if n > 0.0 {
                    let per = -1.0 / r.coefficient(k);
                    for (i, nu) in &r.stoichiometry {
                        flows[*i] += nu * per * n;
                    }
                    flows[k] = 0.0;
                }
            }
        }
        if flows[water] < 0.0 {
            return Err(Error::InvalidValue {
                field: "inlet water".into(),
                value: format!("{} mol/s", flows[water]),
                reason: "not enough steam to reform the higher hydrocarbons".into(),
            });
        }
    }
    Ok(flows)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_measured_inlet_takes_its_water_from_the_model_or_the_sample() {
        // Identities of the definitions (no outside data): steam-to-carbon ratio 3 in the model,
        // 2 mol/s of dry gas measured as 90 % CH4 and 10 % C2H6 (1.1 mol of organic carbon
        // per mol dry: 0.9 + 2 x 0.1), so 3 x 2.2 = 6.6 mol/s of water.
        let db = SpeciesDb::embedded().unwrap();
        let ix = |s: &str| db.index_of(s).unwrap();
        let mut model = vec![0.0; db.len()];
        model[ix("CH4")] = 1.0;
        model[ix("H2O")] = 3.0;
        let mut measured = MeasuredInlet {
            dry_pct: vec![(ix("CH4"), 90.0), (ix("C2H6"), 10.0)],
            dry_flow_mol_s: Some(2.0),
            ..MeasuredInlet::default()
        };
        let flows = measured_inlet(&db, &measured, &model, false).unwrap();
        assert!((flows[ix("H2O")] - 6.6).abs() < 1e-12);
        assert!((flows[ix("CH4")] - 1.8).abs() < 1e-12);
        // Reformed first (C2H6 + 2 H2O = 2 CO + 5 H2): 0.2 mol/s of C2H6 takes 0.4 of water.
        let reformed = measured_inlet(&db, &measured, &model, true).unwrap();
        assert!((reformed[ix("H2O")] - 6.2).abs() < 1e-12);
        assert!((reformed[ix("CO")] - 0.4).abs() < 1e-12 && reformed[ix("C2H6")] == 0.0);
        assert!((reformed[ix("H2")] - 1.0).abs() < 1e-12);
        // 25 % water on the wet gas: 2 x 25 / 75 mol/s.
        measured.water_pct_wet = Some(25.0);
        let flows = measured_inlet(&db, &measured, &model, false).unwrap();
        assert!((flows[ix("H2O")] - 2.0 / 3.0).abs() < 1e-12);
    }

    #[test]
    fn accuracies_default_and_are_set() {
        let db = SpeciesDb::embedded().unwrap();
        let mut o = Options::default();
        let co = db.index_of("CO").unwrap();
        assert_eq!(o.accuracy(&db, co), 0.02);
        assert_eq!(
            o.accuracy(&db, db.index_of("He").unwrap()),
            OTHER_ACCURACY_PCT
        );
        o.add_accuracy(&db, "CO=0.005").unwrap();
        assert_eq!(o.accuracy(&db, co), 0.005);
        for bad in ["CO", "XX=1", "CO=-1", "CO=abc"] {
            assert!(o.add_accuracy(&db, bad).is_err(), "{bad}");
        }
    }
}

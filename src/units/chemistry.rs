//! Chemistry shared by the reforming units: the complete steam reforming of the higher
//! hydrocarbons and oxygenates (every gas of carbon with hydrogen and oxygen other than CH4, CO
//! and CO2, found from the species data, reformed to CO and H2 before methane and shift come to
//! equilibrium, as on a nickel catalyst, where their equilibrium lies fully on the side of CO and
//! H2), the carbon-bearing species a unit's reactions cannot convert (named in a warning), and the
//! carbon activity at an outlet by methane cracking (CH4 = C + 2 H2) and Boudouard
//! (2 CO = C + CO2), a_C > 1 meaning carbon is thermodynamically possible.

use super::common::{degc, figure, run_stage_into, spec_error, Key};
use super::reactor::ReactorCore;
use super::{FigureKind, UnitResult, Warning};
use crate::equilibrium::{EnergyMode, SolverOptions, StageResult, StageWorkspace};
use crate::error::{Result, ResultExt};
use crate::quantity::STANDARD_PRESSURE_PA;
use crate::reaction::{carbon_activity_of, Reaction};
use crate::thermo::SpeciesDb;

/// The complete steam reforming of every species the database holds that a nickel catalyst
/// converts completely (see [`Reaction::steam_reforming_of`]), prepared once.
#[derive(Debug, Clone)]
pub(crate) struct HigherHydrocarbons {
    /// (species index, stoichiometry of its reforming reaction, products positive).
    reactions: Vec<(usize, Vec<(usize, f64)>)>,
}

impl HigherHydrocarbons {
    pub(crate) fn new(db: &SpeciesDb) -> Result<HigherHydrocarbons> {
        let mut reactions = Vec::new();
        for i in 0..db.len() {
            if let Some(r) = Reaction::steam_reforming_of(db, i) {
                let r = r?;
                let nu = r.coefficient(i);
                // Scale to one mole of the species consumed per unit extent.
                let st = r.stoichiometry.iter().map(|(k, v)| (*k, -v / nu)).collect();
                reactions.push((i, st));
            }
        }
        Ok(HigherHydrocarbons { reactions })
    }

    /// True when species `i` is reformed completely by these reactions.
    pub(crate) fn converts(&self, i: usize) -> bool {
        self.reactions.iter().any(|(k, _)| *k == i)
    }

    /// Higher hydrocarbons in `flows`, mol/s (molecules).
    pub(crate) fn amount(&self, flows: &[f64]) -> f64 {
        self.reactions.iter().map(|(i, _)| flows[*i]).sum()
    }

    /// Reform every higher hydrocarbon in `flows` completely (in place); error when there is not
    /// enough steam. Returns the amount reformed, mol/s.
    pub(crate) fn reform(&self, unit: &str, key: &Key, flows: &mut [f64]) -> Result<f64> {
        let water_in = flows[key.h2o];
        let mut reformed = 0.0;
        for (i, st) in &self.reactions {
            let n = flows[*i];
            if n > 0.0 {
                for (k, nu) in st {
                    if k == i {
                        flows[*k] = 0.0;
                    } else {
                        flows[*k] += nu * n;
                    }
                }
                reformed += n;
            }
        }
        if flows[key.h2o] < 0.0 {
            return Err(spec_error(
                unit,
                "inlet",
                format!(
                    "not enough steam to reform the higher hydrocarbons: they need {:.6} mol/s \
                     of H2O, the inlet has {water_in:.6} mol/s; raise the steam-to-carbon ratio",
                    water_in - flows[key.h2o]
                ),
            ));
        }
        Ok(reformed)
    }
}

/// Warn for every carbon-bearing gas in `flows` other than CH4, CO and CO2 that the unit's
/// reactions leave unconverted (`converts` says which they convert): it passes through, its
/// carbon counted in the steam-to-carbon ratio but not reformed.
pub(crate) fn unconverted_carbon_warnings(
    db: &SpeciesDb,
    unit: &str,
    key: &Key,
    flows: &[f64],
    converts: impl Fn(usize) -> bool,
    warnings: &mut Vec<Warning>,
) {
    for &i in &key.other_carbon {
        let (s, n) = (db.by_index(i), &flows[i]);
        if *n > 0.0 && !converts(i) {
            warnings.push(
                Warning::new(
                    "unconverted-carbon",
                    "{subject} ({value} of the inlet) passes unconverted: none of this unit's \
                     reactions converts it",
                )
                .value(n / flows.iter().sum::<f64>(), FigureKind::Fraction)
                .subject(s.name.as_str())
                .for_unit(unit),
            );
        }
    }
}

/// How many temperatures the carbon check takes along a reactor's path, inlet and outlet
/// included (20 equal steps), unless its `carbon-path-points` says otherwise.
pub(crate) const CARBON_PATH_POINTS: usize = 21;

/// The carbon activity of one route in a gas.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) enum Activity {
    /// Both sides present: the activity.
    Value(f64),
    /// The carbon former absent: no carbon by this route.
    Zero,
    /// The carbon former present and its partner absent (methane without hydrogen, CO without
    /// CO2): the activity is unbounded.
    Unbounded,
}

/// Work memory of the carbon check along a path, kept in the unit's scratch so that a warm
/// check makes no heap allocation.
#[derive(Debug, Clone, Default)]
pub(crate) struct CarbonScratch {
    stage: StageWorkspace,
    result: StageResult,
    /// Extents of the previous point (the warm start of the next).
    guess: Vec<f64>,
    /// Zero approach for every reaction of the stage.
    zero: Vec<f64>,
    /// What the last path check was asked (the converted inlet flows, then inlet temperature
    /// and pressure, outlet temperature and pressure) and what it found, reused when a solve
    /// asks the same again to [`MEMO_TOLERANCE`] (a study varying something downstream).
    memo_key: Vec<f64>,
    memo: Option<PathFinding>,
    /// The extents of every point of the last walk (point by point, each reaction), the start
    /// of the same point in the next walk of this unit (a study's next case lies close).
    last_walk: Vec<f64>,
}

/// Relative difference below which a path check is asked the same as the last one: far below
/// the tolerance of every stage solve (1e-10), so the answer cannot tell.
const MEMO_TOLERANCE: f64 = 1e-12;

/// What the walk along the path found: the worst point of each route and the smallest margin.
#[derive(Debug, Clone, Copy)]
struct PathFinding {
    worst: [Option<Worst>; 2],
    margin: Option<(f64, f64)>,
}

impl CarbonScratch {
    /// Forget the last path check (the next one is worked out afresh).
    pub(crate) fn forget(&mut self) {
        self.memo = None;
        self.memo_key.clear();
        self.last_walk.clear();
    }
}

/// The worst point of one route: its activity and where.
#[derive(Debug, Clone, Copy)]
struct Worst {
    activity: f64,
    temperature_k: f64,
    /// True when it is the actual outlet gas rather than a gas equilibrated on the path.
    outlet: bool,
}

/// Carbon activity checks of a reforming unit.
#[derive(Debug, Clone)]
pub(crate) struct CarbonCheck {
    cracking: Reaction,
    boudouard: Reaction,
}

impl CarbonCheck {
    pub(crate) fn new(db: &SpeciesDb) -> Result<CarbonCheck> {
        Ok(CarbonCheck {
            cracking: Reaction::named(db, "methane-cracking")?,
            boudouard: Reaction::named(db, "boudouard")?,
        })
    }

    /// The activity of `reaction`'s carbon in a gas of `flows` at `temperature_k` and
    /// `pressure_pa` against graphite (see [`crate::reaction::carbon_activity`]).
    pub(crate) fn activity(
        db: &SpeciesDb,
        reaction: &Reaction,
        flows: &[f64],
        temperature_k: f64,
        pressure_pa: f64,
    ) -> Result<Activity> {
        let total: f64 = flows.iter().sum();
        let gas = |i: usize| db.by_index(i).phase == crate::thermo::Phase::Gas;
        let former_present = reaction
            .stoichiometry
            .iter()
            .all(|(i, nu)| !gas(*i) || *nu > 0.0 || flows[*i] > 0.0);
        if total <= 0.0 || !former_present {
            return Ok(Activity::Zero);
        }
        let partner_present = reaction
            .stoichiometry
            .iter()
            .all(|(i, nu)| !gas(*i) || *nu < 0.0 || flows[*i] > 0.0);
        if !partner_present {
            return Ok(Activity::Unbounded);
        }
        let p = |i: usize| flows[i] / total * pressure_pa / STANDARD_PRESSURE_PA;
        // Graphite is the condensed product of the reaction (found without a name lookup:
        // this runs at every point of every path check).
        let carbon = match reaction
            .stoichiometry
            .iter()
            .find(|(i, nu)| *nu > 0.0 && !gas(*i))
        {
            Some((c, _)) => *c,
            None => db.require("C(gr)", " (carbon activity)")?,
        };
        Ok(Activity::Value(carbon_activity_of(
            db,
            reaction,
            carbon,
            temperature_k,
            p,
        )?))
    }

    /// The carbon checks of a reforming unit whose stage `core` was solved into `out` (one
    /// outlet): the activities of the actual inlet gas (figures only), of the actual outlet gas
    /// (figures), and of the gas `converted` (the inlet with its higher hydrocarbons reformed)
    /// equilibrated by the unit's own stage at zero approach at [`CARBON_PATH_POINTS`]
    /// temperatures from the inlet's to the outlet's (pressure linear between them as well),
    /// each solve warm-started from the one before. One warning when an activity exceeds one
    /// anywhere (the highest named, with its route and temperature), a warning when it is
    /// unbounded at the
    /// outlet, and the figures `carbon-margin` (smallest 1 - a of both routes over the path
    /// and the outlet) and `carbon-margin-temperature` (where). The path is walked from the
    /// outlet back to the inlet, the first point warm-started from the unit's own stage result,
    /// every later one from the point before it.
    #[allow(clippy::too_many_arguments)]
    pub(crate) fn report(
        &self,
        db: &SpeciesDb,
        core: &ReactorCore,
        inlet: &super::Stream,
        converted: &[f64],
        path_points: Option<f64>,
        options: &SolverOptions,
        scratch: &mut CarbonScratch,
        out: &mut UnitResult,
    ) -> Result<()> {
        let points = path_points.map_or(CARBON_PATH_POINTS, |n| n as usize);
        let unit = core.name.as_str();
        let UnitResult {
            outlets,
            figures,
            warnings,
            equilibrium,
            ..
        } = out;
        let outlet = &outlets[0];
        let routes = [
            (
                &self.cracking,
                "carbon-activity-methane-cracking",
                "carbon activity, CH4 cracking",
                "carbon-activity-inlet-cracking",
                "carbon activity, inlet gas, CH4 cracking",
            ),
            (
                &self.boudouard,
                "carbon-activity-boudouard",
                "carbon activity, Boudouard",
                "carbon-activity-inlet-boudouard",
                "carbon activity, inlet gas, Boudouard",
            ),
        ];
        let mut worst: [Option<Worst>; 2] = [None, None];
        let mut margin: Option<(f64, f64)> = None;
        let mut note = |r: usize, a: f64, t: f64, at_outlet: bool| {
            if r < 2 && worst[r].is_none_or(|w| a > w.activity) {
                worst[r] = Some(Worst {
                    activity: a,
                    temperature_k: t,
                    outlet: at_outlet,
                });
            }
            if margin.is_none_or(|(m, _)| 1.0 - a < m) {
                margin = Some((1.0 - a, t));
            }
        };
        for (r, (reaction, key, label, inlet_key, inlet_label)) in routes.iter().enumerate() {
            let context = || format!("unit '{unit}', carbon activity");
            let a_in = Self::activity(
                db,
                reaction,
                &inlet.flows,
                inlet.temperature_k,
                inlet.pressure_pa,
            )
            .context(context)?;
            if let Activity::Value(a) = a_in {
                figures.push(figure(inlet_key, inlet_label, a, FigureKind::Number));
            }
            let (t_out, p_out) = (outlet.temperature_k, outlet.pressure_pa);
            match Self::activity(db, reaction, &outlet.flows, t_out, p_out).context(context)? {
                Activity::Value(a) => {
                    figures.push(figure(key, label, a, FigureKind::Number));
                    note(r, a, t_out, true);
                }
                Activity::Zero => {}
                Activity::Unbounded => warnings.push(
                    Warning::new(
                        "carbon-formation",
                        "the outlet has the carbon former of {subject} but none of its other \
                         product, so its carbon activity is unbounded: carbon formation \
                         thermodynamically possible (screening check)",
                    )
                    .subject(reaction.name.as_str())
                    .for_unit(unit),
                ),
            }
        }
        // The gas equilibrated along the path: worked out afresh unless this solve asks what
        // the last one asked (to 1e-12 relative: an upstream stage warm-started from its last
        // answer lands on the same answer to its last bits only).
        let (t_in, p_in) = (inlet.temperature_k, inlet.pressure_pa);
        let (t_out, p_out) = (outlet.temperature_k, outlet.pressure_pa);
        let key_len = converted.len() + 5;
        let same = scratch.memo.is_some()
            && scratch.memo_key.len() == key_len
            && scratch
                .memo_key
                .iter()
                .zip(
                    converted
                        .iter()
                        .chain(&[t_in, p_in, t_out, p_out, points as f64]),
                )
                .all(|(a, b)| (a - b).abs() <= MEMO_TOLERANCE * a.abs().max(b.abs()));
        let found = match scratch.memo {
            Some(found) if same => found,
            _ if points == 0 => PathFinding {
                worst: [None, None],
                margin: None,
            },
            _ => {
                let found = self.walk_path(
                    db,
                    core,
                    equilibrium.as_ref(),
                    (inlet, outlet),
                    converted,
                    points,
                    options,
                    scratch,
                )?;
                scratch.memo_key.clear();
                scratch.memo_key.extend_from_slice(converted);
                scratch
                    .memo_key
                    .extend_from_slice(&[t_in, p_in, t_out, p_out, points as f64]);
                scratch.memo = Some(found);
                found
            }
        };
        for r in 0..2 {
            if let Some(w) = found.worst[r] {
                note(r, w.activity, w.temperature_k, false);
            }
        }
        if let Some((m, t)) = found.margin {
            note(usize::MAX, 1.0 - m, t, false);
        }
        // One warning, at the route and point of the highest activity (in a gas at reforming
        // and shift equilibrium both routes agree, so a second would say the same).
        let highest = (0..2)
            .filter_map(|r| worst[r].map(|w| (r, w)))
            .filter(|(_, w)| w.activity > 1.0)
            .max_by(|a, b| a.1.activity.total_cmp(&b.1.activity));
        if let Some((r, w)) = highest {
            let name = &routes[r].0.name;
            let subject = if w.outlet {
                format!("{name} in the outlet gas at {}", degc(w.temperature_k))
            } else {
                format!(
                    "{name} in the gas at equilibrium at {} (path from the inlet at {} to the \
                     outlet at {})",
                    degc(w.temperature_k),
                    degc(t_in),
                    degc(t_out)
                )
            };
            warnings.push(
                Warning::new(
                    "carbon-formation",
                    "carbon activity {value} (above {limit}) by {subject}: carbon formation \
                     thermodynamically possible (principle of equilibrated gas, a screening \
                     check; raise the steam-to-carbon ratio or the temperature)",
                )
                .value(w.activity, FigureKind::Number)
                .limit(1.0)
                .subject(subject)
                .for_unit(unit),
            );
        }
        if let Some((m, t)) = margin {
            figures.push(figure(
                "carbon-margin",
                "carbon margin, smallest 1 - a",
                m,
                FigureKind::Number,
            ));
            figures.push(figure(
                "carbon-margin-temperature",
                "carbon margin, where",
                t,
                FigureKind::Temperature,
            ));
        }
        Ok(())
    }

    /// The gas `converted` equilibrated by the unit's stage at zero approach at
    /// [`CARBON_PATH_POINTS`] temperatures from the inlet's to the outlet's: the worst point of
    /// each route and the smallest margin.
    #[allow(clippy::too_many_arguments)]
    fn walk_path(
        &self,
        db: &SpeciesDb,
        core: &ReactorCore,
        own: Option<&StageResult>,
        (inlet, outlet): (&super::Stream, &super::Stream),
        converted: &[f64],
        points: usize,
        options: &SolverOptions,
        scratch: &mut CarbonScratch,
    ) -> Result<PathFinding> {
        let CarbonScratch {
            stage: ws,
            result,
            guess,
            zero,
            last_walk,
            ..
        } = scratch;
        let unit = core.name.as_str();
        let routes = [&self.cracking, &self.boudouard];
        let mut found = PathFinding {
            worst: [None, None],
            margin: None,
        };
        zero.clear();
        zero.resize(core.stage.reactions().len(), 0.0);
        let (t_in, p_in) = (inlet.temperature_k, inlet.pressure_pa);
        let (t_out, p_out) = (outlet.temperature_k, outlet.pressure_pa);
        let steps = (points - 1) as f64;
        // From the outlet back to the inlet. Each point starts from the same point of this
        // unit's last walk where there is one (a study's next case lies close, so it needs
        // fewer Newton steps); otherwise the first from the unit's own solution (the outlet at
        // its approaches) and every later one from the point before. The answer is the
        // converged equilibrium either way (to the stage tolerance, 1e-10); a workspace forgets
        // its last walk with its warm starts, so a study repeats on any thread count.
        let nr = zero.len();
        let reuse = last_walk.len() == points * nr;
        if !reuse {
            last_walk.clear();
            last_walk.resize(points * nr, 0.0);
        }
        guess.clear();
        if let Some(e) = own {
            guess.extend_from_slice(&e.extents);
        }
        for k in (0..points).rev() {
            let f = k as f64 / steps;
            let t = t_in + (t_out - t_in) * f;
            let p = p_in + (p_out - p_in) * f;
            if reuse {
                guess.clear();
                guess.extend_from_slice(&last_walk[k * nr..(k + 1) * nr]);
            }
            let start: Option<&[f64]> = (guess.len() == nr).then_some(guess.as_slice());
            let stage_inlet = crate::equilibrium::StageInlet {
                flows: converted,
                temperature_k: t_in,
                pressure_pa: p,
            };
            run_stage_into(
                &core.stage,
                db,
                unit,
                stage_inlet,
                EnergyMode::FixedTemperature { temperature_k: t },
                start,
                Some(zero),
                options,
                ws,
                result,
            )
            .map_err(|e| {
                e.context(format!(
                    "carbon check of the gas equilibrated at {}",
                    degc(t)
                ))
            })?;
            guess.clear();
            guess.extend_from_slice(&result.extents);
            if guess.len() == nr {
                last_walk[k * nr..(k + 1) * nr].copy_from_slice(guess);
            }
            // In a gas at reforming and shift equilibrium both routes give the same activity
            // (cracking minus Boudouard is a sum of reforming and shift), so one is worked out
            // and stands for both.
            let a = Self::activity(db, routes[0], &result.outlet_flows, t, p)
                .context(|| format!("unit '{unit}', carbon activity"))?;
            for r in 0..routes.len() {
                if let Activity::Value(a) = a {
                    if found.worst[r].is_none_or(|w| a > w.activity) {
                        found.worst[r] = Some(Worst {
                            activity: a,
                            temperature_k: t,
                            outlet: false,
                        });
                    }
                    if found.margin.is_none_or(|(m, _)| 1.0 - a < m) {
                        found.margin = Some((1.0 - a, t));
                    }
                }
            }
        }
        Ok(found)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::units::test_support::{db, element_error, flows};

    #[test]
    fn higher_hydrocarbons_are_reformed_completely_and_balanced() {
        let db = db();
        let key = Key::new(&db, "r").unwrap();
        let hhc = HigherHydrocarbons::new(&db).unwrap();
        let inlet = flows(
            &db,
            &[
                ("C2H6", 0.1),
                ("C3H8", 0.02),
                ("n-C4H10", 0.01),
                ("H2O", 1.0),
            ],
        );
        let mut out = inlet.clone();
        let n = hhc.reform("r", &key, &mut out).unwrap();
        assert!((n - 0.13).abs() < 1e-15);
        assert_eq!(hhc.amount(&out), 0.0);
        // C2H6 + 2 H2O = 2 CO + 5 H2, C3H8 + 3 H2O = 3 CO + 7 H2, C4H10 + 4 H2O = 4 CO + 9 H2.
        assert!((out[key.co] - (0.2 + 0.06 + 0.04)).abs() < 1e-15);
        assert!((out[key.h2] - (0.5 + 0.14 + 0.09)).abs() < 1e-15);
        assert!(element_error(&db, &[&inlet], &[&out]) < 1e-14);
        let mut dry = flows(&db, &[("C2H6", 1.0), ("H2O", 1.0)]);
        let e = hhc.reform("r", &key, &mut dry).unwrap_err().to_string();
        assert!(
            e.contains("unit 'r'") && e.contains("not enough steam"),
            "{e}"
        );
    }
    #[test]
    fn carbon_activity_is_unbounded_only_with_the_former_and_without_its_partner() {
        // a_C = K p_CH4 / p_H2^2 (cracking) and K p_CO^2 / p_CO2 (Boudouard): a former without
        // its partner makes it unbounded, a partner without its former makes it zero.
        let db = db();
        let check = CarbonCheck::new(&db).unwrap();
        let run = |pairs: &[(&str, f64)]| {
            let s = crate::units::test_support::gas(&db, pairs, 900.0, 20e5);
            [&check.cracking, &check.boudouard].map(|r| {
                CarbonCheck::activity(&db, r, &s.flows, s.temperature_k, s.pressure_pa).unwrap()
            })
        };
        // Methane without hydrogen, CO without CO2: both unbounded.
        let a = run(&[("CH4", 1.0), ("CO", 1.0), ("N2", 1.0)]);
        assert_eq!(a, [Activity::Unbounded, Activity::Unbounded]);
        // Hydrogen and CO2 without their formers: zero activity.
        let a = run(&[("H2", 1.0), ("CO2", 1.0)]);
        assert_eq!(a, [Activity::Zero, Activity::Zero]);
        // All present: both values.
        let a = run(&[("CH4", 0.1), ("H2", 1.0), ("CO", 0.1), ("CO2", 0.1)]);
        assert!(
            a.iter()
                .all(|x| matches!(x, Activity::Value(v) if *v > 0.0)),
            "{a:?}"
        );
    }
}

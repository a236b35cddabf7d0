//! Chemistry shared by the reforming units: the complete steam reforming of the higher
//! hydrocarbons and oxygenates (every gas of carbon with hydrogen and oxygen other than CH4, CO
//! and CO2, found from the species data, reformed to CO and H2 before methane and shift come to
//! equilibrium, as on a nickel catalyst, where their equilibrium lies fully on the side of CO and
//! H2), the carbon-bearing species a unit's reactions cannot convert (named in a warning), and the
//! carbon activity at an outlet by methane cracking (CH4 = C + 2 H2) and Boudouard
//! (2 CO = C + CO2), a_C > 1 meaning carbon is thermodynamically possible.

use super::common::{figure, spec_error, Key};
use super::{FigureKind, Warning};
use crate::error::{Result, ResultExt};
use crate::quantity::STANDARD_PRESSURE_PA;
use crate::reaction::{carbon_activity, Reaction};
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

/// Carbon activity checks at an outlet.
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

    /// Add the two carbon-activity figures of a gas (where its species are present) and a
    /// warning when either exceeds one.
    pub(crate) fn report(
        &self,
        db: &SpeciesDb,
        unit: &str,
        outlet: &super::Stream,
        figures: &mut Vec<super::Figure>,
        warnings: &mut Vec<Warning>,
    ) -> Result<()> {
        let flows = &outlet.flows;
        let (temperature_k, pressure_pa) = (outlet.temperature_k, outlet.pressure_pa);
        let total: f64 = flows.iter().sum();
        if total <= 0.0 {
            return Ok(());
        }
        let p = |i: usize| flows[i] / total * pressure_pa / STANDARD_PRESSURE_PA;
        let checks = [
            (
                &self.cracking,
                "carbon-activity-methane-cracking",
                "carbon activity, CH4 cracking",
            ),
            (
                &self.boudouard,
                "carbon-activity-boudouard",
                "carbon activity, Boudouard",
            ),
        ];
        for (reaction, key, label) in checks {
            let present = reaction.stoichiometry.iter().all(|(i, _)| {
                db.by_index(*i).phase != crate::thermo::Phase::Gas || flows[*i] > 0.0
            });
            if !present {
                // Carbon former present, its partner absent (methane with no hydrogen, CO with
                // no CO2): the activity is unbounded.
                let unbounded = reaction.stoichiometry.iter().all(|(i, nu)| {
                    db.by_index(*i).phase != crate::thermo::Phase::Gas
                        || (*nu < 0.0) == (flows[*i] > 0.0)
                });
                if unbounded {
                    warnings.push(
                        Warning::new(
                            "carbon-formation",
                            "the outlet has the carbon former of {subject} but none of its other \
                             product, so its carbon activity is unbounded: carbon formation \
                             thermodynamically possible (screening check)",
                        )
                        .subject(reaction.name.as_str())
                        .for_unit(unit),
                    );
                }
                continue;
            }
            let a = carbon_activity(db, reaction, temperature_k, p)
                .context(|| format!("unit '{unit}', carbon activity"))?;
            figures.push(figure(key, label, a, FigureKind::Number));
            if a > 1.0 {
                warnings.push(
                    Warning::new(
                        "carbon-formation",
                        "carbon activity {value} by {subject} at the outlet (above {limit}): \
                         carbon formation thermodynamically possible at the outlet (screening \
                         check; raise the steam-to-carbon ratio or the temperature)",
                    )
                    .value(a, FigureKind::Number)
                    .limit(1.0)
                    .subject(reaction.name.as_str())
                    .for_unit(unit),
                );
            }
        }
        Ok(())
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
            let (mut figures, mut warnings) = (Vec::new(), Vec::new());
            check
                .report(&db, "r", &s, &mut figures, &mut warnings)
                .unwrap();
            let keys: Vec<&str> = figures.iter().map(|f| f.key).collect();
            let unbounded: Vec<String> = warnings
                .iter()
                .filter(|w| w.code == "carbon-formation" && w.value.is_none())
                .map(|w| w.subject.clone().unwrap())
                .collect();
            (keys, unbounded)
        };
        // Methane without hydrogen, CO without CO2: both unbounded, no figures.
        let (keys, unbounded) = run(&[("CH4", 1.0), ("CO", 1.0), ("N2", 1.0)]);
        assert!(keys.is_empty(), "{keys:?}");
        assert_eq!(unbounded, vec!["methane-cracking", "boudouard"]);
        // Hydrogen and CO2 without their formers: zero activity, no warning, no figure.
        let (keys, unbounded) = run(&[("H2", 1.0), ("CO2", 1.0)]);
        assert!(
            keys.is_empty() && unbounded.is_empty(),
            "{keys:?} {unbounded:?}"
        );
        // All present: both figures, nothing unbounded.
        let (keys, unbounded) = run(&[("CH4", 0.1), ("H2", 1.0), ("CO", 0.1), ("CO2", 0.1)]);
        assert_eq!(
            keys,
            vec![
                "carbon-activity-methane-cracking",
                "carbon-activity-boudouard"
            ]
        );
        assert!(unbounded.is_empty());
    }
}

//! Reactions: stoichiometry, element balance, and ln K(T), dH(T), dG(T) from species data.
//!
//! For a reaction sum_i nu_i A_i = 0 (products positive), the standard Gibbs energy change is
//! dG(T) = sum_i nu_i G_i(T) and the equilibrium constant is ln K = -dG / (R T), with the
//! standard state of every gas the pure ideal gas at 1 bar and of a solid the pure solid
//! (activity one). The van 't Hoff relation d ln K / dT = dH / (R T^2) follows from the same data.
//!
//! The named reactions of the trade are built in (`reforming`, `shift`, `dry-reforming`,
//! `boudouard`, `methane-cracking`, and the oxidations); any other can be defined from its
//! stoichiometry, and every definition is checked for its element balance. The complete steam
//! reforming of every other carbon-bearing gas of carbon, hydrogen and oxygen (ethane, propane, a
//! user's n-heptane or methanol) follows from the species data alone
//! ([`Reaction::steam_reforming_of`]): C_n H_m O_k + (n - k) H2O = n CO + (n + m/2 - k) H2.

use crate::error::{Error, Result};
use crate::quantity::R_GAS;
use crate::thermo::{Phase, Species, SpeciesDb};

/// One reaction: a name and the stoichiometric coefficients (products positive) by species index.
#[derive(Debug, Clone, PartialEq)]
pub struct Reaction {
    /// The reaction's name (`reforming`, `shift`, ...).
    pub name: String,
    /// (species index in the database, stoichiometric coefficient), products positive.
    pub stoichiometry: Vec<(usize, f64)>,
}

/// The built-in reactions: name, and (species, coefficient) with products positive.
pub const NAMED_REACTIONS: &[(&str, &[(&str, f64)])] = &[
    (
        "reforming",
        &[("CH4", -1.0), ("H2O", -1.0), ("CO", 1.0), ("H2", 3.0)],
    ),
    (
        "shift",
        &[("CO", -1.0), ("H2O", -1.0), ("CO2", 1.0), ("H2", 1.0)],
    ),
    (
        "dry-reforming",
        &[("CH4", -1.0), ("CO2", -1.0), ("CO", 2.0), ("H2", 2.0)],
    ),
    ("boudouard", &[("CO", -2.0), ("C(gr)", 1.0), ("CO2", 1.0)]),
    (
        "methane-cracking",
        &[("CH4", -1.0), ("C(gr)", 1.0), ("H2", 2.0)],
    ),
    (
        "hydrogen-oxidation",
        &[("H2", -1.0), ("O2", -0.5), ("H2O", 1.0)],
    ),
    ("co-oxidation", &[("CO", -1.0), ("O2", -0.5), ("CO2", 1.0)]),
    (
        "methane-oxidation",
        &[("CH4", -1.0), ("O2", -2.0), ("CO2", 1.0), ("H2O", 2.0)],
    ),
];

/// Carbon atoms that count as organic carbon in a steam-to-carbon ratio: those of every gas
/// species holding carbon other than CO and CO2 (hydrocarbons, oxygenates); zero otherwise.
pub fn organic_carbon_atoms(species: &Species) -> f64 {
    let inorganic = matches!(species.name.as_str(), "CO" | "CO2");
    if species.phase == Phase::Gas && !inorganic {
        species.atoms("C")
    } else {
        0.0
    }
}

impl Reaction {
    /// The complete steam reforming of species `index` to CO and H2, named `<species>-reforming`:
    /// C_n H_m O_k + (n - k) H2O = n CO + (n + m/2 - k) H2. `None` for the species it does not
    /// apply to: anything but a gas of carbon with hydrogen and/or oxygen only, methane (which
    /// comes to equilibrium instead), CO and CO2 (the products), and species whose hydrogen
    /// would be consumed (n + m/2 < k).
    pub fn steam_reforming_of(db: &SpeciesDb, index: usize) -> Option<Result<Reaction>> {
        let species = db.by_index(index);
        let n = species.atoms("C");
        let m = species.atoms("H");
        let k = species.atoms("O");
        let only_cho = species
            .elements
            .iter()
            .all(|(e, _)| matches!(e.as_str(), "C" | "H" | "O"));
        let excluded = matches!(species.name.as_str(), "CH4" | "CO" | "CO2");
        if species.phase != Phase::Gas || !only_cho || n <= 0.0 || excluded {
            return None;
        }
        let h2 = n + m / 2.0 - k;
        if h2 < 0.0 {
            return None;
        }
        let name = format!("{}-reforming", species.name);
        let terms = [
            (species.name.as_str(), -1.0),
            ("H2O", k - n),
            ("CO", n),
            ("H2", h2),
        ];
        Some(Reaction::new(db, &name, &terms))
    }

    /// Define a reaction from (species name, coefficient) pairs, products positive; the element
    /// balance is checked and a species named twice is summed.
    pub fn new(db: &SpeciesDb, name: &str, terms: &[(&str, f64)]) -> Result<Reaction> {
        let mut stoichiometry: Vec<(usize, f64)> = Vec::new();
        for (species, nu) in terms {
            if !nu.is_finite() {
                return Err(Error::Reaction {
                    reaction: name.to_string(),
                    reason: format!("coefficient of {species} is not a finite number"),
                });
            }
            let index = db.require(species, &format!(" in reaction '{name}'"))?;
            match stoichiometry.iter_mut().find(|(i, _)| *i == index) {
                Some((_, v)) => *v += nu,
                None => stoichiometry.push((index, *nu)),
            }
        }
        stoichiometry.retain(|(_, nu)| *nu != 0.0);
        if stoichiometry.is_empty() {
            return Err(Error::Reaction {
                reaction: name.to_string(),
                reason: "has no species with a non-zero coefficient".into(),
            });
        }
        let reaction = Reaction {
            name: name.to_string(),
            stoichiometry,
        };
        reaction.check_element_balance(db)?;
        Ok(reaction)
    }

    /// One of the built-in reactions by name.
    pub fn named(db: &SpeciesDb, name: &str) -> Result<Reaction> {
        match NAMED_REACTIONS.iter().find(|(n, _)| *n == name) {
            Some((n, terms)) => Reaction::new(db, n, terms),
            None => Err(Error::UnknownReaction {
                name: name.to_string(),
                context: String::new(),
                known: NAMED_REACTIONS
                    .iter()
                    .map(|(n, _)| *n)
                    .collect::<Vec<_>>()
                    .join(", "),
            }),
        }
    }

    fn check_element_balance(&self, db: &SpeciesDb) -> Result<()> {
        let mut elements: Vec<&str> = Vec::new();
        for (i, _) in &self.stoichiometry {
            for (e, _) in &db.by_index(*i).elements {
                if !elements.contains(&e.as_str()) {
                    elements.push(e);
                }
            }
        }
        for element in elements {
            let net: f64 = self
                .stoichiometry
                .iter()
                .map(|(i, nu)| nu * db.by_index(*i).atoms(element))
                .sum();
            if net.abs() > 1e-12 {
                return Err(Error::ElementBalance {
                    reaction: self.name.clone(),
                    element: element.to_string(),
                    imbalance: net,
                });
            }
        }
        Ok(())
    }

    /// Coefficient of a species (zero when it does not take part).
    pub fn coefficient(&self, species: usize) -> f64 {
        self.stoichiometry
            .iter()
            .find(|(i, _)| *i == species)
            .map_or(0.0, |(_, nu)| *nu)
    }

    /// Change in moles of gas per unit extent.
    pub fn gas_mole_change(&self, db: &SpeciesDb) -> f64 {
        self.stoichiometry
            .iter()
            .filter(|(i, _)| db.by_index(*i).phase == Phase::Gas)
            .map(|(_, nu)| nu)
            .sum()
    }

    /// True when a solid takes part.
    pub fn has_solid(&self, db: &SpeciesDb) -> bool {
        self.stoichiometry
            .iter()
            .any(|(i, _)| db.by_index(*i).phase == Phase::Solid)
    }

    /// Standard Gibbs energy change at `t` K, J/mol of extent.
    pub fn delta_g(&self, db: &SpeciesDb, temperature_k: f64) -> Result<f64> {
        self.sum(db, |s| s.gibbs(temperature_k))
    }

    /// Standard enthalpy change at `t` K, J/mol of extent (positive: endothermic forward).
    pub fn delta_h(&self, db: &SpeciesDb, temperature_k: f64) -> Result<f64> {
        self.sum(db, |s| s.enthalpy(temperature_k))
    }

    /// Natural logarithm of the equilibrium constant at `t` K (standard state 1 bar).
    pub fn ln_k(&self, db: &SpeciesDb, temperature_k: f64) -> Result<f64> {
        Ok(-self.delta_g(db, temperature_k)? / (R_GAS * temperature_k))
    }

    fn sum(
        &self,
        db: &SpeciesDb,
        property: impl Fn(&crate::thermo::Species) -> Result<f64>,
    ) -> Result<f64> {
        let mut total = 0.0;
        for (i, nu) in &self.stoichiometry {
            total += nu * property(db.by_index(*i))?;
        }
        Ok(total)
    }

    /// The reaction written out, e.g. `CH4 + H2O = CO + 3 H2`.
    pub fn equation(&self, db: &SpeciesDb) -> String {
        let side = |sign: f64| {
            self.stoichiometry
                .iter()
                .filter(|(_, nu)| nu * sign > 0.0)
                .map(|(i, nu)| {
                    let n = nu.abs();
                    let name = &db.by_index(*i).name;
                    if (n - 1.0).abs() < 1e-12 {
                        name.clone()
                    } else {
                        format!("{} {name}", trim_number(n))
                    }
                })
                .collect::<Vec<_>>()
                .join(" + ")
        };
        format!("{} = {}", side(-1.0), side(1.0))
    }
}

fn trim_number(x: f64) -> String {
    let s = format!("{x:.6}");
    s.trim_end_matches('0').trim_end_matches('.').to_string()
}

/// Carbon activity from a reaction that forms graphite, given the gas composition.
///
/// For `methane-cracking` (CH4 = C + 2 H2) a_C = K p_CH4 / p_H2^2 and for `boudouard`
/// (2 CO = C + CO2) a_C = K p_CO^2 / p_CO2, partial pressures in bar. a_C > 1 means carbon is
/// thermodynamically possible.
pub fn carbon_activity(
    db: &SpeciesDb,
    reaction: &Reaction,
    temperature_k: f64,
    partial_pressure_bar: impl Fn(usize) -> f64,
) -> Result<f64> {
    let carbon = db.require("C(gr)", " (carbon activity)")?;
    carbon_activity_of(db, reaction, carbon, temperature_k, partial_pressure_bar)
}

/// [`carbon_activity`] with the database index of graphite already looked up (a check that
/// takes many activities looks it up once).
pub fn carbon_activity_of(
    db: &SpeciesDb,
    reaction: &Reaction,
    carbon: usize,
    temperature_k: f64,
    partial_pressure_bar: impl Fn(usize) -> f64,
) -> Result<f64> {
    let nu_c = reaction.coefficient(carbon);
    if nu_c <= 0.0 {
        return Err(Error::Reaction {
            reaction: reaction.name.clone(),
            reason: "does not form graphite, so it gives no carbon activity".into(),
        });
    }
    let mut ln_q_gas = 0.0;
    for (i, nu) in &reaction.stoichiometry {
        if *i != carbon {
            ln_q_gas += nu * partial_pressure_bar(*i).ln();
        }
    }
    // K = a_C^nu_c * prod p^nu  =>  ln a_C = (ln K - ln Q_gas) / nu_c
    Ok(((reaction.ln_k(db, temperature_k)? - ln_q_gas) / nu_c).exp())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn db() -> SpeciesDb {
        SpeciesDb::embedded().unwrap()
    }

    #[test]
    fn all_named_reactions_balance() {
        let db = db();
        for (name, _) in NAMED_REACTIONS {
            Reaction::named(&db, name).unwrap();
        }
    }

    #[test]
    fn steam_reforming_follows_from_the_formula() {
        let db = db();
        let by = |name: &str| db.index_of(name).unwrap();
        // C2H6 + 2 H2O = 2 CO + 5 H2; C3H8 + 3 H2O = 3 CO + 7 H2 (stoichiometry of
        // C_n H_m + n H2O = n CO + (n + m/2) H2, common practice).
        let r = Reaction::steam_reforming_of(&db, by("C2H6"))
            .unwrap()
            .unwrap();
        assert_eq!(r.equation(&db), "C2H6 + 2 H2O = 2 CO + 5 H2");
        assert_eq!(r.name, "C2H6-reforming");
        let r = Reaction::steam_reforming_of(&db, by("C3H8"))
            .unwrap()
            .unwrap();
        assert_eq!(r.equation(&db), "C3H8 + 3 H2O = 3 CO + 7 H2");
        // Methane comes to equilibrium instead; CO and CO2 are the products; N2, H2O and
        // graphite are no fuel for it.
        for name in ["CH4", "CO", "CO2", "N2", "H2O", "H2", "C(gr)", "NH3"] {
            assert!(
                Reaction::steam_reforming_of(&db, by(name)).is_none(),
                "{name}"
            );
        }
        // Organic carbon counts every gas carbon atom but those of CO and CO2.
        assert_eq!(organic_carbon_atoms(db.by_index(by("C3H8"))), 3.0);
        assert_eq!(organic_carbon_atoms(db.by_index(by("CH4"))), 1.0);
        assert_eq!(organic_carbon_atoms(db.by_index(by("CO2"))), 0.0);
        assert_eq!(organic_carbon_atoms(db.by_index(by("C(gr)"))), 0.0);
    }

    #[test]
    fn unbalanced_reaction_is_refused() {
        let db = db();
        let err = Reaction::new(&db, "bad", &[("CH4", -1.0), ("CO", 1.0), ("H2", 2.0)]);
        assert!(matches!(err, Err(Error::ElementBalance { .. })));
        assert!(matches!(
            Reaction::named(&db, "reformin"),
            Err(Error::UnknownReaction { .. })
        ));
    }

    #[test]
    fn equation_text() {
        let db = db();
        let r = Reaction::named(&db, "reforming").unwrap();
        assert_eq!(r.equation(&db), "CH4 + H2O = CO + 3 H2");
        assert_eq!(r.gas_mole_change(&db), 2.0);
    }
}

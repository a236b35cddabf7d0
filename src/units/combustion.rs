//! Complete combustion and lower heating values, worked out from the species data alone.
//!
//! Every species made of carbon, hydrogen, oxygen and nitrogen burns completely by its atoms:
//!
//! ```text
//! CcHhOoNn + (c + h/4 - o/2) O2 -> c CO2 + h/2 H2O + n/2 N2
//! ```
//!
//! so CO goes to CO2, H2 and NH3 to water (NH3 giving N2), every hydrocarbon to CO2 and water,
//! and CO2, H2O, N2 themselves come out unchanged (their oxygen demand is zero); O2 has a demand
//! of -1, i.e. it supplies oxygen. Noble gases (He, Ne, Ar, Kr, Xe, Rn) pass unchanged. A species
//! with any other element cannot be burnt here, which is an error wherever it flows into a
//! flame.
//!
//! The lower heating value (LHV, water leaving as vapour) of a species at 298.15 K is minus the
//! enthalpy of that reaction with the standard enthalpies of the database at 298.15 K, which
//! the NASA-7 records hold as the formation enthalpies (NIST-JANAF, Chase 1998, for the
//! embedded records):
//!
//! ```text
//! LHV_i = h_i(298.15) + d_i h_O2(298.15) - c h_CO2(298.15) - h/2 h_H2O,gas(298.15) - n/2 h_N2(298.15)
//! ```
//!
//! For methane with the JANAF formation enthalpies (CH4 -74.873, CO2 -393.522, H2O(g)
//! -241.826 kJ/mol, O2 and N2 zero): 802.301 kJ/mol.

use crate::error::{Error, Result};
use crate::thermo::SpeciesDb;

/// The reference temperature of heating values and of sensible heats, K (25 degC).
pub const REFERENCE_TEMPERATURE_K: f64 = 298.15;

/// Elements that pass through a flame unchanged.
const NOBLE_GASES: [&str; 6] = ["He", "Ne", "Ar", "Kr", "Xe", "Rn"];

/// How one species burns, per mole of it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Burn {
    /// Oxygen taken, mol O2 (negative for a species that brings oxygen, -1 for O2 itself).
    pub oxygen: f64,
    /// CO2 made, mol.
    pub co2: f64,
    /// H2O made, mol.
    pub h2o: f64,
    /// N2 made, mol.
    pub n2: f64,
    /// True for a noble gas: it leaves as itself.
    pub inert: bool,
}

/// Complete combustion of every species of a database, and its lower heating values.
#[derive(Debug, Clone)]
pub struct Combustion {
    /// Database indices of CO2, H2O, N2 and O2.
    pub co2: usize,
    /// H2O.
    pub h2o: usize,
    /// N2.
    pub n2: usize,
    /// O2.
    pub o2: usize,
    /// Per database species: how it burns, or `None` when it holds an element that cannot be
    /// burnt here.
    burns: Vec<Option<Burn>>,
    /// Per database species: lower heating value at 298.15 K, J/mol (zero for what does not
    /// burn).
    lhv: Vec<f64>,
}

impl Combustion {
    /// The combustion table of `db` (which must hold CO2, H2O, N2 and O2).
    pub fn new(db: &SpeciesDb) -> Result<Combustion> {
        let ctx = " (needed to burn fuels)";
        let (co2, h2o, n2, o2) = (
            db.require("CO2", ctx)?,
            db.require("H2O", ctx)?,
            db.require("N2", ctx)?,
            db.require("O2", ctx)?,
        );
        let t = REFERENCE_TEMPERATURE_K;
        let h = |i: usize| db.by_index(i).enthalpy(t);
        let (h_co2, h_h2o, h_n2, h_o2) = (h(co2)?, h(h2o)?, h(n2)?, h(o2)?);
        let mut burns = Vec::with_capacity(db.len());
        let mut lhv = Vec::with_capacity(db.len());
        for s in db.all() {
            let chon = s
                .elements
                .iter()
                .all(|(e, _)| matches!(e.as_str(), "C" | "H" | "O" | "N"));
            let noble = s.elements.len() == 1 && NOBLE_GASES.contains(&s.elements[0].0.as_str());
            let burn = if noble {
                Some(Burn {
                    oxygen: 0.0,
                    co2: 0.0,
                    h2o: 0.0,
                    n2: 0.0,
                    inert: true,
                })
            } else if chon {
                let (c, hy, o, n) = (s.atoms("C"), s.atoms("H"), s.atoms("O"), s.atoms("N"));
                Some(Burn {
                    oxygen: c + hy / 4.0 - o / 2.0,
                    co2: c,
                    h2o: hy / 2.0,
                    n2: n / 2.0,
                    inert: false,
                })
            } else {
                None
            };
            let value = match burn {
                Some(b) if !b.inert && s.nasa7.in_range(t) => {
                    s.enthalpy(t)? + b.oxygen * h_o2 - b.co2 * h_co2 - b.h2o * h_h2o - b.n2 * h_n2
                }
                _ => 0.0,
            };
            burns.push(burn);
            lhv.push(value);
        }
        Ok(Combustion {
            co2,
            h2o,
            n2,
            o2,
            burns,
            lhv,
        })
    }

    /// Lower heating value of species `i` at 298.15 K, J/mol (zero for what does not burn).
    pub fn lhv(&self, i: usize) -> f64 {
        self.lhv.get(i).copied().unwrap_or(0.0)
    }

    /// Lower heating value of a flow vector, W.
    pub fn lhv_w(&self, flows: &[f64]) -> f64 {
        flows.iter().zip(&self.lhv).map(|(n, h)| n * h).sum()
    }

    /// How species `i` burns (`None`: it cannot be burnt here).
    pub fn burn_of(&self, i: usize) -> Option<Burn> {
        self.burns.get(i).copied().flatten()
    }

    /// Burn `scale` times the flows `flows` completely, adding the products to `out` (one entry
    /// per database species): CO2, H2O and N2 made, noble gases as they are, and the oxygen
    /// balance into O2 (so O2 in `out` goes down by the oxygen taken and may end negative; the
    /// caller supplies the air). Returns the oxygen taken, mol/s (O2 in `flows` counted as a
    /// negative demand). A species that cannot be burnt is an error naming it.
    pub fn burn_into(
        &self,
        db: &SpeciesDb,
        flows: &[f64],
        scale: f64,
        out: &mut [f64],
    ) -> Result<f64> {
        let mut oxygen = 0.0;
        for (i, &n) in flows.iter().enumerate() {
            if n == 0.0 {
                continue;
            }
            let m = n * scale;
            let Some(b) = self.burn_of(i) else {
                let s = db.by_index(i);
                return Err(Error::InvalidValue {
                    field: format!("species {}", s.name),
                    value: format!("{n} mol/s"),
                    reason: "it holds an element other than C, H, O, N or a noble gas and \
                             cannot be burnt completely here"
                        .into(),
                });
            };
            if b.inert {
                out[i] += m;
                continue;
            }
            oxygen += m * b.oxygen;
            out[self.co2] += m * b.co2;
            out[self.h2o] += m * b.h2o;
            out[self.n2] += m * b.n2;
        }
        out[self.o2] -= oxygen;
        Ok(oxygen)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::units::test_support::{db, flows};

    #[test]
    fn methane_and_hydrogen_heating_values_match_janaf() {
        let db = db();
        let c = Combustion::new(&db).unwrap();
        // NIST-JANAF (Chase 1998) formation enthalpies at 298.15 K, kJ/mol: CH4 -74.873,
        // CO2 -393.522, H2O(g) -241.826. LHV(CH4) = -74.873 - (-393.522 - 2 x 241.826)
        // = -74.873 + 393.522 + 483.652 = 802.301 kJ/mol.
        let ch4 = c.lhv(db.index_of("CH4").unwrap()) / 1e3;
        assert!((ch4 - 802.301).abs() < 0.1, "{ch4} kJ/mol");
        // H2 + 1/2 O2 -> H2O(g): LHV = -dfH(H2O, g) = 241.826 kJ/mol (NIST-JANAF).
        let h2 = c.lhv(db.index_of("H2").unwrap()) / 1e3;
        assert!((h2 - 241.826).abs() < 0.1, "{h2} kJ/mol");
        // CO + 1/2 O2 -> CO2: LHV = -393.522 - (-110.527) = 282.995 kJ/mol (NIST-JANAF dfH CO).
        let co = c.lhv(db.index_of("CO").unwrap()) / 1e3;
        assert!((co - 282.995).abs() < 0.1, "{co} kJ/mol");
        // What does not burn has no heating value.
        for n in ["CO2", "H2O", "N2", "O2", "Ar", "He"] {
            assert_eq!(c.lhv(db.index_of(n).unwrap()), 0.0, "{n}");
        }
    }

    #[test]
    fn burning_follows_the_atoms() {
        let db = db();
        let c = Combustion::new(&db).unwrap();
        // C3H8 + 5 O2 -> 3 CO2 + 4 H2O; NH3 + 3/4 O2 -> 1/2 N2 + 3/2 H2O; Ar unchanged.
        let f = flows(&db, &[("C3H8", 1.0), ("NH3", 2.0), ("Ar", 0.5)]);
        let mut out = vec![0.0; db.len()];
        let o2 = c.burn_into(&db, &f, 1.0, &mut out).unwrap();
        assert_eq!(o2, 5.0 + 1.5);
        let get = |n: &str| out[db.index_of(n).unwrap()];
        assert_eq!(get("CO2"), 3.0);
        assert_eq!(get("H2O"), 4.0 + 3.0);
        assert_eq!(get("N2"), 1.0);
        assert_eq!(get("Ar"), 0.5);
        assert_eq!(get("O2"), -6.5);
        assert_eq!(get("C3H8"), 0.0);
    }
}

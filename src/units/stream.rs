//! Process streams: flows per database species at a temperature and pressure, as vapour (an
//! ideal-gas mixture) or as liquid water (condensate).

use crate::error::Result;
use crate::thermo::{mixture, SpeciesDb};

/// Phase of a whole stream.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum StreamPhase {
    /// Ideal-gas mixture.
    Vapour,
    /// Liquid water (condensate); its enthalpy is the ideal-gas value less the latent heat.
    Liquid,
}

/// A process stream.
#[derive(Debug, Clone, PartialEq)]
pub struct Stream {
    /// Flow of every database species, mol/s (indexed like the database).
    pub flows: Vec<f64>,
    /// Temperature, K.
    pub temperature_k: f64,
    /// Pressure, Pa (absolute).
    pub pressure_pa: f64,
    /// Vapour or liquid.
    pub phase: StreamPhase,
}

impl Stream {
    /// A vapour stream.
    pub fn vapour(flows: Vec<f64>, temperature_k: f64, pressure_pa: f64) -> Stream {
        Stream {
            flows,
            temperature_k,
            pressure_pa,
            phase: StreamPhase::Vapour,
        }
    }

    /// Total molar flow, mol/s.
    pub fn total(&self) -> f64 {
        mixture::total(&self.flows)
    }

    /// Mole fraction of a species by database index (zero for an empty stream).
    pub fn mole_fraction(&self, species: usize) -> f64 {
        let t = self.total();
        if t > 0.0 {
            self.flows[species] / t
        } else {
            0.0
        }
    }

    /// Mole fraction on a dry basis (water left out); zero when nothing but water flows.
    pub fn dry_mole_fraction(&self, db: &SpeciesDb, species: usize) -> f64 {
        let water = db.index_of("H2O");
        if Some(species) == water {
            return 0.0;
        }
        let dry = self.total() - water.map_or(0.0, |w| self.flows[w]);
        if dry > 0.0 {
            self.flows[species] / dry
        } else {
            0.0
        }
    }

    /// Enthalpy flow, W, formation enthalpies included.
    pub fn enthalpy_w(&self, db: &SpeciesDb) -> Result<f64> {
        let ideal = mixture::enthalpy(db, &self.flows, self.temperature_k)?;
        match self.phase {
            StreamPhase::Vapour => Ok(ideal),
            StreamPhase::Liquid => {
                let water = db.require("H2O", " (condensate)")?;
                let n = self.flows[water];
                if n == 0.0 {
                    // No condensate: no latent heat (and no range check on the temperature).
                    return Ok(ideal);
                }
                Ok(ideal - n * crate::thermo::water::latent_heat_j_per_mol(self.temperature_k)?)
            }
        }
    }
}

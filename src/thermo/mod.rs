//! Thermochemical data and properties: species records with NASA 7-coefficient polynomials
//! (McBride, Zehe & Gordon, NASA/TP-2002-211556), the species database, ideal-gas mixtures, and
//! the water saturation line (IAPWS-IF97), and the
//! gas models: ideal, or Peng-Robinson (Peng & Robinson 1976) for fugacity coefficients and
//! residual enthalpies at plant pressure.

pub mod database;
pub mod gas_model;
pub mod if97;
pub mod mixture;
pub mod peng_robinson;
pub mod species;
pub mod water;

pub use database::SpeciesDb;
pub use gas_model::GasModel;
pub use species::{Critical, Nasa7, Phase, Species};

//! Thermochemical data and properties: species records with NASA 7-coefficient polynomials
//! (McBride, Zehe & Gordon, NASA/TP-2002-211556), the species database, ideal-gas mixtures, and
//! the water saturation line (IAPWS-IF97).

pub mod database;
pub mod if97;
pub mod mixture;
pub mod species;
pub mod water;

pub use database::SpeciesDb;
pub use species::{Nasa7, Phase, Species};

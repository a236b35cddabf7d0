//! # syntrain
//!
//! Equilibrium and energy balances of the reactor train of a steam-reforming hydrogen or syngas
//! plant: pre-reformer, reformer, high-, medium- and low-temperature shift, methanator, and the
//! coolers, knockouts and purification around them.
//!
//! Layers, each knowing only those below it: [`quantity`] (units at the edges) ->
//! [`thermo`] (species data, NASA polynomials, mixtures, water saturation) -> [`reaction`]
//! (stoichiometry, ln K, dH) -> [`equilibrium`] (the equilibrium stage with approach
//! temperatures and energy modes).
//!
//! Results are screening-level engineering estimates. Hot hydrogen and carbon monoxide at
//! pressure are flammable and toxic: follow local codes and licensed engineering practice.

// Comparisons are written `!(x > 0.0)` on purpose so that NaN is refused with the bad values,
// and the numerical kernels index several parallel arrays by the same loop variable.
#![allow(clippy::neg_cmp_op_on_partial_ord, clippy::needless_range_loop)]

pub mod diagnostics;
pub mod equilibrium;
pub mod error;
pub mod evaluate;
pub mod flowsheet;
pub mod quantity;
pub mod reaction;
pub mod report;
pub mod study;
pub mod thermo;
pub mod units;

pub use error::{Error, Result};

//! Studies built on the compiled flowsheet: revamp options written as overlays of a base
//! ([`overlay`]) and compared side by side with the base ([`compare`]).
//!
//! Studies speak input paths and result paths only (see [`crate::flowsheet::paths`]); they never
//! print. Results are screening-level engineering estimates: hot hydrogen and carbon monoxide at
//! pressure are flammable and toxic; follow local codes and licensed engineering practice.

pub mod compare;
pub mod overlay;

//! Regression tests: one file per fault found by trying syntrain as a plant engineer would, each
//! named after what it was, each failing without its fix. Run with the rest: `cargo test --release`.

mod support;

mod adiabatic_search;
mod liquid_water;
mod output_writes;
mod oxygen_in_reactors;
mod panics;
mod purifier_defaults;
mod report_labels;
mod review_findings;
mod shift_catalysts;
mod species_keys;
mod user_hydrocarbons;

//! Studies: many solves of one compiled flowsheet with a few inputs changed. Studies speak input
//! paths and result paths only (see [`crate::flowsheet::paths`]); they never print.
//!
//! - [`vary`]: what a study varies: input paths with values written in units (`--vary
//!   PATH=FROM..TO:COUNT`, a list, or a distribution), and the steam-to-carbon ratio at a unit's
//!   inlet as a settable input;
//! - [`cases`]: the case list (a full grid, an explicit table, or seeded random draws), case
//!   `i` made on demand from its index alone, so a slice of the list (a shard) or any thread
//!   makes the same case;
//! - [`columns`]: which result paths a sweep writes;
//! - [`sweep`]: the parallel runner writing one CSV row per case in case order ([`row`]);
//! - [`percentiles`] and [`plot`]: what is made of the rows afterwards;
//! - [`overlay`] and [`compare`]: revamp options written as overlays of a base and compared
//!   side by side with it.
//!
//! Results are screening-level engineering estimates. Hot hydrogen and carbon monoxide at
//! pressure are flammable and toxic: follow local codes and licensed engineering practice.

pub mod cases;
pub mod columns;
pub mod compare;
pub mod distribution;
pub mod overlay;
pub mod percentiles;
pub mod plot;
pub mod row;
pub mod sweep;
pub mod uncertainty;
pub mod vary;

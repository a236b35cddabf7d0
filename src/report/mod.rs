//! Reports: what the command line prints. Text tables, JSON, CSV and Markdown of a solved
//! flowsheet, the species listing, and the error chain. Values leave in the units a plant
//! engineer reads (degC, bar abs, kmol/h, Nm3/h per DIN 1343, kW, mol %).

pub mod species;

use crate::error::Error;

/// The cautions printed with every result.
pub const CAUTIONS: &str = "Screening results only. Hot hydrogen and carbon monoxide at pressure \
are flammable, toxic and can embrittle or attack steel; check every figure against vendor data and \
follow local codes and licensed engineering practice before acting on it.";

/// The error and each of its causes, one per line ("error: ...", "  caused by: ...").
pub fn error_chain(err: &Error) -> String {
    let mut out = format!("error: {err}");
    let mut source = std::error::Error::source(err);
    while let Some(s) = source {
        out.push_str(&format!("\n  caused by: {s}"));
        source = s.source();
    }
    out
}

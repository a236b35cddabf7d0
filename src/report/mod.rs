//! Reports: what the command line prints. Text tables, JSON, CSV and Markdown of a solved
//! flowsheet, the species listing, and the error chain. Values leave in the units a plant
//! engineer reads (degC, bar abs, kmol/h, Nm3/h per DIN 1343, kW, mol %).

pub mod compare;
pub mod csv;
pub mod energy;
pub mod evaluate;
pub mod json;
pub mod markdown;
pub mod output;
pub mod solve_table;
pub mod species;
pub mod spread;
pub mod tables;
#[cfg(test)]
mod test_fixture;
pub mod unit_types;

pub use output::{create_streaming, write_output};

use crate::error::{Error, Result};
use crate::flowsheet::result::FlowsheetResult;
use crate::thermo::SpeciesDb;

/// Output format of `solve`.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Format {
    /// Plain-text tables for a terminal ([`solve_table`]).
    Table,
    /// One JSON object with stable keys ([`json`]).
    Json,
    /// The stream table as CSV, wide form ([`csv`]).
    Csv,
    /// The tables of `Table` in GitHub-flavoured Markdown ([`markdown`]).
    Markdown,
}

/// Render a solved flowsheet in `format`. Rendering is complete before anything is written, so
/// an error leaves no partial output behind.
pub fn render_solution(db: &SpeciesDb, result: &FlowsheetResult, format: Format) -> Result<String> {
    match format {
        Format::Table => solve_table::render(db, result),
        Format::Json => json::render(db, result),
        Format::Csv => csv::render(db, result),
        Format::Markdown => markdown::render(db, result),
    }
}

/// The cautions printed with every result.
pub const CAUTIONS: &str = "Screening results only: estimates for engineering studies. Hot \
hydrogen and carbon monoxide at temperature and pressure are flammable, toxic and can embrittle or \
attack steel. The operating limits checked here (carbon formation, steam-to-carbon ratio, catalyst \
windows, dew point) are common practice and replace no limit of the catalyst supplier or the \
equipment designer. Design and operating decisions follow local codes and standards, licensed \
engineering practice and the review of licensed engineers.";

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

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn error_chain_lists_causes() {
        let err = Error::Flowsheet {
            reason: "stream 'x' has two producers".into(),
        }
        .context("reading 'plant.yaml'");
        assert_eq!(
            error_chain(&err),
            "error: reading 'plant.yaml'\n  caused by: flowsheet: stream 'x' has two producers"
        );
    }
}

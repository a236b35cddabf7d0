//! The plain-text solve report for a terminal: the tables of [`super::tables`] laid out in
//! fixed-width columns (text left, numbers right, two spaces between columns), then the
//! warnings and the cautions.
//!
//! Order: title, convergence status, stream blocks (streams as columns, species as rows), the
//! unit table, the key figures of each unit, the equilibrium convergence table, the summary,
//! warnings, cautions.

use super::tables::{self, Align, Row, SolveReport, Table};
use crate::error::Result;
use crate::flowsheet::result::FlowsheetResult;
use crate::thermo::SpeciesDb;

/// Render the solve report as plain text.
pub fn render(db: &SpeciesDb, result: &FlowsheetResult) -> Result<String> {
    Ok(layout(&tables::build(db, result)?))
}

/// Lay out a built report.
pub fn layout(report: &SolveReport) -> String {
    let mut out = String::new();
    let title = if report.title.is_empty() {
        "Flowsheet"
    } else {
        report.title.as_str()
    };
    out.push_str(title);
    out.push('\n');
    out.push_str(&"=".repeat(title.chars().count()));
    out.push_str("\n\n");
    out.push_str(&report.status);
    out.push_str("\n\n");
    for table in &report.streams {
        out.push_str(&table_text(table));
        out.push('\n');
    }
    out.push_str(&table_text(&report.units));
    out.push('\n');
    out.push_str(&table_text(&report.figures));
    out.push('\n');
    if let Some(table) = &report.equilibrium {
        out.push_str(&table_text(table));
        out.push('\n');
    }
    out.push_str(&table_text(&report.summary));
    out.push('\n');
    out.push_str(&table_text(&report.heat_balance));
    out.push('\n');
    if let Some(table) = &report.targets {
        out.push_str(&table_text(table));
        out.push('\n');
    }
    out.push_str("Warnings\n");
    if report.warnings.is_empty() {
        out.push_str("  none\n");
    }
    for w in &report.warnings {
        out.push_str(&format!("  - {w}\n"));
    }
    out.push('\n');
    out.push_str("Cautions\n");
    out.push_str(&wrap(&report.cautions, 2, tables::REPORT_WIDTH - 4));
    out
}

/// One table in fixed-width columns, ending in a newline.
pub fn table_text(table: &Table) -> String {
    let columns = table.headers.len();
    let mut widths: Vec<usize> = table.headers.iter().map(|h| h.chars().count()).collect();
    for row in &table.rows {
        if let Row::Cells(cells) = row {
            for (w, cell) in widths.iter_mut().zip(cells) {
                *w = (*w).max(cell.chars().count());
            }
        }
    }
    let line = |cells: &[String]| -> String {
        let mut text = String::from("  ");
        for (k, cell) in cells.iter().enumerate().take(columns) {
            if k > 0 {
                text.push_str("  ");
            }
            let pad = widths[k].saturating_sub(cell.chars().count());
            match table.align.get(k).copied().unwrap_or(Align::Left) {
                Align::Left => {
                    text.push_str(cell);
                    text.push_str(&" ".repeat(pad));
                }
                Align::Right => {
                    text.push_str(&" ".repeat(pad));
                    text.push_str(cell);
                }
            }
        }
        format!("{}\n", text.trim_end())
    };
    let mut out = format!("{}\n", table.title);
    out.push_str(&line(&table.headers));
    let rule: Vec<String> = widths.iter().map(|w| "-".repeat(*w)).collect();
    out.push_str(&line(&rule));
    for row in &table.rows {
        match row {
            Row::Cells(cells) => out.push_str(&line(cells)),
            Row::Group(label) => out.push_str(&format!("  {label}\n")),
        }
    }
    out
}

/// Wrap text at word boundaries to `width` columns, each line indented by `indent` spaces.
pub(crate) fn wrap(text: &str, indent: usize, width: usize) -> String {
    let mut out = String::new();
    let mut line = String::new();
    for word in text.split_whitespace() {
        if !line.is_empty() && indent + line.len() + 1 + word.len() > width {
            out.push_str(&format!("{}{line}\n", " ".repeat(indent)));
            line.clear();
        }
        if !line.is_empty() {
            line.push(' ');
        }
        line.push_str(word);
    }
    if !line.is_empty() {
        out.push_str(&format!("{}{line}\n", " ".repeat(indent)));
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::test_fixture::{fixture, with_db};

    #[test]
    fn report_has_every_section_and_fits_a_terminal() {
        with_db(|db| {
            let text = render(db, &fixture(db)).unwrap();
            for needle in [
                "Test train, invented",
                "Every unit converged",
                "Streams, 1-",
                "temperature, degC",
                "mol % wet",
                "mol % dry",
                "Units",
                "reforming 10.0 K, shift 0.0 K",
                "Key figures",
                "methane slip, dry",
                "Equilibrium convergence",
                "Summary",
                "steam-to-carbon ratio, reformer inlet",
                "Targets",
                "target 1: met, 7 flowsheet solves",
                "units.reformer.outlet-temperature",
                "870.000 degC",
                "streams.reformed.dry_mol_pct.CH4",
                "4.50003",
                "Warnings",
                "near the catalyst limit",
                "Cautions",
                "licensed engineering practice",
            ] {
                assert!(text.contains(needle), "missing '{needle}' in\n{text}");
            }
            // Every line fits a terminal of 100 columns.
            for line in text.lines() {
                assert!(
                    line.chars().count() <= tables::REPORT_WIDTH,
                    "too wide: {line}"
                );
            }
            // No species that flows nowhere (ethane, argon, ...).
            assert!(!text.contains("C2H6"));
            assert!(!text.contains("  Ar "));
        });
    }

    #[test]
    fn stream_values_in_report_units() {
        with_db(|db| {
            let text = render(db, &fixture(db)).unwrap();
            // Reformed gas at 870 degC, 28 bar; 550 mol/s = 1980 kmol/h = 44380 Nm3/h (DIN 1343,
            // 22.414 m3/kmol).
            let row = |label: &str| {
                text.lines()
                    .find(|l| l.trim_start().starts_with(label))
                    .unwrap()
                    .to_string()
            };
            assert!(row("temperature, degC").contains("870.0"));
            assert!(row("pressure, bar abs").contains("28.00"));
            assert!(row("total, kmol/h").contains("1980.00"));
            assert!(row("total, Nm3/h").contains("44380"));
            // Steam feed: 100 mol % water wet; no dry gas at all.
            assert!(text.contains("100.000"));
        });
    }

    #[test]
    fn wraps_words() {
        assert_eq!(wrap("aa bb cc", 2, 7), "  aa bb\n  cc\n");
    }
}

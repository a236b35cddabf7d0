//! The solve report in GitHub-flavoured Markdown: the same tables as the plain-text report
//! ([`super::tables`]) as pipe tables (GitHub Flavored Markdown Spec 0.29-gfm, section 4.10
//! "Tables (extension)"), with the warnings as a list and the cautions as a block quote.
//!
//! Pipes inside cells are escaped as `\|`; a sub-heading row ("mol % wet") becomes a row whose
//! first cell is bold and whose other cells are empty.

use super::tables::{self, Align, Row, SolveReport, Table};
use crate::error::Result;
use crate::flowsheet::result::FlowsheetResult;
use crate::thermo::SpeciesDb;

/// Render the solve report as Markdown.
pub fn render(db: &SpeciesDb, result: &FlowsheetResult) -> Result<String> {
    Ok(layout(&tables::build(db, result)?))
}

/// Lay out a built report as Markdown.
pub fn layout(report: &SolveReport) -> String {
    let title = if report.title.is_empty() {
        "Flowsheet"
    } else {
        report.title.as_str()
    };
    let mut out = format!("# {}\n\n{}\n\n", escape_text(title), report.status);
    for table in &report.streams {
        out.push_str(&table_markdown(table));
    }
    out.push_str(&table_markdown(&report.units));
    out.push_str(&table_markdown(&report.figures));
    if let Some(table) = &report.equilibrium {
        out.push_str(&table_markdown(table));
    }
    out.push_str(&table_markdown(&report.summary));
    out.push_str(&table_markdown(&report.heat_balance));
    if let Some(table) = &report.targets {
        out.push_str(&table_markdown(table));
    }
    out.push_str("## Warnings\n\n");
    if report.warnings.is_empty() {
        out.push_str("None.\n");
    }
    for w in &report.warnings {
        out.push_str(&format!("- {}\n", escape_text(w)));
    }
    out.push_str("\n## Cautions\n\n");
    out.push_str(&format!("> {}\n", escape_text(&report.cautions)));
    out
}

/// One table with a level-2 heading, followed by a blank line.
pub fn table_markdown(table: &Table) -> String {
    let columns = table.headers.len();
    let row = |cells: &[String]| -> String {
        let cells: Vec<String> = (0..columns)
            .map(|k| escape_cell(cells.get(k).map(String::as_str).unwrap_or("")))
            .collect();
        format!("| {} |\n", cells.join(" | "))
    };
    let mut out = format!("## {}\n\n", escape_text(&table.title));
    out.push_str(&row(&table.headers));
    let rule: Vec<&str> = (0..columns)
        .map(
            |k| match table.align.get(k).copied().unwrap_or(Align::Left) {
                Align::Left => ":---",
                Align::Right => "---:",
            },
        )
        .collect();
    out.push_str(&format!("| {} |\n", rule.join(" | ")));
    for r in &table.rows {
        match r {
            Row::Cells(cells) => out.push_str(&row(cells)),
            Row::Group(label) => {
                // The bold marks are ours: escape only the label.
                let mut cells = vec![format!("**{}**", escape_cell(label))];
                cells.resize(columns, String::new());
                out.push_str(&format!("| {} |\n", cells.join(" | ")));
            }
        }
    }
    out.push('\n');
    out
}

/// A cell: trimmed (indentation means nothing in Markdown), pipes escaped, and characters that
/// would start emphasis escaped.
fn escape_cell(text: &str) -> String {
    escape_text(text.trim()).replace('|', "\\|")
}

/// Escape the characters that Markdown would read as emphasis or code.
fn escape_text(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    for c in text.chars() {
        if matches!(c, '*' | '_' | '`' | '\\') {
            out.push('\\');
        }
        out.push(c);
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::test_fixture::{fixture, with_db};

    #[test]
    fn tables_are_pipe_tables_with_equal_columns() {
        with_db(|db| {
            let text = render(db, &fixture(db)).unwrap();
            assert!(text.starts_with("# Test train, invented\n"));
            assert!(text.contains("## Units\n"));
            assert!(text.contains("## Summary\n"));
            assert!(text.contains("## Targets\n"));
            assert!(text.contains("| **target 1: met, 7 flowsheet solves** |"));
            assert!(text.contains("| **mol % wet** |"));
            assert!(text.contains("> Screening results only:"));
            // Every table line of a block has as many cells as its header.
            let mut expected = None;
            for line in text.lines() {
                if line.starts_with('|') {
                    let cells = line.replace("\\|", "").matches('|').count();
                    match expected {
                        None => expected = Some(cells),
                        Some(n) => assert_eq!(cells, n, "{line}"),
                    }
                } else {
                    expected = None;
                }
            }
            // Alignment row: numbers right-aligned.
            assert!(text.contains("| :--- | ---: |"));
        });
    }

    #[test]
    fn cells_are_escaped() {
        assert_eq!(escape_cell("  a|b_c "), "a\\|b\\_c");
        let table = Table {
            title: "T".into(),
            headers: vec!["x".into(), "y".into()],
            align: vec![Align::Left, Align::Right],
            rows: vec![Row::Cells(vec!["p|q".into(), "1".into()])],
        };
        assert_eq!(
            table_markdown(&table),
            "## T\n\n| x | y |\n| :--- | ---: |\n| p\\|q | 1 |\n\n"
        );
    }
}

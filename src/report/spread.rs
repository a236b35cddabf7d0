//! The spread of a study's results: count, P10, P50, P90, mean, min and max of each result of
//! a sweep's draws, and of each option's change against the base in `compare --draws`
//! (percentiles by Hyndman & Fan definition 7, see `study::percentiles`).

use serde_json::{json, Value};

use super::json::number;
use super::tables::significant;
use super::Format;
use crate::error::{Error, Result};
use crate::study::percentiles::Spread;
use crate::study::uncertainty::DrawsOutcome;

/// One row: the result path, its unit and its spread (`None` when no case gave a value).
pub type SpreadRow = (String, String, Option<Spread>);

/// The table, aligned for a terminal, ending in a newline. `failed`: cases that failed.
pub fn table(rows: &[SpreadRow], cases: u64, failed: u64) -> String {
    let header = [
        "result", "unit", "count", "P10", "P50", "P90", "mean", "min", "max",
    ];
    let mut lines: Vec<Vec<String>> = vec![header.iter().map(|h| h.to_string()).collect()];
    for (path, unit, spread) in rows {
        let mut line = vec![path.clone(), unit.clone()];
        match spread {
            Some(s) => {
                line.push(s.count.to_string());
                for v in [s.p10, s.p50, s.p90, s.mean, s.min, s.max] {
                    line.push(significant(v, 5));
                }
            }
            None => {
                line.push("0".into());
                line.extend(std::iter::repeat_n("n/a".to_string(), 6));
            }
        }
        lines.push(line);
    }
    format!(
        "Spread over {cases} cases ({failed} failed)\n{}",
        aligned(&lines, 2)
    )
}

/// The spread of each option's changes against the base over the draws of `compare
/// --draws`, in `format` (table, Markdown, CSV with one row per option and figure, or JSON).
pub fn changes(outcome: &DrawsOutcome, seed: u64, format: Format) -> Result<String> {
    let used = outcome.draws - outcome.failed;
    let note = format!(
        "Changes against {} over {} draws (seed {seed}; {} left out because a flowsheet failed), \
         the same draws for every option",
        outcome.base, outcome.draws, outcome.failed
    );
    let head = [
        "option", "figure", "unit", "draws", "P10", "P50", "P90", "mean",
    ];
    let mut rows: Vec<Vec<String>> = Vec::new();
    let mut json_options = Vec::new();
    for option in &outcome.options {
        let mut figures = serde_json::Map::new();
        for f in &option.figures {
            let (label, unit, _) = super::compare::label(&f.figure);
            let cells = match &f.change {
                Some(s) => vec![
                    s.count.to_string(),
                    significant(s.p10, 5),
                    significant(s.p50, 5),
                    significant(s.p90, 5),
                    significant(s.mean, 5),
                ],
                None => vec![
                    "0".into(),
                    "n/a".into(),
                    "n/a".into(),
                    "n/a".into(),
                    "n/a".into(),
                ],
            };
            let mut row = vec![option.name.clone(), label, unit.to_string()];
            row.extend(cells);
            rows.push(row);
            let spread_value = |s: &Option<Spread>| match s {
                Some(s) => json!({"count": s.count, "p10": number(s.p10), "p50": number(s.p50),
                    "p90": number(s.p90), "mean": number(s.mean), "min": number(s.min),
                    "max": number(s.max)}),
                None => Value::Null,
            };
            figures.insert(
                f.figure.clone(),
                json!({"unit": unit, "change": spread_value(&f.change), "base": spread_value(&f.base)}),
            );
        }
        json_options.push(json!({"name": option.name, "figures": figures}));
    }
    match format {
        Format::Json => {
            let value = json!({
                "draws": outcome.draws,
                "used": used,
                "failed": outcome.failed,
                "first_failure": outcome.first_failure,
                "seed": seed,
                "base": outcome.base,
                "options": json_options,
                "cautions": super::CAUTIONS,
            });
            Ok(format!("{value:#}\n"))
        }
        Format::Csv => {
            let mut w = ::csv::WriterBuilder::new()
                .terminator(::csv::Terminator::Any(b'\n'))
                .from_writer(Vec::new());
            let io = |e: ::csv::Error| Error::InvalidValue {
                field: "csv".into(),
                value: String::new(),
                reason: e.to_string(),
            };
            w.write_record(head).map_err(io)?;
            for r in &rows {
                w.write_record(r).map_err(io)?;
            }
            let bytes = w.into_inner().map_err(|e| io(e.into_error().into()))?;
            Ok(String::from_utf8_lossy(&bytes).into_owned())
        }
        Format::Markdown => {
            let mut out = format!("{note}.\n\n| {} |\n|", head.join(" | "));
            out.push_str(&" --- |".repeat(head.len()));
            out.push('\n');
            for r in &rows {
                out.push_str(&format!("| {} |\n", r.join(" | ")));
            }
            Ok(out)
        }
        Format::Table => {
            let mut lines: Vec<Vec<String>> = vec![head.iter().map(|h| h.to_string()).collect()];
            lines.extend(rows);
            Ok(format!("{note}\n{}", aligned(&lines, 3)))
        }
    }
}

/// Columns aligned, the first `text_columns` to the left, a rule under the header.
fn aligned(lines: &[Vec<String>], text_columns: usize) -> String {
    let width = lines.first().map_or(0, Vec::len);
    let widths: Vec<usize> = (0..width)
        .map(|c| {
            lines
                .iter()
                .map(|l| l[c].chars().count())
                .max()
                .unwrap_or(0)
        })
        .collect();
    let mut out = String::new();
    for (i, line) in lines.iter().enumerate() {
        let cells: Vec<String> = line
            .iter()
            .enumerate()
            .map(|(c, cell)| {
                if c < text_columns {
                    format!("{cell:<w$}", w = widths[c])
                } else {
                    format!("{cell:>w$}", w = widths[c])
                }
            })
            .collect();
        out.push_str("  ");
        out.push_str(cells.join("  ").trim_end());
        out.push('\n');
        if i == 0 {
            let rule: Vec<String> = widths.iter().map(|w| "-".repeat(*w)).collect();
            out.push_str("  ");
            out.push_str(&rule.join("  "));
            out.push('\n');
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::study::percentiles::spread;

    #[test]
    fn the_table_shows_each_percentile() {
        // numpy.percentile of these ten values: P10 0.94, P50 4.85, P90 8.91 (linear method).
        let x = [3.1, 1.0, 4.7, 2.2, 9.9, 5.0, 6.5, 0.4, 8.8, 7.3];
        let rows = vec![
            ("summary.x".to_string(), "K".to_string(), spread(&x)),
            ("summary.y".to_string(), "kW".to_string(), None),
        ];
        let text = table(&rows, 11, 1);
        assert!(text.starts_with("Spread over 11 cases (1 failed)\n"));
        let line = text.lines().find(|l| l.contains("summary.x")).unwrap();
        let cells: Vec<&str> = line.split_whitespace().collect();
        assert_eq!(
            cells,
            [
                "summary.x",
                "K",
                "10",
                "0.94000",
                "4.8500",
                "8.9100",
                "4.8900",
                "0.40000",
                "9.9000"
            ]
        );
        assert!(text
            .lines()
            .any(|l| l.contains("summary.y") && l.contains("n/a")));
    }
}

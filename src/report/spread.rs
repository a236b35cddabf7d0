//! The spread of a study's results as a text table: count, P10, P50, P90, mean, min and max
//! of each result (percentiles by Hyndman & Fan definition 7, see `study::percentiles`).

use super::tables::significant;
use crate::study::percentiles::Spread;

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
    let widths: Vec<usize> = (0..header.len())
        .map(|c| {
            lines
                .iter()
                .map(|l| l[c].chars().count())
                .max()
                .unwrap_or(0)
        })
        .collect();
    let mut out = format!("Spread over {cases} cases ({failed} failed)\n");
    for (i, line) in lines.iter().enumerate() {
        let cells: Vec<String> = line
            .iter()
            .enumerate()
            .map(|(c, cell)| {
                if c < 2 {
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

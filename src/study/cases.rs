//! The case list of a study: a full grid of `--vary` values (the last input varies fastest),
//! an explicit table from a cases file, or seeded random draws. Case `i` is made from its
//! index alone ([`CaseList::case`]), so any thread and any slice of the list makes the same
//! case.
//!
//! A cases file is CSV (RFC 4180, read with the `csv` crate): a header of input paths, then one
//! row per case, each cell a value with its unit ("820 degC", "10 K", "3105 kmol/h"). A
//! column is reported in the unit of its first cell.

use super::distribution::{generator, Distribution};
use super::vary::{StudyInput, Variation, Vary};
use crate::error::{Error, Position, Result};
use crate::flowsheet::Flowsheet;

/// Most cases in one study (a guard against a grid that could never finish).
pub const MAX_CASES: u64 = 1 << 40;

#[derive(Debug, Clone)]
enum Source {
    /// One list of (shown, SI) values per input; the last varies fastest.
    Grid(Vec<Vec<(f64, f64)>>),
    /// Row-major (shown, SI) values, one row per case.
    Table(Vec<(f64, f64)>),
    /// Draws seeded with `seed`, one distribution per input.
    Draws {
        seed: u64,
        distributions: Vec<Distribution>,
    },
}

/// The cases of a study.
#[derive(Debug, Clone)]
pub struct CaseList {
    /// The inputs, in the order of the `--vary` settings or the file's columns.
    pub inputs: Vec<StudyInput>,
    source: Source,
    len: u64,
}

impl CaseList {
    /// The full grid of `varies`, each a list or range of values; the last varies fastest.
    pub fn grid(varies: Vec<Vary>) -> Result<CaseList> {
        let mut inputs = Vec::new();
        let mut lists = Vec::new();
        for v in varies {
            match v.variation {
                Variation::Values(values) => lists.push(values),
                Variation::Draw(_) => {
                    return Err(invalid(
                        "--vary",
                        &v.input.path,
                        "a distribution (~) needs --draws N; give ranges or lists for a grid",
                    ))
                }
            }
            inputs.push(v.input);
        }
        check_distinct(&inputs)?;
        let len = lists.iter().try_fold(1u64, |n, l| {
            n.checked_mul(l.len() as u64).filter(|n| *n <= MAX_CASES)
        });
        let len = len.ok_or_else(|| {
            invalid(
                "--vary",
                "the grid",
                &format!("it has more than {MAX_CASES} cases; split the study"),
            )
        })?;
        Ok(CaseList {
            inputs,
            source: Source::Grid(lists),
            len,
        })
    }

    /// `count` random draws of `varies`, each a distribution, seeded by `seed`.
    pub fn draws(varies: Vec<Vary>, count: u64, seed: u64) -> Result<CaseList> {
        if count == 0 || count > MAX_CASES {
            return Err(invalid(
                "--draws",
                &count.to_string(),
                &format!("give 1 to {MAX_CASES} draws"),
            ));
        }
        let mut inputs = Vec::new();
        let mut distributions = Vec::new();
        for v in varies {
            match v.variation {
                Variation::Draw(d) => distributions.push(d),
                Variation::Values(_) => {
                    return Err(invalid(
                        "--vary",
                        &v.input.path,
                        "with --draws every --vary is a distribution, e.g. \
                         'PATH~normal(10 K, 3 K)'",
                    ))
                }
            }
            inputs.push(v.input);
        }
        check_distinct(&inputs)?;
        Ok(CaseList {
            inputs,
            source: Source::Draws {
                seed,
                distributions,
            },
            len: count,
        })
    }

    /// The cases of a cases file's text (`origin` names it in errors).
    pub fn from_table(flowsheet: &Flowsheet, origin: &str, text: &str) -> Result<CaseList> {
        let mut reader = csv::ReaderBuilder::new()
            .has_headers(true)
            .trim(csv::Trim::All)
            .from_reader(text.as_bytes());
        let at = |line: u64, column: usize, input: &str, message: String| Error::Input {
            file: origin.to_string(),
            position: Some(Position {
                line: line as usize,
                column,
            }),
            input: input.to_string(),
            message,
        };
        let header = reader
            .headers()
            .map_err(|e| at(1, 1, "header", format!("cannot read the header: {e}")))?
            .clone();
        let mut records = Vec::new();
        for record in reader.records() {
            let record = record.map_err(|e| {
                let line = e.position().map_or(0, |p| p.line());
                at(line, 1, "row", format!("cannot read this row: {e}"))
            })?;
            records.push(record);
        }
        let Some(first) = records.first() else {
            return Err(at(1, 1, "rows", "the cases file has no rows".into()));
        };
        let mut inputs = Vec::new();
        for (c, path) in header.iter().enumerate() {
            let input = StudyInput::resolve(flowsheet, path, first.get(c).unwrap_or(""))
                .map_err(|e| at(1, c + 1, path, e.to_string()))?;
            inputs.push(input);
        }
        check_distinct(&inputs)?;
        let mut values = Vec::with_capacity(records.len() * inputs.len());
        for record in &records {
            let line = record.position().map_or(0, |p| p.line());
            for (c, input) in inputs.iter().enumerate() {
                let cell = record.get(c).unwrap_or("");
                let si = input
                    .parse(cell)
                    .map_err(|e| at(line, c + 1, &input.path, e.to_string()))?;
                values.push((input.shown(cell, si), si));
            }
        }
        Ok(CaseList {
            inputs,
            len: records.len() as u64,
            source: Source::Table(values),
        })
    }

    /// The number of cases.
    pub fn len(&self) -> u64 {
        self.len
    }

    /// True when there are no cases.
    pub fn is_empty(&self) -> bool {
        self.len == 0
    }

    /// Case `i`: each input's value shown in its unit and in SI (slices as long as the inputs).
    pub fn case(&self, i: u64, shown: &mut [f64], si: &mut [f64]) {
        match &self.source {
            Source::Grid(lists) => {
                let mut rest = i;
                for (k, list) in lists.iter().enumerate().rev() {
                    let n = list.len() as u64;
                    let (s, x) = list[(rest % n) as usize];
                    rest /= n;
                    shown[k] = s;
                    si[k] = x;
                }
            }
            Source::Table(values) => {
                let width = self.inputs.len();
                let row = &values[i as usize * width..(i as usize + 1) * width];
                for (k, (s, x)) in row.iter().enumerate() {
                    shown[k] = *s;
                    si[k] = *x;
                }
            }
            Source::Draws {
                seed,
                distributions,
                ..
            } => {
                let mut rng = generator(*seed, i);
                for (k, d) in distributions.iter().enumerate() {
                    let s = d.sample(&mut rng);
                    let unit = &self.inputs[k].unit;
                    shown[k] = s;
                    si[k] = unit.offset + unit.scale * s;
                }
            }
        }
    }

    /// The values of input `k` in the grid, in order (`None` unless a grid).
    pub fn grid_values(&self, k: usize) -> Option<Vec<f64>> {
        match &self.source {
            Source::Grid(lists) => lists.get(k).map(|l| l.iter().map(|v| v.0).collect()),
            _ => None,
        }
    }

    /// True for random draws.
    pub fn is_draws(&self) -> bool {
        matches!(self.source, Source::Draws { .. })
    }
}

/// An input given twice would make the first setting silently lost.
fn check_distinct(inputs: &[StudyInput]) -> Result<()> {
    for (i, a) in inputs.iter().enumerate() {
        if inputs[..i].iter().any(|b| b.target == a.target) {
            return Err(invalid(
                "--vary",
                &a.path,
                "this input is varied twice; give each input once",
            ));
        }
    }
    Ok(())
}

fn invalid(field: &str, value: &str, reason: &str) -> Error {
    Error::InvalidValue {
        field: field.to_string(),
        value: value.to_string(),
        reason: reason.to_string(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::study::vary::parse_vary;
    use crate::thermo::SpeciesDb;

    fn demo(db: &SpeciesDb) -> Flowsheet {
        let path =
            std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("flowsheets/demo-train.yaml");
        Flowsheet::from_file(&path, db).unwrap()
    }

    fn all(list: &CaseList) -> Vec<Vec<f64>> {
        let n = list.inputs.len();
        (0..list.len())
            .map(|i| {
                let (mut shown, mut si) = (vec![0.0; n], vec![0.0; n]);
                list.case(i, &mut shown, &mut si);
                shown
            })
            .collect()
    }

    #[test]
    fn a_grid_varies_the_last_input_fastest() {
        let db = SpeciesDb::embedded().unwrap();
        let fs = demo(&db);
        let varies = vec![
            parse_vary(&fs, "units.hts.approach.shift=1 K,2 K").unwrap(),
            parse_vary(&fs, "units.lts.approach.shift=10 K..30 K:3").unwrap(),
        ];
        let grid = CaseList::grid(varies).unwrap();
        assert_eq!(grid.len(), 6);
        assert!(!grid.is_empty() && !grid.is_draws());
        assert_eq!(
            all(&grid),
            [
                [1.0, 10.0],
                [1.0, 20.0],
                [1.0, 30.0],
                [2.0, 10.0],
                [2.0, 20.0],
                [2.0, 30.0]
            ]
        );
        assert_eq!(grid.grid_values(1), Some(vec![10.0, 20.0, 30.0]));
        // An input given twice, and a distribution without draws, are refused.
        let twice = vec![
            parse_vary(&fs, "units.hts.approach.shift=1 K").unwrap(),
            parse_vary(&fs, "units.hts.approach.shift=2 K").unwrap(),
        ];
        assert!(CaseList::grid(twice).is_err());
        let draw = vec![parse_vary(&fs, "units.hts.approach.shift~normal(8 K, 1 K)").unwrap()];
        assert!(CaseList::grid(draw).is_err());
    }

    #[test]
    fn draws_repeat_by_index_and_convert_to_si() {
        let db = SpeciesDb::embedded().unwrap();
        let fs = demo(&db);
        let varies = || {
            vec![parse_vary(
                &fs,
                "units.reformer.outlet-temperature~uniform(850 degC, 870 degC)",
            )
            .unwrap()]
        };
        let list = CaseList::draws(varies(), 50, 3).unwrap();
        assert!(list.is_draws() && list.grid_values(0).is_none());
        let (mut shown, mut si) = ([0.0], [0.0]);
        list.case(17, &mut shown, &mut si);
        assert!((850.0..870.0).contains(&shown[0]));
        assert!((shown[0] + 273.15 - si[0]).abs() < 1e-9);
        let again = CaseList::draws(varies(), 10, 3).unwrap();
        let (mut shown2, mut si2) = ([0.0], [0.0]);
        again.case(17, &mut shown2, &mut si2);
        assert_eq!(shown, shown2);
        assert!(CaseList::draws(varies(), 0, 3).is_err());
        let range = vec![parse_vary(&fs, "units.hts.approach.shift=1 K,2 K").unwrap()];
        assert!(CaseList::draws(range, 5, 3).is_err());
    }

    #[test]
    fn a_table_takes_units_per_cell_and_names_bad_cells() {
        let db = SpeciesDb::embedded().unwrap();
        let fs = demo(&db);
        let text = "units.reformer.outlet-temperature, units.hts.approach.shift\n\
                    850 degC, 5 K\n\
                    1143.15 K, 7 K\n";
        let list = CaseList::from_table(&fs, "cases.csv", text).unwrap();
        assert_eq!(list.len(), 2);
        let rows = all(&list);
        assert_eq!(rows[0], [850.0, 5.0]);
        assert!((rows[1][0] - 870.0).abs() < 1e-9 && rows[1][1] == 7.0);
        let bad = "units.hts.approach.shift\n5 K\nfive K\n";
        let e = CaseList::from_table(&fs, "cases.csv", bad).unwrap_err();
        assert!(e.to_string().starts_with("cases.csv:3:1"), "{e}");
        let e =
            CaseList::from_table(&fs, "cases.csv", "units.hts.aproach.shift\n5 K\n").unwrap_err();
        assert!(e.to_string().contains("cases.csv:1:1"), "{e}");
        assert!(CaseList::from_table(&fs, "c.csv", "units.hts.approach.shift\n").is_err());
    }
}

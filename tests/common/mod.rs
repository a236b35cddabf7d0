//! Helpers shared by the integration tests: reading the reference tables under tests/data/.

#![allow(dead_code)]

pub mod alloc;
pub mod syngas;

use std::path::PathBuf;

use syntrain::thermo::SpeciesDb;

/// Path of a file under tests/data/.
pub fn data_path(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests")
        .join("data")
        .join(name)
}

/// A CSV table with a header line: column names and rows of text cells.
pub struct Table {
    pub header: Vec<String>,
    pub rows: Vec<Vec<String>>,
}

impl Table {
    pub fn read(name: &str) -> Table {
        let text = std::fs::read_to_string(data_path(name))
            .unwrap_or_else(|e| panic!("reading tests/data/{name}: {e}"));
        let mut lines = text.lines().filter(|l| !l.trim().is_empty());
        let header = lines
            .next()
            .expect("header line")
            .split(',')
            .map(|s| s.trim().to_string())
            .collect();
        let rows = lines
            .map(|l| l.split(',').map(|s| s.trim().to_string()).collect())
            .collect();
        Table { header, rows }
    }

    pub fn column(&self, name: &str) -> usize {
        self.header
            .iter()
            .position(|h| h == name)
            .unwrap_or_else(|| panic!("no column {name} in {:?}", self.header))
    }

    pub fn number(&self, row: usize, name: &str) -> f64 {
        let cell = &self.rows[row][self.column(name)];
        cell.parse()
            .unwrap_or_else(|e| panic!("row {row} column {name}: '{cell}': {e}"))
    }

    pub fn text(&self, row: usize, name: &str) -> &str {
        &self.rows[row][self.column(name)]
    }
}

/// A flow vector over the database from (name, amount) pairs.
pub fn flows(db: &SpeciesDb, pairs: &[(&str, f64)]) -> Vec<f64> {
    let mut v = vec![0.0; db.len()];
    for (name, n) in pairs {
        v[db.index_of(name).expect("species")] += *n;
    }
    v
}

/// Largest relative element-balance error between two flow vectors.
pub fn element_balance_error(db: &SpeciesDb, a: &[f64], b: &[f64]) -> f64 {
    use syntrain::thermo::mixture;
    mixture::elements(db)
        .iter()
        .map(|e| {
            let x = mixture::element_amount(db, a, e);
            let y = mixture::element_amount(db, b, e);
            if x == 0.0 && y == 0.0 {
                0.0
            } else {
                (x - y).abs() / x.abs().max(y.abs())
            }
        })
        .fold(0.0, f64::max)
}

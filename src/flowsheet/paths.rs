//! Input and result paths: the names every numeric input and output of a flowsheet goes by.
//!
//! Input paths (values in SI when set through the library): `feeds.NAME.temperature`,
//! `feeds.NAME.pressure`, `feeds.NAME.total`, `feeds.NAME.flows.SPECIES`, `units.NAME.KEY` and
//! `units.NAME.KEY.SUBKEY` (`units.hts.approach.shift`, `units.reformer.outlet-temperature`).
//!
//! Result paths: `streams.NAME.temperature_K`, `streams.NAME.pressure_bar`,
//! `streams.NAME.flow_kmol_h.SPECIES`, `streams.NAME.dry_mol_pct.SPECIES`, `units.NAME.duty_kW`,
//! `units.NAME.outlet_temperature_K`, `units.NAME.figures.KEY` (in report units),
//! `summary.KEY`.
//!
//! A path that does not exist is an error listing the nearest valid ones, nearest by the
//! Levenshtein edit distance (Levenshtein 1966) on the whole path.

/// The `count` paths of `known` nearest to `path` by edit distance, nearest first (ties in the
/// order of `known`).
pub fn nearest<'a>(path: &str, known: &[&'a str], count: usize) -> Vec<&'a str> {
    let mut scored: Vec<(usize, usize, &str)> = known
        .iter()
        .enumerate()
        .map(|(i, k)| (edit_distance(path, k), i, *k))
        .collect();
    scored.sort_unstable();
    scored.into_iter().take(count).map(|(_, _, k)| k).collect()
}

/// Levenshtein distance between two strings, by characters (one row of the table at a time).
pub fn edit_distance(a: &str, b: &str) -> usize {
    let b: Vec<char> = b.chars().collect();
    let mut row: Vec<usize> = (0..=b.len()).collect();
    for (i, ca) in a.chars().enumerate() {
        let mut diagonal = row[0];
        row[0] = i + 1;
        for (j, cb) in b.iter().enumerate() {
            let above = row[j + 1];
            row[j + 1] = if ca == *cb {
                diagonal
            } else {
                1 + diagonal.min(above).min(row[j])
            };
            diagonal = above;
        }
    }
    row[b.len()]
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn levenshtein_distances() {
        // Levenshtein (1966); the classic worked pair: kitten -> sitting is 3 edits.
        assert_eq!(edit_distance("kitten", "sitting"), 3);
        assert_eq!(edit_distance("", "abc"), 3);
        assert_eq!(edit_distance("same", "same"), 0);
        assert_eq!(edit_distance("flaw", "lawn"), 2);
    }

    #[test]
    fn nearest_paths_first() {
        let known = [
            "units.hts.approach.shift",
            "units.lts.approach.shift",
            "units.reformer.outlet-temperature",
        ];
        let n = nearest("units.hts.aproach.shift", &known, 2);
        assert_eq!(
            n,
            vec!["units.hts.approach.shift", "units.lts.approach.shift"]
        );
    }
}

//! The stream table as CSV in wide form: one header line, then one line per stream, in the order
//! of the result (feeds first, then unit outlets in solve order). Written by the `csv` crate:
//! quoting and line ends follow RFC 4180 (lines end in CRLF; a field holding a comma, a double
//! quote, CR or LF is enclosed in double quotes with inner quotes doubled).
//!
//! Columns, in this order:
//! - `stream`: stream name
//! - `source`: `feed` or the name of the unit that makes it
//! - `destination`: the unit that uses it; empty for a product
//! - `phase`: `vapour` or `liquid`
//! - `temperature_degC`, `temperature_K`
//! - `pressure_bar_abs` (absolute pressure, bar)
//! - `total_kmol_h`, `total_Nm3_h` (ideal gas at 273.15 K and 101 325 Pa, DIN 1343), `mass_kg_h`
//! - `enthalpy_kW` (total, formation enthalpies included)
//! - `<species>_kmol_h` for each species that flows in some stream, in database order
//! - `<species>_mol_pct_wet` for the same species
//! - `<species>_mol_pct_dry` for the same species less water
//!
//! The stream table only: design targets are not in it (the streams are those of the final solve,
//! with the targets met); `--format json` lists them.
//!
//! Numbers are written in full precision (the shortest text that reads back to the same value);
//! a value that is not finite is left empty.

use super::tables::{phase_name, present_species, source_name};
use crate::error::{Error, Result, ResultExt};
use crate::flowsheet::result::FlowsheetResult;
use crate::quantity::{
    kelvin_to_degc, kg_s_to_kg_h, mol_s_to_kmol_h, mol_s_to_nm3_h, pa_to_bar, w_to_kw,
};
use crate::thermo::SpeciesDb;

/// Render the stream table as CSV.
pub fn render(db: &SpeciesDb, result: &FlowsheetResult) -> Result<String> {
    let species = present_species(result);
    let water = db.index_of("H2O");
    let dry: Vec<usize> = species
        .iter()
        .copied()
        .filter(|&i| Some(i) != water)
        .collect();
    let name = |i: usize| db.by_index(i).name.as_str();

    let mut header: Vec<String> = [
        "stream",
        "source",
        "destination",
        "phase",
        "temperature_degC",
        "temperature_K",
        "pressure_bar_abs",
        "total_kmol_h",
        "total_Nm3_h",
        "mass_kg_h",
        "enthalpy_kW",
    ]
    .iter()
    .map(|s| s.to_string())
    .collect();
    header.extend(species.iter().map(|&i| format!("{}_kmol_h", name(i))));
    header.extend(species.iter().map(|&i| format!("{}_mol_pct_wet", name(i))));
    header.extend(dry.iter().map(|&i| format!("{}_mol_pct_dry", name(i))));

    let mut out = csv::WriterBuilder::new()
        .terminator(csv::Terminator::CRLF)
        .from_writer(Vec::new());
    out.write_record(&header).map_err(csv_error)?;
    for s in &result.streams {
        let st = &s.stream;
        let enthalpy_w = st
            .enthalpy_w(db)
            .context(|| format!("enthalpy of stream '{}' for the report", s.name))?;
        let mut fields = vec![
            s.name.clone(),
            source_name(s).to_string(),
            s.destination.clone().unwrap_or_default(),
            phase_name(st.phase).to_string(),
            number(kelvin_to_degc(st.temperature_k)),
            number(st.temperature_k),
            number(pa_to_bar(st.pressure_pa)),
            number(mol_s_to_kmol_h(st.total())),
            number(mol_s_to_nm3_h(st.total())),
            number(kg_s_to_kg_h(crate::thermo::mixture::mass(db, &st.flows))),
            number(w_to_kw(enthalpy_w)),
        ];
        fields.extend(
            species
                .iter()
                .map(|&i| number(mol_s_to_kmol_h(st.flows.get(i).copied().unwrap_or(0.0)))),
        );
        fields.extend(species.iter().map(|&i| number(100.0 * st.mole_fraction(i))));
        fields.extend(
            dry.iter()
                .map(|&i| number(100.0 * st.dry_mole_fraction(db, i))),
        );
        out.write_record(&fields).map_err(csv_error)?;
    }
    let bytes = out
        .into_inner()
        .map_err(|e| csv_error(csv::Error::from(e.into_error())))?;
    String::from_utf8(bytes).map_err(|e| Error::InvalidValue {
        field: "CSV report".into(),
        value: String::new(),
        reason: format!("not UTF-8: {e}"),
    })
}

/// A CSV writer error as the library's error (writing into memory: not expected in practice).
fn csv_error(e: csv::Error) -> Error {
    Error::InvalidValue {
        field: "CSV report".into(),
        value: String::new(),
        reason: e.to_string(),
    }
}

/// Full-precision number, empty when not finite.
fn number(x: f64) -> String {
    if x.is_finite() {
        format!("{x}")
    } else {
        String::new()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::test_fixture::{fixture, with_db};

    #[test]
    fn numbers_in_full_precision_and_empty_when_not_finite() {
        assert_eq!(number(f64::INFINITY), "");
        assert_eq!(number(f64::NAN), "");
        assert_eq!(number(0.1), "0.1");
        assert_eq!(number(1.0 / 3.0).parse::<f64>().unwrap(), 1.0 / 3.0);
    }

    #[test]
    fn wide_table_one_line_per_stream() {
        with_db(|db| {
            let mut result = fixture(db);
            // RFC 4180, section 2, rules 6 and 7: a comma and quotes force quoting, inner
            // quotes doubled; a line break inside a field stays inside the quotes.
            result.streams[0].name = "gas, \"natural\"".into();
            result.streams[1].name = "two\nlines".into();
            let text = render(db, &result).unwrap();
            assert!(text.ends_with("\r\n"));
            let lines: Vec<&str> = text.split("\r\n").filter(|l| !l.is_empty()).collect();
            assert_eq!(lines.len(), 1 + result.streams.len());
            let header: Vec<&str> = lines[0].split(',').collect();
            assert_eq!(header[0], "stream");
            assert!(header.contains(&"CO_kmol_h"));
            assert!(header.contains(&"H2O_mol_pct_wet"));
            assert!(!header.contains(&"H2O_mol_pct_dry"));
            assert!(!header.iter().any(|h| h.starts_with("C2H6")));
            assert!(lines[1].starts_with("\"gas, \"\"natural\"\"\",feed,mixer,vapour,"));
            assert!(lines[2].starts_with("\"two\nlines\","), "{}", lines[2]);
            // Reformed gas: 45 mol/s CO = 162 kmol/h; its row has as many fields as the header.
            let reformed: Vec<&str> = lines[4].split(',').collect();
            assert_eq!(reformed.len(), header.len());
            let co = header.iter().position(|h| *h == "CO_kmol_h").unwrap();
            assert!((reformed[co].parse::<f64>().unwrap() - 162.0).abs() < 1e-9);
            // A product has no destination.
            assert!(lines[9].starts_with("hydrogen,purifier,,vapour,"));
        });
    }
}

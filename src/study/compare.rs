//! Comparing revamp options with their base: each flowsheet (a full file or an overlay, see
//! [`super::overlay`]) is loaded and solved, and the reports put the plant figures side by side
//! with each option's change against the base ([`crate::report::compare`]).
//!
//! The figures compared are the plant summary (hydrogen made, methane slip at each reformer, CO
//! slip at each shift converter, steam-to-carbon ratios, hydrogen made per carbon fed, heating
//! and cooling duties) and each unit's outlet temperature and duty. A unit or figure only one
//! flowsheet has is blank on the other side; no change is made up for it.
//!
//! For studies that solve many cases (uncertainty), [`evaluate`] takes each flowsheet with its
//! own parameter vector and returns the same figures as (path, value) pairs in a stable order,
//! so that one set of random draws can be applied to every option and the changes computed.

use std::path::PathBuf;

use super::overlay::{self, Case};
use crate::error::Result;
use crate::flowsheet::{Flowsheet, FlowsheetResult};
use crate::quantity::{kelvin_to_degc, w_to_kw};
use crate::thermo::SpeciesDb;

/// One flowsheet of a comparison, loaded and solved.
#[derive(Debug, Clone)]
pub struct Solved {
    /// The flowsheet as loaded (name, file, compiled flowsheet, parameters, files read).
    pub case: Case,
    /// Its solution with its parameter vector.
    pub result: FlowsheetResult,
}

/// Load and solve the base (first file) and each option; an error names the file it came from.
pub fn solve_all(db: &SpeciesDb, files: &[PathBuf]) -> Result<Vec<Solved>> {
    files
        .iter()
        .map(|file| {
            let case = overlay::load(db, file)?;
            let result = case
                .flowsheet
                .solve_with(db, &case.parameters, None)
                .map_err(|e| e.context(format!("solving {}", file.display())))?;
            Ok(Solved { case, result })
        })
        .collect()
}

/// The compared figures of one solution as (path, value), in a stable order: the `summary.`
/// result paths in report order (those the solution holds), then for each unit in solve order
/// `units.NAME.outlet_temperature_degC` (units with an outlet) and `units.NAME.duty_kW`.
pub fn figures(db: &SpeciesDb, result: &FlowsheetResult) -> Vec<(String, f64)> {
    let mut out: Vec<(String, f64)> = result
        .result_paths(db)
        .into_iter()
        .filter(|p| p.path.starts_with("summary."))
        .filter_map(|p| p.get(db, result).map(|v| (p.path, v)))
        .collect();
    for u in &result.units {
        if let Some(first) = u.result.outlets.first() {
            out.push((
                format!("units.{}.outlet_temperature_degC", u.name),
                kelvin_to_degc(first.temperature_k),
            ));
        }
        out.push((
            format!("units.{}.duty_kW", u.name),
            w_to_kw(u.result.duty_w),
        ));
    }
    out
}

/// Solve each flowsheet with its own parameter vector (start from [`Flowsheet::parameters`] or
/// [`Case::parameters`] and set the slots [`Flowsheet::input`] gives) and return its
/// [`figures`], one list per flowsheet in the order given. The first error stops the run.
pub fn evaluate(db: &SpeciesDb, cases: &[(&Flowsheet, &[f64])]) -> Result<Vec<Vec<(String, f64)>>> {
    cases
        .iter()
        .map(|(flowsheet, params)| {
            let result = flowsheet.solve_with(db, params, None)?;
            Ok(figures(db, &result))
        })
        .collect()
}

/// The change of each figure of `option` against `base`: (path, option - base, percent of the
/// base), in the order of `base` and then the figures only `option` has; `None` where either
/// side lacks the figure, percent `None` where the base is 0.
pub fn changes(
    base: &[(String, f64)],
    option: &[(String, f64)],
) -> Vec<(String, Option<f64>, Option<f64>)> {
    let find =
        |list: &[(String, f64)], path: &str| list.iter().find(|(p, _)| p == path).map(|(_, v)| *v);
    let mut paths: Vec<&str> = base.iter().map(|(p, _)| p.as_str()).collect();
    for (p, _) in option {
        if !paths.contains(&p.as_str()) {
            paths.push(p);
        }
    }
    paths
        .into_iter()
        .map(|p| {
            let (b, o) = (find(base, p), find(option, p));
            let change = b.zip(o).map(|(b, o)| o - b);
            let pct = change
                .zip(b)
                .filter(|(_, b)| *b != 0.0)
                .map(|(c, b)| 100.0 * c / b);
            (p.to_string(), change, pct)
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn pairs(list: &[(&str, f64)]) -> Vec<(String, f64)> {
        list.iter().map(|(p, v)| (p.to_string(), *v)).collect()
    }

    #[test]
    fn changes_are_blank_where_a_side_lacks_the_figure() {
        let base = pairs(&[("a", 2.0), ("b", 0.0), ("only-base", 1.0)]);
        let option = pairs(&[("a", 3.0), ("b", 1.0), ("only-option", 5.0)]);
        let c = changes(&base, &option);
        assert_eq!(c[0], ("a".into(), Some(1.0), Some(50.0)));
        assert_eq!(c[1], ("b".into(), Some(1.0), None));
        assert_eq!(c[2], ("only-base".into(), None, None));
        assert_eq!(c[3], ("only-option".into(), None, None));
    }

    #[test]
    fn evaluate_applies_each_parameter_vector() {
        let db = SpeciesDb::embedded().unwrap();
        let path =
            std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("flowsheets/demo-train.yaml");
        let fs = Flowsheet::from_file(&path, &db).unwrap();
        let base = fs.parameters();
        let mut hotter = base.clone();
        hotter[fs.input("units.reformer.outlet-temperature").unwrap().0] += 15.0;
        let out = evaluate(&db, &[(&fs, &base), (&fs, &hotter)]).unwrap();
        let get = |k: usize, p: &str| out[k].iter().find(|(q, _)| q == p).unwrap().1;
        // Same paths in the same order for the same flowsheet.
        let paths = |k: usize| out[k].iter().map(|(p, _)| p.clone()).collect::<Vec<_>>();
        assert_eq!(paths(0), paths(1));
        assert_eq!(paths(0)[0], "summary.hydrogen_product_kmol_h");
        assert!((get(1, "units.reformer.outlet_temperature_degC") - 880.0).abs() < 1e-9);
        assert!((get(0, "units.reformer.outlet_temperature_degC") - 865.0).abs() < 1e-9);
        // Common practice: a hotter reformer outlet lowers the methane slip.
        let slip = "summary.methane_slip_percent_dry.reformer";
        assert!(get(1, slip) < get(0, slip) - 0.5);
        // The figures agree with the solve of the file.
        let r = fs.solve(&db).unwrap();
        let made = r.summary.hydrogen_made_mol_s.unwrap() * 3.6;
        assert!((get(0, "summary.hydrogen_made_kmol_h") - made).abs() < 1e-9 * made);
    }
}

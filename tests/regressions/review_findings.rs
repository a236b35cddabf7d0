//! Findings of a code review, each with a test that fails without its fix.

use syntrain::thermo::SpeciesDb;
use syntrain::units::{Split, Splitter, SplitterSpec, Stream, UnitKind};

/// The splitter marked the outlet that takes the rest with NaN inside its fractions, a marker
/// that a NaN from a caller could be mistaken for; it now keeps `None` for that outlet
/// throughout. Pinned here: the rest outlet takes exactly what the others leave, and a NaN
/// fraction or flow is refused naming the unit.
#[test]
fn splitter_rest_outlet_takes_what_is_left_and_nan_is_refused() {
    let db = SpeciesDb::embedded().unwrap();
    let mut flows = vec![0.0; db.len()];
    flows[db.index_of("H2").unwrap()] = 3.0;
    let inlet = Stream::vapour(flows, 600.0, 20e5);
    let spec = |split| SplitterSpec {
        split,
        pressure_drop_pa: 0.0,
    };
    let solve = |spec: SplitterSpec| Splitter::new(&db, "tee", &spec)?.solve(&db, &[&inlet], None);
    let r = solve(spec(Split::Fractions(vec![Some(0.25), None, Some(0.5)]))).unwrap();
    let totals: Vec<f64> = r.outlets.iter().map(|s| s.total()).collect();
    assert_eq!(totals, vec![0.75, 0.75, 1.5]);
    for bad in [
        Split::Fractions(vec![Some(f64::NAN), None]),
        Split::Flows(vec![Some(f64::NAN), None]),
    ] {
        let e = solve(spec(bad)).unwrap_err();
        assert!(e.to_string().contains("unit 'tee'"), "{e}");
    }
}

/// Every warning code the source can raise is documented in the README, one line each; a code
/// added without its line fails here.
#[test]
fn every_warning_code_is_listed_in_the_readme() {
    let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR"));
    let readme = std::fs::read_to_string(root.join("README.md")).unwrap();
    let mut codes = Vec::new();
    let mut stack = vec![root.join("src")];
    while let Some(dir) = stack.pop() {
        for entry in std::fs::read_dir(dir).unwrap() {
            let path = entry.unwrap().path();
            if path.is_dir() {
                stack.push(path);
            } else if path.extension().is_some_and(|e| e == "rs") {
                let text = std::fs::read_to_string(&path).unwrap();
                let mut rest = text.as_str();
                while let Some(i) = rest.find("Warning::new(") {
                    rest = &rest[i + "Warning::new(".len()..];
                    let code = rest.trim_start().trim_start_matches('"');
                    let code: String = code
                        .chars()
                        .take_while(|c| c.is_ascii_lowercase() || *c == '-')
                        .collect();
                    if code.len() > 1 {
                        codes.push(code);
                    }
                }
            }
        }
    }
    assert!(codes.len() >= 10, "{codes:?}");
    for code in codes {
        assert!(
            readme.contains(&format!("- `{code}`: ")),
            "warning code {code} is not listed in the README"
        );
    }
}

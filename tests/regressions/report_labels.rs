//! What an engineer reads: pressures labelled absolute, the hydrogen summary saying what it is
//! beside the product's own flow and purity, small contents in ppm, the cautions under every help
//! page, `species -t` without a name applied to the whole list, and a table report that fits 100
//! columns.

use crate::support::{arg, demo, stderr, stdout, syntrain};

fn demo_report(format: &str) -> String {
    let out = syntrain(&["solve", &arg(&demo("demo-train.yaml")), "--format", format]);
    assert!(out.status.success(), "{}", stderr(&out));
    stdout(&out)
}

/// The label cell and the value cells of the first row of `text` starting with `label`.
fn row<'a>(text: &'a str, label: &str) -> Vec<&'a str> {
    let line = text
        .lines()
        .find(|l| l.trim_start().starts_with(label))
        .unwrap_or_else(|| panic!("no row '{label}' in\n{text}"));
    line[line.find(label).unwrap() + label.len()..]
        .split("  ")
        .map(str::trim)
        .filter(|c| !c.is_empty())
        .collect()
}

#[test]
fn pressures_are_labelled_absolute() {
    let table = demo_report("table");
    assert!(table.contains("pressure, bar abs"), "{table}");
    assert!(!table.lines().any(|l| l.trim_start() == "pressure, bar"));
    let markdown = demo_report("markdown");
    assert!(markdown.contains("| pressure, bar abs |"), "{markdown}");
    let csv = demo_report("csv");
    let header: Vec<&str> = csv.lines().next().unwrap().split(',').collect();
    assert!(header.contains(&"pressure_bar_abs"), "{header:?}");
    assert!(!header.contains(&"pressure_bar"));
    // The stable JSON key stays.
    let json: serde_json::Value = serde_json::from_str(&demo_report("json")).unwrap();
    assert!(json["streams"]["hydrogen-product"]["pressure_bar"].is_number());
}

#[test]
fn the_summary_names_contained_hydrogen_and_shows_the_product() {
    let table = demo_report("table");
    let json: serde_json::Value = serde_json::from_str(&demo_report("json")).unwrap();
    let product = &json["streams"]["hydrogen-product"];
    let total = product["total_kmol_h"].as_f64().unwrap();
    let h2 = product["flow_kmol_h"]["H2"].as_f64().unwrap();
    let contained = row(&table, "hydrogen contained in the product");
    let got: f64 = contained[0].parse().unwrap();
    assert!((got - h2).abs() < 0.006, "{contained:?} vs {h2}");
    assert_eq!(contained[1], "kmol/h");
    let flow = row(&table, "product gas, total flow");
    let got: f64 = flow[0].parse().unwrap();
    assert!((got - total).abs() < 0.006, "{flow:?} vs {total}");
    // DIN 1343: 22.414 m3/kmol.
    let nm3 = table
        .lines()
        .filter(|l| l.trim_start().starts_with("product gas, total flow"))
        .nth(1)
        .unwrap();
    let nm3: f64 = nm3
        .split_whitespace()
        .rev()
        .nth(1)
        .unwrap()
        .parse()
        .unwrap();
    assert!((nm3 - total * 22.414).abs() < 1.0, "{nm3}");
    let purity = row(&table, "product purity, H2");
    let got: f64 = purity[0].parse().unwrap();
    assert!((got - 100.0 * h2 / total).abs() < 0.0006, "{purity:?}");
    assert_eq!(purity[1], "mol %");
}

#[test]
fn small_contents_show_in_ppm() {
    let table = demo_report("table");
    let json: serde_json::Value = serde_json::from_str(&demo_report("json")).unwrap();
    // CO in the hydrogen product: well below 0.1 %, so its cell is in ppm (1 % = 10 000 ppm).
    let co_pct = json["streams"]["hydrogen-product"]["mole_percent_wet"]["CO"]
        .as_f64()
        .unwrap();
    assert!(co_pct > 0.0 && co_pct < 0.1, "{co_pct}");
    let block = &table[table.find("hydrogen-product").unwrap()..];
    let line = block
        .lines()
        .find(|l| l.trim_start().starts_with("CO ") || l.trim() == "CO")
        .unwrap();
    assert!(line.trim_end().ends_with("ppm"), "{line}");
    let cells: Vec<&str> = line.split_whitespace().collect();
    let ppm: f64 = cells[cells.len() - 2].parse().unwrap();
    assert!(
        (ppm - co_pct * 1.0e4).abs() <= 0.006 * co_pct * 1.0e4,
        "{line}"
    );
    let streams = &table[..table.find("\nUnits\n").unwrap()];
    assert!(
        !streams.contains("e-"),
        "no exponent form in mole fractions"
    );
}

#[test]
fn the_table_report_fits_100_columns() {
    let table = demo_report("table");
    for line in table.lines() {
        assert!(
            line.chars().count() <= 100,
            "{} columns: {line}",
            line.len()
        );
    }
}

#[test]
fn cautions_under_every_help_page() {
    for args in [
        &["--help"][..],
        &["-h"],
        &["solve", "--help"],
        &["solve", "-h"],
        &["species", "--help"],
        &["species", "-h"],
        &["help", "solve"],
        &["help", "species"],
    ] {
        let out = syntrain(args);
        assert!(out.status.success(), "{args:?}");
        assert!(
            stdout(&out).contains("hot hydrogen and carbon monoxide at pressure"),
            "{args:?}: {}",
            stdout(&out)
        );
    }
}

#[test]
fn species_temperatures_without_a_name_apply_to_every_species() {
    // CO2 at 1000 K: Cp 54.308 J/(mol K) (NIST-JANAF (Chase 1998), CO2 table; the record is a fit
    // within 0.5 %); H2 at 1000 K: Cp 30.205 J/(mol K) (NIST-JANAF, H2 table).
    let out = syntrain(&["species", "-t", "1000 K"]);
    assert!(out.status.success(), "{}", stderr(&out));
    let text = stdout(&out);
    let cp = |name: &str| -> f64 {
        let line = text
            .lines()
            .find(|l| l.starts_with(&format!("{name} ")) && l.contains(" 1000.00 "))
            .unwrap_or_else(|| panic!("no {name} row at 1000 K in\n{text}"));
        line.split_whitespace().nth(3).unwrap().parse().unwrap()
    };
    assert!((cp("CO2") - 54.308).abs() < 0.005 * 54.308);
    assert!((cp("H2") - 30.205).abs() < 0.005 * 30.205);
    let rows = text.lines().filter(|l| l.contains(" 1000.00 ")).count();
    assert_eq!(rows, 16, "one row per species");
}

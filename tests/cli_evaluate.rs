//! `syntrain evaluate`, run as the real binary on temporary sample files: outlets made by the
//! solver evaluated back to their approaches, rounded and faulty analyses, a hand check against
//! NIST-JANAF, a forecast on synthetic samples, and errors with row and column.

use std::path::{Path, PathBuf};
use std::process::Command;

use serde_json::Value;
use syntrain::evaluate::samples::{date_text, days_from_civil};
use syntrain::flowsheet::{Flowsheet, FlowsheetResult};
use syntrain::thermo::SpeciesDb;

const SPECIES: [&str; 5] = ["H2", "CO", "CO2", "CH4", "N2"];

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn demo() -> PathBuf {
    root().join("flowsheets/demo-train.yaml")
}

fn run(args: &[&str]) -> (bool, String, String) {
    let out = Command::new(env!("CARGO_BIN_EXE_syntrain"))
        .args(args)
        .output()
        .unwrap();
    (
        out.status.success(),
        String::from_utf8_lossy(&out.stdout).into_owned(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

fn evaluate_json(flowsheet: &Path, samples: &str, extra: &[&str]) -> Value {
    let dir = tempfile::tempdir().unwrap();
    let file = dir.path().join("samples.csv");
    std::fs::write(&file, samples).unwrap();
    let mut args = vec![
        "evaluate",
        flowsheet.to_str().unwrap(),
        "--samples",
        file.to_str().unwrap(),
        "--format",
        "json",
    ];
    args.extend(extra);
    let (ok, out, err) = run(&args);
    assert!(ok, "{err}");
    serde_json::from_str(&out).unwrap()
}

/// Solve the demo train with `approaches` set by input path.
fn solve_at(approaches: &[(&str, f64)]) -> FlowsheetResult {
    let db = SpeciesDb::embedded().unwrap();
    let fs = Flowsheet::from_file(&demo(), &db).unwrap();
    let mut p = fs.parameters();
    for (path, v) in approaches {
        p[fs.input(path).unwrap().0] = *v;
    }
    fs.solve_with(&db, &p, None).unwrap()
}

/// A samples row of a stream's outlet: temperature, pressure and dry mol % of SPECIES, each
/// written by `cell`.
fn row(
    r: &FlowsheetResult,
    id: &str,
    unit: &str,
    stream: &str,
    cell: &dyn Fn(f64) -> String,
) -> String {
    let db = SpeciesDb::embedded().unwrap();
    let s = &r.streams.iter().find(|s| s.name == stream).unwrap().stream;
    let water = db.index_of("H2O").unwrap();
    let dry: f64 = s
        .flows
        .iter()
        .enumerate()
        .filter(|(i, _)| *i != water)
        .map(|(_, v)| v)
        .sum();
    let mut cells = vec![
        id.to_string(),
        unit.to_string(),
        format!("{:.9}", s.temperature_k - 273.15),
        format!("{:.9}", s.pressure_pa / 1e5),
    ];
    for sp in SPECIES {
        cells.push(cell(100.0 * s.flows[db.index_of(sp).unwrap()] / dry));
    }
    cells.join(",")
}

const HEADER: &str = "sample,unit,temperature_C,pressure_bar,H2,CO,CO2,CH4,N2\n";

#[test]
fn outlets_made_by_the_solver_give_their_approaches_back() {
    // The solver's own outlets at known approaches (the design convention of DEVELOPERS.md: a
    // positive approach is short of equilibrium), written as dry analyses to 1e-9 mol %, must
    // come back within 0.05 K. Each unit is varied alone so that its inlet is the model's.
    let exact = |v: f64| format!("{v:.9}");
    let mut text = HEADER.to_string();
    let mut expected = Vec::new();
    for a in [2.0, 10.0, 25.0, 40.0] {
        let r = solve_at(&[("units.hts.approach.shift", a)]);
        text += &row(&r, &format!("hts-{a}"), "hts", "hts-exit", &exact);
        text += "\n";
        expected.push(("shift", a));
        let r = solve_at(&[("units.lts.approach.shift", a)]);
        text += &row(&r, &format!("lts-{a}"), "lts", "lts-exit", &exact);
        text += "\n";
        expected.push(("shift", a));
    }
    for a in [3.0, 10.0, 20.0] {
        let r = solve_at(&[("units.reformer.approach.reforming", a)]);
        text += &row(
            &r,
            &format!("reformer-{a}"),
            "reformer",
            "reformed-gas",
            &exact,
        );
        text += "\n";
        expected.push(("reforming", a));
    }
    let v = evaluate_json(&demo(), &text, &[]);
    let samples = v["samples"].as_array().unwrap();
    assert_eq!(samples.len(), expected.len());
    let mut worst: f64 = 0.0;
    for (s, (reaction, a)) in samples.iter().zip(&expected) {
        let back = s["approach_K"][reaction].as_f64().unwrap();
        worst = worst.max((back - a).abs());
        assert!((back - a).abs() < 0.05, "{}: {back} for {a}", s["sample"]);
        assert!(s["warnings"].as_array().unwrap().is_empty(), "{s}");
        if s["unit"] == "reformer" {
            // The reformer's shift is at 0 K in the file.
            assert!(s["approach_K"]["shift"].as_f64().unwrap().abs() < 0.05);
        }
    }
    eprintln!("worst round-trip error {worst:.2e} K");
}

#[test]
fn rounded_analyses_still_give_the_approach_and_a_wrong_species_is_named() {
    // A laboratory reports 0.01 mol %: the HTS and reformer approaches stay within 1 K
    // (common practice: a degree is the resolution engineers read approaches at).
    let rounded = |v: f64| format!("{v:.2}");
    let hts = solve_at(&[("units.hts.approach.shift", 12.0)]);
    let reformer = solve_at(&[("units.reformer.approach.reforming", 15.0)]);
    let text = format!(
        "{HEADER}{}\n{}\n",
        row(&hts, "hts", "hts", "hts-exit", &rounded),
        row(&reformer, "reformer", "reformer", "reformed-gas", &rounded)
    );
    let v = evaluate_json(&demo(), &text, &[]);
    let hts_back = v["samples"][0]["approach_K"]["shift"].as_f64().unwrap();
    let ref_back = v["samples"][1]["approach_K"]["reforming"].as_f64().unwrap();
    eprintln!("rounded: hts {hts_back} (12), reformer {ref_back} (15)");
    assert!((hts_back - 12.0).abs() < 1.0, "{hts_back}");
    assert!((ref_back - 15.0).abs() < 1.0, "{ref_back}");
    // 1 mol % too much of one species (and the analysis total 101 %): flagged, that species
    // named, the misfit near 1 mol %.
    let exact = |v: f64| format!("{v:.6}");
    for (k, species) in [(2, "CO2"), (3, "CH4"), (0, "H2")] {
        for (r, unit, stream) in [
            (&hts, "hts", "hts-exit"),
            (&reformer, "reformer", "reformed-gas"),
        ] {
            let line = row(r, "x", unit, stream, &exact);
            let mut cells: Vec<String> = line.split(',').map(String::from).collect();
            let v: f64 = cells[4 + k].parse().unwrap();
            cells[4 + k] = format!("{:.6}", v + 1.0);
            let v = evaluate_json(&demo(), &format!("{HEADER}{}\n", cells.join(",")), &[]);
            let warnings = v["samples"][0]["warnings"].as_array().unwrap();
            let misfit: Vec<&Value> = warnings
                .iter()
                .filter(|w| w["code"] == "analysis-misfit")
                .collect();
            assert_eq!(misfit.len(), 1, "{unit} {species}: {warnings:?}");
            let message = misfit[0]["message"].as_str().unwrap();
            assert!(
                message.contains(&format!(": {species} is off")),
                "{message}"
            );
            let size = misfit[0]["value"].as_f64().unwrap();
            eprintln!("{unit}, +1 mol % {species}: misfit {size:.3} mol %");
            assert!((size - 1.0).abs() < 0.15, "{unit} {species}: {size}");
        }
    }
}

#[test]
fn a_hand_computed_approach_from_nist_janaf() {
    // NIST-JANAF (Chase 1998), tests/data/janaf/, dfG at 700 K: CO2 -395.398, CO -173.518,
    // H2O -208.812, H2 0 kJ/mol. Shift CO + H2O = CO2 + H2: dG = -395.398 + 173.518 + 208.812
    // = -13.068 kJ/mol; ln K = 13068 / (8.314462618 x 700) = 2.245313, K = 9.44337.
    // Inlet (measured, per 100 mol dry): H2 60, CO 20, CO2 15, N2 5, H2O 50 (33.3333 % wet).
    // Outlet at extent x: Q = (15 + x)(60 + x) / ((20 - x)(50 - x)) = K gives
    // (1 - K) x^2 + (75 + 70 K) x + (900 - 1000 K) = 0, x = 13.788134 mol; dry total 113.788134:
    // H2 64.846950, CO 5.459151, CO2 25.299768, N2 4.394131 mol %. That gas is at equilibrium
    // at 700 K; measured at 690 K, the shift (exothermic forward, sign -1) is 10 K short of it:
    // approach = -(690 - 700) = +10 K.
    let text = "sample,unit,temperature_C,pressure_bar,H2,CO,CO2,N2,inlet:H2,inlet:CO,inlet:CO2,\
                inlet:N2,inlet_H2O_pct_wet\n\
                hand,hts,416.85,25,64.846950,5.459151,25.299768,4.394131,60,20,15,5,33.3333333333\n";
    let v = evaluate_json(&root().join("flowsheets/shift-only.yaml"), text, &[]);
    let s = &v["samples"][0];
    assert_eq!(s["inlet"], "measured");
    let a = s["approach_K"]["shift"].as_f64().unwrap();
    eprintln!("hand check: {a} K (10 by hand)");
    // d lnK/dT = -dH/(R T^2) = 38 000 / (8.314 x 700^2) = 0.0093 per K at 700 K, so 0.1 K is
    // 0.0004 in log10 K: our records' log10 Kf of CO, CO2 and H2O sit within about 0.001 of
    // JANAF's printed columns (tests/data/README.md, "Worst deviations from JANAF"), and JANAF's
    // own dfG is printed to 1 J/mol (0.0002 K here).
    assert!((a - 10.0).abs() < 0.1, "{a}");
    // The extent: 13.788134 mol per 100 mol of dry inlet, on the model's dry flow.
    let residual = s["residuals_pct"]["CO"].as_f64().unwrap();
    assert!(residual.abs() < 1e-4, "{residual}");
}

#[test]
fn a_forecast_finds_a_known_crossing_within_its_band() {
    // Synthetic samples (invented): HTS approach 5 + 0.02 t K, t days from 2026-01-05, weekly
    // for a year, each solved by the solver with seeded noise of 0.5 K on the approach. The
    // limit is the HTS exit CO at 15 K, so the true trend crosses it at t = 500 days.
    use rand::SeedableRng;
    use rand_distr::Distribution;
    let mut rng = rand_chacha::ChaCha8Rng::seed_from_u64(7);
    let noise = rand_distr::Normal::new(0.0, 0.5).unwrap();
    let origin = days_from_civil(2026, 1, 5);
    let exact = |v: f64| format!("{v:.9}");
    let mut text = HEADER.to_string();
    for k in 0..52 {
        let t = 7.0 * k as f64;
        let a = 5.0 + 0.02 * t + noise.sample(&mut rng);
        let r = solve_at(&[("units.hts.approach.shift", a)]);
        text += &row(&r, &date_text(origin + 7 * k), "hts", "hts-exit", &exact);
        text += "\n";
    }
    let db = SpeciesDb::embedded().unwrap();
    let limit = solve_at(&[("units.hts.approach.shift", 15.0)])
        .value(&db, "streams.hts-exit.dry_mol_pct.CO")
        .unwrap();
    let expr = format!("streams.hts-exit.dry_mol_pct.CO>{limit:.9}");
    let v = evaluate_json(&demo(), &text, &["--limit", &expr]);
    let f = &v["forecast"];
    let truth = date_text(origin + 500);
    let (early, central, late) = (
        f["band_earliest"].as_str().unwrap(),
        f["crossing"].as_str().unwrap(),
        f["band_latest"].as_str().unwrap(),
    );
    eprintln!("forecast: {central} ({early} to {late}), truth {truth}");
    // ISO dates compare as text.
    assert!(
        early <= truth.as_str() && truth.as_str() <= late,
        "{early} {truth} {late}"
    );
    assert!(early < central && central < late);
    let slope = v["trends"][0]["linear"]["slope_K_per_year"]
        .as_f64()
        .unwrap();
    assert!((slope - 7.305).abs() < 1.0, "{slope}"); // 0.02 K/day x 365.25
    assert_eq!(f["extrapolation"], true);
}

#[test]
fn the_demo_samples_evaluate_and_forecast() {
    let (ok, out, err) = run(&[
        "evaluate",
        demo().to_str().unwrap(),
        "--samples",
        root().join("flowsheets/demo-samples.csv").to_str().unwrap(),
        "--limit",
        "streams.lts-exit.dry_mol_pct.CO>0.40",
    ]);
    assert!(ok, "{err}");
    assert!(out.contains("extrapolation"));
    assert!(out.contains("hts, shift"));
    // The demo's HTS approach grows 6 -> 10 K over 357 days (tools/make_demo_samples.py):
    // 4.09 K/year; its fitted slope must be near.
    let line = out.lines().find(|l| l.contains("hts, shift")).unwrap();
    let slope: f64 = line.split_whitespace().nth(3).unwrap().parse().unwrap();
    assert!((slope - 4.09).abs() < 1.0, "{line}");
    let dir = tempfile::tempdir().unwrap();
    let svg = dir.path().join("ageing.svg");
    let csv = dir.path().join("samples-out.csv");
    let (ok, _, err) = run(&[
        "evaluate",
        demo().to_str().unwrap(),
        "--samples",
        root().join("flowsheets/demo-samples.csv").to_str().unwrap(),
        "--format",
        "csv",
        "--plot",
        svg.to_str().unwrap(),
        "--output",
        csv.to_str().unwrap(),
    ]);
    assert!(ok, "{err}");
    let chart = std::fs::read_to_string(&svg).unwrap();
    assert!(
        chart.starts_with("<svg") && chart.contains("hts, shift") && chart.contains("lts, shift")
    );
    assert!(chart.contains("2026-"));
    let table = std::fs::read_to_string(&csv).unwrap();
    assert_eq!(table.lines().count(), 1 + 104);
    assert!(table.starts_with("sample,unit,temperature_C,pressure_bar,approach_K.shift"));
    // The template ships and reads.
    let (ok, out, err) = run(&[
        "evaluate",
        demo().to_str().unwrap(),
        "--samples",
        root()
            .join("flowsheets/samples-template.csv")
            .to_str()
            .unwrap(),
    ]);
    assert!(ok, "{err}");
    assert!(out.contains("reformer"));
}

#[test]
fn errors_in_the_samples_file_name_the_row_and_column() {
    let dir = tempfile::tempdir().unwrap();
    let file = dir.path().join("bad.csv");
    let good = "2026-01-05,hts,422.8,25.5,74.68,3.541,16.61,4.730,0.24\n";
    for (text, expect) in [
        (
            "sample,unit,temperature_C,H2,CO,COO\n".to_string(),
            ":1:6: COO: unknown column 'COO'",
        ),
        (
            format!("{HEADER}{good}2026-01-12,hts-x,422.8,25.5,74.68,3.541,16.61,4.730,0.24\n"),
            ":3:2: unit: no unit 'hts-x'",
        ),
        (
            format!("{HEADER}{good}2026-01-12,hts-exit-cooler,422.8,25.5,74.68,3.541,16.61,4.730,0.24\n"),
            ":3:2: unit: unit 'hts-exit-cooler' is a cooler, not a reactor",
        ),
        (
            format!("{HEADER}{good}{good}2026-01-19,hts,422.8,25.5,74.68,n/a,16.61,4.730,0.24\n"),
            ":4:6: CO: 'n/a' is not a number",
        ),
        (
            format!("{HEADER}2026-01-19,hts,,25.5,74.68,3.5,16.61,4.730,0.24\n"),
            ":2:3: temperature_C: the sample has no temperature_C",
        ),
    ] {
        std::fs::write(&file, text).unwrap();
        let (ok, _, err) = run(&[
            "evaluate",
            demo().to_str().unwrap(),
            "--samples",
            file.to_str().unwrap(),
        ]);
        assert!(!ok);
        assert!(err.contains("bad.csv") && err.contains(expect), "{err}");
    }
}

#[test]
fn a_hot_thermocouple_and_a_trace_reading_are_flagged() {
    // The solver's HTS outlet at 8 K read 5 K hotter: the shift (exothermic, sign -1) reads
    // 8 - 5 = 3 K (the design convention); 12 K hotter reads -4 K, past equilibrium, flagged.
    // The LTS outlet with CO read as 0.003 mol % (below 0.005, common practice) is flagged.
    let r = solve_at(&[]);
    let exact = |v: f64| format!("{v:.9}");
    let base = row(&r, "a", "hts", "hts-exit", &exact);
    let mut cells: Vec<String> = base.split(',').map(String::from).collect();
    let t: f64 = cells[2].parse().unwrap();
    cells[2] = format!("{:.9}", t + 5.0);
    let warm = cells.join(",");
    cells[2] = format!("{:.9}", t + 12.0);
    let hot = cells.join(",");
    let lts = row(&r, "c", "lts", "lts-exit", &exact);
    let mut cells: Vec<String> = lts.split(',').map(String::from).collect();
    cells[5] = "0.003".into();
    let trace = cells.join(",");
    // A measured inlet and outlet with CO at 0.0001 mol % and 25 % water (33.3 mol per 100 mol
    // dry): the quotient 19 x 75 / (0.0001 x 33.3) = 4.3e5 passes K of the shift at 300 K
    // (NIST-JANAF, Chase 1998, log Kf at 300 K: CO2 68.670, CO 23.911, H2O 39.785 give
    // log K = 4.97, K = 9.4e4), so equilibrium lies below the searched range: no approach.
    let none = "d,lts,200,25,75,0.0001,19,5.9999,,75,0.0001,19,5.9999,25";
    let header = HEADER.trim_end().to_string()
        + ",inlet:H2,inlet:CO,inlet:CO2,inlet:CH4,inlet_H2O_pct_wet\n";
    let v = evaluate_json(
        &demo(),
        &format!("{header}{warm},,,,,\n{hot},,,,,\n{trace},,,,,\n{none}\n"),
        &[],
    );
    let s = v["samples"].as_array().unwrap();
    let a = s[0]["approach_K"]["shift"].as_f64().unwrap();
    assert!((a - 3.0).abs() < 0.01, "{a}");
    assert!(s[0]["warnings"].as_array().unwrap().is_empty());
    let a = s[1]["approach_K"]["shift"].as_f64().unwrap();
    assert!((a + 4.0).abs() < 0.01, "{a}");
    let codes = |k: usize| -> Vec<String> {
        s[k]["warnings"]
            .as_array()
            .unwrap()
            .iter()
            .map(|w| w["code"].as_str().unwrap().to_string())
            .collect()
    };
    assert_eq!(codes(1), ["approach-negative"]);
    assert!(
        codes(2).contains(&"below-detection-limit".to_string()),
        "{:?}",
        codes(2)
    );
    let w = s[2]["warnings"]
        .as_array()
        .unwrap()
        .iter()
        .find(|w| w["code"] == "below-detection-limit")
        .unwrap();
    assert_eq!(w["value"].as_f64().unwrap(), 0.003);
    assert_eq!(w["limit"].as_f64().unwrap(), 0.005);
    assert!(s[3]["approach_K"]["shift"].is_null());
    assert!(
        codes(3).contains(&"approach-undefined".to_string()),
        "{:?}",
        codes(3)
    );
}

#[test]
fn strict_exits_3_on_a_flagged_sample_and_0_on_clean_ones() {
    // The HTS outlet of the solver read 12 K hotter: approach -4 K, flagged (as above).
    let r = solve_at(&[]);
    let exact = |v: f64| format!("{v:.9}");
    let clean = row(&r, "a", "hts", "hts-exit", &exact);
    let mut cells: Vec<String> = clean.split(',').map(String::from).collect();
    let t: f64 = cells[2].parse().unwrap();
    cells[2] = format!("{:.9}", t + 12.0);
    let hot = cells.join(",");
    let dir = tempfile::tempdir().unwrap();
    let file = dir.path().join("samples.csv");
    let status = |text: String| {
        std::fs::write(&file, text).unwrap();
        let out = std::process::Command::new(env!("CARGO_BIN_EXE_syntrain"))
            .args(["evaluate", demo().to_str().unwrap(), "--samples"])
            .arg(&file)
            .arg("--strict")
            .output()
            .unwrap();
        assert!(!out.stdout.is_empty(), "the report is still written");
        out.status.code()
    };
    assert_eq!(status(format!("{HEADER}{clean}\n")), Some(0));
    assert_eq!(status(format!("{HEADER}{clean}\n{hot}\n")), Some(3));
}

//! Flowsheets with recycles end to end: the real binary on temporary files (values, JSON keys,
//! named tears, errors) and the library's workspace (warm start, `forget`).
//!
//! The reference answers are mass and energy balances around the loops (analytic):
//! - a mixer taking a feed F and a recycle R, and a splitter returning the fraction r of the
//!   mixer outlet as R: at steady state M = F + R and R = r M, so R = r F / (1 - r) for every
//!   species, and the product (1 - r) M equals the feed;
//! - with a heater of fixed duty Q in the loop, the energy balance around the whole flowsheet
//!   gives the product temperature T = T_F + Q / (F cp) whatever r, and the mixer's
//!   T_M = (F T_F + R T) / (F + R) for a gas of constant cp. Argon is used: a monatomic ideal
//!   gas, cp = 5/2 R; NIST-JANAF (Chase 1998), table Ar-001, lists Cp = 20.786 J/(mol K) at every
//!   temperature.

mod common;

use std::path::Path;
use std::process::{Command, Output, Stdio};

use serde_json::Value;
use syntrain::flowsheet::Flowsheet;
use syntrain::thermo::SpeciesDb;

#[global_allocator]
static GLOBAL: common::alloc::Counting = common::alloc::Counting;

/// NIST-JANAF (Chase 1998), Ar-001: Cp of argon, J/(mol K), constant.
const ARGON_CP: f64 = 20.786;

fn syntrain(args: &[&str]) -> Output {
    let out = Command::new(env!("CARGO_BIN_EXE_syntrain"))
        .args(args)
        .stdin(Stdio::null())
        .output()
        .expect("running the syntrain binary");
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(!err.contains("panicked"), "the binary panicked: {err}");
    out
}

fn write(dir: &Path, name: &str, text: &str) -> String {
    let path = dir.join(name);
    std::fs::write(&path, text).unwrap();
    path.display().to_string()
}

fn solve(dir: &Path, text: &str, format: &str) -> String {
    let file = write(dir, "loop.yaml", text);
    let out = syntrain(&["solve", &file, "--format", format]);
    let err = String::from_utf8_lossy(&out.stderr).to_string();
    assert!(out.status.success(), "solve failed: {err}");
    String::from_utf8(out.stdout).unwrap()
}

fn solve_json(text: &str) -> Value {
    let dir = tempfile::tempdir().unwrap();
    serde_json::from_str(&solve(dir.path(), text, "json")).unwrap()
}

/// The error message of a solve that must fail (exit 1).
fn solve_error(text: &str) -> String {
    let dir = tempfile::tempdir().unwrap();
    let file = write(dir.path(), "loop.yaml", text);
    let out = syntrain(&["solve", &file]);
    assert_eq!(out.status.code(), Some(1));
    assert!(out.stdout.is_empty());
    String::from_utf8(out.stderr).unwrap()
}

fn f(v: &Value) -> f64 {
    v.as_f64().unwrap_or_else(|| panic!("not a number: {v}"))
}

/// A mixer and a splitter returning `r` of the mixer outlet; `solver` lines under `solver:`.
fn mixer_splitter(r: f64, solver: &str) -> String {
    format!(
        "\
title: A recycle loop, invented
solver:
  {solver}
feeds:
  gas:
    temperature: 350 degC
    pressure: 25 bar
    flows:
      H2: 100 kmol/h
      CH4: 10 kmol/h
      N2: 0.5 kmol/h
units:
  - name: mix
    type: mixer
    from: [gas, back]
    to: mid
  - name: split
    type: splitter
    from: mid
    to: [out, back]
    fractions:
      back: {r}
"
    )
}

/// Argon F = 100 kmol/h at 100 degC, a heater of 100 kW in the loop, fraction `r` returned.
fn heated_loop(r: f64) -> String {
    format!(
        "\
title: A heated recycle loop, invented
feeds:
  argon:
    temperature: 100 degC
    pressure: 10 bar
    flows:
      Ar: 100 kmol/h
units:
  - name: mix
    type: mixer
    from: [argon, back]
    to: mid
  - name: heater
    type: heater
    from: mid
    to: hot
    duty: 100 kW
  - name: split
    type: splitter
    from: hot
    to: [out, back]
    fractions:
      back: {r}
"
    )
}

#[test]
fn a_mixer_and_splitter_loop_converges_to_the_mass_balance() {
    for r in [0.3, 0.9] {
        let v = solve_json(&mixer_splitter(r, "recycle-iterations: 100"));
        let feed = &v["streams"]["gas"]["flow_kmol_h"];
        let back = &v["streams"]["back"]["flow_kmol_h"];
        let out = &v["streams"]["out"]["flow_kmol_h"];
        for species in ["H2", "CH4", "N2"] {
            // Mass balance (analytic): R = r F / (1 - r); the product equals the feed.
            let fed = f(&feed[species]);
            let expected = r * fed / (1.0 - r);
            let got = f(&back[species]);
            assert!(
                (got / expected - 1.0).abs() < 1e-9,
                "r = {r}, {species}: recycle {got} against {expected}"
            );
            assert!((f(&out[species]) / fed - 1.0).abs() < 1e-9);
        }
        let rec = &v["recycles"];
        assert_eq!(rec["tear_streams"], serde_json::json!(["back"]));
        assert_eq!(rec["converged"], Value::Bool(true));
        assert!(f(&rec["residual"]) <= 1e-10, "{rec}");
        let iterations = f(&rec["iterations"]);
        assert!((2.0..=100.0).contains(&iterations), "{rec}");
        // Balances of the whole flowsheet (products against feeds) close.
        assert!(f(&v["balances"]["element_residual"]) < 1e-9);
        assert!(f(&v["balances"]["energy_residual"]) < 1e-6);
    }
}

#[test]
fn wider_wegstein_bounds_speed_up_a_loop_returning_most_of_its_flow() {
    // r = 0.99: slope 0.99, Wegstein's q = -99. Within the default bounds [-5, 0] the error
    // shrinks by 0.94 a pass (hundreds of passes); with [-100, 0] the linear loop is met in the
    // second pass and confirmed in the third (Wegstein 1958).
    let v = solve_json(&mixer_splitter(
        0.99,
        "wegstein-bounds: [-100, 0]\n  recycle-iterations: 5",
    ));
    assert_eq!(f(&v["recycles"]["iterations"]), 3.0);
    let back = f(&v["streams"]["back"]["flow_kmol_h"]["CH4"]);
    // Mass balance (analytic): R = 0.99 * 10 / 0.01 = 990 kmol/h.
    assert!((back / 990.0 - 1.0).abs() < 1e-9, "{back}");
    let e = solve_error(&mixer_splitter(0.99, "recycle-iterations: 5"));
    assert!(e.contains("after 5 iterations"), "{e}");
    let e = solve_error(&mixer_splitter(0.5, "wegstein-bounds: [0, -5]"));
    assert!(e.contains("wegstein-bounds"), "{e}");
}

#[test]
fn temperature_iterates_through_a_heated_loop() {
    let feed_t = 373.15;
    let feed_mol_s = 100.0 / 3.6;
    // Energy balance around the flowsheet (analytic), argon's Cp from NIST-JANAF.
    let product_t = feed_t + 100e3 / (feed_mol_s * ARGON_CP);
    for r in [0.5, 0.8] {
        let v = solve_json(&heated_loop(r));
        let s = &v["streams"];
        let t_out = f(&s["out"]["temperature_K"]);
        assert!((t_out - product_t).abs() < 1e-3, "r = {r}: {t_out} K");
        let back = f(&s["back"]["total_kmol_h"]);
        assert!((back / (r * 100.0 / (1.0 - r)) - 1.0).abs() < 1e-9);
        // Mixer at constant cp (analytic): T_M = (F T_F + R T) / (F + R).
        let t_mix = (100.0 * feed_t + back * product_t) / (100.0 + back);
        let got = f(&s["mid"]["temperature_K"]);
        assert!((got - t_mix).abs() < 1e-3, "r = {r}: {got} against {t_mix}");
        assert!((f(&v["units"]["heater"]["duty_kW"]) - 100.0).abs() < 1e-9);
        assert!(f(&v["balances"]["energy_residual"]) < 1e-6);
        assert_eq!(v["recycles"]["converged"], Value::Bool(true));
    }
}

#[test]
fn a_design_target_is_met_around_a_recycle() {
    // The heater duty for a product at 500 K: energy balance (analytic) Q = F cp (T - T_F).
    let text = heated_loop(0.6)
        + "targets:\n  - vary: units.heater.duty\n    between: [10 kW, 500 kW]\n    \
           so-that: streams.out.temperature_K\n    equals: 500\n";
    let v = solve_json(&text);
    let expected_kw = 100.0 / 3.6 * ARGON_CP * (500.0 - 373.15) / 1e3;
    let duty = f(&v["units"]["heater"]["duty_kW"]);
    assert!(
        (duty - expected_kw).abs() < 1e-3,
        "{duty} kW against {expected_kw}"
    );
    assert_eq!(v["targets"][0]["met"], Value::Bool(true));
    assert_eq!(v["recycles"]["converged"], Value::Bool(true));
}

#[test]
fn a_loop_that_cannot_converge_in_time_is_an_error_naming_the_tear() {
    let e = solve_error(&mixer_splitter(0.999, "recycle-iterations: 3"));
    assert!(
        e.contains("recycle did not converge")
            && e.contains("after 3 iterations")
            && e.contains("'back'")
            && e.contains("recycle-iterations")
            && e.contains("tear-streams"),
        "{e}"
    );
    // The last residual is named: after three passes the recycle still grows by a large part.
    let residual = e
        .split("still change by ")
        .nth(1)
        .and_then(|rest| rest.split_whitespace().next())
        .and_then(|x| x.parse::<f64>().ok())
        .unwrap_or_else(|| panic!("no residual in: {e}"));
    assert!(residual > 0.1, "{e}");
}

#[test]
fn a_pressure_falling_around_the_loop_is_named() {
    // The mixer leaves at its lowest inlet pressure, so 0.5 bar lost in the heater is lost
    // again on every pass: the loop has no steady state.
    let text = heated_loop(0.5).replace("duty: 100 kW", "duty: 100 kW\n    pressure-drop: 0.5 bar");
    let e = solve_error(&text);
    assert!(
        e.contains("pressure of tear stream 'back' fell on each of the last")
            && e.contains("by 0.5000 bar"),
        "{e}"
    );
}

#[test]
fn named_tear_streams_are_honoured_and_checked() {
    let v = solve_json(&mixer_splitter(0.5, "tear-streams: [mid]"));
    assert_eq!(v["recycles"]["tear_streams"], serde_json::json!(["mid"]));
    // The same answer, torn elsewhere (mass balance: R = F for r = 0.5).
    let back = f(&v["streams"]["back"]["flow_kmol_h"]["H2"]);
    assert!((back / 100.0 - 1.0).abs() < 1e-9, "{back}");
    // Each stream is shown once.
    assert_eq!(v["streams"].as_object().unwrap().len(), 4);
    let e = solve_error(&mixer_splitter(0.5, "tear-streams: [out]"));
    assert!(
        e.contains("tear stream 'out'") && e.contains("not in a cycle"),
        "{e}"
    );
    let e = solve_error(&mixer_splitter(0.5, "tear-streams: [nowhere]"));
    assert!(e.contains("'nowhere'") && e.contains("not a stream"), "{e}");
    let e = solve_error(&mixer_splitter(0.5, "recycle-tolerance: 0"));
    assert!(e.contains("positive and finite"), "{e}");
}

#[test]
fn reports_show_the_recycle_and_a_train_without_loops_shows_none() {
    let dir = tempfile::tempdir().unwrap();
    let text = mixer_splitter(0.3, "recycle-iterations: 50");
    for format in ["table", "markdown"] {
        let out = solve(dir.path(), &text, format);
        assert!(
            out.contains("Recycle converged after") && out.contains("tear streams 'back'"),
            "{out}"
        );
    }
    // Without the loop (the splitter's second outlet a product): no recycle anywhere.
    let open = text.replace("from: [gas, back]", "from: gas");
    let open = open.replace("type: mixer", "type: heater\n    duty: 0 kW");
    let out = solve(dir.path(), &open, "table");
    assert!(!out.contains("Recycle"), "{out}");
    let v: Value = serde_json::from_str(&solve(dir.path(), &open, "json")).unwrap();
    assert!(v.get("recycles").is_none());
}

#[test]
fn a_unit_error_inside_the_loop_names_the_iteration() {
    // Wet gas cooled to 40 degC at 25 bar lies below its water dew point: the cooler's outlet
    // is refused in the first pass.
    let text = "\
feeds:
  gas:
    temperature: 300 degC
    pressure: 25 bar
    flows: {H2: 70 kmol/h, H2O: 30 kmol/h}
units:
  - name: mix
    type: mixer
    from: [gas, back]
    to: mid
  - name: cooler
    type: cooler
    from: mid
    to: cold
    outlet-temperature: 40 degC
  - name: split
    type: splitter
    from: cold
    to: [out, back]
    fractions: {back: 0.5}
";
    let e = solve_error(text);
    assert!(
        e.contains("recycle iteration 1 of at most 100") && e.contains("dew point"),
        "{e}"
    );
}

#[test]
fn a_workspace_starts_from_its_converged_tears_until_it_forgets_them() {
    let db = SpeciesDb::embedded().unwrap();
    let fs = Flowsheet::from_yaml_str("loop", &heated_loop(0.8), &db).unwrap();
    assert_eq!(fs.tear_streams(), ["back"]);
    let params = fs.parameters();
    let mut ws = fs.workspace(&db);
    let iterations = |ws: &syntrain::flowsheet::Workspace| {
        ws.result().recycle.as_ref().map(|r| r.iterations).unwrap()
    };
    fs.solve_in(&db, &params, &mut ws).unwrap();
    let cold = iterations(&ws);
    let t_cold = ws.result().streams[3].stream.temperature_k;
    // A first pass by direct substitution, then Wegstein (slope 0.8, q = -4 inside the bounds,
    // exact for this linear loop), then the pass that finds no change.
    assert!(cold >= 2, "{cold}");
    // Solved again from the converged tears: the first pass already meets the tolerance.
    fs.solve_in(&db, &params, &mut ws).unwrap();
    assert_eq!(iterations(&ws), 1);
    assert!((ws.result().streams[3].stream.temperature_k - t_cold).abs() < 1e-6);
    ws.forget();
    fs.solve_in(&db, &params, &mut ws).unwrap();
    assert_eq!(iterations(&ws), cold);
    // The one-off solve agrees; started from a previous result, it starts from its tears.
    let once = fs.solve(&db).unwrap();
    let rec = once.recycle.as_ref().unwrap();
    assert_eq!(rec.tear_streams, vec!["back"]);
    assert!(rec.termination.is_converged());
    assert_eq!(rec.iterations, cold);
    let again = fs.solve_with(&db, &params, Some(&once)).unwrap();
    assert_eq!(again.recycle.unwrap().iterations, 1);
}

#[test]
fn recycle_iterations_allocate_nothing_once_warm() {
    let db = SpeciesDb::embedded().unwrap();
    let fs = Flowsheet::from_yaml_str("loop", &mixer_splitter(0.9, "{}"), &db).unwrap();
    let params = fs.parameters();
    let mut ws = fs.workspace(&db);
    for _ in 0..2 {
        ws.forget();
        fs.solve_in(&db, &params, &mut ws).unwrap();
    }
    // From the first guess again: every pass of the iteration, with the buffers sized.
    ws.forget();
    let before = common::alloc::allocations();
    fs.solve_in(&db, &params, &mut ws).unwrap();
    let after = common::alloc::allocations();
    let iterations = ws.result().recycle.as_ref().unwrap().iterations;
    assert!(iterations > 10, "{iterations}");
    assert_eq!(after - before, 0, "{iterations} passes allocated");
}

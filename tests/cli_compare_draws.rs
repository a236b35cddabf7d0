//! `syntrain compare --draws`: every option sees the same random draws (common random numbers),
//! the spread of each change is reported, the figures repeat on any thread count, and an option
//! that sets a drawn input itself is refused.

use std::process::{Command, Output};

const FLOWSHEETS: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/flowsheets/");

fn run(args: &[&str], threads: &str) -> Output {
    let out = Command::new(env!("CARGO_BIN_EXE_syntrain"))
        .args(args)
        .env("RAYON_NUM_THREADS", threads)
        .output()
        .expect("running the syntrain binary");
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(!err.contains("panicked"), "{err}");
    out
}

fn file(name: &str) -> String {
    format!("{FLOWSHEETS}{name}")
}

fn draws_json(vary: &[&str], draws: &str, threads: &str) -> serde_json::Value {
    let (base, fresh, mts) = (
        file("demo-train.yaml"),
        file("revamp-fresh-lts.yaml"),
        file("revamp-mts.yaml"),
    );
    let mut args = vec![
        "compare", &base, &fresh, &mts, "--draws", draws, "--seed", "11", "--format", "json",
    ];
    for v in vary {
        args.push("--vary");
        args.push(v);
    }
    let out = run(&args, threads);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).unwrap()
}

#[test]
fn a_narrow_draw_gives_the_change_of_the_plain_comparison() {
    // Draws of the HTS approach within +-0.001 K of its file value (8 K): every change is the
    // change of the plain comparison, to the effect of 0.001 K.
    let v = draws_json(
        &["units.hts.approach.shift~uniform(7.999 K, 8.001 K)"],
        "20",
        "2",
    );
    let (base, fresh, mts) = (
        file("demo-train.yaml"),
        file("revamp-fresh-lts.yaml"),
        file("revamp-mts.yaml"),
    );
    let plain = run(&["compare", &base, &fresh, &mts, "--format", "json"], "2");
    let plain: serde_json::Value = serde_json::from_slice(&plain.stdout).unwrap();
    for (k, key) in [
        "hydrogen_made_kmol_h",
        "hydrogen_per_carbon_fed",
        "heating_duty_kW",
    ]
    .iter()
    .enumerate()
    {
        for option in 0..2 {
            let want = plain["options"][option]["change"]["summary"][key]
                .as_f64()
                .unwrap();
            let got = v["options"][option]["figures"][format!("summary.{key}")]["change"]["p50"]
                .as_f64()
                .unwrap();
            assert!(
                (got - want).abs() <= 1e-3 * want.abs().max(1e-3),
                "{k} {key} option {option}: {got} vs {want}"
            );
        }
    }
    assert_eq!(v["draws"], 20);
    assert_eq!(v["failed"], 0);
}

#[test]
fn common_draws_make_the_change_narrower_than_either_value() {
    let v = draws_json(
        &[
            "units.hts.approach.shift~normal(10 K, 3 K)",
            "units.reformer.outlet-temperature~triangular(850 degC, 865 degC, 875 degC)",
        ],
        "60",
        "2",
    );
    let f = &v["options"][1]["figures"]["summary.hydrogen_made_kmol_h"];
    let spread = |x: &serde_json::Value| x["p90"].as_f64().unwrap() - x["p10"].as_f64().unwrap();
    // The reformer temperature moves hydrogen made by tens of kmol/h in every flowsheet alike;
    // the change of the added shift stage stays within a few kmol/h (common random numbers).
    assert!(spread(&f["base"]) > 10.0 * spread(&f["change"]), "{f}");
    let p = |q: &str| f["change"][q].as_f64().unwrap();
    assert!(p("p10") <= p("p50") && p("p50") <= p("p90"));
    // Common practice: an added shift stage makes more hydrogen in every draw.
    assert!(f["change"]["min"].as_f64().unwrap() > 0.0, "{f}");
}

#[test]
fn the_spread_repeats_on_any_thread_count() {
    let vary = ["units.hts.approach.shift~normal(10 K, 3 K)"];
    assert_eq!(draws_json(&vary, "30", "1"), draws_json(&vary, "30", "2"));
}

#[test]
fn an_option_that_sets_a_drawn_input_is_refused() {
    let (base, fresh) = (file("demo-train.yaml"), file("revamp-fresh-lts.yaml"));
    let out = run(
        &[
            "compare",
            &base,
            &fresh,
            "--draws",
            "10",
            "--vary",
            "units.lts.approach.shift~normal(10 K, 3 K)",
        ],
        "2",
    );
    assert!(!out.status.success());
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("sets this input itself"), "{err}");
    let out = run(
        &[
            "compare",
            &base,
            &fresh,
            "--vary",
            "units.hts.approach.shift~normal(10 K, 3 K)",
        ],
        "2",
    );
    assert!(!out.status.success(), "--vary without --draws is refused");
}

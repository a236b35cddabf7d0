//! Purifier defaults: with only a purity given, the impurities reached the product in
//! proportion to their feed amounts, so CO2 and water, which an adsorbent holds essentially
//! completely, dominated the product of the demo train. They now reach it in the order of how
//! weakly they adsorb (weights N2, Ar 1, CO 0.1, CH4 0.02, CO2 and water 0; common practice),
//! each weight overridable per species.

use serde_json::Value;

use super::support::{arg, demo, stderr, stdout, syntrain, write};

fn solve_json(file: &str) -> Value {
    let out = syntrain(&["solve", file, "--format", "json"]);
    assert!(out.status.success(), "{}", stderr(&out));
    serde_json::from_str(&stdout(&out)).unwrap()
}

fn flow(v: &Value, stream: &str, species: &str) -> f64 {
    v["streams"][stream]["flow_kmol_h"][species]
        .as_f64()
        .unwrap_or(0.0)
}

#[test]
fn demo_product_holds_no_co2_or_water_and_shares_the_rest_by_weight() {
    let v = solve_json(&arg(&demo("demo-train.yaml")));
    let (feed, product) = ("raw-hydrogen", "hydrogen-product");
    assert_eq!(flow(&v, product, "CO2"), 0.0);
    assert_eq!(flow(&v, product, "H2O"), 0.0);
    // Share of each feed amount in the product: N2 s, CO 0.1 s, CH4 0.02 s (common practice).
    let share = |s: &str| flow(&v, product, s) / flow(&v, feed, s);
    let s = share("N2");
    assert!(s > 0.0 && s < 1.0, "N2 share {s}");
    assert!(
        (share("CO") / s - 0.1).abs() < 1e-9,
        "CO {}",
        share("CO") / s
    );
    assert!(
        (share("CH4") / s - 0.02).abs() < 1e-9,
        "CH4 {}",
        share("CH4") / s
    );
    // The purity asked (0.999) is met exactly.
    let total: f64 = v["streams"][product]["flow_kmol_h"]
        .as_object()
        .unwrap()
        .values()
        .map(|x| x.as_f64().unwrap())
        .sum();
    assert!((flow(&v, product, "H2") / total - 0.999).abs() < 1e-12);
}

#[test]
fn impurity_weights_override_the_defaults() {
    let dir = tempfile::tempdir().unwrap();
    let text = std::fs::read_to_string(demo("demo-train.yaml")).unwrap();
    let text = text.replace(
        "    purity: 0.999\n",
        "    purity: 0.999\n    impurity-weights: {CH4: 1, CO2: 0.5}\n",
    );
    assert!(text.contains("impurity-weights"));
    let file = write(dir.path(), "weights.yaml", &text);
    let v = solve_json(&arg(&file));
    let share = |s: &str| flow(&v, "hydrogen-product", s) / flow(&v, "raw-hydrogen", s);
    assert!((share("CH4") / share("N2") - 1.0).abs() < 1e-9);
    assert!((share("CO2") / share("N2") - 0.5).abs() < 1e-9);
    // A weight above one is refused, naming the key.
    let bad = text.replace("CH4: 1,", "CH4: 2,");
    let file = write(dir.path(), "bad.yaml", &bad);
    let out = syntrain(&["solve", &arg(&file)]);
    assert_eq!(out.status.code(), Some(1));
    assert!(
        stderr(&out).contains("impurity-weights"),
        "{}",
        stderr(&out)
    );
}

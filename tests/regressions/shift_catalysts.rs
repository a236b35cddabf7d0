//! A medium-temperature shift converter raised a false alarm meant for a low-temperature copper
//! charge: there was one copper class with a 270 degC limit. Medium-temperature copper is now a
//! class of its own (common practice: fed at about 200-240 degC, outlet up to about
//! 330-350 degC; warned above 350 degC).

use super::support::{arg, stderr, stdout, syntrain, write};

/// A shift converter on a reformed gas fed at 215 degC (adiabatic outlet about 316 degC), with
/// `extra` lines (catalyst, outlet temperature).
fn flowsheet(extra: &str) -> String {
    format!(
        "title: medium-temperature shift (invented)
feeds:
  gas:
    temperature: 215 degC
    pressure: 25 bar
    flows: {{H2: 470 kmol/h, H2O: 340 kmol/h, CO: 95 kmol/h, CO2: 55 kmol/h, CH4: 35 kmol/h, N2: 5 kmol/h}}
units:
  - name: mts
    type: shift
    from: gas
    to: out
{extra}"
    )
}

fn warnings(extra: &str) -> String {
    let dir = tempfile::tempdir().unwrap();
    let file = write(dir.path(), "mts.yaml", &flowsheet(extra));
    let out = syntrain(&["solve", &arg(&file), "--format", "json"]);
    assert!(out.status.success(), "{}", stderr(&out));
    let v: serde_json::Value = serde_json::from_str(&stdout(&out)).unwrap();
    v["warnings"].to_string()
}

#[test]
fn medium_temperature_copper_at_316_degc_raises_no_alarm() {
    let w = warnings("    catalyst: medium-temperature-copper\n");
    assert!(!w.contains("upper limit"), "{w}");
    // The same outlet on a low-temperature copper charge is above its 260 degC limit (common
    // practice: 250-270 degC).
    let w = warnings("    catalyst: low-temperature-copper\n");
    assert!(w.contains("upper limit") && w.contains("260.0 degC"), "{w}");
    // `copper`, as older files say, is the low-temperature charge.
    let w = warnings("    catalyst: copper\n");
    assert!(w.contains("260.0 degC"), "{w}");
}

#[test]
fn medium_temperature_copper_limit_is_350_degc() {
    let at = |t: &str| {
        warnings(&format!(
            "    catalyst: medium-temperature-copper\n    outlet-temperature: {t}\n"
        ))
    };
    assert!(!at("349 degC").contains("upper limit"));
    let w = at("351 degC");
    assert!(w.contains("upper limit") && w.contains("350.0 degC"), "{w}");
}

#[test]
fn an_unnamed_copper_charge_with_a_316_degc_outlet_is_taken_as_medium_temperature() {
    let w = warnings("");
    assert!(
        w.contains("medium-temperature-copper assumed") && !w.contains("upper limit"),
        "{w}"
    );
}

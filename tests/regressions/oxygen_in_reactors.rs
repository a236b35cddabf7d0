//! Oxygen passed through catalytic reactors: O2 in a reformer, pre-reformer, shift or
//! methanator inlet was carried through unreacted beside 48 % hydrogen. It is now refused with
//! a message naming the unit and the oxygen fraction.

use super::support::{arg, stderr, syntrain, write};

/// A one-unit flowsheet: a reformed gas with 0.5 % O2 (5 of 1000 kmol/h) into `unit_lines`.
fn flowsheet(unit_lines: &str) -> String {
    format!(
        "title: oxygen check (invented)
feeds:
  gas:
    temperature: 350 degC
    pressure: 25 bar
    flows: {{H2: 480 kmol/h, H2O: 330 kmol/h, CO: 90 kmol/h, CO2: 55 kmol/h, CH4: 40 kmol/h, O2: 5 kmol/h}}
units:
  - name: bed
    from: gas
    to: out
{unit_lines}"
    )
}

#[test]
fn oxygen_is_refused_by_every_catalytic_reactor() {
    let dir = tempfile::tempdir().unwrap();
    let cases = [
        "    type: reformer\n    outlet-temperature: 850 degC\n",
        "    type: prereformer\n",
        "    type: shift\n    catalyst: iron-chromium\n",
        "    type: methanator\n",
    ];
    for unit in cases {
        let file = write(dir.path(), "o2.yaml", &flowsheet(unit));
        let out = syntrain(&["solve", &arg(&file)]);
        let err = stderr(&out);
        assert_eq!(out.status.code(), Some(1), "{unit}: {err}");
        // 5 of 1000 kmol/h: 0.5 mol %, 5000 ppm.
        assert!(
            err.contains("unit 'bed'") && err.contains("O2") && err.contains("0.500000 mol %"),
            "{unit}: {err}"
        );
    }
}

#[test]
fn oxygen_may_still_pass_a_heater() {
    let dir = tempfile::tempdir().unwrap();
    let heater = "    type: heater\n    outlet-temperature: 400 degC\n";
    let file = write(dir.path(), "o2.yaml", &flowsheet(heater));
    let out = syntrain(&["solve", &arg(&file)]);
    assert!(out.status.success(), "{}", stderr(&out));
}

//! Nothing a file can hold may panic: random flowsheets built on the shape of the demo train,
//! with every number drawn from far outside the sensible range as well as inside it, are read
//! and solved through the library; each must end in a result or an error, never a panic
//! (proptest reports a panic as a failure and shrinks it to the smallest case).

use proptest::prelude::*;
use syntrain::flowsheet::Flowsheet;
use syntrain::thermo::SpeciesDb;

/// A temperature in degC: mostly plant-like, sometimes absurd (below absolute zero, above every
/// species record).
fn temperature() -> impl Strategy<Value = f64> {
    prop_oneof![
        4 => 150.0..950.0f64,
        1 => -400.0..6000.0f64,
    ]
}

/// A temperature difference in K, including approaches larger than any data range.
fn approach() -> impl Strategy<Value = f64> {
    prop_oneof![
        4 => -20.0..40.0f64,
        1 => -3000.0..3000.0f64,
    ]
}

/// A flow in kmol/h, zero included.
fn flow() -> impl Strategy<Value = f64> {
    prop_oneof![
        1 => Just(0.0),
        4 => 0.0..5000.0f64,
        1 => 0.0..1e9f64,
    ]
}

#[derive(Debug, Clone)]
struct Case {
    t_gas: f64,
    t_steam: f64,
    p_bar: f64,
    ch4: f64,
    c2h6: f64,
    h2: f64,
    o2: f64,
    steam: f64,
    t_pre: f64,
    t_reformer: f64,
    a_reforming: f64,
    a_shift: f64,
    t_hts_in: f64,
    a_hts: f64,
    t_lts_in: f64,
    t_knockout: f64,
    drop_bar: f64,
    recovery: f64,
    purity: f64,
}

fn case() -> impl Strategy<Value = Case> {
    (
        (temperature(), temperature(), 0.001..400.0f64),
        (
            flow(),
            flow(),
            flow(),
            prop_oneof![5 => Just(0.0), 1 => 0.0..10.0f64],
            flow(),
        ),
        (temperature(), temperature(), approach(), approach()),
        (temperature(), approach(), temperature(), temperature()),
        (0.0..5.0f64, 0.01..1.0f64, 0.3..1.0f64),
    )
        .prop_map(|(a, b, c, d, e)| Case {
            t_gas: a.0,
            t_steam: a.1,
            p_bar: a.2,
            ch4: b.0,
            c2h6: b.1,
            h2: b.2,
            o2: b.3,
            steam: b.4,
            t_pre: c.0,
            t_reformer: c.1,
            a_reforming: c.2,
            a_shift: c.3,
            t_hts_in: d.0,
            a_hts: d.1,
            t_lts_in: d.2,
            t_knockout: d.3,
            drop_bar: e.0,
            recovery: e.1,
            purity: e.2,
        })
}

fn flowsheet(c: &Case) -> String {
    format!(
        "title: random train (invented)
feeds:
  natural-gas:
    temperature: {} degC
    pressure: {} bar
    flows: {{CH4: {} kmol/h, C2H6: {} kmol/h, H2: {} kmol/h, O2: {} kmol/h, N2: 1 kmol/h}}
  process-steam:
    temperature: {} degC
    pressure: {} bar
    flows: {{H2O: {} kmol/h}}
units:
  - {{name: mix, type: mixer, from: [natural-gas, process-steam], to: m1}}
  - {{name: pre-heat, type: heater, from: m1, to: m2, outlet-temperature: {} degC}}
  - {{name: pre, type: prereformer, from: m2, to: m3, approach: {{reforming: {} K, shift: {} K}}}}
  - name: reformer
    type: reformer
    from: m3
    to: m4
    outlet-temperature: {} degC
    pressure-drop: {} bar
    approach: {{reforming: {} K, shift: {} K}}
  - {{name: cool-1, type: cooler, from: m4, to: m5, outlet-temperature: {} degC}}
  - {{name: hts, type: shift, from: m5, to: m6, catalyst: iron-chromium, approach: {{shift: {} K}}}}
  - {{name: cool-2, type: cooler, from: m6, to: m7, outlet-temperature: {} degC}}
  - {{name: lts, type: shift, from: m7, to: m8, approach: {{shift: {} K}}}}
  - {{name: ko, type: knockout, from: m8, to: [m9, condensate], temperature: {} degC}}
  - name: psa
    type: purifier
    from: m9
    to: [product, tail]
    hydrogen-recovery: {}
    purity: {}
    tail-gas-pressure: 1.3 bar
",
        c.t_gas,
        c.p_bar,
        c.ch4,
        c.c2h6,
        c.h2,
        c.o2,
        c.t_steam,
        c.p_bar,
        c.steam,
        c.t_pre,
        c.a_reforming,
        c.a_shift,
        c.t_reformer,
        c.drop_bar,
        c.a_reforming,
        c.a_shift,
        c.t_hts_in,
        c.a_hts,
        c.t_lts_in,
        c.a_hts,
        c.t_knockout,
        c.recovery,
        c.purity,
    )
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 400, ..ProptestConfig::default() })]

    #[test]
    fn random_trains_end_in_a_result_or_an_error(c in case()) {
        let db = SpeciesDb::embedded().unwrap();
        let text = flowsheet(&c);
        // Either outcome is fine; a panic fails the test.
        if let Ok(fs) = Flowsheet::from_yaml_str("random.yaml", &text, &db) {
            if let Ok(r) = fs.solve(&db) {
                // A result is balanced: the solve checks it and never returns otherwise.
                prop_assert!(r.element_balance_residual <= 1e-9);
            }
        }
    }
}

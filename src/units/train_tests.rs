//! A whole train through the dispatcher: pre-reformer, reformer, HTS, LTS, knockout, a CO2
//! removal modelled as a purifier split, methanator, and a hydrogen purifier; every unit's
//! element and energy balance asserted, and a warm-started re-solve compared.

use super::test_support::{assert_balances, db, fig, reformer_feed};
use super::*;

fn thermal(t_k: f64) -> ThermalSpec {
    ThermalSpec {
        target: ThermalTarget::OutletTemperature(t_k),
        pressure_drop_pa: 0.2e5,
    }
}

/// The demo train (invented): (name, spec), each fed by the previous unit's first outlet.
fn train() -> Vec<(&'static str, UnitSpec)> {
    vec![
        (
            "prereformer",
            UnitSpec::Prereformer(PrereformerSpec {
                pressure_drop_pa: 0.3e5,
                approaches: Vec::new(),
            }),
        ),
        ("reformer-preheat", UnitSpec::Heater(thermal(893.15))),
        (
            "reformer",
            UnitSpec::Reformer(ReformerSpec {
                outlet_temperature_k: 1138.15,
                pressure_drop_pa: 2.0e5,
                approaches: vec![("reforming".into(), 5.0)],
            }),
        ),
        ("waste-heat-boiler", UnitSpec::Cooler(thermal(623.15))),
        (
            "hts",
            UnitSpec::Shift(ShiftSpec {
                outlet_temperature_k: None,
                pressure_drop_pa: 0.3e5,
                approaches: vec![("shift".into(), 5.0)],
                catalyst: Some(ShiftCatalyst::IronChromium),
            }),
        ),
        ("lts-cooler", UnitSpec::Cooler(thermal(473.15))),
        (
            "lts",
            UnitSpec::Shift(ShiftSpec {
                outlet_temperature_k: None,
                pressure_drop_pa: 0.3e5,
                approaches: Vec::new(),
                catalyst: Some(ShiftCatalyst::LowTemperatureCopper),
            }),
        ),
        // A cooler stays above the dew point; the knockout cools on to 40 degC and condenses.
        ("final-cooler", UnitSpec::Cooler(thermal(443.15))),
        (
            "knockout",
            UnitSpec::Knockout(KnockoutSpec {
                temperature_k: Some(313.15),
                pressure_drop_pa: 0.1e5,
            }),
        ),
        (
            "co2-removal",
            UnitSpec::Purifier(PurifierSpec {
                hydrogen_recovery: 1.0,
                product: PurifierProduct::ImpuritySplit(vec![
                    ("CH4".into(), 1.0),
                    ("CO".into(), 1.0),
                    ("N2".into(), 1.0),
                    ("H2O".into(), 1.0),
                    ("CO2".into(), 0.005),
                ]),
                pressure_drop_pa: 0.3e5,
                tail_gas_pressure_pa: 1.5e5,
                impurity_weights: Vec::new(),
            }),
        ),
        ("methanator-preheat", UnitSpec::Heater(thermal(573.15))),
        (
            "methanator",
            UnitSpec::Methanator(MethanatorSpec {
                pressure_drop_pa: 0.3e5,
                approaches: Vec::new(),
            }),
        ),
    ]
}

#[test]
fn whole_train_closes_every_balance_and_warm_starts() {
    let db = db();
    let feed = reformer_feed(&db, 763.15, 30e5);
    let prepared: Vec<PreparedUnit> = train()
        .iter()
        .map(|(n, s)| s.prepare(&db, n).unwrap())
        .collect();
    let mut stream = feed.clone();
    let mut results = Vec::new();
    for u in &prepared {
        let r = u.solve(&db, &[&stream], None).unwrap();
        assert_balances(&db, &[&stream], &r);
        assert_eq!(r.outlets.len(), u.spec().outlet_count(), "{}", u.name());
        assert_eq!(r.equilibrium.is_some(), u.spec().has_equilibrium());
        stream = r.outlets[0].clone();
        results.push(r);
    }
    // The figures along the way are those of the unit tests' ranges (common practice).
    let by = |name: &str| &results[prepared.iter().position(|u| u.name() == name).unwrap()];
    let slip = fig(by("reformer"), "methane-slip-dry");
    assert!((0.03..0.07).contains(&slip), "{slip}");
    let hts_out = by("hts").outlets[0].temperature_k;
    assert!((673.15..723.15).contains(&hts_out), "{hts_out}");
    let co = fig(by("lts"), "co-slip-dry");
    assert!((0.001..0.005).contains(&co), "{co}");
    let ppm = fig(by("methanator"), "co-co2-dry") * 1e6;
    assert!(ppm < 10.0, "{ppm}");
    // A warm-started second pass gives the same outlets.
    let mut stream = feed.clone();
    for (u, old) in prepared.iter().zip(&results) {
        let r = u.solve(&db, &[&stream], Some(old)).unwrap();
        let (a, b) = (&r.outlets[0], &old.outlets[0]);
        assert!(
            (a.temperature_k - b.temperature_k).abs() < 1e-7,
            "{}",
            u.name()
        );
        for (x, y) in a.flows.iter().zip(&b.flows) {
            assert!((x - y).abs() <= 1e-9 * y.abs().max(1e-9), "{}", u.name());
        }
        stream = r.outlets[0].clone();
    }
}

#[test]
fn dispatcher_names_types_and_counts() {
    let db = db();
    let specs = train();
    let names: Vec<&str> = specs.iter().map(|(_, s)| s.type_name()).collect();
    assert!(names.contains(&"prereformer") && names.contains(&"knockout"));
    let mixer = UnitSpec::Mixer(MixerSpec::default());
    let split = UnitSpec::Splitter(SplitterSpec {
        split: Split::Fractions(vec![Some(0.2), Some(0.3), None]),
        pressure_drop_pa: 0.0,
    });
    assert_eq!(split.outlet_count(), 3);
    let feed = reformer_feed(&db, 763.15, 30e5);
    let r = solve_unit(&db, "tee", &split, &[&feed]).unwrap();
    assert_balances(&db, &[&feed], &r);
    // Errors carry the unit's name.
    let bad = UnitSpec::Reformer(ReformerSpec {
        outlet_temperature_k: 1100.0,
        pressure_drop_pa: 40e5,
        approaches: Vec::new(),
    });
    let e = solve_unit(&db, "primary", &bad, &[&feed])
        .unwrap_err()
        .to_string();
    assert!(e.contains("unit 'primary'"), "{e}");
    let e = solve_unit(&db, "mix", &mixer, &[]).unwrap_err().to_string();
    assert!(e.contains("unit 'mix'"), "{e}");
}

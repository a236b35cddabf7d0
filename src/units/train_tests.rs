//! A whole train through the unit trait: pre-reformer, reformer, HTS, LTS, knockout, a CO2
//! removal modelled as a purifier split, methanator, and a hydrogen purifier; every unit's
//! element and energy balance asserted, and a warm-started re-solve compared. Also the registry:
//! every type built from a plain entry, its inputs registered under their paths.

use super::test_support::{assert_balances, db, fig, reformer_feed};
use super::unit::{BuildInput, Entry, EntryValue, ParamTable, UnitContext};
use super::*;
use crate::error::Result;
use crate::thermo::SpeciesDb;

/// A unit's solve: database, inlets, warm-start extents.
type Solve = Box<dyn Fn(&SpeciesDb, &[&Stream], Option<&[f64]>) -> Result<UnitResult>>;

/// A unit of the train: its name, whether it has an equilibrium stage, and its solve.
struct TrainUnit {
    name: &'static str,
    reactor: bool,
    solve: Solve,
}

/// A unit of kind `U` built from its spec.
fn unit<U: UnitKind>(
    db: &SpeciesDb,
    name: &'static str,
    reactor: bool,
    spec: U::Spec,
) -> TrainUnit {
    let u = U::new(db, name, &spec).unwrap();
    TrainUnit {
        name,
        reactor,
        solve: Box::new(move |db, inlets, guess| u.solve(db, inlets, guess)),
    }
}

fn thermal(t_k: f64) -> ThermalSpec {
    ThermalSpec {
        target: ThermalTarget::OutletTemperature(t_k),
        pressure_drop_pa: 0.2e5,
    }
}

/// The demo train (invented), each unit fed by the previous unit's first outlet.
fn train(db: &SpeciesDb) -> Vec<TrainUnit> {
    vec![
        unit::<Prereformer>(
            db,
            "prereformer",
            true,
            PrereformerSpec {
                pressure_drop_pa: 0.3e5,
                approaches: Vec::new(),
                limits: Default::default(),
                gas_model: None,
            },
        ),
        unit::<Heater>(db, "reformer-preheat", false, thermal(893.15)),
        unit::<Reformer>(
            db,
            "reformer",
            true,
            ReformerSpec {
                outlet_temperature_k: 1138.15,
                pressure_drop_pa: 2.0e5,
                approaches: vec![("reforming".into(), 5.0)],
                limits: Default::default(),
                gas_model: None,
            },
        ),
        unit::<Cooler>(db, "waste-heat-boiler", false, thermal(623.15)),
        unit::<Shift>(
            db,
            "hts",
            true,
            ShiftSpec {
                outlet_temperature_k: None,
                pressure_drop_pa: 0.3e5,
                approaches: vec![("shift".into(), 5.0)],
                catalyst: Some(ShiftCatalyst::IronChromium),
                limits: Default::default(),
                gas_model: None,
            },
        ),
        unit::<Cooler>(db, "lts-cooler", false, thermal(473.15)),
        unit::<Shift>(
            db,
            "lts",
            true,
            ShiftSpec {
                outlet_temperature_k: None,
                pressure_drop_pa: 0.3e5,
                approaches: Vec::new(),
                catalyst: Some(ShiftCatalyst::LowTemperatureCopper),
                limits: Default::default(),
                gas_model: None,
            },
        ),
        // A cooler stays above the dew point; the knockout cools on to 40 degC and condenses.
        unit::<Cooler>(db, "final-cooler", false, thermal(443.15)),
        unit::<Knockout>(
            db,
            "knockout",
            false,
            KnockoutSpec {
                temperature_k: Some(313.15),
                pressure_drop_pa: 0.1e5,
            },
        ),
        unit::<Purifier>(
            db,
            "co2-removal",
            false,
            PurifierSpec {
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
            },
        ),
        unit::<Heater>(db, "methanator-preheat", false, thermal(573.15)),
        unit::<Methanator>(
            db,
            "methanator",
            true,
            MethanatorSpec {
                pressure_drop_pa: 0.3e5,
                approaches: Vec::new(),
                limits: Default::default(),
                gas_model: None,
            },
        ),
    ]
}

#[test]
fn whole_train_closes_every_balance_and_warm_starts() {
    let db = db();
    let feed = reformer_feed(&db, 763.15, 30e5);
    let train = train(&db);
    let mut stream = feed.clone();
    let mut results = Vec::new();
    for u in &train {
        let r = (u.solve)(&db, &[&stream], None).unwrap();
        assert_balances(&db, &[&stream], &r);
        assert_eq!(r.equilibrium.is_some(), u.reactor, "{}", u.name);
        stream = r.outlets[0].clone();
        results.push(r);
    }
    // The figures along the way are those of the unit tests' ranges (common practice).
    let by = |name: &str| &results[train.iter().position(|u| u.name == name).unwrap()];
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
    for (u, old) in train.iter().zip(&results) {
        let guess = old.equilibrium.as_ref().map(|e| e.extents.as_slice());
        let r = (u.solve)(&db, &[&stream], guess).unwrap();
        let (a, b) = (&r.outlets[0], &old.outlets[0]);
        assert!(
            (a.temperature_k - b.temperature_k).abs() < 1e-7,
            "{}",
            u.name
        );
        for (x, y) in a.flows.iter().zip(&b.flows) {
            assert!((x - y).abs() <= 1e-9 * y.abs().max(1e-9), "{}", u.name);
        }
        stream = r.outlets[0].clone();
    }
}

fn scalar(key: &str, value: &str) -> (String, EntryValue) {
    (key.to_string(), EntryValue::Scalar(value.to_string()))
}

/// Build a unit of a registry type from plain entry values, as the flowsheet reader does.
fn built(
    db: &SpeciesDb,
    type_name: &str,
    outlets: &[&str],
    fields: Vec<(String, EntryValue)>,
    params: &mut ParamTable,
) -> Result<Box<dyn Unit>> {
    let unit_type = registry::unit_type(type_name).unwrap();
    let outlets: Vec<String> = outlets.iter().map(|s| s.to_string()).collect();
    let entry = Entry { fields };
    let mut input = BuildInput {
        db,
        name: "u",
        unit_type,
        outlets: &outlets,
        inlets: &[],
        entry: &entry,
        params,
    };
    (unit_type.build)(&mut input)
}

#[test]
fn registry_types_build_from_plain_entries_and_register_their_inputs() {
    let db = db();
    let mut params = ParamTable::default();
    let approach = EntryValue::Map(vec![(
        "reforming".into(),
        EntryValue::Scalar("10 K".into()),
    )]);
    let reformer = built(
        &db,
        "reformer",
        &["out"],
        vec![
            scalar("outlet-temperature", "865 degC"),
            ("approach".into(), approach),
        ],
        &mut params,
    )
    .unwrap();
    let paths: Vec<&str> = params.all().iter().map(|p| p.path.as_str()).collect();
    assert_eq!(
        paths,
        vec![
            "units.u.outlet-temperature",
            "units.u.pressure-drop",
            "units.u.approach.reforming",
            "units.u.approach.shift",
        ]
    );
    let defaults = params.defaults();
    assert_eq!(defaults, vec![1138.15, 0.0, 10.0, 0.0]);
    // Solved with the file's values, then with the reforming approach changed through its slot:
    // the same as a unit built with that approach.
    let feed = reformer_feed(&db, 893.15, 28e5);
    let mut changed = defaults.clone();
    changed[2] = 25.0;
    let (at_file, at_changed) = (
        UnitContext {
            db: &db,
            name: "u",
            params: &defaults,
            defaults: &defaults,
        },
        UnitContext {
            db: &db,
            name: "u",
            params: &changed,
            defaults: &defaults,
        },
    );
    let a = reformer.solve(&at_file, &[&feed], None).unwrap();
    let b = reformer.solve(&at_changed, &[&feed], None).unwrap();
    let direct = Reformer::new(
        &db,
        "u",
        &ReformerSpec {
            outlet_temperature_k: 1138.15,
            pressure_drop_pa: 0.0,
            approaches: vec![("reforming".into(), 25.0), ("shift".into(), 0.0)],
            limits: Default::default(),
            gas_model: None,
        },
    )
    .unwrap()
    .solve(&db, &[&feed], None)
    .unwrap();
    assert_eq!(b.outlets[0].flows, direct.outlets[0].flows);
    assert!(
        b.outlets[0].flows[db.index_of("CH4").unwrap()]
            > a.outlets[0].flows[db.index_of("CH4").unwrap()]
    );
    // An unknown key is refused naming the keys of the type; a bad value names its key.
    let mut params = ParamTable::default();
    let e = built(
        &db,
        "shift",
        &["out"],
        vec![scalar("outlet-temprature", "400 degC")],
        &mut params,
    )
    .unwrap_err()
    .to_string();
    assert!(
        e.contains("outlet-temprature") && e.contains("catalyst"),
        "{e}"
    );
    let e = built(
        &db,
        "shift",
        &["out"],
        vec![scalar("catalyst", "nickel")],
        &mut params,
    )
    .unwrap_err()
    .to_string();
    assert!(e.contains("iron-chromium") && e.contains("nickel"), "{e}");
    // Every type builds from the entry of its own example's keys being absent where optional.
    let splitter = built(
        &db,
        "splitter",
        &["a", "b", "c"],
        vec![(
            "fractions".into(),
            EntryValue::Map(vec![
                ("a".into(), EntryValue::Scalar("0.2".into())),
                ("b".into(), EntryValue::Scalar("0.3".into())),
            ]),
        )],
        &mut params,
    )
    .unwrap();
    let defaults = params.defaults();
    let cx = UnitContext {
        db: &db,
        name: "u",
        params: &defaults,
        defaults: &defaults,
    };
    let r = splitter.solve(&cx, &[&feed], None).unwrap();
    assert_balances(&db, &[&feed], &r);
    assert_eq!(r.outlets.len(), 3);
    assert!((r.outlets[2].total() / feed.total() - 0.5).abs() < 1e-12);
}

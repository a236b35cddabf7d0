//! Library-level checks of the flowsheet layer: the demo trains against common practice and
//! DIN 1343, the balance checks on both demos, and every error path of reading a flowsheet
//! (each message must name the field, stream or unit, and the line and column where it applies).

use std::path::{Path, PathBuf};

use syntrain::error::Position;
use syntrain::flowsheet::{
    Flowsheet, FlowsheetResult, StreamSource, ELEMENT_BALANCE_TOLERANCE, ENERGY_BALANCE_TOLERANCE,
};
use syntrain::quantity::{kelvin_to_degc, mol_s_to_nm3_h, pa_to_bar};
use syntrain::thermo::SpeciesDb;
use syntrain::Error;

fn db() -> SpeciesDb {
    SpeciesDb::embedded().expect("embedded species data")
}

fn demo(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("flowsheets")
        .join(name)
}

fn solve_demo(name: &str) -> (Flowsheet, FlowsheetResult) {
    let db = db();
    let fs = Flowsheet::from_file(&demo(name), &db).unwrap_or_else(|e| panic!("{name}: {e}"));
    let result = fs.solve(&db).unwrap_or_else(|e| panic!("{name}: {e}"));
    (fs, result)
}

fn stream<'a>(r: &'a FlowsheetResult, name: &str) -> &'a syntrain::units::Stream {
    &r.streams
        .iter()
        .find(|s| s.name == name)
        .unwrap_or_else(|| panic!("no stream {name}"))
        .stream
}

fn dry(db: &SpeciesDb, s: &syntrain::units::Stream, species: &str) -> f64 {
    s.dry_mole_fraction(db, db.index_of(species).unwrap())
}

/// A small valid flowsheet that the error tests change one piece at a time.
const BASE: &str = "\
title: error-test train
feeds:
  gas:
    temperature: 350 degC
    pressure: 25 bar
    flows: {H2: 480 kmol/h, CO: 90 kmol/h, CO2: 56 kmol/h, CH4: 34 kmol/h, H2O: 340 kmol/h}
units:
  - name: hts
    type: shift
    from: gas
    to: hts-exit
    approach: {shift: 8 K}
  - name: cooler
    type: cooler
    from: hts-exit
    to: cooled
    outlet-temperature: 200 degC
";

fn read(text: &str) -> Result<Flowsheet, Error> {
    Flowsheet::from_yaml_str("test.yaml", text, &db())
}

/// The error of reading `text`, as displayed.
fn error(text: &str) -> String {
    match read(text) {
        Ok(_) => panic!("expected an error for:\n{text}"),
        Err(e) => e.to_string(),
    }
}

/// The position (":line:column") and message of an error in the file, found while parsing (a
/// YAML error) or after (an input error, with its input path in front of the message).
fn yaml_error(text: &str) -> (String, String) {
    match read(text) {
        Err(Error::Yaml {
            path,
            position,
            message,
        }) => {
            assert_eq!(path, "test.yaml");
            (Position::suffix(&position), message)
        }
        Err(Error::Input {
            file,
            position,
            input,
            message,
        }) => {
            assert_eq!(file, "test.yaml");
            (Position::suffix(&position), format!("{input}: {message}"))
        }
        Err(other) => panic!("expected an error with a position, got: {other}"),
        Ok(_) => panic!("expected an error for:\n{text}"),
    }
}

fn replaced(from: &str, to: &str) -> String {
    assert!(BASE.contains(from), "BASE lacks {from:?}");
    BASE.replacen(from, to, 1)
}

fn assert_has(message: &str, needles: &[&str]) {
    for n in needles {
        assert!(message.contains(n), "message lacks {n:?}:\n{message}");
    }
}

// ---------------------------------------------------------------------------------------------
// The demo trains against common practice.

#[test]
fn base_flowsheet_reads_and_solves() {
    let db = db();
    let fs = read(BASE).unwrap();
    let r = fs.solve(&db).unwrap();
    assert_eq!(r.title, "error-test train");
    let names: Vec<&str> = r.streams.iter().map(|s| s.name.as_str()).collect();
    assert_eq!(names, vec!["gas", "hts-exit", "cooled"]);
    assert_eq!(r.streams[0].source, StreamSource::Feed);
    assert_eq!(r.streams[0].destination.as_deref(), Some("hts"));
    assert_eq!(
        r.streams[2].destination, None,
        "a stream nobody uses is a product"
    );
}

#[test]
fn demo_reformer_leaves_three_to_seven_percent_methane_dry() {
    // Common practice: a reformer at 850-900 degC, 20-30 bar and S/C 2.5-3.5 leaves about
    // 3-7 % methane on a dry basis.
    let db = db();
    let (_, r) = solve_demo("demo-train.yaml");
    let exit = stream(&r, "reformed-gas");
    let t = kelvin_to_degc(exit.temperature_k);
    assert!((860.0..=870.0).contains(&t), "reformer exit {t} degC");
    let p = pa_to_bar(exit.pressure_pa);
    assert!((23.0..=27.0).contains(&p), "reformer exit {p} bar");
    let (unit, sc) = &r.summary.steam_to_carbon[0];
    assert_eq!(unit, "prereformer");
    assert!((2.9..=3.1).contains(sc), "S/C {sc}");
    let ch4 = dry(&db, exit, "CH4");
    assert!((0.03..=0.07).contains(&ch4), "methane slip {ch4}");
    let (unit, slip) = &r.summary.methane_slip_dry[0];
    assert_eq!(unit, "reformer");
    assert!((slip - ch4).abs() < 1e-15);
}

#[test]
fn demo_hts_from_350_degc_leaves_at_400_to_450_degc() {
    // Common practice: HTS inlet 320-380 degC, exit 400-450 degC.
    let (_, r) = solve_demo("demo-train.yaml");
    let inlet = kelvin_to_degc(stream(&r, "hts-feed").temperature_k);
    assert!((inlet - 350.0).abs() < 1e-9, "HTS inlet {inlet}");
    let exit = kelvin_to_degc(stream(&r, "hts-exit").temperature_k);
    assert!((400.0..=450.0).contains(&exit), "HTS exit {exit} degC");
}

#[test]
fn demo_lts_from_about_200_degc_leaves_a_tenth_to_half_percent_co_dry() {
    // Common practice: LTS inlet 190-220 degC, CO slip 0.1-0.4 % dry (0.5 % allowed here).
    let db = db();
    let (_, r) = solve_demo("demo-train.yaml");
    let inlet = kelvin_to_degc(stream(&r, "lts-feed").temperature_k);
    assert!((190.0..=220.0).contains(&inlet), "LTS inlet {inlet}");
    let co = dry(&db, stream(&r, "lts-exit"), "CO");
    assert!((0.001..=0.005).contains(&co), "LTS CO slip {co}");
    let lts = r
        .summary
        .co_slip_dry
        .iter()
        .find(|(u, _)| u == "lts")
        .unwrap();
    assert!((lts.1 - co).abs() < 1e-15);
}

#[test]
fn demo_purifier_recovers_88_percent_at_three_nines() {
    // The demo's own spec (common practice for PSA: recovery 0.85-0.90, purity 99.9 % or more).
    let db = db();
    let (_, r) = solve_demo("demo-train.yaml");
    let h2 = db.index_of("H2").unwrap();
    let raw = stream(&r, "raw-hydrogen").flows[h2];
    let product = stream(&r, "hydrogen-product");
    let made = r.summary.hydrogen_product_mol_s.unwrap();
    assert!((made - product.flows[h2]).abs() < 1e-12);
    assert!((made / raw - 0.88).abs() < 1e-9);
    assert!((product.mole_fraction(h2) - 0.999).abs() < 1e-9);
    let nm3_h = mol_s_to_nm3_h(made);
    assert!(
        (50_000.0..=80_000.0).contains(&nm3_h),
        "H2 product {nm3_h} Nm3/h"
    );
}

#[test]
fn demo_train_streams_and_units_are_in_order() {
    let (fs, r) = solve_demo("demo-train.yaml");
    assert_eq!(r.streams[0].name, "natural-gas");
    assert_eq!(r.streams[1].name, "process-steam");
    let units: Vec<&str> = r.units.iter().map(|u| u.name.as_str()).collect();
    let order: Vec<&str> = fs.units_in_order().map(|u| u.name.as_str()).collect();
    assert_eq!(units, order);
    assert_eq!(units.first(), Some(&"feed-mixer"));
    assert_eq!(units.last(), Some(&"psa"));
    // Every outlet follows the feeds in solve order.
    let outlets: Vec<&str> = r
        .units
        .iter()
        .flat_map(|u| u.outlets.iter().map(String::as_str))
        .collect();
    let streams: Vec<&str> = r.streams[2..].iter().map(|s| s.name.as_str()).collect();
    assert_eq!(outlets, streams);
    let products: Vec<&str> = r
        .streams
        .iter()
        .filter(|s| s.destination.is_none())
        .map(|s| s.name.as_str())
        .collect();
    assert_eq!(
        products,
        vec!["process-condensate", "hydrogen-product", "psa-tail-gas"]
    );
    // Duties: heaters and the reformer add heat, coolers and the knockout remove it.
    let s = &r.summary;
    let heat: f64 = r
        .units
        .iter()
        .map(|u| u.result.duty_w)
        .filter(|q| *q > 0.0)
        .sum();
    assert!((s.heating_duty_w - heat).abs() < 1e-6 && s.heating_duty_w > 0.0);
    assert!(s.cooling_duty_w < 0.0);
}

#[test]
fn normal_cubic_metres_convert_at_the_din_1343_molar_volume() {
    // DIN 1343: 22.414 m3/kmol at 273.15 K and 101325 Pa, so 22414 Nm3/h is 1000 kmol/h.
    let text = replaced(
        "flows: {H2: 480 kmol/h, CO: 90 kmol/h, CO2: 56 kmol/h, CH4: 34 kmol/h, H2O: 340 kmol/h}",
        "total: 22414 Nm3/h\n    mole-fractions: {H2: 0.5, CO: 0.1, H2O: 0.4}",
    );
    let fs = read(&text).unwrap();
    let kmol_h = fs.feeds()[0].stream.total() * 3.6;
    assert!((kmol_h - 1000.0).abs() <= 1000.0 * 1e-4, "{kmol_h} kmol/h");
}

#[test]
fn mass_flows_convert_with_the_molar_mass() {
    // IUPAC 2013 conventional atomic weights: M(H2O) = 2 * 1.008 + 15.999 = 18.015 g/mol, so
    // 18015 kg/h of steam is 1000 kmol/h; a mixture total uses the mean molar mass.
    let db = db();
    let h2o = db.index_of("H2O").unwrap();
    let text = replaced("H2O: 340 kmol/h", "H2O: 18015 kg/h");
    let fs = read(&text).unwrap();
    assert!((fs.feeds()[0].stream.flows[h2o] * 3.6 - 1000.0).abs() < 0.01);
    let text = replaced(
        "flows: {H2: 480 kmol/h, CO: 90 kmol/h, CO2: 56 kmol/h, CH4: 34 kmol/h, H2O: 340 kmol/h}",
        "total: 18.015 t/h\n    mole-fractions: {H2O: 0.5, CO: 0.5}",
    );
    // M(CO) = 12.011 + 15.999 = 28.010 g/mol; mean (18.015 + 28.010) / 2 = 23.0125 g/mol.
    let fs = read(&text).unwrap();
    let expected = 18_015.0 / 23.0125;
    assert!((fs.feeds()[0].stream.total() * 3.6 - expected).abs() < 0.01);
}

#[test]
fn both_demos_close_their_balances() {
    for name in ["demo-train.yaml", "shift-only.yaml"] {
        let (_, r) = solve_demo(name);
        assert!(
            r.element_balance_residual <= ELEMENT_BALANCE_TOLERANCE,
            "{name}: element balance {:e}",
            r.element_balance_residual
        );
        assert!(
            r.energy_balance_residual <= ENERGY_BALANCE_TOLERANCE,
            "{name}: energy balance {:e}",
            r.energy_balance_residual
        );
    }
}

#[test]
fn energy_balance_is_checked_independently_of_the_solver() {
    // Products minus feeds equals the sum of duties, recomputed here from the streams.
    let db = db();
    for name in ["demo-train.yaml", "shift-only.yaml"] {
        let (_, r) = solve_demo(name);
        let h = |feed: bool| -> f64 {
            r.streams
                .iter()
                .filter(|s| {
                    if feed {
                        s.source == StreamSource::Feed
                    } else {
                        s.destination.is_none()
                    }
                })
                .map(|s| s.stream.enthalpy_w(&db).unwrap())
                .sum()
        };
        let duties: f64 = r.units.iter().map(|u| u.result.duty_w).sum();
        let scale: f64 = r
            .streams
            .iter()
            .filter(|s| s.source == StreamSource::Feed)
            .map(|s| s.stream.enthalpy_w(&db).unwrap().abs())
            .sum();
        let residual = (h(false) - h(true) - duties).abs() / scale;
        assert!(residual <= 1e-6, "{name}: {residual:e}");
    }
}

#[test]
fn shift_only_demo_shifts_to_low_co() {
    // Common practice: HTS exit 400-450 degC; LTS CO slip 0.1-0.5 % dry.
    let db = db();
    let (_, r) = solve_demo("shift-only.yaml");
    let hts = kelvin_to_degc(stream(&r, "hts-exit").temperature_k);
    assert!((400.0..=450.0).contains(&hts), "{hts}");
    let co = dry(&db, stream(&r, "shifted-gas"), "CO");
    assert!((0.001..=0.005).contains(&co), "{co}");
}

#[test]
fn from_and_to_take_one_name_or_a_list() {
    let text = replaced("from: gas", "from: [gas]").replacen("to: cooled", "to: [cooled]", 1);
    let fs = read(&text).unwrap();
    assert_eq!(fs.units()[0].inlets, vec!["gas"]);
    assert_eq!(fs.units()[1].outlets, vec!["cooled"]);
}

#[test]
fn every_unit_type_reads_with_its_own_keys() {
    // Each type's keys are accepted (deny_unknown_fields per type, not per file).
    let text = "\
feeds:
  gas:
    temperature: 300 degC
    pressure: 25 bar
    flows: {H2: 700 kmol/h, CO: 5 kmol/h, CO2: 10 kmol/h, CH4: 50 kmol/h, H2O: 300 kmol/h, C2H6: 5 kmol/h}
units:
  - {name: split, type: splitter, from: gas, to: [a, b], fractions: {a: 0.6}}
  - {name: mix, type: mixer, from: [a, b], to: c, pressure-drop: 0.1 bar}
  - {name: heat, type: heater, from: c, to: d, duty: 2 MW}
  - {name: pre, type: prereformer, from: d, to: e, approach: {reforming: 0 K, shift: 0 K}}
  - {name: cool, type: cooler, from: e, to: f, outlet-temperature: 300 degC}
  - {name: meth, type: methanator, from: f, to: g, approach: {reforming: 0 K, shift: 0 K}}
  - {name: ko, type: knockout, from: g, to: [h, w], temperature: 40 degC}
  - name: pu
    type: purifier
    from: h
    to: [p, t]
    hydrogen-recovery: 85 %
    impurity-split: {N2: 0.01}
    tail-gas-pressure: 1.5 bar
";
    let db = db();
    let fs = read(text).unwrap();
    let r = fs.solve(&db).unwrap();
    assert_eq!(r.units.len(), 8);
    assert!(r.element_balance_residual <= 1e-9 && r.energy_balance_residual <= 1e-6);
}

// ---------------------------------------------------------------------------------------------
// Error paths: values.

#[test]
fn unknown_unit_names_the_field_line_and_column() {
    let (loc, msg) = yaml_error(&replaced("350 degC", "350 degX"));
    assert_eq!(loc, ":4:18");
    assert_has(
        &msg,
        &["feeds.gas.temperature", "unknown temperature unit 'degX'"],
    );
}

#[test]
fn missing_unit_is_an_error() {
    let (loc, msg) = yaml_error(&replaced("pressure: 25 bar", "pressure: 25"));
    assert_eq!(loc, ":5:15");
    assert_has(&msg, &["feeds.gas.pressure", "no unit given"]);
}

#[test]
fn temperature_at_or_below_absolute_zero_is_an_error() {
    let (loc, msg) = yaml_error(&replaced("350 degC", "-300 degC"));
    assert_eq!(loc, ":4:18");
    assert_has(&msg, &["feeds.gas.temperature", "above 0 K"]);
}

#[test]
fn zero_pressure_is_an_error() {
    let (loc, msg) = yaml_error(&replaced("pressure: 25 bar", "pressure: 0 bar"));
    assert_eq!(loc, ":5:15");
    assert_has(&msg, &["feeds.gas.pressure", "must be above 0"]);
}

#[test]
fn negative_flow_is_an_error() {
    let (loc, msg) = yaml_error(&replaced("CO: 90 kmol/h", "CO: -90 kmol/h"));
    assert!(loc.starts_with(":6:"), "{loc}");
    assert_has(&msg, &["feeds.gas.flows.CO", "zero or positive"]);
}

#[test]
fn nan_and_infinity_are_errors() {
    for bad in ["nan degC", ".nan", "inf K", ".inf"] {
        let (loc, msg) = yaml_error(&replaced("350 degC", bad));
        assert_eq!(loc, ":4:18", "{bad}");
        assert_has(&msg, &["feeds.gas.temperature", "not a finite number"]);
    }
}

#[test]
fn bad_value_inside_a_unit_names_the_unit_and_keeps_its_position() {
    let (loc, msg) = yaml_error(&replaced("200 degC", "200 degc"));
    assert_eq!(loc, ":17:25");
    assert_has(
        &msg,
        &["units.cooler.outlet-temperature", "did you mean 'degC'?"],
    );
    let (loc, msg) = yaml_error(&replaced("{shift: 8 K}", "{shift: 8}"));
    assert_eq!(loc, ":12:23");
    assert_has(&msg, &["units.hts.approach.shift", "no unit given"]);
}

// Error paths: keys.

#[test]
fn unknown_top_level_key_is_an_error() {
    let (loc, msg) = yaml_error(&replaced("title:", "titel:"));
    assert_eq!(loc, ":1:1");
    assert_has(&msg, &["unknown field `titel`", "title"]);
}

#[test]
fn unknown_feed_key_is_an_error() {
    let (loc, msg) = yaml_error(&replaced("pressure: 25 bar", "presure: 25 bar"));
    assert_eq!(loc, ":5:5");
    assert_has(&msg, &["feeds.gas", "unknown field `presure`"]);
}

#[test]
fn misspelt_unit_key_is_an_error_at_its_line() {
    let (loc, msg) = yaml_error(&replaced("outlet-temperature:", "outlet-temprature:"));
    assert_eq!(loc, ":17:5");
    assert_has(
        &msg,
        &[
            "units.cooler.outlet-temprature",
            "unknown key for a cooler",
            "outlet-temperature",
        ],
    );
}

#[test]
fn key_of_another_unit_type_is_an_error_at_its_line() {
    // `hydrogen-recovery` is a purifier key: a cooler refuses it.
    let text = format!("{BASE}    hydrogen-recovery: 0.9\n");
    let (loc, msg) = yaml_error(&text);
    assert_eq!(loc, ":18:5");
    assert_has(
        &msg,
        &[
            "units.cooler.hydrogen-recovery",
            "unknown key for a cooler",
            "outlet-temperature, duty",
        ],
    );
}

#[test]
fn unknown_reaction_in_approach_is_an_error() {
    let (loc, msg) = yaml_error(&replaced("{shift: 8 K}", "{reforming: 8 K}"));
    assert_eq!(loc, ":12:27");
    assert_has(
        &msg,
        &[
            "units.hts.approach.reforming",
            "not part of this unit",
            "its reactions are: shift",
        ],
    );
}

#[test]
fn unknown_unit_type_is_an_error_at_its_line() {
    let (loc, msg) = yaml_error(&replaced("type: shift", "type: shfit"));
    assert_eq!(loc, ":9:11");
    assert_has(
        &msg,
        &[
            "units.hts.type",
            "unknown unit type 'shfit'",
            "shift",
            "unit-types",
        ],
    );
}

#[test]
fn missing_unit_type_is_an_error() {
    let (loc, msg) = yaml_error(&replaced("    type: shift\n", ""));
    assert_eq!(loc, ":8:5");
    assert_has(&msg, &["units.hts", "missing field `type`"]);
}

#[test]
fn missing_required_key_is_an_error() {
    let (loc, msg) = yaml_error(&replaced("    pressure: 25 bar\n", ""));
    assert_eq!(loc, ":4:5");
    assert_has(&msg, &["feeds.gas", "missing field `pressure`"]);
}

#[test]
fn repeated_key_is_an_error() {
    let (loc, msg) = yaml_error(&replaced("CO: 90 kmol/h", "CO: 90 kmol/h, CO: 1 kmol/h"));
    assert!(loc.starts_with(":6:"), "{loc}");
    assert_has(&msg, &["feeds.gas.flows", "duplicate entry", "CO"]);
}

#[test]
fn yaml_syntax_error_has_line_and_column() {
    let (loc, msg) = yaml_error(&replaced("to: hts-exit", "to: [hts-exit"));
    assert_eq!(loc, ":12:13");
    assert_has(&msg, &["did not find expected ',' or ']'"]);
}

#[test]
fn missing_file_is_an_io_error() {
    let e = Flowsheet::from_file(Path::new("/nonexistent/train.yaml"), &db()).unwrap_err();
    assert_has(&e.to_string(), &["reading", "/nonexistent/train.yaml"]);
}

// Error paths: species and feeds.

#[test]
fn unknown_species_in_flows_is_an_error() {
    let e = error(&replaced("CH4: 34", "CH5: 34"));
    assert_has(
        &e,
        &[
            "unknown species 'CH5'",
            "feeds.gas.flows",
            "test.yaml:6:65: feeds.gas:",
            "known species",
        ],
    );
}

#[test]
fn unknown_species_in_mole_fractions_is_an_error() {
    let e = error(&replaced(
        "flows: {H2: 480 kmol/h, CO: 90 kmol/h, CO2: 56 kmol/h, CH4: 34 kmol/h, H2O: 340 kmol/h}",
        "total: 100 kmol/h\n    mole-fractions: {H2: 0.5, Steam: 0.5}",
    ));
    assert_has(
        &e,
        &[
            "unknown species 'Steam'",
            "feeds.gas.mole-fractions",
            "test.yaml:7:38: feeds.gas:",
        ],
    );
}

#[test]
fn unknown_species_in_impurity_split_is_an_error() {
    let text = format!(
        "{BASE}  - name: psa\n    type: purifier\n    from: cooled\n    to: [h2, tail]\n    \
         hydrogen-recovery: 0.88\n    impurity-split: {{Nitrogen: 0.01}}\n    \
         tail-gas-pressure: 1.3 bar\n"
    );
    let e = error(&text);
    assert_has(
        &e,
        &["unknown species 'Nitrogen'", "test.yaml:23:32: units.psa:"],
    );
}

#[test]
fn feed_with_no_flow_is_an_error() {
    let (loc, msg) = yaml_error(&replaced(
        "    flows: {H2: 480 kmol/h, CO: 90 kmol/h, CO2: 56 kmol/h, CH4: 34 kmol/h, H2O: 340 kmol/h}\n",
        "",
    ));
    assert_eq!(loc, ":4:5");
    assert_has(
        &msg,
        &["feeds.gas", "give `flows` (per species) or `total`"],
    );
    let (loc, msg) = yaml_error(&replaced(
        "{H2: 480 kmol/h, CO: 90 kmol/h, CO2: 56 kmol/h, CH4: 34 kmol/h, H2O: 340 kmol/h}",
        "{H2: 0 kmol/h}",
    ));
    assert_eq!(loc, ":4:5");
    assert_has(&msg, &["feeds.gas", "no flow at all"]);
}

#[test]
fn mole_fractions_must_sum_to_one() {
    let (loc, msg) = yaml_error(&replaced(
        "flows: {H2: 480 kmol/h, CO: 90 kmol/h, CO2: 56 kmol/h, CH4: 34 kmol/h, H2O: 340 kmol/h}",
        "total: 100 kmol/h\n    mole-fractions: {H2: 0.5, H2O: 0.49}",
    ));
    assert_eq!(loc, ":4:5");
    assert_has(
        &msg,
        &[
            "feeds.gas",
            "mole fractions sum to 0.990000",
            "must sum to 1 within 1e-6",
        ],
    );
    // Within the tolerance they are accepted (and normalised).
    read(&replaced(
        "flows: {H2: 480 kmol/h, CO: 90 kmol/h, CO2: 56 kmol/h, CH4: 34 kmol/h, H2O: 340 kmol/h}",
        "total: 100 kmol/h\n    mole-fractions: {H2: 0.5, H2O: 0.4999995}",
    ))
    .unwrap();
}

#[test]
fn flows_and_total_together_are_an_error() {
    let (loc, msg) = yaml_error(&replaced("    flows:", "    total: 100 kmol/h\n    flows:"));
    assert_eq!(loc, ":4:5");
    assert_has(&msg, &["feeds.gas", "`flows`", "`total`", "not both"]);
}

#[test]
fn total_without_mole_fractions_is_an_error() {
    let (loc, msg) = yaml_error(&replaced(
        "flows: {H2: 480 kmol/h, CO: 90 kmol/h, CO2: 56 kmol/h, CH4: 34 kmol/h, H2O: 340 kmol/h}",
        "total: 100 kmol/h",
    ));
    assert_eq!(loc, ":4:5");
    assert_has(&msg, &["feeds.gas", "`total` needs `mole-fractions`"]);
}

// Error paths: the graph.

#[test]
fn stream_used_but_never_made_is_an_error() {
    let e = error(&replaced("from: hts-exit", "from: hts-exlt"));
    assert_has(
        &e,
        &[
            "test.yaml:15:11: units.cooler.from",
            "stream 'hts-exlt'",
            "never made",
        ],
    );
}

#[test]
fn stream_made_twice_is_an_error() {
    let e = error(&replaced("to: cooled", "to: hts-exit"));
    assert_has(
        &e,
        &[
            "test.yaml:16:9: units.cooler.to",
            "stream 'hts-exit' is made twice",
            "'hts'",
        ],
    );
}

#[test]
fn stream_used_twice_is_an_error() {
    let text = format!(
        "{BASE}  - name: second-cooler\n    type: cooler\n    from: hts-exit\n    to: other\n    \
         outlet-temperature: 250 degC\n"
    );
    let e = error(&text);
    assert_has(
        &e,
        &[
            "test.yaml:20:11: units.second-cooler.from",
            "stream 'hts-exit' is used twice",
            "'cooler'",
            "'second-cooler'",
        ],
    );
}

#[test]
fn unit_name_used_twice_is_an_error() {
    let e = error(&replaced("name: cooler", "name: hts"));
    assert_has(
        &e,
        &[
            "test.yaml:13:11: units.hts.name",
            "unit name 'hts' is used twice",
        ],
    );
}

#[test]
fn feed_name_that_is_also_a_unit_outlet_is_an_error() {
    let e = error(&replaced("to: cooled", "to: gas"));
    assert_has(
        &e,
        &[
            "test.yaml:16:9: units.cooler.to",
            "stream 'gas' is both a feed and an outlet of unit 'cooler'",
        ],
    );
}

#[test]
fn cycle_is_an_error_naming_its_streams() {
    // hts takes the cooler's outlet, and the cooler takes hts's outlet.
    let text = replaced("from: gas", "from: cooled");
    let e = error(&text);
    assert_has(
        &e,
        &[
            "cycle through streams",
            "'hts-exit'",
            "'cooled'",
            "recycles",
        ],
    );
}

#[test]
fn wrong_number_of_inlets_is_an_error() {
    let (loc, msg) = yaml_error(&replaced("from: hts-exit", "from: [hts-exit, gas]"));
    assert_eq!(loc, ":13:5");
    assert_has(
        &msg,
        &["units.cooler", "exactly 1 inlet(s) in `from`", "; 2 given"],
    );
}

#[test]
fn wrong_number_of_outlets_is_an_error() {
    let (loc, msg) = yaml_error(&replaced("to: hts-exit", "to: [hts-exit, spare]"));
    assert_eq!(loc, ":8:5");
    assert_has(
        &msg,
        &["units.hts", "exactly 1 outlet(s) in `to`", "; 2 given"],
    );
    let text = format!(
        "{BASE}  - {{name: ko, type: knockout, from: cooled, to: dry-gas, temperature: 40 degC}}\n"
    );
    let (loc, msg) = yaml_error(&text);
    assert_eq!(loc, ":18:5");
    assert_has(&msg, &["units.ko", "(gas, condensate); 1 given"]);
}

// Error paths: unit specifications.

#[test]
fn heater_needs_exactly_one_of_outlet_temperature_and_duty() {
    let (loc, msg) = yaml_error(&replaced(
        "outlet-temperature: 200 degC",
        "outlet-temperature: 200 degC\n    duty: -1 MW",
    ));
    // At the first of the two keys.
    assert_eq!(loc, ":17:25");
    assert_has(
        &msg,
        &["units.cooler", "`outlet-temperature` or `duty`, not both"],
    );
    let (loc, msg) = yaml_error(&replaced("    outlet-temperature: 200 degC\n", ""));
    assert_eq!(loc, ":13:5");
    assert_has(
        &msg,
        &["units.cooler", "needs `outlet-temperature` or `duty`"],
    );
}

#[test]
fn reformer_needs_an_outlet_temperature() {
    let text = format!("{BASE}  - {{name: ref, type: reformer, from: cooled, to: out}}\n");
    let (loc, msg) = yaml_error(&text);
    assert_eq!(loc, ":18:5");
    assert_has(&msg, &["units.ref", "needs `outlet-temperature`"]);
}

#[test]
fn purifier_needs_exactly_one_of_purity_and_impurity_split() {
    let base = format!(
        "{BASE}  - name: psa\n    type: purifier\n    from: cooled\n    to: [h2, tail]\n    \
         hydrogen-recovery: 0.88\n    tail-gas-pressure: 1.3 bar\n"
    );
    let (loc, msg) = yaml_error(&format!(
        "{base}    purity: 0.999\n    impurity-split: 0.001\n"
    ));
    // At the first of the two keys.
    assert_eq!(loc, ":24:13");
    assert_has(
        &msg,
        &["units.psa", "`purity` or the `impurity-split`, not both"],
    );
    let (loc, msg) = yaml_error(&base);
    assert_eq!(loc, ":18:5");
    assert_has(
        &msg,
        &[
            "units.psa",
            "needs the product `purity`",
            "`impurity-split`",
        ],
    );
}

#[test]
fn splitter_entries_must_name_its_outlets() {
    let text = format!(
        "{BASE}  - {{name: split, type: splitter, from: cooled, to: [a, b], fractions: {{a: 0.5, c: 0.5}}}}\n"
    );
    let (loc, msg) = yaml_error(&text);
    // At the outlet name's value.
    assert_eq!(loc, ":18:84");
    assert_has(&msg, &["units.split.fractions.c", "'c' is not an outlet"]);
}

#[test]
fn unit_layer_spec_error_names_the_unit_and_points_at_the_key() {
    // The unit layer refuses a recovery of zero; the message gets the key's position.
    let text = format!(
        "{BASE}  - name: psa\n    type: purifier\n    from: cooled\n    to: [h2, tail]\n    \
         hydrogen-recovery: 0\n    purity: 0.999\n    tail-gas-pressure: 1.3 bar\n"
    );
    let e = error(&text);
    assert_has(
        &e,
        &["test.yaml:22:24: units.psa.hydrogen-recovery:", "above 0"],
    );
}

#[test]
fn a_unit_that_fails_to_solve_names_the_unit() {
    // A reformer fed with no steam cannot reform the ethane: the error names the unit.
    let text = "\
feeds:
  gas:
    temperature: 600 degC
    pressure: 25 bar
    flows: {CH4: 100 kmol/h, C2H6: 10 kmol/h}
units:
  - {name: ref, type: reformer, from: gas, to: out, outlet-temperature: 850 degC}
";
    let db = db();
    let e = read(text).unwrap().solve(&db).unwrap_err();
    assert_has(&e.to_string(), &["solving unit 'ref' (reformer)"]);
}

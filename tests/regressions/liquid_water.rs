//! Liquid water taken as vapour: boiler-feed water below its saturation temperature was mixed and
//! heated as superheated steam (every enthalpy downstream off by the latent heat), and a wet gas
//! below its dew point was labelled vapour. Pure water below T_s(P) is now liquid with its latent
//! heat, heaters, coolers and mixers change its phase, and gas below its dew point is refused.
//! Pure water now takes IAPWS-IF97 Regions 1 and 2 (the departure from the ideal gas added to
//! the NASA ideal-gas enthalpy), so heaters and desuperheaters agree with IF97 closely.
//!
//! References: tests/data/iapws97_heater.csv and tests/data/iapws97_desuperheater.csv, made by
//! tools/iapws_water_reference.py from IAPWS-IF97 (PyPI `iapws` 1.5.5, IAPWS97 regions 1 and 2).

use serde_json::Value;

use crate::support::{arg, stderr, stdout, syntrain, write};

/// IAPWS molar mass of water, g/mol, is 18.015268; the species data use IUPAC 2013 atomic
/// weights (2 x 1.008 + 15.999 = 18.015 g/mol), the mass the report converts with.
const WATER_KG_PER_KMOL: f64 = 18.015;

/// Rows of a reference CSV under tests/data/ as (column -> cell) maps.
fn table(name: &str) -> Vec<Vec<(String, String)>> {
    let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests")
        .join("data")
        .join(name);
    let text = std::fs::read_to_string(&path).expect("reading the reference table");
    let mut lines = text.lines().filter(|l| !l.trim().is_empty());
    let header: Vec<String> = lines
        .next()
        .expect("header")
        .split(',')
        .map(str::to_string)
        .collect();
    lines
        .map(|l| {
            header
                .iter()
                .cloned()
                .zip(l.split(',').map(str::to_string))
                .collect()
        })
        .collect()
}

fn cell<'a>(row: &'a [(String, String)], key: &str) -> &'a str {
    &row.iter().find(|(k, _)| k == key).expect(key).1
}

fn number(row: &[(String, String)], key: &str) -> f64 {
    cell(row, key).parse().expect("a number")
}

/// Solve a flowsheet written to a temporary file; JSON report, success required.
fn solve_json(text: &str) -> Value {
    let dir = tempfile::tempdir().unwrap();
    let path = write(dir.path(), "water.yaml", text);
    let out = syntrain(&["solve", &arg(&path), "--format", "json"]);
    assert!(out.status.success(), "solve failed: {}", stderr(&out));
    serde_json::from_str(&stdout(&out)).expect("JSON report")
}

/// Solve a flowsheet that must be refused; its error text.
fn solve_error(text: &str) -> String {
    let dir = tempfile::tempdir().unwrap();
    let path = write(dir.path(), "water.yaml", text);
    let out = syntrain(&["solve", &arg(&path)]);
    assert_eq!(
        out.status.code(),
        Some(1),
        "expected a refusal: {}",
        stdout(&out)
    );
    stderr(&out)
}

fn f(v: &Value) -> f64 {
    v.as_f64().unwrap_or_else(|| panic!("not a number: {v}"))
}

fn kelvin(t: f64) -> String {
    format!("{:.2} degC", t - 273.15)
}

#[test]
fn heaters_and_coolers_on_water_match_iapws_if97() {
    // IAPWS-IF97 h(T, p) differences from tests/data/iapws97_heater.csv. Our water is the NASA
    // ideal-gas polynomial plus the IF97 departure from the ideal gas (Regions 1 and 2), so
    // the duty differs from IF97 only by the NASA ideal-gas enthalpy change less IF97's own
    // ideal-gas part, and by the molar mass (18.015 g/mol of the species data converting the
    // kg/h, 18.015268 of IAPWS: +1.5e-5). Measured deviations of the duty: -1.8e-5 (boiler feed
    // water 150 -> 400 degC at 30 bar), +2.9e-5 (25 -> 450 degC, 40 bar), +2.1e-6 (105 ->
    // 250 degC, 5 bar), +2.0e-4 (30 -> 150 degC at 30 bar, liquid only), -9.5e-6 (steam
    // 300 -> 100 degC at 20 bar, condensing cooler). Checked at 1e-4, the liquid-only case
    // at 5e-4 (before IF97 Regions 1 and 2: +0.48 %, +1.73 %, +0.09 %, +7.4 %, +1.58 %).
    let rows = table("iapws97_heater.csv");
    assert_eq!(rows.len(), 5);
    for row in &rows {
        let case = cell(row, "case");
        let p_bar = number(row, "pressure_MPa") * 10.0;
        let (t_in, t_out) = (number(row, "t_in_K"), number(row, "t_out_K"));
        let kind = if t_out > t_in { "heater" } else { "cooler" };
        let text = format!(
            "feeds:\n  water:\n    temperature: {}\n    pressure: {p_bar} bar\n    \
             flows: {{H2O: 1000 kg/h}}\nunits:\n  - name: hx\n    type: {kind}\n    \
             from: water\n    to: out\n    outlet-temperature: {}\n",
            kelvin(t_in),
            kelvin(t_out)
        );
        let v = solve_json(&text);
        let streams = &v["streams"];
        assert_eq!(
            streams["water"]["phase"],
            cell(row, "phase_in"),
            "{case}: inlet"
        );
        assert_eq!(
            streams["out"]["phase"],
            cell(row, "phase_out"),
            "{case}: outlet"
        );
        let flow_kg_h = f(&streams["water"]["flow_kmol_h"]["H2O"]) * WATER_KG_PER_KMOL;
        assert!(
            (flow_kg_h - 1000.0).abs() < 1e-6,
            "{case}: {flow_kg_h} kg/h"
        );
        // kW per (kg/h) -> kJ/kg: x 3600 / (kg/h).
        let duty_kj_kg = f(&v["units"]["hx"]["duty_kW"]) * 3600.0 / flow_kg_h;
        let reference = number(row, "dh_kJ_kg");
        let deviation = (duty_kj_kg - reference) / reference;
        let tolerance = match case {
            // Liquid heated as liquid: the 0.1 kJ/kg between the NASA and IF97 ideal-gas
            // enthalpy changes over 30 -> 150 degC weighs more against 505 kJ/kg.
            "bfw-preheat-stays-liquid" => 5e-4,
            _ => 1e-4,
        };
        assert!(
            deviation.abs() <= tolerance,
            "{case}: duty {duty_kj_kg:.2} kJ/kg vs IAPWS-IF97 {reference:.2} kJ/kg \
             ({deviation:+.2e}, at most {tolerance:.0e} allowed)"
        );
    }
}

#[test]
fn spray_water_into_superheated_steam_matches_iapws_if97() {
    // Desuperheater: IAPWS-IF97 T(p, h) of the adiabatic mix, tests/data/iapws97_desuperheater.csv.
    // Measured: +0.025 K (3 MPa) and +0.029 K (4 MPa), the NASA ideal-gas part against IF97's
    // own; checked at 0.05 K. (With the ideal-gas steam heat capacity instead of IF97 Region 2
    // the outlets were 12.4 K and 31 K low; with the spray water taken as steam, 81 K high.)
    for row in table("iapws97_desuperheater.csv") {
        let case = cell(&row, "case");
        let p_bar = number(&row, "pressure_MPa") * 10.0;
        let steam_kg_h = 10_000.0;
        let water_kg_h = steam_kg_h * number(&row, "water_per_steam_kg_kg");
        let text = format!(
            "feeds:\n  steam:\n    temperature: {}\n    pressure: {p_bar} bar\n    \
             flows: {{H2O: {steam_kg_h} kg/h}}\n  spray:\n    temperature: {}\n    \
             pressure: {p_bar} bar\n    flows: {{H2O: {water_kg_h} kg/h}}\nunits:\n  \
             - {{name: attemperator, type: mixer, from: [steam, spray], to: out}}\n",
            kelvin(number(&row, "t_steam_K")),
            kelvin(number(&row, "t_water_K")),
        );
        let v = solve_json(&text);
        assert_eq!(v["streams"]["spray"]["phase"], "liquid", "{case}");
        assert_eq!(v["streams"]["out"]["phase"], "vapour", "{case}");
        let t = f(&v["streams"]["out"]["temperature_K"]);
        let reference = number(&row, "t_out_K");
        let tolerance_k = 0.05;
        assert!(
            (t - reference).abs() <= tolerance_k,
            "{case}: outlet {t:.2} K vs IAPWS-IF97 {reference:.2} K (at most {tolerance_k} K off)"
        );
    }
}

#[test]
fn water_below_saturation_is_reported_liquid() {
    // IAPWS-IF97 Table 36 / eq. (31): T_s(3 MPa) = 507.008 K = 233.86 degC (PyPI iapws 1.5.5).
    let text =
        "feeds:\n  bfw: {temperature: 150 degC, pressure: 30 bar, flows: {H2O: 50 kmol/h}}\n  \
                steam: {temperature: 233.9 degC, pressure: 30 bar, flows: {H2O: 50 kmol/h}}\n  \
                near: {temperature: 233.5 degC, pressure: 30 bar, flows: {H2O: 50 kmol/h}}\n\
                units:\n  - {name: hx, type: heater, from: bfw, to: hot, \
                outlet-temperature: 160 degC}\n";
    let v = solve_json(text);
    assert_eq!(v["streams"]["bfw"]["phase"], "liquid");
    assert_eq!(v["streams"]["steam"]["phase"], "vapour");
    assert_eq!(v["streams"]["near"]["phase"], "liquid");
    // A heater that leaves water below saturation keeps it liquid.
    assert_eq!(v["streams"]["hot"]["phase"], "liquid");
    // A feed just below saturation (meant as saturated steam, rounded down?) is named.
    // IAPWS-IF97 eq. (31): T_s(3 MPa) = 233.858 degC (PyPI iapws 1.5.5).
    let list = v["warnings"].as_array().unwrap();
    let near: Vec<&serde_json::Value> = list
        .iter()
        .filter(|w| w["code"] == "feed-near-saturation")
        .collect();
    assert_eq!(near.len(), 1, "{list:?}");
    assert!(
        (f(&near[0]["limit"]) - 233.858).abs() < 1e-3,
        "{:?}",
        near[0]
    );
    assert!((f(&near[0]["value"]) - 233.5).abs() < 1e-9, "{:?}", near[0]);
    assert!(near[0]["message"].as_str().unwrap().contains("feed near"));
    // Liquid enthalpy carries the latent heat: IAPWS-IF97 h(507.05 K, 3 MPa, Region 2)
    // - h(506.65 K, 3 MPa, Region 1) = 1796.7325038774268 kJ/kg (PyPI iapws 1.5.5); the NASA
    // ideal-gas part over the 0.4 K differs a little from IF97's, checked at 0.5 kJ/kg.
    const IAPWS_DH: f64 = 1_796.732_503_877_426_8;
    let dh_kj_kg = (f(&v["streams"]["steam"]["enthalpy_kW"])
        - f(&v["streams"]["near"]["enthalpy_kW"]))
        * 3600.0
        / (50.0 * 18.015_268);
    assert!((dh_kj_kg - IAPWS_DH).abs() < 0.5, "{dh_kj_kg} kJ/kg");
    // The text table says liquid and gives no normal volume for it.
    let dir = tempfile::tempdir().unwrap();
    let path = write(dir.path(), "water.yaml", text);
    let out = syntrain(&["solve", &arg(&path)]);
    let table = stdout(&out);
    let phase_line = table
        .lines()
        .find(|l| l.trim_start().starts_with("phase"))
        .expect("phase row");
    assert_eq!(
        phase_line.split_whitespace().collect::<Vec<_>>(),
        ["phase", "liquid", "vapour", "liquid", "liquid"],
        "{table}"
    );
}

#[test]
fn a_gas_feed_below_its_dew_point_is_refused() {
    // 30 % water at 25 bar: partial pressure 7.5 bar, dew point 167.8 degC (IAPWS-IF97 eq. 31);
    // at 120 degC the saturation pressure is 1.99 bar (IAPWS-IF97 eq. 30), so it is partly liquid.
    let e = solve_error(
        "feeds:\n  wet-gas:\n    temperature: 120 degC\n    pressure: 25 bar\n    \
         flows: {H2: 70 kmol/h, H2O: 30 kmol/h}\nunits:\n  - {name: hx, type: heater, \
         from: wet-gas, to: hot, outlet-temperature: 200 degC}\n",
    );
    for part in [
        "feeds.wet-gas",
        "partly condensed",
        "dew point is 167.",
        "above its dew point",
        "knockout",
    ] {
        assert!(e.contains(part), "missing '{part}' in: {e}");
    }
    // Above the dew point the same gas is a vapour feed.
    let v = solve_json(
        "feeds:\n  wet-gas:\n    temperature: 180 degC\n    pressure: 25 bar\n    \
         flows: {H2: 70 kmol/h, H2O: 30 kmol/h}\nunits:\n  - {name: hx, type: heater, \
         from: wet-gas, to: hot, outlet-temperature: 200 degC}\n",
    );
    assert_eq!(v["streams"]["wet-gas"]["phase"], "vapour");
}

#[test]
fn liquid_water_mixed_into_gas_vaporises_or_is_refused() {
    // Enough hot gas: the water takes its latent heat from the gas and the mix is vapour.
    let base = "feeds:\n  gas: {temperature: 800 degC, pressure: P bar, \
                flows: {N2: 100 kmol/h}}\n  water: {temperature: 150 degC, pressure: P bar, \
                flows: {H2O: WATER kmol/h}}\nunits:\n  - {name: quench, type: mixer, \
                from: [gas, water], to: out}\n";
    let liquid = solve_json(&base.replace("WATER", "10").replace("P bar", "30 bar"));
    let s = &liquid["streams"];
    assert_eq!(s["water"]["phase"], "liquid");
    assert_eq!(s["out"]["phase"], "vapour");
    let h_in = f(&s["gas"]["enthalpy_kW"]) + f(&s["water"]["enthalpy_kW"]);
    assert!((f(&s["out"]["enthalpy_kW"]) - h_in).abs() < 1e-6 * h_in.abs());
    // The same mix at 2 bar, where water at 150 degC is steam (T_s(0.2 MPa) = 120.2 degC,
    // IAPWS-IF97 eq. 31): the mixes are ideal gases, so the two outlets differ by the water's
    // IAPWS-IF97 h(423.15 K, 0.2 MPa) - h(423.15 K, 3 MPa) = 2135.276295789112 kJ/kg (PyPI
    // iapws 1.5.5) x 18.015268 g/mol x 10 kmol/h = 106.854374 kW; measured 3e-14 relative,
    // checked at 1e-9.
    let vapour = solve_json(&base.replace("WATER", "10").replace("P bar", "2 bar"));
    assert_eq!(vapour["streams"]["water"]["phase"], "vapour");
    let dh = f(&vapour["streams"]["out"]["enthalpy_kW"]) - f(&s["out"]["enthalpy_kW"]);
    assert!((dh / 106.854_374_229_689 - 1.0).abs() < 1e-9, "{dh} kW");
    let dt = f(&vapour["streams"]["out"]["temperature_K"]) - f(&s["out"]["temperature_K"]);
    assert!(
        dt > 50.0,
        "the vaporising water cools the mix by only {dt} K"
    );
    // Too much water for the gas: the mix would fall below its dew point; refused, saying so.
    let e = solve_error(&base.replace("WATER", "100").replace("P bar", "30 bar"));
    for part in [
        "unit 'quench'",
        "below its water dew point",
        "cannot vaporise",
    ] {
        assert!(e.contains(part), "missing '{part}' in: {e}");
    }
}

#[test]
fn a_cooler_condenses_steam_but_refuses_a_wet_gas() {
    // Pure steam cooled below T_s(20 bar) = 212.38 degC (IAPWS-IF97 eq. 31) leaves as liquid.
    let v = solve_json(
        "feeds:\n  steam: {temperature: 300 degC, pressure: 20 bar, flows: {H2O: 10 kmol/h}}\n\
         units:\n  - {name: condenser, type: cooler, from: steam, to: water, \
         outlet-temperature: 150 degC}\n",
    );
    assert_eq!(v["streams"]["water"]["phase"], "liquid");
    // A process gas cooled below its dew point is not labelled vapour: the cooler refuses and
    // points to the knockout.
    let e = solve_error(
        "feeds:\n  gas: {temperature: 300 degC, pressure: 25 bar, \
         flows: {H2: 70 kmol/h, H2O: 30 kmol/h}}\nunits:\n  - {name: hx, type: cooler, \
         from: gas, to: cold, outlet-temperature: 60 degC}\n",
    );
    for part in ["unit 'hx'", "below its water dew point", "use a knockout"] {
        assert!(e.contains(part), "missing '{part}' in: {e}");
    }
}

#[test]
fn a_heater_duty_that_leaves_wet_steam_is_refused() {
    // 1 kmol/h of water at 150 degC, 30 bar: reaching saturated steam takes about
    // 10.5 kW (IAPWS-IF97: h'' (30 bar) 2803 - h(150 degC) 634 kJ/kg = 2169 kJ/kg x 18.015 kg/h);
    // 5 kW leaves it part boiled.
    let e = solve_error(
        "feeds:\n  bfw: {temperature: 150 degC, pressure: 30 bar, flows: {H2O: 1 kmol/h}}\n\
         units:\n  - {name: boiler, type: heater, from: bfw, to: steam, duty: 5 kW}\n",
    );
    for part in ["unit 'boiler'", "wet steam", "saturated steam"] {
        assert!(e.contains(part), "missing '{part}' in: {e}");
    }
    // A duty past saturated steam gives superheated steam.
    let v = solve_json(
        "feeds:\n  bfw: {temperature: 150 degC, pressure: 30 bar, flows: {H2O: 1 kmol/h}}\n\
         units:\n  - {name: boiler, type: heater, from: bfw, to: steam, duty: 12 kW}\n",
    );
    assert_eq!(v["streams"]["steam"]["phase"], "vapour");
    let t = f(&v["streams"]["steam"]["temperature_K"]);
    assert!(t > 507.0, "{t} K");
}

#[test]
fn liquid_water_into_a_reactor_is_refused_with_what_to_do() {
    let e = solve_error(
        "feeds:\n  bfw: {temperature: 150 degC, pressure: 30 bar, flows: {H2O: 10 kmol/h}}\n  \
         gas: {temperature: 400 degC, pressure: 30 bar, flows: {CO: 10 kmol/h, H2: 30 kmol/h}}\n\
         units:\n  - {name: hts, type: shift, from: bfw, to: out, catalyst: iron-chromium}\n",
    );
    assert!(
        e.contains("unit 'hts'") && e.contains("liquid water") && e.contains("heater"),
        "{e}"
    );
}

//! Tests of the exchanger: balances, each way of fixing the heat, the log-mean difference by
//! hand, crosses refused, and condensation against the knockout drum.

use super::*;
use crate::units::knockout::{Knockout, KnockoutSpec};
use crate::units::test_support::{assert_balances, db, fig, gas};

/// A reformed-gas-like hot stream (invented demo composition, mol/s) at 350 degC, 24 bar.
fn hot_gas(db: &SpeciesDb) -> Stream {
    gas(
        db,
        &[
            ("H2", 0.50),
            ("CO", 0.05),
            ("CO2", 0.08),
            ("CH4", 0.02),
            ("H2O", 0.35),
        ],
        623.15,
        24e5,
    )
}

/// Boiler-feed water, liquid, 105 degC and 40 bar (invented demo flow, mol/s).
fn feed_water(db: &SpeciesDb, n: f64) -> Stream {
    let mut s = gas(db, &[("H2O", n)], 378.15, 40e5);
    s.phase = StreamPhase::Liquid;
    s
}

fn unit(db: &SpeciesDb, target: ExchangerTarget, condensate: bool) -> Exchanger {
    let spec = ExchangerSpec {
        target,
        hot_pressure_drop_pa: 0.2e5,
        cold_pressure_drop_pa: 0.5e5,
        condensate_outlet: condensate,
    };
    Exchanger::new(db, "x", &spec).unwrap()
}

/// H_hot,in - H_hot,out and H_cold,out - H_cold,in of a result (condensate on the hot side).
fn sides(db: &SpeciesDb, hot: &Stream, cold: &Stream, r: &UnitResult) -> (f64, f64) {
    let h = |s: &Stream| s.enthalpy_w(db).unwrap();
    let hot_out = h(&r.outlets[0]) + r.outlets.get(2).map_or(0.0, h);
    (h(hot) - hot_out, h(&r.outlets[1]) - h(cold))
}

#[test]
fn heat_given_equals_heat_taken_for_each_spec() {
    let db = db();
    let (hot, cold) = (hot_gas(&db), feed_water(&db, 3.0));
    // Hot gas dew point near 172 degC at 23.8 bar: every case keeps the hot outlet above it.
    let targets = [
        ExchangerTarget::HotOutletTemperature(523.15),
        ExchangerTarget::ColdOutletTemperature(398.15),
        ExchangerTarget::Duty(3000.0),
        ExchangerTarget::MinimumApproach(80.0),
    ];
    for target in targets {
        let r = unit(&db, target, false)
            .solve(&db, &[&hot, &cold], None)
            .unwrap();
        assert_balances(&db, &[&hot, &cold], &r);
        assert_eq!(r.duty_w, 0.0);
        let (given, taken) = sides(&db, &hot, &cold, &r);
        let q = fig(&r, "heat-transferred");
        // Duty closure, 1e-9 relative (the requirement of the unit).
        assert!(
            (given - taken).abs() <= 1e-9 * q,
            "{target:?}: {given} vs {taken}"
        );
        assert!((given - q).abs() <= 1e-9 * q, "{target:?}");
        let (th, tc) = (r.outlets[0].temperature_k, r.outlets[1].temperature_k);
        assert_eq!(r.outlets[0].pressure_pa, 23.8e5);
        assert_eq!(r.outlets[1].pressure_pa, 39.5e5);
        assert_eq!(r.outlets[1].phase, StreamPhase::Liquid);
        assert!((fig(&r, "hot-end-difference") - (623.15 - tc)).abs() < 1e-12);
        assert!((fig(&r, "cold-end-difference") - (th - 378.15)).abs() < 1e-12);
        match target {
            ExchangerTarget::HotOutletTemperature(t) => assert_eq!(th, t),
            ExchangerTarget::ColdOutletTemperature(t) => assert_eq!(tc, t),
            ExchangerTarget::Duty(d) => assert!((q - d).abs() <= 1e-9 * d),
            ExchangerTarget::MinimumApproach(d) => {
                let smaller = fig(&r, "hot-end-difference").min(fig(&r, "cold-end-difference"));
                assert!((smaller - d).abs() < 1e-6, "{smaller}");
            }
        }
    }
}

#[test]
fn log_mean_difference_by_hand() {
    // (40 - 20) / ln(40 / 20) = 20 / 0.693147180559945 = 28.853900817779268 K (hand arithmetic).
    assert!((lmtd(40.0, 20.0) - 28.853_900_817_779_27).abs() < 1e-12);
    assert!((lmtd(20.0, 40.0) - 28.853_900_817_779_27).abs() < 1e-12);
    // Equal differences: the limit is the difference itself.
    assert_eq!(lmtd(25.0, 25.0), 25.0);
    // Nearly equal: 25.0001 and 25: (0.0001) / ln(1.000004) = 25.00004999996667 (hand
    // arithmetic, ln(1 + e) = e - e^2/2 + e^3/3 with e = 4e-6).
    assert!((lmtd(25.0001, 25.0) - 25.000_049_999_966_67).abs() < 1e-9);
    // The unit's figure is the log mean of its own terminal differences.
    let db = db();
    let (hot, cold) = (hot_gas(&db), feed_water(&db, 3.0));
    let r = unit(&db, ExchangerTarget::HotOutletTemperature(523.15), false)
        .solve(&db, &[&hot, &cold], None)
        .unwrap();
    let (a, b) = (
        fig(&r, "hot-end-difference"),
        fig(&r, "cold-end-difference"),
    );
    assert!((fig(&r, "lmtd") - (a - b) / (a / b).ln()).abs() < 1e-9);
}

#[test]
fn crosses_and_bad_specs_are_refused() {
    let db = db();
    let (hot, cold) = (hot_gas(&db), feed_water(&db, 20.0));
    // Hot outlet below the cold inlet (378.15 K).
    let e = unit(&db, ExchangerTarget::HotOutletTemperature(370.0), true)
        .solve(&db, &[&hot, &cold], None)
        .unwrap_err()
        .to_string();
    assert!(e.contains("unit 'x'") && e.contains("cross"), "{e}");
    // Cold outlet above the hot inlet (350 degC).
    let e = unit(&db, ExchangerTarget::ColdOutletTemperature(633.15), true)
        .solve(&db, &[&hot, &cold], None)
        .unwrap_err()
        .to_string();
    assert!(e.contains("cross") && e.contains("360.0 degC"), "{e}");
    // An approach as large as the difference of the inlets.
    let e = unit(&db, ExchangerTarget::MinimumApproach(245.0), true)
        .solve(&db, &[&hot, &cold], None)
        .unwrap_err()
        .to_string();
    assert!(e.contains("minimum approach"), "{e}");
    // Hot and cold swapped.
    let e = unit(&db, ExchangerTarget::Duty(100.0), true)
        .solve(&db, &[&cold, &hot], None)
        .unwrap_err()
        .to_string();
    assert!(e.contains("swap"), "{e}");
    let bad = ExchangerSpec {
        target: ExchangerTarget::Duty(-1.0),
        hot_pressure_drop_pa: 0.0,
        cold_pressure_drop_pa: 0.0,
        condensate_outlet: false,
    };
    assert!(Exchanger::new(&db, "x", &bad).is_err());
}

#[test]
fn a_duty_beyond_the_condensing_gas_is_refused_as_such() {
    // 1 mol/s of the hot gas can give at most about 27 kW down to 0 degC (about 33 J/(mol K)
    // over 350 K, plus 0.35 mol/s x 44 kJ/mol of latent heat: from memory, rounded); asking
    // 100 kW is refused by name, not as a temperature search that did not converge.
    let db = db();
    let (hot, cold) = (hot_gas(&db), feed_water(&db, 20.0));
    let e = unit(&db, ExchangerTarget::Duty(100e3), true)
        .solve(&db, &[&hot, &cold], None)
        .unwrap_err()
        .to_string();
    assert!(
        e.contains("cooled below") && e.contains("transfer less heat"),
        "{e}"
    );
}

#[test]
fn water_boiling_to_wet_steam_is_refused() {
    // Feed water at 40 bar heated by a duty that leaves it part boiled.
    let db = db();
    let hot = gas(&db, &[("N2", 20.0)], 1073.15, 10e5);
    let cold = feed_water(&db, 1.0);
    let h_liq = 1.0 * 25_000.0; // enough to pass saturated liquid, short of saturated steam
    let e = unit(&db, ExchangerTarget::Duty(h_liq), false)
        .solve(&db, &[&hot, &cold], None)
        .unwrap_err()
        .to_string();
    assert!(e.contains("wet steam") && e.contains("cold side"), "{e}");
}

#[test]
fn condensate_matches_the_knockout_and_carries_the_latent_heat() {
    let db = db();
    let w = db.index_of("H2O").unwrap();
    let hot = hot_gas(&db);
    // Cooling water at 30 degC, 5 bar (invented demo flow, mol/s).
    let mut cold = gas(&db, &[("H2O", 20.0)], 303.15, 5e5);
    cold.phase = StreamPhase::Liquid;
    let t = 323.15;
    let x = unit(&db, ExchangerTarget::HotOutletTemperature(t), true);
    let r = x.solve(&db, &[&hot, &cold], None).unwrap();
    assert_balances(&db, &[&hot, &cold], &r);
    let (given, taken) = sides(&db, &hot, &cold, &r);
    assert!((given - taken).abs() <= 1e-9 * given);
    // The knockout drum at the same temperature and outlet pressure.
    let ko = Knockout::new(
        &db,
        "ko",
        &KnockoutSpec {
            temperature_k: Some(t),
            pressure_drop_pa: 0.2e5,
        },
    )
    .unwrap();
    let k = ko.solve(&db, &[&hot], None).unwrap();
    let (ours, theirs) = (r.outlets[2].flows[w], k.outlets[1].flows[w]);
    assert!(ours > 0.3, "{ours}");
    assert!((ours - theirs).abs() <= 1e-9 * theirs, "{ours} vs {theirs}");
    assert_eq!(r.outlets[2].phase, StreamPhase::Liquid);
    let m = db.by_index(w).molar_mass_kg_per_mol;
    assert!((fig(&r, "condensed-water") - ours * m).abs() < 1e-15);
    assert!(fig(&r, "hot-dew-point") > t);
    // The heat given is the ideal-gas cooling plus the latent heat of what condenses.
    let ideal = crate::thermo::mixture::enthalpy(&db, &hot.flows, 623.15).unwrap()
        - crate::thermo::mixture::enthalpy(&db, &hot.flows, t).unwrap();
    let latent = (given - ideal) / ours;
    // IAPWS-IF97 saturation tables at 50 degC (from memory): h' = 209.34 kJ/kg,
    // h'' = 2591.3 kJ/kg, so h'' - h' = 2382.0 kJ/kg x 18.015268 g/mol = 42.91 kJ/mol.
    assert!((latent / 42_912.0 - 1.0).abs() < 2e-3, "{latent}");
    // Without `condensate-to` the same case is an error telling to add it.
    let e = unit(&db, ExchangerTarget::HotOutletTemperature(t), false)
        .solve(&db, &[&hot, &cold], None)
        .unwrap_err()
        .to_string();
    assert!(
        e.contains("condensate-to") && e.contains("dew point"),
        "{e}"
    );
}

#[test]
fn condensing_duty_and_approach_find_the_same_outlet() {
    // Given the duty the hot-outlet case transferred, the duty case finds that outlet again
    // (the search below the dew point), and the minimum-difference figure sees the inside.
    let db = db();
    let hot = hot_gas(&db);
    let mut cold = gas(&db, &[("H2O", 20.0)], 303.15, 5e5);
    cold.phase = StreamPhase::Liquid;
    let by_t = unit(&db, ExchangerTarget::HotOutletTemperature(333.15), true)
        .solve(&db, &[&hot, &cold], None)
        .unwrap();
    let q = fig(&by_t, "heat-transferred");
    let by_q = unit(&db, ExchangerTarget::Duty(q), true)
        .solve(&db, &[&hot, &cold], None)
        .unwrap();
    assert_balances(&db, &[&hot, &cold], &by_q);
    assert!((by_q.outlets[0].temperature_k - 333.15).abs() < 1e-6);
    let w = db.index_of("H2O").unwrap();
    assert!((by_q.outlets[2].flows[w] - by_t.outlets[2].flows[w]).abs() < 1e-9);
    assert!(fig(&by_q, "minimum-difference") <= fig(&by_q, "cold-end-difference"));
    // A gas saturated by a knockout at 60 degC (a hair above its dew point after the 0.2 bar
    // drop) cooled to 45 degC by a duty: its condensate is that of a knockout at 45 degC.
    let ko = |t: f64, inlet: &Stream| {
        let spec = KnockoutSpec {
            temperature_k: Some(t),
            pressure_drop_pa: 0.0,
        };
        Knockout::new(&db, "ko", &spec)
            .unwrap()
            .solve(&db, &[inlet], None)
            .unwrap()
    };
    let saturated = ko(333.15, &hot).outlets[0].clone();
    let by_t = unit(&db, ExchangerTarget::HotOutletTemperature(318.15), true)
        .solve(&db, &[&saturated, &cold], None)
        .unwrap();
    let q = fig(&by_t, "heat-transferred");
    let by_q = unit(&db, ExchangerTarget::Duty(q), true)
        .solve(&db, &[&saturated, &cold], None)
        .unwrap();
    assert!((by_q.outlets[0].temperature_k - 318.15).abs() < 1e-6);
    let drum = ko(
        318.15,
        &Stream {
            pressure_pa: saturated.pressure_pa - 0.2e5,
            ..saturated.clone()
        },
    );
    let (ours, theirs) = (by_q.outlets[2].flows[w], drum.outlets[1].flows[w]);
    assert!((ours - theirs).abs() <= 1e-6 * theirs, "{ours} vs {theirs}");
}

#[test]
fn condensing_steam_can_pinch_inside_and_gas_heats_gas() {
    let db = db();
    // Steam at 200 degC, 10 bar (T_s(1 MPa) = 453.035632 K, IAPWS-IF97 Table 35) heating
    // nitrogen from 30 degC (invented demo flows, mol/s).
    let steam = gas(&db, &[("H2O", 1.0)], 473.15, 10e5);
    let n2 = gas(&db, &[("N2", 10.0)], 303.15, 5e5);
    // 10 K at the ends leaves the cold gas at 190 degC, above the condensing steam at
    // 179.9 degC for part of the length: a cross inside, refused.
    let e = unit(&db, ExchangerTarget::MinimumApproach(10.0), false)
        .solve(&db, &[&steam, &n2], None)
        .unwrap_err()
        .to_string();
    assert!(e.contains("inside"), "{e}");
    // Condensed and subcooled to 150 degC, liquid, with the cold side's heat closing the
    // balance (and the cold outlet below the condensing steam).
    let n2 = gas(&db, &[("N2", 30.0)], 303.15, 5e5);
    let r = unit(&db, ExchangerTarget::HotOutletTemperature(423.15), false)
        .solve(&db, &[&steam, &n2], None)
        .unwrap();
    assert_balances(&db, &[&steam, &n2], &r);
    assert_eq!(r.outlets[0].phase, StreamPhase::Liquid);
    let (given, taken) = sides(&db, &steam, &n2, &r);
    assert!((given - taken).abs() <= 1e-9 * given);
    // The smallest difference lies inside, at the start of condensation (453.04 K on the hot
    // side), below both ends.
    let inside = fig(&r, "minimum-difference");
    assert!(inside < fig(&r, "hot-end-difference") && inside < fig(&r, "cold-end-difference"));
    assert!(inside > 0.0);
    // Condensing only part way down is wet steam, refused.
    let q_wet = 0.1 * given;
    let e = unit(&db, ExchangerTarget::Duty(q_wet), false)
        .solve(&db, &[&steam, &n2], None)
        .unwrap_err()
        .to_string();
    assert!(e.contains("wet steam") && e.contains("hot side"), "{e}");
    // Gas against gas by minimum approach: no phase change, the ends set.
    let hot = hot_gas(&db);
    let cold = gas(&db, &[("CH4", 0.3), ("H2", 0.02)], 303.15, 30e5);
    let r = unit(&db, ExchangerTarget::MinimumApproach(25.0), false)
        .solve(&db, &[&hot, &cold], None)
        .unwrap();
    assert_balances(&db, &[&hot, &cold], &r);
    let smaller = fig(&r, "hot-end-difference").min(fig(&r, "cold-end-difference"));
    assert!((smaller - 25.0).abs() < 1e-6, "{smaller}");
}

//! Tests of the furnace: the textbook flue gas of methane, a tail gas with make-up fuel (element
//! and energy balances), and the errors of a demand the fuels cannot meet.

use super::*;
use crate::units::test_support::{assert_balances, db, fig, gas};

fn spec(excess: f64, loss: f64) -> FurnaceSpec {
    FurnaceSpec {
        bridgewall_temperature_k: 1283.15,
        excess_air: excess,
        heat_loss_fraction: loss,
        pressure_drop_pa: 0.0,
        air_inlet: (1, "air".into()),
        make_up_inlet: (0, "fuel".into()),
    }
}

/// The inlets as the flowsheet leaves them: each feed the furnace set rescaled to its flow.
fn rescaled(inlets: &[&Stream], r: &UnitResult) -> Vec<Stream> {
    let mut v: Vec<Stream> = inlets.iter().map(|s| (*s).clone()).collect();
    for &(k, flow) in &r.inlet_flows {
        let scale = flow / v[k].total();
        v[k].flows.iter_mut().for_each(|n| *n *= scale);
    }
    v
}

#[test]
fn methane_with_ten_percent_excess_air_gives_the_textbook_flue_gas() {
    let db = db();
    let fuel = gas(&db, &[("CH4", 1.0)], 298.15, 1.5e5);
    // Air as 79 % N2 and 21 % O2 (common practice, argon counted as nitrogen).
    let air = gas(&db, &[("N2", 0.79), ("O2", 0.21)], 298.15, 1.05e5);
    let f = Furnace::new(&db, "f", &spec(0.10, 0.0)).unwrap();
    let r = f.solve_for(&db, &[&fuel, &air], 2.0e6).unwrap();
    // Atom balance per mol CH4 (CH4 + 2 O2 -> CO2 + 2 H2O) with 10 % excess O2:
    // O2 supplied 2.2, left 0.2; N2 with it 2.2 x 79/21; CO2 1; H2O 2.
    // Total 1 + 2 + 0.2 + 2.2 x 79/21 = 11.476190476...
    let n2 = 2.2 * 79.0 / 21.0;
    let total = 1.0 + 2.0 + 0.2 + n2;
    let expect = [
        ("flue-co2-wet", 1.0 / total),
        ("flue-h2o-wet", 2.0 / total),
        ("flue-o2-wet", 0.2 / total),
        ("flue-n2-wet", n2 / total),
        ("flue-o2-dry", 0.2 / (total - 2.0)),
    ];
    for (key, y) in expect {
        assert!(
            (fig(&r, key) - y).abs() < 1e-12,
            "{key}: {} vs {y}",
            fig(&r, key)
        );
    }
    // Air per mol CH4: 2.2 / 0.21.
    let x = fig(&r, "make-up-fuel-flow");
    assert!((fig(&r, "air-flow") / x - 2.2 / 0.21).abs() < 1e-12);
    let inlets = rescaled(&[&fuel, &air], &r);
    let refs: Vec<&Stream> = inlets.iter().collect();
    assert_balances(&db, &refs, &r);
    // Without a casing loss the heat to the reformer is -duty, and the make-up follows it.
    assert!((r.duty_w + 2.0e6).abs() < 1e-9 * 2.0e6);
    // Fired duty = x LHV(CH4); NIST-JANAF LHV 802.301 kJ/mol (see combustion.rs).
    assert!((fig(&r, "fired-duty") / x / 1e3 - 802.301).abs() < 0.1);
    assert!((fig(&r, "radiant-efficiency") - 2.0e6 / fig(&r, "fired-duty")).abs() < 1e-15);
    // A radiant box at a 1010 degC bridgewall with cold air passes about 45-50 % of the LHV
    // to the tubes (common practice, without air preheat).
    let eta = fig(&r, "radiant-efficiency");
    assert!((0.40..0.55).contains(&eta), "{eta}");
}

#[test]
fn tail_gas_with_make_up_closes_its_balances() {
    let db = db();
    // Invented demo compositions, mol/s: a purifier tail gas, natural gas, humid air with argon.
    let tail = gas(
        &db,
        &[
            ("H2", 60.0),
            ("CO", 25.0),
            ("CO2", 110.0),
            ("CH4", 30.0),
            ("N2", 3.0),
            ("H2O", 1.5),
        ],
        303.15,
        1.3e5,
    );
    let ng = gas(
        &db,
        &[("CH4", 0.93), ("C2H6", 0.04), ("C3H8", 0.01), ("N2", 0.02)],
        288.15,
        4.0e5,
    );
    let air = gas(
        &db,
        &[
            ("N2", 0.7720),
            ("O2", 0.2071),
            ("Ar", 0.0092),
            ("H2O", 0.0117),
        ],
        523.15,
        1.05e5,
    );
    let mut s = spec(0.10, DEFAULT_HEAT_LOSS);
    s.air_inlet = (2, "air".into());
    s.make_up_inlet = (1, "ng".into());
    let f = Furnace::new(&db, "f", &s).unwrap();
    let q = 80.0e6;
    let inlets = [&tail, &ng, &air];
    let r = f.solve_for(&db, &inlets, q).unwrap();
    let scaled = rescaled(&inlets, &r);
    let refs: Vec<&Stream> = scaled.iter().collect();
    // Element balance 1e-12, energy 1e-9 (test_support).
    assert_balances(&db, &refs, &r);
    // H_in - H_flue = Q + L exactly as asked.
    let fired = fig(&r, "fired-duty");
    let loss = DEFAULT_HEAT_LOSS * fired;
    assert!((-r.duty_w - (q + loss)).abs() < 1e-9 * q, "{}", r.duty_w);
    assert!((fig(&r, "heat-loss") - loss).abs() < 1e-9 * loss);
    // Fired duty is the LHV of tail gas and make-up fuel.
    let c = Combustion::new(&db).unwrap();
    let lhv = c.lhv_w(&scaled[0].flows) + c.lhv_w(&scaled[1].flows);
    assert!((fired - lhv).abs() < 1e-9 * lhv);
    // Oxygen left is the excess on the stoichiometric oxygen of both fuels (by atoms).
    let flue = &r.outlets[0].flows;
    let mut products = vec![0.0; db.len()];
    let stoich = c
        .burn_into(&db, &scaled[0].flows, 1.0, &mut products)
        .unwrap()
        + c.burn_into(&db, &scaled[1].flows, 1.0, &mut products)
            .unwrap();
    let o2 = flue[db.index_of("O2").unwrap()];
    assert!((o2 - 0.10 * stoich).abs() < 1e-12 * stoich);
    assert!(r.outlets[0].temperature_k == 1283.15);
    assert_eq!(r.inlet_flows.len(), 2);
}

#[test]
fn a_demand_the_fuels_cannot_meet_is_an_error_saying_by_how_much() {
    let db = db();
    let tail = gas(
        &db,
        &[("H2", 60.0), ("CO2", 100.0), ("CH4", 30.0)],
        303.15,
        1.3e5,
    );
    let ng = gas(&db, &[("CH4", 1.0)], 288.15, 4.0e5);
    let air = gas(&db, &[("N2", 0.79), ("O2", 0.21)], 298.15, 1.05e5);
    let mut s = spec(0.10, 0.0);
    s.air_inlet = (2, "air".into());
    s.make_up_inlet = (1, "ng".into());
    let f = Furnace::new(&db, "f", &s).unwrap();
    // The tail gas alone gives about 11 MW at this bridgewall; 1 MW asked.
    let e = f
        .solve_for(&db, &[&tail, &ng, &air], 1.0e6)
        .unwrap_err()
        .to_string();
    assert!(e.contains("kW more than the 1000.0 kW"), "{e}");
    // A make-up "fuel" of nitrogen brings no heat: the demand cannot be met.
    let n2 = gas(&db, &[("N2", 1.0)], 288.15, 4.0e5);
    let e = f
        .solve_for(&db, &[&tail, &n2, &air], 50.0e6)
        .unwrap_err()
        .to_string();
    assert!(
        e.contains("brings no net heat") && e.contains("short by"),
        "{e}"
    );
    // Air without oxygen.
    let bad = gas(&db, &[("N2", 1.0)], 298.15, 1.05e5);
    assert!(f.solve_for(&db, &[&tail, &ng, &bad], 50.0e6).is_err());
    // Numbers out of range.
    assert!(Furnace::new(&db, "f", &spec(-0.1, 0.0)).is_err());
    assert!(Furnace::new(&db, "f", &spec(0.1, 1.0)).is_err());
}

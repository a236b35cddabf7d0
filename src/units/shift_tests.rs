//! Tests of the shift converter on a reformed gas (reformer at 865 degC, S/C 3, 28 bar).

use super::*;
use crate::units::reformer::{Reformer, ReformerSpec};
use crate::units::test_support::{assert_balances, db, fig, gas, reformer_feed};

/// The reformer outlet of the reformer test, cooled to `t_k`.
fn reformed_gas(db: &SpeciesDb, t_k: f64) -> Stream {
    let feed = reformer_feed(db, 893.15, 28e5);
    let spec = ReformerSpec {
        outlet_temperature_k: 1138.15,
        pressure_drop_pa: 2.0e5,
        approaches: Vec::new(),
        limits: Default::default(),
        gas_model: None,
    };
    let r = Reformer::new(db, "primary", &spec)
        .unwrap()
        .solve(db, &[&feed], None)
        .unwrap();
    let mut s = r.outlets[0].clone();
    s.temperature_k = t_k;
    s
}

fn shift(db: &SpeciesDb, catalyst: Option<ShiftCatalyst>, approach: f64) -> Shift {
    let spec = ShiftSpec {
        outlet_temperature_k: None,
        pressure_drop_pa: 0.5e5,
        approaches: vec![("shift".into(), approach)],
        catalyst,
        limits: Default::default(),
        gas_model: None,
    };
    Shift::new(db, "hts", &spec).unwrap()
}

#[test]
fn hts_from_350_degc_exits_at_400_to_450_degc() {
    // Common practice: HTS inlet 320-380 degC, exit 400-450 degC on a reformed gas.
    let db = db();
    let inlet = reformed_gas(&db, 623.15);
    let r = shift(&db, Some(ShiftCatalyst::IronChromium), 0.0)
        .solve(&db, &[&inlet], None)
        .unwrap();
    assert_balances(&db, &[&inlet], &r);
    let t_out = r.outlets[0].temperature_k;
    assert!((673.15..723.15).contains(&t_out), "HTS exit {t_out} K");
    assert!(fig(&r, "temperature-rise") > 0.0 && fig(&r, "co-conversion") > 0.5);
    // Methane passes inert.
    let ch4 = db.index_of("CH4").unwrap();
    assert_eq!(r.outlets[0].flows[ch4], inlet.flows[ch4]);
    assert!(r.warnings.is_empty(), "{:?}", r.warnings);
    assert!(fig(&r, "inlet-dew-point-margin") > 100.0);
}

#[test]
fn lts_from_200_degc_leaves_0_1_to_0_5_percent_co_dry() {
    // Common practice: LTS inlet 190-220 degC, CO slip 0.1-0.4 % dry (0.1-0.5 % accepted here).
    let db = db();
    let inlet = reformed_gas(&db, 623.15);
    let hts = shift(&db, Some(ShiftCatalyst::IronChromium), 0.0)
        .solve(&db, &[&inlet], None)
        .unwrap();
    let mut lts_in = hts.outlets[0].clone();
    lts_in.temperature_k = 473.15;
    let lts = shift(&db, Some(ShiftCatalyst::LowTemperatureCopper), 0.0);
    let r = lts.solve(&db, &[&lts_in], None).unwrap();
    assert_balances(&db, &[&lts_in], &r);
    let slip = fig(&r, "co-slip-dry");
    assert!((0.001..0.005).contains(&slip), "LTS CO slip {slip}");
    let t_out = r.outlets[0].temperature_k;
    assert!(t_out < COPPER_MAX_K, "LTS exit {t_out} K");
    assert!(fig(&r, "inlet-dew-point-margin") > crate::units::limits::DEW_POINT_MARGIN_K);
    assert!(r.warnings.is_empty(), "{:?}", r.warnings);
    // A positive approach leaves more CO; a warm start gives the same answer.
    let apart = shift(&db, Some(ShiftCatalyst::LowTemperatureCopper), 10.0);
    let r10 = apart.solve(&db, &[&lts_in], None).unwrap();
    assert!(fig(&r10, "co-slip-dry") > slip);
    let g = r10.equilibrium.as_ref().unwrap().extents.clone();
    let again = apart.solve(&db, &[&lts_in], Some(&g)).unwrap();
    assert!((again.outlets[0].temperature_k - r10.outlets[0].temperature_k).abs() < 1e-8);
}

#[test]
fn catalyst_cautions_and_fixed_outlet_temperature() {
    let db = db();
    // Copper catalyst fed a hot gas: the outlet limit warns.
    let inlet = reformed_gas(&db, 623.15);
    let r = shift(&db, Some(ShiftCatalyst::LowTemperatureCopper), 0.0)
        .solve(&db, &[&inlet], None)
        .unwrap();
    assert!(
        r.warnings
            .iter()
            .any(|w| w.code == "catalyst-temperature" && w.limit == Some(COPPER_MAX_K)),
        "{:?}",
        r.warnings
    );
    // No catalyst given: inferred from the inlet temperature, and said so.
    let r = shift(&db, None, 0.0).solve(&db, &[&inlet], None).unwrap();
    assert!(
        r.warnings[0].code == "catalyst-assumed"
            && r.warnings[0].subject.as_deref() == Some("iron-chromium"),
        "{:?}",
        r.warnings
    );
    // A copper bed fed close to the dew point warns.
    let wet = gas(
        &db,
        &[("CO", 0.03), ("H2", 0.5), ("H2O", 0.4), ("CO2", 0.07)],
        460.0,
        28e5,
    );
    let r = shift(&db, Some(ShiftCatalyst::LowTemperatureCopper), 0.0)
        .solve(&db, &[&wet], None)
        .unwrap();
    let margin = fig(&r, "inlet-dew-point-margin");
    assert!(margin > 0.0 && margin < 20.0, "{margin}");
    assert!(
        r.warnings
            .iter()
            .any(|w| w.code == "dew-point"
                && w.limit == Some(crate::units::limits::DEW_POINT_MARGIN_K)),
        "{:?}",
        r.warnings
    );
    // Cooled (isothermal) converter: duty negative, balances closed.
    let spec = ShiftSpec {
        outlet_temperature_k: Some(623.15),
        pressure_drop_pa: 0.0,
        approaches: Vec::new(),
        catalyst: Some(ShiftCatalyst::IronChromium),
        limits: Default::default(),
        gas_model: None,
    };
    let r = Shift::new(&db, "iso", &spec)
        .unwrap()
        .solve(&db, &[&inlet], None)
        .unwrap();
    assert_balances(&db, &[&inlet], &r);
    assert!(r.duty_w < 0.0);
    assert!(Shift::new(
        &db,
        "x",
        &ShiftSpec {
            approaches: vec![("reforming".into(), 5.0)],
            ..ShiftSpec::default()
        }
    )
    .is_err());
}

#[test]
fn reverse_shift_runs_backward_with_the_approach_sign_of_its_direction() {
    // CO2-rich hydrogen at 450 degC: the shift runs backward (endothermic direction), so its
    // 8 K approach puts K at T - 8 K (the approach convention of the README).
    let db = db();
    let unit = shift(&db, Some(ShiftCatalyst::IronChromium), 8.0);
    let inlet = gas(
        &db,
        &[("CO2", 0.3), ("H2", 0.6), ("H2O", 0.05), ("CO", 0.01)],
        723.15,
        20e5,
    );
    let r = unit.solve(&db, &[&inlet], None).unwrap();
    assert_balances(&db, &[&inlet], &r);
    let e = r.equilibrium.as_ref().unwrap();
    assert!(e.extents[0] < 0.0);
    assert_eq!(e.approach_signs, vec![1.0]);
    assert!((e.equilibrium_temperatures_k[0] - (e.outlet_temperature_k - 8.0)).abs() < 1e-9);
    assert!(e.outlet_temperature_k < inlet.temperature_k);
}

//! Warm solves of the units without an equilibrium stage make no heap allocation.
//!
//! The check: a global allocator that counts every `alloc` and `realloc` of the thread that
//! makes it (so tests running beside each other do not disturb the count) wraps the system
//! allocator; each unit (mixer, heater, cooler, knockout, purifier, splitter, exchanger,
//! separator, boiler) is solved through `UnitKind::solve_into` into one result and one scratch,
//! first on other inlets (so that stale contents would show), then twice on a realistic inlet,
//! and the second of these must count zero allocations. Each warm result must also equal, value for value, a fresh `UnitKind::solve` of
//! the same inlet, so that reused buffers cannot hide a wrong answer. This is a property of the
//! code, with no outside reference; the inlets are invented demo compositions near those of
//! flowsheets/demo-train.yaml (flows in mol/s).

mod common;

use syntrain::thermo::SpeciesDb;
use syntrain::units::unit::UnitScratch;
use syntrain::units::{
    Cooler, Heater, Knockout, KnockoutSpec, Mixer, MixerSpec, Purifier, PurifierProduct,
    PurifierSpec, Split, Splitter, SplitterSpec, Stream, StreamPhase, Thermal, ThermalKind,
    ThermalSpec, ThermalTarget, UnitKind, UnitResult,
};

#[global_allocator]
static GLOBAL: common::alloc::Counting = common::alloc::Counting;

fn db() -> SpeciesDb {
    SpeciesDb::embedded().unwrap()
}

/// A stream from (species, mol/s) pairs.
fn stream(
    db: &SpeciesDb,
    pairs: &[(&str, f64)],
    t_k: f64,
    p_pa: f64,
    phase: StreamPhase,
) -> Stream {
    let mut flows = vec![0.0; db.len()];
    for (name, n) in pairs {
        flows[db.index_of(name).unwrap()] += *n;
    }
    Stream {
        flows,
        temperature_k: t_k,
        pressure_pa: p_pa,
        phase,
    }
}

fn gas(db: &SpeciesDb, pairs: &[(&str, f64)], t_k: f64, p_pa: f64) -> Stream {
    stream(db, pairs, t_k, p_pa, StreamPhase::Vapour)
}

/// Mixed feed after the feed mixer: natural gas and steam at S/C 3.0 (demo train).
fn mixed_feed(db: &SpeciesDb) -> Stream {
    gas(
        db,
        &[
            ("CH4", 259.72),
            ("C2H6", 9.72),
            ("C3H8", 2.78),
            ("CO2", 2.78),
            ("N2", 2.78),
            ("H2O", 862.5),
        ],
        663.0,
        30e5,
    )
}

/// Reformer outlet at 865 degC (demo-train-like composition).
fn reformed_gas(db: &SpeciesDb) -> Stream {
    gas(
        db,
        &[
            ("H2", 700.0),
            ("CO", 150.0),
            ("CO2", 80.0),
            ("CH4", 40.0),
            ("N2", 2.78),
            ("H2O", 500.0),
        ],
        1138.15,
        26.3e5,
    )
}

/// Low-temperature shift outlet cooled to 170 degC (demo-train-like composition).
fn knockout_feed(db: &SpeciesDb) -> Stream {
    gas(
        db,
        &[
            ("H2", 840.0),
            ("CO", 3.0),
            ("CO2", 227.0),
            ("CH4", 40.0),
            ("N2", 2.78),
            ("H2O", 360.0),
        ],
        443.15,
        25.4e5,
    )
}

/// Raw hydrogen from the knockout drum at 40 degC (demo-train-like composition).
fn raw_hydrogen(db: &SpeciesDb) -> Stream {
    gas(
        db,
        &[
            ("H2", 840.0),
            ("CO", 3.0),
            ("CO2", 227.0),
            ("CH4", 40.0),
            ("N2", 2.78),
            ("H2O", 3.3),
        ],
        313.15,
        25.1e5,
    )
}

fn water(db: &SpeciesDb, t_k: f64, phase: StreamPhase) -> Stream {
    stream(db, &[("H2O", 40.0)], t_k, 30e5, phase)
}

/// The warm result equals a fresh solve, value for value.
fn assert_same(name: &str, warm: &UnitResult, fresh: &UnitResult) {
    assert_eq!(warm.outlets, fresh.outlets, "{name}: outlets");
    assert_eq!(
        warm.duty_w.to_bits(),
        fresh.duty_w.to_bits(),
        "{name}: duty"
    );
    assert_eq!(warm.approaches, fresh.approaches, "{name}: approaches");
    assert_eq!(warm.figures, fresh.figures, "{name}: figures");
    assert_eq!(warm.warnings, fresh.warnings, "{name}: warnings");
    assert!(
        warm.equilibrium.is_none() && fresh.equilibrium.is_none(),
        "{name}"
    );
}

/// Solve `unit` into one result and scratch: on each of `before` (other inlets), then twice on
/// `inlets`; the allocations the second of these made. Each warm result is checked against a
/// fresh solve.
fn warm_allocations<U: UnitKind>(
    db: &SpeciesDb,
    name: &str,
    unit: &U,
    before: &[&[&Stream]],
    inlets: &[&Stream],
) -> usize {
    let mut scratch = UnitScratch::default();
    let mut out = UnitResult::default();
    for other in before {
        unit.solve_into(db, other, None, &mut scratch, &mut out)
            .unwrap();
    }
    let fresh = unit.solve(db, inlets, None).unwrap();
    unit.solve_into(db, inlets, None, &mut scratch, &mut out)
        .unwrap();
    assert_same(name, &out, &fresh);
    let start = common::alloc::allocations();
    let solved = unit.solve_into(db, inlets, None, &mut scratch, &mut out);
    let made = common::alloc::allocations() - start;
    solved.unwrap();
    assert_same(name, &out, &fresh);
    made
}

fn thermal(target: ThermalTarget, drop_pa: f64) -> ThermalSpec {
    ThermalSpec {
        target,
        pressure_drop_pa: drop_pa,
    }
}

#[test]
fn the_counter_sees_allocations() {
    // The counter itself must bite: a new vector is one allocation on this thread.
    let start = common::alloc::allocations();
    let v = std::hint::black_box(vec![1.0_f64; 8]);
    assert_eq!(common::alloc::allocations() - start, 1);
    drop(v);
    // And a unit whose solve builds a new result counts: the trait's default `solve_into`
    // (here through a fresh `solve`) allocates the outlets.
    let db = db();
    let heater = Heater::new(
        &db,
        "preheater",
        &thermal(ThermalTarget::OutletTemperature(763.15), 0.3e5),
    )
    .unwrap();
    let feed = mixed_feed(&db);
    let start = common::alloc::allocations();
    let r = heater.solve(&db, &[&feed], None).unwrap();
    assert!(
        common::alloc::allocations() - start >= 2,
        "a fresh result has outlets and figures"
    );
    drop(r);
}

#[test]
fn heaters_and_coolers_solve_warm_without_allocating() {
    let db = db();
    let feed = mixed_feed(&db);
    let reformed = reformed_gas(&db);
    let bfw = water(&db, 423.15, StreamPhase::Liquid);
    let steam = water(&db, 600.0, StreamPhase::Vapour);
    let hydrogen = gas(&db, &[("H2", 500.0)], 313.15, 25e5);
    let hot_hydrogen = gas(&db, &[("H2", 500.0)], 700.0, 25e5);
    let build_heater = |target| Heater::new(&db, "preheater", &thermal(target, 0.3e5)).unwrap();
    let build_cooler = |target| Cooler::new(&db, "cooler", &thermal(target, 0.2e5)).unwrap();
    // Gas to 490 degC (demo train), after boiler-feed water (more figures, another phase).
    let to_490 = build_heater(ThermalTarget::OutletTemperature(763.15));
    let n = warm_allocations(&db, "heater to 490 degC", &to_490, &[&[&bfw]], &[&feed]);
    assert_eq!(n, 0, "heater by outlet temperature: {n} allocations");
    // Boiler-feed water to superheated steam (phase change), after a gas.
    let n = warm_allocations(&db, "water to steam", &to_490, &[&[&feed]], &[&bfw]);
    assert_eq!(n, 0, "heater, water to steam: {n} allocations");
    // Dry hydrogen: no water, so no dew point (the saturation range is not met).
    let n = warm_allocations(&db, "dry hydrogen", &to_490, &[&[&feed]], &[&hydrogen]);
    assert_eq!(n, 0, "heater on dry gas: {n} allocations");
    // By duty: the temperature search on a gas, and the liquid and steam sides of water.
    let by_duty = build_heater(ThermalTarget::Duty(8.0e6));
    let n = warm_allocations(&db, "heater by duty", &by_duty, &[], &[&feed]);
    assert_eq!(n, 0, "heater by duty on a gas: {n} allocations");
    let warm_water = build_heater(ThermalTarget::Duty(1.0e5));
    let n = warm_allocations(&db, "water by duty", &warm_water, &[], &[&bfw]);
    assert_eq!(n, 0, "heater by duty, water stays liquid: {n} allocations");
    let boil = build_heater(ThermalTarget::Duty(2.5e6));
    let n = warm_allocations(&db, "water boiled by duty", &boil, &[], &[&bfw]);
    assert_eq!(n, 0, "heater by duty, water to steam: {n} allocations");
    // Process-gas cooler to 350 degC (demo train), and steam condensed to water.
    let to_350 = build_cooler(ThermalTarget::OutletTemperature(623.15));
    let n = warm_allocations(&db, "cooler to 350 degC", &to_350, &[], &[&reformed]);
    assert_eq!(n, 0, "cooler by outlet temperature: {n} allocations");
    let condenser = build_cooler(ThermalTarget::OutletTemperature(400.0));
    let n = warm_allocations(
        &db,
        "steam condensed",
        &condenser,
        &[&[&hot_hydrogen]],
        &[&steam],
    );
    assert_eq!(n, 0, "cooler, steam to water: {n} allocations");
    let by_duty = build_cooler(ThermalTarget::Duty(-20.0e6));
    let n = warm_allocations(&db, "cooler by duty", &by_duty, &[], &[&reformed]);
    assert_eq!(n, 0, "cooler by duty: {n} allocations");
    // The plain type solves the same way.
    let t = Thermal::new(
        &db,
        "cooler",
        ThermalKind::Cooler,
        &thermal(ThermalTarget::OutletTemperature(623.15), 0.2e5),
    )
    .unwrap();
    let mut out = UnitResult::default();
    t.solve_into(&db, &[&reformed], &mut out).unwrap();
    let start = common::alloc::allocations();
    t.solve_into(&db, &[&reformed], &mut out).unwrap();
    assert_eq!(
        common::alloc::allocations() - start,
        0,
        "Thermal::solve_into"
    );
}

#[test]
fn knockout_purifier_splitter_and_mixer_solve_warm_without_allocating() {
    let db = db();
    let wet = knockout_feed(&db);
    let raw = raw_hydrogen(&db);
    // Knockout drum at 40 degC (demo train): water condenses; after a gas that keeps it all.
    let drum = Knockout::new(
        &db,
        "knockout",
        &KnockoutSpec {
            temperature_k: Some(313.15),
            pressure_drop_pa: 0.3e5,
        },
    )
    .unwrap();
    let n = warm_allocations(&db, "knockout", &drum, &[&[&raw]], &[&wet]);
    assert_eq!(n, 0, "knockout condensing: {n} allocations");
    let n = warm_allocations(
        &db,
        "knockout, nothing condenses",
        &drum,
        &[&[&wet]],
        &[&raw],
    );
    assert_eq!(n, 0, "knockout not condensing: {n} allocations");
    // Purifier at 88 % recovery and 99.9 % purity (demo train): the impurity shares by weight.
    let spec = |product| PurifierSpec {
        hydrogen_recovery: 0.88,
        product,
        pressure_drop_pa: 0.5e5,
        tail_gas_pressure_pa: 1.3e5,
        impurity_weights: Vec::new(),
    };
    let psa = Purifier::new(&db, "psa", &spec(PurifierProduct::Purity(0.999))).unwrap();
    let n = warm_allocations(&db, "purifier by purity", &psa, &[&[&wet]], &[&raw]);
    assert_eq!(n, 0, "purifier by purity: {n} allocations");
    let split = PurifierProduct::ImpuritySplit(vec![("N2".into(), 0.5), ("CH4".into(), 0.01)]);
    let psa = Purifier::new(&db, "psa", &spec(split)).unwrap();
    let n = warm_allocations(&db, "purifier by split", &psa, &[], &[&raw]);
    assert_eq!(n, 0, "purifier by impurity split: {n} allocations");
    // Splitters by fraction (one outlet takes the rest) and by flow, after a two-way split.
    let tee = |split| {
        Splitter::new(
            &db,
            "tee",
            &SplitterSpec {
                split,
                pressure_drop_pa: 0.1e5,
            },
        )
        .unwrap()
    };
    let three = tee(Split::Fractions(vec![Some(0.1), None, Some(0.3)]));
    let n = warm_allocations(&db, "splitter by fraction", &three, &[], &[&raw]);
    assert_eq!(n, 0, "splitter by fraction: {n} allocations");
    let by_flow = tee(Split::Flows(vec![Some(100.0), None]));
    let n = warm_allocations(&db, "splitter by flow", &by_flow, &[&[&wet]], &[&raw]);
    assert_eq!(n, 0, "splitter by flow: {n} allocations");
    // Mixer: natural gas and steam at S/C 3.0 (demo train).
    let ng = gas(
        &db,
        &[
            ("CH4", 259.72),
            ("C2H6", 9.72),
            ("C3H8", 2.78),
            ("CO2", 2.78),
            ("N2", 2.78),
        ],
        653.15,
        30e5,
    );
    let steam = gas(&db, &[("H2O", 862.5)], 673.15, 30e5);
    let mixer = Mixer::new(&db, "feed-mixer", &MixerSpec::default()).unwrap();
    let n = warm_allocations(&db, "mixer", &mixer, &[], &[&ng, &steam]);
    assert_eq!(n, 0, "mixer: {n} allocations");
}

/// Exchangers: gas/gas by cold outlet temperature and by minimum approach, and a wet process gas
/// condensing against cooling water (pure liquid water on the cold side, condensate outlet).
#[test]
fn exchangers_solve_warm_without_allocating() {
    use syntrain::units::{Exchanger, ExchangerSpec, ExchangerTarget};
    let db = db();
    let exchanger = |target, condensate_outlet| {
        Exchanger::new(
            &db,
            "exchanger",
            &ExchangerSpec {
                target,
                hot_pressure_drop_pa: 0.3e5,
                cold_pressure_drop_pa: 0.2e5,
                condensate_outlet,
            },
        )
        .unwrap()
    };
    // High-temperature shift outlet at 430 degC heating the natural gas from 40 degC.
    let mut hts_exit = reformed_gas(&db);
    hts_exit.temperature_k = 703.15;
    let natural_gas = gas(
        &db,
        &[
            ("CH4", 259.72),
            ("C2H6", 9.72),
            ("C3H8", 2.78),
            ("CO2", 2.78),
            ("N2", 2.78),
        ],
        313.15,
        32e5,
    );
    let wet = knockout_feed(&db);
    let cooling_water = stream(&db, &[("H2O", 5000.0)], 303.15, 5e5, StreamPhase::Liquid);
    let feed_preheat = exchanger(ExchangerTarget::ColdOutletTemperature(653.15), false);
    let n = warm_allocations(
        &db,
        "gas/gas by cold outlet",
        &feed_preheat,
        &[&[&reformed_gas(&db), &natural_gas]],
        &[&hts_exit, &natural_gas],
    );
    assert_eq!(n, 0, "exchanger gas/gas by cold outlet: {n} allocations");
    let pinch = exchanger(ExchangerTarget::MinimumApproach(25.0), false);
    let n = warm_allocations(
        &db,
        "gas/gas by minimum approach",
        &pinch,
        &[],
        &[&hts_exit, &natural_gas],
    );
    assert_eq!(
        n, 0,
        "exchanger gas/gas by minimum approach: {n} allocations"
    );
    // The LTS outlet at 170 degC cooled to 50 degC by cooling water: water condenses.
    let condenser = exchanger(ExchangerTarget::HotOutletTemperature(323.15), true);
    let n = warm_allocations(
        &db,
        "condensing",
        &condenser,
        &[&[&hts_exit, &cooling_water]],
        &[&wet, &cooling_water],
    );
    assert_eq!(n, 0, "exchanger condensing: {n} allocations");
    // The path under test condenses: liquid water leaves through the third outlet.
    let r = condenser.solve(&db, &[&wet, &cooling_water], None).unwrap();
    let h2o = db.index_of("H2O").unwrap();
    assert!(r.outlets[2].flows[h2o] > 100.0, "{:?}", r.outlets[2]);
    let by_duty = exchanger(ExchangerTarget::Duty(5.0e6), true);
    let n = warm_allocations(
        &db,
        "condensing by duty",
        &by_duty,
        &[&[&hts_exit, &cooling_water]],
        &[&wet, &cooling_water],
    );
    assert_eq!(n, 0, "exchanger condensing by duty: {n} allocations");
}

/// Separators: CO2 removal with its heat figure, and water taken out as liquid.
#[test]
fn separators_solve_warm_without_allocating() {
    use syntrain::units::{Separator, SeparatorSpec};
    let db = db();
    let separator = |removal: &[(&str, f64)]| {
        Separator::new(
            &db,
            "co2-removal",
            &SeparatorSpec {
                removal: removal.iter().map(|(s, f)| (s.to_string(), *f)).collect(),
                pressure_drop_pa: 0.3e5,
                duty_per_tonne_co2_j_per_kg: Some(2.5e6),
            },
        )
        .unwrap()
    };
    // Raw hydrogen at 50 degC: without its CO2 it stays above its water dew point.
    let mut raw = raw_hydrogen(&db);
    raw.temperature_k = 323.15;
    let wet = knockout_feed(&db);
    let co2_removal = separator(&[("CO2", 0.99)]);
    let n = warm_allocations(&db, "CO2 removal", &co2_removal, &[&[&wet]], &[&raw]);
    assert_eq!(n, 0, "separator, CO2 removal: {n} allocations");
    let dryer = separator(&[("H2O", 1.0)]);
    let n = warm_allocations(&db, "dryer", &dryer, &[&[&wet]], &[&raw]);
    assert_eq!(n, 0, "separator, water removed as liquid: {n} allocations");
    let r = dryer.solve(&db, &[&raw], None).unwrap();
    assert_eq!(r.outlets[1].phase, StreamPhase::Liquid);
}

/// Boilers: the steam side as a figure only, and with a feed-water inlet whose flow the boiler
/// sets (steam and blowdown as outlets).
#[test]
fn boilers_solve_warm_without_allocating() {
    use syntrain::units::boiler::{Boiler, BoilerSpec, GasOutlet};
    let db = db();
    let reformed = reformed_gas(&db);
    let mut hts_exit = reformed_gas(&db);
    hts_exit.temperature_k = 703.15;
    // Process-gas boiler after the reformer at 40 bar abs steam: gas to 20 K above saturation.
    let figure_only = Boiler::new(
        &db,
        "process-gas-boiler",
        &BoilerSpec {
            steam_pressure_pa: 40e5,
            steam_temperature_k: None,
            gas_outlet: GasOutlet::ApproachToSaturation(20.0),
            feed_water_temperature_k: Some(378.15),
            blowdown: 0.02,
            pressure_drop_pa: 0.2e5,
            outlet_count: 1,
        },
    )
    .unwrap();
    let n = warm_allocations(
        &db,
        "boiler, steam as a figure",
        &figure_only,
        &[&[&hts_exit]],
        &[&reformed],
    );
    assert_eq!(n, 0, "boiler, steam as a figure: {n} allocations");
    // With feed water at 105 degC and 45 bar abs, superheating to 400 degC.
    let feed_water = stream(&db, &[("H2O", 300.0)], 378.15, 45e5, StreamPhase::Liquid);
    let with_water = Boiler::new(
        &db,
        "process-gas-boiler",
        &BoilerSpec {
            steam_pressure_pa: 40e5,
            steam_temperature_k: Some(673.15),
            gas_outlet: GasOutlet::Temperature(623.15),
            feed_water_temperature_k: None,
            blowdown: 0.02,
            pressure_drop_pa: 0.2e5,
            outlet_count: 3,
        },
    )
    .unwrap();
    let n = warm_allocations(
        &db,
        "boiler with feed water",
        &with_water,
        &[&[&hts_exit, &feed_water]],
        &[&reformed, &feed_water],
    );
    assert_eq!(n, 0, "boiler with a feed-water inlet: {n} allocations");
    // The boiler sets the feed water's flow, and steam and blowdown leave as streams.
    let r = with_water
        .solve(&db, &[&reformed, &feed_water], None)
        .unwrap();
    assert_eq!(r.inlet_flows.len(), 1);
    assert!(r.outlets[1].total() > 0.0 && r.outlets[2].total() > 0.0);
}

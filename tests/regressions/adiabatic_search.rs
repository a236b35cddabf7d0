//! The temperature search of adiabatic and fixed-duty stages: a search that cycled between two
//! temperatures and blamed the species data range, a converged check that judged a stream of
//! near-zero enthalpy by another normalisation than the search, an approach sign taken from an
//! extent at round-off level, and an approach so large that the search bracket crossed (a
//! panic).

use crate::support;
use syntrain::equilibrium::{
    Direction, EnergyMode, EquilibriumStage, StageInlet, StageReaction, StageResult, Termination,
};
use syntrain::quantity::R_GAS;
use syntrain::reaction::Reaction;
use syntrain::thermo::{mixture, SpeciesDb};

fn db() -> SpeciesDb {
    SpeciesDb::embedded().unwrap()
}

fn flows(db: &SpeciesDb, pairs: &[(&str, f64)]) -> Vec<f64> {
    let mut v = vec![0.0; db.len()];
    for (name, n) in pairs {
        v[db.index_of(name).unwrap()] = *n;
    }
    v
}

fn stage(db: &SpeciesDb, reactions: &[(&str, f64)]) -> EquilibriumStage {
    EquilibriumStage::new(
        db,
        reactions
            .iter()
            .map(|(name, approach)| StageReaction {
                reaction: Reaction::named(db, name).unwrap(),
                approach_k: *approach,
                direction: Direction::Auto,
            })
            .collect(),
    )
    .unwrap()
}

fn solve(
    db: &SpeciesDb,
    st: &EquilibriumStage,
    gas: &[f64],
    temperature_k: f64,
    pressure_pa: f64,
    mode: EnergyMode,
) -> syntrain::error::Result<StageResult> {
    st.solve(
        db,
        StageInlet {
            flows: gas,
            temperature_k,
            pressure_pa,
        },
        mode,
        None,
    )
}

/// |H_out - H_in - duty| / (n_in R T_in) from the species data, apart from the stage.
fn energy_closure(db: &SpeciesDb, gas: &[f64], t_in: f64, r: &StageResult) -> f64 {
    let h_in = mixture::enthalpy(db, gas, t_in).unwrap();
    let h_out = mixture::enthalpy(db, &r.outlet_flows, r.outlet_temperature_k).unwrap();
    let total: f64 = gas.iter().sum();
    (h_out - h_in - r.duty_w).abs() / (total * R_GAS * t_in)
}

#[test]
fn hot_steam_rich_feed_finds_its_adiabatic_temperature_at_any_scale() {
    // Cantera 3.2.0 equilibrate('HP') on our own species data (tests/data/cantera_adiabatic.csv,
    // case 11, made by tools/cantera_equilibrium.py): 756.8228961369132 K. The search used to
    // cycle between about 448 K and 1058 K and report "no solution inside the species data
    // range".
    let db = db();
    let st = stage(&db, &[("reforming", 0.0), ("shift", 0.0)]);
    let base = flows(
        &db,
        &[
            ("CH4", 1.0),
            ("H2O", 4.993625800230868),
            ("CO2", 0.018121932251066505),
            ("H2", 0.047275141812904015),
            ("N2", 0.003677059969671648),
        ],
    );
    let (t_in, p) = (1058.680744646038, 175627.38526608754);
    for scale in [1e-3, 1.0, 3.7, 1e3] {
        let gas: Vec<f64> = base.iter().map(|v| v * scale).collect();
        let r = solve(&db, &st, &gas, t_in, p, EnergyMode::Adiabatic).unwrap();
        assert!(r.converged(), "scale {scale}: {r:?}");
        assert!(
            (r.outlet_temperature_k - 756.8228961369132).abs() < 1e-6,
            "scale {scale}: {} K",
            r.outlet_temperature_k
        );
        assert!(energy_closure(&db, &gas, t_in, &r) < 1e-9);
        let search = r.temperature_search.unwrap();
        assert_eq!(search.termination, Termination::Converged);
        assert!(search.iterations <= 20, "{search:?}");
    }
}

#[test]
fn a_stream_of_near_zero_enthalpy_is_judged_by_the_search_normalisation() {
    // A shift gas whose total enthalpy is zero at the inlet (hydrogen's sensible heat balances
    // the formation enthalpies of CO and steam). The energy balance is closed to 1e-9 of
    // n_in R T_in (checked from the species data); the converged flag used to divide by
    // max(|H_in|, |H_out|), near zero here, and reject the answer.
    let db = db();
    let st = stage(&db, &[("shift", 0.0)]);
    let t_in = 650.0;
    let mut gas = flows(
        &db,
        &[("CO", 0.05), ("H2O", 0.08), ("CO2", 0.01), ("H2", 1.0)],
    );
    // H2 flow that makes H_in = 0: H is linear in it.
    let h2 = db.index_of("H2").unwrap();
    let h0 = mixture::enthalpy(&db, &gas, t_in).unwrap();
    gas[h2] = 0.0;
    let h_rest = mixture::enthalpy(&db, &gas, t_in).unwrap();
    gas[h2] = -h_rest / (h0 - h_rest);
    let h_in = mixture::enthalpy(&db, &gas, t_in).unwrap();
    let total: f64 = gas.iter().sum();
    assert!(h_in.abs() < 1e-12 * total * R_GAS * t_in, "{h_in}");
    for mode in [EnergyMode::Adiabatic, EnergyMode::FixedDuty { duty_w: 0.0 }] {
        let r = solve(&db, &st, &gas, t_in, 25e5, mode).unwrap();
        assert!(r.converged(), "{mode:?}: {r:?}");
        assert!(r.energy_residual <= 1e-10);
        assert!(energy_closure(&db, &gas, t_in, &r) < 1e-9);
        // Common practice: the shift is exothermic, the outlet is hotter.
        assert!(r.outlet_temperature_k > t_in);
    }
}

#[test]
fn approach_signs_do_not_follow_round_off_at_any_scale() {
    // Gases already at reforming and shift equilibrium at their temperature (outlets of a
    // zero-approach stage, written to round-trip), fed to a stage with 10 K approaches at the
    // same temperature: both extents at zero approach are round-off, so the approach signs
    // must not depend on the feed's scale (they used to follow the sign of that round-off).
    // Reference: the scaled solutions agree (equilibrium is intensive, common practice).
    let db = db();
    let with_approach = stage(&db, &[("reforming", 10.0), ("shift", 10.0)]);
    let cases = [
        (
            1352.861701716151,
            381466.39018351416,
            flows(
                &db,
                &[
                    ("CH4", 7.575031699054336e-5),
                    ("H2O", 3.102871321998894),
                    ("H2", 3.2566491604176124),
                    ("CO", 0.9953044106032121),
                    ("CO2", 0.48077792753552434),
                    ("N2", 0.2668585682574767),
                ],
            ),
        ),
        (
            687.9913619084303,
            5468640.780950109,
            flows(
                &db,
                &[
                    ("CH4", 1.0454839359817438),
                    ("H2O", 3.7474797611986848),
                    ("H2", 0.16032775565776977),
                    ("CO", 0.0012000850109989173),
                    ("CO2", 0.2967795637362214),
                    ("N2", 8.593873285451992e-11),
                ],
            ),
        ),
    ];
    for (t, p, equilibrium) in &cases {
        let fixed = EnergyMode::FixedTemperature { temperature_k: *t };
        let mut reference: Option<StageResult> = None;
        for scale in [1.0, 1e-6, 1e-3, 1.0 / 3.6, 7.0, 1e3, 1e6] {
            let gas: Vec<f64> = equilibrium.iter().map(|v| v * scale).collect();
            let r = solve(&db, &with_approach, &gas, *t, *p, fixed).unwrap();
            assert!(r.converged());
            match &reference {
                None => reference = Some(r),
                Some(first) => {
                    assert_eq!(
                        r.approach_signs, first.approach_signs,
                        "{t} K, scale {scale}"
                    );
                    let (s0, s1): (f64, f64) =
                        (first.outlet_flows.iter().sum(), r.outlet_flows.iter().sum());
                    for (a, b) in r.outlet_flows.iter().zip(&first.outlet_flows) {
                        assert!((a / s1 - b / s0).abs() < 1e-12, "{t} K, scale {scale}");
                    }
                }
            }
        }
    }
}

#[test]
fn an_approach_wider_than_the_data_range_is_an_error_naming_it() {
    // The species data of these gases span 200-3000 K (data/species.yaml); an approach of
    // 3000 K leaves no outlet temperature whose equilibrium temperature is inside them.
    let db = db();
    let st = stage(&db, &[("shift", 3000.0)]);
    let gas = flows(
        &db,
        &[("CO", 0.13), ("H2O", 0.45), ("H2", 0.5), ("CO2", 0.06)],
    );
    for mode in [
        EnergyMode::Adiabatic,
        EnergyMode::FixedDuty { duty_w: -100.0 },
        EnergyMode::FixedTemperature {
            temperature_k: 700.0,
        },
    ] {
        let e = solve(&db, &st, &gas, 623.15, 25e5, mode)
            .unwrap_err()
            .to_string();
        assert!(e.contains("approach of shift"), "{e}");
        assert!(e.contains("3000 K"), "{e}");
        assert!(e.contains("200.00-3000.00 K"), "{e}");
    }
}

#[test]
fn an_approach_of_1500_k_gives_an_answer_or_an_error_naming_it() {
    // 1500 K used to panic in a clamp whose bounds crossed (the search range was the data
    // range narrowed by the approach on both sides). Shift runs in its exothermic direction
    // here, so T_eq = T + 1500 K (design convention) and outlets up to 1500 K are possible;
    // reforming runs endothermic, T_eq = T - 1500 K, so the outlet would have to be above
    // 1700 K, which the energy balance of this feed does not reach.
    let db = db();
    let gas = flows(
        &db,
        &[("CO", 0.13), ("H2O", 0.45), ("H2", 0.5), ("CO2", 0.06)],
    );
    let shift = stage(&db, &[("shift", 1500.0)]);
    let r = solve(&db, &shift, &gas, 623.15, 25e5, EnergyMode::Adiabatic).unwrap();
    assert!(r.converged());
    assert_eq!(r.approach_signs, vec![-1.0]);
    assert!((r.equilibrium_temperatures_k[0] - (r.outlet_temperature_k + 1500.0)).abs() < 1e-9);
    assert!(energy_closure(&db, &gas, 623.15, &r) < 1e-9);

    let reformer = stage(&db, &[("reforming", 1500.0), ("shift", 0.0)]);
    let feed = flows(&db, &[("CH4", 1.0), ("H2O", 3.0), ("H2", 0.05)]);
    let e = solve(&db, &reformer, &feed, 800.0, 25e5, EnergyMode::Adiabatic)
        .unwrap_err()
        .to_string();
    assert!(e.contains("reforming (approach 1500 K)"), "{e}");
    assert!(e.contains("200.00-3000.00 K"), "{e}");
}

fn wide_approach_flowsheet(dir: &std::path::Path, approach: &str) -> std::path::PathBuf {
    support::write(
        dir,
        "wide-approach.yaml",
        &format!(
            "title: wide approach (invented)\n\
             feeds:\n\
             \x20 gas:\n\
             \x20   temperature: 350 degC\n\
             \x20   pressure: 24.5 barg\n\
             \x20   total: 22414 Nm3/h\n\
             \x20   mole-fractions: {{H2: 0.479, CO: 0.0906, CO2: 0.0559, CH4: 0.0343, \
             H2O: 0.3384, N2: 0.0018}}\n\
             units:\n\
             \x20 - name: hts\n\
             \x20   type: shift\n\
             \x20   from: gas\n\
             \x20   to: out\n\
             \x20   catalyst: iron-chromium\n\
             \x20   approach: {{shift: {approach}}}\n"
        ),
    )
}

#[test]
fn wide_approaches_in_a_flowsheet_are_reported_not_a_panic() {
    // Through the command line: no panic for 1500 K; 3000 K is an error (exit code 1) naming
    // the approach.
    let dir = tempfile::tempdir().unwrap();
    let file = wide_approach_flowsheet(dir.path(), "1500 K");
    let out = support::syntrain(&["solve", &support::arg(&file)]);
    let err = support::stderr(&out);
    assert!(
        out.status.code() == Some(0) || err.contains("approach"),
        "{err}"
    );
    let file = wide_approach_flowsheet(dir.path(), "3000 K");
    let out = support::syntrain(&["solve", &support::arg(&file)]);
    let err = support::stderr(&out);
    assert_eq!(out.status.code(), Some(1), "{err}");
    assert!(
        err.contains("approach of shift") && err.contains("3000"),
        "{err}"
    );
}

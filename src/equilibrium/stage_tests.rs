//! Tests of the equilibrium stage on the project's species data.

use super::*;
use crate::thermo::mixture;

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

fn stage(db: &SpeciesDb, reactions: &[(&str, f64, Direction)]) -> EquilibriumStage {
    EquilibriumStage::new(
        db,
        reactions
            .iter()
            .map(|(name, approach, direction)| StageReaction {
                reaction: Reaction::named(db, name).unwrap(),
                approach_k: *approach,
                direction: *direction,
            })
            .collect(),
    )
    .unwrap()
}

fn element_balance_error(db: &SpeciesDb, a: &[f64], b: &[f64]) -> f64 {
    mixture::elements(db)
        .iter()
        .map(|e| {
            let x = mixture::element_amount(db, a, e);
            let y = mixture::element_amount(db, b, e);
            (x - y).abs() / x.abs().max(y.abs()).max(1e-300)
        })
        .fold(0.0, f64::max)
}

#[test]
fn reformer_at_fixed_temperature_closes_elements_and_energy() {
    let db = db();
    let st = stage(
        &db,
        &[
            ("reforming", 0.0, Direction::Forward),
            ("shift", 0.0, Direction::Auto),
        ],
    );
    let inlet = flows(
        &db,
        &[("CH4", 1.0), ("H2O", 3.0), ("N2", 0.02), ("CO2", 0.01)],
    );
    let r = st
        .solve(
            &db,
            StageInlet {
                flows: &inlet,
                temperature_k: 800.0,
                pressure_pa: 25e5,
            },
            EnergyMode::FixedTemperature {
                temperature_k: 1133.15,
            },
            None,
        )
        .unwrap();
    assert!(r.converged && r.max_residual() < 1e-9);
    assert!(element_balance_error(&db, &inlet, &r.outlet_flows) < 1e-12);
    let h_in = mixture::enthalpy(&db, &inlet, 800.0).unwrap();
    let h_out = mixture::enthalpy(&db, &r.outlet_flows, 1133.15).unwrap();
    assert!(((h_out - h_in) - r.duty_w).abs() < 1e-9 * h_in.abs());
    // Common practice: a reformer is strongly endothermic.
    assert!(r.duty_w > 0.0);
}

#[test]
fn approach_temperature_means_equilibrium_at_the_shifted_temperature() {
    // Design convention (../shared/design.md): a reformer at 860 degC with a 10 K methane
    // approach has the methane of equilibrium at 850 degC; a shift at 420 degC with 10 K has the
    // CO of equilibrium at 430 degC. Checked through the reaction quotients.
    let db = db();
    let st = stage(
        &db,
        &[
            ("reforming", 10.0, Direction::Forward),
            ("shift", 0.0, Direction::Auto),
        ],
    );
    let inlet = flows(&db, &[("CH4", 1.0), ("H2O", 3.0)]);
    let t = 1133.15;
    let p = 25e5;
    let r = st
        .solve(
            &db,
            StageInlet {
                flows: &inlet,
                temperature_k: 800.0,
                pressure_pa: p,
            },
            EnergyMode::FixedTemperature { temperature_k: t },
            None,
        )
        .unwrap();
    assert!((r.equilibrium_temperatures_k[0] - (t - 10.0)).abs() < 1e-12);
    assert_eq!(r.approach_signs[0], 1.0);
    let reforming = Reaction::named(&db, "reforming").unwrap();
    let total: f64 = r.outlet_flows.iter().sum();
    let ln_q: f64 = reforming
        .stoichiometry
        .iter()
        .map(|(i, nu)| nu * (r.outlet_flows[*i] / total * p / 1e5).ln())
        .sum();
    assert!((ln_q - reforming.ln_k(&db, t - 10.0).unwrap()).abs() < 1e-9);
    // With the approach the methane is higher than at full equilibrium.
    let st0 = stage(
        &db,
        &[
            ("reforming", 0.0, Direction::Forward),
            ("shift", 0.0, Direction::Auto),
        ],
    );
    let r0 = st0
        .solve(
            &db,
            StageInlet {
                flows: &inlet,
                temperature_k: 800.0,
                pressure_pa: p,
            },
            EnergyMode::FixedTemperature { temperature_k: t },
            None,
        )
        .unwrap();
    let ch4 = db.index_of("CH4").unwrap();
    assert!(r.outlet_flows[ch4] > r0.outlet_flows[ch4]);

    // Shift: exothermic forward, so T_eq = T + approach, and CO is higher.
    let sh = stage(&db, &[("shift", 10.0, Direction::Auto)]);
    let gas = flows(
        &db,
        &[
            ("CO", 0.13),
            ("H2O", 0.45),
            ("H2", 0.5),
            ("CO2", 0.06),
            ("CH4", 0.03),
        ],
    );
    let a = sh
        .solve(
            &db,
            StageInlet {
                flows: &gas,
                temperature_k: 693.15,
                pressure_pa: p,
            },
            EnergyMode::FixedTemperature {
                temperature_k: 693.15,
            },
            None,
        )
        .unwrap();
    assert_eq!(a.approach_signs[0], -1.0);
    assert!((a.equilibrium_temperatures_k[0] - 703.15).abs() < 1e-12);
    let sh0 = stage(&db, &[("shift", 0.0, Direction::Auto)]);
    let b = sh0
        .solve(
            &db,
            StageInlet {
                flows: &gas,
                temperature_k: 703.15,
                pressure_pa: p,
            },
            EnergyMode::FixedTemperature {
                temperature_k: 703.15,
            },
            None,
        )
        .unwrap();
    let co = db.index_of("CO").unwrap();
    assert!((a.outlet_flows[co] - b.outlet_flows[co]).abs() < 1e-12);
}

#[test]
fn adiabatic_shift_closes_its_energy_balance() {
    let db = db();
    let sh = stage(&db, &[("shift", 0.0, Direction::Forward)]);
    let gas = flows(
        &db,
        &[
            ("CO", 0.13),
            ("H2O", 0.45),
            ("H2", 0.5),
            ("CO2", 0.06),
            ("CH4", 0.03),
            ("N2", 0.01),
        ],
    );
    let r = sh
        .solve(
            &db,
            StageInlet {
                flows: &gas,
                temperature_k: 623.15,
                pressure_pa: 28e5,
            },
            EnergyMode::Adiabatic,
            None,
        )
        .unwrap();
    assert!(r.converged && r.energy_residual < 1e-9 && r.max_residual() < 1e-9);
    // Common practice: an HTS from 350 degC rises to 400-450 degC.
    let t_c = r.outlet_temperature_k - 273.15;
    assert!((400.0..=460.0).contains(&t_c), "{t_c}");
    let h_in = mixture::enthalpy(&db, &gas, 623.15).unwrap();
    let h_out = mixture::enthalpy(&db, &r.outlet_flows, r.outlet_temperature_k).unwrap();
    assert!((h_out - h_in).abs() < 1e-9 * h_in.abs());
    // Fixed duty: removing heat gives a cooler outlet with the same closure.
    let q = sh
        .solve(
            &db,
            StageInlet {
                flows: &gas,
                temperature_k: 623.15,
                pressure_pa: 28e5,
            },
            EnergyMode::FixedDuty { duty_w: -2000.0 },
            None,
        )
        .unwrap();
    assert!(q.outlet_temperature_k < r.outlet_temperature_k);
    let h_q = mixture::enthalpy(&db, &q.outlet_flows, q.outlet_temperature_k).unwrap();
    assert!((h_q - h_in + 2000.0).abs() < 1e-9 * h_in.abs());
}

#[test]
fn scale_invariance_from_1e_minus_6_to_1e6() {
    // Flows from 1e-6 to 1e6 kmol/h give the same answer, scaled (common practice).
    let db = db();
    let st = stage(
        &db,
        &[
            ("reforming", 5.0, Direction::Forward),
            ("shift", 0.0, Direction::Auto),
        ],
    );
    let base = flows(
        &db,
        &[("CH4", 1.0), ("H2O", 3.0), ("H2", 0.05), ("N2", 0.01)],
    );
    let mut reference: Option<StageResult> = None;
    for kmol_h in [1e-6, 1e-2, 1.0, 1e3, 1e6] {
        let scale = kmol_h / 3.6; // mol/s per kmol/h of methane
        let inlet: Vec<f64> = base.iter().map(|v| v * scale).collect();
        let r = st
            .solve(
                &db,
                StageInlet {
                    flows: &inlet,
                    temperature_k: 900.0,
                    pressure_pa: 3e6,
                },
                EnergyMode::Adiabatic,
                None,
            )
            .unwrap();
        assert!(r.converged);
        if let Some(base_r) = &reference {
            let s0: f64 = base_r.outlet_flows.iter().sum();
            let s1: f64 = r.outlet_flows.iter().sum();
            for (a, b) in r.outlet_flows.iter().zip(&base_r.outlet_flows) {
                assert!((a / s1 - b / s0).abs() < 1e-12);
            }
            assert!((r.outlet_temperature_k - base_r.outlet_temperature_k).abs() < 1e-8);
        } else {
            reference = Some(r);
        }
    }
}

#[test]
fn solids_and_bad_inlets_are_refused() {
    let db = db();
    let boudouard = StageReaction {
        reaction: Reaction::named(&db, "boudouard").unwrap(),
        approach_k: 0.0,
        direction: Direction::Auto,
    };
    assert!(EquilibriumStage::new(&db, vec![boudouard]).is_err());
    let sh = stage(&db, &[("shift", 0.0, Direction::Auto)]);
    let gas = flows(&db, &[("CO", 1.0), ("H2O", 1.0)]);
    let bad_p = sh.solve(
        &db,
        StageInlet {
            flows: &gas,
            temperature_k: 600.0,
            pressure_pa: -1.0,
        },
        EnergyMode::Adiabatic,
        None,
    );
    assert!(bad_p.is_err());
    let hot = sh.solve(
        &db,
        StageInlet {
            flows: &gas,
            temperature_k: 600.0,
            pressure_pa: 1e5,
        },
        EnergyMode::FixedTemperature {
            temperature_k: 9000.0,
        },
        None,
    );
    assert!(hot.is_err());
}

#[test]
fn a_lone_reaction_takes_its_direction_from_the_inlet() {
    // Reference: the sign of the extent of the same stage at zero approach (the definition of
    // Direction::Auto), for shift forward, backward, and with a product absent, adiabatic and at
    // a fixed temperature.
    let db = db();
    let with_approach = stage(&db, &[("shift", 8.0, Direction::Auto)]);
    let zero = stage(&db, &[("shift", 0.0, Direction::Auto)]);
    let cases = [
        flows(
            &db,
            &[("CO", 0.13), ("H2O", 0.45), ("H2", 0.5), ("CO2", 0.06)],
        ),
        flows(
            &db,
            &[("CO2", 0.3), ("H2", 0.6), ("H2O", 0.05), ("CO", 0.01)],
        ),
        flows(&db, &[("CO", 0.2), ("H2O", 0.5), ("H2", 0.3)]),
    ];
    for gas in &cases {
        for mode in [
            EnergyMode::Adiabatic,
            EnergyMode::FixedTemperature {
                temperature_k: 700.0,
            },
        ] {
            let inlet = StageInlet {
                flows: gas,
                temperature_k: 690.0,
                pressure_pa: 20e5,
            };
            let a = with_approach.solve(&db, inlet, mode, None).unwrap();
            let z = zero.solve(&db, inlet, mode, None).unwrap();
            // Shift is exothermic forward: forward gives s = -1, backward s = +1.
            let expected = if z.extents[0] >= 0.0 { -1.0 } else { 1.0 };
            assert_eq!(a.approach_signs[0], expected, "{gas:?} {mode:?}");
            assert_eq!(a.extents[0].signum(), z.extents[0].signum());
        }
    }
}

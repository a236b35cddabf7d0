//! The equilibrium stage against a general-purpose reference library: Cantera (PyPI `cantera`,
//! Gibbs minimisation) fed with syntrain's own data/species.yaml, so that only the solver is
//! compared; results stored in tests/data/cantera_*.csv by tools/cantera_equilibrium.py.
//! Also the invariants every solve must keep, and a textbook worked example on our data.

mod common;

use common::{element_balance_error, flows, Table};
use syntrain::equilibrium::*;
use syntrain::reaction::Reaction;
use syntrain::thermo::{mixture, SpeciesDb};

const SPECIES: [&str; 6] = ["CH4", "H2O", "CO", "CO2", "H2", "N2"];

fn stage(db: &SpeciesDb, names: &[&str]) -> EquilibriumStage {
    EquilibriumStage::new(
        db,
        names
            .iter()
            .map(|n| StageReaction {
                reaction: Reaction::named(db, n).unwrap(),
                approach_k: 0.0,
                direction: Direction::Auto,
            })
            .collect(),
    )
    .unwrap()
}

/// Largest equilibrium gap |sum nu ln(y P/P0) - ln K(T)| of a stage's reactions in an outlet,
/// recomputed from the flows alone (not the solver's own residual).
fn equilibrium_gap(db: &SpeciesDb, st: &EquilibriumStage, outlet: &[f64], t: f64, p: f64) -> f64 {
    let total: f64 = outlet.iter().sum();
    st.reactions()
        .iter()
        .map(|r| r.reaction.name.as_str())
        .map(|name| {
            let r = Reaction::named(db, name).unwrap();
            let ln_q: f64 = r
                .stoichiometry
                .iter()
                .map(|(i, nu)| nu * (outlet[*i] / total * p / 1e5).ln())
                .sum();
            (ln_q - r.ln_k(db, t).unwrap()).abs()
        })
        .fold(0.0, f64::max)
}

fn feed(db: &SpeciesDb, table: &Table, row: usize) -> Vec<f64> {
    let pairs: Vec<(&str, f64)> = SPECIES
        .iter()
        .map(|s| (*s, table.number(row, &format!("n_{s}"))))
        .collect();
    flows(db, &pairs)
}

fn check_fractions(db: &SpeciesDb, table: &Table, row: usize, outlet: &[f64], tol: f64) {
    let total: f64 = outlet.iter().sum();
    for s in SPECIES {
        let want = table.number(row, &format!("y_{s}"));
        let got = outlet[db.index_of(s).unwrap()] / total;
        assert!(
            (got - want).abs() < tol,
            "case {}: y_{s} = {got:.12} vs cantera {want:.12}",
            table.text(row, "case")
        );
    }
}

#[test]
fn fixed_temperature_cases_match_cantera_to_1e_minus_6() {
    let db = SpeciesDb::embedded().unwrap();
    let st = stage(&db, &["reforming", "shift"]);
    let table = Table::read("cantera_equilibrium.csv");
    assert!(table.rows.len() >= 30);
    let mut worst: f64 = 0.0;
    for row in 0..table.rows.len() {
        let t = table.number(row, "T_K");
        let p = table.number(row, "P_bar") * 1e5;
        let inlet = feed(&db, &table, row);
        let r = st
            .solve(
                &db,
                StageInlet {
                    flows: &inlet,
                    temperature_k: t,
                    pressure_pa: p,
                },
                EnergyMode::FixedTemperature { temperature_k: t },
                None,
            )
            .unwrap();
        // Invariants: at equilibrium (recomputed, 1e-9), elements within 1e-12 relative.
        assert!(equilibrium_gap(&db, &st, &r.outlet_flows, t, p) < 1e-9);
        assert!(element_balance_error(&db, &inlet, &r.outlet_flows) < 1e-12);
        check_fractions(&db, &table, row, &r.outlet_flows, 1e-6);
        let total: f64 = r.outlet_flows.iter().sum();
        for s in SPECIES {
            let d = r.outlet_flows[db.index_of(s).unwrap()] / total
                - table.number(row, &format!("y_{s}"));
            worst = worst.max(d.abs());
        }
        // Scale invariance over 1e-6 ... 1e6 (common practice: equilibrium is intensive).
        for scale in [1e-6, 1e6] {
            let scaled: Vec<f64> = inlet.iter().map(|v| v * scale).collect();
            let rs = st
                .solve(
                    &db,
                    StageInlet {
                        flows: &scaled,
                        temperature_k: t,
                        pressure_pa: p,
                    },
                    EnergyMode::FixedTemperature { temperature_k: t },
                    None,
                )
                .unwrap();
            for (a, b) in rs.outlet_flows.iter().zip(&r.outlet_flows) {
                assert!((a / scale - b).abs() <= 1e-12 * total);
            }
        }
    }
    eprintln!("worst mole-fraction difference vs cantera: {worst:.2e}");
}

#[test]
fn adiabatic_cases_match_cantera() {
    let db = SpeciesDb::embedded().unwrap();
    let shift = stage(&db, &["shift"]);
    let full = stage(&db, &["reforming", "shift"]);
    let table = Table::read("cantera_adiabatic.csv");
    for row in 0..table.rows.len() {
        let st = match table.text(row, "kind") {
            "shift" => &shift,
            _ => &full,
        };
        let t_in = table.number(row, "T_in_K");
        let p = table.number(row, "P_bar") * 1e5;
        let inlet = feed(&db, &table, row);
        let r = st
            .solve(
                &db,
                StageInlet {
                    flows: &inlet,
                    temperature_k: t_in,
                    pressure_pa: p,
                },
                EnergyMode::Adiabatic,
                None,
            )
            .unwrap();
        let gap = equilibrium_gap(&db, st, &r.outlet_flows, r.outlet_temperature_k, p);
        assert!(gap < 1e-9, "equilibrium gap {gap:e}");
        assert!(element_balance_error(&db, &inlet, &r.outlet_flows) < 1e-12);
        // Adiabatic energy closure within 1e-9 relative.
        let h_in = mixture::enthalpy(&db, &inlet, t_in).unwrap();
        let h_out = mixture::enthalpy(&db, &r.outlet_flows, r.outlet_temperature_k).unwrap();
        assert!((h_out - h_in).abs() <= 1e-9 * h_in.abs(), "{h_in} {h_out}");
        let t_want = table.number(row, "T_out_K");
        assert!(
            (r.outlet_temperature_k - t_want).abs() < 1e-4,
            "case {}: {} vs cantera {t_want}",
            table.text(row, "case"),
            r.outlet_temperature_k
        );
        check_fractions(&db, &table, row, &r.outlet_flows, 1e-6);
    }
}

#[test]
fn simultaneous_reforming_and_shift_worked_example_on_our_data() {
    // Smith, Van Ness & Abbott, Introduction to Chemical Engineering Thermodynamics, 7th ed.,
    // Example 13.14 (2 CH4 + 3 H2O, 1000 K, 1 bar); with NIST-JANAF data the answer is
    // y(CH4, H2O, CO, H2, CO2) = 0.0202, 0.0988, 0.1741, 0.6700, 0.0369 (an independent
    // calculation on NIST-JANAF data, from memory).
    let db = SpeciesDb::embedded().unwrap();
    let st = stage(&db, &["reforming", "shift"]);
    let inlet = flows(&db, &[("CH4", 2.0), ("H2O", 3.0)]);
    let r = st
        .solve(
            &db,
            StageInlet {
                flows: &inlet,
                temperature_k: 1000.0,
                pressure_pa: 1e5,
            },
            EnergyMode::FixedTemperature {
                temperature_k: 1000.0,
            },
            None,
        )
        .unwrap();
    let total: f64 = r.outlet_flows.iter().sum();
    let want = [
        ("CH4", 0.0202),
        ("H2O", 0.0988),
        ("CO", 0.1741),
        ("H2", 0.6700),
        ("CO2", 0.0369),
    ];
    for (s, y) in want {
        let got = r.outlet_flows[db.index_of(s).unwrap()] / total;
        assert!((got - y).abs() < 5e-4, "{s}: {got} vs {y}");
    }
}

//! The species data against the NIST-JANAF Thermochemical Tables, 4th ed. (M. W. Chase Jr.,
//! J. Phys. Chem. Ref. Data Monograph 9, 1998), rows copied into tests/data/janaf/ from PyPI
//! `janaf` by tools/janaf_reference.py; and derived reaction figures.

mod common;

use common::Table;
use syntrain::quantity::R_GAS;
use syntrain::reaction::Reaction;
use syntrain::thermo::SpeciesDb;

/// Element reference species with their atom counts.
type Elements = &'static [(&'static str, f64)];

/// (database name, file, element references)
const SPECIES: &[(&str, &str, Elements)] = &[
    ("CH4", "CH4.csv", &[("C(gr)", 1.0), ("H2", 2.0)]),
    ("H2O", "H2O.csv", &[("H2", 1.0), ("O2", 0.5)]),
    ("CO", "CO.csv", &[("C(gr)", 1.0), ("O2", 0.5)]),
    ("CO2", "CO2.csv", &[("C(gr)", 1.0), ("O2", 1.0)]),
    ("H2", "H2.csv", &[("H2", 1.0)]),
    ("N2", "N2.csv", &[("N2", 1.0)]),
    ("O2", "O2.csv", &[("O2", 1.0)]),
    ("Ar", "Ar.csv", &[("Ar", 1.0)]),
    ("NH3", "NH3.csv", &[("N2", 0.5), ("H2", 1.5)]),
    ("C(gr)", "C_gr.csv", &[("C(gr)", 1.0)]),
];

#[test]
fn every_record_reproduces_janaf_from_300_to_1500_k() {
    let db = SpeciesDb::embedded().unwrap();
    let mut rows_checked = 0;
    for (name, file, refs) in SPECIES {
        let s = db.get(name).unwrap();
        let table = Table::read(&format!("janaf/{file}"));
        let h298 = s.enthalpy(298.15).unwrap();
        for row in 0..table.rows.len() {
            let t = table.number(row, "T_K");
            if t == 298.15 {
                // NIST-JANAF dfH(298.15 K), within 0.3 kJ/mol.
                let dfh = table.number(row, "dfH_kJ_mol");
                assert!(
                    (h298 / 1e3 - dfh).abs() < 0.3,
                    "{name} dfH298 {h298} vs {dfh}"
                );
                continue;
            }
            if !(300.0..=1500.0).contains(&t) {
                continue;
            }
            // NIST-JANAF Cp within 0.5 %.
            let cp = table.number(row, "Cp_J_molK");
            let cp_ours = s.cp(t).unwrap();
            assert!(
                ((cp_ours - cp) / cp).abs() < 0.005,
                "{name} Cp at {t} K: {cp_ours} vs {cp}"
            );
            // NIST-JANAF H - H(298.15) within 0.2 kJ/mol.
            let dh = table.number(row, "H_minus_H298_kJ_mol");
            let dh_ours = (s.enthalpy(t).unwrap() - h298) / 1e3;
            assert!(
                (dh_ours - dh).abs() < 0.2,
                "{name} H-H298 at {t} K: {dh_ours} vs {dh}"
            );
            // NIST-JANAF log10 Kf within 0.005, from our own element records.
            let mut dfg = s.gibbs(t).unwrap();
            for (element, count) in *refs {
                dfg -= count * db.get(element).unwrap().gibbs(t).unwrap();
            }
            let log_kf = -dfg / (R_GAS * t * std::f64::consts::LN_10);
            let want = table.number(row, "log10_Kf");
            assert!(
                (log_kf - want).abs() < 0.005,
                "{name} log Kf at {t} K: {log_kf} vs {want}"
            );
            rows_checked += 1;
        }
    }
    // 10 species, 14-16 rows each between 300 and 1500 K.
    assert!(rows_checked >= 140, "{rows_checked}");
}

#[test]
fn reaction_enthalpies_and_equilibrium_temperatures() {
    let db = SpeciesDb::embedded().unwrap();
    let reforming = Reaction::named(&db, "reforming").unwrap();
    let shift = Reaction::named(&db, "shift").unwrap();
    // NIST-JANAF (Chase 1998), derived: dH298 reforming +206.17 kJ/mol, shift -41.17 kJ/mol.
    assert!((reforming.delta_h(&db, 298.15).unwrap() / 1e3 - 206.17).abs() < 0.3);
    assert!((shift.delta_h(&db, 298.15).unwrap() / 1e3 + 41.17).abs() < 0.3);
    // NIST-JANAF, derived: shift K = 1 near 1097 K, reforming K = 1 near 892 K (within 3 K).
    let root = |r: &Reaction, mut lo: f64, mut hi: f64| {
        for _ in 0..100 {
            let mid = 0.5 * (lo + hi);
            if r.ln_k(&db, lo).unwrap() * r.ln_k(&db, mid).unwrap() <= 0.0 {
                hi = mid;
            } else {
                lo = mid;
            }
        }
        0.5 * (lo + hi)
    };
    let t_shift = root(&shift, 900.0, 1300.0);
    let t_reforming = root(&reforming, 700.0, 1100.0);
    assert!((t_shift - 1097.0).abs() < 3.0, "{t_shift}");
    assert!((t_reforming - 892.0).abs() < 3.0, "{t_reforming}");
}

#[test]
fn shift_constant_against_moe_correlation() {
    // Moe (1962), Kp = exp(4577.8/T - 4.33): a sanity check, within 6 % at 600-700 K (it runs
    // about 4-5 % below JANAF there).
    let db = SpeciesDb::embedded().unwrap();
    let shift = Reaction::named(&db, "shift").unwrap();
    for t in [600.0, 625.0, 650.0, 675.0, 700.0] {
        let ours = shift.ln_k(&db, t).unwrap().exp();
        let moe = (4577.8 / t - 4.33).exp();
        let rel = (moe - ours) / ours;
        assert!(rel.abs() < 0.06, "{t} K: ours {ours}, Moe {moe}");
        assert!(rel < 0.0, "Moe runs below JANAF at {t} K");
    }
}

#[test]
fn carbon_activity_agrees_between_cracking_and_boudouard_at_equilibrium() {
    // In a gas at reforming and shift equilibrium, methane cracking and Boudouard give the same
    // carbon activity (the reactions are combinations of each other; common practice).
    use syntrain::equilibrium::*;
    let db = SpeciesDb::embedded().unwrap();
    let stage = EquilibriumStage::new(
        &db,
        ["reforming", "shift"]
            .iter()
            .map(|n| StageReaction {
                reaction: Reaction::named(&db, n).unwrap(),
                approach_k: 0.0,
                direction: Direction::Auto,
            })
            .collect(),
    )
    .unwrap();
    let inlet = common::flows(&db, &[("CH4", 1.0), ("H2O", 1.2)]);
    let p = 5e5;
    let r = stage
        .solve(
            &db,
            StageInlet {
                flows: &inlet,
                temperature_k: 900.0,
                pressure_pa: p,
            },
            EnergyMode::FixedTemperature {
                temperature_k: 900.0,
            },
            None,
        )
        .unwrap();
    let total: f64 = r.outlet_flows.iter().sum();
    let pp = |i: usize| r.outlet_flows[i] / total * p / 1e5;
    let cracking = Reaction::named(&db, "methane-cracking").unwrap();
    let boudouard = Reaction::named(&db, "boudouard").unwrap();
    let a1 = syntrain::reaction::carbon_activity(&db, &cracking, 900.0, pp).unwrap();
    let a2 = syntrain::reaction::carbon_activity(&db, &boudouard, 900.0, pp).unwrap();
    assert!(((a1 - a2) / a1).abs() < 1e-8, "{a1} {a2}");
}

//! The Peng-Robinson gas model against a reference library, and the equilibrium stage with it.
//!
//! - Compressibility, residual enthalpy and fugacity coefficients against PyPI `thermo`
//!   (thermo.eos.PR for pure species, thermo.eos_mix.PRMIX for mixtures, every binary parameter
//!   zero) on the critical constants of data/species.yaml: tests/data/thermo_peng_robinson.csv,
//!   made by tools/thermo_peng_robinson.py.

mod common;

use common::Table;
use syntrain::thermo::peng_robinson::{evaluate, PrComponent};
use syntrain::thermo::SpeciesDb;

#[test]
fn pure_species_and_mixtures_match_the_thermo_package() {
    // PyPI thermo 0.6.1, thermo.eos.PR / thermo.eos_mix.PRMIX (tests/data/README.md).
    let db = SpeciesDb::embedded().unwrap();
    let table = Table::read("thermo_peng_robinson.csv");
    let mut start = 0;
    let mut states = 0;
    let (mut worst_phi, mut worst_z, mut worst_h) = (0.0f64, 0.0f64, 0.0f64);
    while start < table.rows.len() {
        // One state: consecutive rows of the same case, temperature and pressure.
        let key = |r: usize| {
            (
                table.text(r, "case").to_string(),
                table.text(r, "temperature_k").to_string(),
                table.text(r, "pressure_pa").to_string(),
            )
        };
        let mut end = start + 1;
        while end < table.rows.len() && key(end) == key(start) {
            end += 1;
        }
        let comps: Vec<PrComponent> = (start..end)
            .map(|r| {
                let s = db.get(table.text(r, "species")).unwrap();
                PrComponent::new(s.critical.as_ref().unwrap())
            })
            .collect();
        let y: Vec<f64> = (start..end)
            .map(|r| table.number(r, "mole_fraction"))
            .collect();
        let t = table.number(start, "temperature_k");
        let p = table.number(start, "pressure_pa");
        let mut ln_phi = vec![0.0; comps.len()];
        let state = evaluate(&comps, &y, t, p, &mut ln_phi).unwrap();
        let z = table.number(start, "z");
        let h = table.number(start, "residual_enthalpy_j_per_mol");
        worst_z = worst_z.max(((state.z - z) / z).abs());
        worst_h = worst_h.max(((state.residual_enthalpy_j_per_mol - h) / h).abs());
        for (k, r) in (start..end).enumerate() {
            worst_phi = worst_phi.max((ln_phi[k] - table.number(r, "ln_phi")).abs());
        }
        states += 1;
        start = end;
    }
    eprintln!("{states} states: ln phi {worst_phi:.1e}, Z {worst_z:.1e}, H_res {worst_h:.1e}");
    assert!(states >= 50, "{states} states read");
    assert!(worst_phi < 1e-6, "ln phi off by {worst_phi:.2e}");
    assert!(worst_z < 1e-6, "Z off by {worst_z:.2e} relative");
    assert!(worst_h < 1e-6, "H - H_ig off by {worst_h:.2e} relative");
}

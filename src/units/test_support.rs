//! Test helpers for the unit operations: streams from (species, flow) pairs, and the element
//! and energy balance checks every unit's tests assert.

use super::{Stream, UnitResult};
use crate::thermo::{mixture, SpeciesDb};

/// The embedded database.
pub(crate) fn db() -> SpeciesDb {
    SpeciesDb::embedded().unwrap()
}

/// A flow vector from (species, mol/s) pairs.
pub(crate) fn flows(db: &SpeciesDb, pairs: &[(&str, f64)]) -> Vec<f64> {
    let mut v = vec![0.0; db.len()];
    for (name, n) in pairs {
        v[db.index_of(name).unwrap()] += *n;
    }
    v
}

/// A vapour stream from (species, mol/s) pairs.
pub(crate) fn gas(db: &SpeciesDb, pairs: &[(&str, f64)], t_k: f64, p_pa: f64) -> Stream {
    Stream::vapour(flows(db, pairs), t_k, p_pa)
}

/// Largest relative element imbalance between two sets of flow vectors.
pub(crate) fn element_error(db: &SpeciesDb, a: &[&[f64]], b: &[&[f64]]) -> f64 {
    mixture::elements(db)
        .iter()
        .map(|e| {
            let x: f64 = a.iter().map(|f| mixture::element_amount(db, f, e)).sum();
            let y: f64 = b.iter().map(|f| mixture::element_amount(db, f, e)).sum();
            (x - y).abs() / x.abs().max(y.abs()).max(1e-300)
        })
        .fold(0.0, f64::max)
}

/// Assert the element balance (1e-12 relative) and the energy balance
/// (sum H_out - sum H_in - duty within 1e-9 of max(|H_in|, |H_out|)) of a unit result.
pub(crate) fn assert_balances(db: &SpeciesDb, inlets: &[&Stream], r: &UnitResult) {
    let a: Vec<&[f64]> = inlets.iter().map(|s| s.flows.as_slice()).collect();
    let b: Vec<&[f64]> = r.outlets.iter().map(|s| s.flows.as_slice()).collect();
    let e = element_error(db, &a, &b);
    assert!(e <= 1e-12, "element balance off by {e:.3e}");
    let h_in: f64 = inlets.iter().map(|s| s.enthalpy_w(db).unwrap()).sum();
    let h_out: f64 = r.outlets.iter().map(|s| s.enthalpy_w(db).unwrap()).sum();
    let rel = (h_out - h_in - r.duty_w).abs() / h_in.abs().max(h_out.abs());
    assert!(
        rel <= 1e-9,
        "energy balance off by {rel:.3e} (H_in {h_in}, H_out {h_out}, duty {})",
        r.duty_w
    );
}

/// The equilibrium gap of a named reaction in a vapour stream, recomputed from the stream alone:
/// sum nu_i ln(y_i P / P0) - ln K(t_eq), with K from the species data (zero at equilibrium).
/// Independent of the solver's own residual, so a test of it can fail.
pub(crate) fn equilibrium_gap(db: &SpeciesDb, reaction: &str, s: &Stream, t_eq: f64) -> f64 {
    let r = crate::reaction::Reaction::named(db, reaction).unwrap();
    let total = s.total();
    let ln_q: f64 = r
        .stoichiometry
        .iter()
        .map(|(i, nu)| {
            nu * (s.flows[*i] / total * s.pressure_pa / crate::quantity::STANDARD_PRESSURE_PA).ln()
        })
        .sum();
    ln_q - r.ln_k(db, t_eq).unwrap()
}

/// The value of a figure by key (panics when it is missing).
pub(crate) fn fig(r: &UnitResult, key: &str) -> f64 {
    r.figures
        .iter()
        .find(|f| f.key == key)
        .unwrap_or_else(|| panic!("no figure '{key}' in {:?}", r.figures))
        .value
}

/// A natural-gas-like feed (invented demo composition) mixed with steam at S/C 3.0, mol/s.
pub(crate) fn reformer_feed(db: &SpeciesDb, t_k: f64, p_pa: f64) -> Stream {
    // 94 % CH4, 3.5 % C2H6, 0.5 % C3H8, 1 % N2, 1 % CO2 plus 2 % H2 recycle (demo values).
    let ng = [
        ("CH4", 0.94),
        ("C2H6", 0.035),
        ("C3H8", 0.005),
        ("N2", 0.01),
        ("CO2", 0.01),
        ("H2", 0.02),
    ];
    let carbon = 0.94 + 2.0 * 0.035 + 3.0 * 0.005;
    let mut pairs: Vec<(&str, f64)> = ng.to_vec();
    pairs.push(("H2O", 3.0 * carbon));
    gas(db, &pairs, t_k, p_pa)
}

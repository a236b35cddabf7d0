//! Ideal-gas mixture properties from species amounts.
//!
//! Amounts are given per database species (a slice as long as the database, mol/s or mol);
//! species with zero amount are skipped, so an absent species never triggers a range error.
//! The ideal-gas mixture has H = sum n_i H_i(T) and
//! S = sum n_i (S_i(T) - R ln(y_i P / P0)) over the gas species (solids at unit activity).

use super::{Phase, SpeciesDb};
use crate::error::Result;
use crate::quantity::{R_GAS, STANDARD_PRESSURE_PA};

/// Total amount (sum of all entries).
pub fn total(amounts: &[f64]) -> f64 {
    amounts.iter().sum()
}

/// Total amount of gas-phase species.
pub fn gas_total(db: &SpeciesDb, amounts: &[f64]) -> f64 {
    amounts
        .iter()
        .enumerate()
        .filter(|(i, _)| db.by_index(*i).phase == Phase::Gas)
        .map(|(_, n)| n)
        .sum()
}

/// Enthalpy of the amounts at `temperature_k`, J/s (W) for mol/s; formation enthalpies included.
pub fn enthalpy(db: &SpeciesDb, amounts: &[f64], temperature_k: f64) -> Result<f64> {
    let mut h = 0.0;
    for (i, n) in amounts.iter().enumerate() {
        if *n != 0.0 {
            h += n * db.by_index(i).enthalpy(temperature_k)?;
        }
    }
    Ok(h)
}

/// Heat capacity of the amounts, W/K for mol/s.
pub fn heat_capacity(db: &SpeciesDb, amounts: &[f64], temperature_k: f64) -> Result<f64> {
    let mut cp = 0.0;
    for (i, n) in amounts.iter().enumerate() {
        if *n != 0.0 {
            cp += n * db.by_index(i).cp(temperature_k)?;
        }
    }
    Ok(cp)
}

/// Entropy of the ideal-gas mixture at `temperature_k` and `pressure_pa`, W/K for mol/s.
pub fn entropy(
    db: &SpeciesDb,
    amounts: &[f64],
    temperature_k: f64,
    pressure_pa: f64,
) -> Result<f64> {
    let n_gas = gas_total(db, amounts);
    let mut s = 0.0;
    for (i, n) in amounts.iter().enumerate() {
        if *n > 0.0 {
            let sp = db.by_index(i);
            s += n * sp.entropy(temperature_k)?;
            if sp.phase == Phase::Gas {
                s -= n * R_GAS * (n / n_gas * pressure_pa / STANDARD_PRESSURE_PA).ln();
            }
        }
    }
    Ok(s)
}

/// Gibbs energy G = H - T S of the ideal-gas mixture, W for mol/s.
pub fn gibbs(db: &SpeciesDb, amounts: &[f64], temperature_k: f64, pressure_pa: f64) -> Result<f64> {
    Ok(enthalpy(db, amounts, temperature_k)?
        - temperature_k * entropy(db, amounts, temperature_k, pressure_pa)?)
}

/// Mean molar mass, kg/mol (zero for no amount).
pub fn molar_mass(db: &SpeciesDb, amounts: &[f64]) -> f64 {
    let n = total(amounts);
    if n <= 0.0 {
        return 0.0;
    }
    amounts
        .iter()
        .enumerate()
        .map(|(i, x)| x * db.by_index(i).molar_mass_kg_per_mol)
        .sum::<f64>()
        / n
}

/// Mass flow, kg/s for mol/s.
pub fn mass(db: &SpeciesDb, amounts: &[f64]) -> f64 {
    amounts
        .iter()
        .enumerate()
        .map(|(i, x)| x * db.by_index(i).molar_mass_kg_per_mol)
        .sum()
}

/// Moles of an element in the amounts.
pub fn element_amount(db: &SpeciesDb, amounts: &[f64], element: &str) -> f64 {
    amounts
        .iter()
        .enumerate()
        .map(|(i, x)| x * db.by_index(i).atoms(element))
        .sum()
}

/// Mole fraction of `species` on a dry basis (water, index `water`, left out): zero for water
/// itself and when nothing but water flows. The one dry-basis rule of the crate.
pub fn dry_mole_fraction(flows: &[f64], water: Option<usize>, species: usize) -> f64 {
    if Some(species) == water {
        return 0.0;
    }
    let dry = total(flows) - water.map_or(0.0, |w| flows[w]);
    if dry > 0.0 {
        flows[species] / dry
    } else {
        0.0
    }
}

/// All element symbols present in the database.
pub fn elements(db: &SpeciesDb) -> Vec<String> {
    let mut out: Vec<String> = Vec::new();
    for s in db.all() {
        for (e, _) in &s.elements {
            if !out.contains(e) {
                out.push(e.clone());
            }
        }
    }
    out.sort();
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn mixing_entropy_of_an_equimolar_binary() {
        // Ideal mixing: S_mix - sum n S_i = -R sum n ln y = 2 R ln 2 for 1 + 1 mol at P0
        // (any physical chemistry handbook; common practice).
        let db = SpeciesDb::embedded().unwrap();
        let mut n = vec![0.0; db.len()];
        n[db.index_of("N2").unwrap()] = 1.0;
        n[db.index_of("O2").unwrap()] = 1.0;
        let s = entropy(&db, &n, 400.0, STANDARD_PRESSURE_PA).unwrap();
        let pure = db.get("N2").unwrap().entropy(400.0).unwrap()
            + db.get("O2").unwrap().entropy(400.0).unwrap();
        assert!((s - pure - 2.0 * R_GAS * 2f64.ln()).abs() < 1e-9);
        let m = molar_mass(&db, &n);
        assert!((m - (0.0280134 + 0.031998) / 2.0).abs() < 1e-5);
    }
}

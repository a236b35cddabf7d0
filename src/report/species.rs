//! The `species` listing: the database records, their sources, and Cp, H, S, G at chosen
//! temperatures, so an engineer can check the data the tool uses against the tables.

use serde_json::{json, Map, Value};

use crate::error::Result;
use crate::quantity::kelvin_to_degc;
use crate::thermo::{Phase, Species, SpeciesDb};

/// Temperatures shown for one species when none are asked for, K.
pub const DEFAULT_TEMPERATURES_K: &[f64] = &[298.15, 500.0, 700.0, 900.0, 1100.0, 1300.0];

fn phase_name(p: Phase) -> &'static str {
    match p {
        Phase::Gas => "gas",
        Phase::Solid => "solid",
    }
}

fn temperatures_or_default(t: &[f64]) -> &[f64] {
    if t.is_empty() {
        DEFAULT_TEMPERATURES_K
    } else {
        t
    }
}

/// One property row: (T K, Cp J/(mol K), H kJ/mol, H - H298 kJ/mol, S J/(mol K), G kJ/mol).
fn properties(s: &Species, t: f64) -> Result<[f64; 6]> {
    let h298 = s.enthalpy(298.15)?;
    let h = s.enthalpy(t)?;
    Ok([
        t,
        s.cp(t)?,
        h / 1e3,
        (h - h298) / 1e3,
        s.entropy(t)?,
        s.gibbs(t)? / 1e3,
    ])
}

/// Text table: the whole database, or one record with its properties. With temperatures and no
/// name, one table of every species at each of those temperatures follows the listing.
pub fn table(db: &SpeciesDb, name: Option<&str>, temperatures_k: &[f64]) -> Result<String> {
    let mut out = String::new();
    match name {
        None => {
            // Columns as wide as their widest entry, so long descriptions keep the table aligned.
            let width = |f: &dyn Fn(&Species) -> usize, header: &str| {
                db.all()
                    .iter()
                    .map(f)
                    .chain([header.len()])
                    .max()
                    .unwrap_or(0)
            };
            let name_w = width(&|s| s.name.chars().count(), "species");
            let desc_w = width(&|s| s.description.chars().count(), "description");
            out.push_str(&format!(
                "{:<name_w$} {:<desc_w$} {:<6} {:>10} {:>14}  source\n",
                "species", "description", "phase", "M g/mol", "range K"
            ));
            for s in db.all() {
                out.push_str(&format!(
                    "{:<name_w$} {:<desc_w$} {:<6} {:>10.4} {:>14}  {}\n",
                    s.name,
                    s.description,
                    phase_name(s.phase),
                    s.molar_mass_kg_per_mol * 1e3,
                    format!("{:.0}-{:.0}", s.nasa7.t_min_k, s.nasa7.t_max_k),
                    s.source
                ));
            }
            out.push_str(
                "\nStandard state 1 bar; H includes the formation enthalpy at 298.15 K.\n",
            );
            if !temperatures_k.is_empty() {
                out.push('\n');
                out.push_str(&properties_of_all(db, temperatures_k, name_w)?);
            }
        }
        Some(n) => {
            let s = db.get(n)?;
            out.push_str(&format!("{} ({})\n", s.name, s.description));
            out.push_str(&format!("  formula      {}\n", s.formula));
            let elements: Vec<String> =
                s.elements.iter().map(|(e, c)| format!("{e} {c}")).collect();
            out.push_str(&format!("  elements     {}\n", elements.join(", ")));
            out.push_str(&format!("  phase        {}\n", phase_name(s.phase)));
            out.push_str(&format!(
                "  molar mass   {:.5} g/mol\n",
                s.molar_mass_kg_per_mol * 1e3
            ));
            out.push_str(&format!(
                "  valid        {:.2}-{:.2} K (break at {:.2} K); standard state 1 bar\n",
                s.nasa7.t_min_k, s.nasa7.t_max_k, s.nasa7.t_mid_k
            ));
            out.push_str(&format!("  source       {}\n\n", s.source));
            out.push_str(&property_block(s, temperatures_or_default(temperatures_k))?);
        }
    }
    Ok(out)
}

/// One table of every species at each temperature (species in database order, temperatures in
/// the order given).
fn properties_of_all(db: &SpeciesDb, temperatures_k: &[f64], name_w: usize) -> Result<String> {
    let mut out = format!(
        "{:<name_w$} {:>9} {:>9} {:>12} {:>12} {:>12} {:>12} {:>12}\n",
        "species", "T K", "T degC", "Cp J/molK", "H kJ/mol", "H-H298", "S J/molK", "G kJ/mol"
    );
    for s in db.all() {
        for &t in temperatures_k {
            let p = properties(s, t)?;
            out.push_str(&format!(
                "{:<name_w$} {:>9.2} {:>9.2} {:>12.4} {:>12.4} {:>12.4} {:>12.4} {:>12.4}\n",
                s.name,
                p[0],
                kelvin_to_degc(p[0]),
                p[1],
                p[2],
                p[3],
                p[4],
                p[5]
            ));
        }
    }
    Ok(out)
}

fn property_block(s: &Species, temperatures_k: &[f64]) -> Result<String> {
    let mut out = format!(
        "{:<9} {:>9} {:>9} {:>12} {:>12} {:>12} {:>12} {:>12}\n",
        s.name, "T K", "T degC", "Cp J/molK", "H kJ/mol", "H-H298", "S J/molK", "G kJ/mol"
    );
    for &t in temperatures_k {
        let p = properties(s, t)?;
        out.push_str(&format!(
            "{:<9} {:>9.2} {:>9.2} {:>12.4} {:>12.4} {:>12.4} {:>12.4} {:>12.4}\n",
            "",
            p[0],
            kelvin_to_degc(p[0]),
            p[1],
            p[2],
            p[3],
            p[4],
            p[5]
        ));
    }
    Ok(out)
}

fn record_json(s: &Species, temperatures_k: &[f64]) -> Result<Value> {
    let mut elements = Map::new();
    for (e, c) in &s.elements {
        elements.insert(e.clone(), json!(c));
    }
    let mut props = Vec::new();
    for &t in temperatures_k {
        let p = properties(s, t)?;
        props.push(json!({
            "temperature_K": p[0],
            "cp_J_mol_K": p[1],
            "enthalpy_kJ_mol": p[2],
            "enthalpy_above_298_kJ_mol": p[3],
            "entropy_J_mol_K": p[4],
            "gibbs_kJ_mol": p[5],
        }));
    }
    Ok(json!({
        "name": s.name,
        "description": s.description,
        "formula": s.formula,
        "elements": elements,
        "phase": phase_name(s.phase),
        "molar_mass_g_mol": s.molar_mass_kg_per_mol * 1e3,
        "temperature_range_K": [s.nasa7.t_min_k, s.nasa7.t_mid_k, s.nasa7.t_max_k],
        "nasa7": { "low": s.nasa7.low.to_vec(), "high": s.nasa7.high.to_vec() },
        "standard_pressure_bar": 1.0,
        "source": s.source,
        "properties": props,
    }))
}

/// JSON: `{"species": [records]}` for the whole database or one record object.
pub fn json(db: &SpeciesDb, name: Option<&str>, temperatures_k: &[f64]) -> Result<String> {
    let value = match name {
        None => {
            let mut list = Vec::new();
            for s in db.all() {
                list.push(record_json(s, temperatures_k)?);
            }
            json!({ "species": list })
        }
        Some(n) => record_json(db.get(n)?, temperatures_or_default(temperatures_k))?,
    };
    Ok(format!("{value:#}\n"))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn listing_and_one_record() {
        let db = SpeciesDb::embedded().unwrap();
        let all = table(&db, None, &[]).unwrap();
        assert!(all.contains("n-C4H10") && all.contains("C(gr)"));
        let one = table(&db, Some("CO2"), &[1000.0]).unwrap();
        assert!(one.contains("1000.00") && one.contains("source"));
        let v: Value = serde_json::from_str(&json(&db, Some("H2"), &[]).unwrap()).unwrap();
        assert_eq!(
            v["properties"].as_array().unwrap().len(),
            DEFAULT_TEMPERATURES_K.len()
        );
        // H2 is an element in its reference state: H(298.15) = 0 (NIST-JANAF convention).
        assert!(
            v["properties"][0]["enthalpy_kJ_mol"]
                .as_f64()
                .unwrap()
                .abs()
                < 1e-3
        );
        assert!(table(&db, Some("XYZ"), &[]).is_err());
        // Temperatures without a name: one row per species and temperature, each species at
        // each temperature. CO2 at 1000 K: Cp 54.308 J/(mol K) (NIST-JANAF (Chase 1998), CO2
        // table); the record is a fit within 0.5 %.
        let list = table(&db, None, &[500.0, 1000.0]).unwrap();
        let rows: Vec<&str> = list
            .lines()
            .filter(|l| l.contains(" 1000.00 ") || l.contains(" 500.00 "))
            .collect();
        assert_eq!(rows.len(), 2 * db.len(), "{list}");
        let co2 = rows
            .iter()
            .find(|l| l.starts_with("CO2 ") && l.contains(" 1000.00 "))
            .unwrap();
        let cp: f64 = co2.split_whitespace().nth(3).unwrap().parse().unwrap();
        assert!((cp - 54.308).abs() < 0.005 * 54.308, "{co2}");
        // The listing stays aligned with a long description (isobutane (2-methylpropane)).
        let header = list.lines().next().unwrap();
        let phase_at = header.find("phase").unwrap();
        for line in list.lines().skip(1).take(db.len()) {
            assert!(
                line[phase_at..].starts_with("gas") || line[phase_at..].starts_with("solid"),
                "{line}"
            );
        }
        assert!(table(&db, Some("CH4"), &[5000.0]).is_err());
    }
}

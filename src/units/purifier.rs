//! Hydrogen purifier (e.g. pressure-swing adsorption) as a split: a hydrogen recovery to the
//! product, and either the product purity (mole fraction H2; the impurities in the product then
//! in proportion to their feed amounts) or the fraction of each impurity that reaches the
//! product (default zero). Outlets [product, tail gas], both at the inlet temperature; the
//! product leaves at the inlet pressure less a pressure drop, the tail gas at its own pressure.
//! Isothermal, with no duty: ideal-gas enthalpy does not depend on pressure, so the energy
//! balance closes exactly.

use super::common::{
    check_inlets, check_pressure_drop, figure, outlet_pressure, require_vapour, spec_error, Key,
};
use super::{FigureKind, Stream, UnitResult};
use crate::error::Result;
use crate::thermo::SpeciesDb;

/// What sets the product's impurities.
#[derive(Debug, Clone, PartialEq)]
pub enum PurifierProduct {
    /// Mole fraction of H2 in the product (0 < x <= 1).
    Purity(f64),
    /// Fraction (0..1) of each named impurity that reaches the product; unlisted ones: zero.
    ImpuritySplit(Vec<(String, f64)>),
}

/// Specification of a hydrogen purifier.
#[derive(Debug, Clone, PartialEq)]
pub struct PurifierSpec {
    /// Fraction of the feed hydrogen recovered in the product (0 < R <= 1).
    pub hydrogen_recovery: f64,
    /// Product purity or impurity split.
    pub product: PurifierProduct,
    /// Pressure drop from feed to product, Pa.
    pub pressure_drop_pa: f64,
    /// Tail-gas pressure, Pa (absolute; not above the feed pressure).
    pub tail_gas_pressure_pa: f64,
}

/// A purifier ready to solve.
#[derive(Debug, Clone)]
pub struct Purifier {
    name: String,
    spec: PurifierSpec,
    key: Key,
    mode: Mode,
}

/// The product rule, resolved against the database.
#[derive(Debug, Clone)]
enum Mode {
    /// Mole fraction H2 in the product.
    Purity(f64),
    /// Fraction of each database species to the product (H2 excluded).
    Split(Vec<f64>),
}

impl Purifier {
    /// Check the spec and prepare.
    pub fn new(db: &SpeciesDb, name: &str, spec: &PurifierSpec) -> Result<Purifier> {
        let key = Key::new(db, name)?;
        let r = spec.hydrogen_recovery;
        if !(r > 0.0 && r <= 1.0) {
            return Err(spec_error(
                name,
                "hydrogen-recovery",
                format!("{r} must be a fraction above 0 and at most 1"),
            ));
        }
        let p_tail = spec.tail_gas_pressure_pa;
        if !(p_tail.is_finite() && p_tail > 0.0) {
            return Err(spec_error(
                name,
                "tail-gas-pressure",
                format!("{p_tail} Pa must be a positive absolute pressure"),
            ));
        }
        check_pressure_drop(name, spec.pressure_drop_pa)?;
        let mode = match &spec.product {
            PurifierProduct::Purity(x) => {
                if !(*x > 0.0 && *x <= 1.0) {
                    return Err(spec_error(
                        name,
                        "purity",
                        format!("{x} must be a mole fraction above 0 and at most 1"),
                    ));
                }
                Mode::Purity(*x)
            }
            PurifierProduct::ImpuritySplit(pairs) => {
                let mut f = vec![0.0; db.len()];
                for (species, v) in pairs {
                    let i =
                        db.require(species, &format!(" in the impurity split of unit '{name}'"))?;
                    if i == key.h2 {
                        return Err(spec_error(
                            name,
                            "impurity-split",
                            "H2 is not an impurity; set its recovery with hydrogen-recovery",
                        ));
                    }
                    if !(*v >= 0.0 && *v <= 1.0) {
                        return Err(spec_error(
                            name,
                            "impurity-split",
                            format!("{species}: {v} must be a fraction 0..1"),
                        ));
                    }
                    f[i] = *v;
                }
                Mode::Split(f)
            }
        };
        Ok(Purifier {
            name: name.to_string(),
            spec: spec.clone(),
            key,
            mode,
        })
    }

    /// The spec.
    pub fn spec(&self) -> &PurifierSpec {
        &self.spec
    }

    /// Purify; outlets [product, tail gas].
    pub fn solve(&self, db: &SpeciesDb, inlets: &[&Stream]) -> Result<UnitResult> {
        let name = &self.name;
        let h2 = self.key.h2;
        check_inlets(db, name, "purifier", inlets, 1, Some(1))?;
        require_vapour(db, name, inlets)?;
        let inlet = inlets[0];
        let p_product = outlet_pressure(name, inlet.pressure_pa, self.spec.pressure_drop_pa)?;
        let p_tail = self.spec.tail_gas_pressure_pa;
        if p_tail > inlet.pressure_pa {
            return Err(spec_error(
                name,
                "tail-gas-pressure",
                format!(
                    "{:.4} bar is above the feed pressure {:.4} bar; a purifier's tail gas \
                     leaves at low pressure",
                    p_tail / 1e5,
                    inlet.pressure_pa / 1e5
                ),
            ));
        }
        let h2_feed = inlet.flows[h2];
        if h2_feed <= 0.0 {
            return Err(spec_error(name, "inlet", "carries no hydrogen to purify"));
        }
        let h2_product = self.spec.hydrogen_recovery * h2_feed;
        let mut product = vec![0.0; db.len()];
        product[h2] = h2_product;
        match &self.mode {
            Mode::Purity(x) => {
                let impurities: f64 = inlet.total() - h2_feed;
                let wanted = h2_product * (1.0 - x) / x;
                if wanted > impurities * (1.0 + 1e-12) {
                    return Err(spec_error(
                        name,
                        "purity",
                        format!(
                            "{x} cannot be met: at a recovery of {} the product would need \
                             {wanted:.6} mol/s of impurities, the feed has only {impurities:.6}; \
                             raise the purity (or the feed's hydrogen fraction is above it)",
                            self.spec.hydrogen_recovery
                        ),
                    ));
                }
                if wanted > 0.0 {
                    let share = (wanted / impurities).min(1.0);
                    for (i, n) in inlet.flows.iter().enumerate() {
                        if i != h2 {
                            product[i] = n * share;
                        }
                    }
                }
            }
            Mode::Split(f) => {
                for (i, n) in inlet.flows.iter().enumerate() {
                    if i != h2 {
                        product[i] = n * f[i];
                    }
                }
            }
        }
        let tail: Vec<f64> = inlet
            .flows
            .iter()
            .zip(&product)
            .map(|(n, p)| (n - p).max(0.0))
            .collect();
        let product = Stream::vapour(product, inlet.temperature_k, p_product);
        let tail = Stream::vapour(tail, inlet.temperature_k, p_tail);
        let figures = vec![
            figure(
                "hydrogen-recovery",
                "hydrogen recovery",
                product.flows[h2] / h2_feed,
                FigureKind::Fraction,
            ),
            figure(
                "product-purity",
                "product purity (H2)",
                product.mole_fraction(h2),
                FigureKind::Fraction,
            ),
            figure(
                "product-flow",
                "product",
                product.total(),
                FigureKind::MolarFlow,
            ),
            figure(
                "tail-gas-flow",
                "tail gas",
                tail.total(),
                FigureKind::MolarFlow,
            ),
            figure(
                "tail-gas-h2",
                "H2 in the tail gas",
                tail.mole_fraction(h2),
                FigureKind::Fraction,
            ),
        ];
        Ok(UnitResult {
            outlets: vec![product, tail],
            duty_w: 0.0,
            approaches: Vec::new(),
            figures,
            equilibrium: None,
            warnings: Vec::new(),
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::units::test_support::{assert_balances, db, fig, gas};

    fn feed(db: &SpeciesDb) -> Stream {
        // A shifted, dried gas (invented demo composition), mol/s.
        gas(
            db,
            &[
                ("H2", 0.75),
                ("CO2", 0.17),
                ("CH4", 0.05),
                ("CO", 0.02),
                ("N2", 0.01),
            ],
            313.15,
            25e5,
        )
    }

    fn spec(product: PurifierProduct) -> PurifierSpec {
        PurifierSpec {
            hydrogen_recovery: 0.88,
            product,
            pressure_drop_pa: 0.5e5,
            tail_gas_pressure_pa: 1.3e5,
        }
    }

    #[test]
    fn purity_and_recovery_are_met_exactly() {
        let db = db();
        let f = feed(&db);
        let r = Purifier::new(&db, "psa", &spec(PurifierProduct::Purity(0.9999)))
            .unwrap()
            .solve(&db, &[&f])
            .unwrap();
        assert_balances(&db, &[&f], &r);
        assert!((fig(&r, "hydrogen-recovery") - 0.88).abs() < 1e-15);
        assert!((fig(&r, "product-purity") - 0.9999).abs() < 1e-14);
        // Impurities in proportion to the feed: CO2/CH4 in the product as in the feed.
        let (co2, ch4) = (db.index_of("CO2").unwrap(), db.index_of("CH4").unwrap());
        let p = &r.outlets[0];
        assert!((p.flows[co2] / p.flows[ch4] - 0.17 / 0.05).abs() < 1e-12);
        assert_eq!(p.pressure_pa, 24.5e5);
        assert_eq!(r.outlets[1].pressure_pa, 1.3e5);
        assert_eq!(r.outlets[1].temperature_k, 313.15);
        // Pure product.
        let r = Purifier::new(&db, "psa", &spec(PurifierProduct::Purity(1.0)))
            .unwrap()
            .solve(&db, &[&f])
            .unwrap();
        assert_balances(&db, &[&f], &r);
        assert_eq!(fig(&r, "product-purity"), 1.0);
    }

    #[test]
    fn impurity_split_and_impossible_specs() {
        let db = db();
        let f = feed(&db);
        let split = PurifierProduct::ImpuritySplit(vec![("N2".into(), 0.1)]);
        let r = Purifier::new(&db, "psa", &spec(split))
            .unwrap()
            .solve(&db, &[&f])
            .unwrap();
        assert_balances(&db, &[&f], &r);
        let n2 = db.index_of("N2").unwrap();
        assert!((r.outlets[0].flows[n2] - 0.001).abs() < 1e-15);
        let purity = 0.88 * 0.75 / (0.88 * 0.75 + 0.001);
        assert!((fig(&r, "product-purity") - purity).abs() < 1e-14);
        // A purity below what the feed's impurities allow at this recovery is impossible.
        let low = Purifier::new(&db, "psa", &spec(PurifierProduct::Purity(0.5))).unwrap();
        let e = low.solve(&db, &[&f]).unwrap_err().to_string();
        assert!(
            e.contains("unit 'psa'") && e.contains("cannot be met"),
            "{e}"
        );
        assert!(Purifier::new(&db, "psa", &spec(PurifierProduct::Purity(1.2))).is_err());
        let h2 = PurifierProduct::ImpuritySplit(vec![("H2".into(), 0.1)]);
        assert!(Purifier::new(&db, "psa", &spec(h2)).is_err());
        let mut high_tail = spec(PurifierProduct::Purity(0.999));
        high_tail.tail_gas_pressure_pa = 30e5;
        let p = Purifier::new(&db, "psa", &high_tail).unwrap();
        assert!(p.solve(&db, &[&f]).is_err());
    }
}

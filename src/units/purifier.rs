//! Hydrogen purifier (e.g. pressure-swing adsorption) as a split: a hydrogen recovery to the
//! product, and either the product purity (mole fraction H2) or the fraction of each impurity
//! that reaches the product (default zero). Outlets [product, tail gas], both at the inlet
//! temperature; the product leaves at the inlet pressure less a pressure drop, the tail gas at
//! its own pressure.
//!
//! With a purity, the impurities allowed into the product are shared out in the order of how
//! weakly an adsorbent holds them (common practice, no single source: helium, argon and
//! nitrogen break through first, then CO, then methane; CO2, water, ammonia and the C2+
//! hydrocarbons are held essentially completely). Each impurity i reaches the product as
//! min(1, w_i s) of its feed amount, one factor s for all chosen so that the product has the
//! purity asked; the weights w_i are [`DEFAULT_IMPURITY_WEIGHTS`] (species not listed: zero),
//! each overridable per flowsheet unit (`impurity-weights`).
//! Isothermal, with no duty: ideal-gas enthalpy does not depend on pressure, so the energy
//! balance closes exactly.

use super::common::{
    check_inlets, check_pressure_drop, figure, outlet_pressure, require_vapour, spec_error, Key,
};
use super::{FigureKind, Stream, StreamPhase, UnitResult};
use crate::error::Result;
use crate::thermo::SpeciesDb;

use super::unit::{
    build, EntryValue, KeyDoc, Ports, UnitBuilder, UnitKind, UnitScratch, UnitType, ValueKind,
};

/// Default weights (0..1) of how readily each impurity reaches the product when a purity is
/// given (common practice: the order of adsorption strength He < Ar ~ N2 < CO < CH4 < CO2 <
/// H2O; the values are screening figures, override them with plant data).
pub const DEFAULT_IMPURITY_WEIGHTS: &[(&str, f64)] = &[
    ("He", 1.0),
    ("Ar", 1.0),
    ("N2", 1.0),
    ("O2", 1.0),
    ("CO", 0.1),
    ("CH4", 0.02),
    ("CO2", 0.0),
    ("H2O", 0.0),
    ("NH3", 0.0),
];

/// What sets the product's impurities.
#[derive(Debug, Clone, PartialEq)]
pub enum PurifierProduct {
    /// Mole fraction of H2 in the product (0 < x <= 1); the impurities shared by their weights.
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
    /// Weights (0..1) overriding [`DEFAULT_IMPURITY_WEIGHTS`] by species name (with a purity).
    pub impurity_weights: Vec<(String, f64)>,
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
    /// Mole fraction H2 in the product, and the weight of every database species (H2: zero).
    Purity(f64, Vec<f64>),
    /// Fraction of each database species to the product (H2 excluded).
    Split(Vec<f64>),
}

/// The weight of every database species: the defaults, then the overrides (checked), H2 zero.
fn weights(db: &SpeciesDb, unit: &str, h2: usize, overrides: &[(String, f64)]) -> Result<Vec<f64>> {
    let mut w = vec![0.0; db.len()];
    for (species, v) in DEFAULT_IMPURITY_WEIGHTS {
        if let Some(i) = db.index_of(species) {
            w[i] = *v;
        }
    }
    for (species, v) in overrides {
        let i = db.require(
            species,
            &format!(" in the impurity weights of unit '{unit}'"),
        )?;
        if i == h2 {
            return Err(spec_error(
                unit,
                "impurity-weights",
                "H2 is not an impurity; set its recovery with hydrogen-recovery",
            ));
        }
        if !(*v >= 0.0 && *v <= 1.0) {
            return Err(spec_error(
                unit,
                "impurity-weights",
                format!("{species}: {v} must be a weight 0..1"),
            ));
        }
        w[i] = *v;
    }
    w[h2] = 0.0;
    Ok(w)
}

/// The fraction of each species' feed that reaches the product, min(1, w_i s), with s such that
/// the product takes `wanted` mol/s of impurities in all, written into `shares` (its buffer
/// reused); false when even every weighted impurity in full falls short. The species that reach
/// their whole feed amount are fixed one round at a time, so at most one round per species;
/// while the rounds go on, `shares` holds 1 for the species so fixed and 0 for the others.
fn weighted_shares(flows: &[f64], weights: &[f64], wanted: f64, shares: &mut Vec<f64>) -> bool {
    let reachable: f64 = flows
        .iter()
        .zip(weights)
        .filter(|(_, w)| **w > 0.0)
        .map(|(n, _)| n)
        .sum();
    if wanted > reachable * (1.0 + 1e-12) {
        return false;
    }
    shares.clear();
    shares.resize(flows.len(), 0.0);
    let full = |share: &f64| *share == 1.0;
    loop {
        let taken: f64 = flows
            .iter()
            .zip(shares.iter())
            .filter(|(_, f)| full(f))
            .map(|(n, _)| n)
            .sum();
        let weighted: f64 = flows
            .iter()
            .zip(weights)
            .zip(shares.iter())
            .filter(|(_, f)| !full(f))
            .map(|((n, w), _)| n * w)
            .sum();
        let s = if weighted > 0.0 {
            (wanted - taken) / weighted
        } else {
            0.0
        };
        let mut changed = false;
        for (share, w) in shares.iter_mut().zip(weights) {
            if !full(share) && *w > 0.0 && w * s >= 1.0 {
                *share = 1.0;
                changed = true;
            }
        }
        if !changed {
            for (share, w) in shares.iter_mut().zip(weights) {
                if !full(share) {
                    *share = (w * s).min(1.0);
                }
            }
            return true;
        }
    }
}

/// The `purifier` unit type.
pub static TYPE: UnitType = UnitType {
    name: "purifier",
    summary: "Hydrogen purifier (pressure-swing adsorption) as a split: a hydrogen recovery to \
              the product and a product purity (impurities shared by how weakly they adsorb) or \
              a split per impurity; isothermal, the tail gas at its own pressure.",
    inlets: Ports::exactly(1, "dry raw hydrogen"),
    outlets: Ports::exactly(2, "product, tail gas"),
    named_ports: None,
    keys: &[
        KeyDoc {
            key: "hydrogen-recovery",
            value: ValueKind::Fraction,
            default: None,
            meaning: "fraction of the inlet hydrogen recovered in the product",
        },
        KeyDoc {
            key: "purity",
            value: ValueKind::Fraction,
            default: None,
            meaning: "hydrogen mole fraction of the product; or `impurity-split`",
        },
        KeyDoc {
            key: "impurity-split",
            value: ValueKind::PerSpecies,
            default: None,
            meaning: "fraction of each impurity (or one fraction for all) reaching the \
                      product; or `purity`",
        },
        KeyDoc {
            key: "impurity-weights",
            value: ValueKind::PerSpecies,
            default: Some("He, Ar, N2, O2 1; CO 0.1; CH4 0.02; others 0"),
            meaning: "with `purity`: how readily each impurity reaches the product, 0..1 \
                      (common practice)",
        },
        KeyDoc {
            key: "tail-gas-pressure",
            value: ValueKind::Pressure,
            default: None,
            meaning: "tail-gas pressure",
        },
        KeyDoc {
            key: "pressure-drop",
            value: ValueKind::PressureDifference,
            default: Some("0 bar"),
            meaning: "pressure lost from the inlet to the product",
        },
    ],
    example: "- name: psa\n  type: purifier\n  from: raw-hydrogen\n  to: [hydrogen-product, \
              psa-tail-gas]\n  hydrogen-recovery: 0.88\n  purity: 0.999\n  \
              tail-gas-pressure: 1.3 bar",
    build: build::<Purifier>,
};

impl UnitKind for Purifier {
    type Spec = PurifierSpec;

    fn read(b: &mut UnitBuilder<'_, '_, PurifierSpec>) -> Result<PurifierSpec> {
        let recovery = b.required("hydrogen-recovery", ValueKind::Fraction, "0.88", |s, v| {
            s.hydrogen_recovery = v
        })?;
        let purity = b.number("purity", ValueKind::Fraction, None, |s, v| {
            s.product = PurifierProduct::Purity(v)
        })?;
        let split = match b.value("impurity-split") {
            None => None,
            Some(EntryValue::Scalar(_)) => {
                let all = b
                    .number("impurity-split", ValueKind::Fraction, None, |s, v| {
                        if let PurifierProduct::ImpuritySplit(pairs) = &mut s.product {
                            pairs.iter_mut().for_each(|p| p.1 = v);
                        }
                    })?
                    .unwrap_or(0.0);
                let db = b.db();
                Some(
                    db.names()
                        .into_iter()
                        .filter(|n| *n != "H2")
                        .map(|n| (n.to_string(), all))
                        .collect::<Vec<_>>(),
                )
            }
            Some(_) => {
                let pairs = b
                    .map("impurity-split", ValueKind::Fraction)?
                    .unwrap_or_default();
                for (k, (species, v)) in pairs.iter().enumerate() {
                    b.register(
                        &format!("impurity-split.{species}"),
                        *v,
                        ValueKind::Fraction,
                        move |s: &mut PurifierSpec, v| {
                            if let PurifierProduct::ImpuritySplit(pairs) = &mut s.product {
                                pairs[k].1 = v;
                            }
                        },
                    );
                }
                Some(pairs)
            }
        };
        let product =
            match (purity, split) {
                (Some(x), None) => PurifierProduct::Purity(x),
                (None, Some(pairs)) => PurifierProduct::ImpuritySplit(pairs),
                (Some(_), Some(_)) => {
                    return Err(b.error(
                        "purity, impurity-split",
                        "give either the product `purity` or the `impurity-split`, not both",
                    ))
                }
                (None, None) => return Err(b.error(
                    "purity",
                    "a purifier needs the product `purity` (e.g. 0.999) or the `impurity-split`",
                )),
            };
        let weights = b
            .map("impurity-weights", ValueKind::Fraction)?
            .unwrap_or_default();
        for (k, (species, v)) in weights.iter().enumerate() {
            b.register(
                &format!("impurity-weights.{species}"),
                *v,
                ValueKind::Fraction,
                move |s: &mut PurifierSpec, v| s.impurity_weights[k].1 = v,
            );
        }
        let tail = b.required(
            "tail-gas-pressure",
            ValueKind::Pressure,
            "1.3 bar",
            |s, v| s.tail_gas_pressure_pa = v,
        )?;
        Ok(PurifierSpec {
            hydrogen_recovery: recovery,
            product,
            pressure_drop_pa: b.pressure_drop(|s, v| s.pressure_drop_pa = v)?,
            tail_gas_pressure_pa: tail,
            impurity_weights: weights,
        })
    }

    /// Check the spec and prepare.
    fn new(db: &SpeciesDb, name: &str, spec: &PurifierSpec) -> Result<Purifier> {
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
                Mode::Purity(*x, weights(db, name, key.h2, &spec.impurity_weights)?)
            }
            PurifierProduct::ImpuritySplit(pairs) => {
                if !spec.impurity_weights.is_empty() {
                    return Err(spec_error(
                        name,
                        "impurity-weights",
                        "go with a product `purity`; with an `impurity-split` each fraction is \
                         given already",
                    ));
                }
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

    fn spec(&self) -> &PurifierSpec {
        &self.spec
    }

    /// Purify into `out` (its buffers and `scratch` reused: no heap allocation once they have
    /// their size); outlets [product, tail gas].
    fn solve_into(
        &self,
        db: &SpeciesDb,
        inlets: &[&Stream],
        _: Option<&[f64]>,
        scratch: &mut UnitScratch,
        out: &mut UnitResult,
    ) -> Result<()> {
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
        out.reset(2, db.len());
        out.equilibrium = None;
        let product = &mut out.outlets[0].flows;
        product[h2] = h2_product;
        match &self.mode {
            Mode::Purity(x, w) => {
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
                    let shares = &mut scratch.flows[0];
                    if !weighted_shares(&inlet.flows, w, wanted, shares) {
                        let reachable: f64 = inlet
                            .flows
                            .iter()
                            .zip(w)
                            .filter(|(_, w)| **w > 0.0)
                            .map(|(n, _)| n)
                            .sum();
                        return Err(spec_error(
                            name,
                            "purity",
                            format!(
                                "{x} cannot be met: the product would need {wanted:.6} mol/s of \
                                 impurities, but those that reach it (a weight above zero) \
                                 amount to {reachable:.6} mol/s in the feed; raise the purity or \
                                 give `impurity-weights` for the others"
                            ),
                        ));
                    }
                    for (i, f) in shares.iter().enumerate() {
                        if i != h2 {
                            product[i] = inlet.flows[i] * f;
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
        let (first, second) = out.outlets.split_at_mut(1);
        let (product, tail) = (&mut first[0], &mut second[0]);
        for ((t, n), p) in tail.flows.iter_mut().zip(&inlet.flows).zip(&product.flows) {
            *t = (n - p).max(0.0);
        }
        product.temperature_k = inlet.temperature_k;
        product.pressure_pa = p_product;
        product.phase = StreamPhase::Vapour;
        tail.temperature_k = inlet.temperature_k;
        tail.pressure_pa = p_tail;
        tail.phase = StreamPhase::Vapour;
        let (product, tail) = (&out.outlets[0], &out.outlets[1]);
        out.figures.extend([
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
                "hydrogen-product",
                "hydrogen in the product",
                product.flows[h2],
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
        ]);
        Ok(())
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
            impurity_weights: Vec::new(),
        }
    }

    #[test]
    fn purity_and_recovery_are_met_exactly() {
        let db = db();
        let f = feed(&db);
        let r = Purifier::new(&db, "psa", &spec(PurifierProduct::Purity(0.9999)))
            .unwrap()
            .solve(&db, &[&f], None)
            .unwrap();
        assert_balances(&db, &[&f], &r);
        assert!((fig(&r, "hydrogen-recovery") - 0.88).abs() < 1e-15);
        assert!((fig(&r, "product-purity") - 0.9999).abs() < 1e-14);
        // Impurities by their default weights (common practice): N2 1, CO 0.1, CH4 0.02, CO2
        // none. The product's 0.88 * 0.75 * 1e-4 / 0.9999 mol/s of impurities is shared as
        // s (0.01 + 0.1 * 0.02 + 0.02 * 0.05) = wanted.
        let by = |n: &str| db.index_of(n).unwrap();
        let p = &r.outlets[0];
        let wanted = 0.88 * 0.75 * 1e-4 / 0.9999;
        let s = wanted / (0.01 + 0.1 * 0.02 + 0.02 * 0.05);
        assert!((p.flows[by("N2")] - 0.01 * s).abs() < 1e-15);
        assert!((p.flows[by("CO")] - 0.02 * 0.1 * s).abs() < 1e-15);
        assert!((p.flows[by("CH4")] - 0.05 * 0.02 * s).abs() < 1e-15);
        assert_eq!(p.flows[by("CO2")], 0.0);
        assert_eq!(p.pressure_pa, 24.5e5);
        assert_eq!(r.outlets[1].pressure_pa, 1.3e5);
        assert_eq!(r.outlets[1].temperature_k, 313.15);
        // Pure product.
        let r = Purifier::new(&db, "psa", &spec(PurifierProduct::Purity(1.0)))
            .unwrap()
            .solve(&db, &[&f], None)
            .unwrap();
        assert_balances(&db, &[&f], &r);
        assert_eq!(fig(&r, "product-purity"), 1.0);
    }

    #[test]
    fn weights_cap_at_the_whole_feed_amount_and_can_be_overridden() {
        let db = db();
        let f = feed(&db);
        let by = |n: &str| db.index_of(n).unwrap();
        // Purity 0.95 at 88 % recovery: 0.66 * 0.05 / 0.95 = 0.03474 mol/s of impurities; the
        // 0.01 of N2 all goes (its share would exceed one), CO and CH4 share the rest 0.1 : 0.02.
        let r = Purifier::new(&db, "psa", &spec(PurifierProduct::Purity(0.95)))
            .unwrap()
            .solve(&db, &[&f], None)
            .unwrap();
        assert_balances(&db, &[&f], &r);
        let p = &r.outlets[0];
        assert!((fig(&r, "product-purity") - 0.95).abs() < 1e-14);
        assert!((p.flows[by("N2")] - 0.01).abs() < 1e-15);
        let rest = 0.66 * 0.05 / 0.95 - 0.01;
        let s = rest / (0.1 * 0.02 + 0.02 * 0.05);
        assert!(0.1 * s < 1.0);
        assert!((p.flows[by("CO")] - 0.1 * s * 0.02).abs() < 1e-14);
        // An override lets CO2 through as readily as N2.
        let mut with_co2 = spec(PurifierProduct::Purity(0.999));
        with_co2.impurity_weights = vec![("CO2".into(), 1.0)];
        let r = Purifier::new(&db, "psa", &with_co2)
            .unwrap()
            .solve(&db, &[&f], None)
            .unwrap();
        let p = &r.outlets[0];
        assert!((p.flows[by("CO2")] / p.flows[by("N2")] - 17.0).abs() < 1e-9);
        // Only held impurities in the feed: the purity cannot be met, and the error says why.
        let held = gas(&db, &[("H2", 0.75), ("CO2", 0.25)], 313.15, 25e5);
        let e = Purifier::new(&db, "psa", &spec(PurifierProduct::Purity(0.999)))
            .unwrap()
            .solve(&db, &[&held], None)
            .unwrap_err()
            .to_string();
        assert!(e.contains("impurity-weights"), "{e}");
        // Weights are checked.
        let mut bad = spec(PurifierProduct::Purity(0.999));
        bad.impurity_weights = vec![("CO".into(), 1.5)];
        assert!(Purifier::new(&db, "psa", &bad).is_err());
        bad.impurity_weights = vec![("H2".into(), 0.5)];
        assert!(Purifier::new(&db, "psa", &bad).is_err());
    }

    #[test]
    fn impurity_split_and_impossible_specs() {
        let db = db();
        let f = feed(&db);
        let split = PurifierProduct::ImpuritySplit(vec![("N2".into(), 0.1)]);
        let r = Purifier::new(&db, "psa", &spec(split))
            .unwrap()
            .solve(&db, &[&f], None)
            .unwrap();
        assert_balances(&db, &[&f], &r);
        let n2 = db.index_of("N2").unwrap();
        assert!((r.outlets[0].flows[n2] - 0.001).abs() < 1e-15);
        let purity = 0.88 * 0.75 / (0.88 * 0.75 + 0.001);
        assert!((fig(&r, "product-purity") - purity).abs() < 1e-14);
        // A purity below what the feed's impurities allow at this recovery is impossible.
        let low = Purifier::new(&db, "psa", &spec(PurifierProduct::Purity(0.5))).unwrap();
        let e = low.solve(&db, &[&f], None).unwrap_err().to_string();
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
        assert!(p.solve(&db, &[&f], None).is_err());
    }
}

//! Rebuilding a reactor outlet from its inlet and a measured dry analysis: the extents of the
//! unit's reactions that make the rebuilt dry analysis come nearest the measured one, by
//! weighted least squares (Gauss-Newton, each residual divided by the analyser's accuracy for
//! that species; the normal equations solved by Cholesky with nalgebra).
//!
//! A gross error in one species is found by the global test and serial elimination of data
//! reconciliation (Narasimhan & Jordache, "Data Reconciliation and Gross Error Detection",
//! 2000, ch. 7-8): when the weighted sum of squares passes the 95 % point of chi-square with
//! (species - reactions) degrees of freedom (Wilson & Hilferty 1931 approximation), each
//! species is left out in turn and the one whose removal lowers the sum most is named, with its
//! misfit against the fit made without it.

use nalgebra::{DMatrix, DVector};

use crate::error::{Error, Result};
use crate::reaction::Reaction;
use crate::thermo::SpeciesDb;

/// The weighted least-squares fit of the extents to a dry analysis.
#[derive(Debug, Clone, PartialEq)]
pub struct ExtentFit {
    /// Extent of each reaction, mol/s (positive: as written).
    pub extents: Vec<f64>,
    /// The rebuilt wet outlet, mol/s per database species.
    pub outlet_flows: Vec<f64>,
    /// The rebuilt dry mol % of each measured species, in the order given.
    pub fitted_pct: Vec<f64>,
    /// Sum of squared residuals, each over its accuracy.
    pub chi_square: f64,
    /// Gauss-Newton iterations.
    pub iterations: usize,
}

/// What is measured: (database index, dry mol %, accuracy as absolute mol %).
pub type Measurement = (usize, f64, f64);

/// Fit the extents of `reactions` to the measured dry analysis: the outlet is
/// `inlet + sum_j nu_j extent_j` (mol/s per database species), its dry mol % held against the
/// measurements, each residual weighted by 1/accuracy^2. `start` is where Gauss-Newton starts
/// (zero extents where `None`). Every flow stays positive where the inlet or a reaction makes
/// the species (a step that would make one negative is halved).
pub fn fit_extents(
    db: &SpeciesDb,
    reactions: &[Reaction],
    inlet: &[f64],
    measured: &[Measurement],
    start: Option<&[f64]>,
) -> Result<ExtentFit> {
    let nr = reactions.len();
    let m = measured.len();
    let water = db.index_of("H2O");
    let bad = |reason: String| Error::InvalidValue {
        field: "analysis fit".into(),
        value: format!("{m} species, {nr} reactions"),
        reason,
    };
    if m < nr || nr == 0 {
        return Err(bad(format!(
            "a fit of {nr} extent(s) needs at least as many measured species"
        )));
    }
    // Stoichiometry by species (dense over the database) and the dry mole change per extent.
    let mut nu = vec![vec![0.0; nr]; db.len()];
    for (j, r) in reactions.iter().enumerate() {
        for (i, c) in &r.stoichiometry {
            nu[*i][j] = *c;
        }
    }
    let dry_change: Vec<f64> = (0..nr)
        .map(|j| {
            (0..db.len())
                .filter(|i| Some(*i) != water)
                .map(|i| nu[i][j])
                .sum()
        })
        .collect();
    let outlet = |x: &[f64]| -> Vec<f64> {
        (0..db.len())
            .map(|i| inlet[i] + (0..nr).map(|j| nu[i][j] * x[j]).sum::<f64>())
            .collect()
    };
    let admissible = |n: &[f64]| {
        n.iter().enumerate().all(|(i, v)| {
            v.is_finite() && (*v > 0.0 || (inlet[i] == 0.0 && nu[i].iter().all(|c| *c == 0.0)))
        })
    };
    // Residuals (weighted) and Jacobian at x.
    let evaluate = |n: &[f64]| -> (DVector<f64>, DMatrix<f64>, Vec<f64>) {
        let dry: f64 = (0..db.len())
            .filter(|i| Some(*i) != water)
            .map(|i| n[i])
            .sum();
        let mut r = DVector::zeros(m);
        let mut jac = DMatrix::zeros(m, nr);
        let mut pct = Vec::with_capacity(m);
        for (k, (i, value, sigma)) in measured.iter().enumerate() {
            let y = 100.0 * n[*i] / dry;
            pct.push(y);
            r[k] = (y - value) / sigma;
            for j in 0..nr {
                jac[(k, j)] = 100.0 * (nu[*i][j] - n[*i] / dry * dry_change[j]) / dry / sigma;
            }
        }
        (r, jac, pct)
    };
    let mut x: Vec<f64> = match start {
        Some(s) if s.len() == nr && admissible(&outlet(s)) => s.to_vec(),
        _ => vec![0.0; nr],
    };
    if !admissible(&outlet(&x)) {
        return Err(bad("the inlet does not give a valid outlet".into()));
    }
    let scale = inlet.iter().sum::<f64>().max(1e-30);
    let mut iterations = 0;
    loop {
        let n = outlet(&x);
        let (r, jac, _) = evaluate(&n);
        let chi = r.norm_squared();
        let normal = jac.transpose() * &jac;
        let gradient = jac.transpose() * &r;
        let Some(chol) = normal.clone().cholesky() else {
            return Err(bad(
                "the measured species do not tell the extents apart (the fit is singular); \
                 measure the species the reactions make and use"
                    .into(),
            ));
        };
        let step = chol.solve(&(-gradient));
        // Halve the step until every flow stays positive and the sum of squares does not grow.
        let mut t = 1.0;
        let mut accepted = None;
        for _ in 0..60 {
            let trial: Vec<f64> = x.iter().zip(step.iter()).map(|(a, d)| a + t * d).collect();
            let nt = outlet(&trial);
            if admissible(&nt) && evaluate(&nt).0.norm_squared() <= chi * (1.0 + 1e-12) + 1e-300 {
                accepted = Some(trial);
                break;
            }
            t *= 0.5;
        }
        iterations += 1;
        let moved = step.iter().fold(0.0f64, |a, d| a.max((t * d).abs()));
        let stuck = accepted.is_none();
        if let Some(trial) = accepted {
            x = trial;
        }
        if stuck || moved <= 1e-13 * scale || iterations >= 100 {
            break;
        }
    }
    let n = outlet(&x);
    let (r, _, fitted_pct) = evaluate(&n);
    Ok(ExtentFit {
        extents: x,
        outlet_flows: n,
        fitted_pct,
        chi_square: r.norm_squared(),
        iterations,
    })
}

/// A species the analysis does not fit: its database index and measured minus expected dry
/// mol %, the expectation from the fit made without it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct GrossError {
    /// Database index of the species.
    pub species: usize,
    /// Measured minus expected, mol % dry.
    pub misfit_pct: f64,
    /// Its analyser accuracy, mol % dry.
    pub accuracy_pct: f64,
}

/// Misfits larger than this many accuracies are reported.
pub const MISFIT_ACCURACIES: f64 = 3.0;

/// The global test and serial elimination (module docs): the species whose removal lowers the
/// weighted sum of squares most, when the full fit fails the test and its misfit passes
/// [`MISFIT_ACCURACIES`] accuracies; `None` when the analysis fits, or with no spare species.
pub fn gross_error(
    db: &SpeciesDb,
    reactions: &[Reaction],
    inlet: &[f64],
    measured: &[Measurement],
    full: &ExtentFit,
) -> Option<GrossError> {
    let dof = measured.len().checked_sub(reactions.len() + 1)? + 1;
    if measured.len() < reactions.len() + 2 || full.chi_square <= chi_square_95(dof as f64) {
        return None;
    }
    let mut best: Option<(f64, GrossError)> = None;
    for k in 0..measured.len() {
        let rest: Vec<Measurement> = measured
            .iter()
            .enumerate()
            .filter(|(q, _)| *q != k)
            .map(|(_, v)| *v)
            .collect();
        let Ok(fit) = fit_extents(db, reactions, inlet, &rest, Some(&full.extents)) else {
            continue;
        };
        let (i, value, sigma) = measured[k];
        let dry: f64 = fit
            .outlet_flows
            .iter()
            .enumerate()
            .filter(|(q, _)| db.by_index(*q).name != "H2O")
            .map(|(_, v)| v)
            .sum();
        let expected = 100.0 * fit.outlet_flows[i] / dry;
        let drop = full.chi_square - fit.chi_square;
        if best.as_ref().is_none_or(|(d, _)| drop > *d) {
            best = Some((
                drop,
                GrossError {
                    species: i,
                    misfit_pct: value - expected,
                    accuracy_pct: sigma,
                },
            ));
        }
    }
    best.map(|(_, g)| g)
        .filter(|g| g.misfit_pct.abs() > MISFIT_ACCURACIES * g.accuracy_pct)
}

/// The 95 % point of chi-square with `k` degrees of freedom, by the approximation of Wilson &
/// Hilferty (1931) for k >= 3: k (1 - 2/(9k) + z sqrt(2/(9k)))^3 with z = 1.6449 (within
/// 0.6 %); exact for k = 1 (z^2 with z = 1.95996) and k = 2 (-2 ln 0.05).
pub fn chi_square_95(k: f64) -> f64 {
    if k <= 1.0 {
        return 1.959_963_985_f64.powi(2);
    }
    if k <= 2.0 {
        return -2.0 * 0.05f64.ln();
    }
    let a = 2.0 / (9.0 * k);
    k * (1.0 - a + 1.644_853_6 * a.sqrt()).powi(3)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn db() -> SpeciesDb {
        SpeciesDb::embedded().unwrap()
    }

    #[test]
    fn chi_square_points_match_the_tables() {
        // Abramowitz & Stegun (1964), Table 26.8, upper 5 % points (values from memory): 3.841 (1), 5.991 (2),
        // 7.815 (3), 11.070 (5), 18.307 (10); exact forms for 1 and 2, Wilson-Hilferty within
        // 0.6 % from 3.
        for (k, table, within) in [
            (1.0, 3.841, 2e-4),
            (2.0, 5.991, 2e-4),
            (3.0, 7.815, 0.006),
            (5.0, 11.070, 0.006),
            (10.0, 18.307, 0.006),
        ] {
            let v = chi_square_95(k);
            assert!((v / table - 1.0).abs() < within, "{k}: {v}");
        }
    }

    #[test]
    fn an_exact_analysis_gives_its_extent_back() {
        // Invented gas at a shift inlet, 0.2 mol/s of CO shifted: the dry analysis of that
        // outlet must give 0.2 back (an identity of the balance, no outside data needed).
        let db = db();
        let shift = Reaction::named(&db, "shift").unwrap();
        let mut inlet = vec![0.0; db.len()];
        for (s, n) in [
            ("H2", 5.0),
            ("CO", 1.2),
            ("CO2", 0.6),
            ("CH4", 0.3),
            ("H2O", 3.5),
            ("N2", 0.05),
        ] {
            inlet[db.index_of(s).unwrap()] = n;
        }
        let mut out = inlet.clone();
        for (i, c) in &shift.stoichiometry {
            out[*i] += 0.2 * c;
        }
        let dry: f64 = ["H2", "CO", "CO2", "CH4", "N2"]
            .iter()
            .map(|s| out[db.index_of(s).unwrap()])
            .sum();
        let measured: Vec<Measurement> = ["H2", "CO", "CO2", "CH4", "N2"]
            .iter()
            .map(|s| {
                let i = db.index_of(s).unwrap();
                (i, 100.0 * out[i] / dry, 0.05)
            })
            .collect();
        let fit = fit_extents(&db, std::slice::from_ref(&shift), &inlet, &measured, None).unwrap();
        assert!((fit.extents[0] - 0.2).abs() < 1e-10, "{:?}", fit.extents);
        assert!(fit.chi_square < 1e-16);
        assert!(gross_error(&db, std::slice::from_ref(&shift), &inlet, &measured, &fit).is_none());
        // 1 mol % too much CO2: named, with a misfit near +1 mol %.
        let mut wrong = measured.clone();
        wrong[2].1 += 1.0;
        let fit = fit_extents(&db, std::slice::from_ref(&shift), &inlet, &wrong, None).unwrap();
        let g = gross_error(&db, &[shift], &inlet, &wrong, &fit).unwrap();
        assert_eq!(db.by_index(g.species).name, "CO2");
        assert!((g.misfit_pct - 1.0).abs() < 0.05, "{g:?}");
    }
}

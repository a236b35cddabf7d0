//! Revamp options under uncertainty: every option and the base solved for the same random draws
//! of the uncertain inputs (common random numbers), so that the spread of each option's change
//! against the base is the spread that matters, not the spread of each flowsheet alone.
//!
//! Draw `i` gives every flowsheet the same values (the distributions are read on each
//! flowsheet from the same text, and a draw depends on the seed and its index alone, see
//! [`super::distribution`]). Each draw solves the base and every option cold (no warm start),
//! so the figures do not depend on the thread count. A draw in which any flowsheet fails is
//! left out of every spread and counted. Percentiles: Hyndman & Fan definition 7
//! ([`super::percentiles`]).

use rayon::prelude::*;

use super::cases::CaseList;
use super::compare::{figures, Solved};
use super::percentiles::{spread, Spread};
use super::vary::{parse_vary, InputTarget};
use crate::error::{Error, Result};
use crate::thermo::SpeciesDb;

/// The spread of one figure's change (option minus base) over the draws.
#[derive(Debug, Clone)]
pub struct ChangeSpread {
    /// The figure path (as in `compare`'s rows: `summary.co_slip_percent_dry.lts`, ...).
    pub figure: String,
    /// The spread of the base's value.
    pub base: Option<Spread>,
    /// The spread of the change, option minus base, draw by draw.
    pub change: Option<Spread>,
}

/// The changes of one option.
#[derive(Debug, Clone)]
pub struct OptionSpread {
    /// The option's name.
    pub name: String,
    /// One entry per figure both flowsheets have, in the base's order.
    pub figures: Vec<ChangeSpread>,
}

/// The outcome of a study of options under uncertainty.
#[derive(Debug, Clone)]
pub struct DrawsOutcome {
    /// Draws asked.
    pub draws: u64,
    /// Draws in which some flowsheet failed (left out).
    pub failed: u64,
    /// The first failure met, as text, if any.
    pub first_failure: Option<String>,
    /// The base's name.
    pub base: String,
    /// Per option.
    pub options: Vec<OptionSpread>,
}

/// Solve the base and every option (`solved[0]` is the base) for `draws` draws of the `vary`
/// distributions seeded with `seed`.
pub fn compare_draws(
    db: &SpeciesDb,
    solved: &[Solved],
    vary: &[String],
    draws: u64,
    seed: u64,
) -> Result<DrawsOutcome> {
    if solved.len() < 2 {
        return Err(invalid(
            "compare",
            "",
            "give a base and at least one option",
        ));
    }
    if vary.is_empty() {
        return Err(invalid(
            "--vary",
            "",
            "give the uncertain inputs, e.g. --vary 'units.lts.approach.shift~normal(10 K, 3 K)'",
        ));
    }
    // One case list per flowsheet from the same text: the same draws for all.
    let lists = solved
        .iter()
        .map(|s| {
            let varies = vary
                .iter()
                .map(|v| parse_vary(&s.case.flowsheet, v))
                .collect::<Result<Vec<_>>>()
                .map_err(|e| e.context(format!("in {}", s.case.file.display())))?;
            let list = CaseList::draws(varies, draws, seed)?;
            if let Some(i) = list
                .inputs
                .iter()
                .find(|i| matches!(i.target, InputTarget::SteamToCarbon { .. }))
            {
                return Err(invalid(
                    "--vary",
                    &i.path,
                    "a steam-to-carbon ratio is set by a design target; vary the steam feed's \
                     total instead in a comparison",
                ));
            }
            Ok(list)
        })
        .collect::<Result<Vec<_>>>()?;
    // An option that sets a drawn input itself would have its change overwritten by the draw.
    for (c, s) in solved.iter().enumerate().skip(1) {
        for (k, input) in lists[c].inputs.iter().enumerate() {
            let (InputTarget::Slot(p, _), InputTarget::Slot(q, _)) =
                (&input.target, &lists[0].inputs[k].target)
            else {
                continue;
            };
            let (mine, base) = (s.case.parameters[p.0], solved[0].case.parameters[q.0]);
            if mine.to_bits() != base.to_bits() {
                return Err(invalid(
                    "--vary",
                    &input.path,
                    &format!(
                        "option '{}' sets this input itself; a draw would overwrite its \
                         change. Draw inputs the options leave as the base has them",
                        s.case.name
                    ),
                ));
            }
        }
    }
    let names: Vec<Vec<String>> = solved
        .iter()
        .map(|s| figures(db, &s.result).into_iter().map(|f| f.0).collect())
        .collect();
    let n_inputs = vary.len();
    // values[i][c][k]: draw i, flowsheet c, figure k of that flowsheet (NaN where missing).
    let per_draw: Vec<std::result::Result<Vec<Vec<f64>>, String>> = (0..draws)
        .into_par_iter()
        .map_init(
            || {
                let ws: Vec<_> = solved
                    .iter()
                    .map(|s| s.case.flowsheet.workspace(db))
                    .collect();
                (ws, vec![0.0; n_inputs], vec![0.0; n_inputs], Vec::new())
            },
            |(ws, shown, si, outcomes), i| {
                let mut all = Vec::with_capacity(solved.len());
                for (c, s) in solved.iter().enumerate() {
                    lists[c].case(i, shown, si);
                    let mut params = s.case.parameters.clone();
                    for (input, v) in lists[c].inputs.iter().zip(si.iter()) {
                        if let InputTarget::Slot(p, _) = input.target {
                            params[p.0] = *v;
                        }
                    }
                    ws[c].forget();
                    let result = s
                        .case
                        .flowsheet
                        .solve_targets_in(db, &mut params, &[], &mut ws[c], outcomes)
                        .map_err(|e| format!("{}: {}", s.case.name, super::sweep::one_line(&e)))?;
                    let got = figures(db, result);
                    let row: Vec<f64> = names[c]
                        .iter()
                        .map(|name| {
                            got.iter()
                                .find(|(p, _)| p == name)
                                .map_or(f64::NAN, |(_, v)| *v)
                        })
                        .collect();
                    all.push(row);
                }
                Ok(all)
            },
        )
        .collect();
    let failed = per_draw.iter().filter(|d| d.is_err()).count() as u64;
    let first_failure = per_draw.iter().find_map(|d| d.as_ref().err().cloned());
    let ok: Vec<&Vec<Vec<f64>>> = per_draw.iter().filter_map(|d| d.as_ref().ok()).collect();
    let mut options = Vec::new();
    for (c, s) in solved.iter().enumerate().skip(1) {
        let mut list = Vec::new();
        for (k, figure) in names[0].iter().enumerate() {
            let Some(j) = names[c].iter().position(|n| n == figure) else {
                continue;
            };
            let base: Vec<f64> = ok.iter().map(|d| d[0][k]).collect();
            let change: Vec<f64> = ok.iter().map(|d| d[c][j] - d[0][k]).collect();
            list.push(ChangeSpread {
                figure: figure.clone(),
                base: spread(&base),
                change: spread(&change),
            });
        }
        options.push(OptionSpread {
            name: s.case.name.clone(),
            figures: list,
        });
    }
    Ok(DrawsOutcome {
        draws,
        failed,
        first_failure,
        base: solved[0].case.name.clone(),
        options,
    })
}

fn invalid(field: &str, value: &str, reason: &str) -> Error {
    Error::InvalidValue {
        field: field.to_string(),
        value: value.to_string(),
        reason: reason.to_string(),
    }
}

//! Runs the equilibrium stage of the benchmarks N times for instruction counts under callgrind:
//! `valgrind --tool=callgrind target/release/examples/profile_stage KIND N`, KIND one of
//! `cold` (isothermal reforming + shift, cold start), `warm` (the same, warm-started from a
//! neighbouring answer) and `shift` (adiabatic HTS). Run with two values of N and take the
//! difference to remove the start-up.

use syntrain::equilibrium::*;
use syntrain::reaction::Reaction;
use syntrain::thermo::SpeciesDb;

fn stage(db: &SpeciesDb, names: &[&str]) -> EquilibriumStage {
    let reactions = names
        .iter()
        .map(|n| StageReaction {
            reaction: Reaction::named(db, n).unwrap(),
            approach_k: 0.0,
            direction: if *n == "reforming" {
                Direction::Forward
            } else {
                Direction::Auto
            },
        })
        .collect();
    EquilibriumStage::new(db, reactions).unwrap()
}

fn flows(db: &SpeciesDb, pairs: &[(&str, f64)]) -> Vec<f64> {
    let mut v = vec![0.0; db.len()];
    for (n, x) in pairs {
        v[db.index_of(n).unwrap()] = *x;
    }
    v
}

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let kind = args.get(1).map_or("cold", String::as_str);
    let n: usize = args.get(2).and_then(|s| s.parse().ok()).unwrap_or(1000);
    let db = SpeciesDb::embedded().unwrap();
    let mut ws = StageWorkspace::new();
    let mut out = StageResult::default();
    let (st, feed, t_in, mode) = if kind == "shift" {
        let feed = flows(
            &db,
            &[
                ("H2", 0.479),
                ("CO", 0.0906),
                ("CO2", 0.0559),
                ("CH4", 0.0343),
                ("H2O", 0.3384),
                ("N2", 0.0018),
            ],
        );
        (stage(&db, &["shift"]), feed, 623.15, EnergyMode::Adiabatic)
    } else {
        let feed = flows(
            &db,
            &[
                ("CH4", 0.27),
                ("H2O", 0.82),
                ("CO2", 0.002),
                ("H2", 0.01),
                ("N2", 0.004),
            ],
        );
        let mode = EnergyMode::FixedTemperature {
            temperature_k: 1138.15,
        };
        (stage(&db, &["reforming", "shift"]), feed, 773.15, mode)
    };
    let inlet = StageInlet {
        flows: &feed,
        temperature_k: t_in,
        pressure_pa: 28e5,
    };
    // The warm start is the answer 5 K lower, as in the benchmark.
    let neighbour = match mode {
        EnergyMode::FixedTemperature { temperature_k } => EnergyMode::FixedTemperature {
            temperature_k: temperature_k - 5.0,
        },
        other => other,
    };
    st.solve_into(
        &db,
        inlet,
        neighbour,
        SolveSettings::default(),
        &mut ws,
        &mut out,
    )
    .unwrap();
    let guess = out.extents.clone();
    let mut sum = 0.0;
    for i in 0..n {
        let settings = SolveSettings {
            guess: (kind == "warm").then_some(&guess[..]),
            ..SolveSettings::default()
        };
        // A neighbouring case: the outlet temperature a little different each time.
        let mode = match mode {
            EnergyMode::FixedTemperature { temperature_k } => EnergyMode::FixedTemperature {
                temperature_k: temperature_k + 1e-9 * (i % 7) as f64,
            },
            other => other,
        };
        st.solve_into(&db, inlet, mode, settings, &mut ws, &mut out)
            .unwrap();
        sum += out.outlet_temperature_k;
    }
    println!("{kind} {n} {sum}");
}

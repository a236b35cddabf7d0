//! Benchmarks of the equilibrium stage on typical gases: an isothermal reforming + shift stage
//! (reformer outlet, 865 degC, 28 bar, S/C 3) cold and warm-started from a neighbouring answer as
//! a sweep would, an adiabatic shift stage (HTS from 350 degC), and an adiabatic reforming +
//! shift stage whose hot steam-rich feed cools by about 300 K (a temperature search that needs
//! its bisection safeguard). Each is measured through `solve` (fresh result, allocating) and
//! through `solve_into` with a reused workspace and result (no allocation), the entry a sweep
//! uses.

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use syntrain::equilibrium::*;
use syntrain::reaction::Reaction;
use syntrain::thermo::SpeciesDb;

fn stage(db: &SpeciesDb, names: &[(&str, f64)]) -> EquilibriumStage {
    EquilibriumStage::new(
        db,
        names
            .iter()
            .map(|(n, a)| StageReaction {
                reaction: Reaction::named(db, n).unwrap(),
                approach_k: *a,
                direction: if *n == "reforming" {
                    Direction::Forward
                } else {
                    Direction::Auto
                },
            })
            .collect(),
    )
    .unwrap()
}

fn flows(db: &SpeciesDb, pairs: &[(&str, f64)]) -> Vec<f64> {
    let mut v = vec![0.0; db.len()];
    for (n, x) in pairs {
        v[db.index_of(n).unwrap()] = *x;
    }
    v
}

fn benches(c: &mut Criterion) {
    let db = SpeciesDb::embedded().unwrap();
    let reformer = stage(&db, &[("reforming", 0.0), ("shift", 0.0)]);
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
    let inlet = StageInlet {
        flows: &feed,
        temperature_k: 773.15,
        pressure_pa: 28e5,
    };
    let mode = EnergyMode::FixedTemperature {
        temperature_k: 1138.15,
    };
    c.bench_function("reformer isothermal, cold start", |b| {
        b.iter(|| reformer.solve(&db, black_box(inlet), mode, None).unwrap())
    });
    let mut ws = StageWorkspace::new();
    let mut out = StageResult::default();
    c.bench_function("reformer isothermal, cold start, workspace", |b| {
        b.iter(|| {
            reformer
                .solve_into(
                    &db,
                    black_box(inlet),
                    mode,
                    SolveSettings::default(),
                    &mut ws,
                    &mut out,
                )
                .unwrap()
        })
    });
    let previous = reformer
        .solve(
            &db,
            inlet,
            EnergyMode::FixedTemperature {
                temperature_k: 1133.15,
            },
            None,
        )
        .unwrap();
    c.bench_function(
        "reformer isothermal, warm start from a 5 K neighbour",
        |b| {
            b.iter(|| {
                reformer
                    .solve(&db, black_box(inlet), mode, Some(&previous.extents))
                    .unwrap()
            })
        },
    );
    let warm = SolveSettings {
        guess: Some(&previous.extents),
        ..SolveSettings::default()
    };
    c.bench_function(
        "reformer isothermal, warm start from a 5 K neighbour, workspace",
        |b| {
            b.iter(|| {
                reformer
                    .solve_into(&db, black_box(inlet), mode, warm, &mut ws, &mut out)
                    .unwrap()
            })
        },
    );

    let shift = stage(&db, &[("shift", 0.0)]);
    let gas = flows(
        &db,
        &[
            ("H2", 0.49),
            ("CO", 0.105),
            ("CO2", 0.055),
            ("CH4", 0.035),
            ("H2O", 0.31),
            ("N2", 0.005),
        ],
    );
    let hts = StageInlet {
        flows: &gas,
        temperature_k: 623.15,
        pressure_pa: 27e5,
    };
    c.bench_function("shift adiabatic, cold start", |b| {
        b.iter(|| {
            shift
                .solve(&db, black_box(hts), EnergyMode::Adiabatic, None)
                .unwrap()
        })
    });
    c.bench_function("shift adiabatic, cold start, workspace", |b| {
        b.iter(|| {
            shift
                .solve_into(
                    &db,
                    black_box(hts),
                    EnergyMode::Adiabatic,
                    SolveSettings::default(),
                    &mut ws,
                    &mut out,
                )
                .unwrap()
        })
    });

    let hot = flows(
        &db,
        &[
            ("CH4", 1.0),
            ("H2O", 4.993625800230868),
            ("CO2", 0.018121932251066505),
            ("H2", 0.047275141812904015),
            ("N2", 0.003677059969671648),
        ],
    );
    let hot_inlet = StageInlet {
        flows: &hot,
        temperature_k: 1058.680744646038,
        pressure_pa: 175627.38526608754,
    };
    c.bench_function("reformer adiabatic, hot steam-rich feed", |b| {
        b.iter(|| {
            reformer
                .solve(&db, black_box(hot_inlet), EnergyMode::Adiabatic, None)
                .unwrap()
        })
    });
    c.bench_function("reformer adiabatic, hot steam-rich feed, workspace", |b| {
        b.iter(|| {
            reformer
                .solve_into(
                    &db,
                    black_box(hot_inlet),
                    EnergyMode::Adiabatic,
                    SolveSettings::default(),
                    &mut ws,
                    &mut out,
                )
                .unwrap()
        })
    });
}

criterion_group!(equilibrium, benches);
criterion_main!(equilibrium);

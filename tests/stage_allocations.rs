//! A warm stage solve through `solve_into` makes no heap allocation: the workspace and the
//! result keep their buffers between solves. Checked with a counting global allocator (the only
//! global allocator of this test binary) that counts the allocations of the calling thread.

mod common;

use syntrain::equilibrium::*;
use syntrain::reaction::Reaction;
use syntrain::thermo::SpeciesDb;

#[global_allocator]
static GLOBAL: common::alloc::Counting = common::alloc::Counting;

fn stage(db: &SpeciesDb, reactions: &[(&str, f64, Direction)]) -> EquilibriumStage {
    EquilibriumStage::new(
        db,
        reactions
            .iter()
            .map(|(name, approach, direction)| StageReaction {
                reaction: Reaction::named(db, name).unwrap(),
                approach_k: *approach,
                direction: *direction,
            })
            .collect(),
    )
    .unwrap()
}

fn flows(db: &SpeciesDb, pairs: &[(&str, f64)]) -> Vec<f64> {
    let mut v = vec![0.0; db.len()];
    for (name, n) in pairs {
        v[db.index_of(name).unwrap()] = *n;
    }
    v
}

#[test]
fn warm_solves_do_not_allocate() {
    let db = SpeciesDb::embedded().unwrap();
    // Reformer outlet at 865 degC and 28 bar, S/C 3 (the benchmark's case; invented feed).
    let reformer = stage(
        &db,
        &[
            ("reforming", 0.0, Direction::Forward),
            ("shift", 0.0, Direction::Auto),
        ],
    );
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
    let isothermal = EnergyMode::FixedTemperature {
        temperature_k: 1138.15,
    };
    // High-temperature shift from 350 degC, adiabatic (invented gas).
    let shift = stage(&db, &[("shift", 0.0, Direction::Auto)]);
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
    let neighbour = reformer
        .solve(
            &db,
            inlet,
            EnergyMode::FixedTemperature {
                temperature_k: 1133.15,
            },
            None,
        )
        .unwrap();
    let warm = SolveSettings {
        guess: Some(&neighbour.extents),
        ..SolveSettings::default()
    };
    // Approaches given per solve, with an automatic direction (a zero-approach pass first).
    let approaches = [10.0, -5.0];
    let with_approaches = SolveSettings {
        approaches_k: Some(&approaches),
        ..SolveSettings::default()
    };

    let mut ws = StageWorkspace::new();
    let mut out = StageResult::default();
    let cases: [(
        &EquilibriumStage,
        StageInlet<'_>,
        EnergyMode,
        SolveSettings<'_>,
    ); 5] = [
        (&reformer, inlet, isothermal, SolveSettings::default()),
        (&reformer, inlet, isothermal, warm),
        (&shift, hts, EnergyMode::Adiabatic, SolveSettings::default()),
        (&reformer, inlet, isothermal, with_approaches),
        (&reformer, inlet, EnergyMode::Adiabatic, with_approaches),
    ];
    // Warm-up: the buffers grow to the largest stage once.
    for (st, i, mode, settings) in cases {
        st.solve_into(&db, i, mode, settings, &mut ws, &mut out)
            .unwrap();
    }
    for (k, (st, i, mode, settings)) in cases.into_iter().enumerate() {
        let before = common::alloc::allocations();
        for _ in 0..3 {
            st.solve_into(&db, i, mode, settings, &mut ws, &mut out)
                .unwrap();
        }
        let made = common::alloc::allocations() - before;
        assert_eq!(made, 0, "case {k}: {made} allocations in 3 warm solves");
        assert!(out.converged(), "case {k}: {:?}", out.termination);
        // The same answer as the allocating entry, to the last bit.
        let fresh = st
            .solve_with_options(&db, i, mode, settings.guess, &settings.options)
            .map(|r| (r.outlet_flows, r.outlet_temperature_k));
        if settings.approaches_k.is_none() {
            assert_eq!(
                fresh.unwrap(),
                (out.outlet_flows.clone(), out.outlet_temperature_k)
            );
        }
    }
    // The counter does count: a fresh result allocates.
    let before = common::alloc::allocations();
    let r = reformer.solve(&db, inlet, isothermal, None).unwrap();
    assert!(common::alloc::allocations() > before && r.converged());
}

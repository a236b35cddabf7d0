//! Benchmark of the flowsheet layer: solving the compiled demo train (flowsheets/demo-train.yaml:
//! mixer, heaters, pre-reformer, reformer, coolers, HTS, LTS, knockout, purifier) including the
//! summary and the element and energy balance checks. The file is read and the units built once,
//! outside the timed loop. "solve demo train" makes a fresh result each time (cold stages);
//! "solve demo train, workspace" solves into one workspace, warm-started from its previous
//! solution (the path of a study), and "..., changed input" sets one input through its slot.

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use syntrain::flowsheet::Flowsheet;
use syntrain::thermo::SpeciesDb;

fn benches(c: &mut Criterion) {
    let db = SpeciesDb::embedded().unwrap();
    let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("flowsheets/demo-train.yaml");
    let flowsheet = Flowsheet::from_file(&path, &db).unwrap();
    c.bench_function("solve demo train", |b| {
        b.iter(|| black_box(&flowsheet).solve(&db).unwrap())
    });
    let params = flowsheet.parameters();
    let mut ws = flowsheet.workspace(&db);
    c.bench_function("solve demo train, workspace", |b| {
        b.iter(|| {
            let r = black_box(&flowsheet)
                .solve_in(&db, black_box(&params), &mut ws)
                .unwrap();
            black_box(r.summary.heating_duty_w)
        })
    });
    let slot = flowsheet.input("units.hts.approach.shift").unwrap();
    let mut changed = params.clone();
    changed[slot.0] = 9.0;
    c.bench_function("solve demo train, workspace, changed input", |b| {
        b.iter(|| {
            let r = black_box(&flowsheet)
                .solve_in(&db, black_box(&changed), &mut ws)
                .unwrap();
            black_box(r.summary.heating_duty_w)
        })
    });
    let text = std::fs::read_to_string(&path).unwrap();
    c.bench_function("read demo train", |b| {
        b.iter(|| Flowsheet::from_yaml_str("demo-train.yaml", black_box(&text), &db).unwrap())
    });
}

criterion_group!(flowsheet, benches);
criterion_main!(flowsheet);

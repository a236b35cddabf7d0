//! Benchmark of the flowsheet layer: solving the parsed demo train (flowsheets/demo-train.yaml:
//! mixer, heaters, pre-reformer, reformer, coolers, HTS, LTS, knockout, purifier) including the
//! summary and the element and energy balance checks. The file is read and the units prepared
//! once, outside the timed loop.

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
    let text = std::fs::read_to_string(&path).unwrap();
    c.bench_function("read demo train", |b| {
        b.iter(|| Flowsheet::from_yaml_str("demo-train.yaml", black_box(&text), &db).unwrap())
    });
}

criterion_group!(flowsheet, benches);
criterion_main!(flowsheet);

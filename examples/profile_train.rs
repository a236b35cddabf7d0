//! Solve the demo train N times into one workspace (default 1000), for instruction counts:
//! `valgrind --tool=callgrind target/release/examples/profile_train 1010` minus the count for
//! 10 solves gives the instructions of 1000 warm solves, repeatable whatever the machine's load.

use syntrain::flowsheet::Flowsheet;
use syntrain::thermo::SpeciesDb;
fn main() {
    let db = SpeciesDb::embedded().unwrap();
    let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("flowsheets/demo-train.yaml");
    let fs = Flowsheet::from_file(&path, &db).unwrap();
    let p = fs.parameters();
    let mut ws = fs.workspace(&db);
    let n: usize = std::env::args()
        .nth(1)
        .and_then(|s| s.parse().ok())
        .unwrap_or(1000);
    let mut acc = 0.0;
    for _ in 0..n {
        acc += fs
            .solve_in(&db, &p, &mut ws)
            .unwrap()
            .summary
            .heating_duty_w;
    }
    println!("{acc}");
}

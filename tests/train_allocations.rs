//! A warm solve of the demo train makes no heap allocation: the compiled flowsheet solved again
//! into the same workspace reuses every buffer (streams, unit results, stage work memory). A
//! counting global allocator, the only one of this test binary, counts what a solve allocates.

use std::alloc::{GlobalAlloc, Layout, System};
use std::sync::atomic::{AtomicUsize, Ordering};

use syntrain::flowsheet::Flowsheet;
use syntrain::thermo::SpeciesDb;

struct Counting;

static ALLOCATIONS: AtomicUsize = AtomicUsize::new(0);

unsafe impl GlobalAlloc for Counting {
    unsafe fn alloc(&self, layout: Layout) -> *mut u8 {
        ALLOCATIONS.fetch_add(1, Ordering::Relaxed);
        unsafe { System.alloc(layout) }
    }

    unsafe fn dealloc(&self, ptr: *mut u8, layout: Layout) {
        unsafe { System.dealloc(ptr, layout) }
    }

    unsafe fn realloc(&self, ptr: *mut u8, layout: Layout, new_size: usize) -> *mut u8 {
        ALLOCATIONS.fetch_add(1, Ordering::Relaxed);
        unsafe { System.realloc(ptr, layout, new_size) }
    }
}

#[global_allocator]
static GLOBAL: Counting = Counting;

#[test]
fn a_warm_solve_of_the_demo_train_allocates_nothing() {
    let db = SpeciesDb::embedded().unwrap();
    let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("flowsheets/demo-train.yaml");
    let fs = Flowsheet::from_file(&path, &db).unwrap();
    let params = fs.parameters();
    let mut ws = fs.workspace(&db);
    // Warm-up: buffers take their size.
    for _ in 0..3 {
        fs.solve_in(&db, &params, &mut ws).unwrap();
    }
    let before = ALLOCATIONS.load(Ordering::Relaxed);
    let r = fs.solve_in(&db, &params, &mut ws).unwrap();
    let h2 = r.summary.hydrogen_product_mol_s.unwrap();
    let after = ALLOCATIONS.load(Ordering::Relaxed);
    assert!(h2 > 0.0);
    assert_eq!(
        after - before,
        0,
        "a warm solve of the demo train made {} allocations",
        after - before
    );
}

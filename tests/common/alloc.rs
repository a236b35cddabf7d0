//! A global allocator that counts the heap allocations of the current thread, for the tests
//! that hold a warm solve to no allocation (the tests of a binary run in parallel threads, so
//! the count is kept per thread). A test binary installs it with
//! `#[global_allocator] static GLOBAL: common::alloc::Counting = common::alloc::Counting;`.

use std::alloc::{GlobalAlloc, Layout, System};
use std::cell::Cell;

/// The counting allocator (the system allocator underneath).
pub struct Counting;

thread_local! {
    static ALLOCATIONS: Cell<usize> = const { Cell::new(0) };
}

fn count_one() {
    // `try_with`: the thread-local may already be gone while a thread ends.
    let _ = ALLOCATIONS.try_with(|n| n.set(n.get() + 1));
}

unsafe impl GlobalAlloc for Counting {
    unsafe fn alloc(&self, layout: Layout) -> *mut u8 {
        count_one();
        unsafe { System.alloc(layout) }
    }

    unsafe fn alloc_zeroed(&self, layout: Layout) -> *mut u8 {
        count_one();
        unsafe { System.alloc_zeroed(layout) }
    }

    unsafe fn dealloc(&self, ptr: *mut u8, layout: Layout) {
        unsafe { System.dealloc(ptr, layout) }
    }

    unsafe fn realloc(&self, ptr: *mut u8, layout: Layout, new_size: usize) -> *mut u8 {
        count_one();
        unsafe { System.realloc(ptr, layout, new_size) }
    }
}

/// Heap allocations made by this thread so far.
pub fn allocations() -> usize {
    ALLOCATIONS.with(Cell::get)
}

//! After warm-up, a frame allocates nothing: the renderer, the comparison and the scene
//! validation reuse their buffers (counted with a wrapping global allocator, natively).

use std::alloc::{GlobalAlloc, Layout, System};
use std::sync::atomic::{AtomicUsize, Ordering};
use twinshade::{Scene, Workbench};

struct Counting;
static ALLOCATIONS: AtomicUsize = AtomicUsize::new(0);

// SAFETY: forwards every call to the system allocator unchanged; only counts them.
unsafe impl GlobalAlloc for Counting {
    unsafe fn alloc(&self, layout: Layout) -> *mut u8 {
        ALLOCATIONS.fetch_add(1, Ordering::Relaxed);
        // SAFETY: same contract as the caller's.
        unsafe { System.alloc(layout) }
    }
    unsafe fn dealloc(&self, ptr: *mut u8, layout: Layout) {
        // SAFETY: same contract as the caller's.
        unsafe { System.dealloc(ptr, layout) }
    }
    unsafe fn realloc(&self, ptr: *mut u8, layout: Layout, new_size: usize) -> *mut u8 {
        ALLOCATIONS.fetch_add(1, Ordering::Relaxed);
        // SAFETY: same contract as the caller's.
        unsafe { System.realloc(ptr, layout, new_size) }
    }
}

#[global_allocator]
static GLOBAL: Counting = Counting;

#[test]
fn a_frame_allocates_nothing_after_warm_up() {
    let mut scene = Scene::default().checked().expect("valid scene");
    let mut bench = Workbench::new();
    bench.render(&scene).expect("warm-up frame");
    scene.turn(3.0, 1.0);
    bench.render(&scene).expect("second warm-up frame");
    for step in 0..5 {
        // Each frame turns the mesh, so the vertex work and every panel really re-run.
        scene.turn(7.0, -2.0);
        let before = ALLOCATIONS.load(Ordering::Relaxed);
        bench.render(&scene).expect("frame");
        let after = ALLOCATIONS.load(Ordering::Relaxed);
        assert_eq!(
            after - before,
            0,
            "frame {step} allocated {} times",
            after - before
        );
    }
}

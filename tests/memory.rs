//! Memory budget: a mesh at the 2-million-triangle limit, imported from file bytes and
//! rendered at 800x600 with every panel and the comparison, stays under the stated budget of
//! live heap (the page's wasm memory holds the same structures). Live and peak bytes are
//! counted with a wrapping global allocator, natively.

use std::alloc::{GlobalAlloc, Layout, System};
use std::sync::atomic::{AtomicUsize, Ordering};
use twinshade::scene::MeshSource;
use twinshade::{Scene, Workbench};

struct Tracking;
static LIVE: AtomicUsize = AtomicUsize::new(0);
static PEAK: AtomicUsize = AtomicUsize::new(0);

fn grew(n: usize) {
    let now = LIVE.fetch_add(n, Ordering::Relaxed) + n;
    PEAK.fetch_max(now, Ordering::Relaxed);
}

// SAFETY: forwards every call to the system allocator unchanged; only counts bytes.
unsafe impl GlobalAlloc for Tracking {
    unsafe fn alloc(&self, layout: Layout) -> *mut u8 {
        grew(layout.size());
        // SAFETY: same contract as the caller's.
        unsafe { System.alloc(layout) }
    }
    unsafe fn dealloc(&self, ptr: *mut u8, layout: Layout) {
        LIVE.fetch_sub(layout.size(), Ordering::Relaxed);
        // SAFETY: same contract as the caller's.
        unsafe { System.dealloc(ptr, layout) }
    }
    unsafe fn realloc(&self, ptr: *mut u8, layout: Layout, new_size: usize) -> *mut u8 {
        if new_size >= layout.size() {
            grew(new_size - layout.size());
        } else {
            LIVE.fetch_sub(layout.size() - new_size, Ordering::Relaxed);
        }
        // SAFETY: same contract as the caller's.
        unsafe { System.realloc(ptr, layout, new_size) }
    }
}

#[global_allocator]
static GLOBAL: Tracking = Tracking;

/// The stated budget (README, "Memory"): live heap for a 2-million-triangle mesh and 800x600
/// panels, from the file's bytes to a compared frame.
const BUDGET: usize = 512 << 20;

/// A binary little-endian PLY of an `n` x `n` grid of quads (2 n^2 triangles), gently
/// curved so normals vary.
fn quad_grid_ply(n: usize) -> Vec<u8> {
    let v = n + 1;
    let mut out = format!(
        "ply\nformat binary_little_endian 1.0\nelement vertex {}\nproperty float x\nproperty float y\nproperty float z\nelement face {}\nproperty list uchar int vertex_indices\nend_header\n",
        v * v,
        n * n
    )
    .into_bytes();
    out.reserve(v * v * 12 + n * n * 17);
    for j in 0..v {
        for i in 0..v {
            let (x, y) = (i as f32 / n as f32 - 0.5, j as f32 / n as f32 - 0.5);
            for c in [x, y, 0.3 * (x * x + y * y)] {
                out.extend_from_slice(&c.to_le_bytes());
            }
        }
    }
    for j in 0..n {
        for i in 0..n {
            let a = (j * v + i) as i32;
            out.push(4);
            for k in [a, a + 1, a + 1 + v as i32, a + v as i32] {
                out.extend_from_slice(&k.to_le_bytes());
            }
        }
    }
    out
}

#[test]
fn a_two_million_triangle_mesh_fits_the_memory_budget() {
    let base = LIVE.load(Ordering::Relaxed);
    PEAK.store(base, Ordering::Relaxed);
    let bytes = quad_grid_ply(1000);
    let file_bytes = bytes.len();
    let imported = twinshade::geometry::import("grid.ply", &bytes).expect("imports");
    assert_eq!(imported.info().triangles, 2_000_000);
    drop(bytes); // the page lets go of the file once imported, too
    let scene = Scene {
        mesh: MeshSource::File {
            name: "grid.ply".into(),
        },
        panel: twinshade::scene::PanelSize {
            width: 800,
            height: 600,
        },
        ..Scene::default()
    };
    let mut bench = Workbench::new();
    bench.set_file_mesh(imported.mesh);
    let report = *bench
        .render(&scene.checked().expect("valid scene"))
        .expect("renders");
    assert_eq!(report.triangles, 2_000_000);
    assert!(report.metrics.covered_pixels > 10_000);
    let peak = PEAK.load(Ordering::Relaxed) - base;
    let live = LIVE.load(Ordering::Relaxed).saturating_sub(base);
    println!(
        "2,000,000 triangles (1,002,001 vertices, {:.1} MiB PLY), 800x600: peak {:.1} MiB, \
         live after the frame {:.1} MiB (budget {} MiB)",
        file_bytes as f64 / 1048576.0,
        peak as f64 / 1048576.0,
        live as f64 / 1048576.0,
        BUDGET >> 20
    );
    assert!(peak < BUDGET, "peak heap {peak} bytes over the budget");
}

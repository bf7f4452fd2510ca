//! The fixed benchmark scene (docs/REFERENCES.md) rendered natively: both panels (Gouraud and
//! Phong) per frame, as the in-browser benchmark page does in wasm.
//!
//! Run: `cargo bench --bench bench_scene`. Criterion prints time per frame; the environment
//! it ran on is printed first (record figures with it).

use criterion::{criterion_group, criterion_main, BenchmarkId, Criterion};
use twinshade::{Scene, ValidScene, Workbench};

fn environment() {
    let cpu = std::fs::read_to_string("/proc/cpuinfo")
        .ok()
        .and_then(|t| {
            t.lines()
                .find(|l| l.starts_with("model name"))
                .map(|l| l.split(':').nth(1).unwrap_or("").trim().to_string())
        })
        .unwrap_or_else(|| "unknown CPU".into());
    let cores = std::thread::available_parallelism().map_or(0, |n| n.get());
    eprintln!(
        "bench_scene on {cpu}, {cores} logical cores, {} {}, single-threaded renderer",
        std::env::consts::OS,
        std::env::consts::ARCH
    );
}

fn frames(c: &mut Criterion) {
    environment();
    let mut group = c.benchmark_group("bench_scene_frame");
    group.sample_size(30);
    for (level, w, h) in [(5, 800, 600), (7, 800, 600), (5, 400, 300), (7, 400, 300)] {
        let mut bench = Workbench::new();
        let mut frame = 0u32;
        // Warm up: geometry built, buffers sized.
        bench
            .render_panels(
                &Scene::benchmark(level, w, h, 0)
                    .checked()
                    .expect("valid scene"),
            )
            .expect("bench scene renders");
        let scenes: Vec<ValidScene> = (0..360)
            .map(|f| {
                Scene::benchmark(level, w, h, f)
                    .checked()
                    .expect("valid scene")
            })
            .collect();
        group.bench_function(
            BenchmarkId::from_parameter(format!("L{level}_{w}x{h}")),
            |b| {
                b.iter(|| {
                    frame = (frame + 1) % 360;
                    bench
                        .render_panels(&scenes[frame as usize])
                        .expect("frame renders")
                })
            },
        );
    }
    group.finish();
}

/// A page frame as a drag produces it: the default scene turned a little, both panels and
/// the CIEDE2000 comparison.
fn page_frames(c: &mut Criterion) {
    let mut group = c.benchmark_group("page_frame");
    group.sample_size(20);
    for (w, h) in [(480, 360), (800, 600)] {
        let mut scene = Scene::default();
        scene.panel.width = w;
        scene.panel.height = h;
        let mut scene = scene.checked().expect("valid scene");
        let mut bench = Workbench::new();
        bench.render(&scene).expect("default scene renders");
        group.bench_function(
            BenchmarkId::from_parameter(format!("default_{w}x{h}")),
            |b| {
                b.iter(|| {
                    scene.turn(1.0, 0.0);
                    bench
                        .render(&scene)
                        .map(|r| r.metrics.covered_pixels)
                        .expect("frame")
                })
            },
        );
    }
    group.finish();
}

/// A 360-step turntable sweep at 256x256 against 360 single frames of the same scene (issue
/// goal: the sweep costs at most 1.2 times the frames). A "frame" is what a sweep step
/// renders: both panels and the comparison, with the mesh turned one degree.
fn sweep_cost(c: &mut Criterion) {
    use twinshade::analysis::{Sweep, SweepAxis, SweepSettings};
    let mut group = c.benchmark_group("sweep_256x256");
    group.sample_size(10);
    for (name, mut scene) in [
        ("default", Scene::default()),
        ("bench_L5", Scene::benchmark(5, 256, 256, 0)),
    ] {
        scene.panel.width = 256;
        scene.panel.height = 256;
        let scene = scene.checked().expect("valid scene");
        let mut bench = Workbench::new();
        bench.render(&scene).expect("renders");
        let turned: Vec<ValidScene> = (0..360)
            .map(|d| {
                let mut s = scene.clone();
                s.set_rotation(
                    scene.rotation_quat() * twinshade::scene::axis_angle(glam::Vec3::Y, d as f32),
                );
                s
            })
            .collect();
        group.bench_function(BenchmarkId::new("360_frames", name), |b| {
            b.iter(|| {
                for s in &turned {
                    bench.render(s).expect("frame");
                }
            })
        });
        let settings = SweepSettings {
            axis: SweepAxis::Turntable,
            steps: 360,
            degrees: 360.0,
        };
        group.bench_function(BenchmarkId::new("360_step_sweep", name), |b| {
            b.iter(|| {
                let mut sweep = Sweep::new(&scene, settings).expect("sweep");
                sweep.run(&mut bench, |_, _| {}).expect("runs");
                sweep.summary()
            })
        });
    }
    group.finish();
}

/// The per-pixel panel alone under each reflection model (issue goal: the glTF
/// metallic-roughness BRDF costs at most 1.5 times Blinn-Phong), bench scene L5 800x600.
fn per_pixel_models(c: &mut Criterion) {
    use twinshade::shading::ReflectionModel;
    use twinshade::{Framebuffer, Renderer, ShadingMode};
    let mut group = c.benchmark_group("per_pixel_model_L5_800x600");
    group.sample_size(30);
    for model in ReflectionModel::ALL {
        let scenes: Vec<ValidScene> = (0..360)
            .map(|f| {
                let mut s = Scene::benchmark(5, 800, 600, f);
                s.model = model;
                // Roughness with the Blinn-Phong 64 lobe's width (n = 2 / alpha^2 - 2).
                s.material.roughness = twinshade::shading::roughness_for_blinn_exponent(64.0);
                s.checked().expect("valid scene")
            })
            .collect();
        let mut r = Renderer::new();
        let mut fb = Framebuffer::new(0, 0);
        r.render(&scenes[0], ShadingMode::PerPixel, &mut fb)
            .expect("renders");
        let mut frame = 0usize;
        group.bench_function(BenchmarkId::from_parameter(model.id()), |b| {
            b.iter(|| {
                frame = (frame + 1) % 360;
                r.render(&scenes[frame], ShadingMode::PerPixel, &mut fb)
                    .expect("frame renders")
            })
        });
    }
    group.finish();
}

criterion_group!(benches, frames, page_frames, sweep_cost, per_pixel_models);
criterion_main!(benches);

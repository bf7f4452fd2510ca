//! Orientation dependence of scanline interpolation, the polygon modes, and rotation sweeps.

use twinshade::analysis::{Sweep, SweepAxis, SweepSettings};
use twinshade::geometry::PolygonMode;
use twinshade::pipeline::{draw_triangle, Batch, Cull, FragmentShader, RasterVertex, Target};
use twinshade::pipeline::{fill_polygon, sample_polygon};
use twinshade::{Scene, Workbench};

/// Writes the first varying's bits as the pixel.
#[derive(Clone, Copy)]
struct Bits;
impl FragmentShader<1> for Bits {
    type Out = u32;
    fn shade(&self, v: &[f32; 1]) -> u32 {
        v[0].to_bits()
    }
}

struct Canvas {
    w: usize,
    color: Vec<u32>,
    depth: Vec<f32>,
}

impl Canvas {
    fn new(w: usize) -> Self {
        Canvas {
            w,
            color: vec![u32::MAX; w * w],
            depth: vec![1.0; w * w],
        }
    }
    fn target(&mut self) -> Target<'_> {
        Target {
            color: &mut self.color,
            color2: &mut [],
            depth: &mut self.depth,
            width: self.w,
            height: self.w,
            rows: 0..self.w,
        }
    }
    fn polygon(&mut self, v: &[RasterVertex<1>]) -> u32 {
        let mut batch = Batch::default();
        fill_polygon::<1, false, _>(&mut self.target(), v, Cull::None, &Bits, &mut batch)
    }
    fn value(&self, x: usize, y: usize) -> f32 {
        f32::from_bits(self.color[y * self.w + x])
    }
    fn written(&self) -> usize {
        self.color.iter().filter(|&&c| c != u32::MAX).count()
    }
}

/// Corners `(dx, dy, value)` around `centre`, turned by `deg` (counter-clockwise on screen).
fn turned(centre: (f32, f32), deg: f64, corners: &[(f64, f64, f32)]) -> Vec<RasterVertex<1>> {
    let (s, c) = deg.to_radians().sin_cos();
    corners
        .iter()
        .map(|&(dx, dy, v)| RasterVertex {
            x: centre.0 + (c * dx + s * dy) as f32,
            y: centre.1 + (-s * dx + c * dy) as f32,
            z: 0.5,
            inv_w: 1.0,
            var: [v],
        })
        .collect()
}

#[test]
fn scanline_square_depends_on_roll() {
    // Textbook property of interpolating along edges then spans on polygons of more than
    // three corners (Foley, van Dam, Feiner, Hughes, Computer Graphics: Principles and
    // Practice, 2nd ed., on Gouraud shading; section from memory). Values computed for
    // docs/REFERENCES.md: a square with corner values 1, 0, 1, 0 gives 0.5000 at its centre
    // at 0 degrees, 0.2113 at 30 degrees and 0.0000 at 45 degrees. The square is large (half
    // side 150 px) so snapping corners to 1/256 px moves the centre value by < 1e-5.
    let square = [
        (-150.0, -150.0, 1.0),
        (-150.0, 150.0, 0.0),
        (150.0, 150.0, 1.0),
        (150.0, -150.0, 0.0),
    ];
    // Turned clockwise on screen; turning the other way mirrors the picture, and the value at
    // 30 degrees becomes 1 - 0.2113 = 0.7887.
    let centre = (256.5, 256.5); // the centre of pixel (256, 256)
    for (deg, want) in [
        (0.0, 0.5000),
        (-30.0, 0.2113),
        (-45.0, 0.0000),
        (30.0, 0.7887),
    ] {
        let v = turned(centre, deg, &square);
        let mut c = Canvas::new(512);
        assert!(c.polygon(&v) > 80_000);
        let filled = c.value(256, 256);
        let sampled = sample_polygon(&v, centre.0, centre.1).map(|s| s.2[0]);
        assert!(
            (filled - want).abs() < 5e-5,
            "{deg} degrees: fill gives {filled}, want {want}"
        );
        assert!(
            (sampled.unwrap_or(f32::NAN) - want).abs() < 5e-5,
            "{deg} degrees: sample gives {sampled:?}, want {want}"
        );
    }
}

#[test]
fn triangle_value_at_a_fixed_point_ignores_roll() {
    // A triangle's interpolation is a plane: the value at a fixed point of it cannot depend
    // on orientation (barycentric interpolation; common practice). Both the triangle
    // rasterizer and the scanline fill given three corners must show it.
    let tri = [(-90.0, -40.0, 1.0), (10.0, 80.0, 0.0), (70.0, -60.0, 0.3)];
    let centre = (128.5, 128.5); // pixel (128, 128), a fixed point inside the triangle
    let mut seen = vec![];
    for step in 0..24 {
        let v = turned(centre, step as f64 * 15.0, &tri);
        let mut a = Canvas::new(256);
        a.polygon(&v);
        let mut b = Canvas::new(256);
        draw_triangle::<1, false, _>(&mut b.target(), [&v[0], &v[1], &v[2]], Cull::None, &Bits);
        seen.push((a.value(128, 128), b.value(128, 128)));
    }
    let (a0, b0) = seen[0];
    for (a, b) in seen {
        assert!((a - a0).abs() < 1.0 / 255.0, "scanline {a} vs {a0}");
        assert!((b - b0).abs() < 1.0 / 255.0, "triangle {b} vs {b0}");
    }
}

#[test]
fn scanline_polygons_share_edges_without_gaps_or_overlap() {
    // Six quads fanned around a centre tile a 12-gon; at any roll and sub-pixel offset the
    // quads must write exactly the pixels of the whole 12-gon, none twice (the fill rule of
    // the triangle rasterizer, Direct3D 11 "Rasterization Rules": top-left).
    for roll in 0..16 {
        let deg = roll as f64 * 11.3;
        let centre = (100.3 + roll as f32 * 0.07, 99.8 - roll as f32 * 0.05);
        let ring: Vec<(f64, f64, f32)> = (0..12)
            .map(|k| {
                let a = (k as f64 * 30.0).to_radians();
                (80.0 * a.cos(), -80.0 * a.sin(), 0.0)
            })
            .collect();
        let mut whole = Canvas::new(200);
        let all = whole.polygon(&turned(centre, deg, &ring));
        let mut parts = Canvas::new(200);
        let mut sum = 0;
        for q in 0..6 {
            let corners = [
                (0.0, 0.0, 0.0),
                ring[2 * q],
                ring[2 * q + 1],
                ring[(2 * q + 2) % 12],
            ];
            let mut v = turned(centre, deg, &corners);
            for r in &mut v {
                r.z = 0.9 - 0.1 * q as f32; // each later quad passes the depth test
            }
            sum += parts.polygon(&v);
        }
        assert!(all > 15_000);
        assert_eq!(sum, all, "roll {deg}: pixels drawn twice or missed");
        assert_eq!(parts.written(), whole.written(), "roll {deg}");
    }
}

#[test]
fn fill_and_sample_agree_inside_a_quad() {
    // The closed-form probe and the incremental fill are the same formulas.
    let quad = [
        (-60.0, -30.0, 0.9),
        (-40.0, 50.0, 0.1),
        (55.0, 35.0, 0.7),
        (45.0, -45.0, 0.2),
    ];
    let v = turned((64.0, 64.0), 17.0, &quad);
    let mut c = Canvas::new(128);
    c.polygon(&v);
    let mut checked = 0;
    for y in 0..128 {
        for x in 0..128 {
            if c.color[y * 128 + x] == u32::MAX {
                continue;
            }
            if let Some(s) = sample_polygon(&v, x as f32 + 0.5, y as f32 + 0.5) {
                assert!((s.2[0] - c.value(x, y)).abs() < 1e-4, "pixel ({x}, {y})");
                checked += 1;
            }
        }
    }
    assert!(checked > 5000);
}

fn quad_grid_scene(mode: PolygonMode) -> Scene {
    let mut s = twinshade::scene::preset("quad-split")
        .expect("the quad-split preset")
        .scene;
    s.polygons = mode;
    s.panel.width = 256;
    s.panel.height = 256;
    s
}

fn run(scene: &Scene, axis: SweepAxis, steps: u32) -> twinshade::analysis::SweepSummary {
    let mut bench = Workbench::new();
    let mut sweep = Sweep::new(
        &scene.checked().expect("valid scene"),
        SweepSettings {
            axis,
            steps,
            degrees: 360.0,
        },
    )
    .expect("valid sweep");
    sweep.run(&mut bench, |_, _| {}).expect("sweep runs");
    sweep.summary()
}

#[test]
fn quad_grid_orientation_variance_scanline_vs_split() {
    // Roll changes nothing in the lighting, so a fixed surface point may change only through
    // the interpolation: far above 1/255 for scanline-filled quads, below it for triangles
    // (the property cited in scanline_square_depends_on_roll).
    let scan = run(&quad_grid_scene(PolygonMode::Scanline), SweepAxis::Roll, 24);
    let split = run(
        &quad_grid_scene(PolygonMode::AsAuthored),
        SweepAxis::Roll,
        24,
    );
    let (sv, tv) = (
        scan.orientation_variance.expect("roll summary"),
        split.orientation_variance.expect("roll summary"),
    );
    println!(
        "orientation variance (Gouraud, Phong): scanline {sv:?} over {} probes, split {tv:?} over {} probes",
        scan.probes_tracked, split.probes_tracked
    );
    assert!(scan.probes_tracked >= 8 && split.probes_tracked >= 8);
    assert!(sv[0] > 10.0 / 255.0, "scanline Gouraud {}", sv[0]);
    assert!(tv[0] < 1.0 / 255.0 && tv[1] < 1.0 / 255.0, "split {tv:?}");
}

#[test]
fn coarse_sphere_highlight_crawls_per_vertex_only() {
    // The default scene: a glossy icosphere of level 2 (320 triangles) under a key light.
    // Turning it moves the highlight between vertices: the per-vertex peak swings, the
    // per-pixel peak holds (common practice; the reason the comparison exists).
    let mut scene = Scene::default();
    scene.panel.width = 256;
    scene.panel.height = 256;
    let s = run(&scene, SweepAxis::Turntable, 72);
    println!(
        "turntable 72 steps: peak Y Gouraud {:.4}..{:.4} (CoV {:.4}), Phong {:.4}..{:.4} (CoV {:.4})",
        s.peak_min[0], s.peak_max[0], s.highlight_cov[0], s.peak_min[1], s.peak_max[1], s.highlight_cov[1]
    );
    assert!(s.highlight_cov[0] > 5.0 * s.highlight_cov[1]);
    assert!((s.peak_max[0] - s.peak_min[0]) / s.peak_max[0] > 0.15);
    assert!(s.highlight_cov[1] < 0.01);
}

#[test]
fn polygon_modes_cover_the_same_pixels_on_a_flat_grid() {
    // However a planar quad grid is split (or not), the same pixels are covered; only the
    // interpolation inside differs.
    let mut covered = vec![];
    for mode in PolygonMode::ALL {
        let mut bench = Workbench::new();
        let scene = quad_grid_scene(mode);
        bench
            .render(&scene.checked().expect("valid scene"))
            .expect("renders");
        let fb = bench.framebuffer(twinshade::Panel::PerVertex);
        covered.push((0..256 * 256).filter(|&i| fb.covered(i)).count());
        let want = if mode == PolygonMode::CentreFan {
            36
        } else {
            18
        };
        assert_eq!(bench.report().triangles, want, "{mode:?}");
    }
    println!("covered pixels per mode: {covered:?}");
    assert!(covered[0] > 10_000);
    assert!(covered.iter().all(|&c| c == covered[0]), "{covered:?}");
}

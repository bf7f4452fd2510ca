//! Golden images: exact bytes of a few scenes, so any change to the pixels is deliberate.
//! Regenerate with `TWINSHADE_BLESS=1 cargo test --test golden` and review the PNGs.

use std::path::PathBuf;
use twinshade::geometry::Projection;
use twinshade::shading::Rgb;
mod common;
use common::{read_png, write_png};
use twinshade::geometry::Shape;
use twinshade::scene::{MeshSource, PanelSize};
use twinshade::shading::{Finish, LightKind, ReflectionModel};
use twinshade::{Framebuffer, Renderer, Scene, ShadingMode};

fn scenes() -> Vec<(&'static str, Scene)> {
    let small = PanelSize {
        width: 160,
        height: 120,
    };
    let default = Scene {
        panel: small,
        ..Scene::default()
    };
    let mut torus = default.clone();
    torus.mesh = MeshSource::Shape(Shape::Torus {
        rings: 16,
        segments: 8,
    });
    torus.camera.projection = Projection::Orthographic;
    torus.camera.pitch_deg = 35.0;
    torus.model = ReflectionModel::Phong;
    torus.material.finish = Finish::Metal;
    torus.material.base_color = Rgb::hex("#c08a3e");
    let mut cube = default.clone();
    cube.mesh = MeshSource::Shape(Shape::Cube);
    cube.camera.roll_deg = 30.0;
    cube.camera.yaw_deg = 40.0;
    cube.camera.pitch_deg = 25.0;
    cube.cull_back_faces = false;
    cube.lights[0].kind = LightKind::Point;
    let mut vase = default.clone();
    vase.mesh = MeshSource::Shape(Shape::Vase {
        rings: 12,
        segments: 16,
    });
    vase.perspective_correct = false;
    vase.camera.distance = 2.6;
    vec![
        ("default", default),
        ("torus-ortho-metal", torus),
        ("cube-roll-point", cube),
        ("vase-affine", vase),
    ]
}

#[test]
fn pixels_match_the_golden_images() {
    let dir = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("tests/images/pipeline");
    let bless = std::env::var("TWINSHADE_BLESS").is_ok_and(|v| v == "1");
    let mut r = Renderer::new();
    let mut failures = Vec::new();
    for (name, scene) in scenes() {
        for mode in [
            ShadingMode::Flat,
            ShadingMode::PerVertex,
            ShadingMode::PerPixel,
            ShadingMode::Exact,
        ] {
            let mut fb = Framebuffer::new(0, 0);
            r.render(&scene.checked().expect("valid scene"), mode, &mut fb)
                .expect("render");
            let path = dir.join(format!("{name}-{}.png", mode.id()));
            if bless {
                std::fs::create_dir_all(&dir).expect("image folder");
                write_png(&path, fb.width(), fb.height(), fb.bytes()).expect("write golden");
                continue;
            }
            match read_png(&path) {
                Ok((w, h, bytes)) if (w, h) == (fb.width(), fb.height()) && bytes == fb.bytes() => {
                }
                Ok(_) => failures.push(format!("{} differs", path.display())),
                Err(e) => failures.push(format!("{e} (bless with TWINSHADE_BLESS=1)")),
            }
        }
    }
    assert!(
        failures.is_empty(),
        "golden images:\n{}",
        failures.join("\n")
    );
}

#[test]
fn one_pass_pair_equals_separate_panels() {
    // Renderer::render_pair shares coverage, depth and interpolation between the Gouraud and
    // Phong panels; its bytes must be those of two separate renders.
    let mut scenes = scenes();
    for p in twinshade::scene::presets() {
        scenes.push((
            p.id,
            Scene {
                panel: PanelSize {
                    width: 160,
                    height: 120,
                },
                ..p.scene
            },
        ));
    }
    let mut r = Renderer::new();
    for (name, mut scene) in scenes {
        for turn in 0..3 {
            scene.turn(23.0 * turn as f32, 7.0 * turn as f32);
            let (mut g, mut p) = (Framebuffer::new(0, 0), Framebuffer::new(0, 0));
            let stats = r
                .render_pair(&scene.checked().expect("valid scene"), &mut g, &mut p)
                .expect("pair");
            let mut g1 = Framebuffer::new(0, 0);
            let mut p1 = Framebuffer::new(0, 0);
            let sg = r
                .render(
                    &scene.checked().expect("valid scene"),
                    ShadingMode::PerVertex,
                    &mut g1,
                )
                .expect("gouraud");
            let sp = r
                .render(
                    &scene.checked().expect("valid scene"),
                    ShadingMode::PerPixel,
                    &mut p1,
                )
                .expect("phong");
            assert!(
                g.bytes() == g1.bytes(),
                "{name} turn {turn}: Gouraud differs"
            );
            assert!(p.bytes() == p1.bytes(), "{name} turn {turn}: Phong differs");
            assert!(p.depth() == p1.depth(), "{name} turn {turn}: depth differs");
            assert_eq!(
                (stats[0].lit_vertices, stats[1].fragments),
                (sg.lit_vertices, sp.fragments)
            );
        }
    }
}

/// The golden images checked from outside at sampled pixels: the scene's lighting written out
/// again here in f64 from the published models (Blinn 1977 for the half vector, Phong 1975
/// for the reflection vector, 1 / (1 + k d^2) falloff, IEC 61966-2-1 sRGB), with the surface
/// point found by intersecting the pixel's ray with the analytic surface, never through the
/// renderer. Returns the expected 8-bit sRGB colour.
mod closed_form {
    use twinshade::geometry::Projection;
    use twinshade::scene::PanelSize;
    use twinshade::shading::{Finish, LightKind, ReflectionModel, Rgb};
    use twinshade::Scene;

    pub type V = [f64; 3];
    pub fn add(a: V, b: V) -> V {
        [a[0] + b[0], a[1] + b[1], a[2] + b[2]]
    }
    pub fn sub(a: V, b: V) -> V {
        [a[0] - b[0], a[1] - b[1], a[2] - b[2]]
    }
    pub fn mul(a: V, k: f64) -> V {
        [a[0] * k, a[1] * k, a[2] * k]
    }
    pub fn dot(a: V, b: V) -> f64 {
        a[0] * b[0] + a[1] * b[1] + a[2] * b[2]
    }
    fn cross(a: V, b: V) -> V {
        [
            a[1] * b[2] - a[2] * b[1],
            a[2] * b[0] - a[0] * b[2],
            a[0] * b[1] - a[1] * b[0],
        ]
    }
    pub fn unit(a: V) -> V {
        mul(a, 1.0 / dot(a, a).sqrt())
    }
    fn linear(c: Rgb) -> V {
        c.0.map(crate::common::srgb_decode_f64)
    }
    fn encode(l: f64) -> u8 {
        crate::common::srgb_encode_f64(l)
    }

    /// The eye and the world-space ray through the centre of pixel (x, y) (OpenGL camera,
    /// orbit by yaw about +y and pitch, roll turning the picture counter-clockwise).
    pub fn ray(s: &Scene, x: usize, y: usize) -> (V, V) {
        let c = &s.camera;
        let PanelSize { width, height } = s.panel;
        let (yaw, pitch, roll) = (
            f64::from(c.yaw_deg).to_radians(),
            f64::from(c.pitch_deg).to_radians(),
            f64::from(c.roll_deg).to_radians(),
        );
        let toward = [
            pitch.cos() * yaw.sin(),
            pitch.sin(),
            pitch.cos() * yaw.cos(),
        ];
        let eye = mul(toward, f64::from(c.distance));
        let f = mul(toward, -1.0);
        let side = unit(cross(f, [0.0, 1.0, 0.0]));
        let up = cross(side, f);
        let aspect = f64::from(width) / f64::from(height);
        let nx = (x as f64 + 0.5) / f64::from(width) * 2.0 - 1.0;
        let ny = 1.0 - (y as f64 + 0.5) / f64::from(height) * 2.0;
        // Undo the roll: the picture turned by +roll, so the view-plane point turns by -roll.
        let (sr, cr) = roll.sin_cos();
        let (px, py) = (cr * nx + sr * ny, -sr * nx + cr * ny);
        match c.projection {
            Projection::Perspective => {
                let t = (0.5 * f64::from(c.fov_y_deg)).to_radians().tan();
                let d = add(add(mul(side, px * t * aspect), mul(up, py * t)), f);
                (eye, unit(d))
            }
            Projection::Orthographic => {
                let h = f64::from(c.ortho_height) / 2.0;
                let o = add(add(eye, mul(side, px * h * aspect)), mul(up, py * h));
                (o, f)
            }
        }
    }

    /// Outgoing linear light at world point `p` with unit normal `n`, as seen from `eye`.
    pub fn shade(s: &Scene, n: V, p: V, eye: V) -> [u8; 3] {
        let m = &s.material;
        let base = linear(m.base_color);
        let ambient = linear(s.ambient_light);
        let v = if s.camera.projection == Projection::Orthographic {
            unit(eye) // the camera orbits the origin: toward the eye
        } else {
            unit(sub(eye, p))
        };
        let tint = match m.finish {
            Finish::Dielectric => [1.0; 3],
            Finish::Metal => base,
        };
        let mut out = [0.0; 3];
        for k in 0..3 {
            out[k] = base[k] * ambient[k] * f64::from(m.ambient)
                + linear(m.emissive)[k] * f64::from(m.emissive_strength);
        }
        for light in &s.lights {
            let (az, el) = (
                f64::from(light.azimuth_deg).to_radians(),
                f64::from(light.elevation_deg).to_radians(),
            );
            let dir = [el.cos() * az.sin(), el.sin(), el.cos() * az.cos()];
            let colour = mul(linear(light.color), f64::from(light.intensity));
            let (l, c) = match light.kind {
                LightKind::Directional => (dir, colour),
                LightKind::Point => {
                    let d = sub(mul(dir, f64::from(light.distance)), p);
                    let att = 1.0 / (1.0 + f64::from(light.falloff) * dot(d, d));
                    (unit(d), mul(colour, att))
                }
            };
            let ndl = dot(n, l);
            if ndl <= 0.0 {
                continue;
            }
            let sdot = match s.model {
                ReflectionModel::BlinnPhong => dot(n, unit(add(l, v))),
                ReflectionModel::Phong => dot(sub(mul(n, 2.0 * ndl), l), v),
                // No golden scene uses it; tests/brdf.rs checks it against its closed form.
                ReflectionModel::MetallicRoughness => {
                    panic!("the closed form here is for the Phong models")
                }
            };
            let spec = if sdot > 0.0 {
                sdot.powf(f64::from(m.shininess))
            } else {
                0.0
            };
            for k in 0..3 {
                out[k] += (base[k] * f64::from(m.diffuse) * ndl
                    + tint[k] * f64::from(m.specular) * spec)
                    * c[k];
            }
        }
        out.map(encode)
    }
}

#[test]
fn golden_pixels_match_closed_forms() {
    use closed_form::{add, dot, mul, ray, shade, unit};
    let dir = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("tests/images/pipeline");
    let pixel = |file: &str, x: usize, y: usize| {
        let (w, _, bytes) = read_png(&dir.join(file)).expect("golden image");
        let i = (y * w + x) * 4;
        [bytes[i], bytes[i + 1], bytes[i + 2]]
    };
    let near = |got: [u8; 3], want: [u8; 3]| got.iter().zip(want).all(|(g, w)| g.abs_diff(w) <= 1);
    let all = scenes();
    let scene = |name: &str| {
        all.iter()
            .find(|(n, _)| *n == name)
            .map(|(_, s)| s.clone())
            .expect("scene")
    };
    let mut checked = 0;
    // The default scene: its exact-surface panel is the unit sphere (ray-sphere intersection,
    // normal = the point).
    let s = scene("default");
    // Four fixed pixels and the highlight's peak (the brightest pixel of the golden), so the
    // specular term is checked where it dominates.
    let peak = {
        let (w, h, bytes) = read_png(&dir.join("default-exact.png")).expect("golden image");
        (0..w * h)
            .max_by_key(|&i| {
                bytes[4 * i] as u32 + bytes[4 * i + 1] as u32 + bytes[4 * i + 2] as u32
            })
            .map(|i| (i % w, i / w))
            .expect("pixels")
    };
    for (x, y) in [(80, 60), (70, 45), (95, 70), (60, 62), peak] {
        let (o, d) = ray(&s, x, y);
        let b = dot(o, d);
        let disc = b * b - (dot(o, o) - 1.0);
        assert!(disc > 0.0, "({x}, {y}) misses the sphere");
        let p = add(o, mul(d, -b - disc.sqrt()));
        let want = shade(&s, unit(p), p, o);
        let got = pixel("default-exact.png", x, y);
        assert!(
            near(got, want),
            "default exact ({x}, {y}): {got:?} vs closed form {want:?}"
        );
        checked += 1;
    }
    // The cube under a point light, rolled: its faces are flat with split normals, so the
    // per-pixel panel at a face's inner pixel is the closed form on that face's plane.
    let s = scene("cube-roll-point");
    let a = 1.0 / 3.0f64.sqrt();
    for (x, y) in [(80, 60), (72, 52), (78, 56)] {
        let (o, d) = ray(&s, x, y);
        // The nearest face plane the ray enters (the slab method on the cube [-a, a]^3).
        let (mut t_in, mut normal) = (f64::NEG_INFINITY, [0.0; 3]);
        for k in 0..3 {
            let (t1, t2) = ((-a - o[k]) / d[k], (a - o[k]) / d[k]);
            let t = t1.min(t2);
            if t > t_in {
                t_in = t;
                normal = [0.0; 3];
                normal[k] = if t1 < t2 { -1.0 } else { 1.0 };
            }
        }
        let p = add(o, mul(d, t_in));
        assert!(
            p.iter().all(|c| c.abs() <= a + 1e-9),
            "({x}, {y}) misses the cube"
        );
        // Well inside the face: the pixel is not on an edge.
        let inner = (0..3)
            .filter(|&k| normal[k] == 0.0)
            .all(|k| p[k].abs() < a - 0.05);
        assert!(inner, "({x}, {y}) is too near an edge of the face");
        let want = shade(&s, normal, p, o);
        let got = pixel("cube-roll-point-per_pixel.png", x, y);
        assert!(
            near(got, want),
            "cube per-pixel ({x}, {y}): {got:?} vs closed form {want:?}"
        );
        checked += 1;
    }
    // The torus (orthographic, Phong's reflection vector, metal) and the vase (affine
    // interpolation, so only the exact-surface panel has a closed form): the first point
    // where the ray crosses the implicit surface, found by marching and bisection, lit with
    // the implicit function's gradient (central differences) as the normal.
    let torus = |p: [f64; 3]| {
        // Ring radius 0.7 about +y, tube radius 0.3.
        let ring = p[0].hypot(p[2]) - 0.7;
        ring * ring + p[1] * p[1] - 0.09
    };
    let vase = |p: [f64; 3]| {
        // The profile the shape documents: radius 2 sqrt(t (1 - t)) g(t) at height
        // -0.9 + 1.8 t, g(t) = 0.62 + 0.18 sin(2 pi t + 0.3) - 0.25 t.
        let t = (p[1] + 0.9) / 1.8;
        if !(0.0..=1.0).contains(&t) {
            return 1.0;
        }
        let g = 0.62 + 0.18 * (2.0 * std::f64::consts::PI * t + 0.3).sin() - 0.25 * t;
        p[0].hypot(p[2]) - 2.0 * (t * (1.0 - t)).sqrt() * g
    };
    /// A scene, its exact-surface golden, the surface's implicit function, pixels to check.
    type Case<'a> = (
        &'a str,
        &'a str,
        &'a dyn Fn([f64; 3]) -> f64,
        [(usize, usize); 3],
    );
    let surfaces: [Case; 2] = [
        (
            "torus-ortho-metal",
            "torus-ortho-metal-exact.png",
            &torus,
            [(80, 30), (40, 60), (118, 70)],
        ),
        (
            "vase-affine",
            "vase-affine-exact.png",
            &vase,
            [(80, 60), (80, 40), (72, 75)],
        ),
    ];
    for (name, file, f, pixels) in surfaces {
        let s = scene(name);
        for (x, y) in pixels {
            let (o, d) = ray(&s, x, y);
            let at = |t: f64| add(o, mul(d, t));
            let step = 1e-3;
            let mut t = 0.0;
            while f(at(t + step)) > 0.0 && t < 10.0 {
                t += step;
            }
            assert!(t < 10.0, "{name} ({x}, {y}) misses the surface");
            let (mut lo, mut hi) = (t, t + step);
            for _ in 0..60 {
                let mid = 0.5 * (lo + hi);
                if f(at(mid)) > 0.0 {
                    lo = mid;
                } else {
                    hi = mid;
                }
            }
            let p = at(hi);
            let h = 1e-6;
            let grad = [0, 1, 2].map(|k| {
                let (mut a, mut b) = (p, p);
                a[k] += h;
                b[k] -= h;
                (f(a) - f(b)) / (2.0 * h)
            });
            let want = shade(&s, unit(grad), p, o);
            let got = pixel(file, x, y);
            assert!(
                near(got, want),
                "{name} exact ({x}, {y}): {got:?} vs closed form {want:?}"
            );
            checked += 1;
        }
    }
    assert_eq!(checked, 14);
}

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

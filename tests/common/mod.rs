//! Helpers shared by the integration tests. PNG files are read and written with the command
//! line's own PNG module (src/cli/png_out.rs, the `png` crate), included here by path: the
//! library itself writes no files.
#![allow(dead_code, unused_imports)] // each test crate uses only some of these helpers

use std::path::PathBuf;

pub mod fixtures;
pub mod outside;

#[path = "../../src/cli/png_out.rs"]
mod png_out;
pub use png_out::{read_png, write_png};

/// The project's root folder.
pub fn crate_root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// A scene looking straight at the three squares of the material fixtures (the file mesh
/// `name`): orthographic, 240x80 panels, a black background.
pub fn squares_scene(name: &str) -> twinshade::Scene {
    let mut scene = twinshade::Scene {
        mesh: twinshade::scene::MeshSource::File { name: name.into() },
        panel: twinshade::scene::PanelSize {
            width: 240,
            height: 80,
        },
        background: twinshade::shading::Rgb::BLACK,
        ..twinshade::Scene::default()
    };
    scene.camera.projection = twinshade::geometry::Projection::Orthographic;
    scene.camera.ortho_height = 0.8;
    scene
}

/// The per-vertex and per-pixel panels of `scene` drawn from the file mesh `mesh`.
pub fn render_file_mesh(
    mesh: &twinshade::geometry::Mesh,
    scene: &twinshade::Scene,
) -> [Vec<u8>; 2] {
    use twinshade::{Framebuffer, Renderer, ShadingMode};
    let mut r = Renderer::new();
    r.set_file_mesh(mesh.clone());
    [ShadingMode::PerVertex, ShadingMode::PerPixel].map(|mode| {
        let mut fb = Framebuffer::new(0, 0);
        r.render(&scene.checked().expect("valid scene"), mode, &mut fb)
            .expect("renders");
        fb.bytes().to_vec()
    })
}

/// IEC 61966-2-1 (sRGB) encoding of linear light, in f64, to an 8-bit code (round half up):
/// the reference the closed-form checks compare with.
pub fn srgb_encode_f64(l: f64) -> u8 {
    let l = l.clamp(0.0, 1.0);
    let e = if l <= 0.0031308 {
        12.92 * l
    } else {
        1.055 * l.powf(1.0 / 2.4) - 0.055
    };
    (255.0 * e + 0.5).floor() as u8
}

/// IEC 61966-2-1 decoding of an 8-bit code to linear light, in f64.
pub fn srgb_decode_f64(c: u8) -> f64 {
    let v = f64::from(c) / 255.0;
    if v <= 0.04045 {
        v / 12.92
    } else {
        ((v + 0.055) / 1.055).powf(2.4)
    }
}

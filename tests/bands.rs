//! Horizontal bands: the panels drawn band by band (by separate renderers, as separate threads
//! or page workers would) and put together equal the panels drawn whole, byte for byte, for
//! any split. The whole-frame pair render is itself checked against the golden images and the
//! stored links elsewhere, so bands inherit that reference.

use twinshade::geometry::PolygonMode;
use twinshade::geometry::{import_with, Companion};
use twinshade::scene::MeshSource;
use twinshade::{Framebuffer, Renderer, Scene};
mod common;

/// The two panels whole, then put together from bands cut at `cuts`.
fn whole_and_banded(scene: &Scene, mesh: Option<&twinshade::geometry::Mesh>, cuts: &[u32]) {
    let valid = scene.checked().expect("valid scene");
    let fresh = || {
        let mut r = Renderer::new();
        if let Some(m) = mesh {
            r.set_file_mesh(m.clone());
        }
        r
    };
    let (mut g, mut p) = (Framebuffer::new(0, 0), Framebuffer::new(0, 0));
    let whole = fresh()
        .render_pair(&valid, &mut g, &mut p)
        .expect("renders");
    let (mut bg, mut bp) = (Vec::new(), Vec::new());
    let mut fragments = 0;
    let h = scene.panel.height;
    let mut edges = vec![0];
    edges.extend(cuts.iter().copied().filter(|&c| c > 0 && c < h));
    edges.push(h);
    for band in edges.windows(2) {
        let (mut a, mut b) = (Framebuffer::new(0, 0), Framebuffer::new(0, 0));
        let stats = fresh()
            .render_pair_rows(&valid, band[0]..band[1], &mut a, &mut b)
            .expect("band renders");
        assert_eq!(
            (a.width(), a.height()),
            (g.width(), (band[1] - band[0]) as usize)
        );
        bg.extend_from_slice(a.bytes());
        bp.extend_from_slice(b.bytes());
        fragments += stats[1].fragments;
    }
    assert!(
        bg == g.bytes(),
        "per-vertex panel from bands {edges:?} differs"
    );
    assert!(
        bp == p.bytes(),
        "per-pixel panel from bands {edges:?} differs"
    );
    assert_eq!(fragments, whole[1].fragments, "fragments over the bands");
    assert!(whole[1].fragments > 100, "the scene draws something");
}

#[test]
fn bands_put_together_are_the_whole_panels() {
    let mut scene = Scene::default();
    scene.panel.width = 160;
    scene.panel.height = 120;
    scene.turn(30.0, 15.0);
    // One band, two, three uneven, one per row near the middle, and a split at every 7 rows.
    let every7: Vec<u32> = (1..18).map(|k| k * 7).collect();
    let splits: [&[u32]; 5] = [&[], &[60], &[1, 45, 119], &[58, 59, 60, 61, 62], &every7];
    for cuts in splits {
        whole_and_banded(&scene, None, cuts);
    }
    // Every preset (quads filled whole, roll, metals, point lights, ...).
    for preset in twinshade::scene::presets() {
        let mut s = preset.scene;
        s.panel.width = 128;
        s.panel.height = 96;
        whole_and_banded(&s, None, &[31, 32, 77]);
    }
    // Polygons filled whole by the scanline fill.
    let mut quads = scene.clone();
    quads.mesh = MeshSource::Shape(twinshade::geometry::Shape::Torus {
        rings: 12,
        segments: 8,
    });
    quads.polygons = PolygonMode::Scanline;
    whole_and_banded(&quads, None, &[40, 41, 90]);
    // A mesh file with its own materials (OBJ with its library) and vertex colours (glTF).
    let obj = import_with(
        "squares.obj",
        common::fixtures::SQUARES_OBJ.as_bytes(),
        &[Companion {
            name: "squares.mtl",
            bytes: common::fixtures::SQUARES_MTL.as_bytes(),
        }],
    )
    .expect("imports");
    let mut file = scene.clone();
    file.mesh = MeshSource::File {
        name: "squares.obj".into(),
    };
    whole_and_banded(&file, Some(&obj.mesh), &[50, 70]);
    let gltf = twinshade::geometry::import("m.gltf", &common::fixtures::materials_gltf())
        .expect("imports");
    file.mesh = MeshSource::File {
        name: "m.gltf".into(),
    };
    whole_and_banded(&file, Some(&gltf.mesh), &[59, 61]);
}

#[test]
fn a_band_outside_the_panel_is_refused() {
    let scene = Scene::default().checked().expect("valid");
    let (mut a, mut b) = (Framebuffer::new(0, 0), Framebuffer::new(0, 0));
    let h = scene.panel.height;
    let (ten, five) = (10, 5); // a reversed band, as a caller might compute one
    for rows in [0..0, ten..five, 0..h + 1, h..h + 2] {
        let e = Renderer::new()
            .render_pair_rows(&scene, rows.clone(), &mut a, &mut b)
            .expect_err("refused");
        assert!(e.to_string().contains("not a band"), "{rows:?}: {e}");
    }
}

//! A mesh file's own materials and vertex colours, from a glTF file written with a
//! general-purpose glTF writer (the `gltf-json` crate 1.4.1, which the `gltf` reader is built
//! on): three squares side by side, a rough red dielectric, a glossy gold metal (double-sided),
//! and a white material with red and blue vertex colours (`COLOR_0`).

use twinshade::geometry::import;
use twinshade::scene::MaterialSource;
use twinshade::Scene;
mod common;
use common::fixtures::materials_gltf;

#[test]
fn a_gltf_files_materials_and_vertex_colours_are_read_and_drawn() {
    let file = materials_gltf();
    let m = import("squares.gltf", &file).expect("imports");
    let info = m.info();
    assert_eq!((info.faces, info.materials), (6, 3));
    assert!(info.vertex_colors);
    let mats = &m.mesh.materials;
    assert_eq!(mats[0].name, "rough red");
    assert_eq!(mats[0].base_color.to_array(), [0.8, 0.05, 0.05]);
    assert_eq!((mats[0].metallic, mats[0].roughness), (0.0, 0.9));
    assert_eq!((mats[1].metallic, mats[1].roughness), (1.0, 0.15));
    assert!(mats[1].double_sided && !mats[0].double_sided);
    assert_eq!(m.mesh.face_material, vec![0, 0, 1, 1, 2, 2]);
    // The white square's colours; the others are white (no COLOR_0).
    assert_eq!(m.mesh.colors[8].to_array(), [1.0, 0.0, 0.0]);
    assert_eq!(m.mesh.colors[9].to_array(), [0.0, 0.0, 1.0]);
    assert_eq!(m.mesh.colors[0].to_array(), [1.0, 1.0, 1.0]);

    let mut scene = common::squares_scene("squares.gltf");
    let render = |scene: &Scene| common::render_file_mesh(&m.mesh, scene);
    // Pixels in the middle of each square's left and right halves (the fit puts the three
    // squares across the panel).
    let px = |img: &[u8], x: usize| {
        let i = (40 * 240 + x) * 4;
        [img[i], img[i + 1], img[i + 2]].map(u32::from)
    };
    for img in render(&scene) {
        let red = px(&img, 40);
        assert!(
            red[0] > 3 * red[1].max(6) && red[0] > 3 * red[2].max(6),
            "red square {red:?}"
        );
        let gold = px(&img, 120);
        assert!(
            gold[0] >= gold[1] && gold[1] > gold[2],
            "gold square {gold:?}"
        );
        let (left, right) = (px(&img, 163), px(&img, 213));
        assert!(
            left[0] > 2 * left[2].max(6),
            "coloured square, left {left:?}"
        );
        assert!(
            right[2] > 2 * right[0].max(6),
            "coloured square, right {right:?}"
        );
    }
    // The page's own material instead: the red square is the scene's teal.
    scene.material_source = MaterialSource::Scene;
    for img in render(&scene) {
        let teal = px(&img, 40);
        assert!(
            teal[1] > teal[0] && teal[2] > teal[0],
            "scene material {teal:?}"
        );
    }
}

//! A mesh file's own materials and vertex colours, from a glTF file written with a
//! general-purpose glTF writer (the `gltf-json` crate 1.4.1, which the `gltf` reader is built
//! on): three squares side by side, a rough red dielectric, a glossy gold metal (double-sided),
//! and a white material with red and blue vertex colours (`COLOR_0`).

use base64::Engine;
use gltf_json as json;
use json::validation::Checked::Valid;
use json::validation::USize64;
use twinshade::geometry::{import, Projection};
use twinshade::scene::{MaterialSource, MeshSource, PanelSize};
use twinshade::shading::Rgb;
use twinshade::{Framebuffer, Renderer, Scene, ShadingMode};

/// The squares' corners: x offset, counter-clockwise seen from +z.
fn square(x: f32) -> [[f32; 3]; 4] {
    [
        [x - 0.9, -0.9, 0.0],
        [x + 0.9, -0.9, 0.0],
        [x + 0.9, 0.9, 0.0],
        [x - 0.9, 0.9, 0.0],
    ]
}

fn write_gltf() -> Vec<u8> {
    let mut root = json::Root::default();
    let mut bytes: Vec<u8> = Vec::new();
    let accessor = |root: &mut json::Root,
                    bytes: &mut Vec<u8>,
                    data: &[u8],
                    count: usize,
                    type_: json::accessor::Type,
                    component: json::accessor::ComponentType,
                    bounds: Option<(Vec<f32>, Vec<f32>)>| {
        while bytes.len() % 4 != 0 {
            bytes.push(0);
        }
        let offset = bytes.len();
        bytes.extend_from_slice(data);
        let view = root.push(json::buffer::View {
            buffer: json::Index::new(0),
            byte_length: USize64::from(data.len()),
            byte_offset: Some(USize64::from(offset)),
            byte_stride: None,
            name: None,
            target: None,
            extensions: None,
            extras: Default::default(),
        });
        root.push(json::Accessor {
            buffer_view: Some(view),
            byte_offset: None,
            count: USize64::from(count),
            component_type: Valid(json::accessor::GenericComponentType(component)),
            extensions: None,
            extras: Default::default(),
            type_: Valid(type_),
            min: bounds.as_ref().map(|b| json::Value::from(b.0.clone())),
            max: bounds.map(|b| json::Value::from(b.1)),
            name: None,
            normalized: false,
            sparse: None,
        })
    };
    let materials = [
        ("rough red", [0.8, 0.05, 0.05, 1.0], 0.0, 0.9, false),
        ("glossy gold", [1.0, 0.71, 0.29, 1.0], 1.0, 0.15, true),
        ("white", [1.0, 1.0, 1.0, 1.0], 0.0, 0.5, false),
    ];
    let mut primitives = Vec::new();
    for (k, (name, base, metallic, roughness, double_sided)) in materials.iter().enumerate() {
        let material = root.push(json::Material {
            name: Some(name.to_string()),
            double_sided: *double_sided,
            pbr_metallic_roughness: json::material::PbrMetallicRoughness {
                base_color_factor: json::material::PbrBaseColorFactor(*base),
                metallic_factor: json::material::StrengthFactor(*metallic),
                roughness_factor: json::material::StrengthFactor(*roughness),
                ..Default::default()
            },
            ..Default::default()
        });
        let corners = square(-2.2 + 2.2 * k as f32);
        let flat: Vec<f32> = corners.iter().flatten().copied().collect();
        let lo = (0..3)
            .map(|c| corners.iter().map(|p| p[c]).fold(f32::MAX, f32::min))
            .collect();
        let hi = (0..3)
            .map(|c| corners.iter().map(|p| p[c]).fold(f32::MIN, f32::max))
            .collect();
        let positions = accessor(
            &mut root,
            &mut bytes,
            bytemuck::cast_slice(&flat),
            4,
            json::accessor::Type::Vec3,
            json::accessor::ComponentType::F32,
            Some((lo, hi)),
        );
        let indices: [u16; 6] = [0, 1, 2, 0, 2, 3];
        let indices = accessor(
            &mut root,
            &mut bytes,
            bytemuck::cast_slice(&indices),
            6,
            json::accessor::Type::Scalar,
            json::accessor::ComponentType::U16,
            None,
        );
        let mut attributes = std::collections::BTreeMap::new();
        attributes.insert(Valid(json::mesh::Semantic::Positions), positions);
        if k == 2 {
            // Red on the left corners, blue on the right (linear, as glTF colours are).
            let colours: [f32; 12] = [1., 0., 0., 0., 0., 1., 0., 0., 1., 1., 0., 0.];
            let c = accessor(
                &mut root,
                &mut bytes,
                bytemuck::cast_slice(&colours),
                4,
                json::accessor::Type::Vec3,
                json::accessor::ComponentType::F32,
                None,
            );
            attributes.insert(Valid(json::mesh::Semantic::Colors(0)), c);
        }
        primitives.push(json::mesh::Primitive {
            attributes,
            extensions: None,
            extras: Default::default(),
            indices: Some(indices),
            material: Some(material),
            mode: Valid(json::mesh::Mode::Triangles),
            targets: None,
        });
    }
    let mesh = root.push(json::Mesh {
        extensions: None,
        extras: Default::default(),
        name: Some("three squares".into()),
        primitives,
        weights: None,
    });
    let node = root.push(json::Node {
        mesh: Some(mesh),
        ..Default::default()
    });
    let scene = root.push(json::Scene {
        extensions: None,
        extras: Default::default(),
        name: None,
        nodes: vec![node],
    });
    root.scene = Some(scene);
    root.push(json::Buffer {
        byte_length: USize64::from(bytes.len()),
        name: None,
        uri: Some(format!(
            "data:application/octet-stream;base64,{}",
            base64::engine::general_purpose::STANDARD.encode(&bytes)
        )),
        extensions: None,
        extras: Default::default(),
    });
    json::serialize::to_vec(&root).expect("serialises")
}

#[test]
fn a_gltf_files_materials_and_vertex_colours_are_read_and_drawn() {
    let file = write_gltf();
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

    let mut scene = Scene {
        mesh: MeshSource::File {
            name: "squares.gltf".into(),
        },
        panel: PanelSize {
            width: 240,
            height: 80,
        },
        background: Rgb::BLACK,
        ..Scene::default()
    };
    scene.camera.projection = Projection::Orthographic;
    scene.camera.ortho_height = 0.8;
    let render = |scene: &Scene| {
        let mut r = Renderer::new();
        r.set_file_mesh(m.mesh.clone());
        [ShadingMode::PerVertex, ShadingMode::PerPixel].map(|mode| {
            let mut fb = Framebuffer::new(0, 0);
            r.render(&scene.checked().expect("valid"), mode, &mut fb)
                .expect("renders");
            fb.bytes().to_vec()
        })
    };
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

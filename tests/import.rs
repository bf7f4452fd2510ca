//! Mesh import: fixtures of our own making written by the tests, every malformed variant
//! with its own message and place, and no panic on arbitrary bytes.

use glam::Vec3;
use twinshade::geometry::Shape;
use twinshade::geometry::{import, Format, Location};
use twinshade::geometry::{Mesh, MeshError, MAX_TRIANGLES};
use twinshade::scene::{GltfNormals, MeshSource, PanelSize};
use twinshade::{Framebuffer, Renderer, Scene, ShadingMode};
mod common;
use common::fixtures::{gltf_files, ply_files, three_files, CUBE_OBJ};

#[test]
fn obj_cube_of_quads_with_normals() {
    let m = import("cube.obj", CUBE_OBJ.as_bytes()).expect("imports");
    assert_eq!(m.format, Format::Obj);
    assert_eq!(
        (
            m.mesh.positions.len(),
            m.mesh.face_count(),
            m.mesh.triangle_count()
        ),
        (8, 6, 12)
    );
    assert!(m.has_normals && m.dropped_faces == 0);
    // Centred and scaled: the corners end at distance 1.
    let (lo, hi) = m.mesh.bounds().expect("bounds");
    let k = 1.0 / 3.0f32.sqrt();
    assert!(
        (lo + Vec3::splat(k)).abs().max_element() < 1e-6
            && (hi - Vec3::splat(k)).abs().max_element() < 1e-6
    );
}

#[test]
fn obj_negative_indices_polygons_and_objects_merge() {
    let text = "o first\nv 0 0 0\nv 1 0 0\nv 1 1 0\nv 0.5 1.5 0\nv 0 1 0\nf -5 -4 -3 -2 -1\n\
                g second\nv 2 0 0\nv 3 0 0\nv 3 1 0\nf 6/1 7/2 8/3\nvt 0 0\ns off\nusemtl glaze\n";
    let m = import("merged.obj", text.as_bytes()).expect("imports");
    assert_eq!(m.mesh.positions.len(), 8);
    assert_eq!(m.mesh.face_count(), 2, "a pentagon and a triangle");
    assert_eq!(m.mesh.face(0).len(), 5, "the pentagon stays a polygon");
    assert_eq!(m.mesh.triangle_count(), 4);
    assert!(!m.has_normals);
}

#[test]
fn gltf_without_normals_is_shaded_flat_unless_the_user_asks_for_smooth() {
    // glTF 2.0, 3.7.2.1: "When normals are not specified, client implementations MUST
    // calculate flat normals". Per-vertex lighting of flat normals gives every triangle one
    // colour (its three corners share the face normal and, with a directional light and an
    // orthographic view, the same light).
    let shape = Shape::Icosphere { level: 1 }.build();
    let (_, glb) = gltf_files(&shape, &[[0.0, 0.0, 0.0]]);
    let m = import("ball.glb", &glb).expect("imports");
    assert!(!m.has_normals);
    let render = |normals: GltfNormals| {
        let mut scene = Scene {
            mesh: MeshSource::File {
                name: "ball.glb".into(),
            },
            panel: PanelSize {
                width: 120,
                height: 90,
            },
            ..Scene::default()
        };
        scene.normals.gltf_without_normals = normals;
        scene.camera.projection = twinshade::geometry::Projection::Orthographic;
        scene.lights.truncate(1);
        scene.material.specular = 0.0;
        let mut r = Renderer::new();
        r.set_file_mesh(m.mesh.clone());
        let mut fb = Framebuffer::new(0, 0);
        r.render(
            &scene.checked().expect("valid"),
            ShadingMode::PerVertex,
            &mut fb,
        )
        .expect("renders");
        fb.bytes().to_vec()
    };
    let colours = |bytes: &[u8]| {
        let mut c: Vec<&[u8]> = bytes.chunks_exact(4).collect();
        c.sort_unstable();
        c.dedup();
        c.len()
    };
    let (flat, smooth) = (render(GltfNormals::Flat), render(GltfNormals::Smooth));
    // 80 faces, about half of them in view, plus the background: few colours when flat.
    assert!(colours(&flat) <= 60, "flat: {} colours", colours(&flat));
    assert!(
        colours(&smooth) > 3 * colours(&flat),
        "smooth: {} colours, flat {}",
        colours(&smooth),
        colours(&flat)
    );
}

#[test]
fn gltf_node_transforms_are_applied() {
    let ball = Shape::Icosphere { level: 1 }.build();
    let (text, glb) = gltf_files(&ball, &[[0.0, 0.0, 0.0], [3.0, 0.0, 0.0]]);
    for (name, bytes) in [("pair.gltf", text.into_bytes()), ("pair.glb", glb)] {
        let m = import(name, &bytes).expect("imports");
        assert_eq!(
            m.mesh.positions.len(),
            2 * ball.positions.len(),
            "{name}: two instances"
        );
        assert_eq!(m.mesh.face_count(), 2 * ball.face_count(), "{name}");
        // Spheres of radius 1 at x = 0 and x = 3: 5 wide, 2 high (before the fit to the view).
        let (lo, hi) = m.mesh.bounds().expect("bounds");
        let aspect = (hi.x - lo.x) / (hi.y - lo.y);
        assert!((aspect - 2.5).abs() < 1e-5, "{name}: aspect {aspect}");
    }
}

#[test]
fn the_same_shape_in_eight_files_renders_identical_pixels() {
    let shape = Shape::Icosphere { level: 2 }.build();
    let (obj, bin, ascii) = three_files(&shape);
    // glTF keeps the icosphere's own vertex order; OBJ and STL list vertices by first use.
    let (gltf_text, glb) = gltf_files(&shape, &[[0.0, 0.0, 0.0]]);
    let (ply_ascii, ply_le, ply_be) = ply_files(&shape);
    let mut images = Vec::new();
    for (name, bytes, format) in [
        ("ball.obj", obj.into_bytes(), Format::Obj),
        ("ball.stl", bin, Format::StlBinary),
        ("ball-ascii.stl", ascii.into_bytes(), Format::StlAscii),
        ("ball.gltf", gltf_text.into_bytes(), Format::Gltf),
        ("ball.glb", glb, Format::Glb),
        ("ball.ply", ply_ascii.into_bytes(), Format::Ply),
        ("ball-le.ply", ply_le, Format::Ply),
        ("ball-be.ply", ply_be, Format::Ply),
    ] {
        let m = import(name, &bytes).expect("imports");
        assert_eq!(m.format, format, "{name}");
        assert_eq!(
            (m.mesh.positions.len(), m.mesh.face_count()),
            (162, 320),
            "{name} counts"
        );
        let mut scene = Scene {
            mesh: MeshSource::File { name: name.into() },
            panel: PanelSize {
                width: 200,
                height: 150,
            },
            ..Scene::default()
        };
        // The files hold no normals; glTF asks for flat ones (checked below), the others
        // get smooth ones: compared here with smooth normals everywhere.
        scene.normals.gltf_without_normals = GltfNormals::Smooth;
        let mut r = Renderer::new();
        r.set_file_mesh(m.mesh);
        let mut out = Vec::new();
        for mode in [ShadingMode::PerVertex, ShadingMode::PerPixel] {
            let mut fb = Framebuffer::new(0, 0);
            r.render(&scene.checked().expect("valid scene"), mode, &mut fb)
                .expect("renders");
            out.push(fb.bytes().to_vec());
        }
        images.push((name, out));
    }
    for (name, out) in &images[1..] {
        assert!(
            out == &images[0].1,
            "{name} renders differently from {}",
            images[0].0
        );
    }
}

fn error(name: &str, bytes: &[u8]) -> (Location, String) {
    let e = import(name, bytes).expect_err(name);
    assert!(
        e.to_string().starts_with(name),
        "the message names the file: {e}"
    );
    (e.at, e.message)
}

#[test]
fn every_malformed_variant_is_explained_with_its_place() {
    let mut bin = three_files(&Shape::Icosphere { level: 0 }.build()).1;
    let cases: Vec<(&str, Vec<u8>, Location, &str)> = vec![
        ("empty.obj", vec![], Location::File, "empty"),
        ("latin1.obj", b"v 0 0 0\nv 1 0 0\n# caf\xe9\n".to_vec(), Location::Byte(21), "UTF-8"),
        ("word.obj", b"v 0 0 0\nv 1 x 0\n".to_vec(), Location::Line(2), "'x' is not a finite number"),
        ("nan.obj", b"v nan 0 0\n".to_vec(), Location::Line(1), "finite"),
        ("inf.obj", b"v 0 0 0\nvn 0 inf 0\n".to_vec(), Location::Line(2), "finite"),
        ("short.obj", b"v 0 0\n".to_vec(), Location::Line(1), "needs 3 numbers"),
        ("range.obj", b"v 0 0 0\nv 1 0 0\nv 0 1 0\nf 1 2 9\n".to_vec(), Location::Line(4), "out of range"),
        ("zero.obj", b"v 0 0 0\nv 1 0 0\nv 0 1 0\nf 0 1 2\n".to_vec(), Location::Line(4), "out of range"),
        ("normal.obj", b"v 0 0 0\nv 1 0 0\nv 0 1 0\nf 1//1 2//1 3//1\n".to_vec(), Location::Line(4), "normal index 1 is out of range"),
        ("two.obj", b"v 0 0 0\nv 1 0 0\nf 1 2\n".to_vec(), Location::Line(3), "at least 3"),
        ("nofaces.obj", b"# nothing\nv 0 0 0\n".to_vec(), Location::File, "no faces"),
        ("flat.obj", b"v 0 0 0\nv 1 0 0\nv 2 0 0\nf 1 2 3\n".to_vec(), Location::File, "degenerate"),
        ("html.obj", b"<html>\n".to_vec(), Location::Line(1), "unknown statement"),
        ("cut.stl", bin[..bin.len() - 7].to_vec(), Location::Byte(bin.len() - 7), "cut short"),
        ("png.stl", b"\x89PNG\r\n\x1a\n\0\0\0\rIHDR".to_vec(), Location::Byte(0), "not an STL file"),
        ("two.stl", b"solid x\nfacet normal 0 0 1\nouter loop\nvertex 0 0 0\nvertex 1 0 0\nendloop\nendfacet\nendsolid\n".to_vec(), Location::Line(6), "3 vertices"),
        ("open.stl", b"solid x\nfacet normal 0 0 1\nouter loop\nvertex 0 0 0\n".to_vec(), Location::File, "ends inside a facet"),
        ("what.txt", b"hello\n".to_vec(), Location::File, "unrecognised"),
        ("bad.gltf", b"{\"asset\": ".to_vec(), Location::File, "not a valid glTF"),
        ("fake.glb", b"PK\x03\x04 zip".to_vec(), Location::Byte(0), "does not start with 'glTF'"),
        ("cut.glb", b"glTF\x02\0\0\0\xff\0\0\0".to_vec(), Location::File, "not a valid glTF"),
        ("text.ply", b"solid\n".to_vec(), Location::Byte(0), "does not start with 'ply'"),
        ("nohead.ply", b"ply\nformat ascii 1.0\nelement vertex 1\n".to_vec(), Location::Line(4), "end_header"),
        ("word.ply", b"ply\nformat ascii 1.0\nelement vertex 1\nproperty float x\nproperty float y\nproperty float z\nend_header\n0 zero 0\n".to_vec(), Location::Line(8), "'zero' is not a number"),
        ("cut.ply", b"ply\nformat binary_little_endian 1.0\nelement vertex 2\nproperty float x\nproperty float y\nproperty float z\nend_header\n\0\0\0\0\0\0\0\0\0\0\0\0\0\0".to_vec(), Location::Byte(127), "cut short"),
        ("index.ply", b"ply\nformat ascii 1.0\nelement vertex 3\nproperty float x\nproperty float y\nproperty float z\nelement face 1\nproperty list uchar int vertex_indices\nend_header\n0 0 0\n1 0 0\n0 1 0\n3 0 1 5\n".to_vec(), Location::Line(13), "out of range"),
        ("external.gltf", br#"{"asset":{"version":"2.0"},"buffers":[{"uri":"mesh.bin","byteLength":4}]}"#.to_vec(), Location::File, "external file"),
    ];
    // A binary STL with a NaN coordinate in its second triangle's first vertex.
    let at = 84 + 50 + 12;
    bin[at..at + 4].copy_from_slice(&f32::NAN.to_le_bytes());
    let mut all = cases;
    all.push(("nan.stl", bin, Location::Byte(at), "NaN"));
    for (name, bytes, at, needle) in all {
        let (got_at, message) = error(name, &bytes);
        assert_eq!(got_at, at, "{name}: place ({message})");
        assert!(
            message.contains(needle),
            "{name}: '{message}' should say '{needle}'"
        );
    }
}

#[test]
fn the_triangle_limit_is_enforced() {
    let mut m = Mesh::new("huge");
    m.positions = vec![Vec3::ZERO, Vec3::X, Vec3::Y];
    m.corners.reserve(3 * (MAX_TRIANGLES + 1));
    for _ in 0..=MAX_TRIANGLES {
        m.push_face_positions(&[0, 1, 2]);
    }
    assert!(
        matches!(m.validate(), Err(MeshError::TooLarge { count, .. }) if count == MAX_TRIANGLES + 1)
    );
}

#[test]
fn arbitrary_bytes_never_panic() {
    // Property test: random files and damaged copies of valid ones must give Ok or Err,
    // never a panic. 20,000 inputs per run with a fixed seed; TWINSHADE_FUZZ_INPUTS and
    // TWINSHADE_FUZZ_SEED run longer or other campaigns.
    let env = |k: &str, d: u64| {
        std::env::var(k)
            .ok()
            .and_then(|v| v.parse().ok())
            .unwrap_or(d)
    };
    let total = env("TWINSHADE_FUZZ_INPUTS", 20_000) as u32;
    let mut state = env("TWINSHADE_FUZZ_SEED", 0x1234_5678_9abc_def1).max(1);
    let mut next = move || {
        state ^= state << 13;
        state ^= state >> 7;
        state ^= state << 17;
        state
    };
    let (obj, bin, ascii) = three_files(&Shape::Icosphere { level: 1 }.build());
    let (gltf_text, glb) = gltf_files(&Shape::Icosphere { level: 1 }.build(), &[[0.0; 3]]);
    let (ply_ascii, ply_le, _) = ply_files(&Shape::Icosphere { level: 1 }.build());
    let seeds: [(&str, Vec<u8>); 8] = [
        ("g.ply", ply_ascii.into_bytes()),
        ("h.ply", ply_le),
        ("a.obj", obj.into_bytes()),
        ("b.stl", bin),
        ("c.stl", ascii.into_bytes()),
        ("d.obj", CUBE_OBJ.as_bytes().to_vec()),
        ("e.gltf", gltf_text.into_bytes()),
        ("f.glb", glb),
    ];
    let mut runs = 0;
    for i in 0..total {
        let (name, mut bytes) = match i % 9 {
            8 => ("r.obj", (0..next() % 600).map(|_| next() as u8).collect()),
            k => (seeds[k as usize].0, seeds[k as usize].1.clone()),
        };
        match next() % 3 {
            0 if !bytes.is_empty() => {
                let cut = (next() as usize) % bytes.len();
                bytes.truncate(cut);
            }
            _ => {
                for _ in 0..1 + next() % 8 {
                    if bytes.is_empty() {
                        break;
                    }
                    let at = (next() as usize) % bytes.len();
                    bytes[at] = next() as u8;
                }
            }
        }
        let _ = import(name, &bytes);
        runs += 1;
    }
    eprintln!("import fuzz: {runs} inputs, no panic");
    assert_eq!(runs, total);
}

#[test]
fn rasterizer_survives_arbitrary_geometry() {
    // Property test: random meshes (coordinates from 1e-6 to 1e6, degenerate and repeated
    // corners, geometry behind and around the camera) under random views, in every shading
    // mode: no panic, and every result either renders or is refused with a message.
    let mut state = 0x0bad_5eed_cafe_f00du64;
    let mut next = move || {
        state ^= state << 13;
        state ^= state >> 7;
        state ^= state << 17;
        state
    };
    let mut unit = || (next() >> 40) as f32 / (1u64 << 24) as f32;
    let mut renders = 0;
    for case in 0..300 {
        let scale = [1e-6f32, 1e-2, 1.0, 30.0, 1e6][case % 5];
        let mut m = Mesh::new("random");
        let n = 3 + (unit() * 40.0) as u32;
        m.positions = (0..n)
            .map(|_| Vec3::new(unit() - 0.5, unit() - 0.5, unit() - 0.5) * 2.0 * scale)
            .collect();
        for _ in 0..(1.0 + unit() * 60.0) as u32 {
            let k = 3 + (unit() * 3.0) as usize;
            let idx: Vec<u32> = (0..k).map(|_| (unit() * n as f32) as u32 % n).collect();
            m.push_face_positions(&idx);
        }
        if m.validate().is_err() {
            continue;
        }
        let mut scene = Scene {
            mesh: MeshSource::File {
                name: "random".into(),
            },
            panel: PanelSize {
                width: 64,
                height: 48,
            },
            cull_back_faces: case % 2 == 0,
            perspective_correct: case % 3 != 0,
            ..Scene::default()
        };
        scene.camera.distance = 0.2 + unit() * 5.0;
        scene.camera.roll_deg = unit() * 360.0;
        scene.turn(unit() * 360.0, unit() * 180.0);
        let mut r = Renderer::new();
        r.set_file_mesh(m);
        for mode in [
            ShadingMode::Flat,
            ShadingMode::PerVertex,
            ShadingMode::PerPixel,
            ShadingMode::Exact,
        ] {
            let mut fb = Framebuffer::new(0, 0);
            if r.render(&scene.checked().expect("valid scene"), mode, &mut fb)
                .is_ok()
            {
                renders += 1;
            }
        }
    }
    eprintln!("arbitrary geometry: {renders} renders, no panic");
    assert!(renders > 800, "most random scenes render: {renders}");
}

#[test]
fn vertex_colours_are_read_and_tint_both_panels() {
    // A white square of two triangles, red on the left corners and blue on the right, as PLY
    // (uchar colours) and as OBJ (`v x y z r g b`).
    let ply = "ply\nformat ascii 1.0\nelement vertex 4\nproperty float x\nproperty float y\n\
               property float z\nproperty uchar red\nproperty uchar green\nproperty uchar blue\n\
               element face 2\nproperty list uchar int vertex_indices\nend_header\n\
               -1 -1 0 255 0 0\n1 -1 0 0 0 255\n1 1 0 0 0 255\n-1 1 0 255 0 0\n\
               3 0 1 2\n3 0 2 3\n";
    let obj = "v -1 -1 0 1 0 0\nv 1 -1 0 0 0 1\nv 1 1 0 0 0 1\nv -1 1 0 1 0 0\nf 1 2 3\nf 1 3 4\n";
    for (name, bytes) in [("square.ply", ply), ("square.obj", obj)] {
        let m = import(name, bytes.as_bytes()).expect("imports");
        assert!(m.info().vertex_colors, "{name}");
        assert_eq!(m.mesh.colors.len(), 4, "{name}");
        assert_eq!(m.mesh.colors[0], Vec3::new(1.0, 0.0, 0.0), "{name}");
        assert_eq!(m.mesh.colors[1], Vec3::new(0.0, 0.0, 1.0), "{name}");
        let mut scene = Scene {
            mesh: MeshSource::File { name: name.into() },
            panel: PanelSize {
                width: 100,
                height: 100,
            },
            ..Scene::default()
        };
        scene.material.base_color = twinshade::shading::Rgb::WHITE;
        // No light-coloured highlight, so the colours are the tints alone.
        scene.material.specular = 0.0;
        scene.camera.projection = twinshade::geometry::Projection::Orthographic;
        scene.cull_back_faces = false;
        let render = |scene: &Scene| common::render_file_mesh(&m.mesh, scene);
        let px = |img: &[u8], x: usize, y: usize| {
            let i = (y * 100 + x) * 4;
            [img[i], img[i + 1], img[i + 2]]
        };
        for img in render(&scene) {
            let (left, right) = (px(&img, 25, 50), px(&img, 74, 50));
            assert!(
                left[0] > 2 * left[2].max(8),
                "{name}: left is red: {left:?}"
            );
            assert!(
                right[2] > 2 * right[0].max(8),
                "{name}: right is blue: {right:?}"
            );
        }
        // Turned off, the square is the base colour (white light on white: grey, not red).
        scene.vertex_colors = false;
        for img in render(&scene) {
            let left = px(&img, 25, 50);
            assert!(left[0].abs_diff(left[2]) < 40, "{name}: untinted {left:?}");
        }
    }
}

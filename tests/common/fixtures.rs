//! Mesh files of our own making, written by the tests from procedural shapes (the same
//! indexed mesh in every format), shared by the importer's tests and its outside checks.

use glam::Vec3;
use twinshade::geometry::Mesh;

pub const CUBE_OBJ: &str = "# a cube of quads with face normals
o cube
v -1 -1 -1
v 1 -1 -1
v 1 1 -1
v -1 1 -1
v -1 -1 1
v 1 -1 1
v 1 1 1
v -1 1 1
vn 0 0 -1
vn 0 0 1
vn -1 0 0
vn 1 0 0
vn 0 -1 0
vn 0 1 0
f 1//1 4//1 3//1 2//1
f 5//2 6//2 7//2 8//2
f 1//3 5//3 8//3 4//3
f 2//4 3//4 7//4 6//4
f 1//5 2//5 6//5 5//5
f 4//6 8//6 7//6 3//6
";

/// Triangles of a shape, written as OBJ text, binary STL and ASCII STL (vertices in order of
/// first use, so all three describe the same indexed mesh).
pub fn three_files(mesh: &Mesh) -> (String, Vec<u8>, String) {
    let tris: Vec<[Vec3; 3]> = (0..mesh.face_count())
        .map(|f| {
            let c = mesh.face(f);
            [0, 1, 2].map(|k| mesh.positions[c[k].position as usize])
        })
        .collect();
    let mut order: Vec<Vec3> = Vec::new();
    let mut obj_faces = String::new();
    for t in &tris {
        let idx: Vec<usize> = t
            .iter()
            .map(|p| match order.iter().position(|q| q == p) {
                Some(i) => i + 1,
                None => {
                    order.push(*p);
                    order.len()
                }
            })
            .collect();
        obj_faces += &format!("f {} {} {}\n", idx[0], idx[1], idx[2]);
    }
    let obj: String = order
        .iter()
        .map(|p| format!("v {:?} {:?} {:?}\n", p.x, p.y, p.z))
        .collect::<String>()
        + &obj_faces;
    let mut bin = vec![0u8; 80];
    bin.extend_from_slice(&(tris.len() as u32).to_le_bytes());
    let mut ascii = String::from("solid shape\n");
    for t in &tris {
        bin.extend_from_slice(&[0u8; 12]);
        ascii += "  facet normal 0 0 0\n    outer loop\n";
        for p in t {
            for c in p.to_array() {
                bin.extend_from_slice(&c.to_le_bytes());
            }
            ascii += &format!("      vertex {:?} {:?} {:?}\n", p.x, p.y, p.z);
        }
        bin.extend_from_slice(&[0u8; 2]);
        ascii += "    endloop\n  endfacet\n";
    }
    ascii += "endsolid shape\n";
    (obj, bin, ascii)
}

/// The positions and triangle indices of a shape as glTF 2.0: JSON with a data URI, and the
/// same as a binary GLB container. `nodes` lists a translation per node instance.
pub fn gltf_files(mesh: &Mesh, nodes: &[[f32; 3]]) -> (String, Vec<u8>) {
    use base64::Engine;
    let mut bin = Vec::new();
    for p in &mesh.positions {
        for c in p.to_array() {
            bin.extend_from_slice(&c.to_le_bytes());
        }
    }
    let pos_len = bin.len();
    let mut count = 0;
    for f in 0..mesh.face_count() {
        for c in mesh.face(f) {
            bin.extend_from_slice(&c.position.to_le_bytes());
            count += 1;
        }
    }
    let (lo, hi) = mesh.bounds().expect("bounds");
    let node_json: Vec<String> = nodes
        .iter()
        .map(|t| format!(r#"{{"mesh":0,"translation":[{},{},{}]}}"#, t[0], t[1], t[2]))
        .collect();
    let roots: Vec<String> = (0..nodes.len()).map(|i| i.to_string()).collect();
    let json = |uri: &str| {
        format!(
            r#"{{"asset":{{"version":"2.0"}},"scene":0,"scenes":[{{"nodes":[{}]}}],"nodes":[{}],
"meshes":[{{"primitives":[{{"attributes":{{"POSITION":0}},"indices":1}}]}}],
"buffers":[{{{uri}"byteLength":{}}}],
"bufferViews":[{{"buffer":0,"byteOffset":0,"byteLength":{pos_len}}},{{"buffer":0,"byteOffset":{pos_len},"byteLength":{}}}],
"accessors":[{{"bufferView":0,"componentType":5126,"count":{},"type":"VEC3","min":[{},{},{}],"max":[{},{},{}]}},
{{"bufferView":1,"componentType":5125,"count":{count},"type":"SCALAR"}}]}}"#,
            roots.join(","),
            node_json.join(","),
            bin.len(),
            bin.len() - pos_len,
            mesh.positions.len(),
            lo.x,
            lo.y,
            lo.z,
            hi.x,
            hi.y,
            hi.z
        )
    };
    let data_uri = format!(
        r#""uri":"data:application/octet-stream;base64,{}","#,
        base64::engine::general_purpose::STANDARD.encode(&bin)
    );
    let text = json(&data_uri);
    let mut json_chunk = json("").into_bytes();
    while json_chunk.len() % 4 != 0 {
        json_chunk.push(b' ');
    }
    let mut bin_chunk = bin.clone();
    while bin_chunk.len() % 4 != 0 {
        bin_chunk.push(0);
    }
    let total = 12 + 8 + json_chunk.len() + 8 + bin_chunk.len();
    let mut glb = Vec::new();
    glb.extend_from_slice(b"glTF");
    glb.extend_from_slice(&2u32.to_le_bytes());
    glb.extend_from_slice(&(total as u32).to_le_bytes());
    glb.extend_from_slice(&(json_chunk.len() as u32).to_le_bytes());
    glb.extend_from_slice(b"JSON");
    glb.extend_from_slice(&json_chunk);
    glb.extend_from_slice(&(bin_chunk.len() as u32).to_le_bytes());
    glb.extend_from_slice(b"BIN\0");
    glb.extend_from_slice(&bin_chunk);
    (text, glb)
}

/// A shape as PLY: ASCII, binary little endian (float) and binary big endian (double).
pub fn ply_files(mesh: &Mesh) -> (String, Vec<u8>, Vec<u8>) {
    let header = |format: &str, real: &str| {
        format!(
            "ply\nformat {format} 1.0\ncomment made by the twinshade tests\nelement vertex {}\n\
             property {real} x\nproperty {real} y\nproperty {real} z\nelement face {}\n\
             property list uchar int vertex_indices\nend_header\n",
            mesh.positions.len(),
            mesh.face_count()
        )
    };
    let mut ascii = header("ascii", "float");
    let mut le = header("binary_little_endian", "float").into_bytes();
    let mut be = header("binary_big_endian", "double").into_bytes();
    for p in &mesh.positions {
        ascii += &format!("{:?} {:?} {:?}\n", p.x, p.y, p.z);
        for c in p.to_array() {
            le.extend_from_slice(&c.to_le_bytes());
            be.extend_from_slice(&f64::from(c).to_be_bytes());
        }
    }
    for f in 0..mesh.face_count() {
        let face = mesh.face(f);
        ascii += &format!("{}", face.len());
        le.push(face.len() as u8);
        be.push(face.len() as u8);
        for c in face {
            ascii += &format!(" {}", c.position);
            le.extend_from_slice(&(c.position as i32).to_le_bytes());
            be.extend_from_slice(&(c.position as i32).to_be_bytes());
        }
        ascii += "\n";
    }
    (ascii, le, be)
}

/// The squares' corners: x offset, counter-clockwise seen from +z.
fn square(x: f32) -> [[f32; 3]; 4] {
    [
        [x - 0.9, -0.9, 0.0],
        [x + 0.9, -0.9, 0.0],
        [x + 0.9, 0.9, 0.0],
        [x - 0.9, 0.9, 0.0],
    ]
}

/// A glTF file written with a general-purpose glTF writer (the `gltf-json` crate 1.4.1): three
/// squares side by side, a rough red dielectric, a glossy gold metal (double-sided), and a
/// white material with red (left) and blue (right) vertex colours (`COLOR_0`).
pub fn materials_gltf() -> Vec<u8> {
    use base64::Engine;
    use gltf_json as json;
    use json::validation::Checked::Valid;
    use json::validation::USize64;
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

/// Three squares side by side in an OBJ file naming a library: the first before any `usemtl`,
/// the second "plastic", the third a material the library lacks, then again as "brushed".
pub const SQUARES_OBJ: &str = "mtllib squares.mtl
v -3 -1 0
v -1 -1 0
v -1 1 0
v -3 1 0
v -1 -1 0
v 1 -1 0
v 1 1 0
v -1 1 0
v 1 -1 0
v 3 -1 0
v 3 1 0
v 1 1 0
f 1 2 3 4
usemtl plastic
f 5 6 7 8
usemtl missing
f 9 10 11 12
usemtl brushed
f 9 10 11 12
";

/// The library of [`SQUARES_OBJ`]: a Blinn-Phong plastic with a bluish highlight, a matte
/// grey without highlight (`illum 1`), and a brushed metal with `Pr`/`Pm` and a texture map.
pub const SQUARES_MTL: &str = "# our own library
newmtl plastic
Kd 0.8 0.1 0.1
Ks 0.2 0.4 1.0
Ns 40
Ke 0 0 0
illum 2
newmtl matte
Kd 0.5
Ks 1 1 1
illum 1
newmtl brushed
Kd 0.9 0.7 0.2
Pr 0.35
Pm 1
map_Kd brushed.png
";

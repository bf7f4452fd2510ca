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

//! The mesh importers checked from outside: general-purpose parsers from the registry read the
//! same files and must agree on positions, normals and indices (tobj 4.0.5 for OBJ, stl_io
//! 0.11.0 for STL, ply-rs 0.1.3 for PLY), both on our own fixtures and on mesh files authored
//! outside this project, shipped inside registry packages (obj-rs 0.7.4, stl_io 0.11.0,
//! ply-rs 0.1.3; docs/REFERENCES.md lists them). Those files are read from the packages cargo
//! downloaded for the tests (found with `cargo metadata`), so none is copied into the repo.

use glam::Vec3;
use std::io::Cursor;
use twinshade::geometry::{import, Format, Imported, Mesh, Shape};
mod common;
use common::fixtures::{ply_files, three_files, CUBE_OBJ};
use common::outside::outside_file;

/// Positions are compared in the file's units: the importer centres and scales each mesh and
/// records how ([`Imported::fit`]); undoing that costs a few ulps.
fn close(a: Vec3, b: Vec3, what: &str) {
    let tol = 1e-5 * a.abs().max_element().max(b.abs().max_element()).max(1.0);
    assert!((a - b).abs().max_element() <= tol, "{what}: {a} vs {b}");
}

fn authored(m: &Imported, position: u32) -> Vec3 {
    m.fit.authored(m.mesh.positions[position as usize])
}

fn v3(xs: &[f32], i: u32) -> Vec3 {
    let i = i as usize * 3;
    Vec3::new(xs[i], xs[i + 1], xs[i + 2])
}

/// True when `a[i] == a[j]` exactly where `b[i] == b[j]`: the two index lists describe the
/// same sharing of vertices between corners (whatever numbers each parser gives them).
fn same_sharing(a: &[u32], b: &[u32]) -> bool {
    use std::collections::HashMap;
    let (mut ab, mut ba) = (HashMap::new(), HashMap::new());
    a.len() == b.len()
        && a.iter()
            .zip(b)
            .all(|(x, y)| *ab.entry(*x).or_insert(*y) == *y && *ba.entry(*y).or_insert(*x) == *x)
}

/// Compares the OBJ importer with tobj (polygons kept, positions and normals indexed
/// separately, as the importer keeps them); returns (positions used, faces, normals used).
fn agree_with_tobj(name: &str, bytes: &[u8]) -> (usize, usize, usize) {
    let ours = import(name, bytes).expect("twinshade imports");
    assert_eq!(ours.format, Format::Obj);
    let options = tobj::LoadOptions {
        single_index: false,
        triangulate: false,
        ignore_points: true,
        ignore_lines: true,
    };
    let (models, _materials) = tobj::load_obj_buf(&mut Cursor::new(bytes), &options, |_| {
        Err(tobj::LoadError::OpenFileFailed)
    })
    .expect("tobj loads");
    let mesh: &Mesh = &ours.mesh;
    let mut face = 0;
    let (mut their_positions, mut their_normals) = (0, 0);
    for model in &models {
        let t = &model.mesh;
        let arities: Vec<u32> = if t.face_arities.is_empty() {
            vec![3; t.indices.len() / 3]
        } else {
            t.face_arities.clone()
        };
        let mut start = 0usize;
        let (mut our_p, mut our_n) = (Vec::new(), Vec::new());
        for &n in &arities {
            let corners = mesh.face(face);
            assert_eq!(corners.len(), n as usize, "{name}: face {face} size");
            for (k, c) in corners.iter().enumerate() {
                let ti = t.indices[start + k];
                close(
                    authored(&ours, c.position),
                    v3(&t.positions, ti),
                    &format!("{name}: face {face} corner {k} position"),
                );
                our_p.push(c.position);
                if !t.normal_indices.is_empty() {
                    let tn = t.normal_indices[start + k];
                    let n = mesh.normals[c.normal as usize];
                    close(
                        n,
                        v3(&t.normals, tn),
                        &format!("{name}: face {face} corner {k} normal"),
                    );
                    our_n.push(c.normal);
                }
            }
            start += n as usize;
            face += 1;
        }
        assert!(
            same_sharing(&our_p, &t.indices),
            "{name}: position indices of {}",
            model.name
        );
        if !t.normal_indices.is_empty() {
            assert!(
                same_sharing(&our_n, &t.normal_indices),
                "{name}: normal indices"
            );
        }
        their_positions += t.positions.len() / 3;
        their_normals += t.normals.len() / 3;
    }
    assert_eq!(face, mesh.face_count(), "{name}: every face compared");
    assert_eq!(
        ours.has_normals,
        their_normals > 0,
        "{name}: normals present"
    );
    (their_positions, face, their_normals)
}

/// Compares the STL importer with stl_io (which merges equal vertices, as ours does).
fn agree_with_stl_io(name: &str, bytes: &[u8]) -> (usize, usize) {
    let ours = import(name, bytes).expect("twinshade imports");
    assert!(matches!(ours.format, Format::StlBinary | Format::StlAscii));
    let theirs = stl_io::read_stl(&mut Cursor::new(bytes)).expect("stl_io reads");
    assert_eq!(
        ours.mesh.face_count(),
        theirs.faces.len(),
        "{name}: triangles"
    );
    let mut our_idx = Vec::new();
    let mut their_idx = Vec::new();
    for (f, t) in theirs.faces.iter().enumerate() {
        let corners = ours.mesh.face(f);
        assert_eq!(corners.len(), 3);
        for (k, c) in corners.iter().enumerate() {
            let v = theirs.vertices[t.vertices[k]].0;
            close(
                authored(&ours, c.position),
                Vec3::from(v),
                &format!("{name}: triangle {f} corner {k}"),
            );
            our_idx.push(c.position);
            their_idx.push(t.vertices[k] as u32);
        }
    }
    assert!(
        same_sharing(&our_idx, &their_idx),
        "{name}: shared vertices"
    );
    assert_eq!(ours.mesh.positions.len(), theirs.vertices.len(), "{name}");
    (theirs.vertices.len(), theirs.faces.len())
}

fn ply_number(p: &ply_rs::ply::Property) -> f64 {
    use ply_rs::ply::Property as P;
    match *p {
        P::Float(v) => f64::from(v),
        P::Double(v) => v,
        P::Int(v) => f64::from(v),
        P::UInt(v) => f64::from(v),
        P::Short(v) => f64::from(v),
        P::UShort(v) => f64::from(v),
        P::Char(v) => f64::from(v),
        P::UChar(v) => f64::from(v),
        ref other => panic!("not a number: {other:?}"),
    }
}

fn ply_list(p: &ply_rs::ply::Property) -> Vec<u32> {
    use ply_rs::ply::Property as P;
    match p {
        P::ListInt(v) => v.iter().map(|&i| i as u32).collect(),
        P::ListUInt(v) => v.clone(),
        P::ListUChar(v) => v.iter().map(|&i| u32::from(i)).collect(),
        P::ListUShort(v) => v.iter().map(|&i| u32::from(i)).collect(),
        P::ListShort(v) => v.iter().map(|&i| i as u32).collect(),
        P::ListChar(v) => v.iter().map(|&i| i as u32).collect(),
        other => panic!("not an index list: {other:?}"),
    }
}

/// Compares the PLY importer with ply-rs: the vertex list in file order and each face's
/// indices into it.
fn agree_with_ply_rs(name: &str, bytes: &[u8]) -> (usize, usize) {
    let ours = import(name, bytes).expect("twinshade imports");
    assert_eq!(ours.format, Format::Ply);
    let parser = ply_rs::parser::Parser::<ply_rs::ply::DefaultElement>::new();
    let ply = parser
        .read_ply(&mut Cursor::new(bytes))
        .expect("ply-rs reads");
    let vertices = &ply.payload["vertex"];
    let faces = &ply.payload["face"];
    assert_eq!(
        ours.mesh.positions.len(),
        vertices.len(),
        "{name}: vertices"
    );
    for (i, v) in vertices.iter().enumerate() {
        let p = Vec3::new(
            ply_number(&v["x"]) as f32,
            ply_number(&v["y"]) as f32,
            ply_number(&v["z"]) as f32,
        );
        close(authored(&ours, i as u32), p, &format!("{name}: vertex {i}"));
    }
    assert_eq!(ours.mesh.face_count(), faces.len(), "{name}: faces");
    for (f, face) in faces.iter().enumerate() {
        let list = face
            .get("vertex_indices")
            .or_else(|| face.get("vertex_index"))
            .expect("a face index list");
        let theirs = ply_list(list);
        let mine: Vec<u32> = ours.mesh.face(f).iter().map(|c| c.position).collect();
        assert_eq!(mine, theirs, "{name}: face {f}");
    }
    (vertices.len(), faces.len())
}

#[test]
fn our_fixtures_read_the_same_in_outside_parsers() {
    // The hand-written cube: 8 positions, 6 quads, 6 face normals.
    assert_eq!(agree_with_tobj("cube.obj", CUBE_OBJ.as_bytes()), (8, 6, 6));
    // A triangle mesh for the triangle formats: the level-2 icosphere, 162 vertices and 320
    // triangles (10 x 4^2 + 2 and 20 x 4^2).
    let ball = Shape::Icosphere { level: 2 }.build();
    let (obj, stl_binary, stl_ascii) = three_files(&ball);
    assert_eq!(agree_with_tobj("ball.obj", obj.as_bytes()), (162, 320, 0));
    assert_eq!(agree_with_stl_io("ball.stl", &stl_binary), (162, 320));
    assert_eq!(
        agree_with_stl_io("ball-ascii.stl", stl_ascii.as_bytes()),
        (162, 320)
    );
    // Quads for PLY: a 12 x 8 torus, 96 vertices and 96 quads.
    let shape = Shape::Torus {
        rings: 12,
        segments: 8,
    }
    .build();
    let (ascii, le, be) = ply_files(&shape);
    for (name, bytes) in [
        ("torus.ply", ascii.into_bytes()),
        ("torus-le.ply", le),
        ("torus-be.ply", be),
    ] {
        // The PLY files keep the torus's quads.
        assert_eq!(agree_with_ply_rs(name, &bytes), (96, 96), "{name}");
    }
}

#[test]
fn mesh_files_authored_outside_the_project_import_as_outside_parsers_read_them() {
    // Expected counts read off the files themselves: `v`/`vn`/`f` lines (OBJ), the triangle
    // count in the binary header (STL), the `element` lines of the header (PLY).
    // obj-rs 0.7.4, tests/fixtures: a cone with face normals exported from Blender 2.70, and
    // a dome of triangles without normals.
    let (name, bytes) = outside_file("obj-rs", "0.7.4", "tests/fixtures/normal-cone.obj");
    assert_eq!(agree_with_tobj(&name, &bytes), (33, 32, 32));
    let (name, bytes) = outside_file("obj-rs", "0.7.4", "tests/fixtures/dome.obj");
    assert_eq!(agree_with_tobj(&name, &bytes), (33, 62, 0));
    // obj-rs 0.7.4: a cube of quads with texture coordinates (which twinshade ignores).
    let (name, bytes) = outside_file("obj-rs", "0.7.4", "tests/fixtures/cube.obj");
    assert_eq!(agree_with_tobj(&name, &bytes), (8, 6, 0));
    // stl_io 0.11.0, src/testdata: a 99-triangle bunny as binary and as ASCII STL.
    for file in [
        "src/testdata/bunny_99.stl",
        "src/testdata/bunny_99_ascii.stl",
    ] {
        let (name, bytes) = outside_file("stl_io", "0.11.0", file);
        let (vertices, triangles) = agree_with_stl_io(&name, &bytes);
        assert_eq!(triangles, 99, "{name}");
        assert_eq!(vertices, 54, "{name}: equal vertices merged");
    }
    // ply-rs 0.1.3, example_plys: the two cubes of the PLY format's description (the second
    // with vertex colours and an extra `edge` element), and a house in binary little endian.
    let (name, bytes) = outside_file(
        "ply-rs",
        "0.1.3",
        "example_plys/greg_turk_example1_ok_ascii.ply",
    );
    assert_eq!(agree_with_ply_rs(&name, &bytes), (8, 6));
    let (name, bytes) = outside_file(
        "ply-rs",
        "0.1.3",
        "example_plys/greg_turk_example2_ok_ascii.ply",
    );
    assert_eq!(agree_with_ply_rs(&name, &bytes), (8, 7));
    let (name, bytes) = outside_file(
        "ply-rs",
        "0.1.3",
        "example_plys/house_2_ok_little_endian.ply",
    );
    assert_eq!(agree_with_ply_rs(&name, &bytes), (5, 3));
}

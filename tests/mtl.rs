//! An OBJ file's material library (`.mtl`): read as a general-purpose OBJ/MTL parser from the
//! registry reads it (tobj 4.0.5), on library files authored outside the project (shipped in
//! the obj-rs 0.7.4 package, exported from Blender as their headers say) and on a library of
//! our own; then lit as the Blinn-Phong or metallic-roughness material it states.

use glam::Vec3;
use std::io::Cursor;
use twinshade::geometry::{import, import_with, Companion, Reflectance};
use twinshade::scene::MaterialSource;
use twinshade::shading::{Finish, Material, ReflectionModel, Rgb};
use twinshade::Scene;
mod common;
use common::fixtures::{SQUARES_MTL, SQUARES_OBJ};
use common::outside::outside_file;

/// A material as read: name, diffuse, specular, exponent, and the faces that use it.
type Reading = (String, [f32; 3], [f32; 3], f32, usize);

/// tobj's reading of an OBJ file and the libraries among `given`: per material name, its
/// diffuse, specular and exponent, and the number of faces that use it.
fn tobj_reading(obj: &[u8], given: &[(String, Vec<u8>)]) -> Vec<Reading> {
    let options = tobj::LoadOptions {
        triangulate: false,
        single_index: false,
        ..Default::default()
    };
    let (models, materials) = tobj::load_obj_buf(&mut Cursor::new(obj), &options, |path| {
        let want = path.file_name().and_then(|n| n.to_str()).unwrap_or("");
        let (_, bytes) = given
            .iter()
            .find(|(n, _)| n == want)
            .ok_or(tobj::LoadError::OpenFileFailed)?;
        tobj::load_mtl_buf(&mut Cursor::new(bytes))
    })
    .expect("tobj reads the file");
    let materials = materials.expect("tobj reads the library");
    materials
        .iter()
        .enumerate()
        .map(|(k, m)| {
            let faces = models
                .iter()
                .filter(|model| model.mesh.material_id == Some(k))
                .map(|model| {
                    // tobj lists OBJ lines (`l`) as faces of two corners; they are no faces.
                    let faces = model.mesh.face_arities.iter().filter(|&&a| a >= 3).count();
                    if model.mesh.face_arities.is_empty() {
                        model.mesh.indices.len() / 3
                    } else {
                        faces
                    }
                })
                .sum();
            (
                m.name.clone(),
                m.diffuse.expect("Kd"),
                m.specular.expect("Ks"),
                m.shininess.expect("Ns"),
                faces,
            )
        })
        .collect()
}

/// Our reading, in the same terms.
fn our_reading(name: &str, obj: &[u8], given: &[(String, Vec<u8>)]) -> Vec<Reading> {
    let companions: Vec<Companion> = given
        .iter()
        .map(|(n, b)| Companion { name: n, bytes: b })
        .collect();
    let m = import_with(name, obj, &companions).expect("imports");
    assert!(
        m.notes.iter().all(|n| !n.contains("not given")),
        "{:?}",
        m.notes
    );
    m.mesh
        .materials
        .iter()
        .enumerate()
        .map(|(k, fm)| {
            let Reflectance::Specular { color, exponent } = fm.reflectance else {
                panic!("{}: a Kd/Ks/Ns material is Blinn-Phong", fm.name)
            };
            let faces = m
                .mesh
                .face_material
                .iter()
                .filter(|&&f| f as usize == k)
                .count();
            (
                fm.name.clone(),
                fm.base_color.to_array(),
                color.to_array(),
                exponent,
                faces,
            )
        })
        .collect()
}

#[test]
fn libraries_authored_outside_read_as_tobj_reads_them() {
    // obj-rs 0.7.4 ships cube.obj with cube.mtl (one material, a texture map) and
    // untitled.obj with untitled.mtl (two materials, one of them used).
    for (obj_name, mtl_name) in [("cube.obj", "cube.mtl"), ("untitled.obj", "untitled.mtl")] {
        let (name, obj) = outside_file("obj-rs", "0.7.4", &format!("tests/fixtures/{obj_name}"));
        let mtl = outside_file("obj-rs", "0.7.4", &format!("tests/fixtures/{mtl_name}"));
        let given = vec![mtl];
        let ours = our_reading(&name, &obj, &given);
        let theirs = tobj_reading(&obj, &given);
        assert!(!ours.is_empty(), "{name}: materials read");
        for o in &ours {
            let t = theirs
                .iter()
                .find(|t| t.0 == o.0)
                .unwrap_or_else(|| panic!("{name}: tobj has no material '{}'", o.0));
            assert_eq!(o, t, "{name}: material '{}'", o.0);
        }
        // Every material tobj assigns to faces is one we use on as many faces.
        for t in theirs.iter().filter(|t| t.4 > 0) {
            assert!(
                ours.iter().any(|o| o.0 == t.0 && o.4 == t.4),
                "{name}: {t:?}"
            );
        }
    }
    // Blender's values as written in cube.mtl (Kd 0.64, Ks 0.5, Ns 96.078431).
    let (name, obj) = outside_file("obj-rs", "0.7.4", "tests/fixtures/cube.obj");
    let given = vec![outside_file("obj-rs", "0.7.4", "tests/fixtures/cube.mtl")];
    let ours = our_reading(&name, &obj, &given);
    assert_eq!(ours[0].1, [0.64; 3]);
    assert_eq!(ours[0].3, "96.078431".parse::<f32>().expect("number"));
    assert_eq!(ours[0].4, 6);
    // Its texture map is named as not read.
    let m = import_with(
        &name,
        &obj,
        &[Companion {
            name: &given[0].0,
            bytes: &given[0].1,
        }],
    )
    .expect("imports");
    assert!(
        m.notes.iter().any(|n| n.contains("1 texture map")),
        "{:?}",
        m.notes
    );
}

#[test]
fn a_library_that_is_not_given_is_named_and_the_viewers_material_is_used() {
    // obj-rs 0.7.4's dome.obj names dome.mtl, which the package does not ship.
    let (name, obj) = outside_file("obj-rs", "0.7.4", "tests/fixtures/dome.obj");
    let m = import(&name, &obj).expect("imports");
    assert!(m.mesh.materials.is_empty() && m.mesh.face_material.is_empty());
    assert_eq!(m.notes.len(), 1, "{:?}", m.notes);
    assert!(
        m.notes[0].contains("'dome.mtl'") && m.notes[0].contains("not given"),
        "{:?}",
        m.notes
    );
    assert_eq!(m.info().notes, m.notes);
}

fn squares(mtl: &str) -> Result<twinshade::geometry::Imported, twinshade::geometry::ImportError> {
    import_with(
        "squares.obj",
        SQUARES_OBJ.as_bytes(),
        &[Companion {
            name: "textures/../squares.mtl",
            bytes: mtl.as_bytes(),
        }],
    )
}

#[test]
fn our_library_maps_to_the_models_it_states() {
    let m = squares(SQUARES_MTL).expect("imports");
    let mats = &m.mesh.materials;
    let names: Vec<&str> = mats.iter().map(|m| m.name.as_str()).collect();
    // Used materials in order of first use, then the viewer's for the faces without one.
    assert_eq!(names[..2], ["plastic", "brushed"]);
    assert_eq!(mats[2].reflectance, Reflectance::Viewer);
    assert_eq!(m.mesh.face_material, vec![2, 0, 2, 1]);
    assert_eq!(mats[0].base_color, Vec3::new(0.8, 0.1, 0.1));
    assert_eq!(
        mats[0].reflectance,
        Reflectance::Specular {
            color: Vec3::new(0.2, 0.4, 1.0),
            exponent: 40.0
        }
    );
    assert_eq!(mats[1].reflectance, Reflectance::MetallicRoughness);
    assert_eq!((mats[1].metallic, mats[1].roughness), (1.0, 0.35));
    assert!(
        m.notes.iter().any(|n| n.contains("'missing'")),
        "{:?}",
        m.notes
    );
    assert!(
        m.notes.iter().any(|n| n.contains("1 texture map")),
        "{:?}",
        m.notes
    );
    // illum 1 (no highlight) and a one-value grey.
    let matte = SQUARES_OBJ.replace("usemtl plastic", "usemtl matte");
    let m = import_with(
        "squares.obj",
        matte.as_bytes(),
        &[Companion {
            name: "squares.mtl",
            bytes: SQUARES_MTL.as_bytes(),
        }],
    )
    .expect("imports");
    assert_eq!(m.mesh.materials[0].base_color, Vec3::splat(0.5));
    assert_eq!(
        m.mesh.materials[0].reflectance,
        Reflectance::Specular {
            color: Vec3::ZERO,
            exponent: 1.0
        }
    );
}

#[test]
fn a_broken_library_is_named_with_its_line() {
    for (mtl, line, says) in [
        ("newmtl a\nKd 1 x 0\n", 2, "'x' is not a finite number"),
        ("Kd 1 1 1\n", 1, "before the first 'newmtl'"),
        ("newmtl a\nKd 1 1\n", 2, "needs 3 numbers"),
        ("newmtl a\nKd spectral file.rfl\n", 2, "not supported"),
    ] {
        let e = squares(mtl).expect_err(mtl);
        assert_eq!(e.file, "textures/../squares.mtl");
        let text = e.to_string();
        assert!(
            text.contains(&format!("line {line}")) && text.contains(says),
            "{text}"
        );
    }
    let e = squares("# nothing\n").expect_err("empty library");
    assert!(e.to_string().contains("no material"), "{e}");
}

/// The squares' scene (see `common::squares_scene`).
fn squares_scene() -> Scene {
    common::squares_scene("squares.obj")
}

#[test]
fn a_blinn_phong_library_material_renders_as_the_same_material_set_on_the_page() {
    let file = squares(SQUARES_MTL).expect("imports");
    let scene = squares_scene();
    let own = common::render_file_mesh(&file.mesh, &scene);
    // The same mesh without its library, lit with the page's material set to the library's
    // terms: Kd as the base colour (the nearest 8-bit sRGB code), full diffuse, a grey
    // highlight for Ks, Ns as the exponent, Blinn-Phong. With a grey Ks the two must match
    // byte for byte on the plastic square; with the library's blue-leaning Ks, its highlight
    // is bluer.
    let mut bare = file.mesh.clone();
    bare.materials.clear();
    bare.face_material.clear();
    let mut page = scene.clone();
    page.material_source = MaterialSource::Scene;
    page.model = ReflectionModel::BlinnPhong;
    page.material = Material {
        base_color: Rgb([
            twinshade::shading::encode_srgb8(0.8),
            twinshade::shading::encode_srgb8(0.1),
            twinshade::shading::encode_srgb8(0.1),
        ]),
        diffuse: 1.0,
        specular: 1.0,
        shininess: 40.0,
        finish: Finish::Dielectric,
        ..scene.material.clone()
    };
    let grey = SQUARES_MTL.replace("Ks 0.2 0.4 1.0", "Ks 1 1 1");
    let grey_file = squares(&grey).expect("imports");
    let lib = common::render_file_mesh(&grey_file.mesh, &scene);
    let set = common::render_file_mesh(&bare, &page);
    let column = |img: &[u8], x0: usize, x1: usize| -> Vec<u8> {
        (0..80)
            .flat_map(|y| (x0..x1).flat_map(move |x| (0..4).map(move |c| (y * 240 + x) * 4 + c)))
            .map(|i| img[i])
            .collect()
    };
    for k in 0..2 {
        // The plastic square is the middle one (panel columns 100..140 lie inside it).
        let (a, b) = (column(&lib[k], 100, 140), column(&set[k], 100, 140));
        let differ = a.iter().zip(&b).filter(|(x, y)| x != y).count();
        assert_eq!(differ, 0, "panel {k}: bytes that differ");
        let blue: u32 = column(&own[k], 100, 140)
            .chunks(4)
            .map(|p| u32::from(p[2]))
            .sum();
        let grey_blue: u32 = column(&lib[k], 100, 140)
            .chunks(4)
            .map(|p| u32::from(p[2]))
            .sum();
        let red: u32 = column(&own[k], 100, 140)
            .chunks(4)
            .map(|p| u32::from(p[0]))
            .sum();
        let grey_red: u32 = column(&lib[k], 100, 140)
            .chunks(4)
            .map(|p| u32::from(p[0]))
            .sum();
        assert!(
            blue <= grey_blue && red < grey_red,
            "panel {k}: Ks tints the highlight"
        );
    }
    // The viewer's own material when the scene asks for it: the file's colours are gone.
    let mut viewer = scene;
    viewer.material_source = MaterialSource::Scene;
    let v = common::render_file_mesh(&file.mesh, &viewer);
    assert_eq!(v, common::render_file_mesh(&bare, &viewer));
}

#[test]
fn reports_say_which_materials_lit_the_frame() {
    let file = squares(SQUARES_MTL).expect("imports");
    let mut bench = twinshade::Workbench::new();
    bench.set_file_mesh(file.mesh);
    let mut scene = squares_scene();
    scene.exposure_ev = -1.5;
    let lit = bench
        .render(&scene.checked().expect("valid"))
        .expect("renders")
        .lit_with;
    assert_eq!(
        (
            lit.file_materials.blinn_phong,
            lit.file_materials.metallic_roughness
        ),
        (1, 1)
    );
    assert_eq!(
        lit.describe(),
        "the file's 2 materials (1 Blinn-Phong, 1 metallic-roughness); exposure -1.5 EV"
    );
    scene.material_source = MaterialSource::Scene;
    scene.exposure_ev = 0.0;
    let report = *bench
        .render(&scene.checked().expect("valid"))
        .expect("renders");
    assert_eq!(
        report.lit_with.describe(),
        "the page's material, Blinn-Phong (1977); exposure 0 EV"
    );
    let lines = twinshade::analysis::metrics_lines(&report);
    assert!(
        lines
            .iter()
            .any(|l| l.starts_with("Lit with the page's material")),
        "{lines:?}"
    );
    let csv = report.to_csv("#s=2.x");
    let (header, values) = csv.split_once('\n').expect("two lines");
    let column = |name: &str| {
        let i = header.split(',').position(|h| h == name).expect(name);
        values
            .trim_end()
            .split(',')
            .nth(i)
            .expect("value")
            .to_string()
    };
    assert_eq!(column("model"), "blinn_phong");
    assert_eq!(column("file_materials_metallic_roughness"), "0");
    assert_eq!(column("exposure_ev"), "0");
}

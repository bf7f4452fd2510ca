//! glTF 2.0 through the `gltf` crate: `.gltf` with embedded (data URI) buffers and binary
//! `.glb`; every triangle-mode primitive of every mesh reached from the scene's nodes, with
//! node transforms applied. Positions, normals, vertex colours (`COLOR_0`) and indices are
//! checked against their buffers and the vertex count before use; each primitive keeps its
//! material's factors (base colour, metallic, roughness, emissive, double-sided; textures are
//! not read).

use super::ParseError;
use crate::geometry::mesh::{Corner, FileMaterial, Mesh, Reflectance, MAX_TRIANGLES};
use base64::engine::general_purpose::STANDARD;
use base64::Engine;
use glam::{Mat3, Mat4, Vec3};

/// Deepest node hierarchy followed (guards against cyclic files).
const MAX_DEPTH: usize = 64;

/// Parses glTF JSON or GLB bytes.
///
/// # Errors
/// Syntax and validation errors from the `gltf` crate, external or missing buffers, sparse
/// accessors, out-of-range indices, non-finite data, too many triangles.
pub fn parse(bytes: &[u8]) -> Result<Mesh, ParseError> {
    let invalid =
        |e: &dyn std::fmt::Display| ParseError::file(format!("not a valid glTF 2.0 file: {e}"));
    let raw = gltf::Gltf::from_slice_without_validation(bytes).map_err(|e| invalid(&e))?;
    // gltf-json 1.4.1's validation indexes the POSITION accessor without a bounds check
    // (found by tests/import.rs fuzzing): check that reference before validating.
    let root = raw.document.as_json();
    for (m, mesh) in root.meshes.iter().enumerate() {
        for (p, prim) in mesh.primitives.iter().enumerate() {
            for (semantic, index) in &prim.attributes {
                if index.value() >= root.accessors.len() {
                    return Err(ParseError::file(format!(
                        "mesh {m} primitive {p}: attribute {semantic:?} names accessor {}, but there are {}",
                        index.value(),
                        root.accessors.len()
                    )));
                }
            }
        }
    }
    let document = gltf::Document::from_json(root.clone()).map_err(|e| invalid(&e))?;
    let gltf = gltf::Gltf {
        document,
        blob: raw.blob,
    };
    let mut buffers: Vec<Vec<u8>> = Vec::new();
    for buffer in gltf.document.buffers() {
        let data = match buffer.source() {
            gltf::buffer::Source::Bin => gltf
                .blob
                .clone()
                .ok_or_else(|| ParseError::file("the file names a binary chunk but has none"))?,
            gltf::buffer::Source::Uri(uri) => {
                let Some(rest) = uri.strip_prefix("data:") else {
                    return Err(ParseError::file(format!(
                        "buffer {} is an external file ('{uri}'): embed it (data URI) or use .glb",
                        buffer.index()
                    )));
                };
                let payload = rest.split_once(";base64,").map(|(_, p)| p).ok_or_else(|| {
                    ParseError::file(format!(
                        "buffer {} is not a base64 data URI",
                        buffer.index()
                    ))
                })?;
                STANDARD.decode(payload).map_err(|_| {
                    ParseError::file(format!("buffer {} has damaged base64 data", buffer.index()))
                })?
            }
        };
        if data.len() < buffer.length() {
            return Err(ParseError::file(format!(
                "buffer {} declares {} bytes but holds {}",
                buffer.index(),
                buffer.length(),
                data.len()
            )));
        }
        buffers.push(data);
    }

    let mut mesh = Mesh::new("");
    mesh.flat_if_no_normals = true;
    let mut any_colors = false;
    let mut default_material = false;
    let mut face_material: Vec<u32> = Vec::new();
    let mut triangles = 0usize;
    let mut add = |node: &gltf::Node, world: Mat4| -> Result<(), ParseError> {
        let Some(m) = node.mesh() else {
            return Ok(());
        };
        let normal_matrix = Mat3::from_mat4(world).inverse().transpose();
        let flip = Mat3::from_mat4(world).determinant() < 0.0;
        for prim in m.primitives() {
            if prim.mode() != gltf::mesh::Mode::Triangles {
                continue;
            }
            for (_, accessor) in prim.attributes() {
                if accessor.sparse().is_some() {
                    return Err(ParseError::file(format!(
                        "mesh {} uses a sparse accessor, which twinshade does not read",
                        m.index()
                    )));
                }
            }
            // The reader assumes the types the specification requires (it panics on an index
            // accessor of floats, found by fuzzing): check them first.
            use gltf::accessor::{DataType, Dimensions};
            let is = |a: &gltf::Accessor, t: &[DataType], d: Dimensions| {
                t.contains(&a.data_type()) && a.dimensions() == d && a.sparse().is_none()
            };
            match prim.get(&gltf::Semantic::Positions) {
                Some(a) if is(&a, &[DataType::F32], Dimensions::Vec3) => {}
                _ => {
                    return Err(ParseError::file(format!(
                        "mesh {} primitive {}: POSITION must be three 32-bit floats",
                        m.index(),
                        prim.index()
                    )))
                }
            }
            let normals_ok = prim
                .get(&gltf::Semantic::Normals)
                .is_some_and(|a| is(&a, &[DataType::F32], Dimensions::Vec3));
            // COLOR_0: float, or normalized unsigned byte or short; RGB or RGBA (glTF 2.0,
            // "Meshes", attribute table). Linear, as the specification says.
            let colors_given = match prim.get(&gltf::Semantic::Colors(0)) {
                None => false,
                Some(a) => {
                    let types = [DataType::F32, DataType::U8, DataType::U16];
                    let ok = (is(&a, &types, Dimensions::Vec3) || is(&a, &types, Dimensions::Vec4))
                        && (a.data_type() == DataType::F32 || a.normalized());
                    if !ok {
                        return Err(ParseError::file(format!(
                            "mesh {} primitive {}: COLOR_0 must be RGB or RGBA floats or normalized unsigned bytes or shorts",
                            m.index(),
                            prim.index()
                        )));
                    }
                    true
                }
            };
            if let Some(a) = prim.indices() {
                if !is(
                    &a,
                    &[DataType::U8, DataType::U16, DataType::U32],
                    Dimensions::Scalar,
                ) {
                    return Err(ParseError::file(format!(
                        "mesh {} primitive {}: indices must be unsigned integers",
                        m.index(),
                        prim.index()
                    )));
                }
            }
            // The primitive's material (the glTF default material when it names none).
            let material_index = match prim.material().index() {
                Some(i) => i as u32,
                None => {
                    default_material = true;
                    u32::MAX
                }
            };
            let reader = prim.reader(|b| buffers.get(b.index()).map(Vec::as_slice));
            let Some(positions) = reader.read_positions() else {
                return Err(ParseError::file(format!(
                    "mesh {} primitive {} has no readable positions",
                    m.index(),
                    prim.index()
                )));
            };
            let base = mesh.positions.len() as u32;
            for p in positions {
                let v = world.transform_point3(Vec3::from(p));
                if !v.is_finite() {
                    return Err(ParseError::file(format!(
                        "mesh {} has a NaN or infinite position",
                        m.index()
                    )));
                }
                mesh.positions.push(v);
            }
            let count = mesh.positions.len() as u32 - base;
            let normals: Option<Vec<Vec3>> =
                reader.read_normals().filter(|_| normals_ok).map(|it| {
                    it.map(|n| {
                        (normal_matrix * Vec3::from(n))
                            .try_normalize()
                            .unwrap_or(Vec3::Z)
                    })
                    .collect()
                });
            let has_normals = normals.as_ref().is_some_and(|n| n.len() == count as usize);
            // Colours per position; white for a primitive without them (dropped at the end
            // when no primitive has any). The alpha channel is not used.
            let colors: Vec<Vec3> = if colors_given {
                reader
                    .read_colors(0)
                    .map(|c| c.into_rgb_f32().map(Vec3::from).collect())
                    .unwrap_or_default()
            } else {
                Vec::new()
            };
            if colors.len() == count as usize && colors.iter().all(|c| c.is_finite()) {
                any_colors = true;
                mesh.colors.extend(colors);
            } else if colors_given {
                return Err(ParseError::file(format!(
                    "mesh {} primitive {}: COLOR_0 does not give a finite colour for each of its {count} vertices",
                    m.index(),
                    prim.index()
                )));
            } else {
                mesh.colors
                    .extend(std::iter::repeat_n(Vec3::ONE, count as usize));
            }
            let nbase = mesh.normals.len() as u32;
            if has_normals {
                mesh.normals.extend(normals.unwrap_or_default());
            }
            let indices: Vec<u32> = match reader.read_indices() {
                Some(it) => it.into_u32().collect(),
                None => (0..count).collect(),
            };
            if indices.len() % 3 != 0 {
                return Err(ParseError::file(format!(
                    "mesh {} primitive {}: {} indices do not make whole triangles",
                    m.index(),
                    prim.index(),
                    indices.len()
                )));
            }
            for tri in indices.chunks_exact(3) {
                if let Some(&bad) = tri.iter().find(|&&i| i >= count) {
                    return Err(ParseError::file(format!(
                        "mesh {} primitive {}: index {bad} is out of range ({count} vertices)",
                        m.index(),
                        prim.index()
                    )));
                }
                triangles += 1;
                if triangles > MAX_TRIANGLES {
                    return Err(ParseError::file(format!(
                        "more than {MAX_TRIANGLES} triangles; the limit is {MAX_TRIANGLES}"
                    )));
                }
                let order = if flip { [0, 2, 1] } else { [0, 1, 2] };
                let corners = order.map(|k| Corner {
                    position: base + tri[k],
                    normal: if has_normals {
                        nbase + tri[k]
                    } else {
                        crate::geometry::mesh::NO_NORMAL
                    },
                });
                mesh.push_face(&corners);
                face_material.push(material_index);
            }
        }
        Ok(())
    };

    fn walk(
        node: gltf::Node,
        parent: Mat4,
        depth: usize,
        add: &mut dyn FnMut(&gltf::Node, Mat4) -> Result<(), ParseError>,
    ) -> Result<(), ParseError> {
        if depth > MAX_DEPTH {
            return Err(ParseError::file(
                "the node hierarchy is deeper than 64 (a cycle?)",
            ));
        }
        let world = parent * Mat4::from_cols_array_2d(&node.transform().matrix());
        add(&node, world)?;
        for child in node.children() {
            walk(child, world, depth + 1, add)?;
        }
        Ok(())
    }

    let scene = gltf
        .document
        .default_scene()
        .or_else(|| gltf.document.scenes().next());
    match scene {
        Some(scene) => {
            for node in scene.nodes() {
                walk(node, Mat4::IDENTITY, 0, &mut add)?;
            }
        }
        None => {
            // No scene: every node that is nobody's child is a root.
            let children: std::collections::HashSet<usize> = gltf
                .document
                .nodes()
                .flat_map(|n| n.children().map(|c| c.index()).collect::<Vec<_>>())
                .collect();
            for node in gltf
                .document
                .nodes()
                .filter(|n| !children.contains(&n.index()))
            {
                walk(node, Mat4::IDENTITY, 0, &mut add)?;
            }
        }
    }
    // A mesh whose primitives mix normals and none uses none at all.
    if mesh
        .corners
        .iter()
        .any(|c| c.normal == crate::geometry::mesh::NO_NORMAL)
    {
        for c in &mut mesh.corners {
            c.normal = crate::geometry::mesh::NO_NORMAL;
        }
    }
    if !any_colors {
        mesh.colors.clear();
    }
    // Materials: every material of the file in its order, then the glTF default material
    // for primitives that name none. A file without any material keeps none (the viewer's
    // own material is used).
    let defined = gltf.document.materials().len();
    if defined > 0 {
        mesh.materials = gltf
            .document
            .materials()
            .map(|m| {
                let pbr = m.pbr_metallic_roughness();
                let [r, g, b, _alpha] = pbr.base_color_factor();
                FileMaterial {
                    name: m.name().map_or_else(
                        || format!("material {}", m.index().unwrap_or(0)),
                        str::to_string,
                    ),
                    base_color: Vec3::new(r, g, b),
                    metallic: pbr.metallic_factor(),
                    roughness: pbr.roughness_factor(),
                    emissive: Vec3::from(m.emissive_factor()),
                    double_sided: m.double_sided(),
                    reflectance: Reflectance::MetallicRoughness,
                }
            })
            .collect();
        if default_material {
            mesh.materials.push(FileMaterial {
                name: "glTF default material".into(),
                ..FileMaterial::default()
            });
        }
        let fallback = defined as u32;
        mesh.face_material = face_material
            .into_iter()
            .map(|m| if m == u32::MAX { fallback } else { m })
            .collect();
        let bad = mesh.materials.iter().any(|m| {
            !(m.base_color.is_finite()
                && m.emissive.is_finite()
                && m.metallic.is_finite()
                && m.roughness.is_finite())
        });
        if bad {
            return Err(ParseError::file("a material has a NaN or infinite factor"));
        }
    }
    Ok(mesh)
}

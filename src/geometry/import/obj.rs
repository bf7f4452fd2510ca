//! Wavefront OBJ: `v` positions, `vn` normals, `f` faces of any size (kept as polygons),
//! negative (relative) indices, several objects and groups merged into one mesh, and vertex
//! colours written as `v x y z r g b`, and the materials faces name (`mtllib`, `usemtl`; the
//! library itself is read by [`super::mtl`]). Texture coordinates, smoothing groups, lines and
//! points are read past.

use super::{xyz, ParseError};
use crate::geometry::mesh::{Corner, Mesh, MAX_TRIANGLES, NO_NORMAL};
use glam::Vec3;

/// A colour of components in 0..1 (clamped), kept sRGB-encoded (see [`Mesh::colors`]).
fn srgb_colour(c: [f32; 3]) -> Vec3 {
    Vec3::from(c.map(|v| v.clamp(0.0, 1.0)))
}

/// Resolves a 1-based (or negative, relative) OBJ index against `len` elements.
fn resolve(token: &str, len: usize, what: &str, line: usize) -> Result<u32, ParseError> {
    let i: i64 = token
        .parse()
        .map_err(|_| ParseError::line(line, format!("'{token}' is not a {what} index")))?;
    let resolved = if i > 0 { i - 1 } else { len as i64 + i };
    if i == 0 || resolved < 0 || resolved >= len as i64 {
        return Err(ParseError::line(
            line,
            format!("{what} index {i} is out of range (there are {len} so far)"),
        ));
    }
    Ok(resolved as u32)
}

/// An OBJ file read: the mesh, and the materials its faces name.
#[derive(Clone, Debug)]
pub struct ObjFile {
    /// The mesh (no materials attached yet).
    pub mesh: Mesh,
    /// The text after each `mtllib`, in order.
    pub libraries: Vec<String>,
    /// The names `usemtl` gave, in order of first use.
    pub material_names: Vec<String>,
    /// Per face, an index into `material_names`, or `u32::MAX` before any `usemtl`; empty
    /// when the file has no `usemtl`.
    pub face_material: Vec<u32>,
}

/// Parses OBJ text.
///
/// # Errors
/// Non-UTF-8 bytes (with their offset), malformed numbers, bad or out-of-range indices and
/// faces of fewer than three corners (with their line).
pub fn parse(bytes: &[u8]) -> Result<ObjFile, ParseError> {
    let text = std::str::from_utf8(bytes).map_err(|e| {
        ParseError::byte(
            e.valid_up_to(),
            "the file is not UTF-8 text (is it really OBJ?)",
        )
    })?;
    let mut mesh = Mesh::new("");
    let mut colors: Vec<Option<Vec3>> = Vec::new();
    let mut corners: Vec<Corner> = Vec::new();
    let mut triangles = 0usize;
    let mut libraries = Vec::new();
    let mut material_names: Vec<String> = Vec::new();
    let mut face_material: Vec<u32> = Vec::new();
    let mut using = u32::MAX;
    for (i, raw) in text.lines().enumerate() {
        let line = i + 1;
        let content = raw.split('#').next().unwrap_or("").trim();
        let mut tokens = content.split_ascii_whitespace();
        let Some(keyword) = tokens.next() else {
            continue;
        };
        match keyword {
            "v" | "vn" => {
                let v = xyz(&mut tokens, keyword, line)?;
                if keyword == "v" {
                    mesh.positions.push(v);
                    // `v x y z r g b`: a vertex colour, 0..1, taken as sRGB-encoded (common
                    // practice: tools write the colours they display). `v x y z w` is left be.
                    let rest: Vec<&str> = tokens.collect();
                    if rest.len() == 3 {
                        let mut c = [0.0f32; 3];
                        for (slot, t) in c.iter_mut().zip(&rest) {
                            *slot = crate::geometry::import::number(t).ok_or_else(|| {
                                ParseError::line(line, format!("'{t}' is not a finite number"))
                            })?;
                        }
                        colors.resize(mesh.positions.len() - 1, None);
                        colors.push(Some(srgb_colour(c)));
                    }
                } else {
                    mesh.normals.push(v.try_normalize().unwrap_or(Vec3::Z));
                }
            }
            "f" => {
                corners.clear();
                for t in tokens {
                    let mut parts = t.split('/');
                    let p = resolve(
                        parts.next().unwrap_or(""),
                        mesh.positions.len(),
                        "vertex",
                        line,
                    )?;
                    let _texture = parts.next();
                    let n = match parts.next() {
                        Some(s) if !s.is_empty() => resolve(s, mesh.normals.len(), "normal", line)?,
                        _ => NO_NORMAL,
                    };
                    corners.push(Corner {
                        position: p,
                        normal: n,
                    });
                }
                if corners.len() < 3 {
                    return Err(ParseError::line(
                        line,
                        format!(
                            "a face needs at least 3 corners, this one has {}",
                            corners.len()
                        ),
                    ));
                }
                triangles += corners.len() - 2;
                if triangles > MAX_TRIANGLES {
                    return Err(ParseError::line(
                        line,
                        format!(
                            "more than {MAX_TRIANGLES} triangles; the limit is {MAX_TRIANGLES}"
                        ),
                    ));
                }
                mesh.push_face(&corners);
                face_material.push(using);
            }
            "mtllib" => libraries.push(content["mtllib".len()..].trim().to_string()),
            "usemtl" => {
                let name = content["usemtl".len()..].trim();
                using = match material_names.iter().position(|n| n == name) {
                    Some(k) => k as u32,
                    None => {
                        material_names.push(name.to_string());
                        material_names.len() as u32 - 1
                    }
                };
            }
            // Read past: texture coordinates, parameter-space vertices, grouping, smoothing,
            // lines, points, curves.
            "vt" | "vp" | "o" | "g" | "s" | "l" | "p" | "cstype" | "deg" | "curv" | "curv2"
            | "surf" | "parm" | "end" | "mg" | "bevel" | "c_interp" | "d_interp" | "lod"
            | "shadow_obj" | "trace_obj" | "ctech" | "stech" => {}
            other => {
                return Err(ParseError::line(
                    line,
                    format!("unknown statement '{other}' (is this an OBJ file?)"),
                ))
            }
        }
    }
    // A face that names normals for some corners but not others uses none.
    let mut out = Mesh::new("");
    if !colors.is_empty() {
        // Positions written without a colour are white.
        colors.resize(mesh.positions.len(), None);
        out.colors = colors.iter().map(|c| c.unwrap_or(Vec3::ONE)).collect();
        out.colors_srgb = true;
    }
    out.positions = mesh.positions;
    out.normals = mesh.normals;
    for f in 0..mesh.face_starts.len().saturating_sub(1) {
        let face = &mesh.corners[mesh.face_starts[f] as usize..mesh.face_starts[f + 1] as usize];
        if face.iter().any(|c| c.normal == NO_NORMAL) {
            corners.clear();
            corners.extend(face.iter().map(|c| Corner {
                position: c.position,
                normal: NO_NORMAL,
            }));
            out.push_face(&corners);
        } else {
            out.push_face(face);
        }
    }
    if material_names.is_empty() {
        face_material.clear();
    }
    Ok(ObjFile {
        mesh: out,
        libraries,
        material_names,
        face_material,
    })
}

//! STL, binary and ASCII. STL stores separate triangles with facet normals; vertices are
//! welded by exact position so smooth normals can be computed across triangles.

use super::{xyz, ParseError};
use crate::geometry::mesh::{Mesh, MAX_TRIANGLES};
use glam::Vec3;
use std::collections::HashMap;

/// True when the size matches a binary STL's header: 80 bytes, a u32 count, 50 per triangle.
pub fn is_binary(bytes: &[u8]) -> bool {
    if bytes.len() < 84 {
        return false;
    }
    let count = u32::from_le_bytes([bytes[80], bytes[81], bytes[82], bytes[83]]) as usize;
    count.checked_mul(50).and_then(|n| n.checked_add(84)) == Some(bytes.len())
}

/// Collects triangles, welding identical positions.
struct Welder {
    mesh: Mesh,
    index: HashMap<[u32; 3], u32>,
}

impl Welder {
    fn new() -> Self {
        Welder {
            mesh: Mesh::new(""),
            index: HashMap::new(),
        }
    }

    fn vertex(&mut self, p: Vec3) -> u32 {
        let key = p.to_array().map(|c| (c + 0.0).to_bits()); // -0.0 and 0.0 weld together
        let next = self.mesh.positions.len() as u32;
        *self.index.entry(key).or_insert_with(|| {
            self.mesh.positions.push(p);
            next
        })
    }

    fn triangle(&mut self, t: [Vec3; 3]) {
        let idx = t.map(|p| self.vertex(p));
        self.mesh.push_face_positions(&idx);
    }
}

fn f32_at(bytes: &[u8], at: usize) -> f32 {
    f32::from_le_bytes([bytes[at], bytes[at + 1], bytes[at + 2], bytes[at + 3]])
}

/// Parses binary STL (its size was checked by [`is_binary`]).
///
/// # Errors
/// Too many triangles, or a NaN or infinite coordinate (with its byte offset).
pub fn parse_binary(bytes: &[u8]) -> Result<Mesh, ParseError> {
    if !is_binary(bytes) {
        return Err(ParseError::byte(
            bytes.len(),
            "the file is cut short: its triangle count needs more bytes",
        ));
    }
    let count = u32::from_le_bytes([bytes[80], bytes[81], bytes[82], bytes[83]]) as usize;
    if count > MAX_TRIANGLES {
        return Err(ParseError::byte(
            80,
            format!("{count} triangles; the limit is {MAX_TRIANGLES}"),
        ));
    }
    let mut w = Welder::new();
    for t in 0..count {
        let base = 84 + 50 * t + 12; // skip the facet normal
        let mut tri = [Vec3::ZERO; 3];
        for (k, v) in tri.iter_mut().enumerate() {
            let at = base + 12 * k;
            *v = Vec3::new(
                f32_at(bytes, at),
                f32_at(bytes, at + 4),
                f32_at(bytes, at + 8),
            );
            if !v.is_finite() {
                return Err(ParseError::byte(
                    at,
                    format!("triangle {} has a NaN or infinite coordinate", t + 1),
                ));
            }
        }
        w.triangle(tri);
    }
    Ok(w.mesh)
}

/// Parses ASCII STL: `solid`, then `facet normal ... outer loop vertex x y z (x3) endloop
/// endfacet` blocks, then `endsolid`.
///
/// # Errors
/// Non-UTF-8 bytes, malformed vertices, loops without exactly three vertices (with line).
pub fn parse_ascii(bytes: &[u8]) -> Result<Mesh, ParseError> {
    let text = std::str::from_utf8(bytes)
        .map_err(|e| ParseError::byte(e.valid_up_to(), "the file is not UTF-8 text"))?;
    let mut w = Welder::new();
    let mut current: Vec<Vec3> = Vec::with_capacity(3);
    let mut in_loop = false;
    let mut triangles = 0usize;
    for (i, raw) in text.lines().enumerate() {
        let line = i + 1;
        let mut tokens = raw.split_ascii_whitespace();
        match tokens.next() {
            Some("vertex") => {
                if !in_loop {
                    return Err(ParseError::line(line, "'vertex' outside 'outer loop'"));
                }
                current.push(xyz(&mut tokens, "vertex", line)?);
            }
            Some("outer") => {
                in_loop = true;
                current.clear();
            }
            Some("endloop") => {
                if current.len() != 3 {
                    return Err(ParseError::line(
                        line,
                        format!("a facet needs 3 vertices, this one has {}", current.len()),
                    ));
                }
                triangles += 1;
                if triangles > MAX_TRIANGLES {
                    return Err(ParseError::line(
                        line,
                        format!("more than {MAX_TRIANGLES} triangles"),
                    ));
                }
                w.triangle([current[0], current[1], current[2]]);
                in_loop = false;
            }
            Some("solid" | "facet" | "endfacet" | "endsolid") | None => {}
            Some(other) => {
                return Err(ParseError::line(
                    line,
                    format!("unexpected '{other}' in an ASCII STL file"),
                ))
            }
        }
    }
    if in_loop {
        return Err(ParseError::file("the file ends inside a facet"));
    }
    Ok(w.mesh)
}

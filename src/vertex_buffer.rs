//! Welded vertex and index buffers: what the pipeline draws.
//!
//! A render vertex is a unique (position, normal) pair of the authored mesh, so per-vertex
//! lighting is evaluated exactly once per render vertex and hard edges (split normals) stay
//! hard. Polygons are triangulated here; their corner lists are kept as well, for the scanline
//! polygon mode.

use crate::mesh::Mesh;
use glam::Vec3;
use serde::{Deserialize, Serialize};
use std::collections::HashMap;

/// How faces with more than three corners become triangles.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, Default)]
#[serde(rename_all = "snake_case")]
pub enum Triangulation {
    /// A fan from each face's first corner, in authored order.
    #[default]
    Fan,
    /// Quads split along their shorter diagonal; larger polygons as a fan.
    ShorterDiagonal,
}

/// Buffers ready to draw. Invariant: every index is below `positions.len()`, and `positions`
/// and `normals` have the same length.
#[derive(Clone, Debug, Default)]
pub struct VertexBuffer {
    /// Object-space positions, one per render vertex.
    pub positions: Vec<Vec3>,
    /// Object-space unit normals, one per render vertex.
    pub normals: Vec<Vec3>,
    /// Triangles, counter-clockwise from the front.
    pub triangles: Vec<[u32; 3]>,
    /// The authored face each triangle came from.
    pub triangle_face: Vec<u32>,
    /// Render-vertex indices of each authored face, face after face.
    pub polygon_vertices: Vec<u32>,
    /// `polygon_vertices[polygon_starts[f]..polygon_starts[f + 1]]` is face `f`.
    pub polygon_starts: Vec<u32>,
}

impl VertexBuffer {
    /// Welds `mesh` (which must be valid and have a normal on every corner) and triangulates it.
    pub fn build(mesh: &Mesh, triangulation: Triangulation) -> VertexBuffer {
        let mut vb = VertexBuffer {
            polygon_starts: vec![0],
            ..Default::default()
        };
        vb.polygon_vertices.reserve(mesh.corners.len());
        vb.triangles.reserve(mesh.triangle_count());
        let mut index: HashMap<(u32, u32), u32> = HashMap::with_capacity(mesh.positions.len());
        for c in &mesh.corners {
            let next = vb.positions.len() as u32;
            let v = *index.entry((c.position, c.normal)).or_insert_with(|| {
                vb.positions.push(mesh.positions[c.position as usize]);
                let n = mesh
                    .normals
                    .get(c.normal as usize)
                    .copied()
                    .unwrap_or(Vec3::Z);
                vb.normals.push(n.try_normalize().unwrap_or(Vec3::Z));
                next
            });
            vb.polygon_vertices.push(v);
        }
        for f in 0..mesh.face_count() {
            let (s, e) = (
                mesh.face_starts[f] as usize,
                mesh.face_starts[f + 1] as usize,
            );
            vb.polygon_starts.push(e as u32);
            let poly = &vb.polygon_vertices[s..e];
            let quad_flip = triangulation == Triangulation::ShorterDiagonal && poly.len() == 4 && {
                let p = |i: usize| vb.positions[poly[i] as usize];
                (p(1) - p(3)).length_squared() < (p(0) - p(2)).length_squared()
            };
            if quad_flip {
                vb.triangles.push([poly[1], poly[2], poly[3]]);
                vb.triangles.push([poly[1], poly[3], poly[0]]);
                vb.triangle_face.extend_from_slice(&[f as u32, f as u32]);
            } else {
                for i in 1..poly.len().saturating_sub(1) {
                    vb.triangles.push([poly[0], poly[i], poly[i + 1]]);
                    vb.triangle_face.push(f as u32);
                }
            }
        }
        vb
    }

    /// Number of render vertices.
    pub fn vertex_count(&self) -> usize {
        self.positions.len()
    }

    /// The render vertices of face `f`.
    pub fn polygon(&self, f: usize) -> &[u32] {
        &self.polygon_vertices[self.polygon_starts[f] as usize..self.polygon_starts[f + 1] as usize]
    }

    /// Number of authored faces.
    pub fn polygon_count(&self) -> usize {
        self.polygon_starts.len() - 1
    }
}

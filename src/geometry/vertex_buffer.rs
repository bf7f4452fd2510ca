//! Welded vertex and index buffers: what the pipeline draws.
//!
//! A render vertex is a unique (position, normal) pair of the authored mesh, so per-vertex
//! lighting is evaluated exactly once per render vertex and hard edges (split normals) stay
//! hard. Faces with more than three corners are triangulated here as the scene's
//! [`PolygonMode`] says, or kept whole for the scanline polygon fill; the corner lists of every
//! face are kept either way (flat shading and surface probes use them).

use crate::geometry::mesh::Mesh;
use glam::Vec3;
use schemars::JsonSchema;
use serde::{Deserialize, Serialize};
use std::collections::HashMap;

/// Most corners a polygon may have to be kept whole for the scanline fill (its edge table
/// lives on the stack).
pub const MAX_CORNERS: usize = 32;

/// How faces with more than three corners are drawn. Triangles always take the triangle path.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Serialize, Deserialize, Default, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub enum PolygonMode {
    /// Split as authored: a fan from each face's first corner in the file's corner order, so
    /// the author's order decides which diagonal a quad gets.
    #[default]
    #[serde(alias = "fan")]
    AsAuthored,
    /// A fan of triangles around an added centre vertex (mean position, mean normal): no
    /// diagonal is favoured, at the cost of one more lit vertex per face.
    CentreFan,
    /// Quads split along their shorter diagonal; larger polygons as authored.
    ShorterDiagonal,
    /// No split: the polygon is filled scanline by scanline, values interpolated along its
    /// left and right edges and then across each span (Gouraud 1971). The result depends on
    /// the polygon's orientation on screen. Polygons of more than
    /// [`MAX_CORNERS`] corners, and those crossing a clip plane, are drawn as
    /// authored instead.
    Scanline,
}

impl PolygonMode {
    /// Every mode, in menu order.
    pub const ALL: [PolygonMode; 4] = [
        PolygonMode::AsAuthored,
        PolygonMode::CentreFan,
        PolygonMode::ShorterDiagonal,
        PolygonMode::Scanline,
    ];

    /// A label for menus.
    pub fn label(self) -> &'static str {
        match self {
            PolygonMode::AsAuthored => "Split as authored (from first corner)",
            PolygonMode::CentreFan => "Fan around an added centre",
            PolygonMode::ShorterDiagonal => "Split along the shorter diagonal",
            PolygonMode::Scanline => "Scanline polygon fill (no split)",
        }
    }
}

/// Buffers ready to draw. Invariant: every index is below `positions.len()`, `positions` and
/// `normals` have the same length, and `colors` is empty or has that length too.
#[derive(Clone, Debug, Default)]
pub struct VertexBuffer {
    /// Object-space positions, one per render vertex.
    pub positions: Vec<Vec3>,
    /// Object-space unit normals, one per render vertex.
    pub normals: Vec<Vec3>,
    /// Linear vertex colours, one per render vertex, or empty when the mesh has none.
    pub colors: Vec<Vec3>,
    /// The file material of each render vertex, or empty when the mesh has none.
    pub vertex_material: Vec<u32>,
    /// The file material of each authored face, or empty when the mesh has none.
    pub face_material: Vec<u32>,
    /// Triangles, counter-clockwise from the front.
    pub triangles: Vec<[u32; 3]>,
    /// The authored face each triangle came from.
    pub triangle_face: Vec<u32>,
    /// Render-vertex indices of each authored face, face after face.
    pub polygon_vertices: Vec<u32>,
    /// `polygon_vertices[polygon_starts[f]..polygon_starts[f + 1]]` is face `f`.
    pub polygon_starts: Vec<u32>,
    /// `triangles[triangle_starts[f]..triangle_starts[f + 1]]` came from face `f` (none for
    /// scanline faces).
    pub triangle_starts: Vec<u32>,
    /// Faces drawn whole by the scanline polygon fill (none unless the mode is
    /// [`PolygonMode::Scanline`]); their triangles are not in `triangles`.
    pub scanline_faces: Vec<u32>,
    /// Triangles the scanline faces would make if split (for cost figures).
    pub scanline_triangles: usize,
}

impl VertexBuffer {
    /// Welds `mesh` (which must be valid and have a normal on every corner) and triangulates it.
    pub fn build(mesh: &Mesh, mode: PolygonMode) -> VertexBuffer {
        let mut vb = VertexBuffer {
            polygon_starts: vec![0],
            triangle_starts: vec![0],
            ..Default::default()
        };
        vb.polygon_vertices.reserve(mesh.corners.len());
        vb.triangles.reserve(mesh.triangle_count());
        // A render vertex per (position, normal, material): faces of different materials
        // light their shared corners each with their own.
        let mut index: HashMap<(u32, u32, u32), u32> = HashMap::with_capacity(mesh.positions.len());
        vb.face_material.clone_from(&mesh.face_material);
        let material_of_corner = |ci: usize| -> Option<u32> {
            if mesh.face_material.is_empty() {
                return None;
            }
            // The face holding corner `ci` (face_starts is sorted).
            let f = mesh.face_starts.partition_point(|&s| s as usize <= ci) - 1;
            mesh.face_material.get(f).copied()
        };
        for (ci, c) in mesh.corners.iter().enumerate() {
            let next = vb.positions.len() as u32;
            let material = material_of_corner(ci);
            let key = (c.position, c.normal, material.unwrap_or(0));
            let v = *index.entry(key).or_insert_with(|| {
                vb.positions.push(mesh.positions[c.position as usize]);
                if let Some(colour) = mesh.colors.get(c.position as usize) {
                    vb.colors.push(*colour);
                }
                if let Some(m) = material {
                    vb.vertex_material.push(m);
                }
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
            let n = e - s;
            let p = |i: usize| vb.positions[vb.polygon_vertices[s + i] as usize];
            let face = f as u32;
            match mode {
                PolygonMode::Scanline if (4..=MAX_CORNERS).contains(&n) => {
                    vb.scanline_faces.push(face);
                    vb.scanline_triangles += n - 2;
                }
                PolygonMode::ShorterDiagonal
                    if n == 4
                        && (p(1) - p(3)).length_squared() < (p(0) - p(2)).length_squared() =>
                {
                    let q = &vb.polygon_vertices[s..e];
                    let (a, b, c, d) = (q[0], q[1], q[2], q[3]);
                    vb.triangles.push([b, c, d]);
                    vb.triangles.push([b, d, a]);
                    vb.triangle_face.extend_from_slice(&[face, face]);
                }
                PolygonMode::CentreFan if n > 3 => {
                    let mut pos = Vec3::ZERO;
                    let mut nrm = Vec3::ZERO;
                    let mut col = Vec3::ZERO;
                    for &v in &vb.polygon_vertices[s..e] {
                        pos += vb.positions[v as usize];
                        nrm += vb.normals[v as usize];
                        if let Some(c) = vb.colors.get(v as usize) {
                            col += *c;
                        }
                    }
                    let centre = vb.positions.len() as u32;
                    vb.positions.push(pos / n as f32);
                    if !vb.colors.is_empty() {
                        vb.colors.push(col / n as f32);
                    }
                    if let Some(&m) = vb.face_material.get(f) {
                        vb.vertex_material.push(m);
                    }
                    vb.normals.push(nrm.try_normalize().unwrap_or(Vec3::Z));
                    for i in 0..n {
                        let (a, b) = (
                            vb.polygon_vertices[s + i],
                            vb.polygon_vertices[s + (i + 1) % n],
                        );
                        vb.triangles.push([centre, a, b]);
                        vb.triangle_face.push(face);
                    }
                }
                _ => {
                    let q = &vb.polygon_vertices[s..e];
                    for i in 1..n.saturating_sub(1) {
                        vb.triangles.push([q[0], q[i], q[i + 1]]);
                        vb.triangle_face.push(face);
                    }
                }
            }
            vb.triangle_starts.push(vb.triangles.len() as u32);
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

    /// Triangles drawn plus the triangles the scanline faces stand for: the mesh's size in
    /// triangles, whatever the polygon mode.
    pub fn triangle_count(&self) -> usize {
        self.triangles.len() + self.scanline_triangles
    }

    /// The triangles face `f` was split into (empty for scanline faces).
    pub fn face_triangles(&self, f: usize) -> &[[u32; 3]] {
        &self.triangles[self.triangle_starts[f] as usize..self.triangle_starts[f + 1] as usize]
    }

    /// True when face `f` is drawn by the scanline polygon fill.
    pub fn is_scanline_face(&self, f: usize) -> bool {
        self.scanline_faces.binary_search(&(f as u32)).is_ok()
    }

    /// Number of authored faces.
    pub fn polygon_count(&self) -> usize {
        self.polygon_starts.len() - 1
    }
}

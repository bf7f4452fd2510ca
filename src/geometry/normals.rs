//! Vertex normals from facets: area, angle and Max weights, with a crease angle.
//!
//! A vertex normal is a weighted sum of the normals of the faces around the vertex. The weight
//! decides how the normal leans when the faces around a vertex differ in size or shape, which
//! changes per-vertex lighting visibly on coarse meshes:
//! - area: the face's area (the usual default of modelling tools);
//! - angle: the corner's interior angle (Thuermer & Wuethrich, "Computing Vertex Normals from
//!   Polygonal Facets", Journal of Graphics Tools 3(1), 1998): independent of how a face is split;
//! - Max: `|e1 x e2| / (|e1|^2 |e2|^2)` at the corner (N. Max, "Weights for Computing Vertex
//!   Normals from Facet Normals", Journal of Graphics Tools 4(2), 1999): exact for vertices on a
//!   sphere.
//!
//! The crease angle splits hard edges: a corner only averages the faces around its vertex
//! whose normals are within the crease angle of its own face's normal. 180 degrees smooths
//! everything.

use crate::geometry::mesh::{polygon_area_vector, Mesh};
use glam::Vec3;
use schemars::JsonSchema;
use serde::{Deserialize, Serialize};

/// How face normals are weighted into a vertex normal.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, Default, JsonSchema)]
#[serde(rename_all = "lowercase")]
pub enum NormalWeighting {
    /// By face area.
    Area,
    /// By the corner's interior angle (Thuermer & Wuethrich 1998).
    #[default]
    Angle,
    /// By Max's (1999) weights.
    Max,
}

/// Whether corners at the same position but under different position indices (a mesh split
/// along its UV or patch seams, say) are smoothed together when normals are computed.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default, Serialize, Deserialize, JsonSchema)]
#[serde(rename_all = "lowercase")]
pub enum Coincident {
    /// Each position index is its own vertex (the behaviour of scene format 1).
    Separate,
    /// Positions with the same coordinates are one vertex for smoothing; the corners keep
    /// their own indices (so whatever else tells them apart stays split).
    #[default]
    Joined,
}

/// Returns a copy of `mesh` whose corners use normals computed from its faces.
///
/// `crease_deg` is the largest angle, in degrees, between two face normals that are still
/// smoothed together; 180 or more smooths every vertex.
pub fn compute_normals(
    mesh: &Mesh,
    weighting: NormalWeighting,
    crease_deg: f32,
    coincident: Coincident,
) -> Mesh {
    let nfaces = mesh.face_count();
    let npos = mesh.positions.len();
    // The vertex each position smooths as: itself, or the first position with its coordinates.
    let vertex_of: Vec<u32> = match coincident {
        Coincident::Separate => (0..npos as u32).collect(),
        Coincident::Joined => {
            let mut first = std::collections::HashMap::with_capacity(npos);
            mesh.positions
                .iter()
                .enumerate()
                .map(|(i, p)| {
                    // -0.0 and 0.0 are the same place.
                    let key = (*p + Vec3::ZERO).to_array().map(f32::to_bits);
                    *first.entry(key).or_insert(i as u32)
                })
                .collect()
        }
    };
    // Per face: unit normal. Per corner: weighted contribution (face normal times weight).
    let mut face_normal = Vec::with_capacity(nfaces);
    let mut contribution = vec![Vec3::ZERO; mesh.corners.len()];
    let mut corner_face = vec![0u32; mesh.corners.len()];
    for f in 0..nfaces {
        let start = mesh.face_starts[f] as usize;
        let face = mesh.face(f);
        let area2 = polygon_area_vector(&mesh.positions, face);
        let n = area2.normalize_or_zero();
        face_normal.push(n);
        let k = face.len();
        for i in 0..k {
            let p = mesh.positions[face[i].position as usize];
            let next = mesh.positions[face[(i + 1) % k].position as usize];
            let prev = mesh.positions[face[(i + k - 1) % k].position as usize];
            let (e1, e2) = (next - p, prev - p);
            let w = match weighting {
                NormalWeighting::Area => 0.5 * area2.length(),
                NormalWeighting::Angle => corner_angle(e1, e2),
                NormalWeighting::Max => {
                    let d = e1.length_squared() * e2.length_squared();
                    if d > 0.0 {
                        e1.cross(e2).length() / d
                    } else {
                        0.0
                    }
                }
            };
            contribution[start + i] = n * w;
            corner_face[start + i] = f as u32;
        }
    }
    // Corners around each vertex (compressed rows).
    let mut row = vec![0u32; npos + 1];
    for c in &mesh.corners {
        row[vertex_of[c.position as usize] as usize + 1] += 1;
    }
    for i in 0..npos {
        row[i + 1] += row[i];
    }
    let mut fill = row.clone();
    let mut around = vec![0u32; mesh.corners.len()];
    for (ci, c) in mesh.corners.iter().enumerate() {
        let slot = &mut fill[vertex_of[c.position as usize] as usize];
        around[*slot as usize] = ci as u32;
        *slot += 1;
    }

    let smooth_all = crease_deg >= 180.0;
    let cos_crease = libm::cosf(crease_deg.clamp(0.0, 180.0).to_radians());
    let mut out = mesh.clone();
    out.normals.clear();
    let mut local: Vec<(Vec3, u32)> = Vec::new();
    for v in 0..npos {
        let ring = &around[row[v] as usize..row[v + 1] as usize];
        local.clear();
        for &c in ring {
            let own = face_normal[corner_face[c as usize] as usize];
            let mut sum = Vec3::ZERO;
            for &o in ring {
                let other = face_normal[corner_face[o as usize] as usize];
                if smooth_all || own.dot(other) >= cos_crease - 1e-6 {
                    sum += contribution[o as usize];
                }
            }
            let n = sum.try_normalize().unwrap_or(own);
            let n = if n.is_finite() && n != Vec3::ZERO {
                n
            } else {
                Vec3::Z
            };
            // Share identical normals around this vertex.
            let index = match local.iter().find(|(m, _)| *m == n) {
                Some(&(_, i)) => i,
                None => {
                    let i = out.normals.len() as u32;
                    out.normals.push(n);
                    local.push((n, i));
                    i
                }
            };
            out.corners[c as usize].normal = index;
        }
    }
    out
}

/// The interior angle between two edge vectors, in radians (0 for a degenerate corner).
fn corner_angle(e1: Vec3, e2: Vec3) -> f32 {
    let d = e1.length() * e2.length();
    if d > 0.0 {
        libm::acosf((e1.dot(e2) / d).clamp(-1.0, 1.0))
    } else {
        0.0
    }
}

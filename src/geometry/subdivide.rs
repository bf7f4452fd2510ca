//! Subdivision: more vertices for per-vertex lighting, either on the same flat faces (midpoint)
//! or on a smooth surface through them (PN triangles).
//!
//! Level `L` splits every triangle into `4^L` by a regular grid of `2^L` segments per edge
//! (what `L` rounds of midpoint subdivision give). Faces of more than three corners are first
//! split as authored (a fan from the first corner).
//!
//! - **Midpoint**: new points are barycentric combinations of the triangle's corners, so they
//!   stay on the original faces; normals are the same combination of the corner normals,
//!   renormalised. More samples of the same surface.
//! - **PN triangles** (A. Vlachos, J. Peters, C. Boyd, J. L. Mitchell, "Curved PN Triangles",
//!   ACM Symposium on Interactive 3D Graphics 2001): each triangle becomes the cubic Bezier
//!   triangle determined by its corners and corner normals (control points projected onto the
//!   corners' tangent planes), with normals varying quadratically. The surface interpolates
//!   the corners and their normals; neighbours share an edge curve where they share the
//!   edge's normals. A smoother surface.
//!
//! Points on an original edge are computed once, from the edge's own data in a fixed order,
//! and shared by both faces, so the result has no cracks and welds exactly.

use crate::geometry::mesh::{Corner, Mesh, MAX_TRIANGLES};
use glam::Vec3;
use schemars::JsonSchema;
use serde::{Deserialize, Serialize};
use std::collections::HashMap;

/// How a mesh is subdivided.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Hash, Serialize, Deserialize, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub enum SubdivisionMethod {
    /// Points on the original flat faces, normals interpolated.
    #[default]
    Midpoint,
    /// Curved PN triangles (Vlachos et al. 2001).
    PnTriangles,
}

/// Subdivision settings of a scene.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Hash, Serialize, Deserialize, JsonSchema)]
#[serde(default, deny_unknown_fields)]
pub struct Subdivision {
    /// The method.
    pub method: SubdivisionMethod,
    /// Levels, 0..=[`MAX_LEVELS`]; each multiplies the triangle count by 4.
    #[schemars(range(max = MAX_LEVELS))]
    pub levels: u32,
}

/// Most subdivision levels (4^6 = 4096 triangles per original one).
pub const MAX_LEVELS: u32 = 6;

/// The triangles `mesh` has after `levels` levels, or `None` when that exceeds
/// [`MAX_TRIANGLES`].
pub fn triangles_after(mesh: &Mesh, levels: u32) -> Option<usize> {
    let t = mesh.triangle_count();
    let f = 4usize.checked_pow(levels)?;
    t.checked_mul(f).filter(|&n| n <= MAX_TRIANGLES)
}

/// A corner's identity for sharing: position and normal index.
type Key = (u32, u32);

struct Builder {
    out: Mesh,
    /// Shared points: (corner a, corner b, step from a, of n) on edges, keyed canonically.
    edge_points: HashMap<(Key, Key, u32), u32>,
    /// Shared normals, by the same key plus the owning corners (normals may differ on either
    /// side of a hard edge even where positions agree).
    edge_normals: HashMap<(Key, Key, u32), u32>,
    /// The mesh has vertex colours.
    colored: bool,
}

/// One triangle's data for evaluation.
#[derive(Clone, Copy)]
struct Tri {
    p: [Vec3; 3],
    n: [Vec3; 3],
    /// Vertex colours (zero when the mesh has none); interpolated linearly by both methods.
    c: [Vec3; 3],
}

impl Tri {
    /// The colour at barycentric weights `a`.
    fn color(&self, a: [f32; 3]) -> Vec3 {
        self.c[0] * a[0] + self.c[1] * a[1] + self.c[2] * a[2]
    }

    /// Position and normal at barycentric weights `a` (summing to 1).
    fn eval(&self, method: SubdivisionMethod, a: [f32; 3]) -> (Vec3, Vec3) {
        match method {
            SubdivisionMethod::Midpoint => (
                self.p[0] * a[0] + self.p[1] * a[1] + self.p[2] * a[2],
                (self.n[0] * a[0] + self.n[1] * a[1] + self.n[2] * a[2])
                    .try_normalize()
                    .unwrap_or(self.n[0]),
            ),
            SubdivisionMethod::PnTriangles => self.pn(a),
        }
    }

    /// The PN triangle at barycentric `a` (Vlachos et al. 2001, section 3).
    fn pn(&self, a: [f32; 3]) -> (Vec3, Vec3) {
        let [p1, p2, p3] = self.p;
        let [n1, n2, n3] = self.n;
        // w_ij = (P_j - P_i) . N_i;  b_ij = (2 P_i + P_j - w_ij N_i) / 3.
        let b = |pi: Vec3, pj: Vec3, ni: Vec3| (2.0 * pi + pj - (pj - pi).dot(ni) * ni) / 3.0;
        let b210 = b(p1, p2, n1);
        let b120 = b(p2, p1, n2);
        let b021 = b(p2, p3, n2);
        let b012 = b(p3, p2, n3);
        let b102 = b(p3, p1, n3);
        let b201 = b(p1, p3, n1);
        let e = (b210 + b120 + b021 + b012 + b102 + b201) / 6.0;
        let v = (p1 + p2 + p3) / 3.0;
        let b111 = e + (e - v) / 2.0;
        let [u, w, t] = a; // weights of P1, P2, P3
        let pos = p1 * (u * u * u)
            + p2 * (w * w * w)
            + p3 * (t * t * t)
            + b210 * (3.0 * u * u * w)
            + b120 * (3.0 * u * w * w)
            + b201 * (3.0 * u * u * t)
            + b021 * (3.0 * w * w * t)
            + b102 * (3.0 * u * t * t)
            + b012 * (3.0 * w * t * t)
            + b111 * (6.0 * u * w * t);
        // v_ij = 2 (P_j - P_i) . (N_i + N_j) / |P_j - P_i|^2;
        // n_ij = normalize(N_i + N_j - v_ij (P_j - P_i)).
        let mid = |pi: Vec3, pj: Vec3, ni: Vec3, nj: Vec3| {
            let d = pj - pi;
            let len2 = d.length_squared();
            let vij = if len2 > 0.0 {
                2.0 * d.dot(ni + nj) / len2
            } else {
                0.0
            };
            (ni + nj - vij * d).try_normalize().unwrap_or(ni)
        };
        let n110 = mid(p1, p2, n1, n2);
        let n011 = mid(p2, p3, n2, n3);
        let n101 = mid(p3, p1, n3, n1);
        let nrm = n1 * (u * u)
            + n2 * (w * w)
            + n3 * (t * t)
            + n110 * (u * w)
            + n011 * (w * t)
            + n101 * (u * t);
        (pos, nrm.try_normalize().unwrap_or(n1))
    }
}

impl Builder {
    /// A new position with its colour (kept only when the mesh has colours).
    fn position(&mut self, p: Vec3, color: Vec3) -> u32 {
        self.out.positions.push(p);
        if self.colored {
            self.out.colors.push(color);
        }
        self.out.positions.len() as u32 - 1
    }

    fn normal(&mut self, n: Vec3) -> u32 {
        self.out.normals.push(n);
        self.out.normals.len() as u32 - 1
    }
}

/// Subdivides `mesh` (valid, with a normal on every corner) by `levels` levels of `method`.
/// Level 0 returns the mesh unchanged.
///
/// # Errors
/// When the result would exceed [`MAX_TRIANGLES`] or `levels` exceeds [`MAX_LEVELS`].
pub fn subdivide(mesh: &Mesh, method: SubdivisionMethod, levels: u32) -> Result<Mesh, String> {
    if levels == 0 {
        return Ok(mesh.clone());
    }
    if levels > MAX_LEVELS {
        return Err(format!(
            "subdivision has at most {MAX_LEVELS} levels, not {levels}"
        ));
    }
    let Some(total) = triangles_after(mesh, levels) else {
        return Err(format!(
            "{} levels of subdivision would give more than {MAX_TRIANGLES} triangles (the mesh has {})",
            levels,
            mesh.triangle_count()
        ));
    };
    let n = 1u32 << levels;
    let mut b = Builder {
        out: Mesh::new(mesh.name.clone()),
        edge_points: HashMap::new(),
        edge_normals: HashMap::new(),
        colored: !mesh.colors.is_empty(),
    };
    b.out.corners.reserve(total * 3);
    b.out.face_starts.reserve(total + 1);
    // Original corners keep their positions and normals (both methods interpolate them).
    b.out.positions.extend_from_slice(&mesh.positions);
    b.out.colors.extend_from_slice(&mesh.colors);
    b.out.materials.clone_from(&mesh.materials);
    b.out.normals.extend_from_slice(&mesh.normals);
    let normal_of = |c: Corner| {
        mesh.normals
            .get(c.normal as usize)
            .copied()
            .unwrap_or(Vec3::Z)
    };
    let mut grid: Vec<Corner> = Vec::new();
    for f in 0..mesh.face_count() {
        let face = &mesh.corners[mesh.face_starts[f] as usize..mesh.face_starts[f + 1] as usize];
        for k in 1..face.len().saturating_sub(1) {
            let c = [face[0], face[k], face[k + 1]];
            let tri = Tri {
                p: c.map(|c| mesh.positions[c.position as usize]),
                n: c.map(normal_of),
                c: c.map(|c| {
                    mesh.colors
                        .get(c.position as usize)
                        .copied()
                        .unwrap_or(Vec3::ZERO)
                }),
            };
            // Grid point (i, j): weights ((n - i - j), i, j) / n of corners 0, 1, 2.
            grid.clear();
            for j in 0..=n {
                for i in 0..=n - j {
                    grid.push(grid_corner(&mut b, method, &tri, c, n, i, j));
                }
            }
            let at = |i: u32, j: u32| {
                // Row j starts after rows 0..j, row r holding n - r + 1 points.
                let start = j * (n + 1) - j * j.saturating_sub(1) / 2;
                grid[(start + i) as usize]
            };
            let material = mesh.face_material.get(f).copied();
            for j in 0..n {
                for i in 0..n - j {
                    b.out.push_face(&[at(i, j), at(i + 1, j), at(i, j + 1)]);
                    b.out.face_material.extend(material);
                    if i + j + 1 < n {
                        b.out
                            .push_face(&[at(i + 1, j), at(i + 1, j + 1), at(i, j + 1)]);
                        b.out.face_material.extend(material);
                    }
                }
            }
        }
    }
    Ok(b.out)
}

/// The corner at grid point (i, j) of a triangle with corners `c`: an original corner, a
/// shared point of an original edge, or an interior point of this triangle.
fn grid_corner(
    b: &mut Builder,
    method: SubdivisionMethod,
    tri: &Tri,
    c: [Corner; 3],
    n: u32,
    i: u32,
    j: u32,
) -> Corner {
    let k = n - i - j; // weight of corner 0
    let key = |c: Corner| (c.position, c.normal);
    // Original corners.
    if i == 0 && j == 0 {
        return c[0];
    }
    if i == n {
        return c[1];
    }
    if j == n {
        return c[2];
    }
    // On an edge: (corner a, corner b, steps from a toward b).
    let edge = if j == 0 {
        Some((0, 1, i))
    } else if i == 0 {
        Some((0, 2, j))
    } else if k == 0 {
        Some((1, 2, j))
    } else {
        None
    };
    let Some((ea, eb, s)) = edge else {
        let w = [
            k as f32 / n as f32,
            i as f32 / n as f32,
            j as f32 / n as f32,
        ];
        let (p, nrm) = tri.eval(method, w);
        return Corner {
            position: b.position(p, tri.color(w)),
            normal: b.normal(nrm),
        };
    };
    // Canonical order: the smaller corner key first, so both faces compute the same point
    // from the same numbers.
    let (first, second, steps) = if key(c[ea]) <= key(c[eb]) {
        (ea, eb, s)
    } else {
        (eb, ea, n - s)
    };
    let t = steps as f32 / n as f32;
    let edge_tri = Tri {
        p: [tri.p[first], tri.p[second], tri.p[first]],
        n: [tri.n[first], tri.n[second], tri.n[first]],
        c: [tri.c[first], tri.c[second], tri.c[first]],
    };
    let (p, nrm) = edge_tri.eval(method, [1.0 - t, t, 0.0]);
    let pos_key = ((c[first].position, 0), (c[second].position, 0), steps);
    let position = match b.edge_points.get(&pos_key) {
        Some(&v) => v,
        None => {
            let v = b.position(p, edge_tri.color([1.0 - t, t, 0.0]));
            b.edge_points.insert(pos_key, v);
            v
        }
    };
    let nrm_key = (key(c[first]), key(c[second]), steps);
    let normal = match b.edge_normals.get(&nrm_key) {
        Some(&v) => v,
        None => {
            let v = b.normal(nrm);
            b.edge_normals.insert(nrm_key, v);
            v
        }
    };
    Corner { position, normal }
}

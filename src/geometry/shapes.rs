//! Procedural shapes of our own, each with a resolution parameter and, where the surface is
//! analytic, its exact normal (used by the exact-surface reference shading).
//!
//! Every shape fits inside the unit sphere around the origin, faces are counter-clockwise seen
//! from outside, and quads stay quads (the scanline polygon mode needs them).

use crate::geometry::mesh::{Corner, Mesh};
use glam::{DVec3, Vec3};
use schemars::JsonSchema;
use serde::{Deserialize, Serialize};
use std::f64::consts::PI;

/// A procedural shape and its resolution.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum Shape {
    /// Icosahedron refined by midpoint subdivision projected to the sphere; `level` 0..=7.
    Icosphere {
        /// Subdivision level, 0..=7 (20 * 4^level triangles).
        #[schemars(range(min = 0, max = 7))]
        level: u32,
    },
    /// Latitude/longitude sphere: triangles at the poles, quads elsewhere.
    UvSphere {
        /// Latitude bands, 2..=256.
        #[schemars(range(min = 2, max = 256))]
        rings: u32,
        /// Longitude segments, 3..=512.
        #[schemars(range(min = 3, max = 512))]
        segments: u32,
    },
    /// Ring torus, major radius 0.7, tube radius 0.3, quads.
    Torus {
        /// Segments around the main axis, 3..=512.
        #[schemars(range(min = 3, max = 512))]
        rings: u32,
        /// Segments around the tube, 3..=256.
        #[schemars(range(min = 3, max = 256))]
        segments: u32,
    },
    /// Cube with hard edges: six quads with split (per-face) normals.
    Cube,
    /// A square grid of quads over a gentle height field, facing +z.
    QuadGrid {
        /// Cells per side, 1..=512.
        #[schemars(range(min = 1, max = 512))]
        cells: u32,
    },
    /// A closed vase-like surface of revolution about +y; triangles at the poles, quads elsewhere.
    Vase {
        /// Bands along the profile, 2..=256.
        #[schemars(range(min = 2, max = 256))]
        rings: u32,
        /// Segments around the axis, 3..=512.
        #[schemars(range(min = 3, max = 512))]
        segments: u32,
    },
}

impl Default for Shape {
    fn default() -> Self {
        Shape::Icosphere { level: 2 }
    }
}

/// The page's one resolution control ("detail") for a kind of shape: its label, its range and
/// where it starts. [`Shape::from_detail`] turns a detail value into the shape's parameters.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
pub struct DetailControl {
    /// The shape's `kind` in scene JSON.
    pub kind: &'static str,
    /// The shape's name on the page.
    pub label: &'static str,
    /// Smallest detail.
    pub min: u32,
    /// Largest detail.
    pub max: u32,
    /// Detail when the shape is picked.
    pub default: u32,
}

impl Shape {
    /// One detail control per kind of shape, in the order the page lists them.
    pub const DETAIL: [DetailControl; 6] = [
        DetailControl {
            kind: "icosphere",
            label: "Geodesic sphere",
            min: 0,
            max: 7,
            default: 2,
        },
        DetailControl {
            kind: "uv_sphere",
            label: "Latitude-longitude sphere",
            min: 2,
            max: 64,
            default: 8,
        },
        DetailControl {
            kind: "torus",
            label: "Torus",
            min: 3,
            max: 96,
            default: 10,
        },
        DetailControl {
            kind: "vase",
            label: "Vase (surface of revolution)",
            min: 2,
            max: 96,
            default: 10,
        },
        DetailControl {
            kind: "quad_grid",
            label: "Quad grid (height field)",
            min: 1,
            max: 64,
            default: 6,
        },
        DetailControl {
            kind: "cube",
            label: "Cube (hard edges)",
            min: 0,
            max: 0,
            default: 0,
        },
    ];

    /// The shape of `kind` at `detail` (clamped to the kind's range): an icosphere's level;
    /// `d` rings and `2d` segments for the latitude-longitude sphere and the vase; `2d`
    /// rings and `d` segments for the torus; `d` x `d` cells for the quad grid.
    pub fn from_detail(kind: &str, detail: u32) -> Option<Shape> {
        let c = Shape::DETAIL.iter().find(|c| c.kind == kind)?;
        let d = detail.clamp(c.min, c.max);
        Some(match kind {
            "icosphere" => Shape::Icosphere { level: d },
            "uv_sphere" => Shape::UvSphere {
                rings: d,
                segments: 2 * d,
            },
            "torus" => Shape::Torus {
                rings: 2 * d,
                segments: d,
            },
            "vase" => Shape::Vase {
                rings: d,
                segments: 2 * d,
            },
            "quad_grid" => Shape::QuadGrid { cells: d },
            _ => Shape::Cube,
        })
    }

    /// The detail value that [`Shape::from_detail`] would map to this shape (for shapes made
    /// otherwise, the parameter the control moves).
    pub fn detail(&self) -> u32 {
        match *self {
            Shape::Icosphere { level } => level,
            Shape::UvSphere { rings, .. } | Shape::Vase { rings, .. } => rings,
            Shape::Torus { segments, .. } => segments,
            Shape::QuadGrid { cells } => cells,
            Shape::Cube => 0,
        }
    }

    /// The resolution in words, as the page shows it beside the control.
    pub fn detail_text(&self) -> String {
        match *self {
            Shape::Icosphere { level } => format!("level {level}"),
            Shape::UvSphere { rings, segments }
            | Shape::Vase { rings, segments }
            | Shape::Torus { rings, segments } => format!("{rings} × {segments}"),
            Shape::QuadGrid { cells } => format!("{cells} × {cells} quads"),
            Shape::Cube => "fixed".into(),
        }
    }
}

/// Torus radii.
const TORUS_R: f64 = 0.7;
const TORUS_T: f64 = 0.3;

impl Shape {
    /// Checks the resolution ranges stated on each variant.
    ///
    /// # Errors
    /// A message naming the parameter and its allowed range.
    pub fn validate(&self) -> Result<(), String> {
        let check = |name: &str, v: u32, lo: u32, hi: u32| {
            if (lo..=hi).contains(&v) {
                Ok(())
            } else {
                Err(format!("{name} must be between {lo} and {hi}, not {v}"))
            }
        };
        match *self {
            Shape::Icosphere { level } => check("icosphere level", level, 0, 7),
            Shape::UvSphere { rings, segments } | Shape::Vase { rings, segments } => {
                check("rings", rings, 2, 256)?;
                check("segments", segments, 3, 512)
            }
            Shape::Torus { rings, segments } => {
                check("rings", rings, 3, 512)?;
                check("segments", segments, 3, 256)
            }
            Shape::Cube => Ok(()),
            Shape::QuadGrid { cells } => check("cells", cells, 1, 512),
        }
    }

    /// A short name for labels and file names.
    pub fn name(&self) -> &'static str {
        match self {
            Shape::Icosphere { .. } => "icosphere",
            Shape::UvSphere { .. } => "uv-sphere",
            Shape::Torus { .. } => "torus",
            Shape::Cube => "cube",
            Shape::QuadGrid { .. } => "quad-grid",
            Shape::Vase { .. } => "vase",
        }
    }

    /// Builds the mesh, with authored normals (exact where the surface is analytic).
    /// Call [`Shape::validate`] first; out-of-range values are clamped.
    pub fn build(&self) -> Mesh {
        match *self {
            Shape::Icosphere { level } => icosphere(level.min(7)),
            Shape::UvSphere { rings, segments } => revolve(
                "uv-sphere",
                rings.clamp(2, 256),
                segments.clamp(3, 512),
                |t| {
                    let a = PI * t;
                    (
                        libm::sin(a),
                        -libm::cos(a),
                        PI * libm::cos(a),
                        PI * libm::sin(a),
                    )
                },
            ),
            Shape::Vase { rings, segments } => revolve(
                "vase",
                rings.clamp(2, 256),
                segments.clamp(3, 512),
                vase_profile,
            ),
            Shape::Torus { rings, segments } => torus(rings.clamp(3, 512), segments.clamp(3, 256)),
            Shape::Cube => cube(),
            Shape::QuadGrid { cells } => quad_grid(cells.clamp(1, 512)),
        }
    }

    /// True for shapes that approximate a smooth analytic surface (spheres, torus, vase).
    pub fn has_exact_surface(&self) -> bool {
        !matches!(self, Shape::Cube | Shape::QuadGrid { .. })
    }

    /// The analytic surface as an implicit function: (F(p), grad F(p)), F = 0 on the
    /// surface, negative inside; `None` for shapes without one.
    fn implicit(&self, p: DVec3) -> Option<(f64, DVec3)> {
        match self {
            Shape::Icosphere { .. } | Shape::UvSphere { .. } => {
                let len = p.length();
                Some((len - 1.0, p / len.max(1e-300)))
            }
            Shape::Torus { .. } => {
                let ring = DVec3::new(p.x, 0.0, p.z);
                let rho = ring.length().max(1e-300);
                let q = p - ring * (TORUS_R / rho);
                let len = q.length();
                Some((len - TORUS_T, q / len.max(1e-300)))
            }
            Shape::Vase { .. } => {
                let t = ((p.y + 0.9) / 1.8).clamp(1e-9, 1.0 - 1e-9);
                let (r, _, dr, dy) = vase_profile(t);
                let ring = DVec3::new(p.x, 0.0, p.z);
                let rho = ring.length();
                let dir = if rho > 0.0 { ring / rho } else { DVec3::X };
                // d r / d y = (dr/dt) / (dy/dt).
                Some((rho - r, dir + DVec3::new(0.0, -dr / dy, 0.0)))
            }
            Shape::Cube | Shape::QuadGrid { .. } => None,
        }
    }

    /// Where the view ray through object-space point `p` (direction `dir`, unit) meets the
    /// analytic surface near `p`, and the surface's unit normal there: Newton's method on the
    /// implicit function along the ray, started at the mesh's point. `None` for shapes without
    /// an analytic surface or when the iteration does not settle (then the caller falls back).
    pub fn exact_hit(&self, p: Vec3, dir: Vec3) -> Option<(Vec3, Vec3)> {
        let (p0, d) = (p.as_dvec3(), dir.as_dvec3());
        let mut t = 0.0;
        for _ in 0..8 {
            let (f, g) = self.implicit(p0 + d * t)?;
            let slope = g.dot(d);
            if slope.abs() < 1e-9 {
                return None;
            }
            let step = f / slope;
            t -= step;
            if step.abs() < 1e-9 {
                let hit = p0 + d * t;
                let (_, g) = self.implicit(hit)?;
                return g.try_normalize().map(|n| (hit.as_vec3(), n.as_vec3()));
            }
        }
        None
    }

    /// The true unit normal of the analytic surface nearest to object-space point `p`, for
    /// shapes that approximate a smooth surface (spheres, torus, vase); `None` otherwise.
    pub fn exact_normal(&self, p: Vec3) -> Option<Vec3> {
        let p = p.as_dvec3();
        let n = match self {
            Shape::Icosphere { .. } | Shape::UvSphere { .. } => p,
            Shape::Torus { .. } => {
                let ring = DVec3::new(p.x, 0.0, p.z);
                let len = ring.length();
                if len == 0.0 {
                    return None;
                }
                p - ring * (TORUS_R / len)
            }
            Shape::Vase { .. } => {
                let t = ((p.y + 0.9) / 1.8).clamp(1e-9, 1.0 - 1e-9);
                let (_, _, dr, dy) = vase_profile(t);
                let ring = DVec3::new(p.x, 0.0, p.z);
                let dir = ring.try_normalize().unwrap_or(DVec3::X);
                dir * dy + DVec3::new(0.0, -dr, 0.0)
            }
            Shape::Cube | Shape::QuadGrid { .. } => return None,
        };
        n.try_normalize().map(|n| n.as_vec3())
    }
}

/// The vase profile at parameter t in [0, 1]: (radius, height, d radius/dt, d height/dt).
/// radius = 2 sqrt(t (1 - t)) * g(t), g(t) = 0.62 + 0.18 sin(2 pi t + 0.3) - 0.25 t; height
/// runs linearly from -0.9 to 0.9, so the surface closes at both poles.
fn vase_profile(t: f64) -> (f64, f64, f64, f64) {
    let q = (t * (1.0 - t)).max(0.0);
    let s = 2.0 * libm::sqrt(q);
    let ds = if q > 0.0 {
        (1.0 - 2.0 * t) / libm::sqrt(q)
    } else {
        0.0
    };
    let g = 0.62 + 0.18 * libm::sin(2.0 * PI * t + 0.3) - 0.25 * t;
    let dg = 0.36 * PI * libm::cos(2.0 * PI * t + 0.3) - 0.25;
    (s * g, -0.9 + 1.8 * t, ds * g + s * dg, 1.8)
}

/// Icosahedron vertices and faces (counter-clockwise from outside), then `level` rounds of
/// midpoint subdivision with the midpoints pushed to the unit sphere. The order of vertices
/// and faces matches the benchmark scene (docs/REFERENCES.md).
fn icosphere(level: u32) -> Mesh {
    let t = (1.0 + libm::sqrt(5.0)) / 2.0;
    let raw = [
        [-1.0, t, 0.0],
        [1.0, t, 0.0],
        [-1.0, -t, 0.0],
        [1.0, -t, 0.0],
        [0.0, -1.0, t],
        [0.0, 1.0, t],
        [0.0, -1.0, -t],
        [0.0, 1.0, -t],
        [t, 0.0, -1.0],
        [t, 0.0, 1.0],
        [-t, 0.0, -1.0],
        [-t, 0.0, 1.0],
    ];
    let mut pos: Vec<DVec3> = raw.iter().map(|p| DVec3::from(*p).normalize()).collect();
    let mut faces: Vec<[u32; 3]> = vec![
        [0, 11, 5],
        [0, 5, 1],
        [0, 1, 7],
        [0, 7, 10],
        [0, 10, 11],
        [1, 5, 9],
        [5, 11, 4],
        [11, 10, 2],
        [10, 7, 6],
        [7, 1, 8],
        [3, 9, 4],
        [3, 4, 2],
        [3, 2, 6],
        [3, 6, 8],
        [3, 8, 9],
        [4, 9, 5],
        [2, 4, 11],
        [6, 2, 10],
        [8, 6, 7],
        [9, 8, 1],
    ];
    for _ in 0..level {
        let mut cache = std::collections::HashMap::with_capacity(faces.len() * 3 / 2);
        let mut next = Vec::with_capacity(faces.len() * 4);
        let mut mid = |a: u32, b: u32, pos: &mut Vec<DVec3>| -> u32 {
            let key = (a.min(b), a.max(b));
            *cache.entry(key).or_insert_with(|| {
                let m = (pos[a as usize] + pos[b as usize]) * 0.5;
                pos.push(m.normalize());
                (pos.len() - 1) as u32
            })
        };
        for &[a, b, c] in &faces {
            let ab = mid(a, b, &mut pos);
            let bc = mid(b, c, &mut pos);
            let ca = mid(c, a, &mut pos);
            next.extend_from_slice(&[[a, ab, ca], [b, bc, ab], [c, ca, bc], [ab, bc, ca]]);
        }
        faces = next;
    }
    let mut mesh = Mesh::new(format!("icosphere L{level}"));
    mesh.positions = pos.iter().map(|p| p.as_vec3()).collect();
    mesh.normals = mesh.positions.clone();
    mesh.corners.reserve(faces.len() * 3);
    for f in &faces {
        mesh.push_face_shared(f);
    }
    mesh
}

/// A closed surface of revolution about +y from a profile `t -> (radius, height, dr/dt,
/// dh/dt)` with radius 0 at t = 0 and t = 1 (the poles). Normals are exact.
fn revolve(
    name: &str,
    rings: u32,
    segments: u32,
    profile: impl Fn(f64) -> (f64, f64, f64, f64),
) -> Mesh {
    let mut mesh = Mesh::new(format!("{name} {rings}x{segments}"));
    let push = |mesh: &mut Mesh, p: DVec3, n: DVec3| {
        mesh.positions.push(p.as_vec3());
        mesh.normals.push(n.normalize_or(DVec3::Y).as_vec3());
    };
    push(&mut mesh, DVec3::new(0.0, profile(0.0).1, 0.0), -DVec3::Y);
    for i in 1..rings {
        let t = f64::from(i) / f64::from(rings);
        let (r, y, dr, dy) = profile(t);
        for j in 0..segments {
            let phi = 2.0 * PI * f64::from(j) / f64::from(segments);
            let (s, c) = (libm::sin(phi), libm::cos(phi));
            // Outward normal: the profile tangent (dr, dy) turned by -90 degrees, revolved.
            push(
                &mut mesh,
                DVec3::new(r * c, y, -r * s),
                DVec3::new(dy * c, -dr, -dy * s),
            );
        }
    }
    push(&mut mesh, DVec3::new(0.0, profile(1.0).1, 0.0), DVec3::Y);
    let top = (mesh.positions.len() - 1) as u32;
    let ring = |i: u32, j: u32| 1 + (i - 1) * segments + (j % segments);
    // Longitude runs counter-clockwise seen from +y (phi measured toward -z), so with y going
    // up a face (ring i, j) -> (i, j+1) -> (i+1, j+1) -> (i+1, j) faces outward.
    for j in 0..segments {
        mesh.push_face_shared(&[0, ring(1, j + 1), ring(1, j)]);
    }
    for i in 1..rings - 1 {
        for j in 0..segments {
            mesh.push_face_shared(&[
                ring(i, j),
                ring(i, j + 1),
                ring(i + 1, j + 1),
                ring(i + 1, j),
            ]);
        }
    }
    for j in 0..segments {
        mesh.push_face_shared(&[top, ring(rings - 1, j), ring(rings - 1, j + 1)]);
    }
    mesh
}

fn torus(rings: u32, segments: u32) -> Mesh {
    let mut mesh = Mesh::new(format!("torus {rings}x{segments}"));
    for i in 0..rings {
        let u = 2.0 * PI * f64::from(i) / f64::from(rings);
        let (su, cu) = (libm::sin(u), libm::cos(u));
        for j in 0..segments {
            let v = 2.0 * PI * f64::from(j) / f64::from(segments);
            let (sv, cv) = (libm::sin(v), libm::cos(v));
            let n = DVec3::new(cv * cu, sv, -cv * su);
            let centre = DVec3::new(TORUS_R * cu, 0.0, -TORUS_R * su);
            mesh.positions.push((centre + n * TORUS_T).as_vec3());
            mesh.normals.push(n.as_vec3());
        }
    }
    let at = |i: u32, j: u32| (i % rings) * segments + (j % segments);
    for i in 0..rings {
        for j in 0..segments {
            mesh.push_face_shared(&[at(i, j), at(i + 1, j), at(i + 1, j + 1), at(i, j + 1)]);
        }
    }
    mesh
}

fn cube() -> Mesh {
    let a = 1.0 / 3.0f32.sqrt();
    let mut mesh = Mesh::new("cube");
    for i in 0..8u32 {
        let c = |bit: u32| if i & bit != 0 { a } else { -a };
        mesh.positions.push(Vec3::new(c(1), c(2), c(4)));
    }
    // (normal, corners counter-clockwise seen from outside)
    let faces: [(Vec3, [u32; 4]); 6] = [
        (Vec3::X, [1, 3, 7, 5]),
        (Vec3::NEG_X, [0, 4, 6, 2]),
        (Vec3::Y, [2, 6, 7, 3]),
        (Vec3::NEG_Y, [0, 1, 5, 4]),
        (Vec3::Z, [4, 5, 7, 6]),
        (Vec3::NEG_Z, [0, 2, 3, 1]),
    ];
    for (n, quad) in faces {
        let ni = mesh.normals.len() as u32;
        mesh.normals.push(n);
        let corners = quad.map(|p| Corner {
            position: p,
            normal: ni,
        });
        mesh.push_face(&corners);
    }
    mesh
}

/// Height field of the quad grid: a gentle swell, 0.12 at most.
fn grid_height(x: f64, y: f64) -> (f64, f64, f64) {
    let k = 0.6 * PI;
    let h = 0.12 * libm::cos(k * x) * libm::cos(k * y);
    let dx = -0.12 * k * libm::sin(k * x) * libm::cos(k * y);
    let dy = -0.12 * k * libm::cos(k * x) * libm::sin(k * y);
    (h, dx, dy)
}

fn quad_grid(cells: u32) -> Mesh {
    let mut mesh = Mesh::new(format!("quad grid {cells}x{cells}"));
    let half = 0.68;
    for j in 0..=cells {
        for i in 0..=cells {
            let x = -half + 2.0 * half * f64::from(i) / f64::from(cells);
            let y = -half + 2.0 * half * f64::from(j) / f64::from(cells);
            let (h, dx, dy) = grid_height(x, y);
            mesh.positions.push(DVec3::new(x, y, h).as_vec3());
            mesh.normals
                .push(DVec3::new(-dx, -dy, 1.0).normalize().as_vec3());
        }
    }
    let at = |i: u32, j: u32| j * (cells + 1) + i;
    for j in 0..cells {
        for i in 0..cells {
            mesh.push_face_shared(&[at(i, j), at(i + 1, j), at(i + 1, j + 1), at(i, j + 1)]);
        }
    }
    mesh
}

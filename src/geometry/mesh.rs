//! Polygon meshes as authored: positions, optional normals, faces of any size.
//!
//! Faces are kept as the author wrote them (triangles, quads, n-gons) because the difference
//! between interpolating over a polygon and over its triangles is one of the things twinshade
//! shows. Each face corner names a position and, separately, a normal (as OBJ does), so hard
//! edges are expressed by corners that share a position but not a normal. Triangulation
//! happens later, on demand ([`crate::geometry::vertex_buffer`]).

use glam::Vec3;
use std::fmt;

/// Marks a corner without an authored normal.
pub const NO_NORMAL: u32 = u32::MAX;

/// One corner of a face: indices into [`Mesh::positions`] and [`Mesh::normals`].
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub struct Corner {
    /// Index into `positions`.
    pub position: u32,
    /// Index into `normals`, or [`NO_NORMAL`].
    pub normal: u32,
}

/// A material as a mesh file states it, in the file's own terms (linear factors).
#[derive(Clone, Debug, PartialEq)]
pub struct FileMaterial {
    /// The material's name in the file ("material N" when it has none).
    pub name: String,
    /// glTF `baseColorFactor` RGB, linear (alpha is not used).
    pub base_color: Vec3,
    /// glTF `metallicFactor`.
    pub metallic: f32,
    /// glTF `roughnessFactor`.
    pub roughness: f32,
    /// glTF `emissiveFactor`, linear.
    pub emissive: Vec3,
    /// glTF `doubleSided`: both faces drawn (no back-face culling).
    pub double_sided: bool,
    /// How the material reflects light.
    pub reflectance: Reflectance,
}

/// Which reflection model a file's material asks for.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Reflectance {
    /// glTF 2.0 metallic-roughness (`metallic`, `roughness`); also an OBJ material with the
    /// `Pr`/`Pm` statements.
    MetallicRoughness,
    /// An OBJ material's Blinn-Phong terms: the specular colour `Ks` (linear) and the
    /// exponent `Ns`; the diffuse colour `Kd` is the base colour.
    Specular {
        /// `Ks`, linear.
        color: Vec3,
        /// `Ns`.
        exponent: f32,
    },
    /// No material assigned (an OBJ face before any `usemtl`, or naming a material its
    /// library lacks): lit with the viewer's own material.
    Viewer,
}

impl Default for FileMaterial {
    /// The glTF 2.0 default material: base colour 1, metallic 1, roughness 1, no emission,
    /// single-sided.
    fn default() -> Self {
        FileMaterial {
            name: String::new(),
            base_color: Vec3::ONE,
            metallic: 1.0,
            roughness: 1.0,
            emissive: Vec3::ZERO,
            double_sided: false,
            reflectance: Reflectance::MetallicRoughness,
        }
    }
}

/// How [`Mesh::fit_unit`] moved a mesh: fitted = (authored - `centre`) x `scale`.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Fit {
    /// The authored bounding-box centre, moved to the origin.
    pub centre: Vec3,
    /// The uniform scale applied after the move.
    pub scale: f32,
}

impl Fit {
    /// No move, no scale.
    pub const IDENTITY: Fit = Fit {
        centre: Vec3::ZERO,
        scale: 1.0,
    };

    /// The authored position of a fitted one.
    pub fn authored(&self, fitted: Vec3) -> Vec3 {
        fitted / self.scale + self.centre
    }
}

/// A polygon mesh. Invariant after [`Mesh::validate`]: every index is in range, every
/// coordinate finite, every face has at least three corners.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Mesh {
    /// A human-readable name (file name or shape name).
    pub name: String,
    /// Vertex positions, object space.
    pub positions: Vec<Vec3>,
    /// Authored normals (unit length expected), object space; may be empty.
    pub normals: Vec<Vec3>,
    /// Vertex colours, one per position, components 0..1; empty when the file has none.
    /// Linear RGB unless `colors_srgb` (the renderer decodes those before use).
    pub colors: Vec<Vec3>,
    /// `colors` are sRGB-encoded (OBJ and PLY files, by common practice), not linear (glTF).
    pub colors_srgb: bool,
    /// The file's materials (glTF materials), in the file's order; empty when it has none.
    pub materials: Vec<FileMaterial>,
    /// The material of each face, an index into `materials`; empty when `materials` is.
    pub face_material: Vec<u32>,
    /// Face corners, face after face.
    pub corners: Vec<Corner>,
    /// `corners[face_starts[f]..face_starts[f + 1]]` is face `f`; starts with 0.
    pub face_starts: Vec<u32>,
    /// The file's format asks for flat normals where the file gives none (glTF 2.0: "when
    /// normals are not specified, client implementations MUST calculate flat normals").
    pub flat_if_no_normals: bool,
}

/// What is wrong with a mesh.
#[derive(Clone, Debug, PartialEq)]
pub enum MeshError {
    /// No faces (or no positions) at all.
    Empty,
    /// A position or normal has a NaN or infinite coordinate.
    NonFinite {
        /// "position" or "normal".
        what: &'static str,
        /// Its index.
        index: usize,
    },
    /// A face corner names an element that does not exist.
    IndexOutOfRange {
        /// The face.
        face: usize,
        /// The index named.
        index: u32,
        /// How many elements there are.
        len: usize,
    },
    /// Face materials given, but not one valid material per face.
    MaterialIndex,
    /// Vertex colours given, but not one per position.
    ColorCount {
        /// Colours given.
        colors: usize,
        /// Positions.
        positions: usize,
    },
    /// A face with fewer than three corners.
    TooFewCorners {
        /// The face.
        face: usize,
    },
    /// The mesh exceeds a stated limit.
    TooLarge {
        /// What was counted.
        what: &'static str,
        /// The count found.
        count: usize,
        /// The limit.
        limit: usize,
    },
}

impl fmt::Display for MeshError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            MeshError::Empty => write!(f, "the mesh has no faces"),
            MeshError::NonFinite { what, index } => {
                write!(f, "{what} {index} has a NaN or infinite coordinate")
            }
            MeshError::IndexOutOfRange { face, index, len } => write!(
                f,
                "face {face} refers to element {index}, but there are only {len}"
            ),
            MeshError::TooFewCorners { face } => write!(f, "face {face} has fewer than 3 corners"),
            MeshError::MaterialIndex => {
                f.write_str("the faces' materials do not match the mesh's material list")
            }
            MeshError::ColorCount { colors, positions } => write!(
                f,
                "the mesh has {colors} vertex colours for {positions} vertices"
            ),
            MeshError::TooLarge { what, count, limit } => {
                write!(f, "the mesh has {count} {what}; the limit is {limit}")
            }
        }
    }
}

impl std::error::Error for MeshError {}

/// The largest mesh twinshade accepts, in triangles after triangulation.
pub const MAX_TRIANGLES: usize = 2_000_000;

impl Mesh {
    /// An empty mesh with a name.
    pub fn new(name: impl Into<String>) -> Self {
        Mesh {
            name: name.into(),
            face_starts: vec![0],
            ..Default::default()
        }
    }

    /// Adds a face from corners; returns its index.
    pub fn push_face(&mut self, corners: &[Corner]) -> usize {
        self.corners.extend_from_slice(corners);
        self.end_face()
    }

    fn end_face(&mut self) -> usize {
        if self.face_starts.is_empty() {
            self.face_starts.push(0);
        }
        self.face_starts.push(self.corners.len() as u32);
        self.face_starts.len() - 2
    }

    /// Adds a face whose corners use the same index for position and normal.
    pub fn push_face_shared(&mut self, indices: &[u32]) -> usize {
        self.corners.extend(indices.iter().map(|&i| Corner {
            position: i,
            normal: i,
        }));
        self.end_face()
    }

    /// Adds a face without normals.
    pub fn push_face_positions(&mut self, indices: &[u32]) -> usize {
        self.corners.extend(indices.iter().map(|&i| Corner {
            position: i,
            normal: NO_NORMAL,
        }));
        self.end_face()
    }

    /// Number of faces.
    pub fn face_count(&self) -> usize {
        self.face_starts.len().saturating_sub(1)
    }

    /// The corners of face `f`.
    ///
    /// # Panics
    /// If `f >= face_count()`.
    pub fn face(&self, f: usize) -> &[Corner] {
        &self.corners[self.face_starts[f] as usize..self.face_starts[f + 1] as usize]
    }

    /// Iterates over the faces' corner lists.
    pub fn faces(&self) -> impl Iterator<Item = &[Corner]> + '_ {
        self.face_starts
            .windows(2)
            .map(move |w| &self.corners[w[0] as usize..w[1] as usize])
    }

    /// Triangles after triangulation (a face of n corners gives n - 2).
    pub fn triangle_count(&self) -> usize {
        self.faces().map(|f| f.len().saturating_sub(2)).sum()
    }

    /// True when every corner names an authored normal.
    pub fn has_normals(&self) -> bool {
        !self.normals.is_empty() && self.corners.iter().all(|c| c.normal != NO_NORMAL)
    }

    /// Checks the invariants stated on [`Mesh`] and the size limit.
    ///
    /// # Errors
    /// The first problem found, naming the element.
    pub fn validate(&self) -> Result<(), MeshError> {
        if self.face_count() == 0 || self.positions.is_empty() {
            return Err(MeshError::Empty);
        }
        let tris = self.triangle_count();
        if tris > MAX_TRIANGLES {
            return Err(MeshError::TooLarge {
                what: "triangles",
                count: tris,
                limit: MAX_TRIANGLES,
            });
        }
        if !self.face_material.is_empty()
            && (self.face_material.len() != self.face_count()
                || self
                    .face_material
                    .iter()
                    .any(|&m| m as usize >= self.materials.len()))
        {
            return Err(MeshError::MaterialIndex);
        }
        if !self.colors.is_empty() && self.colors.len() != self.positions.len() {
            return Err(MeshError::ColorCount {
                colors: self.colors.len(),
                positions: self.positions.len(),
            });
        }
        for (what, list) in [
            ("position", &self.positions),
            ("normal", &self.normals),
            ("colour", &self.colors),
        ] {
            if let Some(index) = list.iter().position(|p| !p.is_finite()) {
                return Err(MeshError::NonFinite { what, index });
            }
        }
        for (face, corners) in self.faces().enumerate() {
            if corners.len() < 3 {
                return Err(MeshError::TooFewCorners { face });
            }
            for c in corners {
                if c.position as usize >= self.positions.len() {
                    return Err(MeshError::IndexOutOfRange {
                        face,
                        index: c.position,
                        len: self.positions.len(),
                    });
                }
                if c.normal != NO_NORMAL && c.normal as usize >= self.normals.len() {
                    return Err(MeshError::IndexOutOfRange {
                        face,
                        index: c.normal,
                        len: self.normals.len(),
                    });
                }
            }
        }
        Ok(())
    }

    /// Axis-aligned bounds of the positions used by faces, or `None` for an empty mesh.
    pub fn bounds(&self) -> Option<(Vec3, Vec3)> {
        let mut it = self.positions.iter();
        let first = *it.next()?;
        Some(it.fold((first, first), |(lo, hi), &p| (lo.min(p), hi.max(p))))
    }

    /// Moves the bounding-box centre to the origin and scales so the farthest vertex is at
    /// distance 1. Normals are unchanged (uniform scale). Returns the fit applied, which maps
    /// the new positions back to the authored ones.
    pub fn fit_unit(&mut self) -> Fit {
        let Some((lo, hi)) = self.bounds() else {
            return Fit::IDENTITY;
        };
        let centre = (lo + hi) * 0.5;
        let r = self
            .positions
            .iter()
            .map(|p| (*p - centre).length())
            .fold(0.0f32, f32::max);
        let scale = if r > 0.0 { 1.0 / r } else { 1.0 };
        for p in &mut self.positions {
            *p = (*p - centre) * scale;
        }
        Fit { centre, scale }
    }

    /// Removes faces whose corners span no area (repeated positions, collinear corners);
    /// returns how many were removed.
    pub fn drop_degenerate_faces(&mut self) -> usize {
        let mut kept = Mesh::new(std::mem::take(&mut self.name));
        let mut dropped = 0;
        for f in 0..self.face_count() {
            let face = self.face(f);
            if polygon_area_vector(&self.positions, face).length_squared() > 0.0 {
                kept.push_face(face);
                if let Some(&m) = self.face_material.get(f) {
                    kept.face_material.push(m);
                }
            } else {
                dropped += 1;
            }
        }
        self.corners = kept.corners;
        self.face_starts = kept.face_starts;
        self.face_material = kept.face_material;
        self.name = kept.name;
        dropped
    }
}

/// Twice the vector area of a polygon (Newell's method): its direction is the face normal
/// (counter-clockwise corners give the outward normal), its length twice the area.
pub fn polygon_area_vector(positions: &[Vec3], face: &[Corner]) -> Vec3 {
    let n = face.len();
    let mut acc = Vec3::ZERO;
    let origin = positions[face[0].position as usize];
    for i in 1..n.saturating_sub(1) {
        let a = positions[face[i].position as usize] - origin;
        let b = positions[face[i + 1].position as usize] - origin;
        acc += a.cross(b);
    }
    acc
}

//! The settings types a scene is made of: where the mesh comes from, normals, panel size,
//! the shading modes and what the difference view compares. Plain data with serde names;
//! ranges are checked by [`crate::scene::definition::Scene::validate`].

use crate::geometry::normals::{Coincident, NormalWeighting};
use crate::geometry::shapes::Shape;
use schemars::JsonSchema;
use serde::{Deserialize, Serialize};

/// Largest panel side in pixels.
pub const MAX_PANEL_SIDE: u32 = 4096;

/// Where the mesh comes from.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub enum MeshSource {
    /// A procedural shape.
    Shape(Shape),
    /// A mesh file supplied separately (dropped on the page or named on the command line);
    /// the scene only names it.
    File {
        /// The file name, for display and links.
        #[schemars(length(min = 1))]
        name: String,
    },
}

/// Whose material a mesh file is lit with.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, Default, JsonSchema)]
#[serde(rename_all = "lowercase")]
pub enum MaterialSource {
    /// The file's own materials where it has any (glTF), one per primitive; the scene's
    /// material otherwise.
    #[default]
    File,
    /// The scene's material for every face.
    Scene,
}

/// Use the mesh's own normals or compute them.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, Default, JsonSchema)]
#[serde(rename_all = "lowercase")]
pub enum NormalSource {
    /// Authored normals where every corner has one; computed otherwise.
    #[default]
    Authored,
    /// Always computed from the faces.
    Computed,
}

/// How vertex normals are obtained.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
#[serde(default, deny_unknown_fields)]
pub struct NormalSettings {
    /// Authored or computed.
    pub source: NormalSource,
    /// Weights when computing.
    pub weighting: NormalWeighting,
    /// Crease angle in degrees when computing (180 = smooth everything).
    #[schemars(range(min = 0.0, max = 180.0))]
    pub crease_deg: f32,
    /// When computing: corners at the same position under different indices (a mesh split
    /// along seams) are smoothed together (`joined`) or apart (`separate`).
    pub coincident: Coincident,
    /// A glTF file without normals: `flat`, as the glTF 2.0 specification requires of
    /// clients, or `smooth` (computed with the settings above).
    pub gltf_without_normals: GltfNormals,
}

/// What a glTF file without normals is shaded with.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, Default, JsonSchema)]
#[serde(rename_all = "lowercase")]
pub enum GltfNormals {
    /// Flat: one normal per face (glTF 2.0, "Meshes": clients MUST calculate flat normals).
    #[default]
    Flat,
    /// Smooth: computed with the crease angle and weighting (the user's choice).
    Smooth,
}

impl Default for NormalSettings {
    fn default() -> Self {
        NormalSettings {
            source: NormalSource::Authored,
            weighting: NormalWeighting::Angle,
            crease_deg: 180.0,
            coincident: Coincident::Joined,
            gltf_without_normals: GltfNormals::Flat,
        }
    }
}

/// Panel size in pixels (each panel; all panels have the same size).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct PanelSize {
    /// Width in pixels, 1..=[`MAX_PANEL_SIDE`].
    #[schemars(range(min = 1, max = MAX_PANEL_SIDE))]
    pub width: u32,
    /// Height in pixels, 1..=[`MAX_PANEL_SIDE`].
    #[schemars(range(min = 1, max = MAX_PANEL_SIDE))]
    pub height: u32,
}

impl Default for PanelSize {
    fn default() -> Self {
        PanelSize {
            width: 480,
            height: 360,
        }
    }
}

/// Where lighting is computed.
///
/// In JSON: `flat`, `per_vertex`, `per_pixel`, `exact`; `gouraud` and `phong`, the names of
/// earlier builds, are still read.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, Hash, Default, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub enum ShadingMode {
    /// One colour per face.
    Flat,
    /// Per vertex (Gouraud shading): lit at the vertices, colours interpolated.
    #[serde(alias = "gouraud")]
    PerVertex,
    /// Per pixel (Phong shading): normals interpolated, lit at every pixel.
    #[default]
    #[serde(alias = "phong")]
    PerPixel,
    /// Per pixel with the analytic surface's true normal (the reference).
    Exact,
}

impl ShadingMode {
    /// Every mode, in the order above.
    pub const ALL: [ShadingMode; 4] = [
        ShadingMode::Flat,
        ShadingMode::PerVertex,
        ShadingMode::PerPixel,
        ShadingMode::Exact,
    ];

    /// A label for the panel.
    pub fn label(self) -> &'static str {
        match self {
            ShadingMode::Flat => "Flat (per face)",
            ShadingMode::PerVertex => "Per-vertex (Gouraud)",
            ShadingMode::PerPixel => "Per-pixel (Phong)",
            ShadingMode::Exact => "Exact surface (reference)",
        }
    }

    /// The name in JSON, CSV and file names: `flat`, `per_vertex`, `per_pixel`, `exact`.
    pub fn id(self) -> &'static str {
        match self {
            ShadingMode::Flat => "flat",
            ShadingMode::PerVertex => "per_vertex",
            ShadingMode::PerPixel => "per_pixel",
            ShadingMode::Exact => "exact",
        }
    }

    /// A short name for running text: "flat", "per-vertex", "per-pixel", "exact".
    pub fn short(self) -> &'static str {
        match self {
            ShadingMode::Flat => "flat",
            ShadingMode::PerVertex => "per-vertex",
            ShadingMode::PerPixel => "per-pixel",
            ShadingMode::Exact => "exact",
        }
    }
}

/// Settings of the difference view, shared by the page and the command line.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
#[serde(default, deny_unknown_fields)]
pub struct DifferenceSettings {
    /// The two shadings compared (A, B); any two of per-vertex, per-pixel and exact.
    #[schemars(extend("uniqueItems" = true))]
    pub pair: [ShadingMode; 2],
    /// The "just noticeable" threshold in dE00 (1.0 by common practice).
    #[schemars(range(min = 0.01, max = 100.0))]
    pub threshold: f32,
    /// dE00 at the top of the colour scale.
    #[schemars(range(min = 0.1, max = 200.0))]
    pub scale_max: f32,
}

impl Default for DifferenceSettings {
    fn default() -> Self {
        DifferenceSettings {
            pair: [ShadingMode::PerVertex, ShadingMode::PerPixel],
            threshold: 1.0,
            scale_max: 5.0,
        }
    }
}

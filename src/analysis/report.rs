//! What a frame measured: the comparison's metrics, the lighting cost of each path, the
//! panels by name, and the report as CSV.

use crate::analysis::measure::DiffMetrics;
use crate::pipeline::render::FileMaterialCounts;
use crate::scene::settings::ShadingMode;
use crate::shading::lighting::ReflectionModel;
use serde::Serialize;

/// Lighting evaluations per frame of each path: the cost side of the comparison.
#[derive(Clone, Copy, Debug, Default, PartialEq, Serialize)]
pub struct LightingCost {
    /// Per-vertex (Gouraud): one evaluation per render vertex.
    pub per_vertex: u64,
    /// Per-pixel (Phong): one evaluation per shaded pixel.
    pub per_pixel: u64,
    /// Exact reference: one evaluation per shaded pixel (0 when not rendered).
    pub exact: u64,
}

/// What lit the frame: the scene's reflection model, the mesh file's materials in use, and
/// the exposure, so a report says which material its figures are about.
#[derive(Clone, Copy, Debug, Default, PartialEq, Serialize)]
pub struct LitWith {
    /// The scene's reflection model: the page's material's, and that of faces without a file
    /// material.
    pub model: ReflectionModel,
    /// The mesh file's materials lighting it (all 0 when the page's material does).
    pub file_materials: FileMaterialCounts,
    /// Exposure in stops.
    pub exposure_ev: f32,
}

impl LitWith {
    /// In words, e.g. "the file's 2 materials (metallic-roughness); exposure 0 EV" (sheets
    /// and advice put "Lit with" before it).
    pub fn describe(&self) -> String {
        let f = self.file_materials;
        let n = f.blinn_phong + f.metallic_roughness;
        let what = if f.is_empty() {
            format!("the page's material, {}", self.model.label())
        } else {
            let models = match (f.blinn_phong, f.metallic_roughness) {
                (0, _) => "metallic-roughness".to_string(),
                (_, 0) => "Blinn-Phong".to_string(),
                (b, m) => format!("{b} Blinn-Phong, {m} metallic-roughness"),
            };
            format!(
                "the file's {n} material{} ({models})",
                if n == 1 { "" } else { "s" }
            )
        };
        if self.exposure_ev == 0.0 {
            format!("{what}; exposure 0 EV")
        } else {
            format!("{what}; exposure {:+} EV", self.exposure_ev)
        }
    }
}

/// What one frame of the workbench measured.
#[derive(Clone, Copy, Debug, Default, PartialEq, Serialize)]
pub struct FrameReport {
    /// Panel width in pixels.
    pub width: u32,
    /// Panel height in pixels.
    pub height: u32,
    /// Triangles drawn per panel.
    pub triangles: u64,
    /// The pair compared (A, B).
    pub pair: [ShadingMode; 2],
    /// The comparison of A against B.
    pub metrics: DiffMetrics,
    /// Lighting evaluations per path.
    pub lighting: LightingCost,
    /// The renderer revision that drew the panels (see `scene::RENDERER_REVISION`).
    pub renderer_revision: u32,
    /// What lit the frame.
    pub lit_with: LitWith,
}

impl FrameReport {
    /// The report as two CSV lines: a header and the values.
    pub fn to_csv(&self, link: &str) -> String {
        let m = &self.metrics;
        let header =
            "pair_a,pair_b,width,height,triangles,covered_pixels,silhouette_mismatch_pixels,\
de00_mean,de00_p95,de00_max,de76_mean,de76_p95,de76_max,threshold_de00,share_above_threshold,\
peak_luminance_a,peak_luminance_b,peak_ratio,lighting_per_vertex,lighting_per_pixel,\
lighting_exact,renderer_revision,model,file_materials_blinn_phong,\
file_materials_metallic_roughness,exposure_ev,link";
        format!(
            "{header}\n{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{link}\n",
            self.pair[0].id(),
            self.pair[1].id(),
            self.width,
            self.height,
            self.triangles,
            m.covered_pixels,
            m.silhouette_mismatch_pixels,
            m.de00.mean,
            m.de00.p95,
            m.de00.max,
            m.de76.mean,
            m.de76.p95,
            m.de76.max,
            m.threshold_de00,
            m.share_above_threshold,
            m.peak_luminance[0],
            m.peak_luminance[1],
            m.peak_ratio,
            self.lighting.per_vertex,
            self.lighting.per_pixel,
            self.lighting.exact,
            self.renderer_revision,
            self.lit_with.model.id(),
            self.lit_with.file_materials.blinn_phong,
            self.lit_with.file_materials.metallic_roughness,
            self.lit_with.exposure_ev,
        )
    }
}

/// The panel labels of sheets: per-vertex, per-pixel and the difference.
pub fn panel_labels(report: &FrameReport, scale_max: f32) -> [String; 3] {
    [
        ShadingMode::PerVertex.label().to_string(),
        ShadingMode::PerPixel.label().to_string(),
        format!(
            "dE00 {} vs {} (0-{scale_max})",
            report.pair[0].short(),
            report.pair[1].short()
        ),
    ]
}

/// The workbench's panels.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Panel {
    /// Per-vertex lighting (Gouraud).
    PerVertex,
    /// Per-pixel lighting (Phong).
    PerPixel,
    /// Exact-surface reference.
    Exact,
    /// The difference image of the compared pair.
    Difference,
}

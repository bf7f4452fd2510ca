//! The workbench: every panel of one scene and their comparison, as the page and the command
//! line show them.
//!
//! It renders the Gouraud and Phong panels (and the exact-surface reference when the
//! difference view compares against it), compares the selected pair into the difference
//! panel, and reports the metrics with the cost side of the trade (lighting evaluations per
//! path). Buffers live as long as the workbench: a frame allocates nothing once sizes are
//! stable.

use crate::color::parse_hex;
use crate::framebuffer::Framebuffer;
use crate::measure::{pixel_difference, Comparer, DiffMetrics, PixelDifference};
use crate::mesh::Mesh;
use crate::render::{PanelStats, Renderer, ShadingMode};
use crate::scene::{Scene, SceneError};
use serde::Serialize;

/// Lighting evaluations per frame of each path: the cost side of the comparison.
#[derive(Clone, Copy, Debug, Default, PartialEq, Serialize)]
pub struct LightingCost {
    /// Gouraud: one evaluation per render vertex.
    pub gouraud_vertices: u64,
    /// Phong: one evaluation per shaded pixel.
    pub phong_pixels: u64,
    /// Exact reference: one evaluation per shaded pixel (0 when not rendered).
    pub exact_pixels: u64,
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
}

/// Panels and the comparer for one scene at a time.
#[derive(Default)]
pub struct Workbench {
    renderer: Renderer,
    gouraud: Framebuffer,
    phong: Framebuffer,
    exact: Framebuffer,
    difference: Framebuffer,
    comparer: Comparer,
    stats: [PanelStats; 3],
    report: FrameReport,
}

impl Workbench {
    /// An empty workbench.
    pub fn new() -> Self {
        Self::default()
    }

    /// Supplies the mesh for scenes whose source is a file (see [`Renderer::set_file_mesh`]).
    pub fn set_file_mesh(&mut self, mesh: Mesh) {
        self.renderer.set_file_mesh(mesh);
    }

    /// Validates `scene` and prepares its geometry (normals, subdivision, polygon split),
    /// without drawing: a scene that cannot be drawn (say, subdivided past the triangle limit)
    /// is refused here, before it replaces a working one.
    ///
    /// # Errors
    /// As [`Workbench::render`].
    pub fn prepare(&mut self, scene: &Scene) -> Result<(), SceneError> {
        scene.validate()?;
        self.renderer.prepare_geometry(scene)
    }

    /// Renders every panel the scene needs and compares the selected pair.
    ///
    /// # Errors
    /// When the scene is invalid or names a mesh file that was not supplied.
    pub fn render(&mut self, scene: &Scene) -> Result<&FrameReport, SceneError> {
        self.render_panels(scene)?;
        self.compare_only(scene)
    }

    /// Compares the panels already rendered for `scene` (by [`Workbench::render_panels`] or
    /// [`Workbench::render`] of a scene with the same panels, see [`Scene::same_panels`])
    /// under `scene`'s difference settings, rendering the exact reference if they name it:
    /// what a change of threshold, scale or pair, or the settle frame after a drag, needs.
    ///
    /// # Errors
    /// As [`Workbench::render`].
    pub fn compare_only(&mut self, scene: &Scene) -> Result<&FrameReport, SceneError> {
        let pair = scene.difference.pair;
        self.stats[2] = if pair.contains(&ShadingMode::Exact) {
            self.renderer
                .render(scene, ShadingMode::Exact, &mut self.exact)?
        } else {
            PanelStats::default()
        };
        let (w, h) = (self.gouraud.width(), self.gouraud.height());
        self.difference.resize(w, h);
        let bg = parse_hex(&scene.background).map_err(SceneError)?;
        let Workbench {
            gouraud,
            phong,
            exact,
            difference,
            comparer,
            ..
        } = self;
        let pick = |mode: ShadingMode| match mode {
            ShadingMode::Gouraud => Some(&*gouraud),
            ShadingMode::Phong => Some(&*phong),
            ShadingMode::Exact => Some(&*exact),
            ShadingMode::Flat => None,
        };
        let (Some(fa), Some(fb)) = (pick(pair[0]), pick(pair[1])) else {
            return Err(SceneError(
                "the difference view compares two of gouraud, phong and exact".into(),
            ));
        };
        let cover_a = |i: usize| fa.covered(i);
        let cover_b = |i: usize| fb.covered(i);
        let metrics = comparer.compare(
            fa.bytes(),
            fb.bytes(),
            Some(&cover_a),
            Some(&cover_b),
            scene.difference,
            bg,
            difference.bytes_mut(),
        );
        self.report = FrameReport {
            width: w as u32,
            height: h as u32,
            triangles: self.stats[1].triangles,
            pair,
            metrics,
            lighting: LightingCost {
                gouraud_vertices: self.stats[0].lit_vertices,
                phong_pixels: self.stats[1].fragments,
                exact_pixels: self.stats[2].fragments,
            },
        };
        Ok(&self.report)
    }

    /// Renders only the Gouraud and Phong panels (no exact reference, no comparison): the
    /// benchmark's unit of work. Returns (Gouraud, Phong) statistics.
    ///
    /// # Errors
    /// As [`Workbench::render`].
    pub fn render_panels(&mut self, scene: &Scene) -> Result<[PanelStats; 2], SceneError> {
        let [g, p] = self
            .renderer
            .render_pair(scene, &mut self.gouraud, &mut self.phong)?;
        self.stats[0] = g;
        self.stats[1] = p;
        Ok([g, p])
    }

    /// Probe points spread over the scene's mesh (see [`Renderer::surface_points`]).
    ///
    /// # Errors
    /// As [`Workbench::render`].
    pub fn surface_points(
        &mut self,
        scene: &Scene,
        max: usize,
    ) -> Result<Vec<crate::surface::SurfacePoint>, SceneError> {
        self.renderer.surface_points(scene, max)
    }

    /// Gouraud and Phong luminance at each probe in the last frame, which must be of `scene`
    /// (see [`Renderer::sample_surface`]).
    ///
    /// # Errors
    /// As [`Workbench::render`].
    pub fn sample_surface(
        &mut self,
        scene: &Scene,
        points: &[crate::surface::SurfacePoint],
        out: &mut Vec<[f32; 2]>,
    ) -> Result<(), SceneError> {
        self.renderer
            .sample_surface(scene, self.phong.depth(), points, out)
    }

    fn panel_of(&self, mode: ShadingMode) -> Option<usize> {
        match mode {
            ShadingMode::Gouraud => Some(0),
            ShadingMode::Phong => Some(1),
            ShadingMode::Exact => Some(2),
            ShadingMode::Flat => None,
        }
    }

    fn panel(&self, i: usize) -> &Framebuffer {
        match i {
            0 => &self.gouraud,
            1 => &self.phong,
            _ => &self.exact,
        }
    }

    /// The last frame's report.
    pub fn report(&self) -> &FrameReport {
        &self.report
    }

    /// A rendered panel: Gouraud, Phong, exact (if rendered), or the difference image.
    pub fn framebuffer(&self, which: Panel) -> &Framebuffer {
        match which {
            Panel::Gouraud => &self.gouraud,
            Panel::Phong => &self.phong,
            Panel::Exact => &self.exact,
            Panel::Difference => &self.difference,
        }
    }

    /// The colours of pixel (x, y) in the compared pair and their difference, or `None`
    /// outside the panel.
    pub fn probe(&self, pair: [ShadingMode; 2], x: usize, y: usize) -> Option<PixelDifference> {
        let (w, h) = (self.gouraud.width(), self.gouraud.height());
        if x >= w || y >= h {
            return None;
        }
        let a = self.panel(self.panel_of(pair[0])?).rgba(x, y);
        let b = self.panel(self.panel_of(pair[1])?).rgba(x, y);
        Some(pixel_difference([a[0], a[1], a[2]], [b[0], b[1], b[2]]))
    }
}

impl FrameReport {
    /// The report as two CSV lines: a header and the values.
    pub fn to_csv(&self, link: &str) -> String {
        let m = &self.metrics;
        let header =
            "pair_a,pair_b,width,height,triangles,covered_pixels,silhouette_mismatch_pixels,\
de00_mean,de00_p95,de00_max,de76_mean,de76_p95,de76_max,threshold_de00,share_above_threshold,\
peak_luminance_a,peak_luminance_b,peak_ratio,lighting_gouraud_vertices,lighting_phong_pixels,\
lighting_exact_pixels,link";
        format!(
            "{header}\n{:?},{:?},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{link}\n",
            self.pair[0],
            self.pair[1],
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
            self.lighting.gouraud_vertices,
            self.lighting.phong_pixels,
            self.lighting.exact_pixels,
        )
    }
}

/// The panel labels of sheets: Gouraud, Phong and the difference.
pub fn panel_labels(report: &FrameReport, scale_max: f32) -> [String; 3] {
    [
        ShadingMode::Gouraud.label().to_string(),
        ShadingMode::Phong.label().to_string(),
        format!(
            "dE00 {:?} vs {:?} (0-{scale_max})",
            report.pair[0], report.pair[1]
        ),
    ]
}

impl Workbench {
    /// The report sheet of the last frame of `scene` (see [`crate::sheet::report_sheet`]).
    pub fn report_sheet(&self, scene: &Scene) -> crate::sheet::Image {
        let labels = panel_labels(&self.report, scene.difference.scale_max);
        let panels = [
            (labels[0].as_str(), &self.gouraud),
            (labels[1].as_str(), &self.phong),
            (labels[2].as_str(), &self.difference),
        ];
        crate::sheet::report_sheet(
            &panels,
            &self.report,
            scene.difference.scale_max,
            &crate::share::encode(scene),
        )
    }
}

/// The workbench's panels.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Panel {
    /// Per-vertex lighting.
    Gouraud,
    /// Per-pixel lighting.
    Phong,
    /// Exact-surface reference.
    Exact,
    /// The difference image of the compared pair.
    Difference,
}

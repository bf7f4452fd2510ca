//! The workbench: every panel of one scene and their comparison, as the page and the command
//! line show them.
//!
//! It renders the Gouraud and Phong panels (and the exact-surface reference when the
//! difference view compares against it), compares the selected pair into the difference
//! panel, and reports the metrics with the cost side of the trade (lighting evaluations per
//! path). Buffers live as long as the workbench: a frame allocates nothing once sizes are
//! stable.

use crate::analysis::measure::{pixel_difference, Comparer, PixelDifference};
use crate::analysis::report::{FrameReport, LightingCost, LitWith, Panel};
use crate::geometry::mesh::Mesh;
use crate::pipeline::framebuffer::Framebuffer;
use crate::pipeline::render::{PanelStats, PrepareError, Renderer};
use crate::scene::definition::ValidScene;
use crate::scene::formats::RENDERER_REVISION;
use crate::scene::settings::ShadingMode;

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

    /// The mesh supplied by [`Workbench::set_file_mesh`], if any.
    pub fn file_mesh(&self) -> Option<&Mesh> {
        self.renderer.file_mesh()
    }

    /// Validates `scene` and prepares its geometry (normals, subdivision, polygon split),
    /// without drawing: a scene that cannot be drawn (say, subdivided past the triangle limit)
    /// is refused here, before it replaces a working one.
    ///
    /// # Errors
    /// As [`Workbench::render`].
    pub fn prepare(&mut self, scene: &ValidScene) -> Result<(), PrepareError> {
        self.renderer.prepare(scene)
    }

    /// Renders every panel the scene needs and compares the selected pair.
    ///
    /// # Errors
    /// When the scene is invalid or names a mesh file that was not supplied.
    pub fn render(&mut self, scene: &ValidScene) -> Result<&FrameReport, PrepareError> {
        self.render_panels(scene)?;
        self.compare_only(scene)
    }

    /// Compares the panels already rendered for `scene` (by [`Workbench::render_panels`] or
    /// [`Workbench::render`] of a scene with the same panels, see [`Scene::same_panels`](crate::Scene::same_panels))
    /// under `scene`'s difference settings, rendering the exact reference if they name it:
    /// what a change of threshold, scale or pair, or the settle frame after a drag, needs.
    ///
    /// # Errors
    /// As [`Workbench::render`].
    pub fn compare_only(&mut self, scene: &ValidScene) -> Result<&FrameReport, PrepareError> {
        let pair = scene.difference.pair;
        self.stats[2] = if pair.contains(&ShadingMode::Exact) {
            self.renderer
                .render(scene, ShadingMode::Exact, &mut self.exact)?
        } else {
            PanelStats::default()
        };
        let (w, h) = (self.gouraud.width(), self.gouraud.height());
        self.difference.resize(w, h);
        let bg = scene.background.0;
        let Workbench {
            gouraud,
            phong,
            exact,
            difference,
            comparer,
            ..
        } = self;
        // A valid scene never pairs the flat mode (Scene::validate refuses it).
        let pick = |mode: ShadingMode| match mode {
            ShadingMode::PerVertex | ShadingMode::Flat => &*gouraud,
            ShadingMode::PerPixel => &*phong,
            ShadingMode::Exact => &*exact,
        };
        let (fa, fb) = (pick(pair[0]), pick(pair[1]));
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
            renderer_revision: RENDERER_REVISION,
            lit_with: LitWith {
                model: scene.model,
                file_materials: self.renderer.file_materials_lighting(scene),
                exposure_ev: scene.exposure_ev,
            },
            lighting: LightingCost {
                per_vertex: self.stats[0].lit_vertices,
                per_pixel: self.stats[1].fragments,
                exact: self.stats[2].fragments,
            },
        };
        Ok(&self.report)
    }

    /// Renders only the Gouraud and Phong panels (no exact reference, no comparison): the
    /// benchmark's unit of work. Returns (Gouraud, Phong) statistics.
    ///
    /// # Errors
    /// As [`Workbench::render`].
    pub fn render_panels(&mut self, scene: &ValidScene) -> Result<[PanelStats; 2], PrepareError> {
        let [g, p] = self
            .renderer
            .render_pair(scene, &mut self.gouraud, &mut self.phong)?;
        self.stats[0] = g;
        self.stats[1] = p;
        Ok([g, p])
    }

    /// [`Workbench::render_panels`] for frame rows `rows` only (see
    /// [`Renderer::render_pair_rows`]): the Gouraud and Phong framebuffers then hold just that
    /// band, byte for byte the band of the whole frame. For drawing one frame on several
    /// workers; the comparison needs the whole panels.
    ///
    /// # Errors
    /// As [`Renderer::render_pair_rows`].
    pub fn render_panel_rows(
        &mut self,
        scene: &ValidScene,
        rows: std::ops::Range<u32>,
    ) -> Result<[PanelStats; 2], PrepareError> {
        let [g, p] =
            self.renderer
                .render_pair_rows(scene, rows, &mut self.gouraud, &mut self.phong)?;
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
        scene: &ValidScene,
        max: usize,
    ) -> Result<Vec<crate::pipeline::surface::SurfacePoint>, PrepareError> {
        self.renderer.surface_points(scene, max)
    }

    /// Gouraud and Phong luminance at each probe in the last frame, which must be of `scene`
    /// (see [`Renderer::sample_surface`]).
    ///
    /// # Errors
    /// As [`Workbench::render`].
    pub fn sample_surface(
        &mut self,
        scene: &ValidScene,
        points: &[crate::pipeline::surface::SurfacePoint],
        out: &mut Vec<[f32; 2]>,
    ) -> Result<(), PrepareError> {
        self.renderer
            .sample_surface(scene, self.phong.depth(), points, out)
    }

    fn panel_of(&self, mode: ShadingMode) -> Option<usize> {
        match mode {
            ShadingMode::PerVertex => Some(0),
            ShadingMode::PerPixel => Some(1),
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
            Panel::PerVertex => &self.gouraud,
            Panel::PerPixel => &self.phong,
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

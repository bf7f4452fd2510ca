//! The pipeline: geometry preparation, vertex transform, clipping and one rasterizer for
//! every shading mode.
//!
//! The shading modes differ only in the varyings they hand the rasterizer and the fragment
//! stage that consumes them:
//! - flat: nothing interpolated; one colour per face, lit at the face centroid;
//! - Gouraud: lighting at each render vertex (once), linear colour interpolated, sRGB-encoded
//!   per pixel (H. Gouraud, IEEE Trans. Computers C-20(6), 1971);
//! - Phong: world normal and position interpolated, the normal renormalised and lit per pixel
//!   (B. T. Phong, CACM 18(6), 1975);
//! - exact: the object-space position interpolated and lit with the analytic surface's true
//!   normal (for procedural shapes that have one; others fall back to Phong).
//!
//! Work that does not depend on the panel (vertex transform, outcodes, screen projection) is
//! done once per frame and reused by every panel; buffers are kept between frames, so a frame
//! allocates nothing once sizes are stable.

use crate::geometry::camera::CameraFrame;
use crate::geometry::mesh::{FileMaterial, Mesh, Reflectance};
use crate::geometry::normals::{compute_normals, Coincident};
use crate::geometry::shapes::Shape;
use crate::geometry::vertex_buffer::MAX_CORNERS;
use crate::geometry::vertex_buffer::{PolygonMode, VertexBuffer};
use crate::pipeline::clip::{ClipPolygon, ClipVertex};
use crate::pipeline::framebuffer::Framebuffer;
use crate::pipeline::raster::{
    fill, snap_xy, Batch, Coverage, Cull, FragmentShader, RasterVertex, Target,
};
use crate::pipeline::scanline::fill_polygon;
use crate::pipeline::shaders::{
    Both, BothTinted, Constant, ExactSurface, PerPixel, PerPixelTinted, VertexColor,
};
use crate::pipeline::surface::{surface_points, Probe, SurfacePoint};
use crate::pipeline::vertex_stage::{project, StageKey, VertexStage};
use crate::scene::definition::{Scene, ValidScene};
use crate::scene::settings::{
    GltfNormals, MaterialSource, MeshSource, NormalSettings, NormalSource, ShadingMode,
};
use crate::shading::color::{encode_srgb8, srgb_to_linear, Rgb, SrgbEncoder};
use crate::shading::lanes::{F4, V4};
use crate::shading::lighting::{Finish, Lighting, Material, ReflectionModel};
use glam::{Mat3, Quat, Vec3, Vec4};
use serde::Serialize;

/// Why a scene's mesh could not be prepared for drawing. (The scene itself is valid by type;
/// these depend on the mesh it is combined with.)
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum PrepareError {
    /// The scene names a mesh file that was not supplied (see [`Renderer::set_file_mesh`]).
    MeshNotLoaded {
        /// The file name the scene names.
        name: String,
    },
    /// Subdivision would exceed the triangle limit (the message gives the counts).
    Subdivision(String),
    /// Geometry preparation was skipped (a bug: every drawing call prepares first).
    NotPrepared,
    /// A band of rows that is empty or leaves the panel.
    Rows {
        /// The rows asked for.
        rows: std::ops::Range<u32>,
        /// The panel's height.
        height: u32,
    },
}

impl std::fmt::Display for PrepareError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            PrepareError::MeshNotLoaded { name } => {
                write!(f, "the mesh file '{name}' has not been loaded")
            }
            PrepareError::Subdivision(m) => f.write_str(m),
            PrepareError::NotPrepared => f.write_str("no mesh prepared"),
            PrepareError::Rows { rows, height } => write!(
                f,
                "rows {}..{} are not a band of a panel {height} pixels high",
                rows.start, rows.end
            ),
        }
    }
}

impl std::error::Error for PrepareError {}

/// What one panel's frame cost.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize)]
pub struct PanelStats {
    /// Lighting evaluations at vertices (Gouraud) or faces (flat).
    pub lit_vertices: u64,
    /// Fragments shaded (passed the depth test); for Phong and exact also lighting evaluations.
    pub fragments: u64,
    /// Triangles in the mesh.
    pub triangles: u64,
}

/// The mesh as prepared for drawing, with the settings it was prepared from.
struct Geometry {
    source: MeshSource,
    normals: NormalSettings,
    polygons: PolygonMode,
    subdivision: crate::geometry::subdivide::Subdivision,
    vertex_colors: bool,
    generation: u64,
    vb: VertexBuffer,
    shape: Option<Shape>,
}

/// Renders scenes into framebuffers. Holds the prepared mesh and per-frame scratch buffers.
#[derive(Default)]
pub struct Renderer {
    imported: Option<Mesh>,
    geometry: Option<Geometry>,
    generation: u64,
    stage: VertexStage,
    vertex_color: Vec<Vec3>,
    face_color: Vec<u32>,
    /// This frame's lighting of each file material (empty: the scene's material everywhere).
    lightings: Vec<Lighting>,
    /// Whether each file material is double-sided (drawn without back-face culling).
    double_sided: Vec<bool>,
}

impl Renderer {
    /// A renderer with nothing prepared.
    pub fn new() -> Self {
        Self::default()
    }

    /// Supplies the mesh used when a scene's source is [`MeshSource::File`]. The mesh must
    /// have passed [`Mesh::validate`].
    pub fn set_file_mesh(&mut self, mesh: Mesh) {
        self.imported = Some(mesh);
        self.geometry = None;
    }

    /// The mesh file's materials that light `scene` (by model: Blinn-Phong, from OBJ
    /// libraries, and metallic-roughness), none when the scene's own material does; after
    /// [`Renderer::prepare`] of `scene`.
    pub fn file_materials_lighting(&self, scene: &Scene) -> FileMaterialCounts {
        let mut counts = FileMaterialCounts::default();
        for fm in active_file_materials(&self.geometry, &self.imported, scene) {
            match fm.reflectance {
                Reflectance::Specular { .. } => counts.blinn_phong += 1,
                Reflectance::MetallicRoughness => counts.metallic_roughness += 1,
                Reflectance::Viewer => {}
            }
        }
        counts
    }

    /// The mesh supplied by [`Renderer::set_file_mesh`], if any.
    pub fn file_mesh(&self) -> Option<&Mesh> {
        self.imported.as_ref()
    }

    /// Prepares the mesh of `scene` for drawing (normals, subdivision, polygon split); reused
    /// while those settings stay the same.
    ///
    /// # Errors
    /// When the scene names a mesh file that was not supplied, or subdivision would exceed
    /// the triangle limit.
    pub fn prepare(&mut self, scene: &ValidScene) -> Result<(), PrepareError> {
        self.prepare_geometry(scene)
    }

    fn prepare_geometry(&mut self, scene: &Scene) -> Result<(), PrepareError> {
        if let Some(g) = &self.geometry {
            if g.source == scene.mesh
                && g.normals == scene.normals
                && g.polygons == scene.polygons
                && g.subdivision == scene.subdivision
                && g.vertex_colors == scene.vertex_colors
            {
                return Ok(());
            }
        }
        let (mesh, shape) = match &scene.mesh {
            MeshSource::Shape(shape) => (shape.build(), Some(*shape)),
            MeshSource::File { name } => match &self.imported {
                Some(m) => (m.clone(), None),
                None => return Err(PrepareError::MeshNotLoaded { name: name.clone() }),
            },
        };
        let ns = &scene.normals;
        let mesh = if ns.source == NormalSource::Computed {
            compute_normals(&mesh, ns.weighting, ns.crease_deg, ns.coincident)
        } else if mesh.has_normals() {
            mesh
        } else if mesh.flat_if_no_normals && ns.gltf_without_normals == GltfNormals::Flat {
            // One normal per face: a crease angle of 0 smooths only coplanar faces.
            compute_normals(&mesh, ns.weighting, 0.0, Coincident::Separate)
        } else {
            compute_normals(&mesh, ns.weighting, ns.crease_deg, ns.coincident)
        };
        // Vertex colours in linear light (or none), before subdivision interpolates them.
        let mut mesh = mesh;
        if !scene.vertex_colors {
            mesh.colors.clear();
        } else if mesh.colors_srgb {
            for c in &mut mesh.colors {
                *c = Vec3::from(c.to_array().map(srgb_to_linear));
            }
            mesh.colors_srgb = false;
        }
        let sub = scene.subdivision;
        let mesh = if sub.levels > 0 {
            crate::geometry::subdivide::subdivide(&mesh, sub.method, sub.levels)
                .map_err(PrepareError::Subdivision)?
        } else {
            mesh
        };
        let vb = VertexBuffer::build(&mesh, scene.polygons);
        self.generation += 1;
        self.geometry = Some(Geometry {
            source: scene.mesh.clone(),
            normals: scene.normals,
            polygons: scene.polygons,
            subdivision: scene.subdivision,
            vertex_colors: scene.vertex_colors,
            generation: self.generation,
            vb,
            shape,
        });
        Ok(())
    }

    /// Validates the scene, prepares geometry and the per-frame vertex work, and sizes and
    /// clears the framebuffers.
    fn begin(
        &mut self,
        scene: &ValidScene,
        fbs: &mut [&mut Framebuffer],
    ) -> Result<Frame, PrepareError> {
        let rows = 0..scene.panel.height as usize;
        self.begin_rows(scene, fbs, rows)
    }

    /// [`Renderer::begin`] for the frame rows `rows` only: the framebuffers are sized to
    /// hold just those rows (`rows` must lie within the panel).
    fn begin_rows(
        &mut self,
        scene: &ValidScene,
        fbs: &mut [&mut Framebuffer],
        rows: std::ops::Range<usize>,
    ) -> Result<Frame, PrepareError> {
        self.prepare_geometry(scene)?;
        let (width, height) = (scene.panel.width as usize, scene.panel.height as usize);
        let bg = scene.background.0;
        for fb in fbs.iter_mut() {
            if fb.width() != width || fb.height() != rows.len() {
                fb.resize(width, rows.len());
            }
            fb.clear(u32::from_le_bytes([bg[0], bg[1], bg[2], 255]));
        }
        let camera = scene.camera.frame(width as f32 / height as f32);
        let rotation = scene.rotation_quat();
        if let Some(geo) = &self.geometry {
            self.stage.run(
                &geo.vb,
                StageKey {
                    generation: geo.generation,
                    rotation: scene.rotation,
                    camera: scene.camera,
                    width,
                    height,
                },
                &camera,
                rotation,
            );
        }
        // Exposure scales every light alike (2^EV, exact for whole stops).
        let exposure = libm::exp2f(scene.exposure_ev);
        let lighting = Lighting::new(
            &scene.lights,
            scene.ambient_light,
            &scene.material,
            scene.model,
            &camera,
        )
        .exposed(exposure);
        self.lightings.clear();
        self.double_sided.clear();
        let file_materials = active_file_materials(&self.geometry, &self.imported, scene);
        for fm in file_materials {
            let (material, model) = file_material(fm, &scene.material, scene.model);
            let lit = Lighting::new(
                &scene.lights,
                scene.ambient_light,
                &material,
                model,
                &camera,
            )
            .exposed(exposure);
            self.lightings.push(match fm.reflectance {
                Reflectance::Specular { color, .. } => lit.with_specular_color(color),
                _ => lit,
            });
            self.double_sided.push(fm.double_sided);
        }
        Ok(Frame {
            camera,
            rotation,
            lighting,
            width,
            height,
            cull: if scene.cull_back_faces {
                Cull::Back
            } else {
                Cull::None
            },
            persp: scene.perspective_correct,
        })
    }

    /// Lights every render vertex (Gouraud's per-vertex evaluation), once per frame.
    fn light_vertices(&mut self, lighting: &Lighting) {
        self.vertex_color.clear();
        let (n, p) = (self.stage.world_nrm(), self.stage.world_pos());
        let Some(vb) = self.geometry.as_ref().map(|g| &g.vb) else {
            return;
        };
        // Each render vertex with its file material's lighting, or the scene's.
        let lightings = &self.lightings;
        let of = |i: usize| match vb.vertex_material.get(i) {
            Some(&m) if !lightings.is_empty() => &lightings[m as usize],
            _ => lighting,
        };
        // Four vertices at a time where they share a lighting (shade4 gives exactly what
        // four shade calls give), one at a time otherwise and for the last few.
        let tints = &vb.colors;
        let out = &mut self.vertex_color;
        let lanes = |v: &[Vec3]| V4 {
            x: F4::new([v[0].x, v[1].x, v[2].x, v[3].x]),
            y: F4::new([v[0].y, v[1].y, v[2].y, v[3].y]),
            z: F4::new([v[0].z, v[1].z, v[2].z, v[3].z]),
        };
        let one = |i: usize| {
            if tints.is_empty() {
                of(i).shade(n[i], p[i])
            } else {
                of(i).shade_tinted(n[i], p[i], tints[i])
            }
        };
        let count = n.len();
        let mut i = 0;
        while i + 4 <= count {
            let l = of(i);
            if (1..4).all(|k| std::ptr::eq(of(i + k), l)) {
                let (nv, pv) = (lanes(&n[i..i + 4]), lanes(&p[i..i + 4]));
                let c = if tints.is_empty() {
                    l.shade4(nv, pv)
                } else {
                    l.shade4_tinted(nv, pv, lanes(&tints[i..i + 4]))
                };
                let (x, y, z) = (c.x.to_array(), c.y.to_array(), c.z.to_array());
                out.extend((0..4).map(|k| Vec3::new(x[k], y[k], z[k])));
            } else {
                out.extend((i..i + 4).map(one));
            }
            i += 4;
        }
        out.extend((i..count).map(one));
    }

    /// Renders the Gouraud and Phong panels in one pass: coverage, depth and interpolation
    /// are shared, and each fragment gets both its per-vertex and its per-pixel colour. The
    /// bytes are those of two [`Renderer::render`] calls (the same coverage, depth order and
    /// interpolation formulas); the Phong framebuffer receives a copy of the depth buffer.
    ///
    /// # Errors
    /// As [`Renderer::render`].
    pub fn render_pair(
        &mut self,
        scene: &ValidScene,
        gouraud: &mut Framebuffer,
        phong: &mut Framebuffer,
    ) -> Result<[PanelStats; 2], PrepareError> {
        let rows = 0..scene.panel.height;
        self.render_pair_rows(scene, rows, gouraud, phong)
    }

    /// [`Renderer::render_pair`] for a horizontal band of the panels: frame rows `rows`
    /// only, into framebuffers of the panel's width and `rows.len()` rows. The bands of a
    /// frame put together are [`Renderer::render_pair`]'s framebuffers byte for byte
    /// (coverage, depth and interpolation are the whole frame's), so bands can be drawn by
    /// separate renderers, on separate threads or workers. Fragments count this band's only.
    ///
    /// # Errors
    /// As [`Renderer::render`], and [`PrepareError::Rows`] when `rows` is empty or leaves the
    /// panel.
    pub fn render_pair_rows(
        &mut self,
        scene: &ValidScene,
        rows: std::ops::Range<u32>,
        gouraud: &mut Framebuffer,
        phong: &mut Framebuffer,
    ) -> Result<[PanelStats; 2], PrepareError> {
        if rows.is_empty() || rows.end > scene.panel.height {
            return Err(PrepareError::Rows {
                rows,
                height: scene.panel.height,
            });
        }
        let rows = rows.start as usize..rows.end as usize;
        let f = self.begin_rows(scene, &mut [&mut *gouraud, &mut *phong], rows.clone())?;
        self.light_vertices(&f.lighting);
        let Some(geo) = self.geometry.as_ref() else {
            return Err(PrepareError::NotPrepared);
        };
        let ctx = DrawContext::new(&geo.vb, &self.stage, (f.width, f.height), f.cull)
            .with_materials(&self.double_sided);
        let pick = picker(&geo.vb, &self.lightings, &f.lighting);
        let (color2, _) = phong.planes_mut();
        let (color, depth) = gouraud.planes_mut();
        let mut target = Target {
            color,
            color2,
            depth,
            width: f.width,
            height: f.height,
            rows,
        };
        let (c, n, p) = (
            &self.vertex_color,
            self.stage.world_nrm(),
            self.stage.world_pos(),
        );
        let tints = &geo.vb.colors;
        let fragments = if tints.is_empty() {
            let enc = SrgbEncoder::new();
            ctx.draw(
                &mut target,
                f.persp,
                |v| {
                    let (c, n, p) = (c[v as usize], n[v as usize], p[v as usize]);
                    [c.x, c.y, c.z, n.x, n.y, n.z, p.x, p.y, p.z]
                },
                |face| Both {
                    phong: PerPixel {
                        lighting: pick(face),
                        enc,
                    },
                },
            )
        } else {
            let enc = SrgbEncoder::new();
            ctx.draw(
                &mut target,
                f.persp,
                |v| {
                    let i = v as usize;
                    let (c, n, p, t) = (c[i], n[i], p[i], tints[i]);
                    [c.x, c.y, c.z, n.x, n.y, n.z, p.x, p.y, p.z, t.x, t.y, t.z]
                },
                |face| BothTinted {
                    phong: PerPixelTinted {
                        lighting: pick(face),
                        enc,
                    },
                },
            )
        };
        phong.copy_depth_from(gouraud);
        let triangles = geo.vb.triangle_count() as u64;
        Ok([
            PanelStats {
                lit_vertices: self.vertex_color.len() as u64,
                fragments,
                triangles,
            },
            PanelStats {
                lit_vertices: 0,
                fragments,
                triangles,
            },
        ])
    }

    /// Renders `scene` with `mode` into `fb`, resizing it to the scene's panel size.
    ///
    /// # Errors
    /// As [`Renderer::prepare`]: rendering itself cannot fail on a valid scene.
    pub fn render(
        &mut self,
        scene: &ValidScene,
        mode: ShadingMode,
        fb: &mut Framebuffer,
    ) -> Result<PanelStats, PrepareError> {
        let f = self.begin(scene, &mut [&mut *fb])?;
        if mode == ShadingMode::PerVertex {
            self.light_vertices(&f.lighting);
        }
        let Frame {
            camera,
            rotation,
            lighting,
            width,
            height,
            cull,
            persp,
        } = f;
        let Some(geo) = self.geometry.as_ref() else {
            return Err(PrepareError::NotPrepared);
        };
        let enc = SrgbEncoder::new();
        let mut stats = PanelStats {
            triangles: geo.vb.triangle_count() as u64,
            ..Default::default()
        };
        let ctx = DrawContext::new(&geo.vb, &self.stage, (width, height), cull)
            .with_materials(&self.double_sided);
        let pick = picker(&geo.vb, &self.lightings, &lighting);
        let (color, depth) = fb.planes_mut();
        let mut target = Target {
            color,
            color2: &mut [],
            depth,
            width,
            height,
            rows: 0..height,
        };
        let mode =
            if mode == ShadingMode::Exact && !geo.shape.is_some_and(|s| s.has_exact_surface()) {
                ShadingMode::PerPixel
            } else {
                mode
            };
        stats.fragments = match mode {
            ShadingMode::Flat => {
                let vb = &geo.vb;
                self.face_color.clear();
                for f in 0..vb.polygon_count() {
                    let poly = vb.polygon(f);
                    let mut n = Vec3::ZERO;
                    let mut c = Vec3::ZERO;
                    let world = self.stage.world_pos();
                    let p0 = world[poly[0] as usize];
                    for i in 1..poly.len() - 1 {
                        let a = world[poly[i] as usize] - p0;
                        let b = world[poly[i + 1] as usize] - p0;
                        n += a.cross(b);
                    }
                    for &v in poly {
                        c += world[v as usize];
                    }
                    let centre = c / poly.len() as f32;
                    let lighting = pick(f);
                    let col = if vb.colors.is_empty() {
                        lighting.shade(n.normalize_or_zero(), centre)
                    } else {
                        // The face's mean vertex colour.
                        let mut t = Vec3::ZERO;
                        for &v in poly {
                            t += vb.colors[v as usize];
                        }
                        lighting.shade_tinted(n.normalize_or_zero(), centre, t / poly.len() as f32)
                    };
                    self.face_color.push(enc.pack(col.x, col.y, col.z));
                }
                stats.lit_vertices = vb.polygon_count() as u64;
                let faces = &self.face_color;
                ctx.draw(&mut target, persp, |_| [], |f| Constant(faces[f]))
            }
            ShadingMode::PerVertex => {
                stats.lit_vertices = self.vertex_color.len() as u64;
                let colors = &self.vertex_color;
                let shader = VertexColor { enc };
                ctx.draw(
                    &mut target,
                    persp,
                    |v| colors[v as usize].to_array(),
                    |_| shader,
                )
            }
            ShadingMode::PerPixel if !geo.vb.colors.is_empty() => {
                let (n, p, t) = (
                    self.stage.world_nrm(),
                    self.stage.world_pos(),
                    &geo.vb.colors,
                );
                ctx.draw(
                    &mut target,
                    persp,
                    |v| {
                        let i = v as usize;
                        let (n, p, t) = (n[i], p[i], t[i]);
                        [n.x, n.y, n.z, p.x, p.y, p.z, t.x, t.y, t.z]
                    },
                    |face| PerPixelTinted {
                        lighting: pick(face),
                        enc,
                    },
                )
            }
            ShadingMode::PerPixel => {
                let (n, p) = (self.stage.world_nrm(), self.stage.world_pos());
                ctx.draw(
                    &mut target,
                    persp,
                    |v| {
                        let (n, p) = (n[v as usize], p[v as usize]);
                        [n.x, n.y, n.z, p.x, p.y, p.z]
                    },
                    |face| PerPixel {
                        lighting: pick(face),
                        enc,
                    },
                )
            }
            ShadingMode::Exact => {
                let shape = geo.shape.unwrap_or_default();
                let r = Mat3::from_quat(rotation);
                let shader = ExactSurface {
                    lighting: &lighting,
                    enc,
                    shape,
                    rotation: r,
                    inverse: r.transpose(),
                    eye: camera.eye,
                    toward_eye: camera.toward_eye,
                    orthographic: camera.orthographic,
                };
                let pos = &geo.vb.positions;
                ctx.draw(
                    &mut target,
                    persp,
                    |v| pos[v as usize].to_array(),
                    |_| shader,
                )
            }
        };
        Ok(stats)
    }
}

impl Renderer {
    /// Probe points spread over the mesh of `scene` (see [`SurfacePoint`]):
    /// the centroid and the point halfway to the first corner of up to `max / 2` faces, evenly
    /// strided through the face list.
    ///
    /// # Errors
    /// As [`Renderer::render`].
    pub fn surface_points(
        &mut self,
        scene: &ValidScene,
        max: usize,
    ) -> Result<Vec<SurfacePoint>, PrepareError> {
        self.prepare_geometry(scene)?;
        Ok(self
            .geometry
            .as_ref()
            .map_or_else(Vec::new, |g| surface_points(&g.vb, max)))
    }

    /// The relative luminance (linear, before 8-bit encoding; see
    /// [`linear_luminance`](crate::pipeline::surface::linear_luminance)) that per-vertex
    /// (Gouraud) and per-pixel (Phong) lighting give at each probe in the view of `scene`,
    /// into `out` (cleared first); NaN for probes that are off screen, on a culled face,
    /// crossing a clip plane or hidden according to `depth` (the depth buffer of a frame of
    /// this scene, as [`Renderer::render_pair`] leaves it).
    ///
    /// # Errors
    /// As [`Renderer::render`].
    pub fn sample_surface(
        &mut self,
        scene: &ValidScene,
        depth: &[f32],
        points: &[SurfacePoint],
        out: &mut Vec<[f32; 2]>,
    ) -> Result<(), PrepareError> {
        let f = self.begin(scene, &mut [])?;
        let Some(geo) = self.geometry.as_ref() else {
            return Err(PrepareError::NotPrepared);
        };
        let probe = Probe {
            stage: &self.stage,
            lighting: &f.lighting,
            lightings: &self.lightings,
            rotation: Mat3::from_quat(f.rotation),
            view_proj: f.camera.view_proj,
            size: (f.width, f.height),
            persp: f.persp,
            cull: f.cull == Cull::Back,
            depth,
        };
        probe.sample_all(&geo.vb, points, out);
        Ok(())
    }
}

/// Per-frame inputs shared by every triangle of a panel.
struct DrawContext<'a> {
    vb: &'a VertexBuffer,
    clip: &'a [Vec4],
    outcodes: &'a [u8],
    screen: &'a [[f32; 4]],
    fixed: &'a [[i64; 2]],
    size: (f32, f32),
    cull: Cull,
    /// Per file material: double-sided (never culled). Empty without file materials.
    double_sided: &'a [bool],
}

impl<'a> DrawContext<'a> {
    /// The context of a `size` (width, height) panel drawn from `vb` and this frame's
    /// vertex stage.
    fn new(vb: &'a VertexBuffer, stage: &'a VertexStage, size: (usize, usize), cull: Cull) -> Self {
        DrawContext {
            vb,
            clip: stage.clip(),
            outcodes: stage.outcodes(),
            screen: stage.screen(),
            fixed: stage.fixed(),
            size: (size.0 as f32, size.1 as f32),
            cull,
            double_sided: &[],
        }
    }

    /// The same context with the file materials' sidedness (see [`FileMaterial`]).
    fn with_materials(mut self, double_sided: &'a [bool]) -> Self {
        self.double_sided = double_sided;
        self
    }

    /// The culling of authored face `face`: none for a double-sided material's faces.
    #[inline(always)]
    fn cull_for(&self, face: usize) -> Cull {
        match self.vb.face_material.get(face) {
            Some(&m) if self.double_sided.get(m as usize) == Some(&true) => Cull::None,
            _ => self.cull,
        }
    }

    /// The file material of authored face `face` (0 without file materials).
    #[inline(always)]
    fn material_of(&self, face: usize) -> u32 {
        self.vb.face_material.get(face).copied().unwrap_or(0)
    }

    /// Draws every triangle and scanline polygon with varyings from `varying(vertex)` and the
    /// fragment stage `shader_for(face)`; returns fragments shaded.
    fn draw<const N: usize, S: FragmentShader<N>>(
        &self,
        target: &mut Target<'_>,
        perspective: bool,
        varying: impl Fn(u32) -> [f32; N],
        shader_for: impl Fn(usize) -> S,
    ) -> u64 {
        if perspective {
            self.draw_with::<N, true, S>(target, &varying, shader_for)
        } else {
            self.draw_with::<N, false, S>(target, &varying, shader_for)
        }
    }

    fn draw_with<const N: usize, const PERSP: bool, S: FragmentShader<N>>(
        &self,
        target: &mut Target<'_>,
        varying: &impl Fn(u32) -> [f32; N],
        shader_for: impl Fn(usize) -> S,
    ) -> u64 {
        let mut shaded = 0u64;
        let mut batch = Batch::default();
        let mut last_shader = None;
        let vb = self.vb;
        // Fragments waiting in the batch are shaded by their own face's shader: when the
        // material changes, the batch is emptied with the previous one first.
        let mut last_material = 0;
        for (tri, &face) in vb.triangles.iter().zip(&vb.triangle_face) {
            let face = face as usize;
            let material = self.material_of(face);
            if material != last_material {
                if let Some(previous) = &last_shader {
                    batch.flush(target, previous);
                }
                last_material = material;
            }
            let shader = shader_for(face);
            shaded += u64::from(self.triangle::<N, PERSP, S>(
                target,
                *tri,
                varying,
                &shader,
                &mut batch,
                self.cull_for(face),
            ));
            last_shader = Some(shader);
        }
        let mut rv = [RasterVertex::ZERO; MAX_CORNERS];
        for &face in &vb.scanline_faces {
            let poly = vb.polygon(face as usize);
            let material = self.material_of(face as usize);
            if material != last_material {
                if let Some(previous) = &last_shader {
                    batch.flush(target, previous);
                }
                last_material = material;
            }
            let cull = self.cull_for(face as usize);
            let shader = shader_for(face as usize);
            if poly.iter().all(|&v| self.outcodes[v as usize] == 0) {
                for (out, &v) in rv.iter_mut().zip(poly) {
                    *out = self.raster_vertex::<N, PERSP>(v, varying);
                }
                shaded += u64::from(fill_polygon::<N, PERSP, S>(
                    target,
                    &rv[..poly.len()],
                    cull,
                    &shader,
                    &mut batch,
                ));
            } else {
                // Crossing a clip plane: drawn as authored (a fan), clipped per triangle.
                for i in 1..poly.len() - 1 {
                    let tri = [poly[0], poly[i], poly[i + 1]];
                    shaded +=
                        u64::from(self.triangle::<N, PERSP, S>(
                            target, tri, varying, &shader, &mut batch, cull,
                        ));
                }
            }
            last_shader = Some(shader);
        }
        if let Some(shader) = last_shader {
            batch.flush(target, &shader);
        }
        shaded
    }

    /// A vertex inside the clip volume, projected, its varyings times 1/w in perspective mode.
    #[inline(always)]
    fn raster_vertex<const N: usize, const PERSP: bool>(
        &self,
        v: u32,
        varying: &impl Fn(u32) -> [f32; N],
    ) -> RasterVertex<N> {
        let s = self.screen[v as usize];
        let mut var = varying(v);
        if PERSP {
            for x in &mut var {
                *x *= s[3];
            }
        }
        RasterVertex {
            x: s[0],
            y: s[1],
            z: s[2],
            inv_w: s[3],
            var,
        }
    }

    /// Draws one triangle of render vertices, clipping it when it crosses a clip plane.
    #[inline(always)]
    fn triangle<const N: usize, const PERSP: bool, S: FragmentShader<N>>(
        &self,
        target: &mut Target<'_>,
        tri: [u32; 3],
        varying: &impl Fn(u32) -> [f32; N],
        shader: &S,
        batch: &mut Batch<N>,
        cull: Cull,
    ) -> u32 {
        let codes = tri.map(|v| self.outcodes[v as usize]);
        if codes[0] & codes[1] & codes[2] != 0 {
            return 0; // entirely outside one plane
        }
        if codes[0] | codes[1] | codes[2] == 0 {
            // Coverage first: culled or pixel-less triangles never fetch varyings.
            let Some(cov) = Coverage::new(
                tri.map(|v| self.fixed[v as usize]),
                cull,
                target.width,
                target.rows.clone(),
            ) else {
                return 0;
            };
            let rv = tri.map(|v| self.raster_vertex::<N, PERSP>(v, varying));
            return fill::<N, PERSP, S>(target, &cov, [&rv[0], &rv[1], &rv[2]], shader, batch);
        }
        let (w, h) = self.size;
        let poly = ClipPolygon::clip(tri.map(|v| ClipVertex {
            pos: self.clip[v as usize],
            var: varying(v),
        }));
        if poly.len < 3 {
            return 0;
        }
        let mut rv = [RasterVertex::ZERO; crate::pipeline::clip::MAX_CLIPPED];
        for (out, c) in rv.iter_mut().zip(&poly.verts[..poly.len]) {
            let s = project(c.pos, w, h);
            let mut var = c.var;
            if PERSP {
                for x in &mut var {
                    *x *= s[3];
                }
            }
            *out = RasterVertex {
                x: s[0],
                y: s[1],
                z: s[2],
                inv_w: s[3],
                var,
            };
        }
        let mut shaded = 0;
        for i in 1..poly.len - 1 {
            let tri = [&rv[0], &rv[i], &rv[i + 1]];
            let p = tri.map(|v| snap_xy(v.x, v.y));
            if let Some(cov) = Coverage::new(p, cull, target.width, target.rows.clone()) {
                shaded += fill::<N, PERSP, S>(target, &cov, tri, shader, batch);
            }
        }
        shaded
    }
}

/// The per-frame set-up shared by every panel.
struct Frame {
    camera: CameraFrame,
    rotation: Quat,
    lighting: Lighting,
    width: usize,
    height: usize,
    cull: Cull,
    persp: bool,
}

/// How many of a mesh file's materials light a scene, by the model each is lit with.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize)]
pub struct FileMaterialCounts {
    /// Blinn-Phong materials (an OBJ library's `Kd`/`Ks`/`Ns`).
    pub blinn_phong: u32,
    /// Metallic-roughness materials (glTF, or an OBJ library's `Pr`/`Pm`).
    pub metallic_roughness: u32,
}

impl FileMaterialCounts {
    /// No file material lights the scene.
    pub fn is_empty(&self) -> bool {
        self.blinn_phong + self.metallic_roughness == 0
    }
}

/// The mesh file's materials when they light `scene`: its source is a file, it asks for the
/// file's materials, and the prepared file has some.
fn active_file_materials<'a>(
    geometry: &Option<Geometry>,
    imported: &'a Option<Mesh>,
    scene: &Scene,
) -> &'a [FileMaterial] {
    match (geometry, imported) {
        (Some(g), Some(m))
            if scene.material_source == MaterialSource::File
                && !g.vb.face_material.is_empty()
                && matches!(scene.mesh, MeshSource::File { .. }) =>
        {
            m.materials.as_slice()
        }
        _ => &[],
    }
}

/// A file's material as the scene's material type and the model that lights it (colours
/// rounded to the nearest 8-bit sRGB code, as the page's own colours are; the scene's ambient
/// reflectance). A glTF material (or an OBJ material with roughness or metalness) is
/// metallic-roughness; an OBJ material's diffuse colour, highlight and exponent are a
/// Blinn-Phong material whose specular colour [`Lighting::with_specular_color`] sets; a face
/// without a material keeps the scene's.
pub fn file_material(
    fm: &FileMaterial,
    scene: &Material,
    scene_model: ReflectionModel,
) -> (Material, ReflectionModel) {
    let srgb = |c: Vec3| Rgb(c.to_array().map(|v| encode_srgb8(v.clamp(0.0, 1.0))));
    let own = Material {
        base_color: srgb(fm.base_color),
        emissive: srgb(fm.emissive),
        emissive_strength: 1.0,
        ..scene.clone()
    };
    match fm.reflectance {
        Reflectance::MetallicRoughness => (
            Material {
                metallic: fm.metallic.clamp(0.0, 1.0),
                roughness: fm.roughness.clamp(0.0, 1.0),
                ..own
            },
            ReflectionModel::MetallicRoughness,
        ),
        Reflectance::Specular { color, exponent } => (
            Material {
                diffuse: 1.0,
                specular: color.max_element().clamp(0.0, 1.0),
                shininess: exponent.clamp(1.0, 2048.0),
                finish: Finish::Dielectric,
                ..own
            },
            ReflectionModel::BlinnPhong,
        ),
        Reflectance::Viewer => (scene.clone(), scene_model),
    }
}

/// The lighting of each authored face: its file material's, or `scene`'s.
fn picker<'a>(
    vb: &'a VertexBuffer,
    lightings: &'a [Lighting],
    scene: &'a Lighting,
) -> impl Fn(usize) -> &'a Lighting + Copy + 'a {
    move |face| match vb.face_material.get(face) {
        Some(&m) if !lightings.is_empty() => &lightings[m as usize],
        _ => scene,
    }
}

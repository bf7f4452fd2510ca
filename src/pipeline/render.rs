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
use crate::geometry::mesh::Mesh;
use crate::geometry::normals::compute_normals;
use crate::geometry::shapes::Shape;
use crate::geometry::vertex_buffer::{PolygonMode, VertexBuffer};
use crate::pipeline::clip::{outcode, ClipPolygon, ClipVertex};
use crate::pipeline::framebuffer::Framebuffer;
use crate::pipeline::raster::{
    fill, snap_xy, Batch, Coverage, Cull, FragmentShader, RasterVertex, Target,
};
use crate::pipeline::scanline::{fill_polygon, MAX_CORNERS};
use crate::scene::definition::{Scene, SceneError};
use crate::scene::settings::{MeshSource, NormalSettings, NormalSource, ShadingMode};
use crate::shading::color::{parse_hex, SrgbEncoder};
use crate::shading::lanes::{F4, V4};
use crate::shading::lighting::Lighting;
use glam::{Mat3, Quat, Vec3, Vec4};
use serde::Serialize;

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
pub(crate) struct Geometry {
    source: MeshSource,
    normals: NormalSettings,
    polygons: PolygonMode,
    subdivision: crate::geometry::subdivide::Subdivision,
    generation: u64,
    pub(crate) vb: VertexBuffer,
    shape: Option<Shape>,
}

/// Inputs of the per-frame vertex work; when they repeat, the work is reused.
#[derive(Clone, Copy, PartialEq)]
struct FrameKey {
    generation: u64,
    rotation: [f32; 4],
    camera: crate::geometry::camera::Camera,
    width: usize,
    height: usize,
}

/// Renders scenes into framebuffers. Holds the prepared mesh and per-frame scratch buffers.
#[derive(Default)]
pub struct Renderer {
    imported: Option<Mesh>,
    pub(crate) geometry: Option<Geometry>,
    generation: u64,
    frame_key: Option<FrameKey>,
    pub(crate) world_pos: Vec<Vec3>,
    pub(crate) world_nrm: Vec<Vec3>,
    clip: Vec<Vec4>,
    pub(crate) outcodes: Vec<u8>,
    pub(crate) screen: Vec<[f32; 4]>,
    fixed: Vec<[i64; 2]>,
    vertex_color: Vec<Vec3>,
    face_color: Vec<u32>,
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

    pub(crate) fn prepare_geometry(&mut self, scene: &Scene) -> Result<(), SceneError> {
        if let Some(g) = &self.geometry {
            if g.source == scene.mesh
                && g.normals == scene.normals
                && g.polygons == scene.polygons
                && g.subdivision == scene.subdivision
            {
                return Ok(());
            }
        }
        let (mesh, shape) = match &scene.mesh {
            MeshSource::Shape(shape) => {
                shape.validate().map_err(SceneError)?;
                (shape.build(), Some(*shape))
            }
            MeshSource::File { name } => match &self.imported {
                Some(m) => (m.clone(), None),
                None => {
                    return Err(SceneError(format!(
                        "the mesh file '{name}' has not been loaded"
                    )))
                }
            },
        };
        let mesh = if scene.normals.source == NormalSource::Computed || !mesh.has_normals() {
            compute_normals(&mesh, scene.normals.weighting, scene.normals.crease_deg)
        } else {
            mesh
        };
        let sub = scene.subdivision;
        let mesh = if sub.levels > 0 {
            crate::geometry::subdivide::subdivide(&mesh, sub.method, sub.levels)
                .map_err(SceneError)?
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
            generation: self.generation,
            vb,
            shape,
        });
        Ok(())
    }

    /// Validates the scene, prepares geometry and the per-frame vertex work, and sizes and
    /// clears the framebuffers.
    pub(crate) fn begin(
        &mut self,
        scene: &Scene,
        fbs: &mut [&mut Framebuffer],
    ) -> Result<Frame, SceneError> {
        scene.validate()?;
        self.prepare_geometry(scene)?;
        let (width, height) = (scene.panel.width as usize, scene.panel.height as usize);
        let bg = parse_hex(&scene.background).map_err(SceneError)?;
        for fb in fbs.iter_mut() {
            if fb.width() != width || fb.height() != height {
                fb.resize(width, height);
            }
            fb.clear(u32::from_le_bytes([bg[0], bg[1], bg[2], 255]));
        }
        let camera = scene.camera.frame(width as f32 / height as f32);
        let rotation = scene.rotation_quat();
        self.transform(scene, &camera, rotation, width, height);
        let lighting = Lighting::new(
            &scene.lights,
            &scene.ambient_light,
            &scene.material,
            scene.model,
            &camera,
        )
        .map_err(SceneError)?;
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
        self.vertex_color.extend(
            self.world_nrm
                .iter()
                .zip(&self.world_pos)
                .map(|(n, p)| lighting.shade(*n, *p)),
        );
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
        scene: &Scene,
        gouraud: &mut Framebuffer,
        phong: &mut Framebuffer,
    ) -> Result<[PanelStats; 2], SceneError> {
        let f = self.begin(scene, &mut [&mut *gouraud, &mut *phong])?;
        self.light_vertices(&f.lighting);
        let Some(geo) = self.geometry.as_ref() else {
            return Err(SceneError("no mesh prepared".into()));
        };
        let ctx = DrawContext {
            vb: &geo.vb,
            clip: &self.clip,
            outcodes: &self.outcodes,
            screen: &self.screen,
            fixed: &self.fixed,
            size: (f.width as f32, f.height as f32),
            cull: f.cull,
        };
        let (color2, _) = phong.planes_mut();
        let (color, depth) = gouraud.planes_mut();
        let mut target = Target {
            color,
            color2,
            depth,
            width: f.width,
            height: f.height,
        };
        let shader = Both {
            phong: PerPixel {
                lighting: &f.lighting,
                enc: SrgbEncoder::new(),
            },
        };
        let (c, n, p) = (&self.vertex_color, &self.world_nrm, &self.world_pos);
        let fragments = ctx.draw(
            &mut target,
            f.persp,
            |v| {
                let (c, n, p) = (c[v as usize], n[v as usize], p[v as usize]);
                [c.x, c.y, c.z, n.x, n.y, n.z, p.x, p.y, p.z]
            },
            |_| shader,
        );
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
    /// When the scene is invalid or names a mesh file that was not supplied.
    pub fn render(
        &mut self,
        scene: &Scene,
        mode: ShadingMode,
        fb: &mut Framebuffer,
    ) -> Result<PanelStats, SceneError> {
        let f = self.begin(scene, &mut [&mut *fb])?;
        if mode == ShadingMode::Gouraud {
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
            return Err(SceneError("no mesh prepared".into()));
        };
        let enc = SrgbEncoder::new();
        let mut stats = PanelStats {
            triangles: geo.vb.triangle_count() as u64,
            ..Default::default()
        };
        let ctx = DrawContext {
            vb: &geo.vb,
            clip: &self.clip,
            outcodes: &self.outcodes,
            screen: &self.screen,
            fixed: &self.fixed,
            size: (width as f32, height as f32),
            cull,
        };
        let (color, depth) = fb.planes_mut();
        let mut target = Target {
            color,
            color2: &mut [],
            depth,
            width,
            height,
        };
        let mode =
            if mode == ShadingMode::Exact && !geo.shape.is_some_and(|s| s.has_exact_surface()) {
                ShadingMode::Phong
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
                    let p0 = self.world_pos[poly[0] as usize];
                    for i in 1..poly.len() - 1 {
                        let a = self.world_pos[poly[i] as usize] - p0;
                        let b = self.world_pos[poly[i + 1] as usize] - p0;
                        n += a.cross(b);
                    }
                    for &v in poly {
                        c += self.world_pos[v as usize];
                    }
                    let col = lighting.shade(n.normalize_or_zero(), c / poly.len() as f32);
                    self.face_color.push(enc.pack(col.x, col.y, col.z));
                }
                stats.lit_vertices = vb.polygon_count() as u64;
                let faces = &self.face_color;
                ctx.draw(&mut target, persp, |_| [], |f| Constant(faces[f]))
            }
            ShadingMode::Gouraud => {
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
            ShadingMode::Phong => {
                let (n, p) = (&self.world_nrm, &self.world_pos);
                let shader = PerPixel {
                    lighting: &lighting,
                    enc,
                };
                ctx.draw(
                    &mut target,
                    persp,
                    |v| {
                        let (n, p) = (n[v as usize], p[v as usize]);
                        [n.x, n.y, n.z, p.x, p.y, p.z]
                    },
                    |_| shader,
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

    /// Transforms every render vertex to world and clip space and projects the ones inside
    /// all clip planes to the screen. Skipped when nothing it depends on changed.
    fn transform(
        &mut self,
        scene: &Scene,
        camera: &CameraFrame,
        rotation: Quat,
        width: usize,
        height: usize,
    ) {
        let Some(geo) = self.geometry.as_ref() else {
            return;
        };
        let key = FrameKey {
            generation: geo.generation,
            rotation: scene.rotation,
            camera: scene.camera,
            width,
            height,
        };
        if self.frame_key == Some(key) {
            return;
        }
        let r = Mat3::from_quat(rotation);
        let vb = &geo.vb;
        let (w, h) = (width as f32, height as f32);
        self.world_pos.clear();
        self.world_nrm.clear();
        self.clip.clear();
        self.outcodes.clear();
        self.screen.clear();
        self.fixed.clear();
        for (p, n) in vb.positions.iter().zip(&vb.normals) {
            let pw = r * *p;
            let c = camera.view_proj * pw.extend(1.0);
            let code = outcode(c);
            self.world_pos.push(pw);
            self.world_nrm.push(r * *n);
            self.clip.push(c);
            self.outcodes.push(code);
            let s = if code == 0 {
                project(c, w, h)
            } else {
                [0.0; 4]
            };
            self.screen.push(s);
            self.fixed.push(snap_xy(s[0], s[1]));
        }
        self.frame_key = Some(key);
    }
}

/// Viewport transform of a clip-space point inside the clip volume: (x px, y px down, NDC z,
/// 1/w). Pixel centres are at half-integers.
#[inline(always)]
pub(crate) fn project(c: Vec4, w: f32, h: f32) -> [f32; 4] {
    let iw = 1.0 / c.w;
    [
        (c.x * iw + 1.0) * 0.5 * w,
        (1.0 - c.y * iw) * 0.5 * h,
        c.z * iw,
        iw,
    ]
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
}

impl DrawContext<'_> {
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
        for (tri, &face) in vb.triangles.iter().zip(&vb.triangle_face) {
            let shader = shader_for(face as usize);
            shaded +=
                u64::from(self.triangle::<N, PERSP, S>(target, *tri, varying, &shader, &mut batch));
            last_shader = Some(shader);
        }
        let mut rv = [RasterVertex {
            x: 0.0,
            y: 0.0,
            z: 0.0,
            inv_w: 0.0,
            var: [0.0; N],
        }; MAX_CORNERS];
        for &face in &vb.scanline_faces {
            let poly = vb.polygon(face as usize);
            let shader = shader_for(face as usize);
            if poly.iter().all(|&v| self.outcodes[v as usize] == 0) {
                for (out, &v) in rv.iter_mut().zip(poly) {
                    *out = self.raster_vertex::<N, PERSP>(v, varying);
                }
                shaded += u64::from(fill_polygon::<N, PERSP, S>(
                    target,
                    &rv[..poly.len()],
                    self.cull,
                    &shader,
                    &mut batch,
                ));
            } else {
                // Crossing a clip plane: drawn as authored (a fan), clipped per triangle.
                for i in 1..poly.len() - 1 {
                    let tri = [poly[0], poly[i], poly[i + 1]];
                    shaded += u64::from(
                        self.triangle::<N, PERSP, S>(target, tri, varying, &shader, &mut batch),
                    );
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
    ) -> u32 {
        let codes = tri.map(|v| self.outcodes[v as usize]);
        if codes[0] & codes[1] & codes[2] != 0 {
            return 0; // entirely outside one plane
        }
        if codes[0] | codes[1] | codes[2] == 0 {
            // Coverage first: culled or pixel-less triangles never fetch varyings.
            let Some(cov) = Coverage::new(
                tri.map(|v| self.fixed[v as usize]),
                self.cull,
                target.width,
                target.height,
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
        let mut rv = [RasterVertex {
            x: 0.0,
            y: 0.0,
            z: 0.0,
            inv_w: 0.0,
            var: [0.0; N],
        }; crate::pipeline::clip::MAX_CLIPPED];
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
            if let Some(cov) = Coverage::new(p, self.cull, target.width, target.height) {
                shaded += fill::<N, PERSP, S>(target, &cov, tri, shader, batch);
            }
        }
        shaded
    }
}

/// The per-frame set-up shared by every panel.
pub(crate) struct Frame {
    pub(crate) camera: CameraFrame,
    pub(crate) rotation: Quat,
    pub(crate) lighting: Lighting,
    pub(crate) width: usize,
    pub(crate) height: usize,
    pub(crate) cull: Cull,
    pub(crate) persp: bool,
}

/// Gouraud and Phong at once: varyings 0..3 are the vertex colour, 3..9 the Phong normal and
/// position; out come the Gouraud pixel (first buffer) and the Phong pixel (second).
#[derive(Clone, Copy)]
struct Both<'a> {
    phong: PerPixel<'a>,
}

impl FragmentShader<9> for Both<'_> {
    type Out = [u32; 2];
    const BATCH: bool = true;

    #[inline(always)]
    fn shade(&self, v: &[f32; 9]) -> [u32; 2] {
        let p = [v[3], v[4], v[5], v[6], v[7], v[8]];
        [self.phong.enc.pack(v[0], v[1], v[2]), self.phong.shade(&p)]
    }

    #[inline(always)]
    fn shade4(&self, v: &[[f32; 9]; 4]) -> [[u32; 2]; 4] {
        let lanes = |k: usize| [v[k][3], v[k][4], v[k][5], v[k][6], v[k][7], v[k][8]];
        let p = self.phong.shade4(&[lanes(0), lanes(1), lanes(2), lanes(3)]);
        let g = |k: usize| self.phong.enc.pack(v[k][0], v[k][1], v[k][2]);
        [[g(0), p[0]], [g(1), p[1]], [g(2), p[2]], [g(3), p[3]]]
    }
}

/// Flat: a constant colour.
#[derive(Clone, Copy)]
struct Constant(u32);

impl FragmentShader<0> for Constant {
    type Out = u32;
    #[inline(always)]
    fn shade(&self, _: &[f32; 0]) -> u32 {
        self.0
    }
}

/// Gouraud: the interpolated linear colour, encoded.
#[derive(Clone, Copy)]
struct VertexColor {
    enc: SrgbEncoder,
}

impl FragmentShader<3> for VertexColor {
    type Out = u32;
    #[inline(always)]
    fn shade(&self, v: &[f32; 3]) -> u32 {
        self.enc.pack(v[0], v[1], v[2])
    }
}

/// Phong: renormalised interpolated normal, lit at the interpolated position.
#[derive(Clone, Copy)]
struct PerPixel<'a> {
    lighting: &'a Lighting,
    enc: SrgbEncoder,
}

impl FragmentShader<6> for PerPixel<'_> {
    type Out = u32;
    const BATCH: bool = true;

    #[inline(always)]
    fn shade(&self, v: &[f32; 6]) -> u32 {
        let n = Vec3::new(v[0], v[1], v[2]).normalize_or_zero();
        let c = self.lighting.shade(n, Vec3::new(v[3], v[4], v[5]));
        self.enc.pack(c.x, c.y, c.z)
    }

    #[inline(always)]
    fn shade4(&self, v: &[[f32; 6]; 4]) -> [u32; 4] {
        let lane = |j: usize| F4::new([v[0][j], v[1][j], v[2][j], v[3][j]]);
        let n = V4 {
            x: lane(0),
            y: lane(1),
            z: lane(2),
        }
        .normalize_or_zero();
        let p = V4 {
            x: lane(3),
            y: lane(4),
            z: lane(5),
        };
        let c = self.lighting.shade4(n, p);
        let (r, g, b) = (c.x.to_array(), c.y.to_array(), c.z.to_array());
        let px = |k: usize| self.enc.pack(r[k], g[k], b[k]);
        [px(0), px(1), px(2), px(3)]
    }
}

/// Exact: the pixel's view ray is followed from the mesh's interpolated point to the analytic
/// surface, which is lit there with its true normal (the nearest-point normal if the ray
/// search does not settle).
#[derive(Clone, Copy)]
struct ExactSurface<'a> {
    lighting: &'a Lighting,
    enc: SrgbEncoder,
    shape: Shape,
    rotation: Mat3,
    inverse: Mat3,
    eye: Vec3,
    toward_eye: Vec3,
    orthographic: bool,
}

impl FragmentShader<3> for ExactSurface<'_> {
    type Out = u32;
    fn shade(&self, v: &[f32; 3]) -> u32 {
        let p = Vec3::from_array(*v);
        let world = self.rotation * p;
        let ray = if self.orthographic {
            -self.toward_eye
        } else {
            (world - self.eye).normalize_or_zero()
        };
        let (hit, n) = self
            .shape
            .exact_hit(p, self.inverse * ray)
            .or_else(|| Some((p, self.shape.exact_normal(p)?)))
            .unwrap_or((p, Vec3::Z));
        let c = self.lighting.shade(self.rotation * n, self.rotation * hit);
        self.enc.pack(c.x, c.y, c.z)
    }
}

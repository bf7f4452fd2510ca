//! Surface probes: what each shading method gives at fixed points of the surface.
//!
//! A pixel grid turned with the view samples different surface points at every angle, so
//! reading pixels would mix the method's own change with resampling. A probe is instead a
//! point fixed in object space (on one face); each frame it is projected to its exact,
//! unsnapped screen position and the face's interpolation is evaluated there with the very
//! formulas the rasterizer and the scanline fill use ([`crate::pipeline::raster::sample_triangle`],
//! [`crate::pipeline::scanline::sample_polygon`]). A triangle's value at a probe is then the same at any
//! roll of the view; a scanline-filled polygon's is not, and that change is the method's.

use crate::pipeline::clip::outcode;
use crate::pipeline::raster::{sample_triangle, RasterVertex};
use crate::pipeline::render::{project, Renderer};
use crate::pipeline::scanline::{sample_polygon, MAX_CORNERS};
use crate::scene::definition::{Scene, SceneError};
use crate::shading::lighting::Lighting;
use glam::{Mat3, Vec3};

/// A fixed point of the surface: on face `face`, the fraction `toward_corner` of the way from
/// the face's centroid (the mean of its corners, object space) to its first corner.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SurfacePoint {
    /// Authored face index.
    pub face: u32,
    /// 0 = the centroid, 1 = the first corner.
    pub toward_corner: f32,
}

/// Depth slack (NDC) when deciding that a probe is not hidden: the depth buffer holds the
/// nearest surface at the pixel's centre, up to ~0.7 pixel from the probe.
const DEPTH_SLACK: f32 = 1e-3;

/// Relative luminance Y of a linear sRGB colour, channels clamped to 0..=1 as the display
/// clamps them (IEC 61966-2-1 / ITU-R BT.709 primaries: 0.2126, 0.7152, 0.0722).
pub fn linear_luminance(c: Vec3) -> f32 {
    let c = c.clamp(Vec3::ZERO, Vec3::ONE);
    0.2126 * c.x + 0.7152 * c.y + 0.0722 * c.z
}

impl Renderer {
    /// Probe points spread over the mesh of `scene`: the centroid and the point halfway to
    /// the first corner of up to `max / 2` faces, evenly strided through the face list.
    ///
    /// # Errors
    /// As [`Renderer::render`].
    pub fn surface_points(
        &mut self,
        scene: &Scene,
        max: usize,
    ) -> Result<Vec<SurfacePoint>, SceneError> {
        self.prepare_geometry(scene)?;
        let faces = self.geometry.as_ref().map_or(0, |g| g.vb.polygon_count());
        let stride = faces.div_ceil((max / 2).max(1)).max(1);
        Ok((0..faces)
            .step_by(stride)
            .flat_map(|f| {
                [0.0, 0.5].map(|t| SurfacePoint {
                    face: f as u32,
                    toward_corner: t,
                })
            })
            .take(max)
            .collect())
    }

    /// The relative luminance (linear, before 8-bit encoding; see [`linear_luminance`]) that
    /// per-vertex (Gouraud) and per-pixel (Phong) lighting give at each probe in the view of
    /// `scene`, into `out` (cleared first); NaN for probes that are off screen, on a culled
    /// face, crossing a clip plane or hidden according to `depth` (the depth buffer of a
    /// frame of this scene, as [`Renderer::render_pair`] leaves it).
    ///
    /// # Errors
    /// As [`Renderer::render`].
    pub fn sample_surface(
        &mut self,
        scene: &Scene,
        depth: &[f32],
        points: &[SurfacePoint],
        out: &mut Vec<[f32; 2]>,
    ) -> Result<(), SceneError> {
        let f = self.begin(scene, &mut [])?;
        out.clear();
        let Some(geo) = self.geometry.as_ref() else {
            return Err(SceneError("no mesh prepared".into()));
        };
        let probe = Probe {
            renderer: self,
            lighting: &f.lighting,
            rotation: Mat3::from_quat(f.rotation),
            view_proj: f.camera.view_proj,
            size: (f.width, f.height),
            persp: f.persp,
            cull: f.cull == crate::pipeline::raster::Cull::Back,
            depth,
        };
        for p in points {
            out.push(probe.sample(&geo.vb, *p).unwrap_or([f32::NAN; 2]));
        }
        Ok(())
    }
}

struct Probe<'a> {
    renderer: &'a Renderer,
    lighting: &'a Lighting,
    rotation: Mat3,
    view_proj: glam::Mat4,
    size: (usize, usize),
    persp: bool,
    cull: bool,
    depth: &'a [f32],
}

impl Probe<'_> {
    /// (Gouraud, Phong) luminance at the point, or `None` when it cannot be seen.
    fn sample(
        &self,
        vb: &crate::geometry::vertex_buffer::VertexBuffer,
        pt: SurfacePoint,
    ) -> Option<[f32; 2]> {
        let face = pt.face as usize;
        if face >= vb.polygon_count() {
            return None;
        }
        let poly = vb.polygon(face);
        let corner = |v: u32| vb.positions[v as usize];
        let centroid = poly.iter().map(|&v| corner(v)).sum::<Vec3>() / poly.len() as f32;
        let object = centroid + (corner(poly[0]) - centroid) * pt.toward_corner;
        let clip = self.view_proj * (self.rotation * object).extend(1.0);
        if outcode(clip) != 0 {
            return None;
        }
        let (w, h) = self.size;
        let [x, y, ..] = project(clip, w as f32, h as f32);
        if !(x >= 0.0 && y >= 0.0 && x < w as f32 && y < h as f32) {
            return None;
        }
        let r = self.renderer;
        let vertex = |v: u32| -> Option<RasterVertex<9>> {
            if r.outcodes[v as usize] != 0 {
                return None;
            }
            let (n, p) = (r.world_nrm[v as usize], r.world_pos[v as usize]);
            let c = self.lighting.shade(n, p);
            let s = r.screen[v as usize];
            let mut var = [c.x, c.y, c.z, n.x, n.y, n.z, p.x, p.y, p.z];
            if self.persp {
                for x in &mut var {
                    *x *= s[3];
                }
            }
            Some(RasterVertex {
                x: s[0],
                y: s[1],
                z: s[2],
                inv_w: s[3],
                var,
            })
        };
        // Doubled signed screen area, y down: negative = counter-clockwise = front facing.
        let front = |rv: &[RasterVertex<9>]| {
            let n = rv.len();
            let area: f32 = (0..n)
                .map(|i| {
                    let (a, b) = (&rv[i], &rv[(i + 1) % n]);
                    a.x * b.y - b.x * a.y
                })
                .sum();
            !self.cull || area < 0.0
        };
        let mut hit = None;
        if vb.is_scanline_face(face) && poly.len() <= MAX_CORNERS {
            let mut rv = [vertex(poly[0])?; MAX_CORNERS];
            for (o, &v) in rv.iter_mut().zip(poly) {
                *o = vertex(v)?;
            }
            let rv = &rv[..poly.len()];
            if front(rv) {
                hit = sample_polygon(rv, x, y);
            }
        } else {
            for tri in vb.face_triangles(face) {
                let rv = [vertex(tri[0])?, vertex(tri[1])?, vertex(tri[2])?];
                if let Some(s) = sample_triangle([&rv[0], &rv[1], &rv[2]], x, y) {
                    if front(&rv) {
                        hit = Some(s);
                    }
                    break;
                }
            }
        }
        let (z, q, mut var) = hit?;
        if z > self.depth.get(y as usize * w + x as usize)? + DEPTH_SLACK {
            return None;
        }
        if self.persp {
            let inv = 1.0 / q;
            for v in &mut var {
                *v *= inv;
            }
        }
        let gouraud = Vec3::new(var[0], var[1], var[2]);
        let n = Vec3::new(var[3], var[4], var[5]).normalize_or_zero();
        let phong = self.lighting.shade(n, Vec3::new(var[6], var[7], var[8]));
        Some([linear_luminance(gouraud), linear_luminance(phong)])
    }
}

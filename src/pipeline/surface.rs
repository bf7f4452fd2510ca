//! Surface probes: what each shading method gives at fixed points of the surface.
//!
//! A pixel grid turned with the view samples different surface points at every angle, so
//! reading pixels would mix the method's own change with resampling. A probe is instead a
//! point fixed in object space (on one face); each frame it is projected to its exact,
//! unsnapped screen position and the face's interpolation is evaluated there with the very
//! formulas the rasterizer and the scanline fill use ([`crate::pipeline::raster::sample_triangle`],
//! [`crate::pipeline::scanline::sample_polygon`]). A triangle's value at a probe is then the same at any
//! roll of the view; a scanline-filled polygon's is not, and that change is the method's.

use crate::geometry::vertex_buffer::{VertexBuffer, MAX_CORNERS};
use crate::pipeline::clip::outcode;
use crate::pipeline::raster::{sample_triangle, RasterVertex};
use crate::pipeline::scanline::sample_polygon;
use crate::pipeline::vertex_stage::{project, VertexStage};
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

/// Probe points spread over `vb`: the centroid and the point halfway to the first corner of
/// up to `max / 2` faces, evenly strided through the face list.
pub(crate) fn surface_points(vb: &VertexBuffer, max: usize) -> Vec<SurfacePoint> {
    let faces = vb.polygon_count();
    let stride = faces.div_ceil((max / 2).max(1)).max(1);
    (0..faces)
        .step_by(stride)
        .flat_map(|f| {
            [0.0, 0.5].map(|t| SurfacePoint {
                face: f as u32,
                toward_corner: t,
            })
        })
        .take(max)
        .collect()
}

/// What a probe needs of one frame: its vertex stage, lighting and view.
pub(crate) struct Probe<'a> {
    /// The frame's vertex stage (world positions, normals, screen positions, outcodes).
    pub stage: &'a VertexStage,
    /// The frame's lighting.
    pub lighting: &'a Lighting,
    /// The frame's lighting of each file material (empty: `lighting` everywhere).
    pub lightings: &'a [Lighting],
    /// Object-to-world rotation.
    pub rotation: Mat3,
    /// World-to-clip transform.
    pub view_proj: glam::Mat4,
    /// Panel size in pixels.
    pub size: (usize, usize),
    /// Perspective-correct interpolation.
    pub persp: bool,
    /// Back faces are culled.
    pub cull: bool,
    /// The frame's depth buffer.
    pub depth: &'a [f32],
}

impl Probe<'_> {
    /// (Gouraud, Phong) luminance at each of `points` into `out` (cleared first); NaN where a
    /// probe cannot be seen.
    pub(crate) fn sample_all(
        &self,
        vb: &VertexBuffer,
        points: &[SurfacePoint],
        out: &mut Vec<[f32; 2]>,
    ) {
        out.clear();
        for p in points {
            out.push(self.sample(vb, *p).unwrap_or([f32::NAN; 2]));
        }
    }

    /// (Gouraud, Phong) luminance at the point, or `None` when it cannot be seen.
    fn sample(&self, vb: &VertexBuffer, pt: SurfacePoint) -> Option<[f32; 2]> {
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
        let st = self.stage;
        // The face's material and, when the mesh has them, its vertex colours, as the panels
        // use them.
        let lighting = match vb.face_material.get(face) {
            Some(&m) if !self.lightings.is_empty() => &self.lightings[m as usize],
            _ => self.lighting,
        };
        let tinted = !vb.colors.is_empty();
        let vertex = |v: u32| -> Option<RasterVertex<12>> {
            if st.outcodes()[v as usize] != 0 {
                return None;
            }
            let (n, p) = (st.world_nrm()[v as usize], st.world_pos()[v as usize]);
            let t = vb.colors.get(v as usize).copied().unwrap_or(Vec3::ONE);
            let c = if tinted {
                lighting.shade_tinted(n, p, t)
            } else {
                lighting.shade(n, p)
            };
            let s = st.screen()[v as usize];
            let mut var = [c.x, c.y, c.z, n.x, n.y, n.z, p.x, p.y, p.z, t.x, t.y, t.z];
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
        let front = |rv: &[RasterVertex<12>]| {
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
        let p = Vec3::new(var[6], var[7], var[8]);
        let phong = if tinted {
            lighting.shade_tinted(n, p, Vec3::new(var[9], var[10], var[11]))
        } else {
            lighting.shade(n, p)
        };
        Some([linear_luminance(gouraud), linear_luminance(phong)])
    }
}

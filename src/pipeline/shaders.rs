//! The fragment stages: what each shading mode does with the varyings the rasterizer hands it
//! (flat: a constant; Gouraud: the interpolated colour; Phong: the renormalised normal lit per
//! pixel, four lanes at a time; exact: the analytic surface along the pixel's ray). Every one
//! ends in the same exact sRGB encoder.

use crate::geometry::shapes::Shape;
use crate::pipeline::raster::FragmentShader;
use crate::shading::color::SrgbEncoder;
use crate::shading::lanes::{F4, V4};
use crate::shading::lighting::Lighting;
use glam::{Mat3, Vec3};

/// Gouraud and Phong at once: varyings 0..3 are the vertex colour, 3..9 the Phong normal and
/// position; out come the Gouraud pixel (first buffer) and the Phong pixel (second).
#[derive(Clone, Copy)]
pub(crate) struct Both<'a> {
    pub phong: PerPixel<'a>,
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
    fn shade4(&self, v: &[F4; 9]) -> [[u32; 2]; 4] {
        let p = self.phong.shade4(&[v[3], v[4], v[5], v[6], v[7], v[8]]);
        let g = self.phong.enc.pack4(v[0], v[1], v[2]);
        [[g[0], p[0]], [g[1], p[1]], [g[2], p[2]], [g[3], p[3]]]
    }
}

/// Gouraud and Phong at once for a mesh with vertex colours: varyings 0..3 the vertex's lit
/// colour, 3..12 the Phong normal, position and vertex colour.
#[derive(Clone, Copy)]
pub(crate) struct BothTinted<'a> {
    pub phong: PerPixelTinted<'a>,
}

impl FragmentShader<12> for BothTinted<'_> {
    type Out = [u32; 2];
    const BATCH: bool = true;

    #[inline(always)]
    fn shade(&self, v: &[f32; 12]) -> [u32; 2] {
        let p = [v[3], v[4], v[5], v[6], v[7], v[8], v[9], v[10], v[11]];
        [self.phong.enc.pack(v[0], v[1], v[2]), self.phong.shade(&p)]
    }

    #[inline(always)]
    fn shade4(&self, v: &[F4; 12]) -> [[u32; 2]; 4] {
        let p = self
            .phong
            .shade4(&[v[3], v[4], v[5], v[6], v[7], v[8], v[9], v[10], v[11]]);
        let g = self.phong.enc.pack4(v[0], v[1], v[2]);
        [[g[0], p[0]], [g[1], p[1]], [g[2], p[2]], [g[3], p[3]]]
    }
}

/// Phong for a mesh with vertex colours: normal, position and the interpolated vertex colour,
/// which tints the base colour at the pixel.
#[derive(Clone, Copy)]
pub(crate) struct PerPixelTinted<'a> {
    pub lighting: &'a Lighting,
    pub enc: SrgbEncoder,
}

impl FragmentShader<9> for PerPixelTinted<'_> {
    type Out = u32;
    const BATCH: bool = true;

    #[inline(always)]
    fn shade(&self, v: &[f32; 9]) -> u32 {
        let n = Vec3::new(v[0], v[1], v[2]).normalize_or_zero();
        let c =
            self.lighting
                .shade_tinted(n, Vec3::new(v[3], v[4], v[5]), Vec3::new(v[6], v[7], v[8]));
        self.enc.pack(c.x, c.y, c.z)
    }

    #[inline(always)]
    fn shade4(&self, v: &[F4; 9]) -> [u32; 4] {
        let vec = |j: usize| V4 {
            x: v[j],
            y: v[j + 1],
            z: v[j + 2],
        };
        let c = self
            .lighting
            .shade4_tinted(vec(0).normalize_or_zero(), vec(3), vec(6));
        self.enc.pack4(c.x, c.y, c.z)
    }
}

/// Flat: a constant colour.
#[derive(Clone, Copy)]
pub(crate) struct Constant(pub u32);

impl FragmentShader<0> for Constant {
    type Out = u32;
    #[inline(always)]
    fn shade(&self, _: &[f32; 0]) -> u32 {
        self.0
    }
}

/// Gouraud: the interpolated linear colour, encoded.
#[derive(Clone, Copy)]
pub(crate) struct VertexColor {
    pub enc: SrgbEncoder,
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
pub(crate) struct PerPixel<'a> {
    pub lighting: &'a Lighting,
    pub enc: SrgbEncoder,
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
    fn shade4(&self, v: &[F4; 6]) -> [u32; 4] {
        let n = V4 {
            x: v[0],
            y: v[1],
            z: v[2],
        }
        .normalize_or_zero();
        let p = V4 {
            x: v[3],
            y: v[4],
            z: v[5],
        };
        let c = self.lighting.shade4(n, p);
        self.enc.pack4(c.x, c.y, c.z)
    }
}

/// Exact: the pixel's view ray is followed from the mesh's interpolated point to the analytic
/// surface, which is lit there with its true normal (the nearest-point normal if the ray
/// search does not settle).
#[derive(Clone, Copy)]
pub(crate) struct ExactSurface<'a> {
    pub lighting: &'a Lighting,
    pub enc: SrgbEncoder,
    pub shape: Shape,
    pub rotation: Mat3,
    pub inverse: Mat3,
    pub eye: Vec3,
    pub toward_eye: Vec3,
    pub orthographic: bool,
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

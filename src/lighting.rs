//! Illumination: lights, materials and the Phong / Blinn-Phong reflection models, in linear light.
//!
//! The same [`Lighting::shade`] is evaluated at vertices (Gouraud), at pixels (Phong) and on
//! the exact surface (reference), so the panels differ only in *where* light is computed.
//! - Phong's model (B. T. Phong, "Illumination for Computer Generated Pictures", CACM 18(6),
//!   1975): specular = max(R . V, 0)^n with R the mirror of L about N.
//! - Blinn-Phong (J. F. Blinn, "Models of Light Reflection for Computer Synthesized Pictures",
//!   SIGGRAPH 1977): specular = max(N . H, 0)^n with H = normalize(L + V).
//!
//! Specular is added only where N . L > 0. Dielectric highlights take the light's colour,
//! metallic highlights are tinted by the base colour. Point lights fall off as 1 / (1 + k d^2).

use crate::camera::CameraFrame;
use crate::color::{parse_hex, srgb8_to_linear};
use glam::Vec3;
use serde::{Deserialize, Serialize};

/// At most this many lights are used.
pub const MAX_LIGHTS: usize = 4;

/// The reflection model of the specular term.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, Default)]
#[serde(rename_all = "snake_case")]
pub enum ReflectionModel {
    /// Phong 1975: reflection vector.
    Phong,
    /// Blinn 1977: half vector.
    #[default]
    BlinnPhong,
}

/// Directional or point light.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, Default)]
#[serde(rename_all = "lowercase")]
pub enum LightKind {
    /// Parallel light from a direction.
    #[default]
    Directional,
    /// Light from a point, with distance attenuation.
    Point,
}

/// Dielectric (light-coloured highlights) or metal (base-tinted highlights).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, Default)]
#[serde(rename_all = "lowercase")]
pub enum Finish {
    /// Plastic, glaze, paint: highlight in the light's colour.
    #[default]
    Dielectric,
    /// Metal: highlight tinted by the base colour.
    Metal,
}

/// A light fixed in world space.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(default, deny_unknown_fields)]
pub struct Light {
    /// Directional or point.
    pub kind: LightKind,
    /// Direction toward the light, degrees about +y from +z (toward +x).
    pub azimuth_deg: f32,
    /// Elevation of the direction toward the light, degrees above the xz plane.
    pub elevation_deg: f32,
    /// Point lights: distance of the light from the origin along that direction.
    pub distance: f32,
    /// Colour, sRGB `#rrggbb`.
    pub color: String,
    /// Multiplier of the colour (linear).
    pub intensity: f32,
    /// Point lights: k in 1 / (1 + k d^2), d in world units.
    pub falloff: f32,
}

impl Default for Light {
    fn default() -> Self {
        Light {
            kind: LightKind::Directional,
            azimuth_deg: 35.0,
            elevation_deg: 30.0,
            distance: 2.5,
            color: "#ffffff".into(),
            intensity: 1.0,
            falloff: 0.1,
        }
    }
}

impl Light {
    /// Unit vector from the origin toward the light, world space.
    pub fn direction(&self) -> Vec3 {
        let (sa, ca) = (
            libm::sinf(self.azimuth_deg.to_radians()),
            libm::cosf(self.azimuth_deg.to_radians()),
        );
        let (se, ce) = (
            libm::sinf(self.elevation_deg.to_radians()),
            libm::cosf(self.elevation_deg.to_radians()),
        );
        Vec3::new(ce * sa, se, ce * ca)
    }
}

/// Surface reflectance.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(default, deny_unknown_fields)]
pub struct Material {
    /// Base (diffuse) colour, sRGB `#rrggbb`.
    pub base_color: String,
    /// Ambient reflectance, times the base colour and the ambient light.
    pub ambient: f32,
    /// Diffuse reflectance, times the base colour.
    pub diffuse: f32,
    /// Specular reflectance.
    pub specular: f32,
    /// Specular exponent, 1..=2048.
    pub shininess: f32,
    /// Emitted colour, sRGB `#rrggbb`.
    pub emissive: String,
    /// Multiplier of the emitted colour (linear).
    pub emissive_strength: f32,
    /// Dielectric or metal highlights.
    pub finish: Finish,
}

impl Default for Material {
    fn default() -> Self {
        Material {
            base_color: "#2f8f83".into(),
            ambient: 0.08,
            diffuse: 0.9,
            specular: 0.6,
            shininess: 80.0,
            emissive: "#000000".into(),
            emissive_strength: 0.0,
            finish: Finish::Dielectric,
        }
    }
}

#[derive(Clone, Copy, Debug, Default)]
struct PreparedLight {
    point: bool,
    /// Direction toward the light (directional) or position (point), world space.
    vector: Vec3,
    color: Vec3,
    falloff: f32,
}

/// Everything the reflection model needs for one frame, prepared once: linear colours,
/// world-space light vectors and the eye.
#[derive(Clone, Copy, Debug)]
pub struct Lighting {
    lights: [PreparedLight; MAX_LIGHTS],
    count: usize,
    constant: Vec3,
    diffuse: Vec3,
    specular: Vec3,
    shininess: f32,
    blinn: bool,
    eye: Vec3,
    toward_eye: Vec3,
    orthographic: bool,
}

fn linear_of(hex: &str) -> Result<Vec3, String> {
    Ok(Vec3::from(srgb8_to_linear(parse_hex(hex)?)))
}

impl Lighting {
    /// Prepares lights and material for a frame.
    ///
    /// # Errors
    /// A message when a colour is not `#rrggbb`.
    pub fn new(
        lights: &[Light],
        ambient_light: &str,
        material: &Material,
        model: ReflectionModel,
        camera: &CameraFrame,
    ) -> Result<Lighting, String> {
        let base = linear_of(&material.base_color)?;
        let mut prepared = [PreparedLight::default(); MAX_LIGHTS];
        for (slot, l) in prepared.iter_mut().zip(lights.iter()) {
            let dir = l.direction();
            *slot = PreparedLight {
                point: l.kind == LightKind::Point,
                vector: if l.kind == LightKind::Point {
                    dir * l.distance
                } else {
                    dir
                },
                color: linear_of(&l.color)? * l.intensity,
                falloff: l.falloff,
            };
        }
        let spec_tint = match material.finish {
            Finish::Dielectric => Vec3::ONE,
            Finish::Metal => base,
        };
        Ok(Lighting {
            lights: prepared,
            count: lights.len().min(MAX_LIGHTS),
            constant: base * linear_of(ambient_light)? * material.ambient
                + linear_of(&material.emissive)? * material.emissive_strength,
            diffuse: base * material.diffuse,
            specular: spec_tint * material.specular,
            shininess: material.shininess,
            blinn: model == ReflectionModel::BlinnPhong,
            eye: camera.eye,
            toward_eye: camera.toward_eye,
            orthographic: camera.orthographic,
        })
    }

    /// Outgoing linear radiance at world position `p` with unit normal `n`.
    #[inline]
    pub fn shade(&self, n: Vec3, p: Vec3) -> Vec3 {
        let v = if self.orthographic {
            self.toward_eye
        } else {
            (self.eye - p).normalize_or_zero()
        };
        let mut col = self.constant;
        for light in &self.lights[..self.count] {
            let (l, c) = if light.point {
                let d = light.vector - p;
                let d2 = d.length_squared();
                let att = 1.0 / (1.0 + light.falloff * d2);
                (d.normalize_or_zero(), light.color * att)
            } else {
                (light.vector, light.color)
            };
            let ndl = n.dot(l);
            if ndl > 0.0 {
                let s = if self.blinn {
                    n.dot((l + v).normalize_or_zero())
                } else {
                    (n * (2.0 * ndl) - l).dot(v)
                };
                let spec = if s > 0.0 {
                    specular_power(s, self.shininess)
                } else {
                    0.0
                };
                col += (self.diffuse * ndl + self.specular * spec) * c;
            }
        }
        col
    }

    /// The specular colour factor (used to find highlight pixels in measurements).
    pub fn specular_color(&self) -> Vec3 {
        self.specular
    }
}

/// `x^n` for the specular lobe, x in (0, 1]. Goes through `libm` so every target computes the
/// same bits.
#[inline]
pub fn specular_power(x: f32, n: f32) -> f32 {
    libm::powf(x, n)
}

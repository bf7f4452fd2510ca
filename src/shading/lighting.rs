//! Illumination: lights, materials and the Phong / Blinn-Phong reflection models, in linear light.
//!
//! The same [`Lighting::shade`] is evaluated at vertices (Gouraud), at pixels (Phong) and on
//! the exact surface (reference), so the panels differ only in *where* light is computed.
//! - Phong's model (B. T. Phong, "Illumination for Computer Generated Pictures", CACM 18(6),
//!   1975): specular = max(R . V, 0)^n with R the mirror of L about N.
//! - Blinn-Phong (J. F. Blinn, "Models of Light Reflection for Computer Synthesized Pictures",
//!   SIGGRAPH 1977): specular = max(N . H, 0)^n with H = normalize(L + V).
//!
//! - The glTF 2.0 metallic-roughness BRDF (glTF 2.0 specification, Appendix B, "Sample
//!   Implementation"): Trowbridge-Reitz/GGX distribution, the height-correlated Smith
//!   visibility term, Schlick's Fresnel with f0 = mix(0.04, base, metallic), the dielectric's
//!   Lambertian diffuse weighted by 1 - F, alpha = roughness^2.
//!
//! Light is added only where N . L > 0. In the Phong models dielectric highlights take the
//! light's colour and metallic ones are tinted by the base colour. Point lights fall off as
//! 1 / (1 + k d^2).
//!
//! Light units, one convention for every model (common practice in real-time engines): a
//! light of colour c and intensity k delivers c k at normal incidence, and a BRDF f reflects
//! pi f c k (N . L), so a white Lambertian surface (f = 1/pi) facing a unit light renders at
//! 1.0 before sRGB encoding. The Phong models' diffuse term is kd base (N . L) in the same
//! units.

use crate::geometry::camera::CameraFrame;
use crate::shading::color::Rgb;
use crate::shading::lanes::{F4, V4};
use glam::Vec3;
use schemars::JsonSchema;
use serde::{Deserialize, Serialize};

/// At most this many lights are used.
pub const MAX_LIGHTS: usize = 4;

/// The reflection model.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, Default, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub enum ReflectionModel {
    /// Phong 1975: reflection vector, exponent `shininess`.
    Phong,
    /// Blinn 1977: half vector, exponent `shininess`.
    #[default]
    BlinnPhong,
    /// The glTF 2.0 metallic-roughness BRDF: `base_color`, `metallic`, `roughness`.
    MetallicRoughness,
}

impl ReflectionModel {
    /// Every model, in the order above.
    pub const ALL: [ReflectionModel; 3] = [
        ReflectionModel::Phong,
        ReflectionModel::BlinnPhong,
        ReflectionModel::MetallicRoughness,
    ];

    /// The name in JSON and on the command line.
    pub fn id(self) -> &'static str {
        match self {
            ReflectionModel::Phong => "phong",
            ReflectionModel::BlinnPhong => "blinn_phong",
            ReflectionModel::MetallicRoughness => "metallic_roughness",
        }
    }

    /// A label for menus and sheets.
    pub fn label(self) -> &'static str {
        match self {
            ReflectionModel::Phong => "Phong (1975)",
            ReflectionModel::BlinnPhong => "Blinn-Phong (1977)",
            ReflectionModel::MetallicRoughness => "Metallic-roughness (glTF)",
        }
    }
}

/// The least roughness shaded: below it a surface is shaded at this roughness. At 0.05,
/// alpha^2 = 6.25e-6 and the distribution's peak 1 / (pi alpha^2) is 5.1e4; the term
/// (N . H)^2 (alpha^2 - 1) + 1 that decides the lobe still resolves alpha^2 with about 100
/// f32 steps to spare, and the lobe is already narrower than a pixel of any panel, so lower
/// values would only add noise.
pub const MIN_ROUGHNESS: f32 = 0.05;

/// The Blinn-Phong exponent whose lobe matches a GGX roughness near its peak,
/// n = 2 / alpha^2 - 2 with alpha = roughness^2 (the Phong-Beckmann relation of Walter,
/// Marschner, Li and Torrance 2007, which GGX follows near the peak); clamped to the scene's
/// shininess range 1..=2048.
pub fn blinn_exponent_for_roughness(roughness: f32) -> f32 {
    let r = roughness.clamp(MIN_ROUGHNESS, 1.0);
    let alpha = r * r;
    (2.0 / (alpha * alpha) - 2.0).clamp(1.0, 2048.0)
}

/// The roughness whose GGX lobe matches Blinn-Phong exponent `n` (the inverse of
/// [`blinn_exponent_for_roughness`]), clamped to [`MIN_ROUGHNESS`]..=1.
pub fn roughness_for_blinn_exponent(n: f32) -> f32 {
    let alpha = (2.0 / (n.max(0.0) + 2.0)).sqrt();
    alpha.sqrt().clamp(MIN_ROUGHNESS, 1.0)
}

/// Directional or point light.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, Default, JsonSchema)]
#[serde(rename_all = "lowercase")]
pub enum LightKind {
    /// Parallel light from a direction.
    #[default]
    Directional,
    /// Light from a point, with distance attenuation.
    Point,
}

/// Dielectric (light-coloured highlights) or metal (base-tinted highlights).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, Default, JsonSchema)]
#[serde(rename_all = "lowercase")]
pub enum Finish {
    /// Plastic, glaze, paint: highlight in the light's colour.
    #[default]
    Dielectric,
    /// Metal: highlight tinted by the base colour.
    Metal,
}

/// A light fixed in world space.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
#[serde(default, deny_unknown_fields)]
pub struct Light {
    /// Directional or point.
    pub kind: LightKind,
    /// Direction toward the light, degrees about +y from +z (toward +x).
    pub azimuth_deg: f32,
    /// Elevation of the direction toward the light, degrees above the xz plane.
    #[schemars(range(min = -90.0, max = 90.0))]
    pub elevation_deg: f32,
    /// Point lights: distance of the light from the origin along that direction.
    #[schemars(range(min = 0.0, max = 1000.0))]
    pub distance: f32,
    /// Colour, sRGB `#rrggbb`.
    pub color: Rgb,
    /// Multiplier of the colour (linear).
    #[schemars(range(min = 0.0, max = 100.0))]
    pub intensity: f32,
    /// Point lights: k in 1 / (1 + k d^2), d in world units.
    #[schemars(range(min = 0.0, max = 100.0))]
    pub falloff: f32,
}

impl Default for Light {
    fn default() -> Self {
        Light {
            kind: LightKind::Directional,
            azimuth_deg: 35.0,
            elevation_deg: 30.0,
            distance: 2.5,
            color: Rgb::hex("#ffffff"),
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
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
#[serde(default, deny_unknown_fields)]
pub struct Material {
    /// Base (diffuse) colour, sRGB `#rrggbb`.
    pub base_color: Rgb,
    /// Ambient reflectance, times the base colour and the ambient light.
    #[schemars(range(min = 0.0, max = 10.0))]
    pub ambient: f32,
    /// Diffuse reflectance, times the base colour.
    #[schemars(range(min = 0.0, max = 10.0))]
    pub diffuse: f32,
    /// Specular reflectance.
    #[schemars(range(min = 0.0, max = 10.0))]
    pub specular: f32,
    /// Specular exponent, 1..=2048.
    #[schemars(range(min = 1.0, max = 2048.0))]
    pub shininess: f32,
    /// Emitted colour, sRGB `#rrggbb`.
    pub emissive: Rgb,
    /// Multiplier of the emitted colour (linear).
    #[schemars(range(min = 0.0, max = 100.0))]
    pub emissive_strength: f32,
    /// Dielectric or metal highlights (Phong models).
    pub finish: Finish,
    /// Perceptual roughness, 0..=1 (metallic-roughness model; shaded at no less than
    /// [`MIN_ROUGHNESS`]).
    #[schemars(range(min = 0.0, max = 1.0))]
    pub roughness: f32,
    /// Metalness, 0..=1 (metallic-roughness model).
    #[schemars(range(min = 0.0, max = 1.0))]
    pub metallic: f32,
}

impl Default for Material {
    fn default() -> Self {
        Material {
            base_color: Rgb::hex("#2f8f83"),
            ambient: 0.08,
            diffuse: 0.9,
            specular: 0.6,
            shininess: 80.0,
            emissive: Rgb::hex("#000000"),
            emissive_strength: 0.0,
            finish: Finish::Dielectric,
            roughness: 0.5,
            metallic: 0.0,
        }
    }
}

/// The glTF metallic-roughness material, prepared: Schlick's f0 and 1 - f0, the diffuse
/// colour base (1 - metallic) (1 - 0.04), and alpha^2.
#[derive(Clone, Copy, Debug)]
struct Microfacet {
    f0: Vec3,
    one_minus_f0: Vec3,
    diffuse: Vec3,
    alpha2: f32,
    /// f0's untinted part, 0.04 (1 - metallic), and its tinted part, base metallic.
    f0_plain: f32,
    f0_base: Vec3,
}

impl Microfacet {
    fn new(base: Vec3, material: &Material) -> Microfacet {
        let m = material.metallic;
        let r = material.roughness.max(MIN_ROUGHNESS);
        let alpha = r * r;
        let f0 = Vec3::splat(DIELECTRIC_F0 * (1.0 - m)) + base * m;
        Microfacet {
            f0,
            f0_plain: DIELECTRIC_F0 * (1.0 - m),
            f0_base: base * m,
            one_minus_f0: Vec3::ONE - f0,
            diffuse: base * ((1.0 - m) * (1.0 - DIELECTRIC_F0)),
            alpha2: alpha * alpha,
        }
    }
}

/// Schlick's f0 of dielectrics in the glTF model (an index of refraction of 1.5).
pub const DIELECTRIC_F0: f32 = 0.04;

/// (1 - x)^5, x clamped to [0, 1]: Schlick's Fresnel weight.
#[inline(always)]
pub fn schlick_weight(x: f32) -> f32 {
    let t = 1.0 - x;
    let t = if t > 0.0 { t } else { 0.0 };
    let t2 = t * t;
    t2 * t2 * t
}

/// [`schlick_weight`] in four lanes, bit-identical lane by lane.
#[inline(always)]
fn schlick_weight4(x: F4) -> F4 {
    let t = F4::splat(1.0) - x;
    let t = F4::select(t.gt(0.0), t, F4::splat(0.0));
    let t2 = t * t;
    t2 * t2 * t
}

/// [`ggx_lobe`] in four lanes, bit-identical lane by lane.
#[inline(always)]
fn ggx_lobe4(alpha2: f32, ndh: F4, ndl: F4, ndv: F4) -> F4 {
    let t = ndh * ndh * (alpha2 - 1.0) + 1.0;
    let k = 1.0 - alpha2;
    let a = F4::splat(alpha2);
    let vis =
        F4::splat(0.5) / (ndv * (a + ndl * ndl * k).sqrt() + ndl * (a + ndv * ndv * k).sqrt());
    F4::select(ndh.gt(0.0), a / (t * t) * vis, F4::splat(0.0))
}

/// pi times the glTF specular BRDF without Fresnel, pi D V: the GGX distribution
/// D = alpha^2 / (pi ((N.H)^2 (alpha^2 - 1) + 1)^2) (zero where N.H <= 0) times the
/// height-correlated visibility V = 0.5 / (|N.V| sqrt(alpha^2 + (1 - alpha^2)(N.L)^2) +
/// |N.L| sqrt(alpha^2 + (1 - alpha^2)(N.V)^2)). The pi of the light units cancels D's.
#[inline(always)]
pub fn ggx_lobe(alpha2: f32, ndh: f32, ndl: f32, ndv: f32) -> f32 {
    if ndh <= 0.0 {
        return 0.0;
    }
    let t = ndh * ndh * (alpha2 - 1.0) + 1.0;
    alpha2 / (t * t) * smith_visibility(alpha2, ndl, ndv)
}

/// The glTF specification's visibility term, the height-correlated Smith masking-shadowing
/// function over 4 |N.L| |N.V|: 0.5 / (|N.V| sqrt(alpha^2 + (1 - alpha^2)(N.L)^2) +
/// |N.L| sqrt(alpha^2 + (1 - alpha^2)(N.V)^2)).
#[inline(always)]
pub fn smith_visibility(alpha2: f32, ndl: f32, ndv: f32) -> f32 {
    let k = 1.0 - alpha2;
    0.5 / (ndv * (alpha2 + k * (ndl * ndl)).sqrt() + ndl * (alpha2 + k * (ndv * ndv)).sqrt())
}

#[derive(Clone, Copy, Debug, Default)]
struct PreparedLight {
    point: bool,
    /// Direction toward the light (directional) or position (point), world space.
    vector: Vec3,
    color: Vec3,
    falloff: f32,
}

impl PreparedLight {
    /// The unit direction toward the light from `p` and the light's colour arriving there
    /// (a point light's falls off as 1 / (1 + k d^2)).
    #[inline(always)]
    fn incident(&self, p: Vec3) -> (Vec3, Vec3) {
        if self.point {
            let d = self.vector - p;
            let d2 = d.length_squared();
            let att = 1.0 / (1.0 + self.falloff * d2);
            (d.normalize_or_zero(), self.color * att)
        } else {
            (self.vector, self.color)
        }
    }

    /// [`PreparedLight::incident`] for four points, bit-identical lane by lane.
    #[inline(always)]
    fn incident4(&self, p: V4) -> (V4, V4) {
        if self.point {
            let d = V4::splat(self.vector) - p;
            let d2 = d.dot(d);
            let att = F4::splat(1.0) / (d2 * self.falloff + 1.0);
            (
                d.normalize_or_zero(),
                V4 {
                    x: att * self.color.x,
                    y: att * self.color.y,
                    z: att * self.color.z,
                },
            )
        } else {
            (V4::splat(self.vector), V4::splat(self.color))
        }
    }
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
    /// The parts a vertex colour tints (see [`Lighting::shade_tinted`]): ambient times the
    /// base colour, the emitted colour, and the specular colour split into its untinted
    /// (dielectric) and tinted (metal) parts.
    ambient_base: Vec3,
    emissive: Vec3,
    specular_plain: Vec3,
    specular_base: Vec3,
    shininess: f32,
    blinn: bool,
    /// The metallic-roughness model, when it is the scene's.
    gltf: Option<Microfacet>,
    eye: Vec3,
    toward_eye: Vec3,
    orthographic: bool,
}

fn linear_of(c: Rgb) -> Vec3 {
    Vec3::from(c.linear())
}

impl Lighting {
    /// Prepares lights and material for a frame (at most [`MAX_LIGHTS`] lights are used).
    pub fn new(
        lights: &[Light],
        ambient_light: Rgb,
        material: &Material,
        model: ReflectionModel,
        camera: &CameraFrame,
    ) -> Lighting {
        let base = linear_of(material.base_color);
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
                color: linear_of(l.color) * l.intensity,
                falloff: l.falloff,
            };
        }
        let spec_tint = match material.finish {
            Finish::Dielectric => Vec3::ONE,
            Finish::Metal => base,
        };
        let (specular_plain, specular_base) = match material.finish {
            Finish::Dielectric => (Vec3::splat(material.specular), Vec3::ZERO),
            Finish::Metal => (Vec3::ZERO, base * material.specular),
        };
        Lighting {
            ambient_base: base * linear_of(ambient_light) * material.ambient,
            emissive: linear_of(material.emissive) * material.emissive_strength,
            specular_plain,
            specular_base,
            lights: prepared,
            count: lights.len().min(MAX_LIGHTS),
            constant: base * linear_of(ambient_light) * material.ambient
                + linear_of(material.emissive) * material.emissive_strength,
            diffuse: base * material.diffuse,
            specular: spec_tint * material.specular,
            shininess: material.shininess,
            blinn: model == ReflectionModel::BlinnPhong,
            gltf: (model == ReflectionModel::MetallicRoughness)
                .then(|| Microfacet::new(base, material)),
            eye: camera.eye,
            toward_eye: camera.toward_eye,
            orthographic: camera.orthographic,
        }
    }

    /// The same lighting exposed by `scale` (linear, 2^EV): every light, the ambient light
    /// and the emission are scaled, which scales every output alike. `scale` 1 changes
    /// nothing, bit for bit.
    pub fn exposed(mut self, scale: f32) -> Lighting {
        for l in &mut self.lights {
            l.color *= scale;
        }
        self.constant *= scale;
        self.ambient_base *= scale;
        self.emissive *= scale;
        self
    }

    /// The same lighting with a coloured highlight: `color` (linear) replaces the material's
    /// specular colour in the Phong models (an OBJ material's `Ks`; vertex colours do not tint
    /// it). The metallic-roughness model has no such colour and is returned unchanged.
    pub fn with_specular_color(self, color: Vec3) -> Lighting {
        if self.gltf.is_some() {
            return self;
        }
        Lighting {
            specular: color,
            specular_plain: color,
            specular_base: Vec3::ZERO,
            ..self
        }
    }

    /// Outgoing linear radiance at world position `p` with unit normal `n`.
    #[inline]
    pub fn shade(&self, n: Vec3, p: Vec3) -> Vec3 {
        if let Some(g) = &self.gltf {
            return self.shade_microfacet(g, n, p);
        }
        let v = if self.orthographic {
            self.toward_eye
        } else {
            (self.eye - p).normalize_or_zero()
        };
        let mut col = self.constant;
        for light in &self.lights[..self.count] {
            let (l, c) = light.incident(p);
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

    /// [`Lighting::shade`] for four fragments at once: the same operations in the same order
    /// in each lane, so each lane's result is bit-identical to the scalar call.
    #[inline]
    pub fn shade4(&self, n: V4, p: V4) -> V4 {
        if let Some(g) = &self.gltf {
            return self.shade4_microfacet(g, n, p);
        }
        let v = if self.orthographic {
            V4::splat(self.toward_eye)
        } else {
            (V4::splat(self.eye) - p).normalize_or_zero()
        };
        let mut col = V4::splat(self.constant);
        for light in &self.lights[..self.count] {
            let (l, c) = light.incident4(p);
            let ndl = n.dot(l);
            let lit = ndl.gt(0.0);
            let s = if self.blinn {
                n.dot((l + v).normalize_or_zero())
            } else {
                (n.scale(ndl * 2.0) - l).dot(v)
            };
            let spec = F4::select(
                s.gt(0.0),
                specular_power4(s, self.shininess),
                F4::splat(0.0),
            );
            let term = |d: f32, sp: f32, c: F4| (ndl * d + spec * sp) * c;
            col = V4 {
                x: F4::select(
                    lit,
                    col.x + term(self.diffuse.x, self.specular.x, c.x),
                    col.x,
                ),
                y: F4::select(
                    lit,
                    col.y + term(self.diffuse.y, self.specular.y, c.y),
                    col.y,
                ),
                z: F4::select(
                    lit,
                    col.z + term(self.diffuse.z, self.specular.z, c.z),
                    col.z,
                ),
            };
        }
        col
    }

    /// [`Lighting::shade`] of the glTF metallic-roughness model.
    #[inline]
    fn shade_microfacet(&self, g: &Microfacet, n: Vec3, p: Vec3) -> Vec3 {
        let v = if self.orthographic {
            self.toward_eye
        } else {
            (self.eye - p).normalize_or_zero()
        };
        let mut col = self.constant;
        for light in &self.lights[..self.count] {
            let (l, c) = light.incident(p);
            let ndl = n.dot(l);
            if ndl > 0.0 {
                let h = (l + v).normalize_or_zero();
                let ndv = n.dot(v).abs();
                let fw = schlick_weight(v.dot(h).abs());
                let lobe = ggx_lobe(g.alpha2, n.dot(h), ndl, ndv);
                let diffuse = g.diffuse * (1.0 - fw);
                let specular = (g.f0 + g.one_minus_f0 * fw) * lobe;
                col += (diffuse + specular) * (c * ndl);
            }
        }
        col
    }

    /// [`Lighting::shade4`] of the glTF metallic-roughness model.
    #[inline]
    fn shade4_microfacet(&self, g: &Microfacet, n: V4, p: V4) -> V4 {
        let v = if self.orthographic {
            V4::splat(self.toward_eye)
        } else {
            (V4::splat(self.eye) - p).normalize_or_zero()
        };
        let mut col = V4::splat(self.constant);
        for light in &self.lights[..self.count] {
            let (l, c) = light.incident4(p);
            let ndl = n.dot(l);
            let lit = ndl.gt(0.0);
            let h = (l + v).normalize_or_zero();
            let ndv = n.dot(v).abs();
            let fw = schlick_weight4(v.dot(h).abs());
            let lobe = ggx_lobe4(g.alpha2, n.dot(h), ndl, ndv);
            let one_minus_fw = F4::splat(1.0) - fw;
            let term = |d: f32, f0: f32, omf0: f32, c: F4| {
                (one_minus_fw * d + (fw * omf0 + f0) * lobe) * (c * ndl)
            };
            col = V4 {
                x: F4::select(
                    lit,
                    col.x + term(g.diffuse.x, g.f0.x, g.one_minus_f0.x, c.x),
                    col.x,
                ),
                y: F4::select(
                    lit,
                    col.y + term(g.diffuse.y, g.f0.y, g.one_minus_f0.y, c.y),
                    col.y,
                ),
                z: F4::select(
                    lit,
                    col.z + term(g.diffuse.z, g.f0.z, g.one_minus_f0.z, c.z),
                    col.z,
                ),
            };
        }
        col
    }

    /// [`Lighting::shade`] with the base colour multiplied by `tint` (a vertex colour, linear):
    /// every term that the base colour scales (ambient, diffuse, a metal's highlight, the glTF
    /// model's f0) is scaled by it; light-coloured highlights and emission are not. The result
    /// is affine in the tint, `plain + tinted * tint`, summed in that form.
    #[inline]
    pub fn shade_tinted(&self, n: Vec3, p: Vec3, tint: Vec3) -> Vec3 {
        let v = if self.orthographic {
            self.toward_eye
        } else {
            (self.eye - p).normalize_or_zero()
        };
        let mut plain = self.emissive;
        let mut tinted = self.ambient_base;
        for light in &self.lights[..self.count] {
            let (l, c) = light.incident(p);
            let ndl = n.dot(l);
            // Not `ndl <= 0.0`: a NaN must skip the light too, as the four-lane mask does.
            if !ndl.gt(&0.0) {
                continue;
            }
            let cl = c * ndl;
            if let Some(g) = &self.gltf {
                let h = (l + v).normalize_or_zero();
                let ndv = n.dot(v).abs();
                let fw = schlick_weight(v.dot(h).abs());
                let lobe = ggx_lobe(g.alpha2, n.dot(h), ndl, ndv);
                let one_minus_fw = 1.0 - fw;
                plain += cl * ((g.f0_plain * one_minus_fw + fw) * lobe);
                tinted += (g.diffuse * one_minus_fw + g.f0_base * (one_minus_fw * lobe)) * cl;
                continue;
            }
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
            plain += self.specular_plain * spec * c;
            tinted += (self.diffuse * ndl + self.specular_base * spec) * c;
        }
        plain + tinted * tint
    }

    /// [`Lighting::shade_tinted`] for four fragments, bit-identical lane by lane.
    #[inline]
    pub fn shade4_tinted(&self, n: V4, p: V4, tint: V4) -> V4 {
        let v = if self.orthographic {
            V4::splat(self.toward_eye)
        } else {
            (V4::splat(self.eye) - p).normalize_or_zero()
        };
        let mut plain = V4::splat(self.emissive);
        let mut tinted = V4::splat(self.ambient_base);
        for light in &self.lights[..self.count] {
            let (l, c) = light.incident4(p);
            let ndl = n.dot(l);
            let lit = ndl.gt(0.0);
            let cl = V4 {
                x: c.x * ndl,
                y: c.y * ndl,
                z: c.z * ndl,
            };
            let (add_plain, add_tinted) = if let Some(g) = &self.gltf {
                let h = (l + v).normalize_or_zero();
                let ndv = n.dot(v).abs();
                let fw = schlick_weight4(v.dot(h).abs());
                let lobe = ggx_lobe4(g.alpha2, n.dot(h), ndl, ndv);
                let one_minus_fw = F4::splat(1.0) - fw;
                let k = (one_minus_fw * g.f0_plain + fw) * lobe;
                let w = one_minus_fw * lobe;
                let t = |d: f32, b: f32, c: F4| (one_minus_fw * d + w * b) * c;
                (
                    V4 {
                        x: cl.x * k,
                        y: cl.y * k,
                        z: cl.z * k,
                    },
                    V4 {
                        x: t(g.diffuse.x, g.f0_base.x, cl.x),
                        y: t(g.diffuse.y, g.f0_base.y, cl.y),
                        z: t(g.diffuse.z, g.f0_base.z, cl.z),
                    },
                )
            } else {
                let s = if self.blinn {
                    n.dot((l + v).normalize_or_zero())
                } else {
                    (n.scale(ndl * 2.0) - l).dot(v)
                };
                let spec = F4::select(
                    s.gt(0.0),
                    specular_power4(s, self.shininess),
                    F4::splat(0.0),
                );
                let t = |d: f32, b: f32, c: F4| (ndl * d + spec * b) * c;
                (
                    V4 {
                        x: spec * self.specular_plain.x * c.x,
                        y: spec * self.specular_plain.y * c.y,
                        z: spec * self.specular_plain.z * c.z,
                    },
                    V4 {
                        x: t(self.diffuse.x, self.specular_base.x, c.x),
                        y: t(self.diffuse.y, self.specular_base.y, c.y),
                        z: t(self.diffuse.z, self.specular_base.z, c.z),
                    },
                )
            };
            plain = V4 {
                x: F4::select(lit, plain.x + add_plain.x, plain.x),
                y: F4::select(lit, plain.y + add_plain.y, plain.y),
                z: F4::select(lit, plain.z + add_plain.z, plain.z),
            };
            tinted = V4 {
                x: F4::select(lit, tinted.x + add_tinted.x, tinted.x),
                y: F4::select(lit, tinted.y + add_tinted.y, tinted.y),
                z: F4::select(lit, tinted.z + add_tinted.z, tinted.z),
            };
        }
        V4 {
            x: plain.x + tinted.x * tint.x,
            y: plain.y + tinted.y * tint.y,
            z: plain.z + tinted.z * tint.z,
        }
    }

    /// The specular colour factor (used to find highlight pixels in measurements).
    pub fn specular_color(&self) -> Vec3 {
        self.specular
    }
}

/// `x^n` for the specular lobe, x in (0, 1], n in [1, 2048], without `powf`.
///
/// Software `powf` costs about 44 ns a call in wasm (measured on this 2-core machine for the benchmarks) and was 43 % of a
/// native frame of the bench scene (perf, before this change). The integer part of `n` is
/// done by repeated squaring (exact up to rounding, at most 11 squarings); a fractional part
/// `f` multiplies in `exp2(f log2 x)` from short polynomials. Only IEEE additions,
/// multiplications and bit operations are used, in a fixed order, so every target gives the
/// same bits. Relative error against `powf` (measured in tests/lighting.rs): 4.5e-5 at worst
/// for integer `n` up to 2048 (n - 1 roundings compound), 5.2e-5 for fractional `n`.
#[inline]
pub fn specular_power(x: f32, n: f32) -> f32 {
    let whole = n as u32; // n >= 1 by scene validation; truncation toward zero
    let frac = n - whole as f32;
    let mut result = 1.0f32;
    let mut base = x;
    let mut e = whole;
    while e > 0 {
        if e & 1 == 1 {
            result *= base;
        }
        e >>= 1;
        if e > 0 {
            base *= base;
        }
    }
    if frac > 0.0 {
        result *= exp2_poly(frac * log2_poly(x));
    }
    result
}

/// [`specular_power`] in four lanes: the same steps, lane by lane (the exponent is shared).
#[inline(always)]
pub fn specular_power4(x: F4, n: f32) -> F4 {
    let whole = n as u32;
    let frac = n - whole as f32;
    let mut result = F4::splat(1.0);
    let mut base = x;
    let mut e = whole;
    while e > 0 {
        if e & 1 == 1 {
            result = result * base;
        }
        e >>= 1;
        if e > 0 {
            base = base * base;
        }
    }
    if frac > 0.0 {
        result = result * x.map(|v| exp2_poly(frac * log2_poly(v)));
    }
    result
}

/// log2(x) for x > 0 (normal floats): exponent from the bits, mantissa m in [1, 2) through
/// log2(m) = 2 atanh(t) / ln 2 with t = (m - 1)/(m + 1), an odd series to t^9.
#[inline]
fn log2_poly(x: f32) -> f32 {
    let bits = x.to_bits();
    let exponent = ((bits >> 23) & 0xff) as i32 - 127;
    let m = f32::from_bits((bits & 0x007f_ffff) | 0x3f80_0000);
    let t = (m - 1.0) / (m + 1.0);
    let t2 = t * t;
    // 2/ln2 * (t + t^3/3 + t^5/5 + t^7/7 + t^9/9)
    let series =
        t * (1.0 + t2 * (1.0 / 3.0 + t2 * (1.0 / 5.0 + t2 * (1.0 / 7.0 + t2 * (1.0 / 9.0)))));
    exponent as f32 + series * (2.0 * std::f32::consts::LOG2_E)
}

/// 2^y for y <= 0 (the specular case): integer part into the exponent bits, fractional part
/// by a degree-6 Taylor polynomial of e^(f ln 2) on [0, 1).
#[inline]
fn exp2_poly(y: f32) -> f32 {
    if y < -126.0 {
        return 0.0;
    }
    let fl = y as i32 - i32::from(y < (y as i32) as f32); // floor for negative y
    let f = y - fl as f32;
    let z = f * std::f32::consts::LN_2;
    let p = 1.0
        + z * (1.0
            + z * (0.5
                + z * (1.0 / 6.0 + z * (1.0 / 24.0 + z * (1.0 / 120.0 + z * (1.0 / 720.0))))));
    p * f32::from_bits(((fl + 127) as u32) << 23)
}

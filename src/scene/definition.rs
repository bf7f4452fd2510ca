//! The scene: everything that decides the pixels, as one serde value with a format version.
//!
//! The page, the command line and (later) share links all start from [`Scene::default`] and
//! exchange scenes as JSON, so the defaults exist exactly once. Scenes from outside (files,
//! links, the page) go through [`Scene::from_json`], which validates every field and never
//! panics; a bad scene is refused whole and the caller keeps its previous one.

use crate::geometry::camera::Camera;
use crate::geometry::shapes::Shape;
use crate::geometry::vertex_buffer::PolygonMode;
use crate::scene::settings::{
    DifferenceSettings, MeshSource, NormalSettings, PanelSize, ShadingMode, MAX_PANEL_SIDE,
};
use crate::shading::color::parse_hex;
use crate::shading::lighting::{Light, LightKind, Material, ReflectionModel, MAX_LIGHTS};
use glam::Quat;
use serde::{Deserialize, Serialize};
use std::fmt;

/// The scene format version written by this build.
pub const SCENE_VERSION: u32 = 1;

/// Everything that decides the pixels.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(default, deny_unknown_fields)]
pub struct Scene {
    /// Format version, 1..=[`SCENE_VERSION`].
    pub version: u32,
    /// The mesh.
    pub mesh: MeshSource,
    /// Vertex normals.
    pub normals: NormalSettings,
    /// How faces of more than three corners are drawn (split into triangles or filled whole).
    #[serde(alias = "triangulation")]
    pub polygons: PolygonMode,
    /// Subdivision of the mesh before drawing (none by default).
    pub subdivision: crate::geometry::subdivide::Subdivision,
    /// The camera.
    pub camera: Camera,
    /// The mesh's rotation as a quaternion (x, y, z, w); normalised on use.
    pub rotation: [f32; 4],
    /// Up to [`MAX_LIGHTS`] lights, fixed in world space.
    pub lights: Vec<Light>,
    /// Ambient light colour, sRGB `#rrggbb`.
    pub ambient_light: String,
    /// The surface.
    pub material: Material,
    /// Specular reflection model.
    pub model: ReflectionModel,
    /// Skip faces turned away from the camera.
    pub cull_back_faces: bool,
    /// Perspective-correct interpolation (false: screen-affine, for comparison).
    pub perspective_correct: bool,
    /// Size of each panel.
    pub panel: PanelSize,
    /// Background colour, sRGB `#rrggbb`.
    pub background: String,
    /// What the difference view compares and how it is scaled.
    pub difference: DifferenceSettings,
}

impl Default for Scene {
    /// The built-in demo: a glossy glazed-ceramic sphere of few triangles under a warm key
    /// light and a cool fill, where per-vertex lighting visibly loses the highlight.
    fn default() -> Self {
        Scene {
            version: SCENE_VERSION,
            mesh: MeshSource::Shape(Shape::Icosphere { level: 2 }),
            normals: NormalSettings::default(),
            polygons: PolygonMode::AsAuthored,
            subdivision: crate::geometry::subdivide::Subdivision::default(),
            camera: Camera::default(),
            rotation: [0.0, 0.0, 0.0, 1.0],
            lights: vec![
                Light {
                    kind: LightKind::Directional,
                    azimuth_deg: 35.0,
                    elevation_deg: 30.0,
                    color: "#fff4e0".into(),
                    intensity: 1.0,
                    ..Light::default()
                },
                Light {
                    kind: LightKind::Point,
                    azimuth_deg: -70.0,
                    elevation_deg: -10.0,
                    distance: 3.0,
                    color: "#9fc3ff".into(),
                    intensity: 0.5,
                    falloff: 0.05,
                },
            ],
            ambient_light: "#ffffff".into(),
            material: Material::default(),
            model: ReflectionModel::BlinnPhong,
            cull_back_faces: true,
            perspective_correct: true,
            panel: PanelSize::default(),
            background: "#1b1d22".into(),
            difference: DifferenceSettings::default(),
        }
    }
}

/// Why a scene was refused.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct SceneError(pub String);

impl fmt::Display for SceneError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.0)
    }
}

impl std::error::Error for SceneError {}

// The checks below take the field's name as `impl Display` so that a valid scene is checked
// without formatting (and allocating) any message: the page validates every frame.

fn finite(name: impl fmt::Display, v: f32) -> Result<(), SceneError> {
    if v.is_finite() {
        Ok(())
    } else {
        Err(SceneError(format!("{name} must be a finite number")))
    }
}

fn in_range(name: impl fmt::Display, v: f32, lo: f32, hi: f32) -> Result<(), SceneError> {
    if (lo..=hi).contains(&v) {
        Ok(())
    } else {
        Err(SceneError(format!(
            "{name} must be between {lo} and {hi}, not {v}"
        )))
    }
}

/// "light N field", formatted only when a message is needed.
struct LightField(usize, &'static str);

impl fmt::Display for LightField {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "light {} {}", self.0 + 1, self.1)
    }
}

fn colour(name: impl fmt::Display, v: &str) -> Result<(), SceneError> {
    parse_hex(v)
        .map(|_| ())
        .map_err(|e| SceneError(format!("{name}: {e}")))
}

impl Scene {
    /// Parses and validates a scene from JSON; missing fields take their defaults.
    ///
    /// # Errors
    /// A message naming the problem (syntax with line and column, unknown field, value out
    /// of range).
    pub fn from_json(text: &str) -> Result<Scene, SceneError> {
        let scene: Scene =
            serde_json::from_str(text).map_err(|e| SceneError(format!("scene JSON: {e}")))?;
        scene.validate()?;
        Ok(scene)
    }

    /// The scene as pretty JSON.
    pub fn to_json(&self) -> String {
        // Serialising plain data with string keys cannot fail.
        serde_json::to_string_pretty(self).unwrap_or_default()
    }

    /// Checks every field's range.
    ///
    /// # Errors
    /// The first problem found.
    pub fn validate(&self) -> Result<(), SceneError> {
        if self.version == 0 || self.version > SCENE_VERSION {
            return Err(SceneError(format!(
                "scene version {} is not supported (this build reads 1 to {SCENE_VERSION})",
                self.version
            )));
        }
        match &self.mesh {
            MeshSource::Shape(s) => s.validate().map_err(SceneError)?,
            MeshSource::File { name } => {
                if name.is_empty() {
                    return Err(SceneError("mesh file name is empty".into()));
                }
            }
        }
        in_range("crease angle", self.normals.crease_deg, 0.0, 180.0)?;
        if self.subdivision.levels > crate::geometry::subdivide::MAX_LEVELS {
            return Err(SceneError(format!(
                "subdivision has at most {} levels, not {}",
                crate::geometry::subdivide::MAX_LEVELS,
                self.subdivision.levels
            )));
        }
        self.camera.validate().map_err(SceneError)?;
        for (i, v) in self.rotation.iter().enumerate() {
            finite(format_args!("rotation[{i}]"), *v)?;
        }
        if self.rotation.iter().map(|v| v * v).sum::<f32>() < 1e-12 {
            return Err(SceneError("rotation quaternion has zero length".into()));
        }
        if self.lights.len() > MAX_LIGHTS {
            return Err(SceneError(format!(
                "at most {MAX_LIGHTS} lights, not {}",
                self.lights.len()
            )));
        }
        for (i, l) in self.lights.iter().enumerate() {
            let n = |f: &'static str| LightField(i, f);
            finite(n("azimuth"), l.azimuth_deg)?;
            in_range(n("elevation"), l.elevation_deg, -90.0, 90.0)?;
            in_range(n("distance"), l.distance, 0.0, 1000.0)?;
            in_range(n("intensity"), l.intensity, 0.0, 100.0)?;
            in_range(n("falloff"), l.falloff, 0.0, 100.0)?;
            colour(n("colour"), &l.color)?;
        }
        colour("ambient light", &self.ambient_light)?;
        colour("background", &self.background)?;
        let m = &self.material;
        colour("base colour", &m.base_color)?;
        colour("emissive colour", &m.emissive)?;
        in_range("ambient", m.ambient, 0.0, 10.0)?;
        in_range("diffuse", m.diffuse, 0.0, 10.0)?;
        in_range("specular", m.specular, 0.0, 10.0)?;
        in_range("shininess", m.shininess, 1.0, 2048.0)?;
        in_range("emissive strength", m.emissive_strength, 0.0, 100.0)?;
        let d = &self.difference;
        in_range("difference threshold", d.threshold, 0.01, 100.0)?;
        in_range("difference scale", d.scale_max, 0.1, 200.0)?;
        if d.pair[0] == d.pair[1] || d.pair.contains(&ShadingMode::Flat) {
            return Err(SceneError(
                "the difference view compares two different shadings among gouraud, phong and exact"
                    .into(),
            ));
        }
        for (name, v) in [
            ("panel width", self.panel.width),
            ("panel height", self.panel.height),
        ] {
            if !(1..=MAX_PANEL_SIDE).contains(&v) {
                return Err(SceneError(format!(
                    "{name} must be 1 to {MAX_PANEL_SIDE} pixels, not {v}"
                )));
            }
        }
        Ok(())
    }

    /// True when `self` and `other` draw the same shading panels: every field but the
    /// difference settings (which only change the comparison) is equal.
    pub fn same_panels(&self, other: &Scene) -> bool {
        // Destructured in full so that a new field cannot be forgotten here.
        let Scene {
            version,
            mesh,
            normals,
            polygons,
            subdivision,
            camera,
            rotation,
            lights,
            ambient_light,
            material,
            model,
            cull_back_faces,
            perspective_correct,
            panel,
            background,
            difference: _,
        } = self;
        *version == other.version
            && *mesh == other.mesh
            && *normals == other.normals
            && *polygons == other.polygons
            && *subdivision == other.subdivision
            && *camera == other.camera
            && *rotation == other.rotation
            && *lights == other.lights
            && *ambient_light == other.ambient_light
            && *material == other.material
            && *model == other.model
            && *cull_back_faces == other.cull_back_faces
            && *perspective_correct == other.perspective_correct
            && *panel == other.panel
            && *background == other.background
    }

    /// The mesh rotation, normalised (identity if it cannot be).
    pub fn rotation_quat(&self) -> Quat {
        let [x, y, z, w] = self.rotation;
        normalized(Quat::from_xyzw(x, y, z, w))
    }

    /// Sets the rotation from a quaternion (stored normalised).
    pub fn set_rotation(&mut self, q: Quat) {
        let q = normalized(q);
        self.rotation = [q.x, q.y, q.z, q.w];
    }
}

/// `q / |q|`, or the identity when `q` has no usable length.
fn normalized(q: Quat) -> Quat {
    let len = q.length();
    if len > 0.0 && len.is_finite() {
        q * (1.0 / len)
    } else {
        Quat::IDENTITY
    }
}

impl Scene {
    /// Turns the mesh by `right_deg` about the screen's vertical axis and by `down_deg` about
    /// its horizontal axis (as a drag to the right and down would), in world space, so the
    /// turn follows the view however the camera orbits or rolls.
    pub fn turn(&mut self, right_deg: f32, down_deg: f32) {
        let frame = self
            .camera
            .frame(self.panel.width as f32 / self.panel.height.max(1) as f32);
        // Rows of the view rotation are the camera's right and up axes in world space.
        let right = frame.view.row(0).truncate();
        let up = frame.view.row(1).truncate();
        let q = axis_angle(up, right_deg) * axis_angle(right, down_deg) * self.rotation_quat();
        self.set_rotation(q);
    }
}

/// Rotation by `deg` degrees about `axis` (unit), through `libm`.
pub fn axis_angle(axis: glam::Vec3, deg: f32) -> Quat {
    let half = 0.5 * deg.to_radians();
    let (s, c) = (libm::sinf(half), libm::cosf(half));
    Quat::from_xyzw(axis.x * s, axis.y * s, axis.z * s, c)
}

impl Scene {
    /// The fixed benchmark scene (shared/peers/SCENE.md, "BENCH SCENE v1"): icosphere of
    /// `level`, camera at distance 3 with a 45-degree vertical field of view, Blinn-Phong 64,
    /// a white directional light along (1, 1, 1) and a 0.8 grey point light at (2, 1, 2)
    /// falling off as 1 / (1 + 0.1 d^2), a dark red base, black background, turned `frame`
    /// degrees about +y. (The base colour is the sRGB code nearest to linear (0.6, 0.1, 0.1).)
    pub fn bench(level: u32, width: u32, height: u32, frame: u32) -> Scene {
        let mut s = Scene {
            mesh: MeshSource::Shape(Shape::Icosphere { level }),
            panel: PanelSize { width, height },
            background: "#000000".into(),
            ..Scene::default()
        };
        let elevation = |y: f32, len: f32| libm::asinf(y / len).to_degrees();
        s.lights = vec![
            Light {
                kind: LightKind::Directional,
                azimuth_deg: 45.0,
                elevation_deg: elevation(1.0, 3.0f32.sqrt()),
                color: "#ffffff".into(),
                intensity: 1.0,
                ..Light::default()
            },
            Light {
                kind: LightKind::Point,
                azimuth_deg: 45.0,
                elevation_deg: elevation(1.0, 3.0),
                distance: 3.0,
                color: "#ffffff".into(),
                intensity: 0.8,
                falloff: 0.1,
            },
        ];
        s.material = Material {
            base_color: "#cb5959".into(),
            ambient: 0.05,
            diffuse: 1.0,
            specular: 0.5,
            shininess: 64.0,
            ..Material::default()
        };
        s.set_rotation(axis_angle(glam::Vec3::Y, frame as f32));
        s
    }
}

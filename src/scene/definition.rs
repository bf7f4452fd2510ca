//! The scene: everything that decides the pixels, as one serde value with a format version.
//!
//! The page, the command line and (later) share links all start from [`Scene::default`] and
//! exchange scenes as JSON, so the defaults exist exactly once. Scenes from outside (files,
//! links, the page) go through [`Scene::from_json`], which validates every field and never
//! panics; a bad scene is refused whole and the caller keeps its previous one.

use crate::geometry::camera::Camera;
use crate::geometry::shapes::Shape;
use crate::geometry::subdivide::{Subdivision, MAX_LEVELS};
use crate::geometry::vertex_buffer::PolygonMode;
use crate::scene::formats::{self, RENDERER_REVISION};
use crate::scene::settings::{
    DifferenceSettings, MaterialSource, MeshSource, NormalSettings, PanelSize, ShadingMode,
    MAX_PANEL_SIDE,
};
use crate::shading::color::Rgb;
use crate::shading::lighting::{Light, LightKind, Material, ReflectionModel, MAX_LIGHTS};
use glam::Quat;
use schemars::JsonSchema;
use serde::{Deserialize, Serialize};
use std::fmt;

/// The lowest exposure, in stops.
pub const MIN_EXPOSURE_EV: f32 = -10.0;
/// The highest exposure, in stops.
pub const MAX_EXPOSURE_EV: f32 = 10.0;

/// The scene format version written by this build (see [`FORMAT`](crate::scene::FORMAT)).
pub const SCENE_VERSION: u32 = formats::FORMAT;

/// Everything that decides the pixels.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
#[serde(default, deny_unknown_fields)]
pub struct Scene {
    /// Format version, 1..=[`SCENE_VERSION`].
    #[schemars(range(min = 1, max = SCENE_VERSION))]
    pub version: u32,
    /// The mesh.
    pub mesh: MeshSource,
    /// Vertex normals.
    pub normals: NormalSettings,
    /// How faces of more than three corners are drawn (split into triangles or filled whole).
    #[serde(alias = "triangulation")]
    pub polygons: PolygonMode,
    /// Subdivision of the mesh before drawing (none by default).
    pub subdivision: Subdivision,
    /// The camera.
    pub camera: Camera,
    /// The mesh's rotation as a quaternion (x, y, z, w); normalised on use.
    pub rotation: [f32; 4],
    /// Up to [`MAX_LIGHTS`] lights, fixed in world space.
    #[schemars(length(max = MAX_LIGHTS))]
    pub lights: Vec<Light>,
    /// Ambient light colour, sRGB `#rrggbb`.
    pub ambient_light: Rgb,
    /// Exposure in stops: every light (and the emission) is scaled by 2^`exposure_ev` before
    /// the sRGB encoding, so bright highlights can be brought below clipping. 0 keeps the
    /// stated light units (a white Lambertian surface facing a unit light at 1.0).
    #[schemars(range(min = MIN_EXPOSURE_EV, max = MAX_EXPOSURE_EV))]
    pub exposure_ev: f32,
    /// The surface.
    pub material: Material,
    /// A mesh file's own materials (`file`, where it has any) or this scene's (`scene`).
    pub material_source: MaterialSource,
    /// Vertex colours of a mesh file (glTF `COLOR_0`, PLY `red green blue`, OBJ
    /// `v x y z r g b`) multiply the base colour; false ignores them.
    pub vertex_colors: bool,
    /// Specular reflection model.
    pub model: ReflectionModel,
    /// Skip faces turned away from the camera.
    pub cull_back_faces: bool,
    /// Perspective-correct interpolation (false: screen-affine, for comparison).
    pub perspective_correct: bool,
    /// Size of each panel.
    pub panel: PanelSize,
    /// Background colour, sRGB `#rrggbb`.
    pub background: Rgb,
    /// What the difference view compares and how it is scaled.
    pub difference: DifferenceSettings,
    /// The renderer revision the scene was made under, 1..=[`RENDERER_REVISION`] (see
    /// [`revision_notice`](crate::scene::revision_notice)).
    #[schemars(range(min = 1, max = RENDERER_REVISION))]
    pub renderer: u32,
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
            subdivision: Subdivision::default(),
            camera: Camera::default(),
            rotation: [0.0, 0.0, 0.0, 1.0],
            lights: vec![
                Light {
                    kind: LightKind::Directional,
                    azimuth_deg: 35.0,
                    elevation_deg: 30.0,
                    color: Rgb::hex("#fff4e0"),
                    intensity: 1.0,
                    ..Light::default()
                },
                Light {
                    kind: LightKind::Point,
                    azimuth_deg: -70.0,
                    elevation_deg: -10.0,
                    distance: 3.0,
                    color: Rgb::hex("#9fc3ff"),
                    intensity: 0.5,
                    falloff: 0.05,
                },
            ],
            ambient_light: Rgb::hex("#ffffff"),
            exposure_ev: 0.0,
            material: Material::default(),
            material_source: MaterialSource::File,
            vertex_colors: true,
            model: ReflectionModel::BlinnPhong,
            cull_back_faces: true,
            perspective_correct: true,
            panel: PanelSize::default(),
            background: Rgb::hex("#1b1d22"),
            difference: DifferenceSettings::default(),
            renderer: RENDERER_REVISION,
        }
    }
}

/// Why a scene was refused. The messages are written for the person who gave the scene.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum SceneError {
    /// The text is not a scene: JSON syntax, a wrong type, a malformed colour or an unknown
    /// field (the parser's message, with line and column).
    Syntax(String),
    /// A format version this build does not read.
    Version(u32),
    /// A field is out of range or does not fit another.
    Field {
        /// The field's path in the scene JSON, e.g. `lights[0].intensity`.
        path: String,
        /// What is wrong, naming the field as the page does.
        message: String,
    },
}

impl fmt::Display for SceneError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            SceneError::Syntax(m) => write!(f, "scene JSON: {m}"),
            SceneError::Version(v) => write!(
                f,
                "scene version {v} is not supported (this build reads 1 to {SCENE_VERSION})"
            ),
            SceneError::Field { message, .. } => f.write_str(message),
        }
    }
}

impl std::error::Error for SceneError {}

/// A field as the checks name it: its label in messages and its path in the JSON. Both are
/// formatted only when a message is needed, so a valid scene is checked without allocating
/// (the page validates on every edit).
trait FieldName {
    fn label(&self) -> String;
    fn path(&self) -> String;
    fn error(&self, problem: fmt::Arguments<'_>) -> SceneError {
        SceneError::Field {
            path: self.path(),
            message: format!("{} {problem}", self.label()),
        }
    }
}

/// A top-level field: (label, path).
impl FieldName for (&str, &str) {
    fn label(&self) -> String {
        self.0.to_string()
    }
    fn path(&self) -> String {
        self.1.to_string()
    }
}

/// A field of light `.0`: its label `.1` ("light N label", counted from 1) and JSON name `.2`.
struct LightField(usize, &'static str, &'static str);

impl FieldName for LightField {
    fn label(&self) -> String {
        format!("light {} {}", self.0 + 1, self.1)
    }
    fn path(&self) -> String {
        format!("lights[{}].{}", self.0, self.2)
    }
}

fn finite(name: impl FieldName, v: f32) -> Result<(), SceneError> {
    if v.is_finite() {
        Ok(())
    } else {
        Err(name.error(format_args!("must be a finite number")))
    }
}

fn in_range(name: impl FieldName, v: f32, lo: f32, hi: f32) -> Result<(), SceneError> {
    if (lo..=hi).contains(&v) {
        Ok(())
    } else {
        Err(name.error(format_args!("must be between {lo} and {hi}, not {v}")))
    }
}

/// Component `.0` of the rotation quaternion.
struct RotationField(usize);

impl FieldName for RotationField {
    fn label(&self) -> String {
        format!("rotation[{}]", self.0)
    }
    fn path(&self) -> String {
        self.label()
    }
}

/// A message from a settings type's own check, placed at `path`.
fn at(path: &str) -> impl Fn(String) -> SceneError + '_ {
    move |message| SceneError::Field {
        path: path.to_string(),
        message,
    }
}

impl Scene {
    /// Parses and validates a scene from JSON; missing fields take their defaults.
    ///
    /// # Errors
    /// A message naming the problem (syntax with line and column, unknown field, value out
    /// of range).
    ///
    /// Missing fields take the defaults of the file's `version` (1 when it has none), frozen
    /// in the source (`src/scene/formats.rs`), so a scene file means the same in every later
    /// build.
    pub fn from_json(text: &str) -> Result<ValidScene, SceneError> {
        // Parsed straight into a scene first, for messages with line and column.
        let direct: Scene =
            serde_json::from_str(text).map_err(|e| SceneError::Syntax(e.to_string()))?;
        let given: serde_json::Value =
            serde_json::from_str(text).map_err(|e| SceneError::Syntax(e.to_string()))?;
        let version = if given.get("version").is_some() {
            direct.version
        } else {
            1
        };
        let Some(mut value) = formats::defaults(version) else {
            return Err(SceneError::Version(version));
        };
        formats::merge(&mut value, given);
        let mut scene: Scene =
            serde_json::from_value(value).map_err(|e| SceneError::Syntax(e.to_string()))?;
        // Complete now: every field is explicit, so it is a scene of this build's format.
        scene.version = SCENE_VERSION;
        scene.validated()
    }

    /// The scene as pretty JSON.
    pub fn to_json(&self) -> String {
        // Serialising plain data with string keys cannot fail.
        serde_json::to_string_pretty(self).unwrap_or_default()
    }

    /// Checks every field's range and turns the scene into a [`ValidScene`], the only kind the
    /// pipeline draws.
    ///
    /// # Errors
    /// The first problem found.
    pub fn validated(self) -> Result<ValidScene, SceneError> {
        self.validate()?;
        Ok(ValidScene(self))
    }

    /// A validated copy (see [`Scene::validated`]).
    ///
    /// # Errors
    /// The first problem found.
    pub fn checked(&self) -> Result<ValidScene, SceneError> {
        self.clone().validated()
    }

    /// Checks every field's range.
    ///
    /// # Errors
    /// The first problem found.
    pub fn validate(&self) -> Result<(), SceneError> {
        if self.version == 0 || self.version > SCENE_VERSION {
            return Err(SceneError::Version(self.version));
        }
        match &self.mesh {
            MeshSource::Shape(s) => s.validate().map_err(at("mesh.shape"))?,
            MeshSource::File { name } => {
                if name.is_empty() {
                    return Err(at("mesh.file.name")("mesh file name is empty".into()));
                }
            }
        }
        in_range(
            ("crease angle", "normals.crease_deg"),
            self.normals.crease_deg,
            0.0,
            180.0,
        )?;
        if self.subdivision.levels > MAX_LEVELS {
            return Err(at("subdivision.levels")(format!(
                "subdivision has at most {MAX_LEVELS} levels, not {}",
                self.subdivision.levels
            )));
        }
        self.camera.validate().map_err(at("camera"))?;
        in_range(
            ("exposure", "exposure_ev"),
            self.exposure_ev,
            MIN_EXPOSURE_EV,
            MAX_EXPOSURE_EV,
        )?;
        for (i, v) in self.rotation.iter().enumerate() {
            finite(RotationField(i), *v)?;
        }
        if self.rotation.iter().map(|v| v * v).sum::<f32>() < 1e-12 {
            return Err(at("rotation")("rotation quaternion has zero length".into()));
        }
        if self.lights.len() > MAX_LIGHTS {
            return Err(at("lights")(format!(
                "at most {MAX_LIGHTS} lights, not {}",
                self.lights.len()
            )));
        }
        for (i, l) in self.lights.iter().enumerate() {
            finite(LightField(i, "azimuth", "azimuth_deg"), l.azimuth_deg)?;
            in_range(
                LightField(i, "elevation", "elevation_deg"),
                l.elevation_deg,
                -90.0,
                90.0,
            )?;
            in_range(
                LightField(i, "distance", "distance"),
                l.distance,
                0.0,
                1000.0,
            )?;
            in_range(
                LightField(i, "intensity", "intensity"),
                l.intensity,
                0.0,
                100.0,
            )?;
            in_range(LightField(i, "falloff", "falloff"), l.falloff, 0.0, 100.0)?;
        }
        let m = &self.material;
        in_range(("ambient", "material.ambient"), m.ambient, 0.0, 10.0)?;
        in_range(("diffuse", "material.diffuse"), m.diffuse, 0.0, 10.0)?;
        in_range(("specular", "material.specular"), m.specular, 0.0, 10.0)?;
        in_range(
            ("shininess", "material.shininess"),
            m.shininess,
            1.0,
            2048.0,
        )?;
        in_range(("roughness", "material.roughness"), m.roughness, 0.0, 1.0)?;
        in_range(("metallic", "material.metallic"), m.metallic, 0.0, 1.0)?;
        in_range(
            ("emissive strength", "material.emissive_strength"),
            m.emissive_strength,
            0.0,
            100.0,
        )?;
        let d = &self.difference;
        in_range(
            ("difference threshold", "difference.threshold"),
            d.threshold,
            0.01,
            100.0,
        )?;
        in_range(
            ("difference scale", "difference.scale_max"),
            d.scale_max,
            0.1,
            200.0,
        )?;
        if d.pair[0] == d.pair[1] || d.pair.contains(&ShadingMode::Flat) {
            return Err(at("difference.pair")(
                "the difference view compares two different shadings among gouraud, phong and exact"
                    .into(),
            ));
        }
        if !(1..=RENDERER_REVISION).contains(&self.renderer) {
            return Err(at("renderer")(format!(
                "renderer revision {} is not one this build knows (1 to {RENDERER_REVISION})",
                self.renderer
            )));
        }
        for (name, path, v) in [
            ("panel width", "panel.width", self.panel.width),
            ("panel height", "panel.height", self.panel.height),
        ] {
            if !(1..=MAX_PANEL_SIDE).contains(&v) {
                return Err(at(path)(format!(
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
            exposure_ev,
            material,
            material_source,
            vertex_colors,
            model,
            cull_back_faces,
            perspective_correct,
            panel,
            background,
            difference: _,
            renderer: _,
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
            && *exposure_ev == other.exposure_ev
            && *material == other.material
            && *vertex_colors == other.vertex_colors
            && *material_source == other.material_source
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

/// A scene that passed [`Scene::validate`]: the only kind the pipeline and the analysis
/// take, so they never meet a value out of range and never re-check one.
///
/// Made by [`Scene::validated`], [`Scene::from_json`], link decoding or deserialisation (which
/// validates); read through `Deref`; changed only by the methods below, which keep it valid,
/// or by [`ValidScene::edit`], which validates the result.
#[derive(Clone, Debug, PartialEq, Serialize)]
#[serde(transparent)]
pub struct ValidScene(Scene);

impl ValidScene {
    /// The scene.
    pub fn scene(&self) -> &Scene {
        &self.0
    }

    /// The scene, to change and validate again.
    pub fn into_scene(self) -> Scene {
        self.0
    }

    /// A changed copy, validated.
    ///
    /// # Errors
    /// When the change leaves a field out of range (the original is untouched).
    pub fn edit(&self, change: impl FnOnce(&mut Scene)) -> Result<ValidScene, SceneError> {
        let mut s = self.0.clone();
        change(&mut s);
        s.validated()
    }

    /// Sets the rotation (stored normalised; a quaternion without a usable length becomes the
    /// identity), which keeps the scene valid.
    pub fn set_rotation(&mut self, q: Quat) {
        self.0.set_rotation(q);
    }

    /// Sets the camera's roll in degrees; a non-finite angle leaves it as it is.
    pub fn set_roll(&mut self, deg: f32) {
        if deg.is_finite() {
            self.0.camera.roll_deg = deg;
        }
    }

    /// Turns the mesh as [`Scene::turn`] does; non-finite angles leave it as it is.
    pub fn turn(&mut self, right_deg: f32, down_deg: f32) {
        if right_deg.is_finite() && down_deg.is_finite() {
            self.0.turn(right_deg, down_deg);
        }
    }
}

impl Default for ValidScene {
    /// The built-in default scene (valid: a test checks it).
    fn default() -> Self {
        ValidScene(Scene::default())
    }
}

impl std::ops::Deref for ValidScene {
    type Target = Scene;
    fn deref(&self) -> &Scene {
        &self.0
    }
}

impl PartialEq<Scene> for ValidScene {
    fn eq(&self, other: &Scene) -> bool {
        self.0 == *other
    }
}

impl<'de> Deserialize<'de> for ValidScene {
    /// Deserialises a [`Scene`] and validates it; a refusal is the deserialiser's error with
    /// the validation message.
    fn deserialize<D: serde::Deserializer<'de>>(d: D) -> Result<ValidScene, D::Error> {
        Scene::deserialize(d)?
            .validated()
            .map_err(serde::de::Error::custom)
    }
}

/// `q / |q|`, or the identity when `q` has no usable length.
fn normalized(q: Quat) -> Quat {
    let len = q.length();
    let unit = q * (1.0 / len);
    if len > 0.0 && len.is_finite() && unit.is_finite() {
        unit
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
    /// The fixed benchmark scene (docs/REFERENCES.md, "The benchmark scene"): icosphere of
    /// `level`, camera at distance 3 with a 45-degree vertical field of view, Blinn-Phong 64,
    /// a white directional light along (1, 1, 1) and a 0.8 grey point light at (2, 1, 2)
    /// falling off as 1 / (1 + 0.1 d^2), a dark red base, black background, turned `frame`
    /// degrees about +y. (The base colour is the sRGB code nearest to linear (0.6, 0.1, 0.1).)
    pub fn benchmark(level: u32, width: u32, height: u32, frame: u32) -> Scene {
        let mut s = Scene {
            mesh: MeshSource::Shape(Shape::Icosphere { level }),
            panel: PanelSize { width, height },
            background: Rgb::hex("#000000"),
            ..Scene::default()
        };
        let elevation = |y: f32, len: f32| libm::asinf(y / len).to_degrees();
        s.lights = vec![
            Light {
                kind: LightKind::Directional,
                azimuth_deg: 45.0,
                elevation_deg: elevation(1.0, 3.0f32.sqrt()),
                color: Rgb::hex("#ffffff"),
                intensity: 1.0,
                ..Light::default()
            },
            Light {
                kind: LightKind::Point,
                azimuth_deg: 45.0,
                elevation_deg: elevation(1.0, 3.0),
                distance: 3.0,
                color: Rgb::hex("#ffffff"),
                intensity: 0.8,
                falloff: 0.1,
            },
        ];
        s.material = Material {
            base_color: Rgb::hex("#cb5959"),
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

//! The scene: every setting that decides the pixels as one typed, validated value, its
//! settings types, links that carry it in a URL fragment, the built-in presets and the
//! published JSON Schema.

pub(crate) mod definition;
pub(crate) mod formats;
pub(crate) mod link;
pub(crate) mod presets;
pub(crate) mod schema;
pub(crate) mod settings;

pub use definition::{
    axis_angle, Scene, SceneError, ValidScene, MAX_EXPOSURE_EV, MIN_EXPOSURE_EV, SCENE_VERSION,
};
pub use formats::{revision_notice, FORMAT, RENDERER_REVISION};
pub use link::{decode, encode, LinkError};
pub use presets::{preset, presets, Preset};
pub use schema::{scene_schema, scene_schema_text};
pub use settings::{
    DifferenceSettings, GltfNormals, MaterialSource, MeshSource, NormalSettings, NormalSource,
    PanelSize, ShadingMode, MAX_PANEL_SIDE,
};

//! The scene: every setting that decides the pixels as one typed, validated value, its
//! settings types, links that carry it in a URL fragment, and the built-in presets.

pub(crate) mod definition;
pub(crate) mod formats;
pub(crate) mod link;
pub(crate) mod presets;
pub(crate) mod settings;

pub use definition::{axis_angle, Scene, SceneError, ValidScene, SCENE_VERSION};
pub use formats::{revision_notice, FORMAT, RENDERER_REVISION};
pub use link::{decode, encode, LinkError};
pub use presets::{preset, presets, Preset};
pub use settings::{
    DifferenceSettings, MeshSource, NormalSettings, NormalSource, PanelSize, ShadingMode,
    MAX_PANEL_SIDE,
};

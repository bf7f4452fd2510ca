//! twinshade: one mesh, light and material lit per vertex (Gouraud) and per pixel (Phong),
//! side by side, rendered on the CPU with bit-identical results natively and in WebAssembly.
//!
//! The core (everything but [`cli`] and `web`) is platform-free Rust: meshes, shading,
//! rasterization, colour and scenes. `web` (wasm32 only) is the one file that talks to
//! JavaScript; [`cli`] (native only) is the command line. See DEVELOPERS.md, "Architecture".
#![warn(missing_docs)]

#[cfg(target_endian = "big")]
compile_error!("twinshade's framebuffers are RGBA bytes in little-endian u32s");

pub mod advisor;
pub mod camera;
pub mod clip;
pub mod color;
pub mod framebuffer;
pub mod import;
pub mod lanes;
pub mod lighting;
pub mod measure;
pub mod mesh;
pub mod normals;
pub mod plot;
pub mod presets;
pub mod raster;
pub mod render;
pub mod scanline;
pub mod scene;
pub mod shapes;
pub mod share;
pub mod sheet;
pub mod subdivide;
pub mod surface;
pub mod sweep;
pub mod vertex_buffer;
pub mod workbench;

#[cfg(not(target_arch = "wasm32"))]
pub mod cli;
#[cfg(target_arch = "wasm32")]
mod web;

pub use framebuffer::Framebuffer;
pub use mesh::Mesh;
pub use render::{PanelStats, Renderer, ShadingMode};
pub use scene::{Scene, SceneError};
pub use workbench::{FrameReport, Panel, Workbench};

//! twinshade: one mesh, light and material lit per vertex (Gouraud) and per pixel (Phong),
//! side by side, rendered on the CPU with bit-identical results natively and in WebAssembly.
//!
//! The library is the pipeline, in folders that depend one way only (docs/ARCHITECTURE.md):
//! [`geometry`] and [`draw`] at the bottom, then [`shading`], [`scene`], [`pipeline`] and
//! [`analysis`]. `web` (wasm32 only) is the one file that talks to JavaScript; the native
//! command line is the `twinshade` binary (`src/main.rs` and `src/cli/`), outside the library.
#![warn(missing_docs)]

#[cfg(target_endian = "big")]
compile_error!("twinshade's framebuffers are RGBA bytes in little-endian u32s");

pub mod analysis;
pub mod draw;
pub mod geometry;
pub mod pipeline;
pub mod scene;
pub mod shading;

#[cfg(target_arch = "wasm32")]
mod web;

pub use analysis::{FrameReport, Panel, Workbench};
pub use geometry::Mesh;
pub use pipeline::{Framebuffer, PanelStats, PrepareError, Renderer};
pub use scene::{Scene, SceneError, ShadingMode, ValidScene};

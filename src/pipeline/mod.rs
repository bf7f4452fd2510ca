//! The pipeline from a scene to pixels: vertex transform, clipping, one rasterizer for every
//! shading mode (fixed-point edge functions, top-left rule), Gouraud's scanline polygon fill,
//! the fragment shaders, framebuffers, and surface probes evaluated with the same formulas.

pub(crate) mod clip;
pub(crate) mod framebuffer;
pub(crate) mod raster;
pub(crate) mod render;
pub(crate) mod scanline;
pub(crate) mod shaders;
pub(crate) mod surface;
pub(crate) mod vertex_stage;

pub use clip::{outcode, ClipPolygon, ClipVertex, GUARD, MAX_CLIPPED};
pub use framebuffer::Framebuffer;
pub use raster::{
    draw_triangle, fill, sample_triangle, snap_xy, Batch, Coverage, Cull, FragmentShader, Pixel,
    RasterVertex, Target, SUBPIXEL_BITS,
};
pub use render::{file_material, FileMaterialCounts, PanelStats, PrepareError, Renderer};
pub use scanline::{fill_polygon, sample_polygon};
pub use surface::{linear_luminance, SurfacePoint};
pub use vertex_stage::{project, StageKey, VertexStage};

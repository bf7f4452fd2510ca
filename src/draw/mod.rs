//! Drawing for exports: RGBA images, bitmap text and plots (SVG and raster). Knows nothing of
//! scenes or rendering; sheets that combine panels live with the analysis that fills them.

pub(crate) mod image;
pub(crate) mod plot;
pub(crate) mod text;

pub use image::Image;
pub use plot::{Plot, Rule, Series, PANEL_COLORS};
pub use text::{glyph, GLYPH};

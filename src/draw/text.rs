//! Text for images: the public-domain 8x8 bitmap glyphs of the `font8x8` crate.
//!
//! Bitmap glyphs scaled by an integer factor keep every image the same bytes on every
//! platform (no font rasterizer, no system fonts).

use font8x8::BASIC_UNICODE;

/// Width and height of one glyph in pixels at scale 1.
pub const GLYPH: usize = 8;

/// The glyph of `ch`: eight rows, bit `c` of row `r` set where column `c` is inked. Characters
/// outside ASCII are drawn as '?'.
pub fn glyph(ch: char) -> [u8; 8] {
    let code = if ch.is_ascii() {
        ch as usize
    } else {
        '?' as usize
    };
    BASIC_UNICODE[code].byte_array()
}

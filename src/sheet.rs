//! Contact sheets: panels side by side with their labels, as one RGBA image.
//!
//! Text is drawn from the public-domain 8x8 bitmap glyphs of the `font8x8` crate, scaled by an
//! integer factor, so a sheet is the same bytes on every platform (no font rasterizer, no
//! system fonts).

use crate::framebuffer::Framebuffer;
use font8x8::BASIC_UNICODE;

/// An RGBA8 image, rows top to bottom, no padding.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Image {
    /// Width in pixels.
    pub width: usize,
    /// Height in pixels.
    pub height: usize,
    /// `width * height * 4` bytes.
    pub rgba: Vec<u8>,
}

impl Image {
    /// An image filled with one colour.
    pub fn filled(width: usize, height: usize, rgba: [u8; 4]) -> Image {
        let mut data = Vec::with_capacity(width * height * 4);
        for _ in 0..width * height {
            data.extend_from_slice(&rgba);
        }
        Image {
            width,
            height,
            rgba: data,
        }
    }

    /// Copies a framebuffer's pixels with their top-left corner at (x, y), clipped.
    pub fn blit(&mut self, fb: &Framebuffer, x: usize, y: usize) {
        let src = fb.bytes();
        for row in 0..fb.height() {
            let ty = y + row;
            if ty >= self.height || x >= self.width {
                break;
            }
            let n = fb.width().min(self.width - x) * 4;
            let s = row * fb.width() * 4;
            let d = (ty * self.width + x) * 4;
            self.rgba[d..d + n].copy_from_slice(&src[s..s + n]);
        }
    }

    /// Draws ASCII text (other characters as '?') with its top-left corner at (x, y), each
    /// glyph 8 x 8 pixels times `scale`. Clipped to the image.
    pub fn text(&mut self, text: &str, x: usize, y: usize, scale: usize, rgba: [u8; 4]) {
        for (i, ch) in text.chars().enumerate() {
            let code = if ch.is_ascii() {
                ch as usize
            } else {
                '?' as usize
            };
            let glyph = BASIC_UNICODE[code].byte_array();
            let gx = x + i * 8 * scale;
            for (row, bits) in glyph.iter().enumerate() {
                for col in 0..8 {
                    if bits >> col & 1 == 0 {
                        continue;
                    }
                    for dy in 0..scale {
                        for dx in 0..scale {
                            self.put(gx + col * scale + dx, y + row * scale + dy, rgba);
                        }
                    }
                }
            }
        }
    }

    fn put(&mut self, x: usize, y: usize, rgba: [u8; 4]) {
        if x < self.width && y < self.height {
            let i = (y * self.width + x) * 4;
            self.rgba[i..i + 4].copy_from_slice(&rgba);
        }
    }
}

/// Height of the label strip above each panel, in pixels.
pub const LABEL_STRIP: usize = 28;
/// Gap between panels, in pixels.
pub const GAP: usize = 8;

/// Puts panels side by side, each under a label strip, on a dark background.
pub fn sheet(panels: &[(&str, &Framebuffer)]) -> Image {
    let h = panels.iter().map(|(_, f)| f.height()).max().unwrap_or(0);
    let w: usize = panels.iter().map(|(_, f)| f.width()).sum::<usize>() + GAP * (panels.len() + 1);
    let mut img = Image::filled(w, h + LABEL_STRIP + GAP, [18, 19, 23, 255]);
    let mut x = GAP;
    for (label, fb) in panels {
        // Glyphs at twice their size when the label fits above its panel, else actual size.
        let scale = if label.len() * 16 <= fb.width() { 2 } else { 1 };
        img.text(label, x, 8 + 4 * (2 - scale), scale, [232, 234, 240, 255]);
        img.blit(fb, x, LABEL_STRIP);
        x += fb.width() + GAP;
    }
    img
}

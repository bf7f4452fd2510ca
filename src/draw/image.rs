//! RGBA8 images in memory: the canvas that sheets and plots are drawn on.

use crate::draw::text::glyph;

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

    /// Copies `src_width` x `src_height` RGBA8 pixels (rows top to bottom, no padding) with
    /// their top-left corner at (x, y), clipped to the image.
    pub fn blit(&mut self, src: &[u8], src_width: usize, src_height: usize, x: usize, y: usize) {
        for row in 0..src_height {
            let ty = y + row;
            if ty >= self.height || x >= self.width {
                break;
            }
            let n = src_width.min(self.width - x) * 4;
            let s = row * src_width * 4;
            let d = (ty * self.width + x) * 4;
            self.rgba[d..d + n].copy_from_slice(&src[s..s + n]);
        }
    }

    /// Draws ASCII text (other characters as '?') with its top-left corner at (x, y), each
    /// glyph 8 x 8 pixels times `scale`. Clipped to the image.
    pub fn text(&mut self, text: &str, x: usize, y: usize, scale: usize, rgba: [u8; 4]) {
        for (i, ch) in text.chars().enumerate() {
            let glyph = glyph(ch);
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

    /// Sets one pixel; outside the image nothing happens.
    pub fn put(&mut self, x: usize, y: usize, rgba: [u8; 4]) {
        if x < self.width && y < self.height {
            let i = (y * self.width + x) * 4;
            self.rgba[i..i + 4].copy_from_slice(&rgba);
        }
    }
}

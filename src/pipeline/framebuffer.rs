//! One owned RGBA8 colour buffer plus depth buffer per panel.

/// A panel's pixels. Colour is RGBA8, one `u32` per pixel with R in the lowest byte, so on
/// little-endian targets (x86-64, wasm32) [`Framebuffer::bytes`] is exactly canvas ImageData
/// order: row 0 at the top, left to right, `width * 4` bytes per row, no padding. Depth holds
/// NDC z (smaller is nearer), cleared to 1.0 (the far plane).
#[derive(Clone, Debug, Default)]
pub struct Framebuffer {
    width: usize,
    height: usize,
    color: Vec<u32>,
    depth: Vec<f32>,
}

impl Framebuffer {
    /// A framebuffer of `width` x `height` pixels, cleared to transparent black.
    pub fn new(width: usize, height: usize) -> Self {
        let mut fb = Framebuffer::default();
        fb.resize(width, height);
        fb
    }

    /// Changes the size; allocates only when the pixel count grows.
    pub fn resize(&mut self, width: usize, height: usize) {
        self.width = width;
        self.height = height;
        self.color.resize(width * height, 0);
        self.depth.resize(width * height, 1.0);
    }

    /// Width in pixels.
    pub fn width(&self) -> usize {
        self.width
    }

    /// Height in pixels.
    pub fn height(&self) -> usize {
        self.height
    }

    /// Fills colour with `rgba` (packed, R lowest) and depth with 1.0.
    pub fn clear(&mut self, rgba: u32) {
        self.color.fill(rgba);
        self.depth.fill(1.0);
    }

    /// The packed colour pixels.
    pub fn pixels(&self) -> &[u32] {
        &self.color
    }

    /// Colour and depth for drawing.
    pub fn planes_mut(&mut self) -> (&mut [u32], &mut [f32]) {
        (&mut self.color, &mut self.depth)
    }

    /// The depth values.
    pub fn depth(&self) -> &[f32] {
        &self.depth
    }

    /// The colour as RGBA bytes in ImageData order (see the type's documentation).
    pub fn bytes(&self) -> &[u8] {
        bytemuck::cast_slice(&self.color)
    }

    /// Copies another framebuffer's depth (same size) into this one.
    pub fn copy_depth_from(&mut self, other: &Framebuffer) {
        self.depth.copy_from_slice(&other.depth);
    }

    /// The colour as mutable RGBA bytes (for images computed rather than rasterized).
    pub fn bytes_mut(&mut self) -> &mut [u8] {
        bytemuck::cast_slice_mut(&mut self.color)
    }

    /// True where something was drawn (depth below the cleared far value).
    pub fn covered(&self, i: usize) -> bool {
        self.depth[i] < 1.0
    }

    /// The RGBA bytes of pixel (x, y).
    ///
    /// # Panics
    /// If (x, y) is outside the buffer.
    pub fn rgba(&self, x: usize, y: usize) -> [u8; 4] {
        self.color[y * self.width + x].to_le_bytes()
    }
}

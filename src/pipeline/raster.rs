//! Triangle coverage and interpolation: the one rasterizer every shading mode goes through.
//!
//! Coverage is decided with integer edge functions on vertices snapped to
//! [`SUBPIXEL_BITS`] bits of sub-pixel precision, with pixel centres at (x + 0.5, y + 0.5) and
//! the top-left fill rule (Direct3D 11 "Rasterization Rules"; Vulkan "Basic Polygon
//! Rasterization"): a centre exactly on an edge belongs to the triangle only if the edge is a
//! top or a left edge, so triangles sharing an edge never draw a pixel twice and never leave a
//! crack. Integer arithmetic makes that exact, independent of float rounding.
//!
//! Attributes are interpolated with plane equations set up once per triangle. In perspective
//! mode the planes carry a/w and 1/w and each fragment divides (Vulkan: f = sum(l_i f_i / w_i) /
//! sum(l_i / w_i)); in affine mode they carry a directly. Everything per fragment (the divide,
//! the varyings, the shading) happens only after the depth test passes.

use crate::shading::lanes::F4;

/// Sub-pixel bits of the fixed-point screen coordinates.
pub const SUBPIXEL_BITS: u32 = 8;
const ONE: i64 = 1 << SUBPIXEL_BITS;
const HALF: i64 = ONE / 2;

/// A render target: packed RGBA8 colour (R in the lowest byte) and f32 depth, row 0 at the top,
/// `width` pixels per row, no padding, for all or a band of the frame's rows; optionally a second colour buffer for shaders that
/// produce two pixels per fragment (both panels from one pass).
pub struct Target<'a> {
    /// Colour, `width * height` pixels.
    pub color: &'a mut [u32],
    /// Second colour buffer (`width * height` pixels), or empty when unused.
    pub color2: &'a mut [u32],
    /// Depth (NDC z, smaller is nearer), `width * height` values.
    pub depth: &'a mut [f32],
    /// Pixels per row.
    pub width: usize,
    /// Rows of the whole frame.
    pub height: usize,
    /// The frame rows the buffers hold (`0..height` for the whole frame; a band of it when
    /// the frame is drawn in horizontal bands): frame row `y` is buffer row `y - rows.start`.
    /// Coverage, depth and interpolation are those of the whole frame, so bands put together
    /// are the whole frame byte for byte.
    pub rows: std::ops::Range<usize>,
}

/// A vertex after projection: screen position in pixels (x right, y down), NDC depth, 1/w
/// and `N` varyings (already multiplied by 1/w in perspective mode).
#[derive(Clone, Copy, Debug)]
pub struct RasterVertex<const N: usize> {
    /// Screen x in pixels.
    pub x: f32,
    /// Screen y in pixels, down.
    pub y: f32,
    /// NDC depth.
    pub z: f32,
    /// 1 / clip w.
    pub inv_w: f32,
    /// Varyings (times 1/w in perspective mode).
    pub var: [f32; N],
}

impl<const N: usize> RasterVertex<N> {
    /// All zeros: a placeholder for fixed-size corner arrays.
    pub const ZERO: Self = RasterVertex {
        x: 0.0,
        y: 0.0,
        z: 0.0,
        inv_w: 0.0,
        var: [0.0; N],
    };
}

/// What a fragment shader produces and how it is stored.
pub trait Pixel: Copy {
    /// Writes the value for pixel `i`.
    fn store(self, target: &mut Target<'_>, i: usize);
}

impl Pixel for u32 {
    #[inline(always)]
    fn store(self, target: &mut Target<'_>, i: usize) {
        target.color[i] = self;
    }
}

/// Two pixels: the first to `color`, the second to `color2`.
impl Pixel for [u32; 2] {
    #[inline(always)]
    fn store(self, target: &mut Target<'_>, i: usize) {
        target.color[i] = self[0];
        target.color2[i] = self[1];
    }
}

/// The shading stage: turns interpolated varyings into packed RGBA8 pixels.
pub trait FragmentShader<const N: usize> {
    /// One packed pixel (`u32`) or one per colour buffer.
    type Out: Pixel;

    /// True when fragments may be collected and shaded four at a time with
    /// [`FragmentShader::shade4`], possibly after later triangles were tested: such a shader
    /// must be the same for every triangle of a draw.
    const BATCH: bool = false;

    /// Shades one fragment that passed the depth test.
    fn shade(&self, var: &[f32; N]) -> Self::Out;

    /// Shades four fragments whose varyings come in lanes (`var[k]` holds varying `k` of the
    /// four); must give exactly what four [`FragmentShader::shade`] calls give.
    #[inline]
    fn shade4(&self, var: &[F4; N]) -> [Self::Out; 4] {
        let lanes = var.map(F4::to_array);
        [0, 1, 2, 3].map(|j| self.shade(&std::array::from_fn(|k| lanes[k][j])))
    }
}

/// Fragments that passed the depth test and wait to be shaded four at a time, kept in lanes
/// (structure of arrays): varying `k` of waiting fragment `j` is `var[k][j]`. Four more can
/// always be appended (at most three wait between shadings).
pub struct Batch<const N: usize> {
    index: [usize; 8],
    var: [[f32; 8]; N],
    len: usize,
}

impl<const N: usize> Default for Batch<N> {
    fn default() -> Self {
        Batch {
            index: [0; 8],
            var: [[0.0; 8]; N],
            len: 0,
        }
    }
}

impl<const N: usize> Batch<N> {
    /// Shades the first four waiting fragments and moves the rest to the front.
    #[inline(always)]
    fn shade_first4<S: FragmentShader<N>>(&mut self, target: &mut Target<'_>, shader: &S) {
        let lanes: [F4; N] = std::array::from_fn(|k| F4::load(&self.var[k][..4]));
        let out = shader.shade4(&lanes);
        for (k, px) in out.into_iter().enumerate() {
            px.store(target, self.index[k]);
        }
        // Up to three wait behind them: move the upper half down (fixed-size copies, no
        // library call).
        for v in &mut self.var {
            let upper = F4::load(&v[4..8]);
            upper.store(&mut v[..4]);
        }
        let [_, _, _, _, a, b, c, d] = self.index;
        self.index[..4].copy_from_slice(&[a, b, c, d]);
        self.len -= 4;
    }

    /// Adds one fragment (pixel `i`, varyings `var`).
    #[inline(always)]
    pub(crate) fn push<S: FragmentShader<N>>(
        &mut self,
        target: &mut Target<'_>,
        i: usize,
        var: [f32; N],
        shader: &S,
    ) {
        self.index[self.len] = i;
        for (slot, v) in self.var.iter_mut().zip(var) {
            slot[self.len] = v;
        }
        self.len += 1;
        if self.len == 4 {
            self.shade_first4(target, shader);
        }
    }

    /// Adds the fragments of four neighbouring pixels `i..i + 4` whose bit is set in `live`
    /// (lane 0 in bit 0), with their varyings in lanes.
    #[inline(always)]
    pub(crate) fn push4<S: FragmentShader<N>>(
        &mut self,
        target: &mut Target<'_>,
        i: usize,
        live: u32,
        var: &[F4; N],
        shader: &S,
    ) {
        let len = self.len;
        if live & (live + 1) == 0 {
            // Lanes 0..n live (the common case: a run, or its end): append all four and keep n.
            for (slot, v) in self.var.iter_mut().zip(var) {
                v.store(&mut slot[len..len + 4]);
            }
            for (j, slot) in self.index[len..len + 4].iter_mut().enumerate() {
                *slot = i + j;
            }
            self.len += live.count_ones() as usize;
        } else {
            let lanes = var.map(F4::to_array);
            for j in (0..4).filter(|j| live >> j & 1 == 1) {
                let at = self.len;
                self.index[at] = i + j;
                for (slot, v) in self.var.iter_mut().zip(&lanes) {
                    slot[at] = v[j];
                }
                self.len += 1;
            }
        }
        if self.len >= 4 {
            self.shade_first4(target, shader);
        }
    }

    /// Shades what is left, one by one, in the order the fragments arrived.
    pub fn flush<S: FragmentShader<N>>(&mut self, target: &mut Target<'_>, shader: &S) {
        for j in 0..self.len {
            let var = std::array::from_fn(|k| self.var[k][j]);
            shader.shade(&var).store(target, self.index[j]);
        }
        self.len = 0;
    }
}

/// Which triangles to skip by facing.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Cull {
    /// Draw both faces.
    None,
    /// Skip triangles whose corners run clockwise on screen (back faces).
    Back,
}

/// A linear function of the pixel position, evaluated per row then per pixel:
/// value(x, y) = row(y) + dx * x.
#[derive(Clone, Copy, Default)]
struct Plane {
    dx: f32,
    dy: f32,
    /// Value at the centre of pixel (0, 0).
    origin: f32,
}

impl Plane {
    /// The plane through (0, a0), (d1, a1), (d2, a2), with d = vertex offsets from vertex 0
    /// in pixels and `inv_area` = 1 / (dx1 dy2 - dy1 dx2); `o` = vertex 0 in pixels.
    #[inline(always)]
    fn new(a: [f32; 3], d: [f32; 4], inv_area: f32, o: (f32, f32)) -> Plane {
        let (d1, d2) = (a[1] - a[0], a[2] - a[0]);
        let dx = (d1 * d[3] - d2 * d[1]) * inv_area;
        let dy = (d2 * d[0] - d1 * d[2]) * inv_area;
        Plane {
            dx,
            dy,
            origin: a[0] + dx * (0.5 - o.0) + dy * (0.5 - o.1),
        }
    }
}

/// Snaps a screen coordinate to fixed point, rounding half away from zero by adding 0.5 with
/// the value's sign and truncating (one conversion instruction; `f32::round` is a library
/// call on x86-64). Callers keep coordinates within the clipper's guard band, so the product
/// cannot overflow.
#[inline(always)]
fn snap(v: f32) -> i64 {
    let t = v * ONE as f32;
    (t + 0.5f32.copysign(t)) as i64
}

/// Snaps a vertex's screen position to fixed point (see [`SUBPIXEL_BITS`]).
#[inline(always)]
pub fn snap_xy(x: f32, y: f32) -> [i64; 2] {
    [snap(x), snap(y)]
}

/// A triangle's coverage set-up: snapped corners in drawing order (positive area) and the
/// pixel rectangle to visit. Made before any varying is fetched, so culled, degenerate and
/// pixel-less triangles cost only this.
#[derive(Clone, Copy, Debug)]
pub struct Coverage {
    x: [i64; 3],
    y: [i64; 3],
    /// Corners 1 and 2 were swapped to make the area positive (front facing).
    swapped: bool,
    px: (i64, i64),
    py: (i64, i64),
}

impl Coverage {
    /// Sets up a triangle from snapped corners; `None` when it is culled, has no area, or
    /// covers no pixel centre of rows `rows` of a `width`-pixel-wide target.
    #[inline]
    pub fn new(
        p: [[i64; 2]; 3],
        cull: Cull,
        width: usize,
        rows: std::ops::Range<usize>,
    ) -> Option<Coverage> {
        let [[x0, y0], [mut x1, mut y1], [mut x2, mut y2]] = p;
        // Twice the signed area with y down: positive when the corners run clockwise on screen.
        let area = (x1 - x0) * (y2 - y0) - (y1 - y0) * (x2 - x0);
        if area == 0 {
            return None;
        }
        let swapped = area < 0;
        if swapped {
            // Counter-clockwise on screen = front facing (CCW in NDC). Swap to positive area.
            std::mem::swap(&mut x1, &mut x2);
            std::mem::swap(&mut y1, &mut y2);
        } else if cull == Cull::Back {
            return None;
        }
        // Pixels whose centre (i * ONE + HALF) lies inside the snapped bounding box.
        let w = width as i64;
        let min_x = x0.min(x1).min(x2);
        let max_x = x0.max(x1).max(x2);
        let min_y = y0.min(y1).min(y2);
        let max_y = y0.max(y1).max(y2);
        let px0 = ((min_x - HALF + ONE - 1) >> SUBPIXEL_BITS).max(0);
        let px1 = ((max_x - HALF) >> SUBPIXEL_BITS).min(w - 1);
        let py0 = ((min_y - HALF + ONE - 1) >> SUBPIXEL_BITS).max(rows.start as i64);
        let py1 = ((max_y - HALF) >> SUBPIXEL_BITS).min(rows.end as i64 - 1);
        if px0 > px1 || py0 > py1 {
            return None;
        }
        Some(Coverage {
            x: [x0, x1, x2],
            y: [y0, y1, y2],
            swapped,
            px: (px0, px1),
            py: (py0, py1),
        })
    }
}

/// Draws one triangle; returns the number of fragments shaded (those that passed the depth
/// test). `PERSP` selects perspective-correct (true) or screen-affine (false) interpolation.
pub fn draw_triangle<const N: usize, const PERSP: bool, S: FragmentShader<N>>(
    target: &mut Target<'_>,
    tri: [&RasterVertex<N>; 3],
    cull: Cull,
    shader: &S,
) -> u32 {
    let p = tri.map(|v| snap_xy(v.x, v.y));
    let mut batch = Batch::default();
    let n = match Coverage::new(p, cull, target.width, target.rows.clone()) {
        Some(c) => fill::<N, PERSP, S>(target, &c, tri, shader, &mut batch),
        None => 0,
    };
    batch.flush(target, shader);
    n
}

/// Fills a set-up triangle whose corners (in their original order) are `tri`; returns the
/// number of fragments shaded. With a batching shader, up to three fragments may remain in
/// `batch` afterwards: flush it with the same shader when the draw ends.
pub fn fill<const N: usize, const PERSP: bool, S: FragmentShader<N>>(
    target: &mut Target<'_>,
    cov: &Coverage,
    tri: [&RasterVertex<N>; 3],
    shader: &S,
    batch: &mut Batch<N>,
) -> u32 {
    let [v0, v1, v2] = if cov.swapped {
        [tri[0], tri[2], tri[1]]
    } else {
        tri
    };
    let [x0, x1, x2] = cov.x;
    let [y0, y1, y2] = cov.y;
    let (px0, px1) = cov.px;
    let (py0, py1) = cov.py;

    // Edge function of the edge a -> b at point p (positive inside):
    //   E(p) = (bx - ax)(py - ay) - (by - ay)(px - ax) = A px + B py + C,
    //   A = ay - by, B = bx - ax.
    // Edge i is opposite vertex i. A top edge has A == 0 and B > 0 (horizontal, inside
    // below); a left edge has A > 0. Other edges exclude their own centres: bias -1.
    let edge = |ax: i64, ay: i64, bx: i64, by: i64| {
        let (a, b) = (ay - by, bx - ax);
        let c = -(a * ax + b * ay);
        let top_left = a > 0 || (a == 0 && b > 0);
        (a, b, c + if top_left { 0 } else { -1 })
    };
    let e = [
        edge(x1, y1, x2, y2),
        edge(x2, y2, x0, y0),
        edge(x0, y0, x1, y1),
    ];
    // Per-pixel steps (one pixel = ONE sub-pixel units) and the value at the first centre.
    let step_x = [e[0].0 * ONE, e[1].0 * ONE, e[2].0 * ONE];
    let step_y = [e[0].1 * ONE, e[1].1 * ONE, e[2].1 * ONE];
    let (cx, cy) = (px0 * ONE + HALF, py0 * ONE + HALF);
    let mut row = [
        e[0].0 * cx + e[0].1 * cy + e[0].2,
        e[1].0 * cx + e[1].1 * cy + e[1].2,
        e[2].0 * cx + e[2].1 * cy + e[2].2,
    ];

    if px1 - px0 < 3 {
        // Narrow triangles (a few pixels across, the common case of dense meshes): one
        // pixel at a time, with the same per-pixel formulas as the four-lane runs below.
        let (z, q, var) = attribute_planes(cov, [v0, v1, v2]);
        return fill_narrow::<N, PERSP, S>(
            target,
            [row, step_x, step_y],
            (px0, px1, py0, py1),
            (z, q, &var),
            shader,
            batch,
        );
    }

    // Rows above the first covered one, skipped before any plane is set up: a triangle
    // whose rectangle holds no covered centre costs only this.
    let mut py_first = py0;
    while covered_run(row, step_x, px0, px1).is_none() {
        if py_first == py1 {
            return 0;
        }
        py_first += 1;
        row[0] += step_y[0];
        row[1] += step_y[1];
        row[2] += step_y[2];
    }
    let (z, q, var) = attribute_planes(cov, [v0, v1, v2]);

    let mut shaded = 0u32;
    let lane_offset = F4::new([0.0, 1.0, 2.0, 3.0]);
    for py in py_first..=py1 {
        let this_row = row;
        row[0] += step_y[0];
        row[1] += step_y[1];
        row[2] += step_y[2];
        // The row's covered run, from the edge functions in integers: exactly the centres
        // where all three are >= 0 (the triangle is convex, so they form one run).
        let Some((xs, xe)) = covered_run(this_row, step_x, px0, px1) else {
            continue;
        };
        let yf = py as f32;
        // Row values of the planes; each pixel then adds dx * x (no running sums, so the
        // value at a pixel does not depend on where the row started).
        let z_row = z.origin + z.dy * yf;
        let q_row = q.origin + q.dy * yf;
        let var_row: [f32; N] = std::array::from_fn(|k| var[k].origin + var[k].dy * yf);
        let base = (py as usize - target.rows.start) * target.width;
        // Four pixels at a time: depth, 1/w and the varyings in lanes, each lane computing
        // exactly what the one-pixel formula gives at its x.
        let mut px = xs;
        while px <= xe {
            let i = base + px as usize;
            // px < 2^24 (a panel side is far smaller), so the lane offsets add exactly.
            let xf = F4::splat(px as f32) + lane_offset;
            let zv = xf * z.dx + z_row;
            let live = if xe - px >= 3 {
                let old = F4::load(&target.depth[i..i + 4]);
                let pass = zv.lt(old);
                F4::select(pass, zv, old).store(&mut target.depth[i..i + 4]);
                pass.bits()
            } else {
                let zs = zv.to_array();
                let mut live = 0;
                for (j, &zj) in zs.iter().enumerate().take((xe - px + 1) as usize) {
                    if zj < target.depth[i + j] {
                        target.depth[i + j] = zj;
                        live |= 1 << j;
                    }
                }
                live
            };
            if live != 0 {
                let lanes: [F4; N] = if PERSP {
                    let wv = F4::splat(1.0) / (xf * q.dx + q_row);
                    std::array::from_fn(|k| (xf * var[k].dx + var_row[k]) * wv)
                } else {
                    std::array::from_fn(|k| xf * var[k].dx + var_row[k])
                };
                if S::BATCH {
                    batch.push4(target, i, live, &lanes, shader);
                } else {
                    let l = lanes.map(F4::to_array);
                    for j in (0..4).filter(|j| live >> j & 1 == 1) {
                        let frag = std::array::from_fn(|k| l[k][j]);
                        shader.shade(&frag).store(target, i + j);
                    }
                }
                shaded += live.count_ones();
            }
            px += 4;
        }
    }
    shaded
}

/// The depth, 1/w and varying planes of a set-up triangle whose corners in drawing order are
/// `v`, in pixel units relative to its first snapped corner.
#[inline(always)]
fn attribute_planes<const N: usize>(
    cov: &Coverage,
    v: [&RasterVertex<N>; 3],
) -> (Plane, Plane, [Plane; N]) {
    let [x0, x1, x2] = cov.x;
    let [y0, y1, y2] = cov.y;
    let s = 1.0 / ONE as f32;
    let o = (x0 as f32 * s, y0 as f32 * s);
    let d = [
        (x1 - x0) as f32 * s,
        (y1 - y0) as f32 * s,
        (x2 - x0) as f32 * s,
        (y2 - y0) as f32 * s,
    ];
    let inv_area = 1.0 / (d[0] * d[3] - d[1] * d[2]);
    let z = Plane::new([v[0].z, v[1].z, v[2].z], d, inv_area, o);
    let q = Plane::new([v[0].inv_w, v[1].inv_w, v[2].inv_w], d, inv_area, o);
    let mut var = [Plane::default(); N];
    for (k, p) in var.iter_mut().enumerate() {
        *p = Plane::new([v[0].var[k], v[1].var[k], v[2].var[k]], d, inv_area, o);
    }
    (z, q, var)
}

/// [`fill`] for a triangle at most three pixels wide: every pixel of its rectangle tested
/// alone. `edges` holds the edge values at the first pixel of the first row and their steps
/// per pixel and per row; `rect` the pixel columns and rows to visit.
#[inline(always)]
fn fill_narrow<const N: usize, const PERSP: bool, S: FragmentShader<N>>(
    target: &mut Target<'_>,
    edges: [[i64; 3]; 3],
    rect: (i64, i64, i64, i64),
    planes: (Plane, Plane, &[Plane; N]),
    shader: &S,
    batch: &mut Batch<N>,
) -> u32 {
    let [mut row, step_x, step_y] = edges;
    let (px0, px1, py0, py1) = rect;
    let (z, q, var) = planes;
    let mut shaded = 0u32;
    let mut frag = [0.0f32; N];
    let mut var_row = [0.0f32; N];
    for py in py0..=py1 {
        let yf = py as f32;
        let z_row = z.origin + z.dy * yf;
        let q_row = q.origin + q.dy * yf;
        for k in 0..N {
            var_row[k] = var[k].origin + var[k].dy * yf;
        }
        let base = (py as usize - target.rows.start) * target.width;
        let mut ev = row;
        let mut entered = false;
        for px in px0..=px1 {
            if (ev[0] | ev[1] | ev[2]) >= 0 {
                entered = true;
                let xf = px as f32;
                let zv = z_row + z.dx * xf;
                let i = base + px as usize;
                if zv < target.depth[i] {
                    target.depth[i] = zv;
                    if PERSP {
                        let wv = 1.0 / (q_row + q.dx * xf);
                        for k in 0..N {
                            frag[k] = (var_row[k] + var[k].dx * xf) * wv;
                        }
                    } else {
                        for k in 0..N {
                            frag[k] = var_row[k] + var[k].dx * xf;
                        }
                    }
                    if S::BATCH {
                        batch.push(target, i, frag, shader);
                    } else {
                        shader.shade(&frag).store(target, i);
                    }
                    shaded += 1;
                }
            } else if entered {
                break; // convex: once out again, the rest of the row is out
            }
            ev[0] += step_x[0];
            ev[1] += step_x[1];
            ev[2] += step_x[2];
        }
        row[0] += step_y[0];
        row[1] += step_y[1];
        row[2] += step_y[2];
    }
    shaded
}

/// The pixels `xs..=xe` of a row (within `px0..=px1`) where no edge function is negative,
/// given their values `row` at `px0` and their steps per pixel `step`; `None` when there are
/// none. Integer arithmetic, so the run is exactly the set a per-pixel test finds.
#[inline(always)]
fn covered_run(row: [i64; 3], step: [i64; 3], px0: i64, px1: i64) -> Option<(i64, i64)> {
    let (mut lo, mut hi) = (0i64, px1 - px0);
    for e in 0..3 {
        let (r, s) = (row[e], step[e]);
        if s > 0 {
            // Rising: from the first d with r + s d >= 0.
            if r < 0 {
                lo = lo.max((-r + s - 1) / s);
            }
        } else if s < 0 {
            // Falling: up to the last d with r + s d >= 0.
            if r < 0 {
                return None;
            }
            hi = hi.min(r / -s);
        } else if r < 0 {
            return None;
        }
    }
    (lo <= hi).then_some((px0 + lo, px0 + hi))
}

/// Depth, 1/w and varyings (as stored: times 1/w in perspective mode) of the triangle at the
/// screen point (x, y) from barycentric weights of its snapped corners, or `None` when the
/// point is outside or the triangle has no area. The value the rasterizer's planes give at a
/// pixel centre, at any sub-pixel position: surface probes read fixed points with it.
pub fn sample_triangle<const N: usize>(
    tri: [&RasterVertex<N>; 3],
    x: f32,
    y: f32,
) -> Option<(f32, f32, [f32; N])> {
    let s = 1.0 / ONE as f32;
    let p = tri.map(|v| {
        let [a, b] = snap_xy(v.x, v.y);
        (a as f32 * s, b as f32 * s)
    });
    let area = (p[1].0 - p[0].0) * (p[2].1 - p[0].1) - (p[1].1 - p[0].1) * (p[2].0 - p[0].0);
    if area == 0.0 {
        return None;
    }
    let edge =
        |a: (f32, f32), b: (f32, f32)| ((b.0 - a.0) * (y - a.1) - (b.1 - a.1) * (x - a.0)) / area;
    let l = [edge(p[1], p[2]), edge(p[2], p[0]), edge(p[0], p[1])];
    // A small tolerance keeps points on shared edges inside one of the two triangles.
    if l.iter().any(|&w| w < -1e-5) {
        return None;
    }
    let mix = |f: &dyn Fn(&RasterVertex<N>) -> f32| {
        l[0] * f(tri[0]) + l[1] * f(tri[1]) + l[2] * f(tri[2])
    };
    let mut var = [0.0; N];
    for (k, v) in var.iter_mut().enumerate() {
        *v = mix(&|r| r.var[k]);
    }
    Some((mix(&|r| r.z), mix(&|r| r.inv_w), var))
}

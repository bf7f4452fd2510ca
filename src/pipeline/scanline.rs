//! Scanline polygon fill: Gouraud's own method for faces with more than three corners.
//!
//! Values are interpolated along the polygon's edges to each scanline, then across the span
//! between a left and a right crossing, each step adding a constant (H. Gouraud, "Continuous
//! Shading of Curved Surfaces", IEEE Trans. Computers C-20(6), 1971). Unlike a triangle's
//! plane, the result inside a polygon of four or more corners depends on how the polygon lies
//! on screen: turn the view and the value at a point of the surface changes (Foley, van Dam
//! et al., Computer Graphics: Principles and Practice, 2nd ed., on Gouraud shading). This
//! module exists to show that.
//!
//! Coverage follows the triangle rasterizer's conventions exactly: corners snapped to
//! [`SUBPIXEL_BITS`] bits, pixel centres at half-integers, an edge counts on scanlines from its
//! upper end inclusive to its lower end exclusive, and a span covers centres from its left
//! crossing inclusive to its right crossing exclusive, decided in integers. A polygon next to
//! a triangle or another polygon shares the edge's crossings, so nothing cracks or draws
//! twice. Crossings are paired even-odd, so concave and self-crossing (bow-tie) outlines of
//! non-planar quads still fill.

use crate::pipeline::raster::{
    snap_xy, Batch, Cull, FragmentShader, Pixel, RasterVertex, Target, SUBPIXEL_BITS,
};

use crate::geometry::vertex_buffer::MAX_CORNERS;

const ONE: i64 = 1 << SUBPIXEL_BITS;
const HALF: i64 = ONE / 2;

/// `ceil(a / b)` for `b > 0`.
#[inline]
fn ceil_div(a: i64, b: i64) -> i64 {
    -((-a).div_euclid(b))
}

/// One edge, stored top to bottom (y down) in snapped units.
#[derive(Clone, Copy)]
struct Edge<const N: usize> {
    x0: i64,
    y0: i64,
    dx: i64,
    dy: i64,
    /// Depth, 1/w and varyings at the top end, and their change per pixel of y.
    top: Values<N>,
    per_y: Values<N>,
    /// Values at the current scanline (stepped by `per_y` each scanline).
    cur: Values<N>,
    /// The next scanline `cur` is meant for; `None` before the edge was first met.
    row: Option<i64>,
}

/// What is interpolated: depth, 1/w and the varyings.
#[derive(Clone, Copy)]
struct Values<const N: usize> {
    z: f32,
    q: f32,
    var: [f32; N],
}

impl<const N: usize> Values<N> {
    fn of(v: &RasterVertex<N>) -> Self {
        Values {
            z: v.z,
            q: v.inv_w,
            var: v.var,
        }
    }

    /// `self + (other - self) * t`.
    #[inline]
    fn lerp(&self, other: &Self, t: f32) -> Self {
        let mut var = self.var;
        for (k, v) in var.iter_mut().enumerate() {
            *v += (other.var[k] - *v) * t;
        }
        Values {
            z: self.z + (other.z - self.z) * t,
            q: self.q + (other.q - self.q) * t,
            var,
        }
    }

    /// `(other - self) * s`.
    #[inline]
    fn slope(&self, other: &Self, s: f32) -> Self {
        let mut var = [0.0; N];
        for (k, v) in var.iter_mut().enumerate() {
            *v = (other.var[k] - self.var[k]) * s;
        }
        Values {
            z: (other.z - self.z) * s,
            q: (other.q - self.q) * s,
            var,
        }
    }

    /// `self + step * t`.
    #[inline]
    fn advance(&mut self, step: &Self, t: f32) {
        self.z += step.z * t;
        self.q += step.q * t;
        for (k, v) in self.var.iter_mut().enumerate() {
            *v += step.var[k] * t;
        }
    }
}

/// A crossing of an edge with a scanline: its x as the fraction `num / den` of snapped units
/// (`den > 0`), in pixels for sorting and interpolation, and the values there.
#[derive(Clone, Copy)]
struct Crossing<const N: usize> {
    num: i64,
    den: i64,
    x: f32,
    values: Values<N>,
}

/// Snapped corners and the signed doubled area (y down: positive = clockwise on screen).
fn outline<const N: usize>(verts: &[RasterVertex<N>], p: &mut [[i64; 2]; MAX_CORNERS]) -> i64 {
    for (i, v) in verts.iter().enumerate() {
        p[i] = snap_xy(v.x, v.y);
    }
    let n = verts.len();
    (0..n)
        .map(|i| {
            let (a, b) = (p[i], p[(i + 1) % n]);
            a[0] * b[1] - b[0] * a[1]
        })
        .sum()
}

/// Fills a polygon of 3..=[`MAX_CORNERS`] projected corners (counter-clockwise on screen when
/// front facing); returns the fragments shaded. The fragment stage, depth test and batching
/// are the triangle rasterizer's ([`crate::pipeline::raster::fill`]); with a batching shader, flush
/// `batch` when the draw ends. Out-of-range corner counts draw nothing.
pub fn fill_polygon<const N: usize, const PERSP: bool, S: FragmentShader<N>>(
    target: &mut Target<'_>,
    verts: &[RasterVertex<N>],
    cull: Cull,
    shader: &S,
    batch: &mut Batch<N>,
) -> u32 {
    let n = verts.len();
    if !(3..=MAX_CORNERS).contains(&n) {
        return 0;
    }
    let mut p = [[0i64; 2]; MAX_CORNERS];
    let area = outline(verts, &mut p);
    if area == 0 || (area > 0 && cull == Cull::Back) {
        return 0;
    }
    let mut edges = [None::<Edge<N>>; MAX_CORNERS];
    let (mut min_y, mut max_y) = (i64::MAX, i64::MIN);
    for (i, slot) in edges.iter_mut().enumerate().take(n) {
        let (mut a, mut b) = (i, (i + 1) % n);
        if p[a][1] == p[b][1] {
            continue; // horizontal edges cross no scanline
        }
        if p[a][1] > p[b][1] {
            std::mem::swap(&mut a, &mut b);
        }
        let (va, vb) = (Values::of(&verts[a]), Values::of(&verts[b]));
        let dy = p[b][1] - p[a][1];
        min_y = min_y.min(p[a][1]);
        max_y = max_y.max(p[b][1]);
        *slot = Some(Edge {
            x0: p[a][0],
            y0: p[a][1],
            dx: p[b][0] - p[a][0],
            dy,
            top: va,
            per_y: va.slope(&vb, ONE as f32 / dy as f32),
            cur: va,
            row: None,
        });
    }
    if min_y > max_y {
        return 0;
    }
    // Scanlines whose centre y (py * ONE + HALF) lies in [min_y, max_y).
    let py0 = ceil_div(min_y - HALF, ONE).max(target.rows.start as i64);
    let py1 = (ceil_div(max_y - HALF, ONE) - 1).min(target.rows.end as i64 - 1);
    let w = target.width as i64;
    let mut shaded = 0u32;
    let mut crossings = [None::<Crossing<N>>; MAX_CORNERS];
    let mut frag = [0.0f32; N];
    for py in py0..=py1 {
        let yc = py * ONE + HALF;
        let mut count = 0;
        for e in edges.iter_mut().take(n).flatten() {
            if yc < e.y0 || yc >= e.y0 + e.dy {
                continue;
            }
            // Along the edge: start at the first scanline met, then add a constant per line.
            if e.row != Some(py) {
                e.cur = e.top;
                e.cur.advance(&e.per_y, (yc - e.y0) as f32 / ONE as f32);
            }
            e.row = Some(py + 1);
            let c = Crossing {
                num: e.x0 * e.dy + (yc - e.y0) * e.dx,
                den: e.dy,
                x: (e.x0 as f64 + (yc - e.y0) as f64 * e.dx as f64 / e.dy as f64) as f32
                    / ONE as f32,
                values: e.cur,
            };
            e.cur.advance(&e.per_y, 1.0);
            // Insertion by x keeps the handful of crossings sorted.
            let mut k = count;
            while k > 0 && crossings[k - 1].is_some_and(|o: Crossing<N>| o.x > c.x) {
                crossings[k] = crossings[k - 1];
                k -= 1;
            }
            crossings[k] = Some(c);
            count += 1;
        }
        let base = (py as usize - target.rows.start) * target.width;
        for pair in crossings[..count - count % 2].chunks_exact(2) {
            let (Some(l), Some(r)) = (pair[0], pair[1]) else {
                continue;
            };
            // Centres cx with l <= cx < r: cx = px * ONE + HALF.
            let px0 = ceil_div(l.num - HALF * l.den, ONE * l.den).max(0);
            let px1 = (ceil_div(r.num - HALF * r.den, ONE * r.den) - 1).min(w - 1);
            if px0 > px1 {
                continue;
            }
            // Across the span: the value at the first centre, then a constant per pixel.
            let step = l.values.slope(&r.values, 1.0 / (r.x - l.x));
            let mut v = l.values;
            v.advance(&step, px0 as f32 + 0.5 - l.x);
            for px in px0..=px1 {
                let i = base + px as usize;
                if v.z < target.depth[i] {
                    target.depth[i] = v.z;
                    if PERSP {
                        let wv = 1.0 / v.q;
                        for (f, x) in frag.iter_mut().zip(&v.var) {
                            *f = x * wv;
                        }
                    } else {
                        frag = v.var;
                    }
                    if S::BATCH {
                        batch.push(target, i, frag, shader);
                    } else {
                        shader.shade(&frag).store(target, i);
                    }
                    shaded += 1;
                }
                v.advance(&step, 1.0);
            }
        }
    }
    shaded
}

/// Depth, 1/w and the varyings (as stored in the vertices: times 1/w in perspective mode) that
/// the scanline fill gives at the screen point (x, y), or `None` when the point is outside the
/// polygon. The same formulas as [`fill_polygon`] in closed form, at any sub-pixel position:
/// surface probes use it to read a polygon's value at a fixed point of the surface.
pub fn sample_polygon<const N: usize>(
    verts: &[RasterVertex<N>],
    x: f32,
    y: f32,
) -> Option<(f32, f32, [f32; N])> {
    let n = verts.len();
    if !(3..=MAX_CORNERS).contains(&n) {
        return None;
    }
    let mut p = [[0i64; 2]; MAX_CORNERS];
    if outline(verts, &mut p) == 0 {
        return None;
    }
    let s = 1.0 / ONE as f32;
    let mut crossings = [None::<(f32, Values<N>)>; MAX_CORNERS];
    let mut count = 0;
    for i in 0..n {
        let (mut a, mut b) = (i, (i + 1) % n);
        if p[a][1] > p[b][1] {
            std::mem::swap(&mut a, &mut b);
        }
        let (ya, yb) = (p[a][1] as f32 * s, p[b][1] as f32 * s);
        if !(ya <= y && y < yb) {
            continue;
        }
        let t = (y - ya) / (yb - ya);
        let (xa, xb) = (p[a][0] as f32 * s, p[b][0] as f32 * s);
        let c = (
            xa + (xb - xa) * t,
            Values::of(&verts[a]).lerp(&Values::of(&verts[b]), t),
        );
        let mut k = count;
        while k > 0 && crossings[k - 1].is_some_and(|o: (f32, Values<N>)| o.0 > c.0) {
            crossings[k] = crossings[k - 1];
            k -= 1;
        }
        crossings[k] = Some(c);
        count += 1;
    }
    for pair in crossings[..count - count % 2].chunks_exact(2) {
        let (Some((xl, l)), Some((xr, r))) = (pair[0], pair[1]) else {
            continue;
        };
        if xl <= x && x < xr {
            let v = l.lerp(&r, (x - xl) / (xr - xl));
            return Some((v.z, v.q, v.var));
        }
    }
    None
}

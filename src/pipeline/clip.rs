//! Homogeneous clipping of triangles before the perspective divide.
//!
//! Geometry that crosses the eye plane has w <= 0 at some corners; dividing by it would give
//! inverted or enormous triangles. Triangles are therefore clipped (Sutherland-Hodgman) in
//! clip space, where attributes are still linear, against the near and far planes and against
//! a guard band [`GUARD`] times the viewport on each side. The guard band keeps snapped
//! fixed-point coordinates small enough for exact 64-bit edge functions while making clipping
//! rare: a triangle is only clipped when it leaves the guard band, not the screen.

use glam::Vec4;

/// Guard band half-width in NDC units (the screen is 1). With panels of at most
/// [`MAX_PANEL_SIDE`](crate::scene::MAX_PANEL_SIDE) pixels, screen coordinates stay within +-16384 px.
pub const GUARD: f32 = 7.0;

/// A vertex in clip space with `N` varyings.
#[derive(Clone, Copy, Debug)]
pub struct ClipVertex<const N: usize> {
    /// Clip-space position.
    pub pos: Vec4,
    /// Varyings, linear in clip space.
    pub var: [f32; N],
}

/// Most corners a clipped triangle can have (3 + one per plane).
pub const MAX_CLIPPED: usize = 9;

/// A convex polygon produced by clipping one triangle.
#[derive(Clone, Copy)]
pub struct ClipPolygon<const N: usize> {
    /// Corners in order; only the first `len` are valid.
    pub verts: [ClipVertex<N>; MAX_CLIPPED],
    /// Number of valid corners (0 when the triangle was entirely outside).
    pub len: usize,
}

/// Signed distances to the six planes; inside is >= 0.
#[inline(always)]
fn distances(p: Vec4) -> [f32; 6] {
    let g = GUARD * p.w;
    [p.z + p.w, p.w - p.z, g + p.x, g - p.x, g + p.y, g - p.y]
}

/// One bit per plane the point is outside of.
#[inline(always)]
pub fn outcode(p: Vec4) -> u8 {
    let d = distances(p);
    let mut code = 0;
    for (i, v) in d.iter().enumerate() {
        // NaN counts as outside.
        if v.is_nan() || *v < 0.0 {
            code |= 1 << i;
        }
    }
    code
}

impl<const N: usize> ClipPolygon<N> {
    /// Clips a triangle against all planes; the result has `len` 0 or 3..=[`MAX_CLIPPED`]
    /// corners, in the triangle's winding order.
    pub fn clip(tri: [ClipVertex<N>; 3]) -> ClipPolygon<N> {
        let blank = tri[0];
        let mut a = ClipPolygon {
            verts: [blank; MAX_CLIPPED],
            len: 3,
        };
        a.verts[..3].copy_from_slice(&tri);
        let mut b = ClipPolygon {
            verts: [blank; MAX_CLIPPED],
            len: 0,
        };
        for plane in 0..6 {
            b.len = 0;
            for i in 0..a.len {
                let p = a.verts[i];
                let q = a.verts[(i + 1) % a.len];
                let dp = distances(p.pos)[plane];
                let dq = distances(q.pos)[plane];
                if dp >= 0.0 {
                    b.push(p);
                }
                if (dp >= 0.0) != (dq >= 0.0) {
                    let t = dp / (dp - dq);
                    b.push(lerp(&p, &q, t));
                }
            }
            std::mem::swap(&mut a, &mut b);
            if a.len < 3 {
                a.len = 0;
                return a;
            }
        }
        a
    }

    fn push(&mut self, v: ClipVertex<N>) {
        if self.len < MAX_CLIPPED {
            self.verts[self.len] = v;
            self.len += 1;
        }
    }
}

fn lerp<const N: usize>(p: &ClipVertex<N>, q: &ClipVertex<N>, t: f32) -> ClipVertex<N> {
    let mut var = [0.0; N];
    for (k, v) in var.iter_mut().enumerate() {
        *v = p.var[k] + (q.var[k] - p.var[k]) * t;
    }
    ClipVertex {
        pos: p.pos + (q.pos - p.pos) * t,
        var,
    }
}

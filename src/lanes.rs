//! Four f32 lanes with lane-wise IEEE arithmetic: the per-pixel lighting of four fragments at
//! once.
//!
//! Every operation is applied to each lane separately, in the same order the scalar code
//! uses, with no fused multiply-add and no reassociation; IEEE 754 makes each lane's result
//! bit-identical to the scalar path whether LLVM emits SSE, wasm `simd128` (enabled for the
//! wasm build in .cargo/config.toml) or scalar instructions. Square root and division are
//! correctly rounded on every target.

use std::ops::{Add, Div, Mul, Sub};

/// Four f32 lanes.
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub struct F4(pub [f32; 4]);

macro_rules! lanewise {
    ($trait:ident, $method:ident, $op:tt) => {
        impl $trait for F4 {
            type Output = F4;
            #[inline(always)]
            fn $method(self, rhs: F4) -> F4 {
                F4([
                    self.0[0] $op rhs.0[0],
                    self.0[1] $op rhs.0[1],
                    self.0[2] $op rhs.0[2],
                    self.0[3] $op rhs.0[3],
                ])
            }
        }
        impl $trait<f32> for F4 {
            type Output = F4;
            #[inline(always)]
            fn $method(self, rhs: f32) -> F4 {
                F4([self.0[0] $op rhs, self.0[1] $op rhs, self.0[2] $op rhs, self.0[3] $op rhs])
            }
        }
    };
}

lanewise!(Add, add, +);
lanewise!(Sub, sub, -);
lanewise!(Mul, mul, *);
lanewise!(Div, div, /);

impl F4 {
    /// All lanes `v`.
    #[inline(always)]
    pub fn splat(v: f32) -> F4 {
        F4([v; 4])
    }

    // Written out lane by lane: `array::map` with closures was not inlined and cost about a
    // quarter of a frame (perf, bench scene L5 800x600).

    /// Lane-wise square root (correctly rounded).
    #[inline(always)]
    pub fn sqrt(self) -> F4 {
        let a = self.0;
        F4([a[0].sqrt(), a[1].sqrt(), a[2].sqrt(), a[3].sqrt()])
    }

    /// Lane-wise `if mask { a } else { b }`.
    #[inline(always)]
    pub fn select(mask: [bool; 4], a: F4, b: F4) -> F4 {
        let pick = |k: usize| if mask[k] { a.0[k] } else { b.0[k] };
        F4([pick(0), pick(1), pick(2), pick(3)])
    }

    /// Lane-wise `self > v`.
    #[inline(always)]
    pub fn gt(self, v: f32) -> [bool; 4] {
        let a = self.0;
        [a[0] > v, a[1] > v, a[2] > v, a[3] > v]
    }

    /// Lane-wise application of a scalar function (for steps without a vector form).
    #[inline(always)]
    pub fn map(self, f: impl Fn(f32) -> f32) -> F4 {
        let a = self.0;
        F4([f(a[0]), f(a[1]), f(a[2]), f(a[3])])
    }
}

/// Three-component vectors in four lanes.
#[derive(Clone, Copy, Debug, Default)]
pub struct V4 {
    /// x of each lane.
    pub x: F4,
    /// y of each lane.
    pub y: F4,
    /// z of each lane.
    pub z: F4,
}

impl V4 {
    /// All lanes the same vector.
    #[inline(always)]
    pub fn splat(v: glam::Vec3) -> V4 {
        V4 {
            x: F4::splat(v.x),
            y: F4::splat(v.y),
            z: F4::splat(v.z),
        }
    }

    /// Dot product, `(x*x' + y*y') + z*z'` as glam's `Vec3::dot`.
    #[inline(always)]
    pub fn dot(self, o: V4) -> F4 {
        self.x * o.x + self.y * o.y + self.z * o.z
    }

    /// Each lane's vector times that lane's scalar.
    #[inline(always)]
    pub fn scale(self, s: F4) -> V4 {
        V4 {
            x: self.x * s,
            y: self.y * s,
            z: self.z * s,
        }
    }

    /// Component-wise product with one vector.
    #[inline(always)]
    pub fn mul_vec(self, v: glam::Vec3) -> V4 {
        V4 {
            x: self.x * v.x,
            y: self.y * v.y,
            z: self.z * v.z,
        }
    }

    /// Normalised, or zero where that is impossible: glam's `Vec3::normalize_or_zero`
    /// (`self * (1 / sqrt(dot))` if that reciprocal is finite and positive).
    #[inline(always)]
    pub fn normalize_or_zero(self) -> V4 {
        let rcp = F4::splat(1.0) / self.dot(self).sqrt();
        let r = rcp.0;
        let ok = [
            r[0].is_finite() && r[0] > 0.0,
            r[1].is_finite() && r[1] > 0.0,
            r[2].is_finite() && r[2] > 0.0,
            r[3].is_finite() && r[3] > 0.0,
        ];
        let zero = F4::splat(0.0);
        V4 {
            x: F4::select(ok, self.x * rcp, zero),
            y: F4::select(ok, self.y * rcp, zero),
            z: F4::select(ok, self.z * rcp, zero),
        }
    }
}

impl Add for V4 {
    type Output = V4;
    #[inline(always)]
    fn add(self, o: V4) -> V4 {
        V4 {
            x: self.x + o.x,
            y: self.y + o.y,
            z: self.z + o.z,
        }
    }
}

impl Sub for V4 {
    type Output = V4;
    #[inline(always)]
    fn sub(self, o: V4) -> V4 {
        V4 {
            x: self.x - o.x,
            y: self.y - o.y,
            z: self.z - o.z,
        }
    }
}

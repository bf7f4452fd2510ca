//! Four f32 lanes with lane-wise IEEE arithmetic: the per-pixel lighting of four fragments at
//! once.
//!
//! Every operation is applied to each lane separately, in the same order the scalar code
//! uses, with no fused multiply-add and no reassociation; IEEE 754 makes each lane's result
//! bit-identical to the scalar path whether the lanes run as SSE, wasm `simd128` (enabled for
//! the wasm build in .cargo/config.toml) or scalar instructions. Square root and division are
//! correctly rounded on every target. The lanes are `wide::f32x4`, which guarantees packed
//! instructions where LLVM's auto-vectorisation of `[f32; 4]` left half of them scalar: the
//! per-pixel shading of the bench scene fell from 268 to 111 instructions per pixel
//! (callgrind, L5 800x600).

use std::ops::{Add, Div, Mul, Sub};
use wide::{f32x4, i32x4, CmpGe, CmpGt, CmpLt};

/// Four f32 lanes (a `wide::f32x4`: SSE on x86-64, `simd128` on wasm32, plain arrays
/// elsewhere; packed add, subtract, multiply, divide, square root and compare are IEEE
/// operations, correctly rounded lane by lane).
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub struct F4(f32x4);

/// A lane mask from a comparison (all bits set where true).
#[derive(Clone, Copy, Debug)]
pub struct M4(f32x4);

/// Four i32 lanes (a `wide::i32x4`), for bit-level work on [`F4`] values.
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub struct I4(i32x4);

impl I4 {
    /// The lanes `a`.
    #[inline(always)]
    pub fn new(a: [i32; 4]) -> I4 {
        I4(i32x4::new(a))
    }

    /// All lanes `v`.
    #[inline(always)]
    pub fn splat(v: i32) -> I4 {
        I4(i32x4::splat(v))
    }

    /// The four lanes.
    #[inline(always)]
    pub fn to_array(self) -> [i32; 4] {
        self.0.to_array()
    }

    /// Lane-wise arithmetic shift right by `n`.
    #[inline(always)]
    pub fn shift_right(self, n: i32) -> I4 {
        I4(self.0 >> n)
    }

    /// Lane-wise shift left by `n`.
    #[inline(always)]
    pub fn shift_left(self, n: i32) -> I4 {
        I4(self.0 << n)
    }

    /// Lane-wise wrapping subtraction.
    #[inline(always)]
    pub fn wrapping_sub(self, o: I4) -> I4 {
        I4(self.0 - o.0)
    }

    /// Lane-wise bitwise or.
    #[inline(always)]
    pub fn bit_or(self, o: I4) -> I4 {
        I4(self.0 | o.0)
    }

    /// Lane-wise `self` clamped to `lo..=hi`.
    #[inline(always)]
    pub fn clamp(self, lo: i32, hi: i32) -> I4 {
        I4(self.0.max(i32x4::splat(lo)).min(i32x4::splat(hi)))
    }

    /// Lane-wise `if mask { a } else { b }`.
    #[inline(always)]
    pub fn select(mask: M4, a: I4, b: I4) -> I4 {
        I4(mask.as_i4().0.blend(a.0, b.0))
    }
}

impl M4 {
    /// The mask as integer lanes: -1 where true, 0 where false.
    #[inline(always)]
    pub fn as_i4(self) -> I4 {
        I4(bytemuck::cast(self.0))
    }

    /// The mask as four bits, lane 0 in bit 0.
    #[inline(always)]
    pub fn bits(self) -> u32 {
        self.0.move_mask() as u32
    }
}

impl std::ops::BitAnd for M4 {
    type Output = M4;
    #[inline(always)]
    fn bitand(self, o: M4) -> M4 {
        M4(self.0 & o.0)
    }
}

macro_rules! lanewise {
    ($trait:ident, $method:ident, $op:tt) => {
        impl $trait for F4 {
            type Output = F4;
            #[inline(always)]
            fn $method(self, rhs: F4) -> F4 {
                F4(self.0 $op rhs.0)
            }
        }
        impl $trait<f32> for F4 {
            type Output = F4;
            #[inline(always)]
            fn $method(self, rhs: f32) -> F4 {
                F4(self.0 $op f32x4::splat(rhs))
            }
        }
    };
}

lanewise!(Add, add, +);
lanewise!(Sub, sub, -);
lanewise!(Mul, mul, *);
lanewise!(Div, div, /);

impl F4 {
    /// The lanes `a`.
    #[inline(always)]
    pub fn new(a: [f32; 4]) -> F4 {
        F4(f32x4::new(a))
    }

    /// The four lanes.
    #[inline(always)]
    pub fn to_array(self) -> [f32; 4] {
        self.0.to_array()
    }

    /// All lanes `v`.
    #[inline(always)]
    pub fn splat(v: f32) -> F4 {
        F4(f32x4::splat(v))
    }

    /// Lane-wise square root (correctly rounded).
    #[inline(always)]
    pub fn sqrt(self) -> F4 {
        F4(self.0.sqrt())
    }

    /// Lane-wise absolute value (exact: the sign bit cleared).
    #[inline(always)]
    pub fn abs(self) -> F4 {
        F4(self.0.abs())
    }

    /// Lane-wise `if mask { a } else { b }`.
    #[inline(always)]
    pub fn select(mask: M4, a: F4, b: F4) -> F4 {
        F4(mask.0.blend(a.0, b.0))
    }

    /// Lane-wise `self > v` (false for NaN).
    #[inline(always)]
    pub fn gt(self, v: f32) -> M4 {
        M4(self.0.cmp_gt(f32x4::splat(v)))
    }

    /// The lanes' bit patterns (`f32::to_bits` as i32).
    #[inline(always)]
    pub fn to_bits(self) -> I4 {
        I4(bytemuck::cast(self.0))
    }

    /// Lane-wise `self >= o` (false for NaN).
    #[inline(always)]
    pub fn ge(self, o: F4) -> M4 {
        M4(self.0.cmp_ge(o.0))
    }

    /// Lane-wise `self < o` (false for NaN).
    #[inline(always)]
    pub fn lt(self, o: F4) -> M4 {
        M4(self.0.cmp_lt(o.0))
    }

    /// The lanes from the first four values of `s` (which must hold at least four).
    #[inline(always)]
    pub fn load(s: &[f32]) -> F4 {
        F4::new([s[0], s[1], s[2], s[3]])
    }

    /// Writes the lanes to the first four values of `s` (which must hold at least four).
    #[inline(always)]
    pub fn store(self, s: &mut [f32]) {
        s[..4].copy_from_slice(&self.to_array());
    }

    /// Lane-wise "finite" (neither infinite nor NaN).
    #[inline(always)]
    pub fn finite(self) -> M4 {
        M4(self.0.is_finite())
    }

    /// Lane-wise application of a scalar function (for steps without a vector form).
    #[inline(always)]
    pub fn map(self, f: impl Fn(f32) -> f32) -> F4 {
        let a = self.to_array();
        F4::new([f(a[0]), f(a[1]), f(a[2]), f(a[3])])
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
        let ok = rcp.finite() & rcp.gt(0.0);
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

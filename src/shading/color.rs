//! sRGB transfer functions (IEC 61966-2-1) and the exact 8-bit encoder used by every panel.
//!
//! All lighting in twinshade is done in linear light. Pixels are written as 8-bit sRGB by
//! [`encode_srgb8`], which must give exactly `floor(255 * encode(l) + 0.5)` with the reference
//! transfer function but without calling `powf` per pixel: `powf` in software on wasm costs
//! about 44 ns a call (measured on this 2-core machine for the benchmarks). The encoder therefore searches a table of the
//! 255 linear-light thresholds at which the output byte changes. The thresholds are found once,
//! by bisection over f32 bit patterns against the reference function itself, so the fast path
//! agrees with the reference on every f32 input by construction (a test checks all of them
//! between 0 and 1).

use crate::shading::lanes::{F4, I4};
use std::sync::OnceLock;

/// Decodes one sRGB-encoded component (0..=1) to linear light, in f64 (IEC 61966-2-1).
pub fn srgb_to_linear_f64(v: f64) -> f64 {
    if v <= 0.04045 {
        v / 12.92
    } else {
        libm::pow((v + 0.055) / 1.055, 2.4)
    }
}

/// Encodes one linear-light component (0..=1) to sRGB, in f64 (IEC 61966-2-1).
pub fn linear_to_srgb_f64(l: f64) -> f64 {
    if l <= 0.003_130_8 {
        12.92 * l
    } else {
        1.055 * libm::pow(l, 1.0 / 2.4) - 0.055
    }
}

/// Decodes one sRGB-encoded component (0..=1) to linear light, in f32.
pub fn srgb_to_linear(v: f32) -> f32 {
    if v <= 0.04045 {
        v / 12.92
    } else {
        libm::powf((v + 0.055) / 1.055, 2.4)
    }
}

/// Encodes one linear-light component to sRGB in f32: the reference for [`encode_srgb8`].
pub fn linear_to_srgb(l: f32) -> f32 {
    if l <= 0.003_130_8 {
        12.92 * l
    } else {
        1.055 * libm::powf(l, 1.0 / 2.4) - 0.055
    }
}

/// The reference 8-bit encoding: clamp to 0..=1, encode, `floor(255 e + 0.5)`. NaN gives 0.
pub fn encode_srgb8_reference(l: f32) -> u8 {
    let l = if l > 0.0 { l.min(1.0) } else { 0.0 };
    let e = linear_to_srgb(l);
    let b = (255.0 * e + 0.5).floor();
    b.clamp(0.0, 255.0) as u8
}

/// Linear-light thresholds: `t[b]` is the smallest f32 whose reference byte is `b` (b >= 1).
struct Thresholds {
    t: [f32; 256],
    /// `next[b]` = `t[b + 1]`, infinity for 255: the threshold that would raise byte `b`.
    next: [f32; 256],
    /// For each bucket of the linear range (by f32 bit pattern, see `bucket`), the byte
    /// of the bucket's lower end; one comparison with `next` then finishes the search.
    start: [u8; BUCKETS],
    /// Per bucket, `next[start]` and `start` together: one load per value in the four-lane
    /// encoder.
    entry: [(f32, i32); BUCKETS],
}

/// Buckets: 256 per binade over the 12 binades [2^-12, 1), so each bucket spans at most
/// 0.4 % of its value, less than the narrowest gap between two byte thresholds (about 0.9 %
/// near 1.0): a bucket holds at most one threshold and the search is a single comparison
/// (checked when the tables are built and in tests/color.rs).
const BUCKETS: usize = 12 * 256;

/// Maps a linear value in (0, 1) to a bucket by the top bits of its f32 representation.
/// Values below 2^-12 (bytes 0..=3 region) fall into bucket 0.
#[inline(always)]
fn bucket(l: f32) -> usize {
    let bits = l.to_bits();
    let b = bits.saturating_sub(0x3980_0000) >> 15; // 0x3980_0000 = 2^-12
    (b as usize).min(BUCKETS - 1)
}

fn thresholds() -> &'static Thresholds {
    static T: OnceLock<Thresholds> = OnceLock::new();
    T.get_or_init(|| {
        let mut t = [0.0f32; 256];
        for (b, slot) in t.iter_mut().enumerate().skip(1) {
            // Bisect over the bit patterns of non-negative floats (monotone in value).
            let (mut lo, mut hi) = (0u32, 1.0f32.to_bits());
            while lo < hi {
                let mid = lo + (hi - lo) / 2;
                if encode_srgb8_reference(f32::from_bits(mid)) as usize >= b {
                    hi = mid;
                } else {
                    lo = mid + 1;
                }
            }
            *slot = f32::from_bits(lo);
        }
        let mut start = [0u8; BUCKETS];
        for (i, s) in start.iter_mut().enumerate() {
            *s = encode_srgb8_reference(bucket_lower(i));
        }
        let mut next = [f32::INFINITY; 256];
        next[..255].copy_from_slice(&t[1..]);
        let mut entry = [(0.0f32, 0i32); BUCKETS];
        for (e, &b) in entry.iter_mut().zip(&start) {
            *e = (next[b as usize], i32::from(b));
        }
        Thresholds {
            t,
            next,
            start,
            entry,
        }
    })
}

/// The lowest value of bucket `i`.
fn bucket_lower(i: usize) -> f32 {
    if i == 0 {
        0.0
    } else {
        f32::from_bits(0x3980_0000 + ((i as u32) << 15))
    }
}

/// The most byte thresholds lying strictly inside one bucket of the encoder's table; the
/// single-comparison search is exact only while this is at most 1.
pub fn max_thresholds_per_bucket() -> usize {
    let th = thresholds();
    let mut counts = vec![0usize; BUCKETS];
    for &t in &th.t[1..] {
        let i = bucket(t);
        if t > bucket_lower(i) {
            counts[i] += 1;
        }
    }
    counts.into_iter().max().unwrap_or(0)
}

/// Encodes linear light to an 8-bit sRGB byte, exactly as [`encode_srgb8_reference`] does,
/// by table search (no `powf`). Out-of-range values clamp; NaN gives 0.
#[inline]
pub fn encode_srgb8(l: f32) -> u8 {
    let th = thresholds();
    encode_with(th, l)
}

#[inline(always)]
fn encode_with(th: &Thresholds, l: f32) -> u8 {
    if l.is_nan() || l <= 0.0 {
        return 0;
    }
    if l >= 1.0 {
        return 255;
    }
    let b = th.start[bucket(l)] as usize;
    // At most one threshold lies in a bucket (see `BUCKETS`), so one comparison finishes.
    (b + usize::from(l >= th.next[b])) as u8
}

/// A handle to the encoder tables, for hot loops that encode many pixels: it avoids the
/// lazy-initialisation check per call.
#[derive(Clone, Copy)]
pub struct SrgbEncoder {
    th: &'static Thresholds,
}

impl Default for SrgbEncoder {
    fn default() -> Self {
        Self::new()
    }
}

impl SrgbEncoder {
    /// Builds (once per process) and returns the encoder tables.
    pub fn new() -> Self {
        Self { th: thresholds() }
    }

    /// Same as [`encode_srgb8`].
    #[inline(always)]
    pub fn encode(&self, l: f32) -> u8 {
        encode_with(self.th, l)
    }

    /// Encodes four values in lanes, exactly as four [`SrgbEncoder::encode`] calls: the
    /// bucket from the bit pattern in integer lanes, one table load per lane, one compare.
    #[inline(always)]
    pub fn encode4(&self, l: F4) -> I4 {
        // Buckets as `bucket` computes them for values in (0, 1); other lanes are replaced
        // below, whatever bucket they read.
        let idx = l
            .to_bits()
            .wrapping_sub(I4::splat(0x3980_0000))
            .shift_right(15)
            .clamp(0, BUCKETS as i32 - 1)
            .to_array();
        let e = idx.map(|i| self.th.entry[i as usize]);
        let next = F4::new([e[0].0, e[1].0, e[2].0, e[3].0]);
        let start = I4::new([e[0].1, e[1].1, e[2].1, e[3].1]);
        // start + 1 where l >= next (the mask is -1 there).
        let byte = start.wrapping_sub(l.ge(next).as_i4());
        let inside = I4::select(l.gt(0.0), byte, I4::splat(0));
        I4::select(l.ge(F4::splat(1.0)), I4::splat(255), inside)
    }

    /// Packs four linear RGB colours given in lanes, exactly as four [`SrgbEncoder::pack`]
    /// calls.
    #[inline(always)]
    pub fn pack4(&self, r: F4, g: F4, b: F4) -> [u32; 4] {
        let px = self
            .encode4(r)
            .bit_or(self.encode4(g).shift_left(8))
            .bit_or(self.encode4(b).shift_left(16))
            .bit_or(I4::splat(0xff00_0000u32 as i32))
            .to_array();
        [px[0] as u32, px[1] as u32, px[2] as u32, px[3] as u32]
    }

    /// Packs a linear RGB colour into an opaque RGBA8 pixel (R in the lowest byte).
    #[inline(always)]
    pub fn pack(&self, r: f32, g: f32, b: f32) -> u32 {
        u32::from(self.encode(r))
            | u32::from(self.encode(g)) << 8
            | u32::from(self.encode(b)) << 16
            | 0xff00_0000
    }
}

/// Parses `#rrggbb` into sRGB bytes.
///
/// # Errors
/// Returns a message naming the text when it is not a 6-digit hex colour.
pub fn parse_hex(s: &str) -> Result<[u8; 3], String> {
    let h = s.strip_prefix('#').unwrap_or(s);
    if h.len() != 6 || !h.bytes().all(|c| c.is_ascii_hexdigit()) {
        return Err(format!("'{s}' is not a colour of the form #rrggbb"));
    }
    let byte = |i: usize| u8::from_str_radix(&h[i..i + 2], 16).map_err(|e| e.to_string());
    Ok([byte(0)?, byte(2)?, byte(4)?])
}

/// Formats sRGB bytes as `#rrggbb`.
pub fn to_hex(c: [u8; 3]) -> String {
    format!("#{:02x}{:02x}{:02x}", c[0], c[1], c[2])
}

/// Decodes sRGB bytes to linear-light RGB.
pub fn srgb8_to_linear(c: [u8; 3]) -> [f32; 3] {
    c.map(|v| srgb_to_linear(f32::from(v) / 255.0))
}

/// An 8-bit sRGB colour, written `#rrggbb` in scene JSON, links and the page.
///
/// Text becomes an `Rgb` once, where it enters (deserialisation or [`str::parse`]); code past
/// that point holds a colour that cannot be malformed.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Default)]
pub struct Rgb(pub [u8; 3]);

impl Rgb {
    /// Black.
    pub const BLACK: Rgb = Rgb([0, 0, 0]);
    /// White.
    pub const WHITE: Rgb = Rgb([255, 255, 255]);

    /// A colour from a `#rrggbb` literal in the code, checked at compile time when used in a
    /// constant.
    ///
    /// # Panics
    /// On a malformed literal. Text from users goes through [`str::parse`] instead.
    pub const fn hex(s: &str) -> Rgb {
        let b = s.as_bytes();
        assert!(b.len() == 7 && b[0] == b'#', "a colour literal is #rrggbb");
        const fn digit(c: u8) -> u8 {
            match c {
                b'0'..=b'9' => c - b'0',
                b'a'..=b'f' => c - b'a' + 10,
                b'A'..=b'F' => c - b'A' + 10,
                _ => panic!("a colour literal has hex digits"),
            }
        }
        Rgb([
            digit(b[1]) * 16 + digit(b[2]),
            digit(b[3]) * 16 + digit(b[4]),
            digit(b[5]) * 16 + digit(b[6]),
        ])
    }

    /// Linear-light RGB (IEC 61966-2-1 decoding).
    pub fn linear(self) -> [f32; 3] {
        srgb8_to_linear(self.0)
    }
}

impl std::str::FromStr for Rgb {
    type Err = String;

    /// Parses `#rrggbb` (the `#` may be left out).
    fn from_str(s: &str) -> Result<Rgb, String> {
        parse_hex(s).map(Rgb)
    }
}

impl std::fmt::Display for Rgb {
    /// `#rrggbb`, lower case.
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        let [r, g, b] = self.0;
        write!(f, "#{r:02x}{g:02x}{b:02x}")
    }
}

impl serde::Serialize for Rgb {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.collect_str(self)
    }
}

impl<'de> serde::Deserialize<'de> for Rgb {
    fn deserialize<D: serde::Deserializer<'de>>(d: D) -> Result<Rgb, D::Error> {
        let text = <std::borrow::Cow<'de, str>>::deserialize(d)?;
        text.parse().map_err(serde::de::Error::custom)
    }
}

impl schemars::JsonSchema for Rgb {
    fn schema_name() -> std::borrow::Cow<'static, str> {
        "Rgb".into()
    }

    fn json_schema(_: &mut schemars::SchemaGenerator) -> schemars::Schema {
        schemars::json_schema!({
            "description": "An 8-bit sRGB colour, `#rrggbb` (the `#` may be left out).",
            "type": "string",
            "pattern": "^#?[0-9a-fA-F]{6}$"
        })
    }
}

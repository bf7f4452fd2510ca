//! Perceptual difference between two renderings: CIELAB, CIEDE2000, CIE76, and the metrics
//! and difference image built from them.
//!
//! The convention is pinned once here and documented in DEVELOPERS.md:
//! - 8-bit sRGB decoded with the IEC 61966-2-1 transfer function;
//! - linear sRGB to CIE XYZ with the matrix derived (in f64) from the sRGB primaries
//!   R (0.64, 0.33), G (0.30, 0.60), B (0.15, 0.06) and the D65 white
//!   XYZ (0.95047, 1, 1.08883), which is also the CIELAB reference white, so sRGB white has
//!   a* = b* = 0 exactly (the convention of the `palette` crate 0.7);
//! - CIELAB per CIE 15; CIEDE2000 with kL = kC = kH = 1 as written out by Sharma, Wu & Dalal,
//!   Color Research & Application 30(1), 2005, all in f64 through `libm`.

use crate::scene::settings::DifferenceSettings;
use crate::shading::color::srgb_to_linear_f64;
use serde::Serialize;
use std::sync::OnceLock;

/// A CIELAB colour (D65 white as stated in the module documentation).
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
pub struct Lab {
    /// Lightness L*, 0..=100.
    pub l: f64,
    /// a* (green-red).
    pub a: f64,
    /// b* (blue-yellow).
    pub b: f64,
}

/// The reference white, XYZ.
pub const WHITE: [f64; 3] = [0.95047, 1.0, 1.08883];

struct Tables {
    /// Linear value of each 8-bit sRGB code.
    linear: [f64; 256],
    /// Rows of the linear sRGB -> XYZ matrix.
    m: [[f64; 3]; 3],
}

fn tables() -> &'static Tables {
    static T: OnceLock<Tables> = OnceLock::new();
    T.get_or_init(|| {
        let mut linear = [0.0; 256];
        for (i, v) in linear.iter_mut().enumerate() {
            *v = srgb_to_linear_f64(i as f64 / 255.0);
        }
        Tables {
            linear,
            m: srgb_to_xyz_matrix(),
        }
    })
}

/// The linear sRGB -> XYZ matrix from the primaries and [`WHITE`] (rows).
pub fn srgb_to_xyz_matrix() -> [[f64; 3]; 3] {
    let xy = [(0.64, 0.33), (0.30, 0.60), (0.15, 0.06)];
    // Columns: XYZ of each primary with Y = 1.
    let p: [[f64; 3]; 3] = xy.map(|(x, y)| [x / y, 1.0, (1.0 - x - y) / y]);
    // Solve P s = W for the primaries' scales (Cramer's rule).
    let col = |c: usize| [p[c][0], p[c][1], p[c][2]];
    let det3 = |a: [f64; 3], b: [f64; 3], c: [f64; 3]| {
        a[0] * (b[1] * c[2] - b[2] * c[1]) - b[0] * (a[1] * c[2] - a[2] * c[1])
            + c[0] * (a[1] * b[2] - a[2] * b[1])
    };
    let (r, g, b) = (col(0), col(1), col(2));
    let d = det3(r, g, b);
    let s = [
        det3(WHITE, g, b) / d,
        det3(r, WHITE, b) / d,
        det3(r, g, WHITE) / d,
    ];
    let mut m = [[0.0; 3]; 3];
    for (row, out) in m.iter_mut().enumerate() {
        for (c, v) in out.iter_mut().enumerate() {
            *v = p[c][row] * s[c];
        }
    }
    m
}

fn lab_f(t: f64) -> f64 {
    // CIE 15: cube root above (6/29)^3 = 216/24389, a line below.
    if t > 216.0 / 24389.0 {
        libm::cbrt(t)
    } else {
        (841.0 / 108.0) * t + 16.0 / 116.0
    }
}

/// CIELAB of an 8-bit sRGB colour.
pub fn srgb8_to_lab(rgb: [u8; 3]) -> Lab {
    let t = tables();
    let lin = rgb.map(|c| t.linear[c as usize]);
    let xyz =
        t.m.map(|row| row[0] * lin[0] + row[1] * lin[1] + row[2] * lin[2]);
    let f = [0, 1, 2].map(|i| lab_f(xyz[i] / WHITE[i]));
    Lab {
        l: 116.0 * f[1] - 16.0,
        a: 500.0 * (f[0] - f[1]),
        b: 200.0 * (f[1] - f[2]),
    }
}

/// CIE 1976 colour difference dE*ab: the Euclidean distance in CIELAB.
pub fn delta_e76(x: Lab, y: Lab) -> f64 {
    let (dl, da, db) = (x.l - y.l, x.a - y.a, x.b - y.b);
    libm::sqrt(dl * dl + da * da + db * db)
}

/// CIEDE2000 colour difference dE00 (kL = kC = kH = 1), following the steps of Sharma, Wu &
/// Dalal (2005), section 2; symmetric in its arguments.
pub fn ciede2000(x: Lab, y: Lab) -> f64 {
    const POW25_7: f64 = 6_103_515_625.0; // 25^7
    let deg = |r: f64| r.to_degrees();
    let rad = |d: f64| d.to_radians();
    let c1 = libm::hypot(x.a, x.b);
    let c2 = libm::hypot(y.a, y.b);
    let cbar7 = libm::pow((c1 + c2) / 2.0, 7.0);
    let g = 0.5 * (1.0 - libm::sqrt(cbar7 / (cbar7 + POW25_7)));
    let (a1, a2) = ((1.0 + g) * x.a, (1.0 + g) * y.a);
    let (c1p, c2p) = (libm::hypot(a1, x.b), libm::hypot(a2, y.b));
    let hue = |b: f64, a: f64| {
        if a == 0.0 && b == 0.0 {
            0.0
        } else {
            let h = deg(libm::atan2(b, a));
            if h < 0.0 {
                h + 360.0
            } else {
                h
            }
        }
    };
    let (h1, h2) = (hue(x.b, a1), hue(y.b, a2));
    let dl = y.l - x.l;
    let dc = c2p - c1p;
    let cprod = c1p * c2p;
    let dh = if cprod == 0.0 {
        0.0
    } else {
        let d = h2 - h1;
        if d > 180.0 {
            d - 360.0
        } else if d < -180.0 {
            d + 360.0
        } else {
            d
        }
    };
    let dhh = 2.0 * libm::sqrt(cprod) * libm::sin(rad(dh / 2.0));
    let lbar = (x.l + y.l) / 2.0;
    let cbarp = (c1p + c2p) / 2.0;
    let hbar = if cprod == 0.0 {
        h1 + h2
    } else if (h1 - h2).abs() <= 180.0 {
        (h1 + h2) / 2.0
    } else if h1 + h2 < 360.0 {
        (h1 + h2 + 360.0) / 2.0
    } else {
        (h1 + h2 - 360.0) / 2.0
    };
    let t = 1.0 - 0.17 * libm::cos(rad(hbar - 30.0))
        + 0.24 * libm::cos(rad(2.0 * hbar))
        + 0.32 * libm::cos(rad(3.0 * hbar + 6.0))
        - 0.20 * libm::cos(rad(4.0 * hbar - 63.0));
    let dtheta = 30.0 * libm::exp(-((hbar - 275.0) / 25.0) * ((hbar - 275.0) / 25.0));
    let cbarp7 = libm::pow(cbarp, 7.0);
    let rc = 2.0 * libm::sqrt(cbarp7 / (cbarp7 + POW25_7));
    let l50 = (lbar - 50.0) * (lbar - 50.0);
    let sl = 1.0 + 0.015 * l50 / libm::sqrt(20.0 + l50);
    let sc = 1.0 + 0.045 * cbarp;
    let sh = 1.0 + 0.015 * cbarp * t;
    let rt = -libm::sin(rad(2.0 * dtheta)) * rc;
    let (fl, fc, fh) = (dl / sl, dc / sc, dhh / sh);
    libm::sqrt((fl * fl + fc * fc + fh * fh + rt * fc * fh).max(0.0))
}

/// Relative luminance Y (0..=1) of an 8-bit sRGB colour.
pub fn luminance(rgb: [u8; 3]) -> f64 {
    let t = tables();
    let lin = rgb.map(|c| t.linear[c as usize]);
    t.m[1][0] * lin[0] + t.m[1][1] * lin[1] + t.m[1][2] * lin[2]
}

/// Mean, 95th percentile and maximum of a set of values.
#[derive(Clone, Copy, Debug, Default, PartialEq, Serialize)]
pub struct Summary {
    /// Arithmetic mean.
    pub mean: f64,
    /// 95th percentile, nearest rank: the value at rank ceil(0.95 n) in ascending order.
    pub p95: f64,
    /// Maximum.
    pub max: f64,
}

/// What a comparison of two images measured.
#[derive(Clone, Copy, Debug, Default, PartialEq, Serialize)]
pub struct DiffMetrics {
    /// Pixels covered in both images (the ones compared).
    pub covered_pixels: u64,
    /// Pixels covered in exactly one image (silhouette differences), counted apart.
    pub silhouette_mismatch_pixels: u64,
    /// CIEDE2000 over the covered pixels.
    pub de00: Summary,
    /// CIE 1976 dE*ab over the covered pixels.
    pub de76: Summary,
    /// The threshold used, dE00.
    pub threshold_de00: f64,
    /// Share (0..=1) of covered pixels whose dE00 exceeds the threshold.
    pub share_above_threshold: f64,
    /// Highest relative luminance Y among covered pixels of image A and of image B.
    pub peak_luminance: [f64; 2],
    /// peak_luminance A / peak_luminance B (below 1: A loses highlight).
    pub peak_ratio: f64,
}

/// Reusable buffers for comparisons: no allocation once sizes are stable.
#[derive(Default)]
pub struct Comparer {
    de00: Vec<f32>,
    de76: Vec<f32>,
    sorted: Vec<f32>,
    colormap: Vec<[u8; 3]>,
    /// Direct-mapped memo of colour pairs already compared: key (A << 24 | B) + 1 (0 =
    /// empty) and their (dE00, dE*ab). Smooth shading repeats the same 8-bit pairs over many
    /// pixels; the memo returns the very values the formulas gave, so results do not change.
    memo_key: Vec<u64>,
    memo_val: Vec<(f64, f64)>,
    /// Direct-mapped memo of CIELAB per colour: key rgb + 1 (0 = empty).
    lab_key: Vec<u32>,
    lab_val: Vec<Lab>,
}

/// Entries of the colour-pair memo (a power of two).
const MEMO: usize = 1 << 14;

#[inline(always)]
fn pack_rgb(c: [u8; 3]) -> u64 {
    u64::from(c[0]) << 16 | u64::from(c[1]) << 8 | u64::from(c[2])
}

/// Colour of pixels covered in only one image.
pub const SILHOUETTE_RGB: [u8; 3] = [235, 60, 190];

/// Entries in the colour map table.
const MAP_SIZE: usize = 256;

impl Comparer {
    /// A comparer with empty buffers.
    pub fn new() -> Self {
        Self::default()
    }

    /// The colour map: perceptually uniform and readable with colour-vision deficiencies
    /// (cividis, from the `colorous` crate), `MAP_SIZE` entries from 0 to `scale_max`.
    fn colormap(&mut self) -> &[[u8; 3]] {
        if self.colormap.is_empty() {
            self.colormap = (0..MAP_SIZE)
                .map(|i| {
                    let c = colorous::CIVIDIS.eval_rational(i, MAP_SIZE);
                    [c.r, c.g, c.b]
                })
                .collect();
        }
        &self.colormap
    }

    /// CIELAB of a colour through the per-colour memo (same values as [`srgb8_to_lab`]).
    #[inline]
    fn lab(&mut self, c: [u8; 3]) -> Lab {
        let key = pack_rgb(c) as u32 + 1;
        let slot = (u64::from(key).wrapping_mul(0x9e37_79b9_7f4a_7c15) >> (64 - 14)) as usize;
        if self.lab_key[slot] != key {
            self.lab_key[slot] = key;
            self.lab_val[slot] = srgb8_to_lab(c);
        }
        self.lab_val[slot]
    }

    /// Colour of a dE00 value on the scale 0..=`scale_max`.
    pub fn map_color(&mut self, de: f32, scale_max: f32) -> [u8; 3] {
        let t = if scale_max > 0.0 {
            (de / scale_max).clamp(0.0, 1.0)
        } else {
            1.0
        };
        let i = (t * (MAP_SIZE - 1) as f32 + 0.5) as usize;
        self.colormap()[i.min(MAP_SIZE - 1)]
    }

    /// Compares two RGBA8 images of `width * height` pixels. `covered_a`/`covered_b` say which
    /// pixels each image drew (None: all). Writes the difference image into `out` (RGBA8,
    /// same size): covered-in-both pixels coloured by dE00, silhouette pixels in
    /// [`SILHOUETTE_RGB`], the rest `background`.
    #[allow(clippy::too_many_arguments)] // the two images and their masks belong together
    pub fn compare(
        &mut self,
        a: &[u8],
        b: &[u8],
        covered_a: Option<&dyn Fn(usize) -> bool>,
        covered_b: Option<&dyn Fn(usize) -> bool>,
        settings: DifferenceSettings,
        background: [u8; 3],
        out: &mut [u8],
    ) -> DiffMetrics {
        let n = (a.len() / 4).min(b.len() / 4).min(out.len() / 4);
        if self.memo_key.len() != MEMO {
            self.memo_key = vec![0; MEMO];
            self.memo_val = vec![(0.0, 0.0); MEMO];
            self.lab_key = vec![0; MEMO];
            self.lab_val = vec![srgb8_to_lab([0, 0, 0]); MEMO];
        }
        self.de00.clear();
        self.de76.clear();
        let mut m = DiffMetrics {
            threshold_de00: f64::from(settings.threshold),
            ..Default::default()
        };
        let mut above = 0u64;
        let (mut sum00, mut sum76) = (0.0f64, 0.0f64);
        for i in 0..n {
            let pa = [a[4 * i], a[4 * i + 1], a[4 * i + 2]];
            let pb = [b[4 * i], b[4 * i + 1], b[4 * i + 2]];
            let ca = covered_a.is_none_or(|f| f(i));
            let cb = covered_b.is_none_or(|f| f(i));
            let rgb = match (ca, cb) {
                (true, true) => {
                    let (e00, e76) = if pa == pb {
                        (0.0, 0.0)
                    } else {
                        let key = (pack_rgb(pa) << 24 | pack_rgb(pb)) + 1;
                        // Fibonacci hashing of the 48-bit key into the memo.
                        let slot = (key.wrapping_mul(0x9e37_79b9_7f4a_7c15) >> (64 - 14)) as usize;
                        if self.memo_key[slot] == key {
                            self.memo_val[slot]
                        } else {
                            let (la, lb) = (self.lab(pa), self.lab(pb));
                            let v = (ciede2000(la, lb), delta_e76(la, lb));
                            self.memo_key[slot] = key;
                            self.memo_val[slot] = v;
                            v
                        }
                    };
                    m.peak_luminance[0] = m.peak_luminance[0].max(luminance(pa));
                    m.peak_luminance[1] = m.peak_luminance[1].max(luminance(pb));
                    sum00 += e00;
                    sum76 += e76;
                    if e00 > f64::from(settings.threshold) {
                        above += 1;
                    }
                    self.de00.push(e00 as f32);
                    self.de76.push(e76 as f32);
                    self.map_color(e00 as f32, settings.scale_max)
                }
                (true, false) | (false, true) => {
                    m.silhouette_mismatch_pixels += 1;
                    SILHOUETTE_RGB
                }
                (false, false) => background,
            };
            out[4 * i..4 * i + 4].copy_from_slice(&[rgb[0], rgb[1], rgb[2], 255]);
        }
        let count = self.de00.len();
        m.covered_pixels = count as u64;
        if count > 0 {
            m.de00 = summarize(&self.de00, sum00, &mut self.sorted);
            m.de76 = summarize(&self.de76, sum76, &mut self.sorted);
            m.share_above_threshold = above as f64 / count as f64;
        }
        m.peak_ratio = if m.peak_luminance[1] > 0.0 {
            m.peak_luminance[0] / m.peak_luminance[1]
        } else {
            1.0
        };
        m
    }
}

fn summarize(values: &[f32], sum: f64, sorted: &mut Vec<f32>) -> Summary {
    sorted.clear();
    sorted.extend_from_slice(values);
    let n = sorted.len();
    let rank = (n * 95).div_ceil(100).max(1) - 1;
    let (_, p95, _) = sorted.select_nth_unstable_by(rank, f32::total_cmp);
    let p95 = f64::from(*p95);
    let max = values.iter().copied().fold(0.0f32, f32::max);
    Summary {
        mean: sum / n as f64,
        p95,
        max: f64::from(max),
    }
}

/// Both colours of one pixel and their differences: what the page's probe shows.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
pub struct PixelDifference {
    /// Image A's sRGB colour.
    pub a: [u8; 3],
    /// Image B's sRGB colour.
    pub b: [u8; 3],
    /// Image A's CIELAB.
    pub lab_a: Lab,
    /// Image B's CIELAB.
    pub lab_b: Lab,
    /// CIEDE2000 between them.
    pub de00: f64,
    /// CIE 1976 dE*ab between them.
    pub de76: f64,
}

/// The difference at one pixel of two RGBA8 images.
pub fn pixel_difference(a: [u8; 3], b: [u8; 3]) -> PixelDifference {
    let (lab_a, lab_b) = (srgb8_to_lab(a), srgb8_to_lab(b));
    PixelDifference {
        a,
        b,
        lab_a,
        lab_b,
        de00: ciede2000(lab_a, lab_b),
        de76: delta_e76(lab_a, lab_b),
    }
}

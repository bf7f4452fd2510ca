//! sRGB transfer functions and the 8-bit encoder against IEC 61966-2-1.

use twinshade::shading::{
    encode_srgb8, encode_srgb8_reference, linear_to_srgb, linear_to_srgb_f64, srgb_to_linear,
    srgb_to_linear_f64,
};

#[test]
fn transfer_functions_match_iec_values() {
    // IEC 61966-2-1:1999; values confirmed in docs/REFERENCES.md.
    let cases_decode = [(0.5, 0.2140411405), (128.0 / 255.0, 0.2158605001)];
    for (v, want) in cases_decode {
        assert!((srgb_to_linear_f64(v) - want).abs() < 1e-9, "decode({v})");
        assert!(
            (f64::from(srgb_to_linear(v as f32)) - want).abs() < 1e-6,
            "decode f32 ({v})"
        );
    }
    let cases_encode = [(0.18, 0.4613561295), (0.5, 0.7353569831)];
    for (l, want) in cases_encode {
        assert!((linear_to_srgb_f64(l) - want).abs() < 1e-9, "encode({l})");
        assert!(
            (f64::from(linear_to_srgb(l as f32)) - want).abs() < 1e-6,
            "encode f32 ({l})"
        );
    }
    // Linear segment and the break points (IEC 61966-2-1: 12.92 below 0.0031308).
    assert!((linear_to_srgb_f64(0.002) - 0.02584).abs() < 1e-12);
    assert!((srgb_to_linear_f64(0.04) - 0.04 / 12.92).abs() < 1e-12);
}

#[test]
fn table_encoder_agrees_with_the_reference() {
    // The fast encoder must give the reference's byte for every input. Every f32 within 64
    // ulps of each byte boundary, and a stride through all floats of [0, 1], are checked.
    let one = 1.0f32.to_bits();
    let mut bits = 0u32;
    while bits <= one {
        let l = f32::from_bits(bits);
        assert_eq!(encode_srgb8(l), encode_srgb8_reference(l), "at {l:e}");
        bits += 997;
    }
    for b in 1..=255u32 {
        // The IEC formula's own threshold, in f64: where 255 * encode(l) crosses b - 0.5.
        let t = srgb_to_linear_f64((f64::from(b) - 0.5) / 255.0) as f32;
        for d in -64i32..=64 {
            let l = f32::from_bits((t.to_bits() as i32 + d) as u32);
            assert_eq!(
                encode_srgb8(l),
                encode_srgb8_reference(l),
                "near byte {b}: {l:e}"
            );
        }
        // And the boundary itself lies within a few f32 steps of the exact one.
        let below = f32::from_bits(t.to_bits() - 8);
        let above = f32::from_bits(t.to_bits() + 8);
        assert_eq!(
            u32::from(encode_srgb8(below)),
            b - 1,
            "byte {b} starts too early"
        );
        assert_eq!(
            u32::from(encode_srgb8(above)),
            b,
            "byte {b} starts too late"
        );
    }
    // The single-comparison search relies on at most one threshold per table bucket.
    assert_eq!(twinshade::shading::max_thresholds_per_bucket(), 1);
    assert_eq!(encode_srgb8(0.9999999), 255);
    assert_eq!(encode_srgb8(f32::NAN), 0);
    assert_eq!(encode_srgb8(-1.0), 0);
    assert_eq!(encode_srgb8(7.0), 255);
}

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

#[test]
fn four_lane_encoder_agrees_with_the_reference() {
    // The four-lane encoder (SrgbEncoder::encode4 / pack4) must give, lane by lane, the
    // reference's byte (IEC 61966-2-1 through encode_srgb8_reference): every f32 within 64
    // ulps of each byte boundary, a stride through [0, 1], and the values outside it.
    use twinshade::shading::{SrgbEncoder, F4};
    let enc = SrgbEncoder::new();
    let mut values: Vec<f32> = Vec::new();
    let one = 1.0f32.to_bits();
    let mut bits = 0u32;
    while bits <= one {
        values.push(f32::from_bits(bits));
        bits += 1009;
    }
    for b in 1..=255u32 {
        let t = srgb_to_linear_f64((f64::from(b) - 0.5) / 255.0) as f32;
        for d in -64i32..=64 {
            values.push(f32::from_bits((t.to_bits() as i32 + d) as u32));
        }
    }
    values.extend([
        f32::NAN,
        -f32::NAN,
        f32::INFINITY,
        f32::NEG_INFINITY,
        -0.0,
        0.0,
        -1e-30,
        f32::MIN_POSITIVE,
        1e-45,
        0.9999999,
        1.0,
        1.0000001,
        7.0,
        f32::MAX,
    ]);
    while values.len() % 12 != 0 {
        values.push(0.5);
    }
    for c in values.chunks_exact(12) {
        let lane = |o: usize| F4::new([c[o], c[o + 1], c[o + 2], c[o + 3]]);
        let px = enc.pack4(lane(0), lane(4), lane(8));
        for k in 0..4 {
            let want = enc.pack(c[k], c[4 + k], c[8 + k]);
            let reference = u32::from(encode_srgb8_reference(c[k]))
                | u32::from(encode_srgb8_reference(c[4 + k])) << 8
                | u32::from(encode_srgb8_reference(c[8 + k])) << 16
                | 0xff00_0000;
            assert_eq!(px[k], want, "lane {k} of {c:?}");
            assert_eq!(px[k], reference, "lane {k} of {c:?}");
        }
    }
}

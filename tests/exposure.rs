//! Exposure: a scale of 2^EV on scene light before the sRGB encoding (common practice in
//! real-time engines and photography: one stop doubles the light). Checked as identities of
//! the light model, byte for byte, and against the sRGB decode (IEC 61966-2-1).

use twinshade::scene::ShadingMode;
use twinshade::shading::{ReflectionModel, Rgb};
use twinshade::{Framebuffer, Renderer, Scene};
mod common;

fn panels(scene: &Scene) -> Vec<Vec<u8>> {
    let valid = scene.checked().expect("valid scene");
    let mut r = Renderer::new();
    [
        ShadingMode::PerVertex,
        ShadingMode::PerPixel,
        ShadingMode::Exact,
    ]
    .iter()
    .map(|&mode| {
        let mut fb = Framebuffer::new(0, 0);
        r.render(&valid, mode, &mut fb).expect("renders");
        fb.bytes().to_vec()
    })
    .collect()
}

/// The default scene without ambient light or emission, so light comes from the lights only.
fn lit_by_lights_only(model: ReflectionModel) -> Scene {
    let mut s = Scene::default();
    s.panel.width = 160;
    s.panel.height = 120;
    s.ambient_light = Rgb::BLACK;
    s.model = model;
    s.turn(20.0, 10.0);
    s
}

#[test]
fn one_stop_up_equals_twice_the_light_intensity() {
    for model in ReflectionModel::ALL {
        let mut exposed = lit_by_lights_only(model);
        exposed.exposure_ev = 1.0;
        let mut brighter = lit_by_lights_only(model);
        for l in &mut brighter.lights {
            l.intensity *= 2.0;
        }
        assert!(
            panels(&exposed) == panels(&brighter),
            "{model:?}: +1 EV differs from doubled lights"
        );
        // And it is a change: +1 EV is not the scene at 0 EV.
        assert!(
            panels(&exposed) != panels(&lit_by_lights_only(model)),
            "{model:?}"
        );
    }
}

#[test]
fn zero_ev_is_the_scene_without_exposure() {
    // A scene file without the field reads as 0 EV and draws as before it existed.
    let mut s = Scene::default();
    s.panel.width = 120;
    s.panel.height = 90;
    let json = s.to_json();
    let without: serde_json::Value = {
        let mut v: serde_json::Value = serde_json::from_str(&json).expect("JSON");
        v.as_object_mut().expect("object").remove("exposure_ev");
        v
    };
    let read = Scene::from_json(&without.to_string()).expect("reads");
    assert_eq!(read.exposure_ev, 0.0);
    assert!(panels(&read) == panels(&s));
}

#[test]
fn one_stop_down_halves_the_light_that_reaches_the_pixels() {
    // Decoded to linear light, a pixel at -1 EV is half the pixel at 0 EV, to within the
    // 8-bit quantisation of both (half a code step each side, through the decode's slope).
    let base = lit_by_lights_only(ReflectionModel::BlinnPhong);
    let mut down = base.clone();
    down.exposure_ev = -1.0;
    let (a, b) = (panels(&base), panels(&down));
    let decode = |c: u8| common::srgb_decode_f64(c);
    let mut checked = 0;
    for (pa, pb) in a[1].chunks_exact(4).zip(b[1].chunks_exact(4)) {
        for k in 0..3 {
            let (full, half) = (pa[k], pb[k]);
            if !(40..=250).contains(&full) {
                continue; // too dark to resolve, or possibly clipped
            }
            let step = |c: u8| (decode(c.saturating_add(1)) - decode(c.saturating_sub(1))) / 2.0;
            let expected = decode(full) / 2.0;
            let tol = step(full) / 2.0 + step(half) / 2.0 + 1e-9;
            assert!(
                (decode(half) - expected).abs() <= tol,
                "code {full} at 0 EV, {half} at -1 EV: {} vs {expected}",
                decode(half)
            );
            checked += 1;
        }
    }
    assert!(checked > 1000, "only {checked} channels compared");
}

#[test]
fn exposure_out_of_range_is_refused() {
    for ev in [-10.5, 10.5, f32::NAN] {
        let s = Scene {
            exposure_ev: ev,
            ..Scene::default()
        };
        let e = s.checked().expect_err("refused");
        assert!(e.to_string().contains("exposure"), "{e}");
    }
}

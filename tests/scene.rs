//! The scene as a typed value: colours and choices parsed where they enter, ranges checked
//! once (with the field's path), old names still read, and the facts the page builds its
//! controls from stated once.

use twinshade::geometry::Shape;
use twinshade::scene::{DifferenceSettings, ShadingMode};
use twinshade::shading::Rgb;
use twinshade::{Scene, SceneError};

#[test]
fn colours_are_parsed_once_and_written_back_the_same() {
    let c: Rgb = "#1B1d22".parse().expect("a colour");
    assert_eq!(c, Rgb([0x1b, 0x1d, 0x22]));
    assert_eq!(c.to_string(), "#1b1d22");
    assert_eq!(Rgb::hex("#1b1d22"), c);
    for bad in ["teal", "#12345", "#1234567", "#12345g", ""] {
        assert!(bad.parse::<Rgb>().is_err(), "'{bad}' is refused");
    }
    let json = serde_json::to_string(&Scene::default()).expect("serialises");
    let back = Scene::from_json(&json).expect("reads back");
    assert_eq!(back, Scene::default());
}

#[test]
fn a_field_out_of_range_is_refused_with_its_path() {
    let mut s = Scene::default();
    s.lights[1].intensity = 500.0;
    match s.validated() {
        Err(SceneError::Field { path, message }) => {
            assert_eq!(path, "lights[1].intensity");
            assert_eq!(
                message,
                "light 2 intensity must be between 0 and 100, not 500"
            );
        }
        other => panic!("expected a field error, got {other:?}"),
    }
    let err = Scene::from_json(r##"{"background": "#12"}"##).expect_err("a bad colour");
    assert!(matches!(err, SceneError::Syntax(_)), "{err:?}");
    assert!(err.to_string().contains("#rrggbb"), "{err}");
    // A valid scene stays valid through the edits that keep it so.
    let mut v = Scene::default()
        .validated()
        .expect("the default scene is valid");
    v.turn(f32::NAN, 3.0);
    v.set_rotation(glam::Quat::from_xyzw(0.0, 0.0, 0.0, 0.0));
    v.set_roll(f32::INFINITY);
    assert!(v.scene().validate().is_ok());
    assert!(v.edit(|s| s.panel.width = 0).is_err());
}

#[test]
fn shading_modes_have_one_name_and_old_names_still_read() {
    for m in ShadingMode::ALL {
        let json = serde_json::to_string(&m).expect("serialises");
        assert_eq!(json, format!("\"{}\"", m.id()));
        let back: ShadingMode = serde_json::from_str(&json).expect("reads back");
        assert_eq!(back, m);
    }
    // Scene files and links of earlier builds named the panels "gouraud" and "phong".
    let old: DifferenceSettings =
        serde_json::from_str(r#"{"pair": ["gouraud", "phong"]}"#).expect("old names");
    assert_eq!(old.pair, [ShadingMode::PerVertex, ShadingMode::PerPixel]);
    assert_eq!(old, DifferenceSettings::default());
}

#[test]
fn every_detail_value_of_every_shape_is_a_valid_shape() {
    assert_eq!(Shape::DETAIL.len(), 6);
    for c in Shape::DETAIL {
        for d in c.min..=c.max {
            let s = Shape::from_detail(c.kind, d).expect("a known kind");
            s.validate()
                .unwrap_or_else(|e| panic!("{} at {d}: {e}", c.kind));
            assert_eq!(s.detail(), d, "{} at {d}", c.kind);
            let json = serde_json::to_value(s).expect("serialises");
            assert_eq!(json["kind"], c.kind);
        }
        assert!((c.min..=c.max).contains(&c.default), "{}", c.kind);
        // Out-of-range detail is clamped, never an invalid shape.
        let high = Shape::from_detail(c.kind, u32::MAX).expect("clamped");
        assert_eq!(high.detail(), c.max);
    }
    assert_eq!(Shape::from_detail("teapot", 3), None);
}

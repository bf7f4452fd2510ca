//! Scenes in links: round trips, damage and truncation, presets.

use twinshade::geometry::Projection;
use twinshade::geometry::Shape;
use twinshade::scene::presets;
use twinshade::scene::{decode, encode};
use twinshade::scene::{MeshSource, PanelSize};
use twinshade::shading::Rgb;
use twinshade::shading::{Finish, LightKind, ReflectionModel};
use twinshade::{Scene, Workbench};

const PANEL: PanelSize = PanelSize {
    width: 320,
    height: 240,
};

/// A deterministic pseudo-random source (xorshift64).
struct Rng(u64);
impl Rng {
    fn next(&mut self) -> u64 {
        self.0 ^= self.0 << 13;
        self.0 ^= self.0 >> 7;
        self.0 ^= self.0 << 17;
        self.0
    }
    fn unit(&mut self) -> f32 {
        (self.next() >> 40) as f32 / (1u64 << 24) as f32
    }
    fn pick<T: Copy>(&mut self, items: &[T]) -> T {
        items[(self.next() % items.len() as u64) as usize]
    }
}

fn random_scene(r: &mut Rng) -> Scene {
    let mut s = Scene {
        panel: PANEL,
        ..Scene::default()
    };
    let k = [0; 6].map(|_| r.next());
    let shapes = [
        Shape::Icosphere {
            level: (k[0] % 8) as u32,
        },
        Shape::Torus {
            rings: 3 + (k[1] % 60) as u32,
            segments: 3 + (k[2] % 30) as u32,
        },
        Shape::Cube,
        Shape::QuadGrid {
            cells: 1 + (k[3] % 40) as u32,
        },
        Shape::Vase {
            rings: 2 + (k[4] % 40) as u32,
            segments: 3 + (k[5] % 40) as u32,
        },
    ];
    s.mesh = MeshSource::Shape(r.pick(&shapes));
    s.camera.projection = r.pick(&[Projection::Perspective, Projection::Orthographic]);
    s.camera.roll_deg = r.unit() * 360.0 - 180.0;
    s.camera.yaw_deg = r.unit() * 90.0;
    s.model = r.pick(&[ReflectionModel::Phong, ReflectionModel::BlinnPhong]);
    s.material.shininess = 1.0 + r.unit() * 500.0;
    s.material.finish = r.pick(&[Finish::Dielectric, Finish::Metal]);
    let c = r.next();
    s.material.base_color = Rgb([(c >> 16) as u8, (c >> 8) as u8, c as u8]);
    s.lights[0].kind = r.pick(&[LightKind::Directional, LightKind::Point]);
    s.lights[0].azimuth_deg = r.unit() * 360.0 - 180.0;
    s.lights.truncate(1 + (r.next() % 2) as usize);
    s.cull_back_faces = r.next() % 2 == 0;
    s.perspective_correct = r.next() % 2 == 0;
    let (a, b, c, d) = (
        r.unit() - 0.5,
        r.unit() - 0.5,
        r.unit() - 0.5,
        r.unit() + 0.1,
    );
    s.set_rotation(glam::Quat::from_xyzw(a, b, c, d));
    s.difference.threshold = 0.5 + r.unit() * 3.0;
    s
}

#[test]
fn links_round_trip_random_scenes_exactly() {
    let mut r = Rng(0x5eed_1234_abcd_0001);
    for i in 0..500 {
        let scene = random_scene(&mut r);
        assert_eq!(scene.validate(), Ok(()), "scene {i} is valid");
        let link = encode(&scene);
        assert!(
            link.len() < 600,
            "scene {i}: link of {} characters",
            link.len()
        );
        let back = decode(&link, PANEL).expect("own link decodes");
        assert_eq!(back, scene, "scene {i} changed through its link {link}");
        // The same with the fragment marker the page puts in front.
        assert_eq!(
            decode(&format!("#s={link}"), PANEL).expect("with marker"),
            scene
        );
    }
    // The default scene has the shortest link: nothing differs.
    assert!(
        encode(&Scene::default()).len() <= 20,
        "{}",
        encode(&Scene::default())
    );
}

#[test]
fn every_truncation_and_damage_is_refused_cleanly() {
    let mut r = Rng(0x0dd_ba11);
    let scene = random_scene(&mut r);
    let link = encode(&scene);
    for cut in 0..link.len() {
        let err = decode(&link[..cut], PANEL).expect_err("a truncated link is refused");
        assert!(
            err.to_string().contains("cannot be read"),
            "cut {cut}: {err}"
        );
    }
    // Every single-character change is refused (or, if it happens to decode, validates).
    let alphabet = b"ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789-_";
    let mut refused = 0;
    for pos in 2..link.len() {
        let mut bytes = link.clone().into_bytes();
        bytes[pos] = alphabet[(bytes[pos] as usize * 7 + pos) % alphabet.len()];
        let Ok(text) = String::from_utf8(bytes) else {
            continue;
        };
        if text == link {
            continue;
        }
        match decode(&text, PANEL) {
            Err(_) => refused += 1,
            Ok(s) => assert_eq!(
                s.validate(),
                Ok(()),
                "a decoded damaged link must still be a valid scene"
            ),
        }
    }
    assert!(
        refused as f64 >= 0.95 * (link.len() - 2) as f64,
        "only {refused} of {} damaged links refused",
        link.len() - 2
    );
    for foreign in [
        "",
        "#",
        "#s=",
        "hello",
        "2.abc",
        "1.!!!!",
        "1.eJwrSS0u0U1KzMvP1dPNzgAALc8FPQ",
    ] {
        assert!(decode(foreign, PANEL).is_err(), "'{foreign}' is refused");
    }
}

#[test]
fn every_preset_is_valid_and_shows_a_difference() {
    let mut bench = Workbench::new();
    let all = presets();
    assert!(all.len() >= 6);
    for p in &all {
        assert!(
            p.caption.ends_with('.') && p.caption.len() > 40,
            "{}: caption '{}'",
            p.id,
            p.caption
        );
        let scene = Scene {
            panel: PANEL,
            ..p.scene.clone()
        };
        let report = bench
            .render(&scene.checked().expect("valid scene"))
            .expect("preset renders");
        let m = report.metrics;
        assert!(
            m.covered_pixels > 5_000,
            "{}: only {} pixels drawn",
            p.id,
            m.covered_pixels
        );
        assert!(
            m.de00.max > 1.0,
            "{}: nothing noticeable differs (max dE00 {})",
            p.id,
            m.de00.max
        );
        // The CSV export has as many values as columns.
        let csv = report.to_csv(&encode(&scene));
        let rows: Vec<&str> = csv.lines().collect();
        assert_eq!(rows.len(), 2, "{}: header and one row", p.id);
        assert_eq!(
            rows[0].split(',').count(),
            rows[1].split(',').count(),
            "{}: CSV columns",
            p.id
        );
        // Presets travel through links too.
        assert_eq!(decode(&encode(&scene), PANEL).expect("preset link"), scene);
    }
}

//! The tessellation advisor on the default glossy sphere and on a mesh without a resolution
//! parameter.

use twinshade::analysis::{AdviceSettings, Advisor};
use twinshade::geometry::Shape;
use twinshade::geometry::SubdivisionMethod;
use twinshade::scene::{axis_angle, MeshSource};
use twinshade::{Scene, Workbench};

fn small(mut s: Scene) -> Scene {
    s.panel.width = 200;
    s.panel.height = 150;
    s
}

fn advise(scene: &Scene, settings: AdviceSettings) -> twinshade::analysis::Advice {
    let mut bench = Workbench::new();
    if let MeshSource::File { .. } = scene.mesh {
        bench.set_file_mesh(Shape::Cube.build());
    }
    let mut advisor =
        Advisor::new(&scene.checked().expect("valid scene"), settings).expect("valid advice");
    let mut last = (0, 0);
    advisor
        .run(&mut bench, |d, t| last = (d, t))
        .expect("advice runs");
    assert_eq!(last.0, last.1, "progress ends at its total");
    advisor.advice().clone()
}

const SETTINGS: AdviceSettings = AdviceSettings {
    threshold: 1.0,
    steps: 12,
    method: SubdivisionMethod::Midpoint,
};

#[test]
fn glossier_needs_at_least_as_many_levels() {
    // A tighter highlight (higher Blinn-Phong exponent) is a narrower lobe that vertices
    // sample worse, so the advice cannot go down as shininess goes up (common practice).
    let mut advised = vec![];
    for shininess in [8.0, 32.0, 128.0, 512.0] {
        let mut scene = small(Scene::default());
        scene.material.shininess = shininess;
        let a = advise(&scene, SETTINGS);
        let level = a.advised.expect("some icosphere level passes");
        let r = &a.rungs[level];
        println!(
            "shininess {shininess}: {} ({} vertices, {} triangles, worst p95 {:.3}); per-pixel {} lit pixels",
            r.label, r.vertices, r.triangles, r.worst_p95, a.current_pixels
        );
        advised.push(level);
    }
    assert!(
        advised.windows(2).all(|w| w[0] <= w[1]),
        "advised levels by shininess: {advised:?}"
    );
    assert!(advised[0] < advised[3], "{advised:?}");
}

#[test]
fn the_advised_level_meets_the_threshold_at_every_angle() {
    let scene = small(Scene::default());
    let a = advise(&scene, SETTINGS);
    let i = a.advised.expect("a level passes");
    assert!(a.rungs[..i].iter().all(|r| !r.passes));
    assert!(
        i + 1 >= a.rungs.len() - 1,
        "stops one rung after the advice"
    );
    // Rendered again, independently of the advisor, at each of its angles.
    let mut check = scene.clone();
    check.mesh = a.rungs[i].mesh.clone();
    check.subdivision = a.rungs[i].subdivision;
    let label = &a.rungs[i].label;
    let mut bench = Workbench::new();
    let mut worst: f64 = 0.0;
    for step in 0..SETTINGS.steps {
        let deg = 360.0 * step as f32 / SETTINGS.steps as f32;
        check.set_rotation(scene.rotation_quat() * axis_angle(glam::Vec3::Y, deg));
        let p95 = bench
            .render(&check.checked().expect("valid scene"))
            .expect("renders")
            .metrics
            .de00
            .p95;
        assert!(p95 < 1.0, "{label} at {deg} degrees: p95 {p95}");
        worst = worst.max(p95);
    }
    assert_eq!(worst, a.rungs[i].worst_p95);
    // The coarser rung fails somewhere.
    assert!(a.rungs[i - 1].worst_p95 >= 1.0);
}

#[test]
fn meshes_without_a_resolution_are_subdivided() {
    let mut scene = small(Scene::default());
    scene.mesh = MeshSource::File {
        name: "box.obj".into(),
    };
    scene.lights[0].kind = twinshade::shading::LightKind::Point;
    scene.lights[0].distance = 1.6;
    let a = advise(&scene, SETTINGS);
    assert_eq!(a.rungs[0].label, "as authored");
    assert_eq!(a.rungs[1].label, "1 x midpoint");
    assert_eq!(a.rungs[1].triangles, 4 * a.rungs[0].triangles);
    assert!(a.rungs[1].vertices > a.rungs[0].vertices);
    println!(
        "cube under a close point light: {:?}",
        a.rungs
            .iter()
            .map(|r| (r.label.as_str(), r.vertices, r.worst_p95))
            .collect::<Vec<_>>()
    );
    // Bad settings are refused with a message.
    let bad = AdviceSettings {
        steps: 0,
        ..SETTINGS
    };
    assert!(Advisor::new(&scene.checked().expect("valid scene"), bad).is_err());
}

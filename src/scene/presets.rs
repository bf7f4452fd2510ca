//! Presets: scenes of our own, each showing one artifact of per-vertex lighting, with a
//! one-sentence caption in plain words. The page steps through them in presentation mode and
//! `twinshade render --preset ID` renders them.

use crate::geometry::camera::Projection;
use crate::geometry::shapes::Shape;
use crate::geometry::vertex_buffer::PolygonMode;
use crate::scene::definition::Scene;
use crate::scene::settings::MeshSource;
use crate::shading::color::Rgb;
use crate::shading::lighting::{Finish, Light, LightKind, Material, ReflectionModel};

/// A named scene with its caption.
#[derive(Clone, Debug)]
pub struct Preset {
    /// Short identifier for links and the command line.
    pub id: &'static str,
    /// Title for menus.
    pub title: &'static str,
    /// One sentence saying what to look at.
    pub caption: &'static str,
    /// The scene.
    pub scene: Scene,
}

fn light(kind: LightKind, azimuth_deg: f32, elevation_deg: f32, distance: f32) -> Light {
    Light {
        kind,
        azimuth_deg,
        elevation_deg,
        distance,
        ..Light::default()
    }
}

/// Every preset, in presentation order.
pub fn presets() -> Vec<Preset> {
    let base = Scene::default();
    let mut lost = base.clone();
    lost.mesh = MeshSource::Shape(Shape::Icosphere { level: 1 });
    lost.material.shininess = 160.0;
    lost.material.specular = 0.9;
    lost.lights.truncate(1);
    lost.lights[0].azimuth_deg = 18.0;
    lost.lights[0].elevation_deg = 16.0;

    let mut mach = base.clone();
    mach.mesh = MeshSource::Shape(Shape::UvSphere {
        rings: 6,
        segments: 12,
    });
    mach.material = Material {
        base_color: Rgb::hex("#c9b28f"),
        specular: 0.0,
        ..Material::default()
    };
    mach.lights = vec![light(LightKind::Directional, 60.0, 20.0, 3.0)];

    let mut crawl = base.clone();
    crawl.mesh = MeshSource::Shape(Shape::Torus {
        rings: 24,
        segments: 12,
    });
    crawl.camera.pitch_deg = 30.0;
    crawl.material.base_color = Rgb::hex("#b8472f");
    crawl.material.shininess = 120.0;
    crawl.material.specular = 0.8;

    let mut split = base.clone();
    split.mesh = MeshSource::Shape(Shape::QuadGrid { cells: 3 });
    split.polygons = PolygonMode::AsAuthored;
    split.camera.distance = 2.0;
    split.material.base_color = Rgb::hex("#5d7fb3");
    split.material.shininess = 40.0;
    split.lights = vec![light(LightKind::Point, 20.0, 25.0, 1.2)];
    split.lights[0].falloff = 0.6;

    let mut rolling = split.clone();
    rolling.polygons = PolygonMode::Scanline;
    rolling.camera.roll_deg = 30.0;

    let mut close = base.clone();
    close.mesh = MeshSource::Shape(Shape::QuadGrid { cells: 1 });
    close.material = Material {
        base_color: Rgb::hex("#8a9a5b"),
        specular: 0.3,
        shininess: 20.0,
        ..Material::default()
    };
    close.camera.distance = 2.0;
    close.lights = vec![light(LightKind::Point, 0.0, 0.0, 0.6)];
    close.lights[0].falloff = 4.0;

    let mut affine = base.clone();
    affine.mesh = MeshSource::Shape(Shape::QuadGrid { cells: 2 });
    affine.perspective_correct = false;
    affine.camera.pitch_deg = -62.0;
    affine.camera.distance = 1.9;
    affine.camera.fov_y_deg = 70.0;
    affine.camera.projection = Projection::Perspective;
    affine.material.base_color = Rgb::hex("#d8d2c4");
    affine.material.finish = Finish::Dielectric;
    affine.model = ReflectionModel::BlinnPhong;
    affine.lights = vec![light(LightKind::Point, 0.0, 60.0, 1.0)];
    affine.lights[0].falloff = 1.5;

    let mut glossy = base.clone();
    glossy.mesh = MeshSource::Shape(Shape::Icosphere { level: 3 });
    glossy.model = ReflectionModel::MetallicRoughness;
    glossy.material = Material {
        base_color: Rgb::hex("#d8a657"),
        metallic: 1.0,
        roughness: 0.2,
        ..Material::default()
    };
    let mut rough = glossy.clone();
    rough.material.roughness = 0.8;

    vec![
        Preset {
            id: "lost-highlight",
            title: "Highlight lost between vertices",
            caption: "A small, sharp highlight that lands between vertices all but vanishes when light is computed only at the vertices.",
            scene: lost,
        },
        Preset {
            id: "mach-bands",
            title: "Mach bands on a low-poly surface",
            caption: "Shading interpolated across large faces bends at every edge, and the eye sees those bends as light and dark bands.",
            scene: mach,
        },
        Preset {
            id: "crawling-highlight",
            title: "Highlight crawling as the model turns",
            caption: "Drag to turn the ring: the per-vertex highlight jumps, stretches and dims from vertex to vertex while the per-pixel one glides.",
            scene: crawl,
        },
        Preset {
            id: "quad-split",
            title: "Quads shade by how they are split",
            caption: "Per-vertex light on quads depends on which diagonal splits them and on the view's roll; per-pixel light barely notices.",
            scene: split,
        },
        Preset {
            id: "rolling-quads",
            title: "Quads that change as the view rolls",
            caption: "Filled scanline by scanline without a split, a quad's inside depends on how it lies on screen: roll the view, or sweep the roll, and fixed points of the surface change.",
            scene: rolling,
        },
        Preset {
            id: "close-point-light",
            title: "Point light close to a large face",
            caption: "A point light near a large flat face makes a bright spot in its middle that per-vertex lighting, lit only at the corners, cannot show.",
            scene: close,
        },
        Preset {
            id: "affine-interpolation",
            title: "Affine versus perspective-correct",
            caption: "Interpolating in screen space instead of perspective-correctly bends shading across faces seen at a grazing angle; tick the box to compare.",
            scene: affine,
        },
        Preset {
            id: "glossy-metal",
            title: "Glossy metal needs per-pixel light",
            caption: "A polished brass sphere of 642 vertices (glTF metallic-roughness, roughness 0.2): its narrow highlight falls between vertices, so per-vertex lighting breaks it into facets.",
            scene: glossy,
        },
        Preset {
            id: "rough-metal",
            title: "Rough metal survives per-vertex light",
            caption: "The same sphere and brass at roughness 0.8: the broad highlight spans many vertices, and per-vertex lighting stays within a just-noticeable difference almost everywhere.",
            scene: rough,
        },
    ]
}

/// The preset with this id.
pub fn preset(id: &str) -> Option<Preset> {
    presets().into_iter().find(|p| p.id == id)
}

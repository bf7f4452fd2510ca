//! The defaults of every scene format, frozen.
//!
//! Scene files and links leave out fields (a link holds only what differs from the defaults),
//! so what a record means depends on the defaults it was made against. Each format number
//! keeps its own table here, as data: a file of `version` N and a link `N.…` are read by
//! writing their fields over table N, never over today's [`Scene::default`]. When a default
//! changes, the change gets a new format number and a new table; the old tables stay, so every
//! scene file and link made by an earlier build opens to exactly the scene it was made from.
//! `tests/links.rs` fails when `Scene::default` and the current format's table disagree.
//!
//! [`Scene::default`]: crate::scene::definition::Scene

use serde_json::Value;

/// The format this build writes: the scene JSON `version` and the link prefix.
pub const FORMAT: u32 = 2;

/// The revision of the pixels this build draws. It is raised with every deliberate change that
/// alters pixels (the golden images re-blessed in the same change); scenes, links, sheets and
/// metrics record it, and a scene made under an older revision opens with a notice that its
/// pixels may differ from when it was made. Raising it changes the scene's defaults, so it
/// comes with a new format.
pub const RENDERER_REVISION: u32 = 1;

/// The notice for a scene made under renderer revision `made` and shown by this build, or
/// `None` when the revisions agree.
pub fn revision_notice(made: u32, current: u32) -> Option<String> {
    (made != current).then(|| {
        format!(
            "This scene was made with renderer revision {made}; this build draws revision \
             {current}, so its pixels may differ from when it was made."
        )
    })
}

/// Format 1 (builds up to the metallic-roughness model): the scene JSON of the defaults. The
/// shading modes were once called `gouraud` and `phong`; both spellings are read. Records of
/// format 1 made before scenes recorded their renderer revision were all made under
/// revision 1, which the table fills in.
const FORMAT_1: &str = r##"{
    "version": 1,
    "mesh": {
        "shape": {
            "kind": "icosphere",
            "level": 2
        }
    },
    "normals": {
        "source": "authored",
        "weighting": "angle",
        "crease_deg": 180.0
    },
    "polygons": "as_authored",
    "subdivision": {
        "method": "midpoint",
        "levels": 0
    },
    "camera": {
        "projection": "perspective",
        "fov_y_deg": 45.0,
        "ortho_height": 2.4,
        "yaw_deg": 0.0,
        "pitch_deg": 0.0,
        "distance": 3.0,
        "roll_deg": 0.0,
        "near": 0.1,
        "far": 100.0
    },
    "rotation": [
        0.0,
        0.0,
        0.0,
        1.0
    ],
    "lights": [
        {
            "kind": "directional",
            "azimuth_deg": 35.0,
            "elevation_deg": 30.0,
            "distance": 2.5,
            "color": "#fff4e0",
            "intensity": 1.0,
            "falloff": 0.1
        },
        {
            "kind": "point",
            "azimuth_deg": -70.0,
            "elevation_deg": -10.0,
            "distance": 3.0,
            "color": "#9fc3ff",
            "intensity": 0.5,
            "falloff": 0.05
        }
    ],
    "ambient_light": "#ffffff",
    "material": {
        "base_color": "#2f8f83",
        "ambient": 0.08,
        "diffuse": 0.9,
        "specular": 0.6,
        "shininess": 80.0,
        "emissive": "#000000",
        "emissive_strength": 0.0,
        "finish": "dielectric"
    },
    "model": "blinn_phong",
    "cull_back_faces": true,
    "perspective_correct": true,
    "panel": {
        "width": 480,
        "height": 360
    },
    "background": "#1b1d22",
    "renderer": 1,
    "difference": {
        "pair": [
            "per_vertex",
            "per_pixel"
        ],
        "threshold": 1.0,
        "scale_max": 5.0
    }
}"##;

/// Fields that format 1 did not have, with the values that reproduce what format-1 builds
/// did: normals computed with each position index its own vertex, glTF files without normals
/// smoothed, vertex colours and file materials ignored, and a metallic-roughness material that only the (then
/// absent) model reads.
const FORMAT_1_LATER_FIELDS: &str = r##"{
    "vertex_colors": false,
    "material_source": "scene",
    "normals": {
        "coincident": "separate",
        "gltf_without_normals": "smooth"
    },
    "material": {
        "roughness": 0.5,
        "metallic": 0.0
    }
}"##;

/// Fields added to the scene after format 2's table was frozen, with the values that keep
/// both earlier formats' records drawing as they did: no exposure change.
const FORMAT_2_LATER_FIELDS: &str = r##"{
    "exposure_ev": 0.0
}"##;

/// Format 2: the glTF metallic-roughness model (material `roughness`, `metallic`; model
/// `metallic_roughness`); vertex colours and materials of mesh files are used; computed normals join
/// corners at the same position; glTF files without normals are shaded flat, as the glTF
/// specification requires. Every format-1 default is unchanged.
const FORMAT_2: &str = r##"{
    "version": 2,
    "mesh": {
        "shape": {
            "kind": "icosphere",
            "level": 2
        }
    },
    "normals": {
        "source": "authored",
        "weighting": "angle",
        "crease_deg": 180.0,
        "coincident": "joined",
        "gltf_without_normals": "flat"
    },
    "polygons": "as_authored",
    "subdivision": {
        "method": "midpoint",
        "levels": 0
    },
    "camera": {
        "projection": "perspective",
        "fov_y_deg": 45.0,
        "ortho_height": 2.4,
        "yaw_deg": 0.0,
        "pitch_deg": 0.0,
        "distance": 3.0,
        "roll_deg": 0.0,
        "near": 0.1,
        "far": 100.0
    },
    "rotation": [
        0.0,
        0.0,
        0.0,
        1.0
    ],
    "lights": [
        {
            "kind": "directional",
            "azimuth_deg": 35.0,
            "elevation_deg": 30.0,
            "distance": 2.5,
            "color": "#fff4e0",
            "intensity": 1.0,
            "falloff": 0.1
        },
        {
            "kind": "point",
            "azimuth_deg": -70.0,
            "elevation_deg": -10.0,
            "distance": 3.0,
            "color": "#9fc3ff",
            "intensity": 0.5,
            "falloff": 0.05
        }
    ],
    "ambient_light": "#ffffff",
    "material": {
        "base_color": "#2f8f83",
        "ambient": 0.08,
        "diffuse": 0.9,
        "specular": 0.6,
        "shininess": 80.0,
        "emissive": "#000000",
        "emissive_strength": 0.0,
        "finish": "dielectric",
        "roughness": 0.5,
        "metallic": 0.0
    },
    "vertex_colors": true,
    "material_source": "file",
    "model": "blinn_phong",
    "cull_back_faces": true,
    "perspective_correct": true,
    "panel": {
        "width": 480,
        "height": 360
    },
    "background": "#1b1d22",
    "renderer": 1,
    "difference": {
        "pair": [
            "per_vertex",
            "per_pixel"
        ],
        "threshold": 1.0,
        "scale_max": 5.0
    }
}"##;

/// The defaults of format `n` as JSON, or `None` for a format this build does not know.
pub fn defaults(n: u32) -> Option<Value> {
    // The tables are constants checked by the tests: they always parse.
    let parse = |text: &str| serde_json::from_str::<Value>(text).ok();
    match n {
        1 => {
            let mut table = parse(FORMAT_1)?;
            merge(&mut table, parse(FORMAT_1_LATER_FIELDS)?);
            merge(&mut table, parse(FORMAT_2_LATER_FIELDS)?);
            Some(table)
        }
        2 => {
            let mut table = parse(FORMAT_2)?;
            merge(&mut table, parse(FORMAT_2_LATER_FIELDS)?);
            Some(table)
        }
        _ => None,
    }
}

/// Writes `patch` over `base` (objects merged field by field, anything else replaced). A
/// one-key object over a one-key object with another key is a different variant of an enum
/// (the mesh's `{"shape": ...}` against `{"file": ...}`) and replaces it whole.
pub fn merge(base: &mut Value, patch: Value) {
    let other_variant = |b: &serde_json::Map<String, Value>, p: &serde_json::Map<String, Value>| {
        b.len() == 1 && p.len() == 1 && b.keys().next() != p.keys().next()
    };
    match (base, patch) {
        (Value::Object(b), Value::Object(p)) if other_variant(b, &p) => {
            *b = p;
        }
        (Value::Object(b), Value::Object(p)) => {
            for (k, v) in p {
                match b.get_mut(k.as_str()) {
                    Some(slot) => merge(slot, v),
                    None => {
                        b.insert(k, v);
                    }
                }
            }
        }
        (slot, v) => *slot = v,
    }
}

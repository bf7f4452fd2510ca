//! The published scene schema: a JSON Schema (draft 2020-12) generated from the scene types,
//! so the field names, kinds and ranges it states are the ones the parser reads.
//!
//! It describes scenes as this build writes them. The parser accepts a little more, and the
//! schema says so in its description: fields may be left out (they take the defaults of the
//! file's `version`, frozen in `src/scene/formats.rs`), and names of earlier builds are still
//! read (`gouraud`, `phong`, `fan`, `triangulation`). Checks between fields (near < far, the
//! difference pair not naming `flat`, a non-zero rotation) are the parser's alone.

use crate::scene::definition::Scene;

/// The scene schema as JSON.
pub fn scene_schema() -> serde_json::Value {
    let mut schema = schemars::schema_for!(Scene);
    schema.insert("title".into(), "twinshade scene".into());
    schema.insert(
        "description".into(),
        "Everything that decides the pixels of a twinshade comparison (scene files, \
         `twinshade scene`, the JSON behind a page link). Every field may be left out: it then \
         takes the default of the scene's `version` (1 when absent), and those defaults never \
         change for a version. Colours are sRGB `#rrggbb`. Older vocabulary (`gouraud`, \
         `phong`, `fan`, `triangulation`) is still read but not written. Checks that involve \
         two fields (0 < near < distance, near < far; the difference pair: two different \
         shadings among per_vertex, per_pixel and exact; a rotation of non-zero length) are \
         made by twinshade when it reads the scene."
            .into(),
    );
    let mut value = schema.to_value();
    shortest_f32(&mut value);
    value
}

/// Writes every number that is an `f32` widened to `f64` (defaults like 0.1 arrive as
/// 0.10000000149011612) as the shortest decimal that reads back to the same `f32`, as the
/// scene JSON itself writes it.
fn shortest_f32(value: &mut serde_json::Value) {
    match value {
        serde_json::Value::Number(n) if n.is_f64() => {
            if let Some(x) = n.as_f64() {
                let narrow = x as f32;
                if f64::from(narrow) == x {
                    if let Some(short) = format!("{narrow}")
                        .parse::<f64>()
                        .ok()
                        .and_then(serde_json::Number::from_f64)
                    {
                        *n = short;
                    }
                }
            }
        }
        serde_json::Value::Array(items) => items.iter_mut().for_each(shortest_f32),
        serde_json::Value::Object(fields) => fields.values_mut().for_each(shortest_f32),
        _ => {}
    }
}

/// The schema as pretty JSON text, as `twinshade scene --schema` prints it and the page
/// build ships it (`pkg/scene.schema.json`).
pub fn scene_schema_text() -> String {
    // Serialising a JSON value cannot fail.
    serde_json::to_string_pretty(&scene_schema()).unwrap_or_default()
}

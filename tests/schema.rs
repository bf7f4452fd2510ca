//! The published scene schema (`twinshade scene --schema`), checked with a general-purpose
//! JSON Schema validator from the registry (the `boon` crate 0.6, draft 2020-12): every
//! preset, the default scene and every stored link's scene conform to it; and the schema and
//! the parser agree on what they refuse, at every range the schema states.

use serde_json::{json, Value};
use twinshade::scene::{presets, scene_schema, scene_schema_text, Scene};

/// The compiled scene schema (boon checks it against the draft's meta-schema first).
struct Validator {
    schemas: boon::Schemas,
    index: boon::SchemaIndex,
}

impl Validator {
    fn is_valid(&self, scene: &Value) -> bool {
        self.schemas.validate(scene, self.index).is_ok()
    }
}

fn validator() -> Validator {
    let schema = scene_schema();
    assert_eq!(
        schema["$schema"], "https://json-schema.org/draft/2020-12/schema",
        "the schema names its draft"
    );
    let mut schemas = boon::Schemas::new();
    let mut compiler = boon::Compiler::new();
    compiler
        .add_resource("urn:twinshade:scene", schema)
        .expect("the schema is a resource");
    // Compiling validates the schema against the draft 2020-12 meta-schema.
    let index = compiler
        .compile("urn:twinshade:scene", &mut schemas)
        .unwrap_or_else(|e| panic!("not a valid JSON Schema: {e}"));
    Validator { schemas, index }
}

fn errors(v: &Validator, scene: &Value) -> Vec<String> {
    match v.schemas.validate(scene, v.index) {
        Ok(()) => Vec::new(),
        Err(e) => vec![format!("{e:#}")],
    }
}

#[test]
fn the_default_scene_every_preset_and_every_stored_link_conform() {
    let v = validator();
    let mut checked = 0;
    let mut scenes = vec![("default".to_string(), Scene::default())];
    scenes.extend(presets().into_iter().map(|p| (p.id.to_string(), p.scene)));
    for (name, scene) in &scenes {
        let value = serde_json::to_value(scene).expect("scene as JSON");
        let e = errors(&v, &value);
        assert!(e.is_empty(), "{name}: {e:?}");
        checked += 1;
    }
    // The stored-link corpus holds the scene JSON each committed link decodes to.
    let corpus: Value = serde_json::from_str(
        &std::fs::read_to_string(
            std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/links/corpus.json"),
        )
        .expect("tests/links/corpus.json"),
    )
    .expect("corpus JSON");
    let entries = corpus["entries"].as_array().expect("entries array");
    assert!(entries.len() >= 10, "corpus has {} links", entries.len());
    for entry in entries {
        let e = errors(&v, &entry["scene"]);
        assert!(e.is_empty(), "stored link {}: {e:?}", entry["name"]);
        checked += 1;
    }
    assert_eq!(checked, 1 + presets().len() + entries.len());
}

#[test]
fn the_schema_is_what_the_command_line_prints_and_describes_every_scene_field() {
    let text = scene_schema_text();
    let printed = std::process::Command::new(env!("CARGO_BIN_EXE_twinshade"))
        .args(["scene", "--schema"])
        .output()
        .expect("run twinshade");
    assert!(printed.status.success());
    assert_eq!(String::from_utf8_lossy(&printed.stdout).trim_end(), text);
    // Every field the default scene writes is a property of the schema, and the schema
    // allows no others.
    let schema = scene_schema();
    let properties = schema["properties"].as_object().expect("properties");
    let default = serde_json::to_value(Scene::default()).expect("scene JSON");
    let fields = default.as_object().expect("object");
    let mut a: Vec<&String> = properties.keys().collect();
    let mut b: Vec<&String> = fields.keys().collect();
    a.sort();
    b.sort();
    assert_eq!(a, b);
    assert_eq!(schema["additionalProperties"], json!(false));
}

/// Follows `$ref` to `#/$defs/...`.
fn resolve<'a>(root: &'a Value, mut s: &'a Value) -> &'a Value {
    while let Some(r) = s.get("$ref").and_then(Value::as_str) {
        let name = r.strip_prefix("#/$defs/").expect("local reference");
        s = &root["$defs"][name];
    }
    s
}

/// Every number in `scene` with the schema node that describes it: (JSON pointer, schema).
fn numeric_leaves<'a>(
    root: &'a Value,
    schema: &'a Value,
    value: &Value,
    pointer: String,
    out: &mut Vec<(String, &'a Value)>,
) {
    let schema = resolve(root, schema);
    match value {
        Value::Number(_) => out.push((pointer, schema)),
        Value::Object(fields) => {
            for (k, v) in fields {
                if let Some(s) = schema.get("properties").and_then(|p| p.get(k)) {
                    numeric_leaves(root, s, v, format!("{pointer}/{k}"), out);
                }
            }
        }
        Value::Array(items) => {
            if let Some(s) = schema.get("items") {
                for (i, v) in items.iter().enumerate() {
                    numeric_leaves(root, s, v, format!("{pointer}/{i}"), out);
                }
            }
        }
        _ => {}
    }
}

fn with(scene: &Value, pointer: &str, x: Value) -> Value {
    let mut s = scene.clone();
    *s.pointer_mut(pointer).expect("pointer into the scene") = x;
    s
}

fn parser_accepts(scene: &Value) -> bool {
    Scene::from_json(&scene.to_string()).is_ok()
}

/// Numbers just inside and just outside a bound, as JSON (integers stay integers).
fn around(bound: &Value, outward: f64) -> (Value, Value) {
    if let Some(i) = bound.as_i64() {
        (json!(i), json!(i + outward as i64))
    } else {
        let b = bound.as_f64().expect("number");
        let step = (b.abs() * 1e-3).max(1e-3);
        (json!(b), json!(b + outward * step))
    }
}

#[test]
fn the_schema_and_the_parser_agree_at_every_stated_range() {
    let v = validator();
    let root = scene_schema();
    // The default scene has a directional and a point light, so every light field is in play.
    let scene = serde_json::to_value(Scene::default()).expect("scene JSON");
    let mut leaves = Vec::new();
    numeric_leaves(&root, &root, &scene, String::new(), &mut leaves);
    let mut bounds_checked = 0;
    for (pointer, s) in &leaves {
        for (key, outward) in [("minimum", -1.0), ("maximum", 1.0)] {
            let Some(bound) = s.get(key) else { continue };
            let (inside, outside) = around(bound, outward);
            let at = with(&scene, pointer, inside.clone());
            let past = with(&scene, pointer, outside.clone());
            assert!(v.is_valid(&at), "schema refuses {pointer} = {inside}");
            assert!(parser_accepts(&at), "parser refuses {pointer} = {inside}");
            assert!(!v.is_valid(&past), "schema accepts {pointer} = {outside}");
            assert!(
                !parser_accepts(&past),
                "parser accepts {pointer} = {outside}"
            );
            bounds_checked += 1;
        }
        if s.get("exclusiveMinimum").is_some() {
            let zero = with(&scene, pointer, json!(0.0));
            assert!(!v.is_valid(&zero), "schema accepts {pointer} = 0");
            assert!(!parser_accepts(&zero), "parser accepts {pointer} = 0");
            bounds_checked += 1;
        }
    }
    // The shapes' own ranges, one scene per kind from the schema's variants.
    for variant in resolve(&root, &root["$defs"]["Shape"])["oneOf"]
        .as_array()
        .expect("shape variants")
    {
        let kind = variant["properties"]["kind"]["const"]
            .as_str()
            .expect("kind");
        let fields: Vec<(&String, &Value)> = variant["properties"]
            .as_object()
            .expect("properties")
            .iter()
            .filter(|(k, _)| *k != "kind")
            .collect();
        let mut shape = json!({ "kind": kind });
        for (name, s) in &fields {
            shape[name.as_str()] = s["minimum"].clone();
        }
        let base = with(&scene, "/mesh", json!({ "shape": shape }));
        assert!(
            v.is_valid(&base) && parser_accepts(&base),
            "{kind} at its minima"
        );
        for (name, s) in &fields {
            let pointer = format!("/mesh/shape/{name}");
            for (key, outward) in [("minimum", -1.0), ("maximum", 1.0)] {
                let (inside, outside) = around(&s[key], outward);
                let at = with(&base, &pointer, inside.clone());
                assert!(v.is_valid(&at), "schema refuses {kind}.{name} = {inside}");
                assert!(
                    parser_accepts(&at),
                    "parser refuses {kind}.{name} = {inside}"
                );
                // Below zero is not a u32 at all: both refuse it as a type error.
                let past = with(&base, &pointer, outside.clone());
                assert!(
                    !v.is_valid(&past),
                    "schema accepts {kind}.{name} = {outside}"
                );
                assert!(
                    !parser_accepts(&past),
                    "parser accepts {kind}.{name} = {outside}"
                );
                bounds_checked += 1;
            }
        }
    }
    // The default scene's light fields, camera, material, difference, panel, subdivision,
    // normals, versions and the six shape kinds' parameters.
    assert!(bounds_checked >= 40, "{bounds_checked} bounds checked");
}

#[test]
fn the_schema_refuses_what_the_parser_refuses_by_kind() {
    let v = validator();
    let scene = serde_json::to_value(Scene::default()).expect("scene JSON");
    let cases = [
        ("/background", json!("#12345")),
        ("/background", json!("teal")),
        ("/model", json!("cook_torrance")),
        ("/lights/0/kind", json!("spot")),
        ("/mesh", json!({ "shape": { "kind": "teapot" } })),
        ("/mesh", json!({ "file": { "name": "" } })),
        ("/rotation", json!([0.0, 0.0, 1.0])),
        ("/panel", json!({ "width": 480 })),
        ("/subdivision/method", json!("loop")),
        ("/cull_back_faces", json!("yes")),
    ];
    for (pointer, bad) in cases {
        let s = with(&scene, pointer, bad.clone());
        assert!(!v.is_valid(&s), "schema accepts {pointer} = {bad}");
        assert!(!parser_accepts(&s), "parser accepts {pointer} = {bad}");
    }
    let mut extra = scene.clone();
    extra["shading_rate"] = json!(2);
    assert!(
        !v.is_valid(&extra) && !parser_accepts(&extra),
        "unknown field"
    );
    let mut five = scene.clone();
    let light = five["lights"][0].clone();
    five["lights"] = json!([light, light, light, light, light]);
    assert!(!v.is_valid(&five) && !parser_accepts(&five), "five lights");
    // Fields may be left out (the version's defaults fill them), in both.
    let sparse = json!({ "version": 1, "material": { "shininess": 12.0 } });
    assert!(
        v.is_valid(&sparse) && parser_accepts(&sparse),
        "a sparse scene"
    );
}

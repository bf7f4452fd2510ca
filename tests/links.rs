//! Links and scene files are records: a link made by any earlier build opens to the same scene
//! and the same pixels. The stored corpus (tests/links/corpus.json) holds links made for every
//! preset and for edited scenes, each with the exact scene JSON it decodes to and a hash of
//! its pixels; a change that alters either fails here. Regenerate only for a deliberate,
//! versioned change: `TWINSHADE_BLESS=1 cargo test --test links`.

use serde_json::{json, Value};
use std::path::PathBuf;
use twinshade::scene::{decode, encode, presets, PanelSize, FORMAT};
use twinshade::shading::Rgb;
use twinshade::{Panel, Scene, ShadingMode, Workbench};

/// Panels of the corpus renders: small, so the whole corpus renders in well under a second.
const PANEL: PanelSize = PanelSize {
    width: 120,
    height: 90,
};

fn corpus_path() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("tests/links/corpus.json")
}

/// FNV-1a, 64 bits, over the per-vertex, per-pixel and difference panels' bytes.
fn pixel_hash(scene: &Scene) -> String {
    let mut bench = Workbench::new();
    bench
        .render(&scene.checked().expect("valid"))
        .expect("renders");
    let mut h: u64 = 0xcbf2_9ce4_8422_2325;
    for panel in [Panel::PerVertex, Panel::PerPixel, Panel::Difference] {
        for &b in bench.framebuffer(panel).bytes() {
            h ^= u64::from(b);
            h = h.wrapping_mul(0x0000_0100_0000_01b3);
        }
    }
    format!("{h:016x}")
}

/// The scenes of the corpus: every preset and a few edited scenes, by name.
fn scenes() -> Vec<(String, Scene)> {
    let mut out: Vec<(String, Scene)> = presets()
        .into_iter()
        .map(|p| (format!("preset {}", p.id), p.scene))
        .collect();
    out.push(("default".into(), Scene::default()));
    let mut s = Scene::default();
    s.material.base_color = Rgb::hex("#b8472f");
    s.material.shininess = 300.0;
    s.lights.truncate(1);
    s.lights[0].azimuth_deg = -20.0;
    s.difference.pair = [ShadingMode::PerVertex, ShadingMode::Exact];
    s.difference.threshold = 2.0;
    out.push((
        "edited: glossy red, one light, against the exact surface".into(),
        s,
    ));
    let mut s = Scene::default();
    s.turn(40.0, -15.0);
    s.camera.roll_deg = 30.0;
    s.subdivision.levels = 1;
    out.push(("edited: turned, rolled, subdivided".into(), s));
    let mut s = Scene {
        model: twinshade::shading::ReflectionModel::MetallicRoughness,
        ..Scene::default()
    };
    s.material.metallic = 0.3;
    s.material.roughness = 0.42;
    s.normals.source = twinshade::scene::NormalSource::Computed;
    s.normals.crease_deg = 50.0;
    out.push((
        "edited: metallic-roughness, computed normals with a crease".into(),
        s,
    ));
    out
}

/// The default scene of format 1 as this build reads it: today's defaults where format 1 had
/// the field, and for fields added later the values that reproduce what format-1 builds did
/// (computed normals kept seams apart; glTF files without normals were smoothed; vertex
/// colours and file materials were ignored).
fn format_1_default() -> Scene {
    let mut s = Scene::default();
    s.normals.coincident = twinshade::geometry::Coincident::Separate;
    s.normals.gltf_without_normals = twinshade::scene::GltfNormals::Smooth;
    s.vertex_colors = false;
    s.material_source = twinshade::scene::MaterialSource::Scene;
    s
}

fn canonical(scene: &Scene) -> Value {
    serde_json::to_value(scene).expect("serialises")
}

#[test]
fn the_current_format_freezes_todays_defaults() {
    // A changed default must come with a new format number and its own frozen table
    // (src/scene/formats.rs): otherwise every published link would change its meaning.
    let default = Scene::default();
    let frozen = Scene::from_json(&format!("{{\"version\": {FORMAT}}}"))
        .expect("the frozen defaults are a valid scene");
    assert_eq!(
        canonical(frozen.scene()),
        canonical(&default),
        "Scene::default differs from the frozen defaults of format {FORMAT}: add format {} with its own table",
        FORMAT + 1
    );
    // The default scene's link holds no field at all.
    use base64::Engine;
    let link = encode(&default);
    let body = link
        .strip_prefix(&format!("{FORMAT}."))
        .expect("the current format");
    let packed = base64::engine::general_purpose::URL_SAFE_NO_PAD
        .decode(body)
        .expect("base64url");
    let json = miniz_oxide::inflate::decompress_to_vec_zlib(&packed).expect("zlib");
    assert_eq!(json, b"{}");
}

#[test]
fn stored_links_reopen_to_the_same_scene_and_pixels() {
    let bless = std::env::var("TWINSHADE_BLESS").is_ok_and(|v| v == "1");
    if bless {
        // Entries of earlier formats are records too: they stay as they were. Only the
        // current format's entries are (re)written.
        let old: Value = std::fs::read_to_string(corpus_path())
            .ok()
            .and_then(|t| serde_json::from_str(&t).ok())
            .unwrap_or_else(|| json!({ "entries": [] }));
        let current = format!("{FORMAT}.");
        let mut entries: Vec<Value> = old["entries"]
            .as_array()
            .cloned()
            .unwrap_or_default()
            .into_iter()
            .filter(|e| !e["link"].as_str().is_some_and(|l| l.starts_with(&current)))
            .collect();
        entries.extend(scenes().iter().map(|(name, scene)| {
            let mut s = scene.clone();
            s.panel = PANEL;
            json!({
                "name": format!("{name} (format {FORMAT})"),
                "link": encode(&s),
                "scene": canonical(&s),
                "pixels_fnv1a64": pixel_hash(&s),
            })
        }));
        let text = serde_json::to_string_pretty(&json!({
            "panel": [PANEL.width, PANEL.height],
            "entries": entries,
        }))
        .expect("serialises");
        std::fs::write(corpus_path(), text + "\n").expect("write the corpus");
    }
    let text = std::fs::read_to_string(corpus_path()).expect("tests/links/corpus.json");
    let corpus: Value = serde_json::from_str(&text).expect("corpus JSON");
    let entries = corpus["entries"].as_array().expect("entries");
    assert!(entries.len() >= 10, "only {} stored links", entries.len());
    let mut failures = Vec::new();
    for e in entries {
        let name = e["name"].as_str().expect("name");
        let link = e["link"].as_str().expect("link");
        let scene = match decode(link, PANEL) {
            Ok(s) => s,
            Err(err) => {
                failures.push(format!("{name}: {err}"));
                continue;
            }
        };
        // Compared as scenes (f32 fields): JSON text of an f32 may parse back a unit in the
        // last place of f64 away, which is the same f32. The stored scene is read as a scene
        // file of its own version, as every record is: fields added by later formats take the
        // values their version's table gives them.
        let stored = Scene::from_json(&e["scene"].to_string())
            .expect("a stored scene")
            .into_scene();
        if *scene.scene() != stored {
            failures.push(format!(
                "{name}: decodes to another scene:\n  {}\nnot\n  {}",
                canonical(scene.scene()),
                e["scene"]
            ));
        }
        if pixel_hash(scene.scene()) != e["pixels_fnv1a64"] {
            failures.push(format!("{name}: other pixels"));
        }
        // The page's address form opens the same.
        let page = format!("http://127.0.0.1:8737/?size=120x90#s={link}");
        let fragment = &page[page.find("#s=").expect("fragment")..];
        assert_eq!(decode(fragment, PANEL).ok(), Some(scene.clone()), "{name}");
    }
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}

#[test]
fn links_of_earlier_builds_with_the_old_panel_names_open() {
    // Builds before the per-vertex / per-pixel vocabulary wrote the compared pair as
    // "gouraud" and "phong". This is such a link, built here the way they built it: the
    // changed fields as JSON, zlib, URL-safe base64, format 1.
    use base64::Engine;
    let diff = r#"{"difference":{"pair":["gouraud","exact"]}}"#;
    let packed = miniz_oxide::deflate::compress_to_vec_zlib(diff.as_bytes(), 9);
    let link = format!(
        "1.{}",
        base64::engine::general_purpose::URL_SAFE_NO_PAD.encode(packed)
    );
    let scene = decode(&link, PANEL).expect("an old link opens");
    assert_eq!(
        scene.difference.pair,
        [ShadingMode::PerVertex, ShadingMode::Exact]
    );
    // Everything else is the format-1 default scene.
    let mut expected = Scene {
        panel: PANEL,
        ..format_1_default()
    };
    expected.difference.pair = [ShadingMode::PerVertex, ShadingMode::Exact];
    assert_eq!(scene, expected);
}

#[test]
fn a_link_of_an_unknown_format_is_refused_with_a_message() {
    let link = encode(&Scene::default());
    let body = link.split_once('.').expect("a format prefix").1;
    for (text, says) in [
        (format!("{}.{body}", FORMAT + 1), "newer version"),
        (format!("+1.{body}"), "not a twinshade scene link"),
        (body.to_string(), "not a twinshade scene link"),
    ] {
        let err = decode(&text, PANEL).expect_err("refused");
        assert!(err.to_string().contains(says), "{text}: {err}");
    }
}

#[test]
fn scene_files_fill_missing_fields_from_their_versions_defaults() {
    let s = Scene::from_json(r#"{"version": 1, "model": "phong"}"#).expect("valid");
    let expected = Scene {
        model: twinshade::shading::ReflectionModel::Phong,
        ..format_1_default()
    };
    assert_eq!(s, expected);
    // The same file as version 2 takes format 2's defaults.
    let s2 = Scene::from_json(r#"{"version": 2, "model": "phong"}"#).expect("valid");
    assert_eq!(
        s2,
        Scene {
            model: twinshade::shading::ReflectionModel::Phong,
            ..Scene::default()
        }
    );
    // Without a version a file is read as version 1, the first format.
    assert_eq!(
        Scene::from_json(r#"{"model": "phong"}"#).expect("valid"),
        expected
    );
    let err = Scene::from_json(r#"{"version": 0}"#).expect_err("no version 0");
    assert!(err.to_string().contains("version 0"), "{err}");
}

/// A small deterministic generator (xorshift64*), so a failing input can be found again.
struct Rng(u64);

impl Rng {
    fn next(&mut self) -> u64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        self.0.wrapping_mul(0x2545_f491_4f6c_dd1d)
    }
    fn below(&mut self, n: usize) -> usize {
        (self.next() % n.max(1) as u64) as usize
    }
}

/// Link text to try: a stored link mutated (characters replaced, inserted, dropped, cut,
/// pieces of two links spliced) or random text.
fn mutant(rng: &mut Rng, links: &[String]) -> String {
    const ALPHABET: &[u8] =
        b"ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789-_.#s=+/%{}\"\\ \n\x7f";
    let mut t: Vec<u8> = links[rng.below(links.len())].as_bytes().to_vec();
    match rng.below(6) {
        0 => {
            for _ in 0..1 + rng.below(4) {
                let i = rng.below(t.len());
                t[i] = ALPHABET[rng.below(ALPHABET.len())];
            }
        }
        1 => {
            let i = rng.below(t.len() + 1);
            t.insert(i.min(t.len()), ALPHABET[rng.below(ALPHABET.len())]);
        }
        2 => {
            let i = rng.below(t.len());
            t.remove(i);
        }
        3 => t.truncate(rng.below(t.len())),
        4 => {
            let other = links[rng.below(links.len())].as_bytes();
            let cut = rng.below(t.len()).min(other.len());
            t.truncate(cut);
            t.extend_from_slice(&other[cut..]);
        }
        _ => {
            t = (0..rng.below(200))
                .map(|_| (rng.next() & 0xff) as u8)
                .collect();
        }
    }
    String::from_utf8_lossy(&t).into_owned()
}

#[test]
fn damaged_links_are_refused_with_a_message_and_never_panic() {
    // TWINSHADE_FUZZ_LINKS sets how many (README states the long run's figure); CI runs 20,000.
    let n: usize = std::env::var("TWINSHADE_FUZZ_LINKS")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(20_000);
    let mut links: Vec<String> = scenes().iter().map(|(_, s)| encode(s)).collect();
    links.push(encode(&Scene::default()));
    let mut rng = Rng(0x7417_5ade_2026_1202);
    let (mut refused, mut opened) = (0usize, 0usize);
    for _ in 0..n {
        let text = mutant(&mut rng, &links);
        match std::panic::catch_unwind(|| decode(&text, PANEL)) {
            Ok(Ok(scene)) => {
                // Whatever opens is a valid scene the pipeline can take.
                assert!(scene.scene().validate().is_ok(), "{text:?}");
                opened += 1;
            }
            Ok(Err(e)) => {
                let m = e.to_string();
                assert!(m.starts_with("This link"), "{text:?}: {m}");
                assert!(
                    m.len() > "This link cannot be read: ".len(),
                    "{text:?}: {m}"
                );
                refused += 1;
            }
            Err(_) => panic!("decoding {text:?} panicked"),
        }
    }
    eprintln!("{n} link texts: {refused} refused with a message, {opened} opened");
    assert_eq!(refused + opened, n);
    assert!(
        refused > n / 2,
        "most mutants are damaged: {refused} of {n}"
    );
}

#[test]
fn records_carry_the_renderer_revision() {
    use twinshade::scene::{revision_notice, RENDERER_REVISION};
    // Links and files made before scenes recorded it were all drawn by revision 1.
    let old = decode(&encode(&Scene::default()), PANEL).expect("opens");
    assert_eq!(old.renderer, 1);
    assert_eq!(Scene::from_json("{}").expect("valid").renderer, 1);
    assert_eq!(Scene::default().renderer, RENDERER_REVISION);
    // A revision this build does not know is refused, with the field's path.
    for bad in [0, RENDERER_REVISION + 1] {
        let err = Scene::from_json(&format!(r#"{{"renderer": {bad}}}"#)).expect_err("refused");
        assert!(
            matches!(&err, twinshade::SceneError::Field { path, .. } if path == "renderer"),
            "{err:?}"
        );
    }
    // The notice a scene of an older revision opens with.
    assert_eq!(revision_notice(RENDERER_REVISION, RENDERER_REVISION), None);
    let notice = revision_notice(1, 2).expect("a notice");
    assert!(
        notice.contains("revision 1") && notice.contains("revision 2"),
        "{notice}"
    );
    // Metrics and sheets say which revision drew them.
    let mut bench = Workbench::new();
    let report = *bench
        .render(
            &Scene {
                panel: PANEL,
                ..Scene::default()
            }
            .checked()
            .expect("valid"),
        )
        .expect("renders");
    assert_eq!(report.renderer_revision, RENDERER_REVISION);
    let json = serde_json::to_value(report).expect("serialises");
    assert_eq!(json["renderer_revision"], RENDERER_REVISION);
    let csv = report.to_csv("#s=1.x");
    let (header, values) = csv.split_once('\n').expect("two lines");
    let col = header
        .split(',')
        .position(|h| h == "renderer_revision")
        .expect("a renderer_revision column");
    assert_eq!(
        values.split(',').nth(col),
        Some(RENDERER_REVISION.to_string().as_str())
    );
    let lines = twinshade::analysis::metrics_lines(&report);
    assert!(
        lines
            .iter()
            .any(|l| l.contains(&format!("renderer revision {RENDERER_REVISION}"))),
        "{lines:?}"
    );
}

#[test]
fn links_made_by_the_build_before_frozen_formats_open_unchanged() {
    // Printed by `twinshade scene --file edited.json --link` of build d5cfa4a (before this
    // build froze the formats and renamed the panels), for the scene file below. The same
    // build's `render --size 120x90` PNGs were byte-identical to this build's
    // `render --from-link` of the link (checked once, when the link was recorded).
    const OLD: &str = "#s=1.eNolzdEKwjAMQNF_ia9D5hSU_orIyNpsC2StJNsQRv_dVp8vh3uAx4UUwR2gSaQPNIG7tuc2NxB4HEkpeqr5jazgnjClTXEL0AB90K_wamCdlWxOEsB1P7ngSsoo1Q1o1PskqWg4DY_bvRsLtpkjRzKru__PtiHwzsYpVii0k5R8yfkLIkI3Ow";
    let file = r##"{"material": {"base_color": "#b8472f", "shininess": 300}, "difference": {"pair": ["gouraud", "exact"], "threshold": 2.0}, "camera": {"roll_deg": 30}, "subdivision": {"levels": 1}}"##;
    let from_file = Scene::from_json(file).expect("the scene file");
    let from_link = decode(OLD, PANEL).expect("the old link opens");
    let expected = Scene {
        panel: PANEL,
        ..from_file.scene().clone()
    };
    assert_eq!(*from_link.scene(), expected);
    assert_eq!(
        from_link.difference.pair,
        [ShadingMode::PerVertex, ShadingMode::Exact]
    );
}

#[test]
fn scenes_and_links_that_name_a_mesh_file_open() {
    // The default scene's mesh is a shape; a scene naming a file must replace it whole (the
    // two are variants of one enum), both as a scene file and as a link. Builds up to this
    // one refused both ("expected map with a single key").
    let s = Scene {
        mesh: twinshade::scene::MeshSource::File {
            name: "asset.glb".into(),
        },
        panel: PANEL,
        ..Scene::default()
    };
    let read = Scene::from_json(&s.to_json()).expect("a scene file naming a mesh file");
    assert_eq!(*read.scene(), s);
    let link = encode(&s);
    let decoded = decode(&link, PANEL).expect("a link naming a mesh file");
    assert_eq!(*decoded.scene(), s);
    // A format-1 record naming a file opens too.
    let old = Scene::from_json(r#"{"version": 1, "mesh": {"file": {"name": "a.obj"}}}"#)
        .expect("format 1 with a mesh file");
    assert_eq!(
        old.mesh,
        twinshade::scene::MeshSource::File {
            name: "a.obj".into()
        }
    );
}

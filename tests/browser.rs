//! End-to-end test of the page in headless Chromium (the workplace's notes on browser tests: Debian's chromium and chromedriver): the real `serve`
//! command builds the wasm module and serves www/, WebDriver drives the page, and the canvas
//! bytes are compared with the native renderer for the same scene.
//!
//! Without Chromium and ChromeDriver the test prints SKIPPED; with
//! `TWINSHADE_REQUIRE_BROWSER=1` (set by .ci/run) a missing browser is a failure.

use base64::Engine;
use fantoccini::actions::{
    InputSource, KeyAction, KeyActions, MouseActions, PointerAction, MOUSE_BUTTON_LEFT,
};
use fantoccini::{Client, ClientBuilder, Locator};
use serde_json::{json, Value};
use std::io::{BufRead, BufReader};
use std::path::PathBuf;
use std::process::{Child, Command, Stdio};
use std::sync::mpsc;
use std::time::{Duration, Instant};
use twinshade::{Panel, Scene, ValidScene, Workbench};

mod common;

const PANEL: (u32, u32) = (320, 240);

fn tool(var: &str, default: &str) -> Option<PathBuf> {
    let p = PathBuf::from(std::env::var(var).unwrap_or_else(|_| default.to_string()));
    p.exists().then_some(p)
}

/// Kills a child process when dropped (also when an assertion fails).
struct Reaper(Child);
impl Drop for Reaper {
    fn drop(&mut self) {
        let _ = self.0.kill();
        let _ = self.0.wait();
    }
}

fn free_port() -> u16 {
    std::net::TcpListener::bind("127.0.0.1:0")
        .and_then(|l| l.local_addr())
        .map(|a| a.port())
        .expect("a free loopback port")
}

/// Starts `twinshade serve --port 0` and returns its URL once it prints it.
fn start_server() -> (Reaper, String) {
    let mut child = Command::new(env!("CARGO_BIN_EXE_twinshade"))
        .args(["serve", "--port", "0"])
        .stdout(Stdio::piped())
        .spawn()
        .expect("start twinshade serve");
    let stdout = child.stdout.take().expect("piped stdout");
    let reaper = Reaper(child);
    let (tx, rx) = mpsc::channel();
    std::thread::spawn(move || {
        for line in BufReader::new(stdout).lines().map_while(Result::ok) {
            if let Some(url) = line.split_whitespace().find(|w| w.starts_with("http://")) {
                let _ = tx.send(url.to_string());
            }
        }
    });
    // A cold wasm build takes a few minutes on two cores.
    let url = rx
        .recv_timeout(Duration::from_secs(900))
        .expect("twinshade serve printed its URL");
    (reaper, url)
}

async fn connect(port: u16) -> Client {
    let udd = std::env::temp_dir().join(format!("twinshade-udd-{port}"));
    let caps = json!({
        "goog:chromeOptions": {
            "binary": tool("TWINSHADE_CHROMIUM", "/usr/bin/chromium").expect("chromium"),
            "args": [
                "--headless=new", "--no-sandbox", "--disable-gpu", "--disable-quic",
                "--no-first-run", "--disable-background-networking",
                "--disable-component-update", "--disable-sync",
                "--force-device-scale-factor=1", "--window-size=1400,900",
                format!("--user-data-dir={}", udd.display()),
            ]
        }
    });
    let caps = caps.as_object().cloned().expect("object");
    let deadline = Instant::now() + Duration::from_secs(30);
    loop {
        let mut builder =
            ClientBuilder::new(hyper_util::client::legacy::connect::HttpConnector::new());
        match builder
            .capabilities(caps.clone())
            .connect(&format!("http://127.0.0.1:{port}"))
            .await
        {
            Ok(c) => return c,
            Err(e) if Instant::now() < deadline => {
                let _ = e;
                tokio::time::sleep(Duration::from_millis(250)).await;
            }
            Err(e) => panic!("cannot start a WebDriver session: {e}"),
        }
    }
}

async fn eval(c: &Client, script: &str) -> Value {
    c.execute(script, vec![]).await.expect("script runs")
}

async fn wait_ready(c: &Client) {
    let deadline = Instant::now() + Duration::from_secs(60);
    while eval(c, "return document.body.dataset.ready === '1'").await != json!(true) {
        let errors = eval(c, "return window.twinshadeErrors || []").await;
        assert!(
            Instant::now() < deadline,
            "the page did not draw its first frame; errors: {errors}"
        );
        tokio::time::sleep(Duration::from_millis(100)).await;
    }
}

/// The page's line about the loaded mesh file.
async fn mesh_info(c: &Client) -> Value {
    eval(c, "return document.getElementById('mesh-info').textContent").await
}

/// The RGBA bytes of a panel's canvas.
async fn canvas(c: &Client, panel: &str) -> (u32, u32, Vec<u8>) {
    let v = c
        .execute(
            "const c = document.querySelector(`canvas[data-panel=\"${arguments[0]}\"]`);
             const d = c.getContext('2d').getImageData(0, 0, c.width, c.height).data;
             let s = '';
             for (let i = 0; i < d.length; i += 0x8000)
               s += String.fromCharCode.apply(null, d.subarray(i, i + 0x8000));
             return [c.width, c.height, btoa(s)];",
            vec![json!(panel)],
        )
        .await
        .expect("read canvas");
    let w = v[0].as_u64().expect("width") as u32;
    let h = v[1].as_u64().expect("height") as u32;
    let bytes = base64::engine::general_purpose::STANDARD
        .decode(v[2].as_str().expect("base64"))
        .expect("valid base64");
    (w, h, bytes)
}

/// Waits until a panel's bytes differ from `before` (the page renders on the next frame).
async fn wait_changed(c: &Client, panel: &str, before: &[u8], what: &str) -> Vec<u8> {
    let deadline = Instant::now() + Duration::from_secs(10);
    loop {
        let (_, _, now) = canvas(c, panel).await;
        if now != before {
            return now;
        }
        assert!(
            Instant::now() < deadline,
            "{what} did not change the {panel} panel"
        );
        tokio::time::sleep(Duration::from_millis(50)).await;
    }
}

/// The page's scene rendered natively by the same workbench the page uses.
async fn native_render(c: &Client) -> (ValidScene, Workbench) {
    let json = eval(c, "return window.twinshade.sceneJson()").await;
    let scene = Scene::from_json(json.as_str().expect("scene JSON")).expect("page scene is valid");
    let mut bench = Workbench::new();
    bench.render(&scene).expect("native render");
    (scene, bench)
}

async fn assert_same_as_native(c: &Client, when: &str) {
    let (scene, bench) = native_render(c).await;
    for (name, panel) in [
        ("per_vertex", Panel::PerVertex),
        ("per_pixel", Panel::PerPixel),
        ("difference", Panel::Difference),
    ] {
        let (w, h, page) = canvas(c, name).await;
        assert_eq!(
            (w, h),
            (scene.panel.width, scene.panel.height),
            "{when}: {name} canvas size"
        );
        let native = bench.framebuffer(panel).bytes();
        let differing = page
            .chunks_exact(4)
            .zip(native.chunks_exact(4))
            .filter(|(a, b)| a != b)
            .count();
        assert_eq!(
            differing, 0,
            "{when}: {name} panel in the browser differs from the native render in {differing} pixels"
        );
    }
}

fn luminance(p: &[u8]) -> u32 {
    2126 * u32::from(p[0]) + 7152 * u32::from(p[1]) + 722 * u32::from(p[2])
}

#[tokio::test(flavor = "multi_thread", worker_threads = 2)]
async fn page_end_to_end() {
    let required = std::env::var("TWINSHADE_REQUIRE_BROWSER").is_ok_and(|v| v == "1");
    let (Some(_), Some(driver)) = (
        tool("TWINSHADE_CHROMIUM", "/usr/bin/chromium"),
        tool("TWINSHADE_CHROMEDRIVER", "/usr/bin/chromedriver"),
    ) else {
        assert!(
            !required,
            "TWINSHADE_REQUIRE_BROWSER=1 but Chromium or ChromeDriver is missing \
             (install Debian's chromium and chromium-driver)"
        );
        eprintln!("\n**********\nSKIPPED page_end_to_end: no /usr/bin/chromium or /usr/bin/chromedriver\n**********\n");
        return;
    };

    let (_server, url) = start_server();
    let port = free_port();
    let _driver = Reaper(
        Command::new(driver)
            .arg(format!("--port={port}"))
            .stdout(Stdio::null())
            .stderr(Stdio::null())
            .spawn()
            .expect("start chromedriver"),
    );
    let c = connect(port).await;
    let page = format!("{url}?size={}x{}", PANEL.0, PANEL.1);
    c.goto(&page).await.expect("open the page");
    wait_ready(&c).await;

    let errors = eval(&c, "return window.twinshadeErrors").await;
    assert_eq!(errors, json!([]), "console errors on load");

    // The page's build ships the scene schema beside the module, as `scene --schema` prints it.
    let shipped = c
        .execute_async(
            "const done = arguments[arguments.length - 1];
             fetch('pkg/scene.schema.json').then(r => r.text()).then(done, e => done('' + e));",
            vec![],
        )
        .await
        .expect("fetch the schema");
    assert_eq!(
        shipped.as_str().map(str::trim_end),
        Some(twinshade::scene::scene_schema_text().as_str()),
        "pkg/scene.schema.json"
    );

    // Both panels are drawn at the requested size, and differ where the highlight is.
    let (w, h, gouraud) = canvas(&c, "per_vertex").await;
    let (_, _, phong) = canvas(&c, "per_pixel").await;
    assert_eq!((w, h), PANEL);
    let bg = &gouraud[0..4];
    let covered = gouraud.chunks_exact(4).filter(|p| *p != bg).count();
    assert!(
        covered > (w * h / 10) as usize,
        "gouraud panel mostly empty: {covered} pixels drawn"
    );
    let (peak, _) = phong
        .chunks_exact(4)
        .enumerate()
        .max_by_key(|(_, p)| luminance(p))
        .expect("pixels");
    let at = |img: &[u8]| luminance(&img[peak * 4..peak * 4 + 4]);
    assert!(
        at(&phong) > at(&gouraud) + 1000,
        "at the Phong highlight ({}, {}) the Gouraud panel should be darker: {} vs {}",
        peak % w as usize,
        peak / w as usize,
        at(&gouraud),
        at(&phong)
    );

    // The browser's pixels are the native renderer's pixels (bit-identical), the difference
    // panel included.
    assert_same_as_native(&c, "first frame").await;

    // The metrics appear, with the native values.
    let (_, bench) = native_render(&c).await;
    let p95 = eval(
        &c,
        "return document.querySelector('[data-metric=de00]').dataset.p95",
    )
    .await;
    let p95: f64 = p95.as_str().expect("p95 shown").parse().expect("a number");
    assert_eq!(
        p95,
        bench.report().metrics.de00.p95,
        "p95 dE00 on the page vs native"
    );
    let text = eval(&c, "return document.getElementById('metrics').textContent").await;
    assert!(
        text.as_str().is_some_and(|t| t.contains("dE00")),
        "metrics list: {text}"
    );

    // A click (no drag) probes a pixel; its dE00 is the native one for that pixel.
    let phong_el = c
        .find(Locator::Css("canvas[data-panel=\"per_pixel\"]"))
        .await
        .expect("phong canvas");
    let click = MouseActions::new("mouse".into())
        .then(PointerAction::MoveToElement {
            element: phong_el,
            duration: None,
            x: 25.0,
            y: -20.0,
        })
        .then(PointerAction::Down {
            button: MOUSE_BUTTON_LEFT,
        })
        .then(PointerAction::Up {
            button: MOUSE_BUTTON_LEFT,
        });
    c.perform_actions(click).await.expect("click");
    let probe = eval(
        &c,
        "const d = document.getElementById('probe').dataset; return [d.x, d.y, d.de00]",
    )
    .await;
    let num = |i: usize| {
        probe[i]
            .as_str()
            .unwrap_or_else(|| panic!("probe shows nothing: {probe}"))
            .to_string()
    };
    let (x, y): (usize, usize) = (num(0).parse().expect("x"), num(1).parse().expect("y"));
    let de00: f64 = num(2).parse().expect("dE00");
    let native = bench
        .probe(bench.report().pair, x, y)
        .expect("probe inside the panel");
    assert_eq!(
        de00, native.de00,
        "probe at ({x}, {y}): page vs native dE00"
    );

    // A drag turns the mesh.
    let canvas_el = c
        .find(Locator::Css("canvas[data-panel=\"per_pixel\"]"))
        .await
        .expect("phong canvas");
    let drag = MouseActions::new("mouse".into())
        .then(PointerAction::MoveToElement {
            element: canvas_el,
            duration: None,
            x: 0.0,
            y: 0.0,
        })
        .then(PointerAction::Down {
            button: MOUSE_BUTTON_LEFT,
        })
        .then(PointerAction::MoveBy {
            duration: Some(Duration::from_millis(100)),
            x: 60.0,
            y: 25.0,
        })
        .then(PointerAction::Up {
            button: MOUSE_BUTTON_LEFT,
        });
    c.perform_actions(drag).await.expect("drag");
    let after_drag = wait_changed(&c, "per_pixel", &phong, "a drag").await;

    // A control change re-renders (reflection model), through a real selection.
    c.find(Locator::Css("#model"))
        .await
        .expect("model control")
        .select_by_value("phong")
        .await
        .expect("select Phong model");
    wait_changed(
        &c,
        "per_pixel",
        &after_drag,
        "changing the reflection model",
    )
    .await;

    // After turning and editing, the pixels are still the native ones.
    assert_same_as_native(&c, "after a drag and a control change").await;
    let errors = eval(&c, "return window.twinshadeErrors").await;
    assert_eq!(errors, json!([]), "console errors while using the page");

    // The exported sheet decodes and is exactly the native sheet for the same scene.
    let sheet = eval(&c, "return window.twinshade.sheetDataUrl()").await;
    let png = base64::engine::general_purpose::STANDARD
        .decode(
            sheet[2]
                .as_str()
                .and_then(|u| u.strip_prefix("data:image/png;base64,"))
                .expect("a PNG data URL"),
        )
        .expect("base64");
    let file = std::env::temp_dir().join(format!("twinshade-sheet-{}.png", std::process::id()));
    std::fs::write(&file, &png).expect("write the sheet");
    let (sw, sh, rgba) = common::read_png(&file).expect("the sheet decodes");
    let _ = std::fs::remove_file(&file);
    assert_eq!(json!([sw, sh]), json!([sheet[0], sheet[1]]), "sheet size");
    let (scene, bench) = native_render(&c).await;
    let native = twinshade::analysis::workbench_sheet(&bench, &scene);
    assert_eq!(
        (sw, sh),
        (native.width, native.height),
        "sheet size vs native"
    );
    assert!(
        rgba == native.rgba,
        "the exported sheet differs from the native sheet"
    );

    // The address carries the scene: opened in a fresh page it gives the same pixels.
    let before: Vec<Vec<u8>> = vec![
        canvas(&c, "per_vertex").await.2,
        canvas(&c, "per_pixel").await.2,
    ];
    let href = eval(&c, "return location.href").await;
    let href = href.as_str().expect("href").to_string();
    assert!(
        href.contains(&format!("#s={}.", twinshade::scene::FORMAT)),
        "the address holds the scene: {href}"
    );
    c.goto("about:blank").await.expect("leave");
    c.goto(&href).await.expect("open the link");
    wait_ready(&c).await;
    for (i, name) in ["per_vertex", "per_pixel"].iter().enumerate() {
        assert!(
            canvas(&c, name).await.2 == before[i],
            "{name}: the link does not reproduce the pixels"
        );
    }

    // A damaged link: a message, and the default scene.
    c.goto("about:blank").await.expect("leave");
    c.goto(&format!("{page}#s=1.eJyrVkrLz1eyUkpKLFKqBQAd"))
        .await
        .expect("open a damaged link");
    wait_ready(&c).await;
    let problem = eval(
        &c,
        "const p = document.getElementById('problem'); return [p.hidden, p.textContent]",
    )
    .await;
    assert_eq!(problem[0], json!(false), "a message is shown");
    assert!(
        problem[1]
            .as_str()
            .is_some_and(|t| t.contains("cannot be read")),
        "message: {problem}"
    );
    let json = eval(&c, "return window.twinshade.sceneJson()").await;
    let shown = Scene::from_json(json.as_str().expect("scene")).expect("valid");
    let default = Scene {
        panel: shown.panel,
        ..Scene::default()
    };
    assert_eq!(
        shown, default,
        "a damaged link falls back to the default scene"
    );

    // Every preset loads from the menu, with its caption.
    for p in twinshade::scene::presets() {
        c.find(Locator::Css("#preset"))
            .await
            .expect("preset menu")
            .select_by_value(p.id)
            .await
            .expect("choose a preset");
        let caption = eval(
            &c,
            "return document.getElementById('preset-caption').textContent",
        )
        .await;
        assert_eq!(caption.as_str(), Some(p.caption), "{}: caption", p.id);
        let json = eval(&c, "return window.twinshade.sceneJson()").await;
        let shown = Scene::from_json(json.as_str().expect("scene")).expect("valid");
        assert_eq!(
            shown,
            Scene {
                panel: shown.panel,
                ..p.scene.clone()
            },
            "{}: scene",
            p.id
        );
    }
    let errors = eval(&c, "return window.twinshadeErrors").await;
    assert_eq!(
        errors,
        json!([]),
        "console errors while following links and presets"
    );

    // Presentation mode: the caption shows, arrow keys step through the presets, Esc stops.
    c.find(Locator::Css("#present"))
        .await
        .expect("present button")
        .click()
        .await
        .expect("start presenting");
    let key = |k: char| {
        KeyActions::new("keyboard".into())
            .then(KeyAction::Down { value: k })
            .then(KeyAction::Up { value: k })
    };
    let state = "return [document.body.dataset.present, document.getElementById('preset').value,
                         document.getElementById('caption').hidden]";
    let first = eval(&c, state).await;
    c.perform_actions(key('\u{E014}'))
        .await
        .expect("press ArrowRight");
    let second = eval(&c, state).await;
    c.perform_actions(key('\u{E00C}'))
        .await
        .expect("press Escape");
    let stopped = eval(&c, state).await;
    let all = twinshade::scene::presets();
    // The preset loop above left the last preset chosen: presenting starts there, and the
    // next one after the last is the first.
    let last = all.last().expect("presets").id;
    assert_eq!(
        first,
        json!(["1", last, false]),
        "presenting starts at the chosen preset"
    );
    assert_eq!(
        second,
        json!(["1", all[0].id, false]),
        "ArrowRight steps on, wrapping around"
    );
    assert_eq!(stopped[0], json!(""), "Escape stops presenting");

    // Picking a mesh file loads it (read in the page, never uploaded); a broken file is
    // explained and the previous image stays.
    let dir = std::env::temp_dir().join(format!("twinshade-files-{}", std::process::id()));
    std::fs::create_dir_all(&dir).expect("temp dir");
    let good = dir.join("prism.obj");
    std::fs::write(
        &good,
        "v 0 0 0\nv 1 0 0\nv 0 1 0\nv 0 0 1\nf 1 3 2\nf 1 2 4\nf 2 3 4\nf 3 1 4\n",
    )
    .expect("write a mesh");
    let broken = dir.join("broken.obj");
    std::fs::write(&broken, "v 0 0 0\nv 1 0 0\nv 0 1 0\nf 1 2 7\n").expect("write a broken mesh");
    let before_mesh = canvas(&c, "per_pixel").await.2;
    c.find(Locator::Css("#mesh-file"))
        .await
        .expect("file picker")
        .send_keys(&good.display().to_string())
        .await
        .expect("pick a file");
    let with_mesh = wait_changed(&c, "per_pixel", &before_mesh, "picking a mesh file").await;
    let info = mesh_info(&c).await;
    assert!(
        info.as_str()
            .is_some_and(|t| t.contains("prism.obj: 4 vertices, 4 faces, 4 triangles")),
        "mesh counts shown: {info}"
    );
    c.find(Locator::Css("#mesh-file"))
        .await
        .expect("file picker")
        .send_keys(&broken.display().to_string())
        .await
        .expect("pick a broken file");
    let deadline = Instant::now() + Duration::from_secs(10);
    let problem = loop {
        let p = eval(
            &c,
            "const p = document.getElementById('problem'); return p.hidden ? '' : p.textContent",
        )
        .await;
        if p.as_str().is_some_and(|t| !t.is_empty()) || Instant::now() > deadline {
            break p;
        }
        tokio::time::sleep(Duration::from_millis(50)).await;
    };
    assert!(
        problem
            .as_str()
            .is_some_and(|t| t.contains("broken.obj, line 4") && t.contains("out of range")),
        "the broken file is explained with its line: {problem}"
    );
    tokio::time::sleep(Duration::from_millis(200)).await;
    assert!(
        canvas(&c, "per_pixel").await.2 == with_mesh,
        "the previous image stays"
    );
    let _ = std::fs::remove_dir_all(&dir);

    // ?mesh= loads a file hosted beside the page (www/pkg is the build folder, not in git).
    let hosted = common::crate_root().join("www/pkg/test-hosted.stl");
    std::fs::write(
        &hosted,
        "solid t\nfacet normal 0 0 1\nouter loop\nvertex 0 0 0\nvertex 1 0 0\nvertex 0 1 0\nendloop\nendfacet\nendsolid t\n",
    )
    .expect("host a mesh");
    c.goto(&format!("{url}?size=320x240&mesh=pkg/test-hosted.stl"))
        .await
        .expect("open with mesh=");
    wait_ready(&c).await;
    let info = mesh_info(&c).await;
    let _ = std::fs::remove_file(&hosted);
    assert!(
        info.as_str()
            .is_some_and(|t| t.starts_with("test-hosted.stl: 3 vertices, 1 faces")),
        "mesh= loads the hosted file: {info}"
    );

    // A glTF file with three materials and vertex colours (written with the gltf-json
    // writer): the page draws it with the file's materials and colours, byte for byte as the
    // native renderer does.
    let hosted = common::crate_root().join("www/pkg/test-materials.gltf");
    let file = common::fixtures::materials_gltf();
    std::fs::write(&hosted, &file).expect("host the glTF");
    c.goto(&format!("{url}?size=240x80&mesh=pkg/test-materials.gltf"))
        .await
        .expect("open with the glTF");
    wait_ready(&c).await;
    let _ = std::fs::remove_file(&hosted);
    let info = mesh_info(&c).await;
    assert!(
        info.as_str()
            .is_some_and(|t| t.contains("vertex colours in the file") && t.contains("3 materials")),
        "glTF materials and colours announced: {info}"
    );
    {
        let json = eval(&c, "return window.twinshade.sceneJson()").await;
        let scene =
            Scene::from_json(json.as_str().expect("scene JSON")).expect("page scene is valid");
        let mut bench = Workbench::new();
        bench.set_file_mesh(
            twinshade::geometry::import("test-materials.gltf", &file)
                .expect("imports")
                .mesh,
        );
        bench.render(&scene).expect("native render");
        for (name, panel) in [
            ("per_vertex", Panel::PerVertex),
            ("per_pixel", Panel::PerPixel),
            ("difference", Panel::Difference),
        ] {
            let (_, _, page) = canvas(&c, name).await;
            assert!(
                page == bench.framebuffer(panel).bytes(),
                "coloured glTF: the {name} panel differs from the native render"
            );
        }
    }

    // An OBJ file hosted with its material library beside it: the page fetches the library
    // the file names, draws the squares with its Blinn-Phong and metallic-roughness
    // materials byte for byte as natively, and "Edit a copy" makes the plastic the page's own
    // material, as the library function does.
    let folder = common::crate_root().join("www/pkg/test-obj");
    std::fs::create_dir_all(&folder).expect("host folder");
    std::fs::write(folder.join("squares.obj"), common::fixtures::SQUARES_OBJ).expect("host OBJ");
    std::fs::write(folder.join("squares.mtl"), common::fixtures::SQUARES_MTL).expect("host MTL");
    c.goto(&format!("{url}?size=240x80&mesh=pkg/test-obj/squares.obj"))
        .await
        .expect("open with the OBJ");
    wait_ready(&c).await;
    let info = mesh_info(&c).await;
    let _ = std::fs::remove_dir_all(&folder);
    assert!(
        info.as_str()
            .is_some_and(|t| t.contains("2 materials in the file")
                && t.contains("'missing'")
                && t.contains("1 texture map")),
        "OBJ materials and notes announced: {info}"
    );
    {
        let imported = twinshade::geometry::import_with(
            "squares.obj",
            common::fixtures::SQUARES_OBJ.as_bytes(),
            &[twinshade::geometry::Companion {
                name: "squares.mtl",
                bytes: common::fixtures::SQUARES_MTL.as_bytes(),
            }],
        )
        .expect("imports");
        let json = eval(&c, "return window.twinshade.sceneJson()").await;
        let scene =
            Scene::from_json(json.as_str().expect("scene JSON")).expect("page scene is valid");
        let mut bench = Workbench::new();
        bench.set_file_mesh(imported.mesh.clone());
        bench.render(&scene).expect("native render");
        for (name, panel) in [
            ("per_vertex", Panel::PerVertex),
            ("per_pixel", Panel::PerPixel),
        ] {
            let (_, _, page) = canvas(&c, name).await;
            assert!(
                page == bench.framebuffer(panel).bytes(),
                "OBJ with its library: the {name} panel differs from the native render"
            );
        }
        let surface_note = eval(
            &c,
            "const n = document.getElementById('surface-note'); return n.hidden ? '' : n.textContent",
        )
        .await;
        assert!(
            surface_note
                .as_str()
                .is_some_and(|t| t.contains("2 materials")),
            "the Surface settings say they do not apply: {surface_note}"
        );
        c.execute(
            "document.getElementById('file-material').value = '0';
             document.getElementById('copy-material').click();",
            vec![],
        )
        .await
        .expect("edit a copy");
        let json = eval(&c, "return window.twinshade.sceneJson()").await;
        let copied =
            Scene::from_json(json.as_str().expect("scene JSON")).expect("page scene is valid");
        let (material, model) = twinshade::pipeline::file_material(
            &imported.mesh.materials[0],
            &scene.material,
            scene.model,
        );
        assert_eq!(
            copied.material_source,
            twinshade::scene::MaterialSource::Scene
        );
        assert_eq!((copied.material.clone(), copied.model), (material, model));
        assert_eq!(
            copied.model,
            twinshade::shading::ReflectionModel::BlinnPhong
        );
    }

    // A sweep: a roll sweep of the scanline-quad preset runs to completion in slices, its
    // series equal the native sweep's (same CSV, byte for byte), the plot appears, and
    // clicking a point of it shows that step's scene.
    c.goto(&format!(
        "{page}#s={}",
        twinshade::scene::encode(&{
            let mut s = twinshade::scene::preset("rolling-quads")
                .expect("preset")
                .scene;
            s.panel.width = PANEL.0;
            s.panel.height = PANEL.1;
            s
        })
    ))
    .await
    .expect("open the page");
    wait_ready(&c).await;
    let (before, _) = native_render(&c).await;
    c.execute(
        "document.getElementById('sweep-axis').value = 'roll';
         document.getElementById('sweep-steps').value = '12';",
        vec![],
    )
    .await
    .expect("set the sweep");
    c.find(Locator::Id("sweep"))
        .await
        .expect("sweep button")
        .click()
        .await
        .expect("click sweep");
    let deadline = Instant::now() + Duration::from_secs(60);
    while eval(&c, "return document.body.dataset.sweep").await != json!("done") {
        assert!(Instant::now() < deadline, "the sweep did not finish");
        tokio::time::sleep(Duration::from_millis(100)).await;
    }
    let mut native = twinshade::analysis::Sweep::new(
        &before,
        twinshade::analysis::SweepSettings {
            axis: twinshade::analysis::SweepAxis::Roll,
            steps: 12,
            degrees: 360.0,
        },
    )
    .expect("native sweep");
    native
        .run(&mut Workbench::new(), |_, _| {})
        .expect("native sweep runs");
    let page_csv = eval(&c, "return window.twinshade.sweepCsv()").await;
    assert_eq!(
        page_csv.as_str(),
        Some(native.to_csv().as_str()),
        "the page's sweep equals the native one"
    );
    let picks = eval(
        &c,
        "return document.querySelectorAll('#sweep-plot svg rect[data-pick]').length",
    )
    .await;
    assert_eq!(picks, json!(12), "the plot has a pick band per step");
    let (_, _, shown) = canvas(&c, "per_vertex").await;
    c.find(Locator::Css("#sweep-plot svg rect[data-pick=\"3\"]"))
        .await
        .expect("plot band of step 3")
        .click()
        .await
        .expect("click the plot");
    wait_changed(&c, "per_vertex", &shown, "clicking the plot").await;
    let (after, _) = native_render(&c).await;
    assert_eq!(
        after.camera.roll_deg,
        native.scene_at(3).camera.roll_deg,
        "the click shows step 3 (roll {} + 90 degrees)",
        before.camera.roll_deg
    );
    assert_same_as_native(&c, "after picking a sweep step").await;

    // Tessellation advice: runs to completion in the page, gives the native advisor's levels
    // and figures, and picking the advised level on the plot shows that mesh.
    c.goto(&page).await.expect("open the page");
    wait_ready(&c).await;
    let (start, _) = native_render(&c).await;
    c.execute(
        "document.getElementById('advice-steps').value = '12';",
        vec![],
    )
    .await
    .expect("set the advice");
    c.find(Locator::Id("advise"))
        .await
        .expect("advise button")
        .click()
        .await
        .expect("click advise");
    let deadline = Instant::now() + Duration::from_secs(120);
    while eval(&c, "return document.body.dataset.advice").await != json!("done") {
        assert!(Instant::now() < deadline, "the advice did not finish");
        tokio::time::sleep(Duration::from_millis(200)).await;
    }
    let mut advisor = twinshade::analysis::Advisor::new(
        &start,
        twinshade::analysis::AdviceSettings {
            threshold: start.difference.threshold,
            steps: 12,
            method: twinshade::geometry::SubdivisionMethod::Midpoint,
        },
    )
    .expect("native advisor");
    advisor
        .run(&mut Workbench::new(), |_, _| {})
        .expect("native advice");
    // JavaScript has one number type: compare every number as f64.
    fn as_f64(v: Value) -> Value {
        match v {
            Value::Number(n) => json!(n.as_f64()),
            Value::Array(a) => Value::Array(a.into_iter().map(as_f64).collect()),
            Value::Object(o) => Value::Object(o.into_iter().map(|(k, v)| (k, as_f64(v))).collect()),
            other => other,
        }
    }
    let native = as_f64(serde_json::to_value(advisor.advice()).expect("advice as JSON"));
    let in_page = as_f64(eval(&c, "return window.twinshade.advice()").await);
    assert_eq!(in_page, native, "the page's advice equals the native one");
    let advised = native["advised"].as_f64().expect("an advised level") as u64;
    let answer = eval(
        &c,
        "return document.getElementById('advice-answer').textContent",
    )
    .await;
    assert!(
        answer.as_str().is_some_and(|t| t.contains(
            native["rungs"][advised as usize]["label"]
                .as_str()
                .unwrap_or("?")
        )),
        "the answer names the advised level: {answer}"
    );
    let (_, _, shown) = canvas(&c, "per_vertex").await;
    // The topmost marker of the advised level (the "advised level" series is drawn last).
    c.find(Locator::XPath(&format!(
        "(//*[@id='advice-plot']//*[local-name()='circle' and @data-pick='{advised}'])[last()]"
    )))
    .await
    .expect("advised point on the plot")
    .click()
    .await
    .expect("click the advised point");
    wait_changed(&c, "per_vertex", &shown, "picking a level").await;
    let (picked, _) = native_render(&c).await;
    assert_eq!(
        as_f64(serde_json::to_value(&picked.mesh).expect("mesh")),
        native["rungs"][advised as usize]["mesh"],
        "the picked level's mesh is shown"
    );
    assert_same_as_native(&c, "after picking an advised level").await;

    // Keyboard only: Tab reaches every control (and the panels, which turn with arrow keys).
    c.goto(&page).await.expect("open the page");
    wait_ready(&c).await;
    let wanted = eval(
        &c,
        "return [...document.querySelectorAll('select, input, button, canvas[data-panel]')]
           .filter((e) => !e.closest('[hidden]'))
           .map((e) => e.id || e.dataset.panel)",
    )
    .await;
    let wanted: Vec<String> = wanted
        .as_array()
        .expect("list")
        .iter()
        .filter_map(|v| v.as_str().map(String::from))
        .collect();
    let mut reached = std::collections::BTreeSet::new();
    for _ in 0..wanted.len() + 10 {
        // A key action, not "element send keys" (which sets the value of colour inputs
        // instead of typing into them).
        let tab = KeyActions::new("keyboard".into())
            .then(KeyAction::Down { value: '\u{E004}' })
            .then(KeyAction::Up { value: '\u{E004}' });
        c.perform_actions(tab).await.expect("press Tab");
        let id = eval(
            &c,
            "const e = document.activeElement; return e.id || e.dataset.panel || ''",
        )
        .await;
        if let Some(id) = id.as_str() {
            reached.insert(id.to_string());
        }
    }
    let missing: Vec<&String> = wanted.iter().filter(|w| !reached.contains(*w)).collect();
    assert!(missing.is_empty(), "not reachable with Tab: {missing:?}");

    // Every stored link (tests/links/corpus.json) opens in the page to the pixels recorded
    // with it: the same FNV-1a hash of the three panels as tests/links.rs computes natively.
    let corpus: Value = serde_json::from_str(
        &std::fs::read_to_string(
            std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/links/corpus.json"),
        )
        .expect("tests/links/corpus.json"),
    )
    .expect("corpus JSON");
    let entries = corpus["entries"].as_array().expect("entries");
    let size = &corpus["panel"];
    for entry in entries {
        let link = entry["link"].as_str().expect("link");
        c.goto("about:blank").await.expect("leave");
        c.goto(&format!("{url}?size={}x{}#s={link}", size[0], size[1]))
            .await
            .expect("open the stored link");
        wait_ready(&c).await;
        let mut h: u64 = 0xcbf2_9ce4_8422_2325;
        for panel in ["per_vertex", "per_pixel", "difference"] {
            for b in canvas(&c, panel).await.2 {
                h ^= u64::from(b);
                h = h.wrapping_mul(0x0000_0100_0000_01b3);
            }
        }
        assert_eq!(
            json!(format!("{h:016x}")),
            entry["pixels_fnv1a64"],
            "stored link {} in the page",
            entry["name"]
        );
    }

    // Embed mode in a 480x320 frame: panels shown, no scrollbars, a link to the full page.
    c.goto(&url).await.expect("open the page");
    wait_ready(&c).await;
    c.execute(
        "const f = document.createElement('iframe');
         f.src = 'index.html?embed'; f.width = 480; f.height = 320; f.id = 'embedded';
         document.body.replaceChildren(f);",
        vec![],
    )
    .await
    .expect("frame the page");
    c.enter_frame(0).await.expect("enter the frame");
    wait_ready(&c).await;
    let fit = eval(
        &c,
        "const e = document.documentElement;
         const shown = [...document.querySelectorAll('canvas[data-panel]')]
           .map((c) => c.getBoundingClientRect()).filter((r) => r.width > 40 && r.bottom <= innerHeight);
         return [e.scrollWidth <= innerWidth, e.scrollHeight <= innerHeight, shown.length,
                 document.getElementById('open-full').getAttribute('href')];",
    )
    .await;
    assert_eq!(fit[0], json!(true), "embed: horizontal scrollbar: {fit}");
    assert_eq!(fit[1], json!(true), "embed: vertical scrollbar: {fit}");
    assert_eq!(fit[2], json!(3), "embed: all three panels visible: {fit}");
    assert!(
        fit[3].as_str().is_some_and(|h| !h.contains("embed")),
        "embed: full-page link {fit}"
    );
    c.enter_parent_frame().await.expect("leave the frame");

    // The page's drag frames on 3 band workers: the canvases are cleared, one frame is drawn
    // by the workers alone, and both shading panels equal the native render, byte for byte;
    // then the same with a mesh file the workers were sent.
    let hosted = common::crate_root().join("www/pkg/test-workers.gltf");
    let file = common::fixtures::materials_gltf();
    std::fs::write(&hosted, &file).expect("host the glTF");
    for mesh in [None, Some("pkg/test-workers.gltf")] {
        let address = match mesh {
            None => format!("{url}?size=240x180&workers=3"),
            Some(m) => format!("{url}?size=240x180&workers=3&mesh={m}"),
        };
        c.goto(&address).await.expect("open with workers");
        wait_ready(&c).await;
        let workers = eval(&c, "return window.twinshade.workers()").await;
        assert_eq!(workers, json!(3), "three band workers: {workers}");
        c.execute(
            "for (const c of document.querySelectorAll('canvas[data-panel]'))
               c.getContext('2d').clearRect(0, 0, c.width, c.height);
             return window.twinshade.drawBanded();",
            vec![],
        )
        .await
        .expect("a banded frame");
        let json = eval(&c, "return window.twinshade.sceneJson()").await;
        let scene =
            Scene::from_json(json.as_str().expect("scene JSON")).expect("page scene is valid");
        let mut bench = Workbench::new();
        if mesh.is_some() {
            bench.set_file_mesh(
                twinshade::geometry::import("test-workers.gltf", &file)
                    .expect("imports")
                    .mesh,
            );
        }
        bench.render(&scene).expect("native render");
        for (name, panel) in [
            ("per_vertex", Panel::PerVertex),
            ("per_pixel", Panel::PerPixel),
        ] {
            let (_, _, page) = canvas(&c, name).await;
            assert!(
                page == bench.framebuffer(panel).bytes(),
                "{mesh:?}: the {name} panel drawn by 3 workers differs from the native render"
            );
        }
    }
    let _ = std::fs::remove_file(&hosted);
    let errors = eval(&c, "return window.twinshadeErrors || []").await;
    assert_eq!(errors, json!([]), "console errors with workers");

    // The bench page drawing each frame in bands on 3 Web Workers (each its own wasm
    // instance) gives the pixels of one thread: the same hash of the last frame's panels.
    let mut hashes = Vec::new();
    for workers in [1, 3] {
        c.goto(&format!(
            "{url}bench.html?configs=5x200x150&warm=1&frames=3&workers={workers}&name=test"
        ))
        .await
        .expect("open the bench page");
        let deadline = Instant::now() + Duration::from_secs(60);
        let result = loop {
            let text = eval(&c, "return document.getElementById('results').textContent").await;
            let parsed: Option<Value> = text.as_str().and_then(|t| serde_json::from_str(t).ok());
            if let Some(r) =
                parsed.filter(|r| r["results"].as_array().is_some_and(|a| a.len() == 1))
            {
                break r;
            }
            assert!(
                Instant::now() < deadline,
                "bench page with {workers} workers: {text}"
            );
            tokio::time::sleep(Duration::from_millis(100)).await;
        };
        assert_eq!(result["workers"], json!(workers), "{result}");
        hashes.push(result["results"][0]["panels_fnv1a"].clone());
    }
    assert!(hashes[0].is_string(), "{hashes:?}");
    assert_eq!(
        hashes[0], hashes[1],
        "panels from 3 band workers differ from one thread"
    );
    c.close().await.expect("close the browser");
}

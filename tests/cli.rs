//! The command line as a user runs it.

use std::path::PathBuf;
use std::process::Command;
mod common;
use common::read_png;
use twinshade::{Framebuffer, Renderer, Scene, ShadingMode};

fn twinshade(args: &[&str]) -> std::process::Output {
    Command::new(env!("CARGO_BIN_EXE_twinshade"))
        .args(args)
        .output()
        .expect("run twinshade")
}

fn temp_dir(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("twinshade-cli-{name}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    d
}

#[test]
fn render_writes_panels_identical_to_the_library_and_a_sheet() {
    let dir = temp_dir("render");
    let out = twinshade(&[
        "render",
        "--size",
        "200x150",
        "--out-dir",
        dir.to_str().expect("utf-8"),
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let mut scene = Scene::default();
    scene.panel.width = 200;
    scene.panel.height = 150;
    let mut r = Renderer::new();
    for (file, mode) in [
        ("gouraud.png", ShadingMode::PerVertex),
        ("phong.png", ShadingMode::PerPixel),
    ] {
        let (w, h, bytes) = read_png(&dir.join(file)).expect("readable PNG");
        assert_eq!((w, h), (200, 150), "{file} size");
        let mut fb = Framebuffer::new(0, 0);
        r.render(&scene.checked().expect("valid scene"), mode, &mut fb)
            .expect("render");
        assert!(
            bytes == fb.bytes(),
            "{file} differs from the library's pixels"
        );
    }
    let (w, h, _) = read_png(&dir.join("sheet.png")).expect("sheet");
    assert!(w > 400 && h > 150, "sheet is {w}x{h}");
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn scene_default_prints_the_shared_defaults() {
    let out = twinshade(&["scene", "--default"]);
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).expect("utf-8");
    assert_eq!(
        Scene::from_json(&text).expect("valid JSON"),
        Scene::default()
    );
}

#[test]
fn bad_input_gives_a_message_and_a_failing_exit_code() {
    let dir = temp_dir("bad");
    std::fs::create_dir_all(&dir).expect("temp dir");
    let broken = dir.join("broken.json");
    std::fs::write(&broken, "{\"material\": {\"shininess\": -3}}").expect("write");
    let out_dir = dir.join("out");
    let cases: Vec<(Vec<String>, &str)> = vec![
        (
            vec![
                "render".into(),
                "--scene".into(),
                broken.display().to_string(),
                "--out-dir".into(),
                out_dir.display().to_string(),
            ],
            "shininess",
        ),
        (
            vec![
                "render".into(),
                "--scene".into(),
                dir.join("missing.json").display().to_string(),
                "--out-dir".into(),
                out_dir.display().to_string(),
            ],
            "cannot read scene",
        ),
        (
            vec![
                "render".into(),
                "--size".into(),
                "0x10".into(),
                "--out-dir".into(),
                out_dir.display().to_string(),
            ],
            "panel width",
        ),
        (
            vec![
                "render".into(),
                "--size".into(),
                "big".into(),
                "--out-dir".into(),
                out_dir.display().to_string(),
            ],
            "640x480",
        ),
    ];
    for (args, needle) in cases {
        let args: Vec<&str> = args.iter().map(String::as_str).collect();
        let out = twinshade(&args);
        let err = String::from_utf8_lossy(&out.stderr);
        assert!(!out.status.success(), "{args:?} should fail");
        assert!(
            err.contains(needle),
            "{args:?}: stderr '{err}' should mention '{needle}'"
        );
        assert!(!err.contains("panicked"), "{args:?} panicked: {err}");
    }
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn render_metrics_and_compare_agree() {
    let dir = temp_dir("metrics");
    let d = dir.to_str().expect("utf-8").to_string();
    let metrics = format!("{d}/m.json");
    let out = twinshade(&[
        "render",
        "--size",
        "160x120",
        "--out-dir",
        &d,
        "--metrics",
        &metrics,
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let m: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(&metrics).expect("metrics file"))
            .expect("JSON");
    let (w, h, _) = read_png(&dir.join("difference.png")).expect("difference.png");
    assert_eq!((w, h), (160, 120));
    let p95 = m["metrics"]["de00"]["p95"].as_f64().expect("p95");
    assert!(p95 > 1.0, "default scene: Gouraud vs Phong p95 {p95}");
    assert_eq!(
        m["lighting"]["per_vertex"], 162,
        "icosphere L2 has 162 vertices"
    );

    // `compare` of the two PNGs gives the same dE00 distribution over the covered pixels
    // plus zeros for the background pixels, which compare equal.
    let cmp = format!("{d}/c.json");
    let diff = format!("{d}/diff.png");
    let out = twinshade(&[
        "compare",
        &format!("{d}/gouraud.png"),
        &format!("{d}/phong.png"),
        "--out",
        &diff,
        "--metrics",
        &cmp,
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let c: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(&cmp).expect("compare metrics"))
            .expect("JSON");
    assert_eq!(c["metrics"]["covered_pixels"], 160 * 120);
    assert_eq!(c["metrics"]["de00"]["max"], m["metrics"]["de00"]["max"]);
    let (dw, dh, _) = read_png(std::path::Path::new(&diff)).expect("diff image");
    assert_eq!((dw, dh), (160, 120));

    // Mismatched sizes and non-PNG input are explained, not fatal.
    let small = temp_dir("metrics-small");
    let s = small.to_str().expect("utf-8").to_string();
    assert!(twinshade(&["render", "--size", "80x60", "--out-dir", &s])
        .status
        .success());
    let out = twinshade(&[
        "compare",
        &format!("{d}/gouraud.png"),
        &format!("{s}/phong.png"),
    ]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        !out.status.success() && err.contains("differ in size"),
        "{err}"
    );
    let out = twinshade(&["compare", &metrics, &format!("{d}/phong.png")]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        !out.status.success() && err.contains("not a readable PNG"),
        "{err}"
    );
    let _ = std::fs::remove_dir_all(&dir);
    let _ = std::fs::remove_dir_all(&small);
}

#[test]
fn render_a_mesh_file_reports_its_counts() {
    let dir = temp_dir("mesh");
    std::fs::create_dir_all(&dir).expect("temp dir");
    let obj = dir.join("wedge.obj");
    std::fs::write(
        &obj,
        "v 0 0 0\nv 1 0 0\nv 0 1 0\nv 0 0 1\nv 1 1 1\nf 1 3 2\nf 1 2 4\nf 2 3 5 4\nf 3 1 4\nf 1 1 2\n",
    )
    .expect("write");
    let d = dir.to_str().expect("utf-8").to_string();
    let metrics = format!("{d}/m.json");
    let out = twinshade(&[
        "render",
        "--mesh",
        obj.to_str().expect("utf-8"),
        "--size",
        "120x90",
        "--out-dir",
        &d,
        "--metrics",
        &metrics,
    ]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(out.status.success(), "{err}");
    assert!(
        err.contains("wedge.obj: 5 vertices, 4 faces, 5 triangles, 1 degenerate faces dropped"),
        "{err}"
    );
    let m: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(&metrics).expect("metrics")).expect("JSON");
    assert_eq!(m["mesh"]["faces"], 4);
    assert_eq!(m["mesh"]["dropped_faces"], 1);
    assert_eq!(m["mesh"]["format"], "obj");
    assert_eq!(m["mesh"]["materials"], 0);
    // With a material library named and put beside it in a subfolder: read from there, and
    // the materials counted; without it, a note says which file was missing.
    std::fs::create_dir_all(dir.join("mat")).expect("dir");
    std::fs::write(
        dir.join("mat/wedge.mtl"),
        "newmtl red\nKd 0.8 0.1 0.1\nKs 0.5 0.5 0.5\nNs 30\n",
    )
    .expect("write");
    let text = "mtllib mat/wedge.mtl\nusemtl red\nv 0 0 0\nv 1 0 0\nv 0 1 0\nv 0 0 1\nf 1 3 2\nf 1 2 4\nf 3 1 4\n";
    std::fs::write(&obj, text).expect("write");
    let render = |obj: &std::path::Path| {
        twinshade(&[
            "render",
            "--mesh",
            obj.to_str().expect("utf-8"),
            "--size",
            "60x45",
            "--out-dir",
            &d,
            "--metrics",
            &metrics,
        ])
    };
    let out = render(&obj);
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        out.status.success() && err.contains(", 1 materials"),
        "{err}"
    );
    assert!(!err.contains("note:"), "{err}");
    let m: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(&metrics).expect("metrics")).expect("JSON");
    assert_eq!(m["mesh"]["materials"], 1);
    std::fs::remove_file(dir.join("mat/wedge.mtl")).expect("remove");
    let out = render(&obj);
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        out.status.success()
            && err.contains(", 0 materials")
            && err.contains("note: the material library 'mat/wedge.mtl' was not given"),
        "{err}"
    );
    let m: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(&metrics).expect("metrics")).expect("JSON");
    assert!(
        m["mesh"]["notes"][0]
            .as_str()
            .is_some_and(|n| n.contains("wedge.mtl")),
        "{m}"
    );
    // A broken mesh: a message with the line, a failing exit code.
    std::fs::write(&obj, "v 0 0 0\nf 1 2 3\n").expect("write");
    let out = twinshade(&[
        "render",
        "--mesh",
        obj.to_str().expect("utf-8"),
        "--out-dir",
        &d,
    ]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        !out.status.success() && err.contains("wedge.obj, line 2: vertex index 2 is out of range"),
        "{err}"
    );
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn sweep_writes_the_library_series_and_plots() {
    let dir = temp_dir("sweep");
    std::fs::create_dir_all(&dir).expect("temp dir");
    let csv = dir.join("roll.csv");
    let svg = dir.join("roll.svg");
    let png = dir.join("turn.png");
    let summary = dir.join("roll.json");
    let out = twinshade(&[
        "sweep",
        "--preset",
        "rolling-quads",
        "--size",
        "160x120",
        "--axis",
        "roll",
        "--steps",
        "8",
        "--out",
        csv.to_str().expect("utf-8"),
        "--plot",
        svg.to_str().expect("utf-8"),
        "--metric",
        "probes",
        "--summary",
        summary.to_str().expect("utf-8"),
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    // Not a terminal here: plain progress lines instead of a bar.
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("sweep 8/8"), "{err}");
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert!(stdout.contains("orientation variance"), "{stdout}");

    let mut scene = twinshade::scene::preset("rolling-quads")
        .expect("preset")
        .scene;
    scene.panel.width = 160;
    scene.panel.height = 120;
    let mut sweep = twinshade::analysis::Sweep::new(
        &scene.checked().expect("valid scene"),
        twinshade::analysis::SweepSettings {
            axis: twinshade::analysis::SweepAxis::Roll,
            steps: 8,
            degrees: 360.0,
        },
    )
    .expect("sweep");
    sweep
        .run(&mut twinshade::Workbench::new(), |_, _| {})
        .expect("runs");
    assert_eq!(
        std::fs::read_to_string(&csv).expect("csv written"),
        sweep.to_csv()
    );
    assert_eq!(sweep.to_csv().lines().count(), 9);
    let plot = std::fs::read_to_string(&svg).expect("svg written");
    assert!(plot.starts_with("<svg") && plot.ends_with("</svg>"));
    assert_eq!(plot.matches("<rect data-pick=").count(), 8);
    let json: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(&summary).expect("summary written"))
            .expect("summary is JSON");
    assert!(json["orientation_variance"][0]
        .as_f64()
        .is_some_and(|v| v > 1.0 / 255.0));

    let out = twinshade(&[
        "sweep",
        "--steps",
        "6",
        "--size",
        "96x72",
        "--out",
        csv.to_str().expect("utf-8"),
        "--plot",
        png.to_str().expect("utf-8"),
    ]);
    assert!(out.status.success());
    let (w, h, _) = read_png(&png).expect("png plot");
    assert_eq!((w, h), (800, 420));

    // Bad settings: a message and a failing exit code, no output file.
    for (args, says) in [
        (vec!["--steps", "0"], "1 to 3600 steps"),
        (vec!["--degrees", "720"], "at most 360"),
        (vec!["--plot", "x.gif"], "must end in .svg or .png"),
    ] {
        let mut all = vec!["sweep", "--size", "32x24", "--out"];
        let target = dir.join("bad.csv");
        let target = target.to_str().expect("utf-8").to_string();
        all.push(&target);
        all.extend(args);
        let out = twinshade(&all);
        assert_eq!(out.status.code(), Some(1), "{all:?}");
        let err = String::from_utf8_lossy(&out.stderr);
        assert!(err.contains(says), "{all:?}: {err}");
        assert!(!dir.join("bad.csv").exists(), "{all:?} wrote its CSV");
    }
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn advise_writes_the_library_advice_and_a_plot() {
    let dir = temp_dir("advise");
    std::fs::create_dir_all(&dir).expect("temp dir");
    let json = dir.join("advice.json");
    let svg = dir.join("advice.svg");
    let out = twinshade(&[
        "advise",
        "--size",
        "160x120",
        "--steps",
        "6",
        "--threshold",
        "1.5",
        "--out",
        json.to_str().expect("utf-8"),
        "--plot",
        svg.to_str().expect("utf-8"),
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert!(stdout.contains("advice: icosphere level"), "{stdout}");
    let written = std::fs::read_to_string(&json).expect("advice written");
    let mut scene = Scene::default();
    scene.panel.width = 160;
    scene.panel.height = 120;
    let mut advisor = twinshade::analysis::Advisor::new(
        &scene.checked().expect("valid scene"),
        twinshade::analysis::AdviceSettings {
            threshold: 1.5,
            steps: 6,
            method: twinshade::geometry::SubdivisionMethod::Midpoint,
        },
    )
    .expect("advisor");
    advisor
        .run(&mut twinshade::Workbench::new(), |_, _| {})
        .expect("runs");
    // The same bytes as the library's advice, pretty-printed.
    assert_eq!(
        written,
        serde_json::to_string_pretty(advisor.advice()).expect("JSON") + "\n"
    );
    let plot = std::fs::read_to_string(&svg).expect("plot written");
    assert_eq!(
        plot.matches("<rect data-pick=").count(),
        advisor.advice().rungs.len()
    );

    // A mesh file is subdivided; PN triangles by request.
    let obj = dir.join("tetra.obj");
    std::fs::write(
        &obj,
        "v 0 0 1\nv 0.94 0 -0.33\nv -0.47 0.82 -0.33\nv -0.47 -0.82 -0.33\nf 1 2 3\nf 1 3 4\nf 1 4 2\nf 2 4 3\n",
    )
    .expect("write obj");
    let out = twinshade(&[
        "advise",
        "--mesh",
        obj.to_str().expect("utf-8"),
        "--size",
        "96x72",
        "--steps",
        "4",
        "--method",
        "pn",
        "--out",
        json.to_str().expect("utf-8"),
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert!(stdout.contains("1 x PN triangles"), "{stdout}");
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn links_render_on_the_command_line_as_the_page_shows_them() {
    // The link of an edited preset, as the page's address holds it.
    let mut scene = twinshade::scene::preset("crawling-highlight")
        .expect("preset")
        .scene;
    scene.turn(25.0, 10.0);
    scene.material.shininess = 200.0;
    let link = twinshade::scene::encode(&scene);
    let address = format!("http://127.0.0.1:8737/?size=160x120#s={link}");

    // `scene --from-link` prints the scene the link holds (at the default panel size).
    let out = twinshade(&["scene", "--from-link", &address]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let printed = Scene::from_json(&String::from_utf8_lossy(&out.stdout)).expect("scene JSON");
    let expected = Scene {
        panel: Scene::default().panel,
        ..scene.clone()
    };
    assert_eq!(printed, expected);

    // `render --from-link` at the page's panel size gives the panels the library renders for
    // the decoded link, byte for byte; the fragment alone works the same.
    for text in [address.clone(), format!("#s={link}")] {
        let dir = temp_dir("from-link");
        let d = dir.to_str().expect("utf-8").to_string();
        let out = twinshade(&[
            "render",
            "--from-link",
            &text,
            "--size",
            "160x120",
            "--out-dir",
            &d,
        ]);
        assert!(
            out.status.success(),
            "{}",
            String::from_utf8_lossy(&out.stderr)
        );
        let page_scene = twinshade::scene::decode(
            &link,
            twinshade::scene::PanelSize {
                width: 160,
                height: 120,
            },
        )
        .expect("decodes");
        let mut r = Renderer::new();
        for (file, mode) in [
            ("gouraud.png", ShadingMode::PerVertex),
            ("phong.png", ShadingMode::PerPixel),
        ] {
            let mut fb = Framebuffer::new(0, 0);
            r.render(&page_scene, mode, &mut fb).expect("render");
            let (w, h, bytes) = read_png(&dir.join(file)).expect("readable PNG");
            assert_eq!((w, h), (160, 120), "{file}");
            assert!(
                bytes == fb.bytes(),
                "{file} differs from the decoded link's render"
            );
        }
        let _ = std::fs::remove_dir_all(&dir);
    }

    // A damaged link is refused with the page's message, before anything is written.
    let out = twinshade(&[
        "sweep",
        "--from-link",
        "#s=1.AAAA",
        "--out",
        "/tmp/never.csv",
    ]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        !out.status.success() && err.contains("This link cannot be read"),
        "{err}"
    );
    assert!(!std::path::Path::new("/tmp/never.csv").exists());
}

#[test]
fn material_options_change_the_scene_as_the_page_would() {
    let dir = temp_dir("material");
    let out = twinshade(&[
        "render",
        "--size",
        "160x120",
        "--model",
        "metallic-roughness",
        "--roughness",
        "0.3",
        "--metallic",
        "1",
        "--exposure",
        "-1.5",
        "--out-dir",
        dir.to_str().expect("utf-8"),
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let mut scene = Scene::default();
    scene.panel.width = 160;
    scene.panel.height = 120;
    scene.model = twinshade::shading::ReflectionModel::MetallicRoughness;
    scene.material.roughness = 0.3;
    scene.material.metallic = 1.0;
    scene.exposure_ev = -1.5;
    let mut fb = Framebuffer::new(0, 0);
    Renderer::new()
        .render(
            &scene.checked().expect("valid"),
            ShadingMode::PerPixel,
            &mut fb,
        )
        .expect("renders");
    let (_, _, bytes) = read_png(&dir.join("phong.png")).expect("readable PNG");
    assert!(
        bytes == fb.bytes(),
        "the per-pixel panel differs from the library's"
    );
    // Out of range: refused with the field's name, exit status 1 and no panic.
    let out = twinshade(&[
        "render",
        "--roughness",
        "2",
        "--out-dir",
        dir.to_str().expect("utf-8"),
    ]);
    assert!(!out.status.success());
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("roughness"), "{err}");
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn sweeps_and_advice_on_several_threads_equal_one_thread() {
    // Steps are independent and recorded in order, so the thread count cannot change a
    // figure: the CSV, the summary and the advice are byte for byte those of one thread.
    let dir = temp_dir("jobs");
    std::fs::create_dir_all(&dir).expect("temp dir");
    let d = dir.to_str().expect("utf-8").to_string();
    let run = |args: &[&str]| {
        let out = twinshade(args);
        let err = String::from_utf8_lossy(&out.stderr).to_string();
        assert!(out.status.success(), "{args:?}: {err}");
        err
    };
    for jobs in ["1", "3"] {
        let err = run(&[
            "sweep",
            "--preset",
            "rolling-quads",
            "--axis",
            "roll",
            "--steps",
            "20",
            "--size",
            "160x120",
            "--jobs",
            jobs,
            "--out",
            &format!("{d}/roll{jobs}.csv"),
            "--summary",
            &format!("{d}/roll{jobs}.json"),
        ]);
        assert!(err.contains(&format!("on {jobs} thread")), "{err}");
        run(&[
            "sweep",
            "--steps",
            "40",
            "--size",
            "160x120",
            "--jobs",
            jobs,
            "--out",
            &format!("{d}/turn{jobs}.csv"),
        ]);
        run(&[
            "advise",
            "--steps",
            "6",
            "--size",
            "120x90",
            "--jobs",
            jobs,
            "--out",
            &format!("{d}/advice{jobs}.json"),
        ]);
    }
    for name in ["roll{}.csv", "roll{}.json", "turn{}.csv", "advice{}.json"] {
        let read = |j: &str| std::fs::read(dir.join(name.replace("{}", j))).expect("output");
        let (one, three) = (read("1"), read("3"));
        assert!(!one.is_empty(), "{name}");
        assert!(one == three, "{name} differs between 1 and 3 threads");
    }
    let _ = std::fs::remove_dir_all(&dir);
}

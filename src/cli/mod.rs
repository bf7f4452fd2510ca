//! The native command line: argument parsing and dispatch (thin; the work is in the core).
//!
//! Commands: `serve` (build the page and serve it on 127.0.0.1), `render` (the panels as PNG),
//! `sweep` (measure a turntable or roll rotation step by step), `advise` (how much
//! tessellation per-vertex lighting needs), `scene` (print a scene as
//! JSON), `build-web` (a static folder for any web host). Errors go
//! to stderr with a non-zero exit; nothing panics on bad input.

mod jobs;
mod png_out;
mod server;
mod webbuild;

use webbuild::{build_wasm_pkg, build_web, crate_root};

use clap::{Parser, Subcommand};
use std::path::{Path, PathBuf};
use twinshade::analysis::{Comparer, DiffMetrics};
use twinshade::analysis::{Panel, Workbench};
use twinshade::scene::DifferenceSettings;
use twinshade::scene::{Scene, ValidScene};

#[derive(Parser)]
#[command(
    name = "twinshade",
    version,
    about = "Per-vertex (Gouraud) versus per-pixel (Phong) lighting, side by side, on the CPU"
)]
struct Args {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// Build the WebAssembly page and serve it on 127.0.0.1.
    Serve {
        /// Port to listen on (0 picks a free one); if busy, the next free port is used.
        #[arg(long, default_value_t = 8737)]
        port: u16,
    },
    /// Render the panels of a scene to PNG files.
    Render {
        #[command(flatten)]
        input: SceneArgs,
        /// Folder for gouraud.png, phong.png, difference.png and sheet.png (created if missing).
        #[arg(long)]
        out_dir: PathBuf,
        /// Also write the metrics (dE00, dE*ab, coverage, highlight, cost) as JSON here.
        #[arg(long)]
        metrics: Option<PathBuf>,
    },
    /// Turn the mesh (turntable) or roll the view through evenly spaced steps and measure each:
    /// panel peaks, dE00 between the panels, and for roll the change at fixed surface points.
    Sweep {
        #[command(flatten)]
        input: SceneArgs,
        /// The rotation: the mesh about its up axis, or the view about its axis.
        #[arg(long, value_enum, default_value_t = AxisArg::Turntable)]
        axis: AxisArg,
        /// Number of steps (1 to 3600), evenly spaced over --degrees.
        #[arg(long, default_value_t = 72)]
        steps: u32,
        /// Angle covered, degrees (more than 0, at most 360).
        #[arg(long, default_value_t = 360.0)]
        degrees: f32,
        /// The per-step figures as CSV.
        #[arg(long)]
        out: PathBuf,
        /// Also draw a plot, SVG or PNG by the file's extension.
        #[arg(long)]
        plot: Option<PathBuf>,
        /// What the plot shows.
        #[arg(long, value_enum, default_value_t = MetricArg::Peak)]
        metric: MetricArg,
        /// Also write the summary (highlight stability, orientation variance) as JSON.
        #[arg(long)]
        summary: Option<PathBuf>,
        /// Threads to measure steps on (0: one per core); the figures do not depend on it.
        #[arg(long, default_value_t = 0)]
        jobs: usize,
    },
    /// Find how much tessellation per-vertex lighting needs: finer and finer versions of the
    /// mesh, each swept on a turntable, until per-vertex lighting stays within the threshold of per-pixel lighting.
    Advise {
        #[command(flatten)]
        input: SceneArgs,
        /// The dE00 the 95th percentile must stay under (default: the scene's threshold).
        #[arg(long)]
        threshold: Option<f32>,
        /// Turntable angles per level (1 to 360).
        #[arg(long, default_value_t = 24)]
        steps: u32,
        /// Subdivision for meshes without a resolution parameter (files, the cube).
        #[arg(long, value_enum, default_value_t = MethodArg::Midpoint)]
        method: MethodArg,
        /// The advice (every level measured, the advised one, costs) as JSON.
        #[arg(long)]
        out: PathBuf,
        /// Also draw error against lighting evaluations, SVG or PNG by the file's extension.
        #[arg(long)]
        plot: Option<PathBuf>,
        /// Threads to measure steps on (0: one per core); the figures do not depend on it.
        #[arg(long, default_value_t = 0)]
        jobs: usize,
    },
    /// Compare two same-size sRGB PNG images (e.g. captures from an engine) in dE00.
    Compare {
        /// Image A (PNG).
        a: PathBuf,
        /// Image B (PNG).
        b: PathBuf,
        /// Write the difference image (PNG) here.
        #[arg(long)]
        out: Option<PathBuf>,
        /// Write the metrics as JSON here.
        #[arg(long)]
        metrics: Option<PathBuf>,
        /// Just-noticeable threshold in dE00.
        #[arg(long, default_value_t = 1.0)]
        threshold: f32,
    },
    /// Print a scene as JSON (or as the `#s=` part of a page link).
    Scene {
        /// Print the built-in default scene.
        #[arg(long)]
        default: bool,
        /// Validate and print this scene file (missing fields filled with defaults).
        #[arg(long, conflicts_with_all = ["default", "preset"])]
        file: Option<PathBuf>,
        /// Print a built-in preset.
        #[arg(long, conflicts_with = "default")]
        preset: Option<String>,
        /// Print the scene of a page link (the whole address or its `#s=...` part).
        #[arg(long, conflicts_with_all = ["default", "file", "preset"])]
        from_link: Option<String>,
        /// Print the link fragment (`#s=...`) for the page instead of JSON.
        #[arg(long)]
        link: bool,
        /// Print the JSON Schema of scene files instead of a scene.
        #[arg(long, conflicts_with_all = ["default", "file", "preset", "from_link", "link"])]
        schema: bool,
    },
    /// List the built-in presets with their captions.
    Presets,
    /// Write a self-contained static folder of the page (relative paths, any static host).
    BuildWeb {
        /// Output folder (created if missing).
        #[arg(long)]
        out: PathBuf,
    },
}

/// Which scene, mesh and panel size a command works on.
#[derive(clap::Args)]
struct SceneArgs {
    /// Scene file (JSON); the built-in default scene when absent.
    #[arg(long, conflicts_with = "preset")]
    scene: Option<PathBuf>,
    /// A built-in preset instead of a scene file (see `twinshade presets`).
    #[arg(long, conflicts_with = "from_link")]
    preset: Option<String>,
    /// A page link instead of a scene file: the whole address or its `#s=...` part. Gives
    /// exactly what the page shows for it at the same panel size (`--size`; 480x360 if
    /// absent). A link that names a mesh file needs `--mesh` with that file.
    #[arg(long, conflicts_with = "scene")]
    from_link: Option<String>,
    /// A mesh file (OBJ, STL, PLY, glTF or GLB) instead of the scene's shape.
    #[arg(long)]
    mesh: Option<PathBuf>,
    /// Panel size, WIDTHxHEIGHT (overrides the scene's).
    #[arg(long, value_parser = parse_size)]
    size: Option<(u32, u32)>,
    /// Reflection model (overrides the scene's).
    #[arg(long, value_enum)]
    model: Option<ModelArg>,
    /// Roughness of the metallic-roughness model, 0 to 1 (overrides the scene's).
    #[arg(long)]
    roughness: Option<f32>,
    /// Metalness of the metallic-roughness model, 0 to 1 (overrides the scene's).
    #[arg(long)]
    metallic: Option<f32>,
    /// Whose material a mesh file is lit with: its own (glTF materials, the default) or the
    /// scene's.
    #[arg(long, value_enum)]
    material: Option<MaterialArg>,
    /// Ignore a mesh file's vertex colours.
    #[arg(long)]
    no_vertex_colors: bool,
    /// Exposure in stops, -10 to 10: light is scaled by 2^EV before the sRGB encoding, to
    /// bring bright highlights below clipping (overrides the scene's).
    #[arg(long, allow_hyphen_values = true)]
    exposure: Option<f32>,
}

#[derive(Clone, Copy, clap::ValueEnum)]
enum ModelArg {
    /// Phong (1975): reflection vector, shininess exponent.
    Phong,
    /// Blinn-Phong (1977): half vector, shininess exponent.
    BlinnPhong,
    /// glTF 2.0 metallic-roughness (GGX).
    MetallicRoughness,
}

#[derive(Clone, Copy, clap::ValueEnum)]
enum MaterialArg {
    /// The mesh file's own materials where it has any.
    File,
    /// The scene's material.
    Scene,
}

impl SceneArgs {
    /// The material and vertex-colour options written over `scene`.
    fn apply_material(&self, scene: &mut Scene) {
        use twinshade::shading::ReflectionModel;
        if let Some(m) = self.model {
            scene.model = match m {
                ModelArg::Phong => ReflectionModel::Phong,
                ModelArg::BlinnPhong => ReflectionModel::BlinnPhong,
                ModelArg::MetallicRoughness => ReflectionModel::MetallicRoughness,
            };
        }
        if let Some(r) = self.roughness {
            scene.material.roughness = r;
        }
        if let Some(m) = self.metallic {
            scene.material.metallic = m;
        }
        if let Some(m) = self.material {
            scene.material_source = match m {
                MaterialArg::File => twinshade::scene::MaterialSource::File,
                MaterialArg::Scene => twinshade::scene::MaterialSource::Scene,
            };
        }
        if self.no_vertex_colors {
            scene.vertex_colors = false;
        }
        if let Some(ev) = self.exposure {
            scene.exposure_ev = ev;
        }
    }

    /// The scene with `--size` and `--mesh` applied, a workbench holding the mesh, and the
    /// mesh file's counts.
    fn load(
        self,
    ) -> Result<(ValidScene, Workbench, Option<twinshade::geometry::MeshInfo>), String> {
        let mut scene = pick_scene(
            self.scene.clone(),
            self.preset.clone(),
            self.from_link.clone(),
            self.size,
        )?;
        self.apply_material(&mut scene);
        prepare(scene, self.mesh.as_deref(), self.size)
    }
}

#[derive(Clone, Copy, clap::ValueEnum)]
enum AxisArg {
    Turntable,
    Roll,
}

#[derive(Clone, Copy, clap::ValueEnum)]
enum MethodArg {
    /// Points on the original faces.
    Midpoint,
    /// Curved PN triangles (Vlachos et al. 2001).
    Pn,
}

#[derive(Clone, Copy, clap::ValueEnum)]
enum MetricArg {
    /// Peak luminance of each panel.
    Peak,
    /// Mean and p95 dE00 between the panels.
    De00,
    /// Largest change at fixed surface points (roll).
    Probes,
}

fn parse_size(s: &str) -> Result<(u32, u32), String> {
    let (w, h) = s
        .split_once(['x', 'X'])
        .ok_or_else(|| format!("size '{s}' must look like 640x480"))?;
    let p = |v: &str| {
        v.trim()
            .parse::<u32>()
            .map_err(|_| format!("size '{s}' must look like 640x480"))
    };
    Ok((p(w)?, p(h)?))
}

/// Runs the command line; returns the process exit code.
pub fn main() -> i32 {
    let args = match Args::try_parse() {
        Ok(a) => a,
        Err(e) => {
            let _ = e.print();
            return if e.use_stderr() { 2 } else { 0 };
        }
    };
    match run(args.command) {
        Ok(()) => 0,
        Err(msg) => {
            eprintln!("twinshade: error: {msg}");
            1
        }
    }
}

fn run(command: Command) -> Result<(), String> {
    match command {
        Command::Serve { port } => {
            let root = crate_root();
            build_wasm_pkg(&root, &root.join("www/pkg"))?;
            server::serve(&root.join("www"), port, |url| {
                println!("twinshade: serving {url} (Ctrl+C to stop)");
            })
        }
        Command::Render {
            input,
            out_dir,
            metrics,
        } => render(input.load()?, &out_dir, metrics.as_deref()),
        Command::Sweep {
            input,
            axis,
            steps,
            degrees,
            out,
            plot,
            metric,
            summary,
            jobs,
        } => {
            let (scene, bench, _) = input.load()?;
            let settings = twinshade::analysis::SweepSettings {
                axis: match axis {
                    AxisArg::Turntable => twinshade::analysis::SweepAxis::Turntable,
                    AxisArg::Roll => twinshade::analysis::SweepAxis::Roll,
                },
                steps,
                degrees,
            };
            let metric = match metric {
                MetricArg::Peak => twinshade::analysis::SweepMetric::PeakLuminance,
                MetricArg::De00 => twinshade::analysis::SweepMetric::De00,
                MetricArg::Probes => twinshade::analysis::SweepMetric::ProbeChange,
            };
            sweep(
                &scene,
                bench,
                settings,
                jobs,
                &out,
                plot.as_deref(),
                metric,
                summary.as_deref(),
            )
        }
        Command::Advise {
            input,
            threshold,
            steps,
            method,
            out,
            plot,
            jobs,
        } => {
            let (scene, bench, _) = input.load()?;
            let settings = twinshade::analysis::AdviceSettings {
                threshold: threshold.unwrap_or(scene.difference.threshold),
                steps,
                method: match method {
                    MethodArg::Midpoint => twinshade::geometry::SubdivisionMethod::Midpoint,
                    MethodArg::Pn => twinshade::geometry::SubdivisionMethod::PnTriangles,
                },
            };
            advise(&scene, bench, settings, jobs, &out, plot.as_deref())
        }
        Command::Presets => {
            for p in twinshade::scene::presets() {
                println!("{:22} {}\n{:22} {}", p.id, p.title, "", p.caption);
            }
            Ok(())
        }
        Command::Compare {
            a,
            b,
            out,
            metrics,
            threshold,
        } => compare(&a, &b, out.as_deref(), metrics.as_deref(), threshold),
        Command::Scene {
            default,
            file,
            preset,
            from_link,
            link,
            schema,
        } => {
            if schema {
                println!("{}", twinshade::scene::scene_schema_text());
                return Ok(());
            }
            let scene = match (default, file, preset) {
                _ if from_link.is_some() => {
                    scene_from_link(from_link.as_deref().unwrap_or_default(), None)?
                }
                (_, Some(path), _) => load_scene(&path)?,
                (_, None, Some(id)) => twinshade::scene::preset(&id)
                    .map(|p| p.scene)
                    .ok_or_else(|| format!("no preset '{id}' (see `twinshade presets`)"))?,
                (true, None, None) => Scene::default(),
                (false, None, None) => {
                    return Err(
                        "say --default, --file FILE, --preset ID, --from-link TEXT or --schema"
                            .into(),
                    )
                }
            };
            if link {
                println!("#s={}", twinshade::scene::encode(&scene));
            } else {
                println!("{}", scene.to_json());
            }
            Ok(())
        }
        Command::BuildWeb { out } => {
            build_web(&crate_root(), &out)?;
            println!("twinshade: wrote the page to {}", out.display());
            Ok(())
        }
    }
}

/// The scene named on the command line: a file, a preset or the default.
fn pick_scene(
    file: Option<PathBuf>,
    preset: Option<String>,
    link: Option<String>,
    size: Option<(u32, u32)>,
) -> Result<Scene, String> {
    if let Some(text) = link {
        return scene_from_link(&text, size);
    }
    match (file, preset) {
        (Some(p), _) => load_scene(&p),
        (None, Some(id)) => twinshade::scene::preset(&id)
            .map(|p| p.scene)
            .ok_or_else(|| format!("no preset '{id}' (see `twinshade presets`)")),
        (None, None) => Ok(Scene::default()),
    }
}

/// The scene of page link text: a whole address (`http://.../?size=...#s=1.…`), its fragment
/// (`#s=1.…`) or the bare link (`1.…`), at panel size `size` (the default scene's if `None`).
fn scene_from_link(text: &str, size: Option<(u32, u32)>) -> Result<Scene, String> {
    let text = text.trim();
    let link = text.find("#s=").map_or(text, |i| &text[i..]);
    let mut panel = Scene::default().panel;
    if let Some((w, h)) = size {
        panel.width = w;
        panel.height = h;
    }
    let scene = twinshade::scene::decode(link, panel).map_err(|e| e.to_string())?;
    let current = twinshade::scene::RENDERER_REVISION;
    if let Some(notice) = twinshade::scene::revision_notice(scene.renderer, current) {
        eprintln!("twinshade: {notice}");
    }
    let mut scene = scene.into_scene();
    scene.renderer = current;
    Ok(scene)
}

/// Applies `--size` and `--mesh` to a scene and returns it with a workbench holding the mesh
/// and the mesh's counts.
fn prepare(
    mut scene: Scene,
    mesh: Option<&Path>,
    size: Option<(u32, u32)>,
) -> Result<(ValidScene, Workbench, Option<twinshade::geometry::MeshInfo>), String> {
    if let Some((w, h)) = size {
        scene.panel.width = w;
        scene.panel.height = h;
    }
    scene.validate().map_err(|e| e.to_string())?;
    let mut bench = Workbench::new();
    let mut info = None;
    if let Some(path) = mesh {
        let imported = load_mesh(path)?;
        info = Some(imported.info());
        scene.mesh = twinshade::scene::MeshSource::File {
            name: imported.mesh.name.clone(),
        };
        bench.set_file_mesh(imported.mesh);
    }
    let scene = scene.validated().map_err(|e| e.to_string())?;
    Ok((scene, bench, info))
}

/// Reports progress: a bar on a terminal, a line per quarter otherwise.
struct Progress {
    bar: Option<indicatif::ProgressBar>,
    label: &'static str,
    last_quarter: u64,
}

impl Progress {
    fn new(label: &'static str, total: u64) -> Progress {
        use std::io::IsTerminal;
        let bar = std::io::stderr().is_terminal().then(|| {
            let b = indicatif::ProgressBar::new(total);
            if let Ok(style) = indicatif::ProgressStyle::with_template(
                "{msg} [{bar:40}] {pos}/{len} ({elapsed}, {eta} left)",
            ) {
                b.set_style(style.progress_chars("=> "));
            }
            b.set_message(label);
            b
        });
        Progress {
            bar,
            label,
            last_quarter: 0,
        }
    }

    fn update(&mut self, done: u64, total: u64) {
        match &self.bar {
            Some(b) => b.set_position(done),
            None => {
                let quarter = done * 4 / total.max(1);
                if quarter > self.last_quarter {
                    self.last_quarter = quarter;
                    eprintln!("twinshade: {} {done}/{total}", self.label);
                }
            }
        }
    }

    fn finish(&self) {
        if let Some(b) = &self.bar {
            b.finish_and_clear();
        }
    }
}

/// True for an SVG plot file, false for PNG; an error for other names (checked before any
/// work is done).
fn plot_is_svg(path: &Path) -> Result<bool, String> {
    let ext = path
        .extension()
        .map(|e| e.to_string_lossy().to_ascii_lowercase());
    match ext.as_deref() {
        Some("svg") => Ok(true),
        Some("png") => Ok(false),
        _ => Err(format!(
            "the plot file {} must end in .svg or .png",
            path.display()
        )),
    }
}

fn write_plot(path: &Path, plot: &twinshade::draw::Plot) -> Result<(), String> {
    if plot_is_svg(path)? {
        std::fs::write(path, plot.to_svg(800, 420))
            .map_err(|e| format!("cannot write {}: {e}", path.display()))?;
    } else {
        let img = plot.to_image(800, 420);
        png_out::write_png(path, img.width, img.height, &img.rgba)?;
    }
    eprintln!("twinshade: wrote {}", path.display());
    Ok(())
}

#[allow(clippy::too_many_arguments)] // one per command-line option
fn sweep(
    scene: &ValidScene,
    mut bench: Workbench,
    settings: twinshade::analysis::SweepSettings,
    jobs: usize,
    out: &Path,
    plot: Option<&Path>,
    metric: twinshade::analysis::SweepMetric,
    summary: Option<&Path>,
) -> Result<(), String> {
    if let Some(p) = plot {
        plot_is_svg(p)?;
    }
    let mut sweep = twinshade::analysis::Sweep::new(scene, settings).map_err(|e| e.to_string())?;
    let start = std::time::Instant::now();
    let mut progress = Progress::new("sweep", u64::from(settings.steps));
    let pool = jobs::Jobs::new(jobs, bench.file_mesh())?;
    let report = |done: u32, total: u32| progress.update(u64::from(done), u64::from(total));
    let result = if pool.threads() == 1 {
        sweep.run(&mut bench, report)
    } else {
        sweep.run_with(&mut bench, &mut |s, steps| pool.measure(s, steps), report)
    };
    progress.finish();
    result.map_err(|e| e.to_string())?;
    std::fs::write(out, sweep.to_csv())
        .map_err(|e| format!("cannot write {}: {e}", out.display()))?;
    eprintln!(
        "twinshade: {} steps of {} in {:.2} s on {} thread{}; wrote {}",
        settings.steps,
        settings.axis.name(),
        start.elapsed().as_secs_f64(),
        pool.threads(),
        if pool.threads() == 1 { "" } else { "s" },
        out.display()
    );
    if let Some(path) = plot {
        write_plot(path, &sweep.plot(metric, None))?;
    }
    let s = sweep.summary();
    println!(
        "highlight stability (CoV of the peak): per-vertex {:.4}, per-pixel {:.4}",
        s.highlight_cov[0], s.highlight_cov[1]
    );
    println!(
        "peak luminance: per-vertex {:.4}..{:.4}, per-pixel {:.4}..{:.4}",
        s.peak_min[0], s.peak_max[0], s.peak_min[1], s.peak_max[1]
    );
    println!(
        "dE00 {:?} vs {:?}: mean {:.3}, worst p95 {:.3}",
        s.pair[0], s.pair[1], s.de00_mean, s.de00_p95_max
    );
    if let Some(v) = s.orientation_variance {
        println!(
            "orientation variance (largest change of Y at a fixed point, {} probes): per-vertex {:.5}, per-pixel {:.5}",
            s.probes_tracked, v[0], v[1]
        );
    }
    if let Some(path) = summary {
        write_json(path, &s)?;
    }
    Ok(())
}

fn advise(
    scene: &ValidScene,
    mut bench: Workbench,
    settings: twinshade::analysis::AdviceSettings,
    jobs: usize,
    out: &Path,
    plot: Option<&Path>,
) -> Result<(), String> {
    if let Some(p) = plot {
        plot_is_svg(p)?;
    }
    let mut advisor =
        twinshade::analysis::Advisor::new(scene, settings).map_err(|e| e.to_string())?;
    let start = std::time::Instant::now();
    let mut progress = Progress::new("advise", u64::from(advisor.total_frames()));
    let pool = jobs::Jobs::new(jobs, bench.file_mesh())?;
    let report = |done: u32, total: u32| progress.update(u64::from(done), u64::from(total));
    let result = if pool.threads() == 1 {
        advisor.run(&mut bench, report)
    } else {
        advisor.run_with(&mut bench, &mut |s, steps| pool.measure(s, steps), report)
    };
    progress.finish();
    result.map_err(|e| e.to_string())?;
    let a = advisor.advice();
    eprintln!(
        "twinshade: {} levels, {} turntable angles each, in {:.2} s on {} thread{}",
        a.rungs.len(),
        settings.steps,
        start.elapsed().as_secs_f64(),
        pool.threads(),
        if pool.threads() == 1 { "" } else { "s" }
    );
    for (i, r) in a.rungs.iter().enumerate() {
        println!(
            "{} {:28} {:>9} vertices {:>9} triangles  worst p95 {:7.3} dE00 (at {:.0} deg), mean p95 {:.3}",
            if Some(i) == a.advised { "->" } else { "  " },
            r.label,
            r.vertices,
            r.triangles,
            r.worst_p95,
            r.worst_angle_deg,
            r.mean_p95
        );
    }
    println!("{}", a.lit_with_text);
    match a.advised.map(|i| &a.rungs[i]) {
        Some(r) => println!(
            "advice: {} ({} lighting evaluations per frame per vertex) keeps p95 under {} dE00 at every angle; per-pixel lighting costs {} evaluations per frame at {}x{}",
            r.label, r.vertices, settings.threshold, a.current_pixels, a.view[0], a.view[1]
        ),
        None => println!(
            "advice: none of these levels is enough ({}); per-pixel lighting costs {} evaluations per frame at {}x{}",
            a.note.as_deref().unwrap_or("ladder ended"),
            a.current_pixels,
            a.view[0],
            a.view[1]
        ),
    }
    write_json(out, a)?;
    if let Some(path) = plot {
        write_plot(path, &advisor.plot(a.advised))?;
    }
    Ok(())
}

/// Reads and validates a scene file.
fn load_scene(path: &Path) -> Result<Scene, String> {
    let text = std::fs::read_to_string(path)
        .map_err(|e| format!("cannot read scene {}: {e}", path.display()))?;
    Scene::from_json(&text)
        .map(ValidScene::into_scene)
        .map_err(|e| format!("{}: {e}", path.display()))
}

/// Reads and imports a mesh file, reporting its counts on stderr.
fn load_mesh(path: &Path) -> Result<twinshade::geometry::Imported, String> {
    let bytes =
        std::fs::read(path).map_err(|e| format!("cannot read mesh {}: {e}", path.display()))?;
    let name = path.file_name().map_or_else(
        || path.display().to_string(),
        |n| n.to_string_lossy().into_owned(),
    );
    // The files it refers to (an OBJ's material libraries), read from beside it: the path
    // as written, else the same name in the mesh's folder.
    let folder = path.parent().unwrap_or(Path::new(""));
    let read: Vec<(String, Vec<u8>)> = twinshade::geometry::companions(&name, &bytes)
        .into_iter()
        .filter_map(|wanted| {
            let as_written = folder.join(wanted.replace('\\', "/"));
            let beside = folder.join(wanted.rsplit(['/', '\\']).next().unwrap_or(&wanted));
            let bytes = std::fs::read(&as_written)
                .or_else(|_| std::fs::read(beside))
                .ok()?;
            Some((wanted, bytes))
        })
        .collect();
    let companions: Vec<twinshade::geometry::Companion> = read
        .iter()
        .map(|(name, bytes)| twinshade::geometry::Companion { name, bytes })
        .collect();
    let imported =
        twinshade::geometry::import_with(&name, &bytes, &companions).map_err(|e| e.to_string())?;
    let info = imported.info();
    eprintln!(
        "twinshade: {}: {} vertices, {} faces, {} triangles, {} degenerate faces dropped, {} normals, {}, {} materials",
        info.name,
        info.vertices,
        info.faces,
        info.triangles,
        info.dropped_faces,
        if info.authored_normals { "authored" } else { "computed" },
        if info.vertex_colors {
            "vertex colours read"
        } else {
            "no vertex colours"
        },
        info.materials
    );
    for note in &info.notes {
        eprintln!("twinshade: {}: note: {note}", info.name);
    }
    Ok(imported)
}

/// What `render --metrics` writes: the frame report plus the mesh's counts when a file was
/// rendered.
#[derive(serde::Serialize)]
struct RenderMetrics<'a> {
    #[serde(flatten)]
    report: &'a twinshade::analysis::FrameReport,
    #[serde(skip_serializing_if = "Option::is_none")]
    mesh: Option<twinshade::geometry::MeshInfo>,
}

fn render(
    (scene, mut bench, mesh_info): (ValidScene, Workbench, Option<twinshade::geometry::MeshInfo>),
    out_dir: &Path,
    metrics: Option<&Path>,
) -> Result<(), String> {
    std::fs::create_dir_all(out_dir)
        .map_err(|e| format!("cannot create {}: {e}", out_dir.display()))?;
    let report = *bench.render(&scene).map_err(|e| e.to_string())?;
    for (panel, name) in [
        (Panel::PerVertex, "gouraud.png"),
        (Panel::PerPixel, "phong.png"),
        (Panel::Difference, "difference.png"),
    ] {
        let fb = bench.framebuffer(panel);
        let path = out_dir.join(name);
        png_out::write_png(&path, fb.width(), fb.height(), fb.bytes())?;
        eprintln!("twinshade: wrote {}", path.display());
    }
    let img = twinshade::analysis::workbench_sheet(&bench, &scene);
    let path = out_dir.join("sheet.png");
    png_out::write_png(&path, img.width, img.height, &img.rgba)?;
    eprintln!("twinshade: wrote {}", path.display());
    let m = &report.metrics;
    eprintln!(
        "twinshade: dE00 mean {:.3}, p95 {:.3}, max {:.3}; {:.1}% of {} covered pixels above {}; \
         {} silhouette pixels; lighting evaluations: {} vertices vs {} pixels",
        m.de00.mean,
        m.de00.p95,
        m.de00.max,
        100.0 * m.share_above_threshold,
        m.covered_pixels,
        m.threshold_de00,
        m.silhouette_mismatch_pixels,
        report.lighting.per_vertex,
        report.lighting.per_pixel
    );
    if let Some(path) = metrics {
        write_json(
            path,
            &RenderMetrics {
                report: &report,
                mesh: mesh_info,
            },
        )?;
    }
    Ok(())
}

fn write_json(path: &Path, value: &impl serde::Serialize) -> Result<(), String> {
    let text = serde_json::to_string_pretty(value).map_err(|e| e.to_string())?;
    std::fs::write(path, text + "\n")
        .map_err(|e| format!("cannot write {}: {e}", path.display()))?;
    eprintln!("twinshade: wrote {}", path.display());
    Ok(())
}

/// Metrics of `compare`: the images' size and their difference.
#[derive(serde::Serialize)]
struct CompareReport {
    width: usize,
    height: usize,
    metrics: DiffMetrics,
}

fn compare(
    a: &Path,
    b: &Path,
    out: Option<&Path>,
    metrics: Option<&Path>,
    threshold: f32,
) -> Result<(), String> {
    let (wa, ha, pa) = png_out::read_png(a)?;
    let (wb, hb, pb) = png_out::read_png(b)?;
    if (wa, ha) != (wb, hb) {
        return Err(format!(
            "the images differ in size: {} is {wa}x{ha}, {} is {wb}x{hb}",
            a.display(),
            b.display()
        ));
    }
    if !(threshold > 0.0 && threshold.is_finite()) {
        return Err("the threshold must be a positive number".into());
    }
    let settings = DifferenceSettings {
        threshold,
        ..DifferenceSettings::default()
    };
    let mut diff = vec![0u8; pa.len()];
    let m = Comparer::new().compare(&pa, &pb, None, None, settings, [0, 0, 0], &mut diff);
    println!(
        "dE00 mean {:.4}  p95 {:.4}  max {:.4}  above {threshold}: {:.2}% of {} pixels",
        m.de00.mean,
        m.de00.p95,
        m.de00.max,
        100.0 * m.share_above_threshold,
        m.covered_pixels
    );
    if let Some(path) = out {
        png_out::write_png(path, wa, ha, &diff)?;
    }
    if let Some(path) = metrics {
        write_json(
            path,
            &CompareReport {
                width: wa,
                height: ha,
                metrics: m,
            },
        )?;
    }
    Ok(())
}

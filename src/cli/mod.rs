//! The native command line: argument parsing and dispatch (thin; the work is in the core).
//!
//! Commands: `serve` (build the page and serve it on 127.0.0.1), `render` (the panels as PNG),
//! `scene` (print a scene as JSON), `build-web` (a static folder for any web host). Errors go
//! to stderr with a non-zero exit; nothing panics on bad input.

mod png_out;
mod server;
mod webbuild;

pub use png_out::{read_png, write_png};
pub use webbuild::{build_wasm_pkg, build_web, crate_root};

use crate::measure::{Comparer, DiffMetrics, DifferenceSettings};
use crate::scene::Scene;
use crate::workbench::{Panel, Workbench};
use clap::{Parser, Subcommand};
use std::path::{Path, PathBuf};

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
        /// Scene file (JSON); the built-in default scene when absent.
        #[arg(long, conflicts_with = "preset")]
        scene: Option<PathBuf>,
        /// A built-in preset instead of a scene file (see `twinshade presets`).
        #[arg(long)]
        preset: Option<String>,
        /// A mesh file (OBJ, STL, PLY, glTF or GLB) to render instead of the scene's shape.
        #[arg(long)]
        mesh: Option<PathBuf>,
        /// Panel size, WIDTHxHEIGHT (overrides the scene's).
        #[arg(long, value_parser = parse_size)]
        size: Option<(u32, u32)>,
        /// Folder for gouraud.png, phong.png, difference.png and sheet.png (created if missing).
        #[arg(long)]
        out_dir: PathBuf,
        /// Also write the metrics (dE00, dE*ab, coverage, highlight, cost) as JSON here.
        #[arg(long)]
        metrics: Option<PathBuf>,
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
        /// Print the link fragment (`#s=...`) for the page instead of JSON.
        #[arg(long)]
        link: bool,
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
            scene,
            preset,
            mesh,
            size,
            out_dir,
            metrics,
        } => {
            let scene = match (scene, preset) {
                (Some(p), _) => load_scene(&p)?,
                (None, Some(id)) => crate::presets::preset(&id)
                    .map(|p| p.scene)
                    .ok_or_else(|| format!("no preset '{id}' (see `twinshade presets`)"))?,
                (None, None) => Scene::default(),
            };
            render(scene, mesh.as_deref(), size, &out_dir, metrics.as_deref())
        }
        Command::Presets => {
            for p in crate::presets::presets() {
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
            link,
        } => {
            let scene = match (default, file, preset) {
                (_, Some(path), _) => load_scene(&path)?,
                (_, None, Some(id)) => crate::presets::preset(&id)
                    .map(|p| p.scene)
                    .ok_or_else(|| format!("no preset '{id}' (see `twinshade presets`)"))?,
                (true, None, None) => Scene::default(),
                (false, None, None) => {
                    return Err("say --default, --file FILE or --preset ID".into())
                }
            };
            if link {
                println!("#s={}", crate::share::encode(&scene));
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

/// Reads and validates a scene file.
fn load_scene(path: &Path) -> Result<Scene, String> {
    let text = std::fs::read_to_string(path)
        .map_err(|e| format!("cannot read scene {}: {e}", path.display()))?;
    Scene::from_json(&text).map_err(|e| format!("{}: {e}", path.display()))
}

/// Reads and imports a mesh file, reporting its counts on stderr.
fn load_mesh(path: &Path) -> Result<crate::import::Imported, String> {
    let bytes =
        std::fs::read(path).map_err(|e| format!("cannot read mesh {}: {e}", path.display()))?;
    let name = path.file_name().map_or_else(
        || path.display().to_string(),
        |n| n.to_string_lossy().into_owned(),
    );
    let imported = crate::import::import(&name, &bytes).map_err(|e| e.to_string())?;
    let info = imported.info();
    eprintln!(
        "twinshade: {}: {} vertices, {} faces, {} triangles, {} degenerate faces dropped, {} normals",
        info.name,
        info.vertices,
        info.faces,
        info.triangles,
        info.dropped_faces,
        if info.authored_normals { "authored" } else { "computed" }
    );
    Ok(imported)
}

/// What `render --metrics` writes: the frame report plus the mesh's counts when a file was
/// rendered.
#[derive(serde::Serialize)]
struct RenderMetrics<'a> {
    #[serde(flatten)]
    report: &'a crate::workbench::FrameReport,
    #[serde(skip_serializing_if = "Option::is_none")]
    mesh: Option<crate::import::MeshInfo>,
}

fn render(
    mut scene: Scene,
    mesh: Option<&Path>,
    size: Option<(u32, u32)>,
    out_dir: &Path,
    metrics: Option<&Path>,
) -> Result<(), String> {
    if let Some((w, h)) = size {
        scene.panel.width = w;
        scene.panel.height = h;
    }
    scene.validate().map_err(|e| e.to_string())?;
    std::fs::create_dir_all(out_dir)
        .map_err(|e| format!("cannot create {}: {e}", out_dir.display()))?;
    let mut bench = Workbench::new();
    let mut mesh_info = None;
    if let Some(path) = mesh {
        let imported = load_mesh(path)?;
        mesh_info = Some(imported.info());
        scene.mesh = crate::scene::MeshSource::File {
            name: imported.mesh.name.clone(),
        };
        bench.set_file_mesh(imported.mesh);
    }
    let report = *bench.render(&scene).map_err(|e| e.to_string())?;
    for (panel, name) in [
        (Panel::Gouraud, "gouraud.png"),
        (Panel::Phong, "phong.png"),
        (Panel::Difference, "difference.png"),
    ] {
        let fb = bench.framebuffer(panel);
        let path = out_dir.join(name);
        png_out::write_png(&path, fb.width(), fb.height(), fb.bytes())?;
        eprintln!("twinshade: wrote {}", path.display());
    }
    let img = bench.report_sheet(&scene);
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
        report.lighting.gouraud_vertices,
        report.lighting.phong_pixels
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

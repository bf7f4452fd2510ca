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

use crate::render::{Renderer, ShadingMode};
use crate::scene::Scene;
use crate::{sheet, Framebuffer};
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
        #[arg(long)]
        scene: Option<PathBuf>,
        /// Panel size, WIDTHxHEIGHT (overrides the scene's).
        #[arg(long, value_parser = parse_size)]
        size: Option<(u32, u32)>,
        /// Folder for gouraud.png, phong.png and sheet.png (created if missing).
        #[arg(long)]
        out_dir: PathBuf,
    },
    /// Print a scene as JSON.
    Scene {
        /// Print the built-in default scene.
        #[arg(long)]
        default: bool,
        /// Validate and print this scene file (missing fields filled with defaults).
        #[arg(long, conflicts_with = "default")]
        file: Option<PathBuf>,
    },
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
            size,
            out_dir,
        } => render(scene.as_deref(), size, &out_dir),
        Command::Scene { default, file } => {
            let scene = match (default, file) {
                (_, Some(path)) => load_scene(&path)?,
                (true, None) => Scene::default(),
                (false, None) => return Err("say --default or --file FILE".into()),
            };
            println!("{}", scene.to_json());
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

fn render(scene: Option<&Path>, size: Option<(u32, u32)>, out_dir: &Path) -> Result<(), String> {
    let mut scene = match scene {
        Some(p) => load_scene(p)?,
        None => Scene::default(),
    };
    if let Some((w, h)) = size {
        scene.panel.width = w;
        scene.panel.height = h;
    }
    scene.validate().map_err(|e| e.to_string())?;
    std::fs::create_dir_all(out_dir)
        .map_err(|e| format!("cannot create {}: {e}", out_dir.display()))?;
    let mut renderer = Renderer::new();
    let mut panels = Vec::new();
    for mode in [ShadingMode::Gouraud, ShadingMode::Phong] {
        let mut fb = Framebuffer::new(0, 0);
        renderer
            .render(&scene, mode, &mut fb)
            .map_err(|e| e.to_string())?;
        let name = format!("{}.png", mode_file_name(mode));
        png_out::write_png(&out_dir.join(&name), fb.width(), fb.height(), fb.bytes())?;
        eprintln!("twinshade: wrote {}", out_dir.join(&name).display());
        panels.push((mode, fb));
    }
    let labelled: Vec<(&str, &Framebuffer)> =
        panels.iter().map(|(m, fb)| (m.label(), fb)).collect();
    let img = sheet::sheet(&labelled);
    let path = out_dir.join("sheet.png");
    png_out::write_png(&path, img.width, img.height, &img.rgba)?;
    eprintln!("twinshade: wrote {}", path.display());
    Ok(())
}

fn mode_file_name(mode: ShadingMode) -> &'static str {
    match mode {
        ShadingMode::Flat => "flat",
        ShadingMode::Gouraud => "gouraud",
        ShadingMode::Phong => "phong",
        ShadingMode::Exact => "exact",
    }
}

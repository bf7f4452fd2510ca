//! Builds the WebAssembly module and its JavaScript glue, and static copies of the page.
//!
//! The module is compiled by cargo for `wasm32-unknown-unknown` with the `web` profile into a
//! target folder of its own (`target/web`), so a nested build never waits on the lock of the
//! build that is running it (`cargo test`, `cargo run`). The glue is generated with
//! `wasm-bindgen-cli-support` used as a library, pinned to the wasm-bindgen version.

use std::path::{Path, PathBuf};
use std::process::Command;

const TARGET: &str = "wasm32-unknown-unknown";

/// The source folder of this crate (where Cargo.toml and www/ are).
pub fn crate_root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn cargo() -> String {
    std::env::var("CARGO").unwrap_or_else(|_| "cargo".into())
}

/// Adds the wasm32 target with rustup when the toolchain lacks it.
fn ensure_target() -> Result<(), String> {
    let installed = Command::new("rustc")
        .args(["--print", "target-libdir", "--target", TARGET])
        .output()
        .ok()
        .filter(|out| out.status.success())
        .and_then(|out| std::fs::read_dir(String::from_utf8_lossy(&out.stdout).trim()).ok())
        .is_some_and(|mut dir| {
            dir.any(|e| e.is_ok_and(|e| e.file_name().to_string_lossy().starts_with("libcore-")))
        });
    if installed {
        return Ok(());
    }
    eprintln!("twinshade: adding the {TARGET} target with rustup");
    let status = Command::new("rustup")
        .args(["target", "add", TARGET])
        .status()
        .map_err(|e| format!("cannot run rustup to add {TARGET}: {e}"))?;
    if status.success() {
        Ok(())
    } else {
        Err(format!("`rustup target add {TARGET}` failed"))
    }
}

/// Compiles the crate to wasm and writes `twinshade.js` and `twinshade_bg.wasm` to `out_pkg`,
/// with the scene schema beside them (`scene.schema.json`).
///
/// # Errors
/// When the target cannot be added, cargo fails, or the glue cannot be generated.
pub fn build_wasm_pkg(root: &Path, out_pkg: &Path) -> Result<(), String> {
    ensure_target()?;
    let target_dir = root.join("target/web");
    eprintln!("twinshade: building the WebAssembly module");
    let status = Command::new(cargo())
        .current_dir(root)
        .args(["build", "--lib", "--target", TARGET, "--profile", "web"])
        .arg("--target-dir")
        .arg(&target_dir)
        .env_remove("CARGO_TARGET_DIR")
        .env_remove("CARGO_BUILD_TARGET")
        .status()
        .map_err(|e| format!("cannot run cargo: {e}"))?;
    if !status.success() {
        return Err("building the WebAssembly module failed (see cargo's messages above)".into());
    }
    let wasm = target_dir.join(TARGET).join("web").join("twinshade.wasm");
    std::fs::create_dir_all(out_pkg)
        .map_err(|e| format!("cannot create {}: {e}", out_pkg.display()))?;
    let mut bindgen = wasm_bindgen_cli_support::Bindgen::new();
    bindgen
        .input_path(&wasm)
        .web(true)
        .map_err(|e| e.to_string())?
        .typescript(false)
        // The library API leaves the default module path out unless told; the page relies
        // on `init()` finding `twinshade_bg.wasm` beside the glue.
        .omit_default_module_path(false)
        .generate(out_pkg)
        .map_err(|e| format!("generating the JavaScript glue failed: {e}"))?;
    let schema = out_pkg.join("scene.schema.json");
    std::fs::write(&schema, twinshade::scene::scene_schema_text() + "\n")
        .map_err(|e| format!("cannot write {}: {e}", schema.display()))
}

/// Writes a self-contained static copy of the page (www/ plus the built module) to `out`.
///
/// # Errors
/// When the build fails or files cannot be written.
pub fn build_web(root: &Path, out: &Path) -> Result<(), String> {
    let www = root.join("www");
    build_wasm_pkg(root, &www.join("pkg"))?;
    copy_dir(&www, out)
}

fn copy_dir(from: &Path, to: &Path) -> Result<(), String> {
    std::fs::create_dir_all(to).map_err(|e| format!("cannot create {}: {e}", to.display()))?;
    let entries =
        std::fs::read_dir(from).map_err(|e| format!("cannot read {}: {e}", from.display()))?;
    for entry in entries {
        let entry = entry.map_err(|e| e.to_string())?;
        let path = entry.path();
        let dest = to.join(entry.file_name());
        if path.is_dir() {
            copy_dir(&path, &dest)?;
        } else {
            std::fs::copy(&path, &dest)
                .map_err(|e| format!("cannot copy {}: {e}", path.display()))?;
        }
    }
    Ok(())
}

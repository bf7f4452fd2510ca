//! Files authored outside this project, read where cargo downloaded the registry packages that
//! ship them (found with `cargo metadata`), so none is copied into the repo.

use std::path::PathBuf;

/// The folder of a dependency package `name` at exactly `version`, as cargo resolved it.
pub fn package_dir(name: &str, version: &str) -> PathBuf {
    let cargo = std::env::var("CARGO").unwrap_or_else(|_| "cargo".into());
    let out = std::process::Command::new(cargo)
        .args(["metadata", "--format-version", "1", "--offline"])
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .output()
        .expect("run cargo metadata");
    assert!(
        out.status.success(),
        "cargo metadata: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    let meta: serde_json::Value = serde_json::from_slice(&out.stdout).expect("metadata JSON");
    let manifest = meta["packages"]
        .as_array()
        .expect("packages")
        .iter()
        .find(|p| p["name"] == name && p["version"] == version)
        .and_then(|p| p["manifest_path"].as_str())
        .unwrap_or_else(|| panic!("package {name} {version} is not among the dependencies"));
    PathBuf::from(manifest)
        .parent()
        .expect("package folder")
        .to_path_buf()
}

/// A file shipped inside dependency package `package` `version`: its name and bytes.
pub fn outside_file(package: &str, version: &str, path: &str) -> (String, Vec<u8>) {
    let file = package_dir(package, version).join(path);
    let bytes = std::fs::read(&file).unwrap_or_else(|e| panic!("{package} {version} {path}: {e}"));
    let name = file
        .file_name()
        .and_then(|n| n.to_str())
        .expect("file name")
        .to_string();
    (name, bytes)
}

//! Helpers shared by the integration tests. PNG files are read and written with the command
//! line's own PNG module (src/cli/png_out.rs, the `png` crate), included here by path: the
//! library itself writes no files.
#![allow(dead_code, unused_imports)] // each test crate uses only some of these helpers

use std::path::PathBuf;

pub mod fixtures;

#[path = "../../src/cli/png_out.rs"]
mod png_out;
pub use png_out::{read_png, write_png};

/// The project's root folder.
pub fn crate_root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

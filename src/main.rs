//! The `twinshade` command line; everything lives in `twinshade::cli`.

#[cfg(not(target_arch = "wasm32"))]
fn main() {
    std::process::exit(twinshade::cli::main());
}

/// The command line does not exist on wasm32; the library is the product there.
#[cfg(target_arch = "wasm32")]
fn main() {}

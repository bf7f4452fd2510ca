//! The `twinshade` command line: a thin layer over the library (argument parsing, files, the
//! static server, building the wasm module); see [`cli`].

#[cfg(not(target_arch = "wasm32"))]
mod cli;

#[cfg(not(target_arch = "wasm32"))]
fn main() {
    std::process::exit(cli::main());
}

/// The command line does not exist on wasm32; the library is the product there.
#[cfg(target_arch = "wasm32")]
fn main() {}

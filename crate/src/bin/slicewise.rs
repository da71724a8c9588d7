//! The `slicewise` command-line tool: JSON reports of scenes on stdout, errors on stderr.

#[cfg(not(target_arch = "wasm32"))]
fn main() {
    std::process::exit(slicewise::cli::run(std::env::args_os()));
}

/// The command line is native only; the wasm build of this binary does nothing.
#[cfg(target_arch = "wasm32")]
fn main() {}

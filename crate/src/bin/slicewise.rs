//! The `slicewise` command-line tool: JSON reports of scenes on stdout, errors on stderr.

fn main() {
    std::process::exit(slicewise::cli::run(std::env::args_os()));
}

//! Project chores: `cargo xtask build | serve | dist | test | bench`, one file per task.

mod bench;
mod build;
mod dist;
mod prereq;
mod serve;
mod test;
mod util;

use std::process::ExitCode;

const USAGE: &str = "usage: cargo xtask <task> [options]

tasks:
  build              wasm32 release build + bindings into www/pkg (installs what is missing)
  serve [--port N]   build, then serve www/ on http://127.0.0.1:N/ (default 8000)
        [--no-build] [--root DIR]
  dist               build, then dist/ for any static host and dist/slicewise.html (self-contained)
  test               every test: native, wasm in headless Chromium, end-to-end page tests
  bench              print speed and size figures";

fn main() -> ExitCode {
    let args: Vec<String> = std::env::args().skip(1).collect();
    let Some(task) = args.first() else {
        eprintln!("{USAGE}");
        return ExitCode::from(2);
    };
    let rest = &args[1..];
    let result = match task.as_str() {
        "build" => build::run(),
        "serve" => serve::run(rest),
        "dist" => dist::run(),
        "test" => test::run(rest),
        "bench" => bench::run(rest),
        "-h" | "--help" | "help" => {
            println!("{USAGE}");
            Ok(())
        }
        other => Err(format!("unknown task '{other}'\n{USAGE}")),
    };
    match result {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("xtask: {e}");
            ExitCode::FAILURE
        }
    }
}

//! `cargo xtask test`: every test — native (unit, integration, doc), the wasm build's tests in
//! headless Chromium (wasm-bindgen-test), and the end-to-end page suite (Node + playwright-core
//! driving Debian's Chromium). Installs what is missing first.

use std::path::PathBuf;
use std::process::Command;

use crate::prereq;
use crate::util::{cargo, exec, root};

struct Parts {
    native: bool,
    wasm: bool,
    e2e: bool,
}

fn parse(args: &[String]) -> Result<Parts, String> {
    let mut p = Parts {
        native: true,
        wasm: true,
        e2e: true,
    };
    let mut it = args.iter();
    while let Some(a) = it.next() {
        match a.as_str() {
            "--only" => {
                let which = it.next().ok_or("--only needs native, wasm or e2e")?;
                p = Parts {
                    native: which == "native",
                    wasm: which == "wasm",
                    e2e: which == "e2e",
                };
                if !(p.native || p.wasm || p.e2e) {
                    return Err(format!("--only {which}: use native, wasm or e2e"));
                }
            }
            other => {
                return Err(format!(
                    "test: unknown option '{other}' (use --only native|wasm|e2e)"
                ))
            }
        }
    }
    Ok(p)
}

/// Everything the end-to-end suite needs: a fresh dist, the CLI binary, a server, Chromium.
pub(crate) struct E2eEnv {
    pub(crate) url: String,
    pub(crate) vars: Vec<(String, String)>,
}

pub(crate) fn e2e_env() -> Result<E2eEnv, String> {
    let (chromium, _) = prereq::chromium()?;
    prereq::node_packages()?;
    let single = crate::dist::run_dist()?;
    exec(cargo().args([
        "build",
        "--release",
        "--package",
        "slicewise",
        "--bin",
        "slicewise",
    ]))?;
    let addr = crate::serve::start(root().join("www"), 0, true)?;
    let url = format!("http://{addr}/");
    let artefacts = root().join("tests/artefacts");
    std::fs::create_dir_all(&artefacts).map_err(|e| e.to_string())?;
    let vars = vec![
        ("SLICEWISE_URL".to_owned(), url.clone()),
        (
            "SLICEWISE_STANDALONE".to_owned(),
            single.display().to_string(),
        ),
        (
            "SLICEWISE_CLI".to_owned(),
            root()
                .join("target/release/slicewise")
                .display()
                .to_string(),
        ),
        (
            "SLICEWISE_CHROMIUM".to_owned(),
            chromium.display().to_string(),
        ),
        (
            "SLICEWISE_ARTEFACTS".to_owned(),
            artefacts.display().to_string(),
        ),
        ("SLICEWISE_ROOT".to_owned(), root().display().to_string()),
    ];
    Ok(E2eEnv { url, vars })
}

pub(crate) fn run(args: &[String]) -> Result<(), String> {
    let parts = parse(args)?;
    if parts.native {
        exec(cargo().args(["test", "--workspace"]))?;
    }
    if parts.wasm {
        prereq::wasm_target()?;
        let runner: PathBuf = prereq::wasm_bindgen_tool("wasm-bindgen-test-runner")?;
        let (_, driver) = prereq::chromium()?;
        exec(
            cargo()
                .args([
                    "test",
                    "--package",
                    "slicewise",
                    "--target",
                    "wasm32-unknown-unknown",
                    "--test",
                    "wasm_browser",
                ])
                .env("CARGO_TARGET_WASM32_UNKNOWN_UNKNOWN_RUNNER", &runner)
                .env("CHROMEDRIVER", &driver)
                .env("WASM_BINDGEN_TEST_TIMEOUT", "600"),
        )?;
    }
    if parts.e2e {
        let env = e2e_env()?;
        eprintln!("xtask: page served at {}", env.url);
        let mut node = Command::new("node");
        node.current_dir(root().join("tests"))
            .args(["--test", "--test-concurrency=1", "e2e/"]);
        for (k, v) in &env.vars {
            node.env(k, v);
        }
        exec(&mut node)?;
        eprintln!("xtask: screenshots and figures in tests/artefacts/");
    }
    eprintln!("xtask: all tests passed");
    Ok(())
}

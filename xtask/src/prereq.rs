//! Installing what the build and the tests need, when it is missing: the wasm32 target, the
//! wasm-bindgen CLI pinned to the crate's exact version, Chromium and ChromeDriver (Debian
//! packages, when run as root), and the end-to-end suite's npm packages.

use std::path::PathBuf;
use std::process::Command;

use crate::util::{cargo, exec, output, root};

/// Make sure the wasm32-unknown-unknown target is installed.
pub(crate) fn wasm_target() -> Result<(), String> {
    let installed =
        output(Command::new("rustup").args(["target", "list", "--installed"])).unwrap_or_default();
    if installed
        .lines()
        .any(|l| l.trim() == "wasm32-unknown-unknown")
    {
        return Ok(());
    }
    exec(Command::new("rustup").args(["target", "add", "wasm32-unknown-unknown"])).map_err(|e| {
        format!("{e}\nInstall the target with: rustup target add wasm32-unknown-unknown")
    })
}

/// The wasm-bindgen version in Cargo.lock (the CLI must match it exactly).
pub(crate) fn pinned_wasm_bindgen() -> Result<String, String> {
    let lock = std::fs::read_to_string(root().join("Cargo.lock"))
        .map_err(|e| format!("cannot read Cargo.lock: {e}"))?;
    let mut lines = lock.lines();
    while let Some(l) = lines.next() {
        if l.trim() == "name = \"wasm-bindgen\"" {
            if let Some(v) = lines
                .next()
                .and_then(|v| v.trim().strip_prefix("version = \""))
            {
                return Ok(v.trim_end_matches('"').to_owned());
            }
        }
    }
    Err("Cargo.lock names no wasm-bindgen version".into())
}

fn cargo_bin_dir() -> PathBuf {
    std::env::var_os("CARGO_HOME")
        .map(PathBuf::from)
        .or_else(|| std::env::var_os("HOME").map(|h| PathBuf::from(h).join(".cargo")))
        .unwrap_or_else(|| PathBuf::from(".cargo"))
        .join("bin")
}

fn tool_version(path: &PathBuf) -> Option<String> {
    output(Command::new(path).arg("--version"))
        .map(|s| s.split_whitespace().nth(1).unwrap_or("").to_owned())
}

/// Path of a wasm-bindgen CLI tool (`wasm-bindgen` or `wasm-bindgen-test-runner`) at the pinned
/// version, installing wasm-bindgen-cli with cargo when it is missing or differs.
pub(crate) fn wasm_bindgen_tool(name: &str) -> Result<PathBuf, String> {
    let want = pinned_wasm_bindgen()?;
    let candidates = [cargo_bin_dir().join(name), PathBuf::from(name)];
    for c in &candidates {
        if tool_version(c).as_deref() == Some(want.as_str()) {
            return Ok(c.clone());
        }
    }
    eprintln!("xtask: installing wasm-bindgen-cli {want} (matches the crate's wasm-bindgen; takes a few minutes once)");
    exec(cargo().args(["install", "wasm-bindgen-cli", "--version", &want])).map_err(|e| {
        format!("{e}\nInstall it with: cargo install wasm-bindgen-cli --version {want}")
    })?;
    let p = cargo_bin_dir().join(name);
    match tool_version(&p) {
        Some(v) if v == want => Ok(p),
        other => Err(format!(
            "{} reports version {other:?}, expected {want}",
            p.display()
        )),
    }
}

fn is_root() -> bool {
    output(Command::new("id").arg("-u"))
        .map(|s| s.trim() == "0")
        .unwrap_or(false)
}

/// Paths of Chromium and ChromeDriver, installing Debian's packages when run as root.
pub(crate) fn chromium() -> Result<(PathBuf, PathBuf), String> {
    let find = |names: &[&str]| -> Option<PathBuf> {
        names
            .iter()
            .map(PathBuf::from)
            .find(|p| p.exists())
            .or_else(|| {
                names.iter().find_map(|n| {
                    output(Command::new("which").arg(n)).map(|s| PathBuf::from(s.trim()))
                })
            })
    };
    let browser_names = ["/usr/bin/chromium", "/usr/bin/chromium-browser"];
    let driver_names = ["/usr/bin/chromedriver"];
    if let (Some(b), Some(d)) = (find(&browser_names), find(&driver_names)) {
        return Ok((b, d));
    }
    if !is_root() {
        return Err("Chromium and ChromeDriver are needed for the browser tests. Install them, e.g. on Debian: \
                    sudo apt-get install chromium chromium-driver"
            .into());
    }
    eprintln!("xtask: installing Chromium and ChromeDriver from Debian's packages");
    exec(Command::new("apt-get").arg("update"))?;
    exec(
        Command::new("apt-get")
            .args([
                "install",
                "-y",
                "--no-install-recommends",
                "chromium",
                "chromium-driver",
            ])
            .env("DEBIAN_FRONTEND", "noninteractive"),
    )?;
    match (find(&browser_names), find(&driver_names)) {
        (Some(b), Some(d)) => Ok((b, d)),
        _ => Err("apt-get finished but chromium or chromedriver is still missing".into()),
    }
}

/// Install the end-to-end suite's npm packages (playwright-core, pinned in tests/package.json).
pub(crate) fn node_packages() -> Result<(), String> {
    let dir = root().join("tests");
    if dir
        .join("node_modules/playwright-core/package.json")
        .exists()
    {
        return Ok(());
    }
    if output(Command::new("node").arg("--version")).is_none() {
        return Err("Node.js (18 or newer) is needed for the end-to-end tests; on Debian: sudo apt-get install nodejs npm".into());
    }
    let mut npm = Command::new("npm");
    npm.current_dir(&dir)
        .args(["ci", "--no-audit", "--no-fund"]);
    exec(&mut npm)
}

//! `cargo xtask bench`: speed and size figures, printed (never asserted): the geometry core
//! natively, the page's per-update cost in headless Chromium, and gzipped sizes.

use std::process::Command;

use crate::util::{cargo, exec, gzip_len, output, root};

fn kb(n: usize) -> String {
    format!("{:.1} KB", n as f64 / 1024.0)
}

pub(crate) fn run(args: &[String]) -> Result<(), String> {
    if let Some(a) = args.first() {
        return Err(format!("bench: unknown option '{a}'"));
    }
    println!("== native (release) ==");
    let examples_dir = root().join("crate/examples");
    let mut examples: Vec<String> = std::fs::read_dir(&examples_dir)
        .map(|d| {
            d.flatten()
                .filter_map(|e| {
                    e.file_name()
                        .to_str()
                        .and_then(|n| n.strip_prefix("bench_"))
                        .map(|n| format!("bench_{n}"))
                })
                .map(|n| n.trim_end_matches(".rs").to_owned())
                .collect()
        })
        .unwrap_or_default();
    examples.sort();
    let mut native_echo = String::new();
    for ex in &examples {
        exec(cargo().args([
            "build",
            "--quiet",
            "--release",
            "--package",
            "slicewise",
            "--example",
            ex,
        ]))?;
        let out = output(cargo().args([
            "run",
            "--quiet",
            "--release",
            "--package",
            "slicewise",
            "--example",
            ex,
        ]))
        .ok_or_else(|| format!("the {ex} benchmark failed"))?;
        for line in out.lines() {
            // A machine-readable line for the wasm/native ratio; the rest is for people.
            match line.strip_prefix("NATIVE_ECHO_MS ") {
                Some(json) => native_echo = json.trim().to_owned(),
                None => println!("{line}"),
            }
        }
    }

    println!("\n== page in headless Chromium ==");
    let env = crate::test::e2e_env()?;
    let mut node = Command::new("node");
    node.current_dir(root().join("tests")).arg("e2e/perf.mjs");
    for (k, v) in &env.vars {
        node.env(k, v);
    }
    node.env("SLICEWISE_NATIVE_ECHO_MS", &native_echo);
    exec(&mut node)?;

    println!("\n== sizes (gzip -9) ==");
    let www = root().join("www");
    let wasm = std::fs::read(www.join("pkg/slicewise_bg.wasm")).map_err(|e| e.to_string())?;
    println!(
        "wasm: {} raw, {} gzipped",
        kb(wasm.len()),
        kb(gzip_len(&wasm))
    );
    let mut total_raw = 0;
    let mut total_gz = 0;
    let mut stack = vec![www.clone()];
    while let Some(dir) = stack.pop() {
        for e in std::fs::read_dir(&dir)
            .map_err(|e| e.to_string())?
            .flatten()
        {
            let p = e.path();
            if p.is_dir() {
                stack.push(p);
            } else {
                let bytes = std::fs::read(&p).map_err(|e| e.to_string())?;
                total_raw += bytes.len();
                total_gz += gzip_len(&bytes);
            }
        }
    }
    println!(
        "whole page (www/, each file gzipped): {} raw, {} gzipped (target ≤ 300 KB)",
        kb(total_raw),
        kb(total_gz)
    );
    let single = std::fs::read(root().join("dist/slicewise.html")).map_err(|e| e.to_string())?;
    println!(
        "dist/slicewise.html (self-contained): {} raw, {} gzipped",
        kb(single.len()),
        kb(gzip_len(&single))
    );
    Ok(())
}

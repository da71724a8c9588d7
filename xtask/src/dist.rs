//! `cargo xtask dist`: `dist/` for any static host, and `dist/slicewise.html`, one
//! self-contained file (styles inlined, every ES module as a data: URL behind an import map,
//! the wasm as base64) that works from file:// with no network.

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

use crate::util::{base64, root};

fn copy_dir(from: &Path, to: &Path) -> Result<(), String> {
    std::fs::create_dir_all(to).map_err(|e| format!("cannot create {}: {e}", to.display()))?;
    for entry in std::fs::read_dir(from)
        .map_err(|e| format!("cannot read {}: {e}", from.display()))?
        .flatten()
    {
        let p = entry.path();
        let dest = to.join(entry.file_name());
        if p.is_dir() {
            copy_dir(&p, &dest)?;
        } else {
            std::fs::copy(&p, &dest).map_err(|e| format!("cannot copy {}: {e}", p.display()))?;
        }
    }
    Ok(())
}

/// Every .js file under `dir`, keyed by its path relative to `base` with forward slashes.
fn modules(base: &Path, dir: &Path, out: &mut BTreeMap<String, String>) -> Result<(), String> {
    for entry in std::fs::read_dir(dir)
        .map_err(|e| format!("cannot read {}: {e}", dir.display()))?
        .flatten()
    {
        let p = entry.path();
        if p.is_dir() {
            modules(base, &p, out)?;
        } else if p.extension().is_some_and(|e| e == "js") {
            let key = p
                .strip_prefix(base)
                .map_err(|e| e.to_string())?
                .to_string_lossy()
                .replace('\\', "/");
            let text = std::fs::read_to_string(&p)
                .map_err(|e| format!("cannot read {}: {e}", p.display()))?;
            out.insert(key, text);
        }
    }
    Ok(())
}

/// Resolve a relative specifier against the importing module's key ("js/a.js" + "../pkg/b.js").
fn resolve_key(from: &str, spec: &str) -> String {
    let mut parts: Vec<&str> = from.split('/').collect();
    parts.pop();
    for seg in spec.split('/') {
        match seg {
            "." | "" => {}
            ".." => {
                parts.pop();
            }
            s => parts.push(s),
        }
    }
    parts.join("/")
}

/// The bare specifier a module gets in the import map.
fn bare(key: &str) -> String {
    format!("@slicewise/{key}")
}

/// Rewrite `from "./x.js"`, `import "./x.js"` and `import("./x.js")` to bare specifiers.
pub(crate) fn rewrite_imports(key: &str, src: &str) -> String {
    let mut out = String::with_capacity(src.len());
    let mut rest = src;
    let markers = [
        "from \"",
        "from '",
        "import \"",
        "import '",
        "import(\"",
        "import('",
    ];
    loop {
        let next = markers
            .iter()
            .filter_map(|m| rest.find(m).map(|i| (i, *m)))
            .min_by_key(|(i, _)| *i);
        let Some((i, m)) = next else {
            out.push_str(rest);
            break;
        };
        let quote = m.chars().last().unwrap_or('"');
        let start = i + m.len();
        out.push_str(&rest[..start]);
        let Some(len) = rest[start..].find(quote) else {
            out.push_str(&rest[start..]);
            break;
        };
        let spec = &rest[start..start + len];
        if spec.starts_with("./") || spec.starts_with("../") {
            out.push_str(&bare(&resolve_key(key, spec)));
        } else {
            out.push_str(spec);
        }
        rest = &rest[start + len..];
    }
    out
}

/// Inline `<link rel="stylesheet" href="...">` tags as `<style>` blocks.
fn inline_styles(html: &str, www: &Path) -> Result<String, String> {
    let mut out = String::new();
    let mut rest = html;
    while let Some(i) = rest.find("<link") {
        let Some(end) = rest[i..].find('>') else {
            break;
        };
        let tag = &rest[i..i + end + 1];
        out.push_str(&rest[..i]);
        let href = tag
            .split("href=\"")
            .nth(1)
            .and_then(|h| h.split('"').next());
        match href {
            Some(h) if tag.contains("stylesheet") => {
                let css = std::fs::read_to_string(www.join(h))
                    .map_err(|e| format!("cannot read {h}: {e}"))?;
                out.push_str(&format!(
                    "<style>\n{}\n</style>",
                    css.replace("</style", "<\\/style")
                ));
            }
            _ => out.push_str(tag),
        }
        rest = &rest[i + end + 1..];
    }
    out.push_str(rest);
    Ok(out)
}

/// Build the single-file page from www/ (after `build`).
pub(crate) fn standalone_html(www: &Path) -> Result<String, String> {
    let html = std::fs::read_to_string(www.join("index.html"))
        .map_err(|e| format!("cannot read index.html: {e}"))?;
    let html = inline_styles(&html, www)?;
    let mut mods = BTreeMap::new();
    modules(www, www, &mut mods)?;
    let mut imports = Vec::new();
    for (key, src) in &mods {
        let data = format!(
            "data:text/javascript;base64,{}",
            base64(rewrite_imports(key, src).as_bytes())
        );
        imports.push(format!("\"{}\": \"{}\"", bare(key), data));
    }
    let wasm = std::fs::read(www.join("pkg/slicewise_bg.wasm"))
        .map_err(|e| format!("cannot read the wasm (run build): {e}"))?;
    let head = format!(
        "<script type=\"importmap\">{{\"imports\": {{{}}}}}</script>\n<script>globalThis.SLICEWISE_WASM_BASE64 = \"{}\";</script>\n",
        imports.join(",\n"),
        base64(&wasm)
    );
    // Replace the entry <script type="module" src="js/main.js"></script> with a bare import.
    let marker = "<script type=\"module\" src=\"";
    let i = html
        .find(marker)
        .ok_or("index.html has no <script type=\"module\" src=\"...\"> entry")?;
    let src_start = i + marker.len();
    let src_len = html[src_start..]
        .find('"')
        .ok_or("unterminated script src")?;
    let entry = &html[src_start..src_start + src_len];
    let close = html[src_start..]
        .find("</script>")
        .ok_or("unterminated entry script")?
        + src_start
        + "</script>".len();
    let entry_key = resolve_key("index.html", entry);
    Ok(format!(
        "{}{head}<script type=\"module\">import \"{}\";</script>{}",
        &html[..i],
        bare(&entry_key),
        &html[close..]
    ))
}

pub(crate) fn run_dist() -> Result<PathBuf, String> {
    crate::build::run_build()?;
    let www = root().join("www");
    let dist = root().join("dist");
    let _ = std::fs::remove_dir_all(&dist);
    copy_dir(&www, &dist)?;
    let page = standalone_html(&www)?;
    let single = dist.join("slicewise.html");
    std::fs::write(&single, page).map_err(|e| format!("cannot write {}: {e}", single.display()))?;
    eprintln!("xtask: wrote dist/ and {}", single.display());
    Ok(single)
}

pub(crate) fn run() -> Result<(), String> {
    run_dist().map(|_| ())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn imports_become_bare_specifiers() {
        let src = "import init, * as api from \"../pkg/slicewise.js\";\nimport { a } from './draw.js';\nconst m = await import(\"./late.js\");\nimport \"./side.js\";\n";
        let out = rewrite_imports("js/wasm.js", src);
        assert!(out.contains("from \"@slicewise/pkg/slicewise.js\""));
        assert!(out.contains("from '@slicewise/js/draw.js'"));
        assert!(out.contains("import(\"@slicewise/js/late.js\")"));
        assert!(out.contains("import \"@slicewise/js/side.js\""));
    }
}

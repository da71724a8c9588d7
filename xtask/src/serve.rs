//! `cargo xtask serve`: a small static file server on the loopback interface. GET and HEAD only,
//! correct MIME types (wasm as application/wasm), nothing outside its root.

use std::io::{BufRead, BufReader, Write};
use std::net::{SocketAddr, TcpListener, TcpStream};
use std::path::{Component, Path, PathBuf};

use crate::util::root;

/// MIME type by file extension.
pub(crate) fn mime(path: &Path) -> &'static str {
    match path
        .extension()
        .and_then(|e| e.to_str())
        .map(str::to_ascii_lowercase)
        .as_deref()
    {
        Some("html") | Some("htm") => "text/html; charset=utf-8",
        Some("js") | Some("mjs") => "text/javascript; charset=utf-8",
        Some("css") => "text/css; charset=utf-8",
        Some("wasm") => "application/wasm",
        Some("json") => "application/json",
        Some("png") => "image/png",
        Some("svg") => "image/svg+xml",
        Some("ico") => "image/x-icon",
        Some("txt") | Some("md") => "text/plain; charset=utf-8",
        _ => "application/octet-stream",
    }
}

/// Map a request target to a file under `base`, or None when it would leave `base`.
pub(crate) fn resolve(base: &Path, target: &str) -> Option<PathBuf> {
    let path = target.split(['?', '#']).next().unwrap_or("");
    let decoded = percent_decode(path)?;
    if !decoded.starts_with('/') || decoded.contains('\0') || decoded.contains('\\') {
        return None;
    }
    let mut out = base.to_path_buf();
    for comp in Path::new(decoded.trim_start_matches('/')).components() {
        match comp {
            Component::Normal(c) => out.push(c),
            Component::CurDir => {}
            _ => return None, // "..", a root or a prefix: refuse
        }
    }
    if decoded.ends_with('/') || out.is_dir() {
        out.push("index.html");
    }
    // Symlinks may still point outside: compare canonical paths.
    let canon_base = base.canonicalize().ok()?;
    match out.canonicalize() {
        Ok(c) if c.starts_with(&canon_base) => Some(c),
        Ok(_) => None,
        Err(_) => Some(out), // missing file: a 404, still inside
    }
}

fn percent_decode(s: &str) -> Option<String> {
    let bytes = s.as_bytes();
    let mut out = Vec::with_capacity(bytes.len());
    let mut i = 0;
    while i < bytes.len() {
        if bytes[i] == b'%' {
            let hex = std::str::from_utf8(bytes.get(i + 1..i + 3)?).ok()?;
            out.push(u8::from_str_radix(hex, 16).ok()?);
            i += 3;
        } else {
            out.push(bytes[i]);
            i += 1;
        }
    }
    String::from_utf8(out).ok()
}

fn respond(stream: &mut TcpStream, status: &str, ctype: &str, body: &[u8], head_only: bool) {
    let header = format!(
        "HTTP/1.1 {status}\r\nContent-Type: {ctype}\r\nContent-Length: {}\r\nCache-Control: no-store\r\n\
         X-Content-Type-Options: nosniff\r\nConnection: close\r\n\r\n",
        body.len()
    );
    let _ = stream.write_all(header.as_bytes());
    if !head_only {
        let _ = stream.write_all(body);
    }
}

fn handle(mut stream: TcpStream, base: &Path, quiet: bool) {
    let mut line = String::new();
    let mut reader = BufReader::new(match stream.try_clone() {
        Ok(s) => s,
        Err(_) => return,
    });
    if reader.read_line(&mut line).is_err() {
        return;
    }
    // Drain the headers.
    let mut h = String::new();
    while reader.read_line(&mut h).map(|n| n > 2).unwrap_or(false) {
        h.clear();
    }
    let mut parts = line.split_whitespace();
    let (method, target) = (parts.next().unwrap_or(""), parts.next().unwrap_or(""));
    let head_only = method == "HEAD";
    if method != "GET" && !head_only {
        return respond(
            &mut stream,
            "405 Method Not Allowed",
            "text/plain",
            b"only GET and HEAD\n",
            false,
        );
    }
    let Some(path) = resolve(base, target) else {
        if !quiet {
            eprintln!("403 {target}");
        }
        return respond(
            &mut stream,
            "403 Forbidden",
            "text/plain",
            b"outside the served folder\n",
            head_only,
        );
    };
    match std::fs::read(&path) {
        Ok(body) => respond(&mut stream, "200 OK", mime(&path), &body, head_only),
        Err(_) => {
            if !quiet {
                eprintln!("404 {target}");
            }
            respond(
                &mut stream,
                "404 Not Found",
                "text/plain",
                b"not found\n",
                head_only,
            )
        }
    }
}

/// Start serving `base` on 127.0.0.1:`port` (0 = any free port) in background threads.
pub(crate) fn start(base: PathBuf, port: u16, quiet: bool) -> Result<SocketAddr, String> {
    let listener = TcpListener::bind(("127.0.0.1", port))
        .map_err(|e| format!("cannot listen on 127.0.0.1:{port}: {e}"))?;
    let addr = listener.local_addr().map_err(|e| e.to_string())?;
    std::thread::spawn(move || {
        for stream in listener.incoming().flatten() {
            let base = base.clone();
            std::thread::spawn(move || handle(stream, &base, quiet));
        }
    });
    Ok(addr)
}

pub(crate) fn run(args: &[String]) -> Result<(), String> {
    let mut port = 8000u16;
    let mut build = true;
    let mut base = root().join("www");
    let mut it = args.iter();
    while let Some(a) = it.next() {
        match a.as_str() {
            "--port" => {
                port = it
                    .next()
                    .and_then(|p| p.parse().ok())
                    .ok_or("--port needs a number from 1 to 65535")?;
            }
            "--no-build" => build = false,
            "--root" => base = PathBuf::from(it.next().ok_or("--root needs a folder")?),
            other => {
                return Err(format!(
                    "serve: unknown option '{other}' (use --port N, --no-build, --root DIR)"
                ))
            }
        }
    }
    if build {
        crate::build::run_build()?;
    }
    if !base.join("index.html").exists() {
        return Err(format!("{} has no index.html", base.display()));
    }
    let addr = start(base, port, false)?;
    println!("Slicewise is at http://{addr}/  (Ctrl-C to stop)");
    loop {
        std::thread::park();
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn refuses_paths_outside_the_root() {
        let base = root().join("www");
        for bad in [
            "/../Cargo.toml",
            "/%2e%2e/Cargo.toml",
            "/js/../../Cargo.toml",
            "//etc/passwd",
            "/a\\..\\b",
            "/%00",
        ] {
            let r = resolve(&base, bad);
            assert!(
                r.as_ref()
                    .is_none_or(|p| p.starts_with(base.canonicalize().unwrap())),
                "{bad} → {r:?}"
            );
            assert!(r.is_none() || bad == "//etc/passwd", "{bad} → {r:?}");
        }
        assert_eq!(
            resolve(&base, "/").unwrap().file_name().unwrap(),
            "index.html"
        );
    }

    #[test]
    fn wasm_and_modules_have_the_right_types() {
        assert_eq!(mime(Path::new("a.wasm")), "application/wasm");
        assert_eq!(mime(Path::new("a.js")), "text/javascript; charset=utf-8");
        assert_eq!(mime(Path::new("a.CSS")), "text/css; charset=utf-8");
    }
}

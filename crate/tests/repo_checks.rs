//! Repository checks that plain `cargo test` enforces: the README's opening and commands, the
//! caution on the page and in the README, a `//!` line on every source file, an offline page.

use std::path::{Path, PathBuf};

fn root() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("..")
}

fn files_under(dir: &Path, ext: &str, out: &mut Vec<PathBuf>) {
    for e in std::fs::read_dir(dir).unwrap().flatten() {
        let p = e.path();
        if p.is_dir() {
            if p.file_name()
                .is_some_and(|n| n == "pkg" || n == "node_modules")
            {
                continue;
            }
            files_under(&p, ext, out);
        } else if p.extension().is_some_and(|x| x == ext) {
            out.push(p);
        }
    }
}

#[test]
fn readme_opens_with_the_job_then_the_two_commands() {
    let readme = std::fs::read_to_string(root().join("README.md")).unwrap();
    let mut blocks = readme
        .split("\n\n")
        .map(str::trim)
        .filter(|b| !b.is_empty());
    assert!(blocks.next().unwrap().starts_with("# Slicewise"));
    let job = blocks.next().unwrap();
    assert!(
        job.len() > 300 && !job.starts_with('`'),
        "a paragraph stating the job comes first"
    );
    let commands = blocks.next().unwrap();
    assert!(
        commands.contains("cargo xtask serve") && commands.contains("cargo xtask test"),
        "then the two commands"
    );
    let ci = std::fs::read_to_string(root().join(".ci/run")).unwrap();
    assert!(
        ci.lines().any(|l| l.trim() == "cargo xtask test"),
        ".ci/run calls the README's test command"
    );
}

#[test]
fn the_caution_is_in_the_readme_and_on_the_page() {
    let readme = std::fs::read_to_string(root().join("README.md")).unwrap();
    assert!(
        readme.contains("not a guide for a real\n> needle")
            || readme.contains("not a guide for a real needle")
    );
    let page = std::fs::read_to_string(root().join("www/index.html")).unwrap();
    assert!(page.contains("Not a guide for a real needle"));
    assert!(page.contains("supervised practice"));
}

#[test]
fn every_source_file_opens_with_a_doc_line() {
    let mut files = Vec::new();
    files_under(&root().join("crate/src"), "rs", &mut files);
    files_under(&root().join("xtask/src"), "rs", &mut files);
    assert!(files.len() > 30);
    for f in files {
        let text = std::fs::read_to_string(&f).unwrap();
        assert!(
            text.starts_with("//!"),
            "{} must open with a //! line",
            f.display()
        );
    }
}

#[test]
fn the_page_loads_nothing_from_other_hosts() {
    let mut files = Vec::new();
    files_under(&root().join("www"), "js", &mut files);
    files_under(&root().join("www"), "html", &mut files);
    files_under(&root().join("www"), "css", &mut files);
    for f in files {
        let text = std::fs::read_to_string(&f).unwrap();
        for pat in [
            "src=\"http",
            "href=\"http",
            "url(http",
            "from \"http",
            "fetch(\"http",
            "import(\"http",
        ] {
            assert!(
                !text.contains(pat),
                "{} refers to another host ({pat})",
                f.display()
            );
        }
    }
}

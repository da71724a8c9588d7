//! The `slicewise` command line: JSON for every demo scene, one-line errors, no panics.

mod common;

use common::run_cli as run;

fn demo_paths() -> Vec<String> {
    let mut v: Vec<String> =
        std::fs::read_dir(concat!(env!("CARGO_MANIFEST_DIR"), "/../scenes-demo"))
            .unwrap()
            .flatten()
            .map(|e| format!("scenes-demo/{}", e.file_name().to_string_lossy()))
            .filter(|p| p.ends_with(".scene.json"))
            .collect();
    v.sort();
    v
}

#[test]
fn section_prints_the_design_report_for_every_demo() {
    for p in demo_paths() {
        let (code, out, err) = run(&["section", &p]);
        assert_eq!(code, 0, "{p}: {err}");
        let v: serde_json::Value = serde_json::from_str(&out).unwrap();
        let n = &v["needle"];
        for key in [
            "signature",
            "tip_in_slab",
            "tip_offset_mm",
            "hidden_length_mm",
            "extent_mm",
            "in_slab_mm",
            "apparent_tip",
            "true_tip",
        ] {
            assert!(n.get(key).is_some(), "{p}: needle.{key} missing");
        }
        for key in ["lateral_mm", "depth_mm", "elevation_mm"] {
            assert!(n["true_tip"][key].is_number());
        }
        let sig = n["signature"].as_str().unwrap();
        assert!([
            "none",
            "shaft-dot",
            "tip-double-dot",
            "line-without-tip",
            "line-with-tip"
        ]
        .contains(&sig));
        for s in v["structures"].as_array().unwrap() {
            assert!(s["id"].is_string() && s["kind"].is_string());
            if !s["section"].is_null() {
                assert_eq!(s["section"]["semi_axes_mm"].as_array().unwrap().len(), 2);
            }
        }
    }
}

/// `--set` gives the same report as editing the file (the page tests rely on this).
#[test]
fn set_overrides_a_field() {
    let (code, out, _) = run(&[
        "section",
        "scenes-demo/shaft-dot-past-nerve.scene.json",
        "--set",
        "probe.pose.tilt_deg=12",
    ]);
    assert_eq!(code, 0);
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_ne!(v["needle"]["signature"], "shaft-dot");
    let (code, _, err) = run(&[
        "section",
        "scenes-demo/shaft-dot-past-nerve.scene.json",
        "--set",
        "probe.pose.tilt_deg=99",
    ]);
    assert_eq!(code, 1);
    assert_eq!(
        err,
        "slicewise: --set: probe.pose.tilt_deg: must be a number from -60 to 60 degrees, got 99\n"
    );
}

/// T(v) from `slicewise beam` equals the focused formula at the focus (0.886·λF/H).
#[test]
fn beam_prints_the_profile() {
    let (code, out, err) = run(&[
        "beam",
        "--frequency-mhz",
        "7.5",
        "--aperture-mm",
        "5",
        "--focus-mm",
        "20",
        "--depth-mm",
        "40",
    ]);
    assert_eq!(code, 0, "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    let rows = v["rows"].as_array().unwrap();
    assert_eq!(rows.len(), 41);
    let at20 = rows.iter().find(|r| r["depth_mm"] == 20.0).unwrap();
    assert!((at20["thickness_mm"].as_f64().unwrap() - 0.886 * 0.2053333 * 4.0).abs() < 1e-4);
}

/// `capture` and `walk` print the shapes the issue fixes, and agree with each other.
#[test]
fn capture_and_walk_print_their_reports() {
    let (code, out, err) = run(&["capture", "scenes-demo/shaft-dot-past-nerve.scene.json"]);
    assert_eq!(code, 0, "{err}");
    let c: serde_json::Value = serde_json::from_str(&out).unwrap();
    let centre = c["tilt"]["centre_deg"].as_f64().unwrap();
    let w = c["tilt"]["window_deg"].as_array().unwrap();
    assert!(w[0].as_f64().unwrap() <= centre && centre <= w[1].as_f64().unwrap());
    assert!(c["slide"]["window_mm"].is_array());
    assert!(c["reason"].is_null());
    // Tilting to the reported centre shows the tip.
    let (_, out, _) = run(&[
        "section",
        "scenes-demo/shaft-dot-past-nerve.scene.json",
        "--set",
        &format!("probe.pose.tilt_deg={centre}"),
    ]);
    let s: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(s["needle"]["tip_in_slab"], true);
    assert!(s["needle"]["tip_offset_mm"].as_f64().unwrap().abs() < 1e-9);

    let (code, out, err) = run(&[
        "walk",
        "scenes-demo/shaft-dot-past-nerve.scene.json",
        "--from-mm",
        "14",
        "--to-mm",
        "21",
        "--step-mm",
        "0.5",
    ]);
    assert_eq!(code, 0, "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    let steps = v["steps"].as_array().unwrap();
    assert_eq!(steps.len(), 15);
    let last = steps.last().unwrap();
    assert_eq!(last["inserted_mm"], 21.0);
    assert!(
        (last["tilt_centre_deg"].as_f64().unwrap() - centre).abs() < 1e-9,
        "the last step is the scene itself"
    );
    assert!(v["retilts"].is_u64() && v["blind_advance_mm"].is_f64());

    let (code, _, err) = run(&[
        "walk",
        "scenes-demo/shaft-dot-past-nerve.scene.json",
        "--from-mm",
        "14",
        "--to-mm",
        "21",
        "--step-mm",
        "0",
    ]);
    assert_eq!(code, 1);
    assert_eq!(
        err.trim_end(),
        "slicewise: --step-mm: must be a number from 0.01 to 50 mm, got 0"
    );
    let (code, out, _) = run(&[
        "capture",
        "scenes-demo/shaft-dot-past-nerve.scene.json",
        "--set",
        "needle.inserted_mm=0",
    ]);
    assert_eq!(code, 0);
    assert!(out.contains("not inserted"));
}

#[test]
fn errors_are_one_line_with_nonzero_exit_and_never_a_panic() {
    let cases: Vec<(Vec<&str>, i32, &str)> = vec![
        (vec!["section", "no/such.scene.json"], 1, "slicewise: cannot read no/such.scene.json: No such file or directory (os error 2)"),
        (vec!["section", "Cargo.toml"], 1, "slicewise: Cargo.toml: not valid JSON: expected value at line 1 column 2"),
        (vec!["beam", "--frequency-mhz", "0", "--aperture-mm", "5", "--focus-mm", "20", "--depth-mm", "40"], 1, "slicewise: --frequency-mhz: must be a number from 1 to 30 MHz, got 0"),
        (vec!["beam", "--frequency-mhz", "NaN", "--aperture-mm", "5", "--focus-mm", "20", "--depth-mm", "40"], 1, "slicewise: --frequency-mhz: must be a number from 1 to 30 MHz, got NaN"),
        (vec!["beam", "--frequency-mhz", "ten"], 2, "slicewise: invalid value 'ten' for '--frequency-mhz <FREQUENCY_MHZ>': invalid float literal (see slicewise --help)"),
        (vec!["frobnicate"], 2, "slicewise: unrecognized subcommand 'frobnicate' (see slicewise --help)"),
        (vec!["section", "scenes-demo/forearm-out-of-plane.scene.json", "--set", "tilt"], 1, "slicewise: --set tilt: expected PATH=VALUE, e.g. probe.pose.tilt_deg=4.5"),
    ];
    for (args, code, expected) in cases {
        let (c, out, err) = run(&args);
        assert_eq!(c, code, "{args:?}: {err}");
        assert!(out.is_empty());
        assert_eq!(err.lines().count(), 1, "{args:?}: {err}");
        assert_eq!(err.trim_end(), expected, "{args:?}");
        assert!(!err.contains("panicked"));
    }
}

#[test]
fn help_for_each_verb() {
    for verb in ["section", "beam", "check", "render", "capture", "walk"] {
        let (code, out, _) = run(&[verb, "--help"]);
        assert_eq!(code, 0);
        assert!(out.contains("Usage: slicewise"), "{verb}");
    }
    let (code, out, _) = run(&["--help"]);
    assert_eq!(code, 0);
    assert!(out.contains("not a guide for a real needle"));
}

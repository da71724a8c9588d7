//! `slicewise render`: a PNG of the screen only, the meta as JSON, one-line errors.

mod common;

use common::run_cli as run;

#[test]
fn render_writes_a_png_and_its_meta() {
    let dir = std::env::temp_dir().join(format!("slicewise-render-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let png_path = dir.join("screen.png");
    let meta_path = dir.join("meta.json");
    let (code, out, err) = run(&[
        "render",
        "scenes-demo/inplane-past-vessel.scene.json",
        "--out",
        png_path.to_str().unwrap(),
        "--width",
        "200",
        "--meta",
        meta_path.to_str().unwrap(),
        "--set",
        "display.doppler.mode=\"velocity\"",
    ]);
    assert_eq!(code, 0, "{err}");
    let meta: serde_json::Value = serde_json::from_str(&out).unwrap();
    let from_file: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(&meta_path).unwrap()).unwrap();
    assert_eq!(meta, from_file);
    // Square pixels by default: 40 mm wide, 35 mm deep → 200 × 175.
    assert_eq!(meta["width_px"], 200);
    assert_eq!(meta["height_px"], 175);
    assert!((meta["mm_per_px"]["lateral"].as_f64().unwrap() - 0.2).abs() < 1e-12);
    assert!((meta["mm_per_px"]["depth"].as_f64().unwrap() - 0.2).abs() < 1e-12);
    assert!((meta["top_left_mm"]["lateral_mm"].as_f64().unwrap() + 19.9).abs() < 1e-12);
    assert!((meta["top_left_mm"]["depth_mm"].as_f64().unwrap() - 0.1).abs() < 1e-12);
    for key in [
        "gain_db",
        "tgc_db",
        "dynamic_range_db",
        "grey_levels",
        "doppler",
    ] {
        assert!(meta["display"].get(key).is_some(), "display.{key}");
    }
    assert_eq!(meta["doppler"]["mode"], "velocity");
    assert!(meta["doppler"]["prf_hz"].as_f64().unwrap() > 0.0);
    assert!(
        meta["frame_rate"]["duplex_hz"].as_f64().unwrap()
            < meta["frame_rate"]["b_mode_hz"].as_f64().unwrap()
    );
    let dec = png::Decoder::new(std::io::BufReader::new(
        std::fs::File::open(&png_path).unwrap(),
    ));
    let reader = dec.read_info().unwrap();
    assert_eq!((reader.info().width, reader.info().height), (200, 175));
    assert_eq!(reader.info().color_type, png::ColorType::Rgba);
    std::fs::remove_dir_all(&dir).unwrap();
}

#[test]
fn render_errors_are_one_line() {
    let cases: Vec<(Vec<&str>, i32, &str)> = vec![
        (
            vec![
                "render",
                "scenes-demo/inplane-past-vessel.scene.json",
                "--out",
                "/tmp/x.png",
                "--width",
                "5",
            ],
            1,
            "slicewise: --width: must be a whole number of pixels from 16 to 4096, got 5",
        ),
        (
            vec![
                "render",
                "scenes-demo/inplane-past-vessel.scene.json",
                "--out",
                "/tmp/x.png",
                "--height",
                "9000",
            ],
            1,
            "slicewise: --height: must be a whole number of pixels from 16 to 4096, got 9000",
        ),
        (
            vec![
                "render",
                "scenes-demo/inplane-past-vessel.scene.json",
                "--out",
                "/no/such/dir/x.png",
            ],
            1,
            "slicewise: cannot write /no/such/dir/x.png: No such file or directory (os error 2)",
        ),
        (
            vec![
                "render",
                "scenes-demo/inplane-past-vessel.scene.json",
                "--out",
                "/tmp/x.png",
                "--set",
                "display.grey_levels=1",
            ],
            1,
            "slicewise: --set: display.grey_levels: must be a whole number from 2 to 256, got 1",
        ),
        (
            vec!["render", "scenes-demo/inplane-past-vessel.scene.json"],
            2,
            "slicewise: the following required arguments were not provided: (see slicewise --help)",
        ),
    ];
    for (args, code, expected) in cases {
        let (c, out, err) = run(&args);
        assert_eq!(c, code, "{args:?}: {err}");
        assert!(out.is_empty());
        assert_eq!(err.lines().count(), 1, "{args:?}: {err}");
        assert_eq!(err.trim_end(), expected, "{args:?}");
    }
}

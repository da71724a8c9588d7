//! Renders every demo scene (and a few teaching scenes) to PNG under `tests/artefacts/echo/`
//! (git-ignored) for people to look at, and prints each demo's `echo_fingerprint`: the numbers
//! the wasm build must reproduce bit for bit.

mod echo_support;

use std::path::PathBuf;

use serde_json::json;
use slicewise::*;

fn out_dir() -> PathBuf {
    let dir = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../tests/artefacts/echo");
    std::fs::create_dir_all(&dir).expect("artefact folder can be created");
    dir
}

fn write_png(path: &std::path::Path, out: &RenderOutput) {
    let file = std::fs::File::create(path).expect("artefact file can be written");
    let mut enc = png::Encoder::new(std::io::BufWriter::new(file), out.width(), out.height());
    enc.set_color(png::ColorType::Rgba);
    enc.set_depth(png::BitDepth::Eight);
    let mut w = enc.write_header().unwrap();
    w.write_image_data(out.rgba()).unwrap();
    w.finish().unwrap();
    // Read it back: the file is a valid PNG of the same pixels.
    let dec = png::Decoder::new(std::io::BufReader::new(std::fs::File::open(path).unwrap()));
    let mut reader = dec.read_info().unwrap();
    let mut buf = vec![0; reader.output_buffer_size().unwrap()];
    let info = reader.next_frame(&mut buf).unwrap();
    assert_eq!((info.width, info.height), (out.width(), out.height()));
    assert_eq!(&buf[..info.buffer_size()], out.rgba());
}

/// Square-pixel height for a scene at `width` (as the `render` command chooses it).
fn height_for(scene: &Scene, width: u32) -> u32 {
    let mut r = Renderer::new();
    let m = r.render(scene, 64, 64).unwrap().meta().clone();
    let span_u = m.mm_per_px.lateral * 64.0;
    let span_v = m.mm_per_px.depth * 64.0;
    ((width as f64 * span_v / span_u).round() as u32).clamp(MIN_SCREEN_PX, MAX_SCREEN_PX)
}

/// Every demo scene as the page shows it by default, with a time-gain ramp a user would set,
/// and with colour Doppler.
#[test]
fn render_every_demo_scene_to_png() {
    let dir = out_dir();
    let mut renderer = Renderer::new();
    let mut prints = serde_json::Map::new();
    for (name, scene) in echo_support::demo_scenes() {
        let h = height_for(&scene, 512);
        let out = renderer.render(&scene, 512, h).unwrap();
        write_png(&dir.join(format!("{name}.png")), out);
        let mut ramp = scene.clone();
        ramp.display.tgc_db = vec![-4.0, -2.0, 0.0, 3.0, 6.0, 9.0, 12.0, 15.0];
        let out = renderer.render(&ramp, 512, h).unwrap();
        write_png(&dir.join(format!("{name}-tgc.png")), out);
        let mut colour = ramp.clone();
        colour.display.doppler.mode = DopplerMode::Velocity;
        colour.display.doppler.scale_cm_s = 15.0;
        let out = renderer.render(&colour, 512, h).unwrap();
        write_png(&dir.join(format!("{name}-doppler.png")), out);
        let fp = echo_fingerprint(&scene, 256, 192).unwrap();
        println!("echo_fingerprint({name}, 256, 192) = {fp:#018x}");
        prints.insert(name, json!(format!("{fp:#018x}")));
    }
    std::fs::write(
        dir.join("fingerprints-256x192.json"),
        serde_json::to_string_pretty(&prints).unwrap() + "\n",
    )
    .unwrap();
}

/// Teaching scenes that the demos do not cover: the pleura and its reverberation, a needle
/// square to the beam with its lumen ringing, steep and shallow in-plane needles, bone, grey
/// levels and power Doppler.
#[test]
fn render_teaching_scenes_to_png() {
    let dir = out_dir();
    let base = |edit: &dyn Fn(&mut serde_json::Value)| {
        echo_support::scene(|v| {
            v["probe"]["elevation"] = json!({"model": "focused", "aperture_mm": 5, "focus_mm": 18});
            v["tissue"] = json!({"layers": [{"kind": "skin", "thickness_mm": 1.4},
                {"kind": "fat", "thickness_mm": 4.5}, {"kind": "fascia", "thickness_mm": 0.5},
                {"kind": "muscle", "thickness_mm": 100}]});
            v["display"] = json!({"tgc_db": [-3, 0, 3, 6, 9, 12, 15, 18]});
            edit(v);
        })
    };
    let scenes: Vec<(&str, Scene)> = vec![
        (
            "pleura",
            base(&|v| {
                v["tissue"] = json!({"layers": [{"kind": "skin", "thickness_mm": 1.4},
                {"kind": "fat", "thickness_mm": 3}, {"kind": "muscle", "thickness_mm": 7},
                {"kind": "lung", "thickness_mm": 100}]});
            }),
        ),
        (
            "needle-square-to-beam",
            base(&|v| {
                v["probe"]["pose"]["rock_deg"] = json!(-20);
                v["needle"] = json!({"gauge": 20, "length_mm": 80, "bevel_deg": 30,
                "entry": {"x_mm": -45, "y_mm": 0}, "azimuth_deg": 0, "angle_deg": 20, "inserted_mm": 58});
            }),
        ),
        (
            "needle-in-plane-15deg",
            base(&|v| {
                v["needle"]["angle_deg"] = json!(15);
                v["needle"]["inserted_mm"] = json!(30);
            }),
        ),
        (
            "needle-in-plane-60deg",
            base(&|v| {
                v["needle"]["entry"] = json!({"x_mm": -12, "y_mm": 0});
                v["needle"]["angle_deg"] = json!(60);
                v["needle"]["inserted_mm"] = json!(30);
            }),
        ),
        (
            "bone-and-nerve",
            base(&|v| {
                v["structures"] = json!([
                    {"id": "b", "kind": "bone", "path_mm": [[4, -30, 27], [4, 30, 27]], "radius_mm": 8},
                    {"id": "n", "kind": "nerve", "path_mm": [[-8, -30, 12], [-8, 30, 12]], "radius_mm": 3, "fascicles": 18},
                    {"id": "r", "kind": "nerve", "path_mm": [[8, -30, 10], [8, 30, 10]], "radius_mm": 1.8, "fascicles": 3, "root": true}
                ]);
            }),
        ),
        (
            "vessel-long-axis-power",
            base(&|v| {
                v["structures"] = json!([{"id": "a", "kind": "vessel",
                "path_mm": [[-25, 0, 22], [25, 0, 10]], "radius_mm": 3, "flow_cm_s": 25}]);
                v["display"]["doppler"] = json!({"mode": "power", "scale_cm_s": 20});
            }),
        ),
        (
            "vessel-long-axis-aliasing",
            base(&|v| {
                v["structures"] = json!([{"id": "a", "kind": "vessel",
                "path_mm": [[-25, 0, 22], [25, 0, 10]], "radius_mm": 3, "flow_cm_s": 25}]);
                v["display"]["doppler"] = json!({"mode": "velocity", "scale_cm_s": 8});
            }),
        ),
        (
            "three-grey-levels",
            base(&|v| {
                v["structures"] = json!([{"id": "n", "kind": "nerve", "path_mm": [[0, -30, 14], [0, 30, 14]], "radius_mm": 3}]);
                v["display"]["grey_levels"] = json!(3);
            }),
        ),
    ];
    let mut r = Renderer::new();
    for (name, s) in scenes {
        let out = r.render(&s, 512, 512).unwrap();
        write_png(&dir.join(format!("teach-{name}.png")), out);
    }
}

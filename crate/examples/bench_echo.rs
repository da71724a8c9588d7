//! Speed of the simulated echo image: median time of 256², 512² and 1024² frames of demo
//! scenes, and the cost per pixel. Run with
//! `cargo run --release -p slicewise --example bench_echo` (numbers are printed, never
//! asserted). "probe" frames move the probe every frame (all tables rebuilt); "needle" frames
//! only advance the needle (the speckle and texture grids and the needle-free echo are reused,
//! as when a user drags the needle slider).
//!
//! Besides the lines for people, one line for tools:
//! `NATIVE_ECHO_MS {"256": x, "512": y, "1024": z}` — the median "probe" frame time, ms, of the
//! linear demo scene `inplane-past-vessel` at each size.

use std::time::Instant;

/// The scene whose "probe" medians make the machine-readable line.
const LINEAR_DEMO: &str = "inplane-past-vessel.scene.json";

fn main() {
    let root = concat!(env!("CARGO_MANIFEST_DIR"), "/../scenes-demo/");
    let scenes = [LINEAR_DEMO, "deep-curved-target.scene.json"];
    let mut linear_probe_ms: Vec<(u32, f64)> = Vec::new();
    println!("echo image, one thread, median of repeated frames");
    for name in scenes {
        let text = std::fs::read_to_string(format!("{root}{name}")).expect("demo scene");
        let base = slicewise::load_scene_str(&text).expect("valid demo scene");
        for (label, doppler, moving) in [
            ("probe", slicewise::DopplerMode::Off, true),
            ("probe+colour", slicewise::DopplerMode::Velocity, true),
            ("needle", slicewise::DopplerMode::Off, false),
        ] {
            let mut scene = base.clone();
            scene.display.doppler.mode = doppler;
            let mut renderer = slicewise::Renderer::new();
            for side in [256u32, 512, 1024] {
                let runs = match side {
                    256 => 60,
                    512 => 30,
                    _ => 10,
                };
                // Warm up (the first frame builds the scan tables).
                renderer.render(&scene, side, side).expect("size in range");
                let mut times: Vec<f64> = (0..runs)
                    .map(|k| {
                        if moving {
                            scene.probe.pose.x_mm = base.probe.pose.x_mm + 0.01 * k as f64;
                        } else {
                            scene.needle.inserted_mm = (base.needle.inserted_mm + 0.05 * k as f64)
                                .min(base.needle.length_mm);
                        }
                        let t = Instant::now();
                        let out = renderer.render(&scene, side, side).expect("size in range");
                        std::hint::black_box(out.rgba()[0]);
                        t.elapsed().as_secs_f64() * 1e3
                    })
                    .collect();
                times.sort_by(f64::total_cmp);
                let median = times[times.len() / 2];
                let px = (side as f64) * (side as f64);
                println!(
                    "{name:32} {label:12} {side:4}²: median {median:7.2} ms, {:5.1} ns/pixel",
                    median * 1e6 / px
                );
                if name == LINEAR_DEMO && label == "probe" {
                    linear_probe_ms.push((side, median));
                }
            }
        }
    }
    let fields: Vec<String> = linear_probe_ms
        .iter()
        .map(|(side, ms)| format!("\"{side}\": {ms:.3}"))
        .collect();
    println!("NATIVE_ECHO_MS {{{}}}", fields.join(", "));
}

//! Benchmark: one `section` call on a scene with ten structures (target: under 20 µs native).
//! Prints figures; asserts nothing. Run: `cargo run --release -p slicewise --example bench_section`.

use std::hint::black_box;
use std::time::Instant;

fn median(mut v: Vec<f64>) -> f64 {
    v.sort_by(f64::total_cmp);
    v[v.len() / 2]
}

fn main() {
    let mut scene = slicewise::load_scene_str(include_str!(
        "../../scenes-demo/inplane-past-vessel.scene.json"
    ))
    .expect("demo scene");
    // Ten structures: the scene's three plus seven more tubes, pockets and a bone.
    let extra = r#"[
      {"id": "x1", "kind": "nerve", "path_mm": [[-12, -40, 9], [-11, 0, 9.5], [-12, 40, 10]], "radius_mm": 1.5},
      {"id": "x2", "kind": "vessel", "path_mm": [[14, -40, 12], [14, 40, 13]], "radius_mm": 1.2, "flow_cm_s": 20},
      {"id": "x3", "kind": "vessel", "path_mm": [[-2, -40, 30], [0, 40, 31]], "radius_mm": 2.5, "flow_cm_s": -15},
      {"id": "x4", "kind": "bone", "path_mm": [[0, -40, 45], [0, 40, 45]], "radius_mm": 8},
      {"id": "x5", "kind": "fluid", "centre_mm": [4, 0.5, 17], "semi_axes_mm": [3, 2, 1.5], "yaw_deg": 20},
      {"id": "x6", "kind": "nerve", "path_mm": [[18, -40, 20], [17, -5, 21], [16, 5, 21], [15, 40, 22]], "radius_mm": 1.8},
      {"id": "x7", "kind": "fluid", "centre_mm": [-8, -1, 22], "semi_axes_mm": [1.5, 1.5, 1.5], "yaw_deg": 0}
    ]"#;
    let mut v = slicewise::scene_to_value(&scene);
    let more: serde_json::Value = serde_json::from_str(extra).expect("extra structures");
    v["structures"]
        .as_array_mut()
        .expect("structures")
        .extend(more.as_array().expect("list").iter().cloned());
    scene = slicewise::load_scene_value(&v).expect("ten-structure scene");
    assert_eq!(scene.structures.len(), 10);

    for (name, elevation) in [
        ("focused slab", scene.probe.elevation),
        (
            "uniform slab",
            slicewise::ElevationProfile::Uniform { thickness_mm: 1.0 },
        ),
    ] {
        scene.probe.elevation = elevation;
        let reps = 20_000;
        let mut samples = Vec::new();
        for round in 0..7 {
            let t = Instant::now();
            for i in 0..reps {
                // Vary the pose a little so nothing is cached by accident.
                scene.probe.pose.tilt_deg = ((i + round) % 20) as f64 * 0.05;
                black_box(slicewise::section(black_box(&scene)));
            }
            samples.push(t.elapsed().as_secs_f64() * 1e6 / reps as f64);
        }
        println!(
            "section, 10 structures, {name}: median {:.2} µs per call (target < 20 µs)",
            median(samples)
        );
    }
}

//! Benchmark: one capture solve (tilt and slide windows) and a 100-step walking schedule
//! (targets: under 50 µs and under 5 ms native). Prints figures; asserts nothing.
//! Run: `cargo run --release -p slicewise --example bench_capture`.

use std::hint::black_box;
use std::time::Instant;

fn median(mut v: Vec<f64>) -> f64 {
    v.sort_by(f64::total_cmp);
    v[v.len() / 2]
}

fn main() {
    let mut scene = slicewise::load_scene_str(include_str!(
        "../../scenes-demo/shaft-dot-past-nerve.scene.json"
    ))
    .expect("demo scene");
    let mut samples = Vec::new();
    for round in 0..7 {
        let reps = 2_000;
        let t = Instant::now();
        for i in 0..reps {
            scene.needle.inserted_mm = 16.0 + ((i + round) % 50) as f64 * 0.1;
            black_box(slicewise::capture(black_box(&scene)));
        }
        samples.push(t.elapsed().as_secs_f64() * 1e6 / reps as f64);
    }
    println!(
        "capture solve (tilt + slide windows), focused slab: median {:.1} µs (target < 50 µs)",
        median(samples)
    );

    let mut samples = Vec::new();
    for _ in 0..7 {
        let reps = 10;
        let t = Instant::now();
        for _ in 0..reps {
            black_box(slicewise::walk(black_box(&scene), 12.0, 32.0, 0.2));
        }
        samples.push(t.elapsed().as_secs_f64() * 1e3 / reps as f64);
    }
    let steps = slicewise::walk(&scene, 12.0, 32.0, 0.2).steps.len();
    println!(
        "walking schedule, {steps} steps: median {:.2} ms (target < 5 ms)",
        median(samples)
    );
}

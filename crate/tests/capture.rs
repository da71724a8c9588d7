//! The capture solver and the walking schedule against brute force and a closed form.

mod common;

use common::*;
use slicewise::*;

/// Brute force: step from `seed` in `step` increments both ways while `inside` holds (within
/// [lo, hi]); the ends of that run of grid points.
fn grid_run<F: Fn(f64) -> bool>(inside: F, seed: f64, lo: f64, hi: f64, step: f64) -> (f64, f64) {
    assert!(inside(seed), "the seed {seed} must be inside");
    let mut a = seed;
    while a - step >= lo && inside(a - step) {
        a -= step;
    }
    let mut b = seed;
    while b + step <= hi && inside(b + step) {
        b += step;
    }
    (a, b)
}

fn tip_in_slab_full(scene: &Scene, pose: Pose) -> bool {
    // The full signature computation, not the solver's own bevel test.
    let mut probe = scene.probe.clone();
    probe.pose = pose;
    needle_section(&Slab::of_probe(&probe), &scene.needle).tip_in_slab
}

/// Tilt window and centre against a brute-force search over tilt in 0.01° steps, and the slide
/// window against 0.005 mm steps, on 1,000 seeded random scenes with a capture (both slab
/// models, flat and curved faces).
#[test]
fn capture_matches_brute_force_search() {
    let mut r = rng(0xca97_0001);
    let (mut tilt_checked, mut slide_checked, mut focused, mut uniform_) = (0, 0, 0, 0);
    let mut tried = 0;
    while tilt_checked < 1000 {
        tried += 1;
        assert!(tried < 20_000, "too few capturable scenes");
        let mut scene = random_scene(&mut r, true);
        scene.probe.pose.tilt_deg = uniform(&mut r, -20.0, 20.0);
        if scene.needle.inserted_mm < 1.0 {
            continue;
        }
        let cap = capture(&scene);
        let pose = scene.probe.pose;
        match cap.tilt {
            Some(t) => {
                // Centre: the tip is on the centre plane there (independent frame).
                let (_, _, n) = axes(&Pose {
                    tilt_deg: t.centre_deg,
                    ..pose
                });
                let tip = scene.needle.tip();
                let e = dot([tip.x - pose.x_mm, tip.y - pose.y_mm, tip.z], n);
                assert!(e.abs() < 1e-9, "centre leaves the tip {e} mm off the plane");
                if t.centre_deg.abs() > 45.0 {
                    assert!(cap
                        .reason
                        .as_deref()
                        .unwrap_or("")
                        .contains("beyond the ±45° reach"));
                }
                assert!(t.window_deg[0] >= -45.0 && t.window_deg[1] <= 45.0);
                // Window: the run of grid tilts around the (reach-clamped) centre where the tip
                // is in the slab.
                let at = |tt: f64| {
                    tip_in_slab_full(
                        &scene,
                        Pose {
                            tilt_deg: tt,
                            ..pose
                        },
                    )
                };
                let (lo, hi) = grid_run(at, t.centre_deg.clamp(-45.0, 45.0), -45.0, 45.0, 0.01);
                assert!(
                    (lo - t.window_deg[0]).abs() <= 0.0101
                        && (hi - t.window_deg[1]).abs() <= 0.0101,
                    "solver {t:?} brute [{lo}, {hi}]"
                );
                tilt_checked += 1;
                match scene.probe.elevation {
                    ElevationProfile::Focused { .. } => focused += 1,
                    ElevationProfile::Uniform { .. } => uniform_ += 1,
                }
            }
            None => {
                // No capture: check the reason. Beyond reach: the centre is past ±45° and the tip
                // is not in the slab at the edge of reach. Out of view: the tip is not in the
                // slab at the centre tilt although it lies on the centre plane there.
                let reason = cap.reason.clone().unwrap_or_default();
                let (_, _, n0) = axes(&Pose {
                    tilt_deg: 0.0,
                    ..pose
                });
                let tip = scene.needle.tip();
                let e0 = dot([tip.x - pose.x_mm, tip.y - pose.y_mm, tip.z], n0);
                let centre = e0.atan2(tip.z).to_degrees();
                if reason.contains("beyond the ±45° reach") {
                    assert!(centre.abs() > 45.0);
                    assert!(!tip_in_slab_full(
                        &scene,
                        Pose {
                            tilt_deg: 45.0f64.copysign(centre),
                            ..pose
                        }
                    ));
                } else {
                    assert!(reason.contains("outside the field of view"), "{reason}");
                    assert!(!tip_in_slab_full(
                        &scene,
                        Pose {
                            tilt_deg: centre,
                            ..pose
                        }
                    ));
                }
            }
        }
        if let Some(sl) = cap.slide {
            let (sp, cp) = pose.rotate_deg.to_radians().sin_cos();
            let here = pose.x_mm * -sp + pose.y_mm * cp;
            let at = |t: f64| Pose {
                x_mm: pose.x_mm - (t - here) * sp,
                y_mm: pose.y_mm + (t - here) * cp,
                ..pose
            };
            let (lo, hi) = grid_run(
                |t| tip_in_slab_full(&scene, at(t)),
                sl.centre_mm.clamp(here - MAX_SLIDE_MM, here + MAX_SLIDE_MM),
                here - MAX_SLIDE_MM,
                here + MAX_SLIDE_MM,
                0.005,
            );
            assert!(
                (lo - sl.window_mm[0]).abs() <= 0.00501 && (hi - sl.window_mm[1]).abs() <= 0.00501,
                "slide {sl:?} brute [{lo}, {hi}]"
            );
            slide_checked += 1;
        }
    }
    assert!(
        focused > 300 && uniform_ > 300,
        "both slab models: {focused} focused, {uniform_} uniform"
    );
    assert!(slide_checked > 900);
}

/// Closed form derived in plan/capture.rs: with a uniform slab, the probe pivoting at the skin
/// and no rock, the tilt that captures a tip at depth v and elevation e below the untilted probe
/// is atan2(e, v).
#[test]
fn capture_tilt_is_atan2_of_elevation_and_depth() {
    let mut r = rng(0xca97_0002);
    let mut checked = 0;
    for _ in 0..2000 {
        let mut scene = random_scene(&mut r, false);
        scene.probe.elevation = ElevationProfile::Uniform { thickness_mm: 1.0 };
        scene.probe.pose.rock_deg = 0.0;
        scene.probe.pose.tilt_deg = 0.0;
        let f = scene.frame();
        let c = f.to_image(&scene.needle.tip());
        let cap = capture(&scene);
        if let Some(t) = cap.tilt {
            assert!((t.centre_deg - c.e.atan2(c.v).to_degrees()).abs() < 1e-9);
            checked += 1;
        }
    }
    assert!(checked > 500);
}

fn oop(angle_deg: f64) -> Scene {
    let mut s = load_scene_str(include_str!(
        "../../scenes-demo/forearm-out-of-plane.scene.json"
    ))
    .unwrap();
    s.probe.elevation = ElevationProfile::Focused {
        aperture_mm: 4.5,
        focus_mm: 14.0,
    };
    s.probe.depth_mm = 60.0;
    s.needle.azimuth_deg = 90.0;
    s.needle.angle_deg = angle_deg;
    s.needle.length_mm = 80.0;
    // Enter so the needle reaches the plane at 6 mm depth.
    s.needle.entry.y_mm = -6.0 / angle_deg.to_radians().tan();
    s
}

/// Rule of the trade (common practice, no source), checked geometrically first: for the same
/// advance, a steeper out-of-plane needle needs fewer re-tilts. Geometry: each mm of advance moves
/// the tip cos α mm along the elevation axis and sin α mm deeper; the capture tilt atan2(e, v)
/// therefore changes by about cos α·v/(e² + v²) per mm, which falls as α grows.
#[test]
fn steeper_out_of_plane_needle_needs_fewer_retilts() {
    // The geometric claim: the capture tilt's rate of change per mm of advance falls with α.
    let rate = |alpha: f64| {
        let s = oop(alpha);
        let at = |l: f64| {
            let mut t = s.clone();
            t.needle.inserted_mm = l;
            capture(&t).tilt.unwrap().centre_deg
        };
        let l0 = 6.0 / alpha.to_radians().sin() + 5.0;
        (at(l0 + 10.0) - at(l0)) / 10.0
    };
    let rates: Vec<f64> = [30.0, 45.0, 60.0, 75.0].iter().map(|&a| rate(a)).collect();
    assert!(rates.windows(2).all(|w| w[1] < w[0]), "{rates:?}");

    // The schedule: the same 8 mm of advance beyond the plane, 0.5 mm steps.
    let mut prev = u32::MAX;
    for alpha in [30.0, 45.0, 60.0, 75.0] {
        let s = oop(alpha);
        let start = 6.0 / f64::to_radians(alpha).sin() + 2.0;
        let w = walk(&s, start, start + 8.0, 0.5);
        assert!(
            w.retilts <= prev,
            "α {alpha}: {} re-tilts, more than {prev}",
            w.retilts
        );
        assert!(w.steps.iter().all(|st| st.tilt_centre_deg.is_some()));
        prev = w.retilts;
    }
    assert!(walk(&oop(30.0), 14.0, 22.0, 0.5).retilts > walk(&oop(75.0), 8.2, 16.2, 0.5).retilts);
}

/// A probe that never moves sees the tip only while it is in the slab: the blind advance is the
/// rest, and it is zero when the whole advance stays in the slab.
#[test]
fn blind_advance_counts_steps_with_the_tip_out() {
    let s = oop(45.0);
    let w = walk(&s, 5.0, 20.0, 0.5);
    let out = w
        .steps
        .iter()
        .skip(1)
        .filter(|st| st.tip_offset_mm.abs() > st.half_band_mm + s.needle.bevel_length_mm())
        .count();
    assert!(w.blind_advance_mm >= 0.5 * out as f64 - 1e-9);
    assert!(w.blind_advance_mm <= 15.0);
    // An in-plane needle lying in the slab is never blind.
    let ip = load_scene_str(include_str!(
        "../../scenes-demo/deep-curved-target.scene.json"
    ))
    .unwrap();
    let w = walk(&ip, 30.0, 60.0, 1.0);
    assert_eq!(w.blind_advance_mm, 0.0);
    assert_eq!(w.retilts, 0);
}

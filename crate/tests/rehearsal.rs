//! Rehearsal scoring against the geometry it is built on.

use slicewise::*;

fn scene() -> Scene {
    load_scene_str(include_str!(
        "../../scenes-demo/forearm-out-of-plane.scene.json"
    ))
    .unwrap()
}

fn log(
    scene: &Scene,
    from: f64,
    to: f64,
    step: f64,
    pose_at: impl Fn(&Scene, f64) -> Pose,
    declare_at: &[(f64, Declaration)],
) -> Vec<RehearsalEvent> {
    let mut out = Vec::new();
    let n = ((to - from) / step).round() as usize;
    for i in 0..=n {
        let l = from + step * i as f64;
        let declared = declare_at
            .iter()
            .find(|(at, _)| (at - l).abs() < 1e-9)
            .map(|(_, d)| *d);
        out.push(RehearsalEvent {
            t_s: i as f64,
            inserted_mm: l,
            pose: pose_at(scene, l),
            declared,
        });
    }
    out
}

/// A user who re-centres on the solver's tilt at every step has the tip in view the whole way,
/// and after one correct "tip" call, it stays confirmed.
#[test]
fn perfect_walker_keeps_the_tip_confirmed() {
    let s = scene();
    let follow = |sc: &Scene, l: f64| {
        let mut t = sc.clone();
        t.needle.inserted_mm = l;
        Pose {
            tilt_deg: capture_tilt(&t).0.unwrap().centre_deg,
            ..sc.probe.pose
        }
    };
    let evs = log(&s, 14.0, 20.0, 0.5, follow, &[(14.0, Declaration::Tip)]);
    let r = score_rehearsal(&s, &evs, Some("forearm-nerve"));
    assert!((r.advance_mm - 6.0).abs() < 1e-9);
    assert_eq!(r.tip_in_view_share, 1.0);
    assert_eq!(r.confirmed_share, 1.0);
    assert_eq!(r.longest_blind_mm, 0.0);
    assert_eq!((r.correct_tip_calls, r.false_tip_calls), (1, 0));
    assert_eq!(r.target_id.as_deref(), Some("forearm-nerve"));
    let mut end = s.clone();
    end.needle.inserted_mm = 20.0;
    let expect = section(&end).structures[0].tip_distance_mm;
    assert!((r.final_tip_to_target_mm.unwrap() - expect).abs() < 1e-9);
    for row in &r.replay {
        assert!((row.user_tilt_deg - row.solver_tilt_deg.unwrap()).abs() < 1e-9);
    }
}

/// A probe that never moves: the blind advance agrees with the walking schedule's, and a "tip"
/// call while the screen shows only the shaft counts as false.
#[test]
fn still_probe_goes_blind_and_a_shaft_taken_for_the_tip_is_a_false_call() {
    let s = scene();
    let still = |sc: &Scene, _l: f64| sc.probe.pose;
    // Find a length where the screen shows the shaft only.
    let shaft_at = (0..60)
        .map(|i| 15.0 + i as f64 * 0.5)
        .find(|&l| {
            let mut t = s.clone();
            t.needle.inserted_mm = l;
            section(&t).needle.signature == Signature::ShaftDot
        })
        .expect("advancing past the slab shows a shaft dot");
    let evs = log(
        &s,
        14.0,
        30.0,
        0.5,
        still,
        &[
            (shaft_at, Declaration::Tip),
            (shaft_at + 0.5, Declaration::Shaft),
        ],
    );
    let r = score_rehearsal(&s, &evs, None);
    let w = walk(&s, 14.0, 30.0, 0.5);
    assert!(r.longest_blind_mm <= w.blind_advance_mm + 1e-9);
    assert!(
        (r.tip_in_view_share * r.advance_mm + w.blind_advance_mm - r.advance_mm).abs() < 1e-9,
        "in view + blind = advance"
    );
    assert_eq!(r.false_tip_calls, 1);
    assert_eq!(r.correct_shaft_calls, 1);
    assert_eq!(r.confirmed_share, 0.0);
    assert_eq!(
        r.target_id.as_deref(),
        Some("forearm-nerve"),
        "the nearest nerve when no target is set"
    );
}

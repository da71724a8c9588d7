//! Closed forms derived here, and held against the slab queries.

use slicewise::*;

fn base_scene() -> Scene {
    load_scene_str(include_str!(
        "../../scenes-demo/forearm-out-of-plane.scene.json"
    ))
    .unwrap()
}

/// A needle crossing a uniform slab of thickness T at angle γ to the image plane has in-slab
/// length (T + 2r·cos γ)/sin γ.
///
/// Derivation: along the needle, e(s) = e0 + s·sin γ (d·n′ = sin γ); the cross-section disc of
/// radius r reaches r·√(1 − sin²γ) = r·cos γ toward the plane; the needle touches the slab while
/// |e(s)| ≤ T/2 + r·cos γ, an e-range of T + 2r·cos γ, i.e. an s-range of that over sin γ.
#[test]
fn in_slab_length_crossing_a_uniform_slab() {
    for &t in &[0.3f64, 1.0, 2.0, 4.0] {
        for &gamma_deg in &[3.0f64, 5.0, 10.0, 20.0, 35.0, 45.0, 60.0, 75.0, 89.0] {
            for &gauge in &[18u8, 22, 27] {
                let mut s = base_scene();
                s.probe.elevation = ElevationProfile::Uniform { thickness_mm: t };
                s.probe.depth_mm = 300.0;
                s.probe.pose = Pose::default();
                // The plane is y = 0 (n′ = +y). A needle in the y–z plane at angle α below the
                // skin has d·n′ = cos α, so it meets the plane at γ = 90° − α. Start it far enough
                // back that it crosses the plane 100 mm deep.
                let alpha = 90.0 - gamma_deg;
                let back = 100.0 / alpha.to_radians().tan();
                let s_cross = 100.0 / alpha.to_radians().sin();
                s.needle.azimuth_deg = 90.0;
                s.needle.angle_deg = alpha;
                s.needle.entry = Entry {
                    x_mm: 0.0,
                    y_mm: -back,
                };
                s.needle.size = NeedleSize::Gauge { gauge };
                s.needle.length_mm = s_cross + 200.0;
                s.needle.inserted_mm = s_cross + 150.0;
                let gamma = gamma_deg.to_radians();
                let r = s.needle.radius_mm();
                let expect = (t + 2.0 * r * gamma.cos()) / gamma.sin();
                let sec = needle_section(&Slab::of_probe(&s.probe), &s.needle);
                let total: f64 = sec.in_slab_mm.iter().map(|iv| iv[1] - iv[0]).sum();
                assert_eq!(sec.in_slab_mm.len(), 1, "T {t} γ {gamma_deg}");
                assert!(
                    (total - expect).abs() < 1e-9 * (1.0 + expect),
                    "T {t} γ {gamma_deg} G{gauge}: {total} vs {expect}"
                );
                assert!((sec.plane_angle_deg - gamma_deg).abs() < 1e-9);
            }
        }
    }
}

/// A needle lying in the image plane within the footprint shows as a line with its tip.
#[test]
fn needle_in_plane_within_footprint_is_line_with_tip() {
    for model in [
        ElevationProfile::Uniform { thickness_mm: 0.5 },
        ElevationProfile::Focused {
            aperture_mm: 5.0,
            focus_mm: 18.0,
        },
    ] {
        for angle in [10.0, 30.0, 50.0, 70.0] {
            let mut s = base_scene();
            s.probe.elevation = model;
            s.probe.depth_mm = 60.0;
            s.needle.entry = Entry {
                x_mm: -15.0,
                y_mm: 0.0,
            };
            s.needle.azimuth_deg = 0.0;
            s.needle.angle_deg = angle;
            s.needle.inserted_mm = 30.0;
            let sec = needle_section(&Slab::of_probe(&s.probe), &s.needle);
            assert_eq!(sec.signature, Signature::LineWithTip, "angle {angle}");
            assert_eq!(sec.hidden_length_mm, 0.0);
            assert!(sec.tip_offset_mm.abs() < 1e-12);
            let tip = sec.apparent_tip.unwrap();
            assert!(
                (tip.lateral_mm - sec.true_tip.lateral_mm).abs() < 1e-9
                    && (tip.depth_mm - sec.true_tip.depth_mm).abs() < 1e-9
            );
            assert!(
                (sec.insonation_deg - (90.0 - angle)).abs() < 1e-9,
                "beam vs needle"
            );
        }
    }
}

/// The untilted probe frame is the world frame shifted to the face centre; tilt and rock
/// follow DESIGN.md's formulas (positive tilt swings the deep end toward +n, positive rock
/// toward +a).
#[test]
fn pose_conventions() {
    let f = ProbeFrame::from_pose(&Pose {
        x_mm: 3.0,
        y_mm: -2.0,
        rotate_deg: 0.0,
        tilt_deg: 0.0,
        rock_deg: 0.0,
    });
    let c = f.to_image(&nalgebra::Point3::new(4.0, -1.0, 5.0));
    assert!((c.u - 1.0).abs() < 1e-12 && (c.v - 5.0).abs() < 1e-12 && (c.e - 1.0).abs() < 1e-12);
    let t = ProbeFrame::from_pose(&Pose {
        tilt_deg: 30.0,
        ..Pose::default()
    });
    assert!(t.beam.y > 0.49 && (t.beam.y - 0.5).abs() < 1e-12);
    let r = ProbeFrame::from_pose(&Pose {
        rock_deg: 30.0,
        ..Pose::default()
    });
    assert!((r.beam.x - 0.5).abs() < 1e-12);
    let q = ProbeFrame::from_pose(&Pose {
        rotate_deg: 90.0,
        tilt_deg: 17.0,
        rock_deg: -23.0,
        ..Pose::default()
    });
    assert!(
        (q.lateral.cross(&q.elevation) - q.beam).norm() < 1e-12,
        "lateral × elevation = beam"
    );
}

/// Special cases DESIGN.md names: zero inserted length, a needle exactly parallel to the plane,
/// a tip exactly on the slab boundary.
#[test]
fn degenerate_needles() {
    let mut s = base_scene();
    s.probe.elevation = ElevationProfile::Uniform { thickness_mm: 1.0 };
    s.needle.inserted_mm = 0.0;
    let sec = needle_section(&Slab::of_probe(&s.probe), &s.needle);
    assert_eq!(sec.signature, Signature::None);
    assert_eq!(sec.hidden_length_mm, 0.0);
    assert!(sec.in_slab_mm.is_empty());

    // Parallel to the plane, 0.3 mm off it (inside a 1 mm slab) and 0.9 mm off (outside).
    for (offset, inside) in [(0.3, true), (0.9, false)] {
        let mut p = base_scene();
        p.probe.elevation = ElevationProfile::Uniform { thickness_mm: 1.0 };
        p.needle.size = NeedleSize::Diameter {
            outer_diameter_mm: 0.2,
        };
        p.needle.entry = Entry {
            x_mm: -15.0,
            y_mm: offset,
        };
        p.needle.azimuth_deg = 0.0;
        p.needle.angle_deg = 30.0;
        p.needle.inserted_mm = 25.0;
        let sec = needle_section(&Slab::of_probe(&p.probe), &p.needle);
        assert_eq!(
            sec.signature == Signature::LineWithTip,
            inside,
            "offset {offset}"
        );
        assert_eq!(sec.signature == Signature::None, !inside, "offset {offset}");
    }

    // Tip exactly on the boundary: the vertical needle at y = −(T/2 + r) stops... Instead,
    // an out-of-plane needle whose tip lands exactly at e = T/2 + r·cos γ.
    let mut b = base_scene();
    b.probe.elevation = ElevationProfile::Uniform { thickness_mm: 1.0 };
    b.needle.size = NeedleSize::Diameter {
        outer_diameter_mm: 0.5,
    };
    b.needle.entry = Entry {
        x_mm: 0.0,
        y_mm: -10.0,
    };
    b.needle.azimuth_deg = 90.0;
    b.needle.angle_deg = 60.0;
    let gamma = 30.0f64.to_radians(); // d·n′ = cos 60° → angle to plane 30°
    let reach = 0.5 + 0.25 * gamma.cos();
    // e(s) = −10 + s·cos 60°; on the near boundary e = −reach.
    b.needle.inserted_mm = (10.0 - reach) / 0.5;
    let sec = needle_section(&Slab::of_probe(&b.probe), &b.needle);
    assert!(sec.tip_in_slab, "a tip on the boundary is in the slab");
    assert_eq!(sec.signature, Signature::TipDoubleDot);
    assert!(sec.hidden_length_mm.abs() < 1e-9);
}

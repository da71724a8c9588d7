//! Rules of the trade (common practice, no source), each first checked geometrically here.

use slicewise::*;

fn oop_scene(angle_deg: f64, elevation: ElevationProfile, crossing_depth_mm: f64) -> Scene {
    let mut s = load_scene_str(include_str!(
        "../../scenes-demo/forearm-out-of-plane.scene.json"
    ))
    .unwrap();
    s.probe.elevation = elevation;
    s.probe.pose = Pose::default();
    s.probe.depth_mm = 60.0;
    s.structures.clear();
    // Out-of-plane: the needle travels toward +y and crosses the plane y = 0 at the given depth.
    let a = angle_deg.to_radians();
    s.needle.azimuth_deg = 90.0;
    s.needle.angle_deg = angle_deg;
    s.needle.entry = Entry {
        x_mm: 0.0,
        y_mm: -crossing_depth_mm / a.tan(),
    };
    s.needle.length_mm = 150.0;
    s.needle.inserted_mm = 2.0 * crossing_depth_mm / a.sin();
    s
}

fn in_slab_total(s: &Scene) -> f64 {
    needle_section(&Slab::of_probe(&s.probe), &s.needle)
        .in_slab_mm
        .iter()
        .map(|iv| iv[1] - iv[0])
        .sum()
}

/// Common practice, no source: for an out-of-plane approach a steeper needle keeps a longer
/// part of itself within the slab (it runs more nearly along the slab). Checked for both slab
/// models, crossing at the focus and away from it.
#[test]
fn steeper_out_of_plane_needle_keeps_more_of_itself_in_the_slab() {
    for model in [
        ElevationProfile::Uniform { thickness_mm: 1.0 },
        ElevationProfile::Focused {
            aperture_mm: 5.0,
            focus_mm: 18.0,
        },
    ] {
        for depth in [10.0, 18.0, 30.0] {
            let mut prev = 0.0;
            for angle in [15.0, 25.0, 35.0, 45.0, 55.0, 65.0, 75.0, 85.0] {
                let len = in_slab_total(&oop_scene(angle, model, depth));
                assert!(
                    len > prev,
                    "{model:?} depth {depth}: {angle}° keeps {len} mm, not more than {prev}"
                );
                prev = len;
            }
        }
    }
}

/// Common practice, no source: a dot seen while the tip is past the slab is the shaft; the
/// report says so and gives the hidden length, which equals the closed form
/// L − (Y + T/2 + r·sin α)/cos α for a needle from y = −Y at angle α through a uniform slab.
#[test]
fn dot_with_tip_past_the_slab_is_reported_as_shaft_with_hidden_length() {
    let t = 1.2;
    for angle in [30.0f64, 45.0, 55.0] {
        let mut s = oop_scene(angle, ElevationProfile::Uniform { thickness_mm: t }, 15.0);
        let a = angle.to_radians();
        let y_back = -s.needle.entry.y_mm;
        let r = s.needle.radius_mm();
        let exit = (y_back + t / 2.0 + r * a.sin()) / a.cos();
        for past in [0.5, 2.0, 6.0] {
            // Advance so the tip is `past` mm (along the needle) beyond the far face of the slab.
            s.needle.inserted_mm = exit + past + s.needle.bevel_length_mm();
            let sec = needle_section(&Slab::of_probe(&s.probe), &s.needle);
            assert_eq!(
                sec.signature,
                Signature::ShaftDot,
                "angle {angle} past {past}"
            );
            assert!(!sec.tip_in_slab);
            assert!((sec.hidden_length_mm - (s.needle.inserted_mm - exit)).abs() < 1e-9);
            assert!(
                sec.tip_offset_mm > t / 2.0,
                "the tip lies beyond the far face"
            );
            // The apparent tip (where the dot is) is shallower than the true tip.
            assert!(sec.apparent_tip.unwrap().depth_mm < sec.true_tip.depth_mm);
        }
    }
}

/// Common practice, no source: an in-plane needle aimed slightly off the probe's axis shows a
/// line that ends short of the real tip; the shortfall grows as the needle advances.
#[test]
fn in_plane_line_ends_short_of_an_off_axis_tip() {
    let mut s = load_scene_str(include_str!(
        "../../scenes-demo/inplane-past-vessel.scene.json"
    ))
    .unwrap();
    let mut prev_hidden = 0.0;
    for inserted in [33.0, 35.0, 37.0, 40.0] {
        s.needle.inserted_mm = inserted;
        let sec = needle_section(&Slab::of_probe(&s.probe), &s.needle);
        assert_eq!(sec.signature, Signature::LineWithoutTip, "{inserted}");
        assert!(sec.hidden_length_mm > prev_hidden);
        prev_hidden = sec.hidden_length_mm;
    }
}

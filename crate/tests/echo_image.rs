//! The simulated screen: effects that must emerge from the sums (posterior enhancement, bone
//! shadow, the needle's angle dependence, elevation partial volume), the display chain, colour
//! Doppler, determinism and robustness. Sources are named beside each check.

mod echo_support;

use echo_support::{render, scene, Frame};
use serde_json::json;
use slicewise::*;

/// Posterior enhancement: below an 8 mm blood-filled vessel the level exceeds that beside it by
/// the attenuation difference 2·(α_tissue − α_blood)·f·d (FACTS.md "Grey scale", the +5.6 dB
/// worked value uses 0.5 dB/cm/MHz tissue; here the tissue is muscle, 0.96, and blood 0.15
/// dB/cm/MHz, Diagnostics 13(5):855 Table 4). The same scene without the vessel is subtracted so
/// that tissue texture cancels.
#[test]
fn posterior_enhancement_matches_the_attenuation_difference() {
    let with_vessel = scene(|v| {
        v["structures"] = json!([{"id": "v", "kind": "vessel",
            "path_mm": [[0, -30, 15], [0, 30, 15]], "radius_mm": 4.0, "flow_cm_s": 0}]);
    });
    let without = scene(|_| {});
    let (a, b) = (render(&with_vessel, 400, 400), render(&without, 400, 400));
    let under = ((-0.8, 0.8), (22.0, 36.0));
    let beside_l = ((-16.0, -10.0), (22.0, 36.0));
    let beside_r = ((10.0, 16.0), (22.0, 36.0));
    let contrast = |f: &Frame| {
        let beside = 0.5 * (f.mean_db(beside_l.0, beside_l.1) + f.mean_db(beside_r.0, beside_r.1));
        f.mean_db(under.0, under.1) - beside
    };
    for f in [&a, &b] {
        assert!(
            f.clipped_share(under.0, under.1) < 0.01,
            "regions must not clip"
        );
    }
    let measured = contrast(&a) - contrast(&b);
    // The central ±0.8 mm of the vessel has a chord of at least 7.84 mm; the formula at 8 mm.
    let predicted =
        round_trip_attenuation_db(0.96, 10.0, 8.0) - round_trip_attenuation_db(0.15, 10.0, 8.0);
    assert!((predicted - 12.96).abs() < 1e-9);
    assert!(
        (measured - predicted).abs() < 1.5,
        "enhancement {measured:.2} dB, formula {predicted:.2} dB"
    );
}

/// Bone: a bright surface and a shadow behind it. At 10 MHz bone (15 dB/cm/MHz, Diagnostics
/// 13(5):855 Table 4) takes 30 dB per mm of round trip, so the shadow is essentially total
/// within 1 mm (FACTS.md "Grey scale" [calc]); the surface reflects R ≈ 0.36–0.43.
#[test]
fn bone_surface_is_bright_and_shadows_what_lies_behind() {
    let s = scene(|v| {
        v["structures"] = json!([{"id": "b", "kind": "bone",
            "path_mm": [[0, -30, 20], [0, 30, 20]], "radius_mm": 6.0}]);
    });
    let f = render(&s, 400, 400);
    let beside = f.mean_db((-18.0, -12.0), (16.0, 36.0));
    let shadow = f.mean_db((-1.5, 1.5), (16.0, 36.0));
    assert!(
        shadow < beside - 30.0,
        "shadow {shadow:.1} dB vs beside {beside:.1} dB"
    );
    // The surface at depth 14 mm: brightest pixel of the central columns near it.
    let mut brightest = 0u8;
    for y in f.y_of(13.5)..=f.y_of(14.6) {
        for x in f.x_of(-0.5)..=f.x_of(0.5) {
            brightest = brightest.max(f.grey[y * f.width() + x]);
        }
    }
    let beside_at_surface = f.mean_db((-18.0, -12.0), (13.0, 15.0));
    assert!(
        f.db_of(brightest as f64) > beside_at_surface + 20.0,
        "surface {} dB vs tissue {beside_at_surface:.1} dB",
        f.db_of(brightest as f64)
    );
}

/// Mean level along the axis of an in-plane needle entering at x = −18 mm at `angle_deg`,
/// over arc lengths 4–9 mm (the shaft, away from the bevel).
fn in_plane_needle_level(angle_deg: f64) -> f64 {
    let s = scene(|v| {
        v["needle"]["angle_deg"] = json!(angle_deg);
        v["needle"]["entry"] = json!({"x_mm": -18, "y_mm": 0});
        v["needle"]["inserted_mm"] = json!(12);
        v["display"]["gain_db"] = json!(-25);
    });
    let f = render(&s, 400, 400);
    let (sa, ca) = angle_deg.to_radians().sin_cos();
    let mut sum = 0.0;
    let mut n = 0.0;
    let mut s_mm = 4.0;
    while s_mm <= 9.0 {
        let g = f.grey_at(-18.0 + s_mm * ca, s_mm * sa);
        assert!(g < 255, "{angle_deg}°: the needle clips; lower the gain");
        sum += f.db_of(g as f64);
        n += 1.0;
        s_mm += 0.05;
    }
    sum / n
}

/// Needle visibility falls as the needle steepens; long-axis views are best below about 30°
/// (Schafhalter-Zoppoth, McCulloch, Gray, Reg Anesth Pain Med 29:480, 2004): on the screen the
/// in-plane needle's echo falls strictly from 10° to 70°.
#[test]
fn in_plane_needle_dims_as_it_steepens() {
    let levels: Vec<(f64, f64)> = (1..=7)
        .map(|k| (10.0 * k as f64, in_plane_needle_level(10.0 * k as f64)))
        .collect();
    for w in levels.windows(2) {
        assert!(w[1].1 < w[0].1, "{levels:?}");
    }
    // Best below about 30°: most of the loss comes before 30°.
    let (l10, l30, l50) = (levels[0].1, levels[2].1, levels[4].1);
    assert!(l10 - l30 > 6.0 && l10 - l30 > l30 - l50, "{levels:?}");
}

/// A needle square to the beam rings inside its lumen: copies below it every ID·1540/c_fluid
/// ≈ 0.43 mm for 22G (FACTS.md "Needles" [calc]). The probe is rocked −20° so that a needle
/// inserted at 20° is square to the beam.
#[test]
fn perpendicular_needle_shows_reverberation_copies() {
    let s = scene(|v| {
        v["probe"]["pose"]["rock_deg"] = json!(-20);
        v["probe"]["frequency_mhz"] = json!(15);
        v["needle"]["angle_deg"] = json!(20);
        v["needle"]["entry"] = json!({"x_mm": -40, "y_mm": 0});
        v["needle"]["inserted_mm"] = json!(60);
        v["display"]["gain_db"] = json!(-30);
    });
    let f = render(&s, 300, 1200);
    // The shaft is horizontal on screen; find its row in the centre column.
    let x = f.x_of(0.0);
    let column: Vec<u8> = (0..f.height()).map(|y| f.grey[y * f.width() + x]).collect();
    let (y_needle, _) = column.iter().enumerate().max_by_key(|(_, g)| **g).unwrap();
    let v_needle = f.meta.top_left_mm.depth_mm + y_needle as f64 * f.meta.mm_per_px.depth;
    let spacing = 0.413 * 1540.0 / 1480.0;
    let level = |v: f64| f.db_of(f.grey_at(0.0, v) as f64);
    for k in 1..=3 {
        let peak = level(v_needle + k as f64 * spacing);
        let trough = level(v_needle + (k as f64 - 0.5) * spacing);
        assert!(
            peak > trough + 3.0,
            "copy {k}: peak {peak:.1} dB, trough {trough:.1} dB"
        );
    }
}

/// Elevation integration: a needle lying in plane but moved off the centre plane fades
/// smoothly — still visible just past the slab edge, no step at the edge (the slab edge is the
/// two-way −6 dB width, `scene::beam` docs).
#[test]
fn needle_fades_across_the_slab_edge_without_a_step() {
    let level_at = |offset_mm: f64| {
        let s = scene(|v| {
            v["needle"]["entry"] = json!({"x_mm": -18, "y_mm": offset_mm});
            v["needle"]["angle_deg"] = json!(15);
            v["needle"]["inserted_mm"] = json!(12);
            v["display"]["gain_db"] = json!(-20);
        });
        let f = render(&s, 400, 400);
        let (sa, ca) = 15f64.to_radians().sin_cos();
        let mut best = 0u8;
        for k in 0..40 {
            let s_mm = 4.0 + 0.1 * k as f64;
            best = best.max(f.grey_at(-18.0 + s_mm * ca, s_mm * sa));
        }
        (f.db_of(best as f64), f.mean_db((5.0, 15.0), (5.0, 15.0)))
    };
    // Uniform slab 1 mm thick: the edge is at 0.5 mm.
    let offsets = [0.0, 0.2, 0.4, 0.5, 0.6, 0.8, 1.0];
    let levels: Vec<f64> = offsets.iter().map(|&o| level_at(o).0).collect();
    for w in levels.windows(2) {
        assert!(w[1] < w[0] + 0.5, "{levels:?}");
        assert!(w[0] - w[1] < 8.0, "a step in {levels:?}");
    }
    let (edge, tissue) = level_at(0.6);
    assert!(
        edge > tissue + 6.0,
        "just past the edge the needle still shows: {edge:.1} vs {tissue:.1}"
    );
}

/// Partial volume: a fluid pocket thinner than the slab is not black — the tissue around it in
/// elevation fills it in — while a pocket thicker than the slab is anechoic (FACTS.md "Beam":
/// slice thickness about 1–2 mm at the focus, from memory; here a uniform 2 mm slab).
#[test]
fn thin_fluid_pocket_fills_in() {
    let level = |elevation_semi_axis_mm: f64| {
        let s = scene(|v| {
            v["probe"]["elevation"] = json!({"model": "uniform", "thickness_mm": 2.0});
            v["structures"] = json!([{"id": "f", "kind": "fluid", "centre_mm": [0, 0, 15],
                "semi_axes_mm": [4, elevation_semi_axis_mm, 3]}]);
        });
        let f = render(&s, 400, 400);
        f.mean_db((-1.5, 1.5), (14.0, 16.0))
    };
    let thick = level(5.0);
    let thin = level(0.3);
    assert!(
        thin > thick + 10.0,
        "thin {thin:.1} dB, thick {thick:.1} dB"
    );
}

/// Two grey levels give exactly two values (the contrast/differentiation trade; common
/// practice, no source).
#[test]
fn two_grey_levels_give_exactly_two_values() {
    for (name, mut s) in echo_support::demo_scenes() {
        s.display.grey_levels = 2;
        s.display.doppler.mode = DopplerMode::Off;
        let f = render(&s, 160, 120);
        let mut seen = [false; 256];
        for &g in &f.grey {
            seen[g as usize] = true;
        }
        for px in f.rgba.chunks(4) {
            seen[px[0] as usize] = true;
            seen[px[1] as usize] = true;
            seen[px[2] as usize] = true;
            assert_eq!(px[3], 255);
        }
        let values: Vec<usize> = (0..256).filter(|&g| seen[g]).collect();
        assert_eq!(values, vec![0, 255], "{name}");
    }
}

/// Gain and time-gain bands move the grey level by the dB set, as a scanner's controls do
/// (common practice, no source): +6 dB of gain adds 6·255/DR grey levels where nothing clips;
/// a band raised by 10 dB brightens its own depth only.
#[test]
fn gain_and_tgc_bands_shift_levels_by_their_decibels() {
    let base = scene(|_| {});
    let f0 = render(&base, 300, 300);
    let region = ((-10.0, 10.0), (8.0, 12.0));
    let mut brighter = base.clone();
    brighter.display.gain_db = 6.0;
    let f1 = render(&brighter, 300, 300);
    let d = f1.mean_db(region.0, region.1) - f0.mean_db(region.0, region.1);
    assert!((d - 6.0).abs() < 0.3, "gain step {d:.2} dB");
    // Eight bands over 40 mm: band 5 up by 10 dB.
    let mut banded = base.clone();
    banded.display.tgc_db = vec![0.0, 0.0, 0.0, 0.0, 0.0, 10.0, 0.0, 0.0];
    let f2 = render(&banded, 300, 300);
    // Band centres at 2.5, 7.5, …, 37.5 mm; index 5 is centred at 27.5 mm.
    let at_band = f2.mean_db((-10.0, 10.0), (27.3, 27.7)) - f0.mean_db((-10.0, 10.0), (27.3, 27.7));
    let above = f2.mean_db(region.0, region.1) - f0.mean_db(region.0, region.1);
    assert!((at_band - 10.0).abs() < 0.6, "band {at_band:.2} dB");
    assert!(above.abs() < 0.05, "outside the band {above:.2} dB");
}

/// Higher frequency: finer grain and less penetration (FACTS.md "Sound, wavelength,
/// attenuation": d_max = budget/(2·α·f)).
#[test]
fn frequency_changes_penetration_and_grain() {
    let at = |f_mhz: f64| {
        let s = scene(|v| v["probe"]["frequency_mhz"] = json!(f_mhz));
        render(&s, 400, 400)
    };
    let (low, high) = (at(5.0), at(15.0));
    // Deep tissue (muscle, 0.96 dB/cm/MHz, compensated at 0.5) is darker at 15 MHz by about
    // 2·0.46·Δf·depth more than near the face.
    let drop =
        |f: &Frame| f.mean_db((-15.0, 15.0), (3.0, 6.0)) - f.mean_db((-15.0, 15.0), (33.0, 36.0));
    let extra = drop(&high) - drop(&low);
    let predicted = round_trip_attenuation_db(0.96 - 0.5, 10.0, 30.0);
    assert!(
        (extra - predicted).abs() < 2.0,
        "extra loss {extra:.1} dB vs {predicted:.1} dB"
    );
    // Grain: neighbouring rows differ less when the speckle is coarser.
    let roughness = |f: &Frame| {
        let mut s = 0.0;
        let mut n = 0.0;
        for y in f.y_of(4.0)..f.y_of(8.0) {
            for x in f.x_of(-15.0)..f.x_of(15.0) {
                let a = f.grey[y * f.width() + x] as f64;
                let b = f.grey[(y + 1) * f.width() + x] as f64;
                s += (a - b).abs();
                n += 1.0;
            }
        }
        s / n
    };
    assert!(roughness(&high) > 1.3 * roughness(&low));
}

/// Aerated lung under the pleura: a near-total reflector (tissue/air R > 0.998, FACTS.md) shows
/// a bright line, a black field behind it, and copies of the line at multiples of its depth
/// (reverberation between the pleura and the probe face).
#[test]
fn air_interface_is_bright_with_reverberation_copies() {
    let s = scene(|v| {
        v["tissue"] = json!({"layers": [{"kind": "skin", "thickness_mm": 1.5},
            {"kind": "muscle", "thickness_mm": 8.5}, {"kind": "lung", "thickness_mm": 100}]});
    });
    let f = render(&s, 300, 600);
    // The boundary undulates gently, so take the brightest thin row band near each depth.
    let brightest_row = |v0: f64, v1: f64| {
        let mut best = f64::NEG_INFINITY;
        let mut v = v0;
        while v <= v1 {
            best = best.max(f.mean_db((-1.0, 1.0), (v, v + 0.1)));
            v += 0.05;
        }
        best
    };
    let line = brightest_row(9.0, 11.0);
    let tissue = f.mean_db((-4.0, 4.0), (6.0, 8.0));
    assert!(
        line > tissue + 20.0,
        "pleural line {line:.1} dB vs tissue {tissue:.1} dB"
    );
    let copy = brightest_row(19.0, 21.5);
    let between = f.mean_db((-4.0, 4.0), (14.0, 16.0));
    assert!(
        copy > between + 10.0,
        "first copy {copy:.1} dB vs between {between:.1} dB"
    );
    assert!(
        between < tissue - 30.0,
        "air behind the pleura is black: {between:.1} dB"
    );
}

/// Colour Doppler: no colour where the beam is perpendicular to the flow (f_d = 0 at 90°,
/// FACTS.md); colour where it is oblique; aliasing (both directions' hues in one-way flow) when
/// the scale is low; power mode shows flow without direction.
#[test]
fn doppler_colour_follows_the_beam_to_flow_angle() {
    let coloured = |s: &Scene| {
        let f = render(s, 300, 300);
        let mut toward = 0;
        let mut away = 0;
        for (px, g) in f.rgba.chunks(4).zip(&f.grey) {
            if px[0] != *g || px[1] != *g || px[2] != *g {
                if px[0] > px[2] {
                    toward += 1;
                } else {
                    away += 1;
                }
            }
        }
        (toward, away, f.meta)
    };
    // A vessel along the lateral axis, in plane: flow perpendicular to every beam line.
    let flat = scene(|v| {
        v["structures"] = json!([{"id": "a", "kind": "vessel",
            "path_mm": [[-30, 0, 15], [30, 0, 15]], "radius_mm": 2.5, "flow_cm_s": 30}]);
        v["display"]["doppler"] = json!({"mode": "velocity", "scale_cm_s": 40});
    });
    let (t, a, meta) = coloured(&flat);
    assert_eq!((t, a), (0, 0), "no colour at 90°");
    let legend = meta.doppler.expect("colour on");
    assert_eq!(legend.colours.len(), PALETTE_ENTRIES);
    let rate = meta.frame_rate;
    assert!(
        rate.duplex_hz.unwrap() < rate.b_mode_hz,
        "colour costs frame rate"
    );
    // Sloping 30° up toward +x: flow from −x to +x runs toward the probe.
    let sloped = scene(|v| {
        v["structures"] = json!([{"id": "a", "kind": "vessel",
            "path_mm": [[-17.3, 0, 25], [17.3, 0, 5]], "radius_mm": 2.5, "flow_cm_s": 30}]);
        v["display"]["doppler"] = json!({"mode": "velocity", "scale_cm_s": 80});
    });
    let (t, a, _) = coloured(&sloped);
    assert!(t > 500 && a == 0, "toward {t}, away {a}");
    // Peak 60 cm/s at 60° to the beam: 30 cm/s along it; a 10 cm/s scale aliases.
    let mut aliased = sloped.clone();
    aliased.display.doppler.scale_cm_s = 10.0;
    let (t, a, _) = coloured(&aliased);
    assert!(
        t > 100 && a > 100,
        "aliasing shows both hues: toward {t}, away {a}"
    );
    let mut power = sloped.clone();
    power.display.doppler.mode = DopplerMode::Power;
    let (t, a, meta) = coloured(&power);
    assert!(t + a > 500);
    assert_eq!(meta.doppler.unwrap().mode, "power");
}

/// The same scene gives the same bytes, whether the renderer is fresh or reused after another
/// scene and size (determinism; the wasm build must match `echo_fingerprint` natively).
#[test]
fn same_scene_same_bytes() {
    let demos = echo_support::demo_scenes();
    let mut reused = Renderer::new();
    for (name, s) in &demos {
        let fresh = render(s, 200, 150);
        let _ = reused.render(&demos[0].1, 96, 64).unwrap();
        let again = reused.render(s, 200, 150).unwrap();
        assert_eq!(fresh.rgba, again.rgba(), "{name}");
        assert_eq!(
            echo_fingerprint(s, 200, 150).unwrap(),
            echo_support::fnv1a(&fresh.rgba),
            "{name}"
        );
    }
    let prints: Vec<u64> = demos
        .iter()
        .map(|(_, s)| echo_fingerprint(s, 128, 96).unwrap())
        .collect();
    let mut unique = prints.clone();
    unique.sort_unstable();
    unique.dedup();
    assert_eq!(
        unique.len(),
        prints.len(),
        "different scenes, different images"
    );
}

/// Speckle and texture are anchored to the tissue: sliding the probe by a whole number of
/// pixels slides the picture by as many pixels (common practice, no source).
#[test]
fn moving_the_probe_moves_the_picture_with_the_tissue() {
    let (_, s) = echo_support::demo_scenes()
        .into_iter()
        .find(|(n, _)| n == "forearm-out-of-plane")
        .unwrap();
    let f0 = render(&s, 304, 240);
    let shift_px = 24;
    let mut moved = s.clone();
    moved.probe.pose.x_mm += shift_px as f64 * f0.meta.mm_per_px.lateral;
    let f1 = render(&moved, 304, 240);
    let w = f0.width();
    let (mut same, mut close, mut n) = (0, 0, 0);
    for y in 0..f0.height() {
        for x in shift_px..w {
            let a = f0.grey[y * w + x] as i32;
            let b = f1.grey[y * w + x - shift_px] as i32;
            same += (a == b) as i32;
            close += ((a - b).abs() <= 2) as i32;
            n += 1;
        }
    }
    assert!(
        close as f64 > 0.995 * n as f64,
        "{close} of {n} within 2 levels"
    );
    assert!(same as f64 > 0.9 * n as f64, "{same} of {n} identical");
}

/// Screen sizes are checked with a clear error naming the argument; nothing panics on any valid
/// scene, including curved probes, zero inserted length, odd sizes and random poses.
#[test]
fn sizes_are_validated_and_nothing_panics() {
    let s = scene(|_| {});
    let mut r = Renderer::new();
    assert_eq!(
        r.render(&s, 15, 100).unwrap_err().to_string(),
        "width: must be a whole number of pixels from 16 to 4096, got 15"
    );
    assert_eq!(
        r.render(&s, 100, 5000).unwrap_err().to_string(),
        "height: must be a whole number of pixels from 16 to 4096, got 5000"
    );
    for (w, h) in [(16, 16), (4096, 16), (16, 4096), (17, 333)] {
        let out = r.render(&s, w, h).unwrap();
        assert_eq!(out.rgba().len(), (w * h * 4) as usize);
    }
    let curved = scene(|v| {
        v["probe"]["footprint"] = json!({"kind": "curved", "width_mm": 150, "radius_mm": 57.3});
        v["probe"]["depth_mm"] = json!(300);
        v["probe"]["pose"] = json!({"rock_deg": 60, "tilt_deg": -60, "rotate_deg": 33});
        v["probe"]["elevation"] = json!({"model": "focused", "aperture_mm": 30, "focus_mm": 1});
        v["needle"]["inserted_mm"] = json!(80);
        v["needle"]["angle_deg"] = json!(90);
        v["tissue"] = json!({"layers": [{"kind": "lung", "thickness_mm": 0.1}]});
        v["structures"] = json!([
            {"id": "n", "kind": "nerve", "path_mm": [[0, 0, 5], [0, 0.001, 5]], "radius_mm": 50, "fascicles": 60},
            {"id": "r", "kind": "nerve", "path_mm": [[0, -9, 5], [0, 9, 5], [3, 9, 5]], "radius_mm": 0.05, "root": true},
            {"id": "f", "kind": "fluid", "centre_mm": [0, 0, 0], "semi_axes_mm": [0.1, 100, 0.1]},
            {"id": "v", "kind": "vessel", "path_mm": [[0, 0, 1], [0, 0, 300]], "radius_mm": 3, "flow_cm_s": -300},
            {"id": "b", "kind": "bone", "path_mm": [[-500, 0, 10], [500, 0, 10]], "radius_mm": 50}
        ]);
        v["display"] = json!({"gain_db": 40, "tgc_db": [30, -30, 30, -30], "dynamic_range_db": 20,
            "grey_levels": 3, "doppler": {"mode": "velocity", "scale_cm_s": 1}});
    });
    let out = r.render(&curved, 64, 48).unwrap();
    assert!(out.rgba().chunks(4).all(|p| p[3] == 255));
    let mut rng = 0x2545_f491_4f6c_dd1du64;
    let mut next = || {
        rng ^= rng << 13;
        rng ^= rng >> 7;
        rng ^= rng << 17;
        (rng >> 11) as f64 / (1u64 << 53) as f64
    };
    for k in 0..60 {
        let mut s = echo_support::demo_scenes()[k % 5].1.clone();
        s.probe.pose.rotate_deg = 360.0 * next() - 180.0;
        s.probe.pose.tilt_deg = 120.0 * next() - 60.0;
        s.probe.pose.rock_deg = 120.0 * next() - 60.0;
        s.probe.pose.x_mm = 40.0 * next() - 20.0;
        s.probe.frequency_mhz = 1.0 + 29.0 * next();
        s.needle.inserted_mm = s.needle.length_mm * next();
        s.needle.bevel_roll_deg = 720.0 * next() - 360.0;
        s.display.doppler.mode =
            [DopplerMode::Off, DopplerMode::Velocity, DopplerMode::Power][k % 3];
        let out = r.render(&s, 48 + k as u32, 40).unwrap();
        assert_eq!(out.rgba().len(), (48 + k) * 40 * 4);
    }
}

/// The meta gives the pixel spacing and the centre of pixel (0, 0) so that the page can map
/// pixels to millimetres, and every display setting used.
#[test]
fn meta_maps_pixels_to_millimetres() {
    let s = scene(|v| v["display"]["grey_levels"] = json!(16));
    let f = render(&s, 400, 200);
    let m = &f.meta;
    assert!((m.mm_per_px.lateral - 0.1).abs() < 1e-12);
    assert!((m.mm_per_px.depth - 0.2).abs() < 1e-12);
    assert!((m.top_left_mm.lateral_mm + 19.95).abs() < 1e-12);
    assert!((m.top_left_mm.depth_mm - 0.1).abs() < 1e-12);
    assert_eq!(m.display.grey_levels, 16);
    assert_eq!(m.display.dynamic_range_db, 100.0);
    assert_eq!(m.display.tgc_db.len(), 8);
    assert_eq!(m.footprint, "linear");
    assert!(m.doppler.is_none() && m.frame_rate.duplex_hz.is_none());
    let v = serde_json::to_value(m).unwrap();
    assert!(v["mm_per_px"]["lateral"].is_number());
    assert!(v["top_left_mm"]["lateral_mm"].is_number());
}

/// Fully developed speckle: the echo amplitude (before log compression) of a uniform region is
/// Rayleigh-distributed, mean/std = √(π/(4 − π)) ≈ 1.91 (Burckhardt, IEEE Trans. Sonics
/// Ultrason. 25(1), 1978; Wagner et al., IEEE Trans. Sonics Ultrason. 30(3):156, 1983 — both
/// from memory). Skin has no texture; the user time-gain falls 1.5 dB per 5 mm band so that it
/// cancels skin's lower loss than the automatic time-gain's 0.5 dB/cm/MHz (2·(0.5 − 0.35)·10
/// = 3 dB/cm, Diagnostics 13(5):855 Table 4), leaving a flat mean. The grey levels are turned
/// back into amplitudes through the log compression (FACTS.md "Grey scale").
///
/// Tolerance ±0.03 (1.6 %), three standard errors: the region holds about 17 000 independent
/// speckle cells (36 × 20 mm over cells of 0.27 × 0.15 mm, the resolutions), so the ratio's
/// standard error is about 0.01; the grey quantisation (0.39 dB steps at 100 dB) changes it by
/// well under 0.1 %. Four probe positions 5 mm apart give independent speckle; each must pass.
/// (The earlier speckle gave 1.99.)
#[test]
fn speckle_amplitude_is_rayleigh() {
    for x_mm in [0.0, 5.0, 10.0, 15.0] {
        let s = scene(|v| {
            v["tissue"] = json!({"layers": [{"kind": "skin", "thickness_mm": 200}]});
            v["probe"]["pose"]["x_mm"] = json!(x_mm);
            v["display"]["tgc_db"] = json!([0, -1.5, -3, -4.5, -6, -7.5, -9, -10.5]);
        });
        let f = render(&s, 512, 512);
        let (mut sum, mut sum2, mut n) = (0.0, 0.0, 0.0);
        for y in f.y_of(5.0)..=f.y_of(25.0) {
            for x in f.x_of(-18.0)..=f.x_of(18.0) {
                let g = f.grey[y * f.width() + x];
                assert!(g > 0 && g < 255, "clipped at ({x}, {y})");
                let a = 10f64.powf(f.db_of(g as f64) / 20.0);
                sum += a;
                sum2 += a * a;
                n += 1.0;
            }
        }
        let mean = sum / n;
        let sd = (sum2 / n - mean * mean).sqrt();
        let rayleigh = (std::f64::consts::PI / (4.0 - std::f64::consts::PI)).sqrt();
        assert!((rayleigh - 1.913).abs() < 1e-3);
        assert!(
            (mean / sd - rayleigh).abs() < 0.03,
            "x {x_mm} mm: mean/std {:.3}, Rayleigh {rayleigh:.3}",
            mean / sd
        );
        println!("x {x_mm} mm: amplitude mean/std {:.4}", mean / sd);
    }
}

/// An out-of-plane scene like the demos: 12 MHz, a lens-focused slab (4.5 mm aperture, 14 mm
/// focus, about 0.6 mm thick at 11 mm), muscle, default display settings (gain 0 dB, 60 dB
/// dynamic range, flat time-gain). A 22G needle runs along the elevation axis at
/// `angle_deg` to the skin from 11 mm behind the plane, its axis crossing the centre plane
/// at depth 11·tan(angle) and, with `past_mm` > 0, its tip that far beyond the plane.
fn out_of_plane(angle_deg: f64, past_mm: f64, edit: impl FnOnce(&mut serde_json::Value)) -> Scene {
    let behind = 11.0;
    let inserted = (behind + past_mm) / angle_deg.to_radians().cos();
    scene(|v| {
        v["probe"]["frequency_mhz"] = json!(12);
        v["probe"]["depth_mm"] = json!(30);
        v["probe"]["elevation"] = json!({"model": "focused", "aperture_mm": 4.5, "focus_mm": 14});
        v["needle"] = json!({"gauge": 22, "length_mm": 50, "bevel_deg": 30, "bevel_roll_deg": 0,
            "entry": {"x_mm": 0.5, "y_mm": -behind}, "azimuth_deg": 90,
            "angle_deg": angle_deg, "inserted_mm": inserted});
        v["display"] = json!({});
        edit(v);
    })
}

/// Level (dB) of the out-of-plane dot against the tissue around it: the mean level of a
/// 0.3 × 0.3 mm core (about one resolution cell) centred on the brightest pixel within
/// 1 mm of `centre`, minus the mean level of the tissue 1.5–3 mm to either side over the
/// same depths ± 1.5 mm (both as means of the log-compressed grey, `Frame::mean_db`).
fn dot_contrast_db(f: &Frame, centre: (f64, f64)) -> (f64, (f64, f64)) {
    let (mut best, mut at) = (0u8, centre);
    for y in f.y_of(centre.1 - 1.0)..=f.y_of(centre.1 + 1.0) {
        for x in f.x_of(centre.0 - 0.5)..=f.x_of(centre.0 + 0.5) {
            let g = f.grey[y * f.width() + x];
            if g > best {
                best = g;
                at = (
                    f.meta.top_left_mm.lateral_mm + x as f64 * f.meta.mm_per_px.lateral,
                    f.meta.top_left_mm.depth_mm + y as f64 * f.meta.mm_per_px.depth,
                );
            }
        }
    }
    let core = f.mean_db((at.0 - 0.15, at.0 + 0.15), (at.1 - 0.15, at.1 + 0.15));
    let depths = (at.1 - 1.5, at.1 + 1.5);
    let around = 0.5
        * (f.mean_db((at.0 - 3.0, at.0 - 1.5), depths)
            + f.mean_db((at.0 + 1.5, at.0 + 3.0), depths));
    (core - around, at)
}

/// A steel needle crossing the slab out of plane reads as a dot clearly above the speckle.
/// Threshold 10 dB above the tissue's mean level: fully developed speckle's intensity is
/// exponential and its mean log level sits 2.5 dB below its mean (10·log10 e^−γ, γ Euler's
/// constant), so +10 dB is 5.6 times the mean intensity, which only e^−5.6 ≈ 0.4 % of speckle
/// pixels reach (Goodman, Speckle Phenomena in Optics, ch. 2, from memory). The shaft alone
/// (tip 3 mm beyond the plane) at 45° and 55° to the skin, as in the demos: the beam meets it
/// 45° and 55° off perpendicular, where only the diffuse part of its echo is left
/// (0.4·cos δ/1.4 of the perpendicular amplitude, about −14 and −16 dB; a needle square to the
/// beam is 34 dB above muscle), so the model predicts about +18 to +20 dB.
#[test]
fn out_of_plane_needle_dot_reads_above_the_speckle() {
    for angle in [45.0, 55.0] {
        let f = render(&out_of_plane(angle, 3.0, |_| {}), 640, 505);
        let crossing = (0.5, 11.0 * f64::tan(angle.to_radians()));
        let (contrast, at) = dot_contrast_db(&f, crossing);
        assert!(
            (at.0 - crossing.0).abs() < 0.3 && (at.1 - crossing.1).abs() < 0.6,
            "{angle}°: the brightest point {at:?} is not the crossing {crossing:?}"
        );
        println!("out-of-plane dot at {angle}°: {contrast:.1} dB above the tissue");
        assert!(
            contrast >= 10.0,
            "{angle}°: the dot is only {contrast:.1} dB above the tissue"
        );
    }
}

/// With the bevel in the slab the tip shows as a double dot: the heel (where the bevel starts,
/// on the side it faces) and the point (at the tip, on the other side) are edges that scatter
/// back at any angle (Hopkins & Bradley, Clin Radiol 56:499, 2001: the bevel facing the
/// transducer shows the tip best). A 45° needle with its bevel facing the skin, the bevel's
/// middle on the centre plane of a 1 mm slab: heel and point lie 1.13 mm above and 0.25 mm
/// below the tip's axis depth (22G, 30° bevel: bevel 0.718/tan 30° = 1.24 mm, FACTS.md
/// "Needles"); each stands 3 dB or more above the shaft's echo midway between them and
/// 10 dB above the tissue.
#[test]
fn bevel_in_the_slab_shows_heel_and_point() {
    let (angle, past) = (45f64, 0.44);
    let s = out_of_plane(angle, past, |v| {
        v["probe"]["elevation"] = json!({"model": "uniform", "thickness_mm": 1.0});
    });
    let f = render(&s, 640, 505);
    let (sa, ca) = angle.to_radians().sin_cos();
    let (r, bevel) = (0.718 / 2.0, 0.718 / 30f64.to_radians().tan());
    let tip = (11.0 + past) * angle.to_radians().tan();
    let heel = tip - bevel * sa - r * ca;
    let point = tip + r * ca;
    // Brightest pixel within ±0.1 mm across and ±0.15 mm along the beam (the echoes are
    // smooth there: the needle's echo is far above the speckle).
    let level = |v: f64| {
        let mut best = 0u8;
        for y in f.y_of(v - 0.15)..=f.y_of(v + 0.15) {
            for x in f.x_of(0.4)..=f.x_of(0.6) {
                best = best.max(f.grey[y * f.width() + x]);
            }
        }
        f.db_of(best as f64)
    };
    let (l_heel, l_point, l_mid) = (level(heel), level(point), level(0.5 * (heel + point)));
    let tissue = f.mean_db((2.0, 4.0), (heel - 1.0, point + 1.0));
    println!("heel {l_heel:.1} dB, point {l_point:.1} dB, shaft between {l_mid:.1} dB, tissue {tissue:.1} dB");
    for (name, l) in [("heel", l_heel), ("point", l_point)] {
        assert!(
            l > l_mid + 3.0 && l > tissue + 10.0,
            "{name} {l:.1} dB, shaft between {l_mid:.1} dB, tissue {tissue:.1} dB"
        );
    }
}

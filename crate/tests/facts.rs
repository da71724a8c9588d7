//! Table values from shared/FACTS.md, each with its source named beside the check.

use slicewise::*;

/// Stubs gauge chart nominal ODs (FACTS.md "Needles", [src]).
#[test]
fn gauge_outer_diameters_match_the_stubs_chart() {
    let chart = [
        (18, 1.270),
        (19, 1.067),
        (20, 0.908),
        (21, 0.819),
        (22, 0.718),
        (23, 0.641),
        (24, 0.565),
        (25, 0.514),
        (26, 0.464),
        (27, 0.413),
    ];
    for (g, od) in chart {
        assert_eq!(gauge_outer_diameter_mm(g), Some(od), "gauge {g}");
    }
    assert_eq!(gauge_outer_diameter_mm(17), None);
    assert_eq!(gauge_outer_diameter_mm(28), None);
}

/// ISO 9626:2016 outer-diameter ranges, regular wall — from memory (FACTS.md [mem]); every
/// nominal value lies inside its range.
#[test]
fn nominal_diameters_lie_in_iso_9626_ranges() {
    let iso = [
        (18, 1.200, 1.300),
        (20, 0.860, 0.920),
        (21, 0.800, 0.830),
        (22, 0.698, 0.730),
        (25, 0.500, 0.530),
    ];
    for (g, lo, hi) in iso {
        let od = gauge_outer_diameter_mm(g).unwrap();
        assert!(od >= lo && od <= hi, "gauge {g}: {od} not in [{lo}, {hi}]");
    }
}

fn needle(gauge: u8, bevel_deg: f64) -> Needle {
    Needle {
        size: NeedleSize::Gauge { gauge },
        length_mm: 50.0,
        bevel_deg,
        bevel_roll_deg: 0.0,
        entry: Entry {
            x_mm: 0.0,
            y_mm: 0.0,
        },
        azimuth_deg: 0.0,
        angle_deg: 45.0,
        inserted_mm: 20.0,
    }
}

/// Bevel length OD/tan β: 22G at 30° → 1.24 mm, at 15° → 2.68 mm (FACTS.md [calc]).
#[test]
fn bevel_length_worked_values() {
    assert!((needle(22, 30.0).bevel_length_mm() - 1.24).abs() < 0.005);
    assert!((needle(22, 15.0).bevel_length_mm() - 2.68).abs() < 0.005);
    assert_eq!(needle(22, 90.0).bevel_length_mm(), 0.0);
}

/// λ = c/f with c = 1540 m/s: 5 MHz 0.308 mm, 7.5 MHz 0.205 mm, 10 MHz 0.154 mm,
/// 15 MHz 0.103 mm (FACTS.md "Sound", [calc]).
#[test]
fn wavelengths_at_standard_frequencies() {
    for (f, lambda) in [(5.0, 0.308), (7.5, 0.205), (10.0, 0.154), (15.0, 0.103)] {
        assert!(
            (wavelength_mm(f) - lambda).abs() < 0.0006,
            "{f} MHz: {}",
            wavelength_mm(f)
        );
    }
    // Round trip 12.99 µs per cm of depth (FACTS.md [calc]): 2·10 mm / 1.540 mm/µs.
    assert!((2.0 * 10.0 / (SPEED_OF_SOUND_M_S * 1e-3) - 12.99).abs() < 0.005);
}

/// Width at the focus, two-way −6 dB ≈ 0.886·λF/H (FACTS.md "Beam" [calc from the sinc
/// pattern]); worked example 7.5 MHz, F = 20 mm, H = 5 mm → 0.73 mm.
#[test]
fn focus_width_matches_the_published_formula() {
    let b = FocusedBeam::new(5.0, 20.0, 7.5);
    assert!(
        (b.focus_thickness_mm - 0.73).abs() < 0.005,
        "{}",
        b.focus_thickness_mm
    );
    assert!((b.thickness_mm(20.0) - b.focus_thickness_mm).abs() < 1e-12);
    for (h, f, mhz) in [(4.0, 15.0, 12.0), (5.0, 18.0, 10.0), (13.0, 60.0, 4.0)] {
        let b = FocusedBeam::new(h, f, mhz);
        assert!((b.focus_thickness_mm - 0.886 * wavelength_mm(mhz) * f / h).abs() < 1e-12);
    }
}

/// The 0.886 factor derived: the two-way pattern of a rectangular aperture is sinc², whose
/// half-amplitude (−6 dB) full width in units of λF/H is 2x where sinc(πx)² = 1/2; and the
/// one-way −6 dB full width is 1.21 (FACTS.md "Beam").
#[test]
fn beam_focus_width_matches_sinc_pattern() {
    let sinc = |x: f64| (std::f64::consts::PI * x).sin() / (std::f64::consts::PI * x);
    let solve = |target: f64| {
        let (mut lo, mut hi) = (1e-9, 1.0);
        for _ in 0..200 {
            let m = 0.5 * (lo + hi);
            if sinc(m) > target {
                lo = m
            } else {
                hi = m
            }
        }
        2.0 * lo
    };
    assert!((solve(0.5f64.sqrt()) - TWO_WAY_6DB_FOCUS_FACTOR).abs() < 0.001);
    assert!((solve(0.5) - 1.21).abs() < 0.005);
}

/// Gaussian-beam growth against the worked table (FACTS.md "Beam" [calc]): 10 MHz,
/// w0 = 0.5 mm, zf = 20 mm → zR = 5.10 mm, w = 1.55 / 1.10 / 0.50 / 1.10 / 2.02 mm at
/// z = 5 / 10 / 20 / 30 / 40 mm, within 2 %.
#[test]
fn gaussian_growth_matches_the_worked_table() {
    let lambda = wavelength_mm(10.0);
    let zr = std::f64::consts::PI * 0.25 / lambda;
    assert!((zr - 5.10).abs() / 5.10 < 0.02);
    for (z, w) in [
        (5.0, 1.55),
        (10.0, 1.10),
        (20.0, 0.50),
        (30.0, 1.10),
        (40.0, 2.02),
    ] {
        let ours = gaussian_radius_mm(0.5, 20.0, lambda, z);
        assert!((ours - w).abs() / w < 0.02, "z = {z}: {ours} vs {w}");
    }
    // The slab model uses exactly this growth: T(z)/T(F) = w(z)/w0 below the cap.
    let b = FocusedBeam::new(5.0, 20.0, 10.0);
    for z in [12.0, 16.0, 24.0, 30.0] {
        let expect = gaussian_radius_mm(b.waist_radius_mm, 20.0, lambda, z) / b.waist_radius_mm;
        assert!((b.thickness_mm(z) / b.focus_thickness_mm - expect).abs() < 1e-12);
    }
    // FWHM (intensity) = 1.177·w (FACTS.md).
    assert!((GAUSSIAN_FWHM_PER_RADIUS - 1.177).abs() < 0.0005);
}

/// Never wider than the aperture near the face (DESIGN.md); narrowest at the focus.
#[test]
fn focused_slab_is_capped_and_narrowest_at_focus() {
    let b = FocusedBeam::new(5.0, 18.0, 12.0);
    for i in 0..=600 {
        let z = i as f64 * 0.1;
        let t = b.thickness_mm(z);
        assert!(t <= 5.0 + 1e-12);
        assert!(t >= b.focus_thickness_mm - 1e-12);
    }
    // Far past the focus (4F) the Gaussian spreads to ≈ 1.5·H; the cap holds it at H.
    let deep = FocusedBeam::new(5.0, 10.0, 10.0);
    assert!(deep.uncapped_thickness_mm(40.0) > 5.0);
    assert_eq!(deep.thickness_mm(40.0), 5.0);
    // Slab thickness at the focus of 7–12 MHz linear arrays with 5 mm elements and an
    // 18–20 mm lens: FACTS.md says ≈ 1–2 mm measured [mem]; the diffraction-limited −6 dB
    // model is thinner (0.4–0.7 mm) — the model is the ideal lens, stated in the docs.
    let t7 = FocusedBeam::new(5.0, 20.0, 7.0).focus_thickness_mm;
    assert!(t7 > 0.4 && t7 < 1.0);
}

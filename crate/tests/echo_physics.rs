//! The echo image's formulas against published worked values (shared FACTS.md), each with its
//! source named beside the check.

use slicewise::*;

/// Log compression grey = 255·clamp((20·log10(A/Amax) + DR)/DR, 0, 1): DR 60 dB maps
/// 0.1 → 170, 0.01 → 85, 0.001 → 0; DR 40 dB maps 0.1 → 127.5 (FACTS.md "Grey scale",
/// formula from public simulation code, values [calc]).
#[test]
fn log_compression_worked_values() {
    assert!((log_compress(0.1, 60.0) - 170.0).abs() < 1e-9);
    assert!((log_compress(0.01, 60.0) - 85.0).abs() < 1e-9);
    assert!(log_compress(0.001, 60.0).abs() < 1e-9);
    assert!((log_compress(0.1, 40.0) - 127.5).abs() < 1e-9);
    // Full scale is white; beyond full scale clips; nothing is below black.
    assert_eq!(log_compress(1.0, 60.0), 255.0);
    assert_eq!(log_compress(3.0, 60.0), 255.0);
    assert_eq!(log_compress(1e-9, 60.0), 0.0);
    assert_eq!(log_compress(0.0, 60.0), 0.0);
}

/// R = ((Z2 − Z1)/(Z2 + Z1))²: tissue/air > 0.998, tissue/steel ≈ 0.866, fat/muscle 0.0140,
/// blood/muscle 5.8e-4, tissue/bone 0.36–0.43 (FACTS.md "Impedance and reflection": formula
/// from any physics text; impedances from Sensors 23:5942 Table A2 and OpenStax College
/// Physics Table 17.5; steel ≈ 45 MRayl from memory).
#[test]
fn reflection_coefficients() {
    let tissue_air = intensity_reflection(Z_SOFT_TISSUE_MRAYL, Z_AIR_MRAYL);
    assert!(tissue_air > 0.998, "{tissue_air}");
    assert!((tissue_air - 0.99895).abs() < 2e-4);
    let steel = intensity_reflection(Z_SOFT_TISSUE_MRAYL, Z_STEEL_MRAYL);
    assert!((steel - 0.866).abs() < 0.002, "{steel}");
    assert!((intensity_reflection(1.34, 1.70) - 0.0140).abs() < 1e-4);
    assert!((intensity_reflection(1.62, 1.70) - 5.8e-4).abs() < 0.1e-4);
    for z_bone in [6.5, 7.8] {
        let r = intensity_reflection(Z_SOFT_TISSUE_MRAYL, z_bone);
        assert!((0.355..=0.435).contains(&r), "{z_bone}: {r}"); // 0.36–0.43 to two places
    }
    // Transmission is what is not reflected, whichever side the sound comes from.
    assert_eq!(
        intensity_reflection(1.34, 1.70),
        intensity_reflection(1.70, 1.34)
    );
}

/// f_d = 2·f0·v·cos θ / c: 5 MHz, 0.15 m/s, 0° → 974 Hz (FACTS.md, a worked textbook
/// problem [src]); 5 MHz, 0.5 m/s, 60° → 1623 Hz; 10 MHz, 1 m/s, 60° → 6494 Hz [calc];
/// 90° → 0 Hz.
#[test]
fn doppler_worked_examples() {
    assert!((doppler_shift_hz(5.0, 15.0, 0.0) - 974.0).abs() < 0.1);
    assert!((doppler_shift_hz(5.0, 50.0, 60.0) - 1623.4).abs() < 0.1);
    assert!((doppler_shift_hz(10.0, 100.0, 60.0) - 6493.5).abs() < 0.1);
    assert_eq!(doppler_shift_hz(5.0, 50.0, 90.0), 0.0);
    assert_eq!(doppler_shift_hz(5.0, 50.0, -90.0), 0.0);
    // Flow away from the probe gives the opposite sign.
    assert!((doppler_shift_hz(5.0, 15.0, 180.0) + 974.0).abs() < 0.1);
}

/// Aliasing when |f_d| > PRF/2 (Nyquist; FACTS.md "Doppler"); the displayed shift wraps into
/// [−PRF/2, PRF/2).
#[test]
fn aliasing_threshold() {
    let prf = 2000.0;
    assert!(!aliases(999.9, prf));
    assert!(!aliases(1000.0, prf));
    assert!(aliases(1000.1, prf));
    assert!(aliases(-1000.1, prf));
    assert_eq!(aliased_shift_hz(999.9, prf), 999.9);
    assert!((aliased_shift_hz(1000.5, prf) + 999.5).abs() < 1e-9);
    assert!((aliased_shift_hz(-1200.0, prf) - 800.0).abs() < 1e-9);
    assert!((aliased_shift_hz(4300.0, prf) - 300.0).abs() < 1e-9);
    // The velocity scale is the aliasing velocity along the beam: PRF = 4·f0·v/c, so flow at
    // exactly the scale sits at the Nyquist limit.
    let prf = prf_for_scale_hz(5.0, 15.0);
    assert!((doppler_shift_hz(5.0, 15.0, 0.0) - prf / 2.0).abs() < 1e-6);
    // The depth caps the PRF: one pulse must return before the next, c/(2·d).
    assert!((max_prf_hz(77.0) - 10_000.0).abs() < 1e-6);
}

/// Penetration d = budget/(2·α·f): 60 dB at 0.5 dB/cm/MHz → 12 cm at 5 MHz, 6 cm at 10 MHz,
/// 4 cm at 15 MHz; posterior enhancement below 8 mm of blood at 10 MHz against 0.5 dB/cm/MHz
/// tissue ≈ +5.6 dB (FACTS.md "Sound, wavelength, attenuation" and "Grey scale" [calc];
/// blood 0.15 dB/cm/MHz from Diagnostics 13(5):855 Table 4).
#[test]
fn attenuation_worked_values() {
    assert!((penetration_mm(60.0, TGC_REFERENCE_DB_CM_MHZ, 5.0) - 120.0).abs() < 1e-9);
    assert!((penetration_mm(60.0, TGC_REFERENCE_DB_CM_MHZ, 10.0) - 60.0).abs() < 1e-9);
    assert!((penetration_mm(60.0, TGC_REFERENCE_DB_CM_MHZ, 15.0) - 40.0).abs() < 1e-9);
    let gain =
        round_trip_attenuation_db(0.5, 10.0, 8.0) - round_trip_attenuation_db(0.15, 10.0, 8.0);
    assert!((gain - 5.6).abs() < 1e-9);
}

/// Visibility falls as the needle steepens (Schafhalter-Zoppoth, McCulloch, Gray, Reg Anesth
/// Pain Med 29:480, 2004): the model's shaft echo falls strictly from a beam-to-needle angle of
/// 90° to 0°.
#[test]
fn needle_echo_model_falls_as_the_beam_aligns_with_the_shaft() {
    let mut last = f64::INFINITY;
    for tenth in (0..=900).rev() {
        let angle = tenth as f64 / 10.0;
        let a = needle_echo_amplitude(angle);
        assert!(a < last, "{angle}°: {a} not below {last}");
        last = a;
    }
    assert_eq!(needle_echo_amplitude(90.0), 1.0);
}

/// A plain needle: 60–76 units at 90° beam-to-needle and about 5 at 15° (Nichols et al., J Vasc
/// Interv Radiol 14:1553, 2003), a ratio of 12–15. The model's ratio must be of the same order
/// (within a factor 3 either way), reading the published units as linear in echo amplitude.
#[test]
fn needle_perpendicular_to_grazing_ratio_matches_the_published_order() {
    let ratio = needle_echo_amplitude(90.0) / needle_echo_amplitude(15.0);
    assert!(ratio > 12.0 / 3.0 && ratio < 15.0 * 3.0, "ratio {ratio}");
}

/// Reverberation copies sit below the needle every lumen ID × 1540/c_fluid: 22G → ≈ 0.43 mm
/// (FACTS.md "Needles" [calc]; 22G regular-wall lumen 0.413 mm from the Stubs chart, from
/// memory).
#[test]
fn needle_reverberation_spacing() {
    let mut n = Needle {
        size: NeedleSize::Gauge { gauge: 22 },
        length_mm: 50.0,
        bevel_deg: 30.0,
        bevel_roll_deg: 0.0,
        entry: Entry {
            x_mm: 0.0,
            y_mm: 0.0,
        },
        azimuth_deg: 0.0,
        angle_deg: 30.0,
        inserted_mm: 20.0,
    };
    assert!((reverberation_spacing_mm(&n) - 0.43).abs() < 0.005);
    // A larger bore rings more slowly.
    n.size = NeedleSize::Gauge { gauge: 18 };
    assert!(reverberation_spacing_mm(&n) > 0.8);
}

/// Reducing the grey scale to n levels keeps n evenly spaced values, nearest first (common
/// practice, no source): two levels are black and white only.
#[test]
fn grey_levels_are_evenly_spaced() {
    for n in [2u32, 3, 4, 8, 16, 255, 256] {
        let mut seen: Vec<u8> = (0..=255u8).map(|g| quantise_grey(g, n)).collect();
        seen.sort_unstable();
        seen.dedup();
        assert_eq!(seen.len(), n as usize, "{n} levels");
        assert_eq!(seen[0], 0);
        assert_eq!(*seen.last().unwrap(), 255);
    }
}

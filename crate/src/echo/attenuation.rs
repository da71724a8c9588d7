//! Attenuation along a scan line, the automatic time-gain compensation for the soft-tissue
//! average, and the penetration depth that follows.
//!
//! Round-trip loss to range r through a tissue of attenuation α (dB/cm/MHz) at f MHz is
//! 2·α·f·r (r in cm). Scanners compensate depth with a time-gain curve for the soft-tissue
//! average, 0.5 dB/cm/MHz (common practice; the IEC QA phantom background is 0.5 ± 0.1
//! dB/cm/MHz, FACTS.md). The image sums each material's own loss along each line, so whatever
//! attenuates less than the average (fluid, blood) leaves the tissue below it brighter
//! (posterior enhancement) and whatever attenuates more (bone, air) leaves a shadow: nothing is
//! painted on.

use super::tissue::Acoustic;

/// Soft-tissue average attenuation that the automatic time-gain curve compensates,
/// dB/cm/MHz (common practice, FACTS.md).
pub const TGC_REFERENCE_DB_CM_MHZ: f64 = 0.5;

/// Round-trip attenuation, dB, through `path_mm` of tissue with `alpha_db_cm_mhz` at
/// `frequency_mhz` (linear frequency law).
///
/// ```
/// // 8 mm of blood instead of 0.5 dB/cm/MHz tissue at 10 MHz: (0.5 − 0.15)·10·0.8·2 ≈ 5.6 dB.
/// let gain = slicewise::round_trip_attenuation_db(0.5, 10.0, 8.0)
///     - slicewise::round_trip_attenuation_db(0.15, 10.0, 8.0);
/// assert!((gain - 5.6).abs() < 1e-9);
/// ```
pub fn round_trip_attenuation_db(alpha_db_cm_mhz: f64, frequency_mhz: f64, path_mm: f64) -> f64 {
    2.0 * alpha_db_cm_mhz * frequency_mhz * path_mm / 10.0
}

/// Penetration depth, mm, for a round-trip loss budget: d = budget / (2·α·f).
///
/// ```
/// // 60 dB at 0.5 dB/cm/MHz and 5 MHz → 12 cm (FACTS.md).
/// assert!((slicewise::penetration_mm(60.0, 0.5, 5.0) - 120.0).abs() < 1e-9);
/// ```
pub fn penetration_mm(budget_db: f64, alpha_db_cm_mhz: f64, frequency_mhz: f64) -> f64 {
    budget_db / (2.0 * alpha_db_cm_mhz * frequency_mhz) * 10.0
}

/// Attenuation of a material at `frequency_mhz`, dB/cm (α1·f^n).
pub(crate) fn alpha_db_cm(m: &Acoustic, frequency_mhz: f64) -> f64 {
    m.atten_db_cm_1mhz * libm::pow(frequency_mhz, m.atten_exponent)
}

/// Two-way intensity transmission factor across one step of `step_mm` of a material:
/// 10^(−2·α·step/10).
pub(crate) fn step_transmission(m: &Acoustic, frequency_mhz: f64, step_mm: f64) -> f32 {
    let loss_db = 2.0 * alpha_db_cm(m, frequency_mhz) * step_mm / 10.0;
    libm::pow(10.0, -loss_db / 10.0) as f32
}

/// Automatic time-gain compensation at range `range_mm`, dB (the soft-tissue average).
pub(crate) fn auto_tgc_db(frequency_mhz: f64, range_mm: f64) -> f64 {
    round_trip_attenuation_db(TGC_REFERENCE_DB_CM_MHZ, frequency_mhz, range_mm)
}

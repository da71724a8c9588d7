//! The display chain: overall gain, time-gain bands, log compression to a dynamic range and an
//! optional reduction to a few grey levels.
//!
//! Log compression (FACTS.md, from public simulation code):
//! grey = 255·clamp((20·log10(A/Amax) + DR)/DR, 0, 1); DR 60 dB maps A/Amax = 0.1 → 170,
//! 0.01 → 85, 0.001 → 0. Amax is the display's full scale, fixed (not the frame's maximum), so
//! that gain behaves like a scanner's gain knob.

use crate::scene::DisplaySettings;

/// Grey value 0..=255 (unrounded) of an echo amplitude ratio A/Amax after log compression to
/// `dynamic_range_db`.
///
/// ```
/// assert!((slicewise::log_compress(0.1, 60.0) - 170.0).abs() < 1e-9);
/// assert!((slicewise::log_compress(0.1, 40.0) - 127.5).abs() < 1e-9);
/// assert_eq!(slicewise::log_compress(0.001, 60.0), 0.0);
/// ```
pub fn log_compress(amplitude_ratio: f64, dynamic_range_db: f64) -> f64 {
    if amplitude_ratio.is_nan() || amplitude_ratio <= 0.0 {
        return 0.0;
    }
    let level_db = 20.0 * libm::log10(amplitude_ratio);
    255.0 * ((level_db + dynamic_range_db) / dynamic_range_db).clamp(0.0, 1.0)
}

/// Grey value after reducing 0..=255 to `levels` evenly spaced levels (2..=256): the nearest
/// level, so two levels give exactly black and white.
///
/// ```
/// assert_eq!(slicewise::quantise_grey(100, 2), 0);
/// assert_eq!(slicewise::quantise_grey(200, 2), 255);
/// assert_eq!(slicewise::quantise_grey(128, 3), 128);
/// assert_eq!(slicewise::quantise_grey(77, 256), 77);
/// ```
pub fn quantise_grey(grey: u8, levels: u32) -> u8 {
    let n = levels.clamp(2, 256);
    if n == 256 {
        return grey;
    }
    let steps = n - 1;
    // Nearest level k = round(g·steps/255), shown at round(k·255/steps); integer arithmetic.
    let k = (grey as u32 * steps * 2 + 255) / 510;
    ((k * 255 * 2 + steps) / (2 * steps)) as u8
}

/// The user's time-gain curve at `range_mm`, dB: bands of equal height from the face to
/// `depth_mm`, linear interpolation between band centres, flat beyond the first and last.
pub(crate) fn user_tgc_db(tgc_db: &[f64], depth_mm: f64, range_mm: f64) -> f64 {
    let n = tgc_db.len();
    if n == 0 {
        return 0.0;
    }
    let band = depth_mm / n as f64;
    let pos = range_mm / band - 0.5;
    if pos <= 0.0 {
        return tgc_db[0];
    }
    let i = libm::floor(pos) as usize;
    if i + 1 >= n {
        return tgc_db[n - 1];
    }
    let t = pos - i as f64;
    tgc_db[i] + (tgc_db[i + 1] - tgc_db[i]) * t
}

/// Intensity-to-grey mapping: grey = (10·log10(I) + DR)·255/DR, then the grey-level LUT,
/// tabulated over the top 16 bits of the f32 intensity (exponent and 8 mantissa bits: steps of
/// 0.017 dB, under a tenth of a grey level at 60 dB). Built once per (dynamic range, levels).
#[derive(Debug, Clone)]
pub(crate) struct GreyMap {
    key: (u64, u32),
    table: Vec<u8>,
}

impl GreyMap {
    pub(crate) fn new(display: &DisplaySettings) -> Self {
        let dr = display.dynamic_range_db.clamp(1.0, 1000.0);
        let mut lut = [0u8; 256];
        for (g, slot) in lut.iter_mut().enumerate() {
            *slot = quantise_grey(g as u8, display.grey_levels);
        }
        let offset = dr as f32;
        let scale = (255.0 / dr) as f32;
        let table = (0..1u32 << 16)
            .map(|idx| {
                // Middle of the bucket; the sign bit is never set for an intensity.
                let x = f32::from_bits((idx << 15) | 0x4000);
                if x.is_nan() || x <= 0.0 || !x.is_finite() {
                    return if x.is_infinite() { lut[255] } else { 0 };
                }
                let g = (super::math::db10_fast(x) + offset) * scale;
                let g = if g > 0.0 { g.min(255.0) } else { 0.0 };
                lut[(g + 0.5) as usize & 0xff]
            })
            .collect();
        GreyMap {
            key: Self::key_of(display),
            table,
        }
    }

    /// Settings that decide the table.
    pub(crate) fn key_of(display: &DisplaySettings) -> (u64, u32) {
        (display.dynamic_range_db.to_bits(), display.grey_levels)
    }

    pub(crate) fn key(&self) -> (u64, u32) {
        self.key
    }

    /// Grey of an intensity relative to full scale (gain included).
    #[inline]
    pub(crate) fn grey(&self, intensity: f32) -> u8 {
        if intensity.is_nan() || intensity <= 0.0 {
            return 0;
        }
        self.table[(intensity.to_bits() >> 15) as usize & 0xffff]
    }
}

//! Colour Doppler: the Doppler shift of blood seen along each scan line, aliasing at the
//! velocity scale, the wall filter, our own colour palettes, the legend and the frame-rate cost
//! of duplex imaging.
//!
//! Doppler equation: f_d = 2·f0·v·cos θ / c, θ between the flow and the line toward the
//! transducer, c = 1540 m/s (any ultrasound physics text; FACTS.md worked values). Sampling the
//! phase once per pulse makes f_d ambiguous beyond PRF/2 (Nyquist): the displayed shift wraps
//! into [−PRF/2, PRF/2). The velocity scale is the aliasing velocity for flow straight along
//! the beam, so PRF = 4·f0·scale/c.

use serde::Serialize;

use crate::scene::{DopplerMode, SPEED_OF_SOUND_M_S};

/// Doppler shift, Hz, for transmit `frequency_mhz`, blood speed `velocity_cm_s` and the angle
/// `angle_deg` between the flow and the direction toward the transducer
/// (f_d = 2·f0·v·cos θ / c). Positive is flow toward the transducer.
///
/// ```
/// // 5 MHz, 15 cm/s straight toward the probe → 974 Hz (FACTS.md worked problem).
/// let fd = slicewise::doppler_shift_hz(5.0, 15.0, 0.0);
/// assert!((fd - 974.0).abs() < 0.1);
/// ```
pub fn doppler_shift_hz(frequency_mhz: f64, velocity_cm_s: f64, angle_deg: f64) -> f64 {
    let cos_theta = libm::cos(super::math::rad(angle_deg));
    // A right angle gives exactly no shift, not cos(π/2)'s 6e-17.
    let cos_theta = if (angle_deg.abs() - 90.0).abs() < 1e-12 {
        0.0
    } else {
        cos_theta
    };
    doppler_shift_cos_hz(frequency_mhz, velocity_cm_s, cos_theta)
}

/// Doppler shift, Hz, from the cosine of the beam-to-flow angle.
#[inline]
pub(crate) fn doppler_shift_cos_hz(frequency_mhz: f64, velocity_cm_s: f64, cos_theta: f64) -> f64 {
    2.0 * frequency_mhz * 1e6 * (velocity_cm_s * 0.01) * cos_theta / SPEED_OF_SOUND_M_S
}

/// Pulse repetition frequency, Hz, whose Nyquist limit is `scale_cm_s` along the beam:
/// PRF = 4·f0·v/c.
///
/// ```
/// // 10 MHz, 30 cm/s scale → PRF ≈ 7792 Hz, Nyquist 3896 Hz.
/// let prf = slicewise::prf_for_scale_hz(10.0, 30.0);
/// assert!((prf - 7792.2).abs() < 0.1);
/// ```
pub fn prf_for_scale_hz(frequency_mhz: f64, scale_cm_s: f64) -> f64 {
    4.0 * frequency_mhz * 1e6 * (scale_cm_s * 0.01) / SPEED_OF_SOUND_M_S
}

/// Whether a shift aliases at this PRF: |f_d| > PRF/2 (Nyquist).
pub fn aliases(shift_hz: f64, prf_hz: f64) -> bool {
    shift_hz.abs() > 0.5 * prf_hz
}

/// The shift the scanner displays: f_d wrapped into [−PRF/2, PRF/2).
///
/// ```
/// // 1.2 kHz sampled at 2 kHz shows as −800 Hz: flow seems to reverse.
/// assert!((slicewise::aliased_shift_hz(1200.0, 2000.0) + 800.0).abs() < 1e-9);
/// assert_eq!(slicewise::aliased_shift_hz(900.0, 2000.0), 900.0);
/// ```
pub fn aliased_shift_hz(shift_hz: f64, prf_hz: f64) -> f64 {
    if !aliases(shift_hz, prf_hz) {
        return shift_hz;
    }
    let wrapped = shift_hz - prf_hz * libm::floor(shift_hz / prf_hz + 0.5);
    if wrapped >= 0.5 * prf_hz {
        wrapped - prf_hz
    } else {
        wrapped
    }
}

/// Highest PRF for a display depth, Hz: one pulse must return from `depth_mm` before the next
/// is sent, PRF ≤ c/(2·depth).
pub fn max_prf_hz(depth_mm: f64) -> f64 {
    SPEED_OF_SOUND_M_S / (2.0 * depth_mm * 1e-3)
}

/// Wall filter: shifts below this fraction of the Nyquist limit show no colour (a modelling
/// choice in the usual range of scanners' default filters; common practice, no source).
pub const WALL_FILTER_FRACTION_OF_NYQUIST: f64 = 0.08;
/// Pulses per colour line (ensemble length): a modelling choice in the usual 8–16 range
/// (common practice, no source).
pub const COLOUR_ENSEMBLE: u32 = 10;
/// One colour line for this many grey-scale lines (modelling choice).
pub const COLOUR_LINE_SPACING: u32 = 2;

/// Number of colour entries in each palette, from −scale to +scale (velocity) or from weak to
/// strong (power).
pub const PALETTE_ENTRIES: usize = 65;

/// Control points of Slicewise's own directional palette "ember / tide": flow toward the probe
/// runs from dark garnet through ember orange to pale straw; flow away from dark ink blue through
/// tide blue to pale ice. Position −1 = full scale away, +1 = full scale toward.
const VELOCITY_STOPS: [(f64, [f64; 3]); 8] = [
    (-1.0, [196.0, 238.0, 250.0]),
    (-0.7, [64.0, 170.0, 240.0]),
    (-0.35, [22.0, 84.0, 200.0]),
    (-0.0, [14.0, 24.0, 92.0]),
    (0.0, [96.0, 12.0, 28.0]),
    (0.35, [198.0, 40.0, 24.0]),
    (0.7, [246.0, 138.0, 36.0]),
    (1.0, [255.0, 238.0, 168.0]),
];

/// Control points of the non-directional power palette "amber glow": deep plum to warm amber
/// to pale gold. Position 0 = weakest shown, 1 = strongest.
const POWER_STOPS: [(f64, [f64; 3]); 4] = [
    (0.0, [72.0, 10.0, 52.0]),
    (0.35, [168.0, 44.0, 30.0]),
    (0.7, [236.0, 142.0, 34.0]),
    (1.0, [255.0, 232.0, 150.0]),
];

fn ramp(stops: &[(f64, [f64; 3])], x: f64, toward_positive: bool) -> [u8; 3] {
    // Between duplicate positions (the sign break at 0) pick the side by sign.
    let mut lo = 0;
    for (i, s) in stops.iter().enumerate() {
        if s.0 < x || (s.0 == x && toward_positive) {
            lo = i;
        }
    }
    let hi = (lo + 1).min(stops.len() - 1);
    let (x0, c0) = stops[lo];
    let (x1, c1) = stops[hi];
    let t = if x1 > x0 {
        ((x - x0) / (x1 - x0)).clamp(0.0, 1.0)
    } else {
        0.0
    };
    let mix = |i: usize| (c0[i] + (c1[i] - c0[i]) * t + 0.5).clamp(0.0, 255.0) as u8;
    [mix(0), mix(1), mix(2)]
}

/// The directional palette: entry k is the colour at normalised shift −1 + 2k/(N−1).
pub(crate) fn velocity_palette() -> Vec<[u8; 3]> {
    (0..PALETTE_ENTRIES)
        .map(|k| {
            let x = -1.0 + 2.0 * k as f64 / (PALETTE_ENTRIES - 1) as f64;
            ramp(&VELOCITY_STOPS, x, x >= 0.0)
        })
        .collect()
}

/// The power palette: entry k is the colour at strength k/(N−1).
pub(crate) fn power_palette() -> Vec<[u8; 3]> {
    (0..PALETTE_ENTRIES)
        .map(|k| ramp(&POWER_STOPS, k as f64 / (PALETTE_ENTRIES - 1) as f64, true))
        .collect()
}

/// What the page needs to draw the colour legend and the Doppler readouts.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DopplerLegend {
    /// "velocity" or "power".
    pub mode: &'static str,
    /// Palette name (our own): "ember-tide" or "amber-glow".
    pub palette: &'static str,
    /// Palette colours, RGB. Velocity: from full scale away (first) to full scale toward
    /// (last), the middle two entries either side of zero. Power: weakest to strongest.
    pub colours: Vec<[u8; 3]>,
    /// Velocity scale asked for in the display settings, cm/s.
    pub scale_cm_s: f64,
    /// Velocity at which flow along the beam aliases with the PRF actually used, cm/s (lower
    /// than the scale when the depth limits the PRF).
    pub aliasing_velocity_cm_s: f64,
    /// Pulse repetition frequency used, Hz.
    pub prf_hz: f64,
    /// Nyquist limit of the Doppler shift, PRF/2, Hz.
    pub nyquist_hz: f64,
    /// Highest PRF the display depth allows, c/(2·depth), Hz.
    pub max_prf_hz: f64,
    /// Whether the depth capped the PRF below what the scale asks for.
    pub prf_limited_by_depth: bool,
    /// Flow slower than this along the beam shows no colour (wall filter), cm/s.
    pub wall_filter_cm_s: f64,
}

/// Estimated frame rates: grey scale alone, and with colour (duplex).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct FrameRate {
    /// Grey-scale lines per frame (one per element, element pitch ≈ one wavelength: a modelling
    /// choice).
    pub b_mode_lines: u32,
    /// Time for one grey-scale line, 2·depth/c, µs.
    pub line_time_us: f64,
    /// Grey-scale-only frame rate, Hz.
    pub b_mode_hz: f64,
    /// Colour lines per frame (one per `COLOUR_LINE_SPACING` grey lines, over the whole field
    /// of view), 0 when colour is off.
    pub colour_lines: u32,
    /// Pulses per colour line.
    pub ensemble: u32,
    /// Frame rate with colour on, Hz, or null when colour is off.
    pub duplex_hz: Option<f64>,
}

/// Legend data for the current settings, or `None` when colour is off.
pub(crate) fn legend(
    mode: DopplerMode,
    frequency_mhz: f64,
    depth_mm: f64,
    scale_cm_s: f64,
) -> Option<DopplerLegend> {
    let (name, palette, colours) = match mode {
        DopplerMode::Off => return None,
        DopplerMode::Velocity => ("velocity", "ember-tide", velocity_palette()),
        DopplerMode::Power => ("power", "amber-glow", power_palette()),
    };
    let wanted = prf_for_scale_hz(frequency_mhz, scale_cm_s);
    let cap = max_prf_hz(depth_mm);
    let prf = wanted.min(cap);
    let aliasing = prf * SPEED_OF_SOUND_M_S / (4.0 * frequency_mhz * 1e6) * 100.0;
    Some(DopplerLegend {
        mode: name,
        palette,
        colours,
        scale_cm_s,
        aliasing_velocity_cm_s: aliasing,
        prf_hz: prf,
        nyquist_hz: 0.5 * prf,
        max_prf_hz: cap,
        prf_limited_by_depth: wanted > cap,
        wall_filter_cm_s: aliasing * WALL_FILTER_FRACTION_OF_NYQUIST,
    })
}

/// Frame-rate estimate: a grey-scale frame is N lines of 2·depth/c each; colour adds
/// N/`COLOUR_LINE_SPACING` lines of `COLOUR_ENSEMBLE` pulses at the Doppler PRF.
pub(crate) fn frame_rate(
    face_width_mm: f64,
    wavelength_mm: f64,
    depth_mm: f64,
    legend: Option<&DopplerLegend>,
) -> FrameRate {
    let lines = libm::ceil(face_width_mm / wavelength_mm).max(32.0) as u32;
    let line_s = 2.0 * depth_mm * 1e-3 / SPEED_OF_SOUND_M_S;
    let b_frame_s = lines as f64 * line_s;
    let colour_lines = match legend {
        Some(_) => lines.div_ceil(COLOUR_LINE_SPACING),
        None => 0,
    };
    let duplex_hz = legend.map(|l| {
        let colour_s = colour_lines as f64 * COLOUR_ENSEMBLE as f64 / l.prf_hz.max(1.0);
        1.0 / (b_frame_s + colour_s)
    });
    FrameRate {
        b_mode_lines: lines,
        line_time_us: line_s * 1e6,
        b_mode_hz: 1.0 / b_frame_s,
        colour_lines,
        ensemble: COLOUR_ENSEMBLE,
        duplex_hz,
    }
}

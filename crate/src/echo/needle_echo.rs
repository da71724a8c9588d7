//! The needle's echo: a specular steel cylinder whose brightness depends on the angle between
//! the beam and the shaft, reverberation copies inside its lumen, and the two echoes of the
//! bevel (heel and point).
//!
//! **Shaft (modelling choice, compared with published measurements in the tests).** A smooth
//! cylinder returns a mirror echo to the probe only when the beam meets it nearly at right
//! angles: the echo of a shaft length ℓ about one lateral resolution cell long spreads over an
//! angle of about λ/ℓ by diffraction, and the receive aperture (F# ≈ 2) takes in about ±14°, so
//! we model the mirror part as exp(−(δ/δ0)²) with δ the shaft's deviation from perpendicular
//! and δ0 = 14°. The rough surface and the edges add a diffuse part that falls slowly,
//! A_d·cos δ; A_d = 0.4 of the mirror peak is a round value picked so that the model's
//! perpendicular-to-grazing ratio lands in the published range below (so the test of that
//! ratio checks the formula and its wiring, not an independent prediction). Amplitude, 1 at
//! perpendicular: D(δ) = (exp(−(δ/δ0)²) + 0.4·cos δ) / 1.4.
//! Published trend: visibility falls as the needle steepens and long-axis views are best below
//! about 30° (Schafhalter-Zoppoth et al., Reg Anesth Pain Med 29:480, 2004); a plain needle
//! measured 60–76 units at 90° beam-to-needle and about 5 at 15° (Nichols et al., J Vasc Interv
//! Radiol 14:1553, 2003). D gives 1 at 90° and 0.074 at 15° (ratio 13.5; published 12–15,
//! reading their units as linear in echo amplitude).
//! Larger needles echo more: intensity ∝ outer diameter (cylinder backscatter grows with
//! radius), relative to a 22G needle.
//!
//! **Out of plane.** A needle crossing the slab is met by the beam at its insertion angle off
//! perpendicular (45–55° in the demos), outside the mirror lobe: its dot is the diffuse part,
//! 0.4·cos δ/1.4 of the perpendicular amplitude (−14 dB at 45°, −16 dB at 55°), and a needle
//! square to the beam is 34 dB above muscle, so the dot stands about 20 dB above the tissue's
//! mean level (10 dB already beats all but e^−5.6 ≈ 0.4 % of speckle pixels; a test holds
//! it there). It is as tall as the shaft's crossing of the slab (thickness × tan(angle), about
//! 1 mm) and, with the bevel in the slab, carries the heel and point dots. Neither constant
//! can brighten it much: a lobe wide enough to reach 45° (δ0 ≈ 25° adds 1 dB there) or a
//! diffuse share above about 0.6 flattens the in-plane fall before 30° that the tests hold (a
//! 10° needle at least 6 dB above a 30° one), and the share is set by the published 15°
//! figure. A mirror-like dot with a reverberation tail appears when the needle crosses the
//! slab close to square to the beam (a shallow out-of-plane needle).
//!
//! **Reverberation.** Sound caught in the fluid-filled lumen rings between the walls; each ring
//! comes back one lumen crossing later, so copies sit below the shaft every
//! ID·1540/c_fluid mm (22G: 0.413·1540/1480 ≈ 0.43 mm), each weaker by a constant factor
//! (0.55 in amplitude, modelling choice). They need the mirror echo, so they appear only when
//! the beam is near perpendicular to the shaft.
//!
//! **Bevel.** The heel (where the bevel starts, on the side the bevel faces) and the point (at
//! the tip, on the opposite side) are edges that scatter back over a wide range of angles, so
//! they stay visible when the shaft is too steep to show: two dots wherever the bevel is in the
//! slab. Their strength depends on how the bevel faces the probe: best facing the transducer
//! or turned 180° from it, worst sideways (Hopkins & Bradley, Clin Radiol 56:499, 2001):
//! amplitude 0.5·(0.35 + 0.65·|f·t|) of the perpendicular shaft, f the bevel's facing
//! direction and t the direction toward the transducer across the shaft.

use super::math::{deg, exp_fast, rad};
use super::posed::{add, dot, scale, sub, Axes, V3};
use crate::scene::{Needle, NeedleSize};

/// Width of the mirror lobe, degrees (δ0 above).
pub const NEEDLE_SPECULAR_WIDTH_DEG: f64 = 14.0;
/// Diffuse share of the shaft echo at perpendicular incidence (A_d above).
pub const NEEDLE_DIFFUSE_SHARE: f64 = 0.4;
/// Amplitude kept per reverberation round trip in the lumen.
pub(crate) const REVERB_KEEP: f32 = 0.55;
/// Reverberation is drawn only when the mirror part of the shaft echo is at least this.
pub(crate) const REVERB_MIN_SPECULAR: f32 = 0.02;
/// Number of reverberation copies drawn.
pub(crate) const REVERB_COPIES: usize = 8;
/// Bevel edge echo strength relative to the perpendicular shaft.
const BEVEL_STRENGTH: f64 = 0.5;

/// Relative echo amplitude of the needle shaft (1 when the beam is perpendicular to the shaft)
/// for the angle between the beam and the shaft, degrees (90 = perpendicular, 0 = along it).
///
/// ```
/// let perpendicular = slicewise::needle_echo_amplitude(90.0);
/// let grazing = slicewise::needle_echo_amplitude(15.0);
/// assert_eq!(perpendicular, 1.0);
/// assert!(grazing < 0.1);
/// ```
pub fn needle_echo_amplitude(beam_to_needle_deg: f64) -> f64 {
    let delta = 90.0 - beam_to_needle_deg.abs().min(90.0);
    specular_part(delta) + diffuse_part(delta)
}

/// Mirror part of the amplitude at deviation `delta_deg` from perpendicular.
fn specular_part(delta_deg: f64) -> f64 {
    let x = delta_deg / NEEDLE_SPECULAR_WIDTH_DEG;
    libm::exp(-x * x) / (1.0 + NEEDLE_DIFFUSE_SHARE)
}

/// Diffuse part of the amplitude at deviation `delta_deg` from perpendicular.
fn diffuse_part(delta_deg: f64) -> f64 {
    NEEDLE_DIFFUSE_SHARE * libm::cos(rad(delta_deg)) / (1.0 + NEEDLE_DIFFUSE_SHARE)
}

/// Nominal inner diameters (mm) of regular-wall needles, gauge 18 to 27, from the Stubs gauge
/// chart (from memory); used for the reverberation spacing.
const INNER_DIAMETER_MM: [(u8, f64); 10] = [
    (18, 0.838),
    (19, 0.686),
    (20, 0.603),
    (21, 0.514),
    (22, 0.413),
    (23, 0.337),
    (24, 0.311),
    (25, 0.260),
    (26, 0.260),
    (27, 0.210),
];

/// Lumen diameter of a needle, mm: the gauge chart, or 0.58·OD for an explicit diameter (the
/// regular-wall ratio at 22G, modelling choice).
pub fn lumen_diameter_mm(needle: &Needle) -> f64 {
    match needle.size {
        NeedleSize::Gauge { gauge } => INNER_DIAMETER_MM
            .iter()
            .find(|(g, _)| *g == gauge)
            .map_or(0.58 * needle.outer_diameter_mm(), |(_, id)| *id),
        NeedleSize::Diameter { outer_diameter_mm } => 0.58 * outer_diameter_mm,
    }
}

/// Spacing of the reverberation copies below the needle, mm: ID·1540/c_fluid.
///
/// ```
/// # let n = slicewise::Needle { size: slicewise::NeedleSize::Gauge { gauge: 22 }, length_mm: 50.0,
/// #   bevel_deg: 30.0, bevel_roll_deg: 0.0, entry: slicewise::Entry { x_mm: 0.0, y_mm: 0.0 },
/// #   azimuth_deg: 0.0, angle_deg: 30.0, inserted_mm: 20.0 };
/// assert!((slicewise::reverberation_spacing_mm(&n) - 0.43).abs() < 0.005);
/// ```
pub fn reverberation_spacing_mm(needle: &Needle) -> f64 {
    lumen_diameter_mm(needle) * crate::scene::SPEED_OF_SOUND_M_S / super::tissue::C_FLUID_M_S
}

/// A point echo (heel or point of the bevel) in image coordinates.
#[derive(Debug, Clone, Copy)]
pub(crate) struct PointEcho {
    pub(crate) at: V3,
    pub(crate) amplitude: f32,
}

/// The needle posed for one frame.
#[derive(Debug, Clone)]
pub(crate) struct PosedNeedle {
    /// Skin entry point, image coordinates.
    pub(crate) p0: V3,
    /// Unit shaft direction, image coordinates.
    pub(crate) d: V3,
    /// Inserted length, mm.
    pub(crate) length: f64,
    /// Outer radius, mm.
    pub(crate) radius: f64,
    /// Intensity scale of the shaft (size factor included).
    pub(crate) shaft_intensity: f32,
    /// Reverberation spacing, mm.
    pub(crate) reverb_mm: f64,
    /// Bevel heel and point.
    pub(crate) points: [PointEcho; 2],
    /// Arc-length range [s_lo, s_hi] of the shaft within elevation reach of the beam.
    pub(crate) s_range: (f64, f64),
}

impl PosedNeedle {
    /// Pose the needle; `None` when nothing of it is inside the body or near the slab.
    /// `reach_e` is how far from the plane (mm) the beam still matters.
    pub(crate) fn new(
        needle: &Needle,
        axes: &Axes,
        reach_e: f64,
        intensity_scale: f64,
    ) -> Option<Self> {
        let length = needle.inserted_mm;
        if length.is_nan() || length <= 0.0 {
            return None;
        }
        let od = needle.outer_diameter_mm();
        if od.is_nan() || od <= 0.0 {
            return None;
        }
        let radius = 0.5 * od;
        let dw = super::posed::needle_direction(needle);
        let entry = [needle.entry.x_mm, needle.entry.y_mm, 0.0];
        let p0 = axes.to_image(entry);
        let d = axes.dir_to_image(dw);
        // Elevation clip: |e(s)| ≤ reach.
        let limit = reach_e + radius;
        let (mut lo, mut hi) = (0.0f64, length);
        if d[2].abs() < 1e-12 {
            if p0[2].abs() > limit {
                return None;
            }
        } else {
            let ta = (-limit - p0[2]) / d[2];
            let tb = (limit - p0[2]) / d[2];
            lo = lo.max(ta.min(tb));
            hi = hi.min(ta.max(tb));
            if hi < lo {
                return None;
            }
        }
        let size = od / 0.718;
        // Bevel points.
        let bevel_len = needle.bevel_length_mm().clamp(0.0, length);
        let facing_w = super::posed::bevel_facing(needle);
        let facing = axes.dir_to_image(facing_w);
        let heel = add(add(p0, scale(d, length - bevel_len)), scale(facing, radius));
        let point = sub(add(p0, scale(d, length)), scale(facing, radius));
        // Direction toward the transducer (−beam) across the shaft: −b + (b·d)d, b = (0, 1, 0)
        // approximately for every line (the per-line change is small for this purpose).
        let toward = [d[0] * d[1], -1.0 + d[1] * d[1], d[2] * d[1]];
        let t_norm = dot(toward, toward).sqrt();
        let facing_share = if t_norm > 1e-9 {
            (dot(facing, toward) / t_norm).abs()
        } else {
            1.0
        };
        let bevel_amp = BEVEL_STRENGTH * (0.35 + 0.65 * facing_share) * size.sqrt();
        Some(PosedNeedle {
            p0,
            d,
            length,
            radius,
            shaft_intensity: (intensity_scale * size) as f32,
            reverb_mm: reverberation_spacing_mm(needle),
            points: [
                PointEcho {
                    at: heel,
                    amplitude: bevel_amp as f32,
                },
                PointEcho {
                    at: point,
                    amplitude: bevel_amp as f32,
                },
            ],
            s_range: (lo, hi),
        })
    }

    /// Mirror and diffuse amplitude factors for a line with unit image direction (bu, bv).
    pub(crate) fn angle_factors(&self, bu: f64, bv: f64) -> (f32, f32) {
        let cos_gamma = (self.d[0] * bu + self.d[1] * bv).abs().min(1.0);
        let delta = deg(libm::asin(cos_gamma));
        (specular_part(delta) as f32, diffuse_part(delta) as f32)
    }
}

/// Per-line evaluator of the needle echo.
#[derive(Debug, Clone, Copy)]
pub(crate) struct NeedleLine {
    /// Entry point relative to the line: along-beam and lateral components are computed per
    /// sample from these.
    pub(crate) p0u: f64,
    pub(crate) p0v: f64,
    pub(crate) e0: f64,
    pub(crate) bu: f64,
    pub(crate) bv: f64,
    /// Shaft direction along the beam, across it, and in elevation.
    pub(crate) da: f64,
    pub(crate) dl: f64,
    pub(crate) de: f64,
    pub(crate) length: f64,
    pub(crate) spec: f32,
    pub(crate) diff: f32,
    pub(crate) reverb_mm: f64,
    pub(crate) intensity: f32,
}

impl NeedleLine {
    /// Echo intensity of the shaft (and its reverberation) at image point (u, v), for PSF
    /// weights `wl` = 1/σ_lateral², `wa` = 1/σ_axial², `we` = 1/σ_elevation².
    #[inline]
    pub(crate) fn intensity(&self, u: f64, v: f64, wl: f64, wa: f64, we: f64) -> f32 {
        let (qu, qv) = (u - self.p0u, v - self.p0v);
        let qa = qu * self.bu + qv * self.bv;
        let ql = qu * self.bv - qv * self.bu;
        let den = self.dl * self.dl * wl + self.da * self.da * wa + self.de * self.de * we;
        if den <= 0.0 {
            return 0.0;
        }
        let base = ql * self.dl * wl - self.e0 * self.de * we;
        let eval = |qa: f64| -> f32 {
            let s = ((base + qa * self.da * wa) / den).clamp(0.0, self.length);
            let xl = ql - s * self.dl;
            let xa = qa - s * self.da;
            let xe = self.e0 + s * self.de;
            let j = xl * xl * wl + xa * xa * wa + xe * xe * we;
            // Beyond j = 60 the weight is below e⁻³⁰, its square 10⁻²⁶ of the shaft's peak:
            // far under anything the display shows (the point echoes below stop there too).
            if j > 60.0 {
                return 0.0;
            }
            exp_fast((-0.5 * j) as f32)
        };
        let w = eval(qa);
        let amp = (self.spec + self.diff) * w;
        let mut total = amp * amp;
        if self.spec > REVERB_MIN_SPECULAR {
            let mut keep = 1.0f32;
            for k in 1..=REVERB_COPIES {
                keep *= REVERB_KEEP;
                let wk = eval(qa - k as f64 * self.reverb_mm);
                let a = self.spec * keep * wk;
                total += a * a;
            }
        }
        total * self.intensity
    }
}

/// Echo intensity of a point echo at image point (u, v) on a line with unit direction
/// (bu, bv); `we` = 1/σ_elevation².
#[inline]
#[allow(clippy::too_many_arguments)]
pub(crate) fn point_intensity(
    p: &PointEcho,
    u: f64,
    v: f64,
    bu: f64,
    bv: f64,
    wl: f64,
    wa: f64,
    we: f64,
    scale_intensity: f32,
) -> f32 {
    let (qu, qv) = (u - p.at[0], v - p.at[1]);
    let qa = qu * bu + qv * bv;
    let ql = qu * bv - qv * bu;
    let j = ql * ql * wl + qa * qa * wa + p.at[2] * p.at[2] * we;
    if j > 60.0 {
        return 0.0;
    }
    let a = p.amplitude * exp_fast((-0.5 * j) as f32);
    a * a * scale_intensity
}

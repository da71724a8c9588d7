//! The needle's signature: what the screen shows of it, and what it hides.

use serde::Serialize;

use super::intervals_line_slab::{line_slab_intervals, ImageSegment};
use super::slab::Slab;
use crate::scene::Needle;

/// Largest on-screen extent (mm) of an in-slab stretch that still reads as a dot rather than a
/// line. A documented modelling constant (DESIGN.md, signature rule 4).
pub const DOT_EXTENT_MM: f64 = 3.0;

/// What the screen shows of the needle.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Signature {
    /// No part of the needle touches the slab in the field of view.
    None,
    /// A dot that is shaft only: the tip lies beyond the slab.
    ShaftDot,
    /// A dot that includes the bevel: the tip is in the slab (heel and point echo).
    TipDoubleDot,
    /// A line that ends short of the real tip.
    LineWithoutTip,
    /// A line that includes the tip.
    LineWithTip,
}

impl Signature {
    /// The kebab-case word used in files, CLI output and page hooks.
    pub fn as_str(&self) -> &'static str {
        match self {
            Signature::None => "none",
            Signature::ShaftDot => "shaft-dot",
            Signature::TipDoubleDot => "tip-double-dot",
            Signature::LineWithoutTip => "line-without-tip",
            Signature::LineWithTip => "line-with-tip",
        }
    }
}

/// A point on the screen, mm.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct ScreenPoint {
    /// Lateral, mm (+ toward the orientation marker).
    pub lateral_mm: f64,
    /// Depth, mm.
    pub depth_mm: f64,
}

/// A point in the image frame with its hidden elevation, mm.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct FramePoint {
    /// Lateral, mm.
    pub lateral_mm: f64,
    /// Depth, mm.
    pub depth_mm: f64,
    /// Elevation (distance from the image plane, signed), mm.
    pub elevation_mm: f64,
}

/// Everything the slab does to the needle at one pose.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct NeedleSection {
    /// What the screen shows.
    pub signature: Signature,
    /// Whether the in-slab set meets the bevel region [L − ℓb, L].
    pub tip_in_slab: bool,
    /// Elevation of the true tip, signed mm (0 = on the centre plane).
    pub tip_offset_mm: f64,
    /// Needle length beyond the last in-slab point, mm (L when nothing is in the slab).
    pub hidden_length_mm: f64,
    /// On-screen length of the longest in-slab stretch, mm (0 when none).
    pub extent_mm: f64,
    /// In-slab stretches as arc lengths from the skin, mm, sorted.
    pub in_slab_mm: Vec<[f64; 2]>,
    /// Where the screen's needle ends (the point at s = max of the in-slab set), or null.
    pub apparent_tip: Option<ScreenPoint>,
    /// Where the real tip is, in image coordinates.
    pub true_tip: FramePoint,
    /// On-screen distance from the apparent tip to the true tip's projection, mm, or null.
    pub apparent_to_true_tip_mm: Option<f64>,
    /// Whether the true tip's projection lies inside the field of view.
    pub tip_in_view: bool,
    /// Angle between the beam axis and the needle axis, degrees in [0, 90]; 90 = needle
    /// perpendicular to the beam (strongest specular echo).
    pub insonation_deg: f64,
    /// Angle between the needle and the image plane, degrees in [0, 90]; 0 = in-plane.
    pub plane_angle_deg: f64,
    /// Full slab thickness at the true tip's range, mm.
    pub slab_thickness_at_tip_mm: f64,
    /// Bevel length along the shaft, mm.
    pub bevel_length_mm: f64,
    /// Outer diameter, mm.
    pub outer_diameter_mm: f64,
}

/// The needle axis as an image-frame segment with its radius allowance r·√(1 − (d·n′)²).
pub fn needle_segment(slab: &Slab, needle: &Needle) -> ImageSegment {
    let dir = slab.frame.dir_to_image(&needle.direction());
    let across = (1.0 - dir.e * dir.e).max(0.0).sqrt();
    ImageSegment {
        start: slab.frame.to_image(&needle.entry_point()),
        dir,
        length_mm: needle.inserted_mm,
        allowance_mm: needle.radius_mm() * across,
    }
}

/// Section the needle by the slab (DESIGN.md "Needle signature").
pub fn needle_section(slab: &Slab, needle: &Needle) -> NeedleSection {
    let seg = needle_segment(slab, needle);
    let intervals = line_slab_intervals(slab, &seg);
    let len = needle.inserted_mm;
    let bevel = needle.bevel_length_mm();
    let across = (1.0 - seg.dir.e * seg.dir.e).max(0.0).sqrt();

    let tip_in_slab = intervals.iter().any(|iv| iv[1] >= len - bevel);
    let extent = intervals
        .iter()
        .map(|iv| (iv[1] - iv[0]) * across)
        .fold(0.0, f64::max);
    let last = intervals.last().map(|iv| iv[1]);
    let signature = match (last, extent <= DOT_EXTENT_MM, tip_in_slab) {
        (None, _, _) => Signature::None,
        (Some(_), true, false) => Signature::ShaftDot,
        (Some(_), true, true) => Signature::TipDoubleDot,
        (Some(_), false, false) => Signature::LineWithoutTip,
        (Some(_), false, true) => Signature::LineWithTip,
    };
    let tip = seg.at(len);
    let apparent = last.map(|s| {
        let c = seg.at(s);
        ScreenPoint {
            lateral_mm: c.u,
            depth_mm: c.v,
        }
    });
    NeedleSection {
        signature,
        tip_in_slab,
        tip_offset_mm: tip.e,
        hidden_length_mm: last.map_or(len, |s| len - s),
        extent_mm: extent,
        in_slab_mm: intervals,
        apparent_to_true_tip_mm: apparent.map(|a| (a.lateral_mm - tip.u).hypot(a.depth_mm - tip.v)),
        apparent_tip: apparent,
        true_tip: FramePoint {
            lateral_mm: tip.u,
            depth_mm: tip.v,
            elevation_mm: tip.e,
        },
        tip_in_view: slab.in_view(tip.u, tip.v),
        insonation_deg: seg.dir.v.abs().min(1.0).acos().to_degrees(),
        plane_angle_deg: seg.dir.e.abs().min(1.0).asin().to_degrees(),
        slab_thickness_at_tip_mm: slab.thickness_at(tip.u, tip.v),
        bevel_length_mm: bevel,
        outer_diameter_mm: needle.outer_diameter_mm(),
    }
}

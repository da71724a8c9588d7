//! Where a tube (nerve, vessel, bone) cuts the image plane: an ellipse, or a long-axis band
//! when the tube runs nearly along the plane.

use serde::Serialize;

use super::slab::Slab;
use crate::scene::Tube;

/// Below this |k·n′| (sine of the angle between the tube axis and the image plane) a tube is
/// reported as a long-axis band rather than an ellipse: about 15°, where the ellipse would be
/// more than 3.9 radii long. A documented modelling constant.
pub const BAND_SINE: f64 = 0.258_819_045_102_520_76; // sin 15°

/// How a structure appears on the centre plane of the slab.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum SectionShape {
    /// A closed ellipse (short axis or oblique cut).
    Ellipse,
    /// A band: the tube seen along its length; semi-axes are half-width and half-length.
    Band,
}

/// One cut of a structure by the image plane, in screen millimetres.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct PlaneSection {
    /// Ellipse or long-axis band.
    pub shape: SectionShape,
    /// Centre, lateral mm.
    pub lateral_mm: f64,
    /// Centre, depth mm.
    pub depth_mm: f64,
    /// [minor, major] semi-axes, mm (for a band: half-width, half-length).
    pub semi_axes_mm: [f64; 2],
    /// Direction of the major axis, degrees from +lateral toward +depth, in (−90, 90].
    pub angle_deg: f64,
    /// Whether the centre lies inside the field of view.
    pub in_view: bool,
}

impl PlaneSection {
    /// Signed distance from screen point (u, v) to this section's outline, mm (negative
    /// inside). Exact for an ellipse; a band is treated as its rectangle.
    pub fn signed_distance_mm(&self, u: f64, v: f64) -> f64 {
        let (s, c) = self.angle_deg.to_radians().sin_cos();
        let (du, dv) = (u - self.lateral_mm, v - self.depth_mm);
        // Local frame: x along the major axis, y along the minor axis.
        let x = du * c + dv * s;
        let y = -du * s + dv * c;
        let [minor, major] = self.semi_axes_mm;
        match self.shape {
            SectionShape::Ellipse => super::signed_distance_ellipse([x, y], [major, minor]),
            SectionShape::Band => {
                let qx = x.abs() - major;
                let qy = y.abs() - minor;
                let outside = qx.max(0.0).hypot(qy.max(0.0));
                outside + qx.max(qy).min(0.0)
            }
        }
    }
}

/// An axis direction in degrees folded into (−90, 90].
pub(crate) fn normalise_angle(deg: f64) -> f64 {
    let mut a = deg;
    while a > 90.0 {
        a -= 180.0;
    }
    while a <= -90.0 {
        a += 180.0;
    }
    a
}

/// All cuts of a tube by the centre plane of `slab`, in path order.
pub fn tube_sections(slab: &Slab, tube: &Tube) -> Vec<PlaneSection> {
    let r = tube.radius_mm;
    let pts: Vec<_> = tube.points().map(|p| slab.frame.to_image(&p)).collect();
    let n_seg = pts.len().saturating_sub(1);
    let mut out = Vec::new();
    for (i, w) in pts.windows(2).enumerate() {
        let (a, b) = (w[0], w[1]);
        let (du, dv, de) = (b.u - a.u, b.v - a.v, b.e - a.e);
        let len = (du * du + dv * dv + de * de).sqrt();
        let kn = de / len;
        let angle = normalise_angle(dv.atan2(du).to_degrees());
        if kn.abs() >= BAND_SINE {
            // Crossing parameter; the last segment owns its far end, the others do not, so a
            // crossing exactly at a joint is reported once.
            let t = a.e / (a.e - b.e);
            let last = i + 1 == n_seg;
            if !(t >= 0.0 && (t < 1.0 || (last && t <= 1.0))) {
                continue;
            }
            let (u, v) = (a.u + du * t, a.v + dv * t);
            let in_plane = (du * du + dv * dv).sqrt();
            out.push(PlaneSection {
                shape: SectionShape::Ellipse,
                lateral_mm: u,
                depth_mm: v,
                semi_axes_mm: [r, r / kn.abs()],
                angle_deg: if in_plane < 1e-12 * len { 0.0 } else { angle },
                in_view: slab.in_view(u, v),
            });
        } else {
            // Stretch of the segment whose axis lies within r of the plane: |a.e + de·t| ≤ r.
            let (mut t0, mut t1) = (0.0f64, 1.0f64);
            if de.abs() < 1e-15 {
                if a.e.abs() > r {
                    continue;
                }
            } else {
                let ta = (-r - a.e) / de;
                let tb = (r - a.e) / de;
                t0 = t0.max(ta.min(tb));
                t1 = t1.min(ta.max(tb));
                if t1 < t0 {
                    continue;
                }
            }
            let (ea, eb) = (a.e + de * t0, a.e + de * t1);
            let e_min = if ea * eb <= 0.0 {
                0.0
            } else {
                ea.abs().min(eb.abs())
            };
            let (u0, v0) = (a.u + du * t0, a.v + dv * t0);
            let (u1, v1) = (a.u + du * t1, a.v + dv * t1);
            let (u, v) = (0.5 * (u0 + u1), 0.5 * (v0 + v1));
            out.push(PlaneSection {
                shape: SectionShape::Band,
                lateral_mm: u,
                depth_mm: v,
                semi_axes_mm: [
                    (r * r - e_min * e_min).max(0.0).sqrt(),
                    0.5 * (u1 - u0).hypot(v1 - v0),
                ],
                angle_deg: angle,
                in_view: slab.in_view(u, v),
            });
        }
    }
    out
}

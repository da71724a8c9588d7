//! The scene in the probe's image frame (lateral u, depth v, elevation e), rebuilt with libm
//! trigonometry so that the image is bit-identical on every target. Same formulas as
//! `ProbeFrame::from_pose` and `Needle::direction` (DESIGN.md "Units and frames").

use super::math::{rad, sin_cos};
use crate::scene::{Needle, Pose};

/// A 3-vector.
pub(crate) type V3 = [f64; 3];

#[inline]
pub(crate) fn dot(a: V3, b: V3) -> f64 {
    a[0] * b[0] + a[1] * b[1] + a[2] * b[2]
}
#[inline]
pub(crate) fn sub(a: V3, b: V3) -> V3 {
    [a[0] - b[0], a[1] - b[1], a[2] - b[2]]
}
#[inline]
pub(crate) fn add(a: V3, b: V3) -> V3 {
    [a[0] + b[0], a[1] + b[1], a[2] + b[2]]
}
#[inline]
pub(crate) fn scale(a: V3, s: f64) -> V3 {
    [a[0] * s, a[1] * s, a[2] * s]
}
#[inline]
pub(crate) fn cross(a: V3, b: V3) -> V3 {
    [
        a[1] * b[2] - a[2] * b[1],
        a[2] * b[0] - a[0] * b[2],
        a[0] * b[1] - a[1] * b[0],
    ]
}
#[inline]
pub(crate) fn norm(a: V3) -> f64 {
    dot(a, a).sqrt()
}
/// Unit vector, or `fallback` for a (near) zero vector.
#[inline]
pub(crate) fn unit_or(a: V3, fallback: V3) -> V3 {
    let n = norm(a);
    if n > 1e-12 {
        scale(a, 1.0 / n)
    } else {
        fallback
    }
}

/// The image frame: face centre and the three unit axes in world coordinates.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Axes {
    pub(crate) origin: V3,
    pub(crate) lateral: V3,
    pub(crate) beam: V3,
    pub(crate) elevation: V3,
}

impl Axes {
    /// Rotate about z, tilt about a, rock about n′ (DESIGN.md order), with libm.
    pub(crate) fn from_pose(pose: &Pose) -> Self {
        let (sp, cp) = sin_cos(rad(pose.rotate_deg));
        let (st, ct) = sin_cos(rad(pose.tilt_deg));
        let (sr, cr) = sin_cos(rad(pose.rock_deg));
        let a = [cp, sp, 0.0];
        let n = [-sp, cp, 0.0];
        let b = [0.0, 0.0, 1.0];
        let b1 = add(scale(b, ct), scale(n, st));
        let n1 = sub(scale(n, ct), scale(b, st));
        let b2 = add(scale(b1, cr), scale(a, sr));
        let a1 = sub(scale(a, cr), scale(b1, sr));
        Axes {
            origin: [pose.x_mm, pose.y_mm, 0.0],
            lateral: a1,
            beam: b2,
            elevation: n1,
        }
    }

    /// Image coordinates (u, v, e) of a world point.
    #[inline]
    pub(crate) fn to_image(self, p: V3) -> V3 {
        let d = sub(p, self.origin);
        [
            dot(d, self.lateral),
            dot(d, self.beam),
            dot(d, self.elevation),
        ]
    }

    /// Image components of a world direction.
    #[inline]
    pub(crate) fn dir_to_image(&self, d: V3) -> V3 {
        [
            dot(d, self.lateral),
            dot(d, self.beam),
            dot(d, self.elevation),
        ]
    }

    /// World point of image coordinates (u, v, e).
    #[inline]
    pub(crate) fn to_world(self, u: f64, v: f64, e: f64) -> V3 {
        add(
            self.origin,
            add(
                add(scale(self.lateral, u), scale(self.beam, v)),
                scale(self.elevation, e),
            ),
        )
    }
}

/// Unit direction of the needle shaft in world coordinates, libm trigonometry.
pub(crate) fn needle_direction(n: &Needle) -> V3 {
    let (sa, ca) = sin_cos(rad(n.angle_deg));
    let (sp, cp) = sin_cos(rad(n.azimuth_deg));
    [ca * cp, ca * sp, sa]
}

/// Unit vector the open bevel faces, world coordinates (roll 0 = toward the skin), as
/// `Needle::bevel_facing` with libm trigonometry.
pub(crate) fn bevel_facing(n: &Needle) -> V3 {
    let d = needle_direction(n);
    let up = sub([0.0, 0.0, -1.0], scale(d, -d[2]));
    let up = if norm(up) < 1e-9 {
        let (sp, cp) = sin_cos(rad(n.azimuth_deg));
        [-cp, -sp, 0.0]
    } else {
        unit_or(up, [0.0, 0.0, -1.0])
    };
    let side = cross(d, up);
    let (sr, cr) = sin_cos(rad(n.bevel_roll_deg));
    add(scale(up, cr), scale(side, sr))
}

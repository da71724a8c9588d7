//! The slab of a posed probe: field of view plus elevation profile, as one queryable object.

use nalgebra::Point3;

use crate::scene::{Footprint, ImageCoords, Probe, ProbeFrame, SlabProfile};

/// Boundary tolerance, mm: a point this close to a slab or field-of-view boundary counts as
/// inside, so "exactly on the boundary" is inside whatever the rounding.
pub const BOUNDARY_TOL_MM: f64 = 1e-9;

/// The beam slab of a posed probe.
#[derive(Debug, Clone, Copy)]
pub struct Slab {
    /// Image frame of the pose.
    pub frame: ProbeFrame,
    /// Face shape (field of view).
    pub footprint: Footprint,
    /// Display depth, mm.
    pub depth_mm: f64,
    /// Thickness profile at the probe's frequency.
    pub profile: SlabProfile,
}

impl Slab {
    /// The slab of a probe at its current pose.
    pub fn of_probe(probe: &Probe) -> Self {
        Slab {
            frame: ProbeFrame::from_pose(&probe.pose),
            footprint: probe.footprint,
            depth_mm: probe.depth_mm,
            profile: probe.elevation.at_frequency(probe.frequency_mhz),
        }
    }

    /// Full slab thickness at image point (u, v), mm (uses the range along the scan line).
    #[inline]
    pub fn thickness_at(&self, u: f64, v: f64) -> f64 {
        self.profile.thickness_mm(self.footprint.range_mm(u, v))
    }

    /// Whether image point (u, v) is in the field of view (boundary inside).
    #[inline]
    pub fn in_view(&self, u: f64, v: f64) -> bool {
        self.footprint
            .contains(u, v, self.depth_mm, BOUNDARY_TOL_MM)
    }

    /// Whether an object at image coordinates `c` reaching `allowance_mm` toward the image
    /// plane touches the slab inside the field of view.
    #[inline]
    pub fn touches(&self, c: &ImageCoords, allowance_mm: f64) -> bool {
        self.in_view(c.u, c.v)
            && c.e.abs() <= 0.5 * self.thickness_at(c.u, c.v) + allowance_mm + BOUNDARY_TOL_MM
    }

    /// Whether a world point lies in the slab within the field of view.
    pub fn contains_point(&self, p: &Point3<f64>) -> bool {
        self.touches(&self.frame.to_image(p), 0.0)
    }
}

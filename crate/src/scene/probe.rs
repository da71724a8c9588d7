//! Probe footprint, pose and the image frame (lateral u, depth v, elevation e) it defines.

use nalgebra::{Point3, Vector3};

use super::ElevationProfile;

/// Shape of the probe face, which fixes the field of view in the image plane.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Footprint {
    /// Flat face: the image is the rectangle |u| ≤ width/2, 0 ≤ v ≤ depth.
    Linear {
        /// Face width along the lateral axis, mm.
        width_mm: f64,
    },
    /// Convex face of radius R: scan lines fan out from a virtual apex R behind the face
    /// centre; `width_mm` is the arc length of the face, so the sector half-angle is
    /// width/(2R) radians.
    Curved {
        /// Arc length of the face, mm.
        width_mm: f64,
        /// Radius of curvature of the face, mm.
        radius_mm: f64,
    },
}

/// Probe pose on the skin, angles in degrees (DESIGN.md "Units and frames").
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Pose {
    /// Face centre x on the skin, mm.
    pub x_mm: f64,
    /// Face centre y on the skin, mm.
    pub y_mm: f64,
    /// Rotation about the world z axis, degrees.
    pub rotate_deg: f64,
    /// Tilt about the lateral axis; positive swings the deep end of the beam toward +n.
    pub tilt_deg: f64,
    /// Rock about the tilted elevation axis; positive swings the deep end toward +a.
    pub rock_deg: f64,
}

/// The probe: footprint, imaging settings, beam elevation profile and pose.
#[derive(Debug, Clone, PartialEq)]
pub struct Probe {
    /// Face shape and field of view.
    pub footprint: Footprint,
    /// Transmit centre frequency, MHz.
    pub frequency_mhz: f64,
    /// Displayed depth, mm (for a curved face: range along each scan line).
    pub depth_mm: f64,
    /// Slab thickness model.
    pub elevation: ElevationProfile,
    /// Where the probe sits and how it is angled.
    pub pose: Pose,
}

/// Orthonormal image frame of a posed probe: origin at the face centre C,
/// `lateral` a′, `beam` b″ and `elevation` n′ with lateral × elevation = beam.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ProbeFrame {
    /// Face centre on the skin (the pivot), world mm.
    pub origin: Point3<f64>,
    /// Lateral unit axis a′ (screen left→right before any display flip).
    pub lateral: Vector3<f64>,
    /// Beam unit axis b″ (screen top→bottom).
    pub beam: Vector3<f64>,
    /// Elevation unit axis n′ (normal to the image plane).
    pub elevation: Vector3<f64>,
}

/// Image coordinates of a point: lateral u, depth v, elevation e, all mm.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ImageCoords {
    /// Lateral position on screen, mm (+ toward the orientation marker).
    pub u: f64,
    /// Depth along the beam axis, mm.
    pub v: f64,
    /// Signed distance from the image plane, mm.
    pub e: f64,
}

impl ProbeFrame {
    /// Frame of a pose: rotate about z, tilt about a, rock about n′, in that order.
    pub fn from_pose(pose: &Pose) -> Self {
        let (sp, cp) = pose.rotate_deg.to_radians().sin_cos();
        let (st, ct) = pose.tilt_deg.to_radians().sin_cos();
        let (sr, cr) = pose.rock_deg.to_radians().sin_cos();
        let a = Vector3::new(cp, sp, 0.0);
        let n = Vector3::new(-sp, cp, 0.0);
        let b = Vector3::z();
        let b1 = b * ct + n * st;
        let n1 = n * ct - b * st;
        let b2 = b1 * cr + a * sr;
        let a1 = a * cr - b1 * sr;
        ProbeFrame {
            origin: Point3::new(pose.x_mm, pose.y_mm, 0.0),
            lateral: a1,
            beam: b2,
            elevation: n1,
        }
    }

    /// Image coordinates of a world point.
    #[inline]
    pub fn to_image(&self, p: &Point3<f64>) -> ImageCoords {
        let d = p - self.origin;
        ImageCoords {
            u: d.dot(&self.lateral),
            v: d.dot(&self.beam),
            e: d.dot(&self.elevation),
        }
    }

    /// Image-frame components of a world direction (no translation).
    #[inline]
    pub fn dir_to_image(&self, d: &Vector3<f64>) -> ImageCoords {
        ImageCoords {
            u: d.dot(&self.lateral),
            v: d.dot(&self.beam),
            e: d.dot(&self.elevation),
        }
    }

    /// World point at image coordinates (u, v, e).
    #[inline]
    pub fn to_world(&self, u: f64, v: f64, e: f64) -> Point3<f64> {
        self.origin + self.lateral * u + self.beam * v + self.elevation * e
    }
}

impl Footprint {
    /// Face width (linear) or arc length (curved), mm.
    pub fn width_mm(&self) -> f64 {
        match *self {
            Footprint::Linear { width_mm } | Footprint::Curved { width_mm, .. } => width_mm,
        }
    }

    /// Range along the scan line through (u, v): v for a flat face, distance from the face
    /// along the radial line for a curved face. This is the depth the elevation profile uses.
    #[inline]
    pub fn range_mm(&self, u: f64, v: f64) -> f64 {
        match *self {
            Footprint::Linear { .. } => v,
            Footprint::Curved { radius_mm, .. } => {
                (u * u + (v + radius_mm).powi(2)).sqrt() - radius_mm
            }
        }
    }

    /// Whether (u, v) lies in the displayed field of view for display depth `depth_mm`.
    /// Boundaries count as inside (tolerance `tol` mm).
    pub fn contains(&self, u: f64, v: f64, depth_mm: f64, tol: f64) -> bool {
        match *self {
            Footprint::Linear { width_mm } => {
                u.abs() <= width_mm / 2.0 + tol && v >= -tol && v <= depth_mm + tol
            }
            Footprint::Curved {
                width_mm,
                radius_mm,
            } => {
                let y = v + radius_mm;
                let rho = (u * u + y * y).sqrt();
                let half = width_mm / (2.0 * radius_mm);
                let (s, c) = half.sin_cos();
                rho >= radius_mm - tol
                    && rho <= radius_mm + depth_mm + tol
                    && u * c - y * s <= tol
                    && -u * c - y * s <= tol
            }
        }
    }

    /// Half-angle of the sector of a curved face, radians (0 for a flat face).
    pub fn half_angle_rad(&self) -> f64 {
        match *self {
            Footprint::Linear { .. } => 0.0,
            Footprint::Curved {
                width_mm,
                radius_mm,
            } => width_mm / (2.0 * radius_mm),
        }
    }
}

//! Needle: size, bevel, entry point, direction and inserted length.

use nalgebra::{Point3, Vector3};

/// Nominal outer diameters (mm) of regular-wall needles, gauge 18 to 27, from the Stubs gauge
/// chart; each lies inside its ISO 9626:2016 outer-diameter range (`tests/facts.rs` checks the
/// ranges that FACTS.md lists).
pub const GAUGE_TABLE: [(u8, f64); 10] = [
    (18, 1.270),
    (19, 1.067),
    (20, 0.908),
    (21, 0.819),
    (22, 0.718),
    (23, 0.641),
    (24, 0.565),
    (25, 0.514),
    (26, 0.464),
    (27, 0.413),
];

/// Nominal outer diameter of a gauge in 18..=27, mm; `None` outside the table.
///
/// ```
/// assert_eq!(slicewise::gauge_outer_diameter_mm(22), Some(0.718));
/// assert_eq!(slicewise::gauge_outer_diameter_mm(30), None);
/// ```
pub fn gauge_outer_diameter_mm(gauge: u8) -> Option<f64> {
    GAUGE_TABLE
        .iter()
        .find(|(g, _)| *g == gauge)
        .map(|(_, od)| *od)
}

/// How the needle's size is given in the scene file.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum NeedleSize {
    /// Gauge number, 18..=27.
    Gauge {
        /// Gauge number.
        gauge: u8,
    },
    /// Explicit outer diameter, mm.
    Diameter {
        /// Outer diameter, mm.
        outer_diameter_mm: f64,
    },
}

/// Skin entry point (on z = 0), mm.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Entry {
    /// World x, mm.
    pub x_mm: f64,
    /// World y, mm.
    pub y_mm: f64,
}

/// A straight bevelled needle.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Needle {
    /// Gauge or explicit outer diameter.
    pub size: NeedleSize,
    /// Total shaft length, mm (the most that can be inserted).
    pub length_mm: f64,
    /// Bevel angle β between the bevel face and the shaft axis, degrees.
    pub bevel_deg: f64,
    /// Roll of the bevel about the shaft, degrees: 0 = bevel face looking up toward the skin.
    pub bevel_roll_deg: f64,
    /// Skin entry point.
    pub entry: Entry,
    /// Direction on the skin, degrees from +x toward +y.
    pub azimuth_deg: f64,
    /// Angle below the skin, degrees: 0 flat, 90 vertical.
    pub angle_deg: f64,
    /// Inserted length from the skin to the tip, mm.
    pub inserted_mm: f64,
}

impl Needle {
    /// Outer diameter, mm.
    pub fn outer_diameter_mm(&self) -> f64 {
        match self.size {
            NeedleSize::Gauge { gauge } => gauge_outer_diameter_mm(gauge).unwrap_or(f64::NAN),
            NeedleSize::Diameter { outer_diameter_mm } => outer_diameter_mm,
        }
    }

    /// Outer radius, mm.
    pub fn radius_mm(&self) -> f64 {
        0.5 * self.outer_diameter_mm()
    }

    /// Bevel length along the shaft, OD / tan β, mm (0 for a square-cut tip at 90°).
    ///
    /// ```
    /// use slicewise::{Entry, Needle, NeedleSize};
    /// let n = Needle {
    ///     size: NeedleSize::Gauge { gauge: 22 },
    ///     length_mm: 50.0, bevel_deg: 30.0, bevel_roll_deg: 0.0,
    ///     entry: Entry { x_mm: 0.0, y_mm: 0.0 },
    ///     azimuth_deg: 0.0, angle_deg: 45.0, inserted_mm: 20.0,
    /// };
    /// assert!((n.bevel_length_mm() - 1.2436).abs() < 1e-3); // 0.718 / tan 30°
    /// ```
    pub fn bevel_length_mm(&self) -> f64 {
        if self.bevel_deg >= 90.0 {
            0.0
        } else {
            self.outer_diameter_mm() / self.bevel_deg.to_radians().tan()
        }
    }

    /// Skin entry point E in world coordinates.
    pub fn entry_point(&self) -> Point3<f64> {
        Point3::new(self.entry.x_mm, self.entry.y_mm, 0.0)
    }

    /// Unit direction d = (cos α cos ψ, cos α sin ψ, sin α).
    pub fn direction(&self) -> Vector3<f64> {
        let (sa, ca) = self.angle_deg.to_radians().sin_cos();
        let (sp, cp) = self.azimuth_deg.to_radians().sin_cos();
        Vector3::new(ca * cp, ca * sp, sa)
    }

    /// Point at arc length s from the entry, world mm.
    pub fn point_at(&self, s_mm: f64) -> Point3<f64> {
        self.entry_point() + self.direction() * s_mm
    }

    /// The tip, world mm.
    pub fn tip(&self) -> Point3<f64> {
        self.point_at(self.inserted_mm)
    }

    /// Unit normal of the bevel face's "up" side: the direction the open bevel looks,
    /// perpendicular to the shaft; roll 0 points it toward the skin (−z side of the shaft).
    pub fn bevel_facing(&self) -> Vector3<f64> {
        let d = self.direction();
        // "Up" perpendicular to the shaft: the component of −z orthogonal to d; for a vertical
        // needle use the azimuth direction instead.
        let up = Vector3::new(0.0, 0.0, -1.0) - d * (-d.z);
        let up = if up.norm() < 1e-9 {
            let (sp, cp) = self.azimuth_deg.to_radians().sin_cos();
            Vector3::new(-cp, -sp, 0.0)
        } else {
            up.normalize()
        };
        let side = d.cross(&up);
        let (sr, cr) = self.bevel_roll_deg.to_radians().sin_cos();
        up * cr + side * sr
    }
}

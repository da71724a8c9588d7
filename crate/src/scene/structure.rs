//! Anatomical structures: tubes along polylines (nerve, vessel, bone) and fluid pockets
//! (ellipsoids). The kind fixes the shape: nerve, vessel and bone are tubes, fluid is a pocket.

use nalgebra::{Matrix3, Point3, Vector3};

/// What a structure stands for; it changes the echo, and for vessels the Doppler signal.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum StructureKind {
    /// A peripheral nerve or nerve root (tube).
    Nerve {
        /// Number of fascicles drawn in the echo image (0 = chosen from the radius).
        fascicles: u32,
        /// A nerve root: fascicles with little connective tissue between them.
        root: bool,
    },
    /// A blood vessel (tube) with mean flow along its path (positive = first point to last).
    Vessel {
        /// Mean flow velocity along the path direction, cm/s.
        flow_cm_s: f64,
    },
    /// A bone shaft modelled as a solid cylinder (tube).
    Bone,
    /// A fluid pocket: injectate, effusion or cyst (ellipsoid).
    Fluid,
}

/// The geometry of a structure.
#[derive(Debug, Clone, PartialEq)]
pub enum Shape {
    /// Constant-radius tube around a polyline.
    Tube(Tube),
    /// Solid ellipsoid.
    Ellipsoid(Ellipsoid),
}

/// A tube of constant radius around a polyline of two or more points.
#[derive(Debug, Clone, PartialEq)]
pub struct Tube {
    /// Axis polyline, world mm, two or more points, consecutive points distinct.
    pub path_mm: Vec<[f64; 3]>,
    /// Tube radius, mm.
    pub radius_mm: f64,
}

/// A solid ellipsoid, yawed about world z.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Ellipsoid {
    /// Centre, world mm.
    pub centre_mm: [f64; 3],
    /// Semi-axes along the ellipsoid's own x, y, z (before the yaw), mm.
    pub semi_axes_mm: [f64; 3],
    /// Rotation about world z, degrees.
    pub yaw_deg: f64,
}

/// One structure of the scene.
#[derive(Debug, Clone, PartialEq)]
pub struct Structure {
    /// Unique id within the scene.
    pub id: String,
    /// What it is.
    pub kind: StructureKind,
    /// Where it is.
    pub shape: Shape,
}

impl StructureKind {
    /// The kind word used in files and reports: nerve, vessel, bone or fluid.
    pub fn name(&self) -> &'static str {
        match self {
            StructureKind::Nerve { .. } => "nerve",
            StructureKind::Vessel { .. } => "vessel",
            StructureKind::Bone => "bone",
            StructureKind::Fluid => "fluid",
        }
    }
}

impl Structure {
    /// Signed distance from a world point to the surface, mm (negative inside).
    pub fn signed_distance_mm(&self, p: &Point3<f64>) -> f64 {
        match &self.shape {
            Shape::Tube(t) => t.signed_distance_mm(p),
            Shape::Ellipsoid(e) => e.signed_distance_mm(p),
        }
    }
}

impl Tube {
    /// Axis points as nalgebra points.
    pub fn points(&self) -> impl Iterator<Item = Point3<f64>> + '_ {
        self.path_mm.iter().map(|p| Point3::from(*p))
    }

    /// Distance from `p` to the tube axis, mm, with the unit axis direction of the closest
    /// segment and the parameter of the closest point along the whole path (mm from the start).
    pub fn axis_distance(&self, p: &Point3<f64>) -> (f64, Vector3<f64>, f64) {
        let mut best = (f64::INFINITY, Vector3::x(), 0.0);
        let mut start = 0.0;
        for w in self.path_mm.windows(2) {
            let a = Point3::from(w[0]);
            let ab = Point3::from(w[1]) - a;
            let len2 = ab.norm_squared();
            let len = len2.sqrt();
            let t = ((p - a).dot(&ab) / len2).clamp(0.0, 1.0);
            let d = (p - (a + ab * t)).norm();
            if d < best.0 {
                best = (d, ab / len, start + t * len);
            }
            start += len;
        }
        best
    }

    /// Signed distance from `p` to the tube surface, mm (negative inside).
    pub fn signed_distance_mm(&self, p: &Point3<f64>) -> f64 {
        self.axis_distance(p).0 - self.radius_mm
    }
}

impl Ellipsoid {
    /// Rotation taking ellipsoid axes to world axes.
    pub fn rotation(&self) -> Matrix3<f64> {
        let (s, c) = self.yaw_deg.to_radians().sin_cos();
        Matrix3::new(c, -s, 0.0, s, c, 0.0, 0.0, 0.0, 1.0)
    }

    /// Centre as a point.
    pub fn centre(&self) -> Point3<f64> {
        Point3::from(self.centre_mm)
    }

    /// A world point in the ellipsoid's own axes (centred, unrotated).
    pub fn to_local(&self, p: &Point3<f64>) -> Vector3<f64> {
        self.rotation().transpose() * (p - self.centre())
    }

    /// Whether `p` lies inside (or on) the ellipsoid.
    pub fn contains(&self, p: &Point3<f64>) -> bool {
        let q = self.to_local(p);
        let [a, b, c] = self.semi_axes_mm;
        (q.x / a).powi(2) + (q.y / b).powi(2) + (q.z / c).powi(2) <= 1.0
    }

    /// Signed Euclidean distance to the surface, mm (negative inside).
    pub fn signed_distance_mm(&self, p: &Point3<f64>) -> f64 {
        let q = self.to_local(p);
        crate::query::signed_distance_ellipsoid([q.x, q.y, q.z], self.semi_axes_mm)
    }
}

//! Where a fluid pocket (ellipsoid) cuts the image plane: an ellipse, exactly.

use nalgebra::{Matrix2, Matrix3, Vector2, Vector3};

use super::section_tube_plane::{normalise_angle, PlaneSection, SectionShape};
use super::slab::Slab;
use crate::scene::Ellipsoid;

/// The cut of an ellipsoid by the centre plane of `slab`, or `None` when the plane misses it.
///
/// In the plane p = C + u·a′ + v·b″ the ellipsoid's quadratic form restricts to
/// F(w) = wᵀMw + 2gᵀw + h with w = (u, v); the cut is {F ≤ 1}, centred at w* = −M⁻¹g with
/// semi-axes √((1 − F(w*))/λᵢ) along the eigenvectors of M.
pub fn ellipsoid_section(slab: &Slab, ell: &Ellipsoid) -> Option<PlaneSection> {
    let rot_t = ell.rotation().transpose();
    let [sa, sb, sc] = ell.semi_axes_mm;
    let dm = Matrix3::from_diagonal(&Vector3::new(
        1.0 / (sa * sa),
        1.0 / (sb * sb),
        1.0 / (sc * sc),
    ));
    let q0 = rot_t * (slab.frame.origin - ell.centre());
    let ca = rot_t * slab.frame.lateral;
    let cb = rot_t * slab.frame.beam;
    let m = Matrix2::new(
        ca.dot(&(dm * ca)),
        ca.dot(&(dm * cb)),
        cb.dot(&(dm * ca)),
        cb.dot(&(dm * cb)),
    );
    let g = Vector2::new(ca.dot(&(dm * q0)), cb.dot(&(dm * q0)));
    let h = q0.dot(&(dm * q0));
    let m_inv = m.try_inverse()?;
    let w = -(m_inv * g);
    let f_min = h + g.dot(&w);
    if f_min > 1.0 {
        return None;
    }
    let room = 1.0 - f_min;
    // Symmetric 2×2 eigen-decomposition in closed form.
    let (p, q, r) = (m[(0, 0)], m[(0, 1)], m[(1, 1)]);
    let mean = 0.5 * (p + r);
    let diff = (0.25 * (p - r) * (p - r) + q * q).sqrt();
    let (l_small, l_big) = (mean - diff, mean + diff);
    // Eigenvector of the smaller eigenvalue = direction of the major axis.
    let angle = if q.abs() < 1e-15 * (p.abs() + r.abs()) {
        if p <= r {
            0.0
        } else {
            90.0
        }
    } else {
        (l_small - p).atan2(q).to_degrees()
    };
    let angle = normalise_angle(angle);
    Some(PlaneSection {
        shape: SectionShape::Ellipse,
        lateral_mm: w.x,
        depth_mm: w.y,
        semi_axes_mm: [(room / l_big).sqrt(), (room / l_small).sqrt()],
        angle_deg: angle,
        in_view: slab.in_view(w.x, w.y),
    })
}

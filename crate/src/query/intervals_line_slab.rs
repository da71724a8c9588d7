//! Which stretches of a straight line (the needle axis) touch the slab inside the field of view.
//!
//! Method: every place where one of the conditions can change truth value is a breakpoint —
//! roots of the field-of-view conditions (linear for a flat face, quadratic and linear for a
//! curved one), the zero of the elevation e(s), and the roots of the slab condition
//! f(s) = T(range(s))/2 + c − |e(s)| (linear for a uniform slab; for the focused hourglass,
//! certified Lipschitz subdivision, which finds both crossings of the waist when a needle
//! threads it). Between consecutive breakpoints the conditions keep their truth values, so one
//! evaluation of the exact predicate at each midpoint decides the piece. Adjacent pieces merge.

use super::roots::{push_linear_root, push_lipschitz_roots, push_quadratic_roots};
use super::slab::Slab;
use crate::scene::{Footprint, ImageCoords, SlabProfile};

/// Smallest sub-interval the focused-slab root search splits, mm: a graze of the slab
/// surface shorter than this (the needle dipping in by under ~0.1 µm) is not reported.
pub const ROOT_RESOLUTION_MM: f64 = 1e-7;

/// A straight segment in image coordinates: start point, unit direction, length and the
/// allowance (how far the object reaches toward the image plane, mm).
#[derive(Debug, Clone, Copy)]
pub struct ImageSegment {
    /// Image coordinates at s = 0.
    pub start: ImageCoords,
    /// Image components of the unit direction.
    pub dir: ImageCoords,
    /// Length, mm; s runs over [0, length].
    pub length_mm: f64,
    /// Reach toward the image plane added to the half-thickness, mm (r·√(1 − (d·n′)²) for a
    /// needle of radius r).
    pub allowance_mm: f64,
}

impl ImageSegment {
    /// Image coordinates at arc length s.
    #[inline]
    pub fn at(&self, s: f64) -> ImageCoords {
        ImageCoords {
            u: self.start.u + self.dir.u * s,
            v: self.start.v + self.dir.v * s,
            e: self.start.e + self.dir.e * s,
        }
    }
}

/// Closed sub-intervals [s0, s1] of [0, length] on which the segment touches the slab inside
/// the field of view, sorted and disjoint. A zero-length segment touches nothing. A single
/// point is reported (as [L, L]) only at the far end, where it means "the tip just touches".
pub fn line_slab_intervals(slab: &Slab, seg: &ImageSegment) -> Vec<[f64; 2]> {
    let len = seg.length_mm;
    if len.is_nan() || len <= 0.0 {
        return Vec::new();
    }
    let (p, d) = (seg.start, seg.dir);
    let mut bps: Vec<f64> = Vec::with_capacity(16);
    bps.push(0.0);
    bps.push(len);

    match slab.footprint {
        Footprint::Linear { width_mm } => {
            push_linear_root(d.u, p.u - 0.5 * width_mm, 0.0, len, &mut bps);
            push_linear_root(d.u, p.u + 0.5 * width_mm, 0.0, len, &mut bps);
            push_linear_root(d.v, p.v, 0.0, len, &mut bps);
            push_linear_root(d.v, p.v - slab.depth_mm, 0.0, len, &mut bps);
        }
        Footprint::Curved {
            width_mm,
            radius_mm,
        } => {
            let y0 = p.v + radius_mm;
            let a = d.u * d.u + d.v * d.v;
            let b = 2.0 * (p.u * d.u + y0 * d.v);
            let c = p.u * p.u + y0 * y0;
            push_quadratic_roots(a, b, c - radius_mm * radius_mm, 0.0, len, &mut bps);
            let outer = radius_mm + slab.depth_mm;
            push_quadratic_roots(a, b, c - outer * outer, 0.0, len, &mut bps);
            let (sn, cs) = (width_mm / (2.0 * radius_mm)).sin_cos();
            push_linear_root(d.u * cs - d.v * sn, p.u * cs - y0 * sn, 0.0, len, &mut bps);
            push_linear_root(
                -d.u * cs - d.v * sn,
                -p.u * cs - y0 * sn,
                0.0,
                len,
                &mut bps,
            );
        }
    }

    let n_before_e = bps.len();
    push_linear_root(d.e, p.e, 0.0, len, &mut bps);
    match slab.profile {
        SlabProfile::Uniform(t) => {
            let h = 0.5 * t + seg.allowance_mm;
            push_linear_root(d.e, p.e - h, 0.0, len, &mut bps);
            push_linear_root(d.e, p.e + h, 0.0, len, &mut bps);
        }
        SlabProfile::Focused(_) => {
            let split = if bps.len() > n_before_e {
                Some(bps[n_before_e])
            } else {
                None
            };
            let f = |s: f64| {
                let c = seg.at(s);
                0.5 * slab.thickness_at(c.u, c.v) + seg.allowance_mm - c.e.abs()
            };
            let h_min = 0.5 * slab.profile.min_thickness_mm() + seg.allowance_mm;
            let h_max = 0.5 * max_thickness(&slab.profile) + seg.allowance_mm;
            let bounds = |a: f64, _fa: f64, b: f64, _fb: f64| {
                // |e| is linear on each piece (split at e = 0), so its extremes are at the ends.
                let (ea, eb) = ((p.e + d.e * a).abs(), (p.e + d.e * b).abs());
                (h_min - ea.max(eb), h_max - ea.min(eb))
            };
            let lip = d.e.abs() + slab.profile.half_slope_bound() * (d.u * d.u + d.v * d.v).sqrt();
            let mut pieces = [0.0, len, len];
            if let Some(s) = split {
                pieces[1] = s;
            }
            for w in pieces.windows(2) {
                push_lipschitz_roots(f, bounds, lip, w[0], w[1], ROOT_RESOLUTION_MM, &mut bps);
            }
        }
    }

    bps.sort_by(f64::total_cmp);
    bps.dedup();

    let inside = |s: f64| slab.touches(&seg.at(s), seg.allowance_mm);
    let mut out: Vec<[f64; 2]> = Vec::new();
    for w in bps.windows(2) {
        let (a, b) = (w[0], w[1]);
        if b <= a || !inside(0.5 * (a + b)) {
            continue;
        }
        match out.last_mut() {
            Some(last) if last[1] == a => last[1] = b,
            _ => out.push([a, b]),
        }
    }
    let tip_covered = out.last().is_some_and(|last| last[1] == len);
    if !tip_covered && inside(len) {
        out.push([len, len]);
    }
    out
}

fn max_thickness(profile: &SlabProfile) -> f64 {
    match profile {
        SlabProfile::Uniform(t) => *t,
        SlabProfile::Focused(f) => f.aperture_mm.max(f.focus_thickness_mm),
    }
}

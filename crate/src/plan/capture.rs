//! Capture solver: the probe tilt (rotation, rock and position held) that puts the needle tip on
//! the slab's centre plane, and the whole tilt window in which the tip is in the slab; the same
//! for a slide along the elevation axis (tilt held).
//!
//! The centre has a closed form. Rock turns about the tilted elevation axis n′, so n′ depends on
//! rotate and tilt only: n′(τ) = cos τ·n − sin τ·b. With Δ = tip − face centre, the tip's
//! elevation is e(τ) = cos τ·(Δ·n) − sin τ·(Δ·b), zero at τ = atan2(Δ·n, Δ·b) — the tilt that
//! captures a tip at depth v and elevation e below the untilted probe is atan2(e, v). Sliding by
//! t along n (tilt τ held) gives e(t) = e0 − t·cos τ, zero at t = e0/cos τ.
//!
//! The window is found with the exact signature rule (the in-slab set meets the bevel region,
//! with the depth-dependent thickness of the focused profile and the field of view): from the
//! centre (clamped to the reach) an exponential search outward until the tip leaves the slab,
//! then regula falsi on a continuous margin (verified with the exact test, bisection when they
//! disagree) to 1e-6° (1e-6 mm for slides). The window reported is the run of tilts around
//! the centre; the brute-force test checks it against a 0.01° scan over random scenes.

use nalgebra::Vector3;
use serde::Serialize;

use crate::query::{line_slab_intervals, ImageSegment, Slab};
use crate::scene::{Pose, ProbeFrame, Scene, SlabProfile};

/// Largest tilt the solver will ask for, degrees either way.
pub const MAX_TILT_DEG: f64 = 45.0;
/// Largest slide from the current position the solver will ask for, mm either way.
pub const MAX_SLIDE_MM: f64 = 50.0;

/// The tilt that captures the tip. `centre_deg` is always the tilt that puts the tip on the
/// centre plane, even when that is beyond reach (the capture's `reason` then says so and the
/// window is the reachable part).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct TiltCapture {
    /// Absolute tilt that puts the tip on the centre plane, degrees.
    pub centre_deg: f64,
    /// Absolute tilts [lo, hi] between which the tip is in the slab, degrees.
    pub window_deg: [f64; 2],
}

/// The slide along the elevation axis that captures the tip.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct SlideCapture {
    /// Absolute position of the face centre along the elevation axis n = (−sin φ, cos φ, 0),
    /// mm (equals `y_mm` when `rotate_deg` is 0).
    pub centre_mm: f64,
    /// Absolute positions [lo, hi] along the elevation axis between which the tip is in the slab.
    pub window_mm: [f64; 2],
    /// The face centre at `centre_mm` as pose x, y (mm).
    pub centre_pose_mm: [f64; 2],
}

/// Result of a capture solve; a `None` half comes with its reason.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Capture {
    /// Tilt solution, or null.
    pub tilt: Option<TiltCapture>,
    /// Slide solution, or null.
    pub slide: Option<SlideCapture>,
    /// Why a half is null (null when both are found).
    pub reason: Option<String>,
}

/// Whether the tip (the bevel region) is in the slab with the probe at `pose`.
pub fn tip_in_slab_at(scene: &Scene, pose: &Pose) -> bool {
    TipTest::new(scene).inside(pose)
}

/// Everything about the needle and probe that does not change while the pose is searched: the
/// bevel region's ends in world coordinates, the needle axis and radius, the slab profile.
struct TipTest {
    probe: crate::scene::Probe,
    profile: SlabProfile,
    heel: nalgebra::Point3<f64>,
    tip: nalgebra::Point3<f64>,
    dir: Vector3<f64>,
    radius_mm: f64,
    bevel_region_mm: f64,
    inserted: bool,
}

impl TipTest {
    fn new(scene: &Scene) -> Self {
        let n = &scene.needle;
        let s0 = (n.inserted_mm - n.bevel_length_mm()).max(0.0);
        TipTest {
            probe: scene.probe.clone(),
            profile: scene
                .probe
                .elevation
                .at_frequency(scene.probe.frequency_mhz),
            heel: n.point_at(s0),
            tip: n.tip(),
            dir: n.direction(),
            radius_mm: n.radius_mm(),
            bevel_region_mm: n.inserted_mm - s0,
            inserted: n.inserted_mm > 0.0,
        }
    }

    /// The slab at `pose` and the bevel region as an image-frame segment.
    fn bevel(&self, pose: &Pose) -> (Slab, ImageSegment) {
        let frame = ProbeFrame::from_pose(pose);
        let slab = Slab {
            frame,
            footprint: self.probe.footprint,
            depth_mm: self.probe.depth_mm,
            profile: self.profile,
        };
        let dir = frame.dir_to_image(&self.dir);
        let seg = ImageSegment {
            start: frame.to_image(&self.heel),
            dir,
            length_mm: self.bevel_region_mm,
            allowance_mm: self.radius_mm * (1.0 - dir.e * dir.e).max(0.0).sqrt(),
        };
        (slab, seg)
    }

    /// The signature rule's exact tip test.
    fn inside(&self, pose: &Pose) -> bool {
        if !self.inserted {
            return false;
        }
        let (slab, b) = self.bevel(pose);
        if b.length_mm <= 0.0 {
            return slab.touches(&slab.frame.to_image(&self.tip), b.allowance_mm);
        }
        !line_slab_intervals(&slab, &b).is_empty()
    }

    /// A continuous margin whose sign follows `inside` away from field-of-view edges: the best
    /// of T/2 + c − |e| over the bevel's ends and its crossing of the centre plane. On each
    /// piece where |e| is linear the margin is convex for a flat face below the aperture cap, so
    /// its maximum is at one of these points; elsewhere the search verifies with `inside`.
    fn margin(&self, pose: &Pose) -> f64 {
        if !self.inserted {
            return -1.0;
        }
        let (slab, b) = self.bevel(pose);
        let mut best = f64::NEG_INFINITY;
        let mut consider = |s: f64| {
            let c = b.at(s);
            if slab.in_view(c.u, c.v) {
                best = best.max(0.5 * slab.thickness_at(c.u, c.v) + b.allowance_mm - c.e.abs());
            }
        };
        consider(0.0);
        consider(b.length_mm);
        if b.dir.e != 0.0 {
            let s = -b.start.e / b.dir.e;
            if s > 0.0 && s < b.length_mm {
                consider(s);
            }
        }
        best
    }
}

/// Find the edge of a window that holds at `centre`, moving in direction `sign` no farther than
/// `limit`. Fast path: exponential search and Illinois (regula falsi) on the continuous margin,
/// then two exact tests to confirm the edge. When the margin and the exact test disagree (a
/// field-of-view edge, the aperture cap), exponential search and bisection on the exact test.
fn window_edge<I, M>(
    inside: I,
    margin: M,
    centre: f64,
    sign: f64,
    first_step: f64,
    limit: f64,
    tol: f64,
) -> f64
where
    I: Fn(f64) -> bool,
    M: Fn(f64) -> f64,
{
    let at = |d: f64| centre + sign * d;
    if let Some(edge) = margin_edge(&margin, &at, first_step, limit, tol) {
        let confirmed = if edge >= limit {
            inside(at(limit))
        } else {
            inside(at(edge)) && !inside(at((edge + tol).min(limit)))
        };
        if confirmed {
            return at(edge);
        }
    }
    let mut good = 0.0f64;
    let mut step = first_step;
    let bad = loop {
        let trial = (good + step).min(limit);
        if !inside(at(trial)) {
            break trial;
        }
        good = trial;
        if trial >= limit {
            return at(limit);
        }
        step *= 2.0;
    };
    let (mut lo, mut hi) = (good, bad);
    while hi - lo > tol {
        let mid = 0.5 * (lo + hi);
        if inside(at(mid)) {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    at(lo)
}

/// The margin's zero beyond the start (distance from the centre), to `tol`; `limit` when the
/// margin stays non-negative to the limit; `None` when the margin misbehaves.
fn margin_edge<M, A>(margin: &M, at: &A, first_step: f64, limit: f64, tol: f64) -> Option<f64>
where
    M: Fn(f64) -> f64,
    A: Fn(f64) -> f64,
{
    let mut a = 0.0f64;
    let mut fa = margin(at(a));
    if fa.is_nan() || fa < 0.0 {
        return None;
    }
    let mut step = first_step;
    let (mut b, mut fb) = loop {
        let trial = (a + step).min(limit);
        let f = margin(at(trial));
        if !f.is_finite() && f != f64::NEG_INFINITY {
            return None;
        }
        if f < 0.0 {
            break (trial, f.max(-1e6));
        }
        a = trial;
        fa = f;
        if trial >= limit {
            return Some(limit);
        }
        step *= 2.0;
    };
    let mut side = 0;
    for _ in 0..100 {
        if b - a <= tol {
            return Some(a);
        }
        let mut x = b - fb * (b - a) / (fb - fa);
        if !(x > a && x < b && x.is_finite()) {
            x = 0.5 * (a + b);
        }
        // Keep the bracket shrinking from both sides.
        let x = x.clamp(a + 0.25 * tol, b - 0.25 * tol);
        let fx = margin(at(x));
        if fx >= 0.0 {
            a = x;
            fa = fx;
            if side == -1 {
                fb *= 0.5;
            }
            side = -1;
        } else {
            b = x;
            fb = fx.max(-1e6);
            if side == 1 {
                fa *= 0.5;
            }
            side = 1;
        }
    }
    (b - a <= tol).then_some(a)
}

/// The window of the exact test within [lo, hi] around `centre` (clamped to the range): `None`
/// when the clamped centre is not inside; else both edges.
fn solve_window<I, M>(
    inside: I,
    margin: M,
    centre: f64,
    lo: f64,
    hi: f64,
    first_step: f64,
    tol: f64,
) -> Option<[f64; 2]>
where
    I: Fn(f64) -> bool,
    M: Fn(f64) -> f64,
{
    let seed = centre.clamp(lo, hi);
    if !inside(seed) {
        return None;
    }
    Some([
        window_edge(&inside, &margin, seed, -1.0, first_step, seed - lo, tol).max(lo),
        window_edge(&inside, &margin, seed, 1.0, first_step, hi - seed, tol).min(hi),
    ])
}

/// The tilt half of the capture solve (what the walking schedule needs), with its reason when
/// there is none or the centre is beyond reach.
pub fn capture_tilt(scene: &Scene) -> (Option<TiltCapture>, Option<String>) {
    let pose = scene.probe.pose;
    if scene.needle.inserted_mm <= 0.0 {
        return (
            None,
            Some("the needle is not inserted: there is no tip to capture".to_owned()),
        );
    }
    let test = TipTest::new(scene);
    let (sp, cp) = pose.rotate_deg.to_radians().sin_cos();
    let delta = scene.needle.tip() - nalgebra::Point3::new(pose.x_mm, pose.y_mm, 0.0);
    let tilt_centre = (delta.x * -sp + delta.y * cp).atan2(delta.z).to_degrees();
    let tilt_pose = |t: f64| Pose {
        tilt_deg: t,
        ..pose
    };
    let beyond = tilt_centre.abs() > MAX_TILT_DEG;
    let tilt = solve_window(
        |t| test.inside(&tilt_pose(t)),
        |t| test.margin(&tilt_pose(t)),
        tilt_centre,
        -MAX_TILT_DEG,
        MAX_TILT_DEG,
        0.01,
        TILT_TOL_DEG,
    )
    .map(|window_deg| TiltCapture {
        centre_deg: tilt_centre,
        window_deg,
    });
    let reason = match (&tilt, beyond) {
        (None, true) => Some(format!("tilt: the tip lies {tilt_centre:.1}° off the untilted beam, beyond the ±{MAX_TILT_DEG}° reach")),
        (None, false) => {
            Some("tilt: at the capture tilt the tip is outside the field of view (beyond the footprint or the display depth)".into())
        }
        (Some(_), true) => Some(format!(
            "tilt: the tip reaches the centre plane only at {tilt_centre:.1}°, beyond the ±{MAX_TILT_DEG}° reach; the window is the part within reach"
        )),
        _ => None,
    };
    (tilt, reason)
}

/// Window edges are found to this precision, degrees.
const TILT_TOL_DEG: f64 = 1e-6;
/// Slide window edges are found to this precision, mm.
const SLIDE_TOL_MM: f64 = 1e-6;

/// Solve for the capture tilt and slide of the scene's needle tip.
///
/// The window is the run of tilts (slides) around the centre at which the tip is in the slab.
/// When the centre is beyond reach but the tip is still in the slab at the edge of reach, the
/// window is the reachable part (`reason` says so). When the tip is out of view at the centre,
/// or out of reach altogether, that half is `None` with its reason.
pub fn capture(scene: &Scene) -> Capture {
    let pose = scene.probe.pose;
    if scene.needle.inserted_mm <= 0.0 {
        let why = "the needle is not inserted: there is no tip to capture".to_owned();
        return Capture {
            tilt: None,
            slide: None,
            reason: Some(why),
        };
    }
    let (tilt, tilt_reason) = capture_tilt(scene);
    let mut reasons: Vec<String> = tilt_reason.into_iter().collect();

    // Slide along n with the tilt held.
    let test = TipTest::new(scene);
    let (sp, cp) = pose.rotate_deg.to_radians().sin_cos();
    let n = Vector3::new(-sp, cp, 0.0);
    let tau = pose.tilt_deg.to_radians();
    let here = pose.x_mm * n.x + pose.y_mm * n.y;
    let frame_e = {
        let f = scene.frame();
        (scene.needle.tip() - f.origin).dot(&f.elevation)
    };
    let slide_pose = |t: f64| Pose {
        x_mm: pose.x_mm + (t - here) * n.x,
        y_mm: pose.y_mm + (t - here) * n.y,
        ..pose
    };
    let slide_centre = here + frame_e / tau.cos();
    let slide_beyond = (slide_centre - here).abs() > MAX_SLIDE_MM;
    let slide = solve_window(
        |t| test.inside(&slide_pose(t)),
        |t| test.margin(&slide_pose(t)),
        slide_centre,
        here - MAX_SLIDE_MM,
        here + MAX_SLIDE_MM,
        0.005,
        SLIDE_TOL_MM,
    )
    .map(|window_mm| {
        let p = slide_pose(slide_centre);
        SlideCapture {
            centre_mm: slide_centre,
            window_mm,
            centre_pose_mm: [p.x_mm, p.y_mm],
        }
    });
    let off = slide_centre - here;
    match (&slide, slide_beyond) {
        (None, true) => reasons.push(format!(
            "slide: the tip is {off:.1} mm along the elevation axis, beyond the ±{MAX_SLIDE_MM} mm reach"
        )),
        (None, false) => reasons.push(
            "slide: at the capture position the tip is outside the field of view (beyond the footprint or the display depth)".into(),
        ),
        (Some(_), true) => reasons.push(format!(
            "slide: the tip reaches the centre plane only {off:.1} mm away, beyond the ±{MAX_SLIDE_MM} mm reach; the window is the part within reach"
        )),
        _ => {}
    }

    let reason = if reasons.is_empty() {
        None
    } else {
        Some(reasons.join("; "))
    };
    Capture {
        tilt,
        slide,
        reason,
    }
}

//! Walking schedule: for an advance in steps, the capture tilt and window at each step, how many
//! times a user who re-centres only when the tip leaves the slab must re-tilt, and how much of
//! the advance is blind if the probe is not moved at all.

use serde::Serialize;

use super::capture::{capture_tilt, tip_in_slab_at};
use crate::scene::Scene;

/// One step of the schedule.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct WalkStep {
    /// Inserted length at this step, mm.
    pub inserted_mm: f64,
    /// Capture tilt, degrees (null when the tip cannot be captured by tilting).
    pub tilt_centre_deg: Option<f64>,
    /// Tilt window [lo, hi], degrees (null likewise).
    pub tilt_window_deg: Option<[f64; 2]>,
    /// Tip offset from the centre plane with the probe unmoved (scene pose), signed mm.
    pub tip_offset_mm: f64,
    /// Half-thickness of the slab plus the needle's reach at the tip, mm (the band the tip
    /// offset must stay within), probe unmoved.
    pub half_band_mm: f64,
    /// Tilt a re-centre-when-lost user holds at this step, degrees.
    pub user_tilt_deg: Option<f64>,
}

/// The schedule and its totals.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct WalkSchedule {
    /// One entry per step, from the first inserted length to the last.
    pub steps: Vec<WalkStep>,
    /// Re-tilts needed by a user who re-centres only when the tip leaves the slab (the first
    /// centring is not counted).
    pub retilts: u32,
    /// Advance (mm) during which the tip is out of the slab if the probe is never moved: each
    /// step's length counts when the tip is out at the step's end.
    pub blind_advance_mm: f64,
}

/// Most steps one schedule may have.
pub const MAX_WALK_STEPS: usize = 5000;

/// Check a schedule request against the scene: both ends within the needle's length, a step of
/// 0.01 to 50 mm, at most [`MAX_WALK_STEPS`] steps. `name` turns a field name (`from_mm`,
/// `to_mm`, `step_mm`) into the word the caller's user knows (a CLI flag, a page field).
pub fn check_walk(
    scene: &Scene,
    from_mm: f64,
    to_mm: f64,
    step_mm: f64,
    name: impl Fn(&str) -> String,
) -> Result<(), String> {
    let len = scene.needle.length_mm;
    for (field, v) in [("from_mm", from_mm), ("to_mm", to_mm)] {
        if !(v.is_finite() && (0.0..=len).contains(&v)) {
            return Err(format!(
                "{}: must be a number from 0 to {len} mm (the needle's length), got {v}",
                name(field)
            ));
        }
    }
    if !(step_mm.is_finite() && (0.01..=50.0).contains(&step_mm)) {
        return Err(format!(
            "{}: must be a number from 0.01 to 50 mm, got {step_mm}",
            name("step_mm")
        ));
    }
    let steps = ((to_mm - from_mm).abs() / step_mm).ceil();
    if steps > MAX_WALK_STEPS as f64 {
        return Err(format!(
            "{}: {steps} steps is more than {MAX_WALK_STEPS}; take a larger step or a shorter advance",
            name("step_mm")
        ));
    }
    Ok(())
}

/// Schedule an advance from `from_mm` to `to_mm` in steps of `step_mm` (the last step may be
/// shorter). Check the numbers first with [`check_walk`].
pub fn walk(scene: &Scene, from_mm: f64, to_mm: f64, step_mm: f64) -> WalkSchedule {
    let mut lengths = Vec::new();
    let dir = if to_mm >= from_mm { 1.0 } else { -1.0 };
    let n = ((to_mm - from_mm).abs() / step_mm).ceil() as usize;
    for i in 0..=n {
        lengths.push(if i == n {
            to_mm
        } else {
            from_mm + dir * step_mm * i as f64
        });
    }
    lengths.dedup();

    let mut s = scene.clone();
    let slab_of = |sc: &Scene| crate::query::Slab::of_probe(&sc.probe);
    let mut steps = Vec::with_capacity(lengths.len());
    let mut retilts = 0;
    let mut blind = 0.0;
    let mut user: Option<f64> = None;
    for (i, &len) in lengths.iter().enumerate() {
        s.needle.inserted_mm = len;
        let (tilt, _) = capture_tilt(&s);
        // The user's tilt: centre once at the start, then only when the tip has left the slab.
        if let Some(t) = tilt {
            // Where a user re-centres to: the centre, or the nearest tilt within reach.
            let target = t.centre_deg.clamp(t.window_deg[0], t.window_deg[1]);
            match user {
                None => user = Some(target),
                Some(u) if u < t.window_deg[0] || u > t.window_deg[1] => {
                    user = Some(target);
                    retilts += 1;
                }
                _ => {}
            }
        }
        let slab = slab_of(&s);
        let sec = crate::query::needle_section(&slab, &s.needle);
        let seg = crate::query::needle_segment(&slab, &s.needle);
        if i > 0 && !tip_in_slab_at(&s, &s.probe.pose) {
            blind += (len - lengths[i - 1]).abs();
        }
        steps.push(WalkStep {
            inserted_mm: len,
            tilt_centre_deg: tilt.map(|t| t.centre_deg),
            tilt_window_deg: tilt.map(|t| t.window_deg),
            tip_offset_mm: sec.tip_offset_mm,
            half_band_mm: 0.5 * sec.slab_thickness_at_tip_mm + seg.allowance_mm,
            user_tilt_deg: user,
        });
    }
    WalkSchedule {
        steps,
        retilts,
        blind_advance_mm: blind,
    }
}

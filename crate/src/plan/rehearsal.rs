//! Scoring a tip-walking rehearsal: from the log of what the user did (inserted length, probe
//! pose, declarations), how much of the advance had the tip confirmed in view, the longest
//! blind advance, false "tip" calls (shaft or nothing taken for the tip), the final distance to
//! the target, and a replay of the user's tilt against the solver's.

use serde::Serialize;

use super::capture::{capture_tilt, tip_in_slab_at};
use crate::query::{needle_section, Signature, Slab};
use crate::scene::{Pose, Scene, Shape, StructureKind};

/// What the user said they see.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Declaration {
    /// "That is the tip."
    Tip,
    /// "That is the shaft, not the tip."
    Shaft,
}

/// One moment of a rehearsal: the state after a step, a probe move, or a declaration.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RehearsalEvent {
    /// Seconds since the start.
    pub t_s: f64,
    /// Inserted length at that moment, mm.
    pub inserted_mm: f64,
    /// Probe pose at that moment.
    pub pose: Pose,
    /// A declaration made at that moment, if any.
    pub declared: Option<Declaration>,
}

/// One row of the replay (one per logged event).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct ReplayRow {
    /// Seconds since the start.
    pub t_s: f64,
    /// Inserted length, mm.
    pub inserted_mm: f64,
    /// The user's tilt, degrees.
    pub user_tilt_deg: f64,
    /// The solver's capture tilt at this length with the user's other pose values, degrees.
    pub solver_tilt_deg: Option<f64>,
    /// The solver's tilt window, degrees.
    pub solver_window_deg: Option<[f64; 2]>,
    /// Whether the tip was in the slab at the user's pose.
    pub tip_in_slab: bool,
    /// What the screen showed.
    pub signature: Signature,
    /// The declaration made here, if any.
    pub declared: Option<Declaration>,
    /// Whether that declaration was right.
    pub declaration_correct: Option<bool>,
}

/// The score of one rehearsal.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RehearsalScore {
    /// Total forward advance, mm.
    pub advance_mm: f64,
    /// Share (0..1) of the advance during which the tip was in the slab.
    pub tip_in_view_share: f64,
    /// Share (0..1) of the advance during which the tip was in the slab and a correct "tip"
    /// call stood (made while the tip was in the slab, not yet lapsed by the tip leaving it).
    pub confirmed_share: f64,
    /// Longest run of advance with the tip out of the slab, mm.
    pub longest_blind_mm: f64,
    /// "Tip" calls made while the tip was not in the slab (the shaft, or nothing, taken for it).
    pub false_tip_calls: u32,
    /// "Tip" calls made while the tip was in the slab.
    pub correct_tip_calls: u32,
    /// "Shaft" calls made while the screen showed the shaft without the tip.
    pub correct_shaft_calls: u32,
    /// "Shaft" calls made while the tip was in the slab or nothing showed.
    pub wrong_shaft_calls: u32,
    /// The structure the distance is measured to (the scene's target, else the nearest nerve).
    pub target_id: Option<String>,
    /// Signed 3D distance from the final tip to the target's surface, mm (negative inside).
    pub final_tip_to_target_mm: Option<f64>,
    /// One row per logged event, for the replay plot.
    pub replay: Vec<ReplayRow>,
}

/// Score a rehearsal log against the scene (whose needle path and probe footprint it uses; the
/// log supplies inserted lengths and poses). `target` names a structure id, or `None` for the
/// nearest nerve at the end. Events are taken in time order.
pub fn score_rehearsal(
    scene: &Scene,
    events: &[RehearsalEvent],
    target: Option<&str>,
) -> RehearsalScore {
    let mut evs: Vec<RehearsalEvent> = events.to_vec();
    evs.sort_by(|a, b| a.t_s.total_cmp(&b.t_s));
    let mut s = scene.clone();
    let mut replay = Vec::with_capacity(evs.len());
    let (mut advance, mut in_view, mut confirmed, mut blind_run, mut longest_blind) =
        (0.0, 0.0, 0.0, 0.0f64, 0.0f64);
    let (mut false_tip, mut correct_tip, mut correct_shaft, mut wrong_shaft) = (0, 0, 0, 0);
    let mut claim = false;
    let mut prev_len: Option<f64> = None;
    for ev in &evs {
        s.needle.inserted_mm = ev.inserted_mm.clamp(0.0, s.needle.length_mm);
        s.probe.pose = ev.pose;
        let tip_in = tip_in_slab_at(&s, &ev.pose);
        let sig = needle_section(&Slab::of_probe(&s.probe), &s.needle).signature;
        // The advance since the last event, judged by the state at its end.
        if let Some(p) = prev_len {
            let step = (s.needle.inserted_mm - p).max(0.0);
            advance += step;
            if tip_in {
                in_view += step;
                if claim {
                    confirmed += step;
                }
                blind_run = 0.0;
            } else {
                blind_run += step;
                longest_blind = longest_blind.max(blind_run);
            }
        }
        if !tip_in {
            claim = false;
        }
        let correct = ev.declared.map(|d| match d {
            Declaration::Tip => {
                if tip_in {
                    correct_tip += 1;
                    claim = true;
                } else {
                    false_tip += 1;
                }
                tip_in
            }
            Declaration::Shaft => {
                let right = matches!(sig, Signature::ShaftDot | Signature::LineWithoutTip);
                if right {
                    correct_shaft += 1;
                } else {
                    wrong_shaft += 1;
                }
                right
            }
        });
        let (tilt, _) = capture_tilt(&s);
        replay.push(ReplayRow {
            t_s: ev.t_s,
            inserted_mm: s.needle.inserted_mm,
            user_tilt_deg: ev.pose.tilt_deg,
            solver_tilt_deg: tilt.map(|t| t.centre_deg),
            solver_window_deg: tilt.map(|t| t.window_deg),
            tip_in_slab: tip_in,
            signature: sig,
            declared: ev.declared,
            declaration_correct: correct,
        });
        prev_len = Some(s.needle.inserted_mm);
    }
    let tip = s.needle.tip();
    let chosen = match target {
        Some(id) => scene.structures.iter().find(|st| st.id == id),
        None => scene
            .structures
            .iter()
            .filter(|st| {
                matches!(st.kind, StructureKind::Nerve { .. }) && matches!(st.shape, Shape::Tube(_))
            })
            .min_by(|a, b| {
                a.signed_distance_mm(&tip)
                    .total_cmp(&b.signed_distance_mm(&tip))
            }),
    };
    let share = |x: f64| if advance > 0.0 { x / advance } else { 0.0 };
    RehearsalScore {
        advance_mm: advance,
        tip_in_view_share: share(in_view),
        confirmed_share: share(confirmed),
        longest_blind_mm: longest_blind,
        false_tip_calls: false_tip,
        correct_tip_calls: correct_tip,
        correct_shaft_calls: correct_shaft,
        wrong_shaft_calls: wrong_shaft,
        target_id: chosen.map(|c| c.id.clone()),
        final_tip_to_target_mm: if evs.is_empty() {
            None
        } else {
            chosen.map(|c| c.signed_distance_mm(&tip))
        },
        replay,
    }
}

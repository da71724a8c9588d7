//! Solvers on a scene: the probe tilt (or slide) that captures the needle tip, and the walking
//! schedule for an advance in steps.

mod capture;
mod rehearsal;
mod walk;

pub use capture::{
    capture, capture_tilt, tip_in_slab_at, Capture, SlideCapture, TiltCapture, MAX_SLIDE_MM,
    MAX_TILT_DEG,
};
pub use rehearsal::{score_rehearsal, Declaration, RehearsalEvent, RehearsalScore, ReplayRow};
pub use walk::{check_walk, walk, WalkSchedule, WalkStep, MAX_WALK_STEPS};

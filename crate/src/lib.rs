//! # Slicewise
//!
//! Exact geometry of what a thin ultrasound beam "catches": for a probe pose and its elevation
//! profile, which part of a bevelled needle, and which nerves, vessels, bone and fluid lie
//! inside the beam slab, and what that looks like on the 2D image — including the cases that
//! mislead (a bright dot that is only the shaft while the tip has passed; an in-plane line that
//! ends short of the real tip).
//!
//! Slicewise is a rehearsal, teaching and discussion aid. It is not for guiding a real needle;
//! local protocols, supervision and licensed practice come first.
//!
//! ## Frames and units
//! Millimetres and degrees at every interface; radians only inside. World: skin is z = 0,
//! z is depth. The probe pose (x, y, rotate, tilt, rock) gives the image frame: lateral u,
//! depth v, elevation e (see [`ProbeFrame`]). The screen shows (u, v); e is what the slab hides.
//!
//! ## Decisions DESIGN.md leaves open (documented here)
//! - **Curved faces.** `width_mm` is the arc length of the face; the sector half-angle is
//!   width/(2R), at most 75°. Depth for the field of view and for the elevation profile is the
//!   range along each scan line (distance from the face), not the Cartesian v.
//! - **Slab width definition.** The focused profile's thickness is the two-way −6 dB width
//!   (see the `scene::beam` docs for the formula and sources).
//! - **Boundaries.** A point on the slab surface or the field-of-view edge is inside
//!   (tolerance [`BOUNDARY_TOL_MM`]). A tip that only just touches the slab counts as in it.
//! - **Zero inserted length.** Nothing is inside the body: no in-slab set, signature `none`,
//!   hidden length 0.
//! - **Dot or line.** An in-slab stretch whose on-screen length is at most
//!   [`DOT_EXTENT_MM`] (3 mm) reads as a dot.
//! - **Long-axis band.** A tube meeting the image plane at less than 15° ([`BAND_SINE`]) is
//!   reported as a band (half-width, half-length) rather than an ellipse.
//! - **Structure sections** are cuts by the centre plane (e = 0); the simulated image weighs
//!   the whole slab.
//! - **Tip distances.** 3D: from the true tip to the structure surface, negative inside.
//!   On screen: from the apparent tip to the structure's cut outline, negative inside.
//!
//! - **Capture.** The tilt (or slide) window is the run of poses around the capture centre in
//!   which the tip is in the slab; reach is ±45° of tilt and ±50 mm of slide ([`capture`]).
//! - **Rehearsal score.** Advance counts in the step that ends in the state judged; a "tip" call
//!   stands until the tip leaves the slab ([`score_rehearsal`]).
//!
//! ## Layout
//! `scene` (data), `query` (slab sections and signature), `plan` (capture solver, walking
//! schedule, rehearsal scoring), `echo` (the simulated screen), `scenefile` (v1 JSON: load,
//! validate, save, edit by path), `cli` (the `slicewise` command, native only), `wasm` (the
//! browser boundary, the only file that imports wasm-bindgen).

mod echo;
mod plan;
mod query;
mod scene;
mod scenefile;

#[cfg(not(target_arch = "wasm32"))]
pub mod cli;
#[cfg(target_arch = "wasm32")]
pub mod wasm;

pub use echo::*;
pub use plan::*;
pub use query::*;
pub use scene::*;
pub use scenefile::{
    field_limits, load_scene_str, load_scene_value, save_scene_string, scene_to_value,
    set_scene_field, set_scene_number, SceneError, FORMAT, VERSION,
};

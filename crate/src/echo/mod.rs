//! The simulated echo image: the grey-scale screen and colour Doppler a clinician would see of
//! the scene, from published physics where there is some and documented modelling choices
//! where there is not.
//!
//! One file per responsibility: `scan` (scan-line geometry, field of view, scan conversion),
//! `tissue` (acoustic properties), `speckle` (speckle and texture anchored to the tissue),
//! `structures` (elevation share of nerves, vessels, bone, fluid), `attenuation` (losses and
//! automatic time-gain), `needle_echo` (specular shaft, reverberation, bevel), `doppler`
//! (shift, aliasing, palettes, frame rate), `display_chain` (gain, time-gain bands, log
//! compression, grey levels), `render` (the renderer), `echo_line` (its per-line passes
//! without the needle), `scene_echo` (that needle-free echo, kept between frames), `compose`
//! (levels to screen pixels), `posed` and `math` (the scene in the image frame and
//! deterministic numerics).
//!
//! **Determinism.** Every transcendental function here is `libm`'s (or a polynomial of IEEE
//! basic operations), speckle comes from integer hashing of tissue coordinates, and nothing
//! depends on time or threads: the same scene gives the same bytes natively and in wasm32
//! ([`echo_fingerprint`] is the check). The probe frame and the needle direction are rebuilt
//! here with libm rather than taken from `ProbeFrame`, whose std trigonometry may differ by an
//! ulp between targets.
//!
//! Pure computation: no web-sys, no wasm-bindgen.

mod attenuation;
mod compose;
mod display_chain;
mod doppler;
mod echo_line;
mod math;
mod needle_echo;
mod posed;
mod render;
mod scan;
mod scene_echo;
mod speckle;
mod structures;
mod tissue;

pub use attenuation::{penetration_mm, round_trip_attenuation_db, TGC_REFERENCE_DB_CM_MHZ};
pub use display_chain::{log_compress, quantise_grey};
pub use doppler::{
    aliased_shift_hz, aliases, doppler_shift_hz, max_prf_hz, prf_for_scale_hz, DopplerLegend,
    FrameRate, COLOUR_ENSEMBLE, COLOUR_LINE_SPACING, PALETTE_ENTRIES,
    WALL_FILTER_FRACTION_OF_NYQUIST,
};
pub use needle_echo::{
    lumen_diameter_mm, needle_echo_amplitude, reverberation_spacing_mm, NEEDLE_DIFFUSE_SHARE,
    NEEDLE_SPECULAR_WIDTH_DEG,
};
pub use render::{
    echo_fingerprint, DisplayUsed, DopplerUsed, EchoError, ImagePointMm, Imaging, MmPerPx,
    RenderMeta, RenderOutput, Renderer, MAX_SCREEN_PX, MIN_SCREEN_PX,
};
pub use tissue::{
    intensity_reflection, C_FLUID_M_S, Z_AIR_MRAYL, Z_SOFT_TISSUE_MRAYL, Z_STEEL_MRAYL,
};

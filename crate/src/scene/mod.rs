//! Scene data: probe, elevation profile, needle, structures, tissue and display settings. Data and poses only;
//! every computation on them lives in `query/`, `plan/` and `echo/`.

mod beam;
mod display;
mod needle;
mod probe;
mod rehearsal;
mod structure;
mod tissue;

pub use beam::{
    gaussian_radius_mm, wavelength_mm, ElevationProfile, FocusedBeam, SlabProfile,
    GAUSSIAN_FWHM_PER_RADIUS, SPEED_OF_SOUND_M_S, TWO_WAY_6DB_FOCUS_FACTOR,
};
pub use display::{
    DisplaySettings, DopplerMode, DopplerSettings, DEFAULT_DOPPLER_SCALE_CM_S,
    DEFAULT_DYNAMIC_RANGE_DB, DEFAULT_TGC_BANDS,
};
pub use needle::{gauge_outer_diameter_mm, Entry, Needle, NeedleSize, GAUGE_TABLE};
pub use probe::{Footprint, ImageCoords, Pose, Probe, ProbeFrame};
pub use rehearsal::{AdvanceMode, RehearsalSettings};
pub use structure::{Ellipsoid, Shape, Structure, StructureKind, Tube};
pub use tissue::{LayerKind, TissueLayer, TissueLayers};

/// One complete scene: what a scene file holds.
#[derive(Debug, Clone, PartialEq)]
pub struct Scene {
    /// Short human title, may be empty.
    pub title: String,
    /// Free notes for the facilitator, may be empty.
    pub notes: String,
    /// The probe, its beam and its pose.
    pub probe: Probe,
    /// The needle and how far it is inserted.
    pub needle: Needle,
    /// Tissue layers under the skin (top to bottom); the last continues downward.
    pub tissue: TissueLayers,
    /// Nerves, vessels, bone and fluid pockets.
    pub structures: Vec<Structure>,
    /// Display settings of the simulated screen (all optional in the file).
    pub display: DisplaySettings,
    /// Settings of a tip-walking rehearsal on this scene (all optional in the file).
    pub rehearsal: RehearsalSettings,
}

impl Scene {
    /// The probe's image frame at its current pose.
    pub fn frame(&self) -> ProbeFrame {
        ProbeFrame::from_pose(&self.probe.pose)
    }
}

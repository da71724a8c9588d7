//! Settings of a tip-walking rehearsal, as a scene may set them. Data only; the page runs the
//! rehearsal and `plan::score_rehearsal` scores it.

/// How the needle advances during a rehearsal.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum AdvanceMode {
    /// One step per key press (default).
    #[default]
    Keys,
    /// A steady pace, whatever the user does.
    Steady,
}

impl AdvanceMode {
    /// All modes, in the order the file format lists them.
    pub const ALL: [AdvanceMode; 2] = [AdvanceMode::Keys, AdvanceMode::Steady];

    /// The word used in files: "keys" or "steady".
    pub fn name(&self) -> &'static str {
        match self {
            AdvanceMode::Keys => "keys",
            AdvanceMode::Steady => "steady",
        }
    }
}

/// The optional `rehearsal` object of a scene file.
#[derive(Debug, Clone, PartialEq)]
pub struct RehearsalSettings {
    /// Key presses or a steady pace.
    pub advance: AdvanceMode,
    /// Steady pace, mm/s (0.1 to 20; default 1).
    pub pace_mm_s: f64,
    /// Advance per key press (and per tick at a steady pace), mm (0.1 to 10; default 0.5).
    pub step_mm: f64,
    /// How far the rehearsal advances from the scene's inserted length, mm (0.5 to 300;
    /// default 15); it stops earlier at the needle's full length.
    pub advance_mm: f64,
    /// The structure the final distance is measured to (an id in the scene), or the nearest
    /// nerve when `None`.
    pub target: Option<String>,
    /// Time limit, seconds (10 to 3600; default 180).
    pub time_limit_s: f64,
}

impl Default for RehearsalSettings {
    fn default() -> Self {
        RehearsalSettings {
            advance: AdvanceMode::Keys,
            pace_mm_s: 1.0,
            step_mm: 0.5,
            advance_mm: 15.0,
            target: None,
            time_limit_s: 180.0,
        }
    }
}

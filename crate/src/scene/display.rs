//! Display settings of the simulated screen: gain, time-gain compensation, dynamic range, grey
//! levels and colour Doppler. Data only; the echo module applies them.

/// How colour Doppler is shown over the grey-scale image.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum DopplerMode {
    /// Grey scale only (default).
    #[default]
    Off,
    /// Directional colour: hue for toward/away, brightness for the (aliased) velocity.
    Velocity,
    /// Non-directional power mode: brightness for the strength of the moving-blood signal.
    Power,
}

impl DopplerMode {
    /// All modes, in the order the file format lists them.
    pub const ALL: [DopplerMode; 3] = [DopplerMode::Off, DopplerMode::Velocity, DopplerMode::Power];

    /// The word used in files: "off", "velocity" or "power".
    pub fn name(&self) -> &'static str {
        match self {
            DopplerMode::Off => "off",
            DopplerMode::Velocity => "velocity",
            DopplerMode::Power => "power",
        }
    }
}

/// Colour Doppler settings.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DopplerSettings {
    /// Off, directional velocity, or power.
    pub mode: DopplerMode,
    /// Velocity scale, cm/s: the aliasing (Nyquist) velocity for flow straight along the beam.
    /// It sets the pulse repetition frequency, PRF = 4·f0·scale/c. In 1..=300, default 30.
    pub scale_cm_s: f64,
}

impl Default for DopplerSettings {
    fn default() -> Self {
        DopplerSettings {
            mode: DopplerMode::Off,
            scale_cm_s: DEFAULT_DOPPLER_SCALE_CM_S,
        }
    }
}

/// Default colour velocity scale, cm/s.
pub const DEFAULT_DOPPLER_SCALE_CM_S: f64 = 30.0;
/// Default dynamic range, dB.
pub const DEFAULT_DYNAMIC_RANGE_DB: f64 = 60.0;
/// Default number of time-gain bands (all at 0 dB).
pub const DEFAULT_TGC_BANDS: usize = 8;

/// The display chain's settings, as the scene file's optional `display` object holds them.
///
/// ```
/// let d = slicewise::DisplaySettings::default();
/// assert_eq!((d.gain_db, d.dynamic_range_db, d.grey_levels), (0.0, 60.0, 256));
/// assert_eq!(d.tgc_db, vec![0.0; 8]);
/// ```
#[derive(Debug, Clone, PartialEq)]
pub struct DisplaySettings {
    /// Overall receive gain, dB, in −40..=40 (default 0).
    pub gain_db: f64,
    /// Time-gain compensation, dB, one value per depth band from the face to the display depth
    /// (bands of equal height; the gain is interpolated between band centres). 4 to 16 values,
    /// each in −30..=30 (default eight bands at 0). Applied on top of the automatic
    /// compensation for the soft-tissue average attenuation.
    pub tgc_db: Vec<f64>,
    /// Dynamic range of the log compression, dB, in 20..=100 (default 60).
    pub dynamic_range_db: f64,
    /// Number of distinct grey levels shown, 2..=256 (default 256).
    pub grey_levels: u32,
    /// Colour Doppler.
    pub doppler: DopplerSettings,
}

impl Default for DisplaySettings {
    fn default() -> Self {
        DisplaySettings {
            gain_db: 0.0,
            tgc_db: vec![0.0; DEFAULT_TGC_BANDS],
            dynamic_range_db: DEFAULT_DYNAMIC_RANGE_DB,
            grey_levels: 256,
            doppler: DopplerSettings::default(),
        }
    }
}

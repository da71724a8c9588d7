//! Elevation profile of the beam: the full slab thickness T at each range along a scan line.
//!
//! # The focused model
//!
//! Wavelength λ = c/f with c = 1540 m/s, the soft-tissue speed scanners assume
//! (AIUM/IEC convention; λ = 0.154 mm at 10 MHz).
//!
//! Width at the elevation focus F for a lens of aperture height H: the pulse-echo
//! (two-way) −6 dB full width of a uniformly weighted rectangular aperture,
//! `T_focus = 0.886·λ·F/H`. The one-way far-field pattern of a rectangular aperture is
//! sinc(H·x/(λF)); the two-way pattern is its square, whose −6 dB (amplitude ½) full width is
//! 0.886·λF/H (the one-way −3 dB width of the same sinc, since sinc² at −6 dB is sinc at −3 dB).
//! Source: the far-field (Fraunhofer) pattern of a rectangular aperture, e.g. Szabo,
//! *Diagnostic Ultrasound Imaging: Inside Out*, ch. 6 (from memory); the factor is derived in
//! the `beam_focus_width_matches_sinc_pattern` test.
//!
//! Away from the focus the width grows as a Gaussian beam (Siegman, *Lasers*, ch. 17; any
//! optics text): `w(z) = w0·√(1 + ((z − F)/zR)²)`, `zR = π·w0²/λ`, where w is the 1/e²
//! intensity radius. For a Gaussian the two-way −6 dB full width equals the one-way intensity
//! FWHM, `1.177·w` (√(2 ln 2) = 1.1774), so we set `w0 = T_focus/1.177` and
//! `T(z) = 1.177·w(z)`.
//!
//! Near the face the Gaussian would grow without bound; a real lens cannot illuminate more
//! than its own height, so T is capped at H ("never wider than H near the face", and deep
//! too, where the cap rarely binds).
//!
//! The slab is therefore "the region inside the two-way −6 dB width". Strong specular
//! reflectors (a needle) are still seen a little outside it; the simulated image (echo
//! module) weights by the whole beam profile, not by this hard edge.

/// Speed of sound assumed by scanners in soft tissue, m/s.
pub const SPEED_OF_SOUND_M_S: f64 = 1540.0;
/// Two-way −6 dB width at the focus of a rectangular aperture, in units of λF/H.
pub const TWO_WAY_6DB_FOCUS_FACTOR: f64 = 0.886;
/// FWHM of a Gaussian intensity profile per 1/e² radius: √(2 ln 2).
pub const GAUSSIAN_FWHM_PER_RADIUS: f64 = 1.177_410_022_515_474_6;

/// Wavelength in mm at `frequency_mhz` with c = 1540 m/s.
///
/// ```
/// let lambda = slicewise::wavelength_mm(10.0);
/// assert!((lambda - 0.154).abs() < 1e-12);
/// ```
pub fn wavelength_mm(frequency_mhz: f64) -> f64 {
    // c [m/s] / f [1/µs] = c·1e-6 m = c·1e-3 mm.
    SPEED_OF_SOUND_M_S * 1e-3 / frequency_mhz
}

/// 1/e² radius of a Gaussian beam with waist radius `w0_mm` at `z_focus_mm`, at range `z_mm`.
pub fn gaussian_radius_mm(w0_mm: f64, z_focus_mm: f64, lambda_mm: f64, z_mm: f64) -> f64 {
    let z_r = std::f64::consts::PI * w0_mm * w0_mm / lambda_mm;
    let x = (z_mm - z_focus_mm) / z_r;
    w0_mm * (1.0 + x * x).sqrt()
}

/// How thick the slab is at each range.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum ElevationProfile {
    /// Constant thickness, for teaching and closed-form tests.
    Uniform {
        /// Full slab thickness, mm.
        thickness_mm: f64,
    },
    /// Lens-focused elevation: hourglass from the aperture height and focus.
    Focused {
        /// Elevation aperture (element height), mm.
        aperture_mm: f64,
        /// Elevation focus range, mm.
        focus_mm: f64,
    },
}

/// The focused profile's derived constants at one frequency.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FocusedBeam {
    /// Wavelength, mm.
    pub wavelength_mm: f64,
    /// Elevation aperture H, mm (also the cap on T).
    pub aperture_mm: f64,
    /// Focus range F, mm.
    pub focus_mm: f64,
    /// Two-way −6 dB full width at the focus, 0.886·λF/H, mm.
    pub focus_thickness_mm: f64,
    /// Gaussian waist radius w0 = T_focus/1.177, mm.
    pub waist_radius_mm: f64,
    /// Rayleigh range zR = π·w0²/λ, mm.
    pub rayleigh_mm: f64,
}

impl FocusedBeam {
    /// Constants for aperture H, focus F at `frequency_mhz`.
    pub fn new(aperture_mm: f64, focus_mm: f64, frequency_mhz: f64) -> Self {
        let lambda = wavelength_mm(frequency_mhz);
        let t_focus = TWO_WAY_6DB_FOCUS_FACTOR * lambda * focus_mm / aperture_mm;
        let w0 = t_focus / GAUSSIAN_FWHM_PER_RADIUS;
        FocusedBeam {
            wavelength_mm: lambda,
            aperture_mm,
            focus_mm,
            focus_thickness_mm: t_focus,
            waist_radius_mm: w0,
            rayleigh_mm: std::f64::consts::PI * w0 * w0 / lambda,
        }
    }

    /// Full thickness at range z (mm), before the aperture cap.
    #[inline]
    pub fn uncapped_thickness_mm(&self, z_mm: f64) -> f64 {
        let x = (z_mm - self.focus_mm) / self.rayleigh_mm;
        self.focus_thickness_mm * (1.0 + x * x).sqrt()
    }

    /// Full thickness at range z (mm): the Gaussian growth capped at the aperture height.
    #[inline]
    pub fn thickness_mm(&self, z_mm: f64) -> f64 {
        self.uncapped_thickness_mm(z_mm)
            .min(self.aperture_mm.max(self.focus_thickness_mm))
    }

    /// Largest |dT/dz|/2 anywhere: a Lipschitz bound for the half-thickness.
    pub fn half_thickness_slope_bound(&self) -> f64 {
        0.5 * self.focus_thickness_mm / self.rayleigh_mm
    }
}

impl ElevationProfile {
    /// Full slab thickness T at range `z_mm` along the scan line, for `frequency_mhz`.
    ///
    /// ```
    /// use slicewise::ElevationProfile;
    /// let slab = ElevationProfile::Uniform { thickness_mm: 1.5 };
    /// assert_eq!(slab.thickness_mm(20.0, 10.0), 1.5);
    /// ```
    pub fn thickness_mm(&self, z_mm: f64, frequency_mhz: f64) -> f64 {
        match *self {
            ElevationProfile::Uniform { thickness_mm } => thickness_mm,
            ElevationProfile::Focused {
                aperture_mm,
                focus_mm,
            } => FocusedBeam::new(aperture_mm, focus_mm, frequency_mhz).thickness_mm(z_mm),
        }
    }

    /// A fast evaluator for repeated queries at one frequency.
    pub fn at_frequency(&self, frequency_mhz: f64) -> SlabProfile {
        match *self {
            ElevationProfile::Uniform { thickness_mm } => SlabProfile::Uniform(thickness_mm),
            ElevationProfile::Focused {
                aperture_mm,
                focus_mm,
            } => SlabProfile::Focused(FocusedBeam::new(aperture_mm, focus_mm, frequency_mhz)),
        }
    }
}

/// An elevation profile resolved at one frequency.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum SlabProfile {
    /// Constant full thickness, mm.
    Uniform(f64),
    /// Hourglass.
    Focused(FocusedBeam),
}

impl SlabProfile {
    /// Full thickness at range z, mm.
    #[inline]
    pub fn thickness_mm(&self, z_mm: f64) -> f64 {
        match self {
            SlabProfile::Uniform(t) => *t,
            SlabProfile::Focused(f) => f.thickness_mm(z_mm),
        }
    }

    /// Smallest full thickness over all ranges, mm.
    pub fn min_thickness_mm(&self) -> f64 {
        match self {
            SlabProfile::Uniform(t) => *t,
            SlabProfile::Focused(f) => f
                .focus_thickness_mm
                .min(f.aperture_mm.max(f.focus_thickness_mm)),
        }
    }

    /// Largest full thickness over ranges in [z0, z1], mm (the profile is convex or capped,
    /// so the maximum is at an end).
    pub fn max_thickness_between_mm(&self, z0: f64, z1: f64) -> f64 {
        self.thickness_mm(z0).max(self.thickness_mm(z1))
    }

    /// Lipschitz bound of T/2 with respect to range.
    pub fn half_slope_bound(&self) -> f64 {
        match self {
            SlabProfile::Uniform(_) => 0.0,
            SlabProfile::Focused(f) => f.half_thickness_slope_bound(),
        }
    }
}

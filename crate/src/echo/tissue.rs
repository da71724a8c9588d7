//! Acoustic properties of each material the beam meets: attenuation, impedance and diffuse
//! backscatter. Data only, with the source of every number beside it.
//!
//! Attenuation (dB/cm at 1 MHz) is from Diagnostics 13(5):855, 2023, Table 4; impedances
//! (MRayl) from Sensors 23:5942, 2023, Table A2 and OpenStax College Physics Table 17.5 (see
//! shared FACTS.md). Diffuse backscatter levels are **modelling choices**: the published trade
//! descriptions (skin and fascia hyperechoic, fat hypoechoic, blood and fluid anechoic, nerve
//! fascicles hypoechoic in brighter connective tissue) turned into decibels relative to muscle.

/// Intensity reflection coefficient of a flat interface at normal incidence,
/// R = ((Z2 − Z1)/(Z2 + Z1))² (any physics text; FACTS.md "Impedance and reflection").
///
/// ```
/// // Soft tissue (1.63 MRayl) against air (0.0004 MRayl): almost everything comes back.
/// assert!(slicewise::intensity_reflection(1.63, 0.0004) > 0.998);
/// ```
pub fn intensity_reflection(z1_mrayl: f64, z2_mrayl: f64) -> f64 {
    let r = (z2_mrayl - z1_mrayl) / (z2_mrayl + z1_mrayl);
    r * r
}

/// Acoustic impedance of soft tissue as scanners assume it, MRayl (FACTS.md).
pub const Z_SOFT_TISSUE_MRAYL: f64 = 1.63;
/// Acoustic impedance of air, MRayl (FACTS.md).
pub const Z_AIR_MRAYL: f64 = 0.0004;
/// Acoustic impedance of stainless steel, MRayl: 5700 m/s × 7.9 g/cm³ ≈ 45 (FACTS.md, from
/// memory).
pub const Z_STEEL_MRAYL: f64 = 45.0;
/// Speed of sound in water-like fluid filling a needle lumen, m/s (FACTS.md "Needles": the
/// reverberation spacing uses lumen × 1540/c_fluid).
pub const C_FLUID_M_S: f64 = 1480.0;

/// The materials of the echo model.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[repr(u8)]
pub(crate) enum Material {
    /// Coupling gel between the probe face and the skin (above z = 0).
    Gel,
    Skin,
    Fat,
    Muscle,
    Fascia,
    /// Aerated lung: air behind the pleura.
    Lung,
    Blood,
    /// Injectate, effusion or cyst.
    Fluid,
    /// Epineurium and interfascicular connective tissue.
    NerveConnective,
    /// Nerve fascicle (perineurium and axons).
    NerveFascicle,
    VesselWall,
    Bone,
}

pub(crate) const MATERIAL_COUNT: usize = 12;

/// Properties of one material.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Acoustic {
    /// Attenuation at 1 MHz, dB/cm.
    pub(crate) atten_db_cm_1mhz: f64,
    /// Power-law exponent of attenuation with frequency (α = α1·f^n).
    pub(crate) atten_exponent: f64,
    /// Characteristic impedance, MRayl.
    pub(crate) impedance_mrayl: f64,
    /// Diffuse backscatter relative to muscle, dB.
    pub(crate) backscatter_db: f64,
}

const fn ac(atten: f64, exponent: f64, z: f64, backscatter_db: f64) -> Acoustic {
    Acoustic {
        atten_db_cm_1mhz: atten,
        atten_exponent: exponent,
        impedance_mrayl: z,
        backscatter_db,
    }
}

/// The table, indexed by `Material as usize`.
///
/// Nerve tissue is not in the attenuation table; we give it muscle's value (modelling choice),
/// so a nerve casts neither shadow nor enhancement. Attenuation exponents: 1 for soft tissues (the usual linear law), 2 for water-like fluid and
/// gel (water's classical f² law). Impedances not in FACTS.md (skin, fascia, nerve, vessel wall,
/// gel) are modelling choices close to soft tissue. Blood 0.15, water 0.0022, skin 0.35,
/// adipose 0.63, muscle 0.96 (across fibres: images usually cut fibres across), connective 1.57,
/// bone 15.0, lung 40 dB/cm at 1 MHz.
pub(crate) const ACOUSTIC: [Acoustic; MATERIAL_COUNT] = [
    ac(0.0022, 2.0, 1.50, -55.0), // gel: water-like, anechoic
    ac(0.35, 1.0, 1.63, 7.0),     // skin: dermis bright
    ac(0.63, 1.0, 1.38, -15.0),   // fat: hypoechoic lobules (septa added as texture)
    ac(0.96, 1.0, 1.69, 0.0),     // muscle: the reference level
    ac(1.57, 1.0, 1.75, 9.0),     // fascia: dense connective sheet, bright
    ac(40.0, 1.0, 0.0004, -20.0), // lung: air
    ac(0.15, 1.0, 1.61, -38.0),   // blood: anechoic at these settings
    ac(0.0022, 2.0, 1.48, -50.0), // fluid: water-like, anechoic
    ac(0.96, 1.0, 1.66, 10.0),    // nerve connective tissue: bright, muscle-like loss
    ac(0.96, 1.0, 1.63, -12.0),   // fascicle: dark
    ac(1.57, 1.0, 1.72, 5.0),     // vessel wall
    ac(15.0, 1.0, 7.0, -4.0),     // cortical bone (6.5–7.8 MRayl)
];

impl Material {
    #[inline]
    pub(crate) fn acoustic(self) -> &'static Acoustic {
        &ACOUSTIC[self as usize]
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn table_is_in_material_order() {
        assert_eq!(Material::Bone as usize, MATERIAL_COUNT - 1);
        assert_eq!(
            ACOUSTIC[Material::Lung as usize].impedance_mrayl,
            Z_AIR_MRAYL
        );
    }
}

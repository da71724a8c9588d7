//! The renderer: builds one frame of the simulated screen from a scene — scan lines, tissue,
//! structures, needle, attenuation, time-gain, log compression and colour Doppler — into an
//! RGBA buffer that a canvas can show as it is.
//!
//! Each scan line is computed from the face down in four passes over its samples:
//! 1. background tissue layers (echogenicity, texture, impedance, attenuation, the echoes of
//!    layer boundaries);
//! 2. each structure whose image-plane box the line crosses, painted over the background by its
//!    elevation share (fluid, then vessels, nerves, bone), with the echo of its surface;
//! 3. the sum: diffuse echo × speckle + interface echoes + needle, times the two-way
//!    transmission accumulated so far, which then takes this sample's own loss;
//! 4. reverberation copies of near-total reflectors (air, bone) at multiples of their range,
//!    and the conversion to a level in dB with the time-gain curve.
//!
//! **Interface echoes (modelling choice).** A boundary returns R·F(θ)·Δf² times the echo of a
//! perfect mirror, where R = ((Z2 − Z1)/(Z2 + Z1))² (FACTS.md), Δf is the change in the
//! structure's elevation share across one axial resolution cell, and F(θ) = cos⁴θ the loss of
//! a partly rough surface tilted by θ from the beam (a Phong-like lobe). A sharp boundary thus
//! shows as a line one resolution cell thick, a boundary smeared by the slab as a fainter,
//! wider one. The transmitted intensity keeps (1 − R) each way.
//!
//! **Calibration (modelling choices).** Muscle's diffuse echo sits at −31 dB re the display's
//! full scale at 0 dB gain; a perfect mirror square to the beam returns 35 dB more than muscle;
//! a 22G needle square to the beam 34 dB more.

use serde::Serialize;

use super::attenuation::{auto_tgc_db, step_transmission};
use super::display_chain::{user_tgc_db, GreyMap};
use super::doppler::{
    doppler_shift_cos_hz, frame_rate, legend, DopplerLegend, FrameRate,
    WALL_FILTER_FRACTION_OF_NYQUIST,
};
use super::math::{fnv1a64, NormalCdf};
use super::needle_echo::{point_intensity, NeedleLine, PosedNeedle};
use super::posed::{dot, Axes};
use super::scan::ScanGeometry;
use super::speckle::{fat_factor, muscle_factor, SpeckleField, TextureField};
use super::structures::{PosedKind, PosedStructure};
use super::tissue::{intensity_reflection, Material, MATERIAL_COUNT, Z_STEEL_MRAYL};
use crate::scene::{wavelength_mm, DopplerMode, Footprint, LayerKind, Scene, SlabProfile};

/// Smallest and largest accepted screen size, pixels per side.
pub const MIN_SCREEN_PX: u32 = 16;
/// Largest accepted screen size, pixels per side.
pub const MAX_SCREEN_PX: u32 = 4096;

/// Muscle's diffuse echo re full scale at 0 dB gain, dB.
const SYSTEM_LEVEL_DB: f64 = -31.0;
/// A perfect mirror square to the beam, re muscle's diffuse echo (intensity ratio, +35 dB).
const MIRROR_INTENSITY: f64 = 3.0e3;
/// A 22G needle square to the beam, re muscle's diffuse echo: steel's R times this share of
/// the mirror echo (a thin cylinder returns part of what a plane would).
const NEEDLE_SHARE_OF_MIRROR: f64 = 0.97;
/// Intensity reflection of the probe face back into the tissue, for reverberation (modelling).
const FACE_REFLECTION: f64 = 0.4;
/// Interfaces reflecting at least this much ring between themselves and the probe face.
const REVERB_MIN_REFLECTION: f32 = 0.5;
/// Pulse length in cycles; axial resolution n·λ/2 (FACTS.md "Beam").
const PULSE_CYCLES: f64 = 2.0;
/// Receive f-number; lateral resolution 0.886·λ·F# (FACTS.md "Beam", modelling choice F# = 2).
const F_NUMBER: f64 = 2.0;
/// An interface echo spans this many axial resolution cells (the change in elevation share is
/// taken across this distance; modelling choice: a real boundary is never perfectly sharp).
const INTERFACE_CELLS: f64 = 1.5;
/// Amplitude of the gentle undulation of layer boundaries below the skin, mm (modelling).
const BOUNDARY_WAVE_MM: f64 = 0.5;
/// FWHM per σ of a Gaussian, 2·√(2 ln 2).
const FWHM_PER_SIGMA: f64 = 2.354_820_045;

/// Why a frame could not be rendered.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct EchoError {
    /// The argument at fault: "width" or "height".
    pub field: &'static str,
    /// What is wrong and what is allowed.
    pub message: String,
}

impl std::fmt::Display for EchoError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{}: {}", self.field, self.message)
    }
}

impl std::error::Error for EchoError {}

/// Pixel spacing, mm.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct MmPerPx {
    /// Lateral spacing, mm per pixel.
    pub lateral: f64,
    /// Depth spacing, mm per pixel.
    pub depth: f64,
}

/// A point of the image plane, mm.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct ImagePointMm {
    /// Lateral, mm (+ toward the orientation marker).
    pub lateral_mm: f64,
    /// Depth, mm.
    pub depth_mm: f64,
}

/// Doppler settings as used.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DopplerUsed {
    /// "off", "velocity" or "power".
    pub mode: &'static str,
    /// Velocity scale, cm/s.
    pub scale_cm_s: f64,
}

/// Display settings as used for the frame.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DisplayUsed {
    /// Overall gain, dB.
    pub gain_db: f64,
    /// Time-gain bands, dB, face to display depth.
    pub tgc_db: Vec<f64>,
    /// Dynamic range, dB.
    pub dynamic_range_db: f64,
    /// Grey levels, 2..=256.
    pub grey_levels: u32,
    /// Colour Doppler.
    pub doppler: DopplerUsed,
    /// Automatic time-gain slope for the soft-tissue average, dB per cm of depth (2·0.5·f).
    pub auto_tgc_db_per_cm: f64,
}

/// Imaging figures of the frame.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Imaging {
    /// Transmit frequency, MHz.
    pub frequency_mhz: f64,
    /// Wavelength at 1540 m/s, mm.
    pub wavelength_mm: f64,
    /// Axial resolution n·λ/2 with n = 2 cycles, mm.
    pub axial_resolution_mm: f64,
    /// Lateral resolution 0.886·λ·F# at F# = 2, mm.
    pub lateral_resolution_mm: f64,
    /// Display depth, mm.
    pub depth_mm: f64,
    /// Depth at which the soft-tissue average loses 60 dB round trip, mm.
    pub penetration_60db_mm: f64,
}

/// Everything about a frame except its pixels.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RenderMeta {
    /// Screen width, pixels.
    pub width_px: u32,
    /// Screen height, pixels.
    pub height_px: u32,
    /// Pixel spacing, mm.
    pub mm_per_px: MmPerPx,
    /// Centre of pixel (0, 0) in image mm; pixel (x, y) is at
    /// (lateral_mm + x·mm_per_px.lateral, depth_mm + y·mm_per_px.depth). For a curved face the
    /// screen is the rectangle around the sector; pixels outside the sector are black.
    pub top_left_mm: ImagePointMm,
    /// "linear" or "curved".
    pub footprint: &'static str,
    /// Display settings used.
    pub display: DisplayUsed,
    /// Frequency, resolution and depth figures.
    pub imaging: Imaging,
    /// Colour legend and Doppler figures, or null when colour is off.
    pub doppler: Option<DopplerLegend>,
    /// Estimated frame rates (grey scale alone and duplex).
    pub frame_rate: FrameRate,
}

/// One rendered frame: RGBA pixels and their meta.
#[derive(Debug, Clone)]
pub struct RenderOutput {
    width: u32,
    height: u32,
    rgba: Vec<u8>,
    grey: Vec<u8>,
    meta: Option<RenderMeta>,
}

impl RenderOutput {
    /// Width, pixels.
    pub fn width(&self) -> u32 {
        self.width
    }
    /// Height, pixels.
    pub fn height(&self) -> u32 {
        self.height
    }
    /// Pixels, row-major from the top-left, 4 bytes each (R, G, B, A = 255), width·height·4
    /// bytes: ready for a canvas `ImageData`. Doppler colour is already blended in.
    pub fn rgba(&self) -> &[u8] {
        &self.rgba
    }
    /// The grey-scale image before colour, one byte per pixel, row-major.
    pub fn grey(&self) -> &[u8] {
        &self.grey
    }
    /// FNV-1a 64-bit hash of the RGBA bytes (the native/wasm agreement check).
    pub fn fingerprint(&self) -> u64 {
        fnv1a64(self.rgba())
    }

    /// Spacing, origin, display settings, Doppler legend and frame rates of this frame.
    pub fn meta(&self) -> &RenderMeta {
        // Always set by `Renderer::render` before the output is handed out.
        self.meta.as_ref().unwrap_or_else(|| unreachable!())
    }
}

/// Per-line scratch arrays (length = samples per line).
#[derive(Debug, Clone, Default)]
struct LineScratch {
    bg_beta: Vec<f32>,
    bg_z: Vec<f32>,
    bg_g: Vec<f32>,
    occ: Vec<f32>,
    s_beta: Vec<f32>,
    s_z: Vec<f32>,
    s_g: Vec<f32>,
    spec: Vec<f32>,
    loss: Vec<f32>,
    refl1: Vec<f32>,
    f_outer: Vec<f32>,
    f_inner: Vec<f32>,
    intensity: Vec<f32>,
    col_w: Vec<f32>,
    col_v: Vec<f32>,
    trans: Vec<f32>,
    spec_blur: Vec<f32>,
    in_band: Vec<bool>,
}

impl LineScratch {
    fn resize(&mut self, n: usize) {
        self.in_band.resize(n, false);
        for v in [
            &mut self.bg_beta,
            &mut self.bg_z,
            &mut self.bg_g,
            &mut self.occ,
            &mut self.s_beta,
            &mut self.s_z,
            &mut self.s_g,
            &mut self.spec,
            &mut self.loss,
            &mut self.refl1,
            &mut self.f_outer,
            &mut self.f_inner,
            &mut self.intensity,
            &mut self.col_w,
            &mut self.col_v,
            &mut self.trans,
            &mut self.spec_blur,
        ] {
            v.resize(n, 0.0);
        }
    }
}

/// A reusable renderer: keeps its tables and buffers between frames, so re-rendering after a
/// slider move allocates nothing.
///
/// ```
/// let scene = slicewise::load_scene_str(include_str!("../../../scenes-demo/forearm-out-of-plane.scene.json")).unwrap();
/// let mut renderer = slicewise::Renderer::new();
/// let frame = renderer.render(&scene, 128, 96).unwrap();
/// assert_eq!(frame.rgba().len(), 128 * 96 * 4);
/// assert!(frame.meta().mm_per_px.lateral > 0.0);
/// ```
#[derive(Debug, Clone)]
pub struct Renderer {
    cdf: NormalCdf,
    geometry: Option<ScanGeometry>,
    speckle: SpeckleField,
    texture: TextureField,
    speckle_col: Vec<[f32; 4]>,
    speckle_taps: Vec<(u32, f32, u32, f32)>,
    texture_col: Vec<[f32; 4]>,
    texture_taps: Vec<(u32, f32)>,
    level: Vec<f32>,
    colour_w: Vec<f32>,
    colour_v: Vec<f32>,
    line: LineScratch,
    grey_map: Option<GreyMap>,
    grid_key: Option<u64>,
    output: RenderOutput,
}

impl Default for Renderer {
    fn default() -> Self {
        Self::new()
    }
}

/// Per-sample tables of one frame.
struct SampleTables {
    sigma_int: Vec<f64>,
    we_needle: Vec<f64>,
    gain: Vec<f32>,
}

/// One tissue layer boundary of the frame.
#[derive(Clone, Copy)]
struct Boundary {
    depth_mm: f64,
    reflection: f32,
}

impl Renderer {
    /// A renderer with empty buffers.
    pub fn new() -> Self {
        Renderer {
            cdf: NormalCdf::new(),
            geometry: None,
            speckle: SpeckleField::default(),
            texture: TextureField::default(),
            speckle_col: Vec::new(),
            speckle_taps: Vec::new(),
            texture_col: Vec::new(),
            texture_taps: Vec::new(),
            level: Vec::new(),
            colour_w: Vec::new(),
            colour_v: Vec::new(),
            line: LineScratch::default(),
            grey_map: None,
            grid_key: None,
            output: RenderOutput {
                width: 0,
                height: 0,
                rgba: Vec::new(),
                grey: Vec::new(),
                meta: None,
            },
        }
    }

    /// Render `scene` on a screen of `width` × `height` pixels (each 16..=4096).
    pub fn render(
        &mut self,
        scene: &Scene,
        width: u32,
        height: u32,
    ) -> Result<&RenderOutput, EchoError> {
        for (field, v) in [("width", width), ("height", height)] {
            if !(MIN_SCREEN_PX..=MAX_SCREEN_PX).contains(&v) {
                return Err(EchoError {
                    field,
                    message: format!(
                        "must be a whole number of pixels from {MIN_SCREEN_PX} to {MAX_SCREEN_PX}, got {v}"
                    ),
                });
            }
        }
        let (w, h) = (width as usize, height as usize);
        let probe = &scene.probe;
        let key = ScanGeometry::key_of(&probe.footprint, probe.depth_mm, w, h);
        if self.geometry.as_ref().map(|g| g.key()) != Some(key) {
            self.geometry = Some(ScanGeometry::new(&probe.footprint, probe.depth_mm, w, h));
        }
        let Some(geo) = self.geometry.take() else {
            unreachable!()
        };
        self.render_with(scene, &geo);
        self.geometry = Some(geo);
        Ok(&self.output)
    }

    fn render_with(&mut self, scene: &Scene, geo: &ScanGeometry) {
        let probe = &scene.probe;
        let f0 = probe.frequency_mhz;
        let depth = probe.depth_mm;
        let lambda = wavelength_mm(f0);
        let axial_res = PULSE_CYCLES * lambda / 2.0;
        let lateral_res = 0.886 * lambda * F_NUMBER;
        let axes = Axes::from_pose(&probe.pose);
        let profile: SlabProfile = probe.elevation.at_frequency(f0);
        let display = &scene.display;

        // ---- per-sample tables ----
        let s_count = geo.samples;
        let mut tables = SampleTables {
            sigma_int: Vec::with_capacity(s_count),
            we_needle: Vec::with_capacity(s_count),
            gain: Vec::with_capacity(s_count),
        };
        let mut max_sigma: f64 = 0.0;
        let mut max_sigma_int: f64 = 0.0;
        for i in 0..s_count {
            let r = geo.range_of(i);
            let t = profile.thickness_mm(r).max(1e-3);
            let sigma_amp = t / FWHM_PER_SIGMA;
            max_sigma = max_sigma.max(sigma_amp);
            tables.sigma_int.push(sigma_amp / core::f64::consts::SQRT_2);
            max_sigma_int = max_sigma_int.max(sigma_amp / core::f64::consts::SQRT_2);
            tables.we_needle.push(1.0 / (sigma_amp * sigma_amp));
            let db = SYSTEM_LEVEL_DB
                + display.gain_db
                + auto_tgc_db(f0, r)
                + user_tgc_db(&display.tgc_db, depth, r);
            tables.gain.push(libm::pow(10.0, db / 10.0) as f32);
        }
        let reach_e = 4.5 * max_sigma + 0.5;

        // ---- materials at this frequency and step ----
        let mut step_g = [0.0f32; MATERIAL_COUNT];
        let mut beta = [0.0f32; MATERIAL_COUNT];
        let mut imp = [0.0f32; MATERIAL_COUNT];
        for (k, m) in super::tissue::ACOUSTIC.iter().enumerate() {
            step_g[k] = step_transmission(m, f0, geo.dr);
            beta[k] = libm::pow(10.0, m.backscatter_db / 10.0) as f32;
            imp[k] = m.impedance_mrayl as f32;
        }
        let mat = |m: Material| m as usize;

        // ---- tissue layers: boundaries from the skin (z = 0) down ----
        let mut layer_mats = vec![Material::Gel];
        let mut bounds = Vec::new();
        let mut top = 0.0;
        bounds.push(0.0);
        for (i, l) in scene.tissue.layers.iter().enumerate() {
            layer_mats.push(match l.kind {
                LayerKind::Skin => Material::Skin,
                LayerKind::Fat => Material::Fat,
                LayerKind::Muscle => Material::Muscle,
                LayerKind::Fascia => Material::Fascia,
                LayerKind::Lung => Material::Lung,
            });
            if i + 1 < scene.tissue.layers.len() {
                top += l.thickness_mm;
                bounds.push(top);
            }
        }
        if layer_mats.len() == 1 {
            layer_mats.push(Material::Muscle);
        }
        let boundaries: Vec<Boundary> = bounds
            .iter()
            .enumerate()
            .map(|(b, &z)| Boundary {
                depth_mm: z,
                reflection: intensity_reflection(
                    layer_mats[b].acoustic().impedance_mrayl,
                    layer_mats[b + 1].acoustic().impedance_mrayl,
                ) as f32,
            })
            .collect();

        // ---- structures and needle ----
        let mut posed: Vec<PosedStructure> = scene
            .structures
            .iter()
            .filter_map(|s| PosedStructure::new(s, &axes, reach_e))
            .collect();
        posed.sort_by_key(|p| p.layer);
        let needle_scale = MIRROR_INTENSITY
            * intensity_reflection(super::tissue::Z_SOFT_TISSUE_MRAYL, Z_STEEL_MRAYL)
            * NEEDLE_SHARE_OF_MIRROR;
        let needle = PosedNeedle::new(&scene.needle, &axes, reach_e, needle_scale);

        // ---- textures ----
        let u_range = (geo.u0 - geo.sx, geo.u0 + geo.width as f64 * geo.sx);
        let v_range = (geo.v0 - geo.sy, geo.v0 + geo.height as f64 * geo.sy);
        let cell_e = profile.min_thickness_mm().max(0.2);
        // Grid points farther than a few cells outside the field of view are never read.
        let margin = 3.0 * (lateral_res.max(axial_res)).max(1.5 * geo.sx.max(geo.sy)) + 1.0;
        let in_view = |u: f64, v: f64| -> bool {
            match probe.footprint {
                Footprint::Linear { .. } => true,
                Footprint::Curved { radius_mm, .. } => {
                    let y = v + radius_mm;
                    let rho = (u * u + y * y).sqrt();
                    if rho > radius_mm + depth + margin || rho < radius_mm - margin {
                        return false;
                    }
                    // Distance outside the sector's straight edges.
                    let (sh, ch) = (geo.half_sin_cos.0, geo.half_sin_cos.1);
                    u * ch - y * sh <= margin && -u * ch - y * sh <= margin
                }
            }
        };
        let tex_step = (0.2f64).max(1.5 * geo.sx.max(geo.sy));
        let mut fat_z = Vec::new();
        let mut muscle_z = Vec::new();
        {
            let mut top = 0.0;
            let n_layers = scene.tissue.layers.len();
            for (i, l) in scene.tissue.layers.iter().enumerate() {
                let bottom = if i + 1 == n_layers {
                    f64::INFINITY
                } else {
                    top + l.thickness_mm
                };
                match l.kind {
                    LayerKind::Fat => fat_z.push((top, bottom)),
                    LayerKind::Muscle => muscle_z.push((top, bottom)),
                    _ => {}
                }
                top += l.thickness_mm;
            }
        }
        // The grids depend only on the pose, the frequency, the slab, the layers and the
        // screen: moving the needle or changing display settings reuses them.
        let grid_key = {
            let mut bytes = Vec::with_capacity(160);
            let pose = &probe.pose;
            for x in [
                pose.x_mm,
                pose.y_mm,
                pose.rotate_deg,
                pose.tilt_deg,
                pose.rock_deg,
                f0,
                cell_e,
                tex_step,
                u_range.0,
                u_range.1,
                v_range.0,
                v_range.1,
                depth,
            ] {
                bytes.extend_from_slice(&x.to_bits().to_le_bytes());
            }
            for &(a, b) in fat_z.iter().chain(&[(-1.0, -1.0)]).chain(&muscle_z) {
                bytes.extend_from_slice(&a.to_bits().to_le_bytes());
                bytes.extend_from_slice(&b.to_bits().to_le_bytes());
            }
            let (kind, a, b, c, w, h) = geo.key();
            bytes.push(kind);
            for x in [a, b, c, w as u64, h as u64, geo.samples as u64] {
                bytes.extend_from_slice(&x.to_le_bytes());
            }
            fnv1a64(&bytes)
        };
        if self.grid_key != Some(grid_key) {
            self.speckle.fill(
                &axes,
                lateral_res,
                axial_res,
                cell_e,
                u_range,
                v_range,
                &in_view,
            );
            self.speckle_taps.clear();
            if geo.convert.is_none() {
                // Straight lines: sample i is at depth v = range.
                for i in 0..geo.samples {
                    let tap = self.speckle.column_tap(self.speckle.gy(geo.range_of(i)));
                    self.speckle_taps.push(tap);
                }
            }
            self.texture.fill(
                &axes, u_range, v_range, tex_step, &fat_z, &muscle_z, &in_view,
            );
            self.grid_key = Some(grid_key);
        }

        // ---- Doppler ----
        let dop_legend = legend(display.doppler.mode, f0, depth, display.doppler.scale_cm_s);
        let (prf, wall_hz) = match &dop_legend {
            Some(l) => (l.prf_hz, WALL_FILTER_FRACTION_OF_NYQUIST * l.nyquist_hz),
            None => (0.0, 0.0),
        };
        let doppler_on = dop_legend.is_some();
        let power_mode = display.doppler.mode == DopplerMode::Power;

        // ---- buffers ----
        let n_acq = geo.lines * s_count;
        self.level.resize(n_acq, 0.0);
        self.colour_w.resize(n_acq, 0.0);
        self.colour_v.resize(n_acq, 0.0);
        self.line.resize(s_count);

        let stencil = ((INTERFACE_CELLS * axial_res / geo.dr).round() as usize).clamp(1, 64);
        // Axial pulse shape in intensity (σ_I = σ_axial/√2) out to ±4σ_I, summing to 1.
        let sigma_int_axial = axial_res / FWHM_PER_SIGMA / core::f64::consts::SQRT_2;
        let psf_half = ((4.0 * sigma_int_axial / geo.dr) as usize).min(16);
        let mut psf_kernel: Vec<f32> = (0..=2 * psf_half)
            .map(|q| {
                let x = (q as f64 - psf_half as f64) * geo.dr / sigma_int_axial;
                libm::exp(-0.5 * x * x) as f32
            })
            .collect();
        let psf_sum: f32 = psf_kernel.iter().sum();
        psf_kernel.iter_mut().for_each(|k| *k /= psf_sum);
        let lat_z = axes.lateral[2];
        let beam_z = axes.beam[2];
        let n_z = axes.elevation[2].abs();
        let cdf = &self.cdf;
        let sigma_l = lateral_res / FWHM_PER_SIGMA;
        let sigma_a = axial_res / FWHM_PER_SIGMA;

        let straight = geo.convert.is_none();
        if straight {
            // Every line runs straight down: texture rows depend on the sample only.
            let line0 = self.texture.line(geo.line_origin[0], geo.line_dir[0]);
            self.texture_taps.clear();
            for i in 0..s_count {
                let tap = self.texture.column_tap(&line0, geo.range_of(i));
                self.texture_taps.push(tap);
            }
        }
        for j in 0..geo.lines {
            let o = geo.line_origin[j];
            let b = geo.line_dir[j];
            let ls = &mut self.line;
            // World depth along the line: z = u·a_z + v·b_z (face centre on the skin).
            let z_origin = o[0] * lat_z + o[1] * beam_z;
            let z_slope = b[0] * lat_z + b[1] * beam_z;
            let cos_layer = z_slope.abs() as f32;
            let f_layer = {
                let c2 = cos_layer * cos_layer;
                c2 * c2
            };

            // Pass 1: background layers. Between boundary bands the layer is constant and the
            // samples are filled in tight loops; inside a band (near a boundary, within the
            // slab's spread, the interface cell and the undulation) the two layers are blended.
            let tex_line = self.texture.line(o, b);
            if straight {
                self.texture.column(&tex_line, &mut self.texture_col);
            }
            ls.occ.fill(0.0);
            ls.s_beta.fill(0.0);
            ls.s_z.fill(0.0);
            ls.s_g.fill(0.0);
            ls.col_w.fill(0.0);
            ls.col_v.fill(0.0);
            ls.spec.fill(0.0);
            ls.loss.fill(1.0);
            ls.refl1.fill(0.0);
            ls.in_band.fill(false);
            let reach_max = 4.0 * n_z * max_sigma_int
                + (stencil as f64 + 1.0) * geo.dr * z_slope.abs()
                + BOUNDARY_WAVE_MM;
            for bd in &boundaries {
                let band = if z_slope.abs() > 1e-9 {
                    let rc = (bd.depth_mm - z_origin) / z_slope;
                    let half = reach_max / z_slope.abs() + geo.dr;
                    sample_span(rc - half, rc + half, geo)
                } else if (z_origin - bd.depth_mm).abs() <= reach_max {
                    Some((0, s_count - 1))
                } else {
                    None
                };
                if let Some((a, c)) = band {
                    ls.in_band[a..=c].fill(true);
                }
            }
            let mut i = 0;
            while i < s_count {
                if ls.in_band[i] {
                    let r = geo.range_of(i);
                    let z = z_origin + z_slope * r;
                    let layer = layer_index(&boundaries, z);
                    let sigma_z = n_z * tables.sigma_int[i];
                    // Nearest boundary: above (layer − 1) or below (layer).
                    let k = match (layer.checked_sub(1), boundaries.get(layer)) {
                        (Some(a), Some(bl)) => {
                            if (z - boundaries[a].depth_mm).abs() <= (z - bl.depth_mm).abs() {
                                a
                            } else {
                                layer
                            }
                        }
                        (Some(a), None) => a,
                        (None, _) => 0,
                    };
                    let bd = boundaries[k];
                    // Boundaries undulate gently (modelling choice), except the skin.
                    let wave = if k == 0 {
                        0.0
                    } else {
                        BOUNDARY_WAVE_MM * self.texture.wave(&tex_line, r) as f64
                    };
                    let share = |zz: f64| -> f32 {
                        let x = zz - bd.depth_mm - wave;
                        if sigma_z > 1e-6 {
                            cdf.phi((x / sigma_z) as f32)
                        } else if x >= 0.0 {
                            1.0
                        } else {
                            0.0
                        }
                    };
                    let f_lo = share(z);
                    let f_back = share(z - z_slope * stencil as f64 * geo.dr);
                    let f_prev = share(z - z_slope * geo.dr);
                    let df = f_lo - f_back;
                    let r1 = bd.reflection * (f_lo - f_prev).abs();
                    ls.spec[i] = MIRROR_INTENSITY as f32 * bd.reflection * df * df * f_layer;
                    ls.loss[i] = (1.0 - r1) * (1.0 - r1);
                    ls.refl1[i] = r1;
                    let (m_hi, m_lo) = (layer_mats[k], layer_mats[k + 1]);
                    let tex = self.texture.at(&tex_line, r);
                    let (a, c) = (mat(m_hi), mat(m_lo));
                    let f_hi = 1.0 - f_lo;
                    ls.bg_beta[i] = beta[a] * texture_factor(m_hi, &tex) * f_hi
                        + beta[c] * texture_factor(m_lo, &tex) * f_lo;
                    ls.bg_z[i] = imp[a] * f_hi + imp[c] * f_lo;
                    ls.bg_g[i] = step_g[a] * f_hi + step_g[c] * f_lo;
                    i += 1;
                    continue;
                }
                // A run of samples outside every band: one layer.
                let mut end = i;
                while end < s_count && !ls.in_band[end] {
                    end += 1;
                }
                let r = geo.range_of(i);
                let m = layer_mats[layer_index(&boundaries, z_origin + z_slope * r)];
                let k = mat(m);
                ls.bg_z[i..end].fill(imp[k]);
                ls.bg_g[i..end].fill(step_g[k]);
                match m {
                    Material::Fat | Material::Muscle if straight => {
                        let col = &self.texture_col;
                        let taps = &self.texture_taps[i..end];
                        for (slot, tap) in ls.bg_beta[i..end].iter_mut().zip(taps) {
                            let tex = TextureField::at_column(col, *tap);
                            *slot = beta[k] * texture_factor(m, &tex);
                        }
                    }
                    Material::Fat | Material::Muscle => {
                        for (q, slot) in ls.bg_beta[i..end].iter_mut().enumerate() {
                            let tex = self.texture.at(&tex_line, geo.range_of(i + q));
                            *slot = beta[k] * texture_factor(m, &tex);
                        }
                    }
                    _ => ls.bg_beta[i..end].fill(beta[k]),
                }
                i = end;
            }

            // Pass 2: structures, painted in order.
            for st in &posed {
                let Some((i0, i1)) = ray_box(o, b, &st.bbox, geo, depth) else {
                    continue;
                };
                let start = i0.saturating_sub(stencil);
                for i in start..=i1 {
                    let r = geo.range_of(i);
                    let u = o[0] + b[0] * r;
                    let v = o[1] + b[1] * r;
                    let hit = st.hit(u, v, tables.sigma_int[i], cdf).unwrap_or_default();
                    ls.f_outer[i] = hit.outer;
                    ls.f_inner[i] = hit.inner;
                    if i < i0 {
                        continue;
                    }
                    let f_back_o = if i >= start + stencil {
                        ls.f_outer[i - stencil]
                    } else {
                        0.0
                    };
                    let f_prev_o = if i > start { ls.f_outer[i - 1] } else { 0.0 };
                    let f_back_i = if i >= start + stencil {
                        ls.f_inner[i - stencil]
                    } else {
                        0.0
                    };
                    let f_prev_i = if i > start { ls.f_inner[i - 1] } else { 0.0 };
                    if hit.outer <= 0.0 && f_back_o <= 0.0 && f_prev_o <= 0.0 {
                        continue;
                    }
                    // Angle between the surface normal and the line.
                    let rad = hit.radial;
                    let rn = dot(rad, rad).sqrt();
                    let cos_t = if rn > 1e-12 {
                        ((rad[0] * b[0] + rad[1] * b[1]) / rn).abs() as f32
                    } else {
                        1.0
                    };
                    let f_dir = {
                        let c2 = cos_t * cos_t;
                        c2 * c2
                    };
                    let z_around = ls.bg_z[i] * (1.0 - ls.occ[i]) + ls.s_z[i];
                    // Material of the (outer) body.
                    let (m_body, body_beta) = match &st.kind {
                        PosedKind::Fluid => (Material::Fluid, beta[mat(Material::Fluid)]),
                        PosedKind::Bone => (Material::Bone, beta[mat(Material::Bone)]),
                        PosedKind::Vessel { .. } => {
                            (Material::VesselWall, beta[mat(Material::VesselWall)])
                        }
                        PosedKind::Nerve { layout, root } => {
                            let radius = st.radius();
                            let (x, y) = st.section_xy(hit.segment, rad);
                            let rho2 = x * x + y * y;
                            let conn = beta[mat(Material::NerveConnective)];
                            let fasc = beta[mat(Material::NerveFascicle)];
                            let inside = layout.inside(x, y, radius, 0.5 * axial_res);
                            let rim = rho2 > layout.inner_radius * layout.inner_radius;
                            let conn_here = if *root {
                                if rim {
                                    conn * 1.3
                                } else {
                                    conn * 0.2
                                }
                            } else if rim {
                                conn * 1.6
                            } else {
                                conn
                            };
                            (
                                Material::NerveConnective,
                                conn_here * (1.0 - inside) + fasc * inside,
                            )
                        }
                    };
                    let k_body = mat(m_body);
                    let fo = hit.outer;
                    let r_out = intensity_reflection(z_around as f64, imp[k_body] as f64) as f32;
                    let dfo = fo - f_back_o;
                    ls.spec[i] += MIRROR_INTENSITY as f32 * r_out * dfo * dfo * f_dir;
                    let r1 = r_out * (fo - f_prev_o).abs();
                    ls.loss[i] *= (1.0 - r1) * (1.0 - r1);
                    ls.refl1[i] = ls.refl1[i].max(r1);
                    paint(ls, i, fo, body_beta, imp[k_body], step_g[k_body]);
                    if let PosedKind::Vessel { flow_cm_s, .. } = st.kind {
                        let fi = hit.inner;
                        let kb = mat(Material::Blood);
                        let r_in = intensity_reflection(imp[k_body] as f64, imp[kb] as f64) as f32;
                        let dfi = fi - f_back_i;
                        ls.spec[i] += MIRROR_INTENSITY as f32 * r_in * dfi * dfi * f_dir;
                        let r1_in = r_in * (fi - f_prev_i).abs();
                        ls.loss[i] *= (1.0 - r1_in) * (1.0 - r1_in);
                        paint(ls, i, fi, beta[kb], imp[kb], step_g[kb]);
                        if doppler_on && fi > 0.0 {
                            let radius = st.radius().max(1e-6);
                            let rho2 = (dot(rad, rad) / (radius * radius)).min(1.0);
                            // Poiseuille profile: peak twice the mean.
                            let speed = 2.0 * flow_cm_s * (1.0 - rho2);
                            let k = st.axis(hit.segment);
                            let cos_toward = -(k[0] * b[0] + k[1] * b[1]);
                            let fd = doppler_shift_cos_hz(f0, speed, cos_toward);
                            let shown = fd.abs() >= wall_hz && speed.abs() > 0.0;
                            let value = if power_mode {
                                (fi as f64 * (0.7 + 0.3 * (1.0 - rho2))) as f32
                            } else {
                                (super::doppler::aliased_shift_hz(fd, prf) / (0.5 * prf)) as f32
                            };
                            if shown {
                                ls.col_w[i] = ls.col_w[i] * (1.0 - fi) + fi;
                                ls.col_v[i] = value;
                            } else {
                                ls.col_w[i] *= 1.0 - fi;
                            }
                        }
                    } else {
                        ls.col_w[i] *= 1.0 - fo;
                    }
                }
            }

            // Needle for this line.
            let needle_line = needle.as_ref().and_then(|n| {
                needle_samples(n, o, b, geo, depth, sigma_l, sigma_a).map(|range| {
                    let (spec, diff) = n.angle_factors(b[0], b[1]);
                    let line = NeedleLine {
                        p0u: n.p0[0],
                        p0v: n.p0[1],
                        e0: n.p0[2],
                        bu: b[0],
                        bv: b[1],
                        da: n.d[0] * b[0] + n.d[1] * b[1],
                        dl: n.d[0] * b[1] - n.d[1] * b[0],
                        de: n.d[2],
                        length: n.length,
                        spec,
                        diff,
                        reverb_mm: n.reverb_mm,
                        intensity: n.shaft_intensity,
                    };
                    (range, line, n)
                })
            });
            // The shaft's width blurs its echo across the beam more than along it (the front
            // wall is one sharp reflector).
            let r_needle2 = needle.as_ref().map_or(0.0, |n| n.radius * n.radius);
            let wl = 1.0 / (sigma_l * sigma_l + 0.16 * r_needle2);
            let wa = 1.0 / (sigma_a * sigma_a + 0.02 * r_needle2);
            let wl_pt = 1.0 / (sigma_l * sigma_l);
            let wa_pt = 1.0 / (sigma_a * sigma_a);
            let r_el2 = needle.as_ref().map_or(0.0, |n| 0.5 * n.radius * n.radius);

            // Interface echoes take the pulse's own shape: a Gaussian tail either side of the
            // band, which the log display shows far down (bright reflectors look thick).
            ls.spec_blur.fill(0.0);
            for i in 0..s_count {
                let x = ls.spec[i];
                if x > 0.0 {
                    let lo = i.saturating_sub(psf_half);
                    let hi = (i + psf_half).min(s_count - 1);
                    for q in lo..=hi {
                        ls.spec_blur[q] += x * psf_kernel[q + psf_half - i];
                    }
                }
            }
            std::mem::swap(&mut ls.spec, &mut ls.spec_blur);

            // Pass 3: sum along the line.
            if straight {
                self.speckle
                    .column(self.speckle.gx(o[0]), &mut self.speckle_col);
            }
            let mut trans = 1.0f32;
            for i in 0..s_count {
                let speck = if straight {
                    self.speckle
                        .at_column(&self.speckle_col, self.speckle_taps[i])
                } else {
                    let r = geo.range_of(i);
                    self.speckle.at(
                        self.speckle.gx(o[0] + b[0] * r),
                        self.speckle.gy(o[1] + b[1] * r),
                    )
                };
                let bgw = (1.0 - ls.occ[i]).max(0.0);
                let diffuse = (ls.bg_beta[i] * bgw + ls.s_beta[i]) * speck;
                ls.trans[i] = trans;
                // An interface echo lasts one pulse whatever lies behind the interface: its band
                // takes the transmission where the band began.
                let t_spec = ls.trans[(i + 1).saturating_sub(stencil)];
                let spec = ls.spec[i] * (0.25 + 0.75 * speck) * t_spec;
                ls.intensity[i] = diffuse * trans + spec;
                trans *= (ls.bg_g[i] * bgw + ls.s_g[i]) * ls.loss[i];
            }
            if let Some(((n0, n1), line, n)) = &needle_line {
                for i in *n0..=*n1 {
                    let r = geo.range_of(i);
                    let u = o[0] + b[0] * r;
                    let v = o[1] + b[1] * r;
                    let we = 1.0 / (1.0 / tables.we_needle[i] + r_el2);
                    let mut needle_i = line.intensity(u, v, wl, wa, we);
                    for p in &n.points {
                        needle_i += point_intensity(
                            p,
                            u,
                            v,
                            b[0],
                            b[1],
                            wl_pt,
                            wa_pt,
                            tables.we_needle[i],
                            n.shaft_intensity,
                        );
                    }
                    ls.intensity[i] += needle_i * ls.trans[i];
                }
            }
            // Near-total reflectors, for the reverberation pass.
            let mut events: [(usize, f32, f32, f32); 3] = [(0, 0.0, 0.0, 0.0); 3];
            let mut n_events = 0;
            for i in 0..s_count {
                if ls.refl1[i] >= REVERB_MIN_REFLECTION {
                    // Ring-down starts where the reflector is sharpest; skip its own band.
                    let recent = n_events > 0 && i - events[n_events - 1].0 <= stencil;
                    if !recent {
                        let t = ls.trans[(i + 1).saturating_sub(stencil)];
                        events[n_events] = (i, ls.spec[i] * t, ls.refl1[i], t);
                        n_events += 1;
                        if n_events == events.len() {
                            break;
                        }
                    }
                }
            }

            // Pass 4: reverberation between strong reflectors and the probe face.
            for &(i_e, echo, refl, t_e) in &events[..n_events] {
                let per_trip = refl * FACE_REFLECTION as f32 * t_e;
                let mut amp = echo;
                let r_e = geo.range_of(i_e);
                for m in 2..12 {
                    amp *= per_trip;
                    if amp < 1e-9 {
                        break;
                    }
                    let i_m = ((r_e * m as f64) / geo.dr - 0.5).round();
                    if i_m >= s_count as f64 {
                        break;
                    }
                    let i_m = i_m as usize;
                    for i in i_m..(i_m + stencil).min(s_count) {
                        ls.intensity[i] += amp;
                    }
                }
            }

            // Levels.
            let base = j * s_count;
            for ((out, x), g) in self.level[base..base + s_count]
                .iter_mut()
                .zip(&ls.intensity)
                .zip(&tables.gain)
            {
                *out = x * g;
            }
            if doppler_on {
                self.colour_w[base..base + s_count].copy_from_slice(&ls.col_w);
                self.colour_v[base..base + s_count].copy_from_slice(&ls.col_v);
            }
        }

        // ---- display ----
        if self.grey_map.as_ref().map(|g| g.key()) != Some(GreyMap::key_of(display)) {
            self.grey_map = Some(GreyMap::new(display));
        }
        let Some(grey_map) = self.grey_map.as_ref() else {
            unreachable!()
        };
        let palette = match display.doppler.mode {
            DopplerMode::Off => Vec::new(),
            DopplerMode::Velocity => super::doppler::velocity_palette(),
            DopplerMode::Power => super::doppler::power_palette(),
        };
        let (w, h) = (geo.width, geo.height);
        let out = &mut self.output;
        out.width = w as u32;
        out.height = h as u32;
        out.rgba.resize(w * h * 4, 0);
        out.grey.resize(w * h, 0);
        let colour_at = |cw: f32, cv: f32, grey: u8| -> [u8; 3] {
            if palette.is_empty() || cw < 0.35 {
                return [grey, grey, grey];
            }
            let alpha = ((cw - 0.35) / 0.3).clamp(0.0, 1.0);
            let n = palette.len() - 1;
            let pos = if power_mode {
                cv.clamp(0.0, 1.0) * n as f32
            } else {
                (cv.clamp(-1.0, 1.0) + 1.0) * 0.5 * n as f32
            };
            let c = palette[(pos + 0.5) as usize % (n + 1)];
            let mix = |k: usize| (grey as f32 + (c[k] as f32 - grey as f32) * alpha + 0.5) as u8;
            [mix(0), mix(1), mix(2)]
        };
        match &geo.convert {
            None => {
                for y in 0..h {
                    for x in 0..w {
                        let a = x * s_count + y;
                        let g = grey_map.grey(self.level[a]);
                        let c = colour_at(self.colour_w[a], self.colour_v[a], g);
                        let p = y * w + x;
                        out.grey[p] = g;
                        out.rgba[p * 4..p * 4 + 4].copy_from_slice(&[c[0], c[1], c[2], 255]);
                    }
                }
            }
            Some(taps) => {
                for (p, tap) in taps.iter().enumerate() {
                    if tap.index == u32::MAX {
                        out.grey[p] = 0;
                        out.rgba[p * 4..p * 4 + 4].copy_from_slice(&[0, 0, 0, 255]);
                        continue;
                    }
                    let a = tap.index as usize;
                    let (tl, ts) = (tap.w_line, tap.w_sample);
                    let bl = |buf: &[f32]| {
                        let top = buf[a] + (buf[a + 1] - buf[a]) * ts;
                        let bot = buf[a + s_count] + (buf[a + s_count + 1] - buf[a + s_count]) * ts;
                        top + (bot - top) * tl
                    };
                    let g = grey_map.grey(bl(&self.level));
                    let cw = bl(&self.colour_w);
                    let near = a + if tl > 0.5 { s_count } else { 0 } + usize::from(ts > 0.5);
                    let c = colour_at(cw, self.colour_v[near], g);
                    out.grey[p] = g;
                    out.rgba[p * 4..p * 4 + 4].copy_from_slice(&[c[0], c[1], c[2], 255]);
                }
            }
        }

        // ---- meta ----
        let (footprint, face_width) = match probe.footprint {
            Footprint::Linear { width_mm } => ("linear", width_mm),
            Footprint::Curved { width_mm, .. } => ("curved", width_mm),
        };
        let rate = frame_rate(face_width, lambda, depth, dop_legend.as_ref());
        out.meta = Some(RenderMeta {
            width_px: w as u32,
            height_px: h as u32,
            mm_per_px: MmPerPx {
                lateral: geo.sx,
                depth: geo.sy,
            },
            top_left_mm: ImagePointMm {
                lateral_mm: geo.u0,
                depth_mm: geo.v0,
            },
            footprint,
            display: DisplayUsed {
                gain_db: display.gain_db,
                tgc_db: display.tgc_db.clone(),
                dynamic_range_db: display.dynamic_range_db,
                grey_levels: display.grey_levels,
                doppler: DopplerUsed {
                    mode: display.doppler.mode.name(),
                    scale_cm_s: display.doppler.scale_cm_s,
                },
                auto_tgc_db_per_cm: 2.0 * super::attenuation::TGC_REFERENCE_DB_CM_MHZ * f0,
            },
            imaging: Imaging {
                frequency_mhz: f0,
                wavelength_mm: lambda,
                axial_resolution_mm: axial_res,
                lateral_resolution_mm: lateral_res,
                depth_mm: depth,
                penetration_60db_mm: super::attenuation::penetration_mm(
                    60.0,
                    super::attenuation::TGC_REFERENCE_DB_CM_MHZ,
                    f0,
                ),
            },
            doppler: dop_legend,
            frame_rate: rate,
        });
    }
}

/// Texture brightness factor of a background material from the texture noise.
#[inline]
fn texture_factor(m: Material, tex: &[f32; 4]) -> f32 {
    match m {
        Material::Fat => fat_factor(tex[0]),
        Material::Muscle => muscle_factor(tex[1], tex[2]),
        _ => 1.0,
    }
}

/// Index into the layer list of world depth z: 0 above the skin, k below boundary k − 1.
#[inline]
fn layer_index(boundaries: &[Boundary], z: f64) -> usize {
    boundaries.iter().take_while(|b| z >= b.depth_mm).count()
}

/// Sample indices whose ranges fall in [r0, r1], or `None`.
fn sample_span(r0: f64, r1: f64, geo: &ScanGeometry) -> Option<(usize, usize)> {
    let last = geo.samples as f64 - 1.0;
    let a = libm::floor(r0 / geo.dr - 0.5).max(0.0);
    let c = libm::ceil(r1 / geo.dr - 0.5).min(last);
    (c >= a && c >= 0.0 && a <= last).then_some((a as usize, c as usize))
}

/// Paint a material over sample i with share f (painter's rule: what was there keeps 1 − f).
#[inline]
fn paint(ls: &mut LineScratch, i: usize, f: f32, beta: f32, z: f32, g: f32) {
    if f <= 0.0 {
        return;
    }
    let keep = 1.0 - f;
    ls.occ[i] = ls.occ[i] * keep + f;
    ls.s_beta[i] = ls.s_beta[i] * keep + f * beta;
    ls.s_z[i] = ls.s_z[i] * keep + f * z;
    ls.s_g[i] = ls.s_g[i] * keep + f * g;
}

/// Samples of the line from `o` along unit `b` that fall inside the image-plane box
/// (u_min, u_max, v_min, v_max), as an inclusive index range.
fn ray_box(
    o: [f64; 2],
    b: [f64; 2],
    bbox: &[f64; 4],
    geo: &ScanGeometry,
    depth: f64,
) -> Option<(usize, usize)> {
    let (mut t0, mut t1) = (0.0f64, depth);
    for axis in 0..2 {
        let (lo, hi) = (bbox[2 * axis], bbox[2 * axis + 1]);
        if b[axis].abs() < 1e-12 {
            if o[axis] < lo || o[axis] > hi {
                return None;
            }
        } else {
            let ta = (lo - o[axis]) / b[axis];
            let tb = (hi - o[axis]) / b[axis];
            t0 = t0.max(ta.min(tb));
            t1 = t1.min(ta.max(tb));
        }
    }
    if t1 < t0 {
        return None;
    }
    let i0 = libm::floor(t0 / geo.dr - 0.5).max(0.0) as usize;
    let i1 = (libm::ceil(t1 / geo.dr - 0.5).max(0.0) as usize).min(geo.samples - 1);
    (i0 <= i1).then_some((i0, i1))
}

/// Samples of a line where the needle (shaft, bevel or reverberation) can show.
fn needle_samples(
    n: &PosedNeedle,
    o: [f64; 2],
    b: [f64; 2],
    geo: &ScanGeometry,
    depth: f64,
    sigma_l: f64,
    sigma_a: f64,
) -> Option<(usize, usize)> {
    let h = 3.6 * (sigma_l.max(sigma_a)) + 1.2 * n.radius + 0.05;
    let (s0, s1) = n.s_range;
    let pa = [n.p0[0] + n.d[0] * s0, n.p0[1] + n.d[1] * s0];
    let pb = [n.p0[0] + n.d[0] * s1, n.p0[1] + n.d[1] * s1];
    // Lateral offsets of the ends from the line, and their ranges along it.
    let lat = |p: [f64; 2]| (p[0] - o[0]) * b[1] - (p[1] - o[1]) * b[0];
    let along = |p: [f64; 2]| (p[0] - o[0]) * b[0] + (p[1] - o[1]) * b[1];
    let (la, lb) = (lat(pa), lat(pb));
    let (mut t_lo, mut t_hi);
    if (la - lb).abs() < 1e-12 {
        if la.abs() > h {
            return None;
        }
        t_lo = along(pa).min(along(pb));
        t_hi = along(pa).max(along(pb));
    } else {
        // Part of the segment with |lateral| ≤ h.
        let sa = (-h - la) / (lb - la);
        let sb = (h - la) / (lb - la);
        let (x0, x1) = (sa.min(sb).max(0.0), sa.max(sb).min(1.0));
        if x1 < x0 {
            return None;
        }
        let q0 = [pa[0] + (pb[0] - pa[0]) * x0, pa[1] + (pb[1] - pa[1]) * x0];
        let q1 = [pa[0] + (pb[0] - pa[0]) * x1, pa[1] + (pb[1] - pa[1]) * x1];
        t_lo = along(q0).min(along(q1));
        t_hi = along(q0).max(along(q1));
    }
    t_lo -= h;
    let (spec, _) = n.angle_factors(b[0], b[1]);
    let reverb = if spec > super::needle_echo::REVERB_MIN_SPECULAR {
        super::needle_echo::REVERB_COPIES as f64 * n.reverb_mm
    } else {
        0.0
    };
    t_hi += h + reverb;
    // The bevel points lie within a radius of the shaft; the band already covers them.
    let t_lo = t_lo.max(0.0);
    let t_hi = t_hi.min(depth);
    if t_hi < t_lo {
        return None;
    }
    let i0 = libm::floor(t_lo / geo.dr - 0.5).max(0.0) as usize;
    let i1 = (libm::ceil(t_hi / geo.dr - 0.5).max(0.0) as usize).min(geo.samples - 1);
    (i0 <= i1).then_some((i0, i1))
}

/// FNV-1a 64-bit hash of the RGBA bytes of `scene` rendered at `width` × `height`: one number
/// to compare native and wasm32 builds (they must agree bit for bit).
///
/// ```
/// let scene = slicewise::load_scene_str(include_str!("../../../scenes-demo/forearm-out-of-plane.scene.json")).unwrap();
/// let a = slicewise::echo_fingerprint(&scene, 64, 64).unwrap();
/// assert_eq!(a, slicewise::echo_fingerprint(&scene, 64, 64).unwrap());
/// ```
pub fn echo_fingerprint(scene: &Scene, width: u32, height: u32) -> Result<u64, EchoError> {
    let mut r = Renderer::new();
    let out = r.render(scene, width, height)?;
    Ok(fnv1a64(out.rgba()))
}

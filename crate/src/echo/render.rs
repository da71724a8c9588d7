//! The renderer: builds one frame of the simulated screen from a scene — scan lines, tissue,
//! structures, needle, attenuation, time-gain, log compression and colour Doppler — into an
//! RGBA buffer that a canvas can show as it is.
//!
//! Each scan line is computed from the face down in four passes over its samples
//! (`echo_line`):
//! 1. background tissue layers (echogenicity, texture, impedance, attenuation, the echoes of
//!    layer boundaries);
//! 2. each structure whose image-plane box the line crosses, painted over the background by its
//!    elevation share (fluid, then vessels, nerves, bone), with the echo of its surface;
//! 3. the sum: diffuse echo × speckle + interface echoes, times the two-way transmission
//!    accumulated so far, which then takes this sample's own loss;
//! 4. reverberation copies of near-total reflectors (air, bone) at multiples of their range.
//!
//! That needle-free echo is kept between frames (`scene_echo`). Every frame then adds the
//! needle's echo (times the transmission to each of its samples) and the reverberation copies,
//! converts to a level with the gain and time-gain curve, and composes the screen (`compose`):
//! moving only the needle, or changing only gain, time-gain, dynamic range or grey levels,
//! redraws just that.
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

use super::attenuation::auto_tgc_db;
use super::compose::{compose_curved, compose_linear, ColourLayer};
use super::display_chain::{user_tgc_db, GreyMap};
use super::doppler::{
    frame_rate, legend, DopplerLegend, FrameRate, WALL_FILTER_FRACTION_OF_NYQUIST,
};
use super::echo_line::{Beam, DopplerFigures, LineEchoes, FWHM_PER_SIGMA, MIRROR_INTENSITY};
use super::math::{fnv1a64, NormalCdf};
use super::needle_echo::{point_intensity, NeedleLine, PosedNeedle};
use super::posed::Axes;
use super::scan::ScanGeometry;
use super::scene_echo::SceneEcho;
use super::tissue::{intensity_reflection, Z_STEEL_MRAYL};
use crate::scene::{wavelength_mm, DopplerMode, Footprint, Scene, SlabProfile};

/// Smallest and largest accepted screen size, pixels per side.
pub const MIN_SCREEN_PX: u32 = 16;
/// Largest accepted screen size, pixels per side.
pub const MAX_SCREEN_PX: u32 = 4096;

/// Muscle's diffuse echo re full scale at 0 dB gain, dB.
const SYSTEM_LEVEL_DB: f64 = -31.0;
/// A 22G needle square to the beam, re muscle's diffuse echo: steel's R times this share of
/// the mirror echo (a thin cylinder returns part of what a plane would).
const NEEDLE_SHARE_OF_MIRROR: f64 = 0.97;
/// Pulse length in cycles; axial resolution n·λ/2 (FACTS.md "Beam").
const PULSE_CYCLES: f64 = 2.0;
/// Receive f-number; lateral resolution 0.886·λ·F# (FACTS.md "Beam", modelling choice F# = 2).
const F_NUMBER: f64 = 2.0;

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
    /// The passes of the needle-free echo, with their grids.
    lines: LineEchoes,
    /// The needle-free echo of the last frame.
    echo: SceneEcho,
    /// Levels (intensity re full scale) of every (line, sample), line-major.
    level: Vec<f32>,
    grey_map: Option<GreyMap>,
    /// Colour palette of the Doppler mode it was made for.
    palette: (DopplerMode, Vec<[u8; 3]>),
    output: RenderOutput,
}

impl Default for Renderer {
    fn default() -> Self {
        Self::new()
    }
}

/// Per-sample tables of one frame.
struct SampleTables {
    /// σ of the elevation intensity profile, mm.
    sigma_int: Vec<f64>,
    /// 1/σ² of the elevation amplitude profile, mm⁻² (the needle's elevation weight).
    we_needle: Vec<f64>,
    /// Gain from intensity re muscle to intensity re full scale (system level, gain,
    /// automatic and user time-gain), linear.
    gain: Vec<f32>,
}

impl Renderer {
    /// A renderer with empty buffers.
    pub fn new() -> Self {
        Renderer {
            cdf: NormalCdf::new(),
            geometry: None,
            lines: LineEchoes::default(),
            echo: SceneEcho::default(),
            level: Vec::new(),
            grey_map: None,
            palette: (DopplerMode::Off, Vec::new()),
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
        let sigma_l = lateral_res / FWHM_PER_SIGMA;
        let sigma_a = axial_res / FWHM_PER_SIGMA;

        // ---- Doppler ----
        let dop_legend = legend(display.doppler.mode, f0, depth, display.doppler.scale_cm_s);
        let (prf, wall_hz) = match &dop_legend {
            Some(l) => (l.prf_hz, WALL_FILTER_FRACTION_OF_NYQUIST * l.nyquist_hz),
            None => (0.0, 0.0),
        };

        // ---- the needle-free echo, kept while only the needle or the display chain moves ----
        if !self.echo.is_current(scene, geo.width, geo.height) {
            let beam = Beam {
                axes,
                profile: &profile,
                axial_res,
                lateral_res,
                max_sigma_int,
                reach_e,
                sigma_int: &tables.sigma_int,
                doppler: dop_legend.is_some().then_some(DopplerFigures {
                    prf_hz: prf,
                    wall_hz,
                    power: display.doppler.mode == DopplerMode::Power,
                }),
            };
            self.lines.run(scene, geo, &beam, &self.cdf, &mut self.echo);
            self.echo.finish(scene, geo.width, geo.height);
        }

        // ---- needle, reverberation and gain over the echo: the levels ----
        let needle_scale = MIRROR_INTENSITY
            * intensity_reflection(super::tissue::Z_SOFT_TISSUE_MRAYL, Z_STEEL_MRAYL)
            * NEEDLE_SHARE_OF_MIRROR;
        let needle = PosedNeedle::new(&scene.needle, &axes, reach_e, needle_scale);
        self.levels(geo, depth, &tables, needle.as_ref(), (sigma_l, sigma_a));

        // ---- display ----
        if self.grey_map.as_ref().map(|g| g.key()) != Some(GreyMap::key_of(display)) {
            self.grey_map = Some(GreyMap::new(display));
        }
        let Some(grey_map) = self.grey_map.as_ref() else {
            unreachable!()
        };
        if self.palette.0 != display.doppler.mode {
            self.palette = (
                display.doppler.mode,
                match display.doppler.mode {
                    DopplerMode::Off => Vec::new(),
                    DopplerMode::Velocity => super::doppler::velocity_palette(),
                    DopplerMode::Power => super::doppler::power_palette(),
                },
            );
        }
        let (colour_w, colour_v) = self.echo.colour();
        let colour = (!self.palette.1.is_empty()).then_some(ColourLayer {
            palette: &self.palette.1,
            power: display.doppler.mode == DopplerMode::Power,
            weight: colour_w,
            value: colour_v,
        });
        let (w, h) = (geo.width, geo.height);
        let out = &mut self.output;
        out.width = w as u32;
        out.height = h as u32;
        out.rgba.resize(w * h * 4, 0);
        out.grey.resize(w * h, 0);
        match &geo.convert {
            None => compose_linear(
                &self.level,
                w,
                h,
                grey_map,
                colour,
                &mut out.grey,
                &mut out.rgba,
            ),
            Some(taps) => compose_curved(
                &self.level,
                s_count,
                taps,
                grey_map,
                colour,
                &mut out.grey,
                &mut out.rgba,
            ),
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

    /// The level of every (line, sample) into `self.level`: the kept echo, plus the needle's
    /// echo times the transmission to each sample, plus the reverberation copies, times the
    /// gain. `sigma_la` holds the lateral and axial σ of the beam's amplitude, mm.
    fn levels(
        &mut self,
        geo: &ScanGeometry,
        depth: f64,
        tables: &SampleTables,
        needle: Option<&PosedNeedle>,
        sigma_la: (f64, f64),
    ) {
        let (sigma_l, sigma_a) = sigma_la;
        let s_count = geo.samples;
        // The shaft's width blurs its echo across the beam more than along it (the front
        // wall is one sharp reflector).
        let r_needle2 = needle.map_or(0.0, |n| n.radius * n.radius);
        let wl = 1.0 / (sigma_l * sigma_l + 0.16 * r_needle2);
        let wa = 1.0 / (sigma_a * sigma_a + 0.02 * r_needle2);
        let wl_pt = 1.0 / (sigma_l * sigma_l);
        let wa_pt = 1.0 / (sigma_a * sigma_a);
        let r_el2 = needle.map_or(0.0, |n| 0.5 * n.radius * n.radius);
        self.level.resize(geo.lines * s_count, 0.0);
        for j in 0..geo.lines {
            let o = geo.line_origin[j];
            let b = geo.line_dir[j];
            let x = &mut self.level[j * s_count..(j + 1) * s_count];
            let needle_line = needle.and_then(|n| {
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
            let reverb = self.echo.reverb(j);
            if needle_line.is_none() && reverb.is_empty() {
                // Nothing drawn over the echo: its levels in one pass.
                for ((v, e), g) in x.iter_mut().zip(self.echo.intensity(j)).zip(&tables.gain) {
                    *v = e * g;
                }
                continue;
            }
            x.copy_from_slice(self.echo.intensity(j));
            if let Some(((n0, n1), line, n)) = &needle_line {
                let trans = self.echo.trans(j);
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
                    x[i] += needle_i * trans[i];
                }
            }
            // Reverberation copies come after the needle, as they always have (the order of
            // the sum decides the last bit).
            for copy in reverb {
                for v in &mut x[copy.start as usize..copy.end as usize] {
                    *v += copy.amp;
                }
            }
            for (v, g) in x.iter_mut().zip(&tables.gain) {
                *v *= g;
            }
        }
    }
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

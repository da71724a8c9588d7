//! The needle-free echo of every scan line (passes 1–4 of the renderer): background tissue
//! layers, structures painted over them, the pulse shape of interface echoes, the sum with
//! speckle and transmission, and the reverberation of near-total reflectors.
//!
//! Everything here depends on the probe, the tissue, the structures and the Doppler settings
//! only, never on the needle or the display chain: the result goes to a [`SceneEcho`] that the
//! renderer keeps while only those change. The speckle and texture grids are kept as well,
//! while the pose, frequency, slab, layers and screen stay the same.

use super::attenuation::step_transmission;
use super::doppler::doppler_shift_cos_hz;
use super::math::{fnv1a64, max_f32, max_f64, min_f64, NormalCdf};
use super::posed::{dot, Axes};
use super::scan::ScanGeometry;
use super::scene_echo::{ReverbCopy, SceneEcho};
use super::speckle::{
    fat_factor, muscle_factor, SpeckleField, TextureField, TextureLine, FAT_CHANNEL,
    MUSCLE_CHANNELS,
};
use super::structures::{PosedKind, PosedStructure};
use super::tissue::{intensity_reflection, Material, MATERIAL_COUNT};
use crate::scene::{LayerKind, Scene, SlabProfile};

/// A perfect mirror square to the beam, re muscle's diffuse echo (intensity ratio, +35 dB).
pub(crate) const MIRROR_INTENSITY: f64 = 3.0e3;
/// FWHM per σ of a Gaussian, 2·√(2 ln 2).
pub(crate) const FWHM_PER_SIGMA: f64 = 2.354_820_045;
/// Intensity reflection of the probe face back into the tissue, for reverberation (modelling).
const FACE_REFLECTION: f64 = 0.4;
/// Interfaces reflecting at least this much ring between themselves and the probe face.
const REVERB_MIN_REFLECTION: f32 = 0.5;
/// An interface echo spans this many axial resolution cells (the change in elevation share is
/// taken across this distance; modelling choice: a real boundary is never perfectly sharp).
const INTERFACE_CELLS: f64 = 1.5;
/// Amplitude of the gentle undulation of layer boundaries below the skin, mm (modelling).
const BOUNDARY_WAVE_MM: f64 = 0.5;

/// The beam figures of a frame that the needle-free echo needs.
pub(crate) struct Beam<'a> {
    /// The image frame in the world.
    pub(crate) axes: Axes,
    /// Elevation profile at the transmit frequency.
    pub(crate) profile: &'a SlabProfile,
    /// Axial resolution, mm.
    pub(crate) axial_res: f64,
    /// Lateral resolution, mm.
    pub(crate) lateral_res: f64,
    /// Largest σ of the elevation intensity profile over the display depth, mm.
    pub(crate) max_sigma_int: f64,
    /// How far from the image plane the beam still matters, mm.
    pub(crate) reach_e: f64,
    /// σ of the elevation intensity profile at each sample, mm.
    pub(crate) sigma_int: &'a [f64],
    /// Colour Doppler, when on.
    pub(crate) doppler: Option<DopplerFigures>,
}

/// Colour Doppler figures of a frame.
#[derive(Clone, Copy)]
pub(crate) struct DopplerFigures {
    /// Pulse repetition frequency, Hz.
    pub(crate) prf_hz: f64,
    /// Wall filter cut-off, Hz.
    pub(crate) wall_hz: f64,
    /// Power mode (else velocity).
    pub(crate) power: bool,
}

/// Per-line scratch arrays (length = samples per line).
#[derive(Debug, Clone, Default)]
struct LineScratch {
    /// Background echogenicity (backscatter re muscle, texture included).
    bg_beta: Vec<f32>,
    /// Background impedance, MRayl.
    bg_z: Vec<f32>,
    /// Background one-step intensity transmission (attenuation over one sample).
    bg_g: Vec<f32>,
    /// Share of the sample occupied by structures, 0..1.
    occ: Vec<f32>,
    /// Structures' echogenicity, impedance and one-step transmission, weighted by their share.
    s_beta: Vec<f32>,
    s_z: Vec<f32>,
    s_g: Vec<f32>,
    /// Interface echoes (re muscle's diffuse echo).
    spec: Vec<f32>,
    /// Two-way transmission loss of the sample's interfaces, 0..1.
    loss: Vec<f32>,
    /// Largest one-way intensity reflection at the sample, 0..1.
    refl1: Vec<f32>,
    /// A structure's outer and inner elevation share at each sample, 0..1.
    f_outer: Vec<f32>,
    f_inner: Vec<f32>,
    /// Colour Doppler weight and value.
    col_w: Vec<f32>,
    col_v: Vec<f32>,
    /// Second buffer for the interface blur.
    spec_blur: Vec<f32>,
    /// Speckle intensity factor (mean 1).
    speck: Vec<f32>,
    /// Texture noise (fat, muscle, bundle, wave) of a run of samples.
    tex: Vec<[f32; 4]>,
    /// Whether the sample lies near a layer boundary.
    in_band: Vec<bool>,
}

impl LineScratch {
    fn resize(&mut self, n: usize) {
        self.in_band.resize(n, false);
        self.tex.resize(n, [0.0; 4]);
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
            &mut self.col_w,
            &mut self.col_v,
            &mut self.spec_blur,
            &mut self.speck,
        ] {
            v.resize(n, 0.0);
        }
    }

    /// Back to an empty line: no structure, no interface, full transmission.
    fn clear(&mut self) {
        for v in [
            &mut self.occ,
            &mut self.s_beta,
            &mut self.s_z,
            &mut self.s_g,
            &mut self.col_w,
            &mut self.col_v,
            &mut self.spec,
            &mut self.refl1,
        ] {
            v.fill(0.0);
        }
        self.loss.fill(1.0);
        self.in_band.fill(false);
    }
}

/// One tissue layer boundary of the frame.
#[derive(Clone, Copy)]
struct Boundary {
    /// World depth below the skin, mm.
    depth_mm: f64,
    /// Intensity reflection between the layers above and below, 0..1.
    reflection: f32,
}

/// Acoustic figures of every material at the frame's frequency and sample step.
struct Materials {
    /// One-step intensity transmission.
    step_g: [f32; MATERIAL_COUNT],
    /// Backscatter re muscle (linear).
    beta: [f32; MATERIAL_COUNT],
    /// Impedance, MRayl.
    imp: [f32; MATERIAL_COUNT],
}

/// What every line of a frame shares.
struct Frame<'a> {
    /// Scan lines and samples.
    geo: &'a ScanGeometry,
    beam: &'a Beam<'a>,
    /// Φ, for elevation shares.
    cdf: &'a NormalCdf,
    /// Transmit frequency, MHz.
    f0: f64,
    /// Display depth, mm.
    depth: f64,
    mats: Materials,
    /// Material of each layer from the gel (0) down.
    layer_mats: Vec<Material>,
    /// Boundary k lies between layers k and k + 1; boundary 0 is the skin.
    boundaries: Vec<Boundary>,
    /// Structures in painting order.
    posed: Vec<PosedStructure>,
    /// Samples an interface echo spans.
    stencil: usize,
    /// Axial pulse shape in intensity, 2·psf_half + 1 taps summing to 1.
    psf_kernel: Vec<f32>,
    psf_half: usize,
    /// World-z components of the lateral and beam axes, and |elevation_z|.
    lat_z: f64,
    beam_z: f64,
    n_z: f64,
    /// Lines run straight down (linear face).
    straight: bool,
}

/// The passes' state kept between frames: speckle and texture grids with their per-sample
/// taps, and the scratch arrays of one line.
#[derive(Debug, Clone, Default)]
pub(crate) struct LineEchoes {
    speckle: SpeckleField,
    texture: TextureField,
    /// Speckle and texture of the current straight line, interpolated across x: one entry
    /// per grid row.
    speckle_col: Vec<[f32; 2]>,
    texture_col: Vec<[f32; 4]>,
    /// Where each sample of a straight line reads those columns (the same for every line).
    speckle_taps: Vec<(u32, f32, f32)>,
    texture_taps: Vec<(u32, f32)>,
    /// What the grids and taps were made for.
    grid_key: Option<u64>,
    line: LineScratch,
}

impl LineEchoes {
    /// The needle-free echo of every line of `scene` on `geo`, into `echo`.
    pub(crate) fn run(
        &mut self,
        scene: &Scene,
        geo: &ScanGeometry,
        beam: &Beam<'_>,
        cdf: &NormalCdf,
        echo: &mut SceneEcho,
    ) {
        let frame = Frame::new(scene, geo, beam, cdf);
        self.update_grids(scene, geo, beam);
        let s_count = geo.samples;
        echo.begin(geo.lines, s_count, beam.doppler.is_some());
        self.line.resize(s_count);
        for j in 0..geo.lines {
            let (o, b) = (geo.line_origin[j], geo.line_dir[j]);
            self.line.clear();
            self.background(&frame, o, b);
            frame.structures(&mut self.line, o, b);
            frame.blur_interfaces(&mut self.line);
            self.speckle_line(&frame, o, b);
            let el = echo.line_mut(j);
            frame.sum(&self.line, el.intensity, el.trans);
            if frame.beam.doppler.is_some() {
                el.colour_w.copy_from_slice(&self.line.col_w);
                el.colour_v.copy_from_slice(&self.line.col_v);
            }
            frame.reverberation(&self.line, echo, j);
            echo.end_line();
        }
    }

    /// Refill the speckle and texture grids when what they depend on changed.
    fn update_grids(&mut self, scene: &Scene, geo: &ScanGeometry, beam: &Beam<'_>) {
        let probe = &scene.probe;
        let (f0, depth) = (probe.frequency_mhz, probe.depth_mm);
        let (axial_res, lateral_res) = (beam.axial_res, beam.lateral_res);
        let u_range = (geo.u0 - geo.sx, geo.u0 + geo.width as f64 * geo.sx);
        let v_range = (geo.v0 - geo.sy, geo.v0 + geo.height as f64 * geo.sy);
        let cell_e = beam.profile.min_thickness_mm().max(0.2);
        // Grid points farther than a few cells outside the field of view are never read.
        let margin = 3.0 * (lateral_res.max(axial_res)).max(1.5 * geo.sx.max(geo.sy)) + 1.0;
        let view = |u: f64| geo.view_span(u, margin);
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
        if self.grid_key == Some(grid_key) {
            return;
        }
        // The speckle's PSF: σ of the two-way amplitude from the −6 dB widths; no grid step
        // finer than a pixel.
        self.speckle.fill(
            &beam.axes,
            lateral_res / FWHM_PER_SIGMA,
            axial_res / FWHM_PER_SIGMA,
            (geo.sx, geo.dr),
            cell_e,
            u_range,
            v_range,
            &view,
        );
        self.speckle_taps.clear();
        self.texture.fill(
            &beam.axes, u_range, v_range, tex_step, &fat_z, &muscle_z, &view,
        );
        self.texture_taps.clear();
        if geo.convert.is_none() {
            // Straight lines: sample i is at depth v = range, on every line.
            let line0 = self.texture.line(geo.line_origin[0], geo.line_dir[0]);
            for i in 0..geo.samples {
                let r = geo.range_of(i);
                self.speckle_taps
                    .push(self.speckle.column_tap(self.speckle.gy(r)));
                self.texture_taps.push(self.texture.column_tap(&line0, r));
            }
        }
        self.grid_key = Some(grid_key);
    }

    /// Pass 1: background layers. Between boundary bands the layer is constant and the samples
    /// are filled in tight loops; inside a band (near a boundary, within the slab's spread, the
    /// interface cell and the undulation) every layer is blended in by its share of the beam and
    /// every boundary within reach adds its echo (a thin layer has two boundaries in one band).
    fn background(&mut self, fr: &Frame<'_>, o: [f64; 2], b: [f64; 2]) {
        let geo = fr.geo;
        let s_count = geo.samples;
        let (beta, imp, step_g) = (&fr.mats.beta, &fr.mats.imp, &fr.mats.step_g);
        let boundaries = &fr.boundaries[..];
        let stencil = fr.stencil;
        // World depth along the line: z = u·a_z + v·b_z (face centre on the skin).
        let z_origin = o[0] * fr.lat_z + o[1] * fr.beam_z;
        let z_slope = b[0] * fr.lat_z + b[1] * fr.beam_z;
        let cos_layer = z_slope.abs() as f32;
        let f_layer = {
            let c2 = cos_layer * cos_layer;
            c2 * c2
        };
        let tex_line = self.texture.line(o, b);
        if fr.straight {
            self.texture.column(&tex_line, &mut self.texture_col);
        }
        let reader = TextureReader {
            texture: &self.texture,
            line: tex_line,
            col: &self.texture_col,
            taps: &self.texture_taps,
            straight: fr.straight,
            dr: geo.dr,
        };
        let ls = &mut self.line;
        let reach_max = 4.0 * fr.n_z * fr.beam.max_sigma_int
            + (stencil as f64 + 1.0) * geo.dr * z_slope.abs()
            + BOUNDARY_WAVE_MM;
        for bd in boundaries {
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
                let sigma_z = fr.n_z * fr.beam.sigma_int[i];
                let tex = self.texture.at(&tex_line, r);
                // Boundaries below the skin undulate gently (modelling choice), all by the same
                // amount at a given point: they keep their order and a thin layer (a fascia)
                // keeps its thickness. Every boundary is blended in, not only the nearest: a
                // boundary shifted past the midpoint to its neighbour must not lose its echo.
                let wave = BOUNDARY_WAVE_MM * tex[3] as f64;
                let z_back = z - z_slope * stencil as f64 * geo.dr;
                let z_prev = z - z_slope * geo.dr;
                // Beyond this distance a boundary's share is exactly 0 or 1 at all three depths.
                let far = 6.0 * sigma_z + (z - z_back).abs() + 1e-9;
                let below = |zz: f64, depth: f64| -> f32 {
                    let x = zz - depth;
                    if sigma_z > 1e-6 {
                        fr.cdf.phi((x / sigma_z) as f32)
                    } else if x >= 0.0 {
                        1.0
                    } else {
                        0.0
                    }
                };
                let (mut spec, mut loss, mut refl1) = (0.0f32, 1.0f32, 0.0f32);
                let (mut b_sum, mut z_sum, mut g_sum) = (0.0f32, 0.0f32, 0.0f32);
                // Share of the beam below the boundary above the current layer.
                let mut above = 1.0f32;
                let mut top = f64::NEG_INFINITY;
                for (k, bd) in boundaries.iter().enumerate() {
                    let depth = if k == 0 {
                        bd.depth_mm
                    } else {
                        max_f64(bd.depth_mm + wave, top)
                    };
                    top = depth;
                    let f_lo = if (z - depth).abs() > far {
                        if z > depth {
                            1.0
                        } else {
                            0.0
                        }
                    } else {
                        let f_lo = below(z, depth);
                        let df = f_lo - below(z_back, depth);
                        spec += bd.reflection * df * df;
                        let r1 = bd.reflection * (f_lo - below(z_prev, depth)).abs();
                        loss *= (1.0 - r1) * (1.0 - r1);
                        refl1 = max_f32(refl1, r1);
                        f_lo
                    };
                    // Layer k lies between boundaries k − 1 and k.
                    let share = above - f_lo;
                    if share > 0.0 {
                        let m = fr.layer_mats[k];
                        let c = m as usize;
                        b_sum += beta[c] * texture_factor(m, &tex) * share;
                        z_sum += imp[c] * share;
                        g_sum += step_g[c] * share;
                    }
                    above = f_lo;
                }
                if above > 0.0 {
                    let m = fr.layer_mats[boundaries.len()];
                    let c = m as usize;
                    b_sum += beta[c] * texture_factor(m, &tex) * above;
                    z_sum += imp[c] * above;
                    g_sum += step_g[c] * above;
                }
                ls.spec[i] = MIRROR_INTENSITY as f32 * spec * f_layer;
                ls.loss[i] = loss;
                ls.refl1[i] = refl1;
                ls.bg_beta[i] = b_sum;
                ls.bg_z[i] = z_sum;
                ls.bg_g[i] = g_sum;
                i += 1;
                continue;
            }
            // A run of samples outside every band: one layer.
            let mut end = i;
            while end < s_count && !ls.in_band[end] {
                end += 1;
            }
            let r = geo.range_of(i);
            let m = fr.layer_mats[layer_index(boundaries, z_origin + z_slope * r)];
            let k = m as usize;
            ls.bg_z[i..end].fill(imp[k]);
            ls.bg_g[i..end].fill(step_g[k]);
            let slots = &mut ls.bg_beta[i..end];
            if matches!(m, Material::Fat | Material::Muscle) {
                // The texture noise of the run first, then the material's brightness from it in
                // a loop of its own (one material, no branch per sample).
                let tex = &mut ls.tex[i..end];
                if m == Material::Fat {
                    reader.run(i, FAT_CHANNEL, tex);
                    for (slot, t) in slots.iter_mut().zip(tex.iter()) {
                        *slot = beta[k] * fat_factor(t[0]);
                    }
                } else {
                    reader.run(i, MUSCLE_CHANNELS, tex);
                    for (slot, t) in slots.iter_mut().zip(tex.iter()) {
                        *slot = beta[k] * muscle_factor(t[1], t[2]);
                    }
                }
            } else {
                slots.fill(beta[k]);
            }
            i = end;
        }
    }

    /// The speckle intensity factor of every sample of the line.
    fn speckle_line(&mut self, fr: &Frame<'_>, o: [f64; 2], b: [f64; 2]) {
        let ls = &mut self.line;
        if fr.straight {
            let scale_x = self
                .speckle
                .column(self.speckle.gx(o[0]), &mut self.speckle_col);
            let col = &self.speckle_col[..];
            for (slot, tap) in ls.speck.iter_mut().zip(&self.speckle_taps) {
                *slot = SpeckleField::at_column(col, *tap, scale_x);
            }
        } else {
            self.speckle.along_line(o, b, fr.geo.dr, &mut ls.speck);
        }
    }
}

impl<'a> Frame<'a> {
    fn new(scene: &Scene, geo: &'a ScanGeometry, beam: &'a Beam<'a>, cdf: &'a NormalCdf) -> Self {
        let f0 = scene.probe.frequency_mhz;

        // ---- materials at this frequency and step ----
        let mut mats = Materials {
            step_g: [0.0; MATERIAL_COUNT],
            beta: [0.0; MATERIAL_COUNT],
            imp: [0.0; MATERIAL_COUNT],
        };
        for (k, m) in super::tissue::ACOUSTIC.iter().enumerate() {
            mats.step_g[k] = step_transmission(m, f0, geo.dr);
            mats.beta[k] = libm::pow(10.0, m.backscatter_db / 10.0) as f32;
            mats.imp[k] = m.impedance_mrayl as f32;
        }

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

        // ---- structures ----
        let mut posed: Vec<PosedStructure> = scene
            .structures
            .iter()
            .filter_map(|s| PosedStructure::new(s, &beam.axes, beam.reach_e))
            .collect();
        posed.sort_by_key(|p| p.layer);

        // ---- interface echoes ----
        let stencil = ((INTERFACE_CELLS * beam.axial_res / geo.dr).round() as usize).clamp(1, 64);
        // Axial pulse shape in intensity (σ_I = σ_axial/√2) out to ±4σ_I, summing to 1.
        let sigma_int_axial = beam.axial_res / FWHM_PER_SIGMA / core::f64::consts::SQRT_2;
        let psf_half = ((4.0 * sigma_int_axial / geo.dr) as usize).min(16);
        let mut psf_kernel: Vec<f32> = (0..=2 * psf_half)
            .map(|q| {
                let x = (q as f64 - psf_half as f64) * geo.dr / sigma_int_axial;
                libm::exp(-0.5 * x * x) as f32
            })
            .collect();
        let psf_sum: f32 = psf_kernel.iter().sum();
        psf_kernel.iter_mut().for_each(|k| *k /= psf_sum);

        Frame {
            geo,
            beam,
            cdf,
            f0,
            depth: scene.probe.depth_mm,
            mats,
            layer_mats,
            boundaries,
            posed,
            stencil,
            psf_kernel,
            psf_half,
            lat_z: beam.axes.lateral[2],
            beam_z: beam.axes.beam[2],
            n_z: beam.axes.elevation[2].abs(),
            straight: geo.convert.is_none(),
        }
    }

    /// Pass 2: structures, painted in order over the background, with the echoes of their
    /// surfaces and, for vessels, the colour Doppler of their flow.
    fn structures(&self, ls: &mut LineScratch, o: [f64; 2], b: [f64; 2]) {
        let geo = self.geo;
        let stencil = self.stencil;
        let (beta, imp, step_g) = (&self.mats.beta, &self.mats.imp, &self.mats.step_g);
        let mat = |m: Material| m as usize;
        for st in &self.posed {
            let Some((i0, i1)) = ray_box(o, b, &st.bbox, geo, self.depth) else {
                continue;
            };
            let start = i0.saturating_sub(stencil);
            for i in start..=i1 {
                let r = geo.range_of(i);
                let u = o[0] + b[0] * r;
                let v = o[1] + b[1] * r;
                let hit = st
                    .hit(u, v, self.beam.sigma_int[i], self.cdf)
                    .unwrap_or_default();
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
                        let inside = layout.inside(x, y, radius, 0.5 * self.beam.axial_res);
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
                ls.refl1[i] = max_f32(ls.refl1[i], r1);
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
                    if let Some(d) = self.beam.doppler.filter(|_| fi > 0.0) {
                        let radius = max_f64(st.radius(), 1e-6);
                        let rho2 = min_f64(dot(rad, rad) / (radius * radius), 1.0);
                        // Poiseuille profile: peak twice the mean.
                        let speed = 2.0 * flow_cm_s * (1.0 - rho2);
                        let k = st.axis(hit.segment);
                        let cos_toward = -(k[0] * b[0] + k[1] * b[1]);
                        let fd = doppler_shift_cos_hz(self.f0, speed, cos_toward);
                        let shown = fd.abs() >= d.wall_hz && speed.abs() > 0.0;
                        let value = if d.power {
                            (fi as f64 * (0.7 + 0.3 * (1.0 - rho2))) as f32
                        } else {
                            (super::doppler::aliased_shift_hz(fd, d.prf_hz) / (0.5 * d.prf_hz))
                                as f32
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
    }

    /// Interface echoes take the pulse's own shape: a Gaussian tail either side of the band,
    /// which the log display shows far down (bright reflectors look thick).
    fn blur_interfaces(&self, ls: &mut LineScratch) {
        let s_count = self.geo.samples;
        let (psf_half, psf_kernel) = (self.psf_half, &self.psf_kernel[..]);
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
    }

    /// Pass 3: the sum along the line — diffuse echo × speckle plus interface echoes, times
    /// the two-way transmission accumulated so far. The transmission is a running product (one
    /// dependency chain), so it is taken first; the sum is then independent per sample.
    fn sum(&self, ls: &LineScratch, intensity: &mut [f32], trans: &mut [f32]) {
        let n = self.geo.samples;
        // Every array cut to the line's length up front: the loops then index nothing out of
        // range and carry no per-sample bounds checks.
        let (occ, bg_g, s_g, loss) = (&ls.occ[..n], &ls.bg_g[..n], &ls.s_g[..n], &ls.loss[..n]);
        let (speck, bg_beta, s_beta, spec) = (
            &ls.speck[..n],
            &ls.bg_beta[..n],
            &ls.s_beta[..n],
            &ls.spec[..n],
        );
        let (intensity, trans) = (&mut intensity[..n], &mut trans[..n]);
        let mut t = 1.0f32;
        for i in 0..n {
            trans[i] = t;
            let bgw = background_share(occ[i]);
            t *= (bg_g[i] * bgw + s_g[i]) * loss[i];
        }
        // An interface echo lasts one pulse whatever lies behind the interface: its band takes
        // the transmission where the band began, `stencil` − 1 samples back (or the face).
        let back = self.stencil - 1;
        let band_trans = |i: usize| trans[i.saturating_sub(back)];
        for i in 0..n {
            let speck = speck[i];
            let bgw = background_share(occ[i]);
            let diffuse = (bg_beta[i] * bgw + s_beta[i]) * speck;
            let spec = spec[i] * (0.25 + 0.75 * speck) * band_trans(i);
            intensity[i] = diffuse * trans[i] + spec;
        }
    }

    /// Pass 4: reverberation between near-total reflectors and the probe face, kept in `echo`
    /// as copies of line `j` that the levels add after the needle.
    fn reverberation(&self, ls: &LineScratch, echo: &mut SceneEcho, j: usize) {
        let geo = self.geo;
        let (s_count, stencil) = (geo.samples, self.stencil);
        let trans = echo.trans(j);
        // Near-total reflectors: (sample, echo, reflection, transmission).
        let mut events: [(usize, f32, f32, f32); 3] = [(0, 0.0, 0.0, 0.0); 3];
        let mut n_events = 0;
        for i in 0..s_count {
            if ls.refl1[i] >= REVERB_MIN_REFLECTION {
                // Ring-down starts where the reflector is sharpest; skip its own band.
                let recent = n_events > 0 && i - events[n_events - 1].0 <= stencil;
                if !recent {
                    let t = trans[(i + 1).saturating_sub(stencil)];
                    events[n_events] = (i, ls.spec[i] * t, ls.refl1[i], t);
                    n_events += 1;
                    if n_events == events.len() {
                        break;
                    }
                }
            }
        }
        for &(i_e, echo_e, refl, t_e) in &events[..n_events] {
            let per_trip = refl * FACE_REFLECTION as f32 * t_e;
            let mut amp = echo_e;
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
                echo.push_reverb(ReverbCopy {
                    start: i_m as u32,
                    end: (i_m + stencil).min(s_count) as u32,
                    amp,
                });
            }
        }
    }
}

/// Share of a sample left to the background, 1 − occupied, never below 0.
#[inline]
fn background_share(occupied: f32) -> f32 {
    max_f32(1.0 - occupied, 0.0)
}

/// Reads the texture noise along one line: from the column of a straight line, from the
/// grid for an oblique one.
struct TextureReader<'a> {
    texture: &'a TextureField,
    line: TextureLine,
    /// Column and per-sample taps (straight lines).
    col: &'a [[f32; 4]],
    taps: &'a [(u32, f32)],
    straight: bool,
    /// Sample spacing, mm.
    dr: f64,
}

impl TextureReader<'_> {
    /// The listed channels of samples `first`, `first` + 1, … into the same places of each
    /// slot of `out`.
    #[inline]
    fn run<const K: usize>(&self, first: usize, channels: [usize; K], out: &mut [[f32; 4]]) {
        if self.straight {
            for (t, tap) in out.iter_mut().zip(&self.taps[first..]) {
                TextureField::at_column(self.col, *tap, channels, t);
            }
        } else {
            self.texture
                .along_line(&self.line, self.dr, first, channels, out);
        }
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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::load_scene_str;
    use crate::scene::wavelength_mm;

    /// A thin layer keeps both its boundary echoes on every line, whatever the gentle
    /// undulation of the boundaries does: with the probe square to the layers (no elevation
    /// smear) each boundary's share steps from 0 to 1, so its echo summed along a line is
    /// R·(interface cells)·(mirror echo) — the same on every line, give or take one sample of
    /// the strongest boundary where a boundary falls on a sample's edge. (The renderer once
    /// blended only the boundary nearest in nominal depth, so where the undulation pushed one
    /// past the midpoint to its neighbour its echo vanished: a dark notch in the bright line.)
    #[test]
    fn every_line_keeps_the_echoes_of_a_thin_layer() {
        let scene = load_scene_str(
            r#"{"format": "slicewise-scene", "version": 1, "title": "t", "notes": "invented",
            "probe": {"footprint": {"kind": "linear", "width_mm": 38}, "frequency_mhz": 12,
              "depth_mm": 30, "elevation": {"model": "focused", "aperture_mm": 4.5, "focus_mm": 14},
              "pose": {"x_mm": 0, "y_mm": 0, "rotate_deg": 0, "tilt_deg": 0, "rock_deg": 0}},
            "needle": {"gauge": 22, "length_mm": 50, "bevel_deg": 30, "bevel_roll_deg": 0,
              "entry": {"x_mm": 0, "y_mm": 0}, "azimuth_deg": 0, "angle_deg": 30, "inserted_mm": 0},
            "tissue": {"layers": [{"kind": "skin", "thickness_mm": 1.2},
              {"kind": "fat", "thickness_mm": 3.5}, {"kind": "fascia", "thickness_mm": 0.4},
              {"kind": "muscle", "thickness_mm": 40}]},
            "structures": []}"#,
        )
        .unwrap();
        let geo = ScanGeometry::new(&scene.probe.footprint, scene.probe.depth_mm, 640, 505);
        let f0 = scene.probe.frequency_mhz;
        let lambda = wavelength_mm(f0);
        let profile = scene.probe.elevation.at_frequency(f0);
        let sigma_int: Vec<f64> = (0..geo.samples)
            .map(|i| {
                profile.thickness_mm(geo.range_of(i)).max(1e-3)
                    / FWHM_PER_SIGMA
                    / core::f64::consts::SQRT_2
            })
            .collect();
        let max_sigma_int = sigma_int.iter().copied().fold(0.0, f64::max);
        let beam = Beam {
            axes: Axes::from_pose(&scene.probe.pose),
            profile: &profile,
            axial_res: lambda,
            lateral_res: 0.886 * lambda * 2.0,
            max_sigma_int,
            reach_e: 4.5 * core::f64::consts::SQRT_2 * max_sigma_int + 0.5,
            sigma_int: &sigma_int,
            doppler: None,
        };
        let cdf = NormalCdf::new();
        let frame = Frame::new(&scene, &geo, &beam, &cdf);
        let mut passes = LineEchoes::default();
        passes.update_grids(&scene, &geo, &beam);
        passes.line.resize(geo.samples);
        let expected: f64 = frame
            .boundaries
            .iter()
            .map(|b| MIRROR_INTENSITY * b.reflection as f64 * frame.stencil as f64)
            .sum();
        let one_cell = frame
            .boundaries
            .iter()
            .map(|b| MIRROR_INTENSITY * b.reflection as f64)
            .fold(0.0, f64::max);
        for j in 0..geo.lines {
            passes.line.clear();
            passes.background(&frame, geo.line_origin[j], geo.line_dir[j]);
            let total: f64 = passes.line.spec.iter().map(|&s| s as f64).sum();
            assert!(
                (total - expected).abs() <= 1.001 * one_cell,
                "line {j}: interface echoes {total:.2}, expected {expected:.2}"
            );
        }
    }
}

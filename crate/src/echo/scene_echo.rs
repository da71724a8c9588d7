//! The needle-free echo of a frame, kept between frames: when only the needle moves (or only
//! the gain, time-gain, dynamic range or grey levels change), the renderer redraws the needle
//! and the display chain over this echo instead of recomputing tissue, structures, speckle and
//! reverberation.
//!
//! The key is the part of the scene the echo depends on (probe, tissue, structures, Doppler
//! settings) and the screen size, compared with `==`: any change there — including a field
//! added to the scene later — recomputes the echo. Reverberation copies are kept as a list per
//! line and added after the needle, in the order the renderer always added them, so a reused
//! echo gives the same bytes as a fresh one.

use crate::scene::{DopplerSettings, Probe, Scene, Structure, TissueLayers};

/// What the needle-free echo depends on.
#[derive(Debug, Clone, PartialEq)]
struct EchoKey {
    probe: Probe,
    tissue: TissueLayers,
    structures: Vec<Structure>,
    doppler: DopplerSettings,
    width: usize,
    height: usize,
}

impl EchoKey {
    fn matches(&self, scene: &Scene, width: usize, height: usize) -> bool {
        self.width == width
            && self.height == height
            && self.probe == scene.probe
            && self.tissue == scene.tissue
            && self.structures == scene.structures
            && self.doppler == scene.display.doppler
    }
}

/// One reverberation copy of a strong reflector: `amp` added to samples `start..end` of its
/// line.
#[derive(Debug, Clone, Copy)]
pub(crate) struct ReverbCopy {
    /// First sample.
    pub(crate) start: u32,
    /// One past the last sample.
    pub(crate) end: u32,
    /// Intensity added, re muscle's diffuse echo at 0 dB gain.
    pub(crate) amp: f32,
}

/// The echo of every (line, sample) without the needle, line-major (index line·samples +
/// sample), with what the needle pass needs to draw over it.
#[derive(Debug, Clone, Default)]
pub(crate) struct SceneEcho {
    key: Option<EchoKey>,
    samples: usize,
    /// Echo intensity before the needle and reverberation, re muscle's diffuse echo at 0 dB
    /// gain.
    intensity: Vec<f32>,
    /// Two-way transmission from the face to each sample, 0..1 (the needle's echo takes it).
    trans: Vec<f32>,
    /// Colour Doppler weight, 0..1 (empty when colour is off).
    colour_w: Vec<f32>,
    /// Colour Doppler value: velocity as a fraction of the scale, −1..1, or power, 0..1.
    colour_v: Vec<f32>,
    /// Reverberation copies of all lines; those of line j are `reverb[reverb_start[j]..
    /// reverb_start[j + 1]]`.
    reverb: Vec<ReverbCopy>,
    reverb_start: Vec<u32>,
}

/// One line's share of the echo arrays, to fill.
pub(crate) struct EchoLineMut<'a> {
    /// Echo intensity without needle and reverberation.
    pub(crate) intensity: &'a mut [f32],
    /// Two-way transmission to each sample.
    pub(crate) trans: &'a mut [f32],
    /// Colour Doppler weight.
    pub(crate) colour_w: &'a mut [f32],
    /// Colour Doppler value.
    pub(crate) colour_v: &'a mut [f32],
}

impl SceneEcho {
    /// Whether the kept echo was computed for this scene (needle and display chain aside) and
    /// screen size.
    pub(crate) fn is_current(&self, scene: &Scene, width: usize, height: usize) -> bool {
        self.key
            .as_ref()
            .is_some_and(|k| k.matches(scene, width, height))
    }

    /// Start a new echo of `lines` × `samples`, with colour Doppler arrays when `colour`; the
    /// old one is forgotten.
    pub(crate) fn begin(&mut self, lines: usize, samples: usize, colour: bool) {
        self.key = None;
        self.samples = samples;
        let n = lines * samples;
        self.intensity.resize(n, 0.0);
        self.trans.resize(n, 0.0);
        // Without colour the arrays give their memory back (a large screen holds megabytes).
        let n_colour = if colour { n } else { 0 };
        for v in [&mut self.colour_w, &mut self.colour_v] {
            v.resize(n_colour, 0.0);
            v.shrink_to(n_colour);
        }
        self.reverb.clear();
        self.reverb_start.clear();
        self.reverb_start.push(0);
    }

    /// The arrays of line `j`, to fill; lines are filled in order, each closed with
    /// [`SceneEcho::end_line`]. The colour arrays are empty when the echo has no colour.
    pub(crate) fn line_mut(&mut self, j: usize) -> EchoLineMut<'_> {
        let r = j * self.samples..(j + 1) * self.samples;
        let colour = if self.colour_w.is_empty() {
            0..0
        } else {
            r.clone()
        };
        EchoLineMut {
            intensity: &mut self.intensity[r.clone()],
            trans: &mut self.trans[r],
            colour_w: &mut self.colour_w[colour.clone()],
            colour_v: &mut self.colour_v[colour],
        }
    }

    /// Add a reverberation copy to the line being filled.
    pub(crate) fn push_reverb(&mut self, copy: ReverbCopy) {
        self.reverb.push(copy);
    }

    /// Close the line being filled.
    pub(crate) fn end_line(&mut self) {
        self.reverb_start.push(self.reverb.len() as u32);
    }

    /// Mark the echo as computed for this scene and screen size.
    pub(crate) fn finish(&mut self, scene: &Scene, width: usize, height: usize) {
        self.key = Some(EchoKey {
            probe: scene.probe.clone(),
            tissue: scene.tissue.clone(),
            structures: scene.structures.clone(),
            doppler: scene.display.doppler,
            width,
            height,
        });
    }

    /// Intensity of line `j`.
    pub(crate) fn intensity(&self, j: usize) -> &[f32] {
        &self.intensity[j * self.samples..(j + 1) * self.samples]
    }

    /// Two-way transmission of line `j`.
    pub(crate) fn trans(&self, j: usize) -> &[f32] {
        &self.trans[j * self.samples..(j + 1) * self.samples]
    }

    /// Reverberation copies of line `j`, in the order they are added.
    pub(crate) fn reverb(&self, j: usize) -> &[ReverbCopy] {
        &self.reverb[self.reverb_start[j] as usize..self.reverb_start[j + 1] as usize]
    }

    /// Colour Doppler weight and value of every (line, sample), line-major (empty without
    /// colour).
    pub(crate) fn colour(&self) -> (&[f32], &[f32]) {
        (&self.colour_w, &self.colour_v)
    }
}

#[cfg(test)]
mod tests {
    use crate::{load_scene_str, DopplerMode, Renderer, Scene};

    /// A frame drawn over a kept echo has the bytes of a frame drawn from scratch, whatever
    /// changed before it: the needle, the display chain, or what the echo depends on.
    fn kept_matches_fresh(base: &Scene) {
        let mut steps = vec![base.clone()];
        let mut s = base.clone();
        s.needle.inserted_mm = 0.6 * s.needle.length_mm;
        steps.push(s.clone());
        s.needle.azimuth_deg += 1.5;
        steps.push(s.clone());
        s.display.gain_db = 6.0;
        s.display.dynamic_range_db = 45.0;
        s.display.tgc_db = vec![-3.0, 0.0, 3.0, 6.0, 9.0, 12.0];
        steps.push(s.clone());
        s.probe.pose.x_mm += 1.5;
        steps.push(s.clone());
        s.display.doppler.mode = DopplerMode::Velocity;
        steps.push(s.clone());
        s.needle.inserted_mm = 0.4 * s.needle.length_mm;
        steps.push(s.clone());
        s.structures.pop();
        steps.push(s.clone());
        s.tissue.layers[0].thickness_mm += 0.5;
        steps.push(s.clone());
        s.display.doppler.mode = DopplerMode::Off;
        steps.push(s.clone());
        let mut kept = Renderer::new();
        for (k, scene) in steps.iter().enumerate() {
            let a = kept.render(scene, 96, 80).unwrap().rgba().to_vec();
            let b = Renderer::new()
                .render(scene, 96, 80)
                .unwrap()
                .rgba()
                .to_vec();
            assert!(a == b, "step {k}: the kept echo drew different bytes");
        }
    }

    #[test]
    fn a_kept_echo_draws_the_bytes_of_a_fresh_one() {
        for text in [
            include_str!("../../../scenes-demo/inplane-past-vessel.scene.json"),
            include_str!("../../../scenes-demo/deep-curved-target.scene.json"),
        ] {
            kept_matches_fresh(&load_scene_str(text).unwrap());
        }
    }
}

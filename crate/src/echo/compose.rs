//! Composing the screen from the acquisition grid: each level through the display chain's grey
//! map, colour Doppler blended over the grey, and the move from line-major samples to
//! row-major pixels — a transposition for a linear face, the scan conversion for a curved one.

use super::display_chain::GreyMap;
use super::scan::ConvertTap;

/// Side of the square tiles of the linear transposition, pixels: a tile's lines stay in the
/// first-level cache while its rows are written.
const TILE: usize = 32;

/// Colour Doppler over the grey: the palette and the weight and value of every (line, sample).
#[derive(Clone, Copy)]
pub(crate) struct ColourLayer<'a> {
    /// Palette entries, RGB.
    pub(crate) palette: &'a [[u8; 3]],
    /// Power mode: values 0..1 (else velocity −1..1).
    pub(crate) power: bool,
    /// Colour weight per (line, sample), line-major, 0..1.
    pub(crate) weight: &'a [f32],
    /// Colour value per (line, sample), line-major.
    pub(crate) value: &'a [f32],
}

impl ColourLayer<'_> {
    /// The pixel's RGB: grey where the colour weight is low, else the palette colour of the
    /// value blended over the grey by the weight. The value is read only when it shows (most
    /// pixels have no colour).
    #[inline]
    fn blend(&self, weight: f32, value: impl FnOnce() -> f32, grey: u8) -> [u8; 3] {
        if weight < 0.35 {
            return [grey, grey, grey];
        }
        let value = value();
        let alpha = ((weight - 0.35) / 0.3).clamp(0.0, 1.0);
        let n = self.palette.len() - 1;
        let pos = if self.power {
            value.clamp(0.0, 1.0) * n as f32
        } else {
            (value.clamp(-1.0, 1.0) + 1.0) * 0.5 * n as f32
        };
        let c = self.palette[(pos + 0.5) as usize % (n + 1)];
        let mix = |k: usize| (grey as f32 + (c[k] as f32 - grey as f32) * alpha + 0.5) as u8;
        [mix(0), mix(1), mix(2)]
    }
}

/// The screen of a linear face: line x is pixel column x, sample y pixel row y.
/// `level` is line-major (x·height + y), intensity re full scale; `grey` gets width·height
/// bytes and `rgba` four per pixel, both row-major.
pub(crate) fn compose_linear(
    level: &[f32],
    width: usize,
    height: usize,
    grey_map: &GreyMap,
    colour: Option<ColourLayer<'_>>,
    grey: &mut [u8],
    rgba: &mut [u8],
) {
    // Tile by tile: the lines of a tile stay in the first-level cache while its rows are
    // written. Without colour the RGBA follows from the grey in one sequential pass.
    for y0 in (0..height).step_by(TILE) {
        let y1 = (y0 + TILE).min(height);
        for x0 in (0..width).step_by(TILE) {
            let x1 = (x0 + TILE).min(width);
            for y in y0..y1 {
                let (first, last) = (y * width + x0, y * width + x1);
                let row = &mut grey[first..last];
                for (x, g) in (x0..x1).zip(row.iter_mut()) {
                    *g = grey_map.grey(level[x * height + y]);
                }
                if let Some(layer) = &colour {
                    let pixels = rgba[4 * first..4 * last].chunks_exact_mut(4);
                    for ((x, px), &g) in (x0..x1).zip(pixels).zip(row.iter()) {
                        let a = x * height + y;
                        let c = layer.blend(layer.weight[a], || layer.value[a], g);
                        px.copy_from_slice(&[c[0], c[1], c[2], 255]);
                    }
                }
            }
        }
    }
    if colour.is_none() {
        for (px, &g) in rgba.chunks_exact_mut(4).zip(grey.iter()) {
            px.copy_from_slice(&[g, g, g, 255]);
        }
    }
}

/// The screen of a curved face through its scan-conversion taps (one per pixel, row-major):
/// the level and colour weight interpolated bilinearly between the four nearest (line,
/// sample) points, the colour value taken from the nearest; black outside the sector.
/// `samples` is the number of samples per line of the line-major `level`.
pub(crate) fn compose_curved(
    level: &[f32],
    samples: usize,
    taps: &[ConvertTap],
    grey_map: &GreyMap,
    colour: Option<ColourLayer<'_>>,
    grey: &mut [u8],
    rgba: &mut [u8],
) {
    let bilinear = |buf: &[f32], a: usize, tl: f32, ts: f32| {
        let (near, far) = (&buf[a..a + 2], &buf[a + samples..a + samples + 2]);
        let top = near[0] + (near[1] - near[0]) * ts;
        let bot = far[0] + (far[1] - far[0]) * ts;
        top + (bot - top) * tl
    };
    let Some(layer) = colour else {
        // Grey alone: the grey of each pixel, then the RGBA from it in one sequential pass.
        for (tap, g_out) in taps.iter().zip(grey.iter_mut()) {
            *g_out = if tap.index == u32::MAX {
                0
            } else {
                grey_map.grey(bilinear(
                    level,
                    tap.index as usize,
                    tap.w_line,
                    tap.w_sample,
                ))
            };
        }
        for (px, &g) in rgba.chunks_exact_mut(4).zip(grey.iter()) {
            px.copy_from_slice(&[g, g, g, 255]);
        }
        return;
    };
    for ((tap, g_out), px) in taps
        .iter()
        .zip(grey.iter_mut())
        .zip(rgba.chunks_exact_mut(4))
    {
        if tap.index == u32::MAX {
            *g_out = 0;
            px.copy_from_slice(&[0, 0, 0, 255]);
            continue;
        }
        let a = tap.index as usize;
        let (tl, ts) = (tap.w_line, tap.w_sample);
        let g = grey_map.grey(bilinear(level, a, tl, ts));
        *g_out = g;
        let near = || a + if tl > 0.5 { samples } else { 0 } + usize::from(ts > 0.5);
        let c = layer.blend(bilinear(layer.weight, a, tl, ts), || layer.value[near()], g);
        px.copy_from_slice(&[c[0], c[1], c[2], 255]);
    }
}

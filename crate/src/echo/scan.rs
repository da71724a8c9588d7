//! Scan-line geometry: where each line starts and points for a linear or curved face, the
//! displayed rectangle (field of view and display depth) and, for a curved face, the
//! scan-conversion table from the fan of lines to screen pixels.
//!
//! Linear face: one line per screen column, straight down, samples at the row centres.
//! Curved face of radius R and arc width w: lines fan out from a virtual apex R behind the face
//! centre over ±w/(2R); each line is sampled in range from the face to the display depth, then
//! converted to the screen rectangle that bounds the sector by bilinear interpolation between
//! the four nearest (line, sample) points (the usual scan conversion of sector scanners).

use super::math::sin_cos;
use crate::scene::Footprint;

/// Where one screen pixel takes its value from, for a curved face.
#[derive(Debug, Clone, Copy)]
pub(crate) struct ConvertTap {
    /// Index of the upper-left (line, sample) in the line-major acquisition grid, or u32::MAX
    /// outside the sector.
    pub(crate) index: u32,
    /// Weight toward the next line, 0..1.
    pub(crate) w_line: f32,
    /// Weight toward the next sample, 0..1.
    pub(crate) w_sample: f32,
}

/// The scan geometry of one footprint, depth and screen size.
#[derive(Debug, Clone)]
pub(crate) struct ScanGeometry {
    /// Screen size, pixels.
    pub(crate) width: usize,
    pub(crate) height: usize,
    /// Centre of pixel (0, 0), image mm (lateral, depth).
    pub(crate) u0: f64,
    pub(crate) v0: f64,
    /// Pixel spacing, mm (lateral, depth).
    pub(crate) sx: f64,
    pub(crate) sy: f64,
    /// Number of scan lines and samples per line.
    pub(crate) lines: usize,
    pub(crate) samples: usize,
    /// Sample spacing along a line, mm; sample i is at range (i + ½)·dr.
    pub(crate) dr: f64,
    /// Image-plane point at range 0 of each line, mm.
    pub(crate) line_origin: Vec<[f64; 2]>,
    /// Unit direction of each line in the image plane (lateral, depth).
    pub(crate) line_dir: Vec<[f64; 2]>,
    /// Sine and cosine of the sector half-angle ((0, 1) for a flat face).
    pub(crate) half_sin_cos: (f64, f64),
    /// Scan-conversion taps, one per screen pixel (row-major), for a curved face.
    pub(crate) convert: Option<Vec<ConvertTap>>,
    /// Radius of a curved face and the display depth, mm (`None` for a linear face).
    sector: Option<(f64, f64)>,
    key: (u8, u64, u64, u64, usize, usize),
}

impl ScanGeometry {
    /// The key that decides whether a cached geometry can be reused.
    pub(crate) fn key_of(
        footprint: &Footprint,
        depth_mm: f64,
        width: usize,
        height: usize,
    ) -> (u8, u64, u64, u64, usize, usize) {
        match *footprint {
            Footprint::Linear { width_mm } => {
                (0, width_mm.to_bits(), 0, depth_mm.to_bits(), width, height)
            }
            Footprint::Curved {
                width_mm,
                radius_mm,
            } => (
                1,
                width_mm.to_bits(),
                radius_mm.to_bits(),
                depth_mm.to_bits(),
                width,
                height,
            ),
        }
    }

    pub(crate) fn key(&self) -> (u8, u64, u64, u64, usize, usize) {
        self.key
    }

    /// Build the geometry for a screen of `width` × `height` pixels.
    pub(crate) fn new(footprint: &Footprint, depth_mm: f64, width: usize, height: usize) -> Self {
        let key = Self::key_of(footprint, depth_mm, width, height);
        match *footprint {
            Footprint::Linear { width_mm } => {
                let sx = width_mm / width as f64;
                let sy = depth_mm / height as f64;
                let u0 = -0.5 * width_mm + 0.5 * sx;
                ScanGeometry {
                    width,
                    height,
                    u0,
                    v0: 0.5 * sy,
                    sx,
                    sy,
                    lines: width,
                    samples: height,
                    dr: sy,
                    line_origin: (0..width).map(|j| [u0 + j as f64 * sx, 0.0]).collect(),
                    line_dir: vec![[0.0, 1.0]; width],
                    half_sin_cos: (0.0, 1.0),
                    convert: None,
                    sector: None,
                    key,
                }
            }
            Footprint::Curved {
                width_mm,
                radius_mm,
            } => {
                let r = radius_mm;
                // The reader caps the sector at 150°; keep the maths safe for any input.
                let half = (width_mm / (2.0 * r)).min(75.0 * (core::f64::consts::PI / 180.0));
                let (sh, ch) = sin_cos(half);
                let u_half = (r + depth_mm) * sh;
                let v_top = r * ch - r;
                let sx = 2.0 * u_half / width as f64;
                let sy = (depth_mm - v_top) / height as f64;
                let u0 = -u_half + 0.5 * sx;
                let v0 = v_top + 0.5 * sy;
                // One line per pixel width along the arc at mid-depth: deeper, the lines spread a
                // little wider than a pixel and the scan conversion interpolates between them.
                let arc = (r + 0.5 * depth_mm) * 2.0 * half;
                let lines = (libm::ceil(arc / sx) as usize).clamp(16, 2 * width.max(8));
                let samples = (libm::ceil(depth_mm / sy) as usize).clamp(8, 2 * height.max(8));
                let dr = depth_mm / samples as f64;
                let dtheta = 2.0 * half / lines as f64;
                let mut line_origin = Vec::with_capacity(lines);
                let mut line_dir = Vec::with_capacity(lines);
                for j in 0..lines {
                    let theta = -half + (j as f64 + 0.5) * dtheta;
                    let (s, c) = sin_cos(theta);
                    line_origin.push([r * s, r * c - r]);
                    line_dir.push([s, c]);
                }
                let mut taps = Vec::with_capacity(width * height);
                for y in 0..height {
                    let v = v0 + y as f64 * sy;
                    for x in 0..width {
                        let u = u0 + x as f64 * sx;
                        let yy = v + r;
                        let rho = (u * u + yy * yy).sqrt();
                        let theta = libm::atan2(u, yy);
                        let range = rho - r;
                        if theta.abs() > half || !(0.0..=depth_mm).contains(&range) {
                            taps.push(ConvertTap {
                                index: u32::MAX,
                                w_line: 0.0,
                                w_sample: 0.0,
                            });
                            continue;
                        }
                        let jf = ((theta + half) / dtheta - 0.5).clamp(0.0, (lines - 1) as f64);
                        let if_ = (range / dr - 0.5).clamp(0.0, (samples - 1) as f64);
                        let j0 = (jf as usize).min(lines - 2);
                        let i0 = (if_ as usize).min(samples - 2);
                        taps.push(ConvertTap {
                            index: (j0 * samples + i0) as u32,
                            w_line: (jf - j0 as f64) as f32,
                            w_sample: (if_ - i0 as f64) as f32,
                        });
                    }
                }
                ScanGeometry {
                    width,
                    height,
                    u0,
                    v0,
                    sx,
                    sy,
                    lines,
                    samples,
                    dr,
                    line_origin,
                    line_dir,
                    half_sin_cos: (sh, ch),
                    convert: Some(taps),
                    sector: Some((r, depth_mm)),
                    key,
                }
            }
        }
    }

    /// Whether image point (u, v) (mm) lies within `margin_mm` of the field of view: the
    /// sector between its arcs and straight edges for a curved face, everywhere for a linear
    /// one. (The reference for [`Self::view_span`], checked in the tests.)
    #[cfg(test)]
    pub(crate) fn in_view(&self, u: f64, v: f64, margin_mm: f64) -> bool {
        let Some((radius, depth)) = self.sector else {
            return true;
        };
        let y = v + radius;
        let rho = (u * u + y * y).sqrt();
        if rho > radius + depth + margin_mm || rho < radius - margin_mm {
            return false;
        }
        // Distance outside the sector's straight edges.
        let (sh, ch) = self.half_sin_cos;
        u * ch - y * sh <= margin_mm && -u * ch - y * sh <= margin_mm
    }

    /// The depths v (mm) of the points at lateral position u (mm) that [`Self::in_view`]
    /// accepts, as one interval [lo, hi] that holds them all (a hair wider: it is for skipping
    /// work on points that are never read, not for drawing).
    pub(crate) fn view_span(&self, u: f64, margin_mm: f64) -> (f64, f64) {
        let Some((radius, depth)) = self.sector else {
            return (f64::NEG_INFINITY, f64::INFINITY);
        };
        let (sh, ch) = self.half_sin_cos;
        // Points behind the apex (y = v + R < 0) can only be in view for a face so small that
        // the margin reaches round the apex; then take every depth.
        if sh <= 0.0 || ch <= 0.0 || radius - margin_mm <= margin_mm * (1.0 / sh + 1.0 / ch) {
            return (f64::NEG_INFINITY, f64::INFINITY);
        }
        let outer = radius + depth + margin_mm;
        let inner = radius - margin_mm;
        if u.abs() > outer {
            return (f64::INFINITY, f64::NEG_INFINITY);
        }
        // y ≥ 0 here: below the edges (|u|·cos − y·sin ≤ margin), outside the inner arc and
        // inside the outer one.
        let y_edges = (u.abs() * ch - margin_mm) / sh;
        let y_inner = (inner * inner - u * u).max(0.0).sqrt();
        let y_outer = (outer * outer - u * u).sqrt();
        let slack = 1e-9 * outer;
        (
            y_edges.max(y_inner) - radius - slack,
            y_outer - radius + slack,
        )
    }

    /// Range of sample i, mm.
    #[inline]
    pub(crate) fn range_of(&self, i: usize) -> f64 {
        (i as f64 + 0.5) * self.dr
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The per-column span holds every point the exact test accepts, for narrow and wide
    /// sectors, small and large faces.
    #[test]
    fn view_span_holds_the_field_of_view() {
        for (width_mm, radius_mm, depth_mm) in [
            (60.0, 50.0, 90.0),
            (20.0, 10.0, 40.0),
            (150.0, 40.0, 120.0),
            (8.0, 3.0, 30.0),
        ] {
            let footprint = Footprint::Curved {
                width_mm,
                radius_mm,
            };
            let geo = ScanGeometry::new(&footprint, depth_mm, 200, 160);
            for margin in [0.5, 2.0, 4.0] {
                for k in 0..400 {
                    let u = geo.u0 - 5.0 + k as f64 * (geo.sx * geo.width as f64 + 10.0) / 400.0;
                    let (lo, hi) = geo.view_span(u, margin);
                    for m in 0..400 {
                        let v =
                            geo.v0 - 5.0 + m as f64 * (geo.sy * geo.height as f64 + 10.0) / 400.0;
                        if geo.in_view(u, v, margin) {
                            assert!(v >= lo && v <= hi, "({u}, {v}) outside [{lo}, {hi}]");
                        }
                    }
                }
            }
        }
    }
}

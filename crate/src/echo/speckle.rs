//! Speckle and tissue texture, anchored to the tissue so that moving the probe moves them with
//! it and the same scene always gives the same bytes.
//!
//! **Speckle** (fully developed speckle, after Goodman, *Speckle Phenomena in Optics*, ch. 2,
//! and Burckhardt, IEEE Trans. Sonics Ultrason. 25(1), 1978 — from memory). Many scatterers per
//! resolution cell, each adding a phasor of random phase: the received signal is a circular
//! complex Gaussian field, the sum of the scatterers weighted by the pulse-echo point-spread
//! function (PSF). We build exactly that: white Gaussian scatterer strengths I and Q
//! (independent, from integer hashing of tissue-anchored lattice points and a table of normal
//! quantiles) on a grid aligned with the probe axes, convolved with the two-way amplitude PSF,
//! a Gaussian whose −6 dB widths are the lateral resolution 0.886·λ·F# (F# = 2) and the axial
//! resolution n·λ/2 (n = 2 cycles). The echo intensity factor is I² + Q², scaled to mean 1, so
//! the amplitude √(I² + Q²) is Rayleigh-distributed (mean/std = √(π/(4 − π)) ≈ 1.91) and the
//! dark spots are points where both fields vanish, not lines. The intensity autocorrelation is
//! the squared field autocorrelation, a Gaussian with the PSF's own −6 dB width: grains are
//! one lateral resolution wide and one axial resolution long, elongated across the beam (where
//! resolution is poorer).
//!
//! The grid step is σ of the PSF, or a pixel where that is coarser (finer detail could not be
//! shown); the kernel is truncated at ±3σ and normalised so that a grid node's intensity has
//! mean 1. Between nodes the field is interpolated bilinearly and divided by the interpolated
//! field's known variance, 1 − 2t(1 − t)(1 − ρ) per axis (ρ the correlation of neighbouring
//! nodes), so the statistics do not depend on where a pixel falls in the grid.
//!
//! Anchoring: the lattice is indexed by the world point's projection on the probe axes
//! (lateral, beam, elevation), so sliding the probe shifts the pattern with the tissue
//! exactly; tilting or rotating it decorrelates the pattern, as it does on a scanner. Along
//! the elevation axis the scatterers of two lattice planes one slab thickness (at the focus)
//! apart are blended with weights cos(πt/2) and sin(πt/2), which keep the variance at 1:
//! moving the probe in elevation changes the speckle gradually over one slab thickness. Higher
//! frequency → shorter λ → finer grain.
//!
//! **Texture** (modelling choice): smooth noise in world coordinates, evaluated on a coarse
//! grid of the image plane and interpolated. Fat: thin bright septa where a 3D noise field
//! crosses zero (lobules between them), flattened so the septa run mostly parallel to the skin.
//! Muscle: bright perimysium streaks where a noise field that does not vary along the fibres
//! (taken along world y, the limb's long axis in the demo scenes) peaks — dots and short
//! streaks in cross-section, long parallel striations in long axis.

use super::math::{hash3, max_f64, sin_cos, Noise2, Noise3, PI};
use super::posed::{dot, Axes};

const SEED_SCATTER: u32 = 0x51ce_0005;
const SEED_FAT: u32 = 0x51ce_00fa;
const SEED_MUSCLE: u32 = 0x51ce_0033;
const SEED_BUNDLE: u32 = 0x51ce_0b0d;

/// Bits of a hash that pick one normal quantile: 4096 equal-probability bins.
const GAUSS_BITS: u32 = 12;
/// Speckle grid step in σ of the PSF (finer gains nothing visible; coarser blurs the grain).
const STEP_PER_SIGMA: f64 = 1.0;
/// The PSF kernel is truncated at this many σ (its weight there is e^−4.5 ≈ 1 %).
const KERNEL_SIGMAS: f64 = 3.0;

/// The speckle field of one frame: the complex echo (I, Q) on a grid of the image plane.
#[derive(Debug, Clone, Default)]
pub(crate) struct SpeckleField {
    /// Grid step, mm (lateral, axial).
    step_u: f64,
    step_v: f64,
    /// Grid coordinate of image (u, v) = (0, 0).
    off_x: f64,
    off_y: f64,
    nx: usize,
    ny: usize,
    /// Interleaved (I, Q) at each node, index (ix·ny + iy)·2, scaled so that I² + Q² has mean 1.
    values: Vec<f32>,
    /// 2·(1 − ρ) for neighbouring nodes along x and along y: the variance dip of bilinear
    /// interpolation is t(1 − t) times this.
    dip_x: f32,
    dip_y: f32,
    /// Scatterers filtered along the beam, one column per lattice x (kernel margin included).
    filtered: Vec<f32>,
    /// Scatterers of one lattice column.
    white: Vec<f32>,
    /// Standard normal quantiles at the centres of 2^GAUSS_BITS equal-probability bins,
    /// scaled to variance 1 (built once).
    gauss: Vec<f32>,
}

/// Normalised PSF taps at multiples of `step` for a Gaussian amplitude of σ = `sigma`
/// (Σ taps² = 1), and 2·(1 − ρ) with ρ = Σ taps[n]·taps[n + 1], the correlation of the
/// filtered white noise at neighbouring nodes.
fn psf_taps(sigma: f64, step: f64) -> (Vec<f32>, f32) {
    let reach = libm::ceil(KERNEL_SIGMAS * sigma / step).max(1.0) as i32;
    let raw: Vec<f64> = (-reach..=reach)
        .map(|n| {
            let x = n as f64 * step / sigma;
            libm::exp(-0.5 * x * x)
        })
        .collect();
    let norm = 1.0 / raw.iter().map(|k| k * k).sum::<f64>().sqrt();
    let taps: Vec<f64> = raw.iter().map(|k| k * norm).collect();
    let rho: f64 = taps.windows(2).map(|w| w[0] * w[1]).sum();
    (
        taps.iter().map(|&k| k as f32).collect(),
        (2.0 * (1.0 - rho)) as f32,
    )
}

/// Inverse of the standard normal CDF, relative error below 1.2e-9 (P. J. Acklam's rational
/// approximation, from memory; checked against `libm::erf` in the tests). `p` in (0, 1).
fn normal_quantile(p: f64) -> f64 {
    const A: [f64; 6] = [
        -3.969_683_028_665_376e1,
        2.209_460_984_245_205e2,
        -2.759_285_104_469_687e2,
        1.383_577_518_672_69e2,
        -3.066_479_806_614_716e1,
        2.506_628_277_459_239,
    ];
    const B: [f64; 5] = [
        -5.447_609_879_822_406e1,
        1.615_858_368_580_409e2,
        -1.556_989_798_598_866e2,
        6.680_131_188_771_972e1,
        -1.328_068_155_288_572e1,
    ];
    const C: [f64; 6] = [
        -7.784_894_002_430_293e-3,
        -3.223_964_580_411_365e-1,
        -2.400_758_277_161_838,
        -2.549_732_539_343_734,
        4.374_664_141_464_968,
        2.938_163_982_698_783,
    ];
    const D: [f64; 4] = [
        7.784_695_709_041_462e-3,
        3.224_671_290_700_398e-1,
        2.445_134_137_142_996,
        3.754_408_661_907_416,
    ];
    const P_LOW: f64 = 0.024_25;
    let tail = |q: f64| {
        (((((C[0] * q + C[1]) * q + C[2]) * q + C[3]) * q + C[4]) * q + C[5])
            / ((((D[0] * q + D[1]) * q + D[2]) * q + D[3]) * q + 1.0)
    };
    if p < P_LOW {
        tail((-2.0 * libm::log(p)).sqrt())
    } else if p > 1.0 - P_LOW {
        -tail((-2.0 * libm::log(1.0 - p)).sqrt())
    } else {
        let q = p - 0.5;
        let r = q * q;
        (((((A[0] * r + A[1]) * r + A[2]) * r + A[3]) * r + A[4]) * r + A[5]) * q
            / (((((B[0] * r + B[1]) * r + B[2]) * r + B[3]) * r + B[4]) * r + 1.0)
    }
}

/// The table of [`SpeckleField::gauss`].
fn gaussian_table() -> Vec<f32> {
    let n = 1usize << GAUSS_BITS;
    let q: Vec<f64> = (0..n)
        .map(|k| normal_quantile((k as f64 + 0.5) / n as f64))
        .collect();
    let var = q.iter().map(|x| x * x).sum::<f64>() / n as f64;
    let s = 1.0 / var.sqrt();
    q.iter().map(|x| (x * s) as f32).collect()
}

/// 1 / variance of a bilinear interpolation at offset `t` between nodes (see `dip_x`).
#[inline(always)]
fn inv_var(t: f32, dip: f32) -> f32 {
    1.0 / (1.0 - t * (1.0 - t) * dip)
}

impl SpeckleField {
    /// Fill the field covering image u ∈ [u_min, u_max], v ∈ [v_min, v_max] (mm) for this
    /// frame: PSF σ `sigma_u` (lateral) and `sigma_v` (axial), mm, of the two-way amplitude;
    /// grid steps no finer than `min_step` (lateral, axial), mm; elevation lattice planes
    /// `cell_e` mm apart. `view(u)` gives the depths [v_lo, v_hi] (mm) that can be read at
    /// lateral position u (with a margin wider than the kernel); nodes outside it are left at
    /// zero.
    #[allow(clippy::too_many_arguments)]
    pub(crate) fn fill(
        &mut self,
        axes: &Axes,
        sigma_u: f64,
        sigma_v: f64,
        min_step: (f64, f64),
        cell_e: f64,
        u_range: (f64, f64),
        v_range: (f64, f64),
        view: &dyn Fn(f64) -> (f64, f64),
    ) {
        if self.gauss.is_empty() {
            self.gauss = gaussian_table();
        }
        let step_u = max_f64(sigma_u * STEP_PER_SIGMA, min_step.0);
        let step_v = max_f64(sigma_v * STEP_PER_SIGMA, min_step.1);
        let (taps_u, dip_x) = psf_taps(sigma_u, step_u);
        let (mut taps_v, dip_y) = psf_taps(sigma_v, step_v);
        // I and Q share the unit mean of I² + Q².
        for k in &mut taps_v {
            *k *= core::f32::consts::FRAC_1_SQRT_2;
        }
        let (ru, rv) = (taps_u.len() / 2, taps_v.len() / 2);
        // World point · axis = origin · axis + image coordinate (orthonormal axes).
        let ca = dot(axes.origin, axes.lateral);
        let cb = dot(axes.origin, axes.beam);
        let ce = dot(axes.origin, axes.elevation);
        let x_min = libm::floor((u_range.0 + ca) / step_u) - 1.0;
        let y_min = libm::floor((v_range.0 + cb) / step_v) - 1.0;
        let x_max = libm::floor((u_range.1 + ca) / step_u) + 2.0;
        let y_max = libm::floor((v_range.1 + cb) / step_v) + 2.0;
        let (nx, ny) = (
            ((x_max - x_min) as usize + 1).max(2),
            ((y_max - y_min) as usize + 1).max(2),
        );
        self.nx = nx;
        self.ny = ny;
        self.step_u = step_u;
        self.step_v = step_v;
        self.off_x = ca / step_u - x_min;
        self.off_y = cb / step_v - y_min;
        self.dip_x = dip_x;
        self.dip_y = dip_y;
        let z = ce / cell_e;
        let zf = libm::floor(z);
        let iz = zf as i32;
        let (s_el, c_el) = sin_cos(0.5 * PI * (z - zf));
        let (s_el, c_el) = (s_el as f32, c_el as f32);
        let (ix0, iy0) = (x_min as i32, y_min as i32);
        let depth_at = |iy: usize| (y_min + iy as f64) * step_v - cb;
        let lateral_at = |ix: i32| (x_min + ix as f64) * step_u - ca;
        let gauss = &self.gauss[..];
        let g_mask = (1u32 << GAUSS_BITS) - 1;

        // Pass 1: scatterers of every lattice column that the lateral kernel reaches, filtered
        // along the beam.
        let row = ny * 2;
        self.filtered.resize((nx + 2 * ru) * row, 0.0);
        for (k, column) in self.filtered.chunks_exact_mut(row).enumerate() {
            let ix = k as i32 - ru as i32;
            let (a, b) = span_in(ny, view(lateral_at(ix)), depth_at);
            column[..2 * a].fill(0.0);
            column[2 * b..].fill(0.0);
            if a >= b {
                continue;
            }
            // Scatterer rows a − rv ..= b − 1 + rv, as white index 0..(b − a + 2·rv).
            let n_white = b - a + 2 * rv;
            self.white.resize(2 * n_white, 0.0);
            let x = ix0 + ix;
            let y_first = iy0 + a as i32 - rv as i32;
            for (y, slot) in (y_first..).zip(self.white.chunks_exact_mut(2)) {
                let h = hash3(x, y, iz, SEED_SCATTER);
                let mut i = gauss[(h >> 20) as usize];
                let mut q = gauss[((h >> 8) & g_mask) as usize];
                if s_el != 0.0 {
                    let h2 = hash3(x, y, iz + 1, SEED_SCATTER);
                    i = c_el * i + s_el * gauss[(h2 >> 20) as usize];
                    q = c_el * q + s_el * gauss[((h2 >> 8) & g_mask) as usize];
                }
                slot.copy_from_slice(&[i, q]);
            }
            let out = &mut column[2 * a..2 * b];
            out.fill(0.0);
            for (n, &tap) in taps_v.iter().enumerate() {
                let src = &self.white[2 * n..2 * n + out.len()];
                for (o, s) in out.iter_mut().zip(src) {
                    *o += tap * s;
                }
            }
        }
        // Pass 2: across the beam.
        self.values.resize(nx * row, 0.0);
        for (ix, column) in self.values.chunks_exact_mut(row).enumerate() {
            let (a, b) = span_in(ny, view(lateral_at(ix as i32)), depth_at);
            column[..2 * a].fill(0.0);
            column[2 * b..].fill(0.0);
            let out = &mut column[2 * a..2 * b];
            out.fill(0.0);
            for (n, &tap) in taps_u.iter().enumerate() {
                let base = (ix + n) * row;
                let src = &self.filtered[base + 2 * a..base + 2 * b];
                for (o, s) in out.iter_mut().zip(src) {
                    *o += tap * s;
                }
            }
        }
    }

    /// Highest lattice x coordinate read (just inside the last cell).
    #[inline]
    fn last_x(&self) -> f32 {
        (self.nx - 1) as f32 - 0.001
    }

    /// Highest lattice y coordinate read (just inside the last cell).
    #[inline]
    fn last_y(&self) -> f32 {
        (self.ny - 1) as f32 - 0.001
    }

    /// Grid x coordinate of lateral position u, mm.
    #[inline]
    pub(crate) fn gx(&self, u: f64) -> f32 {
        (u / self.step_u + self.off_x) as f32
    }

    /// Grid y coordinate of depth v, mm.
    #[inline]
    pub(crate) fn gy(&self, v: f64) -> f32 {
        (v / self.step_v + self.off_y) as f32
    }

    /// Speckle intensity factor (mean 1) at grid coordinates (gx, gy) (the tests read single
    /// points; the renderer reads whole lines).
    #[cfg(test)]
    pub(crate) fn at(&self, gx: f32, gy: f32) -> f32 {
        let (i, q, scale) = self.field_at(gx, gy, (self.last_x(), self.last_y()));
        (i * i + q * q) * scale
    }

    /// (I, Q) and the variance correction at grid coordinates (gx, gy).
    #[inline(always)]
    fn field_at(&self, gx: f32, gy: f32, last: (f32, f32)) -> (f32, f32, f32) {
        let (ix, tx) = cell_of(gx, last.0);
        let (iy, ty) = cell_of(gy, last.1);
        let row = self.ny * 2;
        let b = ix * row + iy * 2;
        // One window over this column's pair of nodes and the next column's: one bounds check.
        let w = &self.values[b..b + row + 4];
        let (near, far) = (&w[..4], &w[row..]);
        let i = lerp(lerp(near[0], near[2], ty), lerp(far[0], far[2], ty), tx);
        let q = lerp(lerp(near[1], near[3], ty), lerp(far[1], far[3], ty), tx);
        (i, q, inv_var(tx, self.dip_x) * inv_var(ty, self.dip_y))
    }

    /// Speckle intensity factor at every sample of an oblique line from image point `o` (mm)
    /// along unit direction `b`, sample i at range (i + ½)·`dr` mm, one per slot of `out`.
    pub(crate) fn along_line(&self, o: [f64; 2], b: [f64; 2], dr: f64, out: &mut [f32]) {
        let last = (self.last_x(), self.last_y());
        for (i, slot) in out.iter_mut().enumerate() {
            let r = (i as f64 + 0.5) * dr;
            let gx = ((o[0] + b[0] * r) / self.step_u + self.off_x) as f32;
            let gy = ((o[1] + b[1] * r) / self.step_v + self.off_y) as f32;
            let (si, sq, scale) = self.field_at(gx, gy, last);
            *slot = (si * si + sq * sq) * scale;
        }
    }

    /// Interpolate the field across x at `gx` for every y: a column that a straight line of
    /// constant lateral position reads with [`SpeckleField::at_column`]. Returns the line's
    /// variance correction across x.
    pub(crate) fn column(&self, gx: f32, out: &mut Vec<[f32; 2]>) -> f32 {
        let n = self.ny * 2;
        let (ix, tx) = cell_of(gx, self.last_x());
        let (c0, c1) = (
            &self.values[ix * n..(ix + 1) * n],
            &self.values[(ix + 1) * n..(ix + 2) * n],
        );
        out.resize(self.ny, [0.0; 2]);
        for ((slot, p), q) in out
            .iter_mut()
            .zip(c0.chunks_exact(2))
            .zip(c1.chunks_exact(2))
        {
            *slot = [lerp(p[0], q[0], tx), lerp(p[1], q[1], tx)];
        }
        inv_var(tx, self.dip_x)
    }

    /// Where a depth (grid y coordinate) reads a column: row, weight and variance correction.
    #[inline]
    pub(crate) fn column_tap(&self, gy: f32) -> (u32, f32, f32) {
        let (iy, t) = cell_of(gy, self.last_y());
        (iy as u32, t, inv_var(t, self.dip_y))
    }

    /// Speckle intensity factor from a column, a tap and the column's correction across x.
    #[inline]
    pub(crate) fn at_column(col: &[[f32; 2]], tap: (u32, f32, f32), scale_x: f32) -> f32 {
        let a = tap.0 as usize;
        // A two-row window: one bounds check.
        let rows = &col[a..a + 2];
        let i = lerp(rows[0][0], rows[1][0], tap.1);
        let q = lerp(rows[0][1], rows[1][1], tap.1);
        (i * i + q * q) * (tap.2 * scale_x)
    }
}

/// The run a..b of the `n` points of a grid column whose depths `v_at(i)` (increasing with i)
/// lie in `span` = [lo, hi].
fn span_in(n: usize, span: (f64, f64), v_at: impl Fn(usize) -> f64) -> (usize, usize) {
    let (lo, hi) = span;
    let a = first_where(0, n, |i| v_at(i) >= lo);
    let b = first_where(a, n, |i| v_at(i) > hi);
    (a, b)
}

/// The first i in from..to where `test` holds (`to` if none), for a test that, once true,
/// stays true as i grows: a binary search.
fn first_where(from: usize, to: usize, test: impl Fn(usize) -> bool) -> usize {
    let (mut lo, mut hi) = (from, to);
    while lo < hi {
        let mid = lo + (hi - lo) / 2;
        if test(mid) {
            hi = mid;
        } else {
            lo = mid + 1;
        }
    }
    lo
}

/// A lattice coordinate held within [0, `last`] split into its cell and the offset in that
/// cell (0..1); NaN goes to cell 0. The cell is found through i32, whose conversion to f32 is
/// one instruction (usize's is not, on x86-64).
#[inline(always)]
fn cell_of(g: f32, last: f32) -> (usize, f32) {
    let g = if g > 0.0 { g } else { 0.0 };
    let g = if g < last { g } else { last };
    let i = g as i32;
    (i as usize, g - i as f32)
}

#[inline]
fn lerp(a: f32, b: f32, t: f32) -> f32 {
    a + (b - a) * t
}

/// A grid of noise values over the image plane, `C` channels per point.
#[derive(Debug, Clone, Default)]
struct Grid<const C: usize> {
    u_min: f64,
    v_min: f64,
    step: f64,
    nx: usize,
    ny: usize,
    /// Highest grid coordinates read, x and y (just inside the last cells).
    last: (f32, f32),
    /// C channels per point, index (ix·ny + iy)·C.
    values: Vec<f32>,
}

impl<const C: usize> Grid<C> {
    /// Cover the image rectangle (mm) with points `step_mm` apart, one cell beyond it on each
    /// side, and store `eval(u, v, world point)` at each; points outside `view(u)` (depths,
    /// mm) get zeros without being evaluated.
    fn fill(
        &mut self,
        axes: &Axes,
        u_range: (f64, f64),
        v_range: (f64, f64),
        step_mm: f64,
        view: &dyn Fn(f64) -> (f64, f64),
        mut eval: impl FnMut(f64, f64, [f64; 3]) -> [f32; C],
    ) {
        self.step = step_mm;
        self.u_min = u_range.0 - step_mm;
        self.v_min = v_range.0 - step_mm;
        self.nx = (libm::ceil((u_range.1 - u_range.0) / step_mm) as usize + 3).max(2);
        self.ny = (libm::ceil((v_range.1 - v_range.0) / step_mm) as usize + 3).max(2);
        self.last = ((self.nx - 1) as f32 - 0.001, (self.ny - 1) as f32 - 0.001);
        self.values.resize(self.nx * self.ny * C, 0.0);
        for (ix, column) in self.values.chunks_exact_mut(self.ny * C).enumerate() {
            let u = self.u_min + ix as f64 * step_mm;
            // Points outside the view are never read: zeros, without evaluating them.
            let v_at = |iy: usize| self.v_min + iy as f64 * step_mm;
            let (a, b) = span_in(self.ny, view(u), v_at);
            column[..C * a].fill(0.0);
            column[C * b..].fill(0.0);
            for (iy, slot) in (a..).zip(column[C * a..C * b].chunks_exact_mut(C)) {
                let v = v_at(iy);
                slot.copy_from_slice(&eval(u, v, axes.to_world(u, v, 0.0)));
            }
        }
    }

    /// Grid coordinates along a straight line from image point `o` in unit direction `b`:
    /// (gx at range 0, gx per mm, gy at range 0, gy per mm).
    fn line(&self, o: [f64; 2], b: [f64; 2]) -> [f64; 4] {
        let inv = 1.0 / self.step;
        [
            (o[0] - self.u_min) * inv,
            b[0] * inv,
            (o[1] - self.v_min) * inv,
            b[1] * inv,
        ]
    }

    /// Bilinear value at image point (u, v).
    fn at(&self, u: f64, v: f64) -> [f32; C] {
        let inv = 1.0 / self.step;
        self.at_grid(
            ((u - self.u_min) * inv) as f32,
            ((v - self.v_min) * inv) as f32,
        )
    }

    #[inline(always)]
    fn at_grid(&self, gx: f32, gy: f32) -> [f32; C] {
        let mut out = [0.0; C];
        self.channels_at_grid(gx, gy, core::array::from_fn::<usize, C, _>(|k| k), &mut out);
        out
    }

    /// Bilinear value of the listed channels only, at grid coordinates (gx, gy), into the
    /// same places of `out`.
    #[inline(always)]
    fn channels_at_grid<const K: usize>(
        &self,
        gx: f32,
        gy: f32,
        channels: [usize; K],
        out: &mut [f32; C],
    ) {
        let (ix, tx) = cell_of(gx, self.last.0);
        let (iy, ty) = cell_of(gy, self.last.1);
        let b = (ix * self.ny + iy) * C;
        let r = self.ny * C;
        // This point and the next along y, in this column and the next along x: one window,
        // one bounds check.
        let w = &self.values[b..b + r + 2 * C];
        let (near, far) = (&w[..2 * C], &w[r..]);
        for k in channels {
            out[k] = lerp(
                lerp(near[k], near[C + k], ty),
                lerp(far[k], far[C + k], ty),
                tx,
            );
        }
    }
}

/// Texture noise of one frame: a fine grid for fat septa and muscle streaks (each evaluated
/// only at depths where its tissue lies) and a coarse one for muscle bundles and the
/// undulation of layer boundaries.
#[derive(Debug, Clone, Default)]
pub(crate) struct TextureField {
    /// (fat, muscle streak, bundle, wave): the last two interpolated from `coarse`.
    fine: Grid<4>,
    coarse: Grid<2>,
}

/// Fat lattice cells, mm (world x, y, z): lobules about 2–3 mm across, flattened.
const FAT_CELL_MM: [f64; 3] = [2.6, 2.6, 1.0];
/// Muscle streak cells, mm (world x, z): fine across the fibres; the streaks do not change
/// along the fibres (world y).
const MUSCLE_CELL_MM: [f64; 2] = [1.0, 0.4];
/// Muscle bundle brightness cells, mm.
const BUNDLE_CELL_MM: [f64; 3] = [5.0, 25.0, 3.0];
/// Layer-boundary undulation cells, mm: gentle waves a few mm long.
const WAVE_CELL_MM: [f64; 3] = [5.0, 5.0, 60.0];
const SEED_WAVE: u32 = 0x51ce_0a7e;

/// Whether world depth z lies within `margin` of any of the depth ranges.
fn near_any(ranges: &[(f64, f64)], z: f64, margin: f64) -> bool {
    ranges
        .iter()
        .any(|&(a, b)| z >= a - margin && z <= b + margin)
}

impl TextureField {
    /// Fill the grids over the image rectangle; fat noise only within `fat_z` depth ranges,
    /// muscle only within `muscle_z` (world mm); fine-grid points outside `view(u)` (the
    /// depths, mm, that can be read at lateral position u) are left at zero.
    #[allow(clippy::too_many_arguments)]
    pub(crate) fn fill(
        &mut self,
        axes: &Axes,
        u_range: (f64, f64),
        v_range: (f64, f64),
        step_mm: f64,
        fat_z: &[(f64, f64)],
        muscle_z: &[(f64, f64)],
        view: &dyn Fn(f64) -> (f64, f64),
    ) {
        let margin = 2.0 * step_mm + 1.0;
        // Neighbouring grid points mostly fall in the same noise cell: each reader keeps its
        // last cell's lattice values.
        let (mut bundle, mut wave) = (Noise3::new(SEED_BUNDLE), Noise3::new(SEED_WAVE));
        self.coarse.fill(
            axes,
            u_range,
            v_range,
            (4.0 * step_mm).max(1.0),
            &|_| (f64::NEG_INFINITY, f64::INFINITY),
            |_, _, p| {
                [
                    bundle.at(
                        p[0] / BUNDLE_CELL_MM[0],
                        p[1] / BUNDLE_CELL_MM[1],
                        p[2] / BUNDLE_CELL_MM[2],
                    ),
                    wave.at(
                        p[0] / WAVE_CELL_MM[0],
                        p[1] / WAVE_CELL_MM[1],
                        p[2] / WAVE_CELL_MM[2],
                    ),
                ]
            },
        );
        let coarse = &self.coarse;
        let (mut fat_noise, mut muscle_noise) = (Noise3::new(SEED_FAT), Noise2::new(SEED_MUSCLE));
        self.fine
            .fill(axes, u_range, v_range, step_mm, view, |u, v, p| {
                let fat = if near_any(fat_z, p[2], margin) {
                    fat_noise.at(
                        p[0] / FAT_CELL_MM[0],
                        p[1] / FAT_CELL_MM[1],
                        p[2] / FAT_CELL_MM[2],
                    )
                } else {
                    0.0
                };
                let mus = if near_any(muscle_z, p[2], margin) {
                    muscle_noise.at(p[0] / MUSCLE_CELL_MM[0], p[2] / MUSCLE_CELL_MM[1])
                } else {
                    0.0
                };
                let [bundle, wave] = coarse.at(u, v);
                [fat, mus, bundle, wave]
            });
    }

    /// Grid coordinates along a straight line from `o` in unit direction `b`.
    pub(crate) fn line(&self, o: [f64; 2], b: [f64; 2]) -> TextureLine {
        TextureLine {
            fine: self.fine.line(o, b),
        }
    }

    /// (fat, muscle, bundle, wave) noise at range `r` mm along a line, bilinear.
    #[inline(always)]
    pub(crate) fn at(&self, line: &TextureLine, r: f64) -> [f32; 4] {
        let f = &line.fine;
        self.fine
            .at_grid((f[0] + f[1] * r) as f32, (f[2] + f[3] * r) as f32)
    }

    /// The listed channels of the (fat, muscle, bundle, wave) noise at samples `first`,
    /// `first` + 1, … of a line, sample i at range (i + ½)·`dr` mm, into the same places of
    /// each slot of `out` (the values of [`TextureField::at`]; the other channels are left).
    pub(crate) fn along_line<const K: usize>(
        &self,
        line: &TextureLine,
        dr: f64,
        first: usize,
        channels: [usize; K],
        out: &mut [[f32; 4]],
    ) {
        let f = &line.fine;
        for (q, slot) in out.iter_mut().enumerate() {
            let r = ((first + q) as f64 + 0.5) * dr;
            self.fine.channels_at_grid(
                (f[0] + f[1] * r) as f32,
                (f[2] + f[3] * r) as f32,
                channels,
                slot,
            );
        }
    }

    /// For a line straight down (constant lateral position): the grid interpolated across x at
    /// the line, one entry per grid row; read with [`TextureField::at_column`].
    pub(crate) fn column(&self, line: &TextureLine, out: &mut Vec<[f32; 4]>) {
        let g = &self.fine;
        let (ix, tx) = cell_of(line.fine[0] as f32, g.last.0);
        let (left, right) = (
            &g.values[ix * g.ny * 4..(ix + 1) * g.ny * 4],
            &g.values[(ix + 1) * g.ny * 4..(ix + 2) * g.ny * 4],
        );
        out.resize(g.ny, [0.0; 4]);
        for ((slot, a), b) in out
            .iter_mut()
            .zip(left.chunks_exact(4))
            .zip(right.chunks_exact(4))
        {
            *slot = [
                lerp(a[0], b[0], tx),
                lerp(a[1], b[1], tx),
                lerp(a[2], b[2], tx),
                lerp(a[3], b[3], tx),
            ];
        }
    }

    /// Row and weight of range `r` along a straight-down line, for [`TextureField::at_column`].
    #[inline]
    pub(crate) fn column_tap(&self, line: &TextureLine, r: f64) -> (u32, f32) {
        let g = &self.fine;
        let (iy, t) = cell_of((line.fine[2] + line.fine[3] * r) as f32, g.last.1);
        (iy as u32, t)
    }

    /// The listed channels of the (fat, muscle, bundle, wave) noise from a column, into the
    /// same places of `out`.
    #[inline(always)]
    pub(crate) fn at_column<const K: usize>(
        col: &[[f32; 4]],
        tap: (u32, f32),
        channels: [usize; K],
        out: &mut [f32; 4],
    ) {
        let i = tap.0 as usize;
        let rows = &col[i..i + 2];
        for k in channels {
            out[k] = lerp(rows[0][k], rows[1][k], tap.1);
        }
    }
}

/// The fat channel of the texture noise.
pub(crate) const FAT_CHANNEL: [usize; 1] = [0];
/// The muscle channels of the texture noise: streaks and bundles.
pub(crate) const MUSCLE_CHANNELS: [usize; 2] = [1, 2];

/// Grid coordinates of one straight line in both texture grids.
#[derive(Debug, Clone, Copy)]
pub(crate) struct TextureLine {
    fine: [f64; 4],
}

/// Fat brightness factor from its noise: dim lobules, bright thin septa where the noise crosses
/// zero.
#[inline]
pub(crate) fn fat_factor(n: f32) -> f32 {
    let x = n * (1.0 / 0.075);
    let bump = 1.0 / (1.0 + x * x);
    0.45 + 9.0 * bump * bump
}

/// Muscle brightness factor from its streak and bundle noise: short bright streaks where the
/// streak noise peaks (the "starry" look of muscle cut across), faint lines where it crosses
/// zero, and gentle brightness changes from bundle to bundle.
#[inline]
pub(crate) fn muscle_factor(streak: f32, bundle: f32) -> f32 {
    let x = streak * (1.0 / 0.07);
    let bump = 1.0 / (1.0 + x * x);
    let peak = ((streak.abs() - 0.4) * 5.0).clamp(0.0, 1.0);
    (0.5 + 0.9 * bump * bump + 5.0 * peak * peak) * (1.0 + 0.45 * bundle)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scene::Pose;

    fn field(sigma_u: f64, sigma_v: f64) -> SpeckleField {
        let axes = Axes::from_pose(&Pose::default());
        let mut f = SpeckleField::default();
        f.fill(
            &axes,
            sigma_u,
            sigma_v,
            (0.0, 0.0),
            1.0,
            (-20.0, 20.0),
            (0.0, 40.0),
            &|_| (f64::NEG_INFINITY, f64::INFINITY),
        );
        f
    }

    /// The table of normal quantiles: each entry's Φ (through `libm::erf`) is the centre of its
    /// bin, to 1e-6 relative.
    #[test]
    fn gaussian_table_holds_normal_quantiles() {
        let t = gaussian_table();
        let n = t.len() as f64;
        let var = t.iter().map(|&x| (x as f64) * (x as f64)).sum::<f64>() / n;
        assert!((var - 1.0).abs() < 1e-6, "variance {var}");
        for (k, &x) in t.iter().enumerate() {
            let p = (k as f64 + 0.5) / n;
            let q = normal_quantile(p);
            let phi = 0.5 * (1.0 + libm::erf(q / core::f64::consts::SQRT_2));
            assert!((phi - p).abs() < 1e-6 * p.min(1.0 - p), "{p}: {phi}");
            assert!((x as f64 - q).abs() < 0.01 * q.abs() + 1e-6);
        }
    }

    /// Fully developed speckle (Goodman, Speckle Phenomena in Optics, ch. 2, from memory): the
    /// intensity is exponential — mean 1 and standard deviation 1 — and the amplitude Rayleigh,
    /// mean/std = √(π/(4 − π)) = 1.913, anywhere in the grid (at nodes and between them). About
    /// 15 000 independent cells are read: standard errors near 0.01.
    #[test]
    fn speckle_intensity_is_exponential_and_amplitude_rayleigh() {
        let f = field(0.12, 0.065);
        let (mut sum, mut sum2, mut a_sum, mut n) = (0.0, 0.0, 0.0, 0.0);
        let mut u = -19.0;
        while u < 19.0 {
            let mut v = 1.0;
            while v < 39.0 {
                let s = f.at(f.gx(u), f.gy(v)) as f64;
                sum += s;
                sum2 += s * s;
                a_sum += s.sqrt();
                n += 1.0;
                v += 0.037;
            }
            u += 0.053;
        }
        let mean = sum / n;
        let sd = (sum2 / n - mean * mean).sqrt();
        assert!((mean - 1.0).abs() < 0.04, "mean {mean}");
        assert!((sd / mean - 1.0).abs() < 0.05, "contrast {}", sd / mean);
        // E[A²] = E[I] = mean.
        let a_mean = a_sum / n;
        let snr = a_mean / (mean - a_mean * a_mean).sqrt();
        let rayleigh = (core::f64::consts::PI / (4.0 - core::f64::consts::PI)).sqrt();
        assert!((snr - rayleigh).abs() < 0.03, "amplitude mean/std {snr}");
    }

    /// Grain size: the intensity autocovariance is the squared field autocorrelation, a
    /// Gaussian whose full width at half maximum is the PSF's −6 dB width (2.355 σ): one
    /// resolution cell across and along the beam (Burckhardt 1978; Wagner et al. 1983; from
    /// memory). At a lag of half that width it is ½; the grid's interpolation may widen it a
    /// little (±0.12 allowed).
    #[test]
    fn speckle_grain_is_one_resolution_cell() {
        let (sigma_u, sigma_v) = (0.12, 0.065);
        let f = field(sigma_u, sigma_v);
        let autocov = |du: f64, dv: f64| {
            let (mut s0, mut s1, mut s2, mut s01, mut n) = (0.0, 0.0, 0.0, 0.0, 0.0);
            let mut u = -18.0;
            while u < 18.0 {
                let mut v = 2.0;
                while v < 38.0 {
                    let a = f.at(f.gx(u), f.gy(v)) as f64;
                    let b = f.at(f.gx(u + du), f.gy(v + dv)) as f64;
                    s0 += a;
                    s1 += b;
                    s2 += a * a;
                    s01 += a * b;
                    n += 1.0;
                    v += 0.041;
                }
                u += 0.067;
            }
            let (ma, mb) = (s0 / n, s1 / n);
            (s01 / n - ma * mb) / (s2 / n - ma * ma)
        };
        let fwhm = 2.354_820_045;
        let lateral = autocov(0.5 * fwhm * sigma_u, 0.0);
        let axial = autocov(0.0, 0.5 * fwhm * sigma_v);
        println!("autocovariance at half a cell: lateral {lateral:.3}, axial {axial:.3}");
        assert!((lateral - 0.5).abs() < 0.12, "lateral {lateral}");
        assert!((axial - 0.5).abs() < 0.12, "axial {axial}");
        // Two cells apart: nearly independent (e^−8 ≈ 0.0003 in theory).
        let far = autocov(2.0 * fwhm * sigma_u, 0.0);
        assert!(far.abs() < 0.05, "two cells apart {far}");
    }

    #[test]
    fn speckle_moves_with_the_tissue() {
        let a = Axes::from_pose(&Pose::default());
        let b = Axes::from_pose(&Pose {
            x_mm: 3.7,
            ..Pose::default()
        });
        let mut fa = SpeckleField::default();
        let mut fb = SpeckleField::default();
        fa.fill(
            &a,
            0.3,
            0.15,
            (0.0, 0.0),
            1.0,
            (-20.0, 20.0),
            (0.0, 40.0),
            &|_| (f64::NEG_INFINITY, f64::INFINITY),
        );
        fb.fill(
            &b,
            0.3,
            0.15,
            (0.0, 0.0),
            1.0,
            (-20.0, 20.0),
            (0.0, 40.0),
            &|_| (f64::NEG_INFINITY, f64::INFINITY),
        );
        // The tissue point at image u in frame a is at u − 3.7 in frame b.
        for k in 0..50 {
            let u = -10.0 + 0.31 * k as f64;
            let v = 5.0 + 0.27 * k as f64;
            let sa = fa.at(fa.gx(u), fa.gy(v));
            let sb = fb.at(fb.gx(u - 3.7), fb.gy(v));
            assert!((sa - sb).abs() < 1e-3 * (1.0 + sa), "{sa} vs {sb}");
        }
    }
}

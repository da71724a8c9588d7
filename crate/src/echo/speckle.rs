//! Speckle and tissue texture, anchored to the tissue so that moving the probe moves them with
//! it and the same scene always gives the same bytes.
//!
//! **Speckle** (modelling choice after the usual random-phasor picture of fully developed
//! speckle): two smooth random fields I and Q, made of hashed lattice values with smooth
//! interpolation, stand for the in-phase and quadrature sums of many scatterers in one
//! resolution cell; the echo intensity factor is I² + Q², exponential with mean 1 (so the
//! amplitude is Rayleigh-like). The lattice is aligned with the probe axes (lateral, beam,
//! elevation) with cells one resolution cell in size — axial n·λ/2 with n = 2 cycles, lateral
//! the two-way −6 dB width 0.886·λ·F# at F# = 2, elevation the slab thickness at the focus — and
//! indexed by the world point's projection on those axes. Sliding the probe shifts the pattern
//! with the tissue exactly; tilting or rotating it decorrelates the pattern, as it does on a
//! scanner. Higher frequency → shorter λ → finer grain.
//!
//! **Texture** (modelling choice): smooth noise in world coordinates, evaluated on a coarse
//! grid of the image plane and interpolated. Fat: thin bright septa where a 3D noise field
//! crosses zero (lobules between them), flattened so the septa run mostly parallel to the skin.
//! Muscle: bright perimysium streaks where a noise field that does not vary along the fibres
//! (taken along world y, the limb's long axis in the demo scenes) peaks — dots and short
//! streaks in cross-section, long parallel striations in long axis.

use super::math::{hash3, hash_value, smooth, Noise2, Noise3};
use super::posed::{dot, Axes};

const SEED_I: u32 = 0x51ce_0001;
const SEED_Q: u32 = 0x51ce_0002;
const SEED_I2: u32 = 0x51ce_0003;
const SEED_Q2: u32 = 0x51ce_0004;
const SEED_FAT: u32 = 0x51ce_00fa;
const SEED_MUSCLE: u32 = 0x51ce_0033;
const SEED_BUNDLE: u32 = 0x51ce_0b0d;

/// Mean of I² + Q² for unit-variance-6 triangular lattice values under smooth bilinear
/// interpolation: 2 · (1/6) · 0.742857² (E[(1−s)² + s²] = 26/35 per axis with s = 3t² − 2t³).
const SPECKLE_MEAN_PLANAR: f32 = 2.0 / 6.0 * (26.0 / 35.0) * (26.0 / 35.0);

/// Speckle lattice values on the image plane for one frame.
#[derive(Debug, Clone, Default)]
pub(crate) struct SpeckleField {
    /// Lattice cell, mm (lateral, axial).
    cell_u: f64,
    cell_v: f64,
    /// Lattice coordinate of image (u, v) = (0, 0) minus the grid's first index.
    off_x: f64,
    off_y: f64,
    nx: usize,
    ny: usize,
    /// Interleaved (I, Q) values, row-major by x then y: index (ix·ny + iy)·2.
    values: Vec<f32>,
    /// A second lattice of the same size, read half a cell further on in both directions;
    /// adding the two hides the grid that a single value-noise lattice shows.
    values_b: Vec<f32>,
    norm: f32,
}

impl SpeckleField {
    /// Fill the lattice covering image u ∈ [u_min, u_max], v ∈ [v_min, v_max] (mm) for this
    /// frame. `view(u)` gives the depths [v_lo, v_hi] (mm) that can be read at lateral position
    /// u; lattice points outside it are left at zero.
    #[allow(clippy::too_many_arguments)]
    pub(crate) fn fill(
        &mut self,
        axes: &Axes,
        cell_u: f64,
        cell_v: f64,
        cell_e: f64,
        u_range: (f64, f64),
        v_range: (f64, f64),
        view: &dyn Fn(f64) -> (f64, f64),
    ) {
        // World point · axis = origin · axis + image coordinate (orthonormal axes).
        let ca = dot(axes.origin, axes.lateral);
        let cb = dot(axes.origin, axes.beam);
        let ce = dot(axes.origin, axes.elevation);
        let x_min = libm::floor((u_range.0 + ca) / cell_u) - 1.0;
        let y_min = libm::floor((v_range.0 + cb) / cell_v) - 1.0;
        let x_max = libm::floor((u_range.1 + ca) / cell_u) + 2.0;
        let y_max = libm::floor((v_range.1 + cb) / cell_v) + 2.0;
        self.nx = ((x_max - x_min) as usize + 1).max(2);
        self.ny = ((y_max - y_min) as usize + 1).max(2);
        self.cell_u = cell_u;
        self.cell_v = cell_v;
        self.off_x = ca / cell_u - x_min;
        self.off_y = cb / cell_v - y_min;
        let z = ce / cell_e;
        let zf = libm::floor(z);
        let iz = zf as i32;
        let tz = smooth((z - zf) as f32);
        let (ix0, iy0) = (x_min as i32, y_min as i32);
        for (values, seeds) in [
            (&mut self.values, (SEED_I, SEED_Q)),
            (&mut self.values_b, (SEED_I2, SEED_Q2)),
        ] {
            values.resize(self.nx * self.ny * 2, 0.0);
            for (ix, column) in (0i32..).zip(values.chunks_exact_mut(self.ny * 2)) {
                let u = (x_min + ix as f64) * cell_u - ca;
                // Points outside the view are never read: zeros. The rest is one run, hashed
                // in a loop without branches.
                let (a, b) = span_in(self.ny, view(u), |iy| (y_min + iy as f64) * cell_v - cb);
                column[..2 * a].fill(0.0);
                column[2 * b..].fill(0.0);
                let x = ix0 + ix;
                for (y, slot) in (iy0 + a as i32..).zip(column[2 * a..2 * b].chunks_exact_mut(2)) {
                    let i0 = hash_value(hash3(x, y, iz, seeds.0));
                    let i1 = hash_value(hash3(x, y, iz + 1, seeds.0));
                    let q0 = hash_value(hash3(x, y, iz, seeds.1));
                    let q1 = hash_value(hash3(x, y, iz + 1, seeds.1));
                    slot.copy_from_slice(&[i0 + (i1 - i0) * tz, q0 + (q1 - q0) * tz]);
                }
            }
        }
        let ez = (1.0 - tz) * (1.0 - tz) + tz * tz;
        self.norm = 1.0 / (SPECKLE_MEAN_PLANAR * ez);
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

    /// Lattice x coordinate (grid units) of lateral position u, mm.
    #[inline]
    pub(crate) fn gx(&self, u: f64) -> f32 {
        (u / self.cell_u + self.off_x) as f32
    }

    /// Lattice y coordinate (grid units) of depth v, mm.
    #[inline]
    pub(crate) fn gy(&self, v: f64) -> f32 {
        (v / self.cell_v + self.off_y) as f32
    }

    /// Speckle intensity factor (mean 1) at lattice coordinates (gx, gy) (the tests read
    /// single points; the renderer reads whole lines).
    #[cfg(test)]
    pub(crate) fn at(&self, gx: f32, gy: f32) -> f32 {
        let last = (self.last_x(), self.last_y());
        let row = self.ny * 2;
        let (ia, qa) = bilinear_iq(&self.values, row, gx, gy, last);
        let (ib, qb) = bilinear_iq(&self.values_b, row, gx + 0.5, gy + 0.5, last);
        let (i, q) = (ia + ib, qa + qb);
        // Each sum has twice the variance of one lattice.
        (i * i + q * q) * (0.5 * self.norm)
    }

    /// Speckle intensity factor at every sample of an oblique line from image point `o` (mm)
    /// along unit direction `b`, sample i at range (i + ½)·`dr` mm, one per slot of `out`:
    /// each sample's two lattice lookups in one tight loop.
    pub(crate) fn along_line(&self, o: [f64; 2], b: [f64; 2], dr: f64, out: &mut [f32]) {
        let last = (self.last_x(), self.last_y());
        let row = self.ny * 2;
        let scale = 0.5 * self.norm;
        let (va, vb) = (&self.values[..], &self.values_b[..]);
        for (i, slot) in out.iter_mut().enumerate() {
            let r = (i as f64 + 0.5) * dr;
            let gx = ((o[0] + b[0] * r) / self.cell_u + self.off_x) as f32;
            let gy = ((o[1] + b[1] * r) / self.cell_v + self.off_y) as f32;
            let (ia, qa) = bilinear_iq(va, row, gx, gy, last);
            let (ib, qb) = bilinear_iq(vb, row, gx + 0.5, gy + 0.5, last);
            let (si, sq) = (ia + ib, qa + qb);
            *slot = (si * si + sq * sq) * scale;
        }
    }

    /// Interpolate both lattices across x at `gx` for every y: a column that a straight line
    /// of constant lateral position reads with [`SpeckleField::at_column`].
    pub(crate) fn column(&self, gx: f32, out: &mut Vec<[f32; 4]>) {
        let n = self.ny * 2;
        let last = self.last_x();
        let ((ia, ta), (ib, tb)) = (cell_of(gx, last), cell_of(gx + 0.5, last));
        let (ta, tb) = (smooth(ta), smooth(tb));
        let (a0, a1) = (
            &self.values[ia * n..(ia + 1) * n],
            &self.values[(ia + 1) * n..(ia + 2) * n],
        );
        let (b0, b1) = (
            &self.values_b[ib * n..(ib + 1) * n],
            &self.values_b[(ib + 1) * n..(ib + 2) * n],
        );
        out.resize(self.ny, [0.0; 4]);
        for ((((slot, p), q), r), s) in out
            .iter_mut()
            .zip(a0.chunks_exact(2))
            .zip(a1.chunks_exact(2))
            .zip(b0.chunks_exact(2))
            .zip(b1.chunks_exact(2))
        {
            *slot = [
                lerp(p[0], q[0], ta),
                lerp(p[1], q[1], ta),
                lerp(r[0], s[0], tb),
                lerp(r[1], s[1], tb),
            ];
        }
    }

    /// Where a depth (lattice y coordinate) reads a column: (row, weight) for each lattice.
    #[inline]
    pub(crate) fn column_tap(&self, gy: f32) -> (u32, f32, u32, f32) {
        let last = self.last_y();
        let tap = |gy: f32| {
            let (iy, t) = cell_of(gy, last);
            (iy as u32, smooth(t))
        };
        let (a, ta) = tap(gy);
        let (b, tb) = tap(gy + 0.5);
        (a, ta, b, tb)
    }

    /// Speckle intensity factor from a column and a tap.
    #[inline]
    pub(crate) fn at_column(&self, col: &[[f32; 4]], tap: (u32, f32, u32, f32)) -> f32 {
        let (a, ta, b, tb) = (tap.0 as usize, tap.1, tap.2 as usize, tap.3);
        // Two-row windows: one bounds check each.
        let (ca, cb) = (&col[a..a + 2], &col[b..b + 2]);
        let i = lerp(ca[0][0], ca[1][0], ta) + lerp(cb[0][2], cb[1][2], tb);
        let q = lerp(ca[0][1], ca[1][1], ta) + lerp(cb[0][3], cb[1][3], tb);
        (i * i + q * q) * (0.5 * self.norm)
    }
}

/// Smooth bilinear (I, Q) of an interleaved lattice with `row` values per x column, at lattice
/// coordinates (gx, gy) held within the lattice (last cells `last`).
#[inline(always)]
fn bilinear_iq(v: &[f32], row: usize, gx: f32, gy: f32, last: (f32, f32)) -> (f32, f32) {
    let (ix, tx) = cell_of(gx, last.0);
    let (iy, ty) = cell_of(gy, last.1);
    let (tx, ty) = (smooth(tx), smooth(ty));
    let b = ix * row + iy * 2;
    // One window over this column's pair of points and the next column's: one bounds check.
    let w = &v[b..b + row + 4];
    let (near, far) = (&w[..4], &w[row..]);
    let i = lerp(lerp(near[0], near[2], ty), lerp(far[0], far[2], ty), tx);
    let q = lerp(lerp(near[1], near[3], ty), lerp(far[1], far[3], ty), tx);
    (i, q)
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

    #[test]
    fn speckle_has_unit_mean_and_exponential_like_spread() {
        let axes = Axes::from_pose(&Pose::default());
        let mut f = SpeckleField::default();
        f.fill(&axes, 0.3, 0.15, 1.0, (-20.0, 20.0), (0.0, 40.0), &|_| {
            (f64::NEG_INFINITY, f64::INFINITY)
        });
        let (mut sum, mut sum2, mut n) = (0.0f64, 0.0f64, 0.0f64);
        let mut u = -19.0;
        while u < 19.0 {
            let mut v = 1.0;
            while v < 39.0 {
                let s = f.at(f.gx(u), f.gy(v)) as f64;
                sum += s;
                sum2 += s * s;
                n += 1.0;
                v += 0.037;
            }
            u += 0.053;
        }
        let mean = sum / n;
        let sd = (sum2 / n - mean * mean).sqrt();
        assert!((mean - 1.0).abs() < 0.05, "mean {mean}");
        // Fully developed speckle has intensity contrast sd/mean = 1; smoothing lowers it a bit.
        assert!(sd / mean > 0.6 && sd / mean < 1.3, "contrast {}", sd / mean);
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
        fa.fill(&a, 0.3, 0.15, 1.0, (-20.0, 20.0), (0.0, 40.0), &|_| {
            (f64::NEG_INFINITY, f64::INFINITY)
        });
        fb.fill(&b, 0.3, 0.15, 1.0, (-20.0, 20.0), (0.0, 40.0), &|_| {
            (f64::NEG_INFINITY, f64::INFINITY)
        });
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

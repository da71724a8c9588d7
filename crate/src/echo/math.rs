//! Deterministic numerics for the echo image: every transcendental goes through `libm` (or a
//! polynomial built from + − × ÷), so native and wasm32 builds give identical bytes.
//!
//! std's `f64::sin`, `exp`, `ln` … call the platform's maths library, which may differ by an ulp
//! between targets; `libm` is the same Rust code everywhere. The per-pixel log and exp below
//! are cheaper polynomial versions made only of IEEE basic operations (correctly rounded on
//! every target), accurate to about 1e-6 relative — far below one grey level.

/// π (exact double).
pub(crate) const PI: f64 = core::f64::consts::PI;
/// Degrees to radians.
#[inline]
pub(crate) fn rad(deg: f64) -> f64 {
    deg * (PI / 180.0)
}
/// Radians to degrees.
#[inline]
pub(crate) fn deg(rad: f64) -> f64 {
    rad * (180.0 / PI)
}

/// (sin, cos) of an angle in radians, through libm.
#[inline]
pub(crate) fn sin_cos(x: f64) -> (f64, f64) {
    (libm::sin(x), libm::cos(x))
}

/// log2 of a positive f32 from its bits and a short atanh series; inputs at or below 1e-30
/// (and NaN) are treated as 1e-30. Absolute error below 2e-5.
#[inline]
pub(crate) fn log2_fast(x: f32) -> f32 {
    let x = if x > 1e-30 { x } else { 1e-30 };
    let bits = x.to_bits();
    let exponent = ((bits >> 23) & 0xff) as i32 - 127;
    // Mantissa in [1, 2); fold into [√½, √2) so the series argument stays small.
    let mut m = f32::from_bits((bits & 0x007f_ffff) | 0x3f80_0000);
    let mut e = exponent as f32;
    if m > core::f32::consts::SQRT_2 {
        m *= 0.5;
        e += 1.0;
    }
    // ln m = 2·atanh(s), s = (m − 1)/(m + 1) ∈ [−0.172, 0.172].
    let s = (m - 1.0) / (m + 1.0);
    let s2 = s * s;
    let ln_m = 2.0 * s * (1.0 + s2 * (1.0 / 3.0 + s2 * (0.2 + s2 * (1.0 / 7.0))));
    e + ln_m * core::f32::consts::LOG2_E
}

/// 10·log10 of a positive f32 (a power ratio in dB).
#[inline]
pub(crate) fn db10_fast(x: f32) -> f32 {
    // 10·log10(2) = 3.0103
    10.0 * core::f32::consts::LOG10_2 * log2_fast(x)
}

/// 2^x for f32, x clamped to [−126, 126]; polynomial on [−½, ½] after rounding.
#[inline]
pub(crate) fn exp2_fast(x: f32) -> f32 {
    let x = x.clamp(-126.0, 126.0);
    // NaN → clamp keeps NaN; send it to 0.
    if x.is_nan() {
        return 0.0;
    }
    // floor(x + ½) through i32 (exact here, |x + ½| ≤ 126.5): std's `floor` is a library call
    // on x86-64 without SSE4.1.
    let y = x + 0.5;
    let t = y as i32;
    let n = if t as f32 > y { t - 1 } else { t } as f32;
    let f = x - n; // [−½, ½)
                   // Taylor of e^(f·ln2) to degree 6: error < 2e-8 on [−½, ½].
    let t = f * core::f32::consts::LN_2;
    let p = 1.0
        + t * (1.0
            + t * (0.5
                + t * (1.0 / 6.0 + t * (1.0 / 24.0 + t * (1.0 / 120.0 + t * (1.0 / 720.0))))));
    let scale = f32::from_bits(((n as i32 + 127) as u32) << 23);
    p * scale
}

/// e^x for f32 through [`exp2_fast`].
#[inline]
pub(crate) fn exp_fast(x: f32) -> f32 {
    exp2_fast(x * core::f32::consts::LOG2_E)
}

/// Standard normal CDF Φ(x) as a table over [−6, 6], built once with `libm::erf` and read with
/// linear interpolation (error below 2e-6).
#[derive(Debug, Clone)]
pub(crate) struct NormalCdf {
    table: Vec<f32>,
}

const CDF_HALF_SPAN: f32 = 6.0;
const CDF_STEPS: usize = 3072;

impl NormalCdf {
    pub(crate) fn new() -> Self {
        let table = (0..=CDF_STEPS + 1)
            .map(|i| {
                let x = -(CDF_HALF_SPAN as f64)
                    + 2.0 * CDF_HALF_SPAN as f64 * i as f64 / CDF_STEPS as f64;
                (0.5 * (1.0 + libm::erf(x / core::f64::consts::SQRT_2))) as f32
            })
            .collect();
        NormalCdf { table }
    }

    /// Φ(x); ±∞ and NaN give 1, 0 and 0.
    #[inline]
    pub(crate) fn phi(&self, x: f32) -> f32 {
        if x >= CDF_HALF_SPAN {
            return 1.0;
        }
        if x.is_nan() || x <= -CDF_HALF_SPAN {
            return 0.0;
        }
        let pos = (x + CDF_HALF_SPAN) * (CDF_STEPS as f32 / (2.0 * CDF_HALF_SPAN));
        let i = pos as usize; // pos ≥ 0
        let f = pos - i as f32;
        let a = self.table[i];
        let b = self.table[i + 1];
        a + (b - a) * f
    }
}

/// A 32-bit integer hash of a 3D lattice point and a seed: the coordinates mixed by large odd
/// multipliers, then murmur3's finaliser. The source of every random-looking but reproducible
/// value in the image.
#[inline]
pub(crate) fn hash3(x: i32, y: i32, z: i32, seed: u32) -> u32 {
    let mut h = (x as u32)
        .wrapping_mul(0x9e37_79b1)
        .wrapping_add((y as u32).wrapping_mul(0x85eb_ca77))
        .wrapping_add((z as u32).wrapping_mul(0xc2b2_ae3d))
        ^ seed;
    h ^= h >> 16;
    h = h.wrapping_mul(0x85eb_ca6b);
    h ^= h >> 13;
    h = h.wrapping_mul(0xc2b2_ae35);
    h ^= h >> 16;
    h
}

/// A hash as a value in [−1, 1] with a triangular distribution (sum of two uniform halves),
/// closer to Gaussian than a single uniform; variance 1/6.
#[inline]
pub(crate) fn hash_value(h: u32) -> f32 {
    let a = (h & 0xffff) as f32;
    let b = (h >> 16) as f32;
    (a + b) * (1.0 / 65535.0) - 1.0
}

/// A hash as a value in [0, 1).
#[inline]
pub(crate) fn hash_unit(h: u32) -> f64 {
    (h >> 8) as f64 / (1u32 << 24) as f64
}

/// FNV-1a 64-bit hash of a byte string.
pub(crate) fn fnv1a64(bytes: &[u8]) -> u64 {
    let mut h: u64 = 0xcbf2_9ce4_8422_2325;
    for &b in bytes {
        h ^= b as u64;
        h = h.wrapping_mul(0x0000_0100_0000_01b3);
    }
    h
}

/// A seed from a text (structure ids), so a nerve's fascicles stay with the nerve.
pub(crate) fn seed_of(text: &str) -> u32 {
    let h = fnv1a64(text.as_bytes());
    (h ^ (h >> 32)) as u32
}

/// Smooth interpolation weight 3f² − 2f³ for f in [0, 1].
#[inline]
pub(crate) fn smooth(f: f32) -> f32 {
    f * f * (3.0 - 2.0 * f)
}

/// The larger of two numbers that are not NaN. A plain comparison: `f64::max` has to follow
/// IEEE's NaN rules, which wasm32 compiles to several instructions — it costs in per-sample
/// loops.
#[inline]
pub(crate) fn max_f64(a: f64, b: f64) -> f64 {
    if a > b {
        a
    } else {
        b
    }
}

/// The smaller of two numbers that are not NaN (see [`max_f64`]).
#[inline]
pub(crate) fn min_f64(a: f64, b: f64) -> f64 {
    if a < b {
        a
    } else {
        b
    }
}

/// The larger of two f32 that are not NaN (see [`max_f64`]).
#[inline]
pub(crate) fn max_f32(a: f32, b: f32) -> f32 {
    if a > b {
        a
    } else {
        b
    }
}

/// Largest integer not above `x`, for finite |x| < 2⁵²: exact, from a truncating conversion
/// (cheaper than libm's bit-by-bit `floor` on targets without a rounding instruction). Other
/// inputs are returned as they are (they are integers already, or not numbers).
#[inline]
pub(crate) fn floor_f64(x: f64) -> f64 {
    if x.is_nan() || x.abs() >= 4_503_599_627_370_496.0 {
        return x;
    }
    let t = x as i64 as f64;
    if t > x {
        t - 1.0
    } else {
        t
    }
}

/// Value noise in 3D — hashed lattice values with smooth interpolation, in about [−1, 1] —
/// read at many nearby points in turn: the eight lattice values of the last cell are kept, so
/// the next point in the same cell skips the hashing.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Noise3 {
    seed: u32,
    cell: Option<(i32, i32, i32)>,
    /// Lattice values at the cell's corners, index dx + 2·dy + 4·dz.
    corner: [f32; 8],
}

impl Noise3 {
    /// A reader of the noise with this seed.
    pub(crate) fn new(seed: u32) -> Self {
        Noise3 {
            seed,
            cell: None,
            corner: [0.0; 8],
        }
    }

    /// The noise at lattice coordinates (x, y, z).
    #[inline]
    pub(crate) fn at(&mut self, x: f64, y: f64, z: f64) -> f32 {
        let (fx, fy, fz) = (floor_f64(x), floor_f64(y), floor_f64(z));
        let cell = (fx as i32, fy as i32, fz as i32);
        if self.cell != Some(cell) {
            // A step to a neighbouring cell shares a face with the last one: those lattice
            // values are taken over, the others hashed.
            let old = self.corner;
            let last = self.cell;
            let (ix, iy, iz) = cell;
            for (k, c) in self.corner.iter_mut().enumerate() {
                let (x, y, z) = (
                    ix + (k & 1) as i32,
                    iy + ((k >> 1) & 1) as i32,
                    iz + (k >> 2) as i32,
                );
                *c = match last {
                    Some((lx, ly, lz)) => {
                        let (rx, ry, rz) =
                            (x.wrapping_sub(lx), y.wrapping_sub(ly), z.wrapping_sub(lz));
                        if (rx | ry | rz) as u32 <= 1 {
                            old[(rx + 2 * ry + 4 * rz) as usize]
                        } else {
                            hash_value(hash3(x, y, z, self.seed))
                        }
                    }
                    None => hash_value(hash3(x, y, z, self.seed)),
                };
            }
            self.cell = Some(cell);
        }
        let (tx, ty, tz) = (
            smooth((x - fx) as f32),
            smooth((y - fy) as f32),
            smooth((z - fz) as f32),
        );
        let v = &self.corner;
        let lerp = |a: f32, b: f32, t: f32| a + (b - a) * t;
        let x00 = lerp(v[0], v[1], tx);
        let x10 = lerp(v[2], v[3], tx);
        let x01 = lerp(v[4], v[5], tx);
        let x11 = lerp(v[6], v[7], tx);
        lerp(lerp(x00, x10, ty), lerp(x01, x11, ty), tz)
    }
}

/// Value noise in 2D, in about [−1, 1], read at many nearby points in turn, keeping the last
/// cell's four lattice values.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Noise2 {
    seed: u32,
    cell: Option<(i32, i32)>,
    /// Lattice values at the cell's corners, index dx + 2·dy.
    corner: [f32; 4],
}

impl Noise2 {
    /// A reader of the noise with this seed.
    pub(crate) fn new(seed: u32) -> Self {
        Noise2 {
            seed,
            cell: None,
            corner: [0.0; 4],
        }
    }

    /// The noise at lattice coordinates (x, y).
    #[inline]
    pub(crate) fn at(&mut self, x: f64, y: f64) -> f32 {
        let (fx, fy) = (floor_f64(x), floor_f64(y));
        let cell = (fx as i32, fy as i32);
        if self.cell != Some(cell) {
            // A step to a neighbouring cell shares an edge with the last one: those lattice
            // values are taken over, the others hashed.
            let old = self.corner;
            let last = self.cell;
            let (ix, iy) = cell;
            for (k, c) in self.corner.iter_mut().enumerate() {
                let (x, y) = (ix + (k & 1) as i32, iy + (k >> 1) as i32);
                *c = match last {
                    Some((lx, ly)) => {
                        let (rx, ry) = (x.wrapping_sub(lx), y.wrapping_sub(ly));
                        if (rx | ry) as u32 <= 1 {
                            old[(rx + 2 * ry) as usize]
                        } else {
                            hash_value(hash3(x, y, 0, self.seed))
                        }
                    }
                    None => hash_value(hash3(x, y, 0, self.seed)),
                };
            }
            self.cell = Some(cell);
        }
        let (tx, ty) = (smooth((x - fx) as f32), smooth((y - fy) as f32));
        let v = &self.corner;
        let a = v[0] + (v[1] - v[0]) * tx;
        let b = v[2] + (v[3] - v[2]) * tx;
        a + (b - a) * ty
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn fast_log_and_exp_match_libm() {
        let mut x = 1e-12f32;
        while x < 1e12 {
            let want = libm::log2(x as f64) as f32;
            assert!((log2_fast(x) - want).abs() < 2e-5, "{x}");
            x *= 1.37;
        }
        let mut y = -100.0f32;
        while y < 100.0 {
            let want = libm::exp2(y as f64);
            let got = exp2_fast(y) as f64;
            assert!(((got - want) / want).abs() < 1e-6, "{y}");
            y += 0.173;
        }
    }

    #[test]
    fn normal_cdf_table() {
        let cdf = NormalCdf::new();
        assert!((cdf.phi(0.0) - 0.5).abs() < 1e-6);
        assert!((cdf.phi(1.0) - 0.841_344_7).abs() < 2e-6);
        assert!((cdf.phi(-1.959_964) - 0.025).abs() < 2e-6);
        assert_eq!(cdf.phi(7.0), 1.0);
        assert_eq!(cdf.phi(-7.0), 0.0);
        assert_eq!(cdf.phi(f32::NAN), 0.0);
    }
}

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
    let n = (x + 0.5).floor();
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

/// Value noise in 3D: hashed lattice values with smooth interpolation; in about [−1, 1].
pub(crate) fn value_noise3(x: f64, y: f64, z: f64, seed: u32) -> f32 {
    let (fx, fy, fz) = (libm::floor(x), libm::floor(y), libm::floor(z));
    let (ix, iy, iz) = (fx as i32, fy as i32, fz as i32);
    let (tx, ty, tz) = (
        smooth((x - fx) as f32),
        smooth((y - fy) as f32),
        smooth((z - fz) as f32),
    );
    let v = |dx: i32, dy: i32, dz: i32| hash_value(hash3(ix + dx, iy + dy, iz + dz, seed));
    let lerp = |a: f32, b: f32, t: f32| a + (b - a) * t;
    let x00 = lerp(v(0, 0, 0), v(1, 0, 0), tx);
    let x10 = lerp(v(0, 1, 0), v(1, 1, 0), tx);
    let x01 = lerp(v(0, 0, 1), v(1, 0, 1), tx);
    let x11 = lerp(v(0, 1, 1), v(1, 1, 1), tx);
    lerp(lerp(x00, x10, ty), lerp(x01, x11, ty), tz)
}

/// Value noise in 2D; in about [−1, 1].
pub(crate) fn value_noise2(x: f64, y: f64, seed: u32) -> f32 {
    let (fx, fy) = (libm::floor(x), libm::floor(y));
    let (ix, iy) = (fx as i32, fy as i32);
    let (tx, ty) = (smooth((x - fx) as f32), smooth((y - fy) as f32));
    let v = |dx: i32, dy: i32| hash_value(hash3(ix + dx, iy + dy, 0, seed));
    let a = v(0, 0) + (v(1, 0) - v(0, 0)) * tx;
    let b = v(0, 1) + (v(1, 1) - v(0, 1)) * tx;
    a + (b - a) * ty
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

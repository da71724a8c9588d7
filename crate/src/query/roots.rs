//! One-dimensional root finding for the interval queries: exact linear and quadratic roots,
//! and certified subdivision for a Lipschitz function.

/// Push the root of a·s + b = 0 if it lies strictly inside (lo, hi).
pub(crate) fn push_linear_root(a: f64, b: f64, lo: f64, hi: f64, out: &mut Vec<f64>) {
    if a != 0.0 {
        let s = -b / a;
        if s > lo && s < hi {
            out.push(s);
        }
    }
}

/// Push the real roots of a·s² + b·s + c = 0 lying strictly inside (lo, hi), with the
/// cancellation-free form of the quadratic formula; degenerate leading terms fall back to
/// the linear case.
pub(crate) fn push_quadratic_roots(a: f64, b: f64, c: f64, lo: f64, hi: f64, out: &mut Vec<f64>) {
    let scale = a.abs().max(b.abs()).max(c.abs());
    if scale == 0.0 {
        return;
    }
    if a.abs() <= 1e-14 * scale {
        push_linear_root(b, c, lo, hi, out);
        return;
    }
    let disc = b * b - 4.0 * a * c;
    if disc < 0.0 {
        // A double root lost to rounding still marks a place where the sign may touch zero.
        if disc > -1e-12 * b * b {
            push_linear_root(2.0 * a, b, lo, hi, out);
        }
        return;
    }
    let q = -0.5 * (b + b.signum() * disc.sqrt());
    let (r1, r2) = if q != 0.0 { (q / a, c / q) } else { (0.0, 0.0) };
    for r in [r1, r2] {
        if r > lo && r < hi {
            out.push(r);
        }
    }
}

/// Certified root isolation of `f` on [lo, hi] given a Lipschitz constant `lip` (|f′| ≤ lip)
/// and optional global bounds `f ≥ lower(a, b)` / `f ≤ upper(a, b)` on a sub-interval.
///
/// Every sign change of `f` wider than `min_width` is found and refined by bisection to
/// ~1e-13 relative; a sub-interval is discarded once the bound proves `f` keeps one sign on it.
/// Touching roots where `f` stays on one side within `lip·min_width` are not reported.
pub(crate) fn push_lipschitz_roots<F, B>(
    f: F,
    bounds: B,
    lip: f64,
    lo: f64,
    hi: f64,
    min_width: f64,
    out: &mut Vec<f64>,
) where
    F: Fn(f64) -> f64,
    B: Fn(f64, f64, f64, f64) -> (f64, f64),
{
    if hi.is_nan() || lo.is_nan() || hi <= lo {
        return;
    }
    let mut stack: Vec<(f64, f64, f64, f64)> = Vec::with_capacity(64);
    stack.push((lo, f(lo), hi, f(hi)));
    let mut budget = 20_000usize; // a hard cap on work; far above anything a real scene needs
    while let Some((a, fa, b, fb)) = stack.pop() {
        if budget == 0 {
            break;
        }
        budget -= 1;
        let h = b - a;
        let (lower, upper) = bounds(a, fa, b, fb);
        let same_sign = (fa >= 0.0) == (fb >= 0.0);
        if same_sign {
            // Lipschitz lower envelope: f ≥ (fa + fb − lip·h)/2 on [a, b].
            let lip_min = 0.5 * (fa + fb - lip * h);
            let lip_max = 0.5 * (fa + fb + lip * h);
            if fa >= 0.0 && (lip_min > 0.0 || lower > 0.0) {
                continue;
            }
            if fa < 0.0 && (lip_max < 0.0 || upper < 0.0) {
                continue;
            }
            if h <= min_width {
                continue;
            }
        } else if h <= min_width {
            out.push(bisect(&f, a, fa, b));
            continue;
        }
        let m = 0.5 * (a + b);
        let fm = f(m);
        stack.push((m, fm, b, fb));
        stack.push((a, fa, m, fm));
    }
}

/// Bisection on a bracket [a, b] with a sign change, to ~1e-13 relative.
fn bisect<F: Fn(f64) -> f64>(f: &F, mut a: f64, fa: f64, mut b: f64) -> f64 {
    let pos_a = fa >= 0.0;
    for _ in 0..80 {
        let m = 0.5 * (a + b);
        if m <= a || m >= b || (b - a) <= 1e-13 * (1.0 + a.abs().max(b.abs())) {
            break;
        }
        if (f(m) >= 0.0) == pos_a {
            a = m;
        } else {
            b = m;
        }
    }
    0.5 * (a + b)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn quadratic_roots_without_cancellation() {
        // (s − 1e-8)(s − 1e8): naive formula loses the small root.
        let mut out = vec![];
        push_quadratic_roots(1.0, -(1e8 + 1e-8), 1.0, 0.0, 1e9, &mut out);
        out.sort_by(f64::total_cmp);
        assert!((out[0] - 1e-8).abs() < 1e-20);
        assert!((out[1] - 1e8).abs() < 1e-4);
    }

    #[test]
    fn lipschitz_finds_close_pair_of_roots() {
        // f = 1e-3 − (s − 0.5)²: roots 0.5 ± 0.0316; |f′| ≤ 1 on [0, 1].
        let f = |s: f64| 1e-3 - (s - 0.5) * (s - 0.5);
        let mut out = vec![];
        push_lipschitz_roots(
            f,
            |_, _, _, _| (f64::NEG_INFINITY, f64::INFINITY),
            1.0,
            0.0,
            1.0,
            1e-9,
            &mut out,
        );
        out.sort_by(f64::total_cmp);
        assert_eq!(out.len(), 2);
        assert!((out[0] - (0.5 - 1e-3f64.sqrt())).abs() < 1e-10);
        assert!((out[1] - (0.5 + 1e-3f64.sqrt())).abs() < 1e-10);
    }
}

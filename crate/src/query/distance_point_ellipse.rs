//! Signed distance from a point to an ellipse (2D) or an ellipsoid (3D), in the shape's own
//! axes, after D. Eberly, "Distance from a Point to an Ellipse, an Ellipsoid, or a
//! Hyperellipsoid" (Geometric Tools, 2013): reduce to the first octant, then find the root of
//! a monotone function of the Lagrange parameter by bisection.

/// Signed distance from `p` to the ellipse x²/a² + y²/b² = 1 (semi-axes `[a, b]`), mm,
/// negative inside.
///
/// ```
/// let d = slicewise::signed_distance_ellipse([5.0, 0.0], [3.0, 2.0]);
/// assert!((d - 2.0).abs() < 1e-12);
/// ```
pub fn signed_distance_ellipse(p: [f64; 2], semi: [f64; 2]) -> f64 {
    let (y0, y1) = (p[0].abs(), p[1].abs());
    // Order so that e0 ≥ e1.
    let (e0, e1, y0, y1) = if semi[0] >= semi[1] {
        (semi[0], semi[1], y0, y1)
    } else {
        (semi[1], semi[0], y1, y0)
    };
    let d = distance_ellipse_first_quadrant(e0, e1, y0, y1);
    let inside = (y0 / e0).powi(2) + (y1 / e1).powi(2) < 1.0;
    if inside {
        -d
    } else {
        d
    }
}

/// Signed distance from `p` to the ellipsoid with semi-axes `semi` (axis-aligned), mm,
/// negative inside.
pub fn signed_distance_ellipsoid(p: [f64; 3], semi: [f64; 3]) -> f64 {
    let mut pairs = [
        (semi[0], p[0].abs()),
        (semi[1], p[1].abs()),
        (semi[2], p[2].abs()),
    ];
    pairs.sort_by(|a, b| b.0.total_cmp(&a.0));
    let [(e0, y0), (e1, y1), (e2, y2)] = pairs;
    let d = distance_ellipsoid_first_octant([e0, e1, e2], [y0, y1, y2]);
    let inside = (y0 / e0).powi(2) + (y1 / e1).powi(2) + (y2 / e2).powi(2) < 1.0;
    if inside {
        -d
    } else {
        d
    }
}

fn bisect_root<F: Fn(f64) -> f64>(g: F, mut s0: f64, mut s1: f64) -> f64 {
    let mut s = 0.5 * (s0 + s1);
    for _ in 0..200 {
        s = 0.5 * (s0 + s1);
        if s == s0 || s == s1 {
            break;
        }
        let v = g(s);
        if v > 0.0 {
            s0 = s;
        } else if v < 0.0 {
            s1 = s;
        } else {
            break;
        }
    }
    s
}

/// e0 ≥ e1 > 0, y0, y1 ≥ 0.
fn distance_ellipse_first_quadrant(e0: f64, e1: f64, y0: f64, y1: f64) -> f64 {
    if y1 > 0.0 {
        if y0 > 0.0 {
            let (z0, z1) = (y0 / e0, y1 / e1);
            let g = z0 * z0 + z1 * z1 - 1.0;
            if g == 0.0 {
                return 0.0;
            }
            let r0 = (e0 / e1).powi(2);
            let n0 = r0 * z0;
            let s0 = z1 - 1.0;
            let s1 = if g < 0.0 { 0.0 } else { n0.hypot(z1) - 1.0 };
            let sbar = bisect_root(
                |s| (n0 / (s + r0)).powi(2) + (z1 / (s + 1.0)).powi(2) - 1.0,
                s0,
                s1,
            );
            let x0 = r0 * y0 / (sbar + r0);
            let x1 = y1 / (sbar + 1.0);
            (x0 - y0).hypot(x1 - y1)
        } else {
            (y1 - e1).abs()
        }
    } else {
        let numer0 = e0 * y0;
        let denom0 = e0 * e0 - e1 * e1;
        if numer0 < denom0 {
            let xde0 = numer0 / denom0;
            let x0 = e0 * xde0;
            let x1 = e1 * (1.0 - xde0 * xde0).max(0.0).sqrt();
            (x0 - y0).hypot(x1)
        } else {
            (y0 - e0).abs()
        }
    }
}

/// e0 ≥ e1 ≥ e2 > 0, all y ≥ 0.
fn distance_ellipsoid_first_octant(e: [f64; 3], y: [f64; 3]) -> f64 {
    let [e0, e1, e2] = e;
    let [y0, y1, y2] = y;
    if y2 > 0.0 {
        if y1 > 0.0 {
            if y0 > 0.0 {
                let (z0, z1, z2) = (y0 / e0, y1 / e1, y2 / e2);
                let g = z0 * z0 + z1 * z1 + z2 * z2 - 1.0;
                if g == 0.0 {
                    return 0.0;
                }
                let r0 = (e0 / e2).powi(2);
                let r1 = (e1 / e2).powi(2);
                let (n0, n1) = (r0 * z0, r1 * z1);
                let s0 = z2 - 1.0;
                let s1 = if g < 0.0 {
                    0.0
                } else {
                    (n0 * n0 + n1 * n1 + z2 * z2).sqrt() - 1.0
                };
                let sbar = bisect_root(
                    |s| {
                        (n0 / (s + r0)).powi(2) + (n1 / (s + r1)).powi(2) + (z2 / (s + 1.0)).powi(2)
                            - 1.0
                    },
                    s0,
                    s1,
                );
                let x = [
                    r0 * y0 / (sbar + r0),
                    r1 * y1 / (sbar + r1),
                    y2 / (sbar + 1.0),
                ];
                ((x[0] - y0).powi(2) + (x[1] - y1).powi(2) + (x[2] - y2).powi(2)).sqrt()
            } else {
                distance_ellipse_first_quadrant(e1, e2, y1, y2)
            }
        } else if y0 > 0.0 {
            distance_ellipse_first_quadrant(e0, e2, y0, y2)
        } else {
            (y2 - e2).abs()
        }
    } else {
        let denom0 = e0 * e0 - e2 * e2;
        let denom1 = e1 * e1 - e2 * e2;
        let numer0 = e0 * y0;
        let numer1 = e1 * y1;
        if numer0 < denom0 && numer1 < denom1 {
            let xde0 = numer0 / denom0;
            let xde1 = numer1 / denom1;
            let discr = 1.0 - xde0 * xde0 - xde1 * xde1;
            if discr > 0.0 {
                let x = [e0 * xde0, e1 * xde1, e2 * discr.sqrt()];
                return ((x[0] - y0).powi(2) + (x[1] - y1).powi(2) + x[2] * x[2]).sqrt();
            }
        }
        distance_ellipse_first_quadrant(e0, e1, y0, y1)
    }
}

//! Shared helpers for the integration tests: seeded random scenes and an independent,
//! formula-by-formula re-implementation of the slab predicate (used as a brute-force oracle).

#![allow(dead_code, unreachable_pub, missing_docs)]

use rand::{RngExt, SeedableRng};
use rand_chacha::ChaCha8Rng;
use slicewise::*;

pub fn rng(seed: u64) -> ChaCha8Rng {
    ChaCha8Rng::seed_from_u64(seed)
}

pub fn uniform(r: &mut ChaCha8Rng, lo: f64, hi: f64) -> f64 {
    lo + (hi - lo) * r.random::<f64>()
}

/// A random probe: linear or curved, uniform or focused, anywhere in a plausible pose range.
pub fn random_probe(r: &mut ChaCha8Rng, allow_curved: bool) -> Probe {
    let curved = allow_curved && r.random::<f64>() < 0.3;
    let footprint = if curved {
        let radius_mm = uniform(r, 20.0, 80.0);
        Footprint::Curved {
            width_mm: radius_mm * uniform(r, 0.4, 1.6),
            radius_mm,
        }
    } else {
        Footprint::Linear {
            width_mm: uniform(r, 20.0, 60.0),
        }
    };
    let elevation = if r.random::<f64>() < 0.5 {
        ElevationProfile::Uniform {
            thickness_mm: uniform(r, 0.2, 4.0),
        }
    } else {
        ElevationProfile::Focused {
            aperture_mm: uniform(r, 2.0, 12.0),
            focus_mm: uniform(r, 5.0, 60.0),
        }
    };
    Probe {
        footprint,
        frequency_mhz: uniform(r, 3.0, 18.0),
        depth_mm: uniform(r, 15.0, 90.0),
        elevation,
        pose: Pose {
            x_mm: uniform(r, -10.0, 10.0),
            y_mm: uniform(r, -10.0, 10.0),
            rotate_deg: uniform(r, -180.0, 180.0),
            tilt_deg: uniform(r, -35.0, 35.0),
            rock_deg: uniform(r, -25.0, 25.0),
        },
    }
}

/// A random needle entering near the probe, aimed roughly at the slab.
pub fn random_needle(r: &mut ChaCha8Rng) -> Needle {
    let gauges = [18u8, 19, 20, 21, 22, 23, 24, 25, 26, 27];
    let length_mm = uniform(r, 30.0, 120.0);
    Needle {
        size: NeedleSize::Gauge {
            gauge: gauges[r.random_range(0..gauges.len())],
        },
        length_mm,
        bevel_deg: uniform(r, 10.0, 45.0),
        bevel_roll_deg: uniform(r, -180.0, 180.0),
        entry: Entry {
            x_mm: uniform(r, -40.0, 40.0),
            y_mm: uniform(r, -30.0, 30.0),
        },
        azimuth_deg: uniform(r, -180.0, 180.0),
        angle_deg: uniform(r, 5.0, 85.0),
        inserted_mm: uniform(r, 0.0, length_mm),
    }
}

/// A random scene whose needle is aimed at a point near the image plane, so that many
/// scenes actually cross the slab (a purely random needle mostly misses it).
pub fn random_scene(r: &mut ChaCha8Rng, allow_curved: bool) -> Scene {
    let probe = random_probe(r, allow_curved);
    let mut needle = random_needle(r);
    if r.random::<f64>() < 0.8 {
        // Aim at a point in the image plane (± a few mm) at a random depth.
        let frame = ProbeFrame::from_pose(&probe.pose);
        let target = frame.to_world(
            uniform(r, -15.0, 15.0),
            uniform(r, 3.0, 40.0),
            uniform(r, -2.0, 2.0),
        );
        if target.z > 1.0 {
            let entry = needle.entry_point();
            let d = target - entry;
            let horiz = d.x.hypot(d.y);
            needle.azimuth_deg = d.y.atan2(d.x).to_degrees();
            needle.angle_deg = d.z.atan2(horiz).to_degrees().clamp(1.0, 90.0);
            let reach = d.norm();
            needle.length_mm = (reach * 2.0).clamp(10.0, 250.0);
            needle.inserted_mm = (reach * uniform(r, 0.5, 1.5)).min(needle.length_mm);
        }
    }
    Scene {
        title: String::new(),
        notes: String::new(),
        probe,
        needle,
        tissue: TissueLayers::default(),
        structures: Vec::new(),
        display: DisplaySettings::default(),
        rehearsal: RehearsalSettings::default(),
    }
}

// ---- Independent predicate, written from DESIGN.md's formulas without the crate's helpers ----

/// Image axes (a′, b″, n′) from the pose, rebuilt with rotation matrices.
pub fn axes(pose: &Pose) -> ([f64; 3], [f64; 3], [f64; 3]) {
    let (phi, tau, rho) = (
        pose.rotate_deg.to_radians(),
        pose.tilt_deg.to_radians(),
        pose.rock_deg.to_radians(),
    );
    // Rodrigues rotation of v about unit axis k by angle t.
    fn rot(v: [f64; 3], k: [f64; 3], t: f64) -> [f64; 3] {
        let (s, c) = t.sin_cos();
        let kxv = [
            k[1] * v[2] - k[2] * v[1],
            k[2] * v[0] - k[0] * v[2],
            k[0] * v[1] - k[1] * v[0],
        ];
        let kdv = k[0] * v[0] + k[1] * v[1] + k[2] * v[2];
        [0, 1, 2].map(|i| v[i] * c + kxv[i] * s + k[i] * kdv * (1.0 - c))
    }
    let z = [0.0, 0.0, 1.0];
    let a = rot([1.0, 0.0, 0.0], z, phi);
    let n = rot([0.0, 1.0, 0.0], z, phi);
    let b = z;
    // Tilt about a: positive swings b toward +n (right-hand rotation about −a... check sign).
    let b1 = rot(b, a, -tau);
    let n1 = rot(n, a, -tau);
    // Rock about n1: positive swings b1 toward +a.
    let b2 = rot(b1, n1, rho);
    let a1 = rot(a, n1, rho);
    (a1, b2, n1)
}

pub fn dot(a: [f64; 3], b: [f64; 3]) -> f64 {
    a[0] * b[0] + a[1] * b[1] + a[2] * b[2]
}

/// Full slab thickness at range z from first principles (λ = c/f, 0.886 λF/H, Gaussian growth,
/// cap at H).
pub fn thickness(profile: &ElevationProfile, f_mhz: f64, z: f64) -> f64 {
    match *profile {
        ElevationProfile::Uniform { thickness_mm } => thickness_mm,
        ElevationProfile::Focused {
            aperture_mm,
            focus_mm,
        } => {
            let lambda = 1.540 / f_mhz;
            let t0 = 0.886 * lambda * focus_mm / aperture_mm;
            let w0 = t0 / (2.0 * (2.0f64.ln())).sqrt();
            let zr = std::f64::consts::PI * w0 * w0 / lambda;
            let t = t0 * (1.0 + ((z - focus_mm) / zr).powi(2)).sqrt();
            t.min(aperture_mm.max(t0))
        }
    }
}

/// Whether the needle cross-section at arc length s touches the slab in the field of view.
pub fn oracle_inside(scene: &Scene, s: f64, tol: f64) -> bool {
    let (a, b, n) = axes(&scene.probe.pose);
    let nd = &scene.needle;
    let (al, ps) = (nd.angle_deg.to_radians(), nd.azimuth_deg.to_radians());
    let d = [al.cos() * ps.cos(), al.cos() * ps.sin(), al.sin()];
    let p = [
        nd.entry.x_mm + d[0] * s - scene.probe.pose.x_mm,
        nd.entry.y_mm + d[1] * s - scene.probe.pose.y_mm,
        d[2] * s,
    ];
    let (u, v, e) = (dot(p, a), dot(p, b), dot(p, n));
    let dn = dot(d, n);
    let allowance = nd.outer_diameter_mm() / 2.0 * (1.0 - dn * dn).max(0.0).sqrt();
    let depth = scene.probe.depth_mm;
    let (in_view, range) = match scene.probe.footprint {
        Footprint::Linear { width_mm } => (
            u.abs() <= width_mm / 2.0 + tol && v >= -tol && v <= depth + tol,
            v,
        ),
        Footprint::Curved {
            width_mm,
            radius_mm,
        } => {
            let y = v + radius_mm;
            let rho = u.hypot(y);
            let theta = u.atan2(y);
            (
                rho >= radius_mm - tol
                    && rho <= radius_mm + depth + tol
                    && theta.abs() <= width_mm / (2.0 * radius_mm) + tol / rho,
                rho - radius_mm,
            )
        }
    };
    in_view
        && e.abs()
            <= thickness(&scene.probe.elevation, scene.probe.frequency_mhz, range) / 2.0
                + allowance
                + tol
}

/// Whether sample s is farther than `margin` from every endpoint of `intervals`.
pub fn away_from_boundaries(intervals: &[[f64; 2]], s: f64, margin: f64) -> bool {
    intervals
        .iter()
        .all(|iv| (s - iv[0]).abs() > margin && (s - iv[1]).abs() > margin)
}

pub fn in_intervals(intervals: &[[f64; 2]], s: f64) -> bool {
    intervals.iter().any(|iv| s >= iv[0] && s <= iv[1])
}

/// Run the `slicewise` binary from the repository root: (exit code, stdout, stderr).
pub fn run_cli(args: &[&str]) -> (i32, String, String) {
    let out = std::process::Command::new(env!("CARGO_BIN_EXE_slicewise"))
        .args(args)
        .current_dir(concat!(env!("CARGO_MANIFEST_DIR"), "/.."))
        .output()
        .unwrap();
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stdout).into_owned(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

pub fn demo_scenes() -> Vec<(String, Scene)> {
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../scenes-demo");
    let mut out = Vec::new();
    let mut entries: Vec<_> = std::fs::read_dir(&dir)
        .expect("scenes-demo exists")
        .flatten()
        .map(|e| e.path())
        .collect();
    entries.sort();
    for p in entries {
        if p.to_string_lossy().ends_with(".scene.json") {
            let text = std::fs::read_to_string(&p).unwrap();
            let scene = load_scene_str(&text).unwrap_or_else(|e| panic!("{}: {e}", p.display()));
            out.push((p.file_name().unwrap().to_string_lossy().into_owned(), scene));
        }
    }
    out
}

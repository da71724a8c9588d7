//! The slab queries against references outside the crate:
//! - parry3d-f64 (dimforge's general-purpose collision library, crates.io) ray casts against a
//!   cuboid (uniform slab) and a triangulated hourglass (focused slab), and against cylinders
//!   for structure cuts;
//! - dense brute-force sampling of an independent re-implementation of DESIGN.md's predicate
//!   (tests/common), over 10,000 seeded random scenes with both slab models and both faces.

mod common;

use common::*;
use parry3d_f64::math::{Pose3, Rot3, Vec3};
use parry3d_f64::query::{Ray, RayCast};
use parry3d_f64::shape::{Cuboid, Cylinder, TriMesh};
use slicewise::*;

/// Brute force: 10,000 random scenes, every sample of the needle (0.02 mm apart or finer)
/// must agree with the reported intervals unless it lies within 1e-6 mm of a reported end;
/// each reported end must be a real boundary of the independent predicate.
#[test]
fn intervals_match_brute_force_sampling_on_10000_scenes() {
    let mut r = rng(0x51ab_0001);
    let mut nonempty = 0;
    let mut multi = 0;
    for case in 0..10_000 {
        let scene = random_scene(&mut r, true);
        let slab = Slab::of_probe(&scene.probe);
        let iv = needle_section(&slab, &scene.needle).in_slab_mm;
        let len = scene.needle.inserted_mm;
        if !iv.is_empty() {
            nonempty += 1;
        }
        if iv.len() > 1 {
            multi += 1;
        }
        let n = ((len / 0.02).ceil() as usize).clamp(200, 20_000);
        for k in 0..=n {
            let s = len * k as f64 / n as f64;
            if !away_from_boundaries(&iv, s, 1e-6) {
                continue;
            }
            let truth = oracle_inside(&scene, s, 0.0);
            assert_eq!(
                in_intervals(&iv, s),
                truth,
                "case {case}: s = {s} of {len}, intervals {iv:?}\n{scene:?}"
            );
        }
        for ends in &iv {
            for (i, &b) in ends.iter().enumerate() {
                assert!(
                    oracle_inside(&scene, b, 1e-7),
                    "case {case}: reported end {b} is outside"
                );
                // The outward side of an end that is not the domain end must be outside.
                let out = if i == 0 { b - 1e-5 } else { b + 1e-5 };
                if out > 0.0 && out < len && ends[0] < ends[1] {
                    assert!(
                        !oracle_inside(&scene, out, -1e-9),
                        "case {case}: just beyond end {b} is still inside\n{scene:?}"
                    );
                }
            }
        }
    }
    // The generator must actually exercise the interesting cases.
    assert!(nonempty > 3000, "only {nonempty} scenes crossed the slab");
    assert!(
        multi > 5,
        "only {multi} scenes had two or more in-slab stretches"
    );
}

fn v3(x: [f64; 3]) -> Vec3 {
    Vec3::new(x[0], x[1], x[2])
}

/// The needle axis in image coordinates (u, v, e) using the crate's frame.
fn image_ray(scene: &Scene) -> (Vec3, Vec3, f64) {
    let slab = Slab::of_probe(&scene.probe);
    let seg = needle_segment(&slab, &scene.needle);
    (
        v3([seg.start.u, seg.start.v, seg.start.e]),
        v3([seg.dir.u, seg.dir.v, seg.dir.e]),
        seg.allowance_mm,
    )
}

/// All crossings of the segment [0, len] with a closed shape's surface, by repeated ray casts.
fn crossings<S: RayCast>(shape: &S, origin: Vec3, dir: Vec3, len: f64) -> Vec<f64> {
    let mut out = Vec::new();
    let mut t = 0.0;
    while let Some(toi) = shape.cast_local_ray(&Ray::new(origin + dir * t, dir), len - t, false) {
        let hit = t + toi;
        if hit > len {
            break;
        }
        out.push(hit);
        t = hit + 1e-9;
    }
    out
}

fn inside_by_parity<S: RayCast>(shape: &S, p: Vec3) -> bool {
    // Count crossings along an oblique ray to far away.
    let dir = Vec3::new(0.577_215, 0.267_94, 0.771_23).normalize();
    crossings(shape, p, dir, 1e4).len() % 2 == 1
}

fn intervals_from_crossings(mut inside: bool, xs: &[f64], len: f64) -> Vec<[f64; 2]> {
    let mut out = Vec::new();
    let mut start = 0.0;
    for &x in xs {
        if inside {
            out.push([start, x]);
        } else {
            start = x;
        }
        inside = !inside;
    }
    if inside {
        out.push([start, len]);
    }
    out.retain(|iv| iv[1] - iv[0] > 1e-9);
    out
}

/// Uniform slab on a flat face: the dilated slab is the box |u| ≤ W/2, 0 ≤ v ≤ D,
/// |e| ≤ T/2 + c — a parry3d `Cuboid`. 10,000 seeded scenes, ends agree to 1e-7 mm.
#[test]
fn uniform_intervals_match_parry_cuboid_ray_casts() {
    let mut r = rng(0x51ab_0002);
    let mut compared = 0;
    for case in 0..10_000 {
        let mut scene = random_scene(&mut r, false);
        scene.probe.elevation = ElevationProfile::Uniform {
            thickness_mm: uniform(&mut r, 0.2, 4.0),
        };
        let Footprint::Linear { width_mm } = scene.probe.footprint else {
            unreachable!()
        };
        let (o, d, c) = image_ray(&scene);
        let ElevationProfile::Uniform { thickness_mm } = scene.probe.elevation else {
            unreachable!()
        };
        let half = Vec3::new(
            width_mm / 2.0,
            scene.probe.depth_mm / 2.0,
            thickness_mm / 2.0 + c,
        );
        let centre = Vec3::new(0.0, scene.probe.depth_mm / 2.0, 0.0);
        let cuboid = Cuboid::new(half);
        let len = scene.needle.inserted_mm;
        if len <= 0.0 {
            continue;
        }
        // Convex: entry by a solid cast forward, exit by a solid cast backward from the end.
        let fwd = cuboid.cast_local_ray(&Ray::new(o - centre, d), len, true);
        let expected: Vec<[f64; 2]> = match fwd {
            None => vec![],
            Some(t0) => {
                let back = cuboid
                    .cast_local_ray(&Ray::new(o + d * len - centre, -d), len, true)
                    .unwrap_or(0.0);
                vec![[t0, len - back]]
            }
        };
        let ours = needle_section(&Slab::of_probe(&scene.probe), &scene.needle).in_slab_mm;
        let ours: Vec<_> = ours.into_iter().filter(|iv| iv[1] - iv[0] > 1e-9).collect();
        let expected: Vec<_> = expected
            .into_iter()
            .filter(|iv| iv[1] - iv[0] > 1e-9)
            .collect();
        assert_eq!(
            ours.len(),
            expected.len(),
            "case {case}: ours {ours:?} parry {expected:?}"
        );
        for (a, b) in ours.iter().zip(&expected) {
            assert!(
                (a[0] - b[0]).abs() < 1e-7 && (a[1] - b[1]).abs() < 1e-7,
                "case {case}: ours {a:?} parry {b:?}"
            );
        }
        compared += usize::from(!ours.is_empty());
    }
    assert!(compared > 3000, "only {compared} non-empty comparisons");
}

/// The focused hourglass on a flat face as a closed triangle mesh (rows every 0.05 mm in
/// depth), cast against with parry3d. Chord error of the mesh is below 1e-4 mm, so ends agree
/// to 1e-4 mm divided by how steeply the needle crosses the surface.
#[test]
fn focused_intervals_match_parry_trimesh_ray_casts() {
    let mut r = rng(0x51ab_0003);
    let mut compared = 0;
    for case in 0..1_500 {
        let mut scene = random_scene(&mut r, false);
        scene.probe.elevation = ElevationProfile::Focused {
            aperture_mm: uniform(&mut r, 2.0, 10.0),
            focus_mm: uniform(&mut r, 5.0, 40.0),
        };
        scene.probe.depth_mm = uniform(&mut r, 15.0, 50.0);
        let Footprint::Linear { width_mm } = scene.probe.footprint else {
            unreachable!()
        };
        let (o, d, c) = image_ray(&scene);
        let len = scene.needle.inserted_mm;
        if len <= 0.0 {
            continue;
        }
        let depth = scene.probe.depth_mm;
        let rows = (depth / 0.05).ceil() as usize;
        let mut verts = Vec::new();
        for i in 0..=rows {
            let v = depth * i as f64 / rows as f64;
            let h = thickness(&scene.probe.elevation, scene.probe.frequency_mhz, v) / 2.0 + c;
            let hw = width_mm / 2.0;
            verts.extend([
                Vec3::new(-hw, v, -h),
                Vec3::new(hw, v, -h),
                Vec3::new(hw, v, h),
                Vec3::new(-hw, v, h),
            ]);
        }
        let mut idx: Vec<[u32; 3]> = Vec::new();
        for i in 0..rows as u32 {
            let (a, b) = (4 * i, 4 * (i + 1));
            for k in 0..4u32 {
                let (k0, k1) = (k, (k + 1) % 4);
                idx.push([a + k0, b + k0, b + k1]);
                idx.push([a + k0, b + k1, a + k1]);
            }
        }
        let last = 4 * rows as u32;
        idx.extend([
            [0, 2, 1],
            [0, 3, 2],
            [last, last + 1, last + 2],
            [last, last + 2, last + 3],
        ]);
        let mesh = TriMesh::new(verts, idx).expect("valid mesh");
        let xs = crossings(&mesh, o, d, len);
        let expected = intervals_from_crossings(inside_by_parity(&mesh, o), &xs, len);
        let ours: Vec<_> = needle_section(&Slab::of_probe(&scene.probe), &scene.needle)
            .in_slab_mm
            .into_iter()
            .filter(|iv| iv[1] - iv[0] > 1e-9)
            .collect();
        // Tolerance from the conditioning: the mesh is off by ≤ 1e-4 mm across e, and an end
        // moves by that over |d(|e| − h)/ds|.
        let slope = d.z.abs().max(1e-3);
        let tol = 2e-4 / slope + 1e-6;
        let mut ok = ours.len() == expected.len();
        if ok {
            for (a, b) in ours.iter().zip(&expected) {
                ok &= (a[0] - b[0]).abs() < tol && (a[1] - b[1]).abs() < tol;
            }
        }
        if !ok {
            // A stretch thinner than the mesh tolerance may appear in one and not the other.
            let tiny = |v: &Vec<[f64; 2]>| v.iter().any(|iv| iv[1] - iv[0] < 2.0 * tol);
            assert!(
                tiny(&ours) || tiny(&expected),
                "case {case}: ours {ours:?} parry {expected:?} tol {tol}"
            );
        }
        compared += usize::from(!ours.is_empty());
    }
    assert!(compared > 400, "only {compared} non-empty comparisons");
}

/// Tube cuts: rays cast in the image plane from the reported centre hit a parry3d cylinder
/// around the same axis at the reported ellipse radius in that direction. 10,000 tubes.
#[test]
fn tube_sections_match_parry_cylinder_ray_casts() {
    let mut r = rng(0x51ab_0004);
    let mut checked = 0;
    for case in 0..10_000 {
        let probe = random_probe(&mut r, true);
        let slab = Slab::of_probe(&probe);
        let frame = slab.frame;
        let radius = uniform(&mut r, 0.3, 6.0);
        // An axis through a point near the image plane, in a random direction, long enough
        // that its end caps never reach the cut.
        let through = frame.to_world(
            uniform(&mut r, -20.0, 20.0),
            uniform(&mut r, 5.0, 40.0),
            uniform(&mut r, -3.0, 3.0),
        );
        let dir = nalgebra::Vector3::new(
            uniform(&mut r, -1.0, 1.0),
            uniform(&mut r, -1.0, 1.0),
            uniform(&mut r, -1.0, 1.0),
        );
        if dir.norm() < 0.1 {
            continue;
        }
        let k = dir.normalize();
        let kn = k.dot(&frame.elevation).abs();
        if kn < BAND_SINE + 0.01 {
            continue;
        }
        let half_len = 4.0 * radius / kn + 50.0;
        let (p0, p1) = (through - k * half_len, through + k * half_len);
        let tube = Tube {
            path_mm: vec![p0.into(), p1.into()],
            radius_mm: radius,
        };
        let cuts = tube_sections(&slab, &tube);
        assert_eq!(cuts.len(), 1, "case {case}");
        let cut = cuts[0];
        assert_eq!(cut.shape, SectionShape::Ellipse);
        // parry's cylinder axis is local y: rotate y onto k.
        let rot = Rot3::from_rotation_arc(Vec3::Y, v3([k.x, k.y, k.z]));
        let pose = Pose3::from_parts(v3([through.x, through.y, through.z]), rot);
        let cyl = Cylinder::new(half_len, radius);
        let centre = frame.to_world(cut.lateral_mm, cut.depth_mm, 0.0);
        let [minor, major] = cut.semi_axes_mm;
        for j in 0..12 {
            let th = j as f64 * std::f64::consts::PI / 6.0 + 0.1;
            let (s, c) = th.sin_cos();
            let dir_img = frame.lateral * c + frame.beam * s;
            // Cast inward from far outside along the same line (parry's support-map ray cast
            // is reliable from outside a shape).
            let far = 1e3;
            let start = centre + dir_img * far;
            let ray = Ray::new(
                v3([start.x, start.y, start.z]),
                v3([-dir_img.x, -dir_img.y, -dir_img.z]),
            );
            let toi = cyl
                .cast_ray(&pose, &ray, 2.0 * far, true)
                .expect("the line through the cut's centre meets the tube");
            let hit = far - toi;
            // Ellipse radius in direction th, relative to the major axis at angle_deg.
            let phi = th - cut.angle_deg.to_radians();
            let rad = 1.0 / ((phi.cos() / major).powi(2) + (phi.sin() / minor).powi(2)).sqrt();
            assert!(
                (hit - rad).abs() < 1e-7 * (1.0 + rad),
                "case {case}: direction {j}: parry {hit} ours {rad} cut {cut:?}"
            );
        }
        checked += 1;
    }
    assert!(checked > 5000, "only {checked} tubes checked");
}

/// Fluid-pocket cuts: points on the reported ellipse lie on the ellipsoid surface, points
/// slightly inside/outside the ellipse are inside/outside the ellipsoid, and when no cut is
/// reported a dense grid over the plane finds no point inside. 5,000 ellipsoids.
#[test]
fn ellipsoid_sections_match_the_ellipsoid_equation() {
    let mut r = rng(0x51ab_0005);
    let mut cut_count = 0;
    for case in 0..5_000 {
        let probe = random_probe(&mut r, false);
        let slab = Slab::of_probe(&probe);
        let frame = slab.frame;
        let centre = frame.to_world(
            uniform(&mut r, -10.0, 10.0),
            uniform(&mut r, 5.0, 30.0),
            uniform(&mut r, -6.0, 6.0),
        );
        let ell = Ellipsoid {
            centre_mm: centre.into(),
            semi_axes_mm: [
                uniform(&mut r, 0.5, 8.0),
                uniform(&mut r, 0.5, 8.0),
                uniform(&mut r, 0.5, 8.0),
            ],
            yaw_deg: uniform(&mut r, -180.0, 180.0),
        };
        let form = |u: f64, v: f64| {
            let q = ell.to_local(&frame.to_world(u, v, 0.0));
            (q.x / ell.semi_axes_mm[0]).powi(2)
                + (q.y / ell.semi_axes_mm[1]).powi(2)
                + (q.z / ell.semi_axes_mm[2]).powi(2)
        };
        match ellipsoid_section(&slab, &ell) {
            Some(cut) => {
                cut_count += 1;
                let [minor, major] = cut.semi_axes_mm;
                let (sa, ca) = cut.angle_deg.to_radians().sin_cos();
                for j in 0..16 {
                    let t = j as f64 * std::f64::consts::PI / 8.0;
                    let (x, y) = (major * t.cos(), minor * t.sin());
                    let (u, v) = (
                        cut.lateral_mm + x * ca - y * sa,
                        cut.depth_mm + x * sa + y * ca,
                    );
                    assert!(
                        (form(u, v) - 1.0).abs() < 1e-9,
                        "case {case}: boundary point off the surface"
                    );
                    let (ui, vi) = (
                        cut.lateral_mm + 0.99 * (u - cut.lateral_mm),
                        cut.depth_mm + 0.99 * (v - cut.depth_mm),
                    );
                    assert!(form(ui, vi) < 1.0);
                }
            }
            None => {
                let q = frame.to_image(&centre);
                let reach = ell.semi_axes_mm.iter().cloned().fold(0.0, f64::max);
                for i in 0..=60 {
                    for j in 0..=60 {
                        let u = q.u - reach + 2.0 * reach * i as f64 / 60.0;
                        let v = q.v - reach + 2.0 * reach * j as f64 / 60.0;
                        assert!(
                            form(u, v) > 1.0,
                            "case {case}: plane meets the pocket but no cut was reported"
                        );
                    }
                }
            }
        }
    }
    assert!(cut_count > 1000);
}

/// Point-to-ellipse and point-to-ellipsoid distances against dense sampling of the surface.
#[test]
fn ellipse_distances_match_dense_sampling() {
    let mut r = rng(0x51ab_0006);
    for case in 0..2_000 {
        let semi = [uniform(&mut r, 0.5, 6.0), uniform(&mut r, 0.5, 6.0)];
        let p = [uniform(&mut r, -10.0, 10.0), uniform(&mut r, -10.0, 10.0)];
        let ours = signed_distance_ellipse(p, semi);
        let n = 20_000;
        let brute = (0..n)
            .map(|k| {
                let t = k as f64 * std::f64::consts::TAU / n as f64;
                (semi[0] * t.cos() - p[0]).hypot(semi[1] * t.sin() - p[1])
            })
            .fold(f64::INFINITY, f64::min);
        let inside = (p[0] / semi[0]).powi(2) + (p[1] / semi[1]).powi(2) < 1.0;
        let brute = if inside { -brute } else { brute };
        assert!(
            (ours - brute).abs() < 2e-3,
            "case {case}: ours {ours} brute {brute}"
        );
        assert!(
            ours.abs() <= brute.abs() + 1e-9,
            "case {case}: ours is not the minimum"
        );
    }
    for case in 0..300 {
        let semi = [
            uniform(&mut r, 0.5, 6.0),
            uniform(&mut r, 0.5, 6.0),
            uniform(&mut r, 0.5, 6.0),
        ];
        let p = [
            uniform(&mut r, -9.0, 9.0),
            uniform(&mut r, -9.0, 9.0),
            uniform(&mut r, -9.0, 9.0),
        ];
        let ours = signed_distance_ellipsoid(p, semi);
        let n = 500;
        let mut brute = f64::INFINITY;
        for i in 0..=n {
            let th = std::f64::consts::PI * i as f64 / n as f64;
            for j in 0..(2 * n) {
                let ph = std::f64::consts::PI * j as f64 / n as f64;
                let q = [
                    semi[0] * th.sin() * ph.cos(),
                    semi[1] * th.sin() * ph.sin(),
                    semi[2] * th.cos(),
                ];
                brute = brute.min(
                    ((q[0] - p[0]).powi(2) + (q[1] - p[1]).powi(2) + (q[2] - p[2]).powi(2)).sqrt(),
                );
            }
        }
        let inside =
            (p[0] / semi[0]).powi(2) + (p[1] / semi[1]).powi(2) + (p[2] / semi[2]).powi(2) < 1.0;
        let brute = if inside { -brute } else { brute };
        assert!(
            (ours - brute).abs() < 0.05,
            "case {case}: ours {ours} brute {brute}"
        );
        assert!(
            ours.abs() <= brute.abs() + 1e-9,
            "case {case}: ours is not the minimum"
        );
    }
}

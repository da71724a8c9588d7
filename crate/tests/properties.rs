//! Property tests (proptest): invariance under a rigid motion of the whole scene, monotone
//! shrinking as the slab thins, and the signature agreeing with the tip offset.

mod common;

use common::*;
use nalgebra::{Point3, Rotation3, Vector3};
use proptest::prelude::*;
use slicewise::*;

fn with_structures(seed: u64) -> Scene {
    let mut r = rng(seed);
    let mut s = random_scene(&mut r, true);
    let f = s.frame();
    let mut structures = Vec::new();
    for i in 0..3 {
        let c = f.to_world(
            uniform(&mut r, -10.0, 10.0),
            uniform(&mut r, 5.0, 30.0),
            uniform(&mut r, -3.0, 3.0),
        );
        let k = Vector3::new(
            uniform(&mut r, -1.0, 1.0),
            uniform(&mut r, -1.0, 1.0),
            uniform(&mut r, -0.3, 0.3),
        )
        .normalize();
        let p0 = c - k * 30.0;
        let p1 = c + k * 30.0;
        structures.push(Structure {
            id: format!("t{i}"),
            kind: if i == 0 {
                StructureKind::Nerve {
                    fascicles: 0,
                    root: false,
                }
            } else {
                StructureKind::Vessel { flow_cm_s: 10.0 }
            },
            shape: Shape::Tube(Tube {
                path_mm: vec![p0.into(), c.into(), p1.into()],
                radius_mm: uniform(&mut r, 0.5, 4.0),
            }),
        });
    }
    structures.push(Structure {
        id: "f".into(),
        kind: StructureKind::Fluid,
        shape: Shape::Ellipsoid(Ellipsoid {
            centre_mm: f.to_world(0.0, 15.0, 1.0).into(),
            semi_axes_mm: [3.0, 2.0, 1.5],
            yaw_deg: uniform(&mut r, -90.0, 90.0),
        }),
    });
    s.structures = structures;
    s
}

/// Rotate the whole scene by φ about the world z axis and shift it by (tx, ty) on the skin.
fn moved(s: &Scene, phi_deg: f64, tx: f64, ty: f64) -> Scene {
    let rot = Rotation3::from_axis_angle(&Vector3::z_axis(), phi_deg.to_radians());
    let t = Vector3::new(tx, ty, 0.0);
    let m = |p: [f64; 3]| -> [f64; 3] { (rot * Point3::from(p) + t).into() };
    let mut out = s.clone();
    let c = m([s.probe.pose.x_mm, s.probe.pose.y_mm, 0.0]);
    out.probe.pose.x_mm = c[0];
    out.probe.pose.y_mm = c[1];
    out.probe.pose.rotate_deg += phi_deg;
    let e = m([s.needle.entry.x_mm, s.needle.entry.y_mm, 0.0]);
    out.needle.entry = Entry {
        x_mm: e[0],
        y_mm: e[1],
    };
    out.needle.azimuth_deg += phi_deg;
    for st in &mut out.structures {
        match &mut st.shape {
            Shape::Tube(t) => t.path_mm.iter_mut().for_each(|p| *p = m(*p)),
            Shape::Ellipsoid(e) => {
                e.centre_mm = m(e.centre_mm);
                e.yaw_deg += phi_deg;
            }
        }
    }
    out
}

fn close(a: f64, b: f64, tol: f64) -> bool {
    (a - b).abs() <= tol * (1.0 + a.abs().max(b.abs()))
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 3000, ..ProptestConfig::default() })]

    /// Moving the whole scene rigidly on the skin (rotation about z, shift in x and y) changes
    /// nothing the screen shows.
    #[test]
    fn unchanged_under_rigid_motion(seed in any::<u64>(), phi in -180.0f64..180.0, tx in -50.0f64..50.0, ty in -50.0f64..50.0) {
        let a = with_structures(seed);
        let b = moved(&a, phi, tx, ty);
        let (ra, rb) = (section(&a), section(&b));
        prop_assert_eq!(ra.needle.in_slab_mm.len(), rb.needle.in_slab_mm.len());
        for (x, y) in ra.needle.in_slab_mm.iter().zip(&rb.needle.in_slab_mm) {
            prop_assert!(close(x[0], y[0], 1e-7) && close(x[1], y[1], 1e-7), "{:?} vs {:?}", x, y);
        }
        prop_assert!(close(ra.needle.tip_offset_mm, rb.needle.tip_offset_mm, 1e-9));
        prop_assert!(close(ra.needle.hidden_length_mm, rb.needle.hidden_length_mm, 1e-7));
        if (ra.needle.extent_mm - DOT_EXTENT_MM).abs() > 1e-6 {
            prop_assert_eq!(ra.needle.signature, rb.needle.signature);
        }
        for (x, y) in ra.structures.iter().zip(&rb.structures) {
            prop_assert_eq!(x.sections.len(), y.sections.len());
            for (p, q) in x.sections.iter().zip(&y.sections) {
                prop_assert!(close(p.lateral_mm, q.lateral_mm, 1e-8) && close(p.depth_mm, q.depth_mm, 1e-8));
                prop_assert!(close(p.semi_axes_mm[0], q.semi_axes_mm[0], 1e-8) && close(p.semi_axes_mm[1], q.semi_axes_mm[1], 1e-8));
            }
            prop_assert!(close(x.tip_distance_mm, y.tip_distance_mm, 1e-8));
        }
    }

    /// A thinner uniform slab never shows more: every in-slab stretch at thickness T2 < T1 lies
    /// inside a stretch at T1.
    #[test]
    fn intervals_shrink_as_the_slab_thins(seed in any::<u64>(), t1 in 0.2f64..5.0, ratio in 0.05f64..1.0) {
        let mut r = rng(seed);
        let mut s = random_scene(&mut r, true);
        s.probe.elevation = ElevationProfile::Uniform { thickness_mm: t1 };
        let thick = needle_section(&Slab::of_probe(&s.probe), &s.needle).in_slab_mm;
        s.probe.elevation = ElevationProfile::Uniform { thickness_mm: t1 * ratio };
        let thin = needle_section(&Slab::of_probe(&s.probe), &s.needle).in_slab_mm;
        for iv in &thin {
            prop_assert!(thick.iter().any(|jv| jv[0] <= iv[0] + 1e-9 && iv[1] <= jv[1] + 1e-9), "{:?} not inside {:?}", iv, thick);
        }
        let total = |v: &Vec<[f64; 2]>| v.iter().map(|iv| iv[1] - iv[0]).sum::<f64>();
        prop_assert!(total(&thin) <= total(&thick) + 1e-9);
    }

    /// The signature agrees with the tip offset and the slab thickness: a tip within
    /// T/2 + r·cos γ of the plane (and in view) is in the slab; a tip farther than the bevel
    /// can reach is not; dots are short and lines are long.
    #[test]
    fn signature_agrees_with_tip_offset(seed in any::<u64>()) {
        let mut r = rng(seed);
        let s = random_scene(&mut r, true);
        let slab = Slab::of_probe(&s.probe);
        let sec = needle_section(&slab, &s.needle);
        let seg = needle_segment(&slab, &s.needle);
        let reach = 0.5 * sec.slab_thickness_at_tip_mm + seg.allowance_mm;
        if s.needle.inserted_mm > 0.0 && sec.tip_in_view && sec.tip_offset_mm.abs() <= reach - 1e-9 {
            prop_assert!(sec.tip_in_slab);
            prop_assert_eq!(sec.hidden_length_mm, 0.0);
        }
        let thickest = match slab.profile { SlabProfile::Uniform(t) => t, SlabProfile::Focused(f) => f.aperture_mm.max(f.focus_thickness_mm) };
        let bevel_reach = sec.bevel_length_mm.min(s.needle.inserted_mm) * seg.dir.e.abs();
        if sec.tip_offset_mm.abs() > 0.5 * thickest + seg.allowance_mm + bevel_reach + 1e-9 {
            prop_assert!(!sec.tip_in_slab);
        }
        let tipful = matches!(sec.signature, Signature::TipDoubleDot | Signature::LineWithTip);
        prop_assert_eq!(tipful, sec.tip_in_slab);
        let dot = matches!(sec.signature, Signature::ShaftDot | Signature::TipDoubleDot);
        if sec.signature != Signature::None {
            prop_assert_eq!(dot, sec.extent_mm <= DOT_EXTENT_MM);
        }
        prop_assert_eq!(sec.signature == Signature::None, sec.in_slab_mm.is_empty());
    }
}

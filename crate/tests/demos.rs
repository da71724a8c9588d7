//! Every demo scene loads, sections, and shows what its notes promise.

mod common;

use slicewise::*;

#[test]
fn every_demo_scene_loads_and_sections() {
    let demos = common::demo_scenes();
    assert!(demos.len() >= 4);
    for (name, scene) in &demos {
        let r = section(scene);
        assert!(
            !scene.title.is_empty() && !scene.notes.is_empty(),
            "{name}: needs a title and notes"
        );
        assert!(
            r.structures.iter().any(|s| s.section.is_some()),
            "{name}: the slab cuts no structure"
        );
        assert!(
            r.nearest_nerve.is_some(),
            "{name}: a scene about a nerve block needs a nerve"
        );
        assert!(
            r.nearest_nerve.as_ref().unwrap().distance_mm > 0.0,
            "{name}: the demo tip must not start inside a nerve"
        );
    }
}

/// The scenes teach specific pictures; keep them true when the geometry changes.
#[test]
fn demo_scenes_show_their_teaching_point() {
    let by_name = |n: &str| {
        common::demo_scenes()
            .into_iter()
            .find(|(name, _)| name == n)
            .unwrap()
            .1
    };
    let sig = |n: &str| section(&by_name(n)).needle.signature;
    assert_eq!(sig("shaft-dot-past-nerve.scene.json"), Signature::ShaftDot);
    assert_eq!(
        sig("inplane-past-vessel.scene.json"),
        Signature::LineWithoutTip
    );
    assert_eq!(
        sig("forearm-out-of-plane.scene.json"),
        Signature::TipDoubleDot
    );
    assert_eq!(sig("deep-curved-target.scene.json"), Signature::LineWithTip);
    let past = section(&by_name("shaft-dot-past-nerve.scene.json"));
    assert!(past.needle.hidden_length_mm > 2.0);
    // The deep scene really is deep and under a curved face.
    let deep = by_name("deep-curved-target.scene.json");
    assert!(matches!(deep.probe.footprint, Footprint::Curved { .. }));
    assert!(section(&deep).needle.true_tip.depth_mm > 40.0);
}

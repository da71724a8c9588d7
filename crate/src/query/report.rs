//! The whole-scene section report: needle signature, structure cuts and tip distances.

use serde::Serialize;

use super::section_ellipsoid_plane::ellipsoid_section;
use super::section_tube_plane::{tube_sections, PlaneSection};
use super::signature::{needle_section, NeedleSection};
use super::slab::Slab;
use crate::scene::{Scene, Shape, Structure, StructureKind};

/// How one structure meets the slab and the needle tip.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct StructureSection {
    /// The structure's id.
    pub id: String,
    /// nerve, vessel, bone or fluid.
    pub kind: &'static str,
    /// The first cut by the image plane that lies in the field of view (else the first cut),
    /// or null when the plane misses the structure.
    pub section: Option<PlaneSection>,
    /// Every cut, in path order (a bending tube may cross the plane more than once).
    pub sections: Vec<PlaneSection>,
    /// Signed 3D distance from the true tip to the surface, mm (negative inside).
    pub tip_distance_mm: f64,
    /// Signed on-screen distance from the apparent tip to the primary cut's outline, mm
    /// (negative inside), or null when either is missing.
    pub screen_distance_mm: Option<f64>,
}

/// The nerve nearest the true tip.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct NearestNerve {
    /// Its id.
    pub id: String,
    /// Signed 3D distance from the true tip to its surface, mm.
    pub distance_mm: f64,
    /// Signed on-screen distance from the apparent tip to its cut, mm, or null.
    pub screen_distance_mm: Option<f64>,
}

/// Everything the slab shows at one pose.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SectionReport {
    /// The needle's signature and numbers.
    pub needle: NeedleSection,
    /// Each structure's cut and distance to the tip, in scene order.
    pub structures: Vec<StructureSection>,
    /// The nerve nearest the true tip, or null when the scene has no nerve.
    pub nearest_nerve: Option<NearestNerve>,
}

/// Section a whole scene at its probe pose.
///
/// ```
/// let scene = slicewise::load_scene_str(include_str!("../../../scenes-demo/forearm-out-of-plane.scene.json")).unwrap();
/// let report = slicewise::section(&scene);
/// assert!(!report.structures.is_empty());
/// ```
pub fn section(scene: &Scene) -> SectionReport {
    let slab = Slab::of_probe(&scene.probe);
    let needle = needle_section(&slab, &scene.needle);
    let tip = scene.needle.tip();
    let apparent = needle.apparent_tip;
    let structures: Vec<StructureSection> = scene
        .structures
        .iter()
        .map(|s| {
            let sections = structure_sections(&slab, s);
            let section = sections
                .iter()
                .find(|c| c.in_view)
                .or(sections.first())
                .copied();
            StructureSection {
                id: s.id.clone(),
                kind: s.kind.name(),
                section,
                screen_distance_mm: match (section, apparent) {
                    (Some(c), Some(a)) => Some(c.signed_distance_mm(a.lateral_mm, a.depth_mm)),
                    _ => None,
                },
                sections,
                tip_distance_mm: s.signed_distance_mm(&tip),
            }
        })
        .collect();
    let nearest_nerve = scene
        .structures
        .iter()
        .zip(&structures)
        .filter(|(s, _)| matches!(s.kind, StructureKind::Nerve { .. }))
        .min_by(|a, b| a.1.tip_distance_mm.total_cmp(&b.1.tip_distance_mm))
        .map(|(_, r)| NearestNerve {
            id: r.id.clone(),
            distance_mm: r.tip_distance_mm,
            screen_distance_mm: r.screen_distance_mm,
        });
    SectionReport {
        needle,
        structures,
        nearest_nerve,
    }
}

/// Every cut of one structure by the slab's centre plane.
pub fn structure_sections(slab: &Slab, s: &Structure) -> Vec<PlaneSection> {
    match &s.shape {
        Shape::Tube(t) => tube_sections(slab, t),
        Shape::Ellipsoid(e) => ellipsoid_section(slab, e).into_iter().collect(),
    }
}

//! Queries on a posed scene: what the slab cuts of the needle and the structures.
//!
//! Files are named `<operation>_<shape>_<shape>` so the place of each computation can be
//! guessed: `intervals_line_slab` (needle axis ∩ slab), `section_tube_plane`,
//! `section_ellipsoid_plane`, `distance_point_ellipse`.

mod distance_point_ellipse;
mod intervals_line_slab;
mod report;
mod roots;
mod section_ellipsoid_plane;
mod section_tube_plane;
mod signature;
mod slab;

pub use distance_point_ellipse::{signed_distance_ellipse, signed_distance_ellipsoid};
pub use intervals_line_slab::{line_slab_intervals, ImageSegment, ROOT_RESOLUTION_MM};
pub use report::{section, structure_sections, NearestNerve, SectionReport, StructureSection};
pub use section_ellipsoid_plane::ellipsoid_section;
pub use section_tube_plane::{tube_sections, PlaneSection, SectionShape, BAND_SINE};
pub use signature::{
    needle_section, needle_segment, FramePoint, NeedleSection, ScreenPoint, Signature,
    DOT_EXTENT_MM,
};
pub use slab::{Slab, BOUNDARY_TOL_MM};

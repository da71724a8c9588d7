//! Fast edits of single numeric fields (slider moves), with the same validation and messages as
//! loading a file; anything else goes through the general path edit.

use serde_json::json;

use super::reader::{closed, limit, number, unit_of};
use super::{set_scene_field, SceneError};
use crate::scene::Scene;

/// Set the numeric field at `path` to `value`, validated like a loaded file. Common slider fields
/// are set in place; any other path is edited through the scene's JSON form. On error the scene
/// is unchanged.
///
/// ```
/// let mut scene = slicewise::load_scene_str(include_str!("../../../scenes-demo/forearm-out-of-plane.scene.json")).unwrap();
/// slicewise::set_scene_number(&mut scene, "needle.inserted_mm", 17.5).unwrap();
/// assert_eq!(scene.needle.inserted_mm, 17.5);
/// let err = slicewise::set_scene_number(&mut scene, "needle.inserted_mm", f64::NAN).unwrap_err();
/// assert_eq!(err.to_string(), "needle.inserted_mm: must be a number from 0 to 50 mm, got NaN");
/// ```
pub fn set_scene_number(scene: &mut Scene, path: &str, value: f64) -> Result<(), SceneError> {
    let length = scene.needle.length_mm;
    let (slot, range) = match path {
        "probe.pose.x_mm" => (&mut scene.probe.pose.x_mm, limit(path)),
        "probe.pose.y_mm" => (&mut scene.probe.pose.y_mm, limit(path)),
        "probe.pose.rotate_deg" => (&mut scene.probe.pose.rotate_deg, limit(path)),
        "probe.pose.tilt_deg" => (&mut scene.probe.pose.tilt_deg, limit(path)),
        "probe.pose.rock_deg" => (&mut scene.probe.pose.rock_deg, limit(path)),
        "probe.frequency_mhz" => (&mut scene.probe.frequency_mhz, limit(path)),
        "probe.depth_mm" => (&mut scene.probe.depth_mm, limit(path)),
        "needle.inserted_mm" => (&mut scene.needle.inserted_mm, closed(0.0, length)),
        "needle.angle_deg" => (&mut scene.needle.angle_deg, limit(path)),
        "needle.azimuth_deg" => (&mut scene.needle.azimuth_deg, limit(path)),
        "needle.bevel_roll_deg" => (&mut scene.needle.bevel_roll_deg, limit(path)),
        "needle.entry.x_mm" => (&mut scene.needle.entry.x_mm, limit(path)),
        "needle.entry.y_mm" => (&mut scene.needle.entry.y_mm, limit(path)),
        "display.gain_db" => (&mut scene.display.gain_db, limit(path)),
        "display.dynamic_range_db" => (&mut scene.display.dynamic_range_db, limit(path)),
        "display.doppler.scale_cm_s" => (&mut scene.display.doppler.scale_cm_s, limit(path)),
        _ => {
            // serde_json cannot hold NaN or infinities; name the field rather than fail vaguely.
            if !value.is_finite() {
                return Err(SceneError::at(
                    path,
                    format!("must be a finite number, got {value}"),
                ));
            }
            *scene = set_scene_field(scene, path, json!(value))?;
            return Ok(());
        }
    };
    if !value.is_finite() {
        return Err(SceneError::at(
            path,
            format!("must be {}, got {value}", range.describe(unit_of(path))),
        ));
    }
    let checked = number(&json!(value), path, range, unit_of(path))?;
    *slot = checked;
    Ok(())
}

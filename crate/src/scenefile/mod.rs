//! Scene files (`*.scene.json`, format "slicewise-scene", version 1): load with validation,
//! save, and edit one field by its path.
//!
//! Every error names the field path (`probe.pose.tilt_deg`, `structures[2].path_mm[1]`) and
//! what is allowed there. Unknown fields are refused, so a typo cannot silently fall back to a
//! default. Optional fields and their defaults: `title`, `notes` (empty), `tissue` (1.5 mm
//! skin, 5 mm fat, muscle), `structures` (none), `probe.pose` and each of its fields (0),
//! `needle.bevel_roll_deg` (0), nerve `fascicles` (0 = from the radius) and `root` (false),
//! vessel `flow_cm_s` (0), fluid `yaw_deg` (0), `display` and each of its fields (gain 0 dB,
//! eight 0 dB time-gain bands, 60 dB dynamic range, 256 grey levels, Doppler off with a
//! 30 cm/s scale). Saving writes every field explicitly.

mod edit;
mod reader;
mod strict_json;
mod writer;

pub use edit::set_scene_number;

use serde_json::Value;
use std::fmt;

use crate::scene::Scene;

/// The format tag of a scene file.
pub const FORMAT: &str = "slicewise-scene";
/// The scene-file version this build reads and writes.
pub const VERSION: u32 = 1;

/// A scene file that could not be read, or a field edit that was refused.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct SceneError {
    /// Field path, e.g. `probe.pose.tilt_deg`; empty for the whole file.
    pub path: String,
    /// What is wrong and what is allowed.
    pub message: String,
}

impl SceneError {
    pub(crate) fn at(path: &str, message: String) -> Self {
        SceneError {
            path: path.to_owned(),
            message,
        }
    }
}

impl fmt::Display for SceneError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.path.is_empty() {
            f.write_str(&self.message)
        } else {
            write!(f, "{}: {}", self.path, self.message)
        }
    }
}

impl std::error::Error for SceneError {}

/// Read and validate a scene from JSON text.
///
/// ```
/// let err = slicewise::load_scene_str(r#"{"format": "slicewise-scene", "version": 1}"#).unwrap_err();
/// assert_eq!(err.to_string(), "probe: missing; an object with footprint, frequency_mhz, depth_mm, elevation, pose is required");
/// ```
pub fn load_scene_str(text: &str) -> Result<Scene, SceneError> {
    let value = strict_json::parse(text).map_err(|m| SceneError::at("", m))?;
    load_scene_value(&value)
}

/// Read and validate a scene from an already-parsed JSON value.
pub fn load_scene_value(value: &Value) -> Result<Scene, SceneError> {
    reader::read_scene(value)
}

/// The scene as a v1 JSON value (every field explicit).
pub fn scene_to_value(scene: &Scene) -> Value {
    writer::write_scene(scene)
}

/// The scene as pretty-printed v1 JSON text, ending in a newline.
pub fn save_scene_string(scene: &Scene) -> String {
    let mut s = serde_json::to_string_pretty(&scene_to_value(scene)).unwrap_or_default();
    s.push('\n');
    s
}

/// Split a field path such as `structures[1].path_mm[0][2]` into keys and indices.
fn parse_path(path: &str) -> Result<Vec<PathPart>, SceneError> {
    let bad = || {
        SceneError::at(
            path,
            "not a field path (use names and [index], e.g. probe.pose.tilt_deg)".into(),
        )
    };
    let mut parts = Vec::new();
    for piece in path.split('.') {
        let (name, mut rest) = match piece.find('[') {
            Some(i) => (&piece[..i], &piece[i..]),
            None => (piece, ""),
        };
        // Every piece needs a name, except an index straight after another (`a[0][1]`).
        if name.is_empty() && (parts.is_empty() || rest.is_empty()) {
            return Err(bad());
        }
        if !name.is_empty() {
            parts.push(PathPart::Key(name.to_owned()));
        }
        while !rest.is_empty() {
            let close = rest.find(']').ok_or_else(bad)?;
            let idx: usize = rest[1..close].parse().map_err(|_| bad())?;
            parts.push(PathPart::Index(idx));
            rest = &rest[close + 1..];
            if !rest.is_empty() && !rest.starts_with('[') {
                return Err(bad());
            }
        }
    }
    Ok(parts)
}

enum PathPart {
    Key(String),
    Index(usize),
}

/// A copy of `scene` with the field at `path` set to `value`, validated like a loaded file.
/// The original is untouched when the edit is refused.
///
/// ```
/// let scene = slicewise::load_scene_str(include_str!("../../../scenes-demo/forearm-out-of-plane.scene.json")).unwrap();
/// let tilted = slicewise::set_scene_field(&scene, "probe.pose.tilt_deg", serde_json::json!(5.0)).unwrap();
/// assert_eq!(tilted.probe.pose.tilt_deg, 5.0);
/// let err = slicewise::set_scene_field(&scene, "probe.pose.tilt_deg", serde_json::json!(95.0)).unwrap_err();
/// assert_eq!(err.to_string(), "probe.pose.tilt_deg: must be a number from -60 to 60 degrees, got 95");
/// ```
pub fn set_scene_field(scene: &Scene, path: &str, value: Value) -> Result<Scene, SceneError> {
    let mut root = scene_to_value(scene);
    let parts = parse_path(path)?;
    let mut here = &mut root;
    let last = parts.len() - 1;
    for (i, part) in parts.iter().enumerate() {
        let sofar = || SceneError::at(path, "no such field in this scene".into());
        here = match (part, here) {
            (PathPart::Key(k), Value::Object(m)) => {
                if i == last {
                    m.insert(k.clone(), value);
                    break;
                }
                m.get_mut(k).ok_or_else(sofar)?
            }
            (PathPart::Index(j), Value::Array(a)) => {
                if i == last {
                    if *j < a.len() {
                        a[*j] = value;
                    } else if *j == a.len() {
                        a.push(value);
                    } else {
                        return Err(sofar());
                    }
                    break;
                }
                a.get_mut(*j).ok_or_else(sofar)?
            }
            _ => return Err(sofar()),
        };
    }
    load_scene_value(&root)
}

/// Every numeric field's allowed range, by path pattern ("[]" = any index): the same table
/// the reader enforces, for the JSON Schema test and the page's slider limits.
pub fn field_limits() -> Vec<(&'static str, f64, f64)> {
    reader::LIMITS
        .iter()
        .map(|(p, r)| (*p, r.min, r.max))
        .collect()
}

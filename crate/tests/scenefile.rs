//! Scene files: every demo scene validates against the JSON Schema (checked with the
//! general-purpose `jsonschema` crate), round trips are lossless, and bad files get a clear
//! error naming the field.

mod common;

use serde_json::{json, Value};
use slicewise::*;

fn schema() -> Value {
    serde_json::from_str(include_str!("../schema/scene-v1.schema.json")).unwrap()
}

fn demo_texts() -> Vec<(String, String)> {
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../scenes-demo");
    let mut out: Vec<_> = std::fs::read_dir(dir)
        .unwrap()
        .flatten()
        .map(|e| e.path())
        .filter(|p| p.to_string_lossy().ends_with(".scene.json"))
        .map(|p| {
            (
                p.file_name().unwrap().to_string_lossy().into_owned(),
                std::fs::read_to_string(&p).unwrap(),
            )
        })
        .collect();
    out.sort();
    out
}

#[test]
fn schema_is_valid_draft_2020_12() {
    let s = schema();
    assert_eq!(s["$schema"], "https://json-schema.org/draft/2020-12/schema");
    jsonschema::meta::validate(&s).expect("the schema itself is valid");
}

#[test]
fn every_demo_scene_matches_the_schema_and_the_validator() {
    let validator = jsonschema::validator_for(&schema()).unwrap();
    let demos = demo_texts();
    assert!(demos.len() >= 4, "at least four demo scenes");
    for (name, text) in demos {
        let v: Value = serde_json::from_str(&text).unwrap();
        let errors: Vec<String> = validator
            .iter_errors(&v)
            .map(|e| format!("{} at {}", e, e.instance_path()))
            .collect();
        assert!(errors.is_empty(), "{name}: {errors:?}");
        let scene = load_scene_str(&text).unwrap_or_else(|e| panic!("{name}: {e}"));
        // The canonical form written back also matches the schema.
        assert!(
            validator.is_valid(&scene_to_value(&scene)),
            "{name}: saved form fails the schema"
        );
    }
}

/// The schema's numeric limits are the validator's limits.
#[test]
fn schema_limits_match_the_validator() {
    let s = schema();
    let lookup = |pattern: &str| -> Vec<(f64, f64)> {
        // Walk the schema along the pattern, collecting every min/max reachable.
        fn walk(node: &Value, parts: &[&str], root: &Value, out: &mut Vec<(f64, f64)>) {
            if let Some(r) = node.get("$ref").and_then(Value::as_str) {
                let target = r.trim_start_matches("#/$defs/");
                return walk(&root["$defs"][target], parts, root, out);
            }
            for key in ["oneOf", "anyOf"] {
                if let Some(alts) = node.get(key).and_then(Value::as_array) {
                    for a in alts {
                        walk(a, parts, root, out);
                    }
                }
            }
            if parts.is_empty() {
                let lo = node
                    .get("minimum")
                    .or(node.get("exclusiveMinimum"))
                    .and_then(Value::as_f64);
                let hi = node.get("maximum").and_then(Value::as_f64);
                if let (Some(lo), Some(hi)) = (lo, hi) {
                    out.push((lo, hi));
                }
                return;
            }
            let (head, rest) = (parts[0], &parts[1..]);
            if head == "[]" {
                if let Some(items) = node.get("items") {
                    walk(items, rest, root, out);
                }
            } else if let Some(p) = node.get("properties").and_then(|p| p.get(head)) {
                walk(p, rest, root, out);
            }
        }
        let parts: Vec<&str> = pattern
            .split('.')
            .flat_map(|p| {
                let mut v = vec![p.trim_end_matches("[]").trim_end_matches("[]")];
                let n = p.matches("[]").count();
                v.extend(std::iter::repeat_n("[]", n));
                v
            })
            .collect();
        let mut out = Vec::new();
        walk(&s, &parts, &s, &mut out);
        out
    };
    for (pattern, lo, hi) in field_limits() {
        let found = lookup(pattern);
        assert!(!found.is_empty(), "{pattern}: no limits in the schema");
        assert!(
            found.iter().all(|&(a, b)| a == lo && b == hi),
            "{pattern}: schema {found:?} vs validator ({lo}, {hi})"
        );
    }
}

#[test]
fn round_trip_is_lossless() {
    for (name, text) in demo_texts() {
        let a = load_scene_str(&text).unwrap();
        let saved = save_scene_string(&a);
        let b = load_scene_str(&saved).unwrap();
        assert_eq!(a, b, "{name}");
        assert_eq!(saved, save_scene_string(&b), "{name}: second save differs");
    }
    // Awkward floats survive exactly.
    let mut r = common::rng(7);
    let (_, text) = &demo_texts()[0];
    let mut s = load_scene_str(text).unwrap();
    for _ in 0..200 {
        s.probe.pose.tilt_deg = common::uniform(&mut r, -60.0, 60.0);
        s.needle.inserted_mm = common::uniform(&mut r, 0.0, s.needle.length_mm);
        s.probe.pose.x_mm = 0.1 + 0.2;
        let back = load_scene_str(&save_scene_string(&s)).unwrap();
        assert_eq!(s, back);
    }
}

fn base() -> Value {
    serde_json::from_str(include_str!(
        "../../scenes-demo/forearm-out-of-plane.scene.json"
    ))
    .unwrap()
}

fn with(path: &str, value: Value) -> String {
    let mut v = base();
    let mut here = &mut v;
    let parts: Vec<&str> = path.split('.').collect();
    for (i, p) in parts.iter().enumerate() {
        let (key, idx) = match p.find('[') {
            Some(k) => (
                &p[..k],
                Some(p[k + 1..p.len() - 1].parse::<usize>().unwrap()),
            ),
            None => (*p, None),
        };
        if i + 1 == parts.len() && idx.is_none() {
            if value.is_null() {
                here.as_object_mut().unwrap().remove(key);
            } else {
                here[key] = value.clone();
            }
            break;
        }
        here = &mut here[key];
        if let Some(j) = idx {
            if i + 1 == parts.len() {
                here[j] = value.clone();
                break;
            }
            here = &mut here[j];
        }
    }
    serde_json::to_string(&v).unwrap()
}

/// At least 20 kinds of bad scene file, each with the exact error a user sees.
#[test]
fn bad_files_get_clear_errors_naming_the_field() {
    let cases: Vec<(&str, String, &str)> = vec![
        ("empty file", String::new(), "not valid JSON: EOF while parsing a value at line 1 column 0"),
        ("truncated", r#"{"format": "slicewise-scene", "version": 1"#.into(), "not valid JSON: EOF while parsing an object at line 1 column 42"),
        ("NaN", r#"{"format": "slicewise-scene", "version": NaN}"#.into(), "not valid JSON: expected value at line 1 column 42 (NaN and Infinity are not numbers in JSON; give a finite value)"),
        ("huge number", r#"{"format": "slicewise-scene", "version": 1e999}"#.into(), "not valid JSON: number out of range at line 1 column 46"),
        ("duplicate key", r#"{"format": "slicewise-scene", "format": "x"}"#.into(), "not valid JSON: the key \"format\" appears twice in one object at line 1 column 38"),
        ("not an object", "[1, 2]".into(), "must be an object {...}, got a list"),
        ("wrong format", with("format", json!("other-tool")), "format: must be \"slicewise-scene\", got \"other-tool\""),
        ("newer version", with("version", json!(2)), "version: this build reads version 1 files; got version 2 (written by a newer Slicewise?)"),
        ("version as text", with("version", json!("1")), "version: must be the whole number 1, got \"1\""),
        ("unknown top-level field", with("colour", json!("blue")), "colour: unknown field; allowed here: format, version, title, notes, probe, needle, tissue, structures, display, rehearsal"),
        ("typo in pose", with("probe.pose.tilt", json!(3)), "probe.pose.tilt: unknown field; allowed here: x_mm, y_mm, rotate_deg, tilt_deg, rock_deg"),
        ("missing probe", with("probe", Value::Null), "probe: missing; an object with footprint, frequency_mhz, depth_mm, elevation, pose is required"),
        ("depth out of range", with("probe.depth_mm", json!(1000)), "probe.depth_mm: must be a number from 5 to 300 mm, got 1000"),
        ("depth as text", with("probe.depth_mm", json!("30 mm")), "probe.depth_mm: must be a number from 5 to 300 mm, got \"30 mm\""),
        ("negative frequency", with("probe.frequency_mhz", json!(-12)), "probe.frequency_mhz: must be a number from 1 to 30 MHz, got -12"),
        ("tilt too far", with("probe.pose.tilt_deg", json!(75)), "probe.pose.tilt_deg: must be a number from -60 to 60 degrees, got 75"),
        ("unknown footprint", with("probe.footprint.kind", json!("phased")), "probe.footprint.kind: must be one of \"linear\", \"curved\", got \"phased\""),
        ("curved without radius", with("probe.footprint", json!({"kind": "curved", "width_mm": 40})), "probe.footprint.radius_mm: missing; a number from 5 to 200 mm is required"),
        ("curved too wide", with("probe.footprint", json!({"kind": "curved", "width_mm": 140, "radius_mm": 20})), "probe.footprint.width_mm: a curved face of radius 20 mm may span at most 150°, so width_mm (its arc length) must be at most 52.3 mm, got 140"),
        ("uniform with focus", with("probe.elevation", json!({"model": "uniform", "thickness_mm": 1, "focus_mm": 20})), "probe.elevation.focus_mm: unknown field; allowed here: model, thickness_mm"),
        ("unknown elevation model", with("probe.elevation.model", json!("gaussian")), "probe.elevation.model: must be one of \"focused\", \"uniform\", got \"gaussian\""),
        ("gauge off the table", with("needle.gauge", json!(30)), "needle.gauge: must be a whole number from 18 to 27, got 30"),
        ("fractional gauge", with("needle.gauge", json!(22.5)), "needle.gauge: must be a whole number from 18 to 27, got 22.5"),
        ("gauge and diameter", with("needle.outer_diameter_mm", json!(0.7)), "needle: give either gauge or outer_diameter_mm, not both"),
        ("no size", with("needle.gauge", Value::Null), "needle.gauge: missing; give gauge (18 to 27) or outer_diameter_mm"),
        ("inserted past length", with("needle.inserted_mm", json!(60)), "needle.inserted_mm: must be a number from 0 to 50 mm, got 60"),
        ("flat needle", with("needle.angle_deg", json!(0)), "needle.angle_deg: must be a number above 0 up to 90 degrees, got 0"),
        ("entry as list", with("needle.entry", json!([1, 2])), "needle.entry: must be an object {...}, got a list"),
        ("one-point path", with("structures[0].path_mm", json!([[0, 0, 10]])), "structures[0].path_mm: must hold 2 to 256 points, got 1"),
        ("two-number point", with("structures[0].path_mm", json!([[0, 0, 10], [0, 5]])), "structures[0].path_mm[1]: must be a point [x, y, z] in mm with 3 numbers, got 2"),
        ("repeated point", with("structures[0].path_mm", json!([[0, 0, 10], [0, 0, 10]])), "structures[0].path_mm[1]: repeats the previous point; consecutive points must be at least 0.001 mm apart"),
        ("negative radius", with("structures[1].radius_mm", json!(-1)), "structures[1].radius_mm: must be a number from 0.05 to 50 mm, got -1"),
        ("duplicate id", with("structures[1].id", json!("forearm-nerve")), "structures[1].id: \"forearm-nerve\" is already used by structures[0]; ids must be unique"),
        ("flow on a nerve", with("structures[0].flow_cm_s", json!(10)), "structures[0].flow_cm_s: unknown field; allowed here: id, kind, path_mm, radius_mm, fascicles, root"),
        ("unknown structure kind", with("structures[0].kind", json!("tendon")), "structures[0].kind: must be one of \"nerve\", \"vessel\", \"bone\", \"fluid\", got \"tendon\""),
        ("empty layers", with("tissue.layers", json!([])), "tissue.layers: must hold 1 to 16 layers, got 0"),
        ("unknown layer", with("tissue.layers[1].kind", json!("tendon")), "tissue.layers[1].kind: must be one of \"skin\", \"fat\", \"muscle\", \"fascia\", \"lung\", got \"tendon\""),
        ("root as text", with("structures[0].root", json!("yes")), "structures[0].root: must be true or false, got \"yes\""),
        ("huge coordinate", with("structures[0].path_mm", json!([[0, 0, 10], [0, 1e300, 10]])), "structures[0].path_mm[1][1]: must be a number from -500 to 500 mm, got 1e300"),
        ("display as a list", with("display", json!([1])), "display: must be an object {...}, got a list"),
        ("unknown display field", with("display", json!({"contrast": 3})), "display.contrast: unknown field; allowed here: gain_db, tgc_db, dynamic_range_db, grey_levels, doppler"),
        ("gain too high", with("display", json!({"gain_db": 55})), "display.gain_db: must be a number from -40 to 40 dB, got 55"),
        ("gain as text", with("display", json!({"gain_db": "loud"})), "display.gain_db: must be a number from -40 to 40 dB, got \"loud\""),
        ("too few tgc bands", with("display", json!({"tgc_db": [0, 0, 0]})), "display.tgc_db: must hold 4 to 16 values (dB, one per depth band from the face down), got 3"),
        ("tgc band out of range", with("display", json!({"tgc_db": [0, 0, 45, 0]})), "display.tgc_db[2]: must be a number from -30 to 30 dB, got 45"),
        ("tgc as a number", with("display", json!({"tgc_db": 3})), "display.tgc_db: must be a list of 4 to 16 numbers in dB, got a number"),
        ("dynamic range too small", with("display", json!({"dynamic_range_db": 10})), "display.dynamic_range_db: must be a number from 20 to 100 dB, got 10"),
        ("one grey level", with("display", json!({"grey_levels": 1})), "display.grey_levels: must be a whole number from 2 to 256, got 1"),
        ("fractional grey levels", with("display", json!({"grey_levels": 2.5})), "display.grey_levels: must be a whole number from 2 to 256, got 2.5"),
        ("unknown doppler mode", with("display", json!({"doppler": {"mode": "spectral"}})), "display.doppler.mode: must be one of \"off\", \"velocity\", \"power\", got \"spectral\""),
        ("doppler scale zero", with("display", json!({"doppler": {"mode": "velocity", "scale_cm_s": 0}})), "display.doppler.scale_cm_s: must be a number from 1 to 300 cm/s, got 0"),
        ("unknown doppler field", with("display", json!({"doppler": {"prf_hz": 4000}})), "display.doppler.prf_hz: unknown field; allowed here: mode, scale_cm_s"),
        ("rehearsal target missing", with("rehearsal", json!({"target": "median"})), "rehearsal.target: no structure has the id \"median\"; ids here: forearm-nerve, companion-artery, companion-vein"),
        ("rehearsal target as number", with("rehearsal", json!({"target": 3})), "rehearsal.target: must be a structure id (text), got 3"),
        ("rehearsal pace too fast", with("rehearsal", json!({"pace_mm_s": 50})), "rehearsal.pace_mm_s: must be a number from 0.1 to 20 mm/s, got 50"),
        ("rehearsal unknown advance", with("rehearsal", json!({"advance": "auto"})), "rehearsal.advance: must be one of \"keys\", \"steady\", got \"auto\""),
        ("rehearsal time limit", with("rehearsal", json!({"time_limit_s": 5})), "rehearsal.time_limit_s: must be a number from 10 to 3600 s, got 5"),
        ("rehearsal unknown field", with("rehearsal", json!({"score": 10})), "rehearsal.score: unknown field; allowed here: advance, pace_mm_s, step_mm, advance_mm, target, time_limit_s"),
    ];
    assert!(cases.len() >= 20);
    for (what, text, expected) in &cases {
        match load_scene_str(text) {
            Ok(_) => panic!("{what}: accepted"),
            Err(e) => assert_eq!(&e.to_string(), expected, "{what}"),
        }
    }
}

/// The optional `display` object: absent means the documented defaults, every sub-field is
/// optional, and a saved file keeps what was set.
#[test]
fn display_settings_default_and_round_trip() {
    let plain = load_scene_str(&with("display", Value::Null)).unwrap();
    assert_eq!(plain.display, DisplaySettings::default());
    let partial = load_scene_str(&with(
        "display",
        json!({"gain_db": -6.5, "doppler": {"mode": "power"}}),
    ))
    .unwrap();
    assert_eq!(partial.display.gain_db, -6.5);
    assert_eq!(partial.display.doppler.mode, DopplerMode::Power);
    assert_eq!(
        partial.display.doppler.scale_cm_s,
        DEFAULT_DOPPLER_SCALE_CM_S
    );
    assert_eq!(partial.display.tgc_db, vec![0.0; DEFAULT_TGC_BANDS]);
    let full = load_scene_str(&with(
        "display",
        json!({"gain_db": 3, "tgc_db": [1, 2, 3, 4, 5], "dynamic_range_db": 45, "grey_levels": 3,
               "doppler": {"mode": "velocity", "scale_cm_s": 12.5}}),
    ))
    .unwrap();
    let back = load_scene_str(&save_scene_string(&full)).unwrap();
    assert_eq!(full, back);
    assert_eq!(back.display.grey_levels, 3);
    assert_eq!(back.display.tgc_db, vec![1.0, 2.0, 3.0, 4.0, 5.0]);
    let edited = set_scene_field(&full, "display.gain_db", json!(-12)).unwrap();
    assert_eq!(edited.display.gain_db, -12.0);
}

/// Editing a field by path validates like loading and leaves the scene untouched on error.
#[test]
fn set_field_by_path() {
    let s = load_scene_str(&with("title", json!("t"))).unwrap();
    let t = set_scene_field(&s, "structures[0].radius_mm", json!(2.5)).unwrap();
    match &t.structures[0].shape {
        Shape::Tube(tube) => assert_eq!(tube.radius_mm, 2.5),
        _ => unreachable!(),
    }
    assert_eq!(
        set_scene_field(&s, "needle.inserted_mm", json!(99))
            .unwrap_err()
            .to_string(),
        "needle.inserted_mm: must be a number from 0 to 50 mm, got 99"
    );
    assert_eq!(
        set_scene_field(&s, "probe.nothing.here", json!(1))
            .unwrap_err()
            .to_string(),
        "probe.nothing.here: no such field in this scene"
    );
    assert_eq!(
        set_scene_field(&s, "probe..x", json!(1))
            .unwrap_err()
            .to_string(),
        "probe..x: not a field path (use names and [index], e.g. probe.pose.tilt_deg)"
    );
    let m = set_scene_field(
        &s,
        "probe.elevation",
        json!({"model": "uniform", "thickness_mm": 1.5}),
    )
    .unwrap();
    assert_eq!(
        m.probe.elevation,
        ElevationProfile::Uniform { thickness_mm: 1.5 }
    );
}

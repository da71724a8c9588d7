//! Reading a scene from a JSON value, with every error naming the field path and what is
//! allowed there.

use serde_json::{Map, Value};

use super::SceneError;
use crate::scene::*;

/// An allowed numeric range for one field.
#[derive(Clone, Copy)]
pub(crate) struct Range {
    pub(crate) min: f64,
    pub(crate) max: f64,
    /// The minimum itself is not allowed.
    pub(crate) min_open: bool,
}

pub(crate) const fn closed(min: f64, max: f64) -> Range {
    Range {
        min,
        max,
        min_open: false,
    }
}

pub(crate) const fn open_min(min: f64, max: f64) -> Range {
    Range {
        min,
        max,
        min_open: true,
    }
}

impl Range {
    fn contains(&self, v: f64) -> bool {
        v.is_finite()
            && (if self.min_open {
                v > self.min
            } else {
                v >= self.min
            })
            && v <= self.max
    }

    pub(crate) fn describe(&self, unit: &str) -> String {
        let lo = if self.min_open { "above" } else { "from" };
        let unit = if unit.is_empty() {
            String::new()
        } else {
            format!(" {unit}")
        };
        if self.min_open {
            format!(
                "a number {lo} {} up to {}{unit}",
                fmt_num(self.min),
                fmt_num(self.max)
            )
        } else {
            format!(
                "a number {lo} {} to {}{unit}",
                fmt_num(self.min),
                fmt_num(self.max)
            )
        }
    }
}

/// A number as a person would write it: no trailing ".0", at most 6 significant decimals.
pub(crate) fn fmt_num(v: f64) -> String {
    if v.fract() == 0.0 && v.abs() < 1e15 {
        format!("{}", v as i64)
    } else if v.abs() >= 1e6 || (v != 0.0 && v.abs() < 1e-4) {
        format!("{v:e}")
    } else {
        let s = format!("{v:.6}");
        s.trim_end_matches('0').trim_end_matches('.').to_owned()
    }
}

/// The unit named by a field's suffix, for messages.
pub(crate) fn unit_of(key: &str) -> &'static str {
    match key.rsplit('_').next() {
        Some("mm") => "mm",
        Some("deg") => "degrees",
        Some("mhz") => "MHz",
        Some("db") => "dB",
        Some("s") if key.ends_with("cm_s") => "cm/s",
        Some("s") if key.ends_with("mm_s") => "mm/s",
        Some("s") => "s",
        _ => "",
    }
}

fn type_name(v: &Value) -> &'static str {
    match v {
        Value::Null => "null",
        Value::Bool(_) => "true/false",
        Value::Number(_) => "a number",
        Value::String(_) => "a string",
        Value::Array(_) => "a list",
        Value::Object(_) => "an object",
    }
}

fn shown(v: &Value) -> String {
    match v {
        Value::Number(n) => n.as_f64().map_or_else(|| n.to_string(), fmt_num),
        Value::String(s) if s.chars().count() <= 40 => format!("\"{s}\""),
        other => type_name(other).to_owned(),
    }
}

/// Join a parent path and a key.
pub(crate) fn join(path: &str, key: &str) -> String {
    if path.is_empty() {
        key.to_owned()
    } else {
        format!("{path}.{key}")
    }
}

/// One JSON object being read: its path, its map, and the keys it may hold.
pub(crate) struct Obj<'a> {
    path: String,
    map: &'a Map<String, Value>,
}

impl<'a> Obj<'a> {
    /// Open `v` as an object allowing only `allowed` keys.
    pub(crate) fn open(v: &'a Value, path: &str, allowed: &[&str]) -> Result<Self, SceneError> {
        let Value::Object(map) = v else {
            return Err(SceneError::at(
                path,
                format!("must be an object {{...}}, got {}", type_name(v)),
            ));
        };
        for key in map.keys() {
            if !allowed.contains(&key.as_str()) {
                return Err(SceneError::at(
                    &join(path, key),
                    format!("unknown field; allowed here: {}", allowed.join(", ")),
                ));
            }
        }
        Ok(Obj {
            path: path.to_owned(),
            map,
        })
    }

    pub(crate) fn path(&self, key: &str) -> String {
        join(&self.path, key)
    }

    pub(crate) fn get(&self, key: &str) -> Option<&'a Value> {
        self.map.get(key)
    }

    pub(crate) fn has(&self, key: &str) -> bool {
        self.map.contains_key(key)
    }

    pub(crate) fn req(&self, key: &str, what: &str) -> Result<&'a Value, SceneError> {
        self.get(key)
            .ok_or_else(|| SceneError::at(&self.path(key), format!("missing; {what} is required")))
    }

    /// A required number in `range`.
    pub(crate) fn num(&self, key: &str, range: Range) -> Result<f64, SceneError> {
        let unit = unit_of(key);
        let v = self.req(key, &range.describe(unit))?;
        number(v, &self.path(key), range, unit)
    }

    /// An optional number in `range`, `default` when absent.
    pub(crate) fn num_or(&self, key: &str, range: Range, default: f64) -> Result<f64, SceneError> {
        match self.get(key) {
            None => Ok(default),
            Some(v) => number(v, &self.path(key), range, unit_of(key)),
        }
    }

    /// A required whole number in [min, max].
    pub(crate) fn int(&self, key: &str, min: i64, max: i64) -> Result<i64, SceneError> {
        let v = self.req(key, &format!("a whole number from {min} to {max}"))?;
        integer(v, &self.path(key), min, max)
    }

    /// An optional whole number in [min, max].
    pub(crate) fn int_or(
        &self,
        key: &str,
        min: i64,
        max: i64,
        default: i64,
    ) -> Result<i64, SceneError> {
        match self.get(key) {
            None => Ok(default),
            Some(v) => integer(v, &self.path(key), min, max),
        }
    }

    /// An optional true/false.
    pub(crate) fn bool_or(&self, key: &str, default: bool) -> Result<bool, SceneError> {
        match self.get(key) {
            None => Ok(default),
            Some(Value::Bool(b)) => Ok(*b),
            Some(v) => Err(SceneError::at(
                &self.path(key),
                format!("must be true or false, got {}", shown(v)),
            )),
        }
    }

    /// An optional string of at most `max_chars` characters.
    pub(crate) fn text_or(&self, key: &str, max_chars: usize) -> Result<String, SceneError> {
        match self.get(key) {
            None => Ok(String::new()),
            Some(Value::String(s)) if s.chars().count() <= max_chars => Ok(s.clone()),
            Some(Value::String(_)) => Err(SceneError::at(
                &self.path(key),
                format!("must be text of at most {max_chars} characters"),
            )),
            Some(v) => Err(SceneError::at(
                &self.path(key),
                format!("must be text, got {}", type_name(v)),
            )),
        }
    }

    /// A required string that must be one of `choices`.
    pub(crate) fn choice(
        &self,
        key: &str,
        choices: &[&'static str],
    ) -> Result<&'static str, SceneError> {
        let list = choices
            .iter()
            .map(|c| format!("\"{c}\""))
            .collect::<Vec<_>>()
            .join(", ");
        let v = self.req(key, &format!("one of {list}"))?;
        match v {
            Value::String(s) => choices
                .iter()
                .find(|c| **c == s.as_str())
                .copied()
                .ok_or_else(|| {
                    SceneError::at(
                        &self.path(key),
                        format!("must be one of {list}, got {}", shown(v)),
                    )
                }),
            _ => Err(SceneError::at(
                &self.path(key),
                format!("must be one of {list}, got {}", shown(v)),
            )),
        }
    }
}

pub(crate) fn number(v: &Value, path: &str, range: Range, unit: &str) -> Result<f64, SceneError> {
    match v.as_f64() {
        Some(x) if range.contains(x) => Ok(x),
        Some(x) => Err(SceneError::at(
            path,
            format!("must be {}, got {}", range.describe(unit), fmt_num(x)),
        )),
        None => Err(SceneError::at(
            path,
            format!("must be {}, got {}", range.describe(unit), shown(v)),
        )),
    }
}

fn integer(v: &Value, path: &str, min: i64, max: i64) -> Result<i64, SceneError> {
    let bad = || {
        SceneError::at(
            path,
            format!(
                "must be a whole number from {min} to {max}, got {}",
                shown(v)
            ),
        )
    };
    let x = v.as_f64().ok_or_else(bad)?;
    if x.fract() != 0.0 || x < min as f64 || x > max as f64 {
        return Err(bad());
    }
    Ok(x as i64)
}

/// Read `[x, y, z]` (mm) with each coordinate in `range`.
fn point3(v: &Value, path: &str, range: Range) -> Result<[f64; 3], SceneError> {
    let Value::Array(items) = v else {
        return Err(SceneError::at(
            path,
            format!("must be a point [x, y, z] in mm, got {}", type_name(v)),
        ));
    };
    if items.len() != 3 {
        return Err(SceneError::at(
            path,
            format!(
                "must be a point [x, y, z] in mm with 3 numbers, got {}",
                items.len()
            ),
        ));
    }
    let mut out = [0.0; 3];
    for (i, item) in items.iter().enumerate() {
        out[i] = number(item, &format!("{path}[{i}]"), range, "mm")?;
    }
    Ok(out)
}

// ---- Ranges (also stated in schema/scene-v1.schema.json; a test keeps them in step) ----

/// Limits of every numeric field, by field path pattern ("[]" for any list index).
pub(crate) const LIMITS: &[(&str, Range)] = &[
    ("probe.footprint.width_mm", closed(5.0, 150.0)),
    ("probe.footprint.radius_mm", closed(5.0, 200.0)),
    ("probe.frequency_mhz", closed(1.0, 30.0)),
    ("probe.depth_mm", closed(5.0, 300.0)),
    ("probe.elevation.thickness_mm", closed(0.05, 20.0)),
    ("probe.elevation.aperture_mm", closed(0.5, 30.0)),
    ("probe.elevation.focus_mm", closed(1.0, 300.0)),
    ("probe.pose.x_mm", closed(-500.0, 500.0)),
    ("probe.pose.y_mm", closed(-500.0, 500.0)),
    ("probe.pose.rotate_deg", closed(-360.0, 360.0)),
    ("probe.pose.tilt_deg", closed(-60.0, 60.0)),
    ("probe.pose.rock_deg", closed(-60.0, 60.0)),
    ("needle.outer_diameter_mm", closed(0.1, 3.0)),
    ("needle.length_mm", closed(5.0, 300.0)),
    ("needle.bevel_deg", closed(5.0, 90.0)),
    ("needle.bevel_roll_deg", closed(-360.0, 360.0)),
    ("needle.entry.x_mm", closed(-500.0, 500.0)),
    ("needle.entry.y_mm", closed(-500.0, 500.0)),
    ("needle.azimuth_deg", closed(-360.0, 360.0)),
    ("needle.angle_deg", open_min(0.0, 90.0)),
    ("needle.inserted_mm", closed(0.0, 300.0)),
    ("tissue.layers[].thickness_mm", closed(0.1, 200.0)),
    ("structures[].path_mm[][]", closed(-500.0, 500.0)),
    ("structures[].radius_mm", closed(0.05, 50.0)),
    ("structures[].flow_cm_s", closed(-300.0, 300.0)),
    ("structures[].centre_mm[]", closed(-500.0, 500.0)),
    ("structures[].semi_axes_mm[]", closed(0.1, 100.0)),
    ("structures[].yaw_deg", closed(-360.0, 360.0)),
    ("display.gain_db", closed(-40.0, 40.0)),
    ("rehearsal.pace_mm_s", closed(0.1, 20.0)),
    ("rehearsal.step_mm", closed(0.1, 10.0)),
    ("rehearsal.advance_mm", closed(0.5, 300.0)),
    ("rehearsal.time_limit_s", closed(10.0, 3600.0)),
    ("display.tgc_db[]", closed(-30.0, 30.0)),
    ("display.dynamic_range_db", closed(20.0, 100.0)),
    ("display.doppler.scale_cm_s", closed(1.0, 300.0)),
];

pub(crate) fn limit(pattern: &str) -> Range {
    LIMITS
        .iter()
        .find(|(p, _)| *p == pattern)
        .map(|(_, r)| *r)
        .expect("every numeric field has a limit")
}

/// Gauges the table covers.
pub(crate) const GAUGE_MIN: i64 = 18;
pub(crate) const GAUGE_MAX: i64 = 27;
/// Widest sector a curved face may span, degrees.
pub(crate) const MAX_SECTOR_DEG: f64 = 150.0;
/// Most structures in one scene.
pub(crate) const MAX_STRUCTURES: usize = 64;
/// Most points in one path.
pub(crate) const MAX_PATH_POINTS: usize = 256;
/// Most tissue layers.
pub(crate) const MAX_LAYERS: usize = 16;
/// Fewest and most time-gain bands.
pub(crate) const TGC_BANDS_MIN: usize = 4;
pub(crate) const TGC_BANDS_MAX: usize = 16;

// ---- The scene ----

pub(crate) fn read_scene(v: &Value) -> Result<Scene, SceneError> {
    let top = Obj::open(
        v,
        "",
        &[
            "format",
            "version",
            "title",
            "notes",
            "probe",
            "needle",
            "tissue",
            "structures",
            "display",
            "rehearsal",
        ],
    )?;
    let format = top.req("format", "\"slicewise-scene\"")?;
    if format.as_str() != Some(super::FORMAT) {
        return Err(SceneError::at(
            "format",
            format!("must be \"{}\", got {}", super::FORMAT, shown(format)),
        ));
    }
    let version = top.req("version", "the whole number 1")?;
    match version.as_f64() {
        Some(x) if x == super::VERSION as f64 => {}
        Some(x) if x.fract() == 0.0 && x > super::VERSION as f64 => {
            return Err(SceneError::at(
                "version",
                format!(
                "this build reads version {} files; got version {} (written by a newer Slicewise?)",
                super::VERSION,
                fmt_num(x)
            ),
            ))
        }
        _ => {
            return Err(SceneError::at(
                "version",
                format!(
                    "must be the whole number {}, got {}",
                    super::VERSION,
                    shown(version)
                ),
            ))
        }
    }
    let title = top.text_or("title", 200)?;
    let notes = top.text_or("notes", 20_000)?;
    let probe = read_probe(top.req(
        "probe",
        "an object with footprint, frequency_mhz, depth_mm, elevation, pose",
    )?)?;
    let needle = read_needle(top.req("needle", "an object describing the needle")?)?;
    let tissue = match top.get("tissue") {
        None => TissueLayers::default(),
        Some(t) => read_tissue(t)?,
    };
    let structures = match top.get("structures") {
        None => Vec::new(),
        Some(s) => read_structures(s)?,
    };
    let display = match top.get("display") {
        None => DisplaySettings::default(),
        Some(d) => read_display(d)?,
    };
    let rehearsal = match top.get("rehearsal") {
        None => RehearsalSettings::default(),
        Some(r) => read_rehearsal(r, &structures)?,
    };
    Ok(Scene {
        title,
        notes,
        probe,
        needle,
        tissue,
        structures,
        display,
        rehearsal,
    })
}

fn read_rehearsal(v: &Value, structures: &[Structure]) -> Result<RehearsalSettings, SceneError> {
    let o = Obj::open(
        v,
        "rehearsal",
        &[
            "advance",
            "pace_mm_s",
            "step_mm",
            "advance_mm",
            "target",
            "time_limit_s",
        ],
    )?;
    let d = RehearsalSettings::default();
    let advance = if o.has("advance") {
        let names: Vec<&'static str> = AdvanceMode::ALL.iter().map(|m| m.name()).collect();
        let name = o.choice("advance", &names)?;
        AdvanceMode::ALL
            .into_iter()
            .find(|m| m.name() == name)
            .unwrap_or_default()
    } else {
        d.advance
    };
    let target = match o.get("target") {
        None | Some(Value::Null) => None,
        Some(Value::String(id)) => {
            if !structures.iter().any(|s| &s.id == id) {
                let ids: Vec<&str> = structures.iter().map(|s| s.id.as_str()).collect();
                let known = if ids.is_empty() {
                    "the scene has no structures".to_owned()
                } else {
                    format!("ids here: {}", ids.join(", "))
                };
                return Err(SceneError::at(
                    "rehearsal.target",
                    format!("no structure has the id \"{id}\"; {known}"),
                ));
            }
            Some(id.clone())
        }
        Some(other) => {
            return Err(SceneError::at(
                "rehearsal.target",
                format!("must be a structure id (text), got {}", shown(other)),
            ))
        }
    };
    Ok(RehearsalSettings {
        advance,
        pace_mm_s: o.num_or("pace_mm_s", limit("rehearsal.pace_mm_s"), d.pace_mm_s)?,
        step_mm: o.num_or("step_mm", limit("rehearsal.step_mm"), d.step_mm)?,
        advance_mm: o.num_or("advance_mm", limit("rehearsal.advance_mm"), d.advance_mm)?,
        target,
        time_limit_s: o.num_or(
            "time_limit_s",
            limit("rehearsal.time_limit_s"),
            d.time_limit_s,
        )?,
    })
}

fn read_display(v: &Value) -> Result<DisplaySettings, SceneError> {
    let o = Obj::open(
        v,
        "display",
        &[
            "gain_db",
            "tgc_db",
            "dynamic_range_db",
            "grey_levels",
            "doppler",
        ],
    )?;
    let defaults = DisplaySettings::default();
    let tgc_db = match o.get("tgc_db") {
        None => defaults.tgc_db,
        Some(Value::Array(items))
            if (TGC_BANDS_MIN..=TGC_BANDS_MAX).contains(&items.len()) =>
        {
            let range = limit("display.tgc_db[]");
            let mut out = Vec::with_capacity(items.len());
            for (i, item) in items.iter().enumerate() {
                out.push(number(item, &format!("display.tgc_db[{i}]"), range, "dB")?);
            }
            out
        }
        Some(Value::Array(items)) => {
            return Err(SceneError::at(
                "display.tgc_db",
                format!(
                    "must hold {TGC_BANDS_MIN} to {TGC_BANDS_MAX} values (dB, one per depth band from the face down), got {}",
                    items.len()
                ),
            ))
        }
        Some(other) => {
            return Err(SceneError::at(
                "display.tgc_db",
                format!(
                    "must be a list of {TGC_BANDS_MIN} to {TGC_BANDS_MAX} numbers in dB, got {}",
                    type_name(other)
                ),
            ))
        }
    };
    let doppler = match o.get("doppler") {
        None => defaults.doppler,
        Some(dv) => {
            let d = Obj::open(dv, "display.doppler", &["mode", "scale_cm_s"])?;
            let names: Vec<&'static str> = DopplerMode::ALL.iter().map(|m| m.name()).collect();
            let mode = if d.has("mode") {
                let name = d.choice("mode", &names)?;
                DopplerMode::ALL
                    .into_iter()
                    .find(|m| m.name() == name)
                    .unwrap_or_default()
            } else {
                DopplerMode::Off
            };
            DopplerSettings {
                mode,
                scale_cm_s: d.num_or(
                    "scale_cm_s",
                    limit("display.doppler.scale_cm_s"),
                    DEFAULT_DOPPLER_SCALE_CM_S,
                )?,
            }
        }
    };
    Ok(DisplaySettings {
        gain_db: o.num_or("gain_db", limit("display.gain_db"), defaults.gain_db)?,
        tgc_db,
        dynamic_range_db: o.num_or(
            "dynamic_range_db",
            limit("display.dynamic_range_db"),
            defaults.dynamic_range_db,
        )?,
        grey_levels: o.int_or("grey_levels", 2, 256, 256)? as u32,
        doppler,
    })
}

fn read_probe(v: &Value) -> Result<Probe, SceneError> {
    let o = Obj::open(
        v,
        "probe",
        &[
            "footprint",
            "frequency_mhz",
            "depth_mm",
            "elevation",
            "pose",
        ],
    )?;
    let fp_v = o.req(
        "footprint",
        "an object {\"kind\": \"linear\" | \"curved\", ...}",
    )?;
    let kind = Obj::open(fp_v, "probe.footprint", &["kind", "width_mm", "radius_mm"])?
        .choice("kind", &["linear", "curved"])?;
    let footprint = if kind == "linear" {
        let f = Obj::open(fp_v, "probe.footprint", &["kind", "width_mm"])?;
        Footprint::Linear {
            width_mm: f.num("width_mm", limit("probe.footprint.width_mm"))?,
        }
    } else {
        let f = Obj::open(fp_v, "probe.footprint", &["kind", "width_mm", "radius_mm"])?;
        let radius_mm = f.num("radius_mm", limit("probe.footprint.radius_mm"))?;
        let width_mm = f.num("width_mm", limit("probe.footprint.width_mm"))?;
        let max_width = MAX_SECTOR_DEG.to_radians() * radius_mm;
        if width_mm > max_width {
            return Err(SceneError::at(
                "probe.footprint.width_mm",
                format!(
                    "a curved face of radius {} mm may span at most {}°, so width_mm (its arc length) must be at most {} mm, got {}",
                    fmt_num(radius_mm),
                    fmt_num(MAX_SECTOR_DEG),
                    fmt_num((max_width * 10.0).floor() / 10.0),
                    fmt_num(width_mm)
                ),
            ));
        }
        Footprint::Curved {
            width_mm,
            radius_mm,
        }
    };
    let frequency_mhz = o.num("frequency_mhz", limit("probe.frequency_mhz"))?;
    let depth_mm = o.num("depth_mm", limit("probe.depth_mm"))?;
    let el_v = o.req(
        "elevation",
        "an object {\"model\": \"focused\" | \"uniform\", ...}",
    )?;
    let model = Obj::open(
        el_v,
        "probe.elevation",
        &["model", "thickness_mm", "aperture_mm", "focus_mm"],
    )?
    .choice("model", &["focused", "uniform"])?;
    let elevation = if model == "uniform" {
        let e = Obj::open(el_v, "probe.elevation", &["model", "thickness_mm"])?;
        ElevationProfile::Uniform {
            thickness_mm: e.num("thickness_mm", limit("probe.elevation.thickness_mm"))?,
        }
    } else {
        let e = Obj::open(
            el_v,
            "probe.elevation",
            &["model", "aperture_mm", "focus_mm"],
        )?;
        ElevationProfile::Focused {
            aperture_mm: e.num("aperture_mm", limit("probe.elevation.aperture_mm"))?,
            focus_mm: e.num("focus_mm", limit("probe.elevation.focus_mm"))?,
        }
    };
    let pose = match o.get("pose") {
        None => Pose::default(),
        Some(pv) => {
            let p = Obj::open(
                pv,
                "probe.pose",
                &["x_mm", "y_mm", "rotate_deg", "tilt_deg", "rock_deg"],
            )?;
            Pose {
                x_mm: p.num_or("x_mm", limit("probe.pose.x_mm"), 0.0)?,
                y_mm: p.num_or("y_mm", limit("probe.pose.y_mm"), 0.0)?,
                rotate_deg: p.num_or("rotate_deg", limit("probe.pose.rotate_deg"), 0.0)?,
                tilt_deg: p.num_or("tilt_deg", limit("probe.pose.tilt_deg"), 0.0)?,
                rock_deg: p.num_or("rock_deg", limit("probe.pose.rock_deg"), 0.0)?,
            }
        }
    };
    Ok(Probe {
        footprint,
        frequency_mhz,
        depth_mm,
        elevation,
        pose,
    })
}

fn read_needle(v: &Value) -> Result<Needle, SceneError> {
    let o = Obj::open(
        v,
        "needle",
        &[
            "gauge",
            "outer_diameter_mm",
            "length_mm",
            "bevel_deg",
            "bevel_roll_deg",
            "entry",
            "azimuth_deg",
            "angle_deg",
            "inserted_mm",
        ],
    )?;
    let size = match (o.has("gauge"), o.has("outer_diameter_mm")) {
        (true, true) => {
            return Err(SceneError::at(
                "needle",
                "give either gauge or outer_diameter_mm, not both".into(),
            ));
        }
        (false, false) => {
            return Err(SceneError::at(
                "needle.gauge",
                format!("missing; give gauge ({GAUGE_MIN} to {GAUGE_MAX}) or outer_diameter_mm"),
            ));
        }
        (true, false) => NeedleSize::Gauge {
            gauge: o.int("gauge", GAUGE_MIN, GAUGE_MAX)? as u8,
        },
        (false, true) => NeedleSize::Diameter {
            outer_diameter_mm: o.num("outer_diameter_mm", limit("needle.outer_diameter_mm"))?,
        },
    };
    let length_mm = o.num("length_mm", limit("needle.length_mm"))?;
    let bevel_deg = o.num("bevel_deg", limit("needle.bevel_deg"))?;
    let bevel_roll_deg = o.num_or("bevel_roll_deg", limit("needle.bevel_roll_deg"), 0.0)?;
    let ev = o.req("entry", "an object {\"x_mm\": …, \"y_mm\": …} on the skin")?;
    let e = Obj::open(ev, "needle.entry", &["x_mm", "y_mm"])?;
    let entry = Entry {
        x_mm: e.num("x_mm", limit("needle.entry.x_mm"))?,
        y_mm: e.num("y_mm", limit("needle.entry.y_mm"))?,
    };
    let azimuth_deg = o.num("azimuth_deg", limit("needle.azimuth_deg"))?;
    let angle_deg = o.num("angle_deg", limit("needle.angle_deg"))?;
    let inserted_mm = o.num("inserted_mm", closed(0.0, length_mm))?;
    Ok(Needle {
        size,
        length_mm,
        bevel_deg,
        bevel_roll_deg,
        entry,
        azimuth_deg,
        angle_deg,
        inserted_mm,
    })
}

fn read_tissue(v: &Value) -> Result<TissueLayers, SceneError> {
    let o = Obj::open(v, "tissue", &["layers"])?;
    let lv = o.req(
        "layers",
        "a list of {\"kind\", \"thickness_mm\"} from the skin down",
    )?;
    let Value::Array(items) = lv else {
        return Err(SceneError::at(
            "tissue.layers",
            format!("must be a list of layers, got {}", type_name(lv)),
        ));
    };
    if items.is_empty() || items.len() > MAX_LAYERS {
        return Err(SceneError::at(
            "tissue.layers",
            format!("must hold 1 to {MAX_LAYERS} layers, got {}", items.len()),
        ));
    }
    let names: Vec<&'static str> = LayerKind::ALL.iter().map(|k| k.name()).collect();
    let mut layers = Vec::with_capacity(items.len());
    for (i, item) in items.iter().enumerate() {
        let path = format!("tissue.layers[{i}]");
        let l = Obj::open(item, &path, &["kind", "thickness_mm"])?;
        let kind_name = l.choice("kind", &names)?;
        let kind = LayerKind::ALL
            .into_iter()
            .find(|k| k.name() == kind_name)
            .unwrap_or(LayerKind::Muscle);
        layers.push(TissueLayer {
            kind,
            thickness_mm: l.num("thickness_mm", limit("tissue.layers[].thickness_mm"))?,
        });
    }
    Ok(TissueLayers { layers })
}

fn read_structures(v: &Value) -> Result<Vec<Structure>, SceneError> {
    let Value::Array(items) = v else {
        return Err(SceneError::at(
            "structures",
            format!("must be a list, got {}", type_name(v)),
        ));
    };
    if items.len() > MAX_STRUCTURES {
        return Err(SceneError::at(
            "structures",
            format!("at most {MAX_STRUCTURES} structures, got {}", items.len()),
        ));
    }
    let mut out: Vec<Structure> = Vec::with_capacity(items.len());
    for (i, item) in items.iter().enumerate() {
        let path = format!("structures[{i}]");
        let s = read_structure(item, &path)?;
        if let Some(j) = out.iter().position(|o| o.id == s.id) {
            return Err(SceneError::at(
                &join(&path, "id"),
                format!(
                    "\"{}\" is already used by structures[{j}]; ids must be unique",
                    s.id
                ),
            ));
        }
        out.push(s);
    }
    Ok(out)
}

fn read_structure(v: &Value, path: &str) -> Result<Structure, SceneError> {
    let all = [
        "id",
        "kind",
        "path_mm",
        "radius_mm",
        "flow_cm_s",
        "fascicles",
        "root",
        "centre_mm",
        "semi_axes_mm",
        "yaw_deg",
    ];
    let kind = Obj::open(v, path, &all)?.choice("kind", &["nerve", "vessel", "bone", "fluid"])?;
    let allowed: &[&str] = match kind {
        "nerve" => &["id", "kind", "path_mm", "radius_mm", "fascicles", "root"],
        "vessel" => &["id", "kind", "path_mm", "radius_mm", "flow_cm_s"],
        "bone" => &["id", "kind", "path_mm", "radius_mm"],
        _ => &["id", "kind", "centre_mm", "semi_axes_mm", "yaw_deg"],
    };
    let o = Obj::open(v, path, allowed)?;
    let id = match o.req("id", "a short unique name such as \"n1\"")? {
        Value::String(s) if !s.trim().is_empty() && s.chars().count() <= 64 => s.clone(),
        other => {
            return Err(SceneError::at(
                &o.path("id"),
                format!(
                    "must be a non-empty name of at most 64 characters, got {}",
                    shown(other)
                ),
            ))
        }
    };
    let (kind, shape) = match kind {
        "fluid" => {
            let centre_mm = point3(
                o.req("centre_mm", "a point [x, y, z] in mm")?,
                &o.path("centre_mm"),
                limit("structures[].centre_mm[]"),
            )?;
            let semi_axes_mm = point3(
                o.req("semi_axes_mm", "three semi-axes [a, b, c] in mm")?,
                &o.path("semi_axes_mm"),
                limit("structures[].semi_axes_mm[]"),
            )?;
            let yaw_deg = o.num_or("yaw_deg", limit("structures[].yaw_deg"), 0.0)?;
            (
                StructureKind::Fluid,
                Shape::Ellipsoid(Ellipsoid {
                    centre_mm,
                    semi_axes_mm,
                    yaw_deg,
                }),
            )
        }
        tube_kind => {
            let kind = match tube_kind {
                "nerve" => StructureKind::Nerve {
                    fascicles: o.int_or("fascicles", 0, 60, 0)? as u32,
                    root: o.bool_or("root", false)?,
                },
                "vessel" => StructureKind::Vessel {
                    flow_cm_s: o.num_or("flow_cm_s", limit("structures[].flow_cm_s"), 0.0)?,
                },
                _ => StructureKind::Bone,
            };
            let pv = o.req("path_mm", "a list of two or more points [x, y, z] in mm")?;
            let Value::Array(pts) = pv else {
                return Err(SceneError::at(
                    &o.path("path_mm"),
                    format!(
                        "must be a list of points [x, y, z] in mm, got {}",
                        type_name(pv)
                    ),
                ));
            };
            if pts.len() < 2 || pts.len() > MAX_PATH_POINTS {
                return Err(SceneError::at(
                    &o.path("path_mm"),
                    format!("must hold 2 to {MAX_PATH_POINTS} points, got {}", pts.len()),
                ));
            }
            let mut path_mm: Vec<[f64; 3]> = Vec::with_capacity(pts.len());
            for (j, p) in pts.iter().enumerate() {
                let pp = format!("{}[{j}]", o.path("path_mm"));
                let q = point3(p, &pp, limit("structures[].path_mm[][]"))?;
                if let Some(prev) = path_mm.last() {
                    let d = ((q[0] - prev[0]).powi(2)
                        + (q[1] - prev[1]).powi(2)
                        + (q[2] - prev[2]).powi(2))
                    .sqrt();
                    if d < 1e-3 {
                        return Err(SceneError::at(&pp, "repeats the previous point; consecutive points must be at least 0.001 mm apart".into()));
                    }
                }
                path_mm.push(q);
            }
            let radius_mm = o.num("radius_mm", limit("structures[].radius_mm"))?;
            (kind, Shape::Tube(Tube { path_mm, radius_mm }))
        }
    };
    Ok(Structure { id, kind, shape })
}

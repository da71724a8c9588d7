//! Writing a scene as a v1 JSON value, every field explicit, in a fixed order.

use serde_json::{json, Map, Value};

use crate::scene::*;

pub(crate) fn write_scene(s: &Scene) -> Value {
    let mut top = Map::new();
    top.insert("format".into(), json!(super::FORMAT));
    top.insert("version".into(), json!(super::VERSION));
    top.insert("title".into(), json!(s.title));
    top.insert("notes".into(), json!(s.notes));
    top.insert("probe".into(), write_probe(&s.probe));
    top.insert("needle".into(), write_needle(&s.needle));
    top.insert(
        "tissue".into(),
        json!({"layers": s.tissue.layers.iter().map(|l| json!({"kind": l.kind.name(), "thickness_mm": l.thickness_mm})).collect::<Vec<_>>()}),
    );
    top.insert(
        "structures".into(),
        Value::Array(s.structures.iter().map(write_structure).collect()),
    );
    top.insert("display".into(), write_display(&s.display));
    let r = &s.rehearsal;
    let mut rehearsal = Map::new();
    rehearsal.insert("advance".into(), json!(r.advance.name()));
    rehearsal.insert("pace_mm_s".into(), json!(r.pace_mm_s));
    rehearsal.insert("step_mm".into(), json!(r.step_mm));
    rehearsal.insert("advance_mm".into(), json!(r.advance_mm));
    if let Some(t) = &r.target {
        rehearsal.insert("target".into(), json!(t));
    }
    rehearsal.insert("time_limit_s".into(), json!(r.time_limit_s));
    top.insert("rehearsal".into(), Value::Object(rehearsal));
    Value::Object(top)
}

fn write_probe(p: &Probe) -> Value {
    let footprint = match p.footprint {
        Footprint::Linear { width_mm } => json!({"kind": "linear", "width_mm": width_mm}),
        Footprint::Curved {
            width_mm,
            radius_mm,
        } => json!({"kind": "curved", "width_mm": width_mm, "radius_mm": radius_mm}),
    };
    let elevation = match p.elevation {
        ElevationProfile::Uniform { thickness_mm } => {
            json!({"model": "uniform", "thickness_mm": thickness_mm})
        }
        ElevationProfile::Focused {
            aperture_mm,
            focus_mm,
        } => {
            json!({"model": "focused", "aperture_mm": aperture_mm, "focus_mm": focus_mm})
        }
    };
    let q = &p.pose;
    json!({
        "footprint": footprint,
        "frequency_mhz": p.frequency_mhz,
        "depth_mm": p.depth_mm,
        "elevation": elevation,
        "pose": {"x_mm": q.x_mm, "y_mm": q.y_mm, "rotate_deg": q.rotate_deg, "tilt_deg": q.tilt_deg, "rock_deg": q.rock_deg},
    })
}

fn write_needle(n: &Needle) -> Value {
    let mut m = Map::new();
    match n.size {
        NeedleSize::Gauge { gauge } => m.insert("gauge".into(), json!(gauge)),
        NeedleSize::Diameter { outer_diameter_mm } => {
            m.insert("outer_diameter_mm".into(), json!(outer_diameter_mm))
        }
    };
    m.insert("length_mm".into(), json!(n.length_mm));
    m.insert("bevel_deg".into(), json!(n.bevel_deg));
    m.insert("bevel_roll_deg".into(), json!(n.bevel_roll_deg));
    m.insert(
        "entry".into(),
        json!({"x_mm": n.entry.x_mm, "y_mm": n.entry.y_mm}),
    );
    m.insert("azimuth_deg".into(), json!(n.azimuth_deg));
    m.insert("angle_deg".into(), json!(n.angle_deg));
    m.insert("inserted_mm".into(), json!(n.inserted_mm));
    Value::Object(m)
}

fn write_structure(s: &Structure) -> Value {
    let mut m = Map::new();
    m.insert("id".into(), json!(s.id));
    m.insert("kind".into(), json!(s.kind.name()));
    match &s.shape {
        Shape::Tube(t) => {
            m.insert("path_mm".into(), json!(t.path_mm));
            m.insert("radius_mm".into(), json!(t.radius_mm));
        }
        Shape::Ellipsoid(e) => {
            m.insert("centre_mm".into(), json!(e.centre_mm));
            m.insert("semi_axes_mm".into(), json!(e.semi_axes_mm));
            m.insert("yaw_deg".into(), json!(e.yaw_deg));
        }
    }
    match s.kind {
        StructureKind::Nerve { fascicles, root } => {
            m.insert("fascicles".into(), json!(fascicles));
            m.insert("root".into(), json!(root));
        }
        StructureKind::Vessel { flow_cm_s } => {
            m.insert("flow_cm_s".into(), json!(flow_cm_s));
        }
        StructureKind::Bone | StructureKind::Fluid => {}
    }
    Value::Object(m)
}

fn write_display(d: &DisplaySettings) -> Value {
    json!({
        "gain_db": d.gain_db,
        "tgc_db": d.tgc_db,
        "dynamic_range_db": d.dynamic_range_db,
        "grey_levels": d.grey_levels,
        "doppler": {"mode": d.doppler.mode.name(), "scale_cm_s": d.doppler.scale_cm_s},
    })
}

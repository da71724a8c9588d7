//! The browser boundary: the only file that imports wasm-bindgen. One handle holds the scene;
//! small results cross as plain JS objects (serde-wasm-bindgen); errors cross as `JsError` with
//! the same text the command line prints. Nothing here panics on user input.

use serde::Serialize;
use wasm_bindgen::prelude::*;

use crate::{
    load_scene_str, save_scene_string, scene_to_value, section, set_scene_field, set_scene_number,
    Footprint, Scene, Shape, Slab,
};

fn to_js<T: Serialize + ?Sized>(v: &T) -> Result<JsValue, JsError> {
    v.serialize(&serde_wasm_bindgen::Serializer::json_compatible())
        .map_err(|e| JsError::new(&e.to_string()))
}

/// Install a panic hook that logs to the console (only with the `panic-hook` feature).
#[wasm_bindgen(start)]
pub fn start() {
    #[cfg(feature = "panic-hook")]
    console_error_panic_hook::set_once();
}

/// The crate version, for the page footer and saved reports.
#[wasm_bindgen]
pub fn version() -> String {
    env!("CARGO_PKG_VERSION").to_owned()
}

/// Every numeric field's allowed range: `[[pattern, min, max], ...]` ("[]" = any index).
#[wasm_bindgen(js_name = fieldLimits)]
pub fn field_limits() -> Result<JsValue, JsError> {
    to_js(&crate::field_limits())
}

#[derive(serde::Deserialize)]
struct JsPose {
    x_mm: f64,
    y_mm: f64,
    rotate_deg: f64,
    tilt_deg: f64,
    rock_deg: f64,
}

#[derive(serde::Deserialize)]
struct JsEvent {
    t_s: f64,
    inserted_mm: f64,
    pose: JsPose,
    declared: Option<String>,
}

/// The wasm linear memory, so the page can view rendered pixels in place
/// (`new Uint8ClampedArray(wasmMemory().buffer, echo.rgbaPtr(), echo.rgbaLen())`).
#[wasm_bindgen(js_name = wasmMemory)]
pub fn wasm_memory() -> JsValue {
    wasm_bindgen::memory()
}

/// The simulated screen renderer; keeps its tables and buffers between frames. After
/// `render`, the RGBA pixels (width × height × 4) sit at `rgbaPtr()` in `wasmMemory()` until
/// the next call.
#[wasm_bindgen]
pub struct EchoView {
    renderer: crate::Renderer,
    ptr: usize,
    len: usize,
    fingerprint: u64,
}

impl Default for EchoView {
    fn default() -> Self {
        Self::new()
    }
}

#[wasm_bindgen]
impl EchoView {
    /// A renderer with empty buffers.
    #[wasm_bindgen(constructor)]
    pub fn new() -> EchoView {
        EchoView {
            renderer: crate::Renderer::new(),
            ptr: 0,
            len: 0,
            fingerprint: 0,
        }
    }

    /// Render the session's scene at `width` × `height` pixels (16 to 4096 each); returns the
    /// frame's meta (mm per pixel, the centre of pixel (0, 0) in image mm, display settings,
    /// Doppler legend, frame rates). Errors name `width` or `height`.
    pub fn render(
        &mut self,
        session: &Session,
        width: u32,
        height: u32,
    ) -> Result<JsValue, JsError> {
        let out = self
            .renderer
            .render(&session.scene, width, height)
            .map_err(|e| JsError::new(&e.to_string()))?;
        self.ptr = out.rgba().as_ptr() as usize;
        self.len = out.rgba().len();
        self.fingerprint = out.fingerprint();
        to_js(out.meta())
    }

    /// Address of the last frame's RGBA bytes in `wasmMemory()`.
    #[wasm_bindgen(js_name = rgbaPtr)]
    pub fn rgba_ptr(&self) -> usize {
        self.ptr
    }

    /// Length of the last frame's RGBA bytes.
    #[wasm_bindgen(js_name = rgbaLen)]
    pub fn rgba_len(&self) -> usize {
        self.len
    }

    /// FNV-1a 64 of the last frame's RGBA bytes, 16 hex digits (equals the CLI's
    /// `fingerprint_fnv1a64` for the same scene and size).
    pub fn fingerprint(&self) -> String {
        format!("{:016x}", self.fingerprint)
    }
}

/// One scene being explored on the page.
#[wasm_bindgen]
pub struct Session {
    scene: Scene,
}

/// Drawing data for the 3D and side views, world millimetres.
#[derive(Serialize)]
struct Geometry {
    origin: [f64; 3],
    lateral: [f64; 3],
    beam: [f64; 3],
    elevation: [f64; 3],
    footprint: &'static str,
    width_mm: f64,
    radius_mm: f64,
    depth_mm: f64,
    /// [range_mm, full thickness_mm] rows from the face to the display depth.
    slab: Vec<[f64; 2]>,
    entry: [f64; 3],
    tip: [f64; 3],
    direction: [f64; 3],
    needle_radius_mm: f64,
    bevel_length_mm: f64,
    bevel_facing: [f64; 3],
    /// Depths of tissue-layer boundaries, mm.
    layer_boundaries_mm: Vec<f64>,
    structures: Vec<GeoStructure>,
}

#[derive(Serialize)]
struct GeoStructure {
    id: String,
    kind: &'static str,
    path_mm: Vec<[f64; 3]>,
    radius_mm: f64,
    centre_mm: [f64; 3],
    semi_axes_mm: [f64; 3],
    yaw_deg: f64,
}

impl Session {
    fn geometry_data(&self) -> Geometry {
        let s = &self.scene;
        let slab = Slab::of_probe(&s.probe);
        let f = slab.frame;
        let rows = 48;
        let profile = (0..=rows)
            .map(|i| {
                let z = s.probe.depth_mm * i as f64 / rows as f64;
                [z, slab.profile.thickness_mm(z)]
            })
            .collect();
        let (footprint, radius_mm) = match s.probe.footprint {
            Footprint::Linear { .. } => ("linear", 0.0),
            Footprint::Curved { radius_mm, .. } => ("curved", radius_mm),
        };
        Geometry {
            origin: f.origin.into(),
            lateral: f.lateral.into(),
            beam: f.beam.into(),
            elevation: f.elevation.into(),
            footprint,
            width_mm: s.probe.footprint.width_mm(),
            radius_mm,
            depth_mm: s.probe.depth_mm,
            slab: profile,
            entry: s.needle.entry_point().into(),
            tip: s.needle.tip().into(),
            direction: s.needle.direction().into(),
            needle_radius_mm: s.needle.radius_mm(),
            bevel_length_mm: s.needle.bevel_length_mm(),
            bevel_facing: s.needle.bevel_facing().into(),
            layer_boundaries_mm: s.tissue.boundaries_mm(),
            structures: s
                .structures
                .iter()
                .map(|st| match &st.shape {
                    Shape::Tube(t) => GeoStructure {
                        id: st.id.clone(),
                        kind: st.kind.name(),
                        path_mm: t.path_mm.clone(),
                        radius_mm: t.radius_mm,
                        centre_mm: [0.0; 3],
                        semi_axes_mm: [0.0; 3],
                        yaw_deg: 0.0,
                    },
                    Shape::Ellipsoid(e) => GeoStructure {
                        id: st.id.clone(),
                        kind: st.kind.name(),
                        path_mm: Vec::new(),
                        radius_mm: 0.0,
                        centre_mm: e.centre_mm,
                        semi_axes_mm: e.semi_axes_mm,
                        yaw_deg: e.yaw_deg,
                    },
                })
                .collect(),
        }
    }
}

#[wasm_bindgen]
impl Session {
    /// Open a session on scene-file text; the error names the field.
    #[wasm_bindgen(constructor)]
    pub fn new(scene_text: &str) -> Result<Session, JsError> {
        let scene = load_scene_str(scene_text).map_err(|e| JsError::new(&e.to_string()))?;
        Ok(Session { scene })
    }

    /// Replace the scene with scene-file text. On error the current scene stays.
    pub fn load(&mut self, scene_text: &str) -> Result<(), JsError> {
        self.scene = load_scene_str(scene_text).map_err(|e| JsError::new(&e.to_string()))?;
        Ok(())
    }

    /// The scene as scene-file text (v1, every field explicit).
    pub fn save(&self) -> String {
        save_scene_string(&self.scene)
    }

    /// The scene as a plain object in the file's shape.
    pub fn scene(&self) -> Result<JsValue, JsError> {
        to_js(&scene_to_value(&self.scene))
    }

    /// Set any field by its scene path (e.g. `probe.elevation`) to a JSON-compatible value.
    /// On error the scene is unchanged and the message names the field and its range.
    pub fn set(&mut self, path: &str, value: JsValue) -> Result<(), JsError> {
        let v: serde_json::Value = serde_wasm_bindgen::from_value(value)
            .map_err(|e| JsError::new(&format!("{path}: {e}")))?;
        self.scene =
            set_scene_field(&self.scene, path, v).map_err(|e| JsError::new(&e.to_string()))?;
        Ok(())
    }

    /// Set a numeric field by its scene path (the slider fast path).
    #[wasm_bindgen(js_name = setNumber)]
    pub fn set_number(&mut self, path: &str, value: f64) -> Result<(), JsError> {
        set_scene_number(&mut self.scene, path, value).map_err(|e| JsError::new(&e.to_string()))
    }

    /// The section report (the same JSON as `slicewise section`).
    pub fn section(&self) -> Result<JsValue, JsError> {
        to_js(&section(&self.scene))
    }

    /// Drawing data for the 3D scene view and the side view, world mm.
    pub fn geometry(&self) -> Result<JsValue, JsError> {
        to_js(&self.geometry_data())
    }

    /// The capture solve (the same JSON as `slicewise capture`): tilt and slide that put the tip
    /// on the centre plane, their windows, and the reason for any that is null.
    pub fn capture(&self) -> Result<JsValue, JsError> {
        to_js(&crate::capture(&self.scene))
    }

    /// Score a rehearsal log: `events` is an array of `{t_s, inserted_mm, pose: {x_mm, y_mm,
    /// rotate_deg, tilt_deg, rock_deg}, declared: "tip" | "shaft" | null}`; `target` a structure
    /// id or undefined (nearest nerve).
    #[wasm_bindgen(js_name = scoreRehearsal)]
    pub fn score_rehearsal(
        &self,
        events: JsValue,
        target: Option<String>,
    ) -> Result<JsValue, JsError> {
        let raw: Vec<JsEvent> = serde_wasm_bindgen::from_value(events)
            .map_err(|e| JsError::new(&format!("rehearsal log: {e}")))?;
        let mut evs = Vec::with_capacity(raw.len());
        for (i, e) in raw.iter().enumerate() {
            let p = &e.pose;
            let nums = [
                e.t_s,
                e.inserted_mm,
                p.x_mm,
                p.y_mm,
                p.rotate_deg,
                p.tilt_deg,
                p.rock_deg,
            ];
            if nums.iter().any(|v| !v.is_finite()) {
                return Err(JsError::new(&format!(
                    "rehearsal log[{i}]: every number must be finite"
                )));
            }
            let declared = match e.declared.as_deref() {
                None => None,
                Some("tip") => Some(crate::Declaration::Tip),
                Some("shaft") => Some(crate::Declaration::Shaft),
                Some(other) => return Err(JsError::new(&format!("rehearsal log[{i}].declared: must be \"tip\", \"shaft\" or null, got \"{other}\""))),
            };
            evs.push(crate::RehearsalEvent {
                t_s: e.t_s,
                inserted_mm: e.inserted_mm,
                pose: crate::Pose {
                    x_mm: p.x_mm,
                    y_mm: p.y_mm,
                    rotate_deg: p.rotate_deg,
                    tilt_deg: p.tilt_deg,
                    rock_deg: p.rock_deg,
                },
                declared,
            });
        }
        if let Some(t) = target.as_deref() {
            if !self.scene.structures.iter().any(|s| s.id == t) {
                return Err(JsError::new(&format!(
                    "rehearsal target: no structure with id \"{t}\""
                )));
            }
        }
        to_js(&crate::score_rehearsal(
            &self.scene,
            &evs,
            target.as_deref(),
        ))
    }

    /// The walking schedule for an advance from `from_mm` to `to_mm` in steps of `step_mm`
    /// (the same JSON as `slicewise walk`). Errors name the page's fields (`walk.from_mm`,
    /// `walk.to_mm`, `walk.step_mm`) and the allowed range.
    pub fn walk(&self, from_mm: f64, to_mm: f64, step_mm: f64) -> Result<JsValue, JsError> {
        crate::check_walk(&self.scene, from_mm, to_mm, step_mm, |f| {
            format!("walk.{f}")
        })
        .map_err(|e| JsError::new(&e))?;
        to_js(&crate::walk(&self.scene, from_mm, to_mm, step_mm))
    }
}

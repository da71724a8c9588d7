//! Helpers for the echo tests: small invented scenes built from JSON, and measurements of the
//! rendered grey image in millimetres.

#![allow(dead_code, unreachable_pub, missing_docs)]

use serde_json::{json, Value};
use slicewise::*;

/// A plain linear-probe scene: 40 mm face, 10 MHz, 40 mm deep, a uniform 1 mm slab, muscle
/// only, the needle parked (nothing inserted), no structures, a wide dynamic range so nothing
/// clips. `edit` changes the JSON before loading.
pub fn scene(edit: impl FnOnce(&mut Value)) -> Scene {
    let mut v = json!({
        "format": "slicewise-scene", "version": 1,
        "title": "echo test", "notes": "invented",
        "probe": {
            "footprint": {"kind": "linear", "width_mm": 40},
            "frequency_mhz": 10, "depth_mm": 40,
            "elevation": {"model": "uniform", "thickness_mm": 1.0},
            "pose": {"x_mm": 0, "y_mm": 0, "rotate_deg": 0, "tilt_deg": 0, "rock_deg": 0}
        },
        "needle": {
            "gauge": 22, "length_mm": 80, "bevel_deg": 30, "bevel_roll_deg": 0,
            "entry": {"x_mm": -19, "y_mm": 0},
            "azimuth_deg": 0, "angle_deg": 30, "inserted_mm": 0
        },
        "tissue": {"layers": [{"kind": "muscle", "thickness_mm": 200}]},
        "structures": [],
        "display": {"dynamic_range_db": 100, "gain_db": 0}
    });
    edit(&mut v);
    load_scene_value(&v).unwrap_or_else(|e| panic!("test scene invalid: {e}"))
}

/// A rendered frame's grey image and meta.
pub struct Frame {
    pub grey: Vec<u8>,
    pub rgba: Vec<u8>,
    pub meta: RenderMeta,
}

pub fn render(scene: &Scene, w: u32, h: u32) -> Frame {
    let mut r = Renderer::new();
    let out = r.render(scene, w, h).expect("size in range");
    Frame {
        grey: out.grey().to_vec(),
        rgba: out.rgba().to_vec(),
        meta: out.meta().clone(),
    }
}

impl Frame {
    pub fn width(&self) -> usize {
        self.meta.width_px as usize
    }
    pub fn height(&self) -> usize {
        self.meta.height_px as usize
    }
    /// Pixel column of lateral position u, mm (nearest).
    pub fn x_of(&self, u: f64) -> usize {
        let x = ((u - self.meta.top_left_mm.lateral_mm) / self.meta.mm_per_px.lateral).round();
        (x.max(0.0) as usize).min(self.width() - 1)
    }
    /// Pixel row of depth v, mm (nearest).
    pub fn y_of(&self, v: f64) -> usize {
        let y = ((v - self.meta.top_left_mm.depth_mm) / self.meta.mm_per_px.depth).round();
        (y.max(0.0) as usize).min(self.height() - 1)
    }
    pub fn grey_at(&self, u: f64, v: f64) -> u8 {
        self.grey[self.y_of(v) * self.width() + self.x_of(u)]
    }
    /// Level of a grey value in dB re full scale (linear part of the log compression).
    pub fn db_of(&self, g: f64) -> f64 {
        let dr = self.meta.display.dynamic_range_db;
        g * dr / 255.0 - dr
    }
    /// Mean grey over the rectangle u ∈ [u0, u1], v ∈ [v0, v1] (mm), as a level in dB: the
    /// mean of the log-compressed values, so speckle's log bias cancels between regions.
    pub fn mean_db(&self, u: (f64, f64), v: (f64, f64)) -> f64 {
        let (x0, x1) = (self.x_of(u.0), self.x_of(u.1));
        let (y0, y1) = (self.y_of(v.0), self.y_of(v.1));
        let mut sum = 0.0;
        let mut n = 0.0;
        for y in y0..=y1 {
            for x in x0..=x1 {
                sum += self.grey[y * self.width() + x] as f64;
                n += 1.0;
            }
        }
        self.db_of(sum / n)
    }
    /// Fraction of pixels in the rectangle at grey 0 or 255 (clipped).
    pub fn clipped_share(&self, u: (f64, f64), v: (f64, f64)) -> f64 {
        let (x0, x1) = (self.x_of(u.0), self.x_of(u.1));
        let (y0, y1) = (self.y_of(v.0), self.y_of(v.1));
        let mut c = 0.0;
        let mut n = 0.0;
        for y in y0..=y1 {
            for x in x0..=x1 {
                let g = self.grey[y * self.width() + x];
                if g == 0 || g == 255 {
                    c += 1.0;
                }
                n += 1.0;
            }
        }
        c / n
    }
}

/// FNV-1a 64 over bytes (the same hash `echo_fingerprint` uses).
pub fn fnv1a(bytes: &[u8]) -> u64 {
    let mut h: u64 = 0xcbf2_9ce4_8422_2325;
    for &b in bytes {
        h ^= b as u64;
        h = h.wrapping_mul(0x0000_0100_0000_01b3);
    }
    h
}

pub fn demo_scenes() -> Vec<(String, Scene)> {
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../scenes-demo");
    let mut entries: Vec<_> = std::fs::read_dir(&dir)
        .expect("scenes-demo exists")
        .flatten()
        .map(|e| e.path())
        .filter(|p| p.to_string_lossy().ends_with(".scene.json"))
        .collect();
    entries.sort();
    entries
        .into_iter()
        .map(|p| {
            let text = std::fs::read_to_string(&p).unwrap();
            let scene = load_scene_str(&text).unwrap_or_else(|e| panic!("{}: {e}", p.display()));
            let name = p
                .file_name()
                .unwrap()
                .to_string_lossy()
                .replace(".scene.json", "");
            (name, scene)
        })
        .collect()
}

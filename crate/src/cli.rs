//! The `slicewise` command line: verbs that print JSON to stdout and one-line errors to stderr.

use std::ffi::OsString;
use std::io::Write;
use std::path::{Path, PathBuf};

use clap::{Args, Parser, Subcommand};
use serde_json::{json, Value};

use crate::{load_scene_str, section, set_scene_field, FocusedBeam, Scene};

/// The command line's verbs.
#[derive(Parser, Debug)]
#[command(
    name = "slicewise",
    version,
    about = "Slicewise: what a thin ultrasound beam shows of a needle, nerves and vessels, and what it hides.",
    after_help = "Slicewise is a rehearsal and teaching aid, not a guide for a real needle: \
                  follow local protocols, supervision and licensed practice.",
    disable_help_subcommand = true
)]
struct Cli {
    #[command(subcommand)]
    verb: Verb,
}

#[derive(Subcommand, Debug)]
enum Verb {
    /// Section a scene at its probe pose: needle signature, in-slab stretches, apparent and
    /// true tip, hidden length, structure cuts and tip distances (JSON).
    Section(SectionArgs),
    /// Print the focused elevation profile: slab thickness T(v) against depth (JSON).
    Beam(BeamArgs),
    /// Validate a scene file and print it back in canonical form (every field explicit).
    Check(SceneArgs),
    /// Render the simulated screen (grey scale and colour Doppler) to a PNG; print its meta
    /// (pixel spacing, origin, display settings, Doppler legend, frame rates) as JSON.
    Render(RenderArgs),
    /// Solve for the probe tilt (and, separately, the slide along the elevation axis) that puts
    /// the needle tip on the slab's centre plane, with the window in which the tip is in the slab
    /// (absolute pose values; JSON).
    Capture(SceneArgs),
    /// Walking schedule for an advance in steps: the capture tilt and window at each step, the
    /// re-tilts a user needs if they re-centre only when the tip leaves the slab, and the blind
    /// advance if the probe never moves (JSON).
    Walk(WalkArgs),
}

#[derive(Args, Debug)]
struct WalkArgs {
    #[command(flatten)]
    scene: SceneArgs,
    /// Inserted length at the start, mm (0 to the needle's length).
    #[arg(long, allow_negative_numbers = true)]
    from_mm: f64,
    /// Inserted length at the end, mm (0 to the needle's length).
    #[arg(long, allow_negative_numbers = true)]
    to_mm: f64,
    /// Advance per step, mm (0.01 to 50).
    #[arg(long, allow_negative_numbers = true)]
    step_mm: f64,
}

#[derive(Args, Debug)]
struct RenderArgs {
    #[command(flatten)]
    scene: SceneArgs,
    /// Where to write the PNG (the screen only: no overlay, no text).
    #[arg(long, value_name = "FILE.png")]
    out: PathBuf,
    /// Screen width, pixels (16 to 4096).
    #[arg(long, default_value_t = 512)]
    width: u32,
    /// Screen height, pixels (16 to 4096); default: square pixels for the field of view.
    #[arg(long)]
    height: Option<u32>,
    /// Also write the meta JSON to this file.
    #[arg(long, value_name = "FILE.json")]
    meta: Option<PathBuf>,
}

#[derive(Args, Debug)]
struct SceneArgs {
    /// Scene file (*.scene.json).
    scene: PathBuf,
    /// Override a field before computing, e.g. --set probe.pose.tilt_deg=4.5 (repeatable; the
    /// value is JSON).
    #[arg(long = "set", value_name = "PATH=VALUE")]
    set: Vec<String>,
}

#[derive(Args, Debug)]
struct SectionArgs {
    #[command(flatten)]
    scene: SceneArgs,
}

#[derive(Args, Debug)]
struct BeamArgs {
    /// Transmit frequency, MHz (1 to 30).
    #[arg(long, allow_negative_numbers = true)]
    frequency_mhz: f64,
    /// Elevation aperture (element height), mm (0.5 to 30).
    #[arg(long, allow_negative_numbers = true)]
    aperture_mm: f64,
    /// Elevation focus, mm (1 to 300).
    #[arg(long, allow_negative_numbers = true)]
    focus_mm: f64,
    /// Deepest row, mm (5 to 300).
    #[arg(long, allow_negative_numbers = true)]
    depth_mm: f64,
    /// Row spacing, mm (0.1 to 50).
    #[arg(long, default_value_t = 1.0, allow_negative_numbers = true)]
    step_mm: f64,
}

/// Run the command line with `args` (program name first); returns the exit code.
/// Errors are written to stderr as one line; nothing panics on bad input.
pub fn run<I, T>(args: I) -> i32
where
    I: IntoIterator<Item = T>,
    T: Into<OsString> + Clone,
{
    let cli = match Cli::try_parse_from(args) {
        Ok(c) => c,
        Err(e) => {
            use clap::error::ErrorKind;
            if matches!(e.kind(), ErrorKind::DisplayHelp | ErrorKind::DisplayVersion) {
                let _ = e.print();
                return 0;
            }
            // clap's message is several lines (usage, tip); keep the first, which says what.
            let text = e.render().to_string();
            let first = text
                .lines()
                .next()
                .unwrap_or("bad arguments")
                .trim_start_matches("error: ");
            eprintln!("slicewise: {first} (see slicewise --help)");
            return 2;
        }
    };
    match execute(cli.verb) {
        Ok(v) => {
            let mut out = std::io::stdout().lock();
            let text = serde_json::to_string_pretty(&v).unwrap_or_default();
            if writeln!(out, "{text}").is_err() {
                return 1;
            }
            0
        }
        Err(msg) => {
            eprintln!("slicewise: {msg}");
            1
        }
    }
}

fn execute(verb: Verb) -> Result<Value, String> {
    match verb {
        Verb::Section(a) => {
            let scene = load_with_overrides(&a.scene)?;
            serde_json::to_value(section(&scene)).map_err(|e| e.to_string())
        }
        Verb::Check(a) => {
            let scene = load_with_overrides(&a)?;
            Ok(crate::scene_to_value(&scene))
        }
        Verb::Beam(b) => beam_table(&b),
        Verb::Render(r) => render_png(&r),
        Verb::Capture(a) => {
            let scene = load_with_overrides(&a)?;
            serde_json::to_value(crate::capture(&scene)).map_err(|e| e.to_string())
        }
        Verb::Walk(w) => {
            let scene = load_with_overrides(&w.scene)?;
            crate::check_walk(&scene, w.from_mm, w.to_mm, w.step_mm, |f| {
                format!("--{}", f.replace('_', "-"))
            })?;
            serde_json::to_value(crate::walk(&scene, w.from_mm, w.to_mm, w.step_mm))
                .map_err(|e| e.to_string())
        }
    }
}

/// Height giving square pixels for the scene's field of view at `width`, clamped to 16..=4096.
fn square_pixel_height(scene: &Scene, width: u32) -> u32 {
    let (span_u, span_v) = match scene.probe.footprint {
        crate::Footprint::Linear { width_mm } => (width_mm, scene.probe.depth_mm),
        crate::Footprint::Curved {
            width_mm,
            radius_mm,
        } => {
            let half = (width_mm / (2.0 * radius_mm)).min(75f64.to_radians());
            let d = scene.probe.depth_mm;
            (
                2.0 * (radius_mm + d) * half.sin(),
                d - (radius_mm * half.cos() - radius_mm),
            )
        }
    };
    ((width as f64 * span_v / span_u).round() as u32)
        .clamp(crate::MIN_SCREEN_PX, crate::MAX_SCREEN_PX)
}

fn render_png(a: &RenderArgs) -> Result<Value, String> {
    let scene = load_with_overrides(&a.scene)?;
    let height = a
        .height
        .unwrap_or_else(|| square_pixel_height(&scene, a.width.clamp(1, crate::MAX_SCREEN_PX)));
    let mut renderer = crate::Renderer::new();
    let frame = renderer.render(&scene, a.width, height).map_err(|e| {
        let flag = if e.field == "width" {
            "--width"
        } else {
            "--height"
        };
        format!("{flag}: {}", e.message)
    })?;
    let file = std::fs::File::create(&a.out)
        .map_err(|e| format!("cannot write {}: {e}", a.out.display()))?;
    let mut encoder =
        png::Encoder::new(std::io::BufWriter::new(file), frame.width(), frame.height());
    encoder.set_color(png::ColorType::Rgba);
    encoder.set_depth(png::BitDepth::Eight);
    let write_err = |e: png::EncodingError| format!("cannot write {}: {e}", a.out.display());
    let mut writer = encoder.write_header().map_err(write_err)?;
    writer.write_image_data(frame.rgba()).map_err(write_err)?;
    writer.finish().map_err(write_err)?;
    let mut meta = serde_json::to_value(frame.meta()).map_err(|e| e.to_string())?;
    meta["fingerprint_fnv1a64"] = json!(format!("{:016x}", frame.fingerprint()));
    if let Some(path) = &a.meta {
        let text = serde_json::to_string_pretty(&meta).unwrap_or_default() + "\n";
        std::fs::write(path, text).map_err(|e| format!("cannot write {}: {e}", path.display()))?;
    }
    Ok(meta)
}

/// Read a scene file and apply `--set` overrides; errors name the file and the field.
fn load_with_overrides(a: &SceneArgs) -> Result<Scene, String> {
    let mut scene = read_scene_file(&a.scene)?;
    for s in &a.set {
        let (path, value) = s.split_once('=').ok_or_else(|| {
            format!("--set {s}: expected PATH=VALUE, e.g. probe.pose.tilt_deg=4.5")
        })?;
        let value: Value = serde_json::from_str(value)
            .or_else(|_| Ok::<_, String>(Value::String(value.to_owned())))?;
        scene = set_scene_field(&scene, path.trim(), value).map_err(|e| format!("--set: {e}"))?;
    }
    Ok(scene)
}

/// Read and validate a scene file; the error names the file.
pub fn read_scene_file(path: &Path) -> Result<Scene, String> {
    let text = std::fs::read_to_string(path)
        .map_err(|e| format!("cannot read {}: {e}", path.display()))?;
    load_scene_str(&text).map_err(|e| format!("{}: {e}", path.display()))
}

fn check_arg(name: &str, v: f64, lo: f64, hi: f64, unit: &str) -> Result<f64, String> {
    if v.is_finite() && v >= lo && v <= hi {
        Ok(v)
    } else {
        Err(format!(
            "--{name}: must be a number from {lo} to {hi} {unit}, got {v}"
        ))
    }
}

fn beam_table(b: &BeamArgs) -> Result<Value, String> {
    let f = check_arg("frequency-mhz", b.frequency_mhz, 1.0, 30.0, "MHz")?;
    let h = check_arg("aperture-mm", b.aperture_mm, 0.5, 30.0, "mm")?;
    let z = check_arg("focus-mm", b.focus_mm, 1.0, 300.0, "mm")?;
    let d = check_arg("depth-mm", b.depth_mm, 5.0, 300.0, "mm")?;
    let step = check_arg("step-mm", b.step_mm, 0.1, 50.0, "mm")?;
    let beam = FocusedBeam::new(h, z, f);
    let n = (d / step).floor() as usize;
    let rows: Vec<Value> = (0..=n)
        .map(|i| {
            let v = (i as f64 * step).min(d);
            json!({"depth_mm": round6(v), "thickness_mm": round6(beam.thickness_mm(v))})
        })
        .collect();
    Ok(json!({
        "model": "focused",
        "width_definition": "two-way -6 dB full width",
        "frequency_mhz": f,
        "wavelength_mm": beam.wavelength_mm,
        "aperture_mm": h,
        "focus_mm": z,
        "focus_thickness_mm": beam.focus_thickness_mm,
        "waist_radius_mm": beam.waist_radius_mm,
        "rayleigh_mm": beam.rayleigh_mm,
        "rows": rows,
    }))
}

fn round6(v: f64) -> f64 {
    (v * 1e6).round() / 1e6
}

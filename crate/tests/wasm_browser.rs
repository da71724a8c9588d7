//! The wasm build in a real headless Chromium (wasm-bindgen-test): the session handle gives the
//! same numbers and the same error texts as the native crate, and bad input never panics.
#![cfg(target_arch = "wasm32")]

use slicewise::wasm::Session;
use wasm_bindgen::JsValue;
use wasm_bindgen_test::*;

wasm_bindgen_test_configure!(run_in_browser);

const OUT_OF_PLANE: &str = include_str!("../../scenes-demo/shaft-dot-past-nerve.scene.json");
const IN_PLANE: &str = include_str!("../../scenes-demo/inplane-past-vessel.scene.json");

fn signature(s: &Session) -> String {
    let r = s.section().unwrap();
    let needle = js_sys::Reflect::get(&r, &JsValue::from_str("needle")).unwrap();
    js_sys::Reflect::get(&needle, &JsValue::from_str("signature"))
        .unwrap()
        .as_string()
        .unwrap()
}

fn err_text(e: wasm_bindgen::JsError) -> String {
    let v: JsValue = e.into();
    js_sys::Error::from(v).message().into()
}

#[wasm_bindgen_test]
fn sections_match_the_native_crate() {
    for text in [OUT_OF_PLANE, IN_PLANE] {
        let session = Session::new(text).unwrap();
        let native = slicewise::section(&slicewise::load_scene_str(text).unwrap());
        assert_eq!(signature(&session), native.needle.signature.as_str());
    }
    assert_eq!(signature(&Session::new(OUT_OF_PLANE).unwrap()), "shaft-dot");
    assert_eq!(
        signature(&Session::new(IN_PLANE).unwrap()),
        "line-without-tip"
    );
}

#[wasm_bindgen_test]
fn bad_input_is_an_error_naming_the_field_and_keeps_the_scene() {
    let mut s = Session::new(OUT_OF_PLANE).unwrap();
    let before = s.save();
    let e = s.set_number("probe.pose.tilt_deg", f64::NAN).unwrap_err();
    assert_eq!(
        err_text(e),
        "probe.pose.tilt_deg: must be a number from -60 to 60 degrees, got NaN"
    );
    let e = s.set_number("needle.inserted_mm", 1e308).unwrap_err();
    assert_eq!(
        err_text(e),
        "needle.inserted_mm: must be a number from 0 to 50 mm, got 1e308"
    );
    let e = s
        .load("{\"format\": \"slicewise-scene\", \"version\": 1, \"probe\": 3}")
        .unwrap_err();
    assert_eq!(err_text(e), "probe: must be an object {...}, got a number");
    let e = s
        .set("structures[0].radius_mm", JsValue::from_str("wide"))
        .unwrap_err();
    assert_eq!(
        err_text(e),
        "structures[0].radius_mm: must be a number from 0.05 to 50 mm, got \"wide\""
    );
    assert_eq!(s.save(), before, "nothing the user made is lost");
    assert!(Session::new("not json").is_err());
}

#[wasm_bindgen_test]
fn tilting_onto_the_tip_changes_the_signature() {
    let mut s = Session::new(OUT_OF_PLANE).unwrap();
    assert_eq!(signature(&s), "shaft-dot");
    let mut seen_tip = false;
    for i in 0..=80 {
        s.set_number("probe.pose.tilt_deg", i as f64 * 0.25)
            .unwrap();
        seen_tip |= signature(&s) == "tip-double-dot" || signature(&s) == "line-with-tip";
    }
    assert!(
        seen_tip,
        "some tilt toward the needle's travel brings the tip into the slab"
    );
}

//! The page's WebAssembly bindings (`src/web/mod.rs`), run in headless Chromium by
//! wasm-bindgen-test: the session traces, keeps its last good state on a bad scenario, reports
//! errors as `{field, message}`, and draws on a real canvas.
//!
//! Run: `CHROMEDRIVER=/usr/bin/chromedriver cargo test --target wasm32-unknown-unknown --test wasm`.
//! Natively this file compiles to nothing.
#![cfg(target_arch = "wasm32")]

use doublespar::{Session, demo_scenario};
use js_sys::{Array, Function, Reflect, Uint8ClampedArray};
use wasm_bindgen::{JsCast, JsValue};
use wasm_bindgen_test::{wasm_bindgen_test, wasm_bindgen_test_configure};
use web_sys::HtmlCanvasElement;

wasm_bindgen_test_configure!(run_in_browser);

/// `obj[key]`, panicking with the key's name if it cannot be read.
fn get(obj: &JsValue, key: &str) -> JsValue {
    Reflect::get(obj, &JsValue::from_str(key)).unwrap_or_else(|_| panic!("cannot read '{key}'"))
}

fn get_f64(obj: &JsValue, key: &str) -> f64 {
    get(obj, key)
        .as_f64()
        .unwrap_or_else(|| panic!("'{key}' is not a number"))
}

fn len(array: &JsValue) -> u32 {
    array.dyn_ref::<Array>().expect("expected an array").length()
}

fn first_element(result: &JsValue) -> JsValue {
    Array::from(&get(result, "elements")).get(0)
}

/// The demo with another thickness: still one calcite plate, two rays.
fn demo_with_thickness(thickness_mm: f64) -> String {
    let mut doc: serde_json::Value = serde_json::from_str(&demo_scenario()).unwrap();
    doc["elements"][0]["thickness_mm"] = serde_json::json!(thickness_mm);
    doc.to_string()
}

/// A canvas of `w` × `h` CSS pixels, attached to the document so that it has a layout box.
fn canvas(w: u32, h: u32) -> HtmlCanvasElement {
    let document = web_sys::window().unwrap().document().unwrap();
    let el = document.create_element("canvas").unwrap();
    el.set_attribute("style", &format!("display:block;width:{w}px;height:{h}px"))
        .unwrap();
    document.body().unwrap().append_child(&el).unwrap();
    el.dyn_into::<HtmlCanvasElement>().unwrap()
}

/// RGBA bytes of the whole canvas, through `getImageData` read by reflection (web-sys's
/// `ImageData` feature is not enabled in Cargo.toml).
fn pixels(canvas: &HtmlCanvasElement) -> Vec<u8> {
    let ctx: JsValue = canvas.get_context("2d").unwrap().unwrap().into();
    let get_image_data: Function = get(&ctx, "getImageData").dyn_into().unwrap();
    let args = Array::of4(
        &0.into(),
        &0.into(),
        &f64::from(canvas.width()).into(),
        &f64::from(canvas.height()).into(),
    );
    let image = Reflect::apply(&get_image_data, &ctx, &args).expect("getImageData failed");
    Uint8ClampedArray::from(get(&image, "data")).to_vec()
}

#[wasm_bindgen_test]
fn new_session_traces_the_demo() {
    let session = Session::new().expect("the demo must trace");
    let result = session.result().unwrap();
    assert_eq!(len(&get(&result, "rays")), 2, "calcite demo: o- and e-ray");
    let crystal = first_element(&result);
    assert_eq!(get(&crystal, "material").as_string().as_deref(), Some("calcite"));
    let sep = get_f64(&crystal, "separation_mm");
    assert!(
        sep > 0.5 && sep < 2.0,
        "12.5 mm of calcite at 45°: about 1.3 mm, got {sep}"
    );
    // The scenario comes back with its defaults written out and parses as JSON.
    let doc: serde_json::Value = serde_json::from_str(&session.scenario_json()).unwrap();
    assert_eq!(doc["elements"][0]["thickness_mm"], serde_json::json!(12.5));
}

#[wasm_bindgen_test]
fn update_json_returns_the_result_and_a_bad_scenario_keeps_the_last_good_one() {
    let mut session = Session::new().unwrap();
    let result = session.update_json(&demo_with_thickness(7.0)).expect("a good scenario");
    assert_eq!(len(&get(&result, "rays")), 2);
    let sep_good = get_f64(&first_element(&result), "separation_mm");
    assert_eq!(get_f64(&first_element(&result), "thickness_mm"), 7.0);

    let err = session
        .update_json(r#"{"elements": []}"#)
        .expect_err("an empty stack must be refused");
    assert_eq!(get(&err, "field").as_string().as_deref(), Some("elements"));
    let message = get(&err, "message").as_string().unwrap_or_default();
    assert!(!message.is_empty(), "the error needs a message");

    let kept = session.result().unwrap();
    assert_eq!(get_f64(&first_element(&kept), "thickness_mm"), 7.0);
    assert_eq!(get_f64(&first_element(&kept), "separation_mm"), sep_good);
    let doc: serde_json::Value = serde_json::from_str(&session.scenario_json()).unwrap();
    assert_eq!(doc["elements"][0]["thickness_mm"], serde_json::json!(7.0));

    let not_json = session.update_json("{bad").expect_err("not JSON");
    assert!(get(&not_json, "field").is_string(), "a parse error still has a field");
}

#[wasm_bindgen_test]
fn a_bad_element_is_named_and_the_last_good_result_kept() {
    // updateJson is the one way to trace (the page, the embedded figure and the worker all send
    // text); a bad element is named by its path and nothing already traced changes.
    let mut session = Session::new().unwrap();
    session.update_json(&demo_with_thickness(7.0)).unwrap();
    let err = session
        .update_json(r#"{"elements": [{"kind": "crystal", "thickness_mm": -1}]}"#)
        .expect_err("a bad element");
    assert!(
        get(&err, "field")
            .as_string()
            .unwrap_or_default()
            .starts_with("elements[0]"),
        "the field is named"
    );
    assert!(get(&err, "message").is_string());
    assert_eq!(get_f64(&first_element(&session.result().unwrap()), "thickness_mm"), 7.0);
}

#[wasm_bindgen_test]
fn draw_paints_the_side_view_on_a_canvas() {
    let session = Session::new().unwrap();
    let c = canvas(480, 300);
    session.draw("side", &c, false).expect("side view draws");
    assert!(c.width() >= 480 && c.height() >= 300, "sized from its CSS box");
    let px = pixels(&c);
    let total = px.len() / 4;
    // The corner lies in the margin: it is the background.
    let bg = &px[0..4];
    assert_eq!(bg[3], 255, "the background is painted opaque");
    let differing = px.chunks_exact(4).filter(|p| p != &bg).count();
    assert!(
        differing > 500 && differing < total * 9 / 10,
        "side view: {differing} of {total} pixels differ from the background"
    );
}

#[wasm_bindgen_test]
fn an_unknown_view_is_an_error_on_the_field_view() {
    let session = Session::new().unwrap();
    let c = canvas(200, 100);
    let err = session.draw("nope", &c, false).expect_err("unknown view");
    assert_eq!(get(&err, "field").as_string().as_deref(), Some("view"));
    let err = session.scene("nope").expect_err("unknown view");
    assert_eq!(get(&err, "field").as_string().as_deref(), Some("view"));
    let err = session.svg("nope", 300.0, 200.0, false).expect_err("unknown view");
    assert_eq!(get(&err, "field").as_string().as_deref(), Some("view"));
}

#[wasm_bindgen_test]
fn svg_writes_an_svg_document() {
    let session = Session::new().unwrap();
    for dark in [false, true] {
        let text = session.svg("side", 400.0, 300.0, dark).unwrap();
        assert!(text.starts_with("<svg"), "starts with: {}", &text[..text.len().min(40)]);
        assert!(text.trim_end().ends_with("</svg>"));
    }
}

#[wasm_bindgen_test]
fn every_bad_scenario_is_refused_with_its_field_and_the_last_good_state_kept() {
    // The same table the command line is tested with (tests/bad_input.rs).
    let table: Vec<serde_json::Value> = serde_json::from_str(include_str!("bad/scenarios.json")).unwrap();
    assert!(table.len() >= 40);
    let mut session = Session::new().unwrap();
    let good = session.update_json(&demo_with_thickness(7.0)).unwrap();
    let good_sep = get_f64(&first_element(&good), "separation_mm");
    for case in &table {
        let (name, doc, field) = (
            case["name"].as_str().unwrap(),
            case["doc"].as_str().unwrap(),
            case["field"].as_str().unwrap(),
        );
        let err = session.update_json(doc).expect_err(name);
        assert_eq!(get(&err, "field").as_string().as_deref(), Some(field), "{name}");
        assert!(
            !get(&err, "message").as_string().unwrap_or_default().is_empty(),
            "{name}"
        );
        let kept = get_f64(&first_element(&session.result().unwrap()), "separation_mm");
        assert_eq!(kept, good_sep, "{name}: the last good result must stay");
    }
}

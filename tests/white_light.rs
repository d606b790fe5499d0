//! The colour a set-up shows in white light (`spectrum.white_light`): the interference colours of
//! a quartz plate between crossed polarizers against the order of colours every polarizing
//! microscopist knows, complementary colours between parallel and crossed polarizers, and the
//! report's shape. The colorimetry itself is checked against an independent library in
//! tests/reference/colour_reference.py.

use doublespar::{Scenario, trace_scenario};
use serde_json::Value;

/// A quartz plate (axis in the faces at 45°, activity off) of `thickness_mm` between a linear
/// input at 0° and a polarizer at `analyser_deg`, with a spectrum asked for.
fn plate(thickness_mm: f64, analyser_deg: f64) -> String {
    format!(
        r#"{{"version": 2, "wavelength_nm": 550, "beam": {{"polarization": {{"kind": "linear", "azimuth_deg": 0}}}},
        "elements": [{{"kind": "crystal", "material": "quartz", "optical_activity": false, "thickness_mm": {thickness_mm}, "axis": {{"tilt_deg": 90, "azimuth_deg": 45}}}},
                     {{"kind": "polarizer", "transmission_axis_deg": {analyser_deg}}}],
        "spectrum": {{"from_nm": 400, "to_nm": 700, "points": 7}}}}"#
    )
}

fn traced(doc: &str) -> Value {
    serde_json::to_value(trace_scenario(&Scenario::from_json_str(doc).unwrap()).unwrap()).unwrap()
}

fn rgb(white: &Value) -> [u8; 3] {
    let s = white["srgb"].as_str().unwrap();
    [1, 3, 5].map(|i| u8::from_str_radix(&s[i..i + 2], 16).unwrap())
}

#[test]
fn a_quartz_plate_between_crossed_polarizers_runs_through_the_order_of_colours() {
    // The order of interference colours with retardance (common practice: the colour chart of
    // polarizing microscopy): about 100 nm lavender grey, 280 nm first-order white, 450 nm
    // orange, 550 nm the first-order red to violet "sensitive tint", 650-700 nm second-order
    // blue, about 830 nm second-order yellow-green. Quartz Δn ≈ 0.0092 in the green, so the
    // plate of retardance Γ is Γ/0.0092 thick.
    let colour = |retardance_nm: f64| {
        let r = traced(&plate(retardance_nm / 0.0092 * 1e-6, 90.0));
        rgb(&r["spectrum"]["white_light"])
    };
    let [r, g, b] = colour(100.0);
    assert!(
        b > r && b > g && r < 160,
        "lavender grey: a dim bluish grey, got {r} {g} {b}"
    );
    let [r, g, b] = colour(280.0);
    assert!(r.min(g).min(b) > 225, "first-order white, got {r} {g} {b}");
    let [r, g, b] = colour(450.0);
    assert!(r > g && g > b && r > 200, "orange, got {r} {g} {b}");
    let [r, g, b] = colour(550.0);
    assert!(r > g && b > g && g < 40, "sensitive tint (red-violet), got {r} {g} {b}");
    let [r, g, b] = colour(670.0);
    assert!(b > g && g > r && b > 200, "second-order blue, got {r} {g} {b}");
    let [r, g, b] = colour(830.0);
    assert!(g > r && r > b, "second-order yellow-green, got {r} {g} {b}");
}

#[test]
fn parallel_and_crossed_polarizers_give_complementary_colours() {
    // With lossless faces the two analyser positions share the light between them, T∥ + T⊥ = 1
    // at every wavelength (energy conservation), so their tristimulus values add up to the
    // illuminant's white, Y = 1 (colorimetry is linear in the spectrum).
    for d in [0.02, 0.05, 0.06, 0.11] {
        let crossed = traced(&plate(d, 90.0));
        let parallel = traced(&plate(d, 0.0));
        let open = traced(&plate(d, 0.0).replace(
            r#"{"kind": "polarizer", "transmission_axis_deg": 0}"#,
            r#"{"kind": "rotator", "angle_deg": 0}"#,
        ));
        let xyz = |v: &Value| -> Vec<f64> {
            v["spectrum"]["white_light"]["xyz"]
                .as_array()
                .unwrap()
                .iter()
                .map(|x| x.as_f64().unwrap())
                .collect()
        };
        let (c, p, w) = (xyz(&crossed), xyz(&parallel), xyz(&open));
        assert!((w[1] - 1.0).abs() < 1e-12, "{w:?}");
        for i in 0..3 {
            assert!((c[i] + p[i] - w[i]).abs() < 1e-12, "{d} mm: {c:?} + {p:?} != {w:?}");
        }
    }
}

#[test]
fn the_report_names_its_illuminant_and_observer_and_is_absent_without_a_spectrum() {
    let r = traced(&plate(0.05, 90.0));
    let w = &r["spectrum"]["white_light"];
    assert_eq!(w["illuminant"], "D65");
    assert_eq!(w["observer"], "CIE 1931 2°");
    assert!(w["srgb"].as_str().unwrap().starts_with('#'));
    assert!(w["outside_srgb"].is_boolean());
    let chroma = w["chromaticity"].as_array().unwrap();
    assert_eq!(chroma.len(), 2);
    let plain = traced(&plate(0.05, 90.0).replace(
        r#",
        "spectrum": {"from_nm": 400, "to_nm": 700, "points": 7}"#,
        "",
    ));
    assert!(plain.get("spectrum").is_none());
}

#[test]
fn a_formula_that_cannot_reach_the_visible_gives_no_colour_and_says_why() {
    // A crystal given by its own formula with a pole at 500 nm: its index breaks down inside
    // the colour tables' range, so the colour is null and a warning names the wavelength.
    let doc = r#"{"version": 2, "wavelength_nm": 700, "beam": {"polarization": {"kind": "linear", "azimuth_deg": 0}},
        "elements": [{"kind": "crystal", "thickness_mm": 0.05, "axis": {"tilt_deg": 90, "azimuth_deg": 45},
                      "dispersion": {"range_nm": [600, 800],
                                     "o": {"a": 1.0, "sellmeier": [[1.2, 0.25]]},
                                     "e": {"a": 1.0, "sellmeier": [[1.25, 0.25]]}}},
                     {"kind": "polarizer", "transmission_axis_deg": 90}],
        "spectrum": {"from_nm": 650, "to_nm": 750, "points": 3}}"#;
    let r = traced(doc);
    assert!(r["spectrum"]["white_light"].is_null());
    let warnings: Vec<&str> = r["warnings"]
        .as_array()
        .unwrap()
        .iter()
        .map(|w| w.as_str().unwrap())
        .collect();
    assert!(
        warnings
            .iter()
            .any(|w| w.contains("no colour in white light") && w.contains("nm (in air)")),
        "{warnings:?}"
    );
}

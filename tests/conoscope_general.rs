//! Convergent light through general crystals: biaxial plates and optically active quartz, whose
//! two forward waves come from the forward factor of the 4×4 system's characteristic quartic at
//! every direction of the cone (the full 4×4 solve where it declines), each face by the flux form.
//!
//! Independent checks: every direction against a whole trace of the scenario with the beam at
//! that incidence (the spots' path sum of the general tracer, not the set-up's matrix product);
//! the retardance map against the retardance the trace reports; a biaxial plate's retardance
//! vanishing where the wave normal runs along an optic axis the trace reports (the melatopes of
//! its figure, Born & Wolf §15.4.4); a uniaxial tensor given as custom nx = ny, nz against the
//! uniaxial closed form; and a c-cut quartz plate at normal incidence between crossed polarizers
//! against Malus's law for the rotation its reported rotatory power gives, sin²(ρ d).

mod common;

use doublespar::{ConoscopeQuantity, Scenario, conoscope_at, conoscope_of, trace_scenario};
use serde_json::Value;

const SET_UPS: [&str; 3] = [
    // A KTP plate with its principal axes turned, between crossed polarizers.
    r#"{"version": 2, "wavelength_nm": 1064, "beam": {"polarization": {"kind": "linear", "azimuth_deg": 0}},
        "elements": [{"kind": "crystal", "material": "ktp", "thickness_mm": 0.2, "axes": {"tilt_deg": 30, "azimuth_deg": 20, "roll_deg": 15}},
                     {"kind": "polarizer", "transmission_axis_deg": 90}]}"#,
    // An LBO plate cut along its z axis, bare faces, then a quarter-wave retarder and a polarizer.
    r#"{"version": 2, "wavelength_nm": 532, "interface_losses": "uncoated", "beam": {"polarization": {"kind": "linear", "azimuth_deg": 30}},
        "elements": [{"kind": "crystal", "material": "lbo", "thickness_mm": 0.5, "axes": {"tilt_deg": 0, "azimuth_deg": 0, "roll_deg": 10}},
                     {"kind": "retarder", "retardance_waves": 0.25, "fast_axis_deg": 10},
                     {"kind": "polarizer", "transmission_axis_deg": 60}]}"#,
    // A c-cut quartz plate with its optical activity (the default), between crossed polarizers.
    r#"{"version": 2, "wavelength_nm": 589.3, "beam": {"polarization": {"kind": "linear", "azimuth_deg": 0}},
        "elements": [{"kind": "crystal", "material": "quartz", "thickness_mm": 1, "axis": {"tilt_deg": 0, "azimuth_deg": 0}},
                     {"kind": "polarizer", "transmission_axis_deg": 90}]}"#,
];

const DIRECTIONS: [(f64, f64); 6] = [
    (0.0, 0.0),
    (3.0, 30.0),
    (12.0, 135.0),
    (20.0, -60.0),
    (28.0, 200.0),
    (30.0, 90.0),
];

fn transmission(sc: &Scenario, polar_deg: f64, azimuth_deg: f64) -> f64 {
    conoscope_at(sc, ConoscopeQuantity::Transmission, polar_deg, azimuth_deg)
        .unwrap()
        .unwrap()
}

fn report(sc: &Scenario) -> Value {
    serde_json::to_value(trace_scenario(sc).unwrap()).unwrap()
}

#[test]
fn every_direction_agrees_with_a_whole_trace_at_that_incidence() {
    // The trace sums the spots of the general tracer's paths; the figure multiplies each plate's
    // 2×2 matrix. Both solve the same modes, so they agree to rounding; 1e-9 allowed.
    common::convergent::transmission_agrees_with_whole_traces(&SET_UPS, &DIRECTIONS);
}

#[test]
fn the_acceptance_map_is_the_traced_retardance_against_direction() {
    common::convergent::retardance_agrees_with_whole_traces(&SET_UPS[..2], &DIRECTIONS);
}

#[test]
fn a_biaxial_plate_has_no_retardance_along_its_optic_axes() {
    // KTP cut with its z axis along the plate's normal: its optic axes lie in the xz plane at
    // ±V from z. A wave normal along one has both indices equal to n_y, so outside it leaves at
    // sin θ = n_y sin V in the plane φ = 0° or 180° (Snell's law for the common index), where
    // the retardance map is zero: the melatopes of the figure. Checked against the optic axes the
    // trace reports, to 1e-9 waves; 1° away, it is 0.01 wave or more.
    let doc = r#"{"version": 2, "wavelength_nm": 633, "beam": {"polarization": {"kind": "linear", "azimuth_deg": 45}},
        "elements": [{"kind": "crystal", "material": "ktp", "thickness_mm": 1, "axes": {"tilt_deg": 0, "azimuth_deg": 0, "roll_deg": 0}},
                     {"kind": "polarizer", "transmission_axis_deg": -45}]}"#;
    let sc = Scenario::from_json_str(doc).unwrap();
    let r = report(&sc);
    let crystal = &r["elements"][0];
    let ny = crystal["ny"].as_f64().unwrap();
    let axes = crystal["optic_axes"].as_array().unwrap();
    for axis in axes {
        let a: Vec<f64> = axis.as_array().unwrap().iter().map(|v| v.as_f64().unwrap()).collect();
        let sin_v = a[0].hypot(a[1]) / a[2].abs();
        let sin_v = sin_v / (1.0 + sin_v * sin_v).sqrt();
        let polar = (ny * sin_v).asin().to_degrees();
        let azimuth = a[1].atan2(a[0]).to_degrees() + if a[2] < 0.0 { 180.0 } else { 0.0 };
        assert!(a[1].abs() < 1e-12, "KTP's optic axes lie in its xz plane: {a:?}");
        let g = |p: f64| {
            conoscope_at(&sc, ConoscopeQuantity::RetardanceError, p, azimuth)
                .unwrap()
                .unwrap()
        };
        let normal = crystal["retardance_waves"].as_f64().unwrap();
        let at_axis = g(polar) + normal;
        eprintln!("optic axis {a:?}: {polar:.4}° outside, retardance {at_axis:.3e} waves");
        assert!(at_axis.abs() < 1e-9, "{polar}°, {azimuth}°: {at_axis}");
        assert!((g(polar + 1.0) + normal).abs() > 0.01 && (g(polar - 1.0) + normal).abs() > 0.01);
    }
}

#[test]
fn a_uniaxial_tensor_given_as_custom_principal_indices_gives_the_uniaxial_figure() {
    // The general solver's figure of nx = ny = n_o, nz = n_e against the closed form's of the
    // same crystal given by n_o and n_e: 1e-12 allowed over a 33 × 33 map of each quantity.
    let (no, ne) = (1.6557, 1.4849);
    let doc = |medium: &str| {
        format!(
            r#"{{"version": 2, "wavelength_nm": 633, "beam": {{"polarization": {{"kind": "linear", "azimuth_deg": 10}}}},
                "elements": [{{"kind": "crystal", {medium}, "thickness_mm": 0.05, "axes": {{"tilt_deg": 35, "azimuth_deg": 25, "roll_deg": 0}}}},
                             {{"kind": "polarizer", "transmission_axis_deg": 80}}]}}"#
        )
    };
    let general = Scenario::from_json_str(&doc(&format!(r#""nx": {no}, "ny": {no}, "nz": {ne}"#))).unwrap();
    let uniaxial = Scenario::from_json_str(&doc(&format!(r#""no": {no}, "ne": {ne}"#))).unwrap();
    for q in [ConoscopeQuantity::Transmission, ConoscopeQuantity::RetardanceError] {
        let a = conoscope_of(&general, q, 40.0, 33).unwrap();
        let b = conoscope_of(&uniaxial, q, 40.0, 33).unwrap();
        for (k, (x, y)) in a.values.iter().zip(&b.values).enumerate() {
            match (x, y) {
                (Some(x), Some(y)) => assert!((x - y).abs() < 1e-12, "{q:?} pixel {k}: {x} against {y}"),
                (None, None) => {}
                _ => panic!("{q:?} pixel {k}: {x:?} against {y:?}"),
            }
        }
    }
}

#[test]
fn an_active_c_cut_plate_rotates_the_light_on_axis() {
    // Along the axis quartz's modes are circular and the plate turns the plane of polarization
    // by ρ d, ρ the rotatory power the trace reports: between crossed polarizers the centre of
    // the figure passes sin²(ρ d) (Malus's law; the faces ideal), to 1e-12. Without the activity
    // the centre is dark.
    for mm in [0.5, 1.0, 2.3] {
        let doc = SET_UPS[2].replace(r#""thickness_mm": 1,"#, &format!(r#""thickness_mm": {mm},"#));
        let sc = Scenario::from_json_str(&doc).unwrap();
        let rho = report(&sc)["elements"][0]["rotatory_power_deg_per_mm"]
            .as_f64()
            .unwrap();
        let want = (rho * mm).to_radians().sin().powi(2);
        let got = transmission(&sc, 0.0, 0.0);
        assert!(
            (got - want).abs() < 1e-12,
            "{mm} mm: {got} against sin²({rho} °/mm × {mm}) = {want}"
        );
        assert!(got > 0.03, "{mm} mm: the rotation shows");
        let off = Scenario::from_json_str(&doc.replace(
            r#""material": "quartz","#,
            r#""material": "quartz", "optical_activity": false,"#,
        ))
        .unwrap();
        assert!(transmission(&off, 0.0, 0.0) < 1e-25);
    }
}

#[test]
fn a_general_crystal_s_figures_are_capped_and_say_so() {
    // Each direction solves the crystal's two forward waves (about twice a uniaxial plate's
    // work), so a figure with a general crystal is computed at most 256 × 256, the page's size,
    // and in white light 128 × 128 (one sixteenth of it computed here, the part's size that of
    // the whole).
    let sc = Scenario::from_json_str(SET_UPS[0]).unwrap();
    let map = conoscope_of(&sc, ConoscopeQuantity::Transmission, 30.0, 300).unwrap();
    assert_eq!(map.pixels, doublespar::MAX_PIXELS_GENERAL);
    assert_eq!(doublespar::MAX_PIXELS_GENERAL, 256);
    assert_eq!(map.values.len(), 256 * 256);
    let white = doublespar::white_light_part(&sc, 30.0, 256, 0, 16).unwrap();
    assert_eq!(white.pixels, doublespar::MAX_PIXELS_WHITE_GENERAL);
    assert_eq!(doublespar::MAX_PIXELS_WHITE_GENERAL, 128);
    assert!(white.colours[..8 * 128].iter().any(Option::is_some));
    assert!(white.colours[8 * 128..].iter().all(Option::is_none));
    // Below the cap, the size asked for.
    assert_eq!(
        conoscope_of(&sc, ConoscopeQuantity::Transmission, 30.0, 40)
            .unwrap()
            .pixels,
        40
    );
}

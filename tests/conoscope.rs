//! Convergent light through the whole contract: the conoscopic figure of a c-cut plate between
//! crossed polarizers against the textbook small-angle isochromes and its isogyre cross, and
//! every direction's value against a whole trace with the beam at that incidence.
//!
//! Textbook formula (Born & Wolf, *Principles of Optics*, §15.4.4, from memory): a plate of
//! thickness d cut perpendicular to the optic axis, seen in convergent light, retards a wave
//! crossing it at the internal angle θ_in by Γ ≈ (2π/λ) d (n_e − n_o) sin²θ_in; between crossed
//! polarizers it is dark where Γ = 2πm (isochromes, circles) and along the polarizer axes
//! (isogyres). Outside, sin θ = n_o sin θ_in. The neglected terms (Γ's exact form
//! k0 d [(n_o/n_e)√(n_e² − s²) − √(n_o² − s²)] with s = sin θ, expanded) are a relative
//! (3/2)(n_e − n_o)/n plus O(sin²θ_in) in Γ, half of that in a ring's radius: under 0.5 % for
//! quartz out to 17°, so the check allows 1 %.

mod common;

use doublespar::{ConoscopeQuantity, Scenario, conoscope_at, conoscope_of, trace_scenario};

/// A c-cut quartz plate of `mm` (no optical activity) between crossed polarizers.
fn c_cut(mm: f64) -> Scenario {
    Scenario::from_json_str(&format!(
        r#"{{"version": 2, "wavelength_nm": 589.3, "beam": {{"polarization": {{"kind": "linear", "azimuth_deg": 0}}}},
            "elements": [{{"kind": "crystal", "material": "quartz", "optical_activity": false, "thickness_mm": {mm}, "axis": {{"tilt_deg": 0, "azimuth_deg": 0}}}},
                         {{"kind": "polarizer", "transmission_axis_deg": 90}}]}}"#
    ))
    .unwrap()
}

/// The indices n_o, n_e the trace reports for the first crystal.
fn indices(sc: &Scenario) -> (f64, f64) {
    let r = serde_json::to_value(trace_scenario(sc).unwrap()).unwrap();
    (
        r["elements"][0]["no"].as_f64().unwrap(),
        r["elements"][0]["ne"].as_f64().unwrap(),
    )
}

fn transmission(sc: &Scenario, polar_deg: f64, azimuth_deg: f64) -> f64 {
    conoscope_at(sc, ConoscopeQuantity::Transmission, polar_deg, azimuth_deg)
        .unwrap()
        .unwrap()
}

/// sin θ of the dark rings along the azimuth 45°, out to sin θ = `max`: local minima of the
/// transmission, refined by golden section.
fn dark_rings(sc: &Scenario, max: f64) -> Vec<f64> {
    let t = |s: f64| transmission(sc, s.asin().to_degrees(), 45.0);
    let n = 2000;
    let samples: Vec<f64> = (0..=n).map(|i| max * i as f64 / n as f64).map(t).collect();
    let mut rings = Vec::new();
    for i in 1..n {
        if samples[i] < samples[i - 1] && samples[i] <= samples[i + 1] && samples[i] < 0.05 {
            let (mut a, mut b) = (max * (i - 1) as f64 / n as f64, max * (i + 1) as f64 / n as f64);
            let g = 0.5 * (5f64.sqrt() - 1.0);
            for _ in 0..60 {
                let (c, d) = (b - g * (b - a), a + g * (b - a));
                if t(c) < t(d) {
                    b = d;
                } else {
                    a = c;
                }
            }
            rings.push(0.5 * (a + b));
        }
    }
    rings
}

#[test]
fn isochromes_of_a_c_cut_plate_follow_the_small_angle_formula() {
    let sc = c_cut(10.0);
    let (no, ne) = indices(&sc);
    let lambda_mm = 589.3e-6;
    let rings = dark_rings(&sc, 17f64.to_radians().sin());
    assert_eq!(rings.len(), 5, "{rings:?}");
    for (k, s) in rings.iter().enumerate() {
        let m = (k + 1) as f64;
        let sin_in = (m * lambda_mm / (10.0 * (ne - no))).sqrt();
        let expected = no * sin_in;
        assert!(
            (s / expected - 1.0).abs() < 0.01,
            "ring {m}: sin θ {s} against {expected}"
        );
        // Dark indeed: the minimum is black up to the plate's faces.
        assert!(transmission(&sc, s.asin().to_degrees(), 45.0) < 1e-6);
    }
}

#[test]
fn isogyres_lie_along_the_polarizer_axes() {
    let sc = c_cut(10.0);
    for polar in [3.0, 11.0, 19.0, 29.0] {
        for azimuth in [0.0, 90.0, 180.0, 270.0] {
            assert!(transmission(&sc, polar, azimuth) < 1e-25, "{polar}° at {azimuth}°");
        }
    }
    // Off the cross, between the rings, light passes: sin²(2φ) sin²(Γ/2) at 45°.
    assert!(transmission(&sc, 8.7, 45.0) > 0.5);
    // The map: with an odd number of pixels the middle row and column lie on the cross.
    let map = conoscope_of(&sc, ConoscopeQuantity::Transmission, 30.0, 65).unwrap();
    for i in 0..65 {
        for v in [map.values[32 * 65 + i], map.values[i * 65 + 32]] {
            assert!(v.unwrap() < 1e-25);
        }
    }
    assert!(map.values[0].is_none(), "a corner lies outside the cone");
    assert!(map.min >= 0.0 && map.max > 0.9 && map.max <= 1.0 + 1e-12);
}

const SET_UPS: [&str; 3] = [
    // A thin c-cut plate between crossed polarizers.
    r#"{"version": 2, "wavelength_nm": 633, "beam": {"polarization": {"kind": "linear", "azimuth_deg": 0}},
        "elements": [{"kind": "crystal", "material": "quartz", "optical_activity": false, "thickness_mm": 0.3, "axis": {"tilt_deg": 0, "azimuth_deg": 0}},
                     {"kind": "polarizer", "transmission_axis_deg": 90}]}"#,
    // A thin calcite plate cut at 40°, a quarter-wave retarder and a polarizer, bare faces.
    r#"{"version": 2, "wavelength_nm": 532, "interface_losses": "uncoated", "beam": {"polarization": {"kind": "linear", "azimuth_deg": 20}},
        "elements": [{"kind": "crystal", "material": "calcite", "thickness_mm": 0.02, "axis": {"tilt_deg": 40, "azimuth_deg": 35}},
                     {"kind": "retarder", "retardance_waves": 0.25, "fast_axis_deg": 10},
                     {"kind": "polarizer", "transmission_axis_deg": 60}]}"#,
    // Two thin plates of different crystals in a row, between parallel polarizers.
    r#"{"version": 2, "wavelength_nm": 800, "beam": {"polarization": {"kind": "linear", "azimuth_deg": 45}},
        "elements": [{"kind": "crystal", "material": "quartz", "optical_activity": false, "thickness_mm": 0.1, "axis": {"tilt_deg": 90, "azimuth_deg": 0}},
                     {"kind": "crystal", "material": "calcite", "thickness_mm": 0.01, "axis": {"tilt_deg": 70, "azimuth_deg": 120}},
                     {"kind": "polarizer", "transmission_axis_deg": 45}]}"#,
];

const DIRECTIONS: [(f64, f64); 6] = [
    (0.0, 0.0),
    (5.0, 30.0),
    (12.0, 135.0),
    (20.0, -60.0),
    (28.0, 200.0),
    (30.0, 90.0),
];

#[test]
fn every_direction_agrees_with_a_whole_trace_at_that_incidence() {
    common::convergent::transmission_agrees_with_whole_traces(&SET_UPS, &DIRECTIONS);
}

#[test]
fn the_acceptance_map_is_the_traced_retardance_against_direction() {
    common::convergent::retardance_agrees_with_whole_traces(&SET_UPS, &DIRECTIONS);
    // A c-cut plate: no retardance on axis, growing with the angle, the same at every azimuth.
    let sc = c_cut(1.0);
    let map = conoscope_of(&sc, ConoscopeQuantity::RetardanceError, 20.0, 33).unwrap();
    let centre = map.values[16 * 33 + 16].unwrap();
    assert!(centre.abs() < 1e-12);
    let at = |p: f64, a: f64| {
        conoscope_at(&sc, ConoscopeQuantity::RetardanceError, p, a)
            .unwrap()
            .unwrap()
    };
    assert!((at(15.0, 0.0) - at(15.0, 77.0)).abs() < 1e-9);
    assert!(at(15.0, 0.0) > at(10.0, 0.0));
}

#[test]
fn bad_requests_name_their_field() {
    let sc = c_cut(1.0);
    let q = ConoscopeQuantity::Transmission;
    assert_eq!(conoscope_of(&sc, q, 0.0, 64).unwrap_err().field, "conoscope.cone_deg");
    assert_eq!(conoscope_of(&sc, q, 85.0, 64).unwrap_err().field, "conoscope.cone_deg");
    assert_eq!(
        conoscope_of(&sc, q, f64::NAN, 64).unwrap_err().field,
        "conoscope.cone_deg"
    );
    assert_eq!(conoscope_of(&sc, q, 30.0, 0).unwrap_err().field, "conoscope.pixels");
    assert_eq!(
        conoscope_of(&sc, q, 30.0, 100_000).unwrap_err().field,
        "conoscope.pixels"
    );
    let no_crystal =
        Scenario::from_json_str(r#"{"version": 2, "elements": [{"kind": "polarizer", "transmission_axis_deg": 90}]}"#)
            .unwrap();
    assert_eq!(
        conoscope_of(&no_crystal, ConoscopeQuantity::RetardanceError, 30.0, 16)
            .unwrap_err()
            .field,
        "elements"
    );
    assert!(conoscope_of(&no_crystal, q, 30.0, 16).is_ok());
}

/// The acceptance of an a-cut plate (optic axis along x, in the faces) against the second-order
/// field-of-view formula of a retardation plate (Yariv & Yeh, *Optical Waves in Crystals*, 1984,
/// ch. 5, from memory; re-derived here from the index surfaces): with s = sin θ outside and φ the
/// azimuth from the optic axis,
/// Γ(θ, φ) ≈ Γ(0) [1 − (s²/(2 n_o)) (cos²φ/n_o − sin²φ/n_e)].
/// The neglected terms are O(s⁴/n⁴) of Γ(0): below 1e-3 waves here, next to errors of 0.1–0.3
/// waves, so the check allows 1 % of the predicted error plus 1e-3 waves.
#[test]
fn the_acceptance_of_an_a_cut_plate_follows_the_field_of_view_formula() {
    let sc = Scenario::from_json_str(
        r#"{"version": 2, "wavelength_nm": 633, "beam": {"polarization": {"kind": "linear", "azimuth_deg": 45}},
            "elements": [{"kind": "crystal", "material": "quartz", "optical_activity": false, "thickness_mm": 1, "axis": {"tilt_deg": 90, "azimuth_deg": 0}}]}"#,
    )
    .unwrap();
    let (no, ne) = indices(&sc);
    let g0 = (ne - no) * 1.0 / 633e-6;
    for (polar, azimuth) in [(5.0f64, 0.0f64), (10.0, 0.0), (10.0, 90.0), (12.0, 30.0), (8.0, 120.0)] {
        let s2 = polar.to_radians().sin().powi(2);
        let (c2, sn2) = (azimuth.to_radians().cos().powi(2), azimuth.to_radians().sin().powi(2));
        let predicted = -g0 * s2 / (2.0 * no) * (c2 / no - sn2 / ne);
        let error = conoscope_at(&sc, ConoscopeQuantity::RetardanceError, polar, azimuth)
            .unwrap()
            .unwrap();
        assert!(
            (error - predicted).abs() < 0.01 * predicted.abs() + 1e-3,
            "{polar}°, {azimuth}°: {error} waves against {predicted}"
        );
    }
}

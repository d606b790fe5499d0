//! Convergent light in white light: the conoscopic figure's colours (the interference colours of
//! the isochromes) against the white-light colour of whole traces, the black and white centre of
//! a c-cut plate between crossed and parallel polarizers, and the first isochrome's radius
//! against the textbook small-angle formula.
//!
//! Textbook formula (Born & Wolf, *Principles of Optics*, §15.4.4, from memory; as in
//! tests/conoscope.rs): a c-cut plate of thickness d retards a wave crossing it at the internal
//! angle θ_in by Γ ≈ d (n_e − n_o) sin²θ_in (a length); between crossed polarizers at wavelength λ
//! the first dark ring lies where Γ = λ, and outside sin θ = n_o sin θ_in.

use doublespar::{
    Colour, Scenario, trace_scenario, white_light_at, white_light_note, white_light_of, white_light_part,
};
use serde_json::Value;

/// A c-cut quartz plate of `mm` (no optical activity) between polarizers at 0° and `analyser_deg`.
fn c_cut(mm: f64, analyser_deg: f64) -> String {
    format!(
        r#"{{"version": 2, "wavelength_nm": 589.3, "beam": {{"polarization": {{"kind": "linear", "azimuth_deg": 0}}}},
            "elements": [{{"kind": "crystal", "material": "quartz", "optical_activity": false, "thickness_mm": {mm}, "axis": {{"tilt_deg": 0, "azimuth_deg": 0}}}},
                         {{"kind": "polarizer", "transmission_axis_deg": {analyser_deg}}}]}}"#
    )
}

fn scenario(doc: &str) -> Scenario {
    Scenario::from_json_str(doc).unwrap()
}

/// The white-light colour (X, Y, Z) the whole trace reports with the beam at one incidence, so
/// wide that the o and e rays' spots overlap fully (its spectrum then is the plane wave's).
fn traced_xyz(doc: &str, polar_deg: f64, azimuth_deg: f64) -> [f64; 3] {
    let mut v: Value = serde_json::from_str(doc).unwrap();
    v["beam"]["incidence"] = serde_json::json!({"polar_deg": polar_deg, "azimuth_deg": azimuth_deg});
    v["beam"]["diameter_mm"] = serde_json::json!(1000);
    v["spectrum"] = serde_json::json!({"from_nm": 400, "to_nm": 700, "points": 2});
    let r = serde_json::to_value(trace_scenario(&scenario(&v.to_string())).unwrap()).unwrap();
    let xyz = &r["spectrum"]["white_light"]["xyz"];
    [0, 1, 2].map(|i| xyz[i].as_f64().unwrap())
}

fn close(a: [f64; 3], b: [f64; 3], tol: f64) -> bool {
    a.iter().zip(&b).all(|(x, y)| (x - y).abs() <= tol)
}

/// Each direction's colour is the white-light colour of the whole trace lit at that direction
/// (contract::white_light, an independent path: the result's spectrum), X, Y, Z to 10⁻⁹ (the
/// trace's spot overlap in its 1 m beam differs from 1 by about 10⁻¹⁰); and the map's pixels are
/// those colours exactly.
#[test]
fn each_direction_s_colour_is_the_whole_trace_s() {
    let doc = c_cut(2.0, 90.0);
    let sc = scenario(&doc);
    for (polar, azimuth) in [(0.0, 0.0), (8.0, 30.0), (15.0, 135.0), (22.0, -60.0), (29.0, 200.0)] {
        let fast = white_light_at(&sc, polar, azimuth).unwrap();
        let whole = traced_xyz(&doc, polar, azimuth);
        assert!(
            close(fast.xyz, whole, 1e-9),
            "{polar}°, {azimuth}°: {:?} against {whole:?}",
            fast.xyz
        );
    }
    // A 5 × 5 map: its middle pixel looks along the axis.
    let map = white_light_of(&sc, 30.0, 5).unwrap();
    assert_eq!((map.pixels, map.colours.len()), (5, 25));
    assert!(map.colours[0].is_none(), "a corner lies outside the cone");
    assert_eq!(map.colours[12], Some(white_light_at(&sc, 0.0, 0.0).unwrap()));
    let rgba = map.rgba();
    assert_eq!(rgba.len(), 100);
    assert_eq!(&rgba[0..4], &[0, 0, 0, 0], "transparent outside the cone");
}

/// A figure shared among workers: the parts' rows put together are the whole figure bit for
/// bit (natively the whole is itself computed on the machine's threads, in other parts), each
/// part's other rows are empty, and a bad split names its field.
#[test]
fn a_figure_s_parts_put_together_are_the_whole_figure() {
    let sc = scenario(&c_cut(2.0, 90.0));
    let side = 37;
    let whole = white_light_of(&sc, 30.0, side).unwrap();
    assert_eq!(
        whole.colours[18 * side + 18],
        Some(white_light_at(&sc, 0.0, 0.0).unwrap())
    );
    for parts in [1, 2, 3, 5] {
        let mut joined = vec![None; side * side];
        for part in 0..parts {
            let map = white_light_part(&sc, 30.0, side, part, parts).unwrap();
            assert_eq!((map.pixels, map.colours.len()), (side, side * side));
            let rows = side * part / parts..side * (part + 1) / parts;
            for (row, line) in map.colours.chunks(side).enumerate() {
                if rows.contains(&row) {
                    joined[row * side..(row + 1) * side].copy_from_slice(line);
                } else {
                    assert!(
                        line.iter().all(Option::is_none),
                        "part {part} of {parts} drew row {row}"
                    );
                }
            }
        }
        assert!(
            joined == whole.colours,
            "{parts} parts put together differ from the whole figure"
        );
    }
    for (part, parts, field) in [
        (0, 0, "conoscope.parts"),
        (0, 17, "conoscope.parts"),
        (3, 3, "conoscope.part"),
    ] {
        let e = white_light_part(&sc, 30.0, side, part, parts).unwrap_err();
        assert_eq!(e.field, field, "{part} of {parts}: {}", e.message);
    }
}

/// The centre of a c-cut plate's figure (light along the optic axis, no retardance) is black
/// between crossed polarizers and white between parallel ones (common practice); D65 white maps to
/// sRGB (255, 255, 255) (IEC 61966-2-1).
#[test]
fn the_centre_is_black_between_crossed_and_white_between_parallel_polarizers() {
    let crossed = white_light_at(&scenario(&c_cut(2.0, 90.0)), 0.0, 0.0).unwrap();
    assert_eq!(crossed.srgb, [0, 0, 0]);
    assert!(crossed.xyz[1] < 1e-20, "{:?}", crossed.xyz);
    let parallel = white_light_at(&scenario(&c_cut(2.0, 0.0)), 0.0, 0.0).unwrap();
    assert_eq!(parallel.srgb, [255, 255, 255]);
    assert!((parallel.xyz[1] - 1.0).abs() < 1e-12, "{:?}", parallel.xyz);
    // Off the axis the isochromes are coloured: somewhere in the cone a pixel is far from grey.
    let map = white_light_of(&scenario(&c_cut(2.0, 90.0)), 30.0, 21).unwrap();
    let chroma = |c: &Colour| {
        let [r, g, b] = c.srgb.map(i32::from);
        r.max(g).max(b) - r.min(g).min(b)
    };
    assert!(map.colours.iter().flatten().any(|c| chroma(c) > 100));
}

/// The first isochrome in white light between crossed polarizers: the darkest ring after the
/// centre (least luminance Y) lies where the retardance is about the wavelength at which the eye's
/// sensitivity under D65 peaks, 560 nm (ȳ·D65 of the CIE tables, largest at 555–560 nm). Against
/// the small-angle formula at 560 nm: within 3 % in sin θ (the formula's own error is under 0.5 %
/// here, the sampling's 0.4 %; the rest is that the luminance's least lies a little short of one
/// wave at 560 nm, as the other wavelengths' transmission pulls it: measured 1.3 % inside).
#[test]
fn the_first_isochrome_follows_the_small_angle_formula_at_the_dominant_wavelength() {
    let mm = 2.0;
    let sc = scenario(&c_cut(mm, 90.0));
    let r = serde_json::to_value(trace_scenario(&scenario(&c_cut(mm, 90.0))).unwrap()).unwrap();
    let (no, ne) = (
        r["elements"][0]["no"].as_f64().unwrap(),
        r["elements"][0]["ne"].as_f64().unwrap(),
    );
    let luminance = |s: f64| white_light_at(&sc, s.asin().to_degrees(), 45.0).unwrap().xyz[1];
    let n = 400;
    let max = 25f64.to_radians().sin();
    let ys: Vec<f64> = (0..=n).map(|i| luminance(max * i as f64 / n as f64)).collect();
    // The first local least of Y after it has risen from the black centre.
    let first = (1..n)
        .find(|&i| ys[i] < ys[i - 1] && ys[i] <= ys[i + 1] && i > 5)
        .expect("a dark ring");
    let s = max * first as f64 / n as f64;
    let expected = no * (560e-6 / (mm * (ne - no))).sqrt();
    assert!(
        (s / expected - 1.0).abs() < 0.03,
        "first ring at sin θ {s}, formula {expected}"
    );
}

/// The note states the illuminant, the observer and the sampling.
#[test]
fn the_note_states_the_sampling() {
    let note = white_light_note(128);
    assert_eq!(
        note,
        "colour in D65 white light (CIE 1931 2° observer): 81 wavelengths, 380–780 nm in air at 5 nm; 128 × 128 directions"
    );
}

/// Bad grids name their field; a cell's figure is computed at the cap; a wedge is refused.
#[test]
fn bad_requests_name_their_field_and_a_cell_is_capped() {
    let sc = scenario(&c_cut(1.0, 90.0));
    assert_eq!(white_light_of(&sc, 30.0, 0).unwrap_err().field, "conoscope.pixels");
    assert_eq!(white_light_of(&sc, 30.0, 257).unwrap_err().field, "conoscope.pixels");
    assert_eq!(white_light_of(&sc, 0.0, 8).unwrap_err().field, "conoscope.cone_deg");
    let cell = scenario(
        r#"{"version": 2, "wavelength_nm": 550, "beam": {"polarization": {"kind": "linear", "azimuth_deg": 0}},
            "elements": [{"kind": "lc_cell", "thickness_um": 2.52, "lc": "5cb", "twist_deg": 90},
                         {"kind": "polarizer", "transmission_axis_deg": 90}]}"#,
    );
    let map = white_light_of(&cell, 30.0, 64).unwrap();
    assert_eq!(map.pixels, doublespar::MAX_PIXELS_WHITE_WITH_CELL);
    // A biaxial plate is solved at every direction too (tests/conoscope_general.rs); faces at
    // an angle are not.
    let ktp = scenario(
        r#"{"version": 2, "elements": [{"kind": "crystal", "material": "ktp", "thickness_mm": 1, "axis": {"tilt_deg": 0, "azimuth_deg": 0}}]}"#,
    );
    assert_eq!(white_light_of(&ktp, 30.0, 8).unwrap().pixels, 8);
    let wedge = scenario(
        r#"{"version": 2, "elements": [{"kind": "crystal", "material": "quartz", "thickness_mm": 5, "axis": {"tilt_deg": 90, "azimuth_deg": 0}, "faces": {"back": {"tilt_deg": 10}}, "aperture_mm": 10}]}"#,
    );
    assert_eq!(white_light_of(&wedge, 30.0, 8).unwrap_err().field, "elements[0]");
}

//! Liquid-crystal cells through the whole contract: the `lc_cell` element read, written back with
//! its defaults and reported (`retardance_waves`, `threshold_voltage_v`, the director profile),
//! and traced in stacks with polarizers and crystals against closed forms evaluated here.

use doublespar::{Scenario, find_nematic, trace_scenario};
use serde_json::Value;
use std::f64::consts::PI;

fn trace(doc: &str) -> Value {
    let sc = Scenario::from_json_str(doc).unwrap_or_else(|e| panic!("{}: {}", e.field, e.message));
    serde_json::to_value(trace_scenario(&sc).unwrap()).unwrap()
}

fn cell_between(cell: &str, first_deg: f64, last_deg: f64, nm: f64) -> String {
    format!(
        r#"{{"version": 2, "wavelength_nm": {nm}, "beam": {{"polarization": {{"kind": "linear", "azimuth_deg": {first_deg}}}}},
        "elements": [{cell}, {{"kind": "polarizer", "transmission_axis_deg": {last_deg}}}]}}"#
    )
}

/// Defaults are written out and the document reads back to the same scenario.
#[test]
fn written_back_with_defaults() {
    let doc = r#"{"version": 2, "elements": [{"kind": "lc_cell", "thickness_um": 4.5, "lc": "5CB"}]}"#;
    let sc = Scenario::from_json_str(doc).unwrap();
    let v = sc.to_json();
    let el = &v["elements"][0];
    assert_eq!(el["kind"], "lc_cell");
    assert_eq!(el["lc"], "5cb");
    assert_eq!(el["pretilt_deg"], 2.0);
    assert_eq!(el["twist_deg"], 0.0);
    assert_eq!(el["voltage_v"], 0.0);
    assert_eq!(el["rubbing_azimuth_deg"], 0.0);
    assert_eq!(Scenario::from_json(&v).unwrap(), sc);
    let custom = r#"{"version": 2, "elements": [{"kind": "lc_cell", "thickness_um": 3, "voltage_v": 1.5, "twist_deg": 90,
        "lc": {"ne": 1.7, "no": 1.5, "k11_pn": 11, "k22_pn": 6, "k33_pn": 17, "eps_parallel": 14, "eps_perpendicular": 4}}]}"#;
    let sc = Scenario::from_json_str(custom).unwrap();
    assert_eq!(Scenario::from_json(&sc.to_json()).unwrap(), sc);
    // A misspelt constant is an unknown field, named.
    let bad = custom.replace("k33_pn", "k3_pn");
    let e = Scenario::from_json_str(&bad).unwrap_err();
    assert!(e.field.starts_with("elements[0].lc."), "{}", e.field);
}

/// An untwisted cell with its rubbing at 45° between crossed polarizers is a variable retarder:
/// T = sin²(πΓ) with Γ the reported retardance (common practice). The reported Γ falls with
/// voltage, from (n_e(pretilt) − n_o) d/λ toward 0; the exact 4×4 trace meets sin²(πΓ) to 10⁻³
/// (its faces and the index gradient reflect a little, which Γ leaves out).
#[test]
fn variable_retarder_between_crossed_polarizers() {
    let mut last = f64::INFINITY;
    for v in [0.0, 0.5, 1.0, 1.5, 2.0, 3.0, 5.0, 10.0] {
        let cell = format!(
            r#"{{"kind": "lc_cell", "thickness_um": 5, "lc": "5cb", "rubbing_azimuth_deg": 45, "voltage_v": {v}}}"#
        );
        let r = trace(&cell_between(&cell, 0.0, 90.0, 633.0));
        let el = &r["elements"][0];
        let gamma = el["retardance_waves"].as_f64().unwrap();
        let t = r["total_power"].as_f64().unwrap();
        assert!((t - (PI * gamma).sin().powi(2)).abs() < 1e-3, "{v} V: T {t}, Γ {gamma}");
        assert!(gamma < last, "{v} V: {gamma} after {last}");
        last = gamma;
        assert_eq!(r["rays"][0]["label"], "c");
        assert!((el["power_out"].as_f64().unwrap() - 1.0).abs() < 1e-12);
        let threshold = el["threshold_voltage_v"].as_f64().unwrap();
        // The scenario's temperature is the default 20 °C: 5CB's constants there.
        let lc = find_nematic("5cb").unwrap().at(0.633, 20.0);
        let expected = PI * (lc.k11_pn * 1e-12 / (8.8541878128e-12 * (lc.eps_parallel - lc.eps_perpendicular))).sqrt();
        assert!((threshold - expected).abs() < 1e-12 * expected);
        let profile = &el["director_profile"];
        assert_eq!(profile["z_um"].as_array().unwrap().len(), 101);
        assert_eq!(profile["tilt_deg"][0], 2.0);
    }
    // At zero volts: (n_eff(2°) − n_o) d/λ with 5CB's catalogue indices.
    let lc = find_nematic("5cb").unwrap().at(0.633, 20.0);
    let p = 2f64.to_radians();
    let neff = 1.0 / (p.sin().powi(2) / lc.no.powi(2) + p.cos().powi(2) / lc.ne.powi(2)).sqrt();
    let cell = r#"{"kind": "lc_cell", "thickness_um": 5, "lc": "5cb", "rubbing_azimuth_deg": 45}"#;
    let r = trace(&cell_between(cell, 0.0, 90.0, 633.0));
    let gamma = r["elements"][0]["retardance_waves"].as_f64().unwrap();
    assert!((gamma - (neff - lc.no) * 5.0 / 0.633).abs() < 1e-12, "{gamma}");
}

/// A 90° twisted cell between parallel polarizers: Gooch & Tarry's (1975)
/// T = sin²(½π√(1+u²))/(1+u²), u = 2dΔn/λ, through the whole contract; the first minimum
/// u = √3 passes under 10⁻⁵ of the light.
#[test]
fn twisted_cell_first_minimum() {
    let nm = 550.0;
    let lc = find_nematic("5cb").unwrap().at(nm / 1000.0, 20.0);
    let dn = lc.ne - lc.no;
    for u in [1.0, 3f64.sqrt(), 3.0] {
        let d = u * nm / 1000.0 / (2.0 * dn);
        let cell =
            format!(r#"{{"kind": "lc_cell", "thickness_um": {d}, "lc": "5cb", "twist_deg": 90, "pretilt_deg": 0}}"#);
        let r = trace(&cell_between(&cell, 0.0, 0.0, nm));
        let t = r["total_power"].as_f64().unwrap();
        let expected = (0.5 * PI * (1.0 + u * u).sqrt()).sin().powi(2) / (1.0 + u * u);
        assert!((t - expected).abs() < 5e-4, "u = {u}: T {t}, Gooch–Tarry {expected}");
        if u == 3f64.sqrt() {
            assert!(t < 1e-5, "first minimum: {t}");
        }
        let twist = &r["elements"][0]["director_profile"]["twist_deg"];
        assert!((twist[100].as_f64().unwrap() - 90.0).abs() < 1e-12);
        assert!((twist[50].as_f64().unwrap() - 45.0).abs() < 1e-9);
    }
}

/// A cell in a stack with a crystal and an ideal element: the crystal splits the cell's one ray
/// into its two modes, labelled after the cell's `c`, and with ideal faces no power is lost.
#[test]
fn works_with_crystals() {
    let doc = r#"{"version": 2, "wavelength_nm": 633, "beam": {"polarization": {"kind": "linear", "azimuth_deg": 0}},
      "elements": [
        {"kind": "lc_cell", "thickness_um": 5, "lc": "5cb", "voltage_v": 3},
        {"kind": "crystal", "material": "quartz", "optical_activity": false, "thickness_mm": 0.5, "axis": {"tilt_deg": 90, "azimuth_deg": 30}},
        {"kind": "rotator", "angle_deg": 10}
      ]}"#;
    let r = trace(doc);
    let labels: Vec<&str> = r["rays"]
        .as_array()
        .unwrap()
        .iter()
        .map(|x| x["label"].as_str().unwrap())
        .collect();
    assert_eq!(labels, ["co", "ce"]);
    assert!((r["total_power"].as_f64().unwrap() - 1.0).abs() < 1e-12);
}

/// Bad cells: each error names its field (the page's bad-input table leaves cells out, since the
/// page's module does not hold them).
#[test]
fn bad_cells_name_their_fields() {
    let custom = |k11: f64, eps_par: f64| {
        format!(
            r#"{{"ne": 1.7, "no": 1.5, "k11_pn": {k11}, "k22_pn": 3, "k33_pn": 10, "eps_parallel": {eps_par}, "eps_perpendicular": 7}}"#
        )
    };
    for (extra, field) in [
        (r#""lc": "mbba9""#.to_string(), "elements[0].lc"),
        (format!(r#""lc": {}"#, custom(-1.0, 19.0)), "elements[0].lc.k11_pn"),
        (format!(r#""lc": {}"#, custom(6.0, 5.0)), "elements[0].lc.eps_parallel"),
        (r#""lc": 5"#.to_string(), "elements[0].lc"),
        (r#""lc": "5cb", "voltage_v": -1"#.to_string(), "elements[0].voltage_v"),
        (
            r#""lc": "5cb", "pretilt_deg": 90"#.to_string(),
            "elements[0].pretilt_deg",
        ),
        (
            r#""lc": "5cb", "twist_deg": "ninety""#.to_string(),
            "elements[0].twist_deg",
        ),
        (
            r#""lc": "5cb", "axis": {"tilt_deg": 3}"#.to_string(),
            "elements[0].axis",
        ),
    ] {
        let doc = format!(r#"{{"version": 2, "elements": [{{"kind": "lc_cell", "thickness_um": 5, {extra}}}]}}"#);
        let e = Scenario::from_json_str(&doc).unwrap_err();
        assert_eq!(e.field, field, "{doc}: {}", e.message);
    }
    // A cell is solved between isotropic media: cemented or contacted to a crystal it is refused.
    for contact in [r#""contact": "optical""#, r#""contact": "cement", "cement_index": 1.5"#] {
        let doc = format!(
            r#"{{"version": 2, "elements": [{{"kind": "crystal", "material": "calcite", "thickness_mm": 1, "axis": {{"tilt_deg": 45}}}},
            {{"kind": "lc_cell", "thickness_um": 5, "lc": "5cb", {contact}}}]}}"#
        );
        assert_eq!(
            Scenario::from_json_str(&doc).unwrap_err().field,
            "elements[1].contact",
            "{doc}"
        );
    }
    let e =
        Scenario::from_json_str(r#"{"elements": [{"kind": "lc_cell", "lc": "5cb", "thickness_um": 0}]}"#).unwrap_err();
    assert_eq!(e.field, "elements[0].thickness_um");
}

/// A catalogued nematic's constants follow its order parameter, fitted to a measurement from
/// 25.1 to 34.8 °C. 5CB clears to an isotropic liquid at about 35 °C (common practice, from
/// memory): a cell of it at or above that is refused on `temperature_c`, naming the element;
/// below 20 °C and above 34.8 °C the trace warns that the model is extrapolated; from 20 to 34.8 °C it
/// is quiet,
/// and the retardance of a cell at 0 V falls with the order parameter (Δn ∝ r, to the few 10⁻⁴
/// the 2° pretilt adds). Custom constants are taken as given.
#[test]
fn a_cell_s_temperature_is_refused_above_clearing_and_warned_away_from_its_data() {
    let doc = |t: f64, lc: &str| {
        format!(
            r#"{{"version": 2, "temperature_c": {t}, "elements": [{{"kind": "polarizer", "transmission_axis_deg": 0}},
            {{"kind": "lc_cell", "thickness_um": 5, "lc": {lc}}}]}}"#
        )
    };
    let warnings = |t: f64, lc: &str| -> Vec<String> {
        let r = trace(&doc(t, lc));
        r["warnings"]
            .as_array()
            .unwrap()
            .iter()
            .map(|w| w.as_str().unwrap().to_string())
            .collect()
    };
    for t in [35.0, 60.0] {
        let e = trace_scenario(&Scenario::from_json_str(&doc(t, r#""5cb""#)).unwrap()).unwrap_err();
        assert_eq!(e.field, "temperature_c");
        assert!(
            e.message.contains("elements[1]") && e.message.contains("clearing point"),
            "{}",
            e.message
        );
    }
    for t in [20.0, 25.0, 30.0, 34.0] {
        assert!(warnings(t, r#""5cb""#).is_empty(), "{t} °C");
    }
    let retardance = |t: f64| {
        trace(&doc(t, r#""5cb""#))["elements"][1]["retardance_waves"]
            .as_f64()
            .unwrap()
    };
    let e = find_nematic("5cb").unwrap();
    for t in [25.0, 30.0, 34.0] {
        let (measured, expected) = (retardance(t) / retardance(20.0), e.order_ratio(t) / e.order_ratio(20.0));
        assert!(
            (measured - expected).abs() < 1e-3,
            "{t} °C: {measured} against {expected}"
        );
    }
    assert!(retardance(34.0) < 0.8 * retardance(20.0));
    for t in [34.9, 10.0] {
        let w = warnings(t, r#""5cb""#);
        assert!(
            w.len() == 1
                && w[0].starts_with("elements[1].lc: 5cb's temperature model")
                && w[0].contains("extrapolated"),
            "{t} °C: {w:?}"
        );
    }
    let custom =
        r#"{"ne": 1.7, "no": 1.5, "k11_pn": 6, "k22_pn": 3, "k33_pn": 10, "eps_parallel": 19, "eps_perpendicular": 7}"#;
    assert!(warnings(60.0, custom).is_empty());
}

/// 5PCH (src/optics/lc/catalogue.rs): nematic up to its clearing point, about 54.5 °C, where 5CB
/// is long isotropic; quiet over its measurement's 25.0-53.4 °C (Wu et al. 1993) but for the
/// warning that its elastic and dielectric constants are recalled; its retardance ratio follows
/// its order parameter and its threshold lies near π√(K11/(ε0 Δε)) = 0.98 V.
#[test]
fn a_5pch_cell_traces_to_its_clearing_point_and_says_its_constants_are_recalled() {
    let doc = |t: f64| {
        format!(
            r#"{{"version": 2, "wavelength_nm": 589, "temperature_c": {t}, "elements": [{{"kind": "lc_cell",
            "thickness_um": 5, "lc": "5pch"}}]}}"#
        )
    };
    let e = trace_scenario(&Scenario::from_json_str(&doc(54.5)).unwrap()).unwrap_err();
    assert_eq!(e.field, "temperature_c");
    assert!(
        e.message.contains("5pch") && e.message.contains("clearing point"),
        "{}",
        e.message
    );
    let e5 = find_nematic("5pch").unwrap();
    let r25 = trace(&doc(25.0));
    for t in [40.0, 50.0] {
        let r = trace(&doc(t));
        let w = r["warnings"].as_array().unwrap();
        let first = w[0].as_str().unwrap_or("");
        assert!(
            w.len() == 1 && first.starts_with("elements[0].lc: 5PCH's elastic and dielectric constants are recalled"),
            "{t} °C: {w:?}"
        );
        let ratio = r["elements"][0]["retardance_waves"].as_f64().unwrap()
            / r25["elements"][0]["retardance_waves"].as_f64().unwrap();
        assert!(
            (ratio - e5.order_ratio(t)).abs() < 1e-3,
            "{t} °C: {ratio} against {}",
            e5.order_ratio(t)
        );
    }
    let w = trace(&doc(20.0))["warnings"].to_string();
    assert!(w.contains("extrapolated"), "{w}");
    let v = r25["elements"][0]["threshold_voltage_v"].as_f64().unwrap();
    let want = PI * (8.5e-12_f64 / (8.854_187_812_8e-12 * 10.0)).sqrt();
    assert!((v - want).abs() < 1e-9, "{v} against {want}");
}

/// A custom nematic (Δn = 0.2) with no pretilt at 0 V is a uniform layer, its director in the
/// faces at the rubbing azimuth: the same as a crystal plate of those indices, its optic axis in
/// the faces. Behind a calcite wedge, whose two rays leave about 10° and 14° off the axis, the
/// cell must meet each ray at its own direction: the whole set-up, with a crossed analyser, then
/// passes the power the plate passes, spot by spot (the plate traced face by face with its own
/// exact per-face solve, the cell by its layered 4×4 solve: independent methods).
#[test]
fn behind_a_wedge_a_cell_meets_each_ray_at_its_own_direction_as_a_plate_would() {
    let nematic =
        r#"{"ne": 1.7, "no": 1.5, "k11_pn": 6, "k22_pn": 3, "k33_pn": 10, "eps_parallel": 19, "eps_perpendicular": 7}"#;
    let set_up = |middle: &str| {
        format!(
            r#"{{"version": 2, "wavelength_nm": 633, "beam": {{"diameter_mm": 1, "polarization": {{"kind": "linear", "azimuth_deg": 30}}}},
            "elements": [
              {{"kind": "crystal", "material": "calcite", "thickness_mm": 3, "aperture_mm": 10, "axis": {{"tilt_deg": 90}},
                "faces": {{"back": {{"tilt_deg": 20}}}}}},
              {middle},
              {{"kind": "polarizer", "gap_mm": 1, "transmission_axis_deg": 90}}]}}"#
        )
    };
    let cell = trace(&set_up(&format!(
        r#"{{"kind": "lc_cell", "gap_mm": 5, "thickness_um": 5, "lc": {nematic}, "rubbing_azimuth_deg": 45, "pretilt_deg": 0}}"#
    )));
    let plate = trace(&set_up(
        r#"{"kind": "crystal", "gap_mm": 5, "no": 1.5, "ne": 1.7, "thickness_mm": 0.005, "axis": {"tilt_deg": 90, "azimuth_deg": 45}}"#,
    ));
    let deviation: Vec<f64> = cell["rays"]
        .as_array()
        .unwrap()
        .iter()
        .map(|r| r["deviation_deg"].as_f64().unwrap())
        .collect();
    assert!(
        deviation.iter().all(|d| *d > 9.0),
        "the rays leave the wedge off the axis: {deviation:?}"
    );
    let powers = |r: &Value| -> Vec<f64> {
        let mut p: Vec<f64> = r["spots"]
            .as_array()
            .unwrap()
            .iter()
            .map(|s| s["power"].as_f64().unwrap())
            .collect();
        p.sort_by(f64::total_cmp);
        p
    };
    let (pc, pp) = (powers(&cell), powers(&plate));
    assert_eq!(pc.len(), 2, "{pc:?}");
    assert_eq!(pc.len(), pp.len());
    // The plate's o- and e-rays walk apart by about half a micrometre in it, so their overlap
    // in the 1 mm beam is short of 1 by about 1e-7 (the cell, of no thickness in the stack's
    // geometry, has none): 1e-6 of the power is allowed. At the input beam's direction the
    // cell would be off by 2.6 % here.
    for (c, p) in pc.iter().zip(&pp) {
        assert!((c - p).abs() <= 1e-6 * p, "spot power: cell {c}, plate {p}");
    }
    let (tc, tp) = (
        cell["total_power"].as_f64().unwrap(),
        plate["total_power"].as_f64().unwrap(),
    );
    assert!((tc - tp).abs() <= 1e-6 * tp && tc > 0.01, "cell {tc}, plate {tp}");
}

/// A liquid-crystal cell in convergent light: every direction of its conoscopic figure is the
/// whole trace with the beam at that direction, and a uniform layer (custom nematic, no
/// pretilt, 0 V) between crossed polarizers gives the figure of the equal crystal plate.
#[test]
fn a_cell_s_conoscopic_figure_is_the_equal_plate_s_and_the_trace_s() {
    use doublespar::{ConoscopeQuantity, conoscope_at, conoscope_of};
    let nematic =
        r#"{"ne": 1.7, "no": 1.5, "k11_pn": 6, "k22_pn": 3, "k33_pn": 10, "eps_parallel": 19, "eps_perpendicular": 7}"#;
    let between = |middle: &str| {
        Scenario::from_json_str(&format!(
            r#"{{"version": 2, "wavelength_nm": 550, "beam": {{"polarization": {{"kind": "linear", "azimuth_deg": 0}}}},
            "elements": [{middle}, {{"kind": "polarizer", "transmission_axis_deg": 90}}]}}"#
        ))
        .unwrap()
    };
    let cell = between(&format!(
        r#"{{"kind": "lc_cell", "thickness_um": 4, "lc": {nematic}, "rubbing_azimuth_deg": 30, "pretilt_deg": 0}}"#
    ));
    let plate = between(
        r#"{"kind": "crystal", "no": 1.5, "ne": 1.7, "thickness_mm": 0.004, "axis": {"tilt_deg": 90, "azimuth_deg": 30}}"#,
    );
    let (a, b) = (
        conoscope_of(&cell, ConoscopeQuantity::Transmission, 40.0, 33).unwrap(),
        conoscope_of(&plate, ConoscopeQuantity::Transmission, 40.0, 33).unwrap(),
    );
    for (i, (x, y)) in a.values.iter().zip(&b.values).enumerate() {
        match (x, y) {
            (Some(x), Some(y)) => assert!((x - y).abs() <= 1e-9, "pixel {i}: cell {x}, plate {y}"),
            (None, None) => {}
            _ => panic!("pixel {i}: {x:?} against {y:?}"),
        }
    }
    assert!(
        a.max - a.min > 0.3,
        "the figure varies across the cone: {} to {}",
        a.min,
        a.max
    );
    // A finer map of a cell is computed at the cap, and says so; a plate's is not capped.
    let fine = conoscope_of(&cell, ConoscopeQuantity::Transmission, 40.0, 256).unwrap();
    assert_eq!(
        (fine.pixels, fine.values.len()),
        (doublespar::MAX_PIXELS_WITH_CELL, 192 * 192)
    );
    assert_eq!(
        conoscope_of(&plate, ConoscopeQuantity::Transmission, 40.0, 64)
            .unwrap()
            .pixels,
        64
    );
    // One direction against the whole trace of the cell lit at it.
    let (polar, azimuth) = (25.0, 70.0);
    let mut lit = cell.clone();
    lit.beam.polar_deg = polar;
    lit.beam.azimuth_deg = azimuth;
    let traced = trace_scenario(&lit).unwrap().total_power;
    let pixel = conoscope_at(&cell, ConoscopeQuantity::Transmission, polar, azimuth)
        .unwrap()
        .unwrap();
    assert!((traced - pixel).abs() <= 1e-12, "trace {traced}, figure {pixel}");
}

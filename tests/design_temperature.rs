//! Designs at a temperature (`temperature_c` of a design request): the part each kind emits,
//! traced whole at the temperature it carries, gives the design's figures there; and each
//! temperature sensitivity the answer states agrees with an independent path, a central difference
//! of two whole traces of the emitted part at T ± h, and for the displacer with the closed form of
//! the walk-off differentiated by hand.

use doublespar::{Scenario, solve_design_str, trace_scenario};
use serde_json::{Value, json};

fn design(doc: &str) -> Value {
    solve_design_str(doc).unwrap_or_else(|e| panic!("{doc}: {e}"))
}

/// The answer's part traced whole, at the temperature it carries or at `t_c`.
fn traced(answer: &Value, t_c: Option<f64>) -> Value {
    let mut doc = answer["scenario"].clone();
    if let Some(t) = t_c {
        doc["version"] = json!(2);
        doc["temperature_c"] = json!(t);
    }
    let sc = Scenario::from_json(&doc).unwrap_or_else(|e| panic!("{doc}: {e}"));
    serde_json::to_value(trace_scenario(&sc).unwrap()).unwrap()
}

fn num(v: &Value, path: &str) -> f64 {
    v.pointer(path)
        .and_then(Value::as_f64)
        .unwrap_or_else(|| panic!("{path} in {v}"))
}

fn assert_rel(got: f64, want: f64, rel: f64, what: &str) {
    assert!(
        (got - want).abs() <= rel * want.abs(),
        "{what}: got {got}, want {want} (relative {:e})",
        (got - want).abs() / want.abs()
    );
}

/// (f(t + h) − f(t − h)) / 2h.
fn central(f: impl Fn(f64) -> f64, t: f64, h: f64) -> f64 {
    (f(t + h) - f(t - h)) / (2.0 * h)
}

/// The answer's stated change of `figure` per kelvin against a central difference of the figure
/// `of` two whole traces of the part at T ± h (h the answer's own step).
fn check_sensitivity(answer: &Value, figure: &str, of: impl Fn(&Value) -> f64, rel: f64) {
    assert_stated(answer, figure, |t| of(&traced(answer, Some(t))), rel);
}

/// The answer's stated change of `figure` per kelvin against a central difference of `f` (the
/// figure found independently at a temperature) about the design temperature, with the answer's
/// own step.
fn assert_stated(answer: &Value, figure: &str, f: impl Fn(f64) -> f64, rel: f64) {
    let t = num(answer, "/temperature/design_temperature_c");
    let h = num(answer, "/temperature/step_k");
    let stated = num(answer, &format!("/temperature/per_kelvin/{figure}"));
    assert_rel(stated, central(f, t, h), rel, figure);
}

#[test]
fn a_displacer_designed_hot_separates_as_asked_at_its_temperature() {
    let doc = r#"{"kind": "displacer", "material": "calcite", "separation_mm": 2, "temperature_c": 60, "samples": 0}"#;
    let d = design(doc);
    assert_eq!(d["scenario"]["temperature_c"], 60.0);
    let sep = |r: &Value| num(r, "/elements/0/separation_mm");
    let at_t = traced(&d, None);
    assert_rel(sep(&at_t), 2.0, 1e-9, "separation at 60 °C");
    assert_rel(
        num(&at_t, "/elements/0/thickness_mm"),
        num(&d, "/length_mm"),
        1e-15,
        "made length",
    );
    assert_rel(
        num(&at_t, "/elements/0/thickness_at_temperature_mm"),
        num(&d, "/length_at_temperature_mm"),
        1e-12,
        "length at 60 °C",
    );
    // The same request at 20 °C asks for another length: the temperature is not ignored.
    let cold = design(&doc.replace(r#""temperature_c": 60"#, r#""temperature_c": 20"#));
    assert!((num(&cold, "/length_mm") - num(&d, "/length_mm")).abs() > 1e-4);
    assert!(cold["scenario"].get("temperature_c").is_none());
    check_sensitivity(&d, "separation_um", |r| 1e3 * sep(r), 1e-6);
}

#[test]
fn the_displacer_sensitivity_is_the_walkoff_formula_differentiated() {
    // s = L(T) tan ρ(n_o(T), n_e(T)) with tan ρ = (n_o² − n_e²) sin θ cos θ / (n_e² cos²θ +
    // n_o² sin²θ), L(T) = L₂₀(1 + α_z (T − 20)), α_z = α∥cos²θ + α⊥sin²θ. Calcite's data as the
    // catalogue cites them (a crystal supplier's data sheet): dn_o/dT = 3e-6, dn_e/dT = 13e-6 /K,
    // α∥ = 25e-6, α⊥ = −5.8e-6 /K. By hand: ∂tanρ/∂n_o = 2 n_o n_e² sc/b², ∂tanρ/∂n_e =
    // −2 n_e n_o² sc/b² (s = sin θ, c = cos θ, b the denominator).
    let d = design(
        r#"{"kind": "displacer", "material": "calcite", "separation_mm": 1.5, "temperature_c": 85, "cut_tilt_deg": 35, "samples": 0}"#,
    );
    let (no, ne) = (num(&d, "/no"), num(&d, "/ne"));
    let theta = num(&d, "/cut_tilt_deg").to_radians();
    let (s, c) = theta.sin_cos();
    let b = ne * ne * c * c + no * no * s * s;
    let tan_rho = ((no * no - ne * ne) * s * c / b).abs();
    let sign = ((no * no - ne * ne) * s * c).signum();
    let (dt_dno, dt_dne) = (
        sign * 2.0 * no * ne * ne * s * c / (b * b),
        -sign * 2.0 * ne * no * no * s * c / (b * b),
    );
    let alpha = 25e-6 * c * c - 5.8e-6 * s * s;
    let (l20, lt) = (num(&d, "/length_mm"), num(&d, "/length_at_temperature_mm"));
    let ds_dt = l20 * alpha * tan_rho + lt * (dt_dno * 3e-6 + dt_dne * 13e-6);
    assert_rel(
        num(&d, "/temperature/per_kelvin/separation_um"),
        1e3 * ds_dt,
        1e-6,
        "closed form",
    );
}

/// The retardance of a part of plates with their axes in the faces, traced whole: each plate's,
/// counted negative where its axis is crossed with the first's, waves.
fn plates_retardance(answer: &Value, trace: &Value) -> f64 {
    let els = answer["scenario"]["elements"].as_array().unwrap();
    let az = |i: usize| {
        els[i]
            .pointer("/axis/azimuth_deg")
            .and_then(Value::as_f64)
            .unwrap_or(0.0)
    };
    (0..els.len())
        .map(|i| {
            let g = num(trace, &format!("/elements/{i}/retardance_waves"));
            if ((az(i) - az(0)).abs() - 90.0).abs() < 1e-9 {
                -g
            } else {
                g
            }
        })
        .sum()
}

#[test]
fn waveplates_designed_hot_or_cold_retard_as_asked_at_their_temperature() {
    for (doc, target) in [
        (
            r#"{"kind": "waveplate", "material": "quartz", "retardance_waves": 0.25, "temperature_c": 80}"#,
            0.25,
        ),
        (
            r#"{"kind": "waveplate", "material": "mgf2", "retardance_waves": 0.5, "order": "multiple", "order_number": 4, "temperature_c": -30}"#,
            4.5,
        ),
        (
            r#"{"kind": "waveplate", "material": "calcite", "retardance_waves": 0.25, "order": "compound", "base_mm": 0.5, "temperature_c": 150}"#,
            -0.25,
        ),
    ] {
        let d = design(doc);
        let at_t = traced(&d, None);
        assert_rel(plates_retardance(&d, &at_t), target, 1e-9, doc);
        assert_rel(num(&d, "/retardance_waves"), target, 1e-9, doc);
        check_sensitivity(&d, "retardance_waves", |r| plates_retardance(&d, r), 1e-6);
        assert_eq!(
            num(&d, "/temperature/per_kelvin/retardance_waves"),
            num(&d, "/temperature/retardance_per_kelvin_waves")
        );
    }
}

#[test]
fn an_achromat_designed_hot_holds_both_wavelengths_at_its_temperature() {
    let d = design(
        r#"{"kind": "achromat", "first": {"material": "quartz"}, "second": {"material": "mgf2"}, "retardance_waves": 0.25, "wavelengths_nm": [600, 1000], "temperature_c": 70}"#,
    );
    // The achromat counts a plate with its axis at 0° positive, whichever comes first.
    let first_crossed = d
        .pointer("/scenario/elements/0/axis/azimuth_deg")
        .and_then(Value::as_f64)
        == Some(90.0);
    let sign = if first_crossed { -1.0 } else { 1.0 };
    let at = |nm: f64, t: Option<f64>| {
        let mut a = d.clone();
        a["scenario"]["wavelength_nm"] = json!(nm);
        sign * plates_retardance(&a, &traced(&a, t))
    };
    for nm in [600.0, 1000.0] {
        assert_rel(at(nm, None), 0.25, 1e-9, &format!("{nm} nm"));
    }
    let h = num(&d, "/temperature/step_k");
    for (nm, figure) in [
        (600.0, "retardance_first_wavelength_waves"),
        (1000.0, "retardance_second_wavelength_waves"),
    ] {
        let traced_slope = central(|t| at(nm, Some(t)), 70.0, h);
        assert_rel(
            num(&d, &format!("/temperature/per_kelvin/{figure}")),
            traced_slope,
            1e-6,
            figure,
        );
    }
}

#[test]
fn an_athermal_pair_is_athermal_about_the_requested_temperature() {
    let d = design(
        r#"{"kind": "athermal-waveplate", "first": {"material": "quartz"}, "second": {"material": "mgf2"}, "retardance_waves": 0.25, "temperature_c": 60}"#,
    );
    assert_eq!(num(&d, "/temperature/design_temperature_c"), 60.0);
    let g = |t: Option<f64>| plates_retardance(&d, &traced(&d, t));
    assert_rel(g(None).abs(), 0.25, 1e-9, "retardance at 60 °C");
    // Stationary at 60 °C in whole traces (what is left is the curvature, h² d²Γ/dT² / 2 at most);
    // not at 20 °C, where a pair made athermal there would be.
    let slope = |t: f64| central(|t| g(Some(t)), t, 1.0);
    assert!(slope(60.0).abs() < 1e-9, "{}", slope(60.0));
    assert!(
        slope(20.0).abs() > 1e3 * slope(60.0).abs(),
        "{} {}",
        slope(20.0),
        slope(60.0)
    );
    // The stated slope against the traces' (central differences with the answer's own step): both
    // vanish, so they are compared to rounding (a quarter wave known to about 1e-16).
    let stated = num(&d, "/temperature/per_kelvin/retardance_waves");
    let h = num(&d, "/temperature/step_k");
    let traced_slope = central(|t| g(Some(t)), 60.0, h);
    assert!((stated - traced_slope).abs() < 1e-12, "{stated} against {traced_slope}");
    let band = d["temperature"]["band_c"].as_array().unwrap();
    assert!(band[0].as_f64().unwrap() < 60.0 && band[1].as_f64().unwrap() > 60.0);
}

/// The ray labelled `label` in a traced result.
fn ray<'a>(trace: &'a Value, label: &str) -> &'a Value {
    trace["rays"]
        .as_array()
        .unwrap()
        .iter()
        .find(|r| r["label"] == label)
        .unwrap_or_else(|| panic!("no ray {label}"))
}

#[test]
fn a_tilt_tuned_plate_reaches_its_target_at_its_temperature() {
    let doc = r#"{"kind": "tilt-tuning", "material": "quartz", "thickness_mm": 0.5, "retardance_waves": 0.25, "tilt_azimuth_deg": 90, "temperature_c": 70}"#;
    let d = design(doc);
    let waves = |r: &Value| num(r, "/elements/0/retardance_waves");
    let target = num(&d, "/retardance_waves");
    assert_rel(waves(&traced(&d, None)), target, 1e-9, "retardance at the tilt");
    assert!((target.abs() - 0.25 - num(&d, "/order")).abs() < 1e-9, "{target}");
    check_sensitivity(&d, "retardance_waves", waves, 1e-6);
    // The tilt's change per kelvin against two whole designs at T ± h.
    let tilt_at = |t: f64| num(&design(&doc.replace("70}", &format!("{t}}}"))), "/tilt_deg");
    assert_stated(&d, "tilt_deg", tilt_at, 1e-4);
}

#[test]
fn a_rotator_designed_hot_turns_by_its_rotation_at_its_temperature() {
    let d = design(r#"{"kind": "quartz-rotator", "rotation_deg": 45, "temperature_c": 120}"#);
    let azimuth = |r: &Value| num(r, "/spots/0/ellipse/azimuth_deg");
    let at_t = traced(&d, None);
    assert_eq!(at_t["spots"].as_array().unwrap().len(), 1);
    let turn = azimuth(&at_t);
    assert!((turn - 45.0).abs() < 1e-9, "{turn}");
    assert!(num(&d, "/thickness_mm") < num(&d, "/thickness_at_temperature_mm"));
    check_sensitivity(&d, "rotation_deg", azimuth, 1e-6);
}

#[test]
fn a_recombiner_checked_hot_reports_the_residual_of_its_temperature() {
    let d = design(
        r#"{"kind": "recombiner", "material": "calcite", "length_mm": 5, "length_mismatch_mm": 0.01, "temperature_c": 50}"#,
    );
    let residual = |r: &Value| num(ray(r, "eo"), "/exit_position_mm/0") - num(ray(r, "oe"), "/exit_position_mm/0");
    assert_rel(
        residual(&traced(&d, None)),
        num(&d, "/residual_vector_mm/0"),
        1e-9,
        "residual",
    );
    check_sensitivity(&d, "residual_x_mm", residual, 1e-4);
}

#[test]
fn a_splitter_designed_cold_splits_as_asked_at_its_temperature() {
    let d = design(
        r#"{"kind": "angular-splitter", "material": "calcite", "split_angle_deg": 5, "temperature_c": -40, "samples": 0}"#,
    );
    let split = |r: &Value| {
        let (a, b) = (&ray(r, "oe")["direction"], &ray(r, "eo")["direction"]);
        let v = |x: &Value, i: usize| x[i].as_f64().unwrap();
        let dot: f64 = (0..3).map(|i| v(a, i) * v(b, i)).sum();
        let cross = [
            v(a, 1) * v(b, 2) - v(a, 2) * v(b, 1),
            v(a, 2) * v(b, 0) - v(a, 0) * v(b, 2),
            v(a, 0) * v(b, 1) - v(a, 1) * v(b, 0),
        ];
        (cross.iter().map(|c| c * c).sum::<f64>().sqrt())
            .atan2(dot)
            .to_degrees()
    };
    assert_rel(split(&traced(&d, None)), 5.0, 1e-9, "split at −40 °C");
    check_sensitivity(&d, "split_angle_deg", split, 1e-6);
}

#[test]
fn a_polarizer_field_edges_move_per_kelvin_as_the_traced_edges_do() {
    let d = design(r#"{"kind": "prism-polarizer", "material": "calcite", "temperature_c": 90}"#);
    let letter = |mode: &str| d[mode].as_str().unwrap().to_string();
    let (reflected, passed) = (letter("reflected_mode"), letter("passed_mode"));
    // Whether the mode `m` is totally reflected at the gap when the part at `t` °C is lit at `x`°
    // in the plane of the gap's tilt (the ray through the axis point stays well inside the 10 mm
    // aperture at these angles).
    let reflects = |m: &str, t: f64, x: f64| {
        let mut a = d.clone();
        a["scenario"]["beam"]["incidence"] =
            json!({"polar_deg": x.abs(), "azimuth_deg": if x < 0.0 { 180.0 } else { 0.0 }});
        let r = traced(&a, Some(t));
        let rejected = r["rejected"].as_array().unwrap();
        rejected
            .iter()
            .any(|r| r["reason"] == "total internal reflection" && r["label"].as_str().unwrap().starts_with(m))
    };
    // Each edge by the whole trace, bisected from normal incidence (inside) to twice the edge
    // (outside): above the upper edge the reflected mode passes, below the lower one the passed
    // mode is reflected too.
    let edge = |name: &str, holds: &dyn Fn(f64, f64) -> bool, t: f64| {
        let (mut lo, mut hi) = (0.0, 2.0 * num(&d, &format!("/{name}/incidence_deg")));
        assert!(holds(t, lo) && !holds(t, hi), "{name}");
        for _ in 0..60 {
            let mid = 0.5 * (lo + hi);
            if holds(t, mid) { lo = mid } else { hi = mid }
        }
        0.5 * (lo + hi)
    };
    let blocks = |t: f64, x: f64| reflects(&reflected, t, x);
    let passes = |t: f64, x: f64| !reflects(&passed, t, x);
    for (name, figure, holds) in [
        ("upper_edge", "upper_edge_deg", &blocks as &dyn Fn(f64, f64) -> bool),
        ("lower_edge", "lower_edge_deg", &passes),
    ] {
        let at = |t: f64| edge(name, holds, t);
        assert_rel(at(90.0), num(&d, &format!("/{name}/incidence_deg")), 1e-9, name);
        assert_stated(&d, figure, at, 1e-5);
    }
}

#[test]
fn every_plate_states_its_thickness_made_and_at_temperature_as_the_trace_grows_it() {
    for doc in [
        r#"{"kind": "waveplate", "material": "calcite", "retardance_waves": 0.25, "order": "compound", "base_mm": 0.5, "temperature_c": 150}"#,
        r#"{"kind": "achromat", "first": {"material": "quartz"}, "second": {"material": "mgf2"}, "retardance_waves": 0.25, "wavelengths_nm": [600, 1000], "temperature_c": 70}"#,
        r#"{"kind": "athermal-waveplate", "first": {"material": "quartz"}, "second": {"material": "mgf2"}, "retardance_waves": 0.25, "temperature_c": -60}"#,
    ] {
        let d = design(doc);
        let at_t = traced(&d, None);
        for (i, p) in d["plates"].as_array().unwrap().iter().enumerate() {
            assert_eq!(p["thickness_mm"], d["scenario"]["elements"][i]["thickness_mm"], "{doc}");
            let grown = num(&at_t, &format!("/elements/{i}/thickness_at_temperature_mm"));
            assert_rel(num(p, "/thickness_at_temperature_mm"), grown, 1e-15, doc);
            assert!(
                num(p, "/thickness_at_temperature_mm") != num(p, "/thickness_mm"),
                "{doc}"
            );
        }
    }
}

#[test]
fn a_temperature_outside_the_data_warns_on_temperature_c_and_out_of_range_is_an_error() {
    // Calcite's thermo-optic data are cited for 0-100 °C (src/optics/material/thermal.rs).
    let d = design(
        r#"{"kind": "displacer", "material": "calcite", "separation_mm": 1, "temperature_c": 400, "samples": 0}"#,
    );
    let w: Vec<&str> = d["warnings"]
        .as_array()
        .unwrap()
        .iter()
        .map(|x| x.as_str().unwrap())
        .collect();
    assert!(
        w.len() == 1 && w[0].starts_with("temperature_c: 400 °C is outside"),
        "{w:?}"
    );
    for (kind, rest) in [
        ("displacer", r#""material": "calcite", "separation_mm": 1"#),
        ("quartz-rotator", r#""rotation_deg": 45"#),
        (
            "athermal-waveplate",
            r#""first": {"material": "quartz"}, "second": {"material": "mgf2"}, "retardance_waves": 0.25"#,
        ),
    ] {
        for bad in ["-201", "500.5", "\"warm\""] {
            let doc = format!(r#"{{"kind": "{kind}", {rest}, "temperature_c": {bad}}}"#);
            let e = solve_design_str(&doc).expect_err(&doc);
            assert_eq!(e.field, "temperature_c", "{doc}: {e}");
        }
    }
}

#[test]
fn wedges_and_prisms_state_their_thicknesses_at_temperature_as_the_trace_grows_them() {
    for doc in [
        r#"{"kind": "angular-splitter", "material": "calcite", "split_angle_deg": 5, "temperature_c": 70, "samples": 0}"#,
        r#"{"kind": "prism-polarizer", "material": "yvo4", "cement_index": 1.45, "temperature_c": -20}"#,
    ] {
        let d = design(doc);
        let at_t = traced(&d, None);
        for i in 0..2 {
            assert_eq!(
                d["thickness_mm"][i], d["scenario"]["elements"][i]["thickness_mm"],
                "{doc}"
            );
            let grown = num(&at_t, &format!("/elements/{i}/thickness_at_temperature_mm"));
            assert_rel(num(&d, &format!("/thickness_at_temperature_mm/{i}")), grown, 1e-15, doc);
        }
    }
}

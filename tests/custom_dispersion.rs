//! Crystals given by their own dispersion coefficients (`dispersion` of a crystal element): the
//! catalogue's formulas re-entered as coefficients give the catalogue's numbers to the last bit,
//! the group index against a central difference, the echo of `fitted_in` and `citation`, every bad
//! field named, and random coefficients that never panic nor give NaN.

use doublespar::{Dispersion, ElementReport, Scenario, build_view, materials, trace_scenario};
use proptest::prelude::*;
use serde_json::{Value, json};

/// A catalogue formula as the document's formula object.
fn formula(d: &Dispersion) -> Value {
    match *d {
        Dispersion::Sellmeier { a, terms } => {
            json!({"a": a, "sellmeier": terms.iter().map(|&(b, c)| [b, c]).collect::<Vec<_>>()})
        }
        // Conversion of the pole-and-IR form a + b/(λ² − c) − d λ²: a' = a, poles [[b, c]], ir d.
        Dispersion::PoleAndIr { a, b, c, d } => json!({"a": a, "poles": [[b, c]], "ir": d}),
        Dispersion::Poles { .. } => panic!("not a uniaxial catalogue form"),
    }
}

/// The `dispersion` object holding catalogue crystal `key`'s formulas and range.
fn catalogue_dispersion(key: &str) -> Value {
    let m = materials().iter().find(|m| m.key == key).expect("catalogued");
    json!({"range_nm": [m.range_nm.0, m.range_nm.1], "o": formula(&m.ordinary), "e": formula(&m.extraordinary)})
}

/// A two-crystal stack at oblique incidence, the first crystal given by `medium` (fields merged
/// into the element), traced at `nm`.
fn scenario(medium: &Value, nm: f64, polar_deg: f64) -> Value {
    let mut first = json!({"kind": "crystal", "thickness_mm": 3.0, "axis": {"tilt_deg": 40, "azimuth_deg": 20}});
    for (k, v) in medium.as_object().expect("object") {
        first[k] = v.clone();
    }
    json!({"version": 2, "wavelength_nm": nm, "screen_mm": 50,
           "beam": {"incidence": {"polar_deg": polar_deg, "azimuth_deg": 30}},
           "elements": [first, {"kind": "crystal", "material": "quartz", "thickness_mm": 1.0,
                                 "axis": {"tilt_deg": 90}, "gap_mm": 2}]})
}

fn trace(doc: &Value) -> Value {
    let sc = Scenario::from_json(doc).unwrap_or_else(|e| panic!("{e}: {doc}"));
    serde_json::to_value(trace_scenario(&sc).expect("traced")).expect("serialized")
}

/// The result without the first crystal's `material`, `dispersion`, `source` and
/// `source_spread` (which name where the indices come from).
fn without_source(mut r: Value) -> Value {
    let first = r["elements"][0].as_object_mut().expect("object");
    for key in ["material", "dispersion", "source", "source_spread"] {
        first.remove(key);
    }
    r
}

#[test]
fn catalogue_coefficients_entered_by_hand_give_the_catalogue_trace_bit_for_bit() {
    // Independent check: the catalogue's own evaluation of the same published formulas (G. Ghosh,
    // Opt. Commun. 163, 95 (1999) for calcite; the vanadate's pole-and-IR formula re-entered as a
    // pole and an IR term). Equality is exact: both take the same arithmetic path.
    for key in ["calcite", "yvo4", "sapphire", "alpha-bbo"] {
        for (nm, polar) in [(632.8, 0.0), (1064.0, 12.0), (450.0, -25.0), (3000.0, 5.0)] {
            let custom = trace(&scenario(&json!({"dispersion": catalogue_dispersion(key)}), nm, polar));
            let catalogue = trace(&scenario(&json!({"material": key}), nm, polar));
            assert_eq!(custom["elements"][0]["material"], "custom dispersion");
            let (a, b) = (without_source(custom), without_source(catalogue));
            for part in ["rays", "elements", "spots", "total_power", "rejected"] {
                assert_eq!(a[part], b[part], "{key} at {nm} nm: {part}");
            }
            // Warnings: the same range warning in both (the published range is entered); the
            // catalogue alone adds alpha-BBO's unverified-data warning.
            let count = |r: &Value| r["warnings"].as_array().map_or(0, Vec::len);
            let extra = usize::from(key == "alpha-bbo");
            assert_eq!(
                count(&a) + extra,
                count(&b),
                "{key} at {nm} nm: {} against {}",
                a["warnings"],
                b["warnings"]
            );
        }
    }
}

#[test]
fn the_vanadate_through_poles_and_ir_equals_the_catalogue_within_1e_15() {
    // The conversion a' = a, poles [[b, c]], ir d of the pole-and-IR form; required to 1e-15
    // (it is in fact exact).
    for nm in [400.0, 532.0, 800.0, 1550.0, 3400.0] {
        let custom = trace(&scenario(&json!({"dispersion": catalogue_dispersion("yvo4")}), nm, 0.0));
        let catalogue = trace(&scenario(&json!({"material": "yvo4"}), nm, 0.0));
        for f in ["no", "ne"] {
            let (a, b) = (
                custom["elements"][0][f].as_f64().expect("index"),
                catalogue["elements"][0][f].as_f64().expect("index"),
            );
            assert!((a - b).abs() <= 1e-15, "{f} at {nm} nm: {a} against {b}");
        }
    }
}

/// n of the formula `f` at `um` micrometres, written out by hand (the textbook expression).
fn by_hand(f: &Value, um: f64) -> f64 {
    let u = um * um;
    let pairs = |name: &str| -> Vec<(f64, f64)> {
        f[name].as_array().map_or(Vec::new(), |l| {
            l.iter()
                .map(|p| (p[0].as_f64().expect("b"), p[1].as_f64().expect("c")))
                .collect()
        })
    };
    let n2 = f["a"].as_f64().expect("a")
        + pairs("sellmeier").iter().map(|&(b, c)| b * u / (u - c)).sum::<f64>()
        + pairs("poles").iter().map(|&(b, c)| b / (u - c)).sum::<f64>()
        - f["ir"].as_f64().unwrap_or(0.0) * u;
    n2.sqrt()
}

#[test]
fn a_mixed_formula_gives_its_textbook_index_and_its_group_index_by_central_difference() {
    // Sellmeier terms, a pole and an IR term together (coefficients of the sizes published for
    // borates and vanadates). The phase index against the formula written out by hand; the group
    // index n − λ dn/dλ the report gives against a central difference of n over ±0.1 nm
    // (truncation about h² n‴/6 ≈ 1e-9, rounding about 1e-16/1e-4 = 1e-12): tolerance 1e-7.
    let o = json!({"a": 2.2, "sellmeier": [[0.6, 0.02], [0.9, 110.0]], "poles": [[0.012, 0.018]], "ir": 0.004});
    let e = json!({"a": 2.0, "sellmeier": [[0.5, 0.015]], "ir": 0.01});
    let d = json!({"range_nm": [400, 2000], "o": o, "e": e});
    let index = |nm: f64| {
        let doc = json!({"version": 2, "wavelength_nm": nm,
            "elements": [{"kind": "crystal", "dispersion": d, "thickness_mm": 1, "axis": {"tilt_deg": 90}}]});
        trace(&doc)["elements"][0].clone()
    };
    for nm in [450.0, 633.0, 1064.0, 1800.0] {
        let here = index(nm);
        let um = nm / 1000.0;
        for (name, f) in [("no", &o), ("ne", &e)] {
            let n = here[name].as_f64().expect("index");
            assert!(
                (n - by_hand(f, um)).abs() <= 1e-14,
                "{name} at {nm} nm: {n} against {}",
                by_hand(f, um)
            );
            let h = 1e-4;
            let slope = (by_hand(f, um + h) - by_hand(f, um - h)) / (2.0 * h);
            let want = n - um * slope;
            let mode = if name == "no" { "o" } else { "e" };
            let got = here[mode]["group_index"].as_f64().expect("group index");
            assert!(
                (got - want).abs() <= 1e-7,
                "{name} group at {nm} nm: {got} against {want}"
            );
        }
    }
}

#[test]
fn fitted_in_and_citation_are_echoed_and_reported() {
    let mut d = catalogue_dispersion("calcite");
    d["fitted_in"] = json!("air");
    d["citation"] = json!("A. Author, A Journal 1, 2 (2000); room temperature");
    let doc = scenario(&json!({"dispersion": d}), 632.8, 0.0);
    let sc = Scenario::from_json(&doc).expect("valid");
    let echoed = sc.to_json();
    assert_eq!(
        echoed["elements"][0]["dispersion"], d,
        "the document's dispersion, written back"
    );
    assert_eq!(Scenario::from_json(&echoed).expect("valid again"), sc);
    let r = trace(&doc);
    // The report names the formulas, their range, fitted_in and citation as the document gave them.
    assert_eq!(r["elements"][0]["dispersion"], d);
    // Defaults: fitted in vacuum, no citation.
    let plain = Scenario::from_json(&scenario(
        &json!({"dispersion": catalogue_dispersion("calcite")}),
        632.8,
        0.0,
    ))
    .expect("valid")
    .to_json();
    assert_eq!(plain["elements"][0]["dispersion"]["fitted_in"], "vacuum");
    assert!(plain["elements"][0]["dispersion"].get("citation").is_none());
}

#[test]
fn outside_the_range_a_warning_and_where_the_formula_breaks_down_an_error_on_its_axis() {
    let doc = scenario(&json!({"dispersion": catalogue_dispersion("calcite")}), 2500.0, 0.0);
    let r = trace(&doc);
    let w = r["warnings"].to_string();
    assert!(
        w.contains("2500 nm is outside the 204-2172 nm range of the custom dispersion formula"),
        "{w}"
    );
    // e: n² = 1.2 − 0.5 λ² is below zero beyond 1.55 µm.
    let d = json!({"range_nm": [400, 1000], "o": {"a": 2.5}, "e": {"a": 1.2, "ir": 0.5}});
    let doc = scenario(&json!({"dispersion": d}), 2000.0, 0.0);
    let e = trace_scenario(&Scenario::from_json(&doc).expect("valid")).unwrap_err();
    assert_eq!(e.field, "elements[0].dispersion.e", "{e}");
    assert!(e.message.contains("2000 nm") && e.message.contains("n² = "), "{e}");
    // At a pole of o.
    let d = json!({"range_nm": [400, 1000], "o": {"a": 2.5, "poles": [[0.1, 0.36]]}, "e": {"a": 2.4}});
    let e = trace_scenario(&Scenario::from_json(&scenario(&json!({"dispersion": d}), 600.0, 0.0)).expect("valid"))
        .unwrap_err();
    assert_eq!(e.field, "elements[0].dispersion.o", "{e}");
    assert!(e.message.contains("resonance"), "{e}");
    // Below 1 on the biaxial y axis.
    let d = json!({"range_nm": [400, 1000], "x": {"a": 2.5}, "y": {"a": 0.8}, "z": {"a": 2.6}});
    let e = trace_scenario(&Scenario::from_json(&scenario(&json!({"dispersion": d}), 600.0, 0.0)).expect("valid"))
        .unwrap_err();
    assert_eq!(e.field, "elements[0].dispersion.y", "{e}");
    assert!(e.message.contains("below 1"), "{e}");
}

#[test]
fn x_y_z_formulas_label_modes_as_fixed_principal_indices_do() {
    // CONVENTIONS.md, "More media": two equal principal indices make a uniaxial crystal (o/e),
    // three different a biaxial one (f/s), exactly as for nx, ny, nz.
    let calcite = catalogue_dispersion("calcite");
    let d = json!({"range_nm": [204, 2172], "x": calcite["o"], "y": calcite["o"], "z": calcite["e"]});
    let r = trace(&scenario(&json!({"dispersion": d}), 632.8, 0.0));
    let c = &r["elements"][0];
    assert!(c["o"].is_object() && c["e"].is_object(), "{c}");
    let by_oe = trace(&scenario(&json!({"dispersion": calcite}), 632.8, 0.0));
    assert_eq!(c["no"], by_oe["elements"][0]["no"]);
    assert_eq!(c["ne"], by_oe["elements"][0]["ne"]);
    let d = json!({"range_nm": [400, 1000], "x": {"a": 3.1}, "y": {"a": 3.2}, "z": {"a": 3.4}});
    let r = trace(&scenario(&json!({"dispersion": d}), 632.8, 0.0));
    let c = &r["elements"][0];
    assert!(c["f"].is_object() && c["s"].is_object(), "{c}");
    assert_eq!(c["nx"].as_f64(), Some(3.1_f64.sqrt()));
}

#[test]
fn away_from_20_c_a_formula_without_temperature_data_holds_with_a_warning() {
    let mut doc = scenario(&json!({"dispersion": catalogue_dispersion("calcite")}), 632.8, 0.0);
    let at_20 = trace(&doc);
    doc["temperature_c"] = json!(80);
    let at_80 = trace(&doc);
    assert_eq!(at_20["elements"][0]["no"], at_80["elements"][0]["no"]);
    assert_eq!(at_80["elements"][0]["thickness_at_temperature_mm"], json!(3.0));
    let warnings = at_80["warnings"].to_string();
    assert!(
        warnings.contains("no thermo-optic data (dn_dt_per_k) for o, e"),
        "{warnings}"
    );
    assert!(
        warnings.contains("no thermal expansion (expansion_per_k) for o, e"),
        "{warnings}"
    );
    assert!(!at_20["warnings"].to_string().contains("thermo-optic"));
}

/// Catalogue calcite's formulas with its temperature data re-entered by hand: dn/dT 3e-6 (o) and
/// 13e-6 (e) /K, expansion −5.8e-6 /K across the axis and 25e-6 /K along it (the constants of
/// src/optics/material/thermal.rs).
fn calcite_with_temperature_data() -> Value {
    let mut d = catalogue_dispersion("calcite");
    d["o"]["dn_dt_per_k"] = json!(3e-6);
    d["e"]["dn_dt_per_k"] = json!(13e-6);
    d["o"]["expansion_per_k"] = json!(-5.8e-6);
    d["e"]["expansion_per_k"] = json!(25e-6);
    d
}

#[test]
fn temperature_data_entered_by_hand_give_the_catalogues_trace_at_temperature_bit_for_bit() {
    // Independent of the custom path: the catalogue's own temperature laws applied to the same
    // constants (calcite; BiBO, V. Petrov et al., Laser & Photonics Reviews 4, 53 (2010), Table 3,
    // with the catalogue's expansions). Rays, element reports (indices, group indices, thickness
    // at temperature, retardance) and spots equal to the last bit at 60 °C and at −10 °C.
    let bibo = doublespar::find_biaxial("bibo").expect("catalogued");
    let mut bibo_doc = json!({"range_nm": [bibo.range_nm.0, bibo.range_nm.1]});
    let bibo_dn = [3.5e-6, -5.6e-6, -6.8e-6];
    let bibo_alpha = [4.8e-6, 4.4e-6, -26.7e-6];
    for (i, axis) in ["x", "y", "z"].into_iter().enumerate() {
        bibo_doc[axis] = formula(&bibo.formulas[i]);
        bibo_doc[axis]["dn_dt_per_k"] = json!(bibo_dn[i]);
        bibo_doc[axis]["expansion_per_k"] = json!(bibo_alpha[i]);
    }
    for (key, d) in [("calcite", calcite_with_temperature_data()), ("bibo", bibo_doc)] {
        for (t, nm, polar) in [(60.0, 632.8, 0.0), (-10.0, 1064.0, 12.0), (60.0, 450.0, -25.0)] {
            let mut custom = scenario(&json!({"dispersion": d}), nm, polar);
            let mut catalogue = scenario(&json!({"material": key}), nm, polar);
            custom["temperature_c"] = json!(t);
            catalogue["temperature_c"] = json!(t);
            let (a, b) = (without_source(trace(&custom)), without_source(trace(&catalogue)));
            for part in ["rays", "elements", "spots", "total_power", "rejected"] {
                assert_eq!(a[part], b[part], "{key} at {t} °C, {nm} nm: {part}");
            }
            assert_ne!(a["elements"][0]["thickness_at_temperature_mm"], json!(3.0));
            // Every axis has its data: no warning of missing ones (the catalogue alone warns at
            // −10 °C, outside its data's 0-100 °C).
            assert!(!a["warnings"].to_string().contains("_per_k"), "{}", a["warnings"]);
        }
    }
}

#[test]
fn an_a_cut_plates_retardance_at_temperature_is_the_closed_form() {
    // Normal incidence on a plate whose optic axis lies in its faces: Γ = Δn(T) L(T) / λ with
    // Δn(T) = Δn(20 °C) + (dn_e/dT − dn_o/dT)(T − 20) and L(T) = L (1 + α⊥ (T − 20)), the axis
    // across the beam (textbook, e.g. A. Yariv and P. Yeh, Optical Waves in Crystals (1984),
    // §4.1, from memory). Fixed indices stand in for the formula's value at 20 °C.
    let d = json!({"range_nm": [400, 1000], "o": {"a": 2.4, "dn_dt_per_k": -4e-6, "expansion_per_k": 7e-6},
                   "e": {"a": 2.2, "dn_dt_per_k": 9e-6, "expansion_per_k": 1.3e-5}});
    for t in [-40.0, 20.0, 95.0, 300.0] {
        let doc = json!({"version": 2, "wavelength_nm": 600, "screen_mm": 20, "temperature_c": t,
            "elements": [{"kind": "crystal", "dispersion": d, "thickness_mm": 2.0,
                          "axis": {"tilt_deg": 90, "azimuth_deg": 30}}]});
        let r = trace(&doc);
        let dt = t - 20.0;
        let (no, ne) = (2.4_f64.sqrt() - 4e-6 * dt, 2.2_f64.sqrt() + 9e-6 * dt);
        let l = 2.0 * (1.0 + 7e-6 * dt);
        let e = &r["elements"][0];
        assert!((e["no"].as_f64().expect("no") - no).abs() <= 1e-15, "{t} °C: {e}");
        assert!((e["ne"].as_f64().expect("ne") - ne).abs() <= 1e-15, "{t} °C: {e}");
        assert!((e["thickness_at_temperature_mm"].as_f64().expect("thickness") - l).abs() <= 1e-15);
        let want = (ne - no) * l / 600e-6;
        let got = e["retardance_waves"].as_f64().expect("retardance");
        assert!((got - want).abs() <= 1e-12 * want.abs(), "{t} °C: {got} against {want}");
        // A non-dispersive formula with a constant dn/dT: each group index is its phase index.
        for (mode, n) in [("o", no), ("e", ne)] {
            let g = e[mode]["group_index"].as_f64().expect("group index");
            assert!((g - n).abs() <= 1e-9, "{t} °C {mode}: {g} against {n}");
        }
        // Every axis has its data and no range is stated: no warning at any temperature.
        assert!(r["warnings"].as_array().is_none_or(Vec::is_empty), "{}", r["warnings"]);
    }
}

#[test]
fn the_temperature_data_are_echoed_and_missing_ones_named() {
    let mut d = calcite_with_temperature_data();
    d["e"].as_object_mut().expect("object").remove("dn_dt_per_k");
    d["o"].as_object_mut().expect("object").remove("expansion_per_k");
    let mut doc = scenario(&json!({"dispersion": d}), 632.8, 0.0);
    doc["temperature_c"] = json!(45);
    let r = trace(&doc);
    let echo = &r["elements"][0]["dispersion"];
    assert_eq!(echo["o"]["dn_dt_per_k"], json!(3e-6));
    assert_eq!(echo["e"]["expansion_per_k"], json!(25e-6));
    assert!(echo["e"].get("dn_dt_per_k").is_none() && echo["o"].get("expansion_per_k").is_none());
    let w = r["warnings"].to_string();
    assert!(w.contains("(dn_dt_per_k) for e:"), "{w}");
    assert!(w.contains("(expansion_per_k) for o:"), "{w}");
    // The echo reads back as the same crystal.
    let sc = Scenario::from_json(&doc).expect("valid");
    let again = Scenario::from_json(&sc.to_json()).expect("its own document reads");
    assert_eq!(trace(&sc.to_json())["elements"], r["elements"]);
    assert_eq!(again.to_json(), sc.to_json());
}

#[test]
fn the_wavelength_plots_follow_the_custom_formula() {
    // The separation and retardance against wavelength re-evaluate the plate at every point: with
    // the catalogue's coefficients they draw the catalogue's curves, over the formula's range.
    let custom = scenario(&json!({"dispersion": catalogue_dispersion("calcite")}), 632.8, 0.0);
    let catalogue = scenario(&json!({"material": "calcite"}), 632.8, 0.0);
    for view in ["separation-wavelength", "retardance-wavelength"] {
        let scene = |doc: &Value| {
            let sc = Scenario::from_json(doc).expect("valid");
            let r = trace_scenario(&sc).expect("traced");
            format!("{:?}", build_view(view, &sc, &r).expect("view").items)
        };
        let (a, b) = (scene(&custom), scene(&catalogue));
        // Only the note naming the source differs.
        let strip = |s: String| s.replace("custom dispersion", "calcite");
        assert_eq!(strip(a), b, "{view}");
    }
}

#[test]
fn every_bad_field_is_named() {
    let good = || json!({"range_nm": [400, 1000], "o": {"a": 2.5, "sellmeier": [[0.5, 0.02]]}, "e": {"a": 2.4}});
    let seven: Vec<[f64; 2]> = (0..7).map(|i| [0.1, f64::from(i)]).collect();
    // (member path within `dispersion`, its new value (null: removed), the field named).
    let cases = [
        (&["range_nm"][..], json!([1000, 400]), "elements[0].dispersion.range_nm"),
        (&["range_nm"], json!([0, 400]), "elements[0].dispersion.range_nm[0]"),
        (&["range_nm"], json!([-5, 400]), "elements[0].dispersion.range_nm[0]"),
        (&["range_nm"], json!([400]), "elements[0].dispersion.range_nm"),
        (&["range_nm"], json!([400, "x"]), "elements[0].dispersion.range_nm[1]"),
        (&["range_nm"], Value::Null, "elements[0].dispersion.range_nm"),
        (
            &["o", "sellmeier"],
            json!([[0.5, -0.02]]),
            "elements[0].dispersion.o.sellmeier[0][1]",
        ),
        (
            &["o", "sellmeier"],
            json!([[0.5, 0.02], ["b", 1]]),
            "elements[0].dispersion.o.sellmeier[1][0]",
        ),
        (
            &["o", "sellmeier"],
            json!([[0.5]]),
            "elements[0].dispersion.o.sellmeier[0]",
        ),
        (&["o", "sellmeier"], json!(0.5), "elements[0].dispersion.o.sellmeier"),
        (&["e", "poles"], json!(seven), "elements[0].dispersion.e.poles"),
        (
            &["e", "poles"],
            json!([[0.1, -1]]),
            "elements[0].dispersion.e.poles[0][1]",
        ),
        (&["e", "ir"], json!("0.1"), "elements[0].dispersion.e.ir"),
        (&["e", "a"], Value::Null, "elements[0].dispersion.e.a"),
        (&["e", "b"], json!(1), "elements[0].dispersion.e.b"),
        (&["e"], Value::Null, "elements[0].dispersion.e"),
        (&["e"], json!(2.4), "elements[0].dispersion.e"),
        (&["x"], json!({"a": 2}), "elements[0].dispersion.x"),
        (&["fitted_in"], json!("water"), "elements[0].dispersion.fitted_in"),
        (&["citation"], json!(7), "elements[0].dispersion.citation"),
        (&["citation"], json!("é".repeat(241)), "elements[0].dispersion.citation"),
        (&["colour"], json!("blue"), "elements[0].dispersion.colour"),
        (
            &["o", "dn_dt_per_k"],
            json!(0.01),
            "elements[0].dispersion.o.dn_dt_per_k",
        ),
        (
            &["e", "dn_dt_per_k"],
            json!("1e-5"),
            "elements[0].dispersion.e.dn_dt_per_k",
        ),
        (
            &["e", "expansion_per_k"],
            json!(1e-3),
            "elements[0].dispersion.e.expansion_per_k",
        ),
        (
            &["temperature_range_c"],
            json!([0, 100]),
            "elements[0].dispersion.temperature_range_c",
        ),
        (&[], json!([1, 2]), "elements[0].dispersion"),
    ];
    for (at, value, field) in cases {
        let mut d = good();
        let slot = at.iter().fold(&mut d, |v, k| &mut v[*k]);
        *slot = value;
        let doc = scenario(&json!({"dispersion": d}), 632.8, 0.0);
        let e = Scenario::from_json(&doc).expect_err(field);
        assert_eq!(e.field, field, "{d}: {e}");
        assert!(!e.message.is_empty());
    }
    // Both a catalogue material and formulas.
    let doc = scenario(&json!({"dispersion": good(), "material": "calcite"}), 632.8, 0.0);
    assert_eq!(Scenario::from_json(&doc).unwrap_err().field, "elements[0].dispersion");
    let doc = scenario(&json!({"dispersion": good(), "no": 1.5, "ne": 1.6}), 632.8, 0.0);
    assert_eq!(Scenario::from_json(&doc).unwrap_err().field, "elements[0].dispersion");
}

/// A formula of random coefficients: wide magnitudes, negative strengths, poles anywhere.
fn any_formula() -> impl Strategy<Value = Value> {
    let pair = (-1e3f64..1e3, 0.0f64..1e3);
    (
        -1e3f64..1e3,
        prop::collection::vec(pair.clone(), 0..=6),
        prop::collection::vec(pair, 0..=6),
        -10.0f64..10.0,
    )
        .prop_map(|(a, s, p, ir)| {
            json!({"a": a, "sellmeier": s.iter().map(|&(b, c)| [b, c]).collect::<Vec<_>>(),
                   "poles": p.iter().map(|&(b, c)| [b, c]).collect::<Vec<_>>(), "ir": ir})
        })
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(300))]
    #[test]
    fn random_coefficients_never_panic_nor_give_nan(
        o in any_formula(),
        e in any_formula(),
        nm in 1.0f64..1e6,
        lo in 1.0f64..1e4,
    ) {
        let d = json!({"range_nm": [lo, lo * 2.0], "o": o, "e": e});
        let doc = json!({"version": 2, "wavelength_nm": nm,
            "elements": [{"kind": "crystal", "dispersion": d, "thickness_mm": 1, "axis": {"tilt_deg": 30}}]});
        let sc = Scenario::from_json(&doc).expect("valid coefficients");
        match trace_scenario(&sc) {
            Ok(r) => {
                let ElementReport::Crystal { no, ne, modes, separation_mm, .. } = &r.elements[0] else { panic!("a crystal") };
                prop_assert!(no.is_some_and(|n| n.is_finite() && n >= 1.0));
                prop_assert!(ne.is_some_and(|n| n.is_finite() && n >= 1.0));
                // Serialized, a NaN would read as null: checked on the typed report instead.
                for m in [&modes.first, &modes.second] {
                    prop_assert!(m.index.is_none_or(f64::is_finite) && m.group_index.is_none_or(f64::is_finite));
                }
                prop_assert!(separation_mm.is_none_or(f64::is_finite));
            }
            Err(e) => prop_assert!(e.field.starts_with("elements[0].dispersion.") || e.field.starts_with("wavelength_nm"), "{e}"),
        }
    }
}

#[test]
fn a_design_request_takes_the_crystals_own_formulas() {
    // A displacer of calcite given by its catalogue coefficients (G. Ghosh, Opt. Commun. 163, 95
    // (1999), re-entered) is the catalogue calcite's displacer: the same arithmetic path.
    let formulas = catalogue_dispersion("calcite");
    let by_formula = doublespar::solve_design(
        &json!({"kind": "displacer", "dispersion": formulas, "separation_mm": 1.5, "samples": 1000}),
    )
    .unwrap();
    let by_key = doublespar::solve_design(
        &json!({"kind": "displacer", "material": "calcite", "separation_mm": 1.5, "samples": 1000}),
    )
    .unwrap();
    for key in ["length_mm", "cut_tilt_deg", "walkoff_deg", "separation_mm"] {
        assert_eq!(by_formula[key], by_key[key], "{key}");
    }
    // The part it hands on carries the formulas, and no catalogue source is claimed.
    assert!(by_formula["scenario"]["elements"][0]["dispersion"].is_object());
    assert_eq!(by_formula["sources"], json!([]));
    // x, y, z formulas are a biaxial crystal, which a polarizing prism does not take (a displacer
    // does, cut in a principal plane: tests/biaxial_design.rs); both forms at once are refused;
    // each error names the field.
    let xyz = json!({"range_nm": [400, 1000], "x": {"a": 2.2}, "y": {"a": 2.3}, "z": {"a": 2.4}});
    let e = doublespar::solve_design(&json!({"kind": "prism-polarizer", "dispersion": xyz})).unwrap_err();
    assert_eq!(e.field, "dispersion");
    let biaxial =
        doublespar::solve_design(&json!({"kind": "displacer", "dispersion": xyz, "separation_mm": 1, "samples": 0}));
    assert_eq!(biaxial.map(|d| d["plane"].clone()).ok(), Some(json!("xz")));
    let e = doublespar::solve_design(
        &json!({"kind": "displacer", "dispersion": formulas, "material": "calcite", "separation_mm": 1}),
    )
    .unwrap_err();
    assert_eq!(e.field, "dispersion");
    let e = doublespar::solve_design(&json!({"kind": "waveplate", "retardance_waves": 0.25, "dispersion": {"range_nm": [400, 1000], "o": {"a": -1}, "e": {"a": 2.2}}})).unwrap_err();
    assert!(e.field.starts_with("dispersion.o"), "{}: {}", e.field, e.message);
}

#[test]
fn design_temperature_figures_follow_the_formulas_own_temperature_data() {
    // A waveplate and an athermal pair whose calcite is given by its formulas and its temperature
    // data (re-entered by hand) answer as the catalogue's calcite does: the same temperature
    // slope and band, the same athermal thicknesses and residual curvature.
    let d = calcite_with_temperature_data();
    let waveplate = |medium: Value| {
        let mut req = json!({"kind": "waveplate", "retardance_waves": 0.25, "wavelength_nm": 633,
                             "order": "multiple", "order_number": 5, "temperature_c": 35});
        for (k, v) in medium.as_object().expect("object") {
            req[k] = v.clone();
        }
        doublespar::solve_design(&req).expect("designed")
    };
    let (a, b) = (
        waveplate(json!({"dispersion": d})),
        waveplate(json!({"material": "calcite"})),
    );
    assert_eq!(a["temperature"], b["temperature"]);
    assert_eq!(a["plates"][0]["thickness_mm"], b["plates"][0]["thickness_mm"]);
    assert!(
        a["temperature"]["retardance_per_kelvin_waves"]
            .as_f64()
            .expect("slope")
            .abs()
            > 1e-5
    );
    let pair = |first: Value| {
        doublespar::solve_design(&json!({"kind": "athermal-waveplate", "first": first,
            "second": {"material": "quartz"}, "retardance_waves": 0.25, "wavelength_nm": 633}))
        .expect("designed")
    };
    let filter = |medium: Value| {
        let mut req = json!({"kind": "birefringent-filter", "bandwidth_nm": 2, "wavelength_nm": 633});
        for (k, v) in medium.as_object().expect("object") {
            req[k] = v.clone();
        }
        doublespar::solve_design(&req).expect("designed")
    };
    let (a, b) = (filter(json!({"dispersion": d})), filter(json!({"material": "calcite"})));
    assert_eq!(a["centre_shift_nm_per_k"], b["centre_shift_nm_per_k"]);
    assert!(
        a["centre_shift_nm_per_k"].as_f64().is_some(),
        "{}",
        a["centre_shift_nm_per_k"]
    );
    let (a, b) = (pair(json!({"dispersion": d})), pair(json!({"material": "calcite"})));
    for key in ["plates", "curvature_waves_per_k2"] {
        let strip = |v: &Value| v.to_string().replace("custom dispersion", "calcite");
        assert_eq!(strip(&a[key]), strip(&b[key]), "{key}");
    }
}

#[test]
fn a_design_answer_warns_as_its_trace_does_and_names_the_temperature_data_it_lacks() {
    // Outside the formula's range: the design answer carries the warning its own scenario's
    // trace gives.
    let mut d = catalogue_dispersion("calcite");
    d["range_nm"] = json!([400, 600]);
    let a = doublespar::solve_design(
        &json!({"kind": "waveplate", "retardance_waves": 0.25, "dispersion": d, "wavelength_nm": 633}),
    )
    .expect("designed");
    let traced = trace(&a["scenario"]);
    let w = a["warnings"].to_string();
    assert!(
        w.contains("633 nm is outside the 400-600 nm range of the custom dispersion formula"),
        "{w}"
    );
    assert!(
        traced["warnings"]
            .to_string()
            .contains("633 nm is outside the 400-600 nm range")
    );
    // The temperature figures of a formula without temperature data are zero by construction:
    // the answer says which data it lacks, at 20 °C too; with every axis's data, no such warning.
    assert!(
        w.contains(
            "dispersion: the custom dispersion formula has no dn_dt_per_k for o, e and expansion_per_k for o, e"
        ),
        "{w}"
    );
    let mut half = calcite_with_temperature_data();
    half["e"].as_object_mut().expect("object").remove("dn_dt_per_k");
    let b = doublespar::solve_design(
        &json!({"kind": "waveplate", "retardance_waves": 0.25, "dispersion": half, "wavelength_nm": 633}),
    )
    .expect("designed");
    assert!(
        b["warnings"].to_string().contains("no dn_dt_per_k for e:"),
        "{}",
        b["warnings"]
    );
    let full = calcite_with_temperature_data();
    let c = doublespar::solve_design(
        &json!({"kind": "waveplate", "retardance_waves": 0.25, "dispersion": full, "wavelength_nm": 633}),
    )
    .expect("designed");
    assert!(!c["warnings"].to_string().contains("_per_k"), "{}", c["warnings"]);
    // Fixed indices say their temperature figures count them as constant.
    let e = doublespar::solve_design(
        &json!({"kind": "waveplate", "retardance_waves": 0.25, "no": 1.6, "ne": 1.5, "wavelength_nm": 633}),
    )
    .expect("designed");
    assert!(
        e["warnings"]
            .to_string()
            .contains("no: fixed indices carry no temperature data"),
        "{}",
        e["warnings"]
    );
}

//! Design requests in air wavelengths (`"wavelength_in": "air"`) and the group indices of the
//! waveplate and displacer answers.
//!
//! An air request must be the vacuum request at Ciddor's vacuum wavelength (the conversion
//! itself is checked against published air/vacuum pairs in `src/optics/material/air.rs`, and for
//! scenarios in `tests/spectrum.rs`); the answer reports both wavelengths, and its scenario reads
//! back to the very vacuum wavelength the design used. A filter's own widths (its pass band met,
//! the next orders' pass bands, the centre's drift) are vacuum widths with `air_` twins beside
//! them, each the vacuum width times dλ_air/dλ_vac at the centre, taken here by a central
//! difference of the standard-air conversion itself. The group indices the answers give must be
//! those a trace of the answer's own scenario reports, and the group delay (g₂ − g₁)·L/c.

use doublespar::{
    DESIGN_KINDS, ElementReport, Scenario, Wavelength, air_from_vacuum, solve_design, trace_scenario, vacuum_from_air,
};
use serde_json::{Value, json};

/// Speed of light in vacuum, mm/ps: 299 792 458 m/s exactly (SI definition of the metre).
const C_MM_PER_PS: f64 = 299_792_458.0 * 1e3 / 1e12;

/// Air wavelengths of the reference pairs of `src/optics/material/air.rs` (recalled from NIST's
/// atomic spectra database and common practice, "from memory" there too) with their vacuum
/// wavelengths and the tolerance of the printed digits: helium-neon and sodium D2.
const PAIRS: [(f64, f64, f64); 2] = [(632.816, 632.991, 1e-3), (588.995, 589.1583, 1e-4)];

fn solved(request: &Value) -> Value {
    solve_design(request).unwrap_or_else(|e| panic!("{request}: {e}"))
}

fn vacuum_nm(air_nm: f64) -> f64 {
    vacuum_from_air(air_nm).expect("in range").vacuum.nm()
}

/// `a` and `b` agree to 1e-12 relative in every number, except where `a` (the air answer) says
/// what it was given in air; lists compared element by element, objects key by key.
fn assert_same(a: &Value, b: &Value, path: &str) {
    match (a, b) {
        (Value::Number(x), Value::Number(y)) => {
            let (x, y) = (x.as_f64().unwrap(), y.as_f64().unwrap());
            assert!(
                (x - y).abs() <= 1e-12 * x.abs().max(y.abs()).max(1e-300),
                "{path}: air request {x:e}, vacuum request {y:e}"
            );
        }
        (Value::Array(x), Value::Array(y)) => {
            assert_eq!(x.len(), y.len(), "{path}: lengths");
            for (i, (u, v)) in x.iter().zip(y).enumerate() {
                assert_same(u, v, &format!("{path}[{i}]"));
            }
        }
        (Value::Object(x), Value::Object(y)) => {
            let air_only = |k: &str| k.starts_with("air_") || k == "wavelength_in" || k == "air_index";
            let keys =
                |m: &serde_json::Map<String, Value>| m.keys().filter(|k| !air_only(k)).cloned().collect::<Vec<_>>();
            assert_eq!(keys(x), keys(y), "{path}: keys");
            for k in keys(x) {
                // A scenario states its wavelength in the request's basis (checked apart).
                if path.ends_with("scenario") && k == "wavelength_nm" {
                    continue;
                }
                assert_same(&x[&k], &y[&k], &format!("{path}.{k}"));
            }
        }
        _ => assert_eq!(a, b, "{path}"),
    }
}

/// `base` asked in air at `air_nm` (with its band, if any, in air) against the same request in
/// vacuum at Ciddor's vacuum equivalents; then what the air answer reports.
fn air_equals_vacuum(base: Value, air_nm: f64, air_band: Option<[f64; 2]>) {
    let vac_nm = vacuum_nm(air_nm);
    let mut air = base.clone();
    air["wavelength_in"] = json!("air");
    air["wavelength_nm"] = json!(air_nm);
    let mut vacuum = base;
    vacuum["wavelength_nm"] = json!(vac_nm);
    if let Some([lo, hi]) = air_band {
        air["band_nm"] = json!([lo, hi]);
        vacuum["band_nm"] = json!([vacuum_nm(lo), vacuum_nm(hi)]);
    }
    let (a, v) = (solved(&air), solved(&vacuum));
    assert_same(&a, &v, "");
    // Both wavelengths reported, the basis echoed.
    assert_eq!(a["wavelength_in"], "air", "{air}");
    assert_eq!(v["wavelength_in"], "vacuum", "{vacuum}");
    assert_eq!(a["air_wavelength_nm"].as_f64(), Some(air_nm), "{air}");
    assert_eq!(a["wavelength_nm"].as_f64(), Some(vac_nm), "{air}");
    let n = a["air_index"].as_f64().unwrap();
    assert!(
        (n * air_nm - vac_nm).abs() <= 1e-9,
        "λ_vac = n λ_air: {n} × {air_nm} against {vac_nm}"
    );
    assert!(v.get("air_wavelength_nm").is_none() && v.get("air_index").is_none());
    if let Some(band) = air_band {
        assert_eq!(a["air_band_nm"], json!(band), "{air}");
        assert_eq!(a["band_nm"], json!([vacuum_nm(band[0]), vacuum_nm(band[1])]), "{air}");
    }
    // The scenario is in air, and reads back to the design's vacuum wavelength bit for bit.
    assert_eq!(a["scenario"]["wavelength_in"], "air");
    assert_eq!(a["scenario"]["wavelength_nm"].as_f64(), Some(air_nm));
    let sc = Scenario::from_json(&a["scenario"]).unwrap();
    assert_eq!(sc.wavelength.nm().to_bits(), vac_nm.to_bits(), "{air}");
    let traced = trace_scenario(&sc).unwrap();
    assert_eq!(traced.air_wavelength_nm, Some(air_nm));
    assert_eq!(traced.wavelength_nm.to_bits(), vac_nm.to_bits());
}

#[test]
fn the_reference_pairs_convert_as_recalled() {
    // The pairs this file uses, from memory (see PAIRS): the conversion they stand on.
    for (air, vac, tol) in PAIRS {
        let got = vacuum_nm(air);
        assert!((got - vac).abs() <= tol, "{air} nm in air: expected {vac}, got {got}");
    }
}

#[test]
fn an_air_waveplate_is_the_vacuum_waveplate_at_the_vacuum_wavelength() {
    for (air_nm, _, _) in PAIRS {
        air_equals_vacuum(
            json!({"kind": "waveplate", "material": "quartz", "retardance_waves": 0.25}),
            air_nm,
            Some([550.0, 700.0]),
        );
    }
    // A multiple-order calcite half wave without a band (its default band follows the vacuum
    // wavelength), and a biaxial plate.
    air_equals_vacuum(
        json!({"kind": "waveplate", "material": "calcite", "retardance_waves": 0.5, "order": "multiple", "order_number": 3}),
        632.816,
        None,
    );
    air_equals_vacuum(
        json!({"kind": "waveplate", "material": "ktp", "retardance_waves": 0.5}),
        1063.7,
        None,
    );
}

#[test]
fn an_air_displacer_is_the_vacuum_displacer_at_the_vacuum_wavelength() {
    for (air_nm, _, _) in PAIRS {
        air_equals_vacuum(
            json!({"kind": "displacer", "material": "calcite", "separation_mm": 1, "samples": 2000}),
            air_nm,
            Some([500.0, 800.0]),
        );
    }
    air_equals_vacuum(
        json!({"kind": "displacer", "material": "yvo4", "separation_mm": 2, "samples": 0}),
        1063.7,
        None,
    );
}

#[test]
fn an_air_request_without_a_wavelength_takes_the_default_in_air() {
    let a =
        solved(&json!({"kind": "waveplate", "material": "quartz", "retardance_waves": 0.25, "wavelength_in": "air"}));
    assert_eq!(a["air_wavelength_nm"].as_f64(), Some(632.8));
    assert_eq!(a["wavelength_nm"].as_f64(), Some(vacuum_nm(632.8)));
    // "vacuum" said outright is the default.
    let plain = json!({"kind": "displacer", "material": "calcite", "separation_mm": 1, "samples": 0});
    let mut said = plain.clone();
    said["wavelength_in"] = json!("vacuum");
    assert_eq!(solved(&plain), solved(&said));
}

#[test]
fn a_bad_basis_is_an_error_on_wavelength_in_for_every_kind() {
    for kind in DESIGN_KINDS {
        for bad in [json!("water"), json!(1), json!(null), json!("Air")] {
            let e = solve_design(&json!({"kind": kind, "wavelength_in": bad})).expect_err(kind);
            assert_eq!(e.field, "wavelength_in", "{kind}, {bad}: {e}");
        }
    }
    // An air wavelength with no vacuum equivalent is named on its own field.
    for (doc, field) in [
        (
            json!({"kind": "waveplate", "material": "quartz", "retardance_waves": 0.25, "wavelength_in": "air", "wavelength_nm": 100}),
            "wavelength_nm",
        ),
        (
            json!({"kind": "displacer", "material": "calcite", "separation_mm": 1, "wavelength_in": "air", "band_nm": [500, 120]}),
            "band_nm[1]",
        ),
    ] {
        assert_eq!(solve_design(&doc).expect_err("refused").field, field, "{doc}");
    }
    // A reader's range error on a converted field says which air value it stands for.
    let e = solve_design(&json!({"kind": "displacer", "material": "calcite", "separation_mm": 1,
        "wavelength_in": "air", "tolerances": {"wavelength_nm": 100}}))
    .expect_err("above 100 nm in vacuum");
    assert_eq!(e.field, "tolerances.wavelength_nm");
    assert!(e.message.contains("the vacuum equivalent of 100 nm in air"), "{e}");
}

#[test]
fn every_kind_takes_its_wavelengths_in_air() {
    // One short request per kind; each answer echoes the basis, its air wavelengths beside the
    // vacuum ones, and a scenario in air.
    let requests = [
        json!({"kind": "displacer", "material": "calcite", "separation_mm": 1, "samples": 0, "tolerances": {"wavelength_nm": 1}}),
        json!({"kind": "waveplate", "material": "quartz", "retardance_waves": 0.25}),
        json!({"kind": "achromat", "first": {"material": "quartz"}, "second": {"material": "mgf2"}, "retardance_waves": 0.25, "wavelengths_nm": [500, 900]}),
        json!({"kind": "recombiner", "material": "yvo4", "wavelength_nm": 1064, "length_mm": 5}),
        json!({"kind": "angular-splitter", "material": "quartz", "split_angle_deg": 1, "samples": 0}),
        json!({"kind": "prism-polarizer", "material": "calcite"}),
        json!({"kind": "tilt-tuning", "material": "mgf2", "wavelength_nm": 633, "order_number": 4, "made_for_nm": 680,
            "retardance_waves": 0.25, "axis_azimuth_deg": 45, "tilt_azimuth_deg": 45, "max_tilt_deg": 40}),
        json!({"kind": "quartz-rotator", "rotation_deg": 45}),
        json!({"kind": "athermal-waveplate", "first": {"material": "quartz"}, "second": {"material": "mgf2"}, "retardance_waves": 0.25}),
        json!({"kind": "birefringent-filter", "material": "quartz", "stages": 2, "bandwidth_nm": 20}),
        json!({"kind": "broadband-retarder", "material": "quartz", "retardance_waves": 0.5, "band_nm": [500, 700], "generations": 10}),
        json!({"kind": "lc-voltage", "thickness_um": 5, "lc": "5cb", "rubbing_azimuth_deg": 45, "retardance_waves": 0.25}),
    ];
    let kinds: Vec<&str> = requests.iter().map(|r| r["kind"].as_str().unwrap()).collect();
    assert_eq!(kinds, DESIGN_KINDS, "one request per kind");
    for mut r in requests {
        r["wavelength_in"] = json!("air");
        let a = solved(&r);
        assert_eq!(a["wavelength_in"], "air", "{r}");
        let fields = [
            "wavelength_nm",
            "band_nm",
            "wavelengths_nm",
            "bandwidth_nm",
            "made_for_nm",
        ];
        let given: Vec<&str> = fields
            .iter()
            .copied()
            .filter(|f| a.get(format!("air_{f}")).is_some())
            .collect();
        assert!(!given.is_empty(), "{r}: no air wavelength reported: {a}");
        for f in given {
            assert!(a.get(f).is_some(), "{r}: air_{f} without {f}");
            assert_ne!(a[f], a[format!("air_{f}")], "{r}: {f} was not converted");
        }
        assert_eq!(a["scenario"]["wavelength_in"], "air", "{r}");
        Scenario::from_json(&a["scenario"]).unwrap_or_else(|e| panic!("{r}: {e}"));
    }
}

/// The group index of each mode of the answer (`modes.<letter>.group_index`) against the trace
/// of its scenario, and the group delay against (g₂ − g₁)·L/c.
fn group_indices_match_the_trace(request: Value, letters: [&str; 2]) {
    let d = solved(&request);
    let sc = Scenario::from_json(&d["scenario"]).unwrap();
    let traced = trace_scenario(&sc).unwrap();
    let ElementReport::Crystal {
        modes,
        thickness_at_temperature_mm,
        ..
    } = &traced.elements[0]
    else {
        panic!("{request}: the first element is a crystal")
    };
    let letter_strings = modes.letters.map(|c| c.to_string());
    assert_eq!(letter_strings, letters.map(str::to_string), "{request}");
    let traced_g = [modes.first.group_index.unwrap(), modes.second.group_index.unwrap()];
    let g: Vec<f64> = letters
        .iter()
        .map(|l| {
            d["modes"][l]["group_index"]
                .as_f64()
                .unwrap_or_else(|| panic!("{request}: modes.{l}"))
        })
        .collect();
    for k in 0..2 {
        assert!(
            (g[k] - traced_g[k]).abs() <= 1e-12,
            "{request}: design {} against trace {}",
            g[k],
            traced_g[k]
        );
    }
    // Independent arithmetic: τ₂ − τ₁ = (g₂ − g₁) L / c at normal incidence, L along the normal.
    let want = (g[1] - g[0]) * thickness_at_temperature_mm / C_MM_PER_PS;
    let got = d["group_delay_ps"].as_f64().unwrap();
    assert!(
        (got - want).abs() <= 1e-9 * want.abs(),
        "{request}: group delay {got} ps against (g2 − g1)·L/c = {want} ps"
    );
}

#[test]
fn waveplate_and_displacer_answers_give_the_group_indices_of_the_trace() {
    group_indices_match_the_trace(
        json!({"kind": "waveplate", "material": "quartz", "retardance_waves": 0.25, "order": "multiple", "order_number": 5}),
        ["o", "e"],
    );
    group_indices_match_the_trace(
        json!({"kind": "displacer", "material": "calcite", "separation_mm": 2, "samples": 0, "temperature_c": 40}),
        ["o", "e"],
    );
    group_indices_match_the_trace(
        json!({"kind": "waveplate", "material": "ktp", "wavelength_nm": 1064, "retardance_waves": 0.5}),
        ["f", "s"],
    );
    // In air too: the scenario in air traces at the design's vacuum wavelength.
    group_indices_match_the_trace(
        json!({"kind": "waveplate", "material": "quartz", "retardance_waves": 0.25, "wavelength_nm": 632.816, "wavelength_in": "air"}),
        ["o", "e"],
    );
}

#[test]
fn a_filter_asked_in_air_gives_its_widths_in_air_beside_the_vacuum_ones() {
    // dλ_air/dλ_vac at the vacuum centre, by a central difference over ±0.01 nm of λ_air =
    // λ_vac / n_air(λ_vac) (Ciddor 1996, `air_from_vacuum`): its truncation error, of order
    // (n − 1)(h/λ)², and its rounding, 1e-16 λ / h, are both below 1e-10 here.
    let slope = |vac_nm: f64| {
        let air = |nm: f64| air_from_vacuum(Wavelength::from_nm(nm).unwrap()).expect("in range");
        let h = 0.01;
        (air(vac_nm + h) - air(vac_nm - h)) / (2.0 * h)
    };
    // The last, at the folded filter's lowest order, has no order below it.
    for (material, air_nm, layout, stages, width_nm) in [
        ("quartz", 656.28, "stage-doubling", 4, 2.0),
        ("ktp", 1064.0, "folded", 5, 2.0),
        ("mgf2", 589.0, "stage-doubling", 1, 2.0),
        ("quartz", 656.28, "folded", 2, 300.0),
    ] {
        let request = json!({"kind": "birefringent-filter", "material": material, "layout": layout, "stages": stages,
                             "wavelength_nm": air_nm, "bandwidth_nm": width_nm, "wavelength_in": "air"});
        let a = solved(&request);
        let vac = a["wavelength_nm"].as_f64().unwrap();
        let k = slope(vac);
        assert!((k - 1.0).abs() < 1e-3 && k != 1.0, "{request}: dλ_air/dλ_vac = {k}");
        let mut twins = 0;
        for name in ["fwhm_nm", "neighbour_orders_fwhm_nm", "centre_shift_nm_per_k"] {
            let (v, t) = (&a[name], &a[format!("air_{name}")]);
            let pairs: Vec<(&Value, &Value)> = match (v, t) {
                (Value::Array(v), Value::Array(t)) => v.iter().zip(t).collect(),
                _ => vec![(v, t)],
            };
            for (v, t) in pairs {
                match (v.as_f64(), t.as_f64()) {
                    (Some(v), Some(t)) => {
                        twins += 1;
                        println!(
                            "{material} {layout}: air_{name} / ({name} × dλ_air/dλ_vac) − 1 = {:e}",
                            t / (v * k) - 1.0
                        );
                        assert!(
                            (t - v * k).abs() <= 1e-9 * (v * k).abs(),
                            "{request}: air_{name} {t} against {v} × {k} = {}",
                            v * k
                        );
                    }
                    // A figure the answer does not have (the order below the lowest) has no twin.
                    (None, twin) => assert!(twin.is_none(), "{request}: air_{name} {t} of no {name}"),
                    (Some(v), None) => panic!("{request}: {name} {v} has no air twin: {t}"),
                }
            }
        }
        assert!(twins >= 3, "{request}: {twins} twins");
        // The same filter asked in vacuum has none: its widths are the vacuum ones.
        let mut vacuum = request.clone();
        vacuum["wavelength_nm"] = json!(vac);
        vacuum["bandwidth_nm"] = a["bandwidth_nm"].clone();
        vacuum.as_object_mut().unwrap().remove("wavelength_in");
        let v = solved(&vacuum);
        assert!(v.get("air_fwhm_nm").is_none(), "{vacuum}");
        let (fv, fa) = (v["fwhm_nm"].as_f64().unwrap(), a["fwhm_nm"].as_f64().unwrap());
        assert!(
            (fv - fa).abs() <= 1e-12 * fa,
            "{request}: fwhm_nm {fa}, the vacuum request's {fv}"
        );
    }
}

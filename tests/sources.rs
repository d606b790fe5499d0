//! Dispersion sources through the whole contract: a crystal element's `source`, its errors, its
//! round trip, and the per-crystal `source` and `source_spread` of the result. The indices of
//! each alternative source are checked against an independent evaluation of the same published
//! formula in tests/reference/material_reference.py (ndispers 0.20.0); here the checks are that
//! the chosen formula reaches the trace and that the reported disagreement is the difference of
//! the sources' own indices.

use doublespar::{Scenario, Wavelength, find_uniaxial_source, trace_scenario};
use serde_json::Value;

fn doc(material: &str, extra: &str) -> String {
    format!(
        r#"{{"version": 2, "wavelength_nm": 589.3,
        "elements": [{{"kind": "crystal", "material": "{material}", "thickness_mm": 10, "axis": {{"tilt_deg": 45}}{extra}}}]}}"#
    )
}

fn traced(d: &str) -> Value {
    serde_json::to_value(trace_scenario(&Scenario::from_json_str(d).unwrap()).unwrap()).unwrap()
}

fn error_field(d: &str) -> (String, String) {
    let e = Scenario::from_json_str(d).expect_err("refused");
    (e.field.clone(), e.message.clone())
}

#[test]
fn the_chosen_source_gives_its_own_indices_to_the_trace() {
    let w = Wavelength::from_nm(589.3).unwrap();
    let default = traced(&doc("calcite", ""));
    let other = traced(&doc("calcite", r#", "source": "tropf-1995""#));
    let want = find_uniaxial_source("calcite", "tropf-1995")
        .unwrap()
        .indices(w)
        .unwrap()
        .indices;
    let el = &other["elements"][0];
    assert_eq!(el["source"], "tropf-1995");
    assert_eq!(el["no"].as_f64().unwrap(), want.no);
    assert_eq!(el["ne"].as_f64().unwrap(), want.ne);
    assert_eq!(default["elements"][0]["source"], "ghosh-1999");
    // A different formula moves the e-ray: the separations differ, by the index difference's
    // effect on the walk-off (about 3e-4 in n_e changes a 10 mm calcite plate's offset by microns).
    let sep = |v: &Value| v["elements"][0]["separation_mm"].as_f64().unwrap();
    let d = (sep(&default) - sep(&other)).abs();
    assert!(d > 1e-5 && d < 1e-2, "separations differ by {d} mm");
}

#[test]
fn the_result_reports_how_far_the_sources_disagree() {
    let w = Wavelength::from_nm(589.3).unwrap();
    let el = traced(&doc("calcite", ""))["elements"][0].clone();
    let a = find_uniaxial_source("calcite", "ghosh-1999")
        .unwrap()
        .indices(w)
        .unwrap()
        .indices;
    let b = find_uniaxial_source("calcite", "tropf-1995")
        .unwrap()
        .indices(w)
        .unwrap()
        .indices;
    let sp = &el["source_spread"];
    assert_eq!(sp["sources"], serde_json::json!(["ghosh-1999", "tropf-1995"]));
    assert_eq!(sp["indices"][0].as_f64().unwrap(), (a.no - b.no).abs());
    assert_eq!(sp["indices"][1].as_f64().unwrap(), (a.ne - b.ne).abs());
    assert_eq!(
        sp["birefringence"].as_f64().unwrap(),
        ((a.ne - a.no) - (b.ne - b.no)).abs()
    );
    // One source only (rutile), fixed indices, or a wavelength only one source holds: none.
    assert!(traced(&doc("rutile", ""))["elements"][0].get("source_spread").is_none());
    let custom = r#"{"version": 2, "wavelength_nm": 589.3, "elements": [{"kind": "crystal", "no": 1.6, "ne": 1.5, "thickness_mm": 1, "axis": {"tilt_deg": 45}}]}"#;
    let c = traced(custom);
    assert!(c["elements"][0].get("source").is_none() && c["elements"][0].get("source_spread").is_none());
    // Biaxial: three index spreads.
    let lbo = traced(&doc("lbo", r#", "source": "ghosh-1995""#).replace("589.3", "1064"));
    assert_eq!(lbo["elements"][0]["source"], "ghosh-1995");
    assert_eq!(
        lbo["elements"][0]["source_spread"]["indices"].as_array().unwrap().len(),
        3
    );
}

#[test]
fn a_bad_source_is_an_error_on_its_field_naming_the_known_ones() {
    let (field, message) = error_field(&doc("calcite", r#", "source": "nobody-2000""#));
    assert_eq!(field, "elements[0].source");
    assert!(
        message.contains("ghosh-1999") && message.contains("tropf-1995"),
        "{message}"
    );
    let (field, _) = error_field(&doc("calcite", r#", "source": 3"#));
    assert_eq!(field, "elements[0].source");
    let custom = r#"{"elements": [{"kind": "crystal", "no": 1.6, "ne": 1.5, "source": "ghosh-1999", "thickness_mm": 1, "axis": {"tilt_deg": 45}}]}"#;
    let (field, message) = error_field(custom);
    assert_eq!(field, "elements[0].source");
    assert!(message.contains("catalogue"), "{message}");
    // A source of another crystal is unknown for this one.
    let (field, _) = error_field(&doc("quartz", r#", "source": "tropf-1995""#));
    assert_eq!(field, "elements[0].source");
}

#[test]
fn a_chosen_source_survives_the_round_trip_and_the_default_is_not_written() {
    let sc = Scenario::from_json_str(&doc("linbo3", r#", "source": "EDWARDS-1984""#)).unwrap();
    let v = sc.to_json();
    assert_eq!(v["elements"][0]["source"], "edwards-1984");
    assert_eq!(Scenario::from_json_str(&v.to_string()).unwrap(), sc);
    let sc = Scenario::from_json_str(&doc("linbo3", r#", "source": "zelmon-1997""#)).unwrap();
    assert!(
        sc.to_json()["elements"][0].get("source").is_none(),
        "the default is implied"
    );
}

#[test]
fn a_design_request_takes_a_source_and_its_answer_states_the_source_used() {
    use doublespar::solve_design;
    let req = |extra: &str| {
        let text = format!(
            r#"{{"kind": "displacer", "material": "calcite", "separation_mm": 1, "wavelength_nm": 632.8{extra}}}"#
        );
        solve_design(&serde_json::from_str(&text).unwrap())
    };
    let default = req("").unwrap();
    assert_eq!(default["sources"][0]["source"], "ghosh-1999");
    assert!(default["sources"][0]["citation"].as_str().unwrap().contains("Ghosh"));
    let other = req(r#", "source": "tropf-1995""#).unwrap();
    assert_eq!(
        other["sources"],
        serde_json::json!([{"material": "calcite", "source": "tropf-1995",
        "citation": find_uniaxial_source("calcite", "tropf-1995").unwrap().citation, "fitted_in": "not stated"}])
    );
    // The part it hands on uses the same formula: its trace gives the designed separation.
    let part = &other["scenario"];
    assert_eq!(part["elements"][0]["source"], "tropf-1995");
    let t = traced(&part.to_string());
    let sep = t["elements"][0]["separation_mm"].as_f64().unwrap();
    assert!((sep - 1.0).abs() < 1e-9, "traced separation {sep}");
    // The two formulas ask for different lengths (by about the index difference's share).
    let (a, b) = (
        default["length_mm"].as_f64().unwrap(),
        other["length_mm"].as_f64().unwrap(),
    );
    assert!(a != b && (a - b).abs() / a < 1e-2, "{a} vs {b}");
    let e = req(r#", "source": "nobody-2000""#).unwrap_err();
    assert_eq!(e.field, "source");
}

//! Helpers shared by the integration tests.
#![allow(dead_code)]

pub mod berreman;
pub mod convergent;

use doublespar::Scenario;
use doublespar::{ElementReport, TraceResult, solve_design_str, trace_scenario as trace};
use serde_json::Value;

/// A design request's answer, panicking with the request and the error on failure.
pub fn design(doc: &str) -> Value {
    solve_design_str(doc).unwrap_or_else(|e| panic!("{doc}: {e}"))
}

/// The number at JSON pointer `path` of `v`, panicking with both when there is none.
pub fn num(v: &Value, path: &str) -> f64 {
    v.pointer(path)
        .and_then(Value::as_f64)
        .unwrap_or_else(|| panic!("{path} in {v}"))
}

/// Parses and traces a scenario document, panicking with the error on failure.
pub fn run(doc: &str) -> TraceResult {
    let s = Scenario::from_json_str(doc).unwrap_or_else(|e| panic!("scenario rejected: {e}\n{doc}"));
    trace(&s).unwrap_or_else(|e| panic!("trace failed: {e}\n{doc}"))
}

/// The report of element `i`, which must be a crystal: (separation_mm, retardance_rad, o walk-off, e walk-off).
pub fn crystal(r: &TraceResult, i: usize) -> (Option<f64>, Option<f64>, Option<f64>, Option<f64>) {
    match &r.elements[i] {
        ElementReport::Crystal {
            separation_mm,
            retardance_rad,
            modes,
            ..
        } => (
            *separation_mm,
            *retardance_rad,
            modes.first.walkoff_deg,
            modes.second.walkoff_deg,
        ),
        other => panic!("element {i} is not a crystal: {other:?}"),
    }
}

/// Asserts |actual − expected| ≤ tol, printing both and what is compared (the library's one
/// comparison, shared with its unit tests).
#[allow(unused_imports)] // not every test file compares numbers this way
pub use doublespar::assert_within as near;

/// A one-crystal scenario with custom indices.
#[allow(clippy::too_many_arguments)] // mirrors the document's fields one to one
pub fn plate(no: f64, ne: f64, l: f64, tilt: f64, az: f64, polar: f64, paz: f64, pol_az: f64, losses: &str) -> String {
    format!(
        r#"{{"wavelength_nm": 632.8, "interface_losses": "{losses}",
            "beam": {{"diameter_mm": 1, "incidence": {{"polar_deg": {polar}, "azimuth_deg": {paz}}},
                      "polarization": {{"kind": "linear", "azimuth_deg": {pol_az}}}}},
            "elements": [{{"kind": "crystal", "no": {no}, "ne": {ne}, "thickness_mm": {l},
                           "axis": {{"tilt_deg": {tilt}, "azimuth_deg": {az}}}}}]}}"#
    )
}

/// n_e − n_o of the catalogue crystal `material` by its published formula `source` at `nm`
/// (vacuum), 20 °C: evaluated from the formula alone, independently of any trace.
pub fn birefringence(material: &str, source: &str, nm: f64) -> f64 {
    let ix = doublespar::find_uniaxial_source(material, source)
        .unwrap_or_else(|| panic!("{material} {source}"))
        .indices(doublespar::Wavelength::from_nm(nm).unwrap())
        .unwrap()
        .indices;
    ix.ne - ix.no
}

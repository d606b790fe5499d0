//! Convergent light against whole traces: each direction of a figure is the plane wave that a
//! trace of the scenario with the beam at that incidence sends through, so the two must agree.

use doublespar::{ConoscopeQuantity, Scenario, conoscope_at, trace_scenario};
use serde_json::Value;

/// The same scenario lit at one incidence, with a beam so wide that the two modes' spots overlap
/// fully: its total power is the plane wave's transmission.
pub fn at_incidence(doc: &str, polar_deg: f64, azimuth_deg: f64) -> Scenario {
    let mut v: Value = serde_json::from_str(doc).unwrap();
    v["beam"]["incidence"] = serde_json::json!({"polar_deg": polar_deg, "azimuth_deg": azimuth_deg});
    v["beam"]["diameter_mm"] = serde_json::json!(1000);
    Scenario::from_json_str(&v.to_string()).unwrap()
}

fn report(sc: &Scenario) -> Value {
    serde_json::to_value(trace_scenario(sc).unwrap()).unwrap()
}

/// Each direction's transmission against the traced total power, to 1e-9.
pub fn transmission_agrees_with_whole_traces(docs: &[&str], directions: &[(f64, f64)]) {
    for doc in docs {
        let sc = Scenario::from_json_str(doc).unwrap();
        for &(polar, azimuth) in directions {
            let fast = conoscope_at(&sc, ConoscopeQuantity::Transmission, polar, azimuth)
                .unwrap()
                .unwrap();
            let whole = trace_scenario(&at_incidence(doc, polar, azimuth)).unwrap().total_power;
            assert!(
                (fast - whole).abs() < 1e-9,
                "{polar}°, {azimuth}°: {fast} against {whole}\n{doc}"
            );
        }
    }
}

/// Each direction's retardance error against the first crystal's traced retardance less its
/// retardance at normal incidence, to 1e-9 waves.
pub fn retardance_agrees_with_whole_traces(docs: &[&str], directions: &[(f64, f64)]) {
    for doc in docs {
        let sc = Scenario::from_json_str(doc).unwrap();
        let normal = report(&sc)["elements"][0]["retardance_waves"].as_f64().unwrap();
        for &(polar, azimuth) in directions {
            let error = conoscope_at(&sc, ConoscopeQuantity::RetardanceError, polar, azimuth)
                .unwrap()
                .unwrap();
            let traced = report(&at_incidence(doc, polar, azimuth))["elements"][0]["retardance_waves"]
                .as_f64()
                .unwrap()
                - normal;
            assert!(
                (error - traced).abs() < 1e-9,
                "{polar}°, {azimuth}°: {error} against {traced}\n{doc}"
            );
        }
    }
}

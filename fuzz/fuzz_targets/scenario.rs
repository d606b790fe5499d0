//! Fuzz target: any bytes as a scenario document. Parsing and tracing must never panic; a result
//! must contain no NaN or infinity, and an error must name a field and say something.
#![no_main]

use doublespar::Scenario;
use doublespar::trace_scenario as trace;
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else { return };
    match Scenario::from_json_str(text).and_then(|s| trace(&s).map(|r| (s, r))) {
        Ok((s, r)) => {
            let json = serde_json::to_string(&r).expect("a result always serializes");
            assert!(!json.contains("NaN") && !json.contains("inf"), "non-finite number in {json}");
            for ray in &r.rays {
                assert!(ray.power.is_finite() && ray.power >= -1e-12 && ray.power <= 1.0 + 1e-9, "power {}", ray.power);
            }
            // Every view of a valid trace builds and has finite coordinates.
            for name in doublespar::VIEW_NAMES {
                if let Ok(scene) = doublespar::build_view(name, &s, &r) {
                    assert!(scene.is_finite(), "view {name} has non-finite coordinates");
                }
            }
        }
        Err(e) => assert!(!e.message.is_empty()),
    }
});

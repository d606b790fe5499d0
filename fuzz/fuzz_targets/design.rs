//! Fuzz target: any bytes as a design request. Solving must never panic; an error must say
//! something. Monte Carlo runs are capped so that one input stays fast.
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else { return };
    let Ok(mut v) = serde_json::from_str::<serde_json::Value>(text) else { return };
    if let Some(obj) = v.as_object_mut() {
        if obj.get("samples").and_then(|s| s.as_f64()).is_none_or(|s| s > 200.0) {
            obj.insert("samples".into(), serde_json::json!(200));
        }
    }
    match doublespar::solve_design(&v) {
        Ok(d) => {
            let json = d.to_string();
            assert!(!json.contains("NaN"), "NaN in {json}");
        }
        Err(e) => assert!(!e.message.is_empty()),
    }
});

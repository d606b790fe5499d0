//! The wavelength each catalogue formula was fitted in (`fitted_in`: "air", "vacuum" or "not
//! stated"), as its paper states it: the materials listing and every design answer's `sources`
//! give it for each formula used. No paper text seen states it for any catalogue formula today
//! (each entry's comment in src/optics/material/uniaxial.rs and biaxial.rs says what was seen),
//! so every formula says "not stated"; the catalogue hands each the vacuum wavelength, which a
//! formula fitted in air would misread by the air's index, about 3e-4 in λ (common practice).

use doublespar::{biaxial_materials, find_biaxial_source, find_uniaxial_source, materials, solve_design_str};
use serde_json::Value;
use std::process::Command;

/// The catalogue's own `fitted_in` of `(crystal, source)`, as the contract spells it.
fn catalogued(key: &str, source: &str) -> &'static str {
    find_uniaxial_source(key, source)
        .map(|m| m.fitted_in.as_str())
        .or_else(|| find_biaxial_source(key, source).map(|m| m.fitted_in.as_str()))
        .unwrap_or_else(|| panic!("{key} {source} catalogued"))
}

#[test]
fn the_materials_listing_gives_every_formula_its_fitted_in() {
    let out = Command::new(env!("CARGO_BIN_EXE_doublespar"))
        .args(["materials", "--json"])
        .output()
        .unwrap();
    assert!(out.status.success());
    let listing: Value = serde_json::from_slice(&out.stdout).unwrap();
    let mut formulas = 0;
    for m in listing["materials"].as_array().unwrap() {
        let key = m["key"].as_str().unwrap();
        for s in m["sources"].as_array().unwrap() {
            let source = s["key"].as_str().unwrap();
            assert_eq!(s["fitted_in"], catalogued(key, source), "{key} {source}");
            // No paper seen states it (see the header).
            assert_eq!(s["fitted_in"], "not stated", "{key} {source}");
            formulas += 1;
        }
    }
    // Every catalogue crystal is listed with at least its default formula.
    assert!(formulas >= materials().len() + biaxial_materials().len(), "{formulas}");
}

#[test]
fn a_design_answer_states_the_fitted_in_of_each_formula_it_used() {
    for (doc, key, source) in [
        (
            r#"{"kind": "waveplate", "material": "quartz", "retardance_waves": 0.25}"#,
            "quartz",
            "ghosh-1999",
        ),
        (
            r#"{"kind": "waveplate", "material": "calcite", "source": "tropf-1995", "retardance_waves": 0.5}"#,
            "calcite",
            "tropf-1995",
        ),
        (
            r#"{"kind": "waveplate", "material": "ktp", "wavelength_nm": 1064, "retardance_waves": 0.5}"#,
            "ktp",
            "kato-2002",
        ),
    ] {
        let d = solve_design_str(doc).unwrap_or_else(|e| panic!("{doc}: {e}"));
        let used = d["sources"]
            .as_array()
            .unwrap()
            .iter()
            .find(|s| s["material"] == key)
            .unwrap_or_else(|| panic!("{doc}: {}", d["sources"]));
        assert_eq!(used["source"], source, "{doc}");
        assert_eq!(used["fitted_in"], catalogued(key, source), "{doc}");
    }
}

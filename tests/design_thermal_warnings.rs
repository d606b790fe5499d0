//! Design answers state temperature figures (changes per kelvin, temperature bands, athermal
//! pairs); where a crystal's thermo-optic data are unverified (rutile: a handbook's model and
//! suppliers' values, six times apart, with nothing at hand to decide; alpha-BBO: beta-BBO's data
//! standing in), the answer says so on the field that names the crystal, once, whatever the design
//! kind. YVO4's, from its dispersion source's own fits at several temperatures, and sapphire's,
//! from the handbook model whose table reproduces independent measurements of three other
//! crystals (tests/temperature.rs), are verified and carry no such warning.

use doublespar::solve_design_str;

fn warnings(doc: &str) -> Vec<String> {
    let d = solve_design_str(doc).unwrap_or_else(|e| panic!("{doc}: {e}"));
    // Figures per kelvin: `temperature.per_kelvin`, or the filter's `centre_shift_nm_per_k`.
    assert!(
        d.to_string().contains("per_k"),
        "{doc}: the answer states temperature figures"
    );
    d["warnings"]
        .as_array()
        .unwrap()
        .iter()
        .map(|w| w.as_str().unwrap().to_string())
        .collect()
}

/// The warnings about unverified temperature data in the answer to `doc`.
fn flagged(doc: &str) -> Vec<String> {
    warnings(doc)
        .into_iter()
        .filter(|w| w.contains("unverified temperature data"))
        .collect()
}

#[test]
fn answers_resting_on_unverified_thermo_optic_data_say_so_once_on_the_material_field() {
    for (doc, path, name) in [
        (
            r#"{"kind": "waveplate", "material": "rutile", "wavelength_nm": 1064, "retardance_waves": 0.25}"#,
            "material",
            "rutile",
        ),
        (
            r#"{"kind": "waveplate", "material": "alpha-bbo", "retardance_waves": 0.5, "order": "multiple", "order_number": 10}"#,
            "material",
            "alpha-bbo",
        ),
        (
            r#"{"kind": "displacer", "material": "rutile", "wavelength_nm": 1064, "separation_mm": 1, "samples": 0}"#,
            "material",
            "rutile",
        ),
        (
            r#"{"kind": "athermal-waveplate", "first": {"material": "quartz"}, "second": {"material": "alpha-bbo"}, "retardance_waves": 0.25, "wavelength_nm": 633}"#,
            "second.material",
            "alpha-bbo",
        ),
        (
            r#"{"kind": "birefringent-filter", "material": "rutile", "wavelength_nm": 1064, "bandwidth_nm": 2}"#,
            "material",
            "rutile",
        ),
        (
            r#"{"kind": "athermal-waveplate", "first": {"material": "rutile"}, "second": {"material": "quartz"}, "retardance_waves": 0.25, "wavelength_nm": 1064}"#,
            "first.material",
            "rutile",
        ),
    ] {
        let got = flagged(doc);
        assert_eq!(got.len(), 1, "{doc}: {got:?}");
        assert!(
            got[0].starts_with(&format!("{path}: unverified temperature data for {name}: ")),
            "{doc}: {got:?}"
        );
    }
}

#[test]
fn answers_on_verified_thermo_optic_data_carry_no_such_warning() {
    for doc in [
        r#"{"kind": "waveplate", "material": "quartz", "retardance_waves": 0.25}"#,
        r#"{"kind": "athermal-waveplate", "first": {"material": "quartz"}, "second": {"material": "mgf2"}, "retardance_waves": 0.25}"#,
        r#"{"kind": "birefringent-filter", "material": "quartz", "wavelength_nm": 600, "bandwidth_nm": 2}"#,
        r#"{"kind": "waveplate", "material": "yvo4", "wavelength_nm": 1064, "retardance_waves": 0.5, "order": "multiple", "order_number": 5}"#,
        r#"{"kind": "displacer", "material": "yvo4", "wavelength_nm": 1064, "separation_mm": 1, "samples": 0}"#,
        r#"{"kind": "waveplate", "material": "sapphire", "retardance_waves": 0.5, "order": "multiple", "order_number": 3}"#,
        r#"{"kind": "athermal-waveplate", "first": {"material": "sapphire"}, "second": {"material": "quartz"}, "retardance_waves": 0.25, "wavelength_nm": 633}"#,
    ] {
        assert_eq!(flagged(doc), Vec::<String>::new(), "{doc}");
    }
}

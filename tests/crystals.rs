//! Biaxial and optically active crystals through the whole contract: documents with `axes`,
//! `nx`/`ny`/`nz`, catalogue biaxial crystals, `handedness` and `optical_activity`, traced and
//! reported. Physics checked against closed forms written here and handbook values (named beside
//! each check).

use doublespar::{ElementReport, Scenario, TraceResult, Wavelength, optical_activity, trace_scenario};

fn run(doc: &str) -> TraceResult {
    trace_scenario(&Scenario::from_json_str(doc).unwrap()).unwrap()
}

fn crystal(r: &TraceResult) -> &ElementReport {
    &r.elements[0]
}

/// The azimuth (degrees) of the linear state that leaves, from the one spot.
fn out_azimuth(r: &TraceResult) -> f64 {
    assert_eq!(r.spots.len(), 1, "one spot");
    r.spots[0].ellipse.azimuth_deg
}

#[test]
fn a_biaxial_plate_reports_its_principal_indices_optic_axes_and_fast_and_slow_modes() {
    let r = run(
        r#"{"version": 2, "wavelength_nm": 1064, "beam": {"incidence": {"polar_deg": 8, "azimuth_deg": 20}},
        "elements": [{"kind": "crystal", "material": "ktp", "thickness_mm": 4, "axes": {"tilt_deg": 90, "azimuth_deg": 0, "roll_deg": 30}}]}"#,
    );
    let labels: Vec<&str> = r.rays.iter().map(|x| x.label.as_str()).collect();
    assert_eq!(labels, ["f", "s"]);
    let json = serde_json::to_value(&r).unwrap();
    let el = &json["elements"][0];
    for key in ["nx", "ny", "nz", "f", "s", "optic_axes", "optic_axis_angle_deg"] {
        assert!(!el[key].is_null(), "{key} reported");
    }
    for key in ["no", "ne", "o", "e", "max_walkoff_deg"] {
        assert!(el.get(key).is_none(), "{key} not reported for a biaxial crystal");
    }
    let (nx, ny, nz) = (
        el["nx"].as_f64().unwrap(),
        el["ny"].as_f64().unwrap(),
        el["nz"].as_f64().unwrap(),
    );
    assert!(nx < ny && ny < nz);
    // 2V from Born & Wolf §15.3.3: tan V = (n_z/n_x) √((n_y² − n_x²)/(n_z² − n_y²)).
    let v = ((nz / nx) * ((ny * ny - nx * nx) / (nz * nz - ny * ny)).sqrt()).atan();
    let two_v = el["optic_axis_angle_deg"].as_f64().unwrap();
    assert!((two_v - 2.0 * v.to_degrees()).abs() < 1e-9, "{two_v}");
    // The fast mode has the lower index, and the power is all accounted for (ideal faces).
    assert!(el["f"]["index"].as_f64().unwrap() < el["s"]["index"].as_f64().unwrap());
    let total: f64 = r.rays.iter().map(|x| x.power).sum();
    assert!((total - 1.0).abs() < 1e-12, "{total}");
}

#[test]
fn two_equal_principal_indices_are_the_uniaxial_crystal() {
    // nx = ny: optic axis along z of the principal frame, R·ẑ = the `axis` convention.
    let principal = run(
        r#"{"version": 2, "beam": {"incidence": {"polar_deg": 12, "azimuth_deg": 40}},
        "elements": [{"kind": "crystal", "nx": 1.6584, "ny": 1.6584, "nz": 1.4864, "thickness_mm": 3, "axes": {"tilt_deg": 50, "azimuth_deg": 10, "roll_deg": 77}}]}"#,
    );
    let plain = run(
        r#"{"version": 2, "beam": {"incidence": {"polar_deg": 12, "azimuth_deg": 40}},
        "elements": [{"kind": "crystal", "no": 1.6584, "ne": 1.4864, "thickness_mm": 3, "axis": {"tilt_deg": 50, "azimuth_deg": 10}}]}"#,
    );
    assert_eq!(principal.rays.len(), 2);
    for (a, b) in principal.rays.iter().zip(&plain.rays) {
        assert_eq!(a.label, b.label);
        for k in 0..3 {
            assert!((a.exit_point_mm[k] - b.exit_point_mm[k]).abs() < 1e-12);
        }
        for k in 0..4 {
            assert!((a.stokes[k] - b.stokes[k]).abs() < 1e-12);
        }
    }
    // nx = nz: the optic axis is the y principal axis; a roll of 90° about z puts it along −x.
    let rolled = run(
        r#"{"version": 2, "elements": [{"kind": "crystal", "nx": 1.6584, "ny": 1.4864, "nz": 1.6584,
        "thickness_mm": 3, "axes": {"tilt_deg": 0, "azimuth_deg": 0, "roll_deg": 90}}]}"#,
    );
    let along_x = run(
        r#"{"version": 2, "elements": [{"kind": "crystal", "no": 1.6584, "ne": 1.4864,
        "thickness_mm": 3, "axis": {"tilt_deg": 90, "azimuth_deg": 180}}]}"#,
    );
    for (a, b) in rolled.rays.iter().zip(&along_x.rays) {
        assert_eq!(a.label, b.label);
        for k in 0..4 {
            assert!((a.stokes[k] - b.stokes[k]).abs() < 1e-12);
        }
        assert!((a.phase_rad - b.phase_rad).abs() < 1e-9 * a.phase_rad.abs());
    }
}

#[test]
fn rolling_a_biaxial_crystal_by_90_degrees_swaps_its_x_and_y_axes() {
    // R·Rz(90°) carries x̂ to ŷ and ŷ to −x̂: the same crystal as one with n_x and n_y exchanged.
    let doc = |indices: &str, roll: f64| {
        format!(
            r#"{{"version": 2, "beam": {{"incidence": {{"polar_deg": 15, "azimuth_deg": 70}}}},
               "elements": [{{"kind": "crystal", {indices}, "thickness_mm": 2, "axes": {{"tilt_deg": 35, "azimuth_deg": -20, "roll_deg": {roll}}}}}]}}"#
        )
    };
    let a = run(&doc(r#""nx": 1.74, "ny": 1.75, "nz": 1.83"#, 90.0));
    let b = run(&doc(r#""nx": 1.75, "ny": 1.74, "nz": 1.83"#, 0.0));
    assert_eq!(a.rays.len(), 2);
    for (x, y) in a.rays.iter().zip(&b.rays) {
        for k in 0..3 {
            assert!((x.exit_point_mm[k] - y.exit_point_mm[k]).abs() < 1e-12);
            assert!((x.direction[k] - y.direction[k]).abs() < 1e-12);
        }
        assert!((x.power - y.power).abs() < 1e-12);
    }
}

#[test]
fn c_cut_quartz_turns_linear_light_by_its_rotatory_power() {
    // Along the optic axis of right-handed quartz a linear state turns clockwise as seen looking
    // toward the source (CONVENTIONS.md), i.e. its azimuth decreases, by ρL; the handbook value
    // is 21.72 °/mm at 589.3 nm (common practice; from memory), the catalogue's formula gives
    // its own ρ.
    let doc = |extra: &str, version: u32| {
        format!(
            r#"{{"version": {version}, "wavelength_nm": 589.3, "beam": {{"polarization": {{"kind": "linear", "azimuth_deg": 10}}}},
               "elements": [{{"kind": "crystal", "material": "quartz", "thickness_mm": 1.5, "axis": {{"tilt_deg": 0}}{extra}}}]}}"#
        )
    };
    let rho = optical_activity("quartz")
        .unwrap()
        .at(Wavelength::from_nm(589.3).unwrap())
        .unwrap()
        .rotatory_power_rad_per_mm
        .to_degrees();
    assert!((rho - 21.72).abs() < 0.05, "{rho}");
    let right = run(&doc("", 2));
    assert!(
        (out_azimuth(&right) - (10.0 - 1.5 * rho)).abs() < 1e-9,
        "{}",
        out_azimuth(&right)
    );
    let json = serde_json::to_value(&right).unwrap();
    assert_eq!(json["elements"][0]["handedness"], "right");
    assert!((json["elements"][0]["rotatory_power_deg_per_mm"].as_f64().unwrap() - rho).abs() < 1e-9);
    let left = run(&doc(r#", "handedness": "left""#, 2));
    assert!((out_azimuth(&left) - (10.0 + 1.5 * rho)).abs() < 1e-9);
    // Switched off, and in a version-1 document (which had no optical activity): no rotation.
    for r in [run(&doc(r#", "optical_activity": false"#, 2)), run(&doc("", 1))] {
        assert!((out_azimuth(&r) - 10.0).abs() < 1e-9);
        assert!(
            serde_json::to_value(&r).unwrap()["elements"][0]
                .get("handedness")
                .is_none()
        );
    }
}

#[test]
fn an_active_quartz_plate_far_from_its_axis_is_nearly_the_plain_waveplate() {
    // An a-cut plate: the modes are linear to first order in the gyration (g11 = 0 here), so the
    // retardance moves by a part in 10⁸ at most and the rays are the same.
    let doc = |activity: bool| {
        format!(
            r#"{{"version": 2, "wavelength_nm": 632.8, "elements": [{{"kind": "crystal", "material": "quartz", "optical_activity": {activity},
               "thickness_mm": 1, "axis": {{"tilt_deg": 90, "azimuth_deg": 0}}}}]}}"#
        )
    };
    let (on, off) = (run(&doc(true)), run(&doc(false)));
    let ret = |r: &TraceResult| match crystal(r) {
        ElementReport::Crystal { retardance_rad, .. } => retardance_rad.unwrap(),
        _ => panic!(),
    };
    assert!(
        (ret(&on) - ret(&off)).abs() < 1e-8 * ret(&off).abs(),
        "{} {}",
        ret(&on),
        ret(&off)
    );
    let json = serde_json::to_value(&on).unwrap();
    let chi = json["elements"][0]["o"]["ellipticity_deg"].as_f64().unwrap();
    assert!(chi.abs() < 1e-3, "{chi}");
}

#[test]
fn a_wavelength_given_in_air_is_traced_at_its_vacuum_equivalent() {
    // The helium-neon line is 632.816 nm in standard air and 632.991 nm in vacuum (spectroscopic
    // tables; common practice, from memory). A document may give either.
    let air = run(r#"{"version": 2, "wavelength_nm": 632.816, "wavelength_in": "air",
        "elements": [{"kind": "crystal", "material": "calcite", "thickness_mm": 10, "axis": {"tilt_deg": 45}}]}"#);
    assert!((air.wavelength_nm - 632.991).abs() < 2e-3, "{}", air.wavelength_nm);
    let json = serde_json::to_value(&air).unwrap();
    assert_eq!(json["air_wavelength_nm"], 632.816);
    let vacuum = run(&format!(
        r#"{{"version": 2, "wavelength_nm": {}, "elements": [{{"kind": "crystal", "material": "calcite", "thickness_mm": 10, "axis": {{"tilt_deg": 45}}}}]}}"#,
        air.wavelength_nm
    ));
    for (a, v) in air.rays.iter().zip(&vacuum.rays) {
        assert_eq!(a.exit_point_mm, v.exit_point_mm);
        assert_eq!(a.phase_rad, v.phase_rad);
    }
    // Written back as given, and a bad value named.
    let sc = Scenario::from_json_str(
        r#"{"wavelength_nm": 1064, "wavelength_in": "air", "elements": [{"kind": "rotator", "angle_deg": 1}]}"#,
    )
    .unwrap();
    assert_eq!(sc.to_json()["wavelength_nm"], 1064.0);
    assert_eq!(sc.to_json()["wavelength_in"], "air");
    assert_eq!(Scenario::from_json(&sc.to_json()).unwrap(), sc);
    let bad =
        Scenario::from_json_str(r#"{"wavelength_in": "water", "elements": [{"kind": "rotator", "angle_deg": 1}]}"#)
            .unwrap_err();
    assert_eq!(bad.field, "wavelength_in");
}

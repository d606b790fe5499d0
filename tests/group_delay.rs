//! Group indices and group delays in trace results (`contract::group`), checked against an
//! independent numerical derivative of the dispersion formulas and against the equivalence of a
//! mounted plate and oblique incidence.

use doublespar::{ElementReport, Scenario, Wavelength, materials, trace_scenario};

/// Speed of light in vacuum, mm/ps (SI definition).
const C_MM_PER_PS: f64 = 0.299_792_458;

/// The e-wave index at angle θ to the axis: 1/n² = cos²θ/n_o² + sin²θ/n_e² (Born & Wolf §15.3).
fn extraordinary_index(no: f64, ne: f64, theta: f64) -> f64 {
    1.0 / ((theta.cos() / no).powi(2) + (theta.sin() / ne).powi(2)).sqrt()
}

/// d f/dλ at `nm` by Richardson extrapolation of central differences (steps of 1 and ½ nm):
/// an independent numerical derivative of a closed form.
fn derivative(f: impl Fn(f64) -> f64, nm: f64) -> f64 {
    let d = |h: f64| (f(nm + h) - f(nm - h)) / (2.0 * h);
    (4.0 * d(0.5) - d(1.0)) / 3.0
}

fn crystal_report(doc: &str) -> ElementReport {
    let sc = Scenario::from_json_str(doc).unwrap();
    trace_scenario(&sc).unwrap().elements[0].clone()
}

#[test]
fn group_indices_at_normal_incidence_are_n_minus_lambda_dn_dlambda() {
    // A calcite plate with its axis at 40° to the normal: the o-wave sees n_o(λ) and the
    // e-wave n(θ = 40°, λ) from the closed form, both differentiated here independently of
    // the trace.
    let calcite = materials().iter().find(|m| m.key == "calcite").unwrap();
    let ix = |nm: f64| calcite.indices(Wavelength::from_nm(nm).unwrap()).unwrap().indices;
    let theta = 40f64.to_radians();
    let nm = 800.0;
    let want_o = ix(nm).no - nm * derivative(|w| ix(w).no, nm);
    let ne = |w: f64| extraordinary_index(ix(w).no, ix(w).ne, theta);
    let want_e = ne(nm) - nm * derivative(ne, nm);
    let r = crystal_report(
        r#"{"wavelength_nm": 800, "elements": [{"kind": "crystal", "material": "calcite", "thickness_mm": 2, "axis": {"tilt_deg": 40}}]}"#,
    );
    let ElementReport::Crystal {
        modes, group_delay_ps, ..
    } = r
    else {
        panic!()
    };
    let (go, ge) = (modes.first.group_index.unwrap(), modes.second.group_index.unwrap());
    assert!((go - want_o).abs() < 1e-8, "{go} {want_o}");
    assert!((ge - want_e).abs() < 1e-8, "{ge} {want_e}");
    // τ_e − τ_o = L (g_e − g_o) / c.
    let want = 2.0 * (want_e - want_o) / C_MM_PER_PS;
    assert!(
        (group_delay_ps.unwrap() - want).abs() < 1e-8,
        "{group_delay_ps:?} {want}"
    );
    // A negative crystal: the e-wave's envelope arrives first.
    assert!(want < 0.0);
}

#[test]
fn a_mounted_plate_has_the_group_delay_of_the_plate_lit_obliquely() {
    // A mount is a rigid rotation (CONVENTIONS.md): a plate tilted by 10° about y at normal
    // incidence is, in the plate's own frame, the unmounted plate lit at 10° from the other
    // side (polar −10°). The delay across the plate is the plate's and the beam's alone.
    let mounted = crystal_report(
        r#"{"version": 2, "wavelength_nm": 1030, "elements": [{"kind": "crystal", "material": "quartz", 
            "thickness_mm": 3, "axis": {"tilt_deg": 90, "azimuth_deg": 30}, "mount": {"tilt_deg": 10, "azimuth_deg": 0}}]}"#,
    );
    let oblique = crystal_report(
        r#"{"version": 2, "wavelength_nm": 1030, "beam": {"incidence": {"polar_deg": -10, "azimuth_deg": 0}},
            "elements": [{"kind": "crystal", "material": "quartz",  "thickness_mm": 3,
            "axis": {"tilt_deg": 90, "azimuth_deg": 30}}]}"#,
    );
    let delay = |r: &ElementReport| match r {
        ElementReport::Crystal { group_delay_ps, .. } => group_delay_ps.unwrap(),
        _ => panic!(),
    };
    let (a, b) = (delay(&mounted), delay(&oblique));
    // Quartz in a version-2 document is optically active: both go through the general
    // solver, whose ξ carries rounding of about 10⁻¹⁵, divided by 2h = 4·10⁻⁵ in the group
    // index: a few 10⁻¹⁰ ps here.
    assert!((a - b).abs() < 1e-8 * a.abs(), "{a} {b}");
    // Quartz is positive: the e-wave's envelope arrives later.
    assert!(a > 0.0);
}

#[test]
fn a_wedge_has_group_indices_but_no_single_delay() {
    let r = crystal_report(
        r#"{"version": 2, "elements": [{"kind": "crystal", "material": "calcite", "thickness_mm": 3, "aperture_mm": 5,
            "axis": {"tilt_deg": 90}, "faces": {"back": {"tilt_deg": 10}}}]}"#,
    );
    let ElementReport::Crystal {
        modes, group_delay_ps, ..
    } = r
    else {
        panic!()
    };
    assert!(modes.first.group_index.is_some() && modes.second.group_index.is_some());
    assert_eq!(group_delay_ps, None);
}

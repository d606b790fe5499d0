//! Two-crystal pairs with a biaxial plate: the athermal waveplate (`athermal-waveplate`) and the
//! achromatic pair (`achromat`), each plate with its own `cut`.
//!
//! Every answer's part is traced whole by the general tracer (the path `doublespar trace` takes,
//! with each plate's indices and expansion at the temperature the scenario carries), independent
//! of the solvers' per-millimetre rates and linear systems: an athermal KTP or LBO + quartz pair
//! must give its target at the design temperature to 1e-9 waves and change by less than 1e-6
//! waves per kelvin (a symmetric difference of whole traces over ±1 K), and agree with the
//! answer's own figures; an achromatic pair with a biaxial plate must give its target at both
//! design wavelengths to 1e-9 waves. Each biaxial plate's `axes` are checked to put its cut's
//! principal axis along the plate normal. A custom uniaxial tensor given as nx = ny, nz must give
//! the pair the same crystal gives as no, ne (1e-12 relative); bad requests name their field.

use doublespar::{ElementReport, Scenario, orientation, solve_design_str, trace_scenario};
use nalgebra::Vector3;
use serde_json::{Value, json};

mod common;
use common::{design, num};

/// The lab azimuth (degrees, modulo 180) of the direction whose polarization a traced plate's
/// retardance counts as the slower: a uniaxial plate's optic axis (`axis`, its e-wave), a biaxial
/// plate's slower in-face principal axis, found from its `axes` and the trace's own n_x, n_y, n_z.
fn slow_direction(element: &Value, report: &ElementReport) -> f64 {
    let ElementReport::Crystal { nx, ny, nz, .. } = report else {
        panic!("{report:?}")
    };
    let Some(axes) = element.get("axes") else {
        return num(element, "/axis/azimuth_deg");
    };
    let n = [nx.unwrap(), ny.unwrap(), nz.unwrap()];
    let r = orientation(
        num(axes, "/tilt_deg").to_radians(),
        num(axes, "/azimuth_deg").to_radians(),
        num(axes, "/roll_deg").to_radians(),
    );
    let slow = (0..3)
        .filter(|&k| r[(2, k)].abs() < 1e-9)
        .max_by(|&a, &b| n[a].total_cmp(&n[b]))
        .unwrap_or_else(|| panic!("no principal axis in the faces of {element}"));
    r[(1, slow)].atan2(r[(0, slow)]).to_degrees()
}

/// The answer's pair traced whole at `t_c` °C and `nm`: each plate's traced retardance (the
/// trace's e minus o for a uniaxial plate, slow minus fast for a biaxial one), counted negative
/// for a plate whose slower direction ([`slow_direction`]) is crossed with the first plate's.
fn traced(answer: &Value, t_c: f64, nm: f64) -> f64 {
    let mut doc = answer["scenario"].clone();
    doc["temperature_c"] = json!(t_c);
    doc["wavelength_nm"] = json!(nm);
    doc["version"] = json!(2);
    let sc = Scenario::from_json(&doc).unwrap_or_else(|e| panic!("{doc}: {e}"));
    let elements = doc["elements"].as_array().unwrap();
    let reports = trace_scenario(&sc).unwrap().elements;
    let first = slow_direction(&elements[0], &reports[0]);
    reports
        .iter()
        .zip(elements)
        .map(|(e, el)| match e {
            ElementReport::Crystal { retardance_waves, .. } => {
                let turn = (slow_direction(el, e) - first).to_radians();
                let g = retardance_waves.unwrap();
                match turn.cos().abs() {
                    c if c > 1.0 - 1e-12 => g,
                    c if c < 1e-9 => -g,
                    _ => panic!("plates neither parallel nor crossed: {doc}"),
                }
            }
            other => panic!("{other:?}"),
        })
        .sum()
}

fn close(got: f64, want: f64, tol: f64, what: &str) {
    assert!(
        (got - want).abs() <= tol,
        "{what}: got {got}, want {want} (difference {:e}, allowed {tol:e})",
        (got - want).abs()
    );
}

/// Each biaxial plate of the answer (one with a `cut`): its element's `axes` put that principal
/// axis along the plate normal (z), the rotation being the contract's R = Rz(az)·Ry(tilt)·Rz(roll).
fn cuts_lie_along_the_normal(answer: &Value) -> usize {
    let plates = answer["plates"].as_array().unwrap();
    let mut biaxial = 0;
    for (i, p) in plates.iter().enumerate() {
        let Some(cut) = p["cut"].as_str() else { continue };
        biaxial += 1;
        let k = "xyz".find(cut).unwrap();
        let axes = &answer["scenario"]["elements"][i]["axes"];
        let r = orientation(
            num(axes, "/tilt_deg").to_radians(),
            num(axes, "/azimuth_deg").to_radians(),
            num(axes, "/roll_deg").to_radians(),
        );
        let c: Vector3<f64> = r.column(k).into();
        assert!(c.cross(&Vector3::z()).norm() < 1e-12, "plate {i} cut {cut}: axis {c}");
        assert!(p["cut_note"].as_str().is_some_and(|n| !n.is_empty()), "{p}");
        assert_eq!(p["principal_indices"].as_array().map(Vec::len), Some(3), "{p}");
    }
    biaxial
}

#[test]
fn an_athermal_pair_with_a_biaxial_plate_holds_its_retardance_in_the_whole_trace() {
    for (first, t0, nm) in [
        (json!({"material": "ktp", "cut": "x"}), 40.0, 1064.0),
        (json!({"material": "ktp", "cut": "y"}), 20.0, 632.8),
        (json!({"material": "lbo"}), 60.0, 800.0),
    ] {
        let doc = json!({
            "kind": "athermal-waveplate", "first": first, "second": {"material": "quartz"},
            "retardance_waves": 0.25, "wavelength_nm": nm, "temperature_c": t0,
        })
        .to_string();
        let d = design(&doc);
        assert_eq!(cuts_lie_along_the_normal(&d), 1, "{doc}");
        if let Some(cut) = first.get("cut") {
            assert_eq!(&d["plates"][0]["cut"], cut, "{doc}");
        }
        let (below, at, above) = (traced(&d, t0 - 1.0, nm), traced(&d, t0, nm), traced(&d, t0 + 1.0, nm));
        // The target at T0 (either sign: a negative pair has the other in-face axis slow).
        close(at.abs(), 0.25, 1e-9, &format!("{doc}: traced at T0"));
        // No first-order change: the symmetric difference is of order of the curvature only.
        let slope = (above - below) / 2.0;
        assert!(slope.abs() < 1e-6, "{doc}: traced dΓ/dT {slope:e} waves/K");
        // The answer's figures are the trace's.
        close(
            num(&d, "/retardance_waves"),
            at,
            1e-9,
            &format!("{doc}: answer's retardance"),
        );
        close(
            num(&d, "/temperature/retardance_per_kelvin_waves"),
            slope,
            1e-9,
            &format!("{doc}: answer's dΓ/dT"),
        );
        for p in d["temperature_curve"].as_array().unwrap().iter().step_by(14) {
            let (t, g) = (num(p, "/0"), num(p, "/1"));
            close(g, traced(&d, t, nm), 1e-9, &format!("{doc}: curve at {t} °C"));
        }
        // The comparison plate of the first crystal alone, traced alone, gives the target too
        // and changes by its reported rate.
        let single = &d["single_plate"];
        let mut alone = d.clone();
        alone["scenario"]["elements"] = json!([d["scenario"]["elements"][0].clone()]);
        alone["scenario"]["elements"][0]["thickness_mm"] = single["thickness_mm"].clone();
        close(
            traced(&alone, t0, nm).abs(),
            0.25,
            1e-9,
            &format!("{doc}: single plate"),
        );
        let s = (traced(&alone, t0 + 1.0, nm) - traced(&alone, t0 - 1.0, nm)) / 2.0;
        close(
            num(single, "/temperature/retardance_per_kelvin_waves"),
            s,
            1e-9,
            &format!("{doc}: single plate's dΓ/dT"),
        );
    }
}

#[test]
fn an_achromatic_pair_with_a_biaxial_plate_meets_its_target_at_both_wavelengths() {
    for (first, second, (w1, w2), target) in [
        (
            json!({"material": "ktp"}),
            json!({"material": "quartz"}),
            (600.0, 1000.0),
            0.25,
        ),
        (
            json!({"material": "quartz"}),
            json!({"material": "lbo", "cut": "z"}),
            (500.0, 900.0),
            0.5,
        ),
        (
            json!({"material": "bibo", "cut": "x"}),
            json!({"material": "mgf2"}),
            (700.0, 1100.0),
            0.25,
        ),
    ] {
        let doc = json!({
            "kind": "achromat", "first": first, "second": second,
            "retardance_waves": target, "wavelengths_nm": [w1, w2],
        })
        .to_string();
        let d = design(&doc);
        assert_eq!(cuts_lie_along_the_normal(&d), 1, "{doc}");
        for w in [w1, w2] {
            close(
                traced(&d, 20.0, w).abs(),
                target,
                1e-9,
                &format!("{doc}: traced at {w} nm"),
            );
        }
        // Between them the curve is the trace's too.
        for p in d["wavelength_curve"].as_array().unwrap().iter().step_by(40) {
            let (w, g) = (num(p, "/0"), num(p, "/1"));
            close(
                g.abs(),
                traced(&d, 20.0, w).abs(),
                1e-9,
                &format!("{doc}: curve at {w} nm"),
            );
        }
    }
}

#[test]
fn a_custom_uniaxial_tensor_gives_the_pair_its_no_ne_form_gives() {
    // nx = ny is a uniaxial crystal with its optic axis along z; as a plate's own cut its slow
    // and fast in-face indices are n_e and n_o, so the pair is the same whichever way it is
    // written. A positive crystal keeps its optic axis (the slow one) at the same azimuth; a
    // negative one reports the slow axis where the no/ne form reports the optic axis, so its
    // thicknesses and curves are compared, not its azimuths.
    for (no, ne) in [(1.544, 1.553), (1.658, 1.486)] {
        let pair = |first: Value| {
            design(
                &json!({
                    "kind": "achromat", "first": first, "second": {"material": "mgf2"},
                    "retardance_waves": 0.25, "wavelengths_nm": [500, 900],
                })
                .to_string(),
            )
        };
        let tensor = pair(json!({"nx": no, "ny": no, "nz": ne}));
        let indices = pair(json!({"no": no, "ne": ne}));
        let same_within = |a: f64, b: f64, tol: f64, what: &str| {
            assert!(
                (a - b).abs() <= tol,
                "({no}, {ne}) {what}: {a} against {b}, allowed {tol:e}"
            );
        };
        let same = |a: f64, b: f64, what: &str| same_within(a, b, 1e-12 * a.abs().max(b.abs()), what);
        // Away from the design wavelengths the two forms' retardances come from two mode solvers
        // (the uniaxial closed form, the general one), each rounding its phase k0 n L, some
        // thousands of waves here, at about 1e-16: allowed 1e-15 of that phase besides.
        let path_mm: f64 = (0..2).map(|k| num(&tensor, &format!("/plates/{k}/thickness_mm"))).sum();
        let phase = |nm: f64| 2.0 * path_mm * 1e6 / nm;
        for k in 0..2 {
            let at = |d: &Value| num(d, &format!("/plates/{k}/thickness_mm"));
            same(at(&tensor), at(&indices), "thickness");
            let at = |d: &Value| num(d, &format!("/at_design_wavelengths/{k}/1"));
            same(at(&tensor), at(&indices), "retardance at a design wavelength");
        }
        let (a, b) = (
            tensor["wavelength_curve"].as_array().unwrap(),
            indices["wavelength_curve"].as_array().unwrap(),
        );
        assert_eq!(a.len(), b.len());
        for (p, q) in a.iter().zip(b) {
            let (w, a, b) = (num(p, "/0"), num(p, "/1"), num(q, "/1"));
            same_within(a, b, 1e-12 * a.abs() + 1e-15 * phase(w), &format!("curve at {w} nm"));
        }
        let (a, b) = (num(&tensor, "/max_error_waves"), num(&indices, "/max_error_waves"));
        same_within(a, b, 1e-12 * a + 1e-15 * phase(400.0), "largest error");
        if ne > no {
            for k in 0..2 {
                let at = |d: &Value| num(d, &format!("/plates/{k}/axis_azimuth_deg"));
                assert_eq!(at(&tensor), at(&indices), "({no}, {ne}) plate {k}");
            }
        }
    }
}

#[test]
fn bad_pair_requests_name_their_field() {
    let athermal = |first: &str, second: &str| {
        format!(r#"{{"kind": "athermal-waveplate", "first": {first}, "second": {second}, "retardance_waves": 0.25}}"#)
    };
    let achromat = |first: &str, second: &str| {
        format!(
            r#"{{"kind": "achromat", "first": {first}, "second": {second}, "retardance_waves": 0.25, "wavelengths_nm": [500, 900]}}"#
        )
    };
    for (doc, field) in [
        // A cut is a biaxial plate's, as for a waveplate.
        (
            athermal(r#"{"material": "quartz", "cut": "x"}"#, r#"{"material": "ktp"}"#),
            "first.cut",
        ),
        (
            achromat(r#"{"material": "ktp"}"#, r#"{"no": 1.5, "ne": 1.6, "cut": "y"}"#),
            "second.cut",
        ),
        // Only x, y or z.
        (
            athermal(r#"{"material": "quartz"}"#, r#"{"material": "lbo", "cut": "xz"}"#),
            "second.cut",
        ),
        (
            achromat(r#"{"material": "bibo", "cut": 1}"#, r#"{"material": "quartz"}"#),
            "first.cut",
        ),
        // A cut whose two in-face indices are equal cannot retard.
        (
            achromat(
                r#"{"nx": 1.5, "ny": 1.5, "nz": 1.6, "cut": "z"}"#,
                r#"{"material": "mgf2"}"#,
            ),
            "first.cut",
        ),
        // Fixed principal indices carry no thermal data.
        (
            athermal(r#"{"material": "quartz"}"#, r#"{"nx": 1.5, "ny": 1.55, "nz": 1.6}"#),
            "second.nx",
        ),
        // An unknown field inside a plate is named with its plate.
        (
            achromat(r#"{"material": "ktp", "plane": "xz"}"#, r#"{"material": "quartz"}"#),
            "first.plane",
        ),
    ] {
        let e = solve_design_str(&doc).expect_err(&doc);
        assert_eq!(e.field, field, "{doc}: {e}");
    }
}

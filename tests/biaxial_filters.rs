//! Birefringent filters (`birefringent-filter`) and broadband retarders (`broadband-retarder`) of
//! biaxial crystals (KTP, LBO, custom `nx`/`ny`/`nz`), every plate cut along a principal axis
//! (`cut`).
//!
//! Every answer's part is traced whole by the library's exact tracer (`trace_scenario`: for a
//! biaxial crystal the general 4×4 mode solver), independently of the solvers' Jones models:
//! - a filter transmits 1 at its design wavelength, and its traced transmission peaks there
//!   (located by a golden-section search on whole traces, to 1e-6 of the pass band); its traced
//!   half-maximum points (bisected on whole traces) give the answer's `fwhm_nm` to 1e-9 nm; and
//!   its curve is the closed form with n_slow − n_fast of the cut's two in-face principal indices
//!   evaluated here from the cited formula (KTP: K. Kato and E. Takaoka, Appl. Opt. 41, 5040
//!   (2002); LBO: K. Kato, IEEE J. Quantum Electron. 30, 2950 (1994)): the stage-doubling
//!   product T = Π cos²(π 2ᵏ Δn d/λ) (B. Lyot 1933; Born & Wolf, Principles of Optics, §15.4.4,
//!   from memory) or the folded filter's T = [tan 2ρ cos χ sin Nχ / sin χ]², cos χ = cos 2ρ
//!   sin(Γ/2) (I. Šolc 1953; Yariv & Yeh, Optical Waves in Crystals, §5.3, from memory), to 1e-9;
//! - a broadband retarder's traced Jones matrix U (the output field for x and for y input light)
//!   gives the equivalent retarder's retardance δ by cos δ = tr(U Uᵀ) / (2 det U): with
//!   U = e^{iα} Rot(ω/2) L(δ, θ) Rot(ω/2) (the Hurwitz–Jones equivalence, JOSA 31, 493 (1941),
//!   from memory), U Uᵀ = e^{2iα} Rot(ω/2) L(δ, θ)² Rot(−ω/2) is a retarder of 2δ, whatever ω; a
//!   method of its own beside the solver's product of unitary plates. At every wavelength of the
//!   answer's curve it equals the answer's figure to 1e-9 waves;
//! - every plate's `axes` put its cut's principal axis along the plate normal and its slower
//!   in-face principal axis at the plate's azimuth (to 1e-9°);
//! - a tensor with n_x = n_y is the crystal n_o = n_x, n_e = n_z: the same filter (either sign of
//!   birefringence) and, for a positive crystal, the same broadband retarder, to 1e-12 relative;
//! - bad requests name `cut` (or `materials[i].cut`).

use doublespar::{Scenario, find_biaxial, orientation, solve_design_str, trace_scenario};
use num_complex::Complex64;
use serde_json::{Value, json};
use std::f64::consts::{FRAC_PI_4, PI};

mod common;
use common::{design, num};

fn close(got: f64, want: f64, tol: f64, what: &str) {
    assert!(
        (got - want).abs() <= tol,
        "{what}: got {got}, want {want} (difference {:e}, allowed {tol:e})",
        (got - want).abs()
    );
}

/// The answer's scenario at `nm` (vacuum), lit by `polarization` when given.
fn scenario_at(answer: &Value, nm: f64, polarization: Option<Value>) -> Scenario {
    let mut doc = answer["scenario"].clone();
    doc["wavelength_nm"] = json!(nm);
    doc["version"] = json!(2);
    if let Some(p) = polarization {
        doc["beam"]["polarization"] = p;
    }
    Scenario::from_json(&doc).unwrap_or_else(|e| panic!("{doc}: {e}"))
}

/// The transmission of the answer's part at `nm`, by the whole trace.
fn traced_transmission(answer: &Value, nm: f64) -> f64 {
    trace_scenario(&scenario_at(answer, nm, None)).unwrap().total_power
}

/// The principal axis (0, 1, 2) of the element's `axes` that lies along the plate normal, and the
/// lab azimuth (degrees, modulo 180) of its slower in-face principal axis for indices `n`.
fn cut_and_slow_azimuth(element: &Value, n: [f64; 3]) -> (usize, f64) {
    let axes = &element["axes"];
    let r = orientation(
        num(axes, "/tilt_deg").to_radians(),
        num(axes, "/azimuth_deg").to_radians(),
        num(axes, "/roll_deg").to_radians(),
    );
    let cut = (0..3)
        .find(|&k| (r[(2, k)].abs() - 1.0).abs() < 1e-12)
        .unwrap_or_else(|| panic!("no principal axis along the normal: {element}"));
    let slow = (0..3)
        .filter(|&k| k != cut)
        .max_by(|&a, &b| n[a].total_cmp(&n[b]))
        .unwrap();
    (cut, r[(1, slow)].atan2(r[(0, slow)]).to_degrees().rem_euclid(180.0))
}

fn indices(v: &Value) -> [f64; 3] {
    [0, 1, 2].map(|k| num(v, &format!("/principal_indices/{k}")))
}

/// Each crystal element of the answer's scenario (paired with its plate) is cut along `cut` with
/// its slower in-face axis at the plate's azimuth; `n_of(i)` gives plate i's principal indices.
fn plates_are_cut_as_reported(answer: &Value, n_of: impl Fn(usize) -> [f64; 3], cut_of: impl Fn(usize) -> String) {
    let crystals: Vec<&Value> = answer["scenario"]["elements"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|e| e["kind"] == "crystal")
        .collect();
    let plates = answer["plates"].as_array().unwrap();
    assert_eq!(crystals.len(), plates.len());
    for (i, (e, p)) in crystals.iter().zip(plates).enumerate() {
        let (cut, slow) = cut_and_slow_azimuth(e, n_of(i));
        assert_eq!("xyz".chars().nth(cut).unwrap().to_string(), cut_of(i), "plate {i}: {e}");
        let want = num(p, "/axis_azimuth_deg").rem_euclid(180.0);
        let d = (slow - want + 90.0).rem_euclid(180.0) - 90.0;
        assert!(d.abs() < 1e-9, "plate {i}: slow axis at {slow}°, reported {want}°");
    }
}

/// Where the traced transmission of the answer's part is largest within ±`reach` nm of `nm0`
/// (golden-section search on whole traces).
fn traced_peak(answer: &Value, nm0: f64, reach: f64) -> f64 {
    let g = (5f64.sqrt() - 1.0) / 2.0;
    let (mut a, mut b) = (nm0 - reach, nm0 + reach);
    for _ in 0..90 {
        let (c, d) = (b - g * (b - a), a + g * (b - a));
        if traced_transmission(answer, c) > traced_transmission(answer, d) {
            b = d;
        } else {
            a = c;
        }
    }
    0.5 * (a + b)
}

/// The traced pass band's full width at half of `peak`: each half-maximum point stepped out to
/// from `nm0` by `step` nm and bisected to 1e-12 nm on whole traces.
fn traced_fwhm(answer: &Value, nm0: f64, peak: f64, step: f64) -> f64 {
    let inside = |nm: f64| traced_transmission(answer, nm) >= 0.5 * peak;
    let edge = |dir: f64| {
        let mut a = nm0;
        while inside(a + dir * step) {
            a += dir * step;
        }
        let mut b = a + dir * step;
        while (b - a).abs() > 1e-12 {
            let m = 0.5 * (a + b);
            if inside(m) { a = m } else { b = m }
        }
        0.5 * (a + b)
    };
    edge(1.0) - edge(-1.0)
}

/// The filter's transmission by its closed form, for a thinnest plate of `d` mm and the in-face
/// birefringence `dn` (n_slow − n_fast) at `nm` (see the module header).
fn closed_form(layout: &str, stages: usize, d: f64, dn: f64, nm: f64) -> f64 {
    let gamma = 2.0 * PI * dn * d * 1e6 / nm;
    if layout == "folded" {
        let rho = FRAC_PI_4 / stages as f64;
        let chi = ((2.0 * rho).cos() * (gamma / 2.0).sin()).acos();
        ((2.0 * rho).tan() * chi.cos() * (stages as f64 * chi).sin() / chi.sin()).powi(2)
    } else {
        (0..stages)
            .map(|k| (0.5 * gamma * f64::from(1 << k)).cos().powi(2))
            .product()
    }
}

/// n_slow − n_fast of the cut `cut` (0, 1, 2) of principal indices `n`.
fn in_face_birefringence(n: [f64; 3], cut: usize) -> f64 {
    let face: Vec<f64> = (0..3).filter(|&k| k != cut).map(|k| n[k]).collect();
    (face[0] - face[1]).abs()
}

#[test]
fn biaxial_filters_traced_whole_peak_at_their_centre_with_the_width_they_report() {
    // (request fields, the catalogue key for the closed form of the curve, the cut expected)
    for (fields, key, cut) in [
        (
            json!({"material": "ktp", "stages": 4, "wavelength_nm": 1064, "bandwidth_nm": 1}),
            Some("ktp"),
            "y",
        ),
        (
            json!({"material": "ktp", "cut": "x", "layout": "folded", "stages": 4, "wavelength_nm": 1064, "bandwidth_nm": 3}),
            Some("ktp"),
            "x",
        ),
        (
            json!({"material": "lbo", "cut": "z", "stages": 3, "wavelength_nm": 800, "bandwidth_nm": 2}),
            Some("lbo"),
            "z",
        ),
        (
            json!({"nx": 1.52, "ny": 1.56, "nz": 1.61, "cut": "y", "layout": "folded", "stages": 5, "wavelength_nm": 633, "bandwidth_nm": 5}),
            None,
            "y",
        ),
    ] {
        let mut doc = fields.clone();
        doc["kind"] = json!("birefringent-filter");
        let doc = doc.to_string();
        let a = design(&doc);
        let nm0 = num(&a, "/wavelength_nm");
        let fwhm = num(&a, "/fwhm_nm");
        assert_eq!(a["cut"], cut, "{doc}");
        plates_are_cut_as_reported(&a, |_| indices(&a), |_| cut.to_string());
        // Whole plates of waves (half waves, folded) at the centre: the trace passes everything.
        let peak = traced_transmission(&a, nm0);
        close(peak, 1.0, 1e-12, &format!("{doc}: traced transmission at the centre"));
        close(
            num(&a, "/peak_transmission"),
            peak,
            1e-12,
            &format!("{doc}: answer's peak"),
        );
        // ... and peaks there.
        let at = traced_peak(&a, nm0, 0.25 * fwhm);
        close(at, nm0, 1e-6 * fwhm, &format!("{doc}: traced peak"));
        // The width the answer reports is the traced one.
        let traced = traced_fwhm(&a, nm0, peak, fwhm / 40.0);
        close(traced, fwhm, 1e-9, &format!("{doc}: traced FWHM"));
        println!("{doc}: traced FWHM {traced} nm, answer {fwhm} nm; peak at {at} nm");
        // The curve (every point a whole trace) is the closed form of the cited indices.
        let layout = a["layout"].as_str().unwrap();
        let stages = a["plates"].as_array().unwrap().len();
        let d = num(&a, "/plates/0/thickness_mm");
        let k = "xyz".find(cut).unwrap();
        let dn = |nm: f64| match key {
            Some(key) => {
                let p = find_biaxial(key)
                    .unwrap()
                    .principal(doublespar::Wavelength::from_nm(nm).unwrap())
                    .unwrap();
                in_face_birefringence(p.principal, k)
            }
            None => in_face_birefringence(indices(&a), k),
        };
        for p in a["curve"].as_array().unwrap() {
            let (nm, t) = (num(p, "/0"), num(p, "/1"));
            close(
                t,
                closed_form(layout, stages, d, dn(nm), nm),
                1e-9,
                &format!("{doc}: curve at {nm} nm"),
            );
        }
    }
}

/// The Jones matrix of the answer's stack at `nm` from two whole traces (x and y input light):
/// the coherent field of its one output spot for each.
fn traced_jones(answer: &Value, nm: f64) -> [[Complex64; 2]; 2] {
    let column = |jones: Value| {
        let r = trace_scenario(&scenario_at(answer, nm, Some(json!({"kind": "jones", "jones": jones})))).unwrap();
        assert_eq!(
            r.spots.len(),
            1,
            "the plates' rays meet in one spot at normal incidence"
        );
        let j = r.spots[0].jones.expect("a fully polarized input");
        [Complex64::new(j[0][0], j[0][1]), Complex64::new(j[1][0], j[1][1])]
    };
    let (x, y) = (column(json!([[1, 0], [0, 0]])), column(json!([[0, 0], [1, 0]])));
    [[x[0], y[0]], [x[1], y[1]]]
}

/// The equivalent retarder's retardance of a lossless Jones matrix, waves: cos δ = tr(U Uᵀ) /
/// (2 det U) (see the module header).
fn retardance_of(u: [[Complex64; 2]; 2]) -> f64 {
    let uut_trace = u[0][0] * u[0][0] + u[0][1] * u[0][1] + u[1][0] * u[1][0] + u[1][1] * u[1][1];
    let det = u[0][0] * u[1][1] - u[0][1] * u[1][0];
    let c = uut_trace / (2.0 * det);
    assert!(c.im.abs() < 1e-9, "tr(U Uᵀ)/(2 det U) = {c}: not real");
    c.re.clamp(-1.0, 1.0).acos() / (2.0 * PI)
}

#[test]
fn biaxial_broadband_retarders_traced_whole_give_the_retardance_they_report() {
    for fields in [
        json!({"material": "ktp", "plates": 3, "retardance_waves": 0.25, "band_nm": [800, 1300]}),
        json!({"material": "lbo", "cut": "x", "plates": 2, "retardance_waves": 0.3, "band_nm": [700, 1000], "fast_axis_deg": 20}),
        json!({"materials": ["quartz", {"material": "lbo", "cut": "z"}, "quartz"], "retardance_waves": 0.25, "band_nm": [700, 1000], "generations": 200}),
        json!({"nx": 1.52, "ny": 1.56, "nz": 1.61, "cut": "z", "plates": 3, "retardance_waves": 0.25, "band_nm": [500, 700], "generations": 300}),
    ] {
        let mut doc = fields.clone();
        doc["kind"] = json!("broadband-retarder");
        let doc = doc.to_string();
        let a = design(&doc);
        let plates = a["plates"].as_array().unwrap();
        let biaxial: Vec<usize> = (0..plates.len()).filter(|&i| plates[i].get("cut").is_some()).collect();
        assert!(!biaxial.is_empty(), "{doc}: a biaxial plate reports its cut");
        // Each biaxial plate's axes; a plate of no thickness is left out of the scenario (and
        // says so in the notes), the others keep their order.
        let elements: Vec<usize> = (0..plates.len())
            .filter(|&i| num(&plates[i], "/thickness_mm") > 0.0)
            .collect();
        let left_out = plates.len() - elements.len();
        assert_eq!(
            a["scenario"]["elements"].as_array().unwrap().len(),
            elements.len(),
            "{doc}"
        );
        let said = a["notes"]
            .as_array()
            .unwrap()
            .iter()
            .filter(|n| n.as_str().unwrap().contains("no thickness"))
            .count();
        assert_eq!(said, left_out, "{doc}: {}", a["notes"]);
        for &i in biaxial.iter().filter(|i| elements.contains(i)) {
            let e = &a["scenario"]["elements"][elements.iter().position(|&k| k == i).unwrap()];
            let (cut, slow) = cut_and_slow_azimuth(e, indices(&plates[i]));
            assert_eq!(
                plates[i]["cut"],
                "xyz".chars().nth(cut).unwrap().to_string(),
                "{doc}: plate {i}"
            );
            let want = num(&plates[i], "/axis_azimuth_deg").rem_euclid(180.0);
            let d = (slow - want + 90.0).rem_euclid(180.0) - 90.0;
            assert!(
                d.abs() < 1e-9,
                "{doc}: plate {i}: slow axis at {slow}°, reported {want}°"
            );
        }
        for p in a["curve"].as_array().unwrap() {
            let nm = num(p, "/wavelength_nm");
            close(
                retardance_of(traced_jones(&a, nm)),
                num(p, "/retardance_waves"),
                1e-9,
                &format!("{doc}: traced retardance at {nm} nm"),
            );
        }
    }
}

#[test]
fn a_tensor_with_two_equal_indices_designs_what_its_no_ne_form_designs() {
    // n_x = n_y is a uniaxial crystal with its optic axis along z (CONVENTIONS.md "More media").
    // A plate's slower in-face axis stands where the no/ne form has its optic axis: the same axis
    // for a positive crystal, the one across it for a negative one, which a filter between its
    // polarizers cannot tell apart (cos² and Šolc's form are even in Γ).
    let same = |a: f64, b: f64, tol: f64, what: &str| {
        assert!(
            (a - b).abs() <= tol,
            "{what}: {a} against {b} (difference {:e}, allowed {tol:e})",
            (a - b).abs()
        );
    };
    let relative = |a: f64, b: f64, what: &str| same(a, b, 1e-12 * a.abs().max(b.abs()), what);
    for (no, ne) in [(1.544, 1.553), (1.658, 1.486)] {
        for layout in ["stage-doubling", "folded"] {
            let filter = |crystal: Value| {
                let mut doc = json!({"kind": "birefringent-filter", "layout": layout, "stages": 4, "wavelength_nm": 589.3, "bandwidth_nm": 2});
                doc.as_object_mut()
                    .unwrap()
                    .extend(crystal.as_object().unwrap().clone());
                design(&doc.to_string())
            };
            let (t, i) = (
                filter(json!({"nx": no, "ny": no, "nz": ne})),
                filter(json!({"no": no, "ne": ne})),
            );
            let what = format!("({no}, {ne}) {layout}");
            for path in [
                "/fwhm_nm",
                "/total_thickness_mm",
                "/neighbour_peaks_nm/0",
                "/neighbour_peaks_nm/1",
                "/peak_transmission",
            ] {
                relative(num(&t, path), num(&i, path), &format!("{what} {path}"));
            }
            assert_eq!(t["order"], i["order"], "{what}");
            for k in 0..4 {
                relative(
                    num(&t, &format!("/plates/{k}/thickness_mm")),
                    num(&i, &format!("/plates/{k}/thickness_mm")),
                    &format!("{what} plate {k}"),
                );
                assert_eq!(
                    t["plates"][k]["axis_azimuth_deg"], i["plates"][k]["axis_azimuth_deg"],
                    "{what}"
                );
            }
            // The curves are traced by one mode solver for both forms (the trace resolves the
            // tensor as uniaxial too); allowed besides 1e-15 of each plate's phase, some hundreds
            // of waves, at which two orientations of one axis may round apart.
            let phase = 2.0 * PI * num(&t, "/total_thickness_mm") * 1e6 * no / 589.3;
            let (ct, ci) = (t["curve"].as_array().unwrap(), i["curve"].as_array().unwrap());
            assert_eq!(ct.len(), ci.len());
            for (p, q) in ct.iter().zip(ci) {
                same(
                    num(p, "/1"),
                    num(q, "/1"),
                    1e-12 + 1e-15 * phase,
                    &format!("{what} curve at {}", num(p, "/0")),
                );
            }
        }
    }
    // A broadband retarder of a positive crystal: the same plates, departures and curve (the
    // search's landscape is the same, so it takes the same path). A negative crystal's tensor
    // form puts the slow axis where the no/ne form puts the optic axis, 90° away, so its search
    // runs in a landscape turned by 90° and takes another path.
    let retarder = |crystal: Value| {
        let mut doc = json!({"kind": "broadband-retarder", "plates": 3, "retardance_waves": 0.25, "band_nm": [500, 800], "generations": 300});
        doc.as_object_mut()
            .unwrap()
            .extend(crystal.as_object().unwrap().clone());
        design(&doc.to_string())
    };
    let (t, i) = (
        retarder(json!({"nx": 1.544, "ny": 1.544, "nz": 1.553})),
        retarder(json!({"no": 1.544, "ne": 1.553})),
    );
    for k in 0..3 {
        for f in ["thickness_mm", "axis_azimuth_deg", "retardance_waves"] {
            let path = format!("/plates/{k}/{f}");
            relative(num(&t, &path), num(&i, &path), &format!("broadband {path}"));
        }
    }
    for f in ["retardance_waves", "fast_axis_deg", "rotation_deg", "distance"] {
        let path = format!("/departures/{f}");
        relative(num(&t, &path), num(&i, &path), &format!("broadband {path}"));
    }
    for (p, q) in t["curve"]
        .as_array()
        .unwrap()
        .iter()
        .zip(i["curve"].as_array().unwrap())
    {
        relative(
            num(p, "/retardance_waves"),
            num(q, "/retardance_waves"),
            "broadband curve",
        );
    }
}

#[test]
fn bad_biaxial_filter_and_retarder_requests_name_the_cut() {
    let filter = |crystal: &str| format!(r#"{{"kind": "birefringent-filter", {crystal}, "bandwidth_nm": 1}}"#);
    let retarder = |crystal: &str| {
        format!(r#"{{"kind": "broadband-retarder", {crystal}, "retardance_waves": 0.25, "band_nm": [500, 700]}}"#)
    };
    for (doc, field, words) in [
        // A cut is a biaxial crystal's.
        (filter(r#""material": "quartz", "cut": "x""#), "cut", "biaxial"),
        (filter(r#""no": 1.5, "ne": 1.6, "cut": "z""#), "cut", "biaxial"),
        (retarder(r#""material": "calcite", "cut": "y""#), "cut", "biaxial"),
        // Only x, y or z.
        (filter(r#""material": "ktp", "cut": "xy""#), "cut", "expected x, y or z"),
        (
            retarder(r#""material": "lbo", "cut": "a""#),
            "cut",
            "expected x, y or z",
        ),
        // A cut whose two in-face indices are equal cannot retard.
        (
            filter(r#""nx": 1.5, "ny": 1.5, "nz": 1.6, "cut": "z""#),
            "cut",
            "no birefringence",
        ),
        (
            retarder(r#""nx": 1.5, "ny": 1.5, "nz": 1.6, "cut": "z""#),
            "cut",
            "no birefringence",
        ),
        // In a list of plates, each entry names its own cut; a cut beside the list is refused.
        (
            retarder(r#""materials": ["quartz", {"material": "quartz", "cut": "x"}]"#),
            "materials[1].cut",
            "biaxial",
        ),
        (
            retarder(r#""materials": [{"nx": 1.5, "ny": 1.5, "nz": 1.6, "cut": "z"}, "quartz"]"#),
            "materials[0].cut",
            "no birefringence",
        ),
        (
            retarder(r#""materials": ["ktp", "quartz"], "cut": "x""#),
            "cut",
            "its own entry",
        ),
    ] {
        let e = solve_design_str(&doc).expect_err(&doc);
        assert_eq!(e.field, field, "{doc}: {e}");
        assert!(e.message.contains(words), "{doc}: {e}");
    }
}

//! Spectra through the whole contract: `spectrum` {from_nm, to_nm, points} read, checked and
//! written back, and the result's transmission and output Stokes vector against wavelength
//! compared with textbook closed forms evaluated here from the catalogue's cited dispersion
//! formula (quartz: G. Ghosh, Opt. Commun. 163, 95 (1999)) and with Jones computations written
//! here.

use doublespar::{Scenario, coincident_stokes, trace_scenario};
use serde_json::Value;
use std::f64::consts::PI;

mod common;

/// Quartz's birefringence n_e − n_o at `nm` from the catalogue formula, independently of the trace.
fn quartz_dn(nm: f64) -> f64 {
    common::birefringence("quartz", "ghosh-1999", nm)
}

/// A stack of a-cut quartz plates (axis in the faces at 45°) of `thicknesses_mm`, each behind a
/// polarizer at 0°, with a last polarizer at `last_deg`; light linear at 0°, normal incidence.
fn filter(thicknesses_mm: &[f64], last_deg: f64, spectrum: &str) -> String {
    let mut elements = Vec::new();
    for t in thicknesses_mm {
        elements.push(r#"{"kind": "polarizer", "transmission_axis_deg": 0}"#.to_string());
        elements.push(format!(
            r#"{{"kind": "crystal", "material": "quartz", "optical_activity": false, "thickness_mm": {t}, "axis": {{"tilt_deg": 90, "azimuth_deg": 45}}}}"#
        ));
    }
    elements.push(format!(
        r#"{{"kind": "polarizer", "transmission_axis_deg": {last_deg}}}"#
    ));
    format!(
        r#"{{"version": 2, "wavelength_nm": 600, "beam": {{"polarization": {{"kind": "linear", "azimuth_deg": 0}}}},
        "elements": [{}], "spectrum": {spectrum}}}"#,
        elements.join(", ")
    )
}

fn spectrum_of(doc: &str) -> (Vec<f64>, Vec<Option<f64>>, Vec<String>) {
    let r = serde_json::to_value(trace_scenario(&Scenario::from_json_str(doc).unwrap()).unwrap()).unwrap();
    let s = &r["spectrum"];
    let nums = |v: &Value| v.as_array().unwrap().iter().map(Value::as_f64).collect::<Vec<_>>();
    let warnings = r["warnings"]
        .as_array()
        .unwrap()
        .iter()
        .map(|w| w.as_str().unwrap().to_string())
        .collect();
    (
        nums(&s["wavelength_nm"]).into_iter().map(Option::unwrap).collect(),
        nums(&s["transmission"]),
        warnings,
    )
}

/// The spectrum's `stokes` [S0, S1, S2, S3] | null and `degree_of_polarization` of `doc`, from
/// the result's JSON.
fn stokes_of(doc: &str) -> (Vec<Option<[f64; 4]>>, Vec<Option<f64>>) {
    let r = serde_json::to_value(trace_scenario(&Scenario::from_json_str(doc).unwrap()).unwrap()).unwrap();
    let s = &r["spectrum"];
    let stokes = s["stokes"]
        .as_array()
        .unwrap()
        .iter()
        .map(|v| v.as_array().map(|a| std::array::from_fn(|k| a[k].as_f64().unwrap())))
        .collect();
    let dop = s["degree_of_polarization"]
        .as_array()
        .unwrap()
        .iter()
        .map(Value::as_f64)
        .collect();
    (stokes, dop)
}

#[test]
fn a_plate_at_45_degrees_turns_linear_light_through_the_ellipses_of_its_retardance() {
    // Textbook Jones result (Born & Wolf §1.4.2 / §10.8, from memory), with the conventions of
    // ../shared/CONVENTIONS.md: time dependence exp(i(k·r − ωt)), so the slow e-wave of quartz
    // (n_e > n_o), polarized along the axis at +45°, picks up e^{+iΓ}, Γ = 2πΔn·d/λ. Light linear
    // along x, E = [(1, 1)/√2 · e^{iΓ} + (1, −1)/√2] / √2 = ½ (e^{iΓ} + 1, e^{iΓ} − 1), so
    // S1 = |E1|² − |E2|² = cos Γ, S2 = 2 Re(E1 E2*) = 0, S3 = 2 Im(E1 E2*) = −sin Γ
    // (S3 > 0 right-handed). Lossless faces: S0 = 1.
    let d_mm = 0.5;
    let doc = format!(
        r#"{{"version": 2, "wavelength_nm": 600, "beam": {{"polarization": {{"kind": "linear", "azimuth_deg": 0}}}},
        "elements": [{{"kind": "crystal", "material": "quartz", "optical_activity": false, "thickness_mm": {d_mm}, "axis": {{"tilt_deg": 90, "azimuth_deg": 45}}}}],
        "spectrum": {{"from_nm": 450, "to_nm": 900, "points": 901}}}}"#
    );
    let (nm, t, warnings) = spectrum_of(&doc);
    assert!(warnings.is_empty(), "{warnings:?}");
    let (stokes, dop) = stokes_of(&doc);
    assert_eq!(stokes.len(), nm.len());
    let mut worst = 0.0f64;
    let mut s3_seen = [false, false];
    for (i, l) in nm.iter().enumerate() {
        let s = stokes[i].unwrap();
        // The transmission is S0, the same number.
        assert_eq!(t[i], Some(s[0]), "at {l} nm");
        let g = 2.0 * PI * quartz_dn(*l) * d_mm * 1e6 / l;
        let want = [1.0, g.cos(), 0.0, -g.sin()];
        for k in 0..4 {
            worst = worst.max((s[k] - want[k]).abs());
        }
        assert!(
            (dop[i].unwrap() - 1.0).abs() < 1e-12,
            "degree of polarization {:?} at {l} nm",
            dop[i]
        );
        s3_seen[usize::from(s[3] > 0.5)] |= s[3].abs() > 0.5;
    }
    // The exact trace and the closed form agree to rounding (Γ ≈ 30-40 rad).
    assert!(
        worst < 1e-9,
        "largest difference {worst:.2e} (Ghosh 1999 indices, closed form above)"
    );
    assert_eq!(s3_seen, [true, true], "both handednesses occur over the range");
}

#[test]
fn a_displacer_s_two_spots_add_as_powers_not_as_fields() {
    // A calcite displacer (axis at 45° in the x–z plane) parts light linear at α into an e-spot
    // polarized along x with power cos²α and an o-spot along y with sin²α (lossless faces;
    // Jones: the projections of (cos α, sin α) onto x and y, written here). Spots at different
    // places add incoherently: S = (1, cos 2α, 0, 0), degree of polarization |cos 2α|, where the
    // coherent sum would have kept the input's S2 = sin 2α. At 45° the forward light is
    // unpolarized as a detector taking in both spots sees it.
    for alpha_deg in [45.0f64, 30.0, -70.0] {
        let doc = format!(
            r#"{{"version": 2, "wavelength_nm": 600, "beam": {{"diameter_mm": 0.02, "polarization": {{"kind": "linear", "azimuth_deg": {alpha_deg}}}}},
            "elements": [{{"kind": "crystal", "material": "calcite", "thickness_mm": 1, "axis": {{"tilt_deg": 45, "azimuth_deg": 0}}}}],
            "spectrum": {{"from_nm": 500, "to_nm": 800, "points": 7}}}}"#
        );
        let sc = Scenario::from_json_str(&doc).unwrap();
        let r = trace_scenario(&sc).unwrap();
        assert_eq!(r.spots.len(), 2, "two spots at {alpha_deg}°");
        assert!(coincident_stokes(&sc.resolve().unwrap().0).is_none());
        let a = alpha_deg.to_radians();
        let (ex, ey) = (a.cos(), a.sin());
        let e_spot = [ex * ex, ex * ex, 0.0, 0.0];
        let o_spot = [ey * ey, -ey * ey, 0.0, 0.0];
        let want: [f64; 4] = std::array::from_fn(|k| e_spot[k] + o_spot[k]);
        let (stokes, dop) = stokes_of(&doc);
        for (s, p) in stokes.iter().zip(&dop) {
            let s = s.unwrap();
            for k in 0..4 {
                assert!((s[k] - want[k]).abs() < 1e-12, "{alpha_deg}°: {s:?} against {want:?}");
            }
            let p_want = (2.0 * a).cos().abs();
            assert!(
                (p.unwrap() - p_want).abs() < 1e-12,
                "{alpha_deg}°: degree {p:?} against {p_want}"
            );
        }
    }
}

#[test]
fn one_stage_between_parallel_and_crossed_polarizers_is_cos_and_sin_squared() {
    // Textbook (e.g. Born & Wolf §15.4.4, from memory): a plate of retardance Γ at 45° between
    // parallel polarizers transmits cos²(Γ/2), between crossed ones sin²(Γ/2), Γ = 2πΔn·d/λ.
    let d_mm = 2.0;
    for (last, f) in [(0.0, f64::cos as fn(f64) -> f64), (90.0, f64::sin)] {
        let doc = filter(&[d_mm], last, r#"{"from_nm": 500, "to_nm": 700, "points": 401}"#);
        let (nm, t, warnings) = spectrum_of(&doc);
        assert_eq!(nm.len(), 401);
        assert_eq!((nm[0], nm[400]), (500.0, 700.0));
        assert!(warnings.is_empty(), "{warnings:?}");
        let mut worst = 0.0f64;
        for (l, t) in nm.iter().zip(&t) {
            let g = 2.0 * PI * quartz_dn(*l) * d_mm * 1e6 / l;
            worst = worst.max((t.unwrap() - f(g / 2.0).powi(2)).abs());
        }
        // The exact trace and the closed form agree to rounding (retardance ≈ 200 rad).
        assert!(worst < 1e-9, "largest difference {worst:.2e}");
    }
}

#[test]
fn a_stage_doubling_filter_is_the_product_of_its_stages() {
    // Stages of thickness d, 2d, 4d between parallel polarizers: T = Π cos²(πΔn·d_k/λ) (the
    // product formula of the stage-doubling filter, textbook; Yariv & Yeh, Optical Waves in
    // Crystals §5.2, from memory).
    let d = 1.5;
    let doc = filter(
        &[d, 2.0 * d, 4.0 * d],
        0.0,
        r#"{"from_nm": 600, "to_nm": 620, "points": 2000}"#,
    );
    let (nm, t, _) = spectrum_of(&doc);
    let mut worst = 0.0f64;
    for (l, t) in nm.iter().zip(&t) {
        let want: f64 = [d, 2.0 * d, 4.0 * d]
            .iter()
            .map(|dk| (PI * quartz_dn(*l) * dk * 1e6 / l).cos().powi(2))
            .product();
        worst = worst.max((t.unwrap() - want).abs());
    }
    assert!(worst < 1e-9, "largest difference {worst:.2e}");
}

#[test]
fn each_point_is_the_trace_at_that_wavelength_in_the_scenarios_basis() {
    for basis in ["vacuum", "air"] {
        let doc = filter(&[0.7], 30.0, r#"{"from_nm": 450, "to_nm": 650, "points": 5}"#).replacen(
            "\"version\": 2,",
            &format!("\"version\": 2, \"wavelength_in\": \"{basis}\","),
            1,
        );
        let (nm, t, _) = spectrum_of(&doc);
        for (l, t) in nm.iter().zip(&t) {
            let mut single: Value = serde_json::from_str(&doc).unwrap();
            single.as_object_mut().unwrap().remove("spectrum");
            single["wavelength_nm"] = (*l).into();
            let r = trace_scenario(&Scenario::from_json(&single).unwrap()).unwrap();
            // The point by the set-up's matrix (every ray leaves from one point), the single
            // trace by its spots: one sum taken in two orders.
            assert!(
                (t.unwrap() - r.total_power).abs() <= 2e-15,
                "{basis} at {l} nm: {} against {}",
                t.unwrap(),
                r.total_power
            );
        }
    }
}

#[test]
fn bad_ranges_are_named_and_the_range_survives_the_round_trip() {
    let cases = [
        (r#"{"from_nm": 500, "to_nm": 600, "points": 1}"#, "spectrum.points"),
        (r#"{"from_nm": 500, "to_nm": 600, "points": 2.5}"#, "spectrum.points"),
        (r#"{"from_nm": 500, "to_nm": 600, "points": 20001}"#, "spectrum.points"),
        (r#"{"from_nm": 500, "to_nm": 600}"#, "spectrum.points"),
        (r#"{"from_nm": 500, "to_nm": 500, "points": 3}"#, "spectrum.to_nm"),
        (r#"{"from_nm": 0, "to_nm": 500, "points": 3}"#, "spectrum.from_nm"),
        (
            r#"{"from_nm": 400, "to_nm": 500, "points": 3, "step": 1}"#,
            "spectrum.step",
        ),
        (r#"[400, 500]"#, "spectrum"),
    ];
    for (range, field) in cases {
        let e = Scenario::from_json_str(&filter(&[1.0], 0.0, range)).expect_err(range);
        assert_eq!(e.field, field, "{range}: {}", e.message);
    }
    // A falling range is allowed: wavelengths are listed as asked.
    let sc = Scenario::from_json_str(&filter(&[1.0], 0.0, r#"{"from_nm": 700, "to_nm": 500, "points": 3}"#)).unwrap();
    assert_eq!(Scenario::from_json(&sc.to_json()).unwrap(), sc);
    assert_eq!(sc.to_json()["spectrum"]["points"], 3);
    let (nm, _, _) = spectrum_of(&sc.to_json().to_string());
    assert_eq!(nm, [700.0, 600.0, 500.0]);
}

#[test]
fn wavelengths_a_formula_cannot_give_are_null_with_one_warning() {
    // Quartz's ultraviolet resonance (Ghosh: λ² = 0.0100586 µm², about 100.3 nm) lies inside
    // 60-200 nm: there n² ≤ 0 or the pole is hit, and those points cannot be traced.
    let (nm, t, warnings) = spectrum_of(&filter(&[0.1], 0.0, r#"{"from_nm": 60, "to_nm": 200, "points": 15}"#));
    let missing = t.iter().filter(|x| x.is_none()).count();
    assert!(missing > 0 && missing < nm.len(), "{t:?}");
    let w: Vec<&String> = warnings.iter().filter(|w| w.starts_with("spectrum:")).collect();
    assert_eq!(w.len(), 1, "{warnings:?}");
    assert!(w[0].contains(&format!("{missing} of 15")), "{}", w[0]);
}

#[test]
fn a_long_range_split_over_threads_gives_each_points_own_trace() {
    // 300 points: traced on several threads natively; every point must still be its own trace.
    let doc = filter(&[0.9, 1.8], 0.0, r#"{"from_nm": 480, "to_nm": 720, "points": 300}"#);
    let (nm, t, warnings) = spectrum_of(&doc);
    assert!(warnings.is_empty(), "{warnings:?}");
    for i in [0, 1, 149, 150, 151, 298, 299] {
        let mut single: Value = serde_json::from_str(&doc).unwrap();
        single.as_object_mut().unwrap().remove("spectrum");
        single["wavelength_nm"] = nm[i].into();
        let r = trace_scenario(&Scenario::from_json(&single).unwrap()).unwrap();
        // The same sum in two orders (see above); a point of another wavelength is far off.
        assert!(
            (t[i].unwrap() - r.total_power).abs() <= 2e-15,
            "point {i} at {} nm",
            nm[i]
        );
    }
}

#[test]
fn a_spectrum_that_would_trace_too_many_rays_is_refused_on_its_points() {
    // Ten splitting plates follow 1024 rays at each wavelength: 2 000 points would trace 2 048 000
    // rays, past the million a spectrum may trace; the message says how many points fit.
    let thick: Vec<f64> = (0..10).map(|k| 0.5 + 0.1 * f64::from(k)).collect();
    let doc = filter(&thick, 0.0, r#"{"from_nm": 500, "to_nm": 700, "points": 2000}"#);
    let e = trace_scenario(&Scenario::from_json_str(&doc).unwrap()).unwrap_err();
    assert_eq!(e.field, "spectrum.points");
    assert!(
        e.message.contains("1024 rays") && e.message.contains("at most 976 points") && !e.message.contains("  "),
        "{}",
        e.message
    );
    let fits = doc.replace("\"points\": 2000", "\"points\": 976");
    assert!(trace_scenario(&Scenario::from_json_str(&fits).unwrap()).is_ok());
}

/// A spectrum's point is the whole trace's forward power at that wavelength, whichever way it is
/// computed: by the set-up's matrix where every ray leaves from one point (a filter at normal
/// incidence, a c-cut plate, a cell behind a plate, uncoated faces with partly polarized light),
/// or by the trace and its spots where the rays part (a displacer, a filter lit obliquely), which
/// `coincident_stokes` declines; and so is its Stokes vector, the sum of the whole trace's spots'. The trace enumerates every path and groups their beams into
/// spots (`optics::parallel`, `optics::spots`); the matrix multiplies one 2×2 per element: two
/// computations that share only the per-face solve.
#[test]
fn every_point_is_the_whole_trace_s_power_whether_or_not_the_rays_coincide() {
    let quartz = |t: f64, tilt: f64, az: f64| {
        format!(
            r#"{{"kind": "crystal", "material": "quartz", "optical_activity": false, "thickness_mm": {t}, "axis": {{"tilt_deg": {tilt}, "azimuth_deg": {az}}}}}"#
        )
    };
    let pol = |a: f64| format!(r#"{{"kind": "polarizer", "transmission_axis_deg": {a}}}"#);
    let doc = |elements: Vec<String>, incidence: &str| {
        format!(
            r#"{{"version": 2, "wavelength_nm": 600, "beam": {{"diameter_mm": 1{incidence}, "polarization": {{"kind": "linear", "azimuth_deg": 10}}}},
            "elements": [{}]}}"#,
            elements.join(", ")
        )
    };
    let cell = r#"{"kind": "lc_cell", "thickness_um": 6, "lc": "5cb", "rubbing_azimuth_deg": 30, "voltage_v": 1.5}"#;
    let cases: Vec<(&str, String, bool)> = vec![
        ("filter", doc(vec![pol(0.0), quartz(1.0, 90.0, 45.0), pol(0.0), quartz(2.0, 90.0, 45.0), pol(90.0)], ""), true),
        ("c-cut plate", doc(vec![pol(0.0), quartz(3.0, 0.0, 0.0), pol(90.0)], ""), true),
        ("cell behind a plate", doc(vec![quartz(0.5, 90.0, 20.0), cell.to_string(), pol(90.0)], ""), true),
        (
            "uncoated, partly polarized",
            format!(
                r#"{{"version": 2, "wavelength_nm": 600, "interface_losses": "uncoated", "beam": {{"polarization": {{"kind": "stokes", "stokes": [1, 0.3, 0.2, 0.1]}}}},
                "elements": [{}, {}, {}]}}"#,
                quartz(1.3, 90.0, 30.0),
                quartz(0.7, 90.0, -15.0),
                pol(60.0)
            ),
            true,
        ),
        ("displacer", doc(vec![r#"{"kind": "crystal", "material": "calcite", "thickness_mm": 1, "axis": {"tilt_deg": 45, "azimuth_deg": 0}}"#.to_string(), pol(45.0)], ""), false),
        (
            "filter lit at 8°",
            doc(vec![pol(0.0), quartz(1.0, 90.0, 45.0), pol(0.0)], r#", "incidence": {"polar_deg": 8, "azimuth_deg": 30}"#),
            false,
        ),
    ];
    for (name, d, coincide) in cases {
        let sc = Scenario::from_json_str(&d).unwrap_or_else(|e| panic!("{name}: {e:?}"));
        let (stack, _) = sc.resolve().unwrap();
        assert_eq!(coincident_stokes(&stack).is_some(), coincide, "{name}");
        let with_spectrum = d.replacen('{', r#"{"spectrum": {"from_nm": 590, "to_nm": 610, "points": 5},"#, 1);
        let (nm, t, _) = spectrum_of(&with_spectrum);
        let (stokes, _) = stokes_of(&with_spectrum);
        for ((l, t), s) in nm.iter().zip(&t).zip(&stokes) {
            let at = d.replacen("\"wavelength_nm\": 600", &format!("\"wavelength_nm\": {l}"), 1);
            let r = serde_json::to_value(trace_scenario(&Scenario::from_json_str(&at).unwrap()).unwrap()).unwrap();
            let whole = r["total_power"].as_f64().unwrap();
            assert!(
                (t.unwrap() - whole).abs() < 1e-13,
                "{name} at {l} nm: {} against {whole}",
                t.unwrap()
            );
            let spots = r["spots"].as_array().unwrap();
            let summed: [f64; 4] =
                std::array::from_fn(|k| spots.iter().map(|p| p["stokes"][k].as_f64().unwrap()).sum());
            let s = s.unwrap();
            for k in 0..4 {
                assert!(
                    (s[k] - summed[k]).abs() < 1e-12,
                    "{name} at {l} nm: Stokes {s:?} against the spots' {summed:?}"
                );
            }
        }
    }
}

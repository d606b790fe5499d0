//! Invariants over generated scenarios: power, unitarity, physical Stokes vectors, rotation
//! covariance, and no panic or NaN for any input, valid or not.

mod common;
use common::near;
use doublespar::Scenario;
use doublespar::{ElementReport, TraceResult, trace_scenario as trace};
use proptest::prelude::*;

/// An angle generator that favours the near-degenerate values: exactly 0, 90, 180, and a hair
/// away from them.
fn tilt() -> impl Strategy<Value = f64> {
    prop_oneof![
        3 => 0.0f64..180.0,
        1 => Just(0.0),
        1 => Just(90.0),
        1 => Just(180.0),
        1 => (-1e-6f64..1e-6).prop_map(|d| 90.0 + d),
        1 => 0.0f64..1e-6,
    ]
}

fn polar() -> impl Strategy<Value = f64> {
    prop_oneof![3 => -80.0f64..80.0, 1 => Just(0.0), 1 => 85.0f64..89.9]
}

#[derive(Debug, Clone)]
struct Plate {
    medium: String,
    thickness: f64,
    tilt: f64,
    az: f64,
    gap: f64,
}

fn plate() -> impl Strategy<Value = Plate> {
    let medium = prop_oneof![
        proptest::sample::select(doublespar::material_keys()).prop_map(|k| format!(r#""material": "{k}""#)),
        (1.3f64..2.9, -0.3f64..0.3).prop_map(|(no, d)| format!(r#""no": {no}, "ne": {}"#, (no + d).max(1.0))),
        (1.3f64..2.9, -1e-6f64..1e-6).prop_map(|(no, d)| format!(r#""no": {no}, "ne": {}"#, no + d)),
    ];
    (
        medium,
        0.001f64..50.0,
        tilt(),
        -180.0f64..180.0,
        prop_oneof![Just(0.0), 0.0f64..20.0],
    )
        .prop_map(|(medium, thickness, tilt, az, gap)| Plate {
            medium,
            thickness,
            tilt,
            az,
            gap,
        })
}

#[allow(clippy::too_many_arguments)] // a test helper mirroring the document's fields
fn scenario_doc(
    plates: &[Plate],
    wl: f64,
    n_out: f64,
    polar: f64,
    paz: f64,
    pol: &str,
    losses: &str,
    extra: &str,
) -> String {
    let els: Vec<String> = plates
        .iter()
        .map(|p| {
            format!(
                r#"{{"kind": "crystal", {}, "thickness_mm": {}, "axis": {{"tilt_deg": {}, "azimuth_deg": {}}}, "gap_mm": {}}}"#,
                p.medium, p.thickness, p.tilt, p.az, p.gap
            )
        })
        .collect();
    let mut all = els.join(", ");
    if !extra.is_empty() {
        all = format!("{all}, {extra}");
    }
    format!(
        r#"{{"wavelength_nm": {wl}, "outside_index": {n_out}, "interface_losses": "{losses}",
            "beam": {{"diameter_mm": 1, "incidence": {{"polar_deg": {polar}, "azimuth_deg": {paz}}}, "polarization": {pol}}},
            "elements": [{all}]}}"#
    )
}

fn polarization() -> impl Strategy<Value = String> {
    prop_oneof![
        (-180.0f64..180.0).prop_map(|a| format!(r#"{{"kind": "linear", "azimuth_deg": {a}}}"#)),
        (-90.0f64..90.0, -45.0f64..45.0)
            .prop_map(|(a, c)| format!(r#"{{"kind": "elliptical", "azimuth_deg": {a}, "ellipticity_deg": {c}}}"#)),
        Just(r#"{"kind": "circular", "handedness": "left"}"#.to_string()),
        Just(r#"{"kind": "unpolarized"}"#.to_string()),
        (0.0f64..1.0, -1.0f64..1.0, -1.0f64..1.0, -1.0f64..1.0).prop_map(|(p, a, b, c)| {
            let n = (a * a + b * b + c * c).sqrt().max(1e-9);
            format!(
                r#"{{"kind": "stokes", "stokes": [2, {}, {}, {}]}}"#,
                2.0 * p * a / n,
                2.0 * p * b / n,
                2.0 * p * c / n
            )
        }),
    ]
}

/// Every number in the result is finite, every Stokes vector physical, Jones agrees with Stokes.
fn check_physical(r: &TraceResult) {
    let text = serde_json::to_string(r).unwrap();
    assert!(!text.contains("null") || !text.contains("NaN"));
    for ray in &r.rays {
        let s = ray.stokes;
        assert!(s.iter().all(|x| x.is_finite()), "{s:?}");
        let pol = (s[1] * s[1] + s[2] * s[2] + s[3] * s[3]).sqrt();
        assert!(
            s[0] >= -1e-15 && pol <= s[0] * (1.0 + 1e-9) + 1e-15,
            "unphysical Stokes {s:?}"
        );
        if let Some(j) = ray.jones {
            let jv = doublespar::Jones::new(
                num_complex::Complex64::new(j[0][0], j[0][1]),
                num_complex::Complex64::new(j[1][0], j[1][1]),
            );
            let sj = doublespar::jones_stokes(&jv);
            for k in 0..4 {
                near(
                    sj[k],
                    s[k],
                    1e-12,
                    &format!("Stokes component {k} from Jones {sj:?}, against the traced {s:?}"),
                );
            }
        }
        assert!(ray.exit_position_mm.iter().all(|x| x.is_finite()));
        assert!(ray.phase_rad.is_finite());
    }
}

proptest! {
    #![proptest_config(ProptestConfig {
        // 400 cases by default; CI runs them at scale with PROPTEST_CASES (scripts/test.sh).
        cases: std::env::var("PROPTEST_CASES").ok().and_then(|v| v.parse().ok()).unwrap_or(400), ..ProptestConfig::default() })]

    /// Faces at any angle (contract version 2): for generated wedge pairs, tilted and mounted
    /// plates, air, cement and optical contacts, incidences up to grazing, the power of the rays
    /// that leave, the rejected rays and the reflected light add to 1 (nothing absorbs); every
    /// number is finite; a document the contract refuses names its field.
    #[test]
    fn placed_faces_account_for_every_watt(
        (t1, t2, a1, a2) in (0.0f64..60.0, 0.0f64..60.0, -180.0f64..180.0, -180.0f64..180.0),
        (front, back, mount) in (0.0f64..45.0, 0.0f64..45.0, 0.0f64..30.0),
        (contact, uncoated) in (0usize..3, any::<bool>()),
        polar in prop_oneof![3 => -40.0f64..40.0, 1 => Just(0.0), 1 => 80.0f64..89.9],
        paz in -180.0f64..180.0,
        pol in polarization(),
        medium in proptest::sample::select(vec!["calcite", "quartz", "yvo4", "rutile"]),
    ) {
        let contact = ["", r#", "contact": "cement", "cement_index": 1.5"#, r#", "contact": "optical""#][contact];
        let doc = format!(
            r#"{{"version": 2, "wavelength_nm": 700, "interface_losses": "{}", "screen_mm": 20,
                "beam": {{"incidence": {{"polar_deg": {polar}, "azimuth_deg": {paz}}}, "polarization": {pol}}},
                "elements": [
                  {{"kind": "crystal", "material": "{medium}", "thickness_mm": 6, "axis": {{"tilt_deg": {t1}, "azimuth_deg": {a1}}},
                    "aperture_mm": 6, "faces": {{"front": {{"tilt_deg": {front}}}, "back": {{"tilt_deg": {back}, "azimuth_deg": 30}}}}}},
                  {{"kind": "crystal", "material": "{medium}", "thickness_mm": 6, "axis": {{"tilt_deg": {t2}, "azimuth_deg": {a2}}},
                    "aperture_mm": 6, "faces": {{"front": {{"tilt_deg": {back}, "azimuth_deg": 30}}}}{contact}}},
                  {{"kind": "crystal", "material": "{medium}", "thickness_mm": 1, "axis": {{"tilt_deg": 90}}, "gap_mm": 5,
                    "mount": {{"tilt_deg": {mount}, "azimuth_deg": 60}}}}]}}"#,
            if uncoated { "uncoated" } else { "ideal" }
        );
        let s = match Scenario::from_json_str(&doc) {
            Ok(s) => s,
            Err(e) => {
                prop_assert!(e.field.starts_with("elements["), "{}: {}", e.field, e.message);
                return Ok(());
            }
        };
        let Ok(r) = trace(&s) else { return Ok(()) };
        let rays: f64 = r.rays.iter().map(|x| x.power).sum();
        let rejected: f64 = r.rejected.iter().map(|x| x.power).sum();
        let reflected: f64 = r
            .elements
            .iter()
            .map(|e| match e {
                ElementReport::Crystal { reflected_power, .. } => *reflected_power,
                _ => 0.0,
            })
            .sum();
        prop_assert!((rays + rejected + reflected - 1.0).abs() < 1e-9, "{rays} + {rejected} + {reflected}");
        for ray in &r.rays {
            prop_assert!(ray.power.is_finite() && ray.deviation_deg.is_finite());
            prop_assert!(ray.screen_position_mm.iter().chain(&ray.exit_point_mm).chain(&ray.direction).all(|x| x.is_finite()));
        }
        for x in &r.rejected {
            prop_assert!(x.power.is_finite() && x.power >= 0.0);
            prop_assert!(x.point_mm.iter().chain(&x.direction).all(|v| v.is_finite()));
        }
    }

    #[test]
    fn ideal_stacks_conserve_power(
        plates in prop::collection::vec(plate(), 1..4),
        wl in 450.0f64..1500.0,
        n_out in 1.0f64..1.2,
        polar in polar(),
        paz in -180.0f64..180.0,
        pol in polarization(),
    ) {
        let doc = scenario_doc(&plates, wl, n_out, polar, paz, &pol, "ideal", "");
        let s = Scenario::from_json_str(&doc).unwrap();
        let Ok(r) = trace(&s) else { return Ok(()) }; // a formula that breaks down is an error, tested elsewhere
        check_physical(&r);
        let any_evanescent = r.elements.iter().any(|e| matches!(e, ElementReport::Crystal { separation_mm: None, .. }));
        let ray_sum: f64 = r.rays.iter().map(|x| x.power).sum();
        if !any_evanescent {
            prop_assert!((ray_sum - 1.0).abs() < 1e-10, "ray powers sum to {}", ray_sum);
        }
        prop_assert!(ray_sum <= 1.0 + 1e-10);
    }

    #[test]
    fn uncoated_stacks_balance_transmitted_and_reflected(
        plates in prop::collection::vec(plate(), 1..3),
        polar in polar(),
        paz in -180.0f64..180.0,
        pol in polarization(),
    ) {
        let doc = scenario_doc(&plates, 800.0, 1.0, polar, paz, &pol, "uncoated", "");
        let Ok(r) = trace(&Scenario::from_json_str(&doc).unwrap()) else { return Ok(()) };
        check_physical(&r);
        let reflected: f64 = r.elements.iter().map(|e| match e { ElementReport::Crystal { reflected_power, .. } => *reflected_power, _ => 0.0 }).sum();
        let out: f64 = r.rays.iter().map(|x| x.power).sum();
        let evanescent = r.elements.iter().any(|e| matches!(e, ElementReport::Crystal { separation_mm: None, .. }));
        if !evanescent {
            prop_assert!((out + reflected - 1.0).abs() < 1e-10, "out {} + reflected {} ≠ 1", out, reflected);
        }
    }

    #[test]
    fn results_turn_with_the_axis_azimuth(
        plates in prop::collection::vec(plate(), 1..3),
        polar in -60.0f64..60.0,
        pol_az in -90.0f64..90.0,
        alpha in -180.0f64..180.0,
    ) {
        // Turning the whole set-up (axes, plane of incidence, input polarization) about z by α
        // turns every exit point by α and leaves powers and retardances unchanged.
        let pol = |a: f64| format!(r#"{{"kind": "linear", "azimuth_deg": {a}}}"#);
        let base = scenario_doc(&plates, 1000.0, 1.0, polar, 10.0, &pol(pol_az), "ideal", "");
        let turned: Vec<Plate> = plates.iter().map(|p| Plate { az: p.az + alpha, ..p.clone() }).collect();
        let rot = scenario_doc(&turned, 1000.0, 1.0, polar, 10.0 + alpha, &pol(pol_az + alpha), "ideal", "");
        let (Ok(a), Ok(b)) = (trace(&Scenario::from_json_str(&base).unwrap()), trace(&Scenario::from_json_str(&rot).unwrap())) else { return Ok(()) };
        prop_assert_eq!(a.rays.len(), b.rays.len());
        let (s, c) = alpha.to_radians().sin_cos();
        for (ra, rb) in a.rays.iter().zip(b.rays.iter()) {
            prop_assert_eq!(&ra.label, &rb.label);
            let [x, y] = ra.exit_position_mm;
            let scale = 1.0 + x.abs() + y.abs();
            prop_assert!((rb.exit_position_mm[0] - (c * x - s * y)).abs() < 1e-9 * scale);
            prop_assert!((rb.exit_position_mm[1] - (s * x + c * y)).abs() < 1e-9 * scale);
            prop_assert!((ra.power - rb.power).abs() < 1e-9, "power {} vs {}", ra.power, rb.power);
        }
    }

    #[test]
    fn lossless_retarders_are_unitary(g in -20.0f64..20.0, th in -4.0f64..4.0) {
        let m = doublespar::retarder_matrix(g, th);
        prop_assert!((m.adjoint() * m - doublespar::JonesMatrix::identity()).norm() < 1e-13);
    }

    #[test]
    fn any_document_gives_a_result_or_a_named_error(doc in any_json(), ) {
        // No panic and no NaN: whatever comes in, the answer is a result or an error.
        match Scenario::from_json_str(&doc).and_then(|s| trace(&s)) {
            Ok(r) => check_physical(&r),
            Err(e) => prop_assert!(!e.message.is_empty()),
        }
    }

    #[test]
    fn wild_numbers_in_valid_shapes_never_panic(
        wl in prop_oneof![Just(f64::MIN_POSITIVE), Just(1.0), 1.0f64..1e6, Just(1e300), Just(-1.0), Just(0.0)],
        l in prop_oneof![Just(1e-300), 1e-9f64..1e4, Just(1e308), Just(-0.0)],
        tilt in prop_oneof![tilt(), Just(-1.0), Just(1e20)],
        polar in prop_oneof![polar(), Just(89.999999999), Just(-89.999999999), Just(90.0)],
        n in prop_oneof![Just(1.0), 1.0f64..10.0, Just(0.5), Just(11.0)],
        n_out in prop_oneof![Just(1.0), 1.0f64..5.0],
        key in proptest::sample::select(doublespar::material_keys()),
    ) {
        for medium in [format!(r#""material": "{key}""#), format!(r#""no": {n}, "ne": 1.5"#)] {
            let plates = [Plate { medium, thickness: l, tilt, az: 0.0, gap: 0.0 }];
            let doc = scenario_doc(&plates, wl, n_out, polar, 0.0, r#"{"kind": "linear", "azimuth_deg": 45}"#, "uncoated", "");
            match Scenario::from_json_str(&doc).and_then(|s| trace(&s)) {
                Ok(r) => check_physical(&r),
                Err(e) => prop_assert!(!e.message.is_empty()),
            }
        }
    }
}

/// Arbitrary JSON shaped loosely like a scenario, with wrong types, unknown fields and odd values.
fn any_json() -> impl Strategy<Value = String> {
    let leaf = prop_oneof![
        Just("null".to_string()),
        Just("true".to_string()),
        any::<f64>().prop_map(|x| if x.is_finite() {
            format!("{x}")
        } else {
            "1e999".to_string()
        }),
        Just("\"calcite\"".to_string()),
        Just("\"crystal\"".to_string()),
        Just("-0".to_string()),
        Just("1e308".to_string()),
    ];
    let keys = prop_oneof![
        Just("kind"),
        Just("material"),
        Just("thickness_mm"),
        Just("axis"),
        Just("tilt_deg"),
        Just("elements"),
        Just("beam"),
        Just("polarization"),
        Just("wavelength_nm"),
        Just("no"),
        Just("ne"),
        Just("stokes"),
        Just("zzz"),
    ];
    leaf.prop_recursive(4, 40, 6, move |inner| {
        prop_oneof![
            prop::collection::vec(inner.clone(), 0..4).prop_map(|v| format!("[{}]", v.join(","))),
            prop::collection::vec((keys.clone(), inner), 0..5).prop_map(|kv| {
                let body: Vec<String> = kv.iter().map(|(k, v)| format!("\"{k}\": {v}")).collect();
                format!("{{{}}}", body.join(","))
            }),
        ]
    })
}

#[test]
fn the_same_crystal_twice_doubles_the_retardance() {
    // Cross-method: the retardance of two identical plates in contact equals that of one plate of
    // twice the thickness, at oblique incidence too.
    let one = |l: f64| {
        format!(
            r#"{{"kind": "crystal", "no": 1.6557, "ne": 1.4849, "thickness_mm": {l}, "axis": {{"tilt_deg": 63, "azimuth_deg": 25}}}}"#
        )
    };
    let doc1 = format!(
        r#"{{"beam": {{"incidence": {{"polar_deg": 17, "azimuth_deg": 40}}}}, "elements": [{}]}}"#,
        one(4.0)
    );
    let doc2 = format!(
        r#"{{"beam": {{"incidence": {{"polar_deg": 17, "azimuth_deg": 40}}}}, "elements": [{}, {}]}}"#,
        one(2.0),
        one(2.0)
    );
    let r1 = common::run(&doc1);
    let r2 = common::run(&doc2);
    let ee1 = r1.rays.iter().find(|x| x.label == "e").unwrap();
    let ee2 = r2.rays.iter().find(|x| x.label == "ee").unwrap();
    near(ee2.exit_position_mm[0], ee1.exit_position_mm[0], 1e-12, "x of e vs ee");
    near(ee2.exit_position_mm[1], ee1.exit_position_mm[1], 1e-12, "y of e vs ee");
    near(ee2.phase_rad, ee1.phase_rad, 1e-9, "phase of e vs ee");
}

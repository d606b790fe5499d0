//! The stack trace against closed forms, textbook results and facts of the trade.

mod common;
use common::{crystal, near, plate, run};
use doublespar::ElementReport;
use doublespar::Handedness;
use std::f64::consts::TAU;

const K0: f64 = TAU / 632.8e-6; // rad/mm at 632.8 nm

#[test]
fn calcite_displacer_gives_about_a_millimetre_per_ten() {
    // Common practice: a calcite beam displacer gives roughly 1 mm of separation per 10 mm of
    // length (walk-off near 6.2°, tan 6.2° ≈ 0.109).
    let r = run(
        r#"{"elements": [{"kind": "crystal", "material": "calcite", "thickness_mm": 10, "axis": {"tilt_deg": 45}}]}"#,
    );
    let (sep, _, o_w, e_w) = crystal(&r, 0);
    let sep = sep.unwrap();
    assert!((1.0..1.15).contains(&sep), "separation {sep} mm");
    near(o_w.unwrap(), 0.0, 1e-12, "o-ray has no walk-off");
    near(e_w.unwrap(), 6.2, 0.1, "e walk-off");
    // The separation is exactly L·tan ρ at normal incidence.
    near(sep, 10.0 * e_w.unwrap().to_radians().tan(), 1e-12, "L tan ρ");
    // Linear 45° input splits evenly into two orthogonal linear beams.
    assert_eq!(r.rays.len(), 2);
    for ray in &r.rays {
        near(ray.power, 0.5, 1e-14, "half the power in each ray");
        assert_eq!(ray.ellipse.handedness, Handedness::Linear);
    }
    near(r.total_power, 1.0, 1e-14, "ideal faces conserve power");
}

#[test]
fn no_walkoff_when_the_axis_is_along_or_across_the_beam() {
    for tilt in [0.0, 90.0, 180.0] {
        for az in [0.0, 37.0, -120.0] {
            let r = run(&plate(1.6557, 1.4849, 5.0, tilt, az, 0.0, 0.0, 45.0, "ideal"));
            let (sep, _, _, e_w) = crystal(&r, 0);
            near(sep.unwrap(), 0.0, 1e-13, &format!("separation at tilt {tilt}"));
            near(e_w.unwrap(), 0.0, 1e-10, &format!("walk-off at tilt {tilt}"));
        }
    }
}

#[test]
fn axis_along_the_beam_is_isotropic_and_the_rays_recombine() {
    let r = run(&plate(1.6557, 1.4849, 5.0, 0.0, 0.0, 0.0, 0.0, 30.0, "ideal"));
    let (_, ret, _, _) = crystal(&r, 0);
    near(ret.unwrap(), 0.0, 1e-9, "no retardance along the axis");
    assert_eq!(r.spots.len(), 1, "o and e leave from one point");
    near(r.spots[0].power, 1.0, 1e-13, "coherent sum is the whole beam");
    near(r.spots[0].ellipse.azimuth_deg, 30.0, 1e-9, "polarization unchanged");
}

#[test]
fn light_travels_at_c_over_n() {
    // Common practice: in a medium of index n the phase advances k0·n per unit length, i.e. the
    // phase velocity is c/n. An isotropic "crystal" (no = ne = n) at normal incidence:
    for n in [1.0, 1.5, 2.4] {
        let r = run(&plate(n, n, 3.0, 40.0, 0.0, 0.0, 0.0, 0.0, "ideal"));
        for ray in &r.rays {
            near(ray.phase_rad, K0 * n * 3.0, 1e-9 * K0 * n * 3.0, "phase = k0 n L");
        }
    }
    // The e-wave at normal incidence sees n(θ) with 1/n² = cos²θ/n_o² + sin²θ/n_e².
    let (no, ne, th) = (1.6557f64, 1.4849f64, 30f64.to_radians());
    let n_theta = 1.0 / ((th.cos() / no).powi(2) + (th.sin() / ne).powi(2)).sqrt();
    let r = run(&plate(no, ne, 2.0, 30.0, 0.0, 0.0, 0.0, 0.0, "ideal"));
    let e_ray = r.rays.iter().find(|x| x.label == "e").unwrap();
    near(
        e_ray.phase_rad,
        K0 * n_theta * 2.0,
        1e-9 * K0 * 2.0 * n_theta,
        "e phase = k0 n(θ) L",
    );
}

#[test]
fn oblique_retardance_of_an_a_cut_plate_matches_the_closed_form() {
    // Yariv & Yeh, Optical Waves in Crystals, §4.5: axis along x in the face. In the x–z plane
    // of incidence q_z,o = √(n_o² − s²), q_z,e = (n_e/n_o)√(n_o² − s²); in the y–z plane
    // q_z,e = √(n_e² − s²), with s = n_out sin θ.
    let (no, ne, l) = (1.5427f64, 1.5518f64, 1.3f64);
    for polar in [0.0f64, 5.0, 20.0, 45.0, 70.0] {
        let s = polar.to_radians().sin();
        let r = run(&plate(no, ne, l, 90.0, 0.0, polar, 0.0, 45.0, "ideal"));
        let qo = (no * no - s * s).sqrt();
        let expect = K0 * l * ((ne / no) * qo - qo);
        near(
            crystal(&r, 0).1.unwrap(),
            expect,
            1e-9 * expect.abs().max(1.0),
            &format!("x–z plane, {polar}°"),
        );
        let r = run(&plate(no, ne, l, 90.0, 0.0, polar, 90.0, 45.0, "ideal"));
        let expect = K0 * l * ((ne * ne - s * s).sqrt() - qo);
        near(
            crystal(&r, 0).1.unwrap(),
            expect,
            1e-9 * expect.abs().max(1.0),
            &format!("y–z plane, {polar}°"),
        );
    }
}

#[test]
fn a_quarter_wave_quartz_plate_turns_linear_light_circular() {
    // Common practice: a quarter-wave retarder at 45° to linear light makes it circular. Build
    // it from a-cut quartz with L = λ / (4 (n_e − n_o)) at the catalogue's indices.
    let probe = run(
        r#"{"wavelength_nm": 632.8, "elements": [{"kind": "crystal", "material": "quartz", "thickness_mm": 1, "axis": {"tilt_deg": 90}}]}"#,
    );
    let ElementReport::Crystal { no, ne, .. } = probe.elements[0] else {
        panic!()
    };
    let l = 632.8e-6 / (4.0 * (ne.unwrap() - no.unwrap()));
    let doc = format!(
        r#"{{"wavelength_nm": 632.8, "beam": {{"polarization": {{"kind": "linear", "azimuth_deg": 45}}}},
            "elements": [{{"kind": "crystal", "material": "quartz", "thickness_mm": {l}, "axis": {{"tilt_deg": 90}}}}]}}"#
    );
    let r = run(&doc);
    near(crystal(&r, 0).1.unwrap(), TAU / 4.0, 1e-12, "Γ = π/2");
    assert_eq!(r.spots.len(), 1, "no walk-off in an a-cut plate at normal incidence");
    let s = r.spots[0].stokes;
    // Quartz is positive: e (along x) is slow; the fast axis is y. Fast axis along y at +45°
    // input gives (1, −i)/√2 ∝ right-handed, S3 = +S0 (see CONVENTIONS.md worked example,
    // mirrored).
    near(s[3], 1.0, 1e-12, "S3 = +S0");
    assert_eq!(r.spots[0].ellipse.handedness, Handedness::Right);
}

#[test]
fn uncoated_faces_follow_fresnel_at_normal_incidence() {
    // Born & Wolf §1.5.3: at normal incidence each face transmits 4 n1 n2 / (n1 + n2)². The
    // o-wave sees n_o; the e-wave at tilt 90° sees n_e.
    let (no, ne) = (1.6557f64, 1.4849f64);
    let r = run(&plate(no, ne, 1.0, 90.0, 0.0, 0.0, 0.0, 45.0, "uncoated"));
    let t = |n: f64| 4.0 * n / ((1.0 + n) * (1.0 + n));
    let o = r.rays.iter().find(|x| x.label == "o").unwrap();
    let e = r.rays.iter().find(|x| x.label == "e").unwrap();
    // Input at 45°: half the power in each mode; o is polarized along y (⊥ axis along x).
    near(o.power, 0.5 * t(no) * t(no), 1e-13, "o through two faces");
    near(e.power, 0.5 * t(ne) * t(ne), 1e-13, "e through two faces");
    let ElementReport::Crystal { reflected_power, .. } = r.elements[0] else {
        panic!()
    };
    near(
        reflected_power + o.power + e.power,
        1.0,
        1e-13,
        "transmitted + reflected = incident",
    );
    assert!(r.warnings.iter().any(|w| w.contains("not traced")));
}

#[test]
fn two_displacers_and_a_half_wave_plate_recombine() {
    // Common practice: a half-wave plate at 45° between two equal displacers swaps o and e, so
    // the paths "oe" and "eo" meet again in one spot with no residual separation.
    let r = run(include_str!("../examples/recombiner.json"));
    assert_eq!(r.rays.len(), 4);
    let spot = r.spots.iter().find(|s| s.rays.len() == 2).expect("a recombined spot");
    let mut labels = spot.rays.clone();
    labels.sort();
    assert_eq!(labels, ["eo", "oe"]);
    near(spot.spread_mm, 0.0, 1e-12, "no residual separation");
    near(r.total_power, 1.0, 1e-12, "power conserved with coherent addition");
    // An ideal HWP at 45° swaps x and y exactly: all the light goes into the recombined spot.
    near(spot.power, 1.0, 1e-12, "everything recombines");
}

#[test]
fn unpolarized_light_splits_into_two_fully_polarized_halves() {
    let r = run(r#"{"beam": {"polarization": {"kind": "unpolarized"}},
        "elements": [{"kind": "crystal", "material": "calcite", "thickness_mm": 10, "axis": {"tilt_deg": 45}}]}"#);
    for ray in &r.rays {
        near(ray.power, 0.5, 1e-14, "half each");
        near(ray.degree_of_polarization, 1.0, 1e-12, "each ray fully polarized");
        assert!(ray.jones.is_none(), "no Jones vector for unpolarized input");
    }
    near(r.input.degree_of_polarization, 0.0, 0.0, "input DoP");
}

#[test]
fn evanescent_modes_are_reported_in_immersion() {
    // Immersion index 1.6 at 60°: q_t = 1.386 exceeds n_e = 1.38 of a custom crystal, so the
    // e-wave is totally reflected while the o-wave (n_o = 1.45) enters.
    let doc = r#"{"outside_index": 1.6, "beam": {"incidence": {"polar_deg": 60}},
        "elements": [{"kind": "crystal", "no": 1.45, "ne": 1.3, "thickness_mm": 1, "axis": {"tilt_deg": 90, "azimuth_deg": 90}}]}"#;
    let r = run(doc);
    let ElementReport::Crystal {
        modes, separation_mm, ..
    } = &r.elements[0]
    else {
        panic!()
    };
    let (o, e) = (&modes.first, &modes.second);
    assert_eq!(format!("{:?}", o.status), "Propagating");
    assert_eq!(format!("{:?}", e.status), "Evanescent");
    assert!(e.decay > 0.0 && separation_mm.is_none());
    assert_eq!(r.rays.len(), 1);
    assert!(r.warnings.iter().any(|w| w.contains("evanescent")));
    let text = serde_json::to_string(&r).unwrap();
    assert!(!text.contains("NaN") && !text.contains("inf"));
}

#[test]
fn ray_polylines_end_at_the_exit_points() {
    let r = run(include_str!("../examples/recombiner.json"));
    for ray in &r.rays {
        let last = ray.points_mm.last().unwrap();
        assert_eq!([last[0], last[1]], ray.exit_position_mm, "{}", ray.label);
        near(last[2], ray.exit_z_mm, 1e-12, "exit z");
        assert_eq!(ray.points_mm[0], [0.0, 0.0, 0.0], "starts on the beam axis at z = 0");
        // One point per gap or plate face crossed: z = 0, plate 1 back, gap, plate 2 front, back.
        assert_eq!(ray.points_mm.len(), 5, "{:?}", ray.points_mm);
    }
}

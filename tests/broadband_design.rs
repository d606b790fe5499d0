//! Broadband-retarder designs (`broadband-retarder`): the search's answer re-traced by the whole
//! trace of its own scenario and compared with a Jones product computed here from the catalogue's
//! cited indices (MgF2: M. J. Dodge, Applied Optics 23, 1980 (1984)); the published three-plate
//! half-wave design (S. Pancharatnam 1955) as the reference the search must match or beat; and a
//! single plate as the baseline it must beat.

use doublespar::{Scenario, solve_design_str, trace_scenario};
use num_complex::Complex64 as C;
use serde_json::{Value, json};
use std::f64::consts::PI;

mod common;
use common::{design, num};

/// (n_e − n_o) of MgF2 at `nm`, 20 °C.
fn mgf2_dn(nm: f64) -> f64 {
    common::birefringence("mgf2", "dodge-1984", nm)
}

/// The Jones vector after the answer's plates at `nm`: each plate multiplies the field component
/// along its optic axis by exp(iΓ), Γ = 2π(n_e − n_o)d/λ (CONVENTIONS: the slow mode lags).
fn through(answer: &Value, nm: f64, input: [C; 2]) -> [C; 2] {
    let mut e = input;
    for p in answer["plates"].as_array().unwrap() {
        let (d, az) = (num(p, "/thickness_mm"), num(p, "/axis_azimuth_deg").to_radians());
        let gamma = 2.0 * PI * mgf2_dn(nm) * d * 1e6 / nm;
        let (s, c) = az.sin_cos();
        let along = (c * e[0] + s * e[1]) * C::from_polar(1.0, gamma);
        let across = -s * e[0] + c * e[1];
        e = [c * along - s * across, s * along + c * across];
    }
    e
}

fn stokes(e: [C; 2]) -> [f64; 4] {
    let (x, y) = (e[0], e[1]);
    let s0 = x.norm_sqr() + y.norm_sqr();
    [
        s0,
        x.norm_sqr() - y.norm_sqr(),
        2.0 * (x * y.conj()).re,
        2.0 * (x * y.conj()).im,
    ]
}

#[test]
fn the_answer_retraced_in_full_matches_the_jones_product_of_its_plates() {
    let a = design(
        r#"{"kind": "broadband-retarder", "material": "mgf2", "plates": 3, "retardance_waves": 0.25, "band_nm": [500, 900], "generations": 200}"#,
    );
    let inputs = [
        [C::new(1.0, 0.0), C::new(0.0, 0.0)],
        [C::new(0.6, 0.0), C::new(0.8, 0.0)],
        [C::new(0.5_f64.sqrt(), 0.0), C::new(0.0, 0.5_f64.sqrt())],
    ];
    for nm in [500.0, 620.0, 700.0, 900.0] {
        for input in inputs {
            let mut doc = a["scenario"].clone();
            doc["wavelength_nm"] = json!(nm);
            doc["beam"]["polarization"] =
                json!({"kind": "jones", "jones": [[input[0].re, input[0].im], [input[1].re, input[1].im]]});
            let r = serde_json::to_value(trace_scenario(&Scenario::from_json_str(&doc.to_string()).unwrap()).unwrap())
                .unwrap();
            let spots = r["spots"].as_array().unwrap();
            assert_eq!(spots.len(), 1, "one beam leaves at normal incidence");
            let traced: Vec<f64> = spots[0]["stokes"]
                .as_array()
                .unwrap()
                .iter()
                .map(|v| v.as_f64().unwrap())
                .collect();
            let want = stokes(through(&a, nm, input));
            for k in 0..4 {
                assert!(
                    (traced[k] - want[k]).abs() < 1e-9,
                    "{nm} nm, S{k}: traced {}, product {}",
                    traced[k],
                    want[k]
                );
            }
        }
    }
    // The reported curve is the equivalent retarder of the same product: at the band's ends the
    // light polarized at 45° to the target axis leaves with |S3| = sin(2πδ).
    for (i, nm) in [(0usize, 500.0), (80, 900.0)] {
        let delta = num(&a, &format!("/curve/{i}/retardance_waves"));
        let axis = num(&a, &format!("/curve/{i}/fast_axis_deg")).to_radians();
        let rotation = num(&a, &format!("/curve/{i}/rotation_deg")).to_radians();
        // Light linear along the retarder's axis after the first half rotation stays linear;
        // at 45° to it, it leaves with |S3| = sin 2πδ.
        let at = axis + PI / 4.0 - rotation / 2.0;
        let s = stokes(through(&a, nm, [C::new(at.cos(), 0.0), C::new(at.sin(), 0.0)]));
        assert!(
            (s[3].abs() - (2.0 * PI * delta).sin()).abs() < 1e-9,
            "{nm} nm: {} against {}",
            s[3],
            (2.0 * PI * delta).sin()
        );
    }
}

#[test]
fn three_plates_beat_the_classic_design_and_a_single_plate() {
    let a = design(
        r#"{"kind": "broadband-retarder", "material": "quartz", "plates": 3, "retardance_waves": 0.5, "band_nm": [450, 800]}"#,
    );
    // The classic three-plate half-wave: equal half-wave plates at 60°, 120°, 60° for a fast axis
    // at 0°; at the band's centre it is an exact half-wave plate.
    let classic = &a["classic"];
    let t = num(classic, "/plates/0/thickness_mm");
    for (k, az) in [60.0, 120.0, 60.0].into_iter().enumerate() {
        assert_eq!(num(classic, &format!("/plates/{k}/axis_azimuth_deg")), az);
        assert!((num(classic, &format!("/plates/{k}/thickness_mm")) - t).abs() < 1e-15);
        assert!((num(classic, &format!("/plates/{k}/retardance_waves")) - 0.5).abs() < 1e-12);
    }
    // The search starts from it, so it can only do better; and both beat a single plate
    // (common practice: that is why composite retarders are made).
    let d = |v: &Value, k: &str| num(v, &format!("/departures/{k}"));
    assert!(d(&a, "distance") <= d(classic, "distance"));
    assert!(d(&a, "retardance_waves") < d(&a["single_plate"], "retardance_waves") / 3.0);
    assert!(d(classic, "retardance_waves") < d(&a["single_plate"], "retardance_waves") / 2.0);
    // A half-wave target reports no rotation (it cannot be told from a turn of the axis).
    assert!(a["departures"]["rotation_deg"].is_null());
    // Deterministic for its seed.
    let again = design(
        r#"{"kind": "broadband-retarder", "material": "quartz", "plates": 3, "retardance_waves": 0.5, "band_nm": [450, 800]}"#,
    );
    assert_eq!(a, again);
}

/// More plates, or plates of two crystals, hold at least the classic design they contain: the
/// search also starts from Pancharatnam's three half-wave plates placed on the first three plates
/// of one crystal, the others of no thickness (the same Jones product), so its answer is never
/// further from the target than the classic's. A short search (50 generations) shows it is the
/// start, not the search's luck.
#[test]
fn more_plates_or_two_crystals_never_do_worse_than_the_classic_they_contain() {
    let three = design(
        r#"{"kind": "broadband-retarder", "material": "quartz", "plates": 3, "retardance_waves": 0.5, "band_nm": [450, 800], "generations": 50}"#,
    );
    let classic = num(&three, "/classic/departures/distance");
    for doc in [
        r#"{"kind": "broadband-retarder", "material": "quartz", "plates": 5, "retardance_waves": 0.5, "band_nm": [450, 800], "generations": 50}"#,
        r#"{"kind": "broadband-retarder", "materials": ["quartz", "mgf2", "quartz", "mgf2", "quartz"], "retardance_waves": 0.5, "band_nm": [450, 800], "generations": 50}"#,
    ] {
        let a = design(doc);
        let got = num(&a, "/departures/distance");
        assert!(
            got <= classic * (1.0 + 1e-12),
            "{doc}: {got} against the classic's {classic}"
        );
        assert!(
            a.get("classic").is_none(),
            "{doc}: the classic is reported for three plates only"
        );
    }
}

/// Four plates at the default budget hold the half wave over 450–800 nm closer than three can:
/// the search first sets equal half-wave plates' azimuths (half the unknowns), starts the full
/// search from them, and finishes with a simplex. Before, four quartz plates ended at ±0.032
/// waves in 1000 generations, worse than three plates' ±0.025, in the valley of the classic
/// they contain. The answer is re-traced here from its own plates by a Jones product of the
/// cited quartz indices' birefringence (independent of the search's model) at 36 wavelengths.
#[test]
fn four_plates_beat_three_within_the_default_budget() {
    let q = |n: usize| {
        design(&format!(
            r#"{{"kind": "broadband-retarder", "material": "quartz", "plates": {n}, "retardance_waves": 0.5, "band_nm": [450, 800]}}"#
        ))
    };
    let (three, four) = (q(3), q(4));
    let dep = |v: &Value| num(v, "/departures/retardance_waves");
    assert!(dep(&four) < 0.015, "four plates: ±{}", dep(&four));
    assert!(
        dep(&four) < 0.7 * dep(&three),
        "four ±{} against three ±{}",
        dep(&four),
        dep(&three)
    );
    assert!(num(&four, "/departures/distance") < 0.2 * num(&three, "/departures/distance"));
    // Re-traced: the equivalent retardance of the four plates' product stays within the
    // reported departure (the curve's 81 points bound the worst case between them).
    let quartz_dn = |nm: f64| common::birefringence("quartz", "ghosh-1999", nm);
    for k in 0..36 {
        let nm = 450.0 + 10.0 * k as f64;
        // Product of plates: I + (e^{iΓ} − 1) a aᵀ each, a along the optic axis.
        let mut u = [
            [C::new(1.0, 0.0), C::new(0.0, 0.0)],
            [C::new(0.0, 0.0), C::new(1.0, 0.0)],
        ];
        for p in four["plates"].as_array().unwrap() {
            let (d, az) = (num(p, "/thickness_mm"), num(p, "/axis_azimuth_deg").to_radians());
            let e = C::from_polar(1.0, 2.0 * PI * quartz_dn(nm) * d * 1e6 / nm) - 1.0;
            let (s, c) = az.sin_cos();
            let m = [[1.0 + e * c * c, e * c * s], [e * c * s, 1.0 + e * s * s]];
            u = [
                [
                    m[0][0] * u[0][0] + m[0][1] * u[1][0],
                    m[0][0] * u[0][1] + m[0][1] * u[1][1],
                ],
                [
                    m[1][0] * u[0][0] + m[1][1] * u[1][0],
                    m[1][0] * u[0][1] + m[1][1] * u[1][1],
                ],
            ];
        }
        // A lossless U over √det U is [[a, b], [−b*, a*]] with, for U = Rot(ω/2)·L(δ, θ)·Rot(ω/2)
        // (Hurwitz & Jones 1941), Re a = cos ω cos(δ/2) and Re b = −sin ω cos(δ/2).
        let k = (u[0][0] * u[1][1] - u[0][1] * u[1][0]).sqrt();
        let cos_half = (u[0][0] / k).re.hypot((u[0][1] / k).re).min(1.0);
        let delta_waves = 2.0 * cos_half.acos() / (2.0 * PI);
        assert!(
            (delta_waves - 0.5).abs() <= dep(&four) + 1e-3,
            "{nm} nm: {delta_waves} waves against ±{}",
            dep(&four)
        );
    }
}

/// The search's distance of `answer` from its target, re-traced here: the mean over the 41
/// wavelengths the search weighs (the band's ends included) of 1 − |tr(T†U)|/2, U the Jones product
/// of the answer's plates with the birefringence `dn`, T the target retarder (its slow axis,
/// fast + 90°, takes 2π·`waves`).
fn retraced_distance(answer: &Value, dn: impl Fn(f64) -> f64, band: (f64, f64), waves: f64, fast_deg: f64) -> f64 {
    // A retarder: I + (e^{iΓ} − 1) a aᵀ, a along the axis that takes Γ.
    let retarder = |gamma: f64, az: f64| {
        let e = C::from_polar(1.0, gamma) - 1.0;
        let (s, c) = az.sin_cos();
        [[1.0 + e * c * c, e * c * s], [e * c * s, 1.0 + e * s * s]]
    };
    let t = retarder(2.0 * PI * waves, (fast_deg + 90.0).to_radians());
    let mut sum = 0.0;
    for k in 0..41 {
        let nm = band.0 + (band.1 - band.0) * k as f64 / 40.0;
        let mut u = retarder(0.0, 0.0);
        for p in answer["plates"].as_array().unwrap() {
            let (d, az) = (num(p, "/thickness_mm"), num(p, "/axis_azimuth_deg").to_radians());
            let m = retarder(2.0 * PI * dn(nm) * d * 1e6 / nm, az);
            u = [0, 1].map(|i| [0, 1].map(|j| m[i][0] * u[0][j] + m[i][1] * u[1][j]));
        }
        let tr: C = (0..2)
            .flat_map(|i| (0..2).map(move |j| (i, j)))
            .map(|(i, j)| t[i][j].conj() * u[i][j])
            .sum();
        sum += 1.0 - 0.5 * tr.norm();
    }
    sum / 41.0
}

/// One plate more never answers worse: the search for N plates also finishes, by the simplex,
/// the best (N − 1)-plate answer with a plate added that changes nothing (of no thickness, or one
/// plate split in two), so its distance from the target never rises with N. Before, five quartz
/// plates ended at four plates' distance and, for a quarter wave, six plates above five's. Each
/// answer is re-traced here from its own plates (quartz birefringence from the cited indices,
/// independent of the search's model) and must give the distance it reports.
#[test]
fn one_plate_more_never_answers_worse() {
    let quartz_dn = |nm: f64| common::birefringence("quartz", "ghosh-1999", nm);
    for (waves, generations) in [(0.5, 1000), (0.25, 300)] {
        let mut last = f64::INFINITY;
        for n in 3..=6 {
            let a = design(&format!(
                r#"{{"kind": "broadband-retarder", "material": "quartz", "plates": {n}, "retardance_waves": {waves}, "band_nm": [450, 800], "generations": {generations}}}"#
            ));
            let reported = num(&a, "/departures/distance");
            let retraced = retraced_distance(&a, quartz_dn, (450.0, 800.0), waves, 0.0);
            assert!(
                (retraced - reported).abs() <= 1e-3 * reported + 1e-12,
                "{waves} waves, {n} plates: re-traced {retraced} against reported {reported}"
            );
            assert!(
                reported <= last,
                "{waves} waves: {n} plates' distance {reported} above {} plates' {last}",
                n - 1
            );
            last = reported;
        }
    }
}

#[test]
fn plates_of_two_crystals_and_bad_requests() {
    let a = design(
        r#"{"kind": "broadband-retarder", "materials": ["quartz", "mgf2", "quartz"], "retardance_waves": 0.25, "band_nm": [600, 1000]}"#,
    );
    let keys: Vec<&str> = a["plates"]
        .as_array()
        .unwrap()
        .iter()
        .map(|p| p["material"].as_str().unwrap())
        .collect();
    assert_eq!(keys, ["quartz", "mgf2", "quartz"]);
    assert!(num(&a, "/departures/retardance_waves") < num(&a, "/single_plate/departures/retardance_waves"));
    for (doc, field) in [
        (
            r#"{"kind": "broadband-retarder", "material": "quartz", "retardance_waves": 0.25}"#,
            "band_nm",
        ),
        (
            r#"{"kind": "broadband-retarder", "materials": ["quartz", "glass"], "retardance_waves": 0.25, "band_nm": [500, 600]}"#,
            "materials[1]",
        ),
        (
            r#"{"kind": "broadband-retarder", "no": 1.5, "ne": 1.5, "retardance_waves": 0.25, "band_nm": [500, 600]}"#,
            "material",
        ),
    ] {
        assert_eq!(solve_design_str(doc).expect_err(doc).field, field, "{doc}");
    }
}

//! Birefringent-filter designs (`birefringent-filter`) against closed forms evaluated here, from
//! the catalogue's cited dispersion formulas and independently of the solver:
//! - the stage-doubling filter's product formula T = Π cos²(π 2ᵏ Δn d/λ) (B. Lyot 1933; Born &
//!   Wolf, Principles of Optics, §15.4.4, from memory) and its textbook width,
//!   FWHM ≈ 0.886 λ²/(2ᴺ d Δn_g), from the sinc² shape of the product near its peak;
//! - the folded filter's transmission T = [tan 2ρ cos χ sin Nχ / sin χ]², cos χ = cos 2ρ sin(Γ/2),
//!   ρ = 45°/N (I. Šolc 1953; Yariv & Yeh, Optical Waves in Crystals, §5.3, from memory);
//!
//! every point of the answer's curve being a whole trace of the answer's own scenario.

use doublespar::{Wavelength, find_uniaxial_source, solve_design_str};
use serde_json::Value;

mod common;
use common::{design, num};
use std::f64::consts::PI;

/// Δn = n_e − n_o of a catalogue crystal's default formula at `nm` (20 °C).
fn birefringence(key: &str, source: &str, nm: f64) -> f64 {
    let ix = find_uniaxial_source(key, source)
        .unwrap()
        .indices(Wavelength::from_nm(nm).unwrap())
        .unwrap()
        .indices;
    ix.ne - ix.no
}

fn curve(answer: &Value) -> Vec<[f64; 2]> {
    answer["curve"]
        .as_array()
        .unwrap()
        .iter()
        .map(|p| [p[0].as_f64().unwrap(), p[1].as_f64().unwrap()])
        .collect()
}

#[test]
fn a_stage_doubling_filter_follows_the_product_formula_and_its_width() {
    let a = design(
        r#"{"kind": "birefringent-filter", "material": "mgf2", "stages": 4, "wavelength_nm": 589.3, "bandwidth_nm": 1.0}"#,
    );
    let d = num(&a, "/plates/0/thickness_mm");
    let dn = |nm: f64| birefringence("mgf2", "dodge-1984", nm);
    let product = |nm: f64| {
        (0..4)
            .map(|k| (PI * f64::from(1 << k) * dn(nm) * d * 1e6 / nm).cos().powi(2))
            .product::<f64>()
    };
    // The thinnest plate is a whole number of waves at the centre, the others its doubles.
    let order = num(&a, "/order");
    assert!((dn(589.3) * d * 1e6 / 589.3 - order).abs() < 1e-9);
    for k in 1..4 {
        assert!((num(&a, &format!("/plates/{k}/thickness_mm")) - d * f64::from(1 << k)).abs() < 1e-15);
    }
    // Every traced point of the curve is the product formula.
    let c = curve(&a);
    assert_eq!(c.len(), 161);
    for [nm, t] in &c {
        assert!(
            (t - product(*nm)).abs() < 1e-9,
            "{nm} nm: traced {t}, product {}",
            product(*nm)
        );
    }
    assert!((num(&a, "/peak_transmission") - 1.0).abs() < 1e-12);
    // The width: half-maximum points of the product formula found here by bisection.
    let half = |from: f64, to: f64| {
        let (mut a, mut b) = (from, to);
        for _ in 0..100 {
            let m = 0.5 * (a + b);
            if product(m) > 0.5 { a = m } else { b = m }
        }
        0.5 * (a + b)
    };
    let fwhm = half(589.3, 592.0) - half(589.3, 586.6);
    assert!(
        (num(&a, "/fwhm_nm") - fwhm).abs() < 1e-9,
        "{} against {fwhm}",
        num(&a, "/fwhm_nm")
    );
    // The textbook estimate, with the group birefringence Δn_g = Δn − λ dΔn/dλ.
    let h = 0.01;
    let dn_g = dn(589.3) - 589.3 * (dn(589.3 + h) - dn(589.3 - h)) / (2.0 * h);
    let estimate = 0.886 * 589.3 * 589.3 / (16.0 * d * 1e6 * dn_g);
    assert!(
        (fwhm / estimate - 1.0).abs() < 0.02,
        "{fwhm} against the estimate {estimate}"
    );
    // The width met is the closest whole order to the 1 nm asked.
    assert!((fwhm - 1.0).abs() < 0.5 * fwhm / order, "{fwhm} nm for order {order}");
    // The neighbouring peaks transmit fully: the thinnest plate is one wave more or less there.
    for i in 0..2 {
        let nm = num(&a, &format!("/neighbour_peaks_nm/{i}"));
        assert!((product(nm) - 1.0).abs() < 1e-9, "peak at {nm} nm: {}", product(nm));
        let waves = dn(nm) * d * 1e6 / nm;
        assert!((waves - (order + if i == 0 { 1.0 } else { -1.0 })).abs() < 1e-9);
    }
}

#[test]
fn a_folded_filter_follows_the_closed_form() {
    let a = design(
        r#"{"kind": "birefringent-filter", "material": "calcite", "layout": "folded", "stages": 6, "wavelength_nm": 532, "bandwidth_nm": 3, "band_nm": [500, 565]}"#,
    );
    let d = num(&a, "/plates/0/thickness_mm");
    let rho = PI / 4.0 / 6.0;
    for k in 0..6 {
        let az = num(&a, &format!("/plates/{k}/axis_azimuth_deg"));
        assert!((az - if k % 2 == 0 { 7.5 } else { -7.5 }).abs() < 1e-12);
    }
    let dn = |nm: f64| birefringence("calcite", "ghosh-1999", nm);
    // Each plate is a half-wave plate of some order at the centre.
    let waves = dn(532.0).abs() * d * 1e6 / 532.0;
    assert!((waves - num(&a, "/order") - 0.5).abs() < 1e-9);
    let closed = |nm: f64| {
        let gamma = 2.0 * PI * dn(nm).abs() * d * 1e6 / nm;
        let chi = ((2.0 * rho).cos() * (gamma / 2.0).sin()).acos();
        ((2.0 * rho).tan() * chi.cos() * (6.0 * chi).sin() / chi.sin()).powi(2)
    };
    for [nm, t] in curve(&a) {
        assert!(
            (t - closed(nm)).abs() < 1e-9,
            "{nm} nm: traced {t}, closed form {}",
            closed(nm)
        );
    }
    assert!((num(&a, "/peak_transmission") - 1.0).abs() < 1e-12);
    // Half maximum at the edges of the width met.
    let fwhm = num(&a, "/fwhm_nm");
    assert!((fwhm - 3.0).abs() < 0.2, "{fwhm}");
    let (lo, hi) = (532.0 - 0.5 * fwhm, 532.0 + 0.5 * fwhm);
    assert!(closed(lo - 0.05) < 0.5 && closed(lo + 0.05) > 0.5);
    assert!(closed(hi - 0.05) > 0.5 && closed(hi + 0.05) < 0.5);
}

#[test]
fn impossible_bands_name_the_bandwidth_and_a_uniaxial_crystal_s_cut_the_cut() {
    for (doc, field, words) in [
        (
            r#"{"kind": "birefringent-filter", "material": "quartz", "stages": 3, "wavelength_nm": 550, "bandwidth_nm": 300}"#,
            "bandwidth_nm",
            "wider than this filter can pass",
        ),
        (
            r#"{"kind": "birefringent-filter", "material": "quartz", "stages": 2, "wavelength_nm": 550, "bandwidth_nm": 0.001}"#,
            "bandwidth_nm",
            "longer than",
        ),
        // A cut is a biaxial crystal's (tests/biaxial_filters.rs designs biaxial filters).
        (
            r#"{"kind": "birefringent-filter", "material": "quartz", "bandwidth_nm": 1, "cut": "y"}"#,
            "cut",
            "biaxial",
        ),
        (
            r#"{"kind": "birefringent-filter", "no": 1.5, "ne": 1.5, "bandwidth_nm": 1}"#,
            "ne",
            "no birefringence",
        ),
    ] {
        let e = solve_design_str(doc).expect_err(doc);
        assert_eq!(e.field, field, "{doc}: {e}");
        assert!(e.message.contains(words), "{doc}: {e}");
    }
}

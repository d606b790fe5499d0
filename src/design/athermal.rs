//! The athermal waveplate: two plates of different crystals, axes in the faces (or, for a biaxial
//! crystal, cut along a principal axis), whose retardance at the design wavelength does not
//! change with temperature to first order.
//!
//! Physics. A plate of crystal i, thickness L_i (given at 20 °C) with its axis in the faces,
//! retards by L_i g_i(T) waves at normal incidence, where g_i = (n_e − n_o)(T)·(1 + α⊥ΔT)/λ per
//! millimetre (its indices at T from the catalogue's thermo-optic data, its thickness grown by
//! its expansion across the axis: [`crate::design::waveplate`]'s Γ(T)). A biaxial plate cut
//! along principal axis c (its own `cut` in `first` or `second`, [`crate::design::principal`];
//! default the cut of largest birefringence) has g_i = (n_slow − n_fast)(T)·(1 + α_c ΔT)/λ with
//! its two in-face principal indices, its slow axis at the plate's azimuth and its thickness grown
//! by the expansion along c, the same exact plate the waveplate traces. Two plates in contact,
//! the second's axis along or across the first's (signed thickness), retard by
//! Γ(T) = L₁ g₁(T) + L₂ g₂(T). The pair is athermal at the request's `temperature_c` T₀
//! (default 20 °C) when
//!
//! ```text
//! L₁ g₁ + L₂ g₂ = Γ,      L₁ g₁′ + L₂ g₂′ = 0,      g = g(T₀), g′ = dg/dT at T₀,
//! ```
//!
//! a 2×2 linear system like the achromat's, with temperature in place of wavelength (the usual
//! way to make a retarder athermal; common practice). A negative L₂ is a crossed plate. Γ(T) is exactly
//! linear in the thicknesses, so g and g′ come from 1 mm plates (g′ by a central difference over
//! ±[`TEMPERATURE_STEP_K`]). What is left is second order: the answer gives d²Γ/dT², the band of
//! temperatures that keeps Γ within the acceptance error (bisected on the exact Γ(T)), and, for
//! comparison, the band of a zero-order plate of the first crystal alone.

use crate::contract::request::{AthermalRequest, PlateCrystal, TEMPERATURE_RANGE_C};
use crate::contract::scenario::Medium;
use crate::design::part::Part;
use crate::design::waveplate::{
    Plate, PlateCut, PlateSpec, TemperatureSensitivity, cut_of, plate_specs, stack_retardance_at,
    temperature_sensitivity, with_cuts,
};
use crate::error::Error;
use crate::precision::{SINGULAR_DETERMINANT, TEMPERATURE_STEP_K};
use serde::Serialize;
use std::f64::consts::TAU;

/// Temperatures of the answer's retardance curve, °C (a common sign-off range for instruments;
/// common practice), widened to reach [`CURVE_REACH_K`] either side of the design temperature.
const CURVE_C: (f64, f64) = (-40.0, 100.0);
/// How far the curve reaches either side of the design temperature at least, K.
const CURVE_REACH_K: f64 = 60.0;
/// Points of that curve.
const CURVE_POINTS: usize = 57;
/// Step for the second derivative, K: wide enough that rounding (10⁻¹⁵ of Γ over h²) stays far
/// below the curvature.
const CURVATURE_STEP_K: f64 = 5.0;

/// A zero-order plate of the first crystal alone, for comparison.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SinglePlate {
    /// Its material.
    pub material: String,
    /// Its thickness, mm.
    pub thickness_mm: f64,
    /// Its temperature behaviour.
    pub temperature: TemperatureSensitivity,
}

/// A solved athermal pair.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AthermalDesign {
    /// Design wavelength, nm.
    pub wavelength_nm: f64,
    /// The retardance error that bounds the temperature bands, waves.
    pub acceptance_error_waves: f64,
    /// The two plates (axis azimuth 90° = crossed).
    pub plates: Vec<PlateSpec>,
    /// Retardance at the design wavelength and temperature, waves (signed: positive when the first
    /// plate's optic axis is the slow axis).
    pub retardance_waves: f64,
    /// Its temperature behaviour: dΓ/dT (zero to rounding) and the band within the acceptance
    /// error.
    pub temperature: TemperatureSensitivity,
    /// d²Γ/dT² at the design temperature, waves per K², what limits the band.
    pub curvature_waves_per_k2: f64,
    /// Retardance against temperature [°C, waves].
    pub temperature_curve: Vec<[f64; 2]>,
    /// A zero-order plate of the first crystal alone, for comparison.
    pub single_plate: SinglePlate,
    /// A scenario with these plates, ready to load.
    pub scenario: Part,
}

/// Waves per millimetre at `t` °C of a plate of `m` cut as `cut` at azimuth 0 (a uniaxial
/// plate's optic axis, a biaxial plate's slow axis along x).
fn per_mm(m: &Medium, cut: PlateCut, nm: f64, t: f64) -> Option<f64> {
    stack_retardance_at(&[Plate::new(*m, 1.0, 0.0, cut)], nm, [0.0, 0.0], t).map(|g| g / TAU)
}

/// (g, g′) of `m` cut as `cut` at `t0` °C, or an error on `field`.
fn rate(m: &Medium, cut: PlateCut, (nm, t0): (f64, f64), field: &'static str) -> Result<(f64, f64), Error> {
    let h = TEMPERATURE_STEP_K;
    let at = |t: f64| {
        per_mm(m, cut, nm, t).ok_or_else(|| {
            Error::new(
                field,
                "this crystal's indices cannot be evaluated at the wavelength and temperatures needed",
            )
        })
    };
    Ok((at(t0)?, (at(t0 + h)? - at(t0 - h)?) / (2.0 * h)))
}

/// Solves an athermal waveplate request.
///
/// # Errors
/// `first.no` or `second.no` (`first.nx`, `second.nx`) for fixed indices, which carry no
/// thermal data; `first.cut` or `second.cut` for a biaxial cut without birefringence;
/// `first.material` or `second.material` where a crystal cannot be evaluated; `second` when
/// the two crystals' retardances change with temperature in proportion (no athermal pair).
pub fn athermal(req: &AthermalRequest) -> Result<AthermalDesign, Error> {
    for (m, plate) in [(&req.a.medium, "first"), (&req.b.medium, "second")] {
        let field = match m {
            Medium::Custom(_) => "no",
            Medium::Principal(_) => "nx",
            _ => continue,
        };
        return Err(Error::new(
            format!("{plate}.{field}"),
            "fixed indices carry no thermal data: an athermal pair needs catalogue crystals",
        ));
    }
    let (nm, t0) = (req.wavelength.nm(), req.temperature_c);
    // Each plate's cut at the design wavelength and temperature.
    let cut = |p: &PlateCrystal, plate: &'static str| {
        cut_of(&p.medium, p.cut, req.wavelength, t0).map_err(|e| match e.field.as_str() {
            "cut" => e.within(plate),
            _ => Error::new(format!("{plate}.material"), e.message),
        })
    };
    let ((bi_a, cut_a), (bi_b, cut_b)) = (cut(&req.a, "first")?, cut(&req.b, "second")?);
    let (ma, mb) = (req.a.medium, req.b.medium);
    let (g1, s1) = rate(&ma, cut_a, (nm, t0), "first.material")?;
    let (g2, s2) = rate(&mb, cut_b, (nm, t0), "second.material")?;
    let det = g1 * s2 - g2 * s1;
    if det.abs() < SINGULAR_DETERMINANT * (g1 * s2).abs().max((g2 * s1).abs()).max(1e-300) {
        return Err(Error::new(
            "second",
            "the two crystals' retardances change with temperature in proportion: no pair of thicknesses is athermal",
        ));
    }
    let f = req.retardance_waves;
    let (mut l1, mut l2) = (f * s2 / det, -f * s1 / det);
    // The first plate's axis along x: a negative first thickness turns the pair, whose
    // retardance then changes sign (the other axis is slow).
    if l1 < 0.0 {
        (l1, l2) = (-l1, -l2);
    }
    let plates = [Plate::new(ma, l1, 0.0, cut_a), Plate::signed(mb, l2, cut_b)];
    let at = |t: f64| stack_retardance_at(&plates, nm, [0.0, 0.0], t).map(|g| g / TAU);
    let no_value = || {
        Error::new(
            "second.material",
            "the pair cannot be evaluated at the temperatures needed",
        )
    };
    let g0 = at(t0).ok_or_else(no_value)?;
    let k = CURVATURE_STEP_K;
    let curvature = (at(t0 + k).ok_or_else(no_value)? + at(t0 - k).ok_or_else(no_value)? - 2.0 * g0) / (k * k);
    let temperature = temperature_sensitivity(&plates, (nm, t0), req.acceptance_error_waves).ok_or_else(no_value)?;
    let (c0, c1) = (
        CURVE_C.0.min(t0 - CURVE_REACH_K).max(TEMPERATURE_RANGE_C.0),
        CURVE_C.1.max(t0 + CURVE_REACH_K).min(TEMPERATURE_RANGE_C.1),
    );
    let temperature_curve = (0..CURVE_POINTS)
        .filter_map(|i| {
            let t = c0 + (c1 - c0) * i as f64 / (CURVE_POINTS - 1) as f64;
            at(t).map(|g| [t, g])
        })
        .collect();
    let alone = [Plate::new(ma, (f / g1).abs(), 0.0, cut_a)];
    let single_plate = SinglePlate {
        material: ma.key().to_string(),
        thickness_mm: (f / g1).abs(),
        temperature: temperature_sensitivity(&alone, (nm, t0), req.acceptance_error_waves).ok_or_else(no_value)?,
    };
    let elements = plates.iter().map(Plate::element).collect();
    Ok(AthermalDesign {
        wavelength_nm: nm,
        acceptance_error_waves: req.acceptance_error_waves,
        plates: with_cuts(plate_specs(&plates, t0), [bi_a.as_ref(), bi_b.as_ref()]),
        retardance_waves: g0,
        temperature,
        curvature_waves_per_k2: curvature,
        temperature_curve,
        single_plate,
        scenario: Part::new(req.wavelength, None, elements).at_temperature(t0),
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::contract::request::read_ok;
    use crate::contract::result::{ElementReport, trace_scenario};
    use crate::contract::scenario::Scenario;

    fn request(doc: &str) -> AthermalRequest {
        read_ok(doc, AthermalRequest::from_json)
    }

    /// The retardance of the answer's scenario traced whole at `t` °C (every plate's report).
    fn traced_waves(d: &AthermalDesign, t: f64) -> f64 {
        let mut sc: Scenario = d.scenario.scenario.clone();
        sc.temperature_c = t;
        let r = trace_scenario(&sc).unwrap();
        let first_az = d.plates[0].axis_azimuth_deg;
        r.elements
            .iter()
            .zip(&d.plates)
            .map(|(e, p)| match e {
                ElementReport::Crystal { retardance_waves, .. } => {
                    let crossed = (p.axis_azimuth_deg - first_az).abs() > 45.0;
                    if crossed {
                        -retardance_waves.unwrap()
                    } else {
                        retardance_waves.unwrap()
                    }
                }
                _ => 0.0,
            })
            .sum()
    }

    #[test]
    fn a_quartz_and_mgf2_pair_holds_its_retardance_against_temperature() {
        let d = athermal(&request(
            r#"{"first": {"material": "quartz"}, "second": {"material": "mgf2"}, "retardance_waves": 0.25, "wavelength_nm": 632.8}"#,
        ))
        .unwrap();
        // The whole trace of the answer's scenario gives the target at 20 °C (independent of the
        // solver's per-millimetre rates)...
        assert!(
            (traced_waves(&d, 20.0).abs() - 0.25).abs() < 1e-9,
            "{}",
            traced_waves(&d, 20.0)
        );
        // ... and the same to first order around it: a symmetric difference of whole traces
        // over ±1 K is of order of the curvature only.
        let slope = (traced_waves(&d, 21.0) - traced_waves(&d, 19.0)) / 2.0;
        assert!(slope.abs() < 1e-9, "{slope}");
        assert!(d.temperature.retardance_per_kelvin_waves.abs() < 1e-9);
        // Far better than a plate of either crystal alone: its band is wider than the single
        // zero-order quartz plate's.
        let width = |b: [f64; 2]| b[1] - b[0];
        assert!(width(d.temperature.band_c) >= width(d.single_plate.temperature.band_c));
        assert_eq!(d.plates.len(), 2);
    }

    #[test]
    fn fixed_indices_have_no_thermal_data_and_are_refused() {
        let e = athermal(&request(
            r#"{"first": {"material": "quartz"}, "second": {"no": 1.4, "ne": 1.41}, "retardance_waves": 0.25}"#,
        ))
        .unwrap_err();
        assert_eq!(e.field, "second.no");
    }

    #[test]
    fn one_crystal_twice_has_no_athermal_pair() {
        let e = athermal(&request(
            r#"{"first": {"material": "quartz"}, "second": {"material": "quartz"}, "retardance_waves": 0.25}"#,
        ))
        .unwrap_err();
        assert_eq!(e.field, "second");
    }
}

//! Designing at a temperature: a request's crystal evaluated at its `temperature_c`, lengths
//! grown to it, and the one report every design gives of how its figures change per kelvin.
//!
//! Physics. A part designed for T works at T: its principal indices are the catalogue's at T
//! (the thermo-optic data of `src/optics/material/thermal.rs`), and a length along the element's
//! z axis is the length made at 20 °C grown by the expansion along z,
//!
//! ```text
//! L_T = L_20 (1 + α_z (T − 20 °C)),   α_z = α∥ cos²θ + α⊥ sin²θ
//! ```
//!
//! for an optic axis at θ to z (the scenario contract's "Temperature"; the same factor as the
//! trace's). A solver finds the length the part needs at T and quotes it at 20 °C, the making
//! temperature at which the contract gives thicknesses, L_20 = L_T / (1 + α_z (T − 20 °C)); the
//! part it emits carries `temperature_c`, so that a trace of it grows L_20 back to L_T and gives
//! the design's figures at T. Fixed indices (`no`, `ne`) carry no thermal data: they hold at every
//! temperature and do not expand.
//!
//! Sensitivities. Each figure F of a designed part (its lengths fixed at 20 °C, its angles as
//! made) is recomputed at T ± h by the solver's own exact model, and
//! dF/dT = (F(T + h) − F(T − h)) / 2h with h = [`TEMPERATURE_STEP_K`]: the error is of order
//! h² F‴/6, far below the accuracy of the thermo-optic data (common practice for a central
//! difference). Every answer reports them as `temperature`: {`design_temperature_c`, `step_k`,
//! `per_kelvin`: {figure with its unit: value per kelvin}}.

use crate::contract::scenario::{Medium, PrincipalIndices};
use crate::error::Error;
use crate::optics::anisotropic::orientation;
use crate::optics::material::{Indices, REFERENCE_C};
use crate::optics::wavelength::Wavelength;
use crate::precision::TEMPERATURE_STEP_K;
use serde::Serialize;
use serde::ser::{SerializeMap, Serializer};

/// A figure of a designed part as a function of the temperature it works at, °C.
pub type Figure<'a> = Box<dyn Fn(f64) -> Option<f64> + 'a>;

/// How a design's figures change with temperature about the design temperature.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Temperature {
    /// The temperature the part is designed to work at, °C.
    pub design_temperature_c: f64,
    /// The half step of the central differences, K.
    pub step_k: f64,
    /// Each figure's change per kelvin, named by the figure and its unit (`separation_um`: µm
    /// per K); a figure that cannot be evaluated at T ± h is left out.
    pub per_kelvin: PerKelvin,
}

/// Figures' changes per kelvin, by name, written as one JSON object (a list rather than a map:
/// a design has one to three, and the answer's object orders its keys itself).
#[derive(Debug, Clone, PartialEq, Default)]
pub struct PerKelvin(pub Vec<(&'static str, f64)>);

impl Serialize for PerKelvin {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        let mut m = s.serialize_map(Some(self.0.len()))?;
        for (k, v) in &self.0 {
            m.serialize_entry(k, v)?;
        }
        m.end()
    }
}

impl Temperature {
    /// The report at `t_c` of the figures `(name, F)`, each F(T) the solver's exact model at T.
    pub fn of(t_c: f64, figures: Vec<(&'static str, Figure<'_>)>) -> Temperature {
        Temperature {
            design_temperature_c: t_c,
            step_k: TEMPERATURE_STEP_K,
            per_kelvin: PerKelvin(
                figures
                    .into_iter()
                    .filter_map(|(name, f)| per_kelvin(f, t_c).map(|d| (name, d)))
                    .collect(),
            ),
        }
    }
}

impl Temperature {
    /// The report at `t_c` of sensitivities found otherwise (a solver that differentiates its
    /// own solution implicitly); `None` values are left out.
    pub fn given(t_c: f64, figures: Vec<(&'static str, Option<f64>)>) -> Temperature {
        Temperature {
            design_temperature_c: t_c,
            step_k: TEMPERATURE_STEP_K,
            per_kelvin: PerKelvin(figures.into_iter().filter_map(|(k, v)| v.map(|v| (k, v))).collect()),
        }
    }
}

/// dF/dT at `t_c` by a central difference over ± [`TEMPERATURE_STEP_K`]; `None` where F cannot be
/// evaluated at either side.
pub fn per_kelvin(f: impl Fn(f64) -> Option<f64>, t_c: f64) -> Option<f64> {
    let h = TEMPERATURE_STEP_K;
    Some((f(t_c + h)? - f(t_c - h)?) / (2.0 * h))
}

/// n_o and n_e of a uniaxial crystal at `wavelength` and `t_c` °C.
///
/// # Errors
/// As [`Medium::principal_at`]; `material` for a biaxial crystal (the design solvers take
/// uniaxial ones, which the request readers enforce).
pub fn indices_at(medium: &Medium, wavelength: Wavelength, t_c: f64) -> Result<Indices, Error> {
    match medium.principal_at(wavelength, t_c)?.0 {
        PrincipalIndices::Uniaxial(ix) => Ok(ix),
        PrincipalIndices::Triple(_) => Err(Error::new("material", "this design takes a uniaxial crystal")),
    }
}

/// The factor 1 + α_z (T − 20 °C) by which a length along z, made at 20 °C, grows at `t_c` in a
/// plate of `medium` whose optic axis is at `tilt_deg` from z and `azimuth_deg` from x (1 for
/// fixed indices). The trace applies the same factor.
pub fn growth(medium: &Medium, tilt_deg: f64, azimuth_deg: f64, t_c: f64) -> f64 {
    growth_along_z(
        medium,
        &orientation(tilt_deg.to_radians(), azimuth_deg.to_radians(), 0.0),
        t_c,
    )
}

/// The same factor for principal axes `axes` (columns, element frame): a biaxial crystal expands
/// by the coefficient of the direction through its faces, α_z = Σ α_i (a_i·ẑ)².
pub fn growth_along_z(medium: &Medium, axes: &nalgebra::Matrix3<f64>, t_c: f64) -> f64 {
    1.0 + medium.expansion_along_z(axes) * (t_c - REFERENCE_C)
}

/// The principal indices n₁, n₂, n₃ of any crystal at `wavelength` and `t_c` °C (a uniaxial one
/// as n_o, n_o, n_e).
///
/// # Errors
/// As [`Medium::principal_at`].
pub fn principal_at(medium: &Medium, wavelength: Wavelength, t_c: f64) -> Result<[f64; 3], Error> {
    Ok(match medium.principal_at(wavelength, t_c)?.0 {
        PrincipalIndices::Uniaxial(ix) => [ix.no, ix.no, ix.ne],
        PrincipalIndices::Triple(n) => n,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::optics::material;

    #[test]
    fn growth_weighs_the_two_coefficients_by_the_axis_angle() {
        // α_z = α∥cos²θ + α⊥sin²θ (the contract's "Temperature"), from the catalogue's own pair.
        let calcite = Medium::Catalogue(material::find("calcite").unwrap());
        let [a_perp, _, a_par] = material::thermal("calcite").unwrap().expansion;
        for tilt in [0.0_f64, 30.0, 45.0, 90.0] {
            let (s, c) = tilt.to_radians().sin_cos();
            let want = 1.0 + (a_par * c * c + a_perp * s * s) * 60.0;
            let got = growth(&calcite, tilt, 20.0, 80.0);
            assert!((got - want).abs() <= 1e-15, "tilt {tilt}: {got} against {want}");
        }
        assert_eq!(growth(&calcite, 45.0, 0.0, REFERENCE_C), 1.0);
        let fixed = Medium::Custom(Indices::new(1.5, 1.6).unwrap());
        assert_eq!(growth(&fixed, 45.0, 0.0, 300.0), 1.0);
    }

    #[test]
    fn a_central_difference_of_a_quadratic_is_its_slope() {
        // (T+h)² − (T−h)² = 4hT: exact for a quadratic, whatever h.
        let d = per_kelvin(|t| Some(3.0 * t * t + t), 40.0).unwrap();
        assert!((d - 241.0).abs() < 1e-9, "{d}");
        assert_eq!(per_kelvin(|t| (t < 40.5).then_some(t), 40.0), None);
    }
}

//! The quartz-rotator request: a c-cut crystalline-quartz plate that turns linear light by a
//! given angle at a given wavelength through its optical activity.
//!
//! `rotation_deg` is signed in the ideal rotator's sense (CONVENTIONS.md, Jones basis): positive
//! turns the plane of polarization from x toward y, which a left-handed crystal does; negative is
//! a right-handed crystal (clockwise as seen looking toward the source). `handedness` forces one
//! hand, which then reaches the requested rotation modulo 180°.

use super::{band, temperature_field, wavelength_field};
use crate::contract::fields::Fields;
use crate::error::{Error, above, in_range};
use crate::numfmt::quote_text;
use crate::optics::wavelength::Wavelength;

/// The largest rotation asked, degrees (ten turns: a plate of about 190 mm at 633 nm).
pub const MAX_ROTATION_DEG: f64 = 3600.0;
/// Default tolerance on the rotation, degrees (common practice for a rotator's specification).
pub const DEFAULT_ROTATION_TOLERANCE_DEG: f64 = 0.5;
/// Default tolerance on the ellipticity angle of the output, degrees (tan 0.5° = 0.0087: an
/// extinction of about 7.6 × 10⁻⁵ behind an analyser).
pub const DEFAULT_ELLIPTICITY_TOLERANCE_DEG: f64 = 0.5;

/// A quartz-rotator request.
#[derive(Debug, Clone, PartialEq)]
pub struct RotatorRequest {
    /// The rotation wanted, degrees, positive from x toward y.
    pub rotation_deg: f64,
    /// Design wavelength.
    pub wavelength: Wavelength,
    /// The band of the rotation curve, nm, when given (default ±10 %).
    pub band_nm: Option<(f64, f64)>,
    /// `Some(true)` to force a right-handed crystal, `Some(false)` a left-handed one.
    pub right_handed: Option<bool>,
    /// The thinnest plate accepted, mm (0: none).
    pub min_thickness_mm: f64,
    /// Rotation tolerance, degrees: sets the thickness tolerance and the acceptance.
    pub rotation_tolerance_deg: f64,
    /// Ellipticity tolerance of the output, degrees: sets the acceptance.
    pub ellipticity_tolerance_deg: f64,
    /// Largest incidence searched for the acceptance, degrees.
    pub max_incidence_deg: f64,
    /// The temperature the part is designed to work at, °C (`temperature_c`, default 20):
    /// its indices are taken there and its thickness grown to it; thicknesses are quoted at 20 °C.
    pub temperature_c: f64,
}

impl RotatorRequest {
    /// Reads a request object (`"kind": "quartz-rotator"` checked by the caller).
    ///
    /// # Errors
    /// The path of the first offending field: `rotation_deg` missing, zero or beyond ±3600°,
    /// `handedness` not "right" or "left", a tolerance or limit out of its range.
    pub fn from_json(f: &mut Fields) -> Result<RotatorRequest, Error> {
        let rotation_deg = in_range(
            "rotation_deg",
            f.required_number("rotation_deg")?,
            -MAX_ROTATION_DEG,
            MAX_ROTATION_DEG,
        )?;
        if rotation_deg == 0.0 {
            return Err(Error::new(
                "rotation_deg",
                "must not be 0: a rotator turns the plane of polarization (positive from x toward y)",
            ));
        }
        let wavelength = wavelength_field(f)?;
        let band_nm = band(f, "band_nm")?;
        let right_handed = match f.string("handedness")? {
            None => None,
            Some("right") => Some(true),
            Some("left") => Some(false),
            Some(other) => {
                return Err(Error::new(
                    "handedness",
                    format!("unknown value '{}'; expected \"right\" or \"left\"", quote_text(other)),
                ));
            }
        };
        let min_thickness_mm = in_range("min_thickness_mm", f.number_or("min_thickness_mm", 0.0)?, 0.0, 1e3)?;
        let rotation_tolerance_deg = above(
            "rotation_tolerance_deg",
            f.number_or("rotation_tolerance_deg", DEFAULT_ROTATION_TOLERANCE_DEG)?,
            0.0,
            90.0,
        )?;
        let ellipticity_tolerance_deg = above(
            "ellipticity_tolerance_deg",
            f.number_or("ellipticity_tolerance_deg", DEFAULT_ELLIPTICITY_TOLERANCE_DEG)?,
            0.0,
            45.0,
        )?;
        let max_incidence_deg = in_range("max_incidence_deg", f.number_or("max_incidence_deg", 10.0)?, 0.01, 80.0)?;
        Ok(RotatorRequest {
            rotation_deg,
            wavelength,
            band_nm,
            right_handed,
            min_thickness_mm,
            rotation_tolerance_deg,
            ellipticity_tolerance_deg,
            max_incidence_deg,
            temperature_c: temperature_field(f)?,
        })
    }

    /// The band of the rotation curve, nm: the request's, or ±10 % around the wavelength.
    pub fn band(&self) -> (f64, f64) {
        super::band_or_tenth(self.wavelength, self.band_nm)
    }
}

#[cfg(test)]
mod tests {
    use super::super::first_error;
    use super::*;

    #[test]
    fn rotator_fields_name_themselves() {
        for (doc, field) in [
            (r#"{}"#, "rotation_deg"),
            (r#"{"rotation_deg": 0}"#, "rotation_deg"),
            (r#"{"rotation_deg": 4000}"#, "rotation_deg"),
            (r#"{"rotation_deg": "ninety"}"#, "rotation_deg"),
            (r#"{"rotation_deg": 45, "handedness": "up"}"#, "handedness"),
            (r#"{"rotation_deg": 45, "min_thickness_mm": -1}"#, "min_thickness_mm"),
            (
                r#"{"rotation_deg": 45, "rotation_tolerance_deg": 0}"#,
                "rotation_tolerance_deg",
            ),
            (
                r#"{"rotation_deg": 45, "ellipticity_tolerance_deg": 50}"#,
                "ellipticity_tolerance_deg",
            ),
            (r#"{"rotation_deg": 45, "max_incidence_deg": 85}"#, "max_incidence_deg"),
            (r#"{"rotation_deg": 45, "band_nm": [700, 600]}"#, "band_nm"),
            (r#"{"rotation_deg": 45, "wavelength_nm": -5}"#, "wavelength_nm"),
            (r#"{"rotation_deg": 45, "material": "calcite"}"#, "material"),
        ] {
            assert_eq!(first_error(doc, RotatorRequest::from_json).field, field, "{doc}");
        }
    }
}

//! The recombiner request: two displacers of one crystal with a half-wave plate or a rotator
//! between them, and the second displacer's mismatch against the first.

use super::{parse_medium, temperature_field, wavelength_field};
use crate::contract::fields::Fields;
use crate::contract::scenario::Medium;
use crate::error::{Error, above, in_range};
use crate::optics::uniaxial::max_walkoff_cut;
use crate::optics::wavelength::Wavelength;

/// What sits between the two displacers.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Middle {
    /// An ideal half-wave plate with its fast axis at 45° to the walk-off plane.
    HalfWave,
    /// An ideal rotator by this angle (90° swaps the polarizations).
    Rotator(f64),
}

/// A recombiner request.
#[derive(Debug, Clone, PartialEq)]
pub struct RecombinerRequest {
    /// Crystal of both displacers.
    pub medium: Medium,
    /// Wavelength.
    pub wavelength: Wavelength,
    /// Length of the first displacer, mm.
    pub length_mm: f64,
    /// Cut tilt of the first displacer (default: maximum walk-off), degrees.
    pub cut_tilt_deg: f64,
    /// Beam diameter, mm.
    pub beam_diameter_mm: f64,
    /// The middle element.
    pub middle: Middle,
    /// Length of the second displacer minus the first's, mm.
    pub length_mismatch_mm: f64,
    /// Cut tilt of the second minus the first's, degrees.
    pub tilt_mismatch_deg: f64,
    /// The temperature the part is designed to work at, °C (`temperature_c`, default 20):
    /// its indices are taken there and its thickness grown to it; thicknesses are quoted at 20 °C.
    pub temperature_c: f64,
}

impl RecombinerRequest {
    /// Reads a request object (`"kind": "recombiner"` checked by the caller).
    ///
    /// # Errors
    /// The path of the first offending field.
    pub fn from_json(f: &mut Fields) -> Result<RecombinerRequest, Error> {
        let medium = parse_medium(f)?;
        let wavelength = wavelength_field(f)?;
        let length_mm = above("length_mm", f.required_number("length_mm")?, 0.0, 1e4)?;
        let ix = medium.indices(wavelength)?;
        let default_tilt = max_walkoff_cut(ix).0.to_degrees();
        let cut_tilt_deg = in_range("cut_tilt_deg", f.number_or("cut_tilt_deg", default_tilt)?, 0.0, 180.0)?;
        let beam_diameter_mm = above("beam_diameter_mm", f.number_or("beam_diameter_mm", 1.0)?, 0.0, 1e3)?;
        let middle = match f.string("middle")? {
            None | Some("half-wave") => Middle::HalfWave,
            Some("rotator") => Middle::Rotator(in_range(
                "rotator_deg",
                f.number_or("rotator_deg", 90.0)?,
                -360.0,
                360.0,
            )?),
            Some(other) => {
                return Err(Error::new(
                    "middle",
                    format!("unknown middle element '{other}'; expected half-wave or rotator"),
                ));
            }
        };
        let _ = f.get("rotator_deg");
        // The second displacer must still be a plate: refused, not clamped, when the mismatch
        // would make its length non-positive (the range's lower end is excluded) or its tilt
        // leave 0–180°.
        let length_mismatch_mm = above(
            "length_mismatch_mm",
            f.number_or("length_mismatch_mm", 0.0)?,
            -length_mm,
            1e3,
        )?;
        let tilt_mismatch_deg = in_range(
            "tilt_mismatch_deg",
            f.number_or("tilt_mismatch_deg", 0.0)?,
            -cut_tilt_deg,
            180.0 - cut_tilt_deg,
        )?;
        Ok(RecombinerRequest {
            medium,
            wavelength,
            length_mm,
            cut_tilt_deg,
            beam_diameter_mm,
            middle,
            length_mismatch_mm,
            tilt_mismatch_deg,
            temperature_c: temperature_field(f)?,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::super::first_error;
    use super::*;

    #[test]
    fn impossible_mismatches_are_refused_not_clamped() {
        for (doc, field) in [
            (
                r#"{"material": "calcite", "length_mm": 5, "length_mismatch_mm": -5}"#,
                "length_mismatch_mm",
            ),
            (
                r#"{"material": "calcite", "length_mm": 5, "cut_tilt_deg": 45, "tilt_mismatch_deg": 140}"#,
                "tilt_mismatch_deg",
            ),
            (
                r#"{"material": "calcite", "length_mm": 5, "middle": "mirror"}"#,
                "middle",
            ),
        ] {
            assert_eq!(first_error(doc, RecombinerRequest::from_json).field, field, "{doc}");
        }
        // Ranges whose lower end is excluded say so ("above"), rather than "from 0".
        for (doc, words) in [
            (
                r#"{"material": "calcite", "length_mm": 0}"#,
                "must be above 0 mm and at most 10000 mm, got 0 mm",
            ),
            (
                r#"{"material": "calcite", "length_mm": 5, "length_mismatch_mm": -5}"#,
                "must be above \u{2212}5 mm and at most 1000 mm, got \u{2212}5 mm",
            ),
        ] {
            assert_eq!(first_error(doc, RecombinerRequest::from_json).message, words, "{doc}");
        }
    }

    #[test]
    fn the_default_cut_is_the_maximum_walkoff_cut() {
        let v = serde_json::json!({"material": "yvo4", "wavelength_nm": 1064, "length_mm": 5});
        let r = RecombinerRequest::from_json(&mut Fields::new("", &v).unwrap()).unwrap();
        // tan θ = n_e/n_o at the maximum-walk-off cut (Born & Wolf §15.3).
        let ix = r.medium.indices(r.wavelength).unwrap();
        assert!((r.cut_tilt_deg.to_radians().tan() - ix.ne / ix.no).abs() < 1e-12);
        assert_eq!(r.middle, Middle::HalfWave);
    }
}

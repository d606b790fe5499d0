//! The polarizer request: two prisms of one uniaxial crystal across a thin gap of air or cement,
//! one mode totally reflected at the gap and the other passed.

use super::{parse_medium, temperature_field, wavelength_field};
use crate::contract::fields::Fields;
use crate::contract::scenario::Medium;
use crate::error::{Error, above, in_range};
use crate::optics::wavelength::Wavelength;

/// A polarizer request.
#[derive(Debug, Clone, PartialEq)]
pub struct PolarizerRequest {
    /// Crystal of both prisms.
    pub medium: Medium,
    /// Design wavelength.
    pub wavelength: Wavelength,
    /// Index of the cement in the gap; `None` for an air gap (the outside medium, index 1).
    pub cement_index: Option<f64>,
    /// Clear aperture, mm.
    pub aperture_mm: f64,
    /// The temperature the part is designed to work at, °C (`temperature_c`, default 20):
    /// its indices are taken there and its thickness grown to it; thicknesses are quoted at 20 °C.
    pub temperature_c: f64,
}

impl PolarizerRequest {
    /// Reads a request object (`"kind": "prism-polarizer"` checked by the caller).
    ///
    /// # Errors
    /// The path of the first offending field.
    pub fn from_json(f: &mut Fields) -> Result<PolarizerRequest, Error> {
        let medium = parse_medium(f)?;
        let wavelength = wavelength_field(f)?;
        let cement_index = f
            .number("cement_index")?
            .map(|n| in_range("cement_index", n, 1.0, 3.0))
            .transpose()?;
        let aperture_mm = above("aperture_mm", f.number_or("aperture_mm", 10.0)?, 0.0, 1e3)?;
        Ok(PolarizerRequest {
            medium,
            wavelength,
            cement_index,
            aperture_mm,
            temperature_c: temperature_field(f)?,
        })
    }

    /// Index of the gap: the cement's, or 1 (air).
    pub fn gap_index(&self) -> f64 {
        self.cement_index.unwrap_or(1.0)
    }
}

#[cfg(test)]
mod tests {
    use super::super::first_error;
    use super::*;

    #[test]
    fn polarizer_fields_name_themselves() {
        for (doc, field) in [
            (r#"{"material": "calcite", "cement_index": 4}"#, "cement_index"),
            (r#"{"material": "calcite", "aperture_mm": 0}"#, "aperture_mm"),
            (r#"{"material": "calcite", "gap": 1}"#, "gap"),
        ] {
            assert_eq!(first_error(doc, PolarizerRequest::from_json).field, field, "{doc}");
        }
    }
}

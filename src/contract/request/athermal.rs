//! The athermal waveplate request: two crystals (`first`, `second`) whose plates together give a
//! target retardance at one wavelength with no first-order change with temperature.

use super::{PlateCrystal, temperature_field, two_plates, wavelength_field};
use crate::contract::fields::Fields;
use crate::contract::request::waveplate::DEFAULT_ACCEPTANCE_ERROR_WAVES;
use crate::error::{Error, in_range};
use crate::optics::wavelength::Wavelength;

/// An athermal waveplate request.
#[derive(Debug, Clone, PartialEq)]
pub struct AthermalRequest {
    /// First plate: its crystal and, for a biaxial crystal, its cut.
    pub a: PlateCrystal,
    /// Second plate.
    pub b: PlateCrystal,
    /// Target retardance, waves.
    pub retardance_waves: f64,
    /// Design wavelength.
    pub wavelength: Wavelength,
    /// Retardance error that bounds the temperature band, waves.
    pub acceptance_error_waves: f64,
    /// The temperature the part is designed to work at, °C (`temperature_c`, default 20):
    /// its indices are taken there and its thickness grown to it; thicknesses are quoted at 20 °C.
    pub temperature_c: f64,
}

impl AthermalRequest {
    /// Reads a request object (`"kind": "athermal-waveplate"` checked by the caller): `first` and
    /// `second` hold a `material` (or `no`/`ne`, or `nx`/`ny`/`nz`) each and, for a biaxial crystal,
    /// an optional `cut` (as a waveplate's).
    ///
    /// # Errors
    /// The path of the first offending field.
    pub fn from_json(f: &mut Fields) -> Result<AthermalRequest, Error> {
        let (a, b) = two_plates(f)?;
        Ok(AthermalRequest {
            a,
            b,
            retardance_waves: in_range("retardance_waves", f.required_number("retardance_waves")?, 1e-6, 1e4)?,
            wavelength: wavelength_field(f)?,
            acceptance_error_waves: in_range(
                "acceptance_error_waves",
                f.number_or("acceptance_error_waves", DEFAULT_ACCEPTANCE_ERROR_WAVES)?,
                1e-9,
                0.5,
            )?,
            temperature_c: temperature_field(f)?,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::super::first_error;
    use super::*;

    #[test]
    fn bad_requests_name_their_field() {
        for (doc, field) in [
            (r#"{"second": {"material": "mgf2"}, "retardance_waves": 0.25}"#, "first"),
            (
                r#"{"first": {"material": "quartz"}, "second": {"material": "glass"}, "retardance_waves": 0.25}"#,
                "second.material",
            ),
            // A cut is a biaxial plate's: refused for quartz, and only x, y or z.
            (
                r#"{"first": {"material": "quartz", "cut": "x"}, "second": {"material": "ktp"}, "retardance_waves": 0.25}"#,
                "first.cut",
            ),
            (
                r#"{"first": {"material": "quartz"}, "second": {"material": "ktp", "cut": "w"}, "retardance_waves": 0.25}"#,
                "second.cut",
            ),
            (
                r#"{"first": {"material": "quartz"}, "second": {"material": "mgf2"}, "retardance_waves": 0}"#,
                "retardance_waves",
            ),
            (
                r#"{"first": {"material": "quartz"}, "second": {"material": "mgf2"}, "retardance_waves": 0.25, "acceptance_error_waves": 1}"#,
                "acceptance_error_waves",
            ),
        ] {
            let e = first_error(doc, AthermalRequest::from_json);
            assert_eq!(e.field, field, "{doc}: {e}");
        }
    }
}
